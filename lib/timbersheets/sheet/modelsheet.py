"""Sheet content of a beam analysed as a model: geometry, the loads by kind, the carried reactions, the
analysis (package and version, arrangements of live and snow), reactions, extremes and the diagram.

Every number comes from the same model the design used (:func:`beamdesign.model_of`).
"""

from __future__ import annotations

from ..engineering.analysis import combination_label, sls_combinations
from ..engineering.beamdesign import geometry_of, loads_of, model_deflection, model_of, reactions_by_type
from ..engineering.beammodel import PATTERNED, library
from ..engineering.beampattern import Combined
from ..engineering.calc import format_metres, format_number
from .blocks import Block, heading, para, q, table
from .tex import Cell, Table, escape

KIND_WORDS = {"M+": "largest positive moment", "M-": "most negative moment", "V": "largest shear beyond d",
              "R": "largest reaction", "R-": "uplift"}
KIND_UNITS = {"M+": "N*mm", "M-": "N*mm", "V": "N", "R": "N", "R-": "N"}


def _m(x: float) -> str:
    return f"{x / 1000:.2f}"


def geometry_rows(m) -> list[list[object]]:
    """Rows of section 1: spans, overhangs, supports."""
    g = geometry_of(m)
    spans = " + ".join(f"{s / 1000:g}" for s in g.spans)
    kind = "continuous over the interior supports" if len(g.spans) > 1 else "one span"
    over = "; ".join(f"{side} overhang {format_metres(v)} m" for side, v in (("left", g.left), ("right", g.right)) if v)
    text = f"spans {spans} m between support centres, {kind}" + (f"; {over}" if over else "") + \
        f"; total length {format_metres(g.length)} m"
    supports = ", ".join(f"R{j + 1} at {_m(s)} m" for j, s in enumerate(g.supports))
    # plain text: the table escapes each cell once (an escaped cell would print its own LaTeX)
    return [["Geometry", text],
            ["Supports", f"{supports} from the left end; held in position and against rotation about the "
                         "member axis at each support; the support faces are taken at the centres (on the "
                         "safe side for shear at d)"]]


def loads_block(m) -> Block:
    """Area, partial and point loads and carried reactions, each with its values."""
    from ..engineering.beamdesign import is_model

    out = Block("", "")
    v = m.values
    if is_model(m):
        out += para("$F$ " + escape("is the total specified load of each type on the member (line, partial, point "
                                    "and carried loads), the load on which the long-term ratio for ") + "$K_D$"
                    + escape(" is taken (CSA O86 5.3.2.3)."))
    elif v.get("carried"):
        out += para("$P$ " + escape("includes the axial loads this member carries from other members, listed below: "
                                    "each the named member's specified reaction of that type, unfactored and with "
                                    "its own weight as its design includes it; this member combines them under its "
                                    "own combinations."))
    if v.get("trib") is not None and any(v[f"q_{t}"] for t in "DLSWE"):
        parts = [f"{t}: {format_number(v[f'q_{t}'] * 1000)} kPa × {format_number(v['trib'] / 1000)} m = "
                 f"{format_number(v[f'q_{t}'] * v['trib'])} kN/m" for t in "DLSWE" if v[f"q_{t}"]]
        out += para(escape("Area loads times the tributary width, w = q × trib, included in the line loads w above: "
                           + "; ".join(parts) + "."))
    rows = []
    for t in "DLSWE":
        if is_model(m) and v[f"w_{t}"]:
            rows.append([t, "uniform, whole member", q(v[f"w_{t}"], "N/mm"),
                         Cell(f"$0$–${_m(m.length)}$", f"0–{_m(m.length)}"), ""])
        rows += [[t, "point", q(p, "N"), Cell(f"${_m(x)}$", _m(x)), ""] for p, x in v.get(f"point_{t}", ())]
        rows += [[t, "partial uniform", q(w, "N/mm"), Cell(f"${_m(a)}$–${_m(b)}$", f"{_m(a)}–{_m(b)}"), ""]
                 for w, a, b in v.get(f"part_{t}", ())]
    for c in v.get("carried", ()):
        how = "largest reaction of" if c.largest else "reaction of"
        for t, p in c.loads.items():
            if p:
                at = Cell(f"${_m(c.at)}$", _m(c.at)) if c.at is not None else "axial"
                rows.append([t, "carried", q(p, "N"), at, f"{c.label}: {how} {c.source}, support {c.reaction}"])
    if rows and is_model(m):  # an axial member's carried loads are introduced above
        out += para("The loads on the member (specified, by load type; positions from the member's left "
                    "end). A carried load is the named member's specified reaction of that type, unfactored and "
                    "with its own weight as its design includes it; this member combines it under its own "
                    "combinations.")
    if rows:
        out += table(Table(["Type", "Kind", "Value", "At", "Source"], rows, "llrrX",
                           ["", "", "kN or kN/m", "m", ""]))
    return out


def forces_block(design) -> Block:
    """The analysis: package, method, arrangements; specified reactions; the governing factored extremes."""
    ctx = design.context
    m = ctx.member  # as designed (own weight in the dead load where the design adds it)
    model = model_of(m)
    out = heading("Member forces (beam model)", 2)
    patterned = [t for t in PATTERNED if t in model.present()]
    arrangement = (f"{' and '.join(patterned)} are placed span by span (each span and overhang loaded or not): "
                   "for every effect below, on exactly the spans whose own contribution increases it, which covers "
                   "the full loading, the one-span and the alternate and adjacent-span arrangements (NBC Part 4 "
                   "full and partial loading). " if patterned and len(geometry_of(m).regions) > 1 else "")
    out += para(escape(f"Linear elastic analysis of the beam with {library()} (Python continuous beam analysis, "
                       "stiffness method), each load type and span analysed alone and added (superposition). "
                       "Dead load is on every span; wind and earthquake as given. " + arrangement +
                       "Moments, shears and reactions of a prismatic beam do not depend on its stiffness; "
                       "deflections are the model's ") + r"$E I \Delta$ divided by $E_S I_x$.")
    reactions = reactions_by_type(m)
    types = [t for t in "DLSWE" if any(r.get(t) for r in reactions.values())]
    rows = [[f"R{j}", *[q(r.get(t, 0.0), "N") for t in types]] for j, r in reactions.items()]
    out += para(escape("Specified reactions by load type (upward on this member positive, the same value acting downward on the member that carries it; L and S at their largest over the "
                       "arrangements): these are what a member that carries this one takes."))
    out += table(Table(["Support", *[Cell.math(t) for t in types]], rows, "l" + "r" * len(types),
                       ["", *["kN"] * len(types)]))
    out += para("Governing factored effects, each under the combination and arrangement that gives it (every "
                "combination is checked; section 5 lists them all):")
    best: dict[tuple[str, str], tuple] = {}
    for case in design.cases:
        for t in model.targets("strength", case.combination.factors, ctx.section.d):
            key = (t.kind, t.region)
            if key not in best or abs(t.value) > abs(best[key][1].value):
                best[key] = (case, t)
    rows = [[KIND_WORDS[t.kind], t.region, Cell(f"${_m(t.x)}$", _m(t.x)),
             q(t.value, KIND_UNITS[t.kind]), case.label, t.arrangement or "as given"]
            for case, t in best.values()]
    out += table(Table(["Effect", "Where", "x", "Value", "Combination", "Live/snow on"], rows, "llrrlX",
                       ["", "", "m", "kN·m or kN", "", ""]))
    if any(t.kind == "R-" for _, t in best.values()):
        out += para("Uplift at a support (a negative reaction): no bearing demand there, but the connection must "
                    "hold the member down; it is not checked on this sheet.")
    return out


def diagram(design) -> list[object]:
    """Caption and PNG: the model to scale and the V and M envelopes of the governing bending combination."""
    from IPython.display import Image

    from .diagrams import beam_model_png

    ctx = design.context
    m = ctx.member
    gov = design.governing_by_check().get("bending")
    if gov is None:
        return []
    case = next(c for c in design.cases if c.label == gov.combination)
    model = model_of(m)
    comb = Combined(model, case.combination.factors)
    png = beam_model_png(geometry_of(m), loads_of(m), model.x, (comb.envelope("V", +1), comb.envelope("V", -1)),
                         (comb.envelope("M", +1), comb.envelope("M", -1)), ctx.section.d)
    words = (f"The beam model and the shear and moment under the governing bending combination {case.label}: "
             "solid line the largest, dashed the least value at each point over the arrangements of live and snow "
             f"load; dotted lines at the supports and at d = {ctx.section.d:g} mm from them.")
    return [para(escape(words)), Image(data=png, format="png")]


def serviceability_block(design, data) -> Block:
    from ..engineering.analysis import service_cases_for

    m = design.context.member
    model = model_of(m)
    cases = service_cases_for(m, data, model.present())
    out = heading("Serviceability combinations", 2)
    if not cases:
        return out + para("Deflection is not checked: the member carries no dead, live or snow load.")
    rows = [["live" if c.check == "deflection-live" else "total", c.label,
             f"span/{m.defl_L if c.check == 'deflection-live' else m.defl_total:g}",
             "unverified" if any(not d.verified for d in c.datums) else "sourced"] for c in cases]
    words = ("Deflection of each span and of each overhang tip from the same model, under specified loads with "
             "live and snow placed to make each deflection largest (either sense). Limit: the span over n; at an "
             "overhang tip, twice the overhang over n.")
    stiffness = f" ${model_deflection.inline('E_S')}$, no $K_D$. "
    combos = ", ".join(f"{check.removeprefix('deflection-')} {combination_label(rows)}"
                       for check, rows in sls_combinations(data).items())
    combos = f"{combos[0].upper()}{combos[1:]}, each with only the loads this member carries."
    return out + para(escape(words) + stiffness + escape(combos)) + table(Table(["Deflection", "Combination", "Limit", "Data status"], rows,
                                                   "llrl"))
