"""Tension and compression resistances against hand calculations.

Hand calculations follow the CSA O86 equations as given in the reference notes
(§4.1, §4.2); strengths from the data files (source named per case).
"""

import pytest

from conftest import design_row

from timbersheets.errors import DesignError


def only_check(design, combination):
    return next(c for c in design.checks if c.combination == combination)


def test_sawn_stud_hand_calculation(tmp_path, data):
    # Hand calculation. 38x140 S-P-F No.1/No.2 (S1: f_c 11.5, E05 6500 MPa), dry, L = 2.75 m,
    # weak axis braced by sheathing (Ly = 0), K_D = 1.0 (1.25D + 1.5L with P_L < P_S):
    #   C_c = 2750/140 = 19.64;  K_Zc = 6.3 (140·2750)^-0.13 = 1.184 (≤ 1.3)
    #   K_C = [1 + 11.5·1.184·19.64³ / (35·6500)]^-1 = 0.688
    #   P_r = 0.8 · 11.5 · 5320 · 1.184 · 0.688 = 39.86 kN
    d = design_row(tmp_path, data, size="38x140", length="2.75", Ly="0", P_D="2", P_L="4")
    c = only_check(d, "1.25D + 1.5L")
    assert c.factors["C_cx"] == pytest.approx(19.64, abs=0.01)
    assert c.factors["K_Zcx"] == pytest.approx(1.184, abs=0.001)
    assert c.factors["K_Cx"] == pytest.approx(0.688, abs=0.001)
    assert c.resistance == pytest.approx(39.86, rel=0.002)
    assert c.demand == pytest.approx(1.25 * 2 + 1.5 * 4)
    assert c.unit == "kN"


def test_sawn_post_hand_calculation(tmp_path, data):
    # Hand calculation. 140x140 Hem-Fir No.1 posts and timbers (O86-14 Table 6.3.1D as recalled
    # in the reference notes: f_c 10.0, E05 6000 MPa; memory, unverified), dry, L = 2.7 m, K_D = 1.0:
    #   C_c = 2700/140 = 19.29;  K_Zc = 6.3 (140·2700)^-0.13 = 1.186
    #   K_C = [1 + 10.0·1.186·19.29³/(35·6000)]^-1 = 0.712;  P_r = 0.8·10.0·19600·1.186·0.712 = 132.4 kN
    d = design_row(tmp_path, data, species="Hem-Fir", grade="No.1", size="140x140", length="2.7",
                   P_D="10", P_L="30")
    c = only_check(d, "1.25D + 1.5L")
    assert d.context.strengths.category == "post-timber"
    assert c.factors["K_Cx"] == pytest.approx(0.712, abs=0.001)
    assert c.resistance == pytest.approx(132.4, rel=0.002)
    assert any("memory" in w for w in d.data_warnings)


def test_glulam_column_hand_calculation(tmp_path, data):
    # Hand calculation. 175x228 D.Fir-L 16c-E glulam (notes §2.3: f_c 30.2, E 12 400; memory),
    # wet service (K_Sc 0.75, K_SE 0.90; notes §3.2, memory), L = 4.2 m, Ly = 2.1 m, under 1.4D (K_D 0.65):
    #   F_c = 30.2·0.65·0.75 = 14.72 MPa;  Z = 0.175·0.228·4.2 = 0.1676 m³;  K_Zcg = 0.68 Z^-0.13 = 0.858
    #   E05 = 0.87·12 400 = 10 788 MPa;  C_cx = 4200/228 = 18.42;  K_Cx = 0.811;  P_rx = 327.1 kN
    #   C_cy = 2100/175 = 12.0;  K_Cy = 0.940;  P_ry = 378.8 kN;  P_r = 327.1 kN
    d = design_row(tmp_path, data, material="glulam", species="D.Fir-L", grade="16c-E", size="175x228",
                   service="wet", length="4.2", Ly="2.1", P_D="95", P_L="40", P_S="110")
    c = only_check(d, "1.4D")
    assert c.K_D == pytest.approx(0.65)
    assert c.factors["K_Zcg"] == pytest.approx(0.858, abs=0.001)
    assert c.factors["E_05"] == pytest.approx(10788)
    assert c.factors["P_rx"] == pytest.approx(327.1, rel=0.001)
    assert c.factors["P_ry"] == pytest.approx(378.8, rel=0.001)
    assert c.resistance == pytest.approx(327.1, rel=0.001)
    assert c.demand == pytest.approx(1.4 * 95)


def test_sawn_tension_hand_calculation(tmp_path, data):
    # Hand calculation. 38x140 S-P-F No.1/No.2 (S1: f_t 5.5 MPa), A_n = 0.85 A_g, K_Zt = 1.3
    # (140 mm, notes §3.5, memory), K_D = 1.0:  T_r = 0.9·5.5·(0.85·5320)·1.3 = 29.10 kN
    d = design_row(tmp_path, data, type="tension", net_area="0.85", P_D="2", P_L="6")
    c = only_check(d, "1.25D + 1.5L")
    assert c.factors["K_Zt"] == pytest.approx(1.3)
    assert c.factors["phi"] == pytest.approx(0.9)
    assert c.resistance == pytest.approx(29.10, rel=0.001)
    assert c.clause.endswith("6.5.9")


def test_glulam_tension_net_and_gross(tmp_path, data):
    # Hand calculation. 175x266 Spruce-Pine 14t-E (f_tn 17.9, f_tg 13.4 MPa, memory), wet (K_St 0.75),
    # A_n = 0.85 A_g, A_g = 175·266 = 46 550 mm², K_D = 1.0:
    #   net   T_rn = 0.9·(17.9·0.75)·(0.85·46 550) = 478.1 kN
    #   gross T_rg = 0.9·(13.4·0.75)·46 550 = 421.0 kN  → the lesser, 421.0 kN, governs
    d = design_row(tmp_path, data, type="tension", material="glulam", species="SP", grade="14t-E",
                   size="175x266", service="wet", net_area="0.85", P_D="20", P_L="40")
    c = only_check(d, "1.25D + 1.5L")
    assert c.factors["T_rn"] == pytest.approx(478.1, rel=0.001)
    assert c.factors["T_rg"] == pytest.approx(421.0, rel=0.001)
    assert c.resistance == pytest.approx(421.0, rel=0.001)
    assert c.factors["K_St"] == pytest.approx(0.75)


def test_slenderness_over_50_is_an_error(tmp_path, data):
    # CSA O86 6.5.6.2: C_c shall not exceed 50. 38x140 stud, 2.75 m unbraced about the weak
    # axis: C_c = 2750/38 = 72.4 → an error, not a number.
    d = design_row(tmp_path, data, size="38x140", length="2.75", Ly="", P_D="2", P_L="4")
    assert d.status == "error"
    assert "C_c = 72.4" in d.errors[0] and "exceeds 50" in d.errors[0]
    assert not d.checks


def test_tension_member_in_compression_is_stated_tension_only(tmp_path, data):
    # Common practice: a tension member is tension-only (a brace whose compression diagonal is not relied on).
    # Under 0.9D + 1.4W: P_f = 0.9·2 − 1.4·6 = −6.6 kN (compression): said on the sheet, not checked.
    d = design_row(tmp_path, data, type="tension", P_D="2", P_W="-6", wind_sense="one-way")
    assert d.status == "pass" and {c.check for c in d.checks} == {"tension"}
    note = next(w for w in d.warnings if w.startswith("tension-only"))
    assert "0.9D + 1.4W" in note and "6.6 kN" in note


def test_design_error_pickles():
    import pickle

    err = DesignError("C-1", "slenderness too high", "O86:19 6.5.6", "brace it")
    assert str(pickle.loads(pickle.dumps(err))) == str(err)
