"""What a run's members derive from, hashed before they are designed: whether a run needs a kernel, and
whether the schedule changed since a run (the review).

The run starts its kernel before the design so that it boots meanwhile (~1.5 s of CPU); a rerun whose
notebooks are all in the cache (a warm rerun, a review) does not need one. Which notebooks a run needs
is known only after the design (the keys hold each member's designed inputs), so each run records the
keys under a hash of the files they derive from; the next run with the same files reads them first.
A wrong guess costs time, never a result: a notebook missing from the cache starts the kernel then.
The run also records the hash in its revision folder (INPUTS_KEY): the review compares it with the
files as they are now, and designs the members again only when they differ.
"""

from __future__ import annotations

import hashlib
import json
from pathlib import Path
from typing import TYPE_CHECKING

from ..build.notebooks import templates_dir
from ..errors import TimbersheetsError
from ..fileio import file_hash, library_fingerprint, write_atomic

if TYPE_CHECKING:
    from ..build.sheetjobs import SheetTask

INPUTS_KEY = ".inputs-key"  # in a revision folder: the inputs_key of the run that wrote it
RUNS = "runs"  # the cache's folder of these records


def inputs_key(project_file: Path, schedule_file: Path, data_hash: str) -> str:
    """A hash of every file a member's notebook can depend on: the project and schedule files as they
    are, the data, the library and the templates."""
    digest = hashlib.sha256()
    for path in (project_file, schedule_file):
        digest.update(path.read_bytes() if path.exists() else b"")
        digest.update(b"\0")
    templates = sorted(templates_dir().glob("*.ipynb"))
    digest.update(json.dumps([data_hash, library_fingerprint(), [file_hash(t) for t in templates]]).encode())
    return digest.hexdigest()


def notebooks_kept(cache: Path, key: str) -> bool:
    """Whether the last run with these inputs found all its notebooks in the cache, and they are still there."""
    try:
        names = json.loads((cache / RUNS / f"{key}.json").read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return False
    return isinstance(names, list) and all((cache / str(n)).exists() for n in names)


def remember_notebooks(cache: Path, key: str, tasks: list[SheetTask]) -> None:
    """Record the cached notebooks a run with these inputs reads (see `notebooks_kept`)."""
    try:
        write_atomic(cache / RUNS / f"{key}.json", json.dumps(sorted(t.cached_notebook.name for t in tasks)))
    except TimbersheetsError:
        pass  # not recorded: the next run starts its kernel ahead, as without a record
