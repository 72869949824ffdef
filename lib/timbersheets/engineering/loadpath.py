"""Load paths between members: `carries`, the order of design, and the reactions that flow down.

A member's `carries` names support reactions of other members. The run designs
every member after the members it carries (a topological order of the
schedule); a cycle or an unknown mark is a row error naming the marks. Once a
member is designed, its specified reactions by load type (unfactored; own
weight included where the design adds it) are handed to the members that carry
it, as point loads on a beam or as axial load on a column, so the receiving
member combines them under its own combinations. The carried loads are part of
the receiving member's inputs: its inputs hash (the cache key, `changed_since`
and the review's stale test) changes when they change.
"""

from __future__ import annotations

from dataclasses import replace

from ..errors import ScheduleError
from .loads import LOAD_TYPES
from .member import CarriedLoad, Member, RowError  # noqa: F401 (CarriedLoad read from here too)


def order(members: list, file: str) -> tuple[list, dict[str, list[ScheduleError]]]:
    """Members in an order where each follows what it carries, and row errors for unknown marks and cycles
    (a member that carries an erroneous member is an error too)."""
    by_mark = {m.mark: m for m in members}
    errors: dict[str, list[ScheduleError]] = {}
    for m in members:
        for c in m.values.get("carries", ()):
            if c.mark not in by_mark:
                errors.setdefault(m.mark, []).append(ScheduleError(
                    file, m.row, "carries", c.label, f"names member '{c.mark}', which is not in the schedule "
                    "(or its row has errors)", "marks of members in this schedule"))
    state: dict[str, str] = {}
    out: list = []

    def visit(mark: str, path: list[str]) -> None:
        if state.get(mark) == "done":
            return
        if state.get(mark) == "active":
            cycle = path[path.index(mark):] + [mark]
            for name in set(cycle):
                member = by_mark[name]
                errors.setdefault(name, []).append(ScheduleError(
                    file, member.row, "carries", None, f"is part of a load-path cycle: {' carries '.join(cycle)}",
                    "a member may not carry, directly or through others, a member that carries it"))
            return
        state[mark] = "active"
        for c in by_mark[mark].values.get("carries", ()):
            if c.mark in by_mark:
                visit(c.mark, path + [mark])
        state[mark] = "done"
        out.append(by_mark[mark])

    for m in members:
        visit(m.mark, [])
    return out, errors


def resolve(member, carries_designs: dict, file: str = "schedule.csv") -> object:
    """`member` with its carried loads filled in from the designs of the members it carries."""
    from .beamdesign import reactions_by_type

    loads = []
    for c in member.values.get("carries", ()):
        source = carries_designs[c.mark]
        reactions = source_reactions(source, reactions_by_type)
        if c.reaction is None:
            n = max(reactions, key=lambda j: sum(reactions[j].values()))
        elif c.reaction in reactions:
            n = c.reaction
        else:
            raise ScheduleError(file, member.row, "carries", c.label, f"asks for reaction {c.reaction}, "
                                f"but {c.mark} has {len(reactions)} support(s)",
                                ", ".join(f"{c.mark}.R{j}" for j in reactions))
        # at the precision the notebook receives them (params), so both designs see the same loads
        carried = {t: round(v / 1000, 6) * 1000 for t, v in reactions[n].items()}
        loads.append(CarriedLoad(c.mark, n, c.at, carried, c.reaction is None))
    return replace(member, carried=tuple(loads))


def source_reactions(design, beam_reactions) -> dict[int, dict[str, float]]:
    """Specified reactions of a designed member by support and load type (N): a beam's supports, or a
    column's base (support 1, its axial load)."""
    from .analysis import loading_mode
    from .beamdesign import is_model
    from ..errors import DesignError

    from .membertypes import member_type

    # the member as designed: with its own weight in the dead load where the design adds it
    m = design.context.member if design.context is not None else design.member
    if member_type(m.type).routine == "bending":
        if not is_model(m) and loading_mode(m) == "forces":
            raise DesignError(m.mark, "takes its moments and shears from a frame model, so its support reactions "
                              "are not known here", "", "Give its loads (w_*, point_*, …) to carry its reactions")
        return beam_reactions(m)
    from .design import effects_of

    effects = effects_of(m)
    return {1: {t: effects.get("P", t) for t in LOAD_TYPES if effects.get("P", t)}}


def design_in_order(entries: list, data, file: str = "schedule.csv") -> list:
    """Design every member after what it carries; the outcomes in schedule order."""
    from .design import MemberDesign, rejected
    from ..errors import TimbersheetsError
    from .sizing import design_sized

    members = [e for e in entries if isinstance(e, Member)]
    ordered, errors = order(members, file)
    designs: dict[str, MemberDesign] = {}
    for m in ordered:
        if m.mark in errors:
            designs[m.mark] = rejected(RowError(m.mark, m.row, errors[m.mark], list(m.warnings)))
            continue
        failed = [c.mark for c in m.values.get("carries", ()) if designs[c.mark].errors]
        if failed:
            designs[m.mark] = rejected(RowError(m.mark, m.row, [ScheduleError(
                file, m.row, "carries", "; ".join(failed), f"names {', '.join(failed)}, whose design has errors, so "
                "the loads it hands down are not known", "fix that member first")], list(m.warnings)))
            continue
        try:
            resolved = resolve(m, designs, file) if m.values.get("carries") else m
        except TimbersheetsError as exc:
            designs[m.mark] = MemberDesign(m.mark, m.row, None, errors=[str(exc)], warnings=list(m.warnings))
            continue
        designs[m.mark] = design_sized(resolved, data)
    return [designs[e.mark] if isinstance(e, Member) else rejected(e) for e in entries]


def design_all(entries: list, data, file: str = "schedule.csv") -> list:
    """Every entry designed, each member after the members it carries; `file` is the schedule's name, for
    the load path's row errors."""
    return design_in_order(entries, data, file)
