"""Engineering checks: pure functions of the member and a load case.

Each check returns a frozen :class:`CheckResult` holding the demand, the
resistance, the utilization, the clause and every factor used, plus the
equation steps (a :class:`~timbersheets.calc.Calc` with its values) so the
sheet renders exactly the arithmetic that produced the verdict.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

from ..calc import Calc
from ..units import to_display


@dataclass(frozen=True)
class Step:
    """One rendered equation group: which calc, with which values."""

    calc: Calc
    values: dict[str, float]
    caption: str = ""

    def latex(self) -> str:
        """One display block per equation, so a page may break between them."""
        return self.calc.latex_lines(self.values)


@dataclass(frozen=True)
class CheckResult:
    """One check under one load combination.

    `factors` (every input and intermediate value, in display units) is built
    from the steps on first use: the sizing search never reads it.
    """

    check: str  # tension, compression, bending, shear, bearing, interaction, deflection-*
    combination: str
    K_D: float
    demand: float  # display unit
    resistance: float  # display unit
    unit: str  # display unit ("kN", "kN*m", "mm", "")
    clause: str
    steps: tuple[Step, ...] = field(default=(), compare=False, repr=False)
    demand_symbol: str = ""
    resistance_symbol: str = ""
    leave_out: tuple[str, ...] = ()  # names not reported as factors (e.g. the resistance itself)
    with_kd: bool = True  # K_D is a factor of strength checks, not of deflections
    where: str = ""  # place and load arrangement, for members analysed as beam models

    @cached_property
    def factors(self) -> dict[str, float]:
        out = {"K_D": self.K_D} if self.with_kd else {}
        out.update(factors_of(self.steps, self.leave_out))
        return out

    @property
    def demand_symbol_latex(self) -> str:
        return _sym(self.demand_symbol)

    @property
    def resistance_symbol_latex(self) -> str:
        return _sym(self.resistance_symbol)

    @property
    def utilization(self) -> float:
        if self.resistance <= 0:
            return float("inf")
        return abs(self.demand) / self.resistance


def _sym(name: str) -> str:
    head, _, tail = name.partition("_")
    return f"{head}_{{{tail}}}" if tail else head


def factors_of(steps: tuple[Step, ...], leave_out: tuple[str, ...] = ()) -> dict[str, float]:
    """Every input and intermediate value of the steps, in display units."""
    out: dict[str, float] = {}
    for step in steps:
        for name, value in step.values.items():
            if name in leave_out:
                continue
            out[name] = to_display(value, step.calc.units.get(name, ""))[0]
    return out


def result(check: str, case, demand: float, resistance: float, compute_unit: str, clause: str,
           steps: tuple[Step, ...], demand_symbol: str, resistance_symbol: str) -> CheckResult:
    """Build a CheckResult, converting demand and resistance to display units."""
    shown_demand, unit = to_display(demand, compute_unit)
    shown_resistance, _ = to_display(resistance, compute_unit)
    return CheckResult(check, case.label, case.K_D, shown_demand, shown_resistance, unit, clause,
                       steps, demand_symbol, resistance_symbol, (resistance_symbol,))
