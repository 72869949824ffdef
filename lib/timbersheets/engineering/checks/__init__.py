"""Engineering checks: pure functions of a :class:`~timbersheets.engineering.checks.context.Context` and a load case.

Each check returns a frozen :class:`CheckResult` holding the demand, the
resistance, the utilization, the clause and every factor used, plus the
equation steps (a :class:`~timbersheets.engineering.calc.Calc` with its values) so the
sheet renders exactly the arithmetic that produced the verdict, and the data
values (`used`) and remarks (`notes`) it relied on. A check that cannot be made
from the row returns :class:`NotChecked` with the remark that says so.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from functools import cached_property

from ..calc import Calc
from ..datum import Datum
from ..units import to_display


@dataclass(frozen=True)
class Step:
    """One rendered equation group: which calc, with which values."""

    calc: Calc
    values: dict[str, float]
    caption: str = ""
    #: The calc whose results these equal term by term (the weak axis of a square column braced alike
    #: about both axes): the sheet then gives each value beside its twin, on one line.
    same_as: Calc | None = None
    #: The calc's symbolic rows are left out: the sheet has just shown the same equations (the weak
    #: axis after the strong), so each multi-row equation is given as its numbers and result.
    numbers_only: bool = False

    def latex(self) -> str:
        """One display block per equation, so a page may break between them."""
        if self.same_as is not None:
            from ..calc import format_value

            pairs = zip(self.calc.outputs, self.same_as.outputs, strict=True)
            terms = [f"{_sym(own)} = {_sym(twin)} = "
                     f"{format_value(self.values[own], self.calc.units.get(own, ''))}" for own, twin in pairs]
            return "$$" + r",\quad ".join(terms) + "$$"
        return self.calc.latex_lines(self.values, numbers_only=self.numbers_only)


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
    used: tuple[Datum, ...] = field(default=(), compare=False, repr=False)  # the data values it read
    notes: tuple[str, ...] = field(default=(), compare=False)  # remarks for the sheet and results.json

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


@dataclass(frozen=True)
class NotChecked:
    """A check the row does not allow (no bearing length, a steel support): the remark that says so."""

    check: str
    notes: tuple[str, ...]
    used: tuple[Datum, ...] = ()


@dataclass(frozen=True)
class Checked:
    """A member's check results in sheet order, with the data values they read and their remarks, each in
    the order it was first made (the sheet's list of unverified values keeps that order)."""

    results: tuple[CheckResult, ...]
    used: tuple[Datum, ...]
    notes: tuple[str, ...]


def collect(made: Iterable[CheckResult | NotChecked | None], order: Sequence[str] = (),
            notes: Sequence[str] = ()) -> Checked:
    """The results of `made` (in the order computed) grouped by check name as `order` lists them (names not
    listed keep their place after those), with the union of their data values and their notes once each,
    after `notes`."""
    made = [m for m in made if m is not None]
    results = [m for m in made if isinstance(m, CheckResult)]
    rank = {name: i for i, name in enumerate(order)}
    results.sort(key=lambda r: rank.get(r.check, len(rank)))  # stable: compute order within a check
    remarks = dict.fromkeys([*notes, *(n for m in made for n in m.notes)])
    return Checked(tuple(results), tuple(d for m in made for d in m.used), tuple(remarks))


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
           steps: tuple[Step, ...], demand_symbol: str, resistance_symbol: str, *,
           used: tuple[Datum, ...] = (), notes: tuple[str, ...] = ()) -> CheckResult:
    """Build a CheckResult, converting demand and resistance to display units; `used` and `notes`
    are the data values the check read and its remarks."""
    shown_demand, unit = to_display(demand, compute_unit)
    shown_resistance, _ = to_display(resistance, compute_unit)
    return CheckResult(check, case.label, case.K_D, shown_demand, shown_resistance, unit, clause,
                       steps, demand_symbol, resistance_symbol, (resistance_symbol,),
                       used=tuple(used), notes=tuple(notes))
