"""Reading and validating the member schedule (CSV or .xlsx).

Every row is validated before anything is computed. A bad cell becomes a
:class:`~timbersheets.errors.ScheduleError` naming the file, the row as a
spreadsheet shows it (header = row 1), the column, the value and what is
allowed. A bad row is kept as an error entry; the other rows go on.
"""

from __future__ import annotations

import difflib
import math
import re
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from ..engineering.columns import COLUMNS, LOAD_NAMES, LOAD_TYPES, REQUIRED, Column  # noqa: F401 (read from here too)
from ..engineering.loads import KD_OVERRIDE_RANGE
from ..engineering.materials import (GLULAM_SPECIES, SAWN_GRADES, SAWN_SPECIES, canonical, canonical_grade,
                                     sawn_table_grade)
from ..engineering.member import Member, RowError  # the schedule fills them (also read from here)
from ..engineering.membertypes import member_type, member_types
from ..engineering.sections import Section, parse_size, sawn_category
from ..engineering.units import UnitParseError, convert, example, parse_quantity
from ..errors import JobError, ScheduleError
from . import beamloads
from .csvtext import cell_problem, clean, physical_lines, split_records
from .labels import label_problem
from .rowrules import bearing_errors, lateral_support_errors

EXTRA = "\x00extra"  # key marking a row with cells beyond the header (their column numbers)
BAD = "\x00bad:"  # key prefix marking a cell the file holds no usable value for (the problem)
UNREAD = "\x00unread"  # key marking a row that could not be read whole (the problem)


@dataclass
class Schedule:
    path: Path
    members: list[Member]
    rejected: list[RowError]
    warnings: list[str]

    @property
    def entries(self) -> list[Member | RowError]:
        """Members and rejected rows in schedule order."""
        return sorted([*self.members, *self.rejected], key=lambda e: e.row)


# --------------------------------------------------------------------------- reading
def read_rows(path: Path) -> tuple[list[str], list[tuple[int, dict[str, str]]], list[str]]:
    """Header, rows as (spreadsheet row number, {column: text}), and notes.

    A row that cannot be read whole (a runaway quote) comes back as ``{UNREAD: problem}``.
    """
    if not path.exists():
        raise JobError(str(path), "no schedule file", "Create schedule.csv (timbersheets new DIR makes one)")
    if not path.is_file():
        raise JobError(str(path), "is not a file", "The schedule is a CSV or .xlsx file in the job folder")
    if path.suffix.lower() == ".xlsx":
        return _read_xlsx(path)
    text = decode_text(path)
    notes: list[str] = []
    first = next((ln for ln in physical_lines(text) if ln.strip()), "")
    delimiter = ","
    if first.count(";") > first.count(","):
        delimiter = ";"
        notes.append(f"{path.name}: read as semicolon-separated (decimal commas accepted)")
    table = split_records(text, delimiter)
    if not table or not any(c.strip() for c in table[0].cells):
        raise JobError(str(path), "is empty", "The first row must name the columns (mark, type, ...)")
    if table[0].problem:
        raise JobError(f"{path.name}, row 1", table[0].problem)
    header = [h.strip() for h in table[0].cells]
    _refuse_duplicates(path.name, header)
    rows = []
    for record in table[1:]:
        cells = record.cells
        if record.problem:
            rows.append((record.row, {"mark": cells[0].strip() if cells else "", UNREAD: record.problem}))
            continue
        if not any(c.strip() for c in cells):
            continue
        if delimiter == ";":
            cells = [re.sub(r"^(\s*[-+]?\d+),(\d+)", r"\1.\2", c) for c in cells]
        rows.append((record.row, _row_dict(header, cells)))
    return header, rows, notes


def decode_text(path: Path) -> str:
    """The text of a file saved as UTF-8 (with or without BOM) or UTF-16 (with BOM)."""
    raw = path.read_bytes()
    if raw[:2] in (b"\xff\xfe", b"\xfe\xff"):
        try:
            return raw.decode("utf-16")
        except UnicodeDecodeError:
            raise JobError(str(path), "is not valid UTF-16 text", "Save it as CSV UTF-8") from None
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = raw[:exc.start].count(b"\n") + 1
        raise JobError(str(path), f"is not UTF-8 text (line {line}, byte {exc.start})", "Save it as CSV UTF-8") from None


def _refuse_duplicates(file: str, header: list[str]) -> None:
    seen: dict[str, int] = {}
    for number, name in enumerate(header, start=1):
        if name and name in seen:
            raise JobError(f"{file}, row 1, column '{name}'",
                           f"appears twice (columns {seen[name]} and {number}); which one holds the value is unclear",
                           "Keep one column of each name")
        seen.setdefault(name, number)


def _row_dict(header: list[str], cells: list[str]) -> dict[str, str]:
    row = {h: (clean(cells[i]) if i < len(cells) else "") for i, h in enumerate(header) if h}
    beyond = [i for i, c in enumerate(cells) if c.strip() and (i >= len(header) or not header[i])]
    if beyond:
        row[EXTRA] = ", ".join(str(i + 1) for i in beyond)
    return row


def _read_xlsx(path: Path) -> tuple[list[str], list[tuple[int, dict[str, str]]], list[str]]:
    """The first sheet, numbers at full precision. A formula with no saved value and a
    cell hidden under a merge are errors of their cell: both would read as blank."""
    import openpyxl

    try:
        book = openpyxl.load_workbook(path, data_only=True)
        formulas = openpyxl.load_workbook(path, data_only=False).worksheets[0]
    except Exception as exc:  # openpyxl raises many kinds for a bad file
        raise JobError(str(path), f"cannot be read as .xlsx ({exc})") from None
    sheet = book.worksheets[0]
    table = [[_xlsx_text(v) for v in row] for row in sheet.iter_rows(values_only=True)]
    if not table:
        raise JobError(str(path), "is empty")
    header = [h.strip() for h in table[0]]
    _refuse_duplicates(path.name, header)
    hidden = {cell: str(r) for r in sheet.merged_cells.ranges for cell in list(r.cells)[1:]}
    rows = []
    for n, cells in enumerate(table[1:], start=2):
        row = _row_dict(header, cells)
        for i, name in enumerate(header):
            if not name:
                continue
            if (n, i + 1) in hidden:
                row[BAD + name] = (f"is inside merged cells {hidden[(n, i + 1)]}; only the first cell of a merge "
                                   "holds a value. Unmerge and fill every row")
            elif cells[i:i + 1] == [""] and formulas.cell(n, i + 1).data_type == "f":
                row[BAD + name] = ("is a formula with no saved value; open the file in a spreadsheet program "
                                   "and save it, so the value is stored")
        if any(c.strip() for c in cells) or any(k.startswith(BAD) for k in row):
            rows.append((n, row))
    return header, rows, []


def _xlsx_text(value: Any) -> str:
    if value is None:
        return ""
    if isinstance(value, float):
        return repr(value)
    return str(value)


# --------------------------------------------------------------------------- validating
def load_schedule(path: Path, data=None) -> Schedule:
    """Read and validate every row of the schedule at `path`.

    `data` is the job's DataSet (the built-in data unless given): species and
    grades a firm data file adds are valid."""
    from ..engineering.data import default_data

    data = data or default_data()
    header, rows, notes = read_rows(path)
    name = path.name
    if not rows:
        raise JobError(str(path), "has no member rows", "Give one row per member below the header")
    warnings = list(notes)
    missing = [c for c in REQUIRED if c not in header]
    if missing:
        raise JobError(f"{name}, row 1", f"required column(s) missing: {', '.join(missing)}",
                       f"The header must name at least: {', '.join(REQUIRED)}")
    for col in header:
        if col and col not in COLUMNS:
            close = difflib.get_close_matches(col, COLUMNS, n=1, cutoff=0.6)
            hint = f"; did you mean '{close[0]}'?" if close else ""
            warnings.append(f"{name}, row 1, column '{col}': unknown column, ignored{hint}")
    members: list[Member] = []
    rejected: list[RowError] = []
    first_row: dict[str, int] = {}
    for number, cells in rows:
        mark = cells.get("mark", "")
        errors, values, given = _validate_row(name, number, cells, data)
        if mark and not label_problem(mark):
            if mark in first_row:
                errors.insert(0, ScheduleError(name, number, "mark", mark,
                                               f"is a duplicate of the mark in row {first_row[mark]}",
                                               "a mark unique in the job"))
            else:
                first_row[mark] = number
        if errors:
            rejected.append(RowError(mark or f"row-{number}", number, errors))
        else:
            member = Member.of(mark, number, values, frozenset(given), entered=_entered(cells, given))
            member.warnings.extend(_row_warnings(name, number, member))
            members.append(member)
    return Schedule(path, members, rejected, warnings)


def _validate_row(file: str, row: int, cells: dict[str, str], data) -> tuple[list[ScheduleError], dict[str, Any], set[str]]:
    errors: list[ScheduleError] = []
    values: dict[str, Any] = {}
    given: set[str] = set()
    if UNREAD in cells:
        return [ScheduleError(file, row, None, None, cells[UNREAD])], values, given
    if EXTRA in cells:
        errors.append(ScheduleError(file, row, None, None, f"has a value in column(s) {cells[EXTRA]}, beyond the "
                                    "named columns", "one cell per header column (quote text that contains commas)"))
    for name, col in COLUMNS.items():
        text = cells.get(name, "")
        if BAD + name in cells:
            errors.append(ScheduleError(file, row, name, None, cells[BAD + name]))
            continue
        if not text:
            if col.required:
                errors.append(ScheduleError(file, row, name, "", "is blank, but the column is required", _allowed(col)))
            values[name] = col.default
            continue
        given.add(name)
        problem = cell_problem(text)
        if problem:
            errors.append(ScheduleError(file, row, name, text[:40] + ("..." if len(text) > 40 else ""), problem))
            continue
        try:
            values[name] = _read_cell(col, text)
        except ValueError as exc:
            errors.append(ScheduleError(file, row, name, text, str(exc), _allowed(col)))
    if not errors:
        errors += _cross_checks(file, row, values, given, data)
    return errors, values, given


def _entered(cells: dict[str, str], given: set[str]) -> dict[str, str]:
    """Quantity cells written with a unit other than the column's own (12 ft, 4.5 kip), as written."""
    out = {}
    for name in sorted(given):
        col, text = COLUMNS[name], cells[name].strip()
        if col.kind != "quantity":
            continue
        number = text[:-len(col.unit)].strip() if col.unit and text.endswith(col.unit) else text
        try:
            float(number)
        except ValueError:
            out[name] = text
    return out


def choices(col: Column) -> tuple[str, ...]:
    """The allowed values of a choice column; `type` takes them from the member type registry."""
    return tuple(member_types()) if col.name == "type" else col.choices


def _allowed(col: Column) -> str:
    if col.name == "mark":
        return "letters, digits, '-', '_' and '.', at most 40 characters"
    if col.kind == "choice":
        return ", ".join(choices(col))
    if col.kind == "size":
        return "b x d in mm, e.g. 38x235 or 130x228"
    if col.kind == "count":
        return f"a whole number from {col.minimum:g} to {col.maximum:g}"
    if col.kind in beamloads.ALLOWED:
        return beamloads.ALLOWED[col.kind]
    if col.kind == "quantity":
        return f"a number in {col.unit} ({bound_text(col)}), or with its own unit, e.g. {example(col.unit)}"
    if col.kind == "number":
        return f"a plain number ({bound_text(col)})"
    return ""


def bound_text(col: Column) -> str:
    """The column's bounds in words, as the column reference states them."""
    low = col.minimum
    if low is None:
        return "any value"
    if col.maximum is not None and low == -col.maximum:
        return f"from {low:g} to {col.maximum:g}"
    if col.maximum is None:
        return "greater than 0" if col.strict and low == 0 else f"greater than {low:g}" if col.strict \
            else "0 or more" if low == 0 else f"at least {low:g}"
    return f"{'over' if col.strict else 'from'} {low:g} {'up ' if col.strict else ''}to {col.maximum:g}"


def _read_cell(col: Column, text: str) -> Any:
    if col.kind == "text":
        if col.name == "mark" and label_problem(text):
            raise ValueError(label_problem(text))
        return text
    if col.kind == "choice":
        folded = {c.casefold(): c for c in choices(col)}
        if text.casefold() not in folded:
            raise ValueError("is not one of the allowed values")
        return folded[text.casefold()]
    if col.kind == "size":
        if text.casefold() == "auto":
            return "auto"
        try:
            return parse_size(text)
        except ValueError:
            raise ValueError("is not a size") from None
    if col.kind in beamloads.READERS:
        return beamloads.READERS[col.kind](text)
    if col.kind == "count":
        if not re.fullmatch(r"\d{1,6}", text) or not col.minimum <= int(text) <= col.maximum:
            raise ValueError(f"is not a whole number from {col.minimum:g} to {col.maximum:g}")
        return int(text)
    if col.kind == "quantity":
        try:
            value = parse_quantity(text, col.unit)
        except UnitParseError as exc:
            raise ValueError(str(exc)) from None
        _check_bound(col, value)
        return convert(value, col.unit, col.compute)
    try:
        value = float(text)
    except ValueError:
        raise ValueError("is not a number") from None
    if not math.isfinite(value):
        raise ValueError("is not a finite number")
    _check_bound(col, value)
    return value


def _check_bound(col: Column, value: float) -> None:
    if col.minimum is not None:
        if col.strict and value <= col.minimum:
            raise ValueError("must be greater than 0" if col.minimum == 0 else f"must exceed {col.minimum:g}")
        if value < col.minimum:
            raise ValueError("must not be negative" if col.minimum == 0 else f"must be at least {col.minimum:g}")
    if col.maximum is not None and value > col.maximum:
        raise ValueError(f"exceeds {col.maximum:g}, more than any real member has")


def _cross_checks(file: str, row: int, v: dict[str, Any], given: set[str], data) -> list[ScheduleError]:
    """Rules that involve more than one cell: species/grade/size against the material."""
    errs: list[ScheduleError] = []
    material = v["material"]
    table = {**(GLULAM_SPECIES if material == "glulam" else SAWN_SPECIES), **{s: s for s in data.species(material)}}
    species = canonical(v["species"], table)
    if species is None:
        names = sorted(set(table.values()))
        shorts = sorted(k for k in table if k not in names)
        errs.append(ScheduleError(file, row, "species", v["species"], f"is not a {material} species",
                                  f"{', '.join(names)} (or {', '.join(shorts)})"))
    else:
        v["species"] = species
    if material == "glulam":
        grades = sorted(data.glulam_grades().get(species or "", ()))
        grade = canonical_grade(v["grade"], tuple(grades))
        if species and grade is None:
            errs.append(ScheduleError(file, row, "grade", v["grade"], f"is not a glulam stress grade of {species}",
                                      ", ".join(grades)))
        elif grade:
            v["grade"] = grade
        glulam_k_h = data.glulam_system_factor().value
        if v["K_H"] != glulam_k_h:
            errs.append(ScheduleError(file, row, "K_H", f"{v['K_H']:g}", "is a system factor for sawn lumber; "
                                      f"glulam takes K_H = {glulam_k_h:.1f}", f"{glulam_k_h:.1f} (or blank) for glulam"))
        if v["plies"] != 1:
            errs.append(ScheduleError(file, row, "plies", str(v["plies"]), "applies to built-up sawn members only", "1 for glulam"))
    else:
        grades = SAWN_GRADES + tuple(sorted({g for g, _ in data.firm_sawn_grades} - set(SAWN_GRADES)))
        grade = canonical_grade(v["grade"], grades)
        if grade is None:
            errs.append(ScheduleError(file, row, "grade", v["grade"], "is not a sawn lumber grade", ", ".join(grades)))
        else:
            v["grade"] = grade
    if v["size"] != "auto":
        errs += _size_checks(file, row, v, data)
    least = data.clause_value("net_area_min").value
    if v["net_area"] is not None and v["net_area"] > 1.0:
        errs.append(ScheduleError(file, row, "net_area", f"{v['net_area']:g}", "is a ratio A_n/A_g and cannot exceed 1",
                                  f"a ratio from {least:g} to 1.0"))
    elif v["net_area"] is not None and v["net_area"] < least:
        errs.append(ScheduleError(file, row, "net_area", f"{v['net_area']:g}",
                                  f"leaves less than {least * 100:g} % of the gross area; O86 does not allow designing on it",
                                  f"a ratio from {least:g} to 1.0; reduce the holes or notches"))
    beam_errors = beamloads.row_errors(file, row, v, given)
    if beam_errors:
        return errs + beam_errors
    for name in ("Lx", "Ly", "Lu", "Lu_bottom"):
        if v["length"] is None:  # a beam given by its spans alone has no one length to compare with
            break
        if v[name] is not None and v[name] > v["length"] * (1 + 1e-9) and name in given:
            errs.append(ScheduleError(file, row, name, f"{v[name] / 1000:g} m", f"is longer than the member (length {v['length'] / 1000:g} m)",
                                      f"at most the length, {v['length'] / 1000:g} m"))
    errs += _type_rules(file, row, v, given)
    errs += lateral_support_errors(file, row, v)
    errs += bearing_errors(file, row, v, data)
    low, high = KD_OVERRIDE_RANGE
    if v["K_D"] is not None and not low <= v["K_D"] <= high:
        errs.append(ScheduleError(file, row, "K_D", f"{v['K_D']:g}", "is outside the load-duration factors of "
                                  f"O86 Table 5.1 ({low:g} long term to {high:g} short term)",
                                  f"{low:g} to {high:g}, or blank to compute K_D per combination"))
    return errs


#: Why a column a type requires matters, and what to write in it.
REQUIRED_WHY = {"Lu": " to say how its compression edge is held (lateral support is never assumed)"}
REQUIRED_HINT = {"Lu": "0 when decking, sheathing or joists fixed to it hold the compression edge continuously; "
                       "else the distance between lateral supports in m (the length when nothing braces it)"}


def _type_rules(file: str, row: int, v: dict[str, Any], given: set[str]) -> list[ScheduleError]:
    """The member type's own rules: columns it requires or refuses, and what its blank lengths mean."""
    kind = member_type(v["type"])
    errs = [ScheduleError(file, row, name, "", f"is blank, but a {kind.name} member needs it"
                          f"{REQUIRED_WHY.get(name, '')}", REQUIRED_HINT.get(name, _allowed(COLUMNS[name])))
            for name in kind.requires if name not in given]
    errs += [ScheduleError(file, row, name, _shown(COLUMNS[name], v[name]), f"does not apply to a {kind.name} member",
                           "leave it blank") for name in kind.refuses if name in given]
    for name, blank in kind.blank.items():
        if name not in given:
            v[name] = v["length"] if blank == "length" else float(blank)
    return errs


def _shown(col: Column, value: Any) -> str:
    """A value as the row gave it, in the column's entry unit."""
    if col.kind == "quantity" and value is not None:
        return f"{convert(value, col.compute, col.unit):g} {col.unit}"
    return str(value)


def _size_checks(file: str, row: int, v: dict[str, Any], data) -> list[ScheduleError]:
    b, d = v["size"]
    text = f"{b:g}x{d:g}"
    if v["material"] == "glulam":
        widths = data.glulam_widths
        lam, min_depth = data.lamination
        if b not in widths:
            return [ScheduleError(file, row, "size", text, "has a width that is not a standard glulam width",
                                  f"widths {', '.join(f'{w:g}' for w in widths)} mm")]
        if d < min_depth:
            return [ScheduleError(file, row, "size", text, f"is shallower than the least glulam depth ({min_depth:g} mm)",
                                  f"depths from {min_depth:g} mm in {lam:g} mm laminations")]
        return []
    pairs = {(min(pb, pd), max(pb, pd)) for _cat, pb, pd in data.sawn_sizes}
    if (min(b, d), max(b, d)) not in pairs:
        thick = sorted({p[0] for p in pairs if p[0] < 140})
        timbers = sorted({p[0] for p in pairs if p[0] >= 140})
        return [ScheduleError(file, row, "size", text, "is not a standard dressed sawn size",
                              f"dimension lumber {'/'.join(f'{t:g}' for t in thick)} × 38…286 mm, "
                              f"timbers {'/'.join(f'{t:g}' for t in timbers)} mm")]
    section = Section(b, d, v["plies"])
    category = sawn_category(section)
    if sawn_table_grade(v["grade"], category, data.firm_sawn_grades) is None:
        return [ScheduleError(file, row, "grade", v["grade"], f"is not a grade of {category.replace('-', ' and ')} sizes",
                              "SS, No.1, No.2 for timbers; SS, No.1, No.2, No.1/No.2, No.3, Stud for dimension lumber")]
    return []


def _row_warnings(file: str, row: int, m: Member) -> list[str]:
    out = []
    if m.material == "glulam" and m.size != "auto":
        lam, _ = default_lamination()
        depth = m.size[1]
        if abs(depth / lam - round(depth / lam)) > 1e-6:
            out.append(f"{file}, row {row}, column 'size': glulam depth {depth:g} mm is not a multiple of "
                       f"{lam:g} mm laminations")
    return out


def default_lamination() -> tuple[float, float]:
    from ..engineering.data import default_data

    return default_data().lamination
