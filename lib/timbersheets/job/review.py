"""The checker's record: review.csv in the job folder, one line per verdict.

A verdict is tied to the inputs hash of the member as checked. When the inputs
change afterwards, the check is *stale*: the sheet, the index and results.json
say so until the member is checked again.
"""

from __future__ import annotations

import csv
import datetime as dt
import fcntl
import io
import os
import re
from dataclasses import dataclass, field
from pathlib import Path

from ..errors import JobError, OutputError, UsageError
from ..fileio import spreadsheet_safe
from ..schedule.csvtext import cell_problem, clean, split_records

REVIEW_FILE = "review.csv"
FIELDS = ("mark", "checker", "date", "verdict", "comment", "inputs_hash", "revision")
VERDICTS = ("ok", "revise")
REQUIRED_FIELDS = ("mark", "verdict", "inputs_hash")
HASH = re.compile(r"sha256:[0-9a-f]{64}")


@dataclass(frozen=True)
class Review:
    mark: str
    checker: str
    date: str
    verdict: str
    comment: str
    inputs_hash: str
    revision: str


@dataclass
class ReviewFile:
    """review.csv as read: the usable verdicts, and what was wrong with the other rows."""

    reviews: list[Review] = field(default_factory=list)
    problems: list[str] = field(default_factory=list)  # "review.csv, row N: ..." each
    columns: list[str] = field(default_factory=list)  # the header as the file has it
    encoding: str = "utf-8"
    ends_with_newline: bool = True


def read_reviews(folder: Path) -> list[Review]:
    """The usable verdicts of review.csv (bad rows are left out; :func:`load_review_file` names them)."""
    return load_review_file(folder).reviews


def load_review_file(folder: Path) -> ReviewFile:
    """Read review.csv by its header names; every row is validated, bad rows reported by row.

    A hand-edited file keeps working: reordered columns are read by name, a row with
    an unknown verdict or no inputs hash is reported and left out (so its member shows
    as not checked), a runaway quote spoils only its own row.
    """
    path = folder / REVIEW_FILE
    if not path.exists():
        return ReviewFile()
    if not path.is_file():
        raise JobError(str(path), "is not a file", "review.csv is the checker's record; move the folder away")
    return parse_review_text(*_decode(path.read_bytes()))


def parse_review_text(text: str, encoding: str = "utf-8") -> ReviewFile:
    out = ReviewFile(encoding=encoding, ends_with_newline=not text or text.endswith(("\n", "\r")))
    records = split_records(text)
    if not records:
        return out
    out.columns = [c.strip() for c in records[0].cells]
    index = {name.casefold(): i for i, name in reversed(list(enumerate(out.columns)))}
    missing = [f for f in REQUIRED_FIELDS if f not in index]
    if missing:
        out.problems.append(f"{REVIEW_FILE}, row 1: lacks column(s) {', '.join(missing)}; "
                            f"no verdict in it is used (expected: {', '.join(FIELDS)})")
        return out
    for record in records[1:]:
        cells = [clean(c) for c in record.cells]
        if not any(cells):
            continue
        problem = record.problem or _row_problem(cells, index, len(out.columns))
        if problem:
            out.problems.append(f"{REVIEW_FILE}, row {record.row}: {problem}; the row is not used")
            continue
        values = {f: (cells[index[f]] if f in index and index[f] < len(cells) else "") for f in FIELDS}
        values["verdict"] = values["verdict"].casefold()
        out.reviews.append(Review(**values))
    return out


def _row_problem(cells: list[str], index: dict[str, int], width: int) -> str:
    def cell(name: str) -> str:
        i = index[name]
        return cells[i] if i < len(cells) else ""

    if any(c for c in cells[width:]):
        return f"has cells beyond the {width} named columns"
    for name in FIELDS:
        if name in index and cell_problem(cell(name)):
            return f"column '{name}' {cell_problem(cell(name))}"
    if not cell("mark"):
        return "column 'mark' is blank"
    if cell("verdict").casefold() not in VERDICTS:
        return f"column 'verdict': '{cell('verdict')}' is not a verdict (allowed: {', '.join(VERDICTS)})"
    if cell("inputs_hash") and not HASH.fullmatch(cell("inputs_hash")):  # blank: a row that never had inputs
        return f"column 'inputs_hash': '{cell('inputs_hash')[:20]}' is not an inputs hash (sha256:<64 hex digits>)"
    return ""


def _decode(raw: bytes) -> tuple[str, str]:
    """The text and the encoding to append in: UTF-8 (with or without BOM), UTF-16 with BOM,
    else Latin-1 (every byte is a character, so an old file still reads)."""
    if raw[:2] in (b"\xff\xfe", b"\xfe\xff"):
        try:
            return raw.decode("utf-16"), "utf-16-le" if raw[:2] == b"\xff\xfe" else "utf-16-be"
        except UnicodeDecodeError:
            pass
    try:
        return raw.decode("utf-8-sig"), "utf-8"
    except UnicodeDecodeError:
        return raw.decode("latin-1"), "latin-1"


def latest(reviews: list[Review]) -> dict[str, Review]:
    """The last verdict recorded for each mark."""
    out: dict[str, Review] = {}
    for r in reviews:
        out[r.mark] = r
    return out


def append_reviews(folder: Path, new: list[Review]) -> None:
    """Append verdicts to review.csv under an exclusive lock, then read them back.

    The earlier lines are never rewritten (a hand edit, the file's mode and its
    encoding are kept); the new rows follow the file's own column order. Raises
    JobError when the file cannot take them or a verdict is not in it afterwards:
    success is never reported for a verdict the file does not hold.
    """
    path = folder / REVIEW_FILE
    if path.exists() and not path.is_file():
        raise JobError(str(path), "is not a file", "review.csv is the checker's record; move the folder away")
    try:
        with open(path, "a+b") as handle:
            fcntl.flock(handle.fileno(), fcntl.LOCK_EX)
            handle.seek(0)
            current = parse_review_text(*_decode(handle.read()))
            handle.write(_new_lines(path, current, new))
            handle.flush()
            os.fsync(handle.fileno())
            handle.seek(0)
            after = parse_review_text(*_decode(handle.read()))
    except OSError as exc:
        raise OutputError(folder, exc) from None
    missing = [r.mark for r in new if _as_written(r) not in after.reviews]
    if missing:
        raise JobError(str(path), f"the verdict for {', '.join(missing)} is not in the file after writing it",
                       "Nothing is recorded for them; check the file and record them again")


def _as_written(r: Review) -> Review:
    """A review as it reads back: formula-protected and trimmed."""
    return Review(**{f: clean(spreadsheet_safe(_text(getattr(r, f)))) for f in FIELDS})


def _text(value: object) -> str:
    return "" if value is None else str(value)


def _new_lines(path: Path, current: ReviewFile, new: list[Review]) -> bytes:
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    if not current.ends_with_newline:
        buffer.write("\n")
    columns = current.columns
    if columns and not all(f in {c.casefold() for c in columns} for f in REQUIRED_FIELDS):
        raise JobError(f"{path}, row 1", f"is not a review header ({', '.join(columns)[:80]})",
                       f"Fix row 1 to: {','.join(FIELDS)} (or move the file away); nothing was recorded")
    if not columns:
        columns = list(FIELDS)
        writer.writerow(columns)
    for r in new:
        values = {f: spreadsheet_safe(_text(getattr(r, f))) for f in FIELDS}
        writer.writerow([values.get(c.casefold(), "") for c in columns])
    try:
        return buffer.getvalue().encode(current.encoding)
    except UnicodeEncodeError:
        raise JobError(str(path), f"is {current.encoding} text, which cannot hold the new verdict's text",
                       "Save review.csv as CSV UTF-8, then record again") from None


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
    fail, error). Raises UsageError naming the marks.
    """
    if verdict != "ok" or comment.strip():
        return
    bad = [f"{mark} ({state})" for mark, state in statuses.items() if state != "pass"]
    if bad:
        raise UsageError(f"review --verdict ok {', '.join(bad)}: an ok on a member that does not pass needs a "
                         "reason. Give --comment explaining why it is acceptable, or record --verdict revise")


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
