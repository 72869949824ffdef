"""The one pint registry of the program, and parsing of schedule cells.

Inside the engineering functions every value is a plain float in the consistent
system N, mm, MPa (N/mm²), N·mm, so the same arithmetic serves the fast sizing
search and the rendered sheet. Units are checked where values enter (schedule
cells, public API) and converted to display units (kN, kN·m, MPa, mm) when they
leave.
"""

from __future__ import annotations

import math
import re
from functools import lru_cache

import pint


@lru_cache(maxsize=1)
def registry() -> pint.UnitRegistry:
    """The program's one pint registry, built on first use (building it takes a noticeable fraction of a second)."""
    ureg = pint.UnitRegistry()
    ureg.formatter.default_format = "~"
    return ureg


#: Units the engineering arithmetic works in, by dimension name.
COMPUTE_UNITS = {
    "force": "N",
    "length": "mm",
    "stress": "MPa",
    "moment": "N*mm",
    "line_load": "N/mm",
    "area": "mm**2",
    "modulus": "mm**3",
    "inertia": "mm**4",
    "volume": "m**3",
    "": "",
}

#: How a compute unit is shown on a sheet and in results.json.
DISPLAY_UNITS = {
    "N": "kN",
    "N*mm": "kN*m",
    "N/mm": "kN/m",
    "N/mm**3": "kN/m**3",
    "kg/mm**3": "kg/m**3",
}

_NUMBER_WITH_UNIT = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")


class UnitParseError(ValueError):
    """A cell could not be read as a number with an allowed unit."""


@lru_cache(maxsize=256)
def unit(text: str) -> pint.Unit:
    """The pint unit for `text` ("" is dimensionless)."""
    ureg = registry()
    return ureg.Unit(text) if text else ureg.dimensionless


def parse_quantity(text: str, default_unit: str) -> float:
    """Read a schedule cell such as ``"3.6 m"``, ``"12 ft"`` or ``"4.5"``.

    A bare number takes `default_unit`. The value is returned as a float in
    `default_unit`. Raises UnitParseError for non-numbers, NaN or infinite
    values, unknown units and units of the wrong dimension.
    """
    match = _NUMBER_WITH_UNIT.match(text)
    if not match:
        raise UnitParseError("is not a number")
    number = float(match.group(1))
    if not math.isfinite(number):
        raise UnitParseError("is not a finite number")
    unit_text = match.group(2)
    if not unit_text:
        return number
    try:
        given = unit(unit_text.replace("·", "*"))
    except (pint.errors.UndefinedUnitError, pint.errors.DefinitionSyntaxError, AttributeError, TypeError, ValueError):
        raise UnitParseError(f"has an unknown unit '{unit_text}'") from None
    target = unit(default_unit)
    if given.dimensionality != target.dimensionality:
        raise UnitParseError(
            f"has unit '{unit_text}', which is not a {_dimension_words(target)} "
            f"(expected e.g. {default_unit or 'a plain number'})"
        )
    return float(registry().Quantity(number, given).to(target).magnitude)


def _dimension_words(u: pint.Unit) -> str:
    names = {
        "[length]": "length",
        "[length] * [mass] / [time] ** 2": "force",
        "[mass] / [time] ** 2": "line load (force per length)",
        "[length] ** 2 * [mass] / [time] ** 2": "moment",
        "dimensionless": "plain number",
    }
    return names.get(str(u.dimensionality), str(u.dimensionality))


@lru_cache(maxsize=256)
def _factor(from_unit: str, to_unit: str) -> float:
    """The multiplier from one unit to another (pint, once per pair)."""
    return float(registry().Quantity(1.0, unit(from_unit)).to(unit(to_unit)).magnitude)


def convert(value: float, from_unit: str, to_unit: str) -> float:
    """Convert a float between two units of the same dimension.

    Every unit here is multiplicative (no temperatures), so a cached factor
    per pair gives pint's answer at a fraction of the cost on the sizing path.
    """
    if from_unit == to_unit:
        return value
    return value * _factor(from_unit, to_unit)


def display_unit(compute_unit: str) -> str:
    """The unit a compute-unit value is shown in."""
    return DISPLAY_UNITS.get(compute_unit, compute_unit)


def to_display(value: float, compute_unit: str) -> tuple[float, str]:
    """Convert a compute-unit float to its display unit."""
    shown = display_unit(compute_unit)
    return convert(value, compute_unit, shown), shown
