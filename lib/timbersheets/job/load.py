"""A job loaded once: project.toml, the data tables, the schedule, every member designed.

The run, the what-if and the sizing command all start here, so they read and
design a job the same way (carried loads included).
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from functools import cached_property
from pathlib import Path

from ..engineering.beammodel import STORE_ENV as BEAM_STORE_ENV
from ..engineering.data import DataSet
from ..engineering.design import MemberDesign
from ..engineering.loadpath import design_all
from ..engineering.sizing import STORE_ENV as SIZING_STORE_ENV
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

    def members(self, marks: list[str] | None = None) -> dict[str, Member]:
        """Valid members by mark, with their carried loads filled in where the design resolved them.

        With `marks`, only those members and the ones they carry (and so on down) are designed and
        returned: a member's design depends on nothing else, so each is the member the whole job's
        design gives (a review of one member need not design a hundred)."""
        out = {m.mark: m for m in self.schedule.members}
        if marks is None:
            designs = self.designs
        else:
            needed, todo = set(), [m for m in marks if m in out]
            while todo:
                mark = todo.pop()
                if mark not in needed:
                    needed.add(mark)
                    todo += [c.mark for c in out[mark].values.get("carries", ()) if c.mark in out]
            entries = [m for m in self.schedule.members if m.mark in needed]
            designs = design_all(entries, self.data, self.schedule.path.name)
            out = {k: v for k, v in out.items() if k in set(marks)}
        out.update({d.mark: d.member for d in designs if d.member is not None and d.mark in out})
        return out


def load_job(folder: Path) -> Job:
    """Read and validate the job in `folder`; its members are designed when `designs` is first read.

    Raises JobError when the job is unusable.
    """
    return job_of(load_project(folder))


def job_of(project: Project, data: DataSet | None = None) -> Job:
    """The job of an already loaded `project` (e.g. one whose data file a command overrides), with its
    data set (`data`, when already read)."""
    data = data if data is not None else DataSet(project.materials)
    return Job(project, load_schedule(project.schedule_path, data), data)


def use_stores(cache: Path) -> None:
    """Keep beam-model analyses and sizing searches in the job's cache folder `cache`, for this process,
    the kernels it starts and the next command: both are deterministic in their inputs, and reading one
    back saves importing PyCBA (~2 s a process) or searching again (~50 ms a member). Absolute: the
    kernels run in the job's folder, and papermill changes this process's folder."""
    os.environ[BEAM_STORE_ENV] = str((cache / "beam").absolute())
    os.environ[SIZING_STORE_ENV] = str((cache / "sizing").absolute())
