"""Bearing: compression perpendicular to grain at the supports
(CSA O86:19 6.5.7 sawn, 7.5.9 glulam).

Sawn:   Q_r = φ F_cp A_b K_B K_Zcp,  F_cp = f_cp (K_D K_Scp K_T)   [form: S1]
Glulam: Q_r = φ F_cp A_b K_B
A_b = b l_b with l_b the row's `bearing`. K_B = 1.0 at end supports: the
length-of-bearing factor applies only to bearings at least 75 mm from the end
of the member, and a simple span's supports are at its ends. K_Zcp from the
width-to-depth ratio (data/bearing_size_factors.csv; memory, unverified).
The demand is the support reaction; combinations that lift the member off its
supports (negative reaction) have no bearing demand. The glulam clause number
is from memory.
"""

from __future__ import annotations

from ..analysis import SPAN_CLAUSE
from ..calc import calc, format_number
from . import Step, result

SAWN_CLAUSE = "O86:19 6.5.7"
GLULAM_CLAUSE = "O86:19 7.5.9"
END_BEARING_K_B = 1.0  # K_B does not apply at the end of a member (bearing < 75 mm from the end)

_UNITS = {"f_cp": "MPa", "K_D": "", "K_Scp": "", "K_T": "", "F_cp": "MPa", "phi": "", "b": "mm", "l_b": "mm",
          "A_b": "mm**2", "K_B": "", "Q_r": "N"}


@calc(units={"w_f": "N/mm", "L": "mm", "Q_f": "N"}, clause=SPAN_CLAUSE)
def udl_reaction(w_f, L):
    Q_f = w_f * L / 2
    return locals()


@calc(units={**_UNITS, "K_Zcp": ""}, clause=SAWN_CLAUSE)
def sawn_bearing(f_cp, K_D, K_Scp, K_T, phi, b, l_b, K_B, K_Zcp):
    F_cp = f_cp * (K_D * K_Scp * K_T)
    A_b = b * l_b
    Q_r = phi * F_cp * A_b * K_B * K_Zcp
    return locals()


@calc(units=_UNITS, clause=GLULAM_CLAUSE)
def glulam_bearing(f_cp, K_D, K_Scp, K_T, phi, b, l_b, K_B):
    F_cp = f_cp * (K_D * K_Scp * K_T)
    A_b = b * l_b
    Q_r = phi * F_cp * A_b * K_B
    return locals()


def check_bearing(m, forces, line_loads: bool):
    """Bearing resistance at each support against the reaction, or None (no bearing given, or uplift)."""
    if m.member.bearing is None or forces.R_f <= 0:
        return None
    model = getattr(forces, "where", "")
    if not line_loads and not model:
        note = ("bearing not checked: with moments and shears from a frame model the support reactions are not "
                "known (at an interior support the reaction is the sum of the shears on both sides)")
        if note not in m.notes:
            m.notes.append(note)
        return None
    case, s = forces.case, m.section
    common = dict(f_cp=m.f["f_cp"], K_D=case.K_D, K_Scp=m.K_S["K_Scp"], K_T=m.K_T, phi=m.phi["bearing"],
                  b=s.b, l_b=m.member.bearing, K_B=END_BEARING_K_B)
    words = ("K_B = 1.0: the supports are at the member's ends, and K_B applies only to bearings at least 75 mm "
             "from the end")
    if m.glulam:
        values = glulam_bearing(**common)
        calc_, clause = glulam_bearing, GLULAM_CLAUSE
    else:
        ratio = s.b / s.d
        k_zcp, datums = m.data.bearing_size_factor(ratio)
        m.used += datums
        values = sawn_bearing(K_Zcp=k_zcp, **common)
        calc_, clause = sawn_bearing, SAWN_CLAUSE
        words += f"; K_Zcp = {format_number(k_zcp)} for width/depth b/d = {ratio:.2f}"
    if model:
        words = (f"Factored reaction Q_f = {forces.R_f / 1000:.1f} kN at {model} (beam model, section 3); "
                 "K_B = 1.0 at every support: it applies only to bearings at least 75 mm from the member's end, "
                 f"and 1.0 is on the safe side at interior supports{words.partition('from the end')[2]}")
        steps = [Step(calc_, values, words)]
    else:
        steps = [Step(udl_reaction, udl_reaction(w_f=forces.w_f, L=m.length), "Factored reaction at each support"),
                 Step(calc_, values, words)]
    return result("bearing", case, forces.R_f, values["Q_r"], "N", clause, tuple(steps), "Q_f", "Q_r")
