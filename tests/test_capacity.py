"""No silent capacity: lateral support, K_D, and restraint as the row states them, never assumed.

Each case names its basis: O86 clauses as given in the data files (several from memory, flagged there),
hand calculations with the arithmetic in the comments, or common practice.
"""

from __future__ import annotations

import pytest

from conftest import design_row, member_row, write_schedule
from timbersheets.schedule.read import load_schedule
from timbersheets.sheet.sections import Sheet
from timbersheets.sheet.tex import escape

CODES = {"nbc": "2020", "o86": "2019"}
PURLIN = dict(type="bending", material="sawn", species="S-P-F", grade="No.1/No.2", size="38x184", K_H="1.1",
              length="3.2", w_D="0.46", w_S="1.16", Ly="", P_D="")


def errors_of(tmp_path, rows):
    schedule = load_schedule(write_schedule(tmp_path, rows))
    return schedule, {r.mark: [str(e) for e in r.errors] for r in schedule.rejected}


# ----------------------------------------------------------------------------- Lu required
@pytest.mark.parametrize("kind,cells", [
    ("bending", {}),
    ("beam-column", dict(P_D="5", w_W="0.4")),
    ("tension-bending", dict(P_D="5", w_D="0.3")),
], ids=["bending", "beam-column", "tension-bending"])
def test_blank_lu_on_a_bending_type_is_a_row_error_and_others_run(tmp_path, kind, cells):
    # Common practice (O86 6.5.4.2, 7.5.6.4: K_L depends on how the compression edge is held): a schedule
    # that does not say it must not be read as "held continuously".
    rows = [member_row("X-1", **dict(PURLIN, type=kind, **cells)), member_row("OK-1")]
    schedule, errors = errors_of(tmp_path, rows)
    assert [m.mark for m in schedule.members] == ["OK-1"]
    text = errors["X-1"][0]
    assert "column 'Lu'" in text and "row 2" in text
    assert "0 when decking" in text and "distance between lateral supports" in text


def test_lu_is_not_required_of_axial_members(tmp_path):
    schedule, errors = errors_of(tmp_path, [member_row("C-9")])
    assert not errors and schedule.members[0].Lu is None


UPLIFT = dict(PURLIN, w_S="", w_W="-1.5", Lu="0")


def bending_under(d, combination):
    return next(c for c in d.checks if c.check == "bending" and c.combination == combination)


def test_lu_bottom_governs_an_uplift_case_hand_calculation(tmp_path, data):
    # Hand calculation. 38x184 S-P-F No.1/No.2 purlin (f_b 11.8, E05 6500 MPa), K_H 1.1, L = 3.2 m, top edge
    # decked (Lu = 0); strapping holds the bottom edge at Lu_bottom = 1.6 m. Under 0.9D + 1.4W (K_D = 1.15):
    #   w_f = 0.9·0.46 − 1.4·1.5 = −1.686 kN/m;  M_f = −1.686·3.2²/8 = −2.158 kN·m (bottom edge in compression)
    #   F_b = 11.8·1.15·1.1 = 14.927 MPa;  L_e = 1.92·1600 = 3072 mm
    #   C_B = √(3072·184/38²) = 19.785;  C_K = √(0.97·6500/14.927) = 20.552;  10 < C_B ≤ C_K
    #   K_L = 1 − (1/3)(19.785/20.552)^4 = 0.7137
    #   S = 38·184²/6 = 214 421 mm³;  K_Zb = 1.2;  M_r = 0.9·14.927·214 421·1.2·0.7137 = 2.467 kN·m
    d = design_row(tmp_path, data, **dict(UPLIFT, Lu_bottom="1.6"))
    c = bending_under(d, "0.9D + 1.4W")
    assert c.K_D == pytest.approx(1.15)
    assert c.demand == pytest.approx(-2.158, abs=0.002)
    assert c.factors["C_B"] == pytest.approx(19.785, abs=0.01)
    assert c.factors["K_L"] == pytest.approx(0.7137, abs=0.001)
    assert c.resistance == pytest.approx(2.467, rel=0.002)
    assert d.status == "pass"


def test_blank_lu_bottom_is_the_full_length_and_the_sheet_says_so(tmp_path, data):
    # Hand calculation. As above with Lu_bottom blank: L_u = L = 3.2 m, L_e = 1.92·3200 = 6144 mm,
    #   C_B = √(6144·184/38²) = 27.98 > C_K = 20.55:  K_L = 0.65·6500/(27.98²·14.927) = 0.3615
    #   M_r = 0.9·14.927·214 421·1.2·0.3615 = 1.250 kN·m < 2.158 kN·m: the member fails
    d = design_row(tmp_path, data, **UPLIFT)
    c = bending_under(d, "0.9D + 1.4W")
    assert c.factors["K_L"] == pytest.approx(0.3615, abs=0.001)
    assert c.resistance == pytest.approx(1.250, rel=0.002)
    assert d.status == "fail"
    sheet = Sheet(d, data, CODES)
    text = sheet.member_section().latex + sheet.checks_section().latex
    assert "Lu\\_bottom is not given" in text and "full length between supports" in text


# ----------------------------------------------------------------------------- restraint, one statement
@pytest.mark.parametrize("cells,column,words", [
    (dict(Lu="1.2", restraint="both-edges"), "Lu", "both edges are held"),
    (dict(Lu="0", Lu_bottom="1.0", restraint="both-edges"), "Lu_bottom", "both edges are held"),
    (dict(Lu="1.0", restraint="blocking"), "restraint", "unsupported over that length"),
    (dict(Lu="0", restraint="purlins"), "restraint", "held continuously"),
    (dict(Lu="3.2", restraint="purlins"), "restraint", "nothing braces it"),
], ids=["both-edges-Lu", "both-edges-Lu_bottom", "blocking-Lu", "purlins-Lu0", "purlins-full"])
def test_restraint_that_contradicts_lu_is_a_row_error(tmp_path, cells, column, words):
    # Common practice: a sheet must not say in one place that an edge is unsupported and elsewhere held.
    _, errors = errors_of(tmp_path, [member_row("R-1", **dict(PURLIN, **cells))])
    assert f"column '{column}'" in errors["R-1"][0] and words in errors["R-1"][0]


def test_both_edges_holds_the_bottom_edge_and_the_sheet_says_it_once(tmp_path, data):
    # Depth-to-width rule (data/lateral_restraint_sawn.csv, O86-14 6.5.4.2.1, memory): both edges held, d/b ≤ 9.
    d = design_row(tmp_path, data, **dict(UPLIFT, restraint="both-edges"))
    assert d.member.Lu_bottom == 0.0
    assert bending_under(d, "0.9D + 1.4W").factors["K_L"] == 1.0
    text = Sheet(d, data, CODES).member_section().latex
    assert "both edges held in line" in text and "unsupported" not in text


def test_the_depth_to_width_hint_does_not_offer_what_the_row_already_has(tmp_path, data):
    # 38x286 on a decked, blocked floor: d/b = 7.53 > 7.5 (data/lateral_restraint_sawn.csv, memory).
    d = design_row(tmp_path, data, **dict(PURLIN, size="38x286", Lu="0", restraint="blocking"))
    assert d.status == "error"
    assert "restraint = blocking" not in d.errors[0] and "restraint = both-edges" in d.errors[0]


def test_purlins_on_glulam_is_stated_with_the_computed_k_l(tmp_path, data):
    # O86 7.5.6.4 (memory): glulam has no depth-to-width rule; the purlin spacing is L_u and K_L is computed.
    d = design_row(tmp_path, data, material="glulam", species="Spruce-Pine", grade="20f-E", size="130x456",
                   **{k: v for k, v in PURLIN.items() if k not in ("material", "species", "grade", "size", "K_H")},
                   Lu="0.61", restraint="purlins")
    c = bending_under(d, "1.25D + 1.5S")
    captions = " ".join(s.caption for s in c.steps)
    assert "restraint = purlins" in captions and "K_L" in c.factors
    assert "held at purlins" in Sheet(d, data, CODES).member_section().latex


# ----------------------------------------------------------------------------- K_D override
@pytest.mark.parametrize("value,ok", [("1.3", False), ("0.6", False), ("1.15", True), ("0.65", True)])
def test_kd_override_bounds(tmp_path, value, ok):
    # O86 Table 5.1 (data/duration_factors.csv, sourced): K_D runs from 0.65 (long term) to 1.15 (short term).
    _, errors = errors_of(tmp_path, [member_row("K-1", K_D=value)])
    assert (not errors) == ok
    if not ok:
        assert "column 'K_D'" in errors["K-1"][0] and "0.65 to 1.15" in errors["K-1"][0]


def test_kd_override_is_marked_on_the_sheet(tmp_path, data):
    d = design_row(tmp_path, data, P_D="2", P_L="4", K_D="1.15")
    live = next(c for c in d.cases if c.combination.principal == "L")
    assert live.K_D == 1.15
    assert next(c for c in d.cases if c.combination.principal == "D").K_D == 0.65  # never raised
    block = Sheet(d, data, CODES).combinations_section().latex
    assert block.count("schedule K\\_D override") == len([c for c in d.cases if c.combination.principal != "D"])


# ----------------------------------------------------------------------------- K_D symbols
def test_kd_formula_symbols_are_not_the_schedule_columns(tmp_path, data):
    # O86 5.3.2.3 (reference notes §1.4): K_D = 1.0 − 0.50 log10(P_L/P_S) with P_L the long-term load. The
    # schedule's P_L column is the live load, so the sheet writes X_lt and X_st and says what they are.
    # Hand calculation: D = 30, L = 10 kN: K_D = 1 − 0.5·log10(3) = 0.761.
    d = design_row(tmp_path, data, P_D="30", P_L="10")
    case = next(c for c in d.cases if c.combination.principal == "L")
    assert case.K_D == pytest.approx(0.761, abs=0.001)
    block = Sheet(d, data, CODES).combinations_section().latex
    assert "X_{lt}" in block and "X_{st}" in block and "long-term (dead-load) part" in block
    formula = block[block.index("long-term (dead) part exceeds"):]
    assert "P_L" not in formula and "P_{L}" not in formula and "P_S" not in formula


# ----------------------------------------------------------------------------- own weight
GLULAM_BEAM = dict(type="bending", Ly="", P_D="", Lu="0", material="glulam", species="Spruce-Pine", grade="20f-E",
                   size="130x456", length="6.0", w_D="3.0", w_S="7.0", bearing="100", self_weight="yes")


def test_own_weight_of_a_glulam_beam_hand_calculation(tmp_path, data):
    # Hand calculation with data/densities.csv (Spruce-Pine glulam, dry: 524 kg/m³, memory-unverified):
    #   w_sw = 524 kg/m³ · 9.81 N/kg · (0.130·0.456) m² = 0.3047 kN/m
    #   1.25D + 1.5S: w_f = 1.25·(3.0 + 0.3047) + 1.5·7.0 = 14.631 kN/m;  M_f = 14.631·6.0²/8 = 65.84 kN·m
    assert data.density("glulam", "Spruce-Pine", "dry").value == 524
    d = design_row(tmp_path, data, **GLULAM_BEAM)
    assert d.context.own_weight.value == pytest.approx(0.3047, abs=0.0002)
    c = next(c for c in d.checks if c.check == "bending" and c.combination == "1.25D + 1.5S")
    assert c.demand == pytest.approx(65.84, abs=0.02)
    assert any("rho glulam Spruce-Pine dry" in w for w in d.data_warnings)
    text = Sheet(d, data, CODES).loads_section().latex
    assert "Own weight (in D)" in text and "w_{sw}" in text and "524" in text


def test_self_weight_no_leaves_the_dead_load_as_given(tmp_path, data):
    # Hand calculation: 1.25·3.0 + 1.5·7.0 = 14.25 kN/m;  M_f = 14.25·36/8 = 64.13 kN·m
    d = design_row(tmp_path, data, **dict(GLULAM_BEAM, self_weight="no"))
    c = next(c for c in d.checks if c.check == "bending" and c.combination == "1.25D + 1.5S")
    assert c.demand == pytest.approx(64.13, abs=0.01) and d.context.own_weight is None
    assert escape("includes the member's own weight (self_weight = no)") in Sheet(d, data, CODES).loads_section().latex


def test_own_weight_of_a_column_is_axial_at_the_base(tmp_path, data):
    # Hand calculation (data/densities.csv: S-P-F sawn, dry, 500 kg/m³): 140x140, L = 3.0 m
    #   w_sw = 500·9.81·0.140² = 96.1 N/m;  P_sw = 96.1·3.0 = 0.288 kN;  1.4D: P_f = 1.4·(5 + 0.288) = 7.40 kN
    d = design_row(tmp_path, data, size="140x140", grade="No.2", Ly="", self_weight="yes")
    assert d.context.own_weight.effect == "P"
    assert d.context.own_weight.value == pytest.approx(288.4, abs=0.5)
    assert next(c for c in d.checks if c.combination == "1.4D").demand == pytest.approx(7.40, abs=0.01)


def test_a_sized_purlin_that_passed_only_without_own_weight_takes_the_next_section(tmp_path, data):
    # Hand calculation. S-P-F No.1/No.2 purlin, K_H 1.1, L = 3.2 m, D 0.46 / S 1.16 kN/m, decked.
    # Without own weight 38x184 passes: 1.25D + 1.5S gives w_f = 2.315 kN/m, M_f = 2.315·3.2²/8 = 2.963 kN·m,
    # at utilization 0.986 (M_r = 3.006 kN·m). Its own weight, 500·9.81·0.038·0.184 = 0.0343 kN/m, adds
    # 1.25·0.0343 = 0.0429 kN/m: M_f = 2.358·1.28 = 3.018 kN·m > 3.006 kN·m, so the search moves on to 38x235.
    row = dict(PURLIN, size="auto", Lu="0", bearing="64")
    without = design_row(tmp_path, data, **dict(row, self_weight="no"))
    with_weight = design_row(tmp_path, data, **dict(row, self_weight="yes"))
    assert without.size == "38x184" and without.governing.utilization == pytest.approx(0.986, abs=0.001)
    assert with_weight.size == "38x235" and with_weight.status == "pass"


# ----------------------------------------------------------------------------- wind both ways
CANOPY = dict(type="bending", Ly="", P_D="", material="glulam", species="D.Fir-L", grade="24f-E", size="175x456",
              service="wet", length="8.4", Lu="1.2", Lu_bottom="2.8", bearing="152", w_D="2.65", w_S="5.7",
              w_W="-3.6")


def test_canopy_beam_is_checked_under_uplift_and_downward_wind(tmp_path, data):
    # Hand calculation. w_W = −3.6 kN/m is the uplift the schedule gives; the reversed sense presses down.
    #   0.9D + 1.4W:  w_f = 0.9·2.65 − 1.4·3.6 = −2.655 kN/m;  M_f = −2.655·8.4²/8 = −23.42 kN·m (bottom edge)
    #   1.25D − 1.4W: w_f = 1.25·2.65 + 1.4·3.6 = 8.353 kN/m;   M_f = 8.353·8.4²/8 = 73.67 kN·m (top edge)
    d = design_row(tmp_path, data, **CANOPY)
    up, down = bending_under(d, "0.9D + 1.4W"), bending_under(d, "1.25D − 1.4W")
    assert up.demand == pytest.approx(-23.42, abs=0.02) and down.demand == pytest.approx(73.67, abs=0.02)
    assert up.K_D == down.K_D == pytest.approx(1.15)
    captions = " ".join(s.caption for s in up.steps)
    assert "Lu_bottom = 2.8 m" in captions
    one_way = design_row(tmp_path, data, **dict(CANOPY, wind_sense="one-way"))
    assert not any("−" in c.combination for c in one_way.checks)


def test_wall_stud_under_wind_both_ways(tmp_path, data):
    # Hand calculation. Sheathed stud (both faces held: restraint = both-edges), w_W = 0.47 kN/m:
    #   1.25D + 1.4W + 0.5S: M_f = +1.4·0.47·3.0²/8 = +0.740 kN·m;  1.25D − 1.4W + 0.5S: M_f = −0.740 kN·m
    #   the same P_f = 1.25·2.2 + 0.5·3.9 = 4.70 kN, so both interaction values are the same, 0.356
    #   (tests/test_combined.py, hand calculation, with K_L = 1.0 for both edges).
    d = design_row(tmp_path, data, type="beam-column", size="38x140", K_H="1.1", length="3.0", Ly="0", Lu="0",
                   restraint="both-edges", P_D="2.2", P_L="1.8", P_S="3.9", w_W="0.47")
    plus = next(c for c in d.checks if c.check == "interaction" and c.combination == "1.25D + 1.4W + 0.5S")
    minus = next(c for c in d.checks if c.check == "interaction" and c.combination == "1.25D − 1.4W + 0.5S")
    assert bending_under(d, "1.25D + 1.4W + 0.5S").demand == pytest.approx(0.740, abs=0.001)
    assert bending_under(d, "1.25D − 1.4W + 0.5S").demand == pytest.approx(-0.740, abs=0.001)
    assert minus.demand == pytest.approx(plus.demand, rel=1e-6) and plus.demand == pytest.approx(0.356, abs=0.001)


def test_tension_brace_under_reversing_wind_says_tension_only(tmp_path, data):
    # Common practice: an X-brace diagonal is tension-only. P_D 0.5, P_W 18.5 kN, both senses:
    #   1.25D + 1.4W: T_f = 0.625 + 25.9 = 26.5 kN (checked);  0.9D − 1.4W: 0.45 − 25.9 = −25.45 kN (compression)
    d = design_row(tmp_path, data, type="tension", material="sawn", species="D.Fir-L", grade="No.1", size="89x140",
                   service="wet", length="5.4", Ly="", net_area="0.85", P_D="0.5", P_W="18.5")
    assert {c.check for c in d.checks} == {"tension"}
    assert next(c for c in d.checks if c.combination == "1.25D + 1.4W").demand == pytest.approx(26.5, abs=0.05)
    note = next(w for w in d.warnings if w.startswith("tension-only"))
    assert "0.9D − 1.4W" in note and "compression is not checked" in note


# ----------------------------------------------------------------------------- least tension
def test_tension_bending_compression_face_governed_by_least_tension(tmp_path, data):
    # Hand calculation (O86 7.5.13 compression face, as in checks/combined.py: I_cs = (M_f − T_f d/6)/M_r).
    # 130x190 D.Fir-L 18t-E chord, L = 4.8 m, truss dead tension P_D = 60 kN, ceiling w_D 0.1, attic w_L 2.5 kN/m:
    #   1.25D + 1.5L: T_f = 75.0 kN, M_f = (0.125 + 3.75)·4.8²/8 = 11.16 kN·m
    #   0.9D + 1.5L:  T_f = 54.0 kN, M_f = (0.09 + 3.75)·4.8²/8 = 11.06 kN·m
    #   with the same M_r (K_D 1.0 in both): I_cs = (11.06 − 54·0.190/6)/M_r = 9.349/M_r
    #                                   against (11.16 − 75·0.190/6)/M_r = 8.785/M_r: 0.9D governs the face
    d = design_row(tmp_path, data, type="tension-bending", material="glulam", species="D.Fir-L", grade="18t-E",
                   size="130x190", length="4.8", Ly="", Lu="0", P_D="60", w_D="0.1", w_L="2.5")
    faces = {c.combination: c for c in d.checks if c.check == "interaction"}
    least = faces["0.9D + 1.5L"]
    assert least.factors["T_f"] == pytest.approx(54.0) and least.factors["M_f"] == pytest.approx(11.06, abs=0.01)
    M_r = least.factors["M_r"]
    assert least.factors["I_cs"] == pytest.approx((11.0592 - 54.0 * 0.190 / 6) / M_r, rel=1e-3)
    assert max(faces.values(), key=lambda c: c.factors["I_cs"]) is least


# ----------------------------------------------------------------------------- bearing everywhere
POST = dict(size="140x191", grade="No.2", Ly="", P_D="10", P_L="30")


def test_column_end_bearing_on_a_sawn_sill_hand_calculation(tmp_path, data):
    # Hand calculation. 140x191 S-P-F post on an S-P-F No.1 sill, dry. f_cp of the sill 5.3 MPa (S-P-F, every
    # size category of data/sawn_strengths.csv), K_Scp 1.0, φ = 0.8 (O86 5.1.4, data file), K_B = K_Zcp = 1.0:
    #   1.25D + 1.5L (K_D = 1.0): P_f = 1.25·10 + 1.5·30 = 57.5 kN
    #   Q_r = 0.8·(5.3·1.0·1.0)·(140·191)·1.0·1.0 = 0.8·5.3·26 740 = 113.4 kN
    d = design_row(tmp_path, data, bears_on="sawn SPF no.1", **POST)
    assert d.member.bears_on == "sawn S-P-F No.1"
    c = next(c for c in d.checks if c.check == "bearing" and c.combination == "1.25D + 1.5L")
    assert c.demand == pytest.approx(57.5) and c.resistance == pytest.approx(113.4, abs=0.05)
    from timbersheets.job.results import member_json

    assert not any("bearing on the support" in w for w in member_json(d)["warnings"])


def test_blank_bears_on_warns_in_results_and_on_the_sheet(tmp_path, data):
    from timbersheets.job.results import member_json

    d = design_row(tmp_path, data, **POST)
    assert not [c for c in d.checks if c.check == "bearing"]
    assert any("bearing on the support was not checked" in w for w in member_json(d)["warnings"])
    assert "bearing on the support was not checked" in Sheet(d, data, CODES).cautions().latex


@pytest.mark.parametrize("cells,column", [
    (dict(POST, bears_on="sawn S-P-F No.9"), "bears_on"),
    (dict(POST, bears_on="brick"), "bears_on"),
    (dict(PURLIN, Lu="0", bears_on="steel"), "bears_on"),
    (dict(PURLIN, Lu="0", bearing="64", bearing_width="50"), "bearing_width"),
    (dict(PURLIN, Lu="0", bearing_width="30"), "bearing_width"),
], ids=["bad-grade", "unknown", "on-a-beam", "wider-than-member", "no-bearing-length"])
def test_bearing_columns_are_validated(tmp_path, cells, column):
    _, errors = errors_of(tmp_path, [member_row("B-9", **cells)])
    assert f"column '{column}'" in errors["B-9"][0]


def test_beam_bearing_width_and_skipped_bearing(tmp_path, data):
    # Hand calculation. 38x184 S-P-F purlin on a 30 mm wide ledger, l_b = 64 mm, dry: f_cp 5.3 MPa, φ 0.8,
    # K_B 1.0, K_Zcp 1.0 (b/d ≤ 1): 1.25D + 1.5S (K_D 1.0): Q_r = 0.8·5.3·(30·64) = 8.14 kN (38 mm: 10.31 kN)
    d = design_row(tmp_path, data, **dict(PURLIN, Lu="0", bearing="64", bearing_width="30"))
    c = next(c for c in d.checks if c.check == "bearing" and c.combination == "1.25D + 1.5S")
    assert c.resistance == pytest.approx(8.14, abs=0.01)
    skipped = design_row(tmp_path, data, **dict(PURLIN, Lu="0"))
    assert any("bearing at the supports not checked" in w for w in skipped.warnings)


# ----------------------------------------------------------------------------- storage live load
def test_storage_companion_and_long_term_kd(data):
    # NBC 4.1.3.2 note (data/nbc2020_uls_combinations.csv rows 4b, 4e, memory): companion 0.5L → 1.0L for
    # storage; O86 Table 5.1 (memory of its wording): storage loads are long-term. Hand calculation, D 5, L 8,
    # S 2, W 3 kN (axial):
    #   1.25D + 1.5L: long-term → K_D = 0.65 (general: 1.0)
    #   1.25D + 1.4W + 1.0L: P_f = 6.25 + 4.2 + 8.0 = 18.45 kN (general 0.5L: 14.45 kN); K_D 1.15 (W principal)
    #   1.25D + 1.5S + 1.0L: X_lt = 5 + 8 = 13 > X_st = 2: K_D = 1 − 0.5·log10(13/2) = 0.594 → 0.65 (floor)
    from timbersheets.engineering.loads import Effects, apply_combinations

    effects = Effects({"P": {"D": 5000.0, "L": 8000.0, "S": 2000.0, "W": 3000.0, "E": 0.0}})
    storage = {c.label: c for c in apply_combinations(effects, data, [], storage=True)}
    general = {c.label: c for c in apply_combinations(effects, data, [])}
    assert storage["1.25D + 1.5L"].K_D == 0.65 and general["1.25D + 1.5L"].K_D == 1.0
    assert "storage" in storage["1.25D + 1.5L"].basis
    assert storage["1.25D + 1.4W + 1.0L"].factored["P"] == pytest.approx(18450.0)
    assert general["1.25D + 1.4W + 0.5L"].factored["P"] == pytest.approx(14450.0)
    assert "1.25D + 1.4W + 0.5L" not in storage
    assert storage["1.25D + 1.5S + 1.0L"].K_D == pytest.approx(0.65)
    assert general["1.25D + 1.5S + 1.0L"].K_D == pytest.approx(1.0)  # X_lt = 5 < X_st = 10


def test_storage_floor_beam_hand_calculation(tmp_path, data):
    # Hand calculation. 38x235 S-P-F No.1/No.2 joist (f_b 11.8 MPa), K_H 1.1, L = 3.4 m, decked, w_D 0.31,
    # w_L 1.46 kN/m, live_use = storage: 1.25D + 1.5L with K_D = 0.65 (long term):
    #   F_b = 11.8·0.65·1.1 = 8.437 MPa;  S = 38·235²/6 = 349 758 mm³;  K_Zb = 1.1 (235 mm);  K_L = 1.0
    #   M_r = 0.9·8.437·349 758·1.1 = 2.921 kN·m (general use, K_D 1.0: 4.494 kN·m)
    d = design_row(tmp_path, data, **dict(PURLIN, size="38x235", length="3.4", Lu="0", w_D="0.31", w_S="",
                                          w_L="1.46", live_use="storage"))
    c = bending_under(d, "1.25D + 1.5L")
    assert c.K_D == 0.65 and c.resistance == pytest.approx(2.921, rel=0.002)
    assert "live\\_use = storage" in Sheet(d, data, CODES).combinations_section().latex


# ----------------------------------------------------------------------------- edition
def test_clauses_follow_the_edition_they_come_from_and_revisions_are_noted(tmp_path, data):
    # Review finding (memory): O86:19 revised the sawn compression size factor and the application of K_H.
    d = design_row(tmp_path, data, size="38x140", K_H="1.1", Ly="0", P_D="2", P_L="4")
    assert all(c.clause.startswith("O86-14 ") for c in d.checks)
    text = Sheet(d, data, CODES).cautions().latex
    assert "follow CSA O86-14" in text and "compression size factor" in text and "system factor" in text
    glulam = design_row(tmp_path, data, **GLULAM_BEAM)
    cautions = Sheet(glulam, data, CODES).cautions().latex
    assert "compression size factor" not in cautions and "floor vibration" not in cautions


def test_no_placeholder_table_numbers_in_the_data():
    # Common practice: a table reference a checker cannot look up is a defect; blank + "not recorded" instead.
    from pathlib import Path

    import timbersheets

    folder = Path(timbersheets.__file__).parent / "data"
    for path in folder.glob("*.csv"):
        assert ".x," not in path.read_text(encoding="utf-8"), path.name


# ----------------------------------------------------------------------------- data review findings
def test_review_findings_stay_unverified_and_disagreements_take_the_lower_value(data):
    # Review findings (memory): these rows must stay flagged; two recollections of an E: the lower, both recorded.
    import csv
    from pathlib import Path

    import timbersheets

    folder = Path(timbersheets.__file__).parent / "data"

    def rows(name):
        return list(csv.DictReader((folder / name).read_text(encoding="utf-8").splitlines()))

    sawn = [r for r in rows("sawn_strengths.csv") if r["category"] in ("beam-stringer", "post-timber")]
    assert sawn and all(r["status"] == "memory-unverified" for r in sawn)
    assert all(r["status"] == "memory-unverified" for r in rows("size_factors_sawn.csv") if r["factor"] == "K_Zt")
    assert all(r["status"] == "memory-unverified" for r in rows("system_factors.csv") if r["case"] == "case-2")
    glulam = rows("glulam_strengths.csv")
    assert all(r["status"] == "memory-unverified" for r in glulam if r["property"] in ("f_tn", "f_tg"))
    e = {(r["species"], r["grade"]): r for r in glulam if r["property"] == "E"}
    assert e[("D.Fir-L", "24f-EX")]["value"] == "12800" and "13 100" in e[("D.Fir-L", "24f-EX")]["source"]
    assert e[("Spruce-Pine", "14t-E")]["value"] == "10300" and "10 700" in e[("Spruce-Pine", "14t-E")]["source"]
    assert all(e[k]["status"] == "memory-unverified" for k in (("D.Fir-L", "24f-EX"), ("Spruce-Pine", "14t-E")))


def test_a_tension_member_without_net_area_says_it_was_designed_on_the_gross_area(tmp_path, data):
    # Common practice: a tension member is connected, and its connections usually remove wood (bolt
    # holes, daps). A blank net_area keeps the schedule's default A_n = A_g (no holes), the favourable
    # reading, so the sheet says so; a row that gives net_area, even 1.0, is taken as stated.
    (tmp_path / "a").mkdir()
    (tmp_path / "b").mkdir()
    blank = design_row(tmp_path / "a", data, type="tension", P_D="5")
    stated = design_row(tmp_path / "b", data, type="tension", P_D="5", net_area="1.0")
    assert blank.member.net_area == stated.member.net_area == 1.0
    assert [w for w in blank.warnings if w.startswith("net area not given")], blank.warnings
    assert not [w for w in stated.warnings if "net area" in w], stated.warnings
