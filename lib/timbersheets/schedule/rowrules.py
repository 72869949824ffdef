"""Cross-cell rules of a schedule row about how a member is held and what it bears on.

Lu, Lu_bottom and restraint must make one statement about each edge (O86
6.5.4.2, 7.5.6.4); bears_on names timber, steel or concrete under a column;
bearing_width belongs to a beam's bearings. Each rule returns the row's errors;
the values in `v` are in compute units (mm) and are normalised in place.
"""

from __future__ import annotations

import math

from typing import Any

from ..engineering.materials import SAWN_GRADES, canonical_grade, parse_support
from ..engineering.membertypes import member_type
from ..errors import ScheduleError


def bearing_errors(file: str, row: int, v: dict[str, Any], data) -> list[ScheduleError]:
    """bears_on for columns and posts (named timber, steel or concrete); bearing_width for beams."""
    errs = []
    if v["bears_on"]:
        allowed = "sawn <species> <grade>, glulam <species> <grade>, steel or concrete, e.g. 'sawn S-P-F No.1'"
        if member_type(v["type"]).axial != "compression":
            return [ScheduleError(file, row, "bears_on", v["bears_on"], "applies to columns and posts (compression, "
                                  "beam-column)", "blank for this type; give bearing for a beam's supports")]
        try:
            support = parse_support(v["bears_on"])
        except ValueError as exc:
            return [ScheduleError(file, row, "bears_on", v["bears_on"], str(exc), allowed)]
        if isinstance(support, tuple):
            material, species, grade = support
            grades = (SAWN_GRADES if material == "sawn" else tuple(sorted(data.glulam_grades().get(species, ()))))
            found = canonical_grade(grade, grades)
            if found is None:
                return [ScheduleError(file, row, "bears_on", v["bears_on"], f"names a grade that is not a {material} "
                                      f"grade of {species}", ", ".join(grades))]
            v["bears_on"] = f"{material} {species} {found}"
        else:
            v["bears_on"] = support
    if v["bearing_width"] is not None:
        if member_type(v["type"]).routine != "bending" or v["bearing"] is None:
            errs.append(ScheduleError(file, row, "bearing_width", f"{v['bearing_width']:g} mm", "applies to a "
                                      "beam's bearings and needs their length in 'bearing'",
                                      "blank, or give bearing (the length) on a bending member"))
        elif v["size"] != "auto" and v["bearing_width"] > v["size"][0]:
            errs.append(ScheduleError(file, row, "bearing_width", f"{v['bearing_width']:g} mm", f"is wider than the "
                                      f"member ({v['size'][0]:g} mm); the bearing area cannot exceed it",
                                      f"at most {v['size'][0]:g} mm, or blank for the member width"))
    return errs


def lateral_support_errors(file: str, row: int, v: dict[str, Any]) -> list[ScheduleError]:
    """Lu and restraint must make one statement about how each edge is held (O86 6.5.4.2, 7.5.6.4)."""
    if not member_type(v["type"]).bends or v["Lu"] is None:
        return []  # a blank Lu on a type that requires it is reported with the type's rules
    errs = []
    restraint, lu, lu_bottom = v["restraint"], v["Lu"], v["Lu_bottom"]
    if restraint == "both-edges" and (lu > 0 or (lu_bottom or 0) > 0):
        name = "Lu" if lu > 0 else "Lu_bottom"
        errs.append(ScheduleError(file, row, name, f"{v[name] / 1000:g} m", "says an edge is unsupported over "
                                  "that length, but restraint = both-edges says both edges are held in line",
                                  "Lu = 0 and Lu_bottom = 0 (or blank) with both-edges; or another restraint"))
    elif restraint == "both-edges":
        v["Lu_bottom"] = 0.0  # the row states that the other edge is held too
    elif restraint == "blocking" and lu > 0:
        errs.append(ScheduleError(file, row, "restraint", restraint, f"describes decking on the compression edge "
                                  f"plus bridging or blocking, but Lu = {lu / 1000:g} m says that edge is unsupported "
                                  "over that length", "Lu = 0 with blocking; or purlins, or blank"))
    elif restraint == "purlins" and not 0 < lu < (v["length"] if v["length"] is not None else math.inf):
        errs.append(ScheduleError(file, row, "restraint", restraint, f"describes the compression edge held at "
                                  f"purlins or tie rods, but Lu = {lu / 1000:g} m says "
                                  f"{'it is held continuously' if lu == 0 else 'nothing braces it between the supports'}",
                                  "with purlins, Lu = the purlin spacing (more than 0, less than the length)"))
    return errs
