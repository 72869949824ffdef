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


def refuse_unexplained_ok(verdict: str, comment: str, statuses: dict[str, str]) -> None:
    """An "ok" on a member that fails or has an error needs a comment saying why.

    `statuses` maps each mark to be recorded to its status in the run (pass,
    fail, error). Raises JobError naming the marks.
    """
    if verdict != "ok" or comment.strip():
        return
    bad = [f"{mark} ({state})" for mark, state in statuses.items() if state != "pass"]
    if bad:
        raise JobError(f"review --verdict ok {', '.join(bad)}", "an ok on a member that does not pass needs a reason",
                       "Give --comment explaining why it is acceptable, or record --verdict revise")


STANDINGS = ("ok", "revise", "stale", "not-checked")
STANDING_WORDS = {"ok": "checked ok", "revise": "to revise", "stale": "changed since check",
                  "not-checked": "not checked"}


def standing(state: dict[str, str]) -> str:
    """Where a member's check stands: ok, revise, stale or not-checked (one rule for every count)."""
    if state["status"] == "checked":
        return "revise" if state.get("verdict") == "revise" else "ok"
    return state["status"]


def count_text(states: list[dict[str, str]]) -> str:
    """"3 of 5 members checked ok, 1 to revise, 1 not checked", as the cover, index and review --status say it."""
    counts = {k: 0 for k in STANDINGS}
    for state in states:
        counts[standing(state)] += 1
    noun = "member" if len(states) == 1 else "members"
    parts = [f"{counts['ok']} of {len(states)} {noun} checked ok"]
    parts += [f"{counts[k]} {STANDING_WORDS[k]}" for k in STANDINGS[1:] if counts[k]]
    return ", ".join(parts)


def comment_text(state: dict[str, str]) -> str:
    """The checker's comment as the sheet and review --status show it ("" when there is none)."""
    if not state.get("comment"):
        return ""
    head = f"{state['by']}, {state['date']}, {state['verdict']}"
    if state["status"] == "stale":
        head += " (on inputs changed since)"
    return f"{head}: {state['comment']}"


def today() -> str:
    return dt.date.today().isoformat()
