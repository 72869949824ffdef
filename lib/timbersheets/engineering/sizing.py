"""Automatic sizing: the lightest standard section that passes every check.

The catalogue is the standard sizes of the data files: sawn dimension lumber in
1 to 4 plies, timbers, and glulam standard widths by 38 mm laminations. It is
searched lightest first (least area, then least depth). Every check of the
member type runs under every combination on the fast path (plain floats, no
rendering), so the chosen section is exactly what the sheet will then verify.
"""

from __future__ import annotations

import hashlib
import json
import math
import os
from dataclasses import dataclass, field
from pathlib import Path

from ..errors import DesignError, TimbersheetsError
from ..fileio import library_fingerprint, write_atomic
from .data import DataSet
from .design import MemberDesign, build_context, design_function, design_member, load_cases
from .materials import sawn_table_grade
from .member import Member
from .membertypes import MemberType, member_type
from .sections import Section, sawn_category

RUNNERS_UP = 5
PLIES = (1, 2, 3, 4)
#: Sections within this fraction of the lightest passing area count as "near-equal weight" for `prefer`.
PREFER_BAND = 0.10
MAX_PLY_THICKNESS = 64.0  # built-up members are laminated from 38 or 64 mm stock (common practice)
MIN_PLY_DEPTH = 140.0  # ... of joist depths, 140 mm and deeper (common practice)


@dataclass(frozen=True)
class Candidate:
    section: Section
    utilization: float
    governing: str  # "bending under 1.25D + 1.5S", or why it cannot be used

    @property
    def passes(self) -> bool:
        return self.utilization <= 1.0

    @property
    def label(self) -> str:
        return self.section.label


@dataclass
class Sizing:
    """The outcome of a search: the chosen section and the next ones that pass."""

    chosen: Candidate | None
    runners_up: list[Candidate] = field(default_factory=list)
    searched: int = 0
    best: Candidate | None = None  # the lowest utilization reached (all that exists when nothing passes)
    constraints: str = ""

    def to_json(self) -> dict:
        def item(c: Candidate | None) -> dict | None:
            if c is None:
                return None
            u = None if not math.isfinite(c.utilization) else round(c.utilization, 3)
            return {"size": c.label, "area": round(c.section.A), "utilization": u, "governing": c.governing}

        return {"chosen": item(self.chosen), "runners_up": [item(c) for c in self.runners_up],
                "searched": self.searched, "best": item(self.best), "constraints": self.constraints}


def catalogue(member: Member, data: DataSet) -> list[Section]:
    """Standard sections allowed for `member`, lightest first."""
    width, max_depth = member.values.get("width"), member.values.get("max_depth")
    fixed_plies = member.plies if "plies" in member.given else None
    kind = member_type(member.type)
    sections: list[Section] = []
    if member.material == "glulam":
        lam, min_depth = data.lamination
        standard = data.glulam_factor("depth_max_standard").value
        deepest = min(max_depth, standard) if max_depth else standard  # the catalogue ends at the standard
        depths = [min_depth + lam * i for i in range(int((deepest - min_depth) // lam) + 1)]
        sections = [Section(float(w), d) for w in data.glulam_widths for d in depths]
    else:
        for category, b, d in data.sawn_sizes:
            built_up = category == "dimension" and b <= MAX_PLY_THICKNESS and d >= MIN_PLY_DEPTH
            plies = PLIES if built_up else (1,)
            if fixed_plies is not None:
                plies = (fixed_plies,) if fixed_plies in plies else ()
            for n in plies:
                section = Section(float(b), float(d), n)
                if sawn_table_grade(member.grade, sawn_category(section), data.firm_sawn_grades) is None:
                    continue
                if n > 1 and not kind.plies:
                    continue  # built-up columns are not designed by this version
                sections.append(section)
    if width:
        sections = [s for s in sections if abs(s.b - width) < 0.5]
    if max_depth:
        sections = [s for s in sections if s.d <= max_depth + 1e-9]
    unique = {(s.ply_b, s.d, s.plies): s for s in sections}
    return sorted(unique.values(), key=lambda s: (s.A, s.d, s.plies))


def evaluate(member: Member, data: DataSet, section: Section, cases, design) -> Candidate:
    """The governing utilization of `member` with `section` (fast path, no rendering)."""
    try:
        ctx = build_context(member, data, section)
        if ctx.own_weight is not None:  # the weight, and so the combinations, change with the section
            cases = load_cases(ctx.member, data, [])
        checks = design(ctx, cases).results
    except DesignError as exc:
        return Candidate(section, math.inf, exc.problem)
    gov = max(checks, key=lambda c: c.utilization if math.isfinite(c.utilization) else math.inf)
    if not math.isfinite(gov.utilization):
        return Candidate(section, math.inf, f"{gov.check} under {gov.combination} is not a finite number")
    return Candidate(section, gov.utilization, f"{gov.check} under {gov.combination}")


def constraint_text(member: Member) -> str:
    parts = []
    if member.values.get("width"):
        parts.append(f"width {member.width:g} mm")
    if member.values.get("max_depth"):
        parts.append(f"depth at most {member.max_depth:g} mm")
    if "plies" in member.given:
        parts.append(f"{member.plies} plies")
    if member.values.get("prefer"):
        parts.append(f"prefer {member.prefer}")
    return ", ".join(parts)


def size(member: Member, data: DataSet, design) -> Sizing:
    """Search the catalogue for `member` with the member type's `design` function.

    The chosen section is the lightest that passes (least area, then least
    depth); with ``prefer = deep`` or ``square``, the deepest or squarest of the
    passing sections within 10 % of the lightest area. Runners-up are the other
    passing sections in order of area: with a preference, the lighter ones it
    passed over come first, then the next heavier ones.
    """
    try:
        cases = load_cases(member, data, [])
    except TimbersheetsError as exc:
        raise DesignError(member.mark, f"cannot be sized: {exc}") from None
    sections = catalogue(member, data)
    result = Sizing(None, constraints=constraint_text(member))
    if not sections:
        raise DesignError(member.mark, "no standard section meets the sizing constraints",
                          fix=f"Relax them ({result.constraints or 'none given'})")
    passing: list[Candidate] = []
    prefer = member.values.get("prefer")
    band = math.inf  # with prefer: the chosen section is one of those within PREFER_BAND of the lightest
    for section in sections:
        candidate = evaluate(member, data, section, cases, design)
        result.searched += 1
        if result.best is None or candidate.utilization < result.best.utilization:
            result.best = candidate
        if candidate.passes:
            passing.append(candidate)
            if len(passing) == 1 and prefer:
                band = section.A * (1 + PREFER_BAND)
            if len([c for c in passing if c.section.A > band] if prefer else passing[1:]) >= RUNNERS_UP:
                break
    if not passing:
        return result
    in_band = [c for c in passing if c.section.A <= band]
    chosen = in_band[0]
    if prefer == "deep":
        chosen = max(in_band, key=lambda c: (c.section.d, -c.section.A))
    elif prefer == "square":
        chosen = min(in_band, key=lambda c: (abs(math.log(c.section.d / c.section.b)), c.section.A))
    result.chosen = chosen
    result.runners_up = [c for c in passing if c is not chosen][:RUNNERS_UP]
    return result


STORE_ENV = "TIMBERSHEETS_SIZING_STORE"  # a folder of kept searches, set by the run for itself and its kernels


def _kept_path(member: Member, data: DataSet) -> Path | None:
    """Where the search for exactly this member is kept, or None when no store is set.

    A search designs the member with every candidate section (about 50 ms a member, and the demo's
    largest glulam columns try 15); it is deterministic in the member's inputs, the data and the
    library, so a run keeps it under their hash and a rerun reads it instead of searching again."""
    folder = os.environ.get(STORE_ENV)
    if not folder:
        return None
    key = json.dumps([member.inputs_hash, data.hash, library_fingerprint()])
    return Path(folder) / f"{hashlib.sha256(key.encode()).hexdigest()}.json"


def _candidate_record(c: Candidate | None) -> list | None:
    if c is None:
        return None
    s = c.section
    return [s.ply_b, s.d, s.plies, c.utilization if math.isfinite(c.utilization) else None, c.governing]


def _candidate(record: list | None) -> Candidate | None:
    if record is None:
        return None
    ply_b, d, plies, utilization, governing = record
    return Candidate(Section(float(ply_b), float(d), int(plies)),
                     math.inf if utilization is None else float(utilization), str(governing))


def _read_kept(path: Path) -> Sizing | None:
    try:
        kept = json.loads(path.read_text(encoding="utf-8"))
        return Sizing(_candidate(kept["chosen"]), [_candidate(c) for c in kept["runners_up"]], int(kept["searched"]),
                      _candidate(kept["best"]), str(kept["constraints"]))
    except (OSError, ValueError, KeyError, TypeError):
        return None  # not there, or unreadable: searched again


def _keep(path: Path, result: Sizing) -> None:
    record = {"chosen": _candidate_record(result.chosen), "runners_up": [_candidate_record(c) for c in result.runners_up],
              "searched": result.searched, "best": _candidate_record(result.best), "constraints": result.constraints}
    try:
        write_atomic(path, json.dumps(record))
    except TimbersheetsError:
        pass  # a store that cannot be written costs only the time of searching again


def kept_size(member: Member, data: DataSet, kind: MemberType) -> Sizing:
    """:func:`size` for the member type `kind`, read from the run's store when this search was kept there."""
    path = _kept_path(member, data)
    kept = _read_kept(path) if path is not None else None
    if kept is not None:
        return kept
    result = size(member, data, design_function(kind))
    if path is not None:
        _keep(path, result)
    return result


def sized_section(member: Member, data: DataSet, kind: MemberType, outcome: MemberDesign) -> Section:
    """The section the search chose; when none passes, the best one found (the member then fails)."""
    outcome.sizing = kept_size(member, data, kind)
    chosen = outcome.sizing.chosen
    if chosen is not None:
        return chosen.section
    best = outcome.sizing.best
    if best is None or best.utilization == float("inf"):
        raise DesignError(member.mark, f"no standard section can carry the loads ({outcome.sizing.searched} "
                          "searched)", "", "Change the grade, the loads or the constraints")
    outcome.warnings.append(f"no standard section in the catalogue passes ({outcome.sizing.searched} searched"
                            f"{'; ' + outcome.sizing.constraints if outcome.sizing.constraints else ''}); the best, "
                            f"{best.label}, reaches utilization {best.utilization:.3f} ({best.governing})")
    return best.section


def design_sized(member: Member, data: DataSet) -> MemberDesign:
    """Design `member` as the run does: with size = auto, sized first (:func:`size`), then designed with the
    section chosen, or with the best one found when none passes (the member then fails)."""
    return design_member(member, data, sized_section)
