"""Bearing: compression perpendicular to grain at the supports
(CSA O86-14 6.5.7 sawn, 7.5.9 glulam).

Sawn:   Q_r = φ F_cp A_b K_B K_Zcp,  F_cp = f_cp (K_D K_Scp K_T)   [form: S1]
Glulam: Q_r = φ F_cp A_b K_B
A_b = b l_b with l_b the row's `bearing`. K_B = 1.0 at end supports: the
length-of-bearing factor applies only to bearings at least 75 mm from the end
of the member, and a simple span's supports are at its ends (K_B_end in
data/clause_values.csv; the K_B table, bearing_factors.csv, is informative). K_Zcp from the
width-to-depth ratio (data/bearing_size_factors.csv; memory, unverified).
The demand is the support reaction; combinations that lift the member off its
supports (negative reaction) have no bearing demand. The glulam clause number
is from memory.
"""

from __future__ import annotations

from ..calc import calc, format_number
from . import CheckResult, NotChecked, Step, result
from .context import Context, Reading, inputs

SAWN_CLAUSE = "O86-14 6.5.7"
GLULAM_CLAUSE = "O86-14 7.5.9"

_UNITS = {"f_cp": "MPa", "K_D": "", "K_Scp": "", "K_T": "", "F_cp": "MPa", "phi": "", "b": "mm", "l_b": "mm",
          "A_b": "mm**2", "K_B": "", "Q_r": "N"}


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


def check_bearing(m: Context, forces, line_loads: bool) -> CheckResult | NotChecked | None:
    """Bearing resistance at each support against the reaction; NotChecked when the row does not allow
    it, None when there is no bearing demand (uplift)."""
    if m.member.bearing is None:
        return NotChecked("bearing", ("bearing at the supports not checked: the row gives no bearing length (column "
                                      "'bearing'); give it to check compression perpendicular to grain",))
    if forces.R_f <= 0:
        return None
    model = getattr(forces, "where", "")
    if not line_loads and not model:
        return NotChecked("bearing", ("bearing not checked: with moments and shears from a frame model the support "
                                      "reactions are not known (at an interior support the reaction is the sum of the "
                                      "shears on both sides)",))
    case, s = forces.case, m.section
    width = m.member.bearing_width or s.b
    k_b = m.data.clause_value("K_B_end")  # K_B applies only to bearings at least 75 mm from the member's end
    read = inputs(f_cp=m.f["f_cp"], K_D=case.K_D, K_Scp=m.K_S["K_Scp"], K_T=m.K_T, phi=m.phi["bearing"],
                  b=width, l_b=m.member.bearing, K_B=k_b)
    common, used = read.values, [k_b, *read.used]  # in the order read: the unverified list keeps first sight
    words = (f"K_B = {k_b.value:.1f}: the supports are at the member's ends, and K_B applies only to bearings "
             "at least 75 mm from the end")
    if m.member.bearing_width:
        words += f"; b = {width:g} mm, the bearing width the row gives (narrower than the member)"
    if m.glulam:
        values = glulam_bearing(**common)
        calc_, clause = glulam_bearing, GLULAM_CLAUSE
    else:
        ratio = s.b / s.d
        k_zcp, datums = m.data.bearing_size_factor(ratio)
        used += datums
        values = sawn_bearing(K_Zcp=k_zcp, **common)
        calc_, clause = sawn_bearing, SAWN_CLAUSE
        words += f"; K_Zcp = {format_number(k_zcp)} for width/depth b/d = {ratio:.2f}"
    if model:
        words = (f"Factored reaction Q_f = {forces.R_f / 1000:.1f} kN at {model} (beam model, section 3); "
                 f"K_B = {k_b.value:.1f} at every support: it applies only to bearings at least 75 mm from the member's end, "
                 f"and 1.0 is on the safe side at interior supports{words.partition('from the end')[2]}")
        steps = [Step(calc_, values, words)]
    else:
        steps = [Step(*forces.steps["reaction"], "Factored reaction at each support"), Step(calc_, values, words)]
    return result("bearing", case, forces.R_f, values["Q_r"], "N", clause, tuple(steps), "Q_f", "Q_r",
                  used=tuple(used))


@calc(units={"f_cp": "MPa", "K_D": "", "K_Scp": "", "F_cp": "MPa", "phi": "", "b": "mm", "d": "mm", "A_b": "mm**2",
             "K_B": "", "K_Zcp": "", "Q_r": "N"}, clause=SAWN_CLAUSE)
def support_bearing(f_cp, K_D, K_Scp, phi, b, d, K_B, K_Zcp):
    F_cp = f_cp * (K_D * K_Scp)
    A_b = b * d
    Q_r = phi * F_cp * A_b * K_B * K_Zcp
    return locals()


def check_support_bearing(m: Context, case, P_f: float) -> CheckResult | NotChecked:
    """Compression perpendicular to grain in the timber a column bears on (`bears_on`), or NotChecked.

    The support's size is not in the schedule, so the factors that depend on it take their least value:
    f_cp the lowest of the size categories, K_Scp the lower of them, K_B = 1.0 and K_Zcp = 1.0. The
    bearing area is the column's end, b × d. A blank bears_on, steel or concrete leave a note instead."""
    from ..materials import parse_support, support_f_cp

    text = m.member.bears_on
    if not text:
        note = ("bearing on the support was not checked: the row does not say what the column bears on (give "
                "bears_on: the supporting timber as 'sawn|glulam <species> <grade>', or steel, concrete)")
    elif text in ("steel", "concrete"):
        note = (f"the column bears on {text}: the bearing resistance of the {text} support (plate or bearing "
                "area) is outside this tool and must be checked to its own standard")
    else:
        note = ""
    if note:
        return NotChecked("bearing", (note,))
    material, species, grade = parse_support(text)
    f_cp = support_f_cp(m.data, material, species, grade)
    categories = ("all",) if material == "glulam" else ("small", "timber")
    k_scp = min((m.data.service_factor(material, c, "K_Scp", m.member.service) for c in categories),
                key=lambda d: d.value)
    k_b = m.data.clause_value("K_B_end")
    k_zcp = m.data.bearing_size_factor(0.0)  # the least tabled value: the support's width and depth are not given
    s = m.section
    read = inputs(f_cp=f_cp, K_D=case.K_D, K_Scp=k_scp, phi=m.phi["bearing"], b=s.b, d=s.d, K_B=k_b,
                  K_Zcp=Reading(k_zcp[0], tuple(k_zcp[1])))
    used = (f_cp, k_scp, k_b, *k_zcp[1], *read.used)  # in the order read
    values = support_bearing(**read.values)
    words = (f"Bearing of the column end on the {text} support: f_cp of the support (the lowest of its size "
             f"categories, its size not being given); A_b the column end, b × d; K_B = {k_b.value:.1f} and K_Zcp = "
             f"{k_zcp[0]:.1f}, the "
             "least values, since where the column sits on the support and the support's size are not given; "
             "the support untreated (K_T = 1.0)")
    return result("bearing", case, P_f, values["Q_r"], "N", GLULAM_CLAUSE if material == "glulam" else SAWN_CLAUSE,
                  (Step(support_bearing, values, words),), "P_f", "Q_r", used=used)
