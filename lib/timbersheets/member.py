"""The member: one validated schedule row, as the engineering designs it.

The schedule (:mod:`timbersheets.schedule`) reads and validates a row and fills a
:class:`Member`; the design, sizing and load path use it; :meth:`Member.params`
is what crosses into a notebook (JSON primitives in entry units) and what the
inputs hash covers. The beam cells' values (:class:`Carry`) and the loads a
member carries from others (:class:`CarriedLoad`) are part of it.
"""

from __future__ import annotations

import hashlib
import json
from dataclasses import dataclass, field
from typing import Any

from .columns import COLUMNS, LOAD_TYPES
from .errors import ParameterError, ScheduleError
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


@dataclass
class Member:
    """A validated schedule row. Quantities are floats in compute units (N, mm)."""

    mark: str
    row: int
    values: dict[str, Any]
    given: frozenset[str]  # columns the row gave (not defaulted)
    warnings: list[str] = field(default_factory=list)
    entered: dict[str, str] = field(default_factory=dict)  # quantity cells written in another unit, as written

    def __getattr__(self, name: str) -> Any:
        try:
            return self.__dict__["values"][name]
        except KeyError:
            raise AttributeError(name) from None

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
        return cls(params["mark"], int(params["row"]), values, frozenset(params.get("given", ())),
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
