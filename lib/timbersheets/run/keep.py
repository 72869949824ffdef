"""Sheets a run does not make itself: keep the ones still current, name the rest.

A ``--no-pdf`` or ``--format html`` run makes no PDFs, and ``--only`` makes
sheets for some members only. The revision folder it replaces may hold sheets,
notebooks and a package that this run does not remake. One is kept when it is
exactly the file a full run would make now: the content-addressed cache holds a
file under the key of the member's current inputs, template, library, data,
title block and layout (for the package, the key of the whole results document
and every sheet). Anything else is out of date: it is not carried into the new
revision folder, and run.log and results.json name it, so no stale sheet is
ever presented as current.
"""

from __future__ import annotations

import dataclasses
import hashlib
import json
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable

from ..build.notebooks import templates_dir
from ..build.package import FRONT_HINT
from ..build.sheetjobs import SheetTask
from ..fileio import copy_atomic, file_hash

FORMATS = ("pdf", "html")
PACKAGE_KEY = ".package-key"


@dataclass
class Carried:
    """Files of the previous run of this revision: kept (still current) or dropped (out of date)."""

    kept: list[str] = field(default_factory=list)  # paths relative to the revision folder
    out_of_date: list[str] = field(default_factory=list)

    def log_lines(self) -> list[str]:
        lines = []
        if self.kept:
            lines.append(f"kept from the last run of this revision (still current): {', '.join(self.kept)}")
        if self.out_of_date:
            lines.append(f"removed as out of date (inputs, title block or layout changed since they were made; a "
                         f"run that makes sheets remakes them): {', '.join(self.out_of_date)}")
        return lines

    def to_json(self) -> dict[str, list[str]]:
        return {"kept": self.kept, "out_of_date": self.out_of_date}


def _as(task: SheetTask, fmt: str) -> SheetTask:
    """The task as it would be for a sheet in `fmt` (itself when it is one: its keys are computed once)."""
    return task if task.fmt == fmt else dataclasses.replace(task, fmt=fmt)


def _current_files(task: SheetTask) -> list[tuple[str, Callable[[], Path]]]:
    """Each file a full run would give this member, by path in the revision folder, with (a function
    giving) its cache file: a key is computed only for a file there is to carry."""
    files = [(f"notebooks/{task.mark}.ipynb", lambda: task.cached_notebook)]
    for fmt in FORMATS:
        files.append((f"sheets/{task.mark}.{fmt}", lambda fmt=fmt: _as(task, fmt).cached_sheet))
    return files


def carry_sheets(tasks: list[SheetTask], old: Path, stage: Path, carried: Carried) -> None:
    """Copy into `stage` every file of `old` that this run did not write and that is still current."""
    for task in tasks:
        for rel, cache_file in _current_files(task):
            if (stage / rel).exists() or not (old / rel).exists():
                continue
            cached = cache_file()
            if cached.exists():
                copy_atomic(cached, stage / rel)
                carried.kept.append(rel)
            else:
                carried.out_of_date.append(rel)


def package_key(doc: dict[str, Any], tasks: list[SheetTask]) -> str:
    """What package.pdf depends on: the results (not the time of the run), every PDF sheet, the layout."""
    sheets = {t.mark: _as(t, "pdf").sheet_key for t in tasks}
    layout = file_hash(templates_dir() / "latex" / "package" / "package.tex.j2")
    blob = json.dumps({"doc": {k: v for k, v in doc.items() if k != "run_at"}, "sheets": sheets, "layout": layout},
                      sort_keys=True, default=str)
    return hashlib.sha256(blob.encode()).hexdigest()


def write_package_key(stage: Path, key: str) -> None:
    (stage / PACKAGE_KEY).write_text(key, encoding="utf-8")


def carry_package(key: str, old: Path, stage: Path, carried: Carried) -> None:
    """Keep the last package.pdf of this revision when nothing it shows has changed."""
    if (old / FRONT_HINT).exists():  # the front matter's length: a first guess for the next package
        copy_atomic(old / FRONT_HINT, stage / FRONT_HINT)
    package = old / "package.pdf"
    if not package.exists():
        return
    recorded = old / PACKAGE_KEY
    if recorded.exists() and recorded.read_text(encoding="utf-8") == key:
        copy_atomic(package, stage / "package.pdf")
        write_package_key(stage, key)
        carried.kept.append("package.pdf")
    else:
        carried.out_of_date.append("package.pdf")

