"""Reading the schedule file: rows as a spreadsheet numbers them, nothing swallowed,
nothing silently blank."""

import pytest

from conftest import member_row, write_job
from timbersheets.errors import JobError
from timbersheets.run.runner import run_job
from timbersheets.schedule.read import load_schedule

HEAD = "mark,type,material,species,grade,size,length,Ly,P_D,note\n"
ROW = "{mark},compression,sawn,S-P-F,No.1/No.2,38x140,3.0,0,5,{note}\n"


def schedule(tmp_path, text: str, name: str = "schedule.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8", newline="")
    return load_schedule(path)


def test_unclosed_quote_is_an_error_on_its_row_and_later_rows_still_read(tmp_path):
    bad = ROW.format(mark="C-2", note='"post, see detail 4')
    s = schedule(tmp_path, HEAD + ROW.format(mark="C-1", note="a") + bad + ROW.format(mark="C-3", note="b")
                 + ROW.format(mark="C-4", note="c"))
    assert [m.mark for m in s.members] == ["C-1", "C-3", "C-4"]
    assert [m.row for m in s.members] == [2, 4, 5]
    (error,) = s.rejected
    assert error.row == 3 and "quote" in str(error.errors[0]) and "schedule.csv, row 3" in str(error.errors[0])


def test_unclosed_quote_in_the_last_row(tmp_path):
    s = schedule(tmp_path, HEAD + ROW.format(mark="C-1", note="a") + ROW.format(mark="C-2", note='"open'))
    assert [m.mark for m in s.members] == ["C-1"] and s.rejected[0].row == 3


def test_a_line_break_inside_quotes_stays_in_the_cell_and_rows_keep_their_numbers(tmp_path):
    s = schedule(tmp_path, HEAD + ROW.format(mark="C-1", note='"see\ndetail 4"') + ROW.format(mark="C-2", note="b"))
    assert s.members[0].note == "see\ndetail 4"
    assert [m.row for m in s.members] == [2, 3]


@pytest.mark.parametrize("sep", ["\f", "\u2028", "\x85", "\v"], ids=["form-feed", "U+2028", "NEL", "VT"])
def test_odd_line_separators_do_not_split_rows(tmp_path, sep):
    s = schedule(tmp_path, HEAD + ROW.format(mark="C-1", note=f"see{sep}detail") + ROW.format(mark="C-2", note="b"))
    rows = {e.mark: e.row for e in s.entries}
    assert rows == {"C-1": 2, "C-2": 3}
    if sep == "\u2028":  # a line separator is a line break in the note
        assert s.members[0].note == "see\ndetail"
    else:  # a control character is refused, naming the column
        assert "column 'note'" in str(s.rejected[0].errors[0]) and "control character" in str(s.rejected[0].errors[0])


def test_duplicate_column_is_an_error(tmp_path):
    with pytest.raises(JobError, match=r"row 1, column 'P_D'.*twice \(columns 9 and 11\)"):
        schedule(tmp_path, HEAD.rstrip("\n") + ",P_D\n" + ROW.format(mark="C-1", note="a").rstrip("\n") + ",7\n")


def test_cell_over_the_limit_is_an_error_of_its_cell(tmp_path):
    s = schedule(tmp_path, HEAD + ROW.format(mark="C-1", note="x" * 140_000) + ROW.format(mark="C-2", note="b"))
    assert [m.mark for m in s.members] == ["C-2"]
    assert "row 2, column 'note'" in str(s.rejected[0].errors[0]) and "131,072" in str(s.rejected[0].errors[0])


def test_value_beyond_the_header_is_flagged(tmp_path):
    s = schedule(tmp_path, HEAD + ROW.format(mark="C-1", note="a").rstrip("\n") + ",surprise\n")
    assert "column(s) 11" in str(s.rejected[0].errors[0])


@pytest.mark.parametrize("encoding", ["utf-8-sig", "utf-16"])
def test_utf8_with_bom_and_utf16_are_read(tmp_path, encoding):
    path = tmp_path / "schedule.csv"
    path.write_text(HEAD + ROW.format(mark="C-1", note="poteau é"), encoding=encoding)
    assert load_schedule(path).members[0].note == "poteau é"


def test_latin1_names_the_line(tmp_path):
    path = tmp_path / "schedule.csv"
    path.write_bytes((HEAD + ROW.format(mark="C-1", note="poteau é")).encode("latin-1"))
    with pytest.raises(JobError, match=r"not UTF-8 text \(line 2"):
        load_schedule(path)


def test_schedule_that_is_a_directory_or_has_no_rows(tmp_path):
    (tmp_path / "schedule.csv").mkdir()
    with pytest.raises(JobError, match="is not a file"):
        load_schedule(tmp_path / "schedule.csv")
    with pytest.raises(JobError, match="no member rows"):
        schedule(tmp_path, HEAD, name="other.csv")


def _xlsx(tmp_path, rows, merge: str | None = None):
    import openpyxl

    book = openpyxl.Workbook()
    sheet = book.active
    for row in rows:
        sheet.append(row)
    if merge:
        sheet.merge_cells(merge)
    path = tmp_path / "schedule.xlsx"
    book.save(path)
    return load_schedule(path)


XHEAD = HEAD.strip().split(",")


def xrow(mark, p_d=5.0):
    return [mark, "compression", "sawn", "S-P-F", "No.1/No.2", "38x140", 3.0, 0, p_d, ""]


def test_xlsx_keeps_full_precision(tmp_path):
    s = _xlsx(tmp_path, [XHEAD, xrow("C-1", 4.81234567)])
    assert s.members[0].P_D == pytest.approx(4812.34567, abs=1e-6)  # kN to N, nothing rounded


def test_xlsx_formula_without_saved_value_is_an_error(tmp_path):
    s = _xlsx(tmp_path, [XHEAD, xrow("C-1", "=2+3"), xrow("C-2")])
    assert [m.mark for m in s.members] == ["C-2"]
    assert "row 2, column 'P_D'" in str(s.rejected[0].errors[0]) and "formula" in str(s.rejected[0].errors[0])


def test_xlsx_merged_cells_are_errors_below_the_first(tmp_path):
    s = _xlsx(tmp_path, [XHEAD, xrow("C-1"), xrow("C-2", None), xrow("C-3")], merge="I2:I3")
    assert [m.mark for m in s.members] == ["C-1", "C-3"]
    assert "row 3, column 'P_D'" in str(s.rejected[0].errors[0]) and "I2:I3" in str(s.rejected[0].errors[0])


def test_xlsx_value_beyond_header_is_flagged(tmp_path):
    s = _xlsx(tmp_path, [XHEAD, [*xrow("C-1"), "stray"]])
    assert s.rejected and "beyond the named columns" in str(s.rejected[0].errors[0])


def test_every_good_row_is_designed_around_a_runaway_quote(tmp_path):
    job = write_job(tmp_path / "job", [member_row("G-1"), member_row("B-1", note="x"), member_row("G-2")])
    text = (job / "schedule.csv").read_text().replace(",x\n", ',"post, see detail 4\n')
    (job / "schedule.csv").write_text(text)
    report = run_job(job, out=tmp_path / "out", sheets=False)
    assert {d.mark: d.status for d in report.designs} == {"G-1": "pass", "B-1": "error", "G-2": "pass"}


def test_a_non_finite_result_makes_the_member_an_error(tmp_path, data):
    """NaN compares false with every limit, so unguarded a NaN resistance would pass."""
    import dataclasses

    from conftest import design_row
    from timbersheets.engineering.design import refuse_non_finite
    from timbersheets.errors import DesignError

    d = design_row(tmp_path, data, mark="C-1")
    assert d.status == "pass"
    broken = [dataclasses.replace(c, resistance=float("nan")) for c in d.checks]
    with pytest.raises(DesignError, match=r"C-1: compression under .*: resistance, utilization is not a finite"):
        refuse_non_finite(d.member, broken, d.context.used)
