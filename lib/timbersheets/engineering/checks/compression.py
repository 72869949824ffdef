"""Compression parallel to grain with column stability (CSA O86-14 6.5.6 sawn,
7.5.8 glulam), about the strong (x) and weak (y) axis.

C_c = K_e L / d in the direction of buckling, at most C_c,max (data/clause_values.csv); K_C from the
slenderness; the lower P_r of the two axes governs. Clause numbers follow the
O86-14 numbering (memory, unverified). The size factors K_Zc (sawn) and K_Zcg
(glulam, on member volume) are the O86-14 forms (memory, unverified).
"""

from __future__ import annotations

from ...errors import DesignError
from ..calc import calc
from . import CheckResult, Step, result
from .context import Context, Inputs, inputs

SAWN_CLAUSE = "O86-14 6.5.6"
GLULAM_CLAUSE = "O86-14 7.5.8"

_SAWN = {"f_c": "MPa", "K_D": "", "K_H": "", "K_Sc": "", "K_T": "", "F_c": "MPa", "K_e": "",
         "E_05": "MPa", "K_SE": "", "phi": "", "A": "mm**2"}


@calc(units={"f_c": "MPa", "K_D": "", "K_H": "", "K_Sc": "", "K_T": "", "F_c": "MPa"}, clause=SAWN_CLAUSE)
def sawn_compression_strength(f_c, K_D, K_H, K_Sc, K_T):
    F_c = f_c * (K_D * K_H * K_Sc * K_T)
    return locals()


@calc(units={**_SAWN, "L_x": "mm", "d": "mm", "C_cx": "", "K_Zcx": "", "K_Cx": "", "P_rx": "N"},
      clause=SAWN_CLAUSE)
def sawn_compression_x(F_c, K_T, K_e, L_x, d, E_05, K_SE, phi, A):
    C_cx = K_e * L_x / d
    K_Zcx = min(6.3 * (d * L_x) ** (-0.13), 1.3)
    K_Cx = (1.0 + F_c * K_Zcx * C_cx**3 / (35 * E_05 * K_SE * K_T)) ** (-1)
    P_rx = phi * F_c * A * K_Zcx * K_Cx
    return locals()


@calc(units={**_SAWN, "L_y": "mm", "b": "mm", "C_cy": "", "K_Zcy": "", "K_Cy": "", "P_ry": "N"},
      clause=SAWN_CLAUSE)
def sawn_compression_y(F_c, K_T, K_e, L_y, b, E_05, K_SE, phi, A):
    C_cy = K_e * L_y / b
    K_Zcy = min(6.3 * (b * L_y) ** (-0.13), 1.3)
    K_Cy = (1.0 + F_c * K_Zcy * C_cy**3 / (35 * E_05 * K_SE * K_T)) ** (-1)
    P_ry = phi * F_c * A * K_Zcy * K_Cy
    return locals()


@calc(units={"f_c": "MPa", "K_D": "", "K_H": "", "K_Sc": "", "K_T": "", "F_c": "MPa", "b": "m", "d": "m", "L": "m",
             "Z": "m**3", "K_Zcg": ""}, clause=GLULAM_CLAUSE)
def glulam_compression_factors(f_c, K_D, K_H, K_Sc, K_T, b, d, L):
    F_c = f_c * (K_D * K_H * K_Sc * K_T)
    Z = b * d * L
    K_Zcg = min(0.68 * Z ** (-0.13), 1.0)
    return locals()


_GLULAM = {"F_c": "MPa", "K_Zcg": "", "K_e": "", "E_05": "MPa", "K_SE": "", "K_T": "", "phi": "", "A": "mm**2"}


@calc(units={**_GLULAM, "L_x": "mm", "d": "mm", "C_cx": "", "K_Cx": "", "P_rx": "N"}, clause=GLULAM_CLAUSE)
def glulam_compression_x(F_c, K_Zcg, K_e, L_x, d, E_05, K_SE, K_T, phi, A):
    C_cx = K_e * L_x / d
    K_Cx = (1.0 + F_c * K_Zcg * C_cx**3 / (35 * E_05 * K_SE * K_T)) ** (-1)
    P_rx = phi * F_c * A * K_Zcg * K_Cx
    return locals()


@calc(units={**_GLULAM, "L_y": "mm", "b": "mm", "C_cy": "", "K_Cy": "", "P_ry": "N"}, clause=GLULAM_CLAUSE)
def glulam_compression_y(F_c, K_Zcg, K_e, L_y, b, E_05, K_SE, K_T, phi, A):
    C_cy = K_e * L_y / b
    K_Cy = (1.0 + F_c * K_Zcg * C_cy**3 / (35 * E_05 * K_SE * K_T)) ** (-1)
    P_ry = phi * F_c * A * K_Zcg * K_Cy
    return locals()


def compression_resistance(m: Context, K_D: float) -> tuple[float, tuple[Step, ...], Inputs]:
    """P_r = min(P_rx, P_ry) in N under load-duration factor K_D, with its steps and the data it read.

    Raises DesignError when the slenderness C_c about either axis exceeds C_c,max (clause_values.csv).
    """
    given = inputs(f_c=m.f["f_c"], K_D=K_D, K_H=m.K_H_for("compression"), K_Sc=m.K_S["K_Sc"], K_T=m.K_T,
                   K_e=m.K_e, E_05=m.f["E05"], K_SE=m.K_S["K_SE"], phi=m.phi["compression"], A=m.section.A)
    common = dict(given.values)
    steps = []
    s = m.section
    if m.glulam:  # F_c and the volume size factor are the same about both axes: shown once
        shared = glulam_compression_factors(f_c=common.pop("f_c"), K_D=common.pop("K_D"), K_H=common.pop("K_H"),
                                            K_Sc=common.pop("K_Sc"), K_T=m.K_T, b=s.b / 1000, d=s.d / 1000,
                                            L=m.length / 1000)  # mm → m: Z in m³
        steps.append(Step(glulam_compression_factors, shared, "strength and size factor on the member volume Z, the same about both axes"))
        common.update(F_c=shared["F_c"], K_Zcg=shared["K_Zcg"])
        axes = ((glulam_compression_x, dict(L_x=m.L_x, d=s.d), "C_cx"),
                (glulam_compression_y, dict(L_y=m.L_y, b=s.b), "C_cy"))
    else:  # F_c is the same about both axes: shown once
        shared = sawn_compression_strength(f_c=common.pop("f_c"), K_D=common.pop("K_D"), K_H=common.pop("K_H"),
                                           K_Sc=common.pop("K_Sc"), K_T=m.K_T)
        steps.append(Step(sawn_compression_strength, shared, "strength, the same about both axes"))
        common["F_c"] = shared["F_c"]
        axes = ((sawn_compression_x, dict(L_x=m.L_x, d=s.d), "C_cx"),
                (sawn_compression_y, dict(L_y=m.L_y, b=s.b), "C_cy"))
    limits = []  # the slenderness limit, read once per axis checked
    for (calc_, geometry, slender), axis in zip(axes, ("x", "y"), strict=True):
        if min(v for k, v in geometry.items() if k.startswith("L_")) <= 0:
            continue  # braced about this axis over its whole length: no buckling about it
        values = calc_(**geometry, **common)
        limit = m.data.clause_value("C_c_max", m.member.material)
        limits.append(limit)
        if values[slender] > limit.value:
            raise DesignError(m.mark, f"slenderness C_c = {values[slender]:.1f} about the {axis} axis exceeds "
                              f"{limit.value:g}", GLULAM_CLAUSE if m.glulam else SAWN_CLAUSE,
                              "Brace the member or choose a larger section")
        caption = ("buckling about the strong axis x (across d)" if axis == "x"
                   else "buckling about the weak axis y (across b)")
        after_x = axis == "y" and steps[-1].calc is axes[0][0]
        same = after_x and s.b == s.d and m.L_y == m.L_x
        if same:
            caption += ": b = d and L_y = L_x, so every value is that about x"
        elif after_x:
            caption += ": the equations about x with b and L_y, in numbers"
        steps.append(Step(calc_, values, caption, same_as=axes[0][0] if same else None, numbers_only=after_x))
    resistances = [st.values.get("P_rx", st.values.get("P_ry")) for st in steps]
    if not any(r is not None for r in resistances):
        raise DesignError(m.mark, "is braced about both axes (Lx = Ly = 0); give the unbraced length of at least one")
    P_r = min(r for r in resistances if r is not None)
    return P_r, tuple(steps), Inputs(given.values, (*given.used, *limits), given.notes)


def check_compression(m: Context, case, P_f: float) -> CheckResult:
    """Factored compressive resistance against P_f (N) under one load case."""
    P_r, steps, given = compression_resistance(m, case.K_D)
    clause = GLULAM_CLAUSE if m.glulam else SAWN_CLAUSE
    return result("compression", case, P_f, P_r, "N", clause, steps, "P_f", "P_r", used=given.used,
                  notes=given.notes)
