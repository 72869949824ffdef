"""The checker's record: review.csv in the job folder, one line per verdict.

A verdict is tied to the inputs hash of the member as checked. When the inputs
change afterwards, the check is *stale*: the sheet, the index and results.json
say so until the member is checked again.
"""

from __future__ import annotations

import csv
import datetime as dt
import io
from dataclasses import dataclass
from pathlib import Path

from .errors import JobError
from .fileio import write_atomic

REVIEW_FILE = "review.csv"
FIELDS = ("mark", "checker", "date", "verdict", "comment", "inputs_hash", "revision")
VERDICTS = ("ok", "revise")


@dataclass(frozen=True)
class Review:
    mark: str
    checker: str
    date: str
    verdict: str
    comment: str
    inputs_hash: str
    revision: str


def read_reviews(folder: Path) -> list[Review]:
    path = folder / REVIEW_FILE
    if not path.exists():
        return []
    text = path.read_text(encoding="utf-8-sig")
    reader = csv.DictReader(io.StringIO(text))
    missing = [f for f in FIELDS[:6] if f not in (reader.fieldnames or [])]
    if missing:
        raise JobError(str(path), f"lacks column(s) {', '.join(missing)}", f"Expected: {', '.join(FIELDS)}")
    return [Review(*(row.get(f, "") or "" for f in FIELDS)) for row in reader]


def latest(reviews: list[Review]) -> dict[str, Review]:
    """The last verdict recorded for each mark."""
    out: dict[str, Review] = {}
    for r in reviews:
        out[r.mark] = r
    return out


def append_reviews(folder: Path, new: list[Review]) -> None:
    """Append verdicts to review.csv (rewritten atomically, earlier lines kept)."""
    path = folder / REVIEW_FILE
    old = path.read_text(encoding="utf-8-sig") if path.exists() else ""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    if not old:
        writer.writerow(FIELDS)
    for r in new:
        writer.writerow([r.mark, r.checker, r.date, r.verdict, r.comment, r.inputs_hash, r.revision])
    write_atomic(path, old + buffer.getvalue())


def status(review: Review | None, inputs_hash: str | None) -> dict[str, str]:
    """results.json `review`: checked, not-checked or stale (inputs changed after the check)."""
    if review is None or inputs_hash is None:
        return {"status": "not-checked"}
    state = "checked" if review.inputs_hash == inputs_hash else "stale"
    return {"status": state, "by": review.checker, "date": review.date, "revision": review.revision,
            "verdict": review.verdict, "comment": review.comment}


def titleblock_text(state: dict[str, str]) -> str:
    """What the title block's 'checked by' box says."""
    if state["status"] == "not-checked":
        return "not checked"
    who = f"{state['by']} {state['date']}"
    if state["status"] == "stale":
        return f"changed since check ({who})"
    return who + (" (revise)" if state.get("verdict") == "revise" else "")


def today() -> str:
    return dt.date.today().isoformat()
