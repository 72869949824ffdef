"""The one design driver: a member type's checks under each load combination.

What runs comes from the type's record (:mod:`timbersheets.engineering.membertypes`), never
from its name: an axial sense gives the axial check and, in compression, the
bearing of the member's end on its support; bending gives the bending and shear
checks and, for a type with no axial force, bearing at the span's supports; both
give the interaction check of the two under the same combination. Deflection runs
per SLS combination for every type that bends and carries line loads, and every
type that bends and carries wind or earthquake along its length is told that
its deflection under them is not checked. A beam analysed as a model
(:mod:`timbersheets.engineering.beamdesign`) has its own per-combination loop over the
model's extreme effects.
"""

from __future__ import annotations

from ..errors import DesignError
from .analysis import loading_mode, member_forces, service_cases
from .beamdesign import design_model, is_model
from .checks import Checked, CheckResult, NotChecked, collect
from .checks.bearing import check_bearing, check_support_bearing
from .checks.bending import check_bending
from .checks.combined import check_beam_column, check_tension_bending
from .checks.compression import check_compression
from .checks.context import Context
from .checks.deflection import check_deflection
from .checks.shear import check_shear
from .checks.tension import check_tension
from .loads import LoadCase
from .membertypes import MemberType
from .ownweight import gives_line_loads

EPS = 1e-9
LATERAL = ("W", "E")  # load types the SLS combinations leave out (data/sls_combinations.csv: gravity only)


def refuse_reversal(ctx: Context, cases: list[LoadCase], sense: str) -> None:
    """A member designed for `sense` (tension or compression) must not reverse under any combination."""
    worst = min(cases, key=lambda c: c.factored["P"], default=None)
    if worst is not None and worst.factored["P"] < -EPS:
        other = "compression" if sense == "tension" else "tension"
        hint = (" (or give wind_sense = one-way if the wind or earthquake cannot act the other way)"
                if worst.combination.reversed_loads else "")
        raise DesignError(ctx.mark, f"is in {other} ({-worst.factored['P'] / 1000:.1f} kN) under {worst.label}", "",
                          f"A {sense} member must stay in {sense}; design the reversal as its own member{hint}")


def tension_only(cases: list[LoadCase]) -> tuple[list[LoadCase], tuple[str, ...]]:
    """The cases that put a tension member in tension, and the sheet's note for those that reverse it.

    A tension member is tension-only by definition (a brace whose compression diagonal is not relied on):
    compression is not checked, and the sheet says under which combinations the axial force reverses."""
    reversing = [c for c in cases if c.factored["P"] < -EPS]
    notes: tuple[str, ...] = ()
    if reversing:
        worst = min(reversing, key=lambda c: c.factored["P"])
        notes = (f"tension-only: the axial force reverses to compression under "
                 f"{', '.join(c.label for c in reversing)} (at most {-worst.factored['P'] / 1000:.1f} kN under "
                 f"{worst.label}); the member is tension-only, so compression is not checked: the bracing must "
                 "carry the reversed load in its other diagonal",)
    return [c for c in cases if c.factored["P"] > EPS], notes


def lateral_deflection_note(member) -> tuple[str, ...]:
    """The note that deflection under wind or earthquake along the member is not checked, or ().

    The SLS combinations here are gravity loads only, so a member that bends under a lateral load is
    told so instead of being silently passed (common practice: a calc sheet reports what it does not
    check, e.g. a girt's or stud's wind deflection against the cladding's limit)."""
    v = member.values
    line = [t for t in LATERAL if v[f"w_{t}"]]
    other = [t for t in LATERAL if t not in line and any(v.get(f"{p}_{t}") for p in ("point", "part"))]
    if not line and not other:
        return ()
    what = " and ".join(line + other) + (" line load" if not other else " loads")
    return (f"deflection under the {what} is not checked by this version (the SLS combinations here are gravity "
            "loads only); check it against the limit the cladding or finishes need",)


def deflections(ctx: Context) -> list[CheckResult]:
    """Deflection per SLS combination of a simple span under its line loads."""
    return [check_deflection(ctx, sc) for sc in service_cases(ctx.member, ctx.data)]


def _refuse_plies(ctx: Context, kind: MemberType) -> None:
    if ctx.section.plies > 1 and not kind.plies:
        what = "beam-columns" if kind.bends else "columns"
        raise DesignError(ctx.mark, f"built-up (multi-ply) {what} need the rules for nailed or bolted built-up "
                          "columns, which this version does not implement", "O86-14 6.5.6.4",
                          "Design it as a solid section or by hand")


def _axial_check(ctx: Context, case: LoadCase, sense: str) -> CheckResult | None:
    axial = case.factored["P"]
    if axial <= EPS:
        return None
    return (check_compression if sense == "compression" else check_tension)(ctx, case, axial)


def _combination(ctx: Context, case: LoadCase, kind: MemberType, mode: str) -> list[CheckResult | NotChecked]:
    """Every check of `kind` under one ULS combination, in the order made."""
    out: list[CheckResult | NotChecked] = []
    axial = _axial_check(ctx, case, kind.axial) if kind.axial else None
    if axial is not None:
        out.append(axial)
    if not kind.bends:
        return out
    line = mode == "line"
    forces = member_forces(ctx.member, ctx.section.d, case, mode)
    bending = check_bending(ctx, forces, line) if abs(forces.M_f) > EPS else None
    if bending is not None:
        out.append(bending)
    if abs(forces.V_fd) > EPS or (forces.W_f and abs(forces.W_f) > EPS):
        out.append(check_shear(ctx, forces, line))
    if kind.axial is None:  # a beam bears on its supports; an axial member's end bearing is checked below
        bearing = check_bearing(ctx, forces, line)
        if bearing is not None:
            out.append(bearing)
    elif axial is not None and bending is not None:
        check = check_beam_column if kind.axial == "compression" else check_tension_bending
        out.append(check(ctx, case, case.factored["P"], axial.resistance * 1000.0,  # kN → N
                         forces.M_f, bending.resistance * 1e6))  # kN·m → N·mm
    return out


def _refuse_missing(ctx: Context, kind: MemberType, checked: Checked) -> None:
    names = {r.check for r in checked.results}
    if kind.axial and kind.bends and (kind.axial not in names or "bending" not in names):
        missing = "axial force (P_D … P_E)" if kind.axial not in names else "bending (w_* or M_*)"
        raise DesignError(ctx.mark, f"carries no {missing} under any combination", "",
                          f"Give it, or design the member as {'bending' if kind.axial not in names else kind.axial}")
    if kind.axial and not kind.bends and not names:
        raise DesignError(ctx.mark, "carries no axial force", "", "Give the axial loads P_D … P_E")


def _made(ctx: Context, cases: list[LoadCase], kind: MemberType, order: tuple[str, ...]
          ) -> tuple[list[CheckResult | NotChecked], tuple[str, ...]]:
    """The checks of a member on a simple span (or along its length) in the order made, and the notes
    that precede them (a tension member's reversal)."""
    notes: tuple[str, ...] = ()
    if kind.axial:
        _refuse_plies(ctx, kind)
    if kind.axial == "tension" and not kind.bends:
        cases, notes = tension_only(cases)
    elif kind.axial:
        refuse_reversal(ctx, cases, kind.axial)
    mode = loading_mode(ctx.member) if kind.bends else ""
    made = [c for case in cases for c in _combination(ctx, case, kind, mode)]
    _refuse_missing(ctx, kind, collect(made, order))
    if kind.axial == "compression":
        made += [check_support_bearing(ctx, case, case.factored["P"]) for case in cases
                 if case.factored["P"] > EPS]
    if kind.bends and gives_line_loads(ctx.member, ctx.own_weight):
        made += deflections(ctx)
    return made, notes


def run_checks(ctx: Context, cases: list[LoadCase], kind: MemberType) -> Checked:
    """Every check of member type `kind` under each of `cases` (ULS) and each SLS combination, with the
    Datums they read and their notes (the sheet's deflection note on lateral loads last)."""
    order = tuple(n for n in (kind.axial, "bending", "shear", "interaction", "bearing") if n)  # sheet order
    if kind.bends and kind.axial is None and is_model(ctx.member):
        made, notes = list(design_model(ctx, cases)), ()
    else:
        made, notes = _made(ctx, cases, kind, order)
    strength = collect([m for m in made if not _serviceability(m)], order, notes)
    service = collect([m for m in made if _serviceability(m)])
    lateral = lateral_deflection_note(ctx.member) if kind.bends else ()
    out = Checked(strength.results + service.results, tuple(d for m in made for d in m.used),
                  tuple(dict.fromkeys([*strength.notes, *service.notes, *lateral])))
    if not out.results and kind.bends and not kind.axial:
        raise DesignError(ctx.mark, "carries no bending moment or shear under any combination")
    return out


def _serviceability(made: CheckResult | NotChecked) -> bool:
    return made.check.startswith("deflection")
