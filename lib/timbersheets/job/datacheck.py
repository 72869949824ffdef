"""The data values a job uses, listed so a firm can check them once against the standard.

``timbersheets data DIR`` lists every tabled value the job's members use,
grouped by table as the standard prints it, with which members use it; the same
list is written as CSV, as a verification sheet (PDF, :mod:`datasheet`) or as
a firm data file with status ``to-verify`` (:func:`firm_rows`), which the firm
edits and names in ``[data] materials``.
"""

from __future__ import annotations

import csv
import io
import re
from dataclasses import dataclass, field
from pathlib import Path

from ..engineering.data import TABLES, DataSet, Datum, key_text
from ..engineering.design import MemberDesign
from ..engineering.firmdata import HEADER, read_firm
from ..errors import JobError
from ..fileio import spreadsheet_safe, write_atomic
from .load import job_of
from .project import Project

LIST_HEADER = ["table", "data", "key", "column", "species", "grade", "item", "value", "unit", "edition", "source",
               "status", "verified_by", "verified_on", "builtin_value", "members"]


@dataclass
class Item:
    """One tabled value and the members that use it."""

    datum: Datum
    members: list[str] = field(default_factory=list)

    @property
    def ident(self) -> tuple[str, str, str]:
        return self.datum.data, self.datum.key, self.datum.column

    @property
    def keys(self) -> dict[str, str]:
        return dict(p.split("=", 1) for p in self.datum.key.split("; ") if "=" in p)

    @property
    def what(self) -> str:
        """The property or factor: f_b, or the row's label for a factor table."""
        keys = self.keys
        return keys.get("property") or self.datum.label

    def csv_row(self) -> list[object]:
        d, keys = self.datum, self.keys
        return [d.table, d.data.removesuffix(".csv"), d.key, d.column, keys.get("species", ""),
                keys.get("grade", ""), self.what, d.value, d.unit, d.edition, d.source, d.status, d.verified_by,
                d.verified_on, "" if d.builtin is None else d.builtin, " ".join(self.members)]


def job_designs(project: Project) -> tuple[DataSet, list[MemberDesign]]:
    """Every member of the job designed (no sheets): what its values are read from."""
    job = job_of(project)
    return job.data, job.designs


def used_items(data: DataSet, designs: list[MemberDesign]) -> list[Item]:
    """Every tabled value the members use, once, in the standard's order."""
    items: dict[tuple[str, str, str], Item] = {}
    for d in designs:
        for used in d.data_used:
            for datum in data.value_datums(used):
                item = items.setdefault((datum.data, datum.key, datum.column), Item(datum))
                if d.mark not in item.members:
                    item.members.append(d.mark)
    return ordered(data, list(items.values()))


def all_items(data: DataSet) -> list[Item]:
    return ordered(data, [Item(d) for d in data.all_datums()])


def _natural(text: str) -> tuple:
    return tuple(int(p) if p.isdigit() else p for p in re.split(r"(\d+)", text))


def ordered(data: DataSet, items: list[Item]) -> list[Item]:
    """By standard and table number (as the standard prints them), then in the data file's row order."""
    position: dict[tuple[str, str], int] = {}
    for name, file in data.files.items():
        for i, row in enumerate(file.rows):
            position[(name, key_text(name, row))] = i
    columns = {name: spec.values for name, spec in TABLES.items()}

    def sort_key(item: Item):
        d = item.datum
        col = columns.get(d.data, (d.column,))
        number = d.table.removeprefix(d.edition).strip().removeprefix("Table ").removeprefix("Cl. ")
        return (d.edition, _natural(number), d.data, position.get((d.data, d.key), 0),
                col.index(d.column) if d.column in col else 0)

    return sorted(items, key=sort_key)


def groups(items: list[Item]) -> list[tuple[str, list[Item]]]:
    """Items by table, in order."""
    out: list[tuple[str, list[Item]]] = []
    for item in items:
        title = f"{item.datum.table or 'no table number'} ({item.datum.data})"
        if not out or out[-1][0] != title:
            out.append((title, []))
        out[-1][1].append(item)
    return out


def counts(items: list[Item]) -> dict[str, int]:
    out = {"total": len(items), "unverified": 0, "verified": 0, "sourced": 0}
    for i in items:
        out["verified" if i.datum.status == "verified" else "sourced" if i.datum.verified else "unverified"] += 1
    return out


def format_list(items: list[Item], title: str) -> str:
    """The list as text, one block per table."""
    c = counts(items)
    lines = [f"{title}: {c['total']} values; {c['unverified']} unverified, {c['verified']} verified by the firm, "
             f"{c['sourced']} read in a published source"]
    for heading, members in groups(items):
        lines += ["", heading]
        for i in members:
            d, keys = i.datum, i.keys
            who = f"  [{', '.join(i.members)}]" if i.members else ""
            what = " ".join(x for x in (keys.get("species", ""), keys.get("grade", ""), keys.get("category", ""))
                            if x) + f" {i.what}" if keys.get("species") else i.what
            fixed = f" (built-in {d.builtin:g})" if d.builtin is not None else ""
            lines.append(f"  {what:<44} {d.value:>9g} {d.unit:<4} {d.status_text:<18} {d.source}{fixed}{who}")
    return "\n".join(lines)


def csv_text(items: list[Item]) -> str:
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(LIST_HEADER)
    writer.writerows([spreadsheet_safe(v) if k not in ("unit",) else v for k, v in zip(LIST_HEADER, i.csv_row())]
                     for i in items)
    return buffer.getvalue()


def firm_rows(items: list[Item]) -> list[dict[str, object]]:
    """The firm file's rows: the values as used, `to-verify` unless the firm already verified them."""
    out = []
    for i in items:
        d = i.datum
        if d.data not in TABLES:
            continue  # sizes are a catalogue, not values of the standard
        table = d.table.removeprefix(d.edition).strip().removeprefix("Table ")
        done = d.firm and d.status == "verified"
        out.append({"data": d.data.removesuffix(".csv"), "key": d.key, "column": d.column, "value": d.value,
                    "unit": d.unit, "edition": d.edition, "table": table, "source": d.source,
                    "status": "verified" if done else "to-verify", "verified_by": d.verified_by if done else "",
                    "verified_on": d.verified_on if done else "", "item": d.label,
                    "note": f"used by {', '.join(i.members)}" if i.members else ""})
    return out


def write_firm_file(path: Path, items: list[Item]) -> int:
    """Write the firm file for `items`; refuses to replace an existing file (the firm's edits)."""
    if path.exists():
        raise JobError(str(path), "already exists; nothing was changed",
                       "Give a new file name, or edit the existing file")
    rows = firm_rows(items)
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=list(HEADER), lineterminator="\n")
    writer.writeheader()
    for row in rows:
        writer.writerow({k: v if k in ("unit", "key", "value") else spreadsheet_safe(v) for k, v in row.items()})
    write_atomic(path, buffer.getvalue())
    return len(rows)


def compare(path: Path) -> tuple[list[str], int]:
    """Lines listing where a firm file differs from the built-in data, and how many differ."""
    data = DataSet()
    firm = read_firm(path, data.builtin)
    lines, differ = [], 0
    for r in firm.rows:
        spec = TABLES[r.data]
        key = dict(r.key)
        row = next((x for x in data.builtin[r.data].rows if all(x.get(k, "").strip() == key[k] for k in spec.keys)),
                   None)
        name = f"{r.data.removesuffix('.csv')} {' '.join(key.values())}" + (f" {r.column}" if r.column != "value" else "")
        if row is None:
            lines.append(f"  row {r.number}: {name} = {r.value:g}: added by the firm (not in the built-in data)")
            differ += 1
        elif float(row[r.column]) != r.value:
            lines.append(f"  row {r.number}: {name}: firm {r.value:g}, built-in {float(row[r.column]):g} "
                         f"({row.get('status', '')}); firm status {r.status}")
            differ += 1
    head = f"{firm.description}; {differ} of {len(firm.rows)} values differ from the built-in data"
    errors = [f"  error: {e}" for e in firm.errors]
    return [head, *lines, *errors], differ
