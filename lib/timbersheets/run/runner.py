"""A run: validate the schedule, design every member, write the outputs.

Per-member failures are collected and the run goes on with the other members.
Sheets are executed and converted in worker processes (``jobs``); everything is
written to a temporary name and renamed into place.
"""

from __future__ import annotations

import datetime as dt
import os
import re
import shutil
import time
from dataclasses import dataclass, field
from pathlib import Path

from .. import __version__
from ..build.batch import warm_sheets
from ..build.notebooks import start_kernel, templates_dir
from ..build.sheetjobs import SheetOutcome, SheetTask, run_sheets, will_typeset
from ..build.typeset import discard_waiting
from ..constants import SHORT_CAUTION, TITLE_NOTE_CHARS
from ..engineering.data import DataSet
from ..engineering.design import MemberDesign
from ..engineering.membertypes import member_types
from ..errors import ExitCode, UsageError
from ..fileio import copy_atomic, remove_stale_parts, write_atomic
from ..fileio import write_csv
from ..job.load import load_job, use_stores
from ..job.project import Project, job_dir
from ..job.results import chart_rows, results_doc, write_results
from ..job.review import comment_text, latest, load_review_file, read_reviews, status, titleblock_text
from ..job.revisions import DIFF_HEADER, diff, diff_rows, load_results, previous_revision
from ..lifetime import pid_alive
from ..sheet.charts import chart_in, draw_ahead, write_chart
from ..sheet.tex import escape
from .inputs import INPUTS_KEY, inputs_key, notebooks_kept, remember_notebooks
from .keep import Carried, carry_package, carry_sheets, package_key, write_package_key



@dataclass
class RunOptions:
    out: Path | None = None
    only: list[str] | None = None
    sheets: bool = True  # False with --no-pdf
    fmt: str = "pdf"  # pdf | html
    jobs: int | None = None
    force: bool = False
    progress: bool = True


@dataclass
class RunReport:
    project: Project
    outdir: Path
    designs: list[MemberDesign]
    schedule_warnings: list[str]
    sheets: dict[str, SheetOutcome] = field(default_factory=dict)
    log: list[str] = field(default_factory=list)
    package: Path | None = None
    package_error: str | None = None
    carried: Carried = field(default_factory=Carried)
    data_errors: list[str] = field(default_factory=list)  # bad rows of the firm data file

    @property
    def exit_code(self) -> int:
        ok = all(d.status == "pass" for d in self.designs) and not self.package_error and not self.data_errors
        return ExitCode.OK if ok else ExitCode.MEMBERS

    def counts(self) -> dict[str, int]:
        out = {"pass": 0, "fail": 0, "error": 0}
        for d in self.designs:
            out[d.status] += 1
        return out

    @property
    def executed(self) -> list[str]:
        return [m for m, s in self.sheets.items() if s.executed]

    @property
    def converted(self) -> list[str]:
        """Members whose sheet body was typeset (or HTML sheet written)."""
        return [m for m, s in self.sheets.items() if s.converted]

    @property
    def stamped(self) -> list[str]:
        """Members whose title-block stamp was laid on their body."""
        return [m for m, s in self.sheets.items() if s.stamped]


def revision_dir(project: Project, out: Path | None) -> Path:
    return job_dir(project, out) / f"rev-{project.revision}"


def titleblock(project: Project, design: MemberDesign, data: DataSet, checked: str = "not checked",
               changed_since: str | None = None, review_comment: str = "") -> dict[str, str]:
    """Title block fields for one sheet, escaped for LaTeX."""
    f = project.fields
    m = design.member
    description = (m.note if m and m.note else f"{m.type} member" if m else "")
    short = (description if len(description) <= TITLE_NOTE_CHARS
             else description[:TITLE_NOTE_CHARS - 3].rstrip() + "...")
    raw = {
        "project": f["title"], "number": f["number"], "location": f["location"], "client": f["client"],
        "mark": design.mark, "description": short, "date": f["date"],
        "revision": f["revision"] + (f", changed since {changed_since}" if changed_since else ""),
        "designed": f["designer"], "checked": checked, "engineer": f["engineer"],
        "review_comment": review_comment,
        "tool_version": f"timbersheets {__version__}",
        "inputs_hash": (m.inputs_hash.split(":")[1][:12] if m else ""),
        "data_hash": data.hash.split(":")[1][:12],
        "caution": SHORT_CAUTION,
    }
    return {k: escape(v) for k, v in raw.items()}


def sheet_tasks(project: Project, designs: list[MemberDesign], data: DataSet, outdir: Path,
                opts: RunOptions, extra: dict[str, dict] | None = None) -> list[SheetTask]:
    types = member_types()
    cache = job_dir(project, opts.out) / ".cache"
    tasks = []
    for d in designs:
        if d.member is None or d.member.type not in types:
            continue
        template = templates_dir() / types[d.member.type].template
        params = {"member": d.member.params(), "codes": project.codes,
                  "materials": str(project.materials) if project.materials else ""}
        sheet = outdir / "sheets" / f"{d.mark}.{opts.fmt}" if opts.sheets else None
        info = (extra or {}).get(d.mark, {})
        review = info.get("review", {"status": "not-checked"})
        block = titleblock(project, d, data, titleblock_text(review), info.get("changed_since"), comment_text(review))
        tasks.append(SheetTask(d.mark, template, params, block, data.hash, cache,
                               outdir / "notebooks" / f"{d.mark}.ipynb", sheet, opts.fmt, opts.force,
                               project.folder.resolve()))
    return tasks


def cross_check(design: MemberDesign, outcome: SheetOutcome, mine: dict) -> bool:
    """The sheet's own result record must equal the run's (`mine`, the member's results.json entry):
    else the member is an error. Whether they agree."""
    if outcome.error:
        design.errors.append(f"sheet: {outcome.error}")
        return False
    theirs = outcome.record or {}
    if any(mine.get(k) != theirs.get(k) for k in ("status", "utilization", "governing", "checks")):
        design.errors.append("sheet: the notebook's result differs from the run's own calculation")
        return False
    return True


def _front_ahead(project: Project, doc: dict, changes: list, data: DataSet, tasks: list[SheetTask],
                 earlier: list[Path], stage: Path, cache: Path, title: str, chart):
    """Start typesetting the package's front matter in a thread, from a forecast of this run
    (build.package.front_ahead): the results as designed, and each sheet's page count as the cache
    holds it or as the sheet was last typeset (this revision's folder, then the previous one's).
    None when a page count is not known (a first run): then there is nothing to forecast from."""
    import threading

    from ..build.package import front_ahead, page_count
    from ..build.sheetjobs import cached_pages

    pages: dict[str, int] = {}
    for t in tasks:
        if t.sheet is None:
            continue
        pages[t.mark] = cached_pages(t) or next(
            (page_count(f / "sheets" / f"{t.mark}.pdf") for f in earlier if (f / "sheets" / f"{t.mark}.pdf").exists()), 0)
        if not pages[t.mark]:
            return None
    members = doc["members"]

    def forecast() -> None:
        try:
            if chart is not None:
                chart.join()
            front_ahead(project, doc, data, stage, changes, chart_in(cache, members, title), earlier[0], pages,
                        set(pages), cache)
        except Exception:  # noqa: BLE001 - only a head start: build_package typesets what it needs
            pass

    thread = threading.Thread(target=forecast, name="front matter", daemon=True)
    thread.start()
    return thread


def member_extras(project: Project, designs: list[MemberDesign], previous: dict | None) -> dict[str, dict]:
    """Per member: its inputs, the revision it changed since, and its review status."""
    reviews = latest(read_reviews(project.folder))
    before = {m["mark"]: m for m in previous["members"]} if previous else {}
    out = {}
    for d in designs:
        inputs_hash = d.member.inputs_hash if d.member else None
        prev = before.get(d.mark)
        changed = None
        if previous is not None and (prev is None or prev.get("inputs_hash") != inputs_hash):
            changed = previous["revision"]
        out[d.mark] = {"inputs": d.member.params() if d.member else None, "changed_since": changed,
                       "review": status(reviews.get(d.mark), inputs_hash)}
    return out


def stage_dir(project: Project, opts: RunOptions) -> tuple[Path, Path]:
    """An empty staging folder beside the revision folder (what stays of the old one: keep.py)."""
    final = revision_dir(project, opts.out)
    final.parent.mkdir(parents=True, exist_ok=True)
    remove_stale(final.parent)
    stage = final.parent / f".{final.name}.staging-{os.getpid()}"
    shutil.rmtree(stage, ignore_errors=True)
    stage.mkdir()
    return stage, final


_STAGING = re.compile(r"^\.rev-.+\.(?:staging|old)-(\d+)$")


def remove_stale(jobdir: Path) -> None:
    """Staging folders and temporary files of killed runs of this user (their process is gone)."""
    for path in jobdir.glob(".rev-*"):
        match = _STAGING.match(path.name)
        if match and path.is_dir() and path.stat().st_uid == os.getuid() and not pid_alive(int(match.group(1))):
            shutil.rmtree(path, ignore_errors=True)
    remove_stale_parts(jobdir / ".cache")
def check_only(project: Project, entries: list, only: list[str] | None) -> None:
    """Refuse an --only mark the schedule does not have (a typo would otherwise run nothing, silently)."""
    known = {e.mark for e in entries}
    unknown = [m for m in only or () if m not in known]
    if unknown:
        raise UsageError(f"--only {','.join(only)}: no member {', '.join(unknown)} in {project.schedule_path}. "
                         f"Marks in the schedule: {', '.join(sorted(known)) or 'none'}")


def swap_into_place(stage: Path, final: Path) -> None:
    """Replace the revision folder by the finished staging folder."""
    old = final.parent / f".{final.name}.old-{os.getpid()}"
    if final.exists():
        os.replace(final, old)
    os.replace(stage, final)
    shutil.rmtree(old, ignore_errors=True)


def snapshot_inputs(project: Project, stage: Path) -> None:
    inputs = stage / "inputs"
    inputs.mkdir(exist_ok=True)
    for path in (project.folder / "project.toml", project.schedule_path, project.folder / "review.csv",
                 project.materials):
        if path and path.exists():
            copy_atomic(path, inputs / path.name)


def run_job(folder: Path, opts: RunOptions | None = None, **kw) -> RunReport:
    """Design every member of the job in `folder` and write its revision folder.

    Everything is written into a staging folder that then replaces
    ``rev-<R>/``, so rerunning a revision never leaves a mix of two runs.
    """
    opts = opts or RunOptions(**kw)
    started = time.monotonic()
    job = load_job(folder)  # read and validated; the members are designed when job.designs is first read
    project, schedule, data = job.project, job.schedule, job.data
    schedule.warnings += load_review_file(project.folder).problems
    check_only(project, schedule.entries, opts.only)
    jobdir = job_dir(project, opts.out)
    use_stores(jobdir / ".cache")  # beam analyses and sizing searches, for this run, its kernels and the next
    cache = (jobdir / ".cache").absolute()  # the threads below run while papermill changes the folder
    inputs = inputs_key(project.folder / "project.toml", project.schedule_path, data.hash)
    if opts.sheets and (opts.force or not notebooks_kept(cache, inputs)):
        # started in the folder the sheets run in (sheet_tasks), after the store is named (a kernel keeps
        # the folder and environment it was launched with; another would be started for the first member)
        # and before the design: it boots and imports in its own process while the members are designed.
        # Not when the last run with these very files found every notebook in the cache (run/inputs.py)
        start_kernel(project.folder.resolve())
    designs = job.designs
    prev_label = previous_revision(jobdir, project.revision)
    previous = load_results(jobdir / f"rev-{prev_label}") if prev_label else None
    extra = member_extras(project, designs, previous)
    phases = {"design": time.monotonic() - started}
    work: dict[str, float] = {}  # seconds per phase of the sheet work, summed over workers
    stage, final = stage_dir(project, opts)
    try:
        warnings = project.warnings + schedule.warnings
        report = RunReport(project, final, designs, warnings,
                           data_errors=[str(e) for e in data.firm.errors] if data.firm else [])
        every = sheet_tasks(project, designs, data, stage, opts, extra)
        tasks = every if not opts.only else [t for t in every if t.mark in set(opts.only)]
        if opts.sheets:
            remember_notebooks(cache, inputs, every)
        if opts.sheets and will_typeset(tasks):  # xelatex reads the preamble while the run goes on
            warm_sheets()
        title = f"{project.fields['title']} rev {project.revision}: governing utilization"
        chart = draw_ahead(chart_rows(designs), title, cache) if tasks and opts.sheets else None

        def results_now() -> tuple[dict, list]:
            doc = results_doc(project.name, project.revision, project.codes, designs, data.manifest(), data.hash,
                              warnings, extra)
            doc["previous_revision"] = prev_label
            return doc, diff(previous, doc) if previous else []

        # results.json as designed: the front matter's forecast, and the final one unless a sheet disagrees
        doc, changes = results_now()
        front = (_front_ahead(project, doc, changes, data, every,
                              [final, *([jobdir / f"rev-{prev_label}"] if prev_label else [])], stage,
                              cache, title, chart)
                 if tasks and opts.sheets and opts.fmt == "pdf" and not opts.only else None)
        if tasks and opts.sheets:
            mark = time.monotonic()
            report.sheets = run_sheets(tasks, opts.jobs, opts.progress, work)
            phases["sheets"] = time.monotonic() - mark
            agreed = [cross_check(d, report.sheets[d.mark], mine)
                      for d, mine in zip(designs, doc["members"]) if d.mark in report.sheets]
            if not all(agreed):  # a sheet failed or disagreed: that member is an error
                doc, changes = results_now()
        doc = {**doc, "run_at": dt.datetime.now().isoformat(timespec="seconds")}  # the forecast's thread reads its own
        carried = Carried()
        carry_sheets(every, final, stage, carried)
        key = package_key(doc, every)
        write_csv(stage / "diff.csv", DIFF_HEADER, diff_rows(changes))
        if chart is not None:
            chart.join()
        chart_file = write_chart(stage / "summary.png", doc["members"], title, cache)
        if front is not None:
            front.join()
        if opts.sheets and opts.fmt == "pdf":
            from ..build.package import build_package
            from ..build.typeset import ConversionError

            try:
                mark = time.monotonic()
                report.package = final / "package.pdf"
                build_package(project, doc, data, stage, changes, hint=final,
                              pages={m: o.pages for m, o in report.sheets.items() if o.pages},
                              cache=cache, chart=chart_file)
                write_package_key(stage, key)
                phases["package"] = time.monotonic() - mark
            except ConversionError as exc:
                report.package, report.package_error = None, str(exc)
                report.log.append(f"package.pdf was not written: {exc}")
        else:
            carry_package(key, final, stage, carried)
            report.package = final / "package.pdf" if (stage / "package.pdf").exists() else None
        report.carried = carried
        doc["carried_over"] = carried.to_json()
        if (opts.sheets and opts.fmt == "html") or any(p.endswith(".html") for p in carried.kept):  # made or kept
            from ..build.htmlindex import index_html

            write_atomic(stage / "index.html", index_html(project, doc, stage))
        write_results(stage, doc)
        snapshot_inputs(project, stage)
        write_atomic(stage / INPUTS_KEY, inputs)  # what the review compares the files with (run/inputs.py)
        counts = report.counts()
        report.log.insert(0, f"{project.name} rev {project.revision}: {len(designs)} members, "
                             f"{counts['pass']} pass, {counts['fail']} fail, {counts['error']} error; "
                             f"{len(report.executed)} executed, {len(report.converted)} typeset, {len(report.stamped)} stamped "
                             f"({time.monotonic() - started:.1f} s: "
                             + ", ".join(f"{k} {v:.1f} s" for k, v in phases.items()) + ")"
                             + ("; sheet work: " + ", ".join(f"{k} {v:.1f} s" for k, v in work.items()) if work else ""))
        report.log += carried.log_lines()
        report.log += warnings + report.data_errors
        for d in designs:
            report.log += [f"{d.mark}: {e}" for e in d.errors]
        report.log += [f"{d.mark}: traceback of the internal error\n{d.trace.rstrip()}" for d in designs if d.trace]
        report.log += [f"{o.mark}: traceback of the sheet failure\n{o.trace.rstrip()}"
                       for o in report.sheets.values() if o.trace]
        write_atomic(stage / "run.log", "\n".join(report.log) + "\n")
        swap_into_place(stage, final)
    finally:
        shutil.rmtree(stage, ignore_errors=True)
        discard_waiting()
    return report


__all__ = ["RunOptions", "RunReport", "run_job"]
