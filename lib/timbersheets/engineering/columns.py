"""The schedule's columns: name, kind, unit, default, bounds and meaning of each, in one table.

The reader validates every cell against its `Column`; `timbersheets columns` and
docs/columns.md are printed from the same table.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

LOAD_TYPES = ("D", "L", "S", "W", "E")
LOAD_NAMES = {"D": "dead", "L": "live", "S": "snow (with rain)", "W": "wind", "E": "earthquake"}
LOAD_MEANING = {
    "P": "axial force (positive = the member's own sense: tension for tension members, compression otherwise)",
    "w": "uniform line load over the whole member",
    "M": "strong-axis moment, where a frame model gives it",
    "V": "shear, where a frame model gives it",
}


@dataclass(frozen=True)
class Column:
    """One schedule column: what it means, how to read it and what it defaults to.

    `meaning` is what `timbersheets columns` and docs/columns.md print; every
    column has one.
    """

    name: str
    kind: str  # text | choice | quantity | number | count | size | spans | points | parts | carries
    unit: str = ""  # unit a bare number is in (quantity)
    compute: str = ""  # unit the library works in (quantity)
    default: Any = None
    required: bool = False
    choices: tuple[str, ...] = ()
    minimum: float | None = None  # values must be >= minimum (or > when strict)
    strict: bool = False
    maximum: float | None = None  # values must be <= maximum
    meaning: str = ""
    blank: str = ""  # what a blank cell means, where that is not simply `default`


def _largest_system_factor() -> float:
    """The largest K_H the data tables give for bending or shear (O86 Table 6.4.4, Case 2)."""
    from .data import default_data

    data = default_data()
    return max(data.system_factor_limit(action).value for action in ("bending", "shear"))


def _columns() -> tuple[Column, ...]:
    """The columns and their physical bounds, in entry units (a value outside is a row error).

    Bounds are the range real members have, not the range the formulas accept: a
    factor or a length outside them is a typing slip that would change the verdict.
    """
    cols = [
        Column("mark", "text", required=True,
               meaning="member mark, unique in the job"),
        Column("type", "choice", required=True,  # choices: the member type registry
               meaning="member type: what it carries and which checks it runs (beam-column = bending + axial compression)"),
        Column("material", "choice", required=True, choices=("sawn", "glulam"),
               meaning="sawn lumber or timber, or glulam"),
        Column("species", "text", required=True,
               meaning="species group: sawn D.Fir-L, Hem-Fir, S-P-F, Northern; glulam D.Fir-L, Spruce-Pine (short forms DFL, HF, SPF, NOR, SP accepted)"),
        Column("grade", "text", required=True,
               meaning="stress grade: sawn SS, No.1, No.2, No.1/No.2, No.3, Stud; glulam 20f-E, 20f-EX, 24f-E, 24f-EX, 16c-E, 12c-E, 18t-E, 14t-E"),
        Column("size", "size", required=True,
               meaning="dressed size b x d in mm (38x235, 130x228); auto = the tool picks the lightest passing section"),
        # common practice: built-up members of 2 to 5 plies
        Column("plies", "count", default=1, minimum=1, maximum=5,
               meaning="number of laminations of a built-up sawn member"),
        Column("service", "choice", default="dry", choices=("dry", "wet"),
               meaning="service condition (O86 K_S)"),
        # K_T reduces strength for incised or fire-retardant-treated wood, never raises it (O86 5.4.3)
        Column("K_T", "number", default=1.0, minimum=0.5, maximum=1.0,
               meaning="treatment factor"),
        # O86 5.4.4: system factors from 1.0 to the largest tabled for bending and shear (system_factors.csv)
        Column("K_H", "number", default=1.0, minimum=1.0, maximum=_largest_system_factor(),
               meaning="system factor (load sharing), sawn lumber only"),
        # common practice: longer than 60 m is no single timber member; shorter than 0.1 m is no member
        Column("length", "quantity", "m", "mm", minimum=0.1, maximum=60,
               meaning="member length (the span of a beam; with spans, the total, overhangs included)",
               blank="required, except on a beam that gives spans"),
        # O86 Annex A (from memory): recommended Ke from 0.65 (both ends fixed) to 2.4 (sway, far end
        # pinned); 0.5 is the theoretical least
        Column("Ke", "number", default=1.0, minimum=0.5, maximum=2.4,
               meaning="effective length factor, both axes"),
        Column("Lx", "quantity", "m", "mm", minimum=0, maximum=60,
               meaning="unbraced length about the strong (x) axis; 0 = braced over the length", blank="length"),
        Column("Ly", "quantity", "m", "mm", minimum=0, maximum=60,
               meaning="unbraced length about the weak (y) axis; 0 = braced (e.g. by sheathing)", blank="length"),
        # required for the bending types (checked across cells): lateral support is never assumed
        Column("Lu", "quantity", "m", "mm", minimum=0, maximum=60,
               meaning="laterally unsupported length of the top (compression) edge: 0 when decking, sheathing or "
                       "joists fixed to it hold it continuously, else the distance between lateral supports",
               blank="required for bending, beam-column and tension-bending (row error: never assumed braced)"),
        Column("Lu_bottom", "quantity", "m", "mm", minimum=0, maximum=60,
               meaning="unsupported length of the bottom edge, in compression when the moment reverses (uplift, "
                       "hogging, wind suction)",
               blank="the full length between supports (said on the sheet); 0 with restraint = both-edges"),
        Column("restraint", "choice", choices=("purlins", "blocking", "both-edges"),
               meaning="lateral bracing beyond what Lu says: purlins (top edge held at the purlins, Lu = their "
                       "spacing), blocking (Lu = 0 plus bridging or blocking at 8d), both-edges (Lu = Lu_bottom = 0)"),
        Column("bears_on", "text",
               meaning="what a column or post bears on: sawn <species> <grade>, glulam <species> <grade>, steel, "
                       "concrete (timber: compression perpendicular to grain checked in the support)",
               blank="none: the sheet and results warn that bearing on the support was not checked"),
        Column("bearing_width", "quantity", "mm", "mm", minimum=0, strict=True,
               meaning="width of a beam's bearing where the support is narrower than the beam",
               blank="the member width"),
        Column("net_area", "number", default=1.0, minimum=0, strict=True,
               meaning="A_n / A_g at the worst cross-section (holes, notches)"),
        Column("bearing", "quantity", "mm", "mm", minimum=0, strict=True, maximum=2000,
               meaning="bearing length at each support", blank="none (no bearing check)"),
    ]
    # common practice: a timber member carries well under 10 MN, 1 MN/m or 10 MN·m; beyond is a unit slip
    for prefix, unit, compute, bound in (("P", "kN", "N", 1e4), ("w", "kN/m", "N/mm", 1e3),
                                         ("M", "kN*m", "N*mm", 1e4), ("V", "kN", "N", 1e4)):
        cols += [Column(f"{prefix}_{t}", "quantity", unit, compute, default=0.0, minimum=-bound, maximum=bound,
                        meaning=f"specified {LOAD_MEANING[prefix]} from {LOAD_NAMES[t]} load") for t in LOAD_TYPES]
    cols += [
        Column("spans", "spans",
               meaning="beam spans between support centres, separated by '+' (continuous over interior supports)",
               blank="one span, the length"),
        Column("overhang_left", "quantity", "m", "mm", default=0.0, minimum=0, maximum=60,
               meaning="overhang beyond the left end support"),
        Column("overhang_right", "quantity", "m", "mm", default=0.0, minimum=0, maximum=60,
               meaning="overhang beyond the right end support"),
        Column("trib", "quantity", "m", "mm", minimum=0, strict=True, maximum=60,
               meaning="tributary width of the area loads q_*: w = q × trib", blank="none (q_* refused)"),
    ]
    # common practice: no building carries 1 MPa (1000 kPa) of area load
    cols += [Column(f"q_{t}", "quantity", "kPa", "MPa", default=0.0, minimum=-1e3, maximum=1e3,
                    meaning=f"specified area load from {LOAD_NAMES[t]} load, times trib") for t in LOAD_TYPES]
    cols += [Column(f"point_{t}", "points", default=(),
                    meaning=f"{LOAD_NAMES[t]} point loads value@position; … (kN at m from the left end)", blank="none")
             for t in LOAD_TYPES]
    cols += [Column(f"part_{t}", "parts", default=(),
                    meaning=f"{LOAD_NAMES[t]} partial uniform loads value@from-to; … (kN/m over m)", blank="none")
             for t in LOAD_TYPES]
    cols += [Column("carries", "carries", default=(),
                    meaning="reactions this member supports: MARK.Rn@position on a beam, MARK.Rn on a column; "
                    "MARK alone = its largest reaction", blank="none")]
    cols += [
        # span divisors: common practice from L/120 (cantilevers, roofs without ceilings) to L/2000
        Column("defl_L", "number", default=360.0, minimum=120, maximum=2000,
               meaning="live-load deflection limit as a span divisor (360 = L/360)"),
        Column("defl_total", "number", default=240.0, minimum=120, maximum=2000,
               meaning="total-load deflection limit as a span divisor (240 = L/240)"),
        Column("K_D", "number", minimum=0, strict=True,
               meaning="override of the load-duration factor, 0.65 to 1.15; never raises the dead-only combination; "
                       "marked on the sheet", blank="computed per combination"),
        Column("live_use", "choice", default="general", choices=("general", "storage"),
               meaning="general, or storage (storage, equipment and service areas): companion 0.5L becomes 1.0L "
                       "(NBC note) and live load is long-term in K_D (O86 Table 5.1)"),
        Column("self_weight", "choice", default="yes", choices=("yes", "no"),
               meaning="yes: the tool adds the member's own weight to D from the density data; no: the given D "
                       "includes it"),
        Column("wind_sense", "choice", default="both", choices=("both", "one-way"),
               meaning="both: wind and earthquake checked in both senses; one-way: only in the sense the row gives"),
        # sizing constraints, common practice: no glulam is wider than 365 mm or deeper than 2.5 m
        Column("width", "quantity", "mm", "mm", minimum=0, strict=True, maximum=365,
               meaning="sizing constraint for size = auto: a fixed width"),
        Column("max_depth", "quantity", "mm", "mm", minimum=0, strict=True, maximum=2500,
               meaning="sizing constraint for size = auto: the largest depth"),
        Column("prefer", "choice", choices=("deep", "square"),
               meaning="sizing preference among passing sections of near-equal weight", blank="lightest"),
        Column("note", "text", default="",
               meaning="free text printed on the sheet"),
    ]
    return tuple(cols)


COLUMNS = {c.name: c for c in _columns()}
REQUIRED = tuple(c.name for c in COLUMNS.values() if c.required)

#: The Python type of a validated cell by column kind, as `schedule.Member` declares its fields
#: (quantities in compute units; a size is (b, d) in mm or "auto"; points (P, x), parts (w, a, b)).
KIND_TYPES = {
    "text": "str", "choice": "str", "quantity": "float", "number": "float", "count": "int",
    "size": "tuple[float, float] | str", "spans": "tuple[float, ...]",
    "points": "tuple[tuple[float, float], ...]", "parts": "tuple[tuple[float, float, float], ...]",
    "carries": "tuple[Carry, ...]",
}


def field_type(col: Column) -> str:
    """The type `schedule.Member` declares for `col`: its kind's type, or None allowed when a blank
    cell leaves no value (no default, not required)."""
    base = KIND_TYPES[col.kind]
    return f"{base} | None" if col.default is None and not col.required else base
