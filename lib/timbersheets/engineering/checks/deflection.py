"""Deflection of a simply supported span under specified loads (serviceability).

Δ = 5 w_s L⁴ / (384 E_S I_x) with E_S = E (K_SE K_T) [S1], against the limit
L / n, n the row's span divisor (`defl_L` for live load, `defl_total` for the
total load; defaults 360 and 240). The SLS combinations are data
(data/sls_combinations.csv): live = 1.0L (+ 1.0S), total = 1.0D + 1.0L + 1.0S,
after the practice of the published example S1 (reference notes §5.3).
K_D does not apply to stiffness. Creep is not included (O86:19; O86:24 adds it).
"""

from __future__ import annotations

from dataclasses import replace

from ..analysis import SLS_CLAUSE, sls_deflection
from ..calc import format_number
from ..units import to_display
from . import CheckResult, Step, result
from .context import Context, inputs

NAMES = {"deflection-live": ("live", "defl_L"), "deflection-total": ("total", "defl_total")}


def check_deflection(m: Context, case, n_lim: float | None = None) -> CheckResult:
    """Deflection under one SLS combination `case` (:class:`~timbersheets.engineering.analysis.ServiceCase`); the result
    carries the combination's load factors and the stiffness data it read."""
    kind, column = NAMES[case.check]
    n_lim = n_lim if n_lim is not None else m.member.values[column]
    given = inputs(w_s=case.w_s, L=m.length, E=m.f["E"], K_SE=m.K_S["K_SE"], K_T=m.K_T, I_x=m.section.I_x,
                   n_lim=n_lim)
    values = sls_deflection(**given.values)
    parts = " + ".join(f"{f:.1f}·{format_number(to_display(m.member.values[f'w_{t}'], 'N/mm')[0], 'kN/m')}"
                      for t, f in case.factors.items())
    total = format_number(to_display(case.w_s, "N/mm")[0], "kN/m")
    words = (f"Specified {kind} load {case.label}: w_s = {parts} = {total} kN/m; "
             f"limit L/{n_lim:g} (schedule column {column})")
    steps = (Step(sls_deflection, values, words),)
    out = result(case.check, case, values["Delta"], values["Delta_lim"], "mm", SLS_CLAUSE, steps,
                 r"\Delta", r"\Delta_lim", used=(*case.datums, *given.used))
    return replace(out, leave_out=("Delta_lim",), with_kd=False)
