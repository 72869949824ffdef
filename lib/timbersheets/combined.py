"""Design functions of the combined member types: beam-column and tension-bending.

Each combination gets the axial check, the bending check (and shear), and the
interaction check, all with that combination's K_D; deflection per SLS
combination where the member carries gravity line loads.
"""

from __future__ import annotations

from .analysis import loading_mode, member_forces, service_cases
from .checks import CheckResult, result
from .checks.bearing import check_support_bearing
from .checks.bending import check_bending
from .checks.combined import check_beam_column, check_tension_bending
from .checks.compression import GLULAM_CLAUSE, SAWN_CLAUSE, compression_resistance
from .checks.deflection import check_deflection
from .checks.shear import check_shear
from .checks.tension import check_tension
from .errors import DesignError
from .loads import LoadCase

EPS = 1e-9


def refuse_reversal(ctx, cases: list[LoadCase], sense: str) -> None:
    """A member designed for `sense` (tension or compression) must not reverse under any combination."""
    worst = min(cases, key=lambda c: c.factored["P"], default=None)
    if worst is not None and worst.factored["P"] < -EPS:
        other = "compression" if sense == "tension" else "tension"
        hint = (" (or give wind_sense = one-way if the wind or earthquake cannot act the other way)"
                if worst.combination.reversed_loads else "")
        raise DesignError(ctx.mark, f"is in {other} ({-worst.factored['P'] / 1000:.1f} kN) under {worst.label}", "",
                          f"A {sense} member must stay in {sense}; design the reversal as its own member{hint}")


def tension_only(ctx, cases: list[LoadCase]) -> list[LoadCase]:
    """The cases that put a tension member in tension; a note on the sheet for those that reverse it.

    A tension member is tension-only by definition (a brace whose compression diagonal is not relied on):
    compression is not checked, and the sheet says under which combinations the axial force reverses."""
    reversing = [c for c in cases if c.factored["P"] < -EPS]
    if reversing:
        worst = min(reversing, key=lambda c: c.factored["P"])
        ctx.notes.append(f"tension-only: the axial force reverses to compression under {', '.join(c.label for c in reversing)} "
                         f"(at most {-worst.factored['P'] / 1000:.1f} kN under {worst.label}); the member is "
                         "tension-only, so compression is not checked: the bracing must carry the reversed load "
                         "in its other diagonal")
    return [c for c in cases if c.factored["P"] > EPS]


def deflections(ctx) -> list[CheckResult]:
    """Deflection per SLS combination; the SLS combinations hold gravity loads only, and the sheet says
    so when the member also carries a wind or earthquake line load (any member type that bends)."""
    out = [check_deflection(ctx, sc) for sc in service_cases(ctx.member, ctx.data)]
    lateral = [t for t in ("W", "E") if ctx.member.values[f"w_{t}"]]
    if lateral:
        ctx.notes.append(f"deflection under the {' and '.join(lateral)} line load is not checked by this version "
                         "(the SLS combinations here are gravity loads only); check it against the limit the "
                         "cladding or finishes need")
    return out


def support_bearings(ctx, cases: list[LoadCase]) -> list[CheckResult]:
    """Bearing of a column's end on the timber it bears on, per combination that compresses it."""
    out = [check_support_bearing(ctx, case, case.factored["P"]) for case in cases if case.factored["P"] > EPS]
    return [c for c in out if c is not None]


def design_combined(ctx, cases: list[LoadCase], kind) -> list[CheckResult]:
    """Checks of a member with axial force (in the sense of the type `kind`) and bending."""
    sense = kind.axial
    if ctx.section.plies > 1 and not kind.plies:
        raise DesignError(ctx.mark, "built-up (multi-ply) beam-columns need the rules for built-up columns, which "
                          "this version does not implement", "O86-14 6.5.6.4", "Design it as a solid section")
    refuse_reversal(ctx, cases, sense)
    mode = loading_mode(ctx.member)
    line = mode == "line"
    groups: dict[str, list[CheckResult]] = {sense: [], "bending": [], "shear": [], "interaction": []}
    for case in cases:
        forces = member_forces(ctx.member, ctx.section.d, case, mode)
        axial = case.factored["P"]
        axial_result = bending_result = None
        if axial > EPS:
            if sense == "compression":
                P_r, steps = compression_resistance(ctx, case.K_D)
                axial_result = result("compression", case, axial, P_r, "N",
                                      GLULAM_CLAUSE if ctx.glulam else SAWN_CLAUSE, steps, "P_f", "P_r")
            else:
                axial_result = check_tension(ctx, case, axial)
            groups[sense].append(axial_result)
        if abs(forces.M_f) > EPS:
            bending_result = check_bending(ctx, forces, line)
            groups["bending"].append(bending_result)
        if abs(forces.V_fd) > EPS or (forces.W_f and abs(forces.W_f) > EPS):
            groups["shear"].append(check_shear(ctx, forces, line))
        if axial_result and bending_result:
            axial_r = axial_result.resistance * 1000.0  # kN → N
            moment_r = bending_result.resistance * 1e6  # kN·m → N·mm
            check = check_beam_column if sense == "compression" else check_tension_bending
            groups["interaction"].append(check(ctx, case, axial, axial_r, forces.M_f, moment_r))
    out = [c for name in (sense, "bending", "shear", "interaction") for c in groups[name]]
    if sense == "compression":
        out += support_bearings(ctx, cases)
    if not groups[sense] or not groups["bending"]:
        missing = "axial force (P_D … P_E)" if not groups[sense] else "bending (w_* or M_*)"
        raise DesignError(ctx.mark, f"carries no {missing} under any combination", "",
                          f"Give it, or design the member as {'bending' if not groups[sense] else sense}")
    return out + deflections(ctx)
