"""NBC Part 4 ULS load combinations and the CSA O86 load-duration factor K_D.

The combinations are data (``nbc2020_uls_combinations.csv``, NBC 2020 Table
4.1.3.2.-A). They are applied to every force effect a member has: axial force P,
moment M, shear V and line load w, each given per load type D, L, S, W, E.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from math import log10

from ..errors import DataError
from .calc import calc
from .data import DataSet, Datum

LOAD_TYPES = ("D", "L", "S", "W", "E")
EFFECTS = ("P", "M", "V", "w")  # the schedule's columns P_*, M_*, V_*, w_*
#: ... and F, the total load on a beam model (point, partial and carried loads included)
ALL_EFFECTS = (*EFFECTS, "F")
EFFECT_UNITS = {"P": "N", "M": "N*mm", "V": "N", "w": "N/mm", "F": "N"}
#: Duration class of each load type (CSA O86 5.3.2; Table 5.1 examples).
DURATION_CLASS = {"D": "long", "L": "standard", "S": "standard", "W": "short", "E": "short"}
STANDARD_TERM = ("L", "S")
#: Loads that act in either sense (wind pressure and suction, earthquake both ways).
REVERSIBLE = ("W", "E")


@dataclass(frozen=True)
class Combination:
    """One row of the NBC combination table."""

    id: str
    case: int
    factors: dict[str, float]
    principal: str
    note: str
    datum: Datum | None
    refused: DataError | None = None  # a firm file's bad row for this combination
    @property
    def label(self) -> str:
        """E.g. ``1.25D + 1.5S + 1.0L``: dead load, the principal load, then companions."""
        order = list(dict.fromkeys(["D", self.principal, *LOAD_TYPES]))
        out = ""
        for t in order:
            factor = self.factors[t]
            if factor:
                text = f"{abs(factor):.2f}".rstrip("0")
                text = f"{text}0{t}" if text.endswith(".") else f"{text}{t}"
                out += (" − " if factor < 0 else " + ") + text if out else ("−" if factor < 0 else "") + text
        return out

    @property
    def reversed_loads(self) -> tuple[str, ...]:
        """The load types this combination applies in the sense opposite to the schedule's."""
        return tuple(t for t in LOAD_TYPES if self.factors[t] < 0)

    def reversed(self) -> "Combination":
        """The same combination with wind and earthquake acting in the opposite sense."""
        factors = {t: -f if t in REVERSIBLE else f for t, f in self.factors.items()}
        return replace(self, factors=factors)

    @property
    def reduced_dead(self) -> bool:
        """True for the 0.9D alternative (dead load resisting)."""
        return 0 < self.factors["D"] < 1.0


def combinations(data: DataSet) -> list[Combination]:
    """All ULS combinations of the data file, in its order (read once per data set: a sizing search
    applies them to every section it tries)."""
    memo = data.__dict__.get("_combinations")
    if memo is None:
        memo = data.__dict__["_combinations"] = _read_combinations(data)
    return list(memo)


def _read_combinations(data: DataSet) -> list[Combination]:
    out = []
    file = data.files["nbc2020_uls_combinations.csv"]
    for row in data.combination_rows:
        factors = {t: float(row[t] or 0) for t in LOAD_TYPES}
        try:
            datum, refused = data._datum(file, row, f"NBC combination {row['id']}", "case"), None
        except DataError as exc:  # raised only if a member needs this combination
            datum, refused = None, exc
        out.append(Combination(row["id"], int(row["case"]), factors, row["principal"], row.get("note", ""), datum,
                               refused))
    return out


@dataclass(frozen=True)
class Effects:
    """Specified (unfactored) effects by effect and load type, in compute units."""

    values: dict[str, dict[str, float]]
    #: a beam model whose spans or overhangs a load can lift: the 0.9D alternatives apply
    reversible: bool = False

    def get(self, effect: str, load: str) -> float:
        return self.values.get(effect, {}).get(load, 0.0)

    def present(self) -> list[str]:
        return [e for e in ALL_EFFECTS if any(self.get(e, t) for t in LOAD_TYPES)]

    def dead_resists(self) -> bool:
        """Some other load acts against the dead load (NBC 4.1.3.2.(5): use 0.9D)."""
        return self.reversible or any(self.get(e, "D") * self.get(e, t) < 0 for e in ALL_EFFECTS
                                      for t in LOAD_TYPES[1:])


#: The symbols of :func:`kd_permanent`, in words for the sheet. O86 writes P_L and P_S; the schedule's
#: P_L and P_S columns are the live and snow axial loads, so the sheet uses symbols of its own.
KD_SYMBOLS = {"X_lt": "the specified long-term (dead-load) part of the effect",
              "X_st": "the specified standard-term (live and snow) part of the same effect in this combination"}
#: The K_D override of the schedule is bounded by the factors O86 Table 5.1 itself gives.
KD_OVERRIDE_RANGE = (0.65, 1.15)


@calc(units={"X_lt": "N", "X_st": "N", "K_D": ""}, clause="O86-14 5.3.2.3")
def kd_permanent(X_lt, X_st):
    K_D = max(1.0 - 0.50 * log10(X_lt / X_st), 0.65)
    return locals()


@dataclass(frozen=True)
class LoadCase:
    """A combination applied to one member: factored effects and K_D."""

    combination: Combination
    factored: dict[str, float]
    K_D: float
    basis: str  # why this K_D, in words, for the sheet
    kd_values: dict[str, float] = field(default_factory=dict)  # P_L, P_S, K_D when the formula was used
    kd_effect: str = ""

    @property
    def label(self) -> str:
        return self.combination.label


def load_duration(comb: Combination, effects: Effects, data: DataSet, used: list[Datum],
                  override: float | None, storage: bool = False) -> tuple[float, str, dict[str, float], str]:
    """K_D for one combination (CSA O86-14 5.3.2, Table 5.1), one value for every resistance of it.

    The class of the principal load sets K_D: long term (dead only) 0.65,
    standard term (L or S principal) 1.0, short term (W or E principal) 1.15.
    In a standard-term combination, each effect (P, M, V, w) that carries live
    or snow load is tested: where its specified dead part X_lt exceeds its
    standard-term part X_st, K_D = 1.0 − 0.50 log10(X_lt/X_st) ≥ 0.65
    (5.3.2.3), and the lowest such value is the combination's K_D. An effect from
    dead load alone does not set it: that effect is checked long-term (0.65)
    in the dead-only combination, whose factor 1.4 against 1.25 makes it the
    more severe case. The schedule's K_D replaces the computed value, except
    that it never raises the K_D of a dead-only combination.

    With `storage` (live_use = storage) the live load is long-term load, as O86
    Table 5.1 classes storage loads with dead load: an L-principal combination is
    long-term, and elsewhere L joins the long-term part X_lt.
    """
    cls = "long" if storage and comb.principal == "L" else DURATION_CLASS[comb.principal]
    table = data.duration_factor(cls)
    used.append(table)
    if override is not None:
        if cls == "long" and override > table.value:
            return table.value, (f"schedule K_D = {override:g} not applied: it would raise the long-term K_D of a "
                                 "dead-only combination (Table 5.1)"), {}, ""
        return override, f"schedule K_D override (computed: {cls}-term, Table 5.1)", {}, ""
    if cls != "standard" and storage and comb.principal == "L":
        return table.value, "long-term (storage live load L principal), Table 5.1", {}, ""
    if cls != "standard":
        return table.value, f"{cls}-term ({comb.principal} principal), Table 5.1", {}, ""
    best: tuple[float, dict[str, float], str] = (table.value, {}, "")
    long_loads = ("D", "L") if storage else ("D",)
    for effect in effects.present():
        x_lt = abs(sum(effects.get(effect, t) for t in long_loads if comb.factors[t]))
        x_st = abs(sum(effects.get(effect, t) for t in STANDARD_TERM if comb.factors[t] and t not in long_loads))
        if x_st > 0 and x_lt > x_st:
            values = kd_permanent(X_lt=x_lt, X_st=x_st)
            if values["K_D"] < best[0]:
                best = (values["K_D"], values, effect)
    kd, values, effect = best
    if values:
        part = " (dead and storage L)" if storage else ""
        return kd, f"{comb.principal} principal; X_lt{part} > X_st on {effect}, 5.3.2.3", values, effect
    return kd, f"standard-term ({comb.principal} principal), Table 5.1", {}, ""


#: NBC 4.1.3.2 (table note on storage, equipment and service areas; memory, as data/nbc2020_uls_combinations.csv
#: records it for combinations 4b and 4e): the companion factor 0.5 on L rises to 1.0. Applied to every 0.5L
#: companion, on the safe side where the note's reach is not recorded.
STORAGE_COMPANION = (0.5, 1.0)


def storage_companions(comb: Combination) -> Combination:
    """`comb` for a storage, equipment or service area: a companion 0.5L becomes 1.0L."""
    low, high = STORAGE_COMPANION
    if comb.principal == "L" or comb.factors["L"] != low:
        return comb
    return replace(comb, factors={**comb.factors, "L": high})


def _senses(comb: Combination, carried: set[str], both_senses: bool) -> list[Combination]:
    """The combination as the schedule gives it, and reversed when it carries wind or earthquake
    (a load type in `carried`, those some effect of the member has)."""
    carries = any(comb.factors[t] for t in REVERSIBLE if t in carried)
    return [comb, comb.reversed()] if both_senses and carries else [comb]


def _opposes_dead(comb: Combination, values: dict[str, dict[str, float]]) -> bool:
    """Some load of this combination (in its sense) acts against the dead load (NBC 4.1.3.2.(5));
    `values` the member's effects that are not all zero, by effect and load type."""
    return any(x["D"] * comb.factors[t] * x[t] < 0 for x in values.values() for t in LOAD_TYPES[1:])


def apply_combinations(effects: Effects, data: DataSet, used: list[Datum],
                       override: float | None = None, both_senses: bool = True,
                       least_tension: bool = False, storage: bool = False) -> list[LoadCase]:
    """Every combination that matters for the member, with factored effects and K_D.

    Wind and earthquake act in both senses unless `both_senses` is False (the
    row's wind_sense = one-way): each combination that carries them is applied
    as given and reversed. With `least_tension` (tension with bending) every
    0.9D alternative is kept: it gives the least axial tension with the moment.
    With `storage` (live_use = storage) every companion 0.5L becomes 1.0L
    (:func:`storage_companions`) and live load is long-term in K_D.
    Skipped: combinations whose principal load the member
    does not carry, the 0.9D alternatives unless a load of that combination acts
    against the dead load (or `least_tension`), combinations whose factored effects are all zero, and
    duplicates (same effects and K_D) of a combination listed before.
    """
    cases: list[LoadCase] = []
    seen: set[tuple] = set()
    resists = effects.dead_resists()
    # the effects that are not all zero, each load type's value (a sizing search comes here per section)
    nonzero = {e: {t: effects.get(e, t) for t in LOAD_TYPES} for e in ALL_EFFECTS}
    nonzero = {e: x for e, x in nonzero.items() if any(x.values())}
    carried = {t for t in LOAD_TYPES if any(x[t] for x in nonzero.values())}
    table = [storage_companions(c) for c in combinations(data)] if storage else combinations(data)
    senses = [c for comb in table for c in _senses(comb, carried, both_senses)]
    for comb in senses:
        if comb.principal != "D" and comb.principal not in carried:
            continue
        if comb.reduced_dead and not (resists or least_tension or _opposes_dead(comb, nonzero)):
            continue
        factored = dict.fromkeys(ALL_EFFECTS, 0.0)  # an effect that is zero under every load sums to 0.0
        for e, x in nonzero.items():
            factored[e] = sum(comb.factors[t] * x[t] for t in LOAD_TYPES)
        if all(abs(v) < 1e-9 for v in factored.values()):
            continue
        kd, basis, values, effect = load_duration(comb, effects, data, used, override, storage)
        key = tuple(round(factored[e], 6) for e in ALL_EFFECTS) + (round(kd, 6),)
        if key in seen:
            continue
        seen.add(key)
        if comb.refused is not None:
            raise comb.refused
        used.append(comb.datum)
        cases.append(LoadCase(comb, factored, kd, basis, values, effect))
    return cases

