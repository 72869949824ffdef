"""Beam geometry and load cells of the schedule: spans, point and partial loads, carries.

Cell grammar (units as elsewhere: a bare number takes the column's unit):

* ``spans``: lengths separated by ``+`` (``4.2+4.2``, ``14 ft + 14 ft``), metres;
* ``point_*``: ``value@position`` entries separated by ``;`` (``12@2.4; 8 kN@4.8 m``),
  kN at m from the member's left end (overhang included);
* ``part_*``: ``value@from-to`` entries (``3.5@0-2.4``), kN/m over m;
* ``carries``: ``MARK.Rn@position`` (n-th support reaction of MARK, supports
  numbered from the left), ``MARK@position`` (its largest reaction), and on a
  column ``MARK.Rn`` or ``MARK`` (no position).

Every reader returns values in compute units (N, N/mm, mm) and raises
ValueError with the words a schedule error shows.
"""

from __future__ import annotations

import re

from ..engineering.member import Carry
from ..engineering.units import UnitParseError, convert, parse_quantity

_CARRY = re.compile(r"^(?P<mark>[A-Za-z0-9_-]+(?:\.[A-Za-z0-9_-]+)*?)(?:\.R(?P<n>\d+))?(?:@(?P<at>.+))?$")


def _quantity(text: str, unit: str, compute: str, what: str) -> float:
    try:
        return convert(parse_quantity(text.strip(), unit), unit, compute)
    except UnitParseError as exc:
        raise ValueError(f"{what} '{text.strip()}' {exc}") from None


def _entries(text: str) -> list[str]:
    parts = [p.strip() for p in text.split(";")]
    if any(not p for p in parts):
        raise ValueError("has an empty entry between ';' separators")
    return parts


def parse_spans(text: str) -> tuple[float, ...]:
    """``4.2+4.2`` → (4200.0, 4200.0) mm. Every span must be longer than 0."""
    out = []
    for part in text.split("+"):
        if not part.strip():
            raise ValueError("has an empty span between '+' signs")
        value = _quantity(part, "m", "mm", "span")
        if value <= 0:
            raise ValueError(f"has span '{part.strip()}', which must be greater than 0")
        out.append(value)
    return tuple(out)


def parse_points(text: str) -> tuple[tuple[float, float], ...]:
    """``12@2.4; 8 kN@4.8 m`` → ((12000.0, 2400.0), (8000.0, 4800.0)): (N, mm from the left end)."""
    out = []
    for entry in _entries(text):
        value, at, rest = (*entry.split("@"), None, None)[:3]
        if at is None or rest is not None:
            raise ValueError(f"entry '{entry}' is not value@position")
        position = _quantity(at, "m", "mm", "position")
        if position < 0:
            raise ValueError(f"entry '{entry}' has a negative position")
        out.append((_quantity(value, "kN", "N", "load"), position))
    return tuple(out)


def parse_parts(text: str) -> tuple[tuple[float, float, float], ...]:
    """``3.5@0-2.4`` → ((3.5, 0.0, 2400.0),): (N/mm, from mm, to mm)."""
    out = []
    for entry in _entries(text):
        value, _, extent = entry.partition("@")
        ends = re.fullmatch(r"\s*([^-]+?)\s*-\s*(.+?)\s*", extent) if extent else None
        if not ends:
            raise ValueError(f"entry '{entry}' is not value@from-to")
        start = _quantity(ends.group(1), "m", "mm", "start")
        end = _quantity(ends.group(2), "m", "mm", "end")
        if not 0 <= start < end:
            raise ValueError(f"entry '{entry}' does not run from a start at 0 or more to a larger end")
        out.append((_quantity(value, "kN/m", "N/mm", "load"), start, end))
    return tuple(out)


def parse_carries(text: str) -> tuple[Carry, ...]:
    """``RB-1.R2@3.6; RB-2@7.2`` → Carry entries (position in mm, or None)."""
    out = []
    for entry in _entries(text):
        match = _CARRY.match(entry.replace(" ", ""))
        if not match:
            raise ValueError(f"entry '{entry}' is not MARK.Rn@position, MARK@position, MARK.Rn or MARK")
        n = int(match.group("n")) if match.group("n") else None
        if n == 0:
            raise ValueError(f"entry '{entry}': supports are numbered from 1")
        at = _quantity(match.group("at"), "m", "mm", "position") if match.group("at") else None
        if at is not None and at < 0:
            raise ValueError(f"entry '{entry}' has a negative position")
        out.append(Carry(match.group("mark"), n, at))
    return tuple(out)


ALLOWED = {
    "spans": "span lengths in m separated by '+', each greater than 0, e.g. 4.2+4.2",
    "points": "value@position entries separated by ';', kN at m from the member's left end, e.g. 12@2.4; 8 kN@4.8 m",
    "parts": "value@from-to entries separated by ';', kN/m over m from the left end, e.g. 3.5@0-2.4",
    "carries": "MARK.Rn@position or MARK@position on a beam, MARK.Rn or MARK on a column, separated by ';'",
}
READERS = {"spans": parse_spans, "points": parse_points, "parts": parse_parts, "carries": parse_carries}


# ------------------------------------------------------------------ row rules
def row_errors(file: str, row: int, v: dict, given: set[str]) -> list:
    """Cross-cell rules of the beam columns; sets v["length"] from `spans` when only spans are given."""
    from ..errors import ScheduleError
    from ..engineering.membertypes import member_type
    from ..engineering.columns import LOAD_TYPES

    def err(column, value, problem, allowed=""):
        return ScheduleError(file, row, column, value, problem, allowed)

    kind = member_type(v["type"])
    beam = kind.routine == "bending"
    if any(c in given for c in kind.refuses):
        return []  # the member type's own rules report them
    if beam and any(c.at is None for c in v["carries"]):
        bad = next(c for c in v["carries"] if c.at is None)
        return [err("carries", bad.label, "on a beam needs the position where the reaction lands",
                    "MARK.Rn@position, e.g. RB-1.R2@3.6")]
    if not beam and any(c.at is not None for c in v["carries"]):
        return [err("carries", next(c.label for c in v["carries"] if c.at is not None),
                    "gives a position, but a column or tension member takes the reaction as axial force",
                    "MARK.Rn or MARK, without @position")]
    errors = []
    total = None
    if v["spans"] is not None:
        total = sum(v["spans"]) + v["overhang_left"] + v["overhang_right"]
        if v["length"] is not None and abs(v["length"] - total) > 1.0:
            errors.append(err("length", f"{v['length'] / 1000:g} m", f"differs from the spans and overhangs, "
                              f"which add up to {total / 1000:g} m", "blank, or the total length"))
        v["length"] = total
    elif v["length"] is None:
        return [err("length", "", "is blank, but the column is required (a beam may give its spans instead)",
                    "a length in m greater than 0, or spans such as 4.2+4.2")]
    elif v["overhang_left"] or v["overhang_right"]:
        total = v["length"]
        back = total - v["overhang_left"] - v["overhang_right"]
        if back <= 0:
            return [err("overhang_left", f"{v['overhang_left'] / 1000:g} m", "leaves no span between the "
                        f"supports of a {total / 1000:g} m member", "overhangs shorter than the member")]
        v["spans"] = (back,)
    length = v["length"]
    for t in LOAD_TYPES:
        for p, x in v[f"point_{t}"]:
            if x > length + 1e-6:
                errors.append(err(f"point_{t}", f"{p / 1000:g}@{x / 1000:g}", f"is at {x / 1000:g} m, beyond the "
                                  f"member's right end ({length / 1000:g} m)", f"positions from 0 to {length / 1000:g} m"))
        for w, a, b in v[f"part_{t}"]:
            if b > length + 1e-6:
                errors.append(err(f"part_{t}", f"{w:g}@{a / 1000:g}-{b / 1000:g}", f"ends at {b / 1000:g} m, beyond "
                                  f"the member's right end ({length / 1000:g} m)", f"from 0 to {length / 1000:g} m"))
        if v[f"q_{t}"] and v["trib"] is None:
            errors.append(err(f"q_{t}", f"{v[f'q_{t}'] * 1000:g} kPa", "is an area load, but the row gives no "
                              "tributary width", "give trib (m), or the line load w_* instead"))
    for c in v["carries"]:
        if c.at is not None and c.at > length + 1e-6:
            errors.append(err("carries", f"{c.label}@{c.at / 1000:g}", f"lands at {c.at / 1000:g} m, beyond the "
                              f"member's right end ({length / 1000:g} m)", f"positions from 0 to {length / 1000:g} m"))
        if c.mark == v["mark"]:
            errors.append(err("carries", c.label, "names the member itself", "marks of other members"))
    if not errors and v["trib"] is not None:
        for t in LOAD_TYPES:
            v[f"w_{t}"] += v[f"q_{t}"] * v["trib"]  # w = q × trib (kPa × m = kN/m), shown on the sheet
    return errors
