"""Rectangular sections: dressed sizes, built-up plies, properties, categories.

Dimensions are in mm. `b` is the width (the dimension across the strong-axis
bending plane), `d` the depth. A built-up sawn member of `plies` laminations has
width ``plies × ply_b``.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

_SIZE = re.compile(r"^\s*(\d+(?:\.\d+)?)\s*[xX×*]\s*(\d+(?:\.\d+)?)\s*(?:mm)?\s*$")

#: Smallest dimension of a timber (CWC "Solid-sawn heavy timber": 140 mm or more).
TIMBER_MIN = 140.0
#: Beams & stringers: larger dimension exceeds the smaller by more than this (CWC, mm).
BS_EXCESS = 51.0


def parse_size(text: str) -> tuple[float, float]:
    """Read ``"130x228"`` (mm) as (b, d). Raises ValueError on any other form."""
    match = _SIZE.match(text)
    if not match:
        raise ValueError(text)
    b, d = float(match.group(1)), float(match.group(2))
    if b <= 0 or d <= 0:
        raise ValueError(text)
    return b, d


@dataclass(frozen=True)
class Section:
    """A solid or built-up rectangular section."""

    ply_b: float  # mm, width of one ply (the whole width when plies == 1)
    d: float  # mm, depth
    plies: int = 1

    @property
    def b(self) -> float:
        return self.ply_b * self.plies

    @property
    def A(self) -> float:
        """Gross area, mm²."""
        return self.b * self.d

    @property
    def S_x(self) -> float:
        """Section modulus about the strong axis, mm³."""
        return self.b * self.d**2 / 6.0

    @property
    def I_x(self) -> float:
        """Second moment of area about the strong axis, mm⁴."""
        return self.b * self.d**3 / 12.0

    @property
    def label(self) -> str:
        core = f"{self.ply_b:g}x{self.d:g}"
        return f"{self.plies}-{core}" if self.plies > 1 else core

    @property
    def smaller(self) -> float:
        """Smaller dimension of one piece (a ply), mm."""
        return min(self.ply_b, self.d)

    @property
    def larger(self) -> float:
        """Larger dimension of one piece, mm."""
        return max(self.ply_b, self.d)


def sawn_category(section: Section) -> str:
    """Strength-table category of a sawn piece: dimension, beam-stringer or post-timber.

    Timbers are 140 mm or more in the smaller dimension; beams and stringers have
    the larger dimension more than 51 mm greater than the smaller; posts and
    timbers otherwise (CWC, "Solid-sawn heavy timber").
    """
    if section.smaller < TIMBER_MIN:
        return "dimension"
    return "beam-stringer" if section.larger - section.smaller > BS_EXCESS else "post-timber"


def service_category(section: Section) -> str:
    """K_S category for sawn lumber: 'small' (smaller dimension ≤ 89 mm) or 'timber'."""
    return "small" if section.smaller <= 89.0 else "timber"
