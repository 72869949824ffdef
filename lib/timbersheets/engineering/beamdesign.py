"""Bending members analysed as beams: continuous spans, overhangs, point and partial loads, carried reactions.

The forces come from the beam model (:mod:`beammodel`, PyCBA) with live and
snow patterned (:mod:`beampattern`). Under each ULS combination the member is
checked for the largest positive moment in each span, the most negative moment
in each region, the largest shear at or beyond d from each support, and bearing
at every support; under each SLS combination, the deflection of each span
against span/n and of each overhang tip against 2 × overhang/n.

Lateral stability: a positive moment puts the top edge in compression, held as
the row's `Lu` says (at most the span); a negative moment puts the bottom edge
in compression, taken as laterally unsupported between supports (over a
support, the longer of the span or overhang beside it), unless the row gives
`Lu_bottom`, the member being held in position at every support. The effective length factor is that for "any other loading" (the
largest of the table): the model's loading is not the simple-span uniform case.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from functools import lru_cache

from ..errors import DesignError
from .analysis import SLS_CLAUSE, udl_reaction
from .beammodel import Geometry
from .beampattern import BeamModel
from .calc import calc
from .loads import LOAD_TYPES
from .membertypes import member_type

MODEL_CLAUSE = "beam model (PyCBA)"


def geometry_of(member) -> Geometry:
    spans = member.values.get("spans") or (member.length,)
    return Geometry(tuple(spans), member.values.get("overhang_left") or 0.0, member.values.get("overhang_right") or 0.0)


def loads_of(member) -> dict[str, tuple]:
    """Every load on the beam by type: line loads (w and q × trib, folded into w by the schedule) over the
    whole member, partial loads, point loads and carried reactions."""
    length = member.length
    out: dict[str, list] = {t: [] for t in LOAD_TYPES}
    for t in LOAD_TYPES:
        if member.values[f"w_{t}"]:
            out[t].append(("udl", member.values[f"w_{t}"], 0.0, length))
        out[t] += [("udl", w, a, b) for w, a, b in member.values.get(f"part_{t}", ())]
        out[t] += [("point", p, x) for p, x in member.values.get(f"point_{t}", ())]
    for c in member.values.get("carried", ()):
        for t, p in c.loads.items():
            if p:
                out[t].append(("point", p, c.at))
    return {t: tuple(v) for t, v in out.items() if v}


def is_model(member) -> bool:
    """True where the closed-form simple span under uniform load does not describe the beam."""
    v = member.values
    if member_type(member.type).routine != "bending":
        return False
    return (len(v.get("spans") or ()) > 1 or bool(v.get("overhang_left")) or bool(v.get("overhang_right"))
            or any(v.get(f"{p}_{t}") for p in ("point", "part") for t in LOAD_TYPES) or bool(v.get("carried")))


def total_loads(member) -> dict[str, float]:
    """Total specified load on the member by type (N): what K_D's long-term/standard-term ratio is taken on."""
    out = {}
    for t, loads in loads_of(member).items():
        out[t] = sum(ld[1] * (ld[3] - ld[2]) if ld[0] == "udl" else ld[1] for ld in loads)
    return out


@lru_cache(maxsize=256)
def _model(geometry: Geometry, loads: tuple) -> BeamModel:
    return BeamModel(geometry, dict(loads))


def model_of(member) -> BeamModel:
    """The member's beam model (cached: the sizing search reuses it for every candidate)."""
    return _model(geometry_of(member), tuple(sorted(loads_of(member).items())))


@calc(units={"EI_Delta": "N*mm**3", "E": "MPa", "K_SE": "", "K_T": "", "E_S": "MPa", "I_x": "mm**4", "L_d": "mm",
             "n_lim": "", "Delta": "mm", "Delta_lim": "mm"}, clause=SLS_CLAUSE)
def model_deflection(EI_Delta, E, K_SE, K_T, I_x, L_d, n_lim):
    E_S = E * (K_SE * K_T)
    Delta = EI_Delta / (E_S * I_x)
    Delta_lim = L_d / n_lim
    return locals()


@dataclass(frozen=True)
class ModelForces:
    """Factored effect at one place under one combination, in the shape the checks read (N, N·mm)."""

    case: object
    M_f: float = 0.0
    V_f: float = 0.0
    V_fd: float = 0.0
    R_f: float = 0.0
    W_f: float | None = None
    w_f: float | None = None
    where: str = ""
    L_u: float | None = None  # laterally unsupported length of the compression edge for this moment
    steps: dict = field(default_factory=dict)  # no closed-form steps: the model's values are in section 3


def _where(t) -> str:
    place = f"{t.region}, x = {t.x / 1000:.2f} m"
    return f"{place}; {t.arrangement}" if t.arrangement else place


def design_model(ctx, cases) -> list:
    """Checks of a beam from its model, in the order made: bending, shear and bearing per ULS combination
    (NotChecked where bearing cannot be), then deflection per SLS combination."""
    from .checks import CheckResult
    from .checks.bearing import check_bearing
    from .checks.bending import check_bending
    from .checks.shear import check_shear

    m = ctx.member
    given = [f"{e}_{t}" for e in ("P", "M", "V") for t in LOAD_TYPES if m.values[f"{e}_{t}"]]
    if given:
        raise DesignError(m.mark, f"is analysed as a beam model (spans, overhangs, point, partial or carried "
                          f"loads), which cannot also take {', '.join(given)}", "",
                          "Give the loads on the beam only, or the frame model's forces only (then without spans, "
                          "overhangs, point_*, part_* and carries)")
    model = model_of(m)
    out: list = []
    for case in cases:
        for t in model.targets("strength", case.combination.factors, ctx.section.d):
            where = _where(t)
            if t.kind in ("M+", "M-"):
                negative = t.kind == "M-"
                L_u = _unsupported_length(m, t, negative)
                f = ModelForces(case, M_f=t.value, where=where, L_u=L_u)
                out.append(replace(check_bending(ctx, f, False), where=where))
            elif t.kind == "V":
                f = ModelForces(case, V_f=abs(t.value), V_fd=abs(t.value), where=where)
                out.append(replace(check_shear(ctx, f, False), where=where))
            elif t.kind == "R":
                result = check_bearing(ctx, ModelForces(case, R_f=t.value, where=where), False)
                if isinstance(result, CheckResult):
                    out.append(replace(result, where=where))
                elif result is not None:
                    out.append(result)
    return out + model_deflections(ctx, model)


def _unsupported_length(m, target, negative: bool) -> float:
    """L_u of the edge in compression: the row's Lu (at most the span) for positive moment; between supports
    (the region's length) for negative moment, unless the row gives `Lu_bottom`."""
    if negative:
        bottom = m.values.get("Lu_bottom")
        return bottom if bottom is not None else target.length
    return min(m.Lu, target.length)


def model_deflections(ctx, model) -> list:
    from .analysis import service_cases_for
    from .checks import Step, result
    from .checks.context import inputs

    m, s = ctx.member, ctx.section
    out = []
    for sc in service_cases_for(m, ctx.data, model.present()):
        n_lim = m.values["defl_L" if sc.check == "deflection-live" else "defl_total"]
        for t in model.targets("deflection", sc.factors):
            overhang = "overhang" in t.region
            L_d = 2 * t.length if overhang else t.length
            given = inputs(EI_Delta=abs(t.value), E=ctx.f["E"], K_SE=ctx.K_S["K_SE"], K_T=ctx.K_T, I_x=s.I_x,
                           L_d=L_d, n_lim=n_lim)
            values = model_deflection(**given.values)
            words = (f"{sc.label} at {_where(t)}: E I Δ from the beam model (section 3) divided by E_S I_x; limit "
                     f"{'2 × overhang' if overhang else 'span'} L_d = {L_d / 1000:g} m over n = {n_lim:g}")
            r = result(sc.check, sc, values["Delta"], values["Delta_lim"], "mm", SLS_CLAUSE,
                       (Step(model_deflection, values, words),), r"\Delta", r"\Delta_lim",
                       used=(*sc.datums, *given.used))
            out.append(replace(r, leave_out=("Delta_lim",), with_kd=False, where=_where(t)))
    return out


def reactions_by_type(member) -> dict[int, dict[str, float]]:
    """Specified (unfactored) reactions per support (1-based) and load type, N.

    Dead, wind and earthquake on every region; live and snow at their largest
    downward reaction over the arrangements (for a simple span, the full load).
    """
    if not is_model(member):  # simple span under uniform load: R = wL/2 at each end
        half = {t: udl_reaction(w_f=member.values[f"w_{t}"], L=member.length)["Q_f"] for t in LOAD_TYPES
                if member.values[f"w_{t}"]}
        return {1: dict(half), 2: dict(half)}
    model = model_of(member)
    out: dict[int, dict[str, float]] = {}
    for t in model.present():
        from .beampattern import Combined

        comb = Combined(model, {t: 1.0})
        env = comb.envelope("R", +1) if t in ("L", "S") else model.full(t).R
        for j, value in enumerate(env):
            out.setdefault(j + 1, {})[t] = float(value)
    return out
