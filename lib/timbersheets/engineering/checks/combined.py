"""Combined axial load and bending (CSA O86-14 6.5.10 / 7.5.12 with compression,
6.5.11 / 7.5.13 with tension; clause numbers as O86-14, memory, unverified).

Beam-column (compression with strong-axis bending):
    (P_f / P_r)² + (M_f / M_r) · 1 / (1 − P_f / P_E) ≤ 1,
    P_E = π² E05 K_SE K_T I_x / (K_e L_x)²  (Euler load about the bending axis),
with P_r the lower of the two axes' resistances and M_r as for a bending member,
both under the same K_D, that of the combination. P_f ≥ P_E is a failure of the
member, reported as such, never a negative amplifier.

Tension with bending: the tension face, T_f / T_r + M_f / M_r ≤ 1; and, where the
bending stress exceeds the axial tension, the compression face,
(M_f − T_f·d/6) / M_r ≤ 1 (net compression stress over the bending resistance,
with its lateral stability factor K_L). The larger governs. Taking M_r with K_L
on the tension face too is conservative; we keep one M_r so one equation shows.
"""

from __future__ import annotations

from math import pi

from ...errors import DesignError
from ..calc import calc
from . import CheckResult, Step, result
from .context import Context, inputs

BEAM_COLUMN_CLAUSE = "O86-14 6.5.10"
GLULAM_BEAM_COLUMN_CLAUSE = "O86-14 7.5.12"
TENSION_BENDING_CLAUSE = "O86-14 6.5.11"
GLULAM_TENSION_BENDING_CLAUSE = "O86-14 7.5.13"


@calc(units={"E_05": "MPa", "K_SE": "", "K_T": "", "I_x": "mm**4", "K_e": "", "L_x": "mm", "P_E": "N"},
      clause=BEAM_COLUMN_CLAUSE)
def euler_load(E_05, K_SE, K_T, I_x, K_e, L_x):
    P_E = pi**2 * E_05 * K_SE * K_T * I_x / (K_e * L_x) ** 2
    return locals()


@calc(units={"P_f": "N", "P_r": "N", "M_f": "N*mm", "M_r": "N*mm", "P_E": "N", "A_m": "", "I_c": ""},
      clause=BEAM_COLUMN_CLAUSE)
def beam_column(P_f, P_r, M_f, M_r, P_E):
    A_m = 1 / (1 - P_f / P_E)
    I_c = (P_f / P_r) ** 2 + (M_f / M_r) * A_m
    return locals()


@calc(units={"T_f": "N", "T_r": "N", "M_f": "N*mm", "M_r": "N*mm", "d": "mm", "I_t": "", "I_cs": "", "I_tb": ""},
      clause=TENSION_BENDING_CLAUSE)
def tension_bending(T_f, T_r, M_f, M_r, d):
    I_t = T_f / T_r + M_f / M_r
    I_cs = (M_f - T_f * d / 6) / M_r
    I_tb = max(I_t, I_cs)
    return locals()


def check_beam_column(m: Context, case, P_f: float, P_r: float, M_f: float, M_r: float) -> CheckResult:
    """The interaction of axial compression P_f (N) and moment M_f (N·mm) under one case."""
    clause = GLULAM_BEAM_COLUMN_CLAUSE if m.glulam else BEAM_COLUMN_CLAUSE
    if m.L_x <= 0:
        raise DesignError(m.mark, "Lx = 0 (braced about the strong axis) leaves no Euler load about the bending axis",
                          clause, "Give Lx, the unbraced length about x")
    given = inputs(E_05=m.f["E05"], K_SE=m.K_S["K_SE"], K_T=m.K_T, I_x=m.section.I_x, K_e=m.K_e, L_x=m.L_x)
    euler = euler_load(**given.values)
    if P_f >= euler["P_E"]:
        raise DesignError(m.mark, f"P_f = {P_f / 1000:.1f} kN reaches the Euler load P_E = {euler['P_E'] / 1000:.1f} kN "
                          f"about the x axis under {case.label}: the member buckles and cannot carry the moment",
                          clause, "Choose a deeper section or brace the strong axis")
    values = beam_column(P_f=P_f, P_r=P_r, M_f=abs(M_f), M_r=M_r, P_E=euler["P_E"])
    steps = (Step(euler_load, euler, "Euler buckling load about the bending axis (x)"),
             Step(beam_column, values, "Interaction, with the moment amplifier A_m = 1/(1 − P_f/P_E)"))
    return result("interaction", case, values["I_c"], 1.0, "", clause, steps, "I_c", "1", used=given.used)


def check_tension_bending(m: Context, case, T_f: float, T_r: float, M_f: float, M_r: float) -> CheckResult:
    """The interaction of axial tension T_f (N) and moment M_f (N·mm) under one case."""
    clause = GLULAM_TENSION_BENDING_CLAUSE if m.glulam else TENSION_BENDING_CLAUSE
    values = tension_bending(T_f=T_f, T_r=T_r, M_f=abs(M_f), M_r=M_r, d=m.section.d)
    steps = (Step(tension_bending, values, "Tension face (I_t) and compression face (I_cs); the larger governs"),)
    return result("interaction", case, values["I_tb"], 1.0, "", clause, steps, "I_tb", "1")
