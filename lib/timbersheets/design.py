"""Designing one member: context (strengths, factors, section), load cases, checks.

What a member type is comes from its record (:mod:`timbersheets.membertypes`);
the record names one of the design routines in :data:`ROUTINES`, each a function
of a :class:`Context`, the load cases and the record, returning check results.
"""

from __future__ import annotations

import math
import traceback
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

from .analysis import loading_mode, member_forces
from .beamdesign import design_model, geometry_of, is_model, total_loads
from .checks import CheckResult
from .checks.bearing import check_bearing
from .checks.bending import check_bending
from .checks.compression import check_compression
from .checks.shear import check_shear
from .checks.tension import check_tension
from .combined import deflections, design_combined, refuse_reversal, support_bearings, tension_only
from .data import DataSet, Datum, Recorded
from .errors import DesignError, TimbersheetsError
from .loads import EFFECTS, LOAD_TYPES, Effects, LoadCase, apply_combinations
from .materials import Strengths, strengths
from .ownweight import OwnWeight, gives_line_loads, own_weight, with_own_weight
from .membertypes import MemberType, member_type, member_types
from .member import Member, RowError
from .sections import Section, service_category

SERVICE_PROPERTIES = ("K_Sb", "K_Sv", "K_Sc", "K_Scp", "K_St", "K_SE")
EPS = 1e-9


@dataclass
class Context:
    """Everything a check needs about one member, as floats in compute units."""

    member: Member
    section: Section
    strengths: Strengths
    f: Recorded  # specified strengths (MPa) by symbol
    K_S: Recorded
    phi: Recorded
    used: list[Datum] = field(default_factory=list)
    K_Zt: float = 1.0
    data: DataSet | None = None  # for the lookups a check makes itself (size factors, restraint rules)
    own_weight: OwnWeight | None = None  # included in member's dead load (member is then the loaded copy)

    @property
    def mark(self) -> str:
        return self.member.mark

    @property
    def glulam(self) -> bool:
        return self.member.material == "glulam"

    notes: list[str] = field(default_factory=list)  # design remarks that go on the sheet and into results

    @property
    def K_H(self) -> float:
        return self.member.K_H

    def K_H_for(self, action: str) -> float:
        """K_H for compression or tension: the schedule's value, at most the tabled one (O86 Table 6.4.4)."""
        limit = self.data.system_factor_limit(action)
        if self.member.K_H <= limit.value:
            return self.member.K_H
        self.used.append(limit)
        note = (f"K_H = {self.member.K_H:g} from the schedule applies to bending and shear; {action} takes "
                f"K_H = {limit.value:g}, the most O86 tables for it")
        if note not in self.notes:
            self.notes.append(note)
        return limit.value

    @property
    def K_T(self) -> float:
        return self.member.K_T

    @property
    def K_e(self) -> float:
        return self.member.Ke

    @property
    def length(self) -> float:
        return self.member.length

    @property
    def L_x(self) -> float:
        return self.member.Lx

    @property
    def L_y(self) -> float:
        return self.member.Ly

    @property
    def A_n(self) -> float:
        return self.section.A * self.member.net_area


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
    (unless the row gives self_weight = no): the weight depends on the section."""
    section = section or member.section
    used: list[Datum] = []
    weight = own_weight(member, section, data)
    member = with_own_weight(member, weight)
    if weight is not None:
        used.append(weight.density)
    f = strengths(data, member.material, member.species, member.grade, section)
    category = "all" if member.material == "glulam" else service_category(section)
    K_S = {p: data.service_factor(member.material, category, p, member.service) for p in SERVICE_PROPERTIES}
    phi = {a: data.resistance_factor(a) for a in ("tension", "compression", "bending", "shear", "bearing")}
    ctx = Context(member, section, f, Recorded(f.values, used), Recorded(K_S, used), Recorded(phi, used), used,
                  data=data, own_weight=weight)
    if weight is not None and weight.effect == "w" and any(member.values[f"{e}_{t}"] for e in "MV" for t in LOAD_TYPES):
        ctx.notes.append("own weight is not added to the frame model's moments and shears (the tool cannot place "
                         "it in that model): include it in M_D and V_D; it is included in the line loads used for "
                         "deflection")
    if member.material == "sawn" and member_type(member.type).axial == "tension":  # K_Zt: tension only
        kzt = data.size_factor_sawn("K_Zt", section.smaller, section.larger)
        ctx.K_Zt = kzt.value
        used.append(kzt)
    return ctx


def _axial(ctx: Context, cases: list[LoadCase], kind: MemberType) -> list[CheckResult]:
    """Design routine of an axial member, in the type's sense (tension or compression)."""
    check = check_tension if kind.axial == "tension" else check_compression
    if ctx.section.plies > 1 and not kind.plies:
        raise DesignError(ctx.mark, "built-up (multi-ply) columns need the rules for nailed or bolted "
                          "built-up columns, which this version does not implement", "O86-14 6.5.6.4",
                          "Design it as a solid section or by hand")
    if kind.axial == "tension":
        cases = tension_only(ctx, cases)
    else:
        refuse_reversal(ctx, cases, kind.axial)
    out = [check(ctx, case, case.factored["P"]) for case in cases if case.factored["P"] > EPS]
    if not out:
        raise DesignError(ctx.mark, "carries no axial force", "", "Give the axial loads P_D … P_E")
    if kind.axial == "compression":
        out += support_bearings(ctx, cases)
    return out


def _bending(ctx: Context, cases: list[LoadCase], kind: MemberType) -> list[CheckResult]:
    """Design function for a bending member on a simple span: strength per ULS
    combination (bending, shear, bearing), then deflection per SLS combination."""
    if is_model(ctx.member):
        return design_model(ctx, cases)
    mode = loading_mode(ctx.member)
    line = mode == "line"
    strength: dict[str, list[CheckResult]] = {"bending": [], "shear": [], "bearing": []}
    for case in cases:
        forces = member_forces(ctx.member, ctx.section.d, case, mode)
        if abs(forces.M_f) > EPS:
            strength["bending"].append(check_bending(ctx, forces, line))
        if abs(forces.V_fd) > EPS or (forces.W_f and abs(forces.W_f) > EPS):
            strength["shear"].append(check_shear(ctx, forces, line))
        bearing = check_bearing(ctx, forces, line)
        if bearing is not None:
            strength["bearing"].append(bearing)
    out = [c for name in ("bending", "shear", "bearing") for c in strength[name]]
    if gives_line_loads(ctx.member, ctx.own_weight):
        out += deflections(ctx)
    if not out:
        raise DesignError(ctx.mark, "carries no bending moment or shear under any combination")
    return out


Routine = Callable[[Context, list[LoadCase], MemberType], list[CheckResult]]

#: The design routines a member type record names (MemberType.routine).
ROUTINES: dict[str, Routine] = {"axial": _axial, "bending": _bending, "combined": design_combined}


def design_function(kind: MemberType) -> Callable[[Context, list[LoadCase]], list[CheckResult]]:
    """The checks of `kind` as a function of (context, cases): what design and sizing call."""
    routine = ROUTINES[kind.routine]
    return lambda ctx, cases: routine(ctx, cases, kind)


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
    data_used: list[Datum] = field(default_factory=list)
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
        for used in self.data_used:  # the same Datum is recorded each time a check reads it
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
    :func:`timbersheets.sizing.design_sized`, which passes it (the sizing calls the design, never the
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
                                  "Design it through timbersheets.sizing.design_sized")
            section = sizer(member, data, kind, outcome)
        ctx = build_context(member, data, section)
        cases = load_cases(ctx.member, data, ctx.used)
        outcome.context, outcome.cases = ctx, cases
        outcome.checks = design_function(kind)(ctx, cases)
        refuse_non_finite(member, outcome.checks, ctx.used)
    except TimbersheetsError as exc:
        outcome.errors.append(str(exc))
    except Exception as exc:  # a defect must not stop the other members  # noqa: BLE001
        outcome.errors.append(f"internal error while designing ({type(exc).__name__}: {exc}); please report it "
                              "with run.log, which holds the traceback")
        outcome.trace = traceback.format_exc()
    if outcome.context:
        outcome.data_used = list(outcome.context.used)
        outcome.warnings += [n for n in outcome.context.notes if n not in outcome.warnings]
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
