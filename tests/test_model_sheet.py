"""The sheet of a beam analysed as a model names the package and version, lists every load with its source,
the specified reactions, the governing extremes with place and arrangement, and draws the model."""

from __future__ import annotations

from importlib.metadata import version

import pytest

from conftest import write_schedule
from timbersheets.engineering.loadpath import design_all
from timbersheets.schedule.read import load_schedule
from timbersheets.sheet.sections import Sheet

ROWS = [
    {"mark": "RB-1", "type": "bending", "material": "glulam", "species": "D.Fir-L", "grade": "24f-E",
     "size": "130x304", "length": "6.0", "Lu": "0", "bearing": "140", "w_D": "1.2", "w_S": "3.0",
     "self_weight": "no"},  # the hand calculations below take the dead load as given
    {"mark": "J-1", "type": "bending", "material": "sawn", "species": "S-P-F", "grade": "No.1/No.2",
     "size": "38x235", "spans": "3.6+3.6", "Lu": "0", "bearing": "89", "q_D": "0.5", "q_L": "1.9", "trib": "0.4",
     "restraint": "both-edges", "carries": "RB-1.R1@3.6"},
]


def sheet_for(tmp_path, data, mark):
    schedule = load_schedule(write_schedule(tmp_path, ROWS))
    design = next(d for d in design_all(schedule.entries, data) if d.mark == mark)
    return Sheet(design, data, {"nbc": "2020", "o86": "2019"})


def test_model_sheet_shows_the_model_and_its_sources(tmp_path, data):
    sheet = sheet_for(tmp_path, data, "J-1")
    member = sheet.member_section().latex
    assert "spans 3.6 + 3.6 m" in member and "R2 at 3.60 m" in member
    loads = sheet.loads_section().latex
    # hand calculation: w = q × trib = 1.9 kPa × 0.4 m = 0.76 kN/m
    assert "1.9 kPa × 0.4 m = 0.76 kN/m" in loads
    # RB-1.R1 = wL/2: D 1.2 × 3 = 3.6 kN, S 3.0 × 3 = 9.0 kN, landing at 3.6 m (the interior support)
    assert "RB-1.R1: reaction of RB-1, support 1" in loads and "9.0" in loads and "3.60" in loads
    forces = sheet.combinations_section().latex
    assert f"PyCBA {version('pycba')}" in forces
    assert "L on span 1" in forces and "largest positive moment" in forces and "support 2" in forces
    caption, image = sheet.diagram()
    assert image.data[:4] == b"\x89PNG" and "governing bending combination" in caption.latex
    checks = sheet.checks_section().latex
    assert "Where" in checks and "span 2" in checks


def test_simple_span_sheet_gives_the_reactions_a_carrier_takes(tmp_path, data):
    # hand calculation: R = wL/2: D 1.2 × 6 / 2 = 3.6 kN, S 3.0 × 6 / 2 = 9.0 kN
    sheet = sheet_for(tmp_path, data, "RB-1")
    forces = sheet.combinations_section().latex
    # the closed forms are the design's own Calcs, rendered as symbols: M_f = w_f L²/8, Q_f = w_f L/2
    # (in the text: each check then works its force out with numbers)
    assert r"$M_{f} = w_{f} \cdot \frac{ \left( L \right) ^{ 2 } }{ 8 }$" in forces
    assert r"$Q_{f} = w_{f} \cdot \frac{ L }{ 2 }$" in forces
    assert r"M_{f} &= w_{f} \cdot \frac{ \left( L \right) ^{ 2 } }{ 8 }" in sheet.checks_section().latex
    assert "for $w_f$: D 3.6, S 9.0 kN" in forces
    assert "R1 = R2 = w L / 2 by load type: D 3.6, S 9.0 kN" in sheet.combinations_section().markdown


def test_a_model_sheet_tables_the_own_weight_it_adds_to_d(tmp_path, data):
    """The loads table of a beam model gives each type's total F; the own weight the tool adds to D has
    its own row there, as on every other sheet, so the table's D plus that row is the D of 1.4D in
    section 3. Hand arithmetic: the row is the worked line w_sw times the member's 7.2 m."""
    import re

    sheet = sheet_for(tmp_path, data, "J-1")
    loads = sheet.loads_section().latex
    row = re.search(r"Own weight \(in D\) & \$D\$ & \$([\d.]+)\$", loads)
    assert row, loads
    w_sw = sheet.design.context.own_weight.value  # N/mm = kN/m
    assert float(row.group(1)) == pytest.approx(w_sw * 7.2, rel=5e-3)
    combos = sheet.combinations_section().latex
    d_total = float(re.search(r"Dead & \$D\$ & \$([\d.]+)\$", loads).group(1)) + float(row.group(1))
    first = re.search(r"1\.4D & \$?([\d.]+)", combos)
    assert first and float(first.group(1)) == pytest.approx(1.4 * d_total, rel=5e-3), combos[:400]


def test_a_model_sheet_works_the_own_weight_s_row_out(tmp_path, data):
    """The own-weight row of a beam model's loads table (an F, kN) is worked on the sheet from the line
    load worked above it: F_sw = w_sw L, L the model's whole length (J-1: spans 3.6 + 3.6 m = 7.2 m),
    so a checker reproduces the row with a calculator (common practice: a line load's total is w L)."""
    import re

    sheet = sheet_for(tmp_path, data, "J-1")
    loads = sheet.loads_section().latex
    worked = re.search(r"F_\{sw\} &= w_\{sw\} \\cdot L\s*= ([\d.]+)\\ \\mathrm\{kN/m\} \\cdot ([\d.]+)\\ "
                       r"\\mathrm\{mm\} &= ([\d.]+)\\ \\mathrm\{kN\}", loads)
    assert worked, loads
    w_sw, length, total = (float(g) for g in worked.groups())
    assert length == pytest.approx(7200.0)
    assert total == pytest.approx(w_sw * length / 1000, rel=5e-3)  # kN/m x m
    row = re.search(r"Own weight \(in D\) & \$D\$ & \$([\d.]+)\$", loads)
    assert float(row.group(1)) == pytest.approx(total, rel=5e-3)


def test_a_model_check_table_gives_each_combination_at_its_governing_place(tmp_path, data):
    # Common practice for a beam's calc sheet: a check's table gives each load combination once, at the place
    # that governs it; the other places are checked all the same (results.json keeps every one). J-1 bears on
    # three supports, so every combination has three bearing checks and its row is the worst of them.
    from timbersheets.sheet.sections import governing_places

    sheet = sheet_for(tmp_path, data, "J-1")
    bearing = [c for c in sheet.design.checks if c.check == "bearing"]
    rows = governing_places(bearing)
    combinations = list(dict.fromkeys(c.combination for c in bearing))
    assert [c.combination for c in rows] == combinations and len(bearing) >= 3 * len(rows)
    for row in rows:
        assert row.utilization == max(c.utilization for c in bearing if c.combination == row.combination)
    checks = sheet.checks_section().latex
    assert f"{len(bearing)} places and combinations were checked" in checks
    # a moment's two sides are kept apart: the negative moment over the interior support has its own rows
    bending = [c for c in sheet.design.checks if c.check == "bending"]
    kept = governing_places(bending)
    assert any(c.demand < 0 for c in kept) and any(c.demand > 0 for c in kept)
    assert len(kept) == len({(c.combination, c.demand < 0) for c in bending})
