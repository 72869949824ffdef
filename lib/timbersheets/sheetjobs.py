"""One member's sheet job: execute its notebook and convert it, using the cache.

The cache is content-addressed (``<outputs>/<job>/.cache/``): a notebook is
keyed by the member's inputs, the template, the library and the data; a PDF by
that key plus its title block. A member whose key is unchanged is not
re-executed; ``--force`` ignores the cache.
"""

from __future__ import annotations

import hashlib
import json
from dataclasses import dataclass, field
from functools import cached_property
from pathlib import Path
from typing import Any

from .fileio import copy_atomic
from .constants import RESULT_MIME
from .pipeline import ConversionError, execute, file_hash, library_fingerprint, notebook_to_pdf, to_html



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

    def sheet_key(self, exec_key: str) -> str:
        layout = file_hash(self.template.parent / "latex" / "sheet" / "sheet.tex.j2")
        blob = json.dumps({"e": exec_key, "tb": self.titleblock, "layout": layout, "fmt": self.fmt}, sort_keys=True)
        return hashlib.sha256(blob.encode()).hexdigest()


@dataclass
class SheetOutcome:
    mark: str
    executed: bool = False
    converted: bool = False
    error: str | None = None  # notebook error (the notebook is kept, error marked)
    pages: int = 0  # pages of the PDF sheet (0: not known)
    record: dict[str, Any] | None = field(default=None, repr=False)
    trace: str = field(default="", repr=False)  # traceback of an unexpected failure, for run.log


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


def from_cache(task: SheetTask) -> SheetOutcome | None:
    """The outcome straight from the cache when neither step needs doing, else None."""
    if task.force:
        return None
    key = task.exec_key
    cached_nb = task.cache / f"{key}.ipynb"
    cached_sheet = task.cache / f"{task.sheet_key(key)}.{task.fmt}" if task.sheet is not None else None
    if not cached_nb.exists() or (cached_sheet is not None and not cached_sheet.exists()):
        return None
    outcome = SheetOutcome(task.mark)
    copy_atomic(cached_nb, task.notebook)
    outcome.record, outcome.error = read_record(task.notebook)
    if cached_sheet is not None:
        copy_atomic(cached_sheet, task.sheet)
        outcome.pages = _read_pages(cached_sheet)
    return outcome


def _pages_file(sheet: Path) -> Path:
    return sheet.with_name(sheet.name + ".pages")


def _read_pages(sheet: Path) -> int:
    path = _pages_file(sheet)
    return int(path.read_text()) if path.exists() else 0


def run_sheet(task: SheetTask) -> SheetOutcome:
    """Execute (or reuse) the member's notebook, then convert (or reuse) its sheet."""
    outcome = SheetOutcome(task.mark)
    key = task.exec_key
    cached_nb = task.cache / f"{key}.ipynb"
    if task.force or not cached_nb.exists():
        execute(task.template, cached_nb, task.parameters, task.cwd)
        outcome.executed = True
    copy_atomic(cached_nb, task.notebook)
    outcome.record, outcome.error = read_record(task.notebook)
    if outcome.error:
        cached_nb.unlink(missing_ok=True)  # never serve a failed run from the cache
    if task.sheet is None:
        return outcome
    cached_sheet = task.cache / f"{task.sheet_key(key)}.{task.fmt}"
    if task.force or outcome.executed or not cached_sheet.exists():
        try:
            if task.fmt == "html":
                to_html(task.notebook, cached_sheet, task.titleblock)
            else:
                _pages_file(cached_sheet).write_text(
                    str(notebook_to_pdf(task.notebook, cached_sheet, task.titleblock, task.mark)))
            outcome.converted = True
        except ConversionError as exc:
            outcome.error = (outcome.error + "; " if outcome.error else "") + str(exc)
            return outcome
    copy_atomic(cached_sheet, task.sheet)
    outcome.pages = _read_pages(cached_sheet)
    return outcome
