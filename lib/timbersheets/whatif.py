"""What-if: scale load types and report what would change, writing nothing."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from .data import DataSet
from .design import MemberDesign, design_all
from .loads import EFFECTS, LOAD_TYPES
from .project import load_project
from .schedule import Member, load_schedule


@dataclass
class WhatIf:
    mark: str
    before: MemberDesign
    after: MemberDesign

    @property
    def flipped(self) -> bool:
        return self.before.status != self.after.status

    @property
    def governing_changed(self) -> bool:
        b, a = self.before.governing, self.after.governing
        return bool(b and a and (b.check, b.combination) != (a.check, a.combination))


def parse_scales(texts: list[str]) -> dict[str, float]:
    """``["S=1.2", "W=0.9"]`` → {"S": 1.2, "W": 0.9}; raises ValueError naming the bad one."""
    out = {}
    for text in texts:
        load, _, factor = text.partition("=")
        load = load.strip()
        if load not in LOAD_TYPES:
            raise ValueError(f"--scale {text}: '{load}' is not a load type ({', '.join(LOAD_TYPES)})")
        try:
            out[load] = float(factor)
        except ValueError:
            raise ValueError(f"--scale {text}: '{factor}' is not a number") from None
    return out


def scaled(member: Member, scales: dict[str, float]) -> Member:
    values = dict(member.values)
    for load, factor in scales.items():
        for effect in EFFECTS:
            values[f"{effect}_{load}"] = values[f"{effect}_{load}"] * factor
        values[f"point_{load}"] = tuple((p * factor, x) for p, x in values[f"point_{load}"])
        values[f"part_{load}"] = tuple((w * factor, a, b) for w, a, b in values[f"part_{load}"])
    return Member(member.mark, member.row, values, member.given, list(member.warnings))


def what_if(folder: Path, scales: dict[str, float]) -> list[WhatIf]:
    """Every member designed as scheduled and with its loads scaled."""
    project = load_project(folder)
    schedule = load_schedule(project.schedule_path)
    data = DataSet(project.materials)
    before = design_all(schedule.entries, data)
    after = design_all([scaled(e, scales) if isinstance(e, Member) else e for e in schedule.entries], data)
    return [WhatIf(b.mark, b, a) for b, a in zip(before, after)]
