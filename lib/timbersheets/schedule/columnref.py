"""The schedule column reference, made from the column table in `columns.py`.

One source: `timbersheets columns` prints it and `tools/write-column-reference`
writes it to docs/columns.md (a test keeps that file equal to the code).
"""

from __future__ import annotations

from ..constants import UNIT_TEXT
from .read import COLUMNS, Column, _allowed


def default_text(col: Column) -> str:
    """The default as a reader of the schedule sees it (blank cell = this)."""
    if col.required:
        return "required"
    if col.blank:
        return col.blank
    if col.default is None:
        return "none"
    if col.default == "":
        return "blank"
    if isinstance(col.default, float):
        return f"{col.default:g}"
    return str(col.default)


def rows() -> list[tuple[str, str, str, str, str]]:
    """(column, meaning, unit, default, allowed) for every column, in schedule order."""
    return [(c.name, c.meaning, UNIT_TEXT.get(c.unit, c.unit), default_text(c), _allowed(c) or "text")
            for c in COLUMNS.values()]


def markdown() -> str:
    """The reference as a Markdown page (docs/columns.md)."""
    lines = [
        "# Schedule columns",
        "",
        "Generated from the column table in `lib/timbersheets/engineering/columns.py` by",
        "`tools/write-column-reference`; do not edit by hand. `timbersheets columns` prints the same.",
        "",
        "A blank cell means the default. A number may carry its own unit (`3.6 m`, `12 ft`, `12'-6\"`,",
        "`12 ft 6 in`, `4.5 kip`, `300 plf`, `klf`, `18 kip-ft`, `25 kN-m` or `kNm`, `50 psf`);",
        "a bare number takes the column's unit. Column names are case-sensitive. Load types: D dead,",
        "L live, S snow (with rain), W wind, E earthquake: specified loads including their importance",
        "factors.",
        "",
        "| column | meaning | unit | default | allowed |",
        "|---|---|---|---|---|",
    ]
    for name, meaning, unit, default, allowed in rows():
        cells = [f"`{name}`", meaning, unit, default, allowed]
        lines.append("| " + " | ".join(c.replace("|", "\\|") for c in cells) + " |")
    return "\n".join(lines) + "\n"


def text() -> str:
    """The reference for a terminal: one block per column."""
    out = []
    for name, meaning, unit, default, allowed in rows():
        head = f"{name}" + (f" [{unit}]" if unit else "") + f"  (default: {default})"
        out.append(f"{head}\n    {meaning}\n    allowed: {allowed}")
    return "\n".join(out) + "\n"
