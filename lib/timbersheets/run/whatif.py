"""What-if: scale load types and report what would change, writing nothing.

A what-if asks what heavier (or lighter) loads do to the members as they are:
a member with ``size = auto`` keeps the section sized for the scheduled loads,
unless `resize` asks for a new search under the scaled loads.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from ..engineering.design import MemberDesign
from ..engineering.loadpath import design_all
from ..engineering.loads import EFFECTS, LOAD_TYPES
from ..job.load import load_job
from ..schedule.read import Member


@dataclass
class WhatIf:
    mark: str
    before: MemberDesign
    after: MemberDesign
    auto: bool = False  # size = auto in the schedule

    @property
    def resized(self) -> bool:
        return self.auto and self.before.size != self.after.size

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
    return Member.of(member.mark, member.row, values, member.given, list(member.warnings))


def as_sized(member: Member, design: MemberDesign) -> Member:
    """An auto member fixed at the section its design has (the one a run with the scheduled loads gives)."""
    if member.size != "auto" or design.context is None:
        return member
    section = design.context.section
    values = {**member.values, "size": (section.ply_b, section.d), "plies": section.plies}
    return Member.of(member.mark, member.row, values, member.given, list(member.warnings))


def what_if(folder: Path, scales: dict[str, float], resize: bool = False) -> list[WhatIf]:
    """Every member designed as scheduled and with its loads scaled.

    Auto members keep the sections of the scheduled loads; with `resize` they are sized again.
    """
    job = load_job(folder)
    schedule, data, before = job.schedule, job.data, job.designs
    after_entries = []
    for entry, design in zip(schedule.entries, before, strict=True):
        if isinstance(entry, Member):
            entry = scaled(entry if resize else as_sized(entry, design), scales)
        after_entries.append(entry)
    after = design_all(after_entries, data)
    return [WhatIf(b.mark, b, a, isinstance(e, Member) and e.size == "auto")
            for e, b, a in zip(schedule.entries, before, after, strict=True)]
