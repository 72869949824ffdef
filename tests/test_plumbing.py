"""Plumbing done once: one copy of the cautions, exit codes carried by the errors, tracebacks kept."""

import ast
from pathlib import Path

from conftest import member_row, write_job
from timbersheets.cli import main
from timbersheets.constants import CAUTION, SHORT_CAUTION
from timbersheets.engineering import driver
from timbersheets.errors import DataError, ExitCode, JobError, ScheduleError, UsageError
from timbersheets.run.runner import RunOptions, run_job

REPO = Path(__file__).resolve().parent.parent


def test_the_caution_is_written_once():
    # the words of the caution appear in constants.py and nowhere else the program reads
    places = [p for p in [*(REPO / "lib").rglob("*.py"), *(REPO / "templates").rglob("*.j2")]
              if "licensed professional engineer" in p.read_text(encoding="utf-8")]
    assert [p.name for p in places] == ["constants.py"]
    assert "licensed professional engineer" in CAUTION and "authority having jurisdiction" in SHORT_CAUTION


def test_the_cli_returns_no_literal_exit_status():
    tree = ast.parse((REPO / "lib" / "timbersheets" / "cli.py").read_text(encoding="utf-8"))
    literal = [node.lineno for node in ast.walk(tree) if isinstance(node, ast.Return)
               and isinstance(node.value, ast.Constant) and isinstance(node.value.value, int)]
    assert literal == []


def test_errors_carry_their_exit_code():
    # the documented contract: 2 = the job itself is unusable, or the command cannot act
    for error in (JobError("p", "x"), ScheduleError("f", 2, "c", "v", "x"), DataError("f", "x"), UsageError("x")):
        assert error.exit_code == ExitCode.UNUSABLE == 2


def test_a_usage_error_exits_2_with_its_message(tmp_path, capsys):
    job = write_job(tmp_path / "job", [member_row("OK-1")])
    assert main(["new", str(job)]) == 2
    assert "already holds a job; nothing was changed" in capsys.readouterr().err


def test_an_internal_error_leaves_its_traceback_in_run_log(tmp_path, monkeypatch):
    def defective(ctx, cases, kind):
        return [1 / 0]  # a deliberate defect in the design driver

    monkeypatch.setattr(driver, "run_checks", defective)
    job = write_job(tmp_path / "job", [member_row("OK-1")])
    report = run_job(job, RunOptions(out=tmp_path / "out", sheets=False, progress=False))
    assert report.designs[0].status == "error"
    assert "ZeroDivisionError" in report.designs[0].errors[0]
    log = (report.outdir / "run.log").read_text(encoding="utf-8")
    assert "OK-1: traceback of the internal error" in log
    assert "Traceback (most recent call last)" in log and "in defective" in log


def test_batches_share_the_heavy_sheets_and_keep_schedule_order():
    """A schedule of ties then girders on two workers: each batch gets its share of both (the run
    ends when the busiest worker does), every member once, and schedule order within a batch."""
    from timbersheets.build.sheetjobs import SheetTask, batches

    def task(mark: str, template: str) -> SheetTask:
        return SheetTask(mark, Path(f"{template}.ipynb"), {}, {}, "", Path("."), Path(f"{mark}.ipynb"), None)

    tasks = [task(f"T-{i}", "axial") for i in range(20)] + [task(f"G-{i}", "bending") for i in range(20)]
    made = batches(tasks, 2)
    assert len(made) == 2 and sorted(t.mark for b in made for t in b) == sorted(t.mark for t in tasks)
    for batch in made:
        assert sum(t.mark.startswith("G-") for t in batch) == 10
        assert [tasks.index(t) for t in batch] == sorted(tasks.index(t) for t in batch)

