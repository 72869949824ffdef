"""A job loaded once: project.toml, the data tables, the schedule, every member designed.

The run, the what-if and the sizing command all start here, so they read and
design a job the same way (carried loads included).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property
from pathlib import Path

from ..engineering.data import DataSet
from ..engineering.design import MemberDesign
from ..engineering.loadpath import design_all
from ..schedule.read import Member, Schedule, load_schedule
from .project import Project, load_project


@dataclass
class Job:
    project: Project
    schedule: Schedule
    data: DataSet

    @cached_property
    def designs(self) -> list[MemberDesign]:
        """One design per schedule row, in schedule order, made on first use."""
        return design_all(self.schedule.entries, self.data, self.schedule.path.name)

    def members(self) -> dict[str, Member]:
        """Valid members by mark, with their carried loads filled in where the design resolved them."""
        out = {m.mark: m for m in self.schedule.members}
        out.update({d.mark: d.member for d in self.designs if d.member is not None and d.mark in out})
        return out


def load_job(folder: Path) -> Job:
    """Read and validate the job in `folder`; its members are designed when `designs` is first read.

    Raises JobError when the job is unusable.
    """
    return job_of(load_project(folder))


def job_of(project: Project) -> Job:
    """The job of an already loaded `project` (e.g. one whose data file a command overrides)."""
    data = DataSet(project.materials)
    return Job(project, load_schedule(project.schedule_path, data), data)
