"""The checker's verdicts: an "ok" must mean the member passes (or say why), and the
cover, the index and `review --status` count verdicts by one rule."""

from __future__ import annotations

import json
import subprocess

import pytest

from conftest import member_row, write_job
from timbersheets.build.package import package_tex
from timbersheets.cli import main
from timbersheets.engineering.data import DataSet
from timbersheets.job.project import load_project
from timbersheets.job.review import count_text
from timbersheets.run.runner import RunOptions, run_job

# P_D = 500 kN on a 38x140 S-P-F stud fails by far (its resistance is a few kN): common practice.
ROWS = [member_row("OK-1"), member_row("OK-2"), member_row("BIG", P_D="500"), member_row("BAD", grade="No.7")]


@pytest.fixture
def job(tmp_path):
    folder = write_job(tmp_path / "job", ROWS)
    run_job(folder, RunOptions(out=tmp_path / "out", sheets=False, progress=False))
    return folder, tmp_path / "out"


def review(job, *args):
    folder, out = job
    return main(["review", str(folder), "--out", str(out), *args])


def test_ok_on_a_failing_or_errored_member_needs_a_comment(job, capsys):
    for mark in ("BIG", "BAD"):
        assert review(job, "--mark", mark, "--by", "RD", "--verdict", "ok") == 2
        assert mark in capsys.readouterr().err
    assert not (job[0] / "review.csv").exists()  # nothing was recorded
    assert review(job, "--all", "--by", "RD", "--verdict", "ok") == 2  # --all includes them
    assert review(job, "--mark", "BIG", "--by", "RD", "--verdict", "revise") == 0
    assert review(job, "--mark", "BAD", "--by", "RD", "--verdict", "ok",
                  "--comment", "row replaced by BAD-2 in rev B; not built") == 0
    assert review(job, "--mark", "OK-1", "--by", "RD", "--verdict", "ok") == 0


def test_revise_counts_the_same_on_cover_index_and_status(job, capsys):
    folder, out = job
    assert review(job, "--mark", "OK-1", "--by", "RD", "--verdict", "ok") == 0
    assert review(job, "--mark", "OK-2", "--by", "RD", "--verdict", "revise", "--comment", "use 38x184") == 0
    run_job(folder, RunOptions(out=out, sheets=False, progress=False))  # the verdicts into results.json
    doc = json.loads((out / "rev-A" / "results.json").read_text())
    expected = "1 of 4 members checked ok, 1 to revise, 2 not checked"
    assert count_text([m["review"] for m in doc["members"]]) == expected

    capsys.readouterr()
    assert review(job, "--status") == 1
    printed = capsys.readouterr().out
    assert f"rev A: {expected}" in printed
    assert "OK-2" in printed and "revise" in printed and "use 38x184" in printed  # the comment is shown
    assert "OK-1 " not in printed  # checked ok: nothing left to do

    tex, _ = package_tex(load_project(folder), doc, DataSet(), out / "rev-A", [], "")
    cover, index = tex.split("Index of members", 1)
    assert expected in cover and expected in index


@pytest.mark.pipeline
def test_the_checkers_comment_is_on_the_sheet(tmp_path):
    folder, out = write_job(tmp_path / "job", [member_row("C-1")]), tmp_path / "out"
    run_job(folder, RunOptions(out=out, jobs=1, progress=False))
    assert main(["review", str(folder), "--out", str(out), "--mark", "C-1", "--by", "RD", "--verdict", "revise",
                 "--comment", "Confirm the post base detail"]) == 0
    again = run_job(folder, RunOptions(out=out, jobs=1, progress=False))
    assert again.executed == []  # a review retypesets; nothing is re-executed
    sheet = subprocess.run(["pdftotext", str(out / "rev-A" / "sheets" / "C-1.pdf"), "-"], capture_output=True,
                           text=True, check=True).stdout
    assert "Checker’s comment" in sheet  # TeX sets ' as a typographic apostrophe
    assert "RD, 20" in sheet and "revise: Confirm the post base detail" in sheet


def test_the_checkers_comment_is_on_the_html_sheet():
    import nbformat

    from timbersheets.sheet.htmlsheet import sheet_html

    block = {"mark": "C-1", "checked": "RD 2026-12-02 (revise)",
             "review_comment": "RD, 2026-12-02, revise: Confirm the post base detail"}
    page = sheet_html(nbformat.v4.new_notebook(), block)
    assert "Checker\u2019s comment" in page and "revise: Confirm the post base detail" in page


def test_a_review_after_the_schedule_changed_is_refused_until_the_run(job, capsys):
    """A verdict is tied to the inputs the sheets show: the review refuses a member whose row changed
    after the last run (whether the review reads the run's record of its files or designs again), takes
    the others, and takes all once the files are back as the run read them."""
    folder, out = job
    schedule = folder / "schedule.csv"
    ran = schedule.read_text()
    write_job(folder, [member_row("OK-1", P_D="7"), *ROWS[1:]])  # OK-1's dead load changed, nothing else
    assert review(job, "--mark", "OK-1", "--by", "RD", "--verdict", "ok") == 2
    assert "OK-1" in capsys.readouterr().err and not (folder / "review.csv").exists()
    assert review(job, "--mark", "OK-2", "--by", "RD", "--verdict", "ok") == 0  # its row is as the run read it
    schedule.write_text(ran)
    assert review(job, "--mark", "OK-1", "--by", "RD", "--verdict", "ok") == 0
    assert "OK-1" in (folder / "review.csv").read_text()
