"""NBC 2020 ULS combinations and the CSA O86 load-duration factor."""

import math

import pytest

from timbersheets.engineering.loads import Effects, apply_combinations, combinations, kd_permanent


@pytest.mark.parametrize("ratio,expected", [
    # K_D = 1.0 − 0.50 log10(P_L/P_S) ≥ 0.65, CSA O86:19 5.3.2.3 (memory, unverified: reference
    # notes §3.1); expected values are hand calculations of that formula.
    (1.5, 0.912), (2.0, 0.849), (3.0, 0.761), (4.0, 0.699), (5.01, 0.650), (8.0, 0.650),
])
def test_kd_permanent_formula(ratio, expected):
    values = kd_permanent(X_lt=ratio * 10_000.0, X_st=10_000.0)
    assert values["K_D"] == pytest.approx(expected, abs=0.0006)


def test_table_has_the_nbc_cases(data):
    # NBC 2015 Table 4.1.3.2.-A as read in S1 and S9 (reference notes §5.1): principal factors 1.4D, 1.5L,
    # 1.5S, 1.4W, 1.0E. That NBC 2020 keeps these cases is memory, unverified (the data rows say so).
    labels = {c.label for c in combinations(data)}
    for expected in ("1.4D", "1.25D + 1.5L", "1.25D + 1.5L + 1.0S", "1.25D + 1.5L + 0.4W",
                     "1.25D + 1.5S + 1.0L", "1.25D + 1.4W + 0.5L", "1.25D + 1.4W + 0.5S",
                     "0.9D + 1.4W", "1.0D + 1.0E", "1.0D + 1.0E + 0.5L + 0.25S"):
        assert expected in labels


def effects(**by_type):
    return Effects({"P": {t: by_type.get(t, 0.0) * 1000 for t in "DLSWE"}})


def test_dead_and_live(data):
    # Common practice: with D and L only, the cases that matter are 1.4D and 1.25D + 1.5L.
    cases = apply_combinations(effects(D=10, L=20), data, [])
    assert [c.label for c in cases] == ["1.4D", "1.25D + 1.5L"]
    one, two = cases
    assert one.K_D == pytest.approx(0.65) and one.factored["P"] == pytest.approx(14_000)
    assert two.K_D == pytest.approx(1.0) and two.factored["P"] == pytest.approx(42_500)


def test_dead_dominant_reduces_kd(data):
    # P_L/P_S = 30/10 = 3 → K_D = 1 − 0.5·log10(3) = 0.761 (hand calculation of O86 5.3.2.3)
    cases = apply_combinations(effects(D=30, L=10), data, [])
    live = next(c for c in cases if c.label == "1.25D + 1.5L")
    assert live.K_D == pytest.approx(1 - 0.5 * math.log10(3), abs=1e-9)
    assert "5.3.2.3" in live.basis


def test_wind_is_short_term_and_reduced_dead_only_when_it_resists(data):
    # O86:19 Table 5.1 (O86-14 Table 5.3.2.2): wind principal → short term, K_D = 1.15.
    # NBC Sentence 4.1.3.2.(5) (S9): 0.9D where the dead load resists.
    same_sign = apply_combinations(effects(D=5, W=10), data, [], both_senses=False)
    assert all(not c.combination.reduced_dead for c in same_sign)
    wind = next(c for c in same_sign if c.label == "1.25D + 1.4W")
    assert wind.K_D == pytest.approx(1.15)
    uplift = apply_combinations(effects(D=5, W=-10), data, [])
    assert "0.9D + 1.4W" in [c.label for c in uplift]
    reduced = next(c for c in uplift if c.label == "0.9D + 1.4W")
    assert reduced.factored["P"] == pytest.approx(0.9 * 5000 - 1.4 * 10_000)


def test_wind_and_earthquake_act_both_ways(data):
    # Common practice (NBC 4.1.3.2: wind pressure and suction, earthquake in either direction): every
    # combination with W or E is also applied reversed, with 0.9D where the reversed load opposes D.
    cases = {c.label: c for c in apply_combinations(effects(D=5, W=10, E=4), data, [])}
    assert cases["1.25D − 1.4W"].factored["P"] == pytest.approx(1.25 * 5000 - 1.4 * 10_000)
    assert cases["0.9D − 1.4W"].factored["P"] == pytest.approx(0.9 * 5000 - 1.4 * 10_000)
    assert cases["1.0D − 1.0E"].factored["P"] == pytest.approx(5000 - 4000)
    assert cases["1.25D + 1.4W"].K_D == cases["1.25D − 1.4W"].K_D == pytest.approx(1.15)
    one_way = [c.label for c in apply_combinations(effects(D=5, W=10, E=4), data, [], both_senses=False)]
    assert not any("−" in label for label in one_way)


def test_no_zero_or_duplicate_combinations(data):
    cases = apply_combinations(effects(D=5, S=8), data, [])
    keys = [(round(c.factored["P"], 6), c.K_D) for c in cases]
    assert len(keys) == len(set(keys))
    assert all(c.factored["P"] != 0 for c in cases)
    assert not any("L" in c.label or "W" in c.label for c in cases)


def test_kd_override(data):
    # The override replaces the computed K_D, but never raises the long-term 0.65 of the dead-only
    # combination (O86 Table 5.1: dead load is long-term whatever the schedule says).
    cases = apply_combinations(effects(D=5, L=8), data, [], override=0.8)
    assert {c.K_D for c in cases if c.combination.principal != "D"} == {0.8}
    dead = next(c for c in cases if c.combination.principal == "D")
    assert dead.K_D == 0.65 and "not applied" in dead.basis
    assert all("override" in c.basis for c in cases if c.combination.principal != "D")
