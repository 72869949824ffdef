"""Splitting CSV text into rows the way a spreadsheet numbers them.

The standard ``csv`` module, fed ``str.splitlines()``, breaks a row at a form
feed, U+2028 or NEL inside a cell (shifting every later row number), drops a
line break inside a quoted cell, lets an unclosed quote swallow every later row
without a word, and raises on a cell over 131,072 characters. This reader
breaks rows only at CR, LF or CRLF, keeps line breaks inside quotes, and turns
a quote that runs across rows into an error on the row where it opened; the
rows after it are read as rows.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

MAX_CELL = 131_072  # characters; longer is not a schedule cell but a pasted file
_BREAK = re.compile(r"\r\n|\r|\n")
#: Characters no cell should hold: C0 controls but tab and line breaks, DEL, C1 controls.
_CONTROL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f]")


@dataclass
class Record:
    """One row: its number as a spreadsheet shows it (first row = 1) and its cells."""

    row: int
    cells: list[str]
    problem: str = ""  # why the row could not be read whole (its cells are then partial)


def physical_lines(text: str) -> list[str]:
    lines = _BREAK.split(text)
    if lines and lines[-1] == "":
        lines.pop()
    return lines


def split_records(text: str, delimiter: str = ",") -> list[Record]:
    """Every row of `text`, numbered from 1. A row a quote runs away with carries a problem."""
    lines = physical_lines(text)
    records: list[Record] = []
    width = 0
    i = 0
    while i < len(lines):
        cells, end, closed = _parse(lines, i, delimiter)
        row = len(records) + 1
        spans = end > i + 1
        if not closed or (spans and _runaway(lines[i + 1:end], delimiter, width, len(cells))):
            first, _, _ = _parse([lines[i]], 0, delimiter)
            records.append(Record(row, first, "a quote (\") opened in this row is not closed in it; "
                                              "close the quote, or double a quote meant as text (\"\")"))
            i += 1
            continue
        records.append(Record(row, cells))
        width = width or len(cells)
        i = end
    return records


def _runaway(continued: list[str], delimiter: str, width: int, cells: int) -> bool:
    """A quoted cell over several lines that swallowed what look like whole rows."""
    if width and cells != width:
        return True
    return width > 1 and any(line.count(delimiter) >= width - 1 for line in continued)


def _parse(lines: list[str], start: int, delimiter: str) -> tuple[list[str], int, bool]:
    """Cells of the row starting at lines[start]; the index after it; whether every quote closed."""
    cells: list[str] = []
    cell: list[str] = []
    quoted = False
    i = start
    line, pos = lines[i], 0
    while True:
        if pos >= len(line):
            if quoted:
                if i + 1 >= len(lines):
                    cells.append("".join(cell))
                    return cells, i + 1, False
                cell.append("\n")
                i, line, pos = i + 1, lines[i + 1], 0
                continue
            cells.append("".join(cell))
            return cells, i + 1, True
        ch = line[pos]
        pos += 1
        if quoted:
            if ch == '"':
                if pos < len(line) and line[pos] == '"':
                    cell.append('"')
                    pos += 1
                else:
                    quoted = False
            else:
                cell.append(ch)
        elif ch == delimiter:
            cells.append("".join(cell))
            cell = []
        elif ch == '"' and not "".join(cell).strip():
            cell, quoted = [], True
        else:
            cell.append(ch)


def cell_problem(text: str) -> str:
    """Why a cell's text cannot be a value at all (too long, control characters), or ''."""
    if len(text) > MAX_CELL:
        return f"is {len(text):,} characters long; a cell holds at most {MAX_CELL:,}"
    bad = _CONTROL.search(text)
    if bad:
        return f"holds a control character (U+{ord(bad.group()):04X})"
    return ""


def clean(text: str) -> str:
    """Line and paragraph separators (U+2028, U+2029) read as line breaks inside a cell."""
    return text.replace("\u2028", "\n").replace("\u2029", "\n").strip()
