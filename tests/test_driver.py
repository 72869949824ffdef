"""Pure checks and the one design driver.

A check's result carries every data value it read (nothing is recorded on the side), and the driver
runs every type's checks under each combination, with the same notes and sheet sections for every
type that bends.
"""

from __future__ import annotations

from collections.abc import Iterator, Mapping
from dataclasses import replace
from pathlib import Path

import pytest

from conftest import design_row, member_row, write_schedule
from timbersheets.engineering.checks import Checked
from timbersheets.engineering.data import DataSet, Datum
from timbersheets.engineering.design import build_context, load_cases
from timbersheets.engineering.driver import run_checks
from timbersheets.engineering.membertypes import member_type
from timbersheets.schedule.read import load_schedule
from timbersheets.sheet.sections import Sheet

REPO = Path(__file__).resolve().parent.parent
CODES = {"nbc": "2020", "o86": "2019"}


class Reads(Mapping[str, Datum]):
    """A context's table of Datums that keeps a list of every Datum a check takes from it."""

    def __init__(self, datums: Mapping[str, Datum], seen: list[Datum]) -> None:
        self._datums, self._seen = dict(datums), seen

    def __getitem__(self, key: str) -> Datum:
        self._seen.append(self._datums[key])
        return self._datums[key]

    def __iter__(self) -> Iterator[str]:
        return iter(self._datums)

    def __len__(self) -> int:
        return len(self._datums)


class DataReads:
    """The data set, keeping every single Datum a lookup returns to a check.

    Left out: lookups that return a whole table (the check picks one row, e.g. the restraint rules),
    and those a check reads only to compare (the K_H limit enters only when it governs; a column's
    support takes the lowest f_cp and K_Scp of its size categories, its size not being given)."""

    COMPARED = ("system_factor_limit", "service_factor", "sawn_strength")

    def __init__(self, data: DataSet, seen: list[Datum]) -> None:
        self._data, self._seen = data, seen

    def __getattr__(self, name: str):
        attr = getattr(self._data, name)
        if not callable(attr) or name in self.COMPARED:
            return attr

        def lookup(*args, **kwargs):
            out = attr(*args, **kwargs)
            if isinstance(out, Datum):
                self._seen.append(out)
            elif isinstance(out, tuple) and len(out) == 2 and isinstance(out[1], list):  # interpolated: its rows
                self._seen += out[1]
            return out

        return lookup


ROWS = {  # one member per check and material, each with every load it takes
    "sawn-tension": dict(type="tension", size="38x184", P_D="6", P_S="10", net_area="0.8"),
    "glulam-tension": dict(type="tension", material="glulam", species="D.Fir-L", grade="18t-E", size="130x228",
                           P_D="38", P_S="52"),
    "sawn-compression": dict(type="compression", size="140x140", grade="No.2", P_D="20", P_L="25", K_H="1.3",
                             bears_on="sawn S-P-F No.2"),
    "glulam-compression": dict(type="compression", material="glulam", species="D.Fir-L", grade="16c-E",
                               size="175x228", Ly="2.1", P_D="95", P_S="110"),
    "sawn-bending": dict(type="bending", P_D="", size="38x235", length="3.4", Lu="3.4", bearing="38", w_D="0.31",
                         w_L="1.46", w_W="0.3", K_H="1.1"),
    "glulam-bending": dict(type="bending", P_D="", material="glulam", species="D.Fir-L", grade="24f-E", size="175x456",
                           length="8.4", Lu="1.2", bearing="152", w_D="2.65", w_S="5.7", w_W="-3.6"),
    "beam-model": dict(type="bending", P_D="", size="38x235", length="", spans="3.6+3.6", Lu="0", bearing="89",
                       w_D="0.2", w_L="0.76"),
    "beam-column": dict(type="beam-column", size="38x140", K_H="1.1", Lu="3.0", P_D="2.2", P_S="3.9", w_W="0.47",
                        bears_on="sawn S-P-F No.1/No.2"),
    "tension-bending": dict(type="tension-bending", material="glulam", species="D.Fir-L", grade="18t-E",
                            size="130x190", length="4.8", Lu="0", P_D="31", P_S="46", w_D="0.65"),
}


def spied(tmp_path: Path, data: DataSet, cells: dict[str, str]) -> tuple[Checked, list[Datum], tuple[Datum, ...]]:
    """The checks of one row run on a context whose tables keep what the checks take from them."""
    schedule = load_schedule(write_schedule(tmp_path, [member_row(**cells)]))
    assert not schedule.rejected, [str(e) for r in schedule.rejected for e in r.errors]
    member = schedule.members[0]
    ctx = build_context(member, data)
    cases = load_cases(ctx.member, data, [])
    seen: list[Datum] = []
    watched = replace(ctx, f=Reads(ctx.f, seen), K_S=Reads(ctx.K_S, seen), phi=Reads(ctx.phi, seen),
                      data=DataReads(data, seen))
    return run_checks(watched, cases, member_type(member.type)), seen, ctx.used


@pytest.mark.parametrize("name", ROWS)
def test_every_datum_a_check_reads_is_in_its_results(tmp_path, data, name):
    # Common practice: a calc sheet lists every tabled value it relies on, so a value the checks read
    # must reach the list through the results that used it (the context's own reads beside them).
    checked, seen, context_used = spied(tmp_path, data, ROWS[name])
    assert checked.results and seen
    def where(d: Datum) -> tuple[str, str, str]:  # a check may rename a value's symbol, not its row
        return d.data, d.key, d.column

    carried = {where(d) for d in (*checked.used, *context_used)}
    missing = sorted({d.label for d in seen if where(d) not in carried})
    assert missing == [], f"read but not in any result: {missing}"


def test_each_result_carries_the_datums_of_its_own_equation(tmp_path, data):
    # Hand calculation, O86-14 6.5.9: T_r = φ F_t A_n K_Zt with F_t = f_t (K_D K_H K_St K_T); of these,
    # f_t, K_St, φ and K_Zt are tabled values, so a sawn tension result carries exactly those four.
    checked, _, _ = spied(tmp_path, data, ROWS["sawn-tension"])
    result = checked.results[0]
    symbols = sorted({d.symbol for d in result.used})
    assert symbols == ["K_St", "K_Zt", "f_t", "phi"]
    assert {d.value for d in result.used if d.symbol == "f_t"} == {result.factors["f_t"]}


def test_the_unverified_list_of_a_demo_member_is_what_its_checks_use(data):
    # O86-14 7.5.11 (glulam tension): the lesser of φ F_tn A_n and φ F_tg A_g, F_t = f_t (K_D K_H K_St K_T);
    # T-1 (D.Fir-L 18t-E, wet) therefore uses f_tn, f_tg, K_St (wet), φ tension, and the density of its own
    # weight; its combinations are 1.4D and 1.25D + 1.5S (P_D and P_S only), each with its K_D class.
    demo = load_schedule(REPO / "calcsheets" / "kestrel-cove-boathouse" / "schedule.csv")
    from timbersheets.engineering.design import design_member

    t1 = design_member(next(m for m in demo.members if m.mark == "T-1"), data)
    expected = [data.density("glulam", "D.Fir-L", "wet"), data.service_factor("glulam", "all", "K_St", "wet"),
                data.resistance_factor("tension"), data.glulam_strength("D.Fir-L", "18t-E", "f_tn"),
                data.glulam_strength("D.Fir-L", "18t-E", "f_tg"), data.duration_factor("long"),
                data.duration_factor("standard")]
    tabled = {(d.data, d.key, d.column) for d in t1.data_values if d.data != "nbc2020_uls_combinations.csv"}
    assert tabled == {(d.data, d.key, d.column) for d in expected}
    combinations = {d.key for d in t1.data_values if d.data == "nbc2020_uls_combinations.csv"}
    assert combinations == {"id=1", "id=3a"}
    assert set(t1.data_warnings) == set(DataSet.warnings_for(list(t1.data_used)))
    assert len(t1.data_warnings) == len(set(t1.data_warnings))


# ----------------------------------------------------------------------------- drift between types
WIND_NOTE = "deflection under the W"


@pytest.mark.parametrize("case, cells", [
    ("simple span", dict(type="bending", P_D="", size="38x184", length="2.8", Lu="0", w_D="0.46", w_S="1.16", w_W="-0.55")),
    ("two spans", dict(type="bending", P_D="", size="38x184", length="", spans="2.8+2.8", Lu="0", w_D="0.46", w_S="1.16",
                       w_W="-0.55")),
    ("point wind load", dict(type="bending", P_D="", size="38x184", length="2.8", Lu="0", w_D="0.46", point_W="-1@1.4")),
    ("beam-column", dict(type="beam-column", Lu="3.0", P_D="2.2", P_S="3.9", w_W="0.47")),
])
def test_every_bending_member_under_wind_says_its_wind_deflection_is_not_checked(tmp_path, data, case, cells):
    # Common practice: a calc sheet reports a check it does not make. The SLS combinations here are
    # gravity loads only (data/sls_combinations.csv), so wind deflection of a purlin, girt or stud is
    # left to the designer against the cladding's limit, and every type that bends must say so,
    # whether it is analysed as a simple span or as a beam model.
    d = design_row(tmp_path, data, **cells)
    assert d.errors == []
    assert sum(WIND_NOTE in w and "is not checked" in w for w in d.warnings) == 1, d.warnings


def test_a_bending_member_without_lateral_loads_has_no_wind_note(tmp_path, data):
    d = design_row(tmp_path, data, type="bending", P_D="", size="38x184", length="2.8", Lu="0", w_D="0.46", w_S="1.16")
    assert d.errors == [] and not any(WIND_NOTE in w for w in d.warnings)


def test_a_beam_column_with_gravity_line_loads_shows_its_serviceability_and_diagram(tmp_path, data):
    # Common practice: a deflection check is shown with the load combination it was made under, as a
    # bending member's sheet shows it. A tension chord carrying a ceiling (w_D) is checked for deflection
    # under 1.0D, so its sheet lists that SLS combination and the shear and moment diagram.
    d = design_row(tmp_path, data, **ROWS["tension-bending"])
    assert d.errors == [] and any(c.check == "deflection-total" for c in d.checks)
    sheet = Sheet(d, data, CODES)
    service = sheet.serviceability_section().markdown
    assert "Serviceability combinations" in service and "1.0D" in service
    assert len(sheet.diagram()) == 2  # its caption and the image


def test_a_beam_column_without_line_loads_says_deflection_is_not_checked(tmp_path, data):
    # Given moments come from a frame model, not from loads on a span: no deflection is computed,
    # and the serviceability section says so instead of staying silent.
    d = design_row(tmp_path, data, type="beam-column", material="glulam", species="D.Fir-L", grade="16c-E",
                   size="175x266", length="3.6", Ly="1.8", Lu="3.6", P_D="64", P_S="92", M_D="4.8", M_S="6.9",
                   V_D="0.1")
    assert d.errors == [] and not any(c.check.startswith("deflection") for c in d.checks)
    service = Sheet(d, data, CODES).serviceability_section().markdown
    assert "Deflection is not checked" in service


def test_a_limited_system_factor_travels_with_the_results_that_used_it(tmp_path, data):
    # O86-14 Table 6.4.4 (memory, data/system_factors.csv): compression takes K_H at most 1.1, so a post
    # scheduled with K_H = 1.3 is checked with 1.1; each compression result carries the limit it used and
    # the remark, and the sheet lists the remark once.
    checked, _, _ = spied(tmp_path, data, ROWS["sawn-compression"])
    compression = [r for r in checked.results if r.check == "compression"]
    limit = data.system_factor_limit("compression")
    assert compression and all(limit in r.used for r in compression)
    assert all(r.factors["K_H"] == pytest.approx(1.1) for r in compression)
    assert all(any("compression takes K_H = 1.1" in n for n in r.notes) for r in compression)
    assert sum("compression takes K_H = 1.1" in n for n in checked.notes) == 1
