"""Bending moment resistance with lateral stability (CSA O86-14 6.5.4 sawn, 7.5.6 glulam).

Sawn:   M_r = φ F_b S K_Zb K_L,  F_b = f_b (K_D K_H K_Sb K_T).
Glulam: M_r = the lesser of φ F_b S K_X K_Zbg and φ F_b S K_X K_L, with
        K_Zbg = (130/b)^0.1 (610/d)^0.1 (9100/L)^0.1 ≤ 1.3 (b the widest board),
        K_X = 1.0 for straight members, E05 = 0.87 E in the stability terms.

Lateral stability: for sawn lumber K_L = 1.0 where the depth-to-width ratio d/b
meets the rule for the restraint the row describes (Lu = 0: compression edge
held by decking or joists; 0 < Lu < span: held at intervals by purlins or tie
rods; Lu = span: no intermediate support); otherwise K_L is computed from
C_B = √(L_e d / b²) ≤ C_B,max (data/clause_values.csv) with L_e from Lu. Glulam: K_L = 1.0 for Lu = 0,
computed otherwise. Under negative moment (uplift, hogging, suction) the bottom
edge is in compression and ``Lu_bottom`` gives its unsupported length; blank,
it is the whole length between supports. ``restraint = purlins`` and
``blocking`` describe the top edge; ``both-edges`` holds both (Lu = Lu_bottom =
0). The ends are assumed held in position and against rotation at the
bearings.

Clause numbers follow the O86-14 numbering (memory, unverified); the K_L and
K_Zbg forms and the depth-to-width rules are from memory (reference notes
§4.3, §4.4, §3.6) and are flagged as such through their data rows.
"""

from __future__ import annotations

from dataclasses import replace
from math import sqrt

from ...errors import DataError, DesignError
from ..calc import calc, format_metres, format_number
from ..data import Datum
from . import CheckResult, Step, result
from .context import Context, inputs

SAWN_CLAUSE = "O86-14 6.5.4"
GLULAM_CLAUSE = "O86-14 7.5.6"
STABILITY_CLAUSE = {"sawn": "O86-14 6.5.4.2", "glulam": "O86-14 7.5.6.4"}
CB_STOCKY = 10.0  # C_B at or below which K_L = 1.0 (O86 6.5.4.2.4)


@calc(units={"f_b": "MPa", "K_D": "", "K_H": "", "K_Sb": "", "K_T": "", "F_b": "MPa"}, clause=SAWN_CLAUSE)
def bending_strength(f_b, K_D, K_H, K_Sb, K_T):
    F_b = f_b * (K_D * K_H * K_Sb * K_T)
    return locals()


@calc(units={"K_Le": "", "L_u": "mm", "d": "mm", "b": "mm", "E_05": "MPa", "K_SE": "", "K_T": "", "F_b": "MPa",
             "L_e": "mm", "C_B": "", "C_K": ""}, clause="O86-14 6.5.4.2")
def lateral_slenderness(K_Le, L_u, d, b, E_05, K_SE, K_T, F_b):
    L_e = K_Le * L_u
    C_B = sqrt(L_e * d / b**2)
    C_K = sqrt(0.97 * E_05 * K_SE * K_T / F_b)
    return locals()


@calc(units={"C_B": "", "C_K": "", "K_L": ""}, clause="O86-14 6.5.4.2")
def lateral_intermediate(C_B, C_K):
    K_L = 1 - 1 / 3 * (C_B / C_K) ** 4
    return locals()


@calc(units={"C_B": "", "E_05": "MPa", "K_SE": "", "K_T": "", "F_b": "MPa", "K_L": ""}, clause="O86-14 6.5.4.2")
def lateral_slender(C_B, E_05, K_SE, K_T, F_b):
    K_L = 0.65 * E_05 * K_SE * K_T / (C_B**2 * F_b)
    return locals()


@calc(units={"phi": "", "F_b": "MPa", "S_x": "mm**3", "K_Zb": "", "K_L": "", "M_r": "N*mm"}, clause=SAWN_CLAUSE)
def sawn_bending(phi, F_b, S_x, K_Zb, K_L):
    M_r = phi * F_b * S_x * K_Zb * K_L
    return locals()


@calc(units={"b_lam": "mm", "d": "mm", "L": "mm", "K_Zbg": ""}, clause=GLULAM_CLAUSE)
def glulam_size_factor(b_lam, d, L):
    K_Zbg = min((130 / b_lam) ** 0.1 * (610 / d) ** 0.1 * (9100 / L) ** 0.1, 1.3)
    return locals()


@calc(units={"phi": "", "F_b": "MPa", "S_x": "mm**3", "K_X": "", "K_Zbg": "", "K_L": "",
             "M_r1": "N*mm", "M_r2": "N*mm", "M_r": "N*mm"}, clause=GLULAM_CLAUSE)
def glulam_bending(phi, F_b, S_x, K_X, K_Zbg, K_L):
    M_r1 = phi * F_b * S_x * K_X * K_Zbg
    M_r2 = phi * F_b * S_x * K_X * K_L
    M_r = min(M_r1, M_r2)
    return locals()


def sawn_size_factors(m: Context) -> tuple[Datum, Datum]:
    """K_Zb and K_Zv of a sawn bending member, from the size-factor table.

    Rule for built-up members: the table is entered with the thickness and
    depth of ONE ply (38 × 286 for 4 plies of 38 × 286, giving 1.0), not with
    the built-up width. The size effect describes how the chance of a
    strength-reducing defect grows with the stressed volume of one piece of
    lumber, and the table was derived for single pieces of the tabled
    thickness; in a built-up member each ply is such a piece, with its own
    defects, so each keeps its own size factor. The sharing of load between
    plies is credited by the system factor K_H from the row; taking K_Zb from
    the thicker column as well (the published example S1 used 1.1 for 38 × 286
    plies, which is the 89–102 mm column's value at 286 mm as the team recalls
    it) would credit the built-up action twice. The rule is conservative
    (1.0 ≤ 1.1). K_Zv is read from the same table column as K_Zb (reference
    notes §3.5; memory, unverified).
    """
    s = m.section
    if s.ply_b > s.d:
        raise DesignError(m.mark, f"a sawn bending member must be on edge (depth {s.d:g} mm is less than the "
                          f"piece width {s.ply_b:g} mm)", SAWN_CLAUSE, "Write the size as b x d with d the depth")
    try:
        kzb = m.data.size_factor_sawn("K_Zb", s.ply_b, s.d)
    except DataError:
        raise DesignError(m.mark, f"the bending and shear size factors K_Zb, K_Zv for {s.ply_b:g} mm thick "
                          "pieces are not in the data tables (only dimension lumber 38-102 mm thick is)",
                          "O86-14 6.4.5", "Design this timber by hand, or add a verified size-factor table") from None
    kzv = replace(kzb, symbol="K_Zv", label=kzb.label.replace("K_Zb", "K_Zv (as K_Zb)", 1))
    return kzb, kzv


def unsupported_length(member, negative: bool) -> float:
    """L_u of the edge in compression (mm): Lu for the top edge; under negative moment the bottom edge,
    Lu_bottom, or the full length between supports when the row leaves it blank (never assumed braced)."""
    if not negative:
        return member.Lu
    return member.length if member.Lu_bottom is None else member.Lu_bottom


def _restraint_rule(m: Context, L_u: float, negative: bool) -> tuple[str, Datum] | None:
    """The loosest depth-to-width rule the restraint meets, or None (compute K_L).

    purlins and blocking describe the top edge; under negative moment only both-edges still applies."""
    ratio = m.section.d / m.section.b
    extra = m.member.values.get("restraint")
    if negative and extra != "both-edges":
        extra = None
    if extra == "both-edges":
        actual = "both-edges"
    elif L_u == 0:
        actual = "blocking" if extra == "blocking" else "decking"
    elif extra == "purlins" and L_u < m.length:
        actual = "purlins"
    else:
        actual = None  # only the d/b ≤ 4 rule, else K_L is computed from L_u
    provided = ["none"] + ([actual] if actual else [])
    for name, datum in m.data.lateral_restraints():
        if name in provided and ratio <= datum.value:
            return name, datum
    return None


def _restraint_hint(given: str) -> str:
    """What the row could say instead: only restraints looser than the one it already states."""
    options = {"decking": "restraint = blocking if there is bridging or blocking at no more than 8d; ",
               "blocking": ""}.get(given, None)
    if options is None:
        return "Use a wider or built-up member"
    return (f"{options}restraint = both-edges if both edges are held in line; else give the distance between "
            "lateral supports as Lu to compute K_L, or use a wider or built-up member")


def bottom_edge_words(member) -> str:
    """How the row holds the bottom edge, in words for the sheet."""
    if member.restraint == "both-edges":
        return "restraint = both-edges holds it in line (L_u = 0)"
    if member.Lu_bottom is None:
        return (f"Lu_bottom is not given, so it is taken as laterally unsupported over the full length between "
                f"supports, L_u = {format_metres(member.length)} m")
    if member.Lu_bottom == 0:
        return "Lu_bottom = 0: held continuously"
    return f"held at intervals of Lu_bottom = {format_metres(member.Lu_bottom)} m"


def lateral_stability(m: Context, F_b: float, negative: bool, line_loads: bool,
                      segment: float | None = None) -> tuple[float, list[Step], str, tuple[Datum, ...]]:
    """K_L under one combination, its steps, the words that explain it and the data values it read.

    `segment` (mm): the unsupported length of the compression edge a beam model gives for this moment.
    """
    s, member = m.section, m.member
    L_u = segment if segment is not None else unsupported_length(member, negative)
    bottom = bottom_edge_words(member)
    if negative and segment is not None and member.Lu_bottom is None and member.restraint != "both-edges":
        bottom = (f"Lu_bottom is not given, so it is taken as laterally unsupported between the supports, "
                  f"L_u = {format_metres(L_u)} m")
    edge = f"Negative moment: the bottom edge is in compression; {bottom}. " if negative else ""
    ratio = s.d / s.b
    if m.glulam and L_u == 0:
        return 1.0, [], f"{edge}Lateral stability: compression edge held continuously (L_u = 0), so K_L = 1.0.", ()
    if not m.glulam:
        rule = _restraint_rule(m, L_u, negative)
        if rule is not None:
            given = ("both edges held in line (schedule: restraint = both-edges)" if rule[0] == "both-edges" else
                     "the compression edge held in line by purlins or tie rods (schedule: restraint = purlins)"
                     if rule[0] == "purlins" else
                     "the compression edge held continuously and bridging or blocking at 8d (schedule: restraint = "
                     "blocking)" if rule[0] == "blocking" else
                     "the compression edge held continuously (L_u = 0)" if L_u == 0 else
                     "no intermediate lateral support" if L_u >= m.length else
                     f"the compression edge held at intervals of L_u = {format_metres(L_u)} m")
            words = (f"Lateral stability ({STABILITY_CLAUSE['sawn']}.1): d/b = {ratio:.2f} ≤ {rule[1].value:.1f}, the "
                     f"limit with {rule[1].label.split(', ', 1)[1]}; the member has {given}, so K_L = 1.0.")
            return 1.0, [], edge + words, (rule[1],)
        if L_u == 0:
            given = member.values.get("restraint") if not negative or member.restraint == "both-edges" else None
            given = given or "decking"
            limit = next(d.value for n, d in m.data.lateral_restraints() if n == given)
            words = {"decking": "the compression edge held by decking or joists alone",
                     "blocking": "decking plus bridging or blocking at 8d"}.get(given, "both edges held")
            raise DesignError(m.mark, f"d/b = {ratio:.2f} exceeds {limit:g}, the most the depth-to-width rule "
                              f"allows with {words}", STABILITY_CLAUSE["sawn"], _restraint_hint(given))
    k_le = m.data.bending_effective_length("simple-udl" if line_loads else "other")
    given = inputs(K_Le=k_le, L_u=L_u, d=s.d, b=s.b, E_05=m.f["E05"], K_SE=m.K_S["K_SE"], K_T=m.K_T, F_b=F_b)
    slender = lateral_slenderness(**given.values)
    C_B, C_K = slender["C_B"], slender["C_K"]
    cb_max = m.data.clause_value("C_B_max", member.material)
    read = (*given.used, cb_max)
    if C_B > cb_max.value:
        raise DesignError(m.mark, f"slenderness C_B = {C_B:.1f} exceeds {cb_max.value:g}",
                          STABILITY_CLAUSE["glulam" if m.glulam else "sawn"],
                          "Brace the compression edge (shorter Lu) or choose a wider section")
    held = ""
    if m.glulam and member.restraint == "purlins" and not negative:
        held = ("; restraint = purlins: the compression edge is held at the purlins, so L_u is their spacing (the "
                "depth-to-width rule is for sawn lumber; glulam computes K_L)")
    steps = [Step(lateral_slenderness, slender, f"{edge}Lateral stability, laterally unsupported length "
                  f"L_u = {format_metres(L_u)} m ({'uniform load on a simple span' if line_loads else 'any loading'}){held}")]
    if C_B <= CB_STOCKY:
        return 1.0, steps, f"C_B = {C_B:.2f} ≤ {CB_STOCKY:g}, so K_L = 1.0.", read
    if C_B <= C_K:
        values = lateral_intermediate(C_B=C_B, C_K=C_K)
        steps.append(Step(lateral_intermediate, values, f"{CB_STOCKY:g} < C_B = {C_B:.2f} ≤ C_K = {C_K:.2f}"))
    else:
        values = lateral_slender(C_B=C_B, E_05=given.values["E_05"], K_SE=given.values["K_SE"], K_T=m.K_T, F_b=F_b)
        steps.append(Step(lateral_slender, values, f"C_K = {C_K:.2f} < C_B = {C_B:.2f} ≤ {cb_max.value:g}"))
    return values["K_L"], steps, "", read


def check_bending(m: Context, forces, line_loads: bool) -> CheckResult:
    """Factored bending moment resistance M_r against M_f (N·mm) under one combination."""
    case, M_f = forces.case, forces.M_f
    negative = M_f < 0
    s = m.section
    f_b = m.f["f_b_neg" if negative else "f_b_pos"] if m.glulam else m.f["f_b"]
    given = inputs(f_b=f_b, K_D=case.K_D, K_H=m.K_H, K_Sb=m.K_S["K_Sb"], K_T=m.K_T)
    strength = bending_strength(**given.values)
    F_b = strength["F_b"]
    K_L, lateral_steps, words, lateral_used = lateral_stability(m, F_b, negative, line_loads,
                                                                getattr(forces, "L_u", None))
    used = [*given.used, *lateral_used]
    steps: list[Step] = []
    if "moment" in forces.steps:
        steps.append(Step(*forces.steps["moment"], "Factored moment at midspan"))
    which = ("Negative moment: f_b is the negative-moment strength" if negative else
             "Positive moment: f_b is the positive-moment strength") if m.glulam else ""
    steps.append(Step(bending_strength, strength, which))
    steps += lateral_steps
    if m.glulam:
        b_lam = m.data.glulam_widest_board(s.b)
        k_x = replace(m.data.glulam_factor("K_X_straight"), symbol="K_X")
        size = glulam_size_factor(b_lam=b_lam.value, d=s.d, L=m.length)
        steps.append(Step(glulam_size_factor, size, "Size factor, b_lam the widest single board, L the span "
                          "between points of zero moment"))
        final = inputs(phi=m.phi["bending"], F_b=F_b, S_x=s.S_x, K_X=k_x, K_Zbg=size["K_Zbg"], K_L=K_L)
        used += [b_lam, k_x, *final.used]  # in the order read: the unverified list keeps first sight
        values = glulam_bending(**final.values)
        clause = GLULAM_CLAUSE
    else:
        kzb, kzv = sawn_size_factors(m)
        final = inputs(phi=m.phi["bending"], F_b=F_b, S_x=s.S_x, K_Zb=kzb, K_L=K_L)
        used += [kzb, kzv, *final.used]  # K_Zv is read with K_Zb (the same table cell)
        values = sawn_bending(**final.values)
        ply = f"Size factor for one ply, {s.ply_b:g} × {s.d:g} mm" if s.plies > 1 else f"Size factor for {s.ply_b:g} × {s.d:g} mm"
        words = f"{words} {ply}: K_Zb = {format_number(kzb.value)}.".strip()
        clause = SAWN_CLAUSE
    steps.append(Step(glulam_bending if m.glulam else sawn_bending, values, words))
    return result("bending", case, M_f, values["M_r"], "N*mm", clause, tuple(steps), "M_f", "M_r", used=tuple(used))
