"""Rules of application a checking engineer relies on (each names its basis)."""

from __future__ import annotations

import pytest

from conftest import design_row
from timbersheets.job.results import member_json

PURLIN = dict(type="bending", material="sawn", species="S-P-F", grade="No.1/No.2", size="38x184", K_H="1.1",
              length="3.2", w_D="0.46", w_S="1.16", Ly="", P_D="", Lu="0")


def bending(d, combination="1.25D + 1.5S"):
    return next(c for c in d.checks if c.check == "bending" and c.combination == combination)


def test_partial_lateral_support_is_not_taken_as_purlins(tmp_path, data):
    # Depth-to-width rule (notes §4.3, memory): d/b ≤ 5.0 needs the member held in line by purlins or
    # tie rods. An unsupported length short of the span is not that: K_L is computed from L_u.
    # Hand calculation at L_u = 3.1 m: L_e = 1.92·3100 = 5952 mm; C_B = √(5952·184/38²) = 27.5 > C_K = 22.0;
    # K_L = 0.65·6500/(27.5²·12.98) = 0.430.
    d = design_row(tmp_path, data, **dict(PURLIN, Lu="3.1"))
    assert bending(d).factors["K_L"] == pytest.approx(0.430, abs=0.005)
    held = design_row(tmp_path, data, **dict(PURLIN, Lu="3.1", restraint="purlins"))
    assert bending(held).factors["K_L"] == 1.0  # d/b = 4.84 ≤ 5.0 with purlins stated


def test_the_rule_cited_is_the_restraint_provided(tmp_path, data):
    d = design_row(tmp_path, data, **dict(PURLIN, Lu="0"))
    text = " ".join(s.caption for c in d.checks if c.check == "bending" for s in c.steps)
    text += " ".join(str(v) for v in d.checks[0].factors)
    from timbersheets.sheet.sections import Sheet

    block = Sheet(d, data, {"nbc": "2020", "o86": "2019"}).checks_section().markdown.replace("\\", "")
    # d/b = 184/38 = 4.84, under the 6.5 limit of the decking rule (notes §4.3, memory), not the purlins rule
    sentence = next(s for s in block.split(";") if "d/b = 4.84" in s)
    assert "≤ 6.5, the limit with compression edge held in line by direct connection of decking" in sentence
    assert "purlins" not in sentence


def test_axial_resistance_takes_at_most_the_tabled_system_factor(tmp_path, data):
    # O86 Table 6.4.4 (notes §3.4, memory): Case 2 K_H up to 1.4 for bending and shear, 1.1 for
    # compression and tension.
    d = design_row(tmp_path, data, size="140x140", grade="No.2", K_H="1.4", P_D="10", P_L="20", Ly="")
    c = d.checks[0]
    assert c.factors["K_H"] == pytest.approx(1.1)
    assert any("compression takes K_H = 1.1" in w for w in d.warnings)


@pytest.mark.parametrize("cells,column", [
    (dict(K_H="1.6"), "K_H"),
    (dict(material="glulam", species="DFL", grade="16c-E", size="175x228", K_H="1.1"), "K_H"),
])
def test_system_factor_limits(tmp_path, data, cells, column):
    from conftest import member_row, write_schedule
    from timbersheets.schedule.read import load_schedule

    s = load_schedule(write_schedule(tmp_path, [member_row(**cells)]))
    assert s.rejected and f"column '{column}'" in str(s.rejected[0].errors[0])


def test_no_bearing_check_from_frame_model_forces(tmp_path, data):
    # With M and V from a frame model the support reactions are not known (at an interior support the
    # reaction is the sum of the shears each side): common practice is to check bearing on reactions.
    d = design_row(tmp_path, data, **dict(PURLIN, Lu="0", w_D="", w_S="", M_D="1.2", V_D="1.5", bearing="64"))
    assert not [c for c in d.checks if c.check == "bearing"]
    assert any("bearing not checked" in w for w in d.warnings)


def test_beam_column_braced_about_x_is_a_clear_error(tmp_path, data):
    d = design_row(tmp_path, data, type="beam-column", size="89x89", Lx="0", Ly="", Lu="3.0", P_D="2", w_W="0.4")
    assert d.status == "error" and "Lx = 0" in d.errors[0]


def test_deflection_has_no_load_duration_factor(tmp_path, data):
    d = design_row(tmp_path, data, **dict(PURLIN, Lu="0"))
    doc = member_json(d)
    assert all(c["K_D"] is None for c in doc["checks"] if c["check"].startswith("deflection"))
    assert all(c["K_D"] is not None for c in doc["checks"] if not c["check"].startswith("deflection"))


def test_a_beam_with_wind_says_its_wind_deflection_is_not_checked(tmp_path, data):
    # Conservative reading: the SLS combinations here are gravity loads only, so a roof purlin with wind
    # uplift has no wind deflection check, and its sheet must say so (as a beam-column's does).
    d = design_row(tmp_path, data, **dict(PURLIN, Lu="0", w_W="-0.55"))
    assert d.status != "error", d.errors
    assert {c.check for c in d.checks} >= {"deflection-live", "deflection-total"}
    assert any("deflection under the W line load is not checked" in w for w in d.warnings)
    quiet = design_row(tmp_path, data, **dict(PURLIN, Lu="0"))
    assert not any("line load is not checked" in w for w in quiet.warnings)
