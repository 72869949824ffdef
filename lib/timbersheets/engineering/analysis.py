"""Member forces and deflections of a simply supported bending member.

Two ways a schedule row loads a bending member:

* **line loads** ``w_D … w_E`` on the simple span ``length``: the tool computes
  the factored moment, shear and reactions for every ULS combination, and the
  deflections under the specified (unfactored) loads of the SLS combinations;
* **given forces** ``M_* / V_*`` from a frame model: the strength checks use
  them as given. Deflection then needs the loads that cause it, so it is
  reported only when the row also gives line loads ``w_*`` (used for deflection
  of the simple span only).

Beams beyond the simple span under uniform load (continuous spans, overhangs,
point, partial and carried loads) are analysed as beam models instead
(:mod:`beammodel`, :mod:`beampattern`, :mod:`beamdesign`).

Compute units: N, mm, N/mm, N·mm, MPa.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from ..errors import DesignError
from .calc import calc
from .data import Datum
from .loads import LOAD_TYPES, LoadCase
from .membertypes import member_type

SPAN_CLAUSE = "simply supported span, uniform load"
#: Deflection under specified loads (CSA O86-14 5.4.2; memory, unverified clause number).
SLS_CLAUSE = "O86-14 5.4.2"


@calc(units={"w_f": "N/mm", "L": "mm", "M_f": "N*mm"}, clause=SPAN_CLAUSE)
def udl_moment(w_f, L):
    M_f = w_f * L**2 / 8
    return locals()


@calc(units={"w_f": "N/mm", "L": "mm", "d": "mm", "V_f": "N", "V_fd": "N"}, clause=SPAN_CLAUSE)
def udl_shear(w_f, L, d):
    V_f = w_f * L / 2
    V_fd = w_f * max(L / 2 - d, 0)
    return locals()


@calc(units={"w_f": "N/mm", "L": "mm", "Q_f": "N"}, clause=SPAN_CLAUSE)
def udl_reaction(w_f, L):
    Q_f = w_f * L / 2
    return locals()


@calc(units={"w_f": "N/mm", "L": "mm", "x": "mm", "V_x": "N", "M_x": "N*mm"}, clause=SPAN_CLAUSE)
def udl_section_forces(w_f, L, x):
    V_x = w_f * (L / 2 - x)
    M_x = w_f * x * (L - x) / 2
    return locals()


@calc(units={"w_f": "N/mm", "L": "mm", "W_f": "N"}, clause=SPAN_CLAUSE)
def udl_total_load(w_f, L):
    W_f = w_f * L
    return locals()


@calc(units={"w_s": "N/mm", "L": "mm", "E": "MPa", "K_SE": "", "K_T": "", "E_S": "MPa", "I_x": "mm**4",
             "n_lim": "", "Delta": "mm", "Delta_lim": "mm"}, clause=SLS_CLAUSE)
def sls_deflection(w_s, L, E, K_SE, K_T, I_x, n_lim):
    E_S = E * (K_SE * K_T)
    Delta = 5 * w_s * L**4 / (384 * E_S * I_x)
    Delta_lim = L / n_lim
    return locals()


def loading_mode(member) -> str:
    """'line' (w_* only) or 'forces' (M_* and V_* given). Raises DesignError otherwise."""
    def given(prefix: str) -> bool:
        return any(member.values[f"{prefix}_{t}"] for t in LOAD_TYPES)

    combined = member_type(member.type).axial is not None  # a type that takes axial force with its bending
    if given("P") and not combined:
        raise DesignError(member.mark, "a bending member with axial load P_* needs the combined check", "",
                          "Give type beam-column (compression) or tension-bending, or remove P_*")
    has_m, has_v = given("M"), given("V")
    if has_m or has_v:
        # an axial member with an eccentric load has a moment and no shear: allowed for the combined types
        if not (has_m and has_v) and not (combined and has_m):
            missing = "V_D … V_E" if has_m else "M_D … M_E"
            raise DesignError(member.mark, f"gives {'moments' if has_m else 'shears'} from a frame model but "
                              f"not the {'shears' if has_m else 'moments'}", "", f"Give {missing} too")
        return "forces"
    if not given("w"):
        raise DesignError(member.mark, "carries no load", "",
                          "Give the line loads w_D … w_E, or the moments and shears M_*, V_*")
    return "line"


@dataclass(frozen=True)
class Forces:
    """Factored effects of one ULS combination on the member (N, N·mm)."""

    case: LoadCase
    M_f: float
    V_f: float  # largest shear, at the support
    V_fd: float  # shear used for the shear check (at d in line-load mode)
    R_f: float  # reaction at each support (bearing demand)
    W_f: float | None  # total factored load on the span (line loads only)
    w_f: float | None
    steps: dict[str, tuple] = field(default_factory=dict, compare=False)  # name -> (calc, values)


def member_forces(member, d: float, case: LoadCase, mode: str) -> Forces:
    """The factored moment, shear and reaction of `member` (depth `d`, mm) under `case`."""
    L = member.length
    if mode == "forces":
        M_f, V_f = case.factored["M"], case.factored["V"]
        return Forces(case, M_f, abs(V_f), abs(V_f), abs(V_f), None, None)
    w_f = case.factored["w"]
    moment = udl_moment(w_f=w_f, L=L)
    shear = udl_shear(w_f=w_f, L=L, d=d)
    total = udl_total_load(w_f=w_f, L=L)
    reaction = udl_reaction(w_f=w_f, L=L)
    steps = {"moment": (udl_moment, moment), "shear": (udl_shear, shear), "reaction": (udl_reaction, reaction),
             "total": (udl_total_load, total)}
    return Forces(case, moment["M_f"], shear["V_f"], shear["V_fd"], reaction["Q_f"], total["W_f"], w_f, steps)


@dataclass(frozen=True)
class SpanDiagram:
    """V(x) and M(x) of a simple span under uniform load at evenly spaced stations, with the values the
    checks use (mm, N, N·mm)."""

    x: tuple[float, ...]
    V: tuple[float, ...]
    M: tuple[float, ...]
    d: float  # where V_fd is taken
    V_f: float
    V_fd: float
    M_f: float


def span_diagram(w_f: float, L: float, d: float, stations: int = 41) -> SpanDiagram:
    """The shear and moment along a simple span (`w_f` N/mm, `L` and `d` mm), from the same Calcs as the
    checks: V(x), M(x) from :func:`udl_section_forces`, V_f and V_fd from :func:`udl_shear`, M_f from
    :func:`udl_moment`."""
    xs = tuple(L * i / (stations - 1) for i in range(stations))
    at = [udl_section_forces(w_f=w_f, L=L, x=x) for x in xs]
    shear, moment = udl_shear(w_f=w_f, L=L, d=d), udl_moment(w_f=w_f, L=L)
    return SpanDiagram(xs, tuple(v["V_x"] for v in at), tuple(v["M_x"] for v in at), d, shear["V_f"],
                       shear["V_fd"], moment["M_f"])


@dataclass(frozen=True)
class ServiceCase:
    """One SLS combination of specified loads (load factors 1.0)."""

    check: str  # deflection-live | deflection-total
    factors: dict[str, float]
    w_s: float  # specified line load of the combination, N/mm
    datums: tuple[Datum, ...]
    #: K_D does not apply to stiffness; 1.0 is recorded so every check carries a number.
    K_D: float = 1.0

    @property
    def label(self) -> str:
        return " + ".join(f"{f:.1f}{t}" for t, f in self.factors.items())  # as combination_label


def sls_combinations(data) -> dict[str, list[tuple[str, Datum]]]:
    """The SLS combinations of data/sls_combinations.csv: (load type, factor) rows by check, in file order."""
    by_check: dict[str, list[tuple[str, Datum]]] = {}
    for check, load, datum in data.sls_factors():
        by_check.setdefault(check, []).append((load, datum))
    return by_check


def combination_label(rows: list[tuple[str, Datum]]) -> str:
    """'1.0D + 1.0L': how a sheet writes a combination of factored load types."""
    return " + ".join(f"{d.value:.1f}{t}" for t, d in rows)


def service_cases_for(member, data, present: list[str]) -> list[ServiceCase]:
    """The SLS combinations of :func:`service_cases` for a beam model carrying the load types `present`;
    `w_s` is not used (the model gives the deflection)."""
    out = []
    for check, rows in sls_combinations(data).items():
        used = [(t, d) for t, d in rows if t in present]
        if not used or (check == "deflection-live" and all(t == "D" for t, _ in used)):
            continue
        out.append(ServiceCase(check, {t: d.value for t, d in used}, 0.0, tuple(d for _, d in used)))
    return out


def service_cases(member, data) -> list[ServiceCase]:
    """The SLS combinations that load the member (loads it does not carry are left out).

    From data/sls_combinations.csv: live = 1.0L (+ 1.0S on roofs), total = 1.0D +
    1.0L + 1.0S, following the practice of the published example S1 (live 1.0L,
    total 1.0D + 1.0L; reference notes §5.3), with snow at its full specified
    value (memory (team), conservative against the NBC 2020 SLS companion factors).
    """
    out = []
    for check, rows in sls_combinations(data).items():
        used = [(t, d) for t, d in rows if member.values[f"w_{t}"]]
        if not used or (check == "deflection-live" and all(t == "D" for t, _ in used)):
            continue  # the member carries none of this combination's loads
        factors = {t: d.value for t, d in used}
        w_s = sum(f * member.values[f"w_{t}"] for t, f in factors.items())
        out.append(ServiceCase(check, factors, w_s, tuple(d for _, d in used)))
    return out
