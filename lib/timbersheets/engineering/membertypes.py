"""What each member type is: one :class:`MemberType` record per type.

Everything that differs between types lives here, not in comparisons of the
type's name: the sense of its axial force, whether it bends, the checks it runs,
the columns it requires or refuses, what a blank restraint column means, whether
built-up plies are allowed, the sheet sections it shows and its template. The
schedule's allowed `type` values are this registry's keys.

Adding a member type means adding one record here and its checks (and, if the
driver's composition of axial, bending and interaction checks does not fit, the
rule in ``driver.run_checks``).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from functools import lru_cache
from types import MappingProxyType

#: Sheet sections a type may show beyond the ones every sheet has.
#: span: span, supports, lateral support, bearing, deflection limits, net area;
#: length: K_e, L_x, L_y; net-area: A_n (axial members without the span rows);
#: forces: member forces of every combination; diagram: shear and moment diagram;
#: serviceability: the SLS combinations used for deflection.
SHEET_SECTIONS = ("span", "length", "net-area", "forces", "diagram", "serviceability")

#: How a type is analysed: "axial" (force along its length only), "bending" (a beam: a simple span, the
#: frame model's forces or a beam model) or "combined" (axial force with bending on a simple span). The one
#: design driver (``driver.run_checks``) runs every type; which checks it makes follows `axial` and `bends`.
ROUTINE_NAMES = ("axial", "bending", "combined")


@dataclass(frozen=True)
class MemberType:
    """One member type.

    `axial` is the sense a positive P_* acts in ("tension" or "compression"), or
    None when the type takes no axial force. `blank` says what a blank length
    column means: "length" (the member length) or a number in mm.
    """

    name: str
    description: str
    template: str  # notebook in templates/
    routine: str  # one of ROUTINE_NAMES
    axial: str | None
    bends: bool
    checks: tuple[str, ...]  # result check names it can produce, in sheet order
    plies: bool  # built-up sawn plies allowed
    sections: tuple[str, ...]  # from SHEET_SECTIONS
    requires: tuple[str, ...] = ()  # columns a row of this type must give
    refuses: tuple[str, ...] = ()  # columns a row of this type must leave blank
    blank: Mapping[str, str | float] = field(default_factory=lambda: MappingProxyType({}))

    def __post_init__(self) -> None:
        if self.routine not in ROUTINE_NAMES:
            raise ValueError(f"member type {self.name}: unknown design routine {self.routine!r}")
        unknown = set(self.sections) - set(SHEET_SECTIONS)
        if unknown:
            raise ValueError(f"member type {self.name}: unknown sheet section(s) {sorted(unknown)}")
        if self.axial not in (None, "tension", "compression"):
            raise ValueError(f"member type {self.name}: axial sense must be tension, compression or None")

    def shows(self, section: str) -> bool:
        """Whether this type's sheet shows `section` (one of SHEET_SECTIONS)."""
        return section in self.sections


_LENGTHS = MappingProxyType({"Lx": "length", "Ly": "length"})
#: Geometry and loads only a beam analysed along its length takes (spans, overhangs, area, point, partial loads).
_BEAM_ONLY = ("spans", "overhang_left", "overhang_right", "trib",
              *(f"{p}_{t}" for p in ("q", "point", "part") for t in "DLSWE"))
_DEFLECTIONS = ("deflection-live", "deflection-total")
#: A member with axial force and bending is checked for deflection under its gravity line loads, so its sheet
#: shows the SLS combinations and the diagram those checks come from, as a bending member's does.
_COMBINED_SECTIONS = ("span", "length", "diagram", "serviceability")


@lru_cache(maxsize=1)
def member_types() -> dict[str, MemberType]:
    """The member types this version designs (the one place they are registered)."""
    edge = ("Lu",)  # a type that bends must say how its compression edge is held: never assumed braced
    types = [
        MemberType("tension", "tension member", "axial.ipynb", "axial", axial="tension", bends=False,
                   checks=("tension",), plies=True, sections=("length", "net-area"), blank=_LENGTHS,
                   refuses=_BEAM_ONLY),
        MemberType("compression", "compression member", "axial.ipynb", "axial", axial="compression", bends=False,
                   checks=("compression", "bearing"), plies=False, sections=("length", "net-area"), blank=_LENGTHS,
                   refuses=_BEAM_ONLY),
        MemberType("bending", "bending member", "bending.ipynb", "bending", axial=None, bends=True,
                   checks=("bending", "shear", "bearing", *_DEFLECTIONS), plies=True,
                   sections=("span", "forces", "diagram", "serviceability"), requires=edge, blank=_LENGTHS),
        MemberType("beam-column", "beam-column (axial compression with bending)", "combined.ipynb", "combined",
                   axial="compression", bends=True, checks=("compression", "bending", "shear", "interaction",
                                                            "bearing", *_DEFLECTIONS),
                   plies=False, sections=_COMBINED_SECTIONS, requires=edge, blank=_LENGTHS, refuses=_BEAM_ONLY),
        MemberType("tension-bending", "tension member with bending", "combined.ipynb", "combined",
                   axial="tension", bends=True, checks=("tension", "bending", "shear", "interaction", *_DEFLECTIONS),
                   plies=True, sections=_COMBINED_SECTIONS, requires=edge, blank=_LENGTHS, refuses=_BEAM_ONLY),
    ]
    return {t.name: t for t in types}


def member_type(name: str) -> MemberType | None:
    """The record for `name`, or None when this version has no such type."""
    return member_types().get(name)
