"""The member: one validated schedule row, as the engineering designs it.

The schedule (:mod:`timbersheets.schedule.read`) reads and validates a row and fills a
:class:`Member`; the design, sizing and load path use it; :meth:`Member.params`
is what crosses into a notebook (JSON primitives in entry units) and what the
inputs hash covers. The beam cells' values (:class:`Carry`) and the loads a
member carries from others (:class:`CarriedLoad`) are part of it.
"""

from __future__ import annotations

import hashlib
import json
from collections.abc import Mapping
from dataclasses import dataclass, field, replace
from types import MappingProxyType
from typing import Any

from ..errors import ParameterError, ScheduleError
from .columns import COLUMNS, LOAD_TYPES
from .sections import Section, parse_size
from .units import convert


@dataclass(frozen=True)
class Carry:
    """One entry of `carries`: which reaction of which member, and where it lands (mm, or None)."""

    mark: str
    reaction: int | None  # 1-based support number; None = the largest reaction
    at: float | None

    @property
    def label(self) -> str:
        return f"{self.mark}.R{self.reaction}" if self.reaction else f"{self.mark} (largest reaction)"


@dataclass(frozen=True)
class CarriedLoad:
    """A reaction of `source` at its support `reaction`, landing at `at` (mm from the left end; None on a
    column), by load type in N."""

    source: str
    reaction: int
    at: float | None
    loads: dict[str, float] = field(default_factory=dict)
    largest: bool = False  # the entry named the member without .Rn: its largest reaction was taken

    def params(self) -> dict:
        return {"from": self.source, "reaction": self.reaction, "largest": self.largest,
                "at": None if self.at is None else round(self.at / 1000, 9),
                "loads": {t: round(self.loads.get(t, 0.0) / 1000, 6) for t in LOAD_TYPES}}

    @classmethod
    def from_params(cls, raw: dict) -> "CarriedLoad":
        return cls(raw["from"], int(raw["reaction"]), None if raw["at"] is None else float(raw["at"]) * 1000,
                   {t: float(v) * 1000 for t, v in raw["loads"].items()}, bool(raw["largest"]))

    @property
    def label(self) -> str:
        return f"{self.source}.R{self.reaction}"


# ------------------------------------------------------------------ params (JSON primitives, entry units)
def points_params(points) -> list[dict]:
    return [{"value": round(p / 1000, 9), "at": round(x / 1000, 9)} for p, x in points]


def points_from_params(raw) -> tuple[tuple[float, float], ...]:
    return tuple((float(e["value"]) * 1000, float(e["at"]) * 1000) for e in raw)


def parts_params(parts) -> list[dict]:
    return [{"value": round(w, 9), "from": round(a / 1000, 9), "to": round(b / 1000, 9)} for w, a, b in parts]


def parts_from_params(raw) -> tuple[tuple[float, float, float], ...]:
    return tuple((float(e["value"]), float(e["from"]) * 1000, float(e["to"]) * 1000) for e in raw)


def carries_params(carries) -> list[dict]:
    return [{"mark": c.mark, "reaction": c.reaction, "at": None if c.at is None else round(c.at / 1000, 9)}
            for c in carries]


def carries_from_params(raw) -> tuple[Carry, ...]:
    return tuple(Carry(e["mark"], e["reaction"], None if e["at"] is None else float(e["at"]) * 1000) for e in raw)


#: Set by the load path (reactions of the members this one carries), not by the schedule.
DERIVED = ("carried",)


_PARAMS = {
    "spans": (lambda v: None if v is None else [round(x / 1000, 9) for x in v],
              lambda raw: None if raw is None else tuple(float(x) * 1000 for x in raw)),
    "points": (points_params, points_from_params),
    "parts": (parts_params, parts_from_params),
    "carries": (carries_params, carries_from_params),
}


@dataclass(frozen=True)
class Member:
    """A validated schedule row: one typed field per column of the column table (`columns.COLUMNS`, in its
    order; `tests/test_schedule_member.py` keeps them equal), then where the row sits and what the reader
    knows about it. Quantities are floats in compute units (N, mm, MPa).

    `values` gives the columns by name (read-only), for code that picks a column by a computed name
    such as ``f"w_{t}"``. A member is never changed: :meth:`with_values` returns a changed copy.
    """

    mark: str
    type: str
    material: str
    species: str
    grade: str
    size: tuple[float, float] | str
    plies: int
    service: str
    K_T: float
    K_H: float
    length: float | None
    Ke: float
    Lx: float | None
    Ly: float | None
    Lu: float | None
    Lu_bottom: float | None
    restraint: str | None
    bears_on: str | None
    bearing_width: float | None
    net_area: float
    bearing: float | None
    P_D: float
    P_L: float
    P_S: float
    P_W: float
    P_E: float
    w_D: float
    w_L: float
    w_S: float
    w_W: float
    w_E: float
    M_D: float
    M_L: float
    M_S: float
    M_W: float
    M_E: float
    V_D: float
    V_L: float
    V_S: float
    V_W: float
    V_E: float
    spans: tuple[float, ...] | None
    overhang_left: float
    overhang_right: float
    trib: float | None
    q_D: float
    q_L: float
    q_S: float
    q_W: float
    q_E: float
    point_D: tuple[tuple[float, float], ...]
    point_L: tuple[tuple[float, float], ...]
    point_S: tuple[tuple[float, float], ...]
    point_W: tuple[tuple[float, float], ...]
    point_E: tuple[tuple[float, float], ...]
    part_D: tuple[tuple[float, float, float], ...]
    part_L: tuple[tuple[float, float, float], ...]
    part_S: tuple[tuple[float, float, float], ...]
    part_W: tuple[tuple[float, float, float], ...]
    part_E: tuple[tuple[float, float, float], ...]
    carries: tuple[Carry, ...]
    defl_L: float
    defl_total: float
    K_D: float | None
    live_use: str
    self_weight: str
    wind_sense: str
    width: float | None
    max_depth: float | None
    prefer: str | None
    note: str
    row: int
    given: frozenset[str]  # columns the row gave (not defaulted)
    carried: tuple[CarriedLoad, ...] = ()  # set by the load path: reactions of the members this one carries
    warnings: list[str] = field(default_factory=list, compare=False)
    entered: dict[str, str] = field(default_factory=dict, compare=False)  # quantity cells in another unit, as written

    @classmethod
    def of(cls, mark: str, row: int, values: Mapping[str, Any], given: frozenset[str],
           warnings: list[str] | None = None, entered: dict[str, str] | None = None) -> "Member":
        """A member from its cells by column name (every column of the table; `carried` optional)."""
        cells = {name: values[name] for name in COLUMNS if name != "mark"}
        return cls(mark=mark, **cells, row=row, given=frozenset(given), carried=tuple(values.get("carried", ())),
                   warnings=list(warnings or []), entered=dict(entered or {}))

    @property
    def values(self) -> Mapping[str, Any]:
        """Every column's value by name, and `carried` (read-only; built once)."""
        cache = self.__dict__.get("_values")
        if cache is None:
            cache = {name: getattr(self, name) for name in COLUMNS}
            cache["carried"] = self.carried
            object.__setattr__(self, "_values", cache)  # a cache of frozen fields, not a change of them
        return MappingProxyType(cache)

    def with_values(self, changes: Mapping[str, Any]) -> "Member":
        """A copy with the columns (or `carried`) in `changes` replaced, and its own list of warnings."""
        return replace(self, **changes, warnings=list(self.warnings))

    @property
    def section(self) -> Section:
        if self.values["size"] == "auto":
            raise ValueError(f"{self.mark}: size 'auto' has no section until it is sized")
        b, d = self.values["size"]
        return Section(b, d, self.values["plies"])

    def params(self) -> dict[str, Any]:
        """The inputs as JSON primitives, quantities as {"value", "unit"} in entry units.

        This is what crosses into a notebook, and what the inputs hash covers.
        """
        out: dict[str, Any] = {"mark": self.mark, "row": self.row}
        for name, value in self.values.items():
            if name in DERIVED:
                continue
            col = COLUMNS[name]
            if col.kind == "quantity" and value is not None:
                out[name] = {"value": round(convert(value, col.compute, col.unit), 9), "unit": col.unit}
            elif col.kind == "size":
                out[name] = value if value == "auto" else f"{value[0]:g}x{value[1]:g}"
            elif col.kind in _PARAMS:
                out[name] = _PARAMS[col.kind][0](value)
            else:
                out[name] = value
        out["given"] = sorted(self.given)
        out["carried"] = [c.params() for c in self.values.get("carried", ())]
        if self.entered:
            out["entered"] = dict(self.entered)
        return out

    @classmethod
    def from_params(cls, params: dict[str, Any]) -> "Member":
        """Rebuild a member from :meth:`params` (inside a notebook).

        Refuses unknown or missing keys: papermill itself only warns about them,
        and a typo in a load name would otherwise silently use a default.
        """
        expected = set(COLUMNS) | {"row", "given", *DERIVED}
        unknown, missing = set(params) - expected - {"entered"}, expected - set(params)
        if unknown or missing:
            raise ParameterError(sorted(unknown), sorted(missing))
        values: dict[str, Any] = {}
        for name, col in COLUMNS.items():
            if name == "mark":
                continue
            raw = params[name]
            if col.kind == "quantity" and raw is not None:
                values[name] = convert(float(raw["value"]), raw["unit"], col.compute)
            elif col.kind == "size":
                values[name] = raw if raw == "auto" else parse_size(raw)
            elif col.kind in _PARAMS:
                values[name] = _PARAMS[col.kind][1](raw)
            else:
                values[name] = raw
        values["carried"] = tuple(CarriedLoad.from_params(c) for c in params["carried"])
        return cls.of(params["mark"], int(params["row"]), values, frozenset(params.get("given", ())),
                      entered=dict(params.get("entered", {})))

    @property
    def inputs_hash(self) -> str:
        """What a check is tied to: the member's inputs, not where its row sits in the schedule."""
        params = {k: v for k, v in self.params().items() if k not in ("row", "entered")}  # values, not spelling
        text = json.dumps(params, sort_keys=True, separators=(",", ":"))
        return "sha256:" + hashlib.sha256(text.encode()).hexdigest()


@dataclass
class RowError:
    """A row that could not be made into a member."""

    mark: str
    row: int
    errors: list[ScheduleError]
    warnings: list[str] = field(default_factory=list)
