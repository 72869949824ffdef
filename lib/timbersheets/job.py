"""A job loaded once: project.toml, the schedule, the data tables, every member designed.

The run, the what-if and the sizing command all start here, so they read and
design a job the same way (carried loads included).
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from .data import DataSet
from .design import MemberDesign, design_all
from .project import Project, load_project
from .schedule import Member, Schedule, load_schedule


@dataclass
class Job:
    project: Project
    schedule: Schedule
    data: DataSet
    designs: list[MemberDesign]  # one per schedule row, in schedule order

    def members(self) -> dict[str, Member]:
        """Valid members by mark, with their carried loads filled in where the design resolved them."""
        out = {m.mark: m for m in self.schedule.members}
        out.update({d.mark: d.member for d in self.designs if d.member is not None and d.mark in out})
        return out


def load_job(folder: Path) -> Job:
    """Read and validate the job in `folder` and design every member. Raises JobError when unusable."""
    project = load_project(folder)
    schedule = load_schedule(project.schedule_path)
    data = DataSet(project.materials)
    return Job(project, schedule, data, design_all(schedule.entries, data))
