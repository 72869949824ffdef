"""What a checker reads on a sheet: symbols typeset, one numbering of combinations, numbers that reproduce."""

from __future__ import annotations

import re

import pytest

from conftest import DEMO
from timbersheets.data import DataSet
from timbersheets.design import design_member
from timbersheets.schedule import load_schedule
from timbersheets.sheets import Sheet

CODES = {"nbc": "2020", "o86": "2019"}


@pytest.fixture(scope="module")
def demo_members():
    return {m.mark: m for m in load_schedule(DEMO / "schedule.csv").members}


def sheet_of(member) -> Sheet:
    data = DataSet()
    return Sheet(design_member(member, data), data, CODES)


def prose(latex: str) -> str:
    """Text outside maths and file names (\\texttt), with LaTeX's escaped underscores restored."""
    latex = re.sub(r"\$[^$]*\$", " ", latex)
    latex = re.sub(r"\\texttt\{[^}]*\}", " ", latex)
    return latex.replace("\\_", "_")


@pytest.mark.parametrize("mark", ["G-1", "T-1", "RB-2", "C-1"])
def test_cautions_typeset_symbols_and_name_no_data_identifiers(demo_members, mark):
    caution = sheet_of(demo_members[mark]).cautions().latex
    words = prose(caution)
    assert not re.search(r"\b[A-Za-z][A-Za-z0-9]*_[A-Za-z0-9]", words), re.findall(r"\S*_\S*", words)
    assert "$K_{S" in caution  # the service factors are listed, as symbols


def test_glulam_factor_names_are_words(demo_members):
    caution = sheet_of(demo_members["G-1"]).cautions().latex
    for raw in ("K_X_straight", "shear_method_a_volume_max", "C_V_simple_span_udl", "K\\_X\\_straight"):
        assert raw not in caution
    assert "$K_{X}$, curvature factor" in caution and "straight members" in caution
    assert "$C_{V}$" in caution and "simple span under uniform load" in caution


def test_cautions_name_combinations_as_the_combination_table_numbers_them(demo_members):
    sheet = sheet_of(demo_members["G-1"])
    table = sheet.combinations_section().latex
    caution = sheet.cautions().latex
    listed = re.search(r"combinations ([0-9a-z, ]+) \(numbered as in the load combinations table\)", caution)
    assert listed, caution
    numbers = listed.group(1).split(", ")
    body = table[table.index("\\midrule"):table.index("\\bottomrule")]  # the first table
    first_column = [line.split(" & ")[0] for line in body.splitlines() if " & " in line]
    assert first_column == numbers  # the same labels, in the same order (NBC Table 4.1.3.2.-A cases)
