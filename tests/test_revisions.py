"""Revisions, diff, the checker's review, summary.csv safety and what-if."""

from __future__ import annotations

import csv
import json
import shutil
import subprocess

import pytest

from conftest import DEMO, member_row, write_job
from timbersheets.cli import main
from timbersheets.run.runner import RunOptions, run_job

pytestmark = pytest.mark.pipeline


def text(pdf) -> str:
    return subprocess.run(["pdftotext", "-layout", str(pdf), "-"], capture_output=True, text=True, check=True).stdout


def results(outdir) -> dict:
    return {m["mark"]: m for m in json.loads((outdir / "results.json").read_text())["members"]}


def test_revision_loop_run_change_rerun_diff_review(tmp_path, capsys):
    rows = [member_row("R-1"), member_row("R-2", P_D="6", P_L="4"), member_row("R-3", type="tension", P_D="3")]
    job = write_job(tmp_path / "job", rows)
    out = tmp_path / "out"
    first = run_job(job, RunOptions(out=out, progress=False))
    assert sorted(first.executed) == ["R-1", "R-2", "R-3"]
    assert (out / "rev-A" / "inputs" / "schedule.csv").read_text() == (job / "schedule.csv").read_text()
    assert main(["review", str(job), "--all", "--by", "RD", "--verdict", "ok", "--out", str(out)]) == 0
    assert main(["review", str(job), "--status", "--out", str(out)]) == 0

    rows[1]["P_L"] = "9"  # the load change
    write_job(tmp_path / "job", rows, revision="B")
    (job / "review.csv").write_text((job / "review.csv").read_text())  # write_job keeps review.csv
    second = run_job(job, RunOptions(out=out, progress=False))
    assert second.executed == ["R-2"]  # only the changed member is re-executed
    after = results(out / "rev-B")
    assert after["R-2"]["changed_since"] == "A" and after["R-1"]["changed_since"] is None
    assert after["R-2"]["review"]["status"] == "stale"
    assert after["R-1"]["review"]["status"] == "checked" and after["R-3"]["review"]["status"] == "checked"
    assert (out / "rev-A" / "results.json").exists()  # the earlier revision is kept

    capsys.readouterr()
    assert main(["diff", str(job), "--from", "A", "--to", "B", "--out", str(out)]) == 0
    printed = capsys.readouterr().out
    assert "R-2" in printed and "P_L: 4 kN -> 9 kN" in printed and "R-1" not in printed
    with open(out / "rev-B" / "diff.csv", newline="") as handle:
        diff_rows = list(csv.DictReader(handle))
    assert {r["mark"] for r in diff_rows} == {"R-2"}
    assert {"item": "P_L", "old": "4 kN", "new": "9 kN"}.items() <= next(
        r for r in diff_rows if r["item"] == "P_L").items()

    sheet = text(out / "rev-B" / "sheets" / "R-2.pdf")
    assert "changed since A" in sheet and "changed since check" in sheet
    assert "RD 20" in text(out / "rev-B" / "sheets" / "R-1.pdf")
    package = text(out / "rev-B" / "package.pdf")
    assert "Changes since revision A" in package and "changed since A" in package
    assert main(["review", str(job), "--status", "--out", str(out)]) == 1

    # review records survive a rerun, and a fresh check clears the stale flag
    assert main(["review", str(job), "--mark", "R-2", "--by", "RD", "--verdict", "ok", "--out", str(out)]) == 0
    third = run_job(job, RunOptions(out=out, progress=False))
    assert third.executed == [] and third.converted == [] and third.stamped == ["R-2"]  # only its title block
    assert results(out / "rev-B")["R-2"]["review"]["status"] == "checked"
    assert main(["review", str(job), "--status", "--out", str(out)]) == 0
    assert len((job / "review.csv").read_text().splitlines()) == 1 + 3 + 1


def test_rerunning_a_revision_replaces_it_whole(tmp_path):
    job = write_job(tmp_path / "job", [member_row("K-1"), member_row("K-2")])
    out = tmp_path / "out"
    run_job(job, RunOptions(out=out, sheets=False))
    write_job(tmp_path / "job", [member_row("K-1")])
    run_job(job, RunOptions(out=out, sheets=False))
    assert list(results(out / "rev-A")) == ["K-1"]
    assert not list(out.glob(".rev-A.*"))  # no staging folder left behind


def test_summary_csv_cannot_inject_formulas(tmp_path):
    job = write_job(tmp_path / "job", [member_row("=HYPERLINK(1)", species="Oak"), member_row("-1.5"),
                                       member_row("@SUM", grade="x")])
    report = run_job(job, RunOptions(out=tmp_path / "out", sheets=False))
    with open(report.outdir / "summary.csv", newline="") as handle:
        cells = [c for row in csv.reader(handle) for c in row]
    # a cell a spreadsheet would run as a formula is quoted; a plain number such as the mark -1.5 is left
    # readable, as it is no formula (OWASP "CSV injection": =, +, -, @ lead a formula)
    assert "'=HYPERLINK(1)" in cells and "'@SUM" in cells and "-1.5" in cells
    assert all(not c.startswith(("=", "+", "@")) for c in cells), cells
    assert all(not c.startswith("-") or c.lstrip("-").replace(".", "", 1).isdigit() for c in cells), cells


def test_what_if_matches_a_hand_calculation(tmp_path, capsys):
    # Hand calculation, demo member T-1 (130x228 D.Fir-L 18t-E, wet, A_n = 0.85 A_g, 9.6 m), snow x 1.2.
    # Own weight (densities.csv, wet D.Fir-L glulam 637 kg/m³, memory): 637·9.81·0.130·0.228·9.6 = 1.78 kN
    #   scheduled: T_f = 1.25·(38 + 1.78) + 1.5·52 = 127.7 kN
    #   scaled:    T_f = 1.25·(38 + 1.78) + 1.5·(1.2·52) = 143.3 kN;  K_D = 1.0 (long-term 39.8 < 62.4)
    #   T_r = min(0.9·23.0·0.75·25 194, 0.9·17.9·0.75·29 640) = 358.1 kN → 127.7/358.1 = 0.357, 143.3/358.1 = 0.400
    job = tmp_path / "demo"
    shutil.copytree(DEMO, job)
    code = main(["run", str(job), "--scale", "S=1.2"])
    printed = capsys.readouterr().out
    line = next(ln for ln in printed.splitlines() if ln.strip().startswith("T-1 "))
    assert "0.357 ->  0.400" in line
    assert "nothing is written" in printed
    assert not (tmp_path / "outputs").exists() and not (job / "outputs").exists()
    assert code == 1  # the demo's deliberately undersized post still fails


def test_inserting_a_row_above_leaves_checks_and_revision_marks_alone(tmp_path):
    # Common practice: a check belongs to the member's inputs, not to where its row sits.
    job = write_job(tmp_path / "job", [member_row("K-1"), member_row("K-2", P_D="6")])
    out = tmp_path / "out"
    run_job(job, RunOptions(out=out, sheets=False))
    assert main(["review", str(job), "--all", "--by", "RD", "--verdict", "ok", "--out", str(out)]) == 0
    write_job(tmp_path / "job", [member_row("K-0", P_D="2"), member_row("K-1"), member_row("K-2", P_D="6")],
              revision="B")
    run_job(job, RunOptions(out=out, sheets=False))
    after = results(out / "rev-B")
    assert after["K-1"]["row"] == 3 and after["K-1"]["review"]["status"] == "checked"
    assert after["K-1"]["changed_since"] is None and after["K-2"]["changed_since"] is None
    assert after["K-0"]["changed_since"] == "A"
