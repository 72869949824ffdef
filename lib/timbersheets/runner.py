"""A run: validate the schedule, design every member, write the outputs.

Per-member failures are collected and the run goes on with the other members.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from pathlib import Path

from .data import DataSet
from .design import MemberDesign, design_all
from .fileio import write_atomic
from .project import Project, load_project
from .results import results_doc, write_results
from .schedule import Schedule, load_schedule

EXIT_PASS, EXIT_MEMBERS, EXIT_JOB = 0, 1, 2


@dataclass
class RunReport:
    project: Project
    outdir: Path
    designs: list[MemberDesign]
    schedule_warnings: list[str]
    log: list[str] = field(default_factory=list)

    @property
    def exit_code(self) -> int:
        return EXIT_PASS if all(d.status == "pass" for d in self.designs) else EXIT_MEMBERS

    def counts(self) -> dict[str, int]:
        out = {"pass": 0, "fail": 0, "error": 0}
        for d in self.designs:
            out[d.status] += 1
        return out


def default_outputs(folder: Path) -> Path:
    """``outputs/`` beside ``calcsheets/`` for a job kept there, else ./outputs."""
    folder = folder.resolve()
    if folder.parent.name == "calcsheets":
        return folder.parent.parent / "outputs"
    return Path.cwd() / "outputs"


def revision_dir(project: Project, out: Path | None) -> Path:
    base = out if out is not None else default_outputs(project.folder) / project.name
    return base / f"rev-{project.revision}"


def select(schedule: Schedule, only: list[str] | None) -> list:
    entries = schedule.entries
    if only:
        wanted = set(only)
        entries = [e for e in entries if e.mark in wanted]
    return entries


def run_job(folder: Path, out: Path | None = None, only: list[str] | None = None) -> RunReport:
    """Design every member of the job in `folder` and write results.json and summary.csv."""
    started = time.monotonic()
    project = load_project(folder)
    schedule = load_schedule(project.schedule_path)
    data = DataSet(project.materials)
    designs = design_all(select(schedule, only), data)
    outdir = revision_dir(project, out)
    doc = results_doc(project.name, project.revision, project.codes, designs, data.manifest(), data.hash,
                      schedule.warnings)
    write_results(outdir, doc)
    report = RunReport(project, outdir, designs, schedule.warnings)
    counts = report.counts()
    report.log.append(f"{project.name} rev {project.revision}: {len(designs)} members, "
                      f"{counts['pass']} pass, {counts['fail']} fail, {counts['error']} error "
                      f"({time.monotonic() - started:.1f} s)")
    report.log += schedule.warnings
    for d in designs:
        report.log += [f"{d.mark}: {e}" for e in d.errors]
    write_atomic(outdir / "run.log", "\n".join(report.log) + "\n")
    return report
