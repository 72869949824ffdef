"""The beam model: spans, overhangs and loads, analysed with PyCBA.

A beam is a line of *regions*: the left overhang, each span, the right
overhang. Each load type's loads are analysed region by region with PyCBA
(continuous beam analysis by the stiffness method, a kept PyPI package; the
tool writes no solver of its own), and any arrangement of loaded regions is
the sum of its regions' responses (linear elastic analysis, so superposition
holds). That is how live and snow loads are patterned: dead load, wind and
earthquake act on every region; live and snow are placed on the regions that
make each effect largest.

The analysis is run with EI = 1: moments, shears and reactions of a prismatic
beam do not depend on EI, and deflections scale with 1/EI, so one analysis
serves every candidate section of a sizing search.

Compute units: N, mm, N/mm, N·mm; model deflections in N·mm³ (divide by E I).
"""

from __future__ import annotations

import hashlib
import os
from dataclasses import dataclass
from functools import lru_cache
from importlib.metadata import version
from pathlib import Path

import numpy as np

from ..errors import DesignError

PATTERNED = ("L", "S")  # variable gravity loads placed span by span (NBC 4.1.5.3; 4.1.6)
NPTS = 61  # stations per region (plus the load points and sections of interest)


def library() -> str:
    """The analysis package and its version, for the sheet."""
    return f"PyCBA {version('pycba')}"


@dataclass(frozen=True)
class Geometry:
    """Spans between support centrelines and the overhangs beyond the end supports (mm)."""

    spans: tuple[float, ...]
    left: float = 0.0
    right: float = 0.0

    @property
    def length(self) -> float:
        return sum(self.spans) + self.left + self.right

    @property
    def supports(self) -> tuple[float, ...]:
        """Support positions from the member's left end (mm), left to right."""
        out, x = [self.left], self.left
        for span in self.spans:
            x += span
            out.append(x)
        return tuple(out)

    @property
    def regions(self) -> tuple[tuple[str, float, float], ...]:
        """(name, start, end) of each overhang and span, left to right."""
        out = []
        if self.left:
            out.append(("left overhang", 0.0, self.left))
        s = self.supports
        out += [(f"span {i + 1}", s[i], s[i + 1]) for i in range(len(self.spans))]
        if self.right:
            out.append(("right overhang", s[-1], s[-1] + self.right))
        return tuple(out)


#: A load: ("udl", w N/mm, from mm, to mm) or ("point", P N, at mm).
Load = tuple


@dataclass(frozen=True)
class Response:
    """Response of the model to one set of loads: at stations x (mm) the moment M (N·mm, sagging
    positive), shear V (N), deflection times EI (N·mm³, upward positive); reactions R (N, upward) per support."""

    x: np.ndarray
    M: np.ndarray
    V: np.ndarray
    D: np.ndarray
    R: np.ndarray

    def __add__(self, other: "Response") -> "Response":
        return Response(self.x, self.M + other.M, self.V + other.V, self.D + other.D, self.R + other.R)

    def scaled(self, factor: float) -> "Response":
        return Response(self.x, self.M * factor, self.V * factor, self.D * factor, self.R * factor)


def _split(geometry: Geometry, load: Load) -> list[tuple[int, list]]:
    """The load as PyCBA load-matrix rows, by region index (0-based)."""
    out = []
    for i, (_, a, b) in enumerate(geometry.regions):
        if load[0] == "point":
            _, p, x = load
            last = i == len(geometry.regions) - 1
            if a <= x < b or (last and abs(x - b) < 1e-6):
                out.append((i, [i + 1, 2, p, x - a]))
        else:
            _, w, lo, hi = load
            lo, hi = max(lo, a), min(hi, b)
            if hi - lo > 1e-9:
                out.append((i, [i + 1, 1, w] if lo - a < 1e-9 and b - hi < 1e-9 else [i + 1, 3, w, lo - a, hi - lo]))
    return out


def stations(geometry: Geometry, loads: tuple[Load, ...], extra: tuple[float, ...]) -> dict[int, np.ndarray]:
    """Sections added to PyCBA's grid per region: load points, load ends and `extra` (region-local mm)."""
    points: dict[int, set[float]] = {}
    marks = list(extra)
    for load in loads:
        marks += [load[2]] if load[0] == "point" else [load[2], load[3]]
    for x in marks:
        for i, (_, a, b) in enumerate(geometry.regions):
            if a < x < b:
                points.setdefault(i, set()).add(x - a)
    return {i: np.array(sorted(v)) for i, v in points.items()}


STORE_ENV = "TIMBERSHEETS_BEAM_STORE"  # a folder of stored analyses, set by the run for itself and its kernels


def _stored_path(geometry: Geometry, loads: tuple[Load, ...], extra: tuple[float, ...]):
    """Where the analysis of exactly these inputs is kept, or None when no store is set.

    PyCBA and the SciPy and matplotlib it imports take about 2 s to import, once in every
    process (the run and each worker's kernel). The analysis is deterministic, so a run keeps
    each one under the hash of its inputs, the package version and NPTS; a rerun, and the
    kernels that render the sheets, read it instead of importing PyCBA."""
    folder = os.environ.get(STORE_ENV)
    if not folder:
        return None
    key = repr((geometry, loads, extra, NPTS, _version())).encode()
    return Path(folder) / f"{hashlib.sha256(key).hexdigest()}.npz"


@lru_cache(maxsize=1)
def _version() -> str:
    return version("pycba")


def _read_stored(path) -> Response | None:
    try:
        with np.load(path) as kept:
            return Response(*(np.array(kept[name], float) for name in ("x", "M", "V", "D", "R")))
    except (OSError, KeyError, ValueError):
        return None  # not there, or unreadable: analysed again


def _keep(path, response: Response) -> None:
    """Store an analysis: a temporary name, then a rename (a lost entry is only analysed again)."""
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        staged = path.with_name(f".{path.stem}.{os.getpid()}.part.npz")
        np.savez(staged, x=response.x, M=response.M, V=response.V, D=response.D, R=response.R)
        os.replace(staged, path)
    except OSError:
        pass  # a store that cannot be written costs only the time of analysing again


def analyse(geometry: Geometry, loads: tuple[Load, ...], extra: tuple[float, ...] = ()) -> Response:
    """PyCBA analysis of `loads` on the beam with EI = 1 (read from the run's store when kept there)."""
    path = _stored_path(geometry, loads, extra)
    kept = _read_stored(path) if path is not None else None
    if kept is not None:
        return kept
    response = _analyse(geometry, loads, extra)
    if path is not None:
        _keep(path, response)
    return response


def _analyse(geometry: Geometry, loads: tuple[Load, ...], extra: tuple[float, ...]) -> Response:
    import pycba

    lengths = [b - a for _, a, b in geometry.regions]
    supports = (["f"] if geometry.left else []) + ["p"] + ["r"] * len(geometry.spans) + (["f"] if geometry.right else [])
    rows = [row for load in loads for _, row in _split(geometry, load)]
    if not rows:
        zero = np.zeros(1)
        return Response(zero, zero, zero, zero, np.zeros(len(geometry.supports)))
    ba = pycba.BeamAnalysis(lengths, 1.0, supports=supports, LM=rows)
    ba.shear_points = stations(geometry, loads, extra) or None
    try:
        ba.analyze(npts=NPTS)
    except ValueError as exc:  # a mechanism: PyCBA refuses an unstable model
        raise DesignError("", f"the beam model cannot be analysed ({exc})") from None
    r = ba.beam_results
    res = r.results
    return Response(np.asarray(res.x, float), np.asarray(res.M, float), np.asarray(res.V, float),
                    np.asarray(res.D, float), np.asarray(r.R, float).ravel())


@lru_cache(maxsize=512)
def region_responses(geometry: Geometry, loads: tuple[Load, ...], extra: tuple[float, ...]) -> tuple[Response, ...]:
    """One response per region: the loads (of one type) that lie on that region, analysed alone.

    Every response shares the same stations, so they add point by point.
    """
    all_marks = tuple(sorted(set(extra) | {ld[2] for ld in loads} | {ld[3] for ld in loads if ld[0] == "udl"}))
    out = []
    for i, (_, a, b) in enumerate(geometry.regions):
        mine = tuple(_clip(load, a, b, i == len(geometry.regions) - 1) for load in loads)
        mine = tuple(ld for ld in mine if ld is not None)
        out.append(_analyse_on_grid(geometry, mine, all_marks))
    return tuple(out)


def _analyse_on_grid(geometry: Geometry, loads: tuple[Load, ...], marks: tuple[float, ...]) -> Response:
    """As :func:`analyse`, with the stations fixed by `marks` (so responses of different loads align)."""
    if loads:
        return analyse(geometry, loads, marks)
    probe = analyse(geometry, (("udl", 1.0, 0.0, geometry.length),), marks)
    zero = np.zeros_like(probe.x)
    return Response(probe.x, zero, zero, zero, np.zeros_like(probe.R))


def _clip(load: Load, a: float, b: float, last: bool) -> Load | None:
    if load[0] == "point":
        x = load[2]
        return load if (a <= x < b or (last and abs(x - b) < 1e-6)) else None
    lo, hi = max(load[2], a), min(load[3], b)
    return ("udl", load[1], lo, hi) if hi - lo > 1e-9 else None
