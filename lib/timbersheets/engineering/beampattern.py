"""Factored and service effects of a beam model under one combination, with live and snow patterned.

For each effect of interest (the largest positive moment in each span, the
most negative moment in each region, the largest shear beyond d from each
support, the largest reaction and the uplift at each support, the largest
deflection of each span and overhang tip) the variable gravity loads L and S
are placed on exactly the regions whose own contribution to that effect has
the governing sign. That is the worst on/off arrangement of whole regions for
the effect (superposition of the region responses), which includes the
checkerboard and adjacent-span arrangements of NBC 4.1.5.3 and the full
loading. Dead load, wind and earthquake act on every region, each at its
combination factor.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np

from .beammodel import PATTERNED, Geometry, Load, Response, region_responses
from .loads import LOAD_TYPES

EPS = 1e-6


@dataclass(frozen=True)
class Target:
    """One extreme effect: kind (M+, M-, V, R, R-, D), where, its value (compute units) and the arrangement."""

    kind: str
    region: str
    x: float  # mm from the member's left end
    value: float
    arrangement: str  # e.g. "L on span 1" ("" when nothing is patterned)
    support: int = 0  # 1-based support number (reactions, shear)
    length: float = 0.0  # the region's length (mm): spans for deflection limits, L_u of a negative moment


class BeamModel:
    """Region responses of every load type on one beam (EI = 1)."""

    def __init__(self, geometry: Geometry, loads: dict[str, tuple[Load, ...]]):
        self.geometry = geometry
        self.loads = {t: tuple(loads.get(t, ())) for t in LOAD_TYPES}
        marks = {ld[2] for ls in self.loads.values() for ld in ls}
        marks |= {ld[3] for ls in self.loads.values() for ld in ls if ld[0] == "udl"}
        marks = tuple(sorted(marks))
        self.responses = {t: region_responses(geometry, ls, marks) for t, ls in self.loads.items() if ls}
        any_type = next(iter(self.responses.values()), None)
        self.x = any_type[0].x if any_type else np.zeros(1)
        self._targets: dict[tuple, list] = {}  # (what, factors, d) -> targets: a sizing search asks again and again

    def targets(self, what: str, factors: dict[str, float], d: float = 0.0) -> list["Target"]:
        """Cached :func:`strength_targets` ("strength") or :func:`deflection_targets` ("deflection")."""
        key = (what, tuple(sorted(factors.items())), round(d, 6))
        if key not in self._targets:
            self._targets[key] = (strength_targets(self, factors, d) if what == "strength"
                                  else deflection_targets(self, factors))
        return self._targets[key]

    def present(self) -> list[str]:
        return [t for t in LOAD_TYPES if t in self.responses]

    def full(self, t: str) -> Response | None:
        """Every load of type `t` on every region."""
        if t not in self.responses:
            return None
        total = self.responses[t][0]
        for r in self.responses[t][1:]:
            total = total + r
        return total

    def parts(self, factors: dict[str, float]) -> tuple[Response | None, list[tuple[str, int, Response]]]:
        """The fixed part (sum of non-patterned loads) and the patterned contributions (type, region, response)."""
        fixed = None
        variable = []
        for t, regions in self.responses.items():
            f = factors.get(t, 0.0)
            if not f:
                continue
            if t in PATTERNED and len(regions) > 1:
                variable += [(t, i, r.scaled(f)) for i, r in enumerate(regions)]
            else:
                full = self.full(t).scaled(f)
                fixed = full if fixed is None else fixed + full
        return fixed, variable

    def arrangement_words(self, chosen: list[tuple[str, int]], variable) -> str:
        names = [n for n, _, _ in self.geometry.regions]
        words = []
        for t in PATTERNED:
            mine = [i for (tt, i, _) in variable if tt == t]
            if not mine:
                continue
            on = [i for tt, i in chosen if tt == t]
            if len(on) == len(mine):
                words.append(f"{t} on all spans")
            elif not on:
                words.append(f"{t} on no span")
            else:
                words.append(f"{t} on {', '.join(names[i] for i in sorted(on))}")
        return "; ".join(words)


@dataclass(frozen=True)
class Combined:
    """The envelope of one combination over the arrangements of L and S."""

    model: BeamModel
    factors: dict[str, float]

    @cached_property
    def _parts(self):
        return self.model.parts(self.factors)

    def value(self, attr: str, index, sign: int) -> tuple[float, list[tuple[str, int]]]:
        """The extreme of `attr` (M, V, D at station `index`, or R at support `index`) with sign +1 or -1.

        `index` may also be (position, start, end): the value at a position between stations, interpolated
        within the region from start to end (mm).
        """
        fixed, variable = self._parts
        pick = (lambda arr: float(arr[index])) if not isinstance(index, tuple) else \
            (lambda arr: sample(self.model.x, arr, *index))
        total = pick(getattr(fixed, attr)) if fixed is not None else 0.0
        chosen = []
        for t, i, r in variable:
            c = pick(getattr(r, attr))
            if c * sign > EPS * max(1.0, abs(c)):
                total += c
                chosen.append((t, i))
        return total, chosen

    def envelope(self, attr: str, sign: int) -> np.ndarray:
        fixed, variable = self._parts
        shape = len(self.model.geometry.supports) if attr == "R" else len(self.model.x)
        out = np.array(getattr(fixed, attr), float) if fixed is not None else np.zeros(shape)
        for _, _, r in variable:
            c = getattr(r, attr)
            out = out + (np.maximum(c, 0) if sign > 0 else np.minimum(c, 0))
        return out

    def target(self, kind: str, attr: str, index, sign: int, region: str, x: float, **kw) -> Target:
        value, chosen = self.value(attr, index, sign)
        _, variable = self._parts
        return Target(kind, region, x, value, self.model.arrangement_words(chosen, variable), **kw)


def sample(x: np.ndarray, values: np.ndarray, position: float, start: float, end: float) -> float:
    """`values` at `position`, interpolated between the stations of the region from `start` to `end` (mm)."""
    idx = np.nonzero((x >= start - EPS) & (x <= end + EPS))[0]
    return float(np.interp(position, x[idx], values[idx]))


def _in(x: np.ndarray, a: float, b: float, closed: bool = True) -> np.ndarray:
    return np.nonzero((x >= a - EPS) & (x <= b + EPS) if closed else (x > a + EPS) & (x < b - EPS))[0]


def strength_targets(model: BeamModel, factors: dict[str, float], d: float) -> list[Target]:
    """The extreme factored effects of one combination (moments, shears beyond d, reactions)."""
    comb = Combined(model, factors)
    g, x = model.geometry, model.x
    out: list[Target] = []
    mmax, mmin = comb.envelope("M", +1), comb.envelope("M", -1)
    seen_negative: set[int] = set()
    for name, a, b in g.regions:
        idx = _in(x, a, b)
        if not len(idx):
            continue
        if name.startswith("span"):
            k = idx[int(np.argmax(mmax[idx]))]
            if mmax[k] > EPS:
                out.append(comb.target("M+", "M", k, +1, name, float(x[k]), length=b - a))
        k = idx[int(np.argmin(mmin[idx]))]
        if mmin[k] < -EPS and round(float(x[k])) not in seen_negative:
            seen_negative.add(round(float(x[k])))
            # over a support the bottom edge is in compression on both sides: the longer region sets L_u
            beside = [bb - aa for _, aa, bb in g.regions if min(abs(aa - x[k]), abs(bb - x[k])) < EPS]
            out.append(comb.target("M-", "M", k, -1, name, float(x[k]), length=max([b - a, *beside])))
    out += _shear_targets(comb, d)
    rmax, rmin = comb.envelope("R", +1), comb.envelope("R", -1)
    for j, s in enumerate(g.supports):
        if rmax[j] > EPS:
            out.append(comb.target("R", "R", j, +1, f"support {j + 1}", s, support=j + 1))
        if rmin[j] < -EPS:
            out.append(comb.target("R-", "R", j, -1, f"support {j + 1}", s, support=j + 1))
    return out


def _shear_targets(comb: Combined, d: float) -> list[Target]:
    """Largest |V| in each region at or beyond d from the support faces (taken at the support centrelines)."""
    g, x = comb.model.geometry, comb.model.x
    vmax, vmin = comb.envelope("V", +1), comb.envelope("V", -1)
    out = []
    supports = g.supports
    for name, a, b in g.regions:
        lo = a + d if any(abs(a - s) < EPS for s in supports) else a
        hi = b - d if any(abs(b - s) < EPS for s in supports) else b
        if hi <= lo:  # a region shorter than 2d: its shear is checked at its middle
            lo = hi = (a + b) / 2
        idx = _in(x, lo, hi, closed=False)
        best = None  # (|V|, index or (position, a, b), sign, x)
        for k in idx:
            for sign, env in ((+1, vmax), (-1, vmin)):
                if best is None or abs(env[k]) > best[0]:
                    best = (abs(env[k]), int(k), sign, float(x[k]))
        for pos in (lo, hi):  # the sections at d, between stations
            for sign in (+1, -1):
                v, _ = comb.value("V", (pos, a, b), sign)
                if best is None or abs(v) > best[0] + EPS:
                    best = (abs(v), (pos, a, b), sign, pos)
        if best is None or best[0] <= EPS:
            continue
        near = min(range(len(supports)), key=lambda j: abs(supports[j] - best[3]))
        out.append(comb.target("V", "V", best[1], best[2], name, best[3], support=near + 1, length=b - a))
    return out


def deflection_targets(model: BeamModel, factors: dict[str, float]) -> list[Target]:
    """Largest deflection (EI·Δ, N·mm³, either sense) of each span and at each overhang tip."""
    comb = Combined(model, factors)
    g, x = model.geometry, model.x
    dmax, dmin = comb.envelope("D", +1), comb.envelope("D", -1)
    out = []
    for name, a, b in g.regions:
        if name.startswith("span"):
            idx = _in(x, a, b)
        else:
            tip = a if name.startswith("left") else b
            idx = _in(x, tip, tip)
        if not len(idx):
            continue
        k_up, k_dn = idx[int(np.argmax(dmax[idx]))], idx[int(np.argmin(dmin[idx]))]
        k, sign = (k_dn, -1) if abs(dmin[k_dn]) >= abs(dmax[k_up]) else (k_up, +1)
        if abs(comb.envelope("D", sign)[k]) <= EPS:
            continue
        out.append(comb.target("D", "D", k, sign, name, float(x[k]), length=b - a))
    return out
