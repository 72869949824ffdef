"""Bad input: every error names file, row, column and value, and says what is allowed;
the other members are still designed."""

import json
import subprocess
import sys

import pytest

from conftest import member_row, write_job, write_schedule
from timbersheets.errors import JobError
from timbersheets.run.runner import run_job
from timbersheets.schedule.read import load_schedule

GOOD = member_row("OK-1")

# (id, bad cells, column named, words the message must contain)
BAD = [
    ("unknown-species", {"species": "Oak"}, "species", ["'Oak'", "D.Fir-L", "Hem-Fir", "S-P-F", "Northern"]),
    ("unknown-grade", {"grade": "No.7"}, "grade", ["'No.7'", "No.1/No.2"]),
    ("glulam-grade", {"material": "glulam", "species": "Spruce-Pine", "grade": "24f-E", "size": "130x228"},
     "grade", ["'24f-E'", "20f-E", "12c-E"]),
    ("bad-size", {"size": "38x200"}, "size", ["'38x200'", "standard dressed"]),
    ("size-not-a-size", {"size": "two by six"}, "size", ["'two by six'", "b x d in mm"]),
    ("glulam-width", {"material": "glulam", "species": "DFL", "grade": "16c-E", "size": "150x228"},
     "size", ["'150x228'", "130", "175"]),
    ("mark-chars", {"mark": "C 1/a"}, "mark", ["'C 1/a'", "letters, digits"]),
    ("negative-length", {"length": "-3"}, "length", ["'-3'", "at least 0.1", "from 0.1 to 60"]),
    ("zero-length", {"length": "0"}, "length", ["'0'", "at least 0.1"]),
    ("not-a-number", {"P_D": "lots"}, "P_D", ["'lots'", "not a number"]),
    ("nan", {"P_L": "nan"}, "P_L", ["'nan'"]),
    ("infinite", {"K_H": "inf"}, "K_H", ["'inf'", "finite"]),
    ("wrong-dimension", {"length": "3 kN"}, "length", ["'3 kN'", "not a length"]),
    ("unknown-unit", {"length": "3 cubits"}, "length", ["'3 cubits'", "unknown unit"]),
    ("net-area-low", {"net_area": "0.6"}, "net_area", ["'0.6'", "75 %"]),
    ("required-blank", {"grade": ""}, "grade", ["required"]),
    ("bad-type", {"type": "arch"}, "type", ["'arch'", "tension", "compression"]),
    ("timber-grade", {"size": "140x140", "grade": "No.1/No.2"}, "grade", ["'No.1/No.2'", "SS, No.1, No.2"]),
    ("lx-too-long", {"Lx": "4"}, "Lx", ["'4 m'", "longer than the member"]),
    ("unclosed-bracket", {"length": "12 ft)"}, "length", ["'12 ft)'", "unknown unit", "12 ft"]),
    ("trailing-slash", {"length": "3 m/"}, "length", ["'3 m/'", "unknown unit", "3.6 m"]),
    ("divide-by-zero", {"P_D": "20 kN/0"}, "P_D", ["'20 kN/0'", "unknown unit", "12 kN"]),
    ("power-zero", {"length": "3 m**0"}, "length", ["'3 m**0'", "unknown unit"]),
    ("moment-hint", {"M_D": "3 kN"}, "M_D", ["'3 kN'", "not a moment", "kip-ft", "kN*m"]),
    ("line-load-hint", {"w_L": "3 ft"}, "w_L", ["'3 ft'", "not a line load", "plf"]),
    ("too-many-inches", {"length": "9'-14\""}, "length", ["'9'-14\"'", "12 inches"]),
]


@pytest.mark.parametrize("case_id,cells,column,words", BAD, ids=[b[0] for b in BAD])
def test_bad_cell_names_row_column_and_value(tmp_path, case_id, cells, column, words):
    bad = {**member_row("BAD-1"), **cells}
    job = write_job(tmp_path / "job", [GOOD, bad, member_row("OK-2")])
    report = run_job(job, out=tmp_path / "out", sheets=False)
    by_mark = {d.mark: d for d in report.designs}
    bad_mark = bad["mark"] if case_id != "mark-chars" else "C 1/a"
    bad_design = by_mark[bad_mark]
    assert bad_design.status == "error"
    message = bad_design.errors[0]
    assert "schedule.csv, row 3" in message
    assert f"column '{column}'" in message
    for word in words:
        assert word in message, message
    assert "[" not in message and "Error" not in message, message  # no pint dimension or exception text
    assert by_mark["OK-1"].status == "pass" and by_mark["OK-2"].status == "pass"
    results = json.loads((tmp_path / "out" / "rev-A" / "results.json").read_text())
    statuses = {m["mark"]: m["status"] for m in results["members"]}
    assert statuses["OK-1"] == "pass" and statuses[bad_mark] == "error"
    assert report.exit_code == 1


def test_duplicate_marks(tmp_path):
    path = write_schedule(tmp_path, [GOOD, member_row("X-1"), member_row("OK-1")])
    s = load_schedule(path)
    assert [m.mark for m in s.members] == ["OK-1", "X-1"]
    (err,) = s.rejected[0].errors
    assert "row 4" in str(err) and "column 'mark'" in str(err) and "duplicate of the mark in row 2" in str(err)


def test_missing_required_column_is_a_job_error(tmp_path):
    row = dict(GOOD)
    del row["grade"]
    with pytest.raises(JobError) as info:
        load_schedule(write_schedule(tmp_path, [row]))
    assert "row 1" in str(info.value) and "grade" in str(info.value)


def test_unknown_column_warns_with_closest(tmp_path):
    s = load_schedule(write_schedule(tmp_path, [{**GOOD, "P_Dead": "3"}, ]))
    assert any("'P_Dead'" in w and "did you mean" in w for w in s.warnings)


def test_bom_semicolons_and_decimal_commas(tmp_path):
    text = "\ufeffmark;type;material;species;grade;size;length;P_D\nA-1;compression;sawn;SPF;No.2;38x140;3,0;5,5\n"
    (tmp_path / "schedule.csv").write_text(text, encoding="utf-8")
    s = load_schedule(tmp_path / "schedule.csv")
    (m,) = s.members
    assert m.length == pytest.approx(3000.0) and m.P_D == pytest.approx(5500.0)
    assert m.species == "S-P-F" and any("semicolon" in w for w in s.warnings)


def test_xlsx_schedule(tmp_path):
    import openpyxl

    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(list(GOOD))
    sheet.append(list(GOOD.values()))
    sheet.append([5.0 if k == "P_D" else v for k, v in member_row("OK-2").items()])  # a number cell
    book.save(tmp_path / "schedule.xlsx")
    s = load_schedule(tmp_path / "schedule.xlsx")
    assert [m.mark for m in s.members] == ["OK-1", "OK-2"] and not s.rejected


def test_imperial_units_give_the_same_member(tmp_path):
    si = load_schedule(write_schedule(tmp_path, [member_row("A", length="3.6576", P_D="4.448222")])).members[0]
    imperial = load_schedule(write_schedule(tmp_path, [member_row("A", length="12 ft", P_D="1 kip")])).members[0]
    assert imperial.length == pytest.approx(si.length, rel=1e-6)
    assert imperial.P_D == pytest.approx(si.P_D, rel=1e-5)


# Exact conversions by definition (international yard and pound, 1959; NIST SP 811 appendix B):
# 1 ft = 0.3048 m, 1 in = 25.4 mm, 1 lbf = 4.4482216152605 N, 1 kip = 1000 lbf.
LBF, FT = 4.4482216152605, 304.8  # N, mm
TRADE_UNITS = [
    ("feet-mark", "length", "12'", 12 * FT),
    ("inch-mark", "length", '12"', 12 * 25.4),
    ("feet-and-inches-words", "length", "12 ft 6 in", 12.5 * FT),
    ("feet-and-inches-marks", "length", "12'-6\"", 12.5 * FT),
    ("feet-and-inches-space", "length", "12' 6\"", 12.5 * FT),
    ("kip-ft", "M_D", "10 kip-ft", 10 * 1000 * LBF * FT),
    ("kN-m", "M_D", "3 kN-m", 3e6),
    ("kNm", "M_D", "3 kNm", 3e6),
    ("plf", "w_D", "300 plf", 300 * LBF / FT),
    ("klf", "w_D", "2 klf", 2000 * LBF / FT),
]


@pytest.mark.parametrize("case_id,column,text,expected", TRADE_UNITS, ids=[t[0] for t in TRADE_UNITS])
def test_trade_unit_spellings(tmp_path, case_id, column, text, expected):
    cells = {column: text} if column != "length" else {"length": text, "Ly": "0"}
    s = load_schedule(write_schedule(tmp_path, [member_row("A", **cells)]))
    assert not s.rejected, [str(e) for r in s.rejected for e in r.errors]
    assert getattr(s.members[0], column) == pytest.approx(expected, rel=1e-9)


def test_psf_reads_as_a_pressure():
    from timbersheets.engineering.units import parse_quantity

    # 50 psf = 50 lbf / (0.3048 m)² = 50 × 4.4482216152605 / 0.09290304 Pa = 2394.0 Pa
    assert parse_quantity("50 psf", "kPa") == pytest.approx(50 * LBF / 0.3048**2 / 1000, rel=1e-9)


def test_cli_exit_codes(tmp_path, capsys):
    from timbersheets.cli import main

    job = write_job(tmp_path / "job", [GOOD])
    run = ["run", "--no-pdf", "--out", str(tmp_path / "o")]
    assert main([*run, str(job)]) == 0
    write_job(tmp_path / "job", [GOOD, member_row("BIG", P_D="500")])
    assert main([*run, str(job)]) == 1
    (job / "project.toml").write_text("[project\n", encoding="utf-8")
    assert main([*run, str(job)]) == 2 and "project.toml" in capsys.readouterr().err
    # the process itself exits with the code main returns
    done = subprocess.run([sys.executable, "-m", "timbersheets.cli", *run, str(tmp_path / "nowhere")],
                          capture_output=True, text=True)
    assert done.returncode == 2 and "not a job folder" in done.stderr
