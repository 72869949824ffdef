"""What a checker reads on a sheet: symbols typeset, one numbering of combinations, numbers that reproduce."""

from __future__ import annotations

import csv
import math
import re

import pytest

from conftest import DEMO, write_schedule
from timbersheets.engineering.data import DataSet
from timbersheets.engineering.sizing import design_sized
from timbersheets.schedule.read import COLUMNS, load_schedule
from timbersheets.sheet.sections import SHEET_RUNNERS_UP, Sheet
from timbersheets.sheet.tex import escape

CODES = {"nbc": "2020", "o86": "2019"}


@pytest.fixture(scope="module")
def demo_members():
    return {m.mark: m for m in load_schedule(DEMO / "schedule.csv").members}


def sheet_of(member) -> Sheet:
    data = DataSet()
    return Sheet(design_sized(member, data), data, CODES)


def prose(latex: str) -> str:
    """Text outside maths and file names (\\texttt), with LaTeX's escaped underscores restored."""
    latex = re.sub(r"\$[^$]*\$", " ", latex)
    latex = re.sub(r"\\texttt\{[^}]*\}", " ", latex)
    return latex.replace("\\_", "_")


def test_cautions_typeset_symbols_and_name_no_data_identifiers(demo_members):
    typeset = 0
    for mark, member in demo_members.items():  # the unverified values and the notes of every demo member
        caution = sheet_of(member).cautions().latex
        words = prose(caution)
        for column in COLUMNS:  # a schedule column is named as the row spells it, to say what to fill in
            words = re.sub(rf"\b{re.escape(column)}\b", "", words)
        assert not re.search(r"\b[A-Za-z][A-Za-z0-9]*_[A-Za-z0-9]", words), (mark, re.findall(r"\S*_\S*", words))
        typeset += "$K_{S" in caution  # unverified service factors are listed, as symbols
    assert typeset >= 10


def test_glulam_factor_names_are_words(demo_members):
    sheet = sheet_of(demo_members["G-1"])
    caution = sheet.cautions().latex
    for raw in ("K_X_straight", "shear_method_a_volume_max", "C_V_simple_span_udl", "K\\_X\\_straight"):
        assert raw not in caution
    assert "$K_{X}$" in caution and "glulam\\_factors.csv" in caution  # by its symbol and data file
    assert "$C_{V}$" in caution and "simple span under uniform load" in sheet.checks_section().latex  # its case
    # the meaning of each listed symbol is in the factor table, once
    factors = sheet.factors_section().latex
    assert "$K_{X}$ & $1.0$ & curvature factor" in factors and "curvature factor" not in caution


def test_cautions_name_combinations_as_the_combination_table_numbers_them(demo_members):
    sheet = sheet_of(demo_members["G-1"])
    table = sheet.combinations_section().latex
    caution = sheet.cautions().latex
    listed = re.search(r"NBC cases ([0-9a-z, ]+) \(", caution)
    assert listed, caution
    numbers = listed.group(1).split(", ")
    body = table[table.index("\\midrule"):table.index("\\bottomrule")]  # the first table
    first_column = [line.split(" & ")[0] for line in body.splitlines() if " & " in line]
    assert first_column == numbers  # the same labels, in the same order (NBC Table 4.1.3.2.-A cases)


def demo_variant(tmp_path, mark: str, **cells: str):
    """A demo member with some cells rewritten, through the real schedule reader."""
    rows = list(csv.DictReader((DEMO / "schedule.csv").open(encoding="utf-8")))
    row = {**next(r for r in rows if r["mark"] == mark), **cells}
    schedule = load_schedule(write_schedule(tmp_path, [row]))
    assert not schedule.rejected, [str(e) for r in schedule.rejected for e in r.errors]
    return schedule.members[0]


def whole_sheet(sheet: Sheet) -> str:
    return "".join(getattr(sheet, name)().latex for name in (
        "member_section", "loads_section", "combinations_section", "factors_section", "checks_section",
        "summary_section", "cautions"))


def test_dimensions_show_as_used_so_products_reproduce(tmp_path):
    # A 6 in (152.4 mm) deep glulam: hand calculation 175 mm x 152.4 mm = 26670 mm², which a
    # checker can only reproduce if d is printed as 152.4, not 152.
    member = demo_variant(tmp_path, "C-1", size="175x152.4")
    size_row = sheet_of(member).member_section().latex
    b, d, area = (float(v) for v in re.search(
        r"\$b = ([\d.]+)\\ \\mathrm\{mm\}\$, \$d = ([\d.]+)\\ \\mathrm\{mm\}\$, \$A_g = ([\d.]+)", size_row).groups())
    assert (b, d) == (175, 152.4)
    assert b * d == pytest.approx(area, abs=0.5)


def test_imperial_entry_is_shown_as_entered_beside_its_si_value(tmp_path):
    # 316 in x 25.4 mm/in = 8026.4 mm (exact conversion, common practice)
    member = demo_variant(tmp_path, "C-1", length="316 inch", Ly="")
    table = sheet_of(member).member_section().latex
    assert "As entered & \\texttt{length} 316 inch $= 8026.4\\ \\mathrm{mm}$" in table
    assert "$L = 8026.4\\ \\mathrm{mm}$" in table


@pytest.mark.parametrize("mark", ["J-1", "H-1"])
def test_no_raw_floats_on_the_sheet(tmp_path, mark):
    # 1.3335 ft x 304.8 mm/ft = 406.45 mm: printed to 0.1 mm (0.4065 m), never as 0.406451.
    text = whole_sheet(sheet_of(demo_variant(tmp_path, mark, Lu="1.3335 ft", restraint="")))
    assert "0.4065 m" in text
    assert not re.findall(r"\d+\.\d{5,}", text)


def test_prefer_square_still_lists_runners_up(tmp_path):
    # C-5 (Spruce-Pine 12c-E glulam column, prefer = square) at 10 kN dead: before, the squarest
    # section within 10 % of the lightest left no runner-up; the lighter sections passed over are
    # alternatives a checker wants to see (common practice: show the options the choice rejected).
    design = design_sized(demo_variant(tmp_path, "C-5", P_D="10"), DataSet())
    sizing = design.sizing
    assert sizing.chosen is not None and len(sizing.runners_up) >= 3
    assert all(c.passes for c in sizing.runners_up)
    square = lambda c: abs(math.log(c.section.d / c.section.b))  # noqa: E731
    lightest = min([sizing.chosen, *sizing.runners_up], key=lambda c: c.section.A)
    band = [c for c in [sizing.chosen, *sizing.runners_up] if c.section.A <= 1.1 * lightest.section.A]
    assert square(sizing.chosen) == min(square(c) for c in band)
    table = Sheet(design, DataSet(), CODES).sizing_section().latex
    lighter = [c for c in sizing.runners_up if c.section.A < sizing.chosen.section.A]
    heavier = len(sizing.runners_up) - len(lighter)
    assert table.count("passed over") == len(lighter)  # every option the choice rejected
    assert table.count("runner-up") == min(heavier, SHEET_RUNNERS_UP)
    assert f"the next {min(heavier, SHEET_RUNNERS_UP)} that pass" in table


def test_a_sized_member_lists_the_next_lightest_that_pass_in_order(tmp_path):
    """T-4 (sized tension brace): the sheet lists the chosen section, then the next few heavier
    sections that pass, lightest first, as the search ordered them (common practice: the chosen
    section is the lightest that passes; the alternatives are the nearest above it)."""
    design = design_sized(demo_variant(tmp_path, "T-4"), DataSet())
    sizing = design.sizing
    assert len(sizing.runners_up) > SHEET_RUNNERS_UP  # the case this test is about
    table = Sheet(design, DataSet(), CODES).sizing_section().latex
    shown = [c.label for c in sizing.runners_up[:SHEET_RUNNERS_UP]]
    at = [table.index(f"{label} &") for label in [sizing.chosen.label, *shown]]
    assert at == sorted(at)
    assert all(f"{c.label} &" not in table for c in sizing.runners_up[SHEET_RUNNERS_UP:])


def test_deflection_limits_only_where_deflection_is_checked(demo_members):
    # B-1 takes its forces from the frame model and S-2 carries only wind across it: no SLS
    # combination (gravity line loads) applies, so no limit may be listed as if it were checked.
    for mark in ("B-1", "S-2"):
        sheet = sheet_of(demo_members[mark])
        assert not [c for c in sheet.design.checks if c.check.startswith("deflection")]
        assert "$L/" not in sheet.member_section().latex
    assert "$L/360$ under live load" in sheet_of(demo_members["J-1"]).member_section().latex


def test_glulam_column_size_factor_shown_once_with_its_volume(demo_members):
    # C-1, 175x228 glulam, L = 4.2 m: hand calculation Z = 0.175 x 0.228 x 4.2 = 0.168 m³,
    # K_Zcg = 0.68 Z^-0.13 = 0.858 (O86 7.5.8 form, reference notes §4.2).
    checks = sheet_of(demo_members["C-1"]).checks_section().latex
    gov = checks[:checks.index("\\begin{tabular")]  # the governing combination, in full
    assert gov.count("K_{Zcg} &=") == 1 and gov.count("F_{c} &=") == 1
    assert "Z &= b \\cdot d \\cdot L" in gov and "0.168\\ \\mathrm{m}^{3}" in gov
    assert gov.index("Z &= b") < gov.index("K_{Zcg} &=")


def test_a_column_is_not_said_to_be_held_against_rotation_at_bearings(demo_members):
    for mark in ("S-2", "C-4", "TC-1"):
        assert "rotation at the bearings" not in sheet_of(demo_members[mark]).member_section().latex
    assert "against rotation at the bearings" in sheet_of(demo_members["J-1"]).member_section().latex


def test_a_caption_keeps_with_the_equations_it_introduces(demo_members):
    # common practice: a caption at the foot of a page whose equations start the next reads as a caption
    # of nothing; every caption paragraph of section 5 forbids the break before its equations
    checks = sheet_of(demo_members["RB-1"]).checks_section().latex
    captions = re.findall(r"\\emph\{[^\n]*\n", checks)
    assert len(captions) >= 8, captions
    for line in captions:
        assert line.rstrip().endswith("\\par\\nopagebreak"), line


def test_the_standard_term_rule_is_named_only_where_it_can_apply(demo_members):
    # CSA O86-14 5.3.2.3 reduces K_D where the long-term load exceeds the standard-term (live and snow)
    # load: it can apply only to a combination with L or S principal (O86 5.3.2.3; NBC Table 4.1.3.2.-A).
    # T-4 carries dead and wind only; C-1 and T-1 carry snow.
    rule = "tested by 5.3.2.3"
    wind_only = sheet_of(demo_members["T-4"]).combinations_section().latex
    assert rule not in wind_only and "one per combination." in wind_only
    for mark in ("C-1", "T-1"):
        assert rule in sheet_of(demo_members[mark]).combinations_section().latex


def test_the_interaction_is_a_column_of_the_every_combination_table(demo_members):
    # CSA O86-14 6.5.10 / 6.5.11: the interaction value is compared with 1.0, so its utilization is the value
    # itself; common practice: one row per combination reads across every check, the interaction last.
    # S-2 (beam-column with wind) and TC-1 (tension and bending): no table of their own for the interaction.
    for mark in ("S-2", "TC-1"):
        sheet = sheet_of(demo_members[mark])
        checks = sheet.checks_section().latex
        assert "Every combination" in checks and "Limit" not in checks, mark
        block = checks[checks.index("Every combination"):]
        header = block[:block.index("\\\\")]
        assert header.rstrip().endswith(f"${sheet.design.governing_by_check()['interaction'].demand_symbol_latex}$"), header
        rows: dict[str, str] = {}
        for line in block.splitlines():  # the first table's rows (a second one follows on S-2: bearing)
            if " & " in line:
                rows.setdefault(line.split(" & ")[0].strip(), line)
        interaction = [c for c in sheet.design.checks if c.check == "interaction"]
        assert interaction, mark
        for c in interaction:  # each combination's row ends with its interaction value
            row = rows[escape(c.combination)]
            assert row.split(" & ")[-1].startswith(f"${c.utilization:.3f}$"), row
