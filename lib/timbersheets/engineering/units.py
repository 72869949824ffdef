"""The one pint registry of the program, and parsing of schedule cells.

Inside the engineering functions every value is a plain float in the consistent
system N, mm, MPa (N/mm²), N·mm, so the same arithmetic serves the fast sizing
search and the rendered sheet. Units are checked where values enter (schedule
cells, public API) and converted to display units (kN, kN·m, MPa, mm) when they
leave.
"""

from __future__ import annotations

import math
import os
import re
from functools import lru_cache
from pathlib import Path
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    import pint


@lru_cache(maxsize=1)
def registry() -> pint.UnitRegistry:
    """The program's one pint registry, built on first use.

    Parsing pint's definitions takes about 0.18 s in every process (the run, its workers, each
    kernel); pint keeps the parsed definitions in a cache folder (keyed by the definition files),
    read back in 0.02 s. Where that folder cannot be used, the registry is built from the files.
    pint itself is imported here, on first use (0.3 s): a run whose cells are bare numbers converts
    with EXACT_FACTORS alone and never needs it in its own process."""
    import pint

    folder = None
    try:
        folder = _cache_folder()
        ureg = pint.UnitRegistry(cache_folder=folder)
    except Exception:  # noqa: BLE001 - no home, an unwritable or a damaged cache: the registry as pint ships it
        import shutil

        if folder is not None:
            shutil.rmtree(folder, ignore_errors=True)  # a damaged entry is written anew next time
        ureg = pint.UnitRegistry()
    ureg.formatter.default_format = "~"
    return ureg


def _cache_folder() -> Path:
    import pint

    base = os.environ.get("XDG_CACHE_HOME") or Path.home() / ".cache"
    return Path(base) / "timbersheets" / f"pint-{pint.__version__}"


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

_NUMBER = r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?"
_NUMBER_WITH_UNIT = re.compile(rf"^\s*({_NUMBER})\s*(.*?)\s*$")
_FEET = r"(?:'|′|ft|feet|foot)"
_INCHES = r"(?:\"|″|''|in|inch|inches)"
#: 12'-6", 12' 6", 12 ft 6 in: feet and inches of one length.
_FEET_INCHES = re.compile(rf"^\s*({_NUMBER})\s*{_FEET}\s*-?\s*(\d+\.?\d*|\.\d+)\s*{_INCHES}\s*$")
#: A unit is names joined by *, /, ·, - (kN-m) or a space, each with an optional whole power 1 to 4.
_UNIT_FACTOR = re.compile(r"([A-Za-zµ]+)(?:(?:\*\*|\^)([1-4])|([²³]))?")
_UNIT_JOIN = re.compile(r"\s*((?<!\*)\*(?!\*)|/|·|-)\s*|\s+")

#: Trade spellings pint does not know, or reads as something else (lb is a mass to pint).
_ALIASES = {
    "'": "ft", "′": "ft", '"': "in", "″": "in", "''": "in",
    "kNm": "kN*m", "kN.m": "kN*m",
    "kip-ft": "kip*ft", "ft-kip": "kip*ft", "kip-in": "kip*in", "in-kip": "kip*in",
    "lb-ft": "lbf*ft", "ft-lb": "lbf*ft", "lb-in": "lbf*in", "in-lb": "lbf*in",
    "lb": "lbf", "lbs": "lbf", "kips": "kip",
    "plf": "lbf/ft", "klf": "kip/ft", "psf": "lbf/ft**2", "ksf": "kip/ft**2",
}

#: By a unit of each dimension: the dimension's name, and what to write in such a column (the error hint).
_DIMENSIONS = {
    "m": ("length", "3.6 m, 12 ft or 12'-6\""),
    "kN": ("force", "12 kN or 2.7 kip"),
    "kN/m": ("line load (force per length)", "4.5 kN/m or 300 plf"),
    "kN*m": ("moment", "25 kN*m or 18 kip-ft"),
    "kPa": ("pressure (force per area)", "2.4 kPa or 50 psf"),
}
_SMALL_LENGTH_EXAMPLE = "89 mm or 3.5 in"


class UnitParseError(ValueError):
    """A cell could not be read as a number with an allowed unit."""


@lru_cache(maxsize=256)
def unit(text: str) -> pint.Unit:
    """The pint unit for `text` ("" is dimensionless)."""
    ureg = registry()
    return ureg.Unit(text) if text else ureg.dimensionless


def example(default_unit: str) -> str:
    """How a value of a column whose bare numbers are in `default_unit` may be written."""
    if default_unit == "mm":
        return _SMALL_LENGTH_EXAMPLE
    return _dimension(default_unit)[1]


def parse_quantity(text: str, default_unit: str) -> float:
    """Read a schedule cell such as ``"3.6 m"``, ``"12 ft"``, ``12'-6"`` or ``"4.5"``.

    A bare number takes `default_unit`. The value is returned as a float in
    `default_unit`. Raises UnitParseError for non-numbers, NaN or infinite
    values, unknown units and units of the wrong dimension; the message gives
    an example in the column's own unit.
    """
    compound = _FEET_INCHES.match(text)
    if compound:
        feet, inches = float(compound.group(1)), float(compound.group(2))
        if inches >= 12:
            raise UnitParseError("has 12 inches or more after the feet; write the feet and inches, e.g. 13'-0\"")
        number, given, unit_text = feet + math.copysign(inches / 12, feet), unit("ft"), "ft"
    else:
        match = _NUMBER_WITH_UNIT.match(text)
        if not match:
            raise UnitParseError("is not a number")
        number, unit_text = float(match.group(1)), match.group(2)
        if not unit_text:
            given = None
        else:
            given = _read_unit(unit_text, default_unit)
    if not math.isfinite(number):
        raise UnitParseError("is not a finite number")
    if given is None:
        return number
    target = unit(default_unit)
    if given.dimensionality != target.dimensionality:
        raise UnitParseError(
            f"has unit '{unit_text}', which is not a {_dimension(default_unit)[0]}; write e.g. {example(default_unit)}"
        )
    return float(registry().Quantity(number, given).to(target).magnitude)


def _read_unit(text: str, default_unit: str) -> pint.Unit:
    """A unit from names joined by *, /, ·, - or a space, each with a power 1 to 4.

    pint's own expression reader would also take numbers, brackets and powers
    (``kN/0``, ``m**0``, ``ft)``) and fail in its own words; a cell needs none of them.
    """
    unknown = UnitParseError(f"has an unknown unit '{text}'; write e.g. {example(default_unit)}")
    text = _ALIASES.get(text, text)
    parts = _UNIT_JOIN.split(text)
    result = registry().dimensionless
    for position, part in enumerate(parts):
        if position % 2:
            continue
        factor = _UNIT_FACTOR.fullmatch(part)
        if not factor:
            raise unknown
        name, power, superscript = factor.groups()
        name = _ALIASES.get(name, name)
        try:
            named = registry().Unit(name)
        except Exception:  # pint raises several kinds for a name it does not know
            raise unknown from None
        power_value = int(power) if power else {"²": 2, "³": 3}.get(superscript, 1)
        divide = position > 0 and parts[position - 1] == "/"
        result = result / named**power_value if divide else result * named**power_value
    return result


def _dimension(default_unit: str) -> tuple[str, str]:
    """The dimension's name and an example, for a column whose bare numbers are in `default_unit`."""
    dimensionality = unit(default_unit).dimensionality
    for name, described in _DIMENSIONS.items():
        if unit(name).dimensionality == dimensionality:
            return described
    return (f"quantity in {default_unit}", f"a number in {default_unit}") if default_unit else ("plain number", "4.5")


#: The conversions the design itself makes, between the schedule's and the compute units and to the
#: display units: SI prefixes, exact by definition (1 kN = 1000 N, 1 m = 1000 mm, 1 kPa = 0.001 MPa;
#: kN/m = N/mm). tests/test_units.py holds each equal to pint's.
EXACT_FACTORS = {
    ("kN", "N"): 1e3, ("N", "kN"): 1e-3,
    ("m", "mm"): 1e3, ("mm", "m"): 1e-3,
    ("kN*m", "N*mm"): 1e6, ("N*mm", "kN*m"): 1e-6,
    ("kN/m", "N/mm"): 1.0, ("N/mm", "kN/m"): 1.0,
    ("kPa", "MPa"): 1e-3, ("MPa", "kPa"): 1e3,
}


@lru_cache(maxsize=256)
def _factor(from_unit: str, to_unit: str) -> float:
    """The multiplier from one unit to another (EXACT_FACTORS, else pint, once per pair)."""
    if (from_unit, to_unit) in EXACT_FACTORS:
        return EXACT_FACTORS[from_unit, to_unit]
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
