"""Revisions: the inputs snapshot of each run, and what changed between two.

Each run writes ``outputs/<job>/rev-<R>/`` with ``inputs/`` (project.toml and
the schedule as they were). A diff compares two revisions' results.json: members
added and removed, every changed input (old → new, with units), every changed
result, and verdicts that flipped.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from ..constants import UNIT_TEXT
from ..errors import JobError

DIFF_HEADER = ["mark", "what", "item", "old", "new"]


def load_results(revdir: Path) -> dict[str, Any]:
    path = revdir / "results.json"
    if not path.exists():
        raise JobError(str(path), "does not exist", f"Run that revision first (no results in {revdir})")
    return json.loads(path.read_text(encoding="utf-8"))


def previous_revision(jobdir: Path, current: str) -> str | None:
    """The revision run most recently before this one (by its results' run time)."""
    best: tuple[str, str] | None = None
    for revdir in jobdir.glob("rev-*"):
        label = revdir.name[4:]
        if label == current or not (revdir / "results.json").exists():
            continue
        stamp = json.loads((revdir / "results.json").read_text(encoding="utf-8")).get("run_at", "")
        if best is None or stamp > best[0]:
            best = (stamp, label)
    return best[1] if best else None


def show_input(value: Any) -> str:
    if isinstance(value, dict) and "value" in value:
        unit = UNIT_TEXT.get(value["unit"], value["unit"])
        return f"{value['value']:g} {unit}".strip()
    if value is None:
        return "(blank)"
    return str(value)


def carried_text(carried: list[dict] | None) -> str:
    """Carried reactions in a line: ``RB-1.R2 @ 3.6 m: D 4.2, S 9.1 kN``."""
    if not carried:
        return "(none)"
    parts = []
    for c in carried:
        at = f" @ {c['at']:g} m" if c.get("at") is not None else ""
        loads = ", ".join(f"{t} {v:g}" for t, v in c["loads"].items() if v)
        parts.append(f"{c['from']}.R{c['reaction']}{at}: {loads or '0'} kN")
    return "; ".join(parts)


def changed_sources(old: list[dict], new: list[dict]) -> list[str]:
    """Marks whose carried reactions differ between two inputs."""
    def by_source(items):
        out: dict[str, list] = {}
        for c in items:
            out.setdefault(c["from"], []).append(c)
        return out

    a, b = by_source(old), by_source(new)
    return sorted(m for m in set(a) | set(b) if a.get(m) != b.get(m))


@dataclass
class MemberChange:
    mark: str
    kind: str  # added | removed | changed
    inputs: list[tuple[str, str, str]] = field(default_factory=list)  # (column, old, new)
    results: list[tuple[str, str, str]] = field(default_factory=list)
    verdict_flip: tuple[str, str] | None = None
    because: list[str] = field(default_factory=list)  # members whose reactions this member carries and that changed


def _result_items(m: dict[str, Any]) -> dict[str, str]:
    gov = m.get("governing") or {}
    util = m.get("utilization")
    return {"status": m.get("status", ""), "utilization": "" if util is None else f"{util:.3f}",
            "governing check": gov.get("check", ""), "governing combination": gov.get("combination", ""),
            "size": m.get("size", "")}


def diff(old: dict[str, Any], new: dict[str, Any]) -> list[MemberChange]:
    """What changed from results `old` to results `new`, member by member."""
    before = {m["mark"]: m for m in old["members"]}
    after = {m["mark"]: m for m in new["members"]}
    changes: list[MemberChange] = []
    for mark, m in after.items():
        if mark not in before:
            changes.append(MemberChange(mark, "added"))
            continue
        o = before[mark]
        change = MemberChange(mark, "changed")
        oi, ni = o.get("inputs") or {}, m.get("inputs") or {}
        for key in ni:
            if key in ("row", "given", "mark"):
                continue
            if key == "carried" and oi.get(key) != ni.get(key):
                change.because = changed_sources(oi.get(key) or [], ni.get(key) or [])
                change.inputs.append((key, carried_text(oi.get(key)), carried_text(ni.get(key))))
            elif oi.get(key) != ni.get(key):
                change.inputs.append((key, show_input(oi.get(key)), show_input(ni.get(key))))
        ro, rn = _result_items(o), _result_items(m)
        change.results = [(k, ro[k], rn[k]) for k in rn if ro[k] != rn[k]]
        if ro["status"] != rn["status"]:
            change.verdict_flip = (ro["status"], rn["status"])
        if change.inputs or change.results:
            changes.append(change)
    changes += [MemberChange(mark, "removed") for mark in before if mark not in after]
    return changes


def diff_rows(changes: list[MemberChange]) -> list[list[str]]:
    rows = []
    for c in changes:
        if c.kind != "changed":
            rows.append([c.mark, c.kind, "", "", ""])
            continue
        rows += [[c.mark, "because", "carried", "", f"{source} changed"] for source in c.because]
        rows += [[c.mark, "input", k, a, b] for k, a, b in c.inputs]
        rows += [[c.mark, "result", k, a, b] for k, a, b in c.results]
        if c.verdict_flip:
            rows.append([c.mark, "verdict flipped", "status", *c.verdict_flip])
    return rows


def format_diff(changes: list[MemberChange], r1: str, r2: str) -> str:
    if not changes:
        return f"rev {r1} -> rev {r2}: no member changed"
    lines = [f"rev {r1} -> rev {r2}: {len(changes)} member(s) changed"]
    for c in changes:
        if c.kind != "changed":
            lines.append(f"  {c.mark}: {c.kind}")
            continue
        lines.append(f"  {c.mark}: changed because {', '.join(c.because)} changed" if c.because else f"  {c.mark}:")
        lines += [f"      input  {k}: {a} -> {b}" for k, a, b in c.inputs]
        lines += [f"      result {k}: {a} -> {b}" for k, a, b in c.results]
        if c.verdict_flip:
            lines.append(f"      VERDICT FLIPPED: {c.verdict_flip[0]} -> {c.verdict_flip[1]}")
    return "\n".join(lines)
