"""The data verification sheet: the values a job uses, as a page a firm can tick and file.

Typeset from ``templates/latex/data/verification.tex.j2`` (letter landscape,
title block and cautions on every page), with empty columns for the checker's
tick or corrected value, name, date and the edition checked against.
"""

from __future__ import annotations

import tempfile
from pathlib import Path

from .. import __version__
from ..constants import CAUTION, SHORT_CAUTION
from ..engineering.data import DataSet
from ..fileio import write_atomic
from ..job.datacheck import Item, counts, groups
from ..job.project import Project
from ..sheet.tex import escape
from .notebooks import templates_dir
from .typeset import layout_environment, typeset

MEMBERS_SHOWN = 6



def _members(marks: list[str]) -> str:
    if len(marks) <= MEMBERS_SHOWN:
        return ", ".join(marks)
    return f"{', '.join(marks[:MEMBERS_SHOWN])} and {len(marks) - MEMBERS_SHOWN} more"


def _row(item: Item) -> dict[str, str]:
    d, keys = item.datum, item.keys
    what = (" ".join(keys[k] for k in ("species", "grade", "category") if keys.get(k)) + f", {item.what}"
            if keys.get("species") else item.what)
    status = d.status_text + (f"; built-in {d.builtin:g}" if d.builtin is not None else "")
    return {"what": escape(what), "value": escape(f"{d.value:g}"), "unit": escape(d.unit), "status": escape(status),
            "source": escape(d.source), "members": escape(_members(item.members))}


def sheet_tex(project: Project, data: DataSet, items: list[Item]) -> str:
    firm = data.firm
    data_line = firm.description if firm else "built-in data tables; no firm data file"
    context = {
        "project": {k: escape(v) for k, v in project.fields.items()},
        "description": escape(f"Data values used by the members of {project.name}, grouped by table"),
        "data_line": escape(data_line), "counts": counts(items),
        "groups": [{"title": escape(title), "rows": [_row(i) for i in members]} for title, members in groups(items)],
        "caution": escape(SHORT_CAUTION), "caution_long": escape(CAUTION),
        "tool_version": f"timbersheets {__version__}", "data_hash": data.hash.split(":")[1][:12],
    }
    return layout_environment(templates_dir() / "latex" / "data").get_template("verification.tex.j2").render(**context)


def write_sheet(project: Project, data: DataSet, items: list[Item], folder: Path) -> Path:
    """Typeset the verification sheet into `folder` (written atomically); returns its path."""
    target = folder / f"data-verification-rev-{project.revision}.pdf"
    with tempfile.TemporaryDirectory(prefix="ts-data-") as tmp:
        work, tex = Path(tmp), sheet_tex(project, data, items)
        for _ in range(2):  # the second pass knows the last page ("sheet n of N")
            done = typeset(tex, work, "verification", "data verification sheet")
        write_atomic(target, done.pdf.read_bytes())
    return target
