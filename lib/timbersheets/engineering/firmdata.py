"""A firm's own data file: values it checked against its licensed copy of the standard.

One CSV, one value per row, for any built-in table (strengths, modification
factors, resistance and duration factors, combination rows …)::

    data,key,column,value,unit,edition,table,source,status,verified_by,verified_on,item,note
    sawn_strengths,species=S-P-F; grade=No.1/No.2; category=dimension; property=f_b,value,11.8,MPa,...

``data`` names the built-in table, ``key`` the row in it (its key columns) and
``column`` the value column (blank when the table has one). The strength tables
may also be keyed by their own columns (``material`` or ``data``, ``species``,
``grade``, ``category``, ``property``), and a firm may add species and grades
to them. ``status`` is ``to-verify`` or ``verified`` (or a built-in status); a
verified row names ``verified_by``, ``verified_on`` (YYYY-MM-DD) and the
``edition`` checked against.

The header is checked whole (a misspelt column is an error, never ignored); a
bad row is refused with an error naming file, row and column, and any member
that needs the value it would have supplied becomes an error itself, so no
member silently falls back on the built-in value. A file that supplies nothing
is refused.
"""

from __future__ import annotations

import csv
import datetime as dt
import difflib
import hashlib
import io
import math
import re
from dataclasses import dataclass, field, replace
from pathlib import Path

from ..errors import DataError, DataRowError, JobError
from .datum import TABLES, VERIFIED_STATUSES, DataFile, Datum, TableSpec, _table
from .edition import SUPPORTED_CODES

FIRM_STATUSES = ("to-verify", "verified", "sourced", "memory-unverified")
HEADER = ("data", "key", "column", "value", "unit", "edition", "table", "source", "status", "verified_by",
          "verified_on", "item", "note")
STRENGTH_KEYS = ("material", "species", "grade", "category", "property")
ALLOWED = frozenset(HEADER) | frozenset(STRENGTH_KEYS) | {"clause"}
PROPERTIES = {"sawn_strengths.csv": ("f_b", "f_v", "f_c", "f_cp", "f_t", "E", "E05"),
              "glulam_strengths.csv": ("f_b_pos", "f_b_neg", "f_v", "f_c", "f_cb", "f_cp", "f_tn", "f_tg", "E")}
SAWN_CATEGORIES = ("dimension", "beam-stringer", "post-timber")
#: Load factors of a combination may be zero (a companion not taken); every other value is positive.
MAY_BE_ZERO = ("nbc2020_uls_combinations.csv", "sls_combinations.csv")
NBC_TABLES = MAY_BE_ZERO  # the tables of the building code; every other one is of CSA O86

Key = tuple[tuple[str, str], ...]


@dataclass(frozen=True)
class FirmRow:
    """One valid row of a firm file."""

    file: str  # the firm file's name
    number: int  # as a spreadsheet shows it (the header is row 1)
    data: str
    key: Key
    column: str
    value: float
    unit: str
    edition: str
    table: str
    source: str
    status: str
    verified_by: str
    verified_on: str

    @property
    def where(self) -> str:
        return _table({"edition": self.edition, "table": self.table})


@dataclass
class FirmFile:
    """A firm file as read: its valid rows, its errors, and the values its bad rows refuse."""

    name: str
    path: Path
    sha256: str
    rows: list[FirmRow] = field(default_factory=list)
    errors: list[DataRowError] = field(default_factory=list)
    refused: dict[tuple[str, Key, str], str] = field(default_factory=dict)

    @property
    def short_hash(self) -> str:
        return self.sha256[:12]

    @property
    def verifiers(self) -> list[str]:
        """'RD on 2026-11-30', one per checker and date, in file order."""
        seen = dict.fromkeys(f"{r.verified_by} on {r.verified_on}" for r in self.rows if r.status == "verified")
        return list(seen)

    @property
    def description(self) -> str:
        """One line for a cover or a sheet: name, hash, how many values, who verified them and when."""
        verified = sum(r.status == "verified" for r in self.rows)
        who = f", verified by {'; '.join(self.verifiers)}" if self.verifiers else ", none verified yet"
        refused = f"; {len(self.errors)} bad rows refused (listed in run.log)" if self.errors else ""
        return (f"firm data file {self.name} (sha256 {self.short_hash}): {len(self.rows)} values, "
                f"{verified} verified{who}{refused}")

    def summary(self) -> dict[str, object]:
        return {"file": str(self.path), "name": self.name, "sha256": self.sha256, "role": "firm data",
                "values": len(self.rows), "verified": sum(r.status == "verified" for r in self.rows),
                "verified_by": self.verifiers, "errors": [str(e) for e in self.errors]}


def table_name(text: str) -> str:
    name = text.strip()
    return name if name.endswith(".csv") else f"{name}.csv"


def read_firm(path: Path, builtin: dict[str, DataFile]) -> FirmFile:
    """Read and validate a firm file against the built-in tables.

    Raises JobError when the file as a whole is unusable (unreadable, not
    UTF-8, a bad header, no usable row); bad rows are kept in ``errors``.
    """
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise JobError(str(path), f"cannot be read ({exc.strerror})") from None
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise JobError(path.name, "is not UTF-8 text", "Save the firm data file as CSV UTF-8") from None
    table = [row for row in csv.reader(io.StringIO(text, newline=""))]
    if not table or not any(c.strip() for c in table[0]):
        raise JobError(path.name, "is empty: it supplies no data values",
                       "Write one with: timbersheets data DIR --firm-file FILE")
    header = [h.strip() for h in table[0]]
    _check_header(path.name, header)
    firm = FirmFile(path.name, path, hashlib.sha256(raw).hexdigest())
    first: dict[tuple[str, Key, str], int] = {}
    for number, cells in enumerate(table[1:], start=2):
        if not any(c.strip() for c in cells):
            continue
        values = {h: (cells[i].strip() if i < len(cells) else "") for i, h in enumerate(header)}
        where, errors = _validate_row(path.name, number, values, cells, header, builtin)
        if where is not None and where in first and not errors:
            errors.append(DataRowError(path.name, number, "key", values.get("key") or "",
                                       f"repeats the value of row {first[where]}; both rows are refused",
                                       "one row per value"))
            firm.refused[where] = str(errors[-1])
            firm.rows = [r for r in firm.rows if (r.data, r.key, r.column) != where]
        firm.errors += errors
        if where is None:
            continue
        if errors:
            firm.refused.setdefault(where, str(errors[0]))
        elif where not in first:
            firm.rows.append(_row(path.name, number, where, values))
        first.setdefault(where, number)
    if not firm.rows:
        problems = "; ".join(str(e) for e in firm.errors[:3]) or "it has no rows"
        raise JobError(path.name, f"supplies no usable data value ({problems})",
                       "Correct the rows, or write a new file with: timbersheets data DIR --firm-file FILE")
    return firm


def _check_header(name: str, header: list[str]) -> None:
    seen: set[str] = set()
    for i, col in enumerate(header, start=1):
        if not col:
            raise JobError(f"{name}, row 1", f"column {i} has no name", f"Columns: {', '.join(HEADER)}")
        if col in seen:
            raise JobError(f"{name}, row 1, column '{col}'", "appears twice", "Name each column once")
        seen.add(col)
        if col not in ALLOWED:
            close = difflib.get_close_matches(col, sorted(ALLOWED), n=1, cutoff=0.6)
            hint = f"did you mean '{close[0]}'? " if close else ""
            raise JobError(f"{name}, row 1, column '{col}'", "is not a column of a firm data file",
                           f"{hint}Columns: {', '.join(HEADER)} (strength rows may use "
                           f"{', '.join(STRENGTH_KEYS)} instead of data and key)")
    keyed = "key" in seen and "data" in seen
    by_strength = {"species", "grade", "property"} <= seen and bool(seen & {"data", "material"})
    missing = [c for c in ("value", "status") if c not in seen]
    if not (keyed or by_strength):
        missing.append("data and key (or material, species, grade, property)")
    if missing:
        raise JobError(f"{name}, row 1", f"required column(s) missing: {', '.join(missing)}",
                       f"A firm data file has the columns {', '.join(HEADER)}")


def _validate_row(name: str, number: int, v: dict[str, str], cells: list[str], header: list[str],
                  builtin: dict[str, DataFile]) -> tuple[tuple[str, Key, str] | None, list[DataRowError]]:
    """The value the row supplies (table, key, column) if it can be told, and the row's errors."""
    def err(column: str, value: str, problem: str, allowed: str = "") -> DataRowError:
        return DataRowError(name, number, column, value, problem, allowed)

    if len(cells) > len(header) and any(c.strip() for c in cells[len(header):]):
        return None, [err("", "", "has more cells than the header has columns")]
    broken = next((h for h, c in zip(header, cells) if "\n" in c or "\r" in c), None)
    if broken:  # an unclosed quote swallows the rows after it
        return None, [err(broken, "", "holds a quoted cell that runs across lines (an unclosed quote?)",
                          "one line per row; close the quote")]
    data = table_name(v["data"]) if v.get("data") else (f"{v['material']}_strengths.csv" if v.get("material") else "")
    spec = TABLES.get(data)
    if spec is None:
        column = "data" if "data" in v else "material"
        return None, [err(column, v.get(column, ""), "is not a table a firm file can supply",
                          ", ".join(t.removesuffix(".csv") for t in TABLES))]
    key, problem = _key(data, spec, v)
    if problem:
        return None, [err("key" if v.get("key") else "species", v.get("key", ""), problem,
                          "; ".join(f"{k}=…" for k in spec.keys))]
    column = v.get("column") or (spec.values[0] if len(spec.values) == 1 else "")
    if column not in spec.values:
        return None, [err("column", v.get("column", ""), f"is not a value column of {data}", ", ".join(spec.values))]
    where = (data, key, column)
    original = next((r for r in builtin[data].rows if tuple((k, r.get(k, "").strip()) for k in spec.keys) == key),
                    None)
    errors = []
    if original is None and not spec.firm_may_add:
        return None, [err("key", v.get("key", ""), f"matches no row of {data}; a firm file may add rows only to "
                          "the strength tables", "a key as the tool writes it (timbersheets data DIR --firm-file)")]
    if original is None:
        errors += _new_row_problems(data, dict(key), err)
    errors += _value_problems(data, dict(key), column, v.get("value", ""), original, err)
    expected = (original or {}).get("unit", "").strip() or spec.unit
    if v.get("unit") and v["unit"].replace("-", "") != expected.replace("-", ""):
        errors.append(err("unit", v["unit"], f"is not the unit of {data}", expected))
    status = v.get("status", "")
    if status not in FIRM_STATUSES:
        errors.append(err("status", status, "is blank" if not status else "is not a data status",
                          ", ".join(FIRM_STATUSES)))
    elif status == "verified":
        errors += _verified_problems(data, v, err)
    return where, errors


def _key(data: str, spec: TableSpec, v: dict[str, str]) -> tuple[Key, str]:
    if v.get("key"):
        pairs = {}
        for part in v["key"].split(";"):
            name, eq, value = part.partition("=")
            if not eq or not name.strip() or not value.strip():
                return (), f"part '{part.strip()}' is not name=value"
            pairs[name.strip()] = value.strip()
    else:
        pairs = {k: v.get(k, "") for k in spec.keys}
        if "category" not in spec.keys and v.get("category"):
            return (), "gives a category, which glulam strengths do not have"
    missing = [k for k in spec.keys if not pairs.get(k)]
    extra = [k for k in pairs if k not in spec.keys]
    if missing or extra:
        return (), f"does not name the row of {data}: " + "; ".join(
            x for x in (f"missing {', '.join(missing)}" if missing else "",
                        f"unknown {', '.join(extra)}" if extra else "") if x)
    return tuple((k, pairs[k]) for k in spec.keys), ""


def _new_row_problems(data: str, key: dict[str, str], err) -> list[DataRowError]:
    """A row a firm adds (a species or grade the built-in data lacks) must name a known property."""
    out = []
    if key["property"] not in PROPERTIES[data]:
        out.append(err("key", key["property"], "is not a property of the table", ", ".join(PROPERTIES[data])))
    if data.startswith("sawn") and key["category"] not in SAWN_CATEGORIES:
        out.append(err("key", key["category"], "is not a sawn lumber category", ", ".join(SAWN_CATEGORIES)))
    return out


def _value_problems(data: str, key: dict[str, str], column: str, text: str, original, err) -> list[DataRowError]:
    """A number, of the right sign and scale: a strength in kPa or a modulus in GPa is refused."""
    try:
        value = float(text)
    except ValueError:
        return [err("value", text, "is blank" if not text else "is not a number", "a plain number")]
    if not math.isfinite(value):
        return [err("value", text, "is not a finite number", "a plain number")]
    if value < 0 or (value == 0 and data not in MAY_BE_ZERO):
        return [err("value", text, "has the wrong sign", "a number greater than 0")]
    if data.endswith("strengths.csv"):
        modulus = key["property"].startswith("E")
        low, high = (1000.0, 30000.0) if modulus else (0.0, 100.0)
        if not low < value <= high:
            what = "a modulus of elasticity" if modulus else "a specified strength"
            return [err("value", text, f"is out of scale for {what} in MPa",
                        f"{low:g} to {high:g} MPa" if modulus else f"up to {high:g} MPa")]
    if data == "resistance_factors.csv" and value > 1.0:
        return [err("value", text, "is not a resistance factor", "0 to 1.0")]
    builtin = float(original[column]) if original is not None else 0.0
    if builtin and not 0.5 <= value / builtin <= 2.0:
        return [err("value", text, f"is far from the built-in value {builtin:g} (more than a factor of 2): "
                    "check its unit and scale", f"a value in the unit of {data}")]
    if not builtin and data in MAY_BE_ZERO and value > 2.0:
        return [err("value", text, "is not a load factor", "0 to 2.0")]
    return []


def _verified_problems(data: str, v: dict[str, str], err) -> list[DataRowError]:
    out = []
    if not v.get("verified_by"):
        out.append(err("verified_by", "", "is blank on a verified row", "the checker's name or initials"))
    try:
        dt.date.fromisoformat(v.get("verified_on", ""))
    except ValueError:
        out.append(err("verified_on", v.get("verified_on", ""), "is not a date on a verified row", "YYYY-MM-DD"))
    if not v.get("edition"):
        out.append(err("edition", "", "is blank on a verified row", "the edition checked against, e.g. O86:19"))
    elif not _designed_edition(data, v["edition"]):
        code = "NBC" if data in NBC_TABLES else "CSA O86"
        years = SUPPORTED_CODES["nbc" if data in NBC_TABLES else "o86"]
        out.append(err("edition", v["edition"], f"is not the {code} edition jobs are designed to, so the row "
                       "does not verify the value for them", ", ".join(f"{code} {y}" for y in years)))
    return out


def _designed_edition(data: str, edition: str) -> bool:
    """Whether `edition` (O86:19, CSA O86-2019, NBC 2020 …) is one this version designs to."""
    nbc = data in NBC_TABLES
    pattern = r"NBC\s*(\d{4})" if nbc else r"(?:CSA\s*)?O86\s*[-:]?\s*(\d{2}|\d{4})"
    match = re.fullmatch(pattern, edition.strip(), re.IGNORECASE)
    if not match:
        return False
    year = match.group(1) if len(match.group(1)) == 4 else f"20{match.group(1)}"
    return year in SUPPORTED_CODES["nbc" if nbc else "o86"]


def _row(name: str, number: int, where: tuple[str, Key, str], v: dict[str, str]) -> FirmRow:
    data, key, column = where
    return FirmRow(name, number, data, key, column, float(v["value"]), v.get("unit", ""), v.get("edition", ""),
                   v.get("table", "") or v.get("clause", ""), v.get("source", ""), v["status"],
                   v.get("verified_by", ""), v.get("verified_on", ""))


# --------------------------------------------------------------------------- merging
def merge(builtin: dict[str, DataFile], firm: FirmFile) -> dict[str, DataFile]:
    """The tables with the firm's values in place; each changed row remembers its firm rows."""
    out = dict(builtin)
    touched = {r.data for r in firm.rows} | {w[0] for w in firm.refused}
    for name in touched:
        spec = TABLES[name]
        rows = [dict(r) for r in builtin[name].rows]
        index = {tuple((k, r.get(k, "").strip()) for k in spec.keys): r for r in rows}

        def row_for(key: Key) -> dict:
            if key not in index:
                index[key] = {**dict(key), "unit": spec.unit, "status": "", "_added": "firm"}
                rows.append(index[key])
            return index[key]

        for fr in (r for r in firm.rows if r.data == name):
            row = row_for(fr.key)
            if not row.get("_added"):
                row.setdefault("_builtin", {})[fr.column] = row[fr.column]
            row.setdefault("_firm", {})[fr.column] = fr
            row[fr.column] = repr(fr.value)
        for (data, key, column), message in firm.refused.items():
            if data == name:
                row_for(key).setdefault("_refused", {})[column] = (firm.name, message)
        out[name] = DataFile(name, builtin[name].path, builtin[name].sha256, tuple(rows))
    return out


def provenance(base: Datum, row: dict, spec: TableSpec | None) -> Datum:
    """`base` as the firm file left it: the firm's status, edition and checker where it supplied the value."""
    supplied, refused = row.get("_firm", {}), row.get("_refused", {})
    if spec is None or not (supplied or refused):
        return base
    columns = (base.column,) if base.column in spec.values else spec.values
    for c in columns:
        if c in refused:
            file, message = refused[c]
            raise DataError(file, f"the value for {base.label} is refused: {message}")
    rows = [supplied[c] for c in columns if c in supplied]
    if not rows:
        return base
    statuses = [supplied[c].status if c in supplied else row.get("status", "") for c in columns]
    status = next((s for s in statuses if s not in VERIFIED_STATUSES),
                  "verified" if "verified" in statuses else "sourced")
    original = row.get("_builtin", {}).get(base.column)
    builtin = float(original) if original is not None and float(original) != base.value else None
    first = rows[0]
    return replace(base, table=first.where or base.table, edition=first.edition or base.edition, source=first.source or "firm data file",
                   status=status, file=first.file, firm=first.file, builtin=builtin,
                   verified_by="; ".join(dict.fromkeys(r.verified_by for r in rows if r.verified_by)),
                   verified_on="; ".join(dict.fromkeys(r.verified_on for r in rows if r.verified_on)))
