"""Firm data files: written by the tool, validated row by row, and named on every sheet.

The engineering check here is a hand calculation with a firm value that differs
from the built-in one; the rest checks that the data trail (which file, which
status, who verified it) is told truthfully.
"""

from __future__ import annotations

import csv
import io
import json
import shutil
from pathlib import Path

import pytest

from conftest import DEMO, member_row, write_job
from timbersheets.cli import main
from timbersheets.engineering.data import BUILTIN_FILES, TABLES, DataSet
from timbersheets.engineering.firmdata import HEADER
from timbersheets.errors import JobError
from timbersheets.job.datacheck import all_items, compare, firm_rows, job_designs, used_items
from timbersheets.job.project import load_project
from timbersheets.sheet.sections import Sheet

NOT_FIRM_TABLES = {"sizes_sawn.csv", "sizes_glulam.csv", "glulam_laminations.csv"}  # catalogues, not O86 values
FIRM_LINE = "[data]\nmaterials = \"firm.csv\"\n"
SPF = "species=S-P-F; grade=No.1/No.2; category=dimension; property="


def firm_csv(rows: list[dict[str, object]], header: tuple[str, ...] = HEADER) -> str:
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=list(header), lineterminator="\n", extrasaction="ignore")
    writer.writeheader()
    writer.writerows(rows)
    return buffer.getvalue()


def verified(row: dict[str, object], **changes: object) -> dict[str, object]:
    """The row as an engineer leaves it after checking it against the edition the job is designed to."""
    edition = "NBC 2020" if str(row.get("data", "")).startswith(("nbc", "sls")) else "O86:19"
    return {**row, "status": "verified", "verified_by": "RD", "verified_on": "2026-11-30", "edition": edition,
            **changes}


def strength_row(prop: str, value: object, **cells: object) -> dict[str, object]:
    return {"data": "sawn_strengths", "key": SPF + prop, "column": "value", "value": value, "unit": "MPa",
            "table": "6.3.1A", "source": "firm's licensed copy", **cells}


def demo_copy(tmp_path: Path) -> Path:
    job = tmp_path / "kestrel-cove-boathouse"
    shutil.copytree(DEMO, job)
    return job


def all_verified(job: Path, drop: str = "") -> None:
    """Write the job's firm file with the tool, then mark every row verified (what the engineer does)."""
    project = load_project(job)
    data, designs = job_designs(project)
    rows = [verified(r) for r in firm_rows(used_items(data, designs)) if r["item"] != drop]
    (job / "firm.csv").write_text(firm_csv(rows), encoding="utf-8")
    with (job / "project.toml").open("a", encoding="utf-8") as f:
        f.write("\n" + FIRM_LINE)


def test_every_table_a_member_reads_can_come_from_a_firm_file():
    # A new data table must be added to data.TABLES, or a firm could never verify its values.
    assert set(BUILTIN_FILES) - NOT_FIRM_TABLES <= set(TABLES)


def test_firm_file_verifying_every_value_leaves_nothing_unverified_and_sheets_name_it(tmp_path):
    job = demo_copy(tmp_path)
    all_verified(job)
    project = load_project(job)
    data, designs = job_designs(project)
    assert data.firm is not None and not data.firm.errors
    assert all(not d.errors for d in designs), [d.errors for d in designs if d.errors]
    for d in designs:
        assert d.data_warnings == [], d.mark
        cautions = Sheet(d, data, project.codes).cautions().latex
        assert "not yet verified" not in cautions
        assert "firm.csv" in cautions and data.firm.short_hash in cautions and "RD on 2026-11-30" in cautions
        assert all(v.status in ("verified", "sourced") for v in d.data_values)


def test_removing_one_row_returns_exactly_that_value_to_the_unverified_list(tmp_path):
    job = demo_copy(tmp_path)
    dropped = "f_t D.Fir-L SS dimension"  # memory-unverified in the built-in table
    all_verified(job, drop=dropped)
    data, designs = job_designs(load_project(job))
    warnings = {w for d in designs for w in d.data_warnings}
    assert warnings == {f"{dropped}: memory, unverified (O86-14 Table 6.3.1A; sawn_strengths.csv)"}
    users = {d.mark for d in designs if d.data_warnings}
    listed = next(i for i in used_items(data, designs) if i.datum.label == dropped)
    assert users == set(listed.members) and users


def tension_job(tmp_path: Path, firm_rows_: list[dict[str, object]], header: tuple[str, ...] = HEADER) -> Path:
    rows = [member_row("T-1", type="tension", size="38x140", P_D="5", P_L="20", Ly=""),
            member_row("C-1", species="Hem-Fir", P_D="5", P_L="10")]
    job = write_job(tmp_path / "job", rows, extra=FIRM_LINE)
    (job / "firm.csv").write_text(firm_csv(firm_rows_, header), encoding="utf-8")
    return job


def test_a_firm_value_that_differs_is_used_in_the_check_and_flagged(tmp_path):
    job = tension_job(tmp_path, [verified(strength_row("f_t", 6.0))])
    project = load_project(job)
    data, designs = job_designs(project)
    t1 = next(d for d in designs if d.mark == "T-1")
    gov = t1.governing
    # Hand calculation, CSA O86:19 6.5.9 with the firm's f_t = 6.0 MPa (built-in 5.5):
    # P_f = 1.25 x 5 + 1.5 x 20 = 36.25 kN; K_D = 1.0 (dead 5 kN < live 20 kN); K_H = K_St = K_T = 1.0;
    # K_Zt = 1.3 (size_factors_sawn.csv, 38 mm thick, larger dimension up to 140 mm); phi = 0.9;
    # T_r = 0.9 x 6.0 x 1.0 x (38 x 140) x 1.3 = 37 346 N = 37.35 kN; utilization 36.25 / 37.35 = 0.971.
    # With the built-in 5.5 MPa it would be 36.25 / 34.23 = 1.059 (does not pass).
    assert gov.check == "tension" and gov.combination == "1.25D + 1.5L"
    assert gov.unit == "kN" and gov.resistance == pytest.approx(37.346, rel=1e-3)
    assert gov.utilization == pytest.approx(0.9707, abs=5e-4) and t1.status == "pass"
    assert t1.data_corrections == ["f_t S-P-F No.1/No.2 dimension = 6 from firm file firm.csv differs from the "
                                   "built-in value 5.5"]
    record = next(v for v in t1.data_values if v.symbol == "f_t").record()
    assert record["builtin_value"] == 5.5 and record["status"] == "verified" and record["file"] == "firm.csv"
    sheet = Sheet(t1, data, project.codes)
    assert "firm value, built-in 5.5" in sheet.factors_section().latex
    assert "differ from the built-in data" in sheet.cautions().latex


BAD_ROWS = [
    ("blank-status", [strength_row("f_t", 5.5, status="")], "status", "is blank"),
    ("unknown-status", [strength_row("f_t", 5.5, status="ok")], "status", "is not a data status"),
    ("verified-without-verified_by", [verified(strength_row("f_t", 5.5), verified_by="")], "verified_by",
     "is blank on a verified row"),
    ("duplicate-key", [verified(strength_row("f_c", 11.5)), verified(strength_row("f_t", 5.5)),
                       verified(strength_row("f_t", 5.6))], "key", "repeats the value of row 4"),
    ("strength-in-kPa", [verified(strength_row("f_t", 5500))], "value", "out of scale"),
    ("wrong-sign", [verified(strength_row("f_t", -5.5))], "value", "wrong sign"),
    ("not-a-number", [verified(strength_row("f_t", "nan"))], "value", "not a finite number"),
    ("verified-against-another-edition", [verified(strength_row("f_t", 5.5), edition="O86-14")], "edition",
     "is not the CSA O86 edition jobs are designed to"),
    ("unknown-unit", [verified(strength_row("f_t", 5.5, unit="psi"))], "unit", "is not the unit"),
]


@pytest.mark.parametrize("rows,column,problem", [c[1:] for c in BAD_ROWS], ids=[c[0] for c in BAD_ROWS])
def test_each_bad_firm_row_is_an_error_naming_file_row_column_and_other_members_run(tmp_path, rows, column, problem):
    good = verified(strength_row("f_v", 1.5))
    job = tension_job(tmp_path, [good, *rows])
    data, designs = job_designs(load_project(job))
    by_mark = {d.mark: d for d in designs}
    bad_row = len(rows) + 2  # the header is row 1, the good row is row 2, the bad one is last
    assert any(f"firm.csv, row {bad_row}, column '{column}'" in str(e) and problem in str(e) for e in data.firm.errors)
    assert by_mark["T-1"].status == "error"
    assert f"firm.csv, row {bad_row}, column '{column}'" in by_mark["T-1"].errors[0]
    assert by_mark["C-1"].status == "pass"  # Hem-Fir: no value from the bad row


def test_run_reports_a_bad_firm_row_and_exits_1_while_the_good_members_are_designed(tmp_path, capsys):
    job = tension_job(tmp_path, [verified(strength_row("f_v", 1.5)), strength_row("f_t", 5.5, status="")])
    assert main(["run", str(job), "--no-pdf", "--out", str(tmp_path / "out")]) == 1
    err = capsys.readouterr().err
    assert "error: firm.csv, row 3, column 'status'" in err
    results = json.loads((tmp_path / "out" / "rev-A" / "results.json").read_text())
    assert {m["mark"]: m["status"] for m in results["members"]} == {"T-1": "error", "C-1": "pass"}
    firm = next(f for f in results["data"]["files"] if f.get("name") == "firm.csv")
    assert firm["role"] == "firm data" and firm["values"] == 1 and "row 3" in firm["errors"][0]
    assert "1 bad rows refused" in DataSet(job / "firm.csv").firm.description  # on the cover and every sheet


BAD_FILES = [
    ("misspelt-column", "data,key,column,value,unit,staus\nsawn_strengths,k,value,5.5,MPa,verified\n", "did you mean 'status'"),
    ("passwd", "root:x:0:0:root:/root:/bin/bash\ndaemon:x:1:1:daemon:/usr/sbin:/usr/sbin/nologin\n",
     "is not a column of a firm data file"),
    ("a-b-c", "a,b,c\n1,2,3\n", "is not a column of a firm data file"),
    ("header-only", ",".join(HEADER) + "\n", "supplies no usable data value"),
    ("empty", "", "supplies no data values"),
    ("no-good-row", firm_csv([strength_row("f_t", 5.5, status="")]), "supplies no usable data value"),
    ("unclosed-quote", ",".join(HEADER) + f"\nsawn_strengths,{SPF}f_t,value,5.5,MPa,,6.3.1A,S1,to-verify,,,f_t,\"see\n"
     f"sawn_strengths,{SPF}f_c,value,11.5,MPa,,6.3.1A,S1,to-verify,,,f_c,\n", "runs across lines"),
]


@pytest.mark.parametrize("text,problem", [c[1:] for c in BAD_FILES], ids=[c[0] for c in BAD_FILES])
def test_a_firm_file_that_supplies_nothing_is_refused(tmp_path, text, problem, capsys):
    job = tension_job(tmp_path, [])
    (job / "firm.csv").write_text(text, encoding="utf-8")
    with pytest.raises(JobError, match=problem):
        DataSet(job / "firm.csv")
    assert main(["run", str(job), "--no-pdf", "--out", str(tmp_path / "out")]) == 2
    assert "firm.csv" in capsys.readouterr().err
    assert not (tmp_path / "out").exists()


@pytest.mark.parametrize("species,grade", [("Firm-Cedar", "No.1/No.2"), ("S-P-F", "Select")],
                         ids=["firm-species", "firm-grade"])
def test_firm_file_may_add_a_species_or_grade_that_the_schedule_then_accepts(tmp_path, species, grade):
    values = {"f_b": 9.0, "f_v": 1.2, "f_c": 10.0, "f_cp": 4.0, "f_t": 5.0, "E": 8000, "E05": 5500}
    key = f"species={species}; grade={grade}; category=dimension; property="
    rows = [verified({"data": "sawn_strengths", "key": key + p, "value": v, "unit": "MPa"}) for p, v in values.items()]
    job = write_job(tmp_path / "job", [member_row("T-1", type="tension", species=species, grade=grade, P_D="5",
                                                  Ly="")], extra=FIRM_LINE)
    (job / "firm.csv").write_text(firm_csv(rows), encoding="utf-8")
    data, designs = job_designs(load_project(job))
    assert designs[0].status == "pass", designs[0].errors
    assert designs[0].context.strengths.values["f_t"].value == 5.0
    assert designs[0].context.strengths.values["f_t"].firm == "firm.csv"
    (job / "project.toml").write_text((job / "project.toml").read_text().replace(FIRM_LINE, ""))
    _, designs = job_designs(load_project(job))
    assert designs[0].status == "error" and ("species" in designs[0].errors[0] or "grade" in designs[0].errors[0])


def test_compare_lists_the_differences_from_the_built_in_data(tmp_path):
    path = tmp_path / "firm.csv"
    path.write_text(firm_csv([strength_row("f_t", 6.0, status="to-verify"), strength_row("f_b", 11.8, status="to-verify"),
                              {"data": "resistance_factors", "key": "action=tension", "value": 0.9,
                               "status": "to-verify"}]), encoding="utf-8")
    lines, differ = compare(path)
    assert differ == 1
    assert any("f_t" in ln and "firm 6, built-in 5.5" in ln for ln in lines)
    assert not any("f_b" in ln for ln in lines[1:])


def test_data_warns_that_a_member_not_designed_has_no_values_listed(tmp_path, capsys):
    job = write_job(tmp_path / "job", [member_row("OK-1"), member_row("BAD-1", species="Oak")])
    assert main(["data", str(job)]) == 0
    err = capsys.readouterr().err
    assert "BAD-1 could not be designed" in err and "OK-1" not in err


def test_firm_file_written_by_the_tool_lists_every_value_to_verify_and_is_never_overwritten(tmp_path):
    job = demo_copy(tmp_path)
    target = tmp_path / "firm-data.csv"
    assert main(["data", str(job), "--firm-file", str(target)]) == 0
    rows = list(csv.DictReader(target.open(encoding="utf-8")))
    assert rows and {r["status"] for r in rows} == {"to-verify"}
    assert list(rows[0]) == list(HEADER)
    before = target.read_bytes()
    assert main(["data", str(job), "--firm-file", str(target)]) == 2
    assert target.read_bytes() == before
    assert DataSet(target).firm.errors == []  # the tool's own file reads back clean


def test_demo_example_firm_file_is_to_verify_and_covers_the_demo(tmp_path):
    example = DEMO / "firm-data-example.csv"
    rows = list(csv.DictReader(example.open(encoding="utf-8")))
    assert {r["status"] for r in rows} == {"to-verify"}  # nobody here has checked the standard
    job = demo_copy(tmp_path)
    with (job / "project.toml").open("a", encoding="utf-8") as f:
        f.write('\n[data]\nmaterials = "firm-data-example.csv"\n')
    data, designs = job_designs(load_project(job))
    assert not data.firm.errors and all(not d.errors for d in designs)
    missing = [v.label for d in designs for v in d.data_values if v.data in TABLES and not v.firm]
    assert not missing, ("the demo uses values the example firm file lacks; rewrite it: rm " f"{example}; "
                         f"timbersheets data {DEMO} --firm-file {example}", missing[:5])


def test_data_listing_names_every_value_with_its_members(tmp_path, capsys):
    job = demo_copy(tmp_path)
    assert main(["data", str(job), "--csv"]) == 0
    listed = list(csv.DictReader(io.StringIO(capsys.readouterr().out)))
    data, designs = job_designs(load_project(job))
    used = {(v.data.removesuffix(".csv"), v.key, v.column) for d in designs for v in d.data_values}
    assert {(r["data"], r["key"], r["column"]) for r in listed} == used
    f_b = next(r for r in listed if r["key"] == SPF + "f_b")
    assert f_b["value"] == "11.8" and f_b["unit"] == "MPa" and f_b["status"] == "sourced"
    users = {d.mark for d in designs if any(v.key == SPF + "f_b" for v in d.data_values)}
    assert set(f_b["members"].split()) == users
    assert len(all_items(DataSet())) > len(listed)
