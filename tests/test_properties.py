"""Properties every resistance must have (common practice: monotone in size and
load, K_D bounded by its duration classes, results independent of input units)."""

import math

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from timbersheets.engineering.checks.compression import sawn_compression_x
from timbersheets.engineering.checks.tension import glulam_tension, sawn_tension
from timbersheets.engineering.loads import Effects, apply_combinations

SETTINGS = settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
loads = st.floats(min_value=0.0, max_value=500.0, allow_nan=False)


@SETTINGS
@given(D=loads, L=loads, S=loads, W=st.floats(-300, 300), E=loads)
def test_kd_stays_within_its_classes(data, D, L, S, W, E):
    effects = Effects({"P": {"D": D * 1e3, "L": L * 1e3, "S": S * 1e3, "W": W * 1e3, "E": E * 1e3}})
    for case in apply_combinations(effects, data, []):
        assert 0.65 - 1e-12 <= case.K_D <= 1.15 + 1e-12


COMMON = dict(K_D=1.0, K_H=1.0, K_T=1.0, phi=0.9)


@SETTINGS
@given(area=st.floats(1000, 200_000), grow=st.floats(1.0, 3.0))
def test_larger_net_area_never_resists_less(area, grow):
    small = sawn_tension(f_t=5.5, K_St=1.0, A_n=area, K_Zt=1.0, **COMMON)["T_r"]
    large = sawn_tension(f_t=5.5, K_St=1.0, A_n=area * grow, K_Zt=1.0, **COMMON)["T_r"]
    assert large >= small


@SETTINGS
@given(b=st.sampled_from([38, 89, 140, 191]), d=st.sampled_from([89, 140, 184, 235, 286]),
       L=st.floats(300, 6000), extra=st.sampled_from([0, 38, 51, 102]))
def test_deeper_column_never_resists_less_about_x(b, d, L, extra):
    args = dict(F_c=11.5, K_T=1.0, K_e=1.0, L_x=L, E_05=6500, K_SE=1.0, phi=0.8)  # F_c = f_c with every K 1.0
    shallow = sawn_compression_x(d=d, A=b * d, **args)["P_rx"]
    deep = sawn_compression_x(d=d + extra, A=b * (d + extra), **args)["P_rx"]
    assert deep >= shallow * (1 - 1e-12)


@SETTINGS
@given(width=st.sampled_from([80, 130, 175, 215, 265]), depth_laminations=st.integers(3, 30))
def test_larger_glulam_never_resists_less_in_tension(width, depth_laminations):
    def t_r(w, n):
        area = w * 38.0 * n
        return glulam_tension(f_tn=20.4, f_tg=15.3, K_St=1.0, A_n=0.85 * area, A_g=area, **COMMON)["T_r"]
    assert t_r(width, depth_laminations + 1) >= t_r(width, depth_laminations)


@SETTINGS
@given(load=st.floats(1.0, 100.0), factor=st.floats(1.1, 4.0))
def test_tension_utilization_scales_linearly_with_load(tmp_path_factory, data, load, factor):
    from conftest import design_row

    tmp = tmp_path_factory.mktemp("lin")
    one = design_row(tmp, data, type="tension", P_D=f"{load}", P_L=f"{2 * load}")
    many = design_row(tmp, data, type="tension", P_D=f"{load * factor}", P_L=f"{2 * load * factor}")
    assert one.checks and len(one.checks) == len(many.checks)
    for a, b in zip(one.checks, many.checks, strict=True):
        assert b.utilization == pytest.approx(a.utilization * factor, rel=1e-9)


@SETTINGS
@given(length_ft=st.floats(4.0, 14.0), load_kip=st.floats(0.5, 12.0))
def test_si_and_imperial_inputs_agree(tmp_path_factory, data, length_ft, load_kip):
    from conftest import design_row

    tmp = tmp_path_factory.mktemp("units")
    imperial = design_row(tmp, data, size="140x140", grade="No.2", length=f"{length_ft} ft", P_D=f"{load_kip} kip", Ly="")
    si = design_row(tmp, data, size="140x140", grade="No.2", length=f"{length_ft * 0.3048}", P_D=f"{load_kip * 4.4482216152605}",
                    Ly="")
    assert imperial.status == si.status
    assert imperial.checks
    for a, b in zip(imperial.checks, si.checks, strict=True):
        assert math.isclose(a.utilization, b.utilization, rel_tol=1e-9)
