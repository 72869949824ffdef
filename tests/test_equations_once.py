"""An equation lives once, in its Calc: the diagram, the forces table and the bearing check use the
analysis module's Calcs, and the sheet prints those Calcs (no hand-typed copy)."""

from __future__ import annotations

import pytest

from timbersheets.engineering.analysis import member_forces, span_diagram, udl_moment, udl_reaction, udl_shear
from timbersheets.engineering.checks.bearing import check_bearing

from conftest import design_row


def test_span_diagram_by_hand():
    # hand calculation, w = 2 N/mm on L = 6000 mm, d = 200 mm:
    # V(0) = wL/2 = 2 × 6000 / 2 = 6000 N; V(L) = −6000 N; V_fd = w (L/2 − d) = 2 × 2800 = 5600 N;
    # M(L/2) = w L²/8 = 2 × 36e6 / 8 = 9.0e6 N·mm; M(0) = M(L) = 0
    span = span_diagram(2.0, 6000.0, 200.0)
    assert span.V[0] == pytest.approx(6000.0) and span.V[-1] == pytest.approx(-6000.0)
    assert span.V_f == pytest.approx(6000.0) and span.V_fd == pytest.approx(5600.0)
    assert span.M_f == pytest.approx(9.0e6) and span.M[len(span.M) // 2] == pytest.approx(9.0e6)
    assert span.M[0] == pytest.approx(0.0) and span.M[-1] == pytest.approx(0.0, abs=1e-6)
    assert max(span.M) == pytest.approx(span.M_f)


def test_bearing_renders_the_reaction_the_forces_computed(tmp_path, data):
    # the reaction step of the bearing check is the analysis Calc the forces came from, not a copy
    d = design_row(tmp_path, data, type="bending", size="38x235", length="3.4", Lu="0", bearing="89", P_D="",
                   w_D="0.5", w_L="1.5")
    assert not d.errors, d.errors
    bearing = [c for c in d.checks if c.check == "bearing"]
    assert bearing and all(c.steps[0].calc is udl_reaction for c in bearing)
    ctx = d.context
    forces = member_forces(ctx.member, ctx.section.d, d.cases[0], "line")
    assert {calc for calc, _ in forces.steps.values()} >= {udl_moment, udl_shear, udl_reaction}
    # hand calculation, 1.4D: Q_f = 1.4 × 0.5 kN/m × 3.4 m / 2 = 1.19 kN (self_weight = no)
    assert forces.case.label == "1.4D" and forces.steps["reaction"][1]["Q_f"] == pytest.approx(1190.0)
    assert check_bearing(ctx, forces, True).demand == pytest.approx(1.19)  # shown in kN


def test_formula_is_the_calc_source():
    # the symbols a sheet prints before its table come from the same source as the values
    assert r"\frac{ L }{ 2 }" in udl_reaction.formula_lines() and "Q_{f}" in udl_reaction.inline("Q_f")
    assert "V_{fd}" in udl_shear.formula() and "V_{f} &=" in udl_shear.formula_lines()
