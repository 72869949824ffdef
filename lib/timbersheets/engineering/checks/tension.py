"""Tension parallel to grain (CSA O86-14 6.5.9 sawn, 7.5.11 glulam).

Clause numbers follow the O86-14 numbering (memory, unverified); where O86:19
is known to have revised a clause, the sheet lists it (edition.py).
"""

from __future__ import annotations

from ..calc import calc
from . import CheckResult, Step, result
from .context import Context, inputs

SAWN_CLAUSE = "O86-14 6.5.9"
GLULAM_CLAUSE = "O86-14 7.5.11"


@calc(units={"f_t": "MPa", "K_D": "", "K_H": "", "K_St": "", "K_T": "", "F_t": "MPa",
             "phi": "", "A_n": "mm**2", "K_Zt": "", "T_r": "N"}, clause=SAWN_CLAUSE)
def sawn_tension(f_t, K_D, K_H, K_St, K_T, phi, A_n, K_Zt):
    F_t = f_t * (K_D * K_H * K_St * K_T)
    T_r = phi * F_t * A_n * K_Zt
    return locals()


@calc(units={"f_tn": "MPa", "f_tg": "MPa", "K_D": "", "K_H": "", "K_St": "", "K_T": "",
             "F_tn": "MPa", "F_tg": "MPa", "phi": "", "A_n": "mm**2", "A_g": "mm**2",
             "T_rn": "N", "T_rg": "N", "T_r": "N"}, clause=GLULAM_CLAUSE)
def glulam_tension(f_tn, f_tg, K_D, K_H, K_St, K_T, phi, A_n, A_g):
    F_tn = f_tn * (K_D * K_H * K_St * K_T)
    F_tg = f_tg * (K_D * K_H * K_St * K_T)
    T_rn = phi * F_tn * A_n
    T_rg = phi * F_tg * A_g
    T_r = min(T_rn, T_rg)
    return locals()


def check_tension(m: Context, case, T_f: float) -> CheckResult:
    """Factored tensile resistance T_r against T_f (N) under one load case.

    Sawn: T_r = φ F_t A_n K_Zt. Glulam: the lesser of φ F_tn A_n (net section)
    and φ F_tg A_g (gross section). The result carries every Datum read.
    """
    common = dict(K_D=case.K_D, K_H=m.K_H_for("tension"), K_St=m.K_S["K_St"], K_T=m.K_T, phi=m.phi["tension"],
                  A_n=m.A_n)
    if m.glulam:
        given = inputs(**common, f_tn=m.f["f_tn"], f_tg=m.f["f_tg"], A_g=m.section.A)
        calc_, clause = glulam_tension, GLULAM_CLAUSE
    else:
        given = inputs(**common, f_t=m.f["f_t"], K_Zt=m.tension_size_factor)
        calc_, clause = sawn_tension, SAWN_CLAUSE
    values = calc_(**given.values)
    steps = (Step(calc_, values),)
    notes = given.notes
    if "net_area" not in m.member.given:  # the favourable reading: say it, so the checker can refuse it
        notes += (NET_AREA_NOT_GIVEN,)
    return result("tension", case, T_f, values["T_r"], "N", clause, steps, "T_f", "T_r", used=given.used,
                  notes=notes)


NET_AREA_NOT_GIVEN = ("net area not given (net_area blank): A_n is taken as the gross area, with no holes or "
                      "notches; give net_area where the connections remove wood")
