"""Members' sheet jobs: execute their notebooks and make their sheets, using the cache.

The cache is content-addressed (``<outputs>/<job>/.cache/``):

- a notebook is keyed by the member's inputs, the template, the library and the data;
- a PDF sheet body by that key, the title block's fixed fields and the layout;
- a stamped PDF sheet by the body's key and the stamped fields (revision, date,
  checked by); an HTML sheet by the notebook's key and the whole title block.

A member whose key is unchanged is not re-executed and its body not re-typeset;
``--force`` ignores the cache. Work is done in batches, one per worker at a time:
the batch's notebooks run in the worker's one kernel and its bodies are typeset
in one xelatex run (``batch.py``); the stamps of every sheet that needs one are
then typeset in one run in the main process.
"""

from __future__ import annotations

import hashlib
import json
import math
import multiprocessing
import os
import time
import queue
import traceback
from collections import deque
from concurrent.futures import ProcessPoolExecutor, wait
from dataclasses import dataclass, field
from functools import cached_property
from pathlib import Path
from typing import Any

from ..constants import RESULT_MIME
from ..fileio import copy_atomic, file_hash, library_fingerprint, write_atomic
from ..lifetime import die_with_parent
from .batch import Body, Stamp, fixed_fields, stamp_sheets, stamped_fields, typeset_bodies, warm_sheets
from .notebooks import execute, latex_ahead, start_kernel, templates_dir, to_html

BATCH = 20  # members per xelatex run at most: the ~0.7 s of preamble and fonts spread over 20 sheets
STAMP_LAYOUTS = ("stamp.tex.j2", "stampfields.tex.j2")  # a stamped sheet's key covers both


@dataclass
class SheetTask:
    mark: str
    template: Path
    parameters: dict[str, Any]
    titleblock: dict[str, str]
    data_hash: str
    cache: Path
    notebook: Path  # final place in the revision folder
    sheet: Path | None  # final place of the PDF/HTML, or None (--no-pdf)
    fmt: str = "pdf"
    force: bool = False
    cwd: Path = Path(".")

    @cached_property
    def exec_key(self) -> str:
        blob = json.dumps({"p": self.parameters, "t": file_hash(self.template), "lib": library_fingerprint(),
                           "data": self.data_hash}, sort_keys=True)
        return hashlib.sha256(blob.encode()).hexdigest()

    @cached_property
    def body_key(self) -> str:
        layout = [file_hash(templates_dir() / "latex" / "sheet" / name) for name in ("sheet.tex.j2", "preamble.tex.j2")]
        fields = self.titleblock if self.fmt == "html" else fixed_fields(self.titleblock)
        blob = json.dumps({"e": self.exec_key, "tb": fields, "layout": layout, "fmt": self.fmt}, sort_keys=True)
        return hashlib.sha256(blob.encode()).hexdigest()

    @cached_property
    def sheet_key(self) -> str:
        stamp = [file_hash(templates_dir() / "latex" / "sheet" / name) for name in STAMP_LAYOUTS]
        blob = json.dumps({"b": self.body_key, "tb": stamped_fields(self.titleblock), "stamp": stamp}, sort_keys=True)
        return hashlib.sha256(blob.encode()).hexdigest()

    @property
    def cached_notebook(self) -> Path:
        return self.cache / f"{self.exec_key}.ipynb"

    @property
    def cached_body(self) -> Path:
        return self.cache / f"{self.body_key}.body.pdf"

    @property
    def cached_sheet(self) -> Path:
        """The finished sheet in the cache: the HTML, or the stamped PDF."""
        if self.fmt == "html":
            return self.cache / f"{self.body_key}.html"
        return self.cache / f"{self.sheet_key}.pdf"


@dataclass
class SheetOutcome:
    mark: str
    executed: bool = False
    converted: bool = False  # the body (or HTML) was typeset in this run
    stamped: bool = False  # the title-block stamp was laid on in this run
    error: str | None = None  # notebook error (the notebook is kept, error marked)
    pages: int = 0  # pages of the PDF sheet (0: not known)
    trace: str = field(default="", repr=False)  # traceback of an unexpected failure, for run.log
    # The sheet's result record, kept as compact JSON until it is read (`record`): as Python objects
    # every member's record, held until the run cross-checks them all, took about 60 KB a member
    # (measured: 18 MB for 300 members), a third of that as text.
    record_text: str | None = field(default=None, repr=False)

    @property
    def record(self) -> dict[str, Any] | None:
        return json.loads(self.record_text) if self.record_text is not None else None

    @record.setter
    def record(self, value: dict[str, Any] | None) -> None:
        self.record_text = None if value is None else json.dumps(value, separators=(",", ":"))

    def fail(self, problem: str) -> None:
        self.error = (self.error + "; " if self.error else "") + problem


def read_record(notebook: Path) -> tuple[dict[str, Any] | None, str | None]:
    """The result record the notebook displayed, and its first error, if any."""
    doc = json.loads(notebook.read_text(encoding="utf-8"))
    record, error = None, None
    for cell in doc.get("cells", []):
        for out in cell.get("outputs", []):
            if out.get("output_type") == "error" and error is None:
                error = f"{out.get('ename')}: {out.get('evalue')}"
            data = out.get("data", {})
            if RESULT_MIME in data:
                record = data[RESULT_MIME]
    return record, error


def _pages_file(pdf: Path) -> Path:
    return pdf.with_name(pdf.name + ".pages")


def _read_pages(pdf: Path) -> int:
    path = _pages_file(pdf)
    return int(path.read_text()) if path.exists() else 0


def cached_pages(task: SheetTask) -> int:
    """The page count of the task's sheet as the cache holds it (its stamped sheet or its body), else 0."""
    return _read_pages(task.cached_sheet) or _read_pages(task.cached_body)


def _needs_body(task: SheetTask) -> bool:
    return task.sheet is not None and (task.force or not task.cached_body.exists())


def _needs_work(task: SheetTask) -> bool:
    """Execution, a body or an HTML sheet to make: a worker's job. Stamping alone is not."""
    if task.force or not task.cached_notebook.exists():
        return True
    if task.fmt == "html":
        return task.sheet is not None and not task.cached_sheet.exists()
    return task.sheet is not None and not task.cached_sheet.exists() and not task.cached_body.exists()


def will_typeset(tasks: list[SheetTask]) -> bool:
    """Whether a PDF sheet of `tasks` is not in the cache as stamped, or its notebook is to run (TeX will)."""
    return any(t.fmt == "pdf" and (t.force or not t.cached_notebook.exists() or not t.cached_sheet.exists())
               for t in tasks if t.sheet is not None)


def _record_file(notebook: Path) -> Path:
    return notebook.with_name(notebook.name + ".record")


def _take_notebook(task: SheetTask, outcome: SheetOutcome, base: Path = Path()) -> None:
    """The cached notebook into the revision, with its result record: read from the notebook when it
    was just executed (a few hundred kB of JSON), else from the small record file kept beside it.
    `base` is the folder relative paths are under (a thread's copy: papermill moves the process's
    folder while a batch runs)."""
    notebook, cached = base / task.notebook, base / task.cached_notebook
    copy_atomic(cached, notebook)
    kept = _record_file(cached)
    if kept.exists() and not outcome.executed:
        saved = json.loads(kept.read_text(encoding="utf-8"))
        outcome.record, outcome.error = saved["record"], saved["error"]
        return
    outcome.record, outcome.error = read_record(notebook)
    if not outcome.error:
        write_atomic(kept, json.dumps({"record": outcome.record, "error": outcome.error}))


def run_batch(tasks: list[SheetTask]) -> tuple[list[SheetOutcome], dict[str, float]]:
    """Execute what needs executing, then typeset the batch's bodies in one run (or make HTML).

    A member's failure stays with that member. Returns the outcomes and the
    seconds spent per phase."""
    times: dict[str, float] = {}
    outcomes = {t.mark: SheetOutcome(t.mark) for t in tasks}
    if will_typeset(tasks):
        warm_sheets()  # xelatex reads the preamble while the notebooks execute
    started = time.monotonic()
    executing = [t for t in tasks if t.force or not t.cached_notebook.exists()]
    exporter = latex_ahead() if executing and any(t.fmt == "pdf" and t.sheet is not None for t in tasks) else None
    for task in tasks:
        outcome = outcomes[task.mark]
        try:
            if task.force or not task.cached_notebook.exists():
                execute(task.template, task.cached_notebook, task.parameters, task.cwd)
                outcome.executed = True
            _take_notebook(task, outcome)
        except Exception as exc:  # a worker failure belongs to its member, not the batch  # noqa: BLE001
            outcome.fail(f"{type(exc).__name__}: {exc}")
            outcome.trace = traceback.format_exc()
            continue
        if outcome.error:
            task.cached_notebook.unlink(missing_ok=True)  # never serve a failed run from the cache
            _record_file(task.cached_notebook).unlink(missing_ok=True)
    times["execute"] = time.monotonic() - started
    ready = [t for t in tasks if t.notebook.exists() and t.sheet is not None]
    if ready and ready[0].fmt == "html":
        started = time.monotonic()
        for task in ready:
            to_html(task.notebook, task.cached_sheet, task.titleblock)
            outcomes[task.mark].converted = True
        times["typeset"] = time.monotonic() - started
        return list(outcomes.values()), times
    if exporter is not None:
        exporter.join()
    # each body's stamp is typeset in the same run; the main process stamps only what changed since
    bodies = [Body(t.mark, t.notebook, fixed_fields(t.titleblock), t.cached_body, stamped_fields(t.titleblock),
                   t.cached_sheet) for t in ready if _needs_body(t) or outcomes[t.mark].executed]
    for mark, result in typeset_bodies(bodies, times).items() if bodies else ():
        if isinstance(result, Exception):
            outcomes[mark].fail(str(result))
        else:
            outcomes[mark].converted = outcomes[mark].stamped = True
            outcomes[mark].pages = result
    for body in bodies:
        if outcomes[body.mark].converted:
            write_atomic(_pages_file(body.pdf), str(outcomes[body.mark].pages))
            write_atomic(_pages_file(body.sheet), str(outcomes[body.mark].pages))
    return list(outcomes.values()), times


def _start_worker(run: int, cwd: str) -> None:
    """A pool worker of the run with pid `run`: dies with it (at once if it is already gone), and
    boots its kernel, in the folder the sheets run in, before its first batch arrives."""
    die_with_parent(run)
    start_kernel(Path(cwd))


def _safe_batch(tasks: list[SheetTask]) -> tuple[list[SheetOutcome], dict[str, float]]:
    try:
        return run_batch(tasks)
    except Exception as exc:  # noqa: BLE001 - a broken batch is its members' error, not the run's
        trace = traceback.format_exc()
        return [SheetOutcome(t.mark, error=f"{type(exc).__name__}: {exc}", trace=trace) for t in tasks], {}


# A member's share of a batch's time by its template (measured on the demo's mix: a bending or combined
# sheet executes a diagram and typesets 4-8 pages, an axial one 2-4 pages and no diagram).
TEMPLATE_WEIGHT = {"axial": 1.0, "bending": 2.0, "combined": 2.0}


def batches(tasks: list[SheetTask], jobs: int) -> list[list[SheetTask]]:
    """Tasks in batches of at most BATCH, as many batches for every worker, of about equal work.

    100 members on 2 workers make 6 batches of 16 or 17 (3 a worker), not 5 of 20 (3 and 2):
    the run ends when the busiest worker does. The heavier sheets (TEMPLATE_WEIGHT) are dealt
    out first, back and forth across the batches, so no batch is all girders while another is
    all ties; within a batch the members keep their schedule order."""
    if not tasks:
        return []
    count = jobs * math.ceil(len(tasks) / (jobs * BATCH))
    count = min(count, len(tasks))
    order = sorted(range(len(tasks)), key=lambda i: -TEMPLATE_WEIGHT.get(tasks[i].template.stem, 1.0))
    dealt: list[list[int]] = [[] for _ in range(count)]
    for turn, i in enumerate(order):
        lap, seat = divmod(turn, count)
        dealt[seat if lap % 2 == 0 else count - 1 - seat].append(i)
    return [[tasks[i] for i in sorted(group)] for group in dealt]


def run_sheets(tasks: list[SheetTask], jobs: int | None, progress: bool,
               times: dict[str, float] | None = None) -> dict[str, SheetOutcome]:
    """Execute, typeset and stamp every task, `jobs` workers at a time; a failure stays with its member.

    `times` receives the seconds per phase (execute, typeset, split: summed over
    workers; stamp: in this process)."""
    jobs = max(1, jobs or os.cpu_count() or 1)
    times = times if times is not None else {}
    from tqdm import tqdm

    # disable=None: a bar only on a terminal, as with the other command-line tools
    bar = tqdm(total=len(tasks), desc="sheets", unit="sheet", disable=None if progress else True, leave=False)
    outcomes: dict[str, SheetOutcome] = {}

    def step(mark: str) -> None:
        bar.set_postfix_str(mark, refresh=False)
        bar.update()

    def collect(result: tuple[list[SheetOutcome], dict[str, float]]) -> None:
        for outcome in result[0]:
            outcomes[outcome.mark] = outcome
            step(outcome.mark)
        for phase, seconds in result[1].items():
            times[phase] = times.get(phase, 0.0) + seconds

    work = [t for t in tasks if _needs_work(t)]
    cached = [t for t in tasks if not _needs_work(t)]  # these come from the cache, without a worker
    outcomes.update((t.mark, SheetOutcome(t.mark)) for t in cached)
    pending = deque(batches(work, jobs))
    total = len(pending)
    # sheets that only need new stamps (a new revision, a review) are stamped meanwhile, in a thread:
    # xelatex works outside this process, which copies the cached notebooks, then mostly waits on its
    # kernel while its batch executes
    early = _stale_stamps(cached, outcomes)
    stamping = _stamp_ahead(early, jobs) if early else None
    # and the cached notebooks are copied into the revision meanwhile, in another (100 files with
    # their fsyncs: about half a second, while this process mostly waits on its kernel)
    taking = _take_ahead(cached, outcomes)
    try:
        if jobs == 1 or total <= 1:
            while pending:
                collect(_safe_batch(pending.popleft()))
        else:
            _share_batches(pending, min(jobs - 1, total - 1), collect)
    finally:  # an interrupted run removes its staging folder: the copies must have stopped by then
        wait([taking])
    taking.result()
    for task in cached:
        step(task.mark)
    bar.close()
    started = time.monotonic()  # stamp: what is left of the stamping once the batches are done
    if stamping is not None:
        _apply_stamps(early, stamping.result(), outcomes)
    _finish(tasks, outcomes, jobs)
    times["stamp"] = time.monotonic() - started
    return {t.mark: outcomes[t.mark] for t in tasks}


def _share_batches(pending: deque, workers: int, collect) -> None:
    """Run the batches on `workers` pool processes and in this one, each taking the next when free.

    This process is one of the workers: its kernel was started while it designed the
    members, and the pool's processes start theirs as they spawn. A pool process is handed
    its next batch the moment it finishes one (from the future's callback)."""
    total = len(pending)
    done: queue.Queue = queue.Queue()
    cwd = str(pending[0][0].cwd)  # the job's folder: every sheet of a run executes there

    def feed(pool) -> None:
        try:
            batch = pending.popleft()
        except IndexError:
            return
        try:
            future = pool.submit(_safe_batch, batch)
        except Exception as exc:  # noqa: BLE001 - a broken pool: the batch's members get the error
            done.put((batch, exc))
            return
        future.add_done_callback(lambda f: (done.put((batch, f)), feed(pool)))

    context = multiprocessing.get_context("spawn")
    with ProcessPoolExecutor(max_workers=workers, mp_context=context, initializer=_start_worker,
                             initargs=(os.getpid(), cwd)) as pool:
        for _ in range(workers):
            feed(pool)
        collected = 0
        while True:
            try:
                batch = pending.popleft()
            except IndexError:
                break
            collect(_safe_batch(batch))
            collected += 1
        while collected < total:
            batch, future = done.get()
            try:
                if isinstance(future, Exception):
                    raise future
                collect(future.result())
            except Exception as exc:  # noqa: BLE001 - a worker that died takes only its batch down
                trace = traceback.format_exc()
                collect(([SheetOutcome(t.mark, error=f"{type(exc).__name__}: {exc}", trace=trace) for t in batch], {}))
            collected += 1


def _stale_stamps(tasks: list[SheetTask], outcomes: dict[str, SheetOutcome]) -> list[Stamp]:
    """The stamps to typeset for the PDF sheets among `tasks` whose stamped version is not cached."""
    pdf = [t for t in tasks if t.sheet is not None and t.fmt == "pdf" and t.cached_body.exists()]
    stale = [t for t in pdf if not outcomes[t.mark].stamped
             and (t.force or outcomes[t.mark].converted or not t.cached_sheet.exists())]
    # absolute: the stamps may be typeset in a thread while papermill has changed this process's folder
    return [Stamp(t.mark, t.cached_body.absolute(), _read_pages(t.cached_body), stamped_fields(t.titleblock),
                  t.cached_sheet.absolute()) for t in stale]


def _stamp_ahead(stamps: list[Stamp], jobs: int):
    """stamp_sheets in a thread; the future holds its result."""
    from concurrent.futures import ThreadPoolExecutor

    pool = ThreadPoolExecutor(max_workers=1, thread_name_prefix="stamps")
    future = pool.submit(stamp_sheets, stamps, max(1, jobs - 1))  # the batches keep the other CPUs busy
    pool.shutdown(wait=False)
    return future


def _take_ahead(tasks: list[SheetTask], outcomes: dict[str, SheetOutcome]):
    """_take_notebook for every one of `tasks`, in a thread; its future re-raises what stopped it."""
    from concurrent.futures import ThreadPoolExecutor

    here = Path.cwd()  # relative paths (--out given relative) are under this folder, wherever papermill goes
    pool = ThreadPoolExecutor(max_workers=1, thread_name_prefix="notebooks")
    future = pool.submit(lambda: [_take_notebook(t, outcomes[t.mark], here) for t in tasks])
    pool.shutdown(wait=False)
    return future


def _apply_stamps(stamps: list[Stamp], results: dict, outcomes: dict[str, SheetOutcome]) -> None:
    made = {s.mark: s.pdf for s in stamps}
    for mark, result in results.items():
        if isinstance(result, Exception):
            outcomes[mark].fail(str(result))
        else:
            outcomes[mark].stamped = True
            write_atomic(_pages_file(made[mark]), str(result))


def _finish(tasks: list[SheetTask], outcomes: dict[str, SheetOutcome], jobs: int = 1) -> None:
    """Stamp, in one run, every PDF sheet whose stamped version is not cached; put every sheet in place."""
    stamps = _stale_stamps(tasks, outcomes)
    _apply_stamps(stamps, stamp_sheets(stamps, jobs) if stamps else {}, outcomes)
    for task in tasks:
        if task.sheet is not None and task.cached_sheet.exists() and task.cached_sheet.stat().st_size:
            copy_atomic(task.cached_sheet, task.sheet)
            outcomes[task.mark].pages = _read_pages(task.cached_sheet)
