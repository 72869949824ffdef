"""Shear resistance (CSA O86-14 6.5.5 sawn, 7.5.7 glulam).

Sawn:   V_r = φ F_v (2/3) A_n K_Zv,  F_v = f_v (K_D K_H K_Sv K_T).
Glulam: (a) V_r = φ F_v (2/3) A_n K_N, for members of volume Z under 2.0 m³;
        (b) W_r = φ F_v 0.48 A_g K_N C_V Z^-0.18 against the total factored load W_f.
Either glulam method is permitted: both are shown and the more favourable is
used. Method (b) needs the total load on the span, so in the given-forces
mode only (a) is available. K_N = 1.0: members are not notched at the supports.

Under line loads the shear checked is V_f at distance d from the end of the
design span (S1 practice: V_fd = V_f − w_f d), which lies on the safe side of
measuring d from the support face. Clause numbers follow the O86-14 numbering;
the glulam method (b) form, C_V and the 2.0 m³ limit are from memory
(reference notes §4.5), flagged through their data rows.
"""

from __future__ import annotations

from dataclasses import replace

from ...errors import DesignError
from ..calc import calc, format_metres, format_number
from . import CheckResult, Step, result
from .bending import sawn_size_factors
from .context import Context, Inputs, inputs

SAWN_CLAUSE = "O86-14 6.5.5"
GLULAM_CLAUSE = "O86-14 7.5.7"
NO_NOTCH = 1.0  # K_N of a member not notched at its supports

_STRENGTH = {"f_v": "MPa", "K_D": "", "K_H": "", "K_Sv": "", "K_T": "", "F_v": "MPa", "phi": "", "A_n": "mm**2"}


@calc(units={**_STRENGTH, "K_Zv": "", "V_r": "N"}, clause=SAWN_CLAUSE)
def sawn_shear(f_v, K_D, K_H, K_Sv, K_T, phi, A_n, K_Zv):
    F_v = f_v * (K_D * K_H * K_Sv * K_T)
    V_r = phi * F_v * (2 / 3) * A_n * K_Zv
    return locals()


@calc(units={**_STRENGTH, "K_N": "", "V_r": "N"}, clause=GLULAM_CLAUSE)
def glulam_shear_area(f_v, K_D, K_H, K_Sv, K_T, phi, A_n, K_N):
    F_v = f_v * (K_D * K_H * K_Sv * K_T)
    V_r = phi * F_v * (2 / 3) * A_n * K_N
    return locals()


@calc(units={"phi": "", "F_v": "MPa", "A_g": "mm**2", "K_N": "", "C_V": "", "Z": "m**3", "W_r": "N"},
      clause=GLULAM_CLAUSE)
def glulam_shear_load(phi, F_v, A_g, K_N, C_V, Z):
    W_r = phi * F_v * 0.48 * A_g * K_N * C_V * Z ** (-0.18)
    return locals()


def _demand_step(forces, line_loads: bool) -> list[Step]:
    if not line_loads:
        return []
    return [Step(*forces.steps["shear"], "Factored shear at the support, V_f, and at distance d from the end of "
                 "the span, V_fd, which is the shear checked (on the safe side of d from the support face)")]


def check_shear(m: Context, forces, line_loads: bool) -> CheckResult:
    """Factored shear resistance against the factored shear of one combination."""
    case = forces.case
    common = inputs(f_v=m.f["f_v"], K_D=case.K_D, K_H=m.K_H, K_Sv=m.K_S["K_Sv"], K_T=m.K_T, phi=m.phi["shear"],
                    A_n=m.A_n)
    given = "" if line_loads else "Shear V_f from the frame model, used as given (no reduction at d). "
    if getattr(forces, "where", ""):
        given = (f"Largest factored shear at or beyond d from the supports, from the beam model ({forces.where}). ")
    if not m.glulam:
        kzb, kzv = sawn_size_factors(m)
        values = sawn_shear(K_Zv=kzv.value, **common.values)
        ply = "for one ply, " if m.section.plies > 1 else "for "
        steps = _demand_step(forces, line_loads) + [
            Step(sawn_shear, values, f"{given}Size factor {ply}{m.section.ply_b:g} × {m.section.d:g} mm: "
                 f"K_Zv = {format_number(kzv.value)}")]
        return result("shear", case, forces.V_fd, values["V_r"], "N", SAWN_CLAUSE, tuple(steps), "V_fd" if line_loads
                      else "V_f", "V_r", used=(*common.used, kzb, kzv))
    return _glulam_shear(m, forces, line_loads, common, given)


def _glulam_shear(m: Context, forces, line_loads: bool, read: Inputs, given: str) -> CheckResult:
    case, s = forces.case, m.section
    common = read.values
    volume = s.A * m.length * 1e-9  # mm³ → m³
    z_max = replace(m.data.glulam_factor("shear_method_a_volume_max"), symbol="Z_max")
    used = [*read.used, z_max]
    options = []  # (utilization, demand, resistance, symbols, steps)
    words = (f"Z = b d L = {format_metres(s.b)} × {format_metres(s.d)} × {format_metres(m.length)} m "
             f"= {volume:.3f} m³")
    area = glulam_shear_area(K_N=NO_NOTCH, **common)
    if volume < z_max.value:
        steps = [Step(glulam_shear_area, area, f"Method (a), permitted as {words} < {z_max.value:g} m³")]
        options.append((abs(forces.V_fd) / area["V_r"], forces.V_fd, area["V_r"], ("V_fd" if line_loads else "V_f",
                                                                                    "V_r"), steps))
    if line_loads:
        c_v = replace(m.data.glulam_factor("C_V_simple_span_udl"), symbol="C_V")
        used.append(c_v)
        load = glulam_shear_load(phi=common["phi"], F_v=area["F_v"], A_g=s.A, K_N=NO_NOTCH, C_V=c_v.value, Z=volume)
        steps = [Step(*forces.steps["total"], "Method (b): total factored load on the span"),
                 Step(glulam_shear_load, load, f"{words}; C_V for a simple span under uniform load")]
        options.append((abs(forces.W_f) / load["W_r"], forces.W_f, load["W_r"], ("W_f", "W_r"), steps))
    if not options:
        raise DesignError(m.mark, f"member volume {volume:.2f} m³ is at least {z_max.value:g} m³, so shear needs "
                          "method (b), which needs the total load on the span", GLULAM_CLAUSE,
                          "Give the line loads w_* instead of M_*, V_*")
    best = min(options, key=lambda o: o[0])
    if len(options) > 1:
        method = "(a)" if best is options[0] else "(b)"
        choice = (f"Both methods are permitted; both are shown and the more favourable, method {method}, is used "
                  f"(V_fd/V_r = {options[0][0]:.3f}, W_f/W_r = {options[1][0]:.3f}).")
    else:
        choice = "Method (a) only: method (b) needs the total load on the span." if not line_loads else \
            "Method (b) only: method (a) applies to members under the volume limit."
    steps = _demand_step(forces, line_loads) + [step for o in options for step in o[4]]
    steps[0] = replace(steps[0], caption=f"{given}{choice} {steps[0].caption}".strip())
    return result("shear", case, best[1], best[2], "N", GLULAM_CLAUSE, tuple(steps), *best[3], used=tuple(used))
