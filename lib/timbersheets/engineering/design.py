"""Designing one member: context (strengths, factors, section), load cases, checks.

What a member type is comes from its record (:mod:`timbersheets.engineering.membertypes`);
the one driver (:func:`timbersheets.engineering.driver.run_checks`) runs the record's checks
on the member's :class:`~timbersheets.engineering.checks.context.Context` under each load
combination. The member's data values and notes are the union of what the
context, the load cases and the check results carry: nothing is recorded as a
side effect of reading a value.
"""

from __future__ import annotations

import math
import traceback
from collections.abc import Callable
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any

from ..errors import DesignError, TimbersheetsError
from . import driver
from .beamdesign import geometry_of, is_model, total_loads
from .checks import Checked, CheckResult
from .checks.context import Context
from .data import DataSet, Datum
from .loads import EFFECTS, LOAD_TYPES, Effects, LoadCase, apply_combinations
from .materials import strengths
from .member import Member, RowError
from .membertypes import MemberType, member_type, member_types
from .ownweight import own_weight, with_own_weight
from .sections import Section, service_category

SERVICE_PROPERTIES = ("K_Sb", "K_Sv", "K_Sc", "K_Scp", "K_St", "K_SE")


def effects_of(member: Member) -> Effects:
    """Specified effects by type from the row's P_*, M_*, V_*, w_* columns, the axial loads a column carries
    from other members, and the total load F of a beam model."""
    values = {e: {t: member.values[f"{e}_{t}"] for t in LOAD_TYPES} for e in EFFECTS}
    if member_type(member.type).axial is not None:
        for c in member.values.get("carried", ()):
            for t in LOAD_TYPES:
                values["P"][t] += c.loads.get(t, 0.0)
    if not is_model(member):
        return Effects(values)
    # a beam model's loads act together: K_D is taken on their total F, not on the line loads alone
    values = {e: {t: 0.0 for t in LOAD_TYPES} for e in EFFECTS}
    values["F"] = {t: total_loads(member).get(t, 0.0) for t in LOAD_TYPES}
    geometry = geometry_of(member)
    return Effects(values, reversible=len(geometry.spans) > 1 or bool(geometry.left or geometry.right))


def load_cases(member: Member, data: DataSet, used: list[Datum]) -> list[LoadCase]:
    """The ULS combinations of `member` (with its own weight already in it) as its row asks for them.

    A tension member with bending also gets every 0.9D alternative: least dead-load tension with the full
    moment is what puts its compression face in compression (O86 interaction, compression face)."""
    return apply_combinations(effects_of(member), data, used, member.K_D, both_senses=member.wind_sense != "one-way",
                              least_tension=member_type(member.type).axial == "tension" and member_type(member.type).bends,
                              storage=member.live_use == "storage")


def build_context(member: Member, data: DataSet, section: Section | None = None) -> Context:
    """Look up strengths and factors for `member` (or for `section` while sizing).

    The context's member is the schedule's member with its own weight added to the dead load
    (unless the row gives self_weight = no): the weight depends on the section. The density and
    K_Zt it reads, and its note on a frame model's own weight, are carried in its `used` and `notes`."""
    section = section or member.section
    used: list[Datum] = []
    notes: list[str] = []
    weight = own_weight(member, section, data)
    member = with_own_weight(member, weight)
    if weight is not None:
        used.append(weight.density)
    f = strengths(data, member.material, member.species, member.grade, section)
    category = "all" if member.material == "glulam" else service_category(section)
    K_S = {p: data.service_factor(member.material, category, p, member.service) for p in SERVICE_PROPERTIES}
    phi = {a: data.resistance_factor(a) for a in ("tension", "compression", "bending", "shear", "bearing")}
    if weight is not None and weight.effect == "w" and any(member.values[f"{e}_{t}"] for e in "MV" for t in LOAD_TYPES):
        notes.append("own weight is not added to the frame model's moments and shears (the tool cannot place "
                     "it in that model): include it in M_D and V_D; it is included in the line loads used for "
                     "deflection")
    kzt = None
    if member.material == "sawn" and member_type(member.type).axial == "tension":  # K_Zt: tension only
        kzt = data.size_factor_sawn("K_Zt", section.smaller, section.larger)
        used.append(kzt)
    return Context(member, section, f, MappingProxyType(dict(f.values)), MappingProxyType(K_S),
                   MappingProxyType(phi), data, kzt, weight, tuple(used), tuple(notes))


def design_function(kind: MemberType) -> Callable[[Context, list[LoadCase]], Checked]:
    """The checks of `kind` as a function of (context, cases): what design and sizing call."""
    return lambda ctx, cases: driver.run_checks(ctx, cases, kind)


@dataclass
class MemberDesign:
    """The outcome for one schedule row."""

    mark: str
    row: int
    member: Member | None
    context: Context | None = None
    cases: list[LoadCase] = field(default_factory=list)
    checks: list[CheckResult] = field(default_factory=list)
    errors: list[str] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)
    data_used: list[Datum] = field(default_factory=list)  # context's, load cases', then the checks' (first read first)
    sizing: Any = None  # sizing.Sizing, the search's outcome when the size was auto (sizing sits above design)
    trace: str = field(default="", repr=False)  # traceback of an internal error, for run.log

    @property
    def status(self) -> str:
        if self.errors:
            return "error"
        return "fail" if any(c.utilization > 1.0 for c in self.checks) else "pass"

    @property
    def governing(self) -> CheckResult | None:
        return max(self.checks, key=lambda c: c.utilization) if self.checks else None

    def governing_by_check(self) -> dict[str, CheckResult]:
        """The highest-utilization result of each check name, in first-seen order."""
        out: dict[str, CheckResult] = {}
        for c in self.checks:
            if c.check not in out or c.utilization > out[c.check].utilization:
                out[c.check] = c
        return out

    @property
    def data_warnings(self) -> list[str]:
        return DataSet.warnings_for(self.data_used)

    @property
    def data_values(self) -> list[Datum]:
        """Every tabled value the member used, once: the parts of derived values, each combination factor."""
        if self.context is None or self.context.data is None:
            return []
        seen: dict[tuple[str, str, str], Datum] = {}
        read: set[int] = set()
        for used in self.data_used:  # the same Datum is carried by every result that reads it
            if id(used) in read:
                continue
            read.add(id(used))
            for d in self.context.data.value_datums(used):
                seen.setdefault((d.data, d.key, d.column), d)
        return list(seen.values())

    @property
    def data_corrections(self) -> list[str]:
        """Notes for the values a firm file corrected (its value differs from the built-in one)."""
        return list(dict.fromkeys(d.correction for d in self.data_values if d.correction))

    @property
    def size(self) -> str:
        if self.context:
            return self.context.section.label
        if self.member and self.member.size != "auto":
            return Section(self.member.size[0], self.member.size[1], self.member.plies).label
        return ""


#: Chooses the section of a member whose size is auto (sizing.sized_section), recording the search in the outcome.
Sizer = Callable[[Member, DataSet, MemberType, "MemberDesign"], Section]


def design_member(member: Member, data: DataSet, sizer: Sizer | None = None) -> MemberDesign:
    """Design one validated member. Engineering limits become errors, not crashes.

    A member whose size is auto needs `sizer`: the run designs through
    :func:`timbersheets.engineering.sizing.design_sized`, which passes it (the sizing calls the design, never the
    other way)."""
    outcome = MemberDesign(member.mark, member.row, member, warnings=list(member.warnings))
    kind = member_type(member.type)
    if kind is None:
        outcome.errors.append(f"type '{member.type}' is not designed by this version "
                              f"(available: {', '.join(member_types())})")
        return outcome
    try:
        section = None
        if member.size == "auto":
            if sizer is None:
                raise DesignError(member.mark, "has size = auto, and this call sizes nothing", "",
                                  "Design it through timbersheets.engineering.sizing.design_sized")
            section = sizer(member, data, kind, outcome)
        ctx = build_context(member, data, section)
        outcome.context = ctx
        outcome.data_used = list(ctx.used)
        outcome.warnings += [n for n in ctx.notes if n not in outcome.warnings]
        cases = load_cases(ctx.member, data, outcome.data_used)
        outcome.cases = cases
        checked = design_function(kind)(ctx, cases)
        outcome.checks = list(checked.results)
        outcome.data_used += checked.used
        outcome.warnings += [n for n in checked.notes if n not in outcome.warnings]
        refuse_non_finite(member, outcome.checks, outcome.data_used)
    except TimbersheetsError as exc:
        outcome.errors.append(str(exc))
    except Exception as exc:  # a defect must not stop the other members  # noqa: BLE001
        outcome.errors.append(f"internal error while designing ({type(exc).__name__}: {exc}); please report it "
                              "with run.log, which holds the traceback")
        outcome.trace = traceback.format_exc()
    return outcome


def refuse_non_finite(member: Member, checks: list[CheckResult], used: list[Datum]) -> None:
    """A NaN or infinity anywhere in the results makes the member an error, naming its source.

    Neither may reach a verdict: NaN compares false with every limit, so it would pass.
    """
    for c in checks:
        numbers = {"demand": c.demand, "resistance": c.resistance, "utilization": c.utilization, **c.factors}
        bad = [name for name, value in numbers.items() if not math.isfinite(value)]
        if not bad:
            continue
        suspects = [f"{d.label} = {d.value} ({d.file})" for d in used if not math.isfinite(d.value)]
        suspects += [f"{k} = {v}" for k, v in member.values.items()
                     if isinstance(v, float) and not math.isfinite(v)]
        cause = f"from {'; '.join(dict.fromkeys(suspects))}" if suspects else "from the member's inputs together"
        raise DesignError(member.mark, f"{c.check} under {c.combination}: {', '.join(bad)} is not a finite number "
                          f"({cause})", fix="Check the inputs and the data values named")


def rejected(entry: RowError) -> MemberDesign:
    """The outcome of a row that failed validation."""
    return MemberDesign(entry.mark, entry.row, None, errors=[str(e) for e in entry.errors], warnings=entry.warnings)
