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


def test_a_cached_notebooks_record_is_read_once_then_kept_beside_it(tmp_path):
    """The result record a cached notebook displayed is parsed from the notebook once (a few hundred
    kB of JSON a member, on every rerun), then read from the small record file kept beside it; a
    notebook just executed is read again, and its record kept in place of the old one."""
    import json

    from timbersheets.build.notebooks import templates_dir
    from timbersheets.build.sheetjobs import SheetOutcome, SheetTask, _take_notebook
    from timbersheets.constants import RESULT_MIME

    def notebook(status: str) -> str:
        return json.dumps({"cells": [{"cell_type": "code", "outputs": [
            {"output_type": "display_data", "data": {RESULT_MIME: {"mark": "T-1", "status": status}}}]}]})

    cache = tmp_path / "cache"
    cache.mkdir()
    task = SheetTask("T-1", templates_dir() / "axial.ipynb", {"mark": "T-1"}, {}, "", cache, tmp_path / "rev" / "T-1.ipynb", None)
    task.cached_notebook.write_text(notebook("pass"))
    first = SheetOutcome("T-1")
    _take_notebook(task, first)
    assert first.record == {"mark": "T-1", "status": "pass"} and first.error is None
    assert json.loads(task.notebook.read_text()) == json.loads(notebook("pass"))
    # the record file, not the notebook, answers the next time
    task.cached_notebook.write_text(notebook("fail"))
    again = SheetOutcome("T-1")
    _take_notebook(task, again)
    assert again.record["status"] == "pass"
    # a notebook just executed (a forced rerun, or a lost entry made again) is read itself
    rerun = SheetOutcome("T-1", executed=True)
    _take_notebook(task, rerun)
    assert rerun.record["status"] == "fail"
    again = SheetOutcome("T-1")
    _take_notebook(task, again)
    assert again.record["status"] == "fail"



def test_the_unit_registry_reads_pints_cache_and_survives_a_damaged_one(tmp_path):
    """pint's parsed definitions are kept in a cache folder (0.18 s a process to 0.02 s); a cache
    left damaged (a killed write) is not trusted: the registry is built from pint's files and
    converts the same (1 kN·m = 10^6 N·mm, 1 kN/m = 1 N/mm: arithmetic of the SI prefixes)."""
    import subprocess
    import sys

    probe = ("from timbersheets.engineering.units import registry\n"
             "q = registry().Quantity\n"
             "print(q(1, 'kN*m').to('N*mm').magnitude, q(1, 'kN/m').to('N/mm').magnitude)")
    env = {**__import__("os").environ, "XDG_CACHE_HOME": str(tmp_path)}

    def run() -> list[str]:
        done = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, env=env, check=True)
        return done.stdout.split()

    assert run() == ["1000000.0", "1.0"]
    pickles = list((tmp_path / "timbersheets").rglob("*.pickle"))
    assert pickles  # the cache was written
    for path in pickles:
        path.write_bytes(path.read_bytes()[:40])  # cut short, as by a killed write
    assert run() == ["1000000.0", "1.0"]
    assert run() == ["1000000.0", "1.0"]  # and the cache written anew
    assert all(p.stat().st_size > 40 for p in (tmp_path / "timbersheets").rglob("*.pickle"))
    blocked = tmp_path / "a-file"
    blocked.write_text("not a folder")
    env["XDG_CACHE_HOME"] = str(blocked)  # no cache can be made there: the registry is built all the same
    assert run() == ["1000000.0", "1.0"]
