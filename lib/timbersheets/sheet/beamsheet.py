"""Sheet content that only bending members have: span and support rows, the
member forces of every combination, the SLS combinations and the diagram.

Called by :class:`timbersheets.sheet.sections.Sheet`; every number comes from the same
analysis functions the design used.
"""

from __future__ import annotations

from ..engineering.analysis import (combination_label, loading_mode, member_forces, service_cases, sls_combinations,
                                    sls_deflection, span_diagram, udl_moment, udl_reaction, udl_shear)
from ..engineering.beamdesign import is_model, reactions_by_type
from ..engineering.calc import format_metres, format_number, format_value
from ..engineering.checks.bending import bottom_edge_words
from ..engineering.membertypes import member_type
from ..engineering.ownweight import gives_line_loads
from ..engineering.units import to_display
from ..errors import TimbersheetsError
from .blocks import Block, heading, math_block, para, q, table
from .tabled import checks_by_name, shared_table_checks
from .tex import Cell, Table, escape


def member_rows(m, section, checks: set[str] | None = None) -> list[list[object]]:
    """Rows of section 1 that describe the span, its supports and the limits.

    `checks` names the checks the design ran: deflection limits are listed only
    for the deflection checks made (all scheduled limits when not known).
    """
    try:
        frame = loading_mode(m) == "forces"
    except TimbersheetsError:
        frame = False
    if frame:
        span = Cell(f"$L = {format_value(m.length, 'mm')}$; moments and shears from the frame model (the length "
                    "sets lateral stability and the glulam size factor)", f"L = {m.length:g} mm, frame-model forces")
    elif member_type(m.type).axial is None:  # a beam on its supports, no axial force
        span = Cell(f"$L = {format_value(m.length, 'mm')}$, simply supported; the design span between the centres of "
                    "the bearings", f"L = {m.length:g} mm, simply supported")
    else:
        span = Cell(f"$L = {format_value(m.length, 'mm')}$; line loads act across the member between its ends, "
                    "which are held in position", f"L = {m.length:g} mm")
    lateral = lateral_support_words(m)
    bearing = (Cell(f"$l_b = {format_value(m.bearing, 'mm')}$ at each end support",
                    f"l_b = {m.bearing:g} mm at each end support") if m.bearing is not None
               else "not given: no bearing check")
    try:
        mode = loading_mode(m)
    except TimbersheetsError:
        mode = ""
    loading = {"line": "uniform line loads on the span (the forces are computed below)",
               "forces": "moments and shears from a frame model, used as given"}.get(mode, "see section 5")
    limits = deflection_limits(m, checks)
    spans = [["Span", span]]
    if is_model(m):
        from ..engineering.beammodel import library
        from .modelsheet import geometry_rows

        spans = geometry_rows(m)
        lateral = lateral_support_words(m, model=True)
        bearing = (Cell(f"$l_b = {format_value(m.bearing, 'mm')}$ at every support", f"l_b = {m.bearing:g} mm")
                   if m.bearing is not None else bearing)
        loading = f"beam model analysed with {library()}, live and snow patterned (section 3)"
        limits = limits if isinstance(limits, str) else Cell(f"span/{m.defl_L:g} live, span/{m.defl_total:g} "
                      "total; at an overhang tip twice the overhang over the same divisor",
                      f"span/{m.defl_L:g} live, span/{m.defl_total:g} total; overhang tips 2 × overhang / n")
    return [
        *spans,
        ["Lateral support", Cell(escape(lateral), lateral)],
        ["Bearing", bearing],
        ["Loading", loading],
        ["Deflection limits", limits],
        ["Net area", Cell(f"$A_n = {format_number(m.net_area)}\\,A_g = {format_value(section.A * m.net_area, 'mm**2')}$",
                          f"A_n = {m.net_area:g} A_g")],
    ]


def deflection_limits(m, checks: set[str] | None) -> Cell | str:
    """The limits of the deflection checks made; none when the member is not checked for deflection."""
    limits = [(f"$L/{format_number(m.values[column], 'mm')}$ under {words} load", f"L/{m.values[column]:g} {words}")
              for check, column, words in (("deflection-live", "defl_L", "live"),
                                           ("deflection-total", "defl_total", "total"))
              if checks is None or check in checks]
    if not limits:
        return "none checked: no SLS combination applies (they combine gravity line loads on the span only)"
    return Cell(", ".join(latex for latex, _ in limits), ", ".join(text for _, text in limits))


def lateral_support_words(m, model: bool = False) -> str:
    """One statement of how each edge is held, from Lu, Lu_bottom and restraint together (`model`: a beam
    model, whose bottom edge without Lu_bottom is unsupported between supports)."""
    restraint = m.restraint
    # a beam's bearings restrain twist; a column's ends are only held in position
    ends = ("ends held in position and against rotation at the bearings" if member_type(m.type).axial is None
            else "ends held in position")
    if restraint == "both-edges":
        return f"both edges held in line (restraint = both-edges; Lu = Lu_bottom = 0); {ends}"
    if m.Lu == 0:
        top = "top (compression) edge held continuously (Lu = 0), e.g. by decking or joists fixed to it"
        if restraint == "blocking":
            top += ", with bridging or blocking at no more than 8d (restraint = blocking)"
    elif restraint == "purlins":
        top = f"top (compression) edge held at purlins or tie rods every Lu = {format_metres(m.Lu)} m (restraint = purlins)"
    else:
        top = f"top (compression) edge laterally unsupported over Lu = {format_metres(m.Lu)} m"
    bottom = bottom_edge_words(m)
    if model and m.Lu_bottom is None:
        bottom = ("Lu_bottom is not given, so it is taken as laterally unsupported between supports (an overhang: "
                  "its length)")
    return f"{top}; bottom edge (in compression under negative moment): {bottom}; {ends}"


def forces_block(design) -> Block:
    """The factored moment, shear and reaction of every combination."""
    ctx, m = design.context, design.member
    if ctx is None or design.errors:
        return Block("", "")
    if is_model(m):
        from .modelsheet import forces_block as model_forces

        return model_forces(design)
    out = heading("Member forces", 2)
    if loading_mode(m) == "forces":
        return out + para("Moments and shears from the frame model, combined by the factors of each combination "
                          "(the table above) and used as given; the reaction at a support is taken as the shear.")
    forces = [member_forces(m, ctx.section.d, case, "line") for case in design.cases]
    span = f"Simply supported span $L = {format_value(m.length, 'mm')}$ under the uniform factored load $w_f$"
    words_md = ("Simply supported span under the uniform factored load w_f: M_f at midspan, V_f and Q_f at the "
                "supports, V_fd at d from the end of the span.")
    if {"bending", "shear"} <= set(shared_table_checks(checks_by_name(design))):
        # each check works its force out with numbers (section 5): the equations here in the text, not displayed
        out += para(f"{span}: the moment ${udl_moment.inline('M_f')}$ at midspan; the shear "
                    f"${udl_shear.inline('V_f')}$ and the reaction ${udl_reaction.inline('Q_f')}$ at the supports; "
                    f"the shear ${udl_shear.inline('V_fd')}$ at distance $d$ from the end of the span, the one the "
                    "check uses (on the safe side of measuring $d$ from the face of the support). Each "
                    "combination's $w_f$ is in the table above; each check works its force out for its governing "
                    "combination, and the table that ends section 5 gives them for every combination.", words_md)
    else:
        out += para(f"{span}: the moment $M_f$ at midspan, the shear $V_f$ and the reaction $Q_f$ at the "
                    "supports, and the shear $V_{fd}$ at distance $d$ from the end of the span, the one the check "
                    "uses (on the safe side of measuring $d$ from the face of the support):", words_md)
        out += force_equations(forces[0]) if forces else Block("", "")
        header = ["Combination", Cell.math("w_f"), Cell.math("M_f"), Cell.math("V_f"), Cell.math("V_{fd}"),
                  Cell.math("Q_f")]
        units = ["", "kN/m", "kN·m", "kN", "kN", "kN"]
        rows = [[f.case.label, q(f.w_f, "N/mm"), q(f.M_f, "N*mm"), q(f.V_f, "N"), q(f.V_fd, "N"), q(f.R_f, "N")]
                for f in forces]
        out += table(Table(header, rows, "l" + "r" * (len(header) - 1), units))
    if any(f.R_f < 0 for f in forces):
        out += para("A negative $Q_f$ is uplift at the supports: no bearing demand, but the connections must hold "
                    "the member down (not checked on this sheet).")
    each = reactions_by_type(ctx.member)[1]
    if each:
        parts = ", ".join(f"{t} {format_number(to_display(v, 'N')[0], 'kN')}" for t, v in each.items())
        out += para(f"Specified reactions $R_1 = R_2$ by load type, from ${udl_reaction.inline('Q_f')}$ with the "
                    f"specified load $w$ of the type for $w_f$: {escape(parts)} kN (what a member that carries this "
                    "one takes).",
                    f"Specified reactions R1 = R2 = w L / 2 by load type: {parts} kN (what a member that carries "
                    "this one takes).")
    return out


def force_equations(forces) -> Block:
    """The equations member_forces evaluated for every row of the forces table, as symbols (their Calcs)."""
    shown = [calc_ for name, (calc_, _) in forces.steps.items() if name != "total"]
    rows = "\n\\\\\n".join(c.formula_lines() for c in shown)
    return math_block(f"$$\n\\begin{{aligned}}\n{rows}\n\\end{{aligned}}\n$$")


def serviceability_block(design, data) -> Block:
    """The SLS combinations used for deflection, with their sources."""
    out = heading("Serviceability combinations", 2)
    if design.errors or design.context is None:
        return Block("", "")
    m = design.context.member  # with its own weight in the dead load
    if is_model(m):
        from .modelsheet import serviceability_block as model_serviceability

        return model_serviceability(design, data)
    mode = loading_mode(m)
    cases = service_cases(m, data) if gives_line_loads(m, design.context.own_weight) else []
    if not cases and mode == "forces":
        return out + para("Deflection is not checked: the row gives the moments and shears of a frame model, not "
                          "the loads that cause them. Check deflection in the frame model, or give the line loads "
                          "$w_*$ of the simple span.", "Deflection is not checked: no line loads w_* given.")
    if not cases:
        return out + para("Deflection is not checked: the member carries no dead, live or snow load, and wind and "
                          "earthquake are not included in the serviceability combinations.")
    def carries(*types: str) -> bool:
        return any(m.values.get(f"{kind}_{t}") for t in types for kind in ("w", "M", "V"))

    intro = (f"Deflection under specified (unfactored) loads, with ${sls_deflection.inline('E_S')}$ and no $K_D$: "
             f"{sls_words(data)}.")
    if carries("S"):  # said only where it applies: a sheet without snow has no choice to explain
        intro += (" Snow is taken at its full specified value, the roof's live load: a conservative choice against "
                  "the NBC 2020 SLS companion factors, recorded as unverified.")
    if carries("W", "E"):
        intro += " Wind and earthquake are not gravity loads on the span and are left out."
    if mode == "forces":
        intro += " The strength checks use the frame model's forces; the line loads serve deflection only."
    rows = []
    for c in cases:
        limit = m.defl_L if c.check == "deflection-live" else m.defl_total
        status = "unverified" if any(not d.verified for d in c.datums) else "sourced"
        rows.append(["live" if c.check == "deflection-live" else "total", c.label, q(c.w_s, "N/mm"),
                     Cell(f"$L/{format_number(limit, 'mm')}$", f"L/{limit:g}"), status])
    return out + para(intro) + table(Table(["Deflection", "Combination", Cell.math("w_s"), "Limit",
                                                           "Data status"], rows, "llrrl",
                                                          ["", "", "kN/m", "", ""]))


def sls_words(data) -> str:
    """The SLS combinations as the data rows give them, and which of them a published example follows."""
    by_check = {check.removeprefix("deflection-"): rows for check, rows in sls_combinations(data).items()}
    every = " and ".join(f"{name} ${combination_label(rows)}$" for name, rows in by_check.items())
    sourced = " and ".join(f"{name} ${combination_label([r for r in rows if r[1].verified])}$"
                           for name, rows in by_check.items() if any(d.verified for _, d in rows))
    words = f"{every}, each with only the loads this member carries"
    if sourced:  # the sourced rows come from S1 (data README)
        words += (f". {sourced[0].upper()}{sourced[1:]} follow a published worked example (L. A. Fernandez, 2024; "
                  "NBC 2015 basis)")
    return words


def diagram(design) -> list[object]:
    """Caption and PNG of the shear and moment under the governing bending combination, or []."""
    from IPython.display import Image

    from .diagrams import shear_moment_png

    m, ctx = design.member, design.context
    if not design.errors and ctx is not None and is_model(m):
        from .modelsheet import diagram as model_diagram

        return model_diagram(design)
    if design.errors or ctx is None or loading_mode(m) != "line":
        return []
    gov = design.governing_by_check().get("bending")
    if gov is None:
        return []
    case = next(c for c in design.cases if c.label == gov.combination)
    w_f = to_display(case.factored["w"], "N/mm")[0]
    png = shear_moment_png(span_diagram(case.factored["w"], m.length, ctx.section.d))
    caption = para(f"Shear and moment under the governing combination {escape(case.label)}, "
                   f"$w_f = {format_number(w_f, 'kN/m')}$~kN/m ($V_{{fd}}$ at $d = {format_value(ctx.section.d, 'mm')}$).",
                   f"Shear and moment under {case.label}.")
    return [caption, Image(data=png, format="png")]
