"""The first commands a new user types: `new`, `run`, the help text."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

CLI = [sys.executable, "-m", "timbersheets.cli"]


def cli(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess:
    return subprocess.run([*CLI, *args], capture_output=True, text=True, cwd=cwd)


def test_new_scaffold_designs_as_written(tmp_path):
    job = tmp_path / "harbour-hall"
    assert cli("new", str(job)).returncode == 0
    done = cli("run", str(job), "--no-pdf", "--out", str(tmp_path / "out"), "--jobs", "1")
    assert done.returncode == 0, done.stdout + done.stderr
    results = json.loads((tmp_path / "out" / "rev-A" / "results.json").read_text(encoding="utf-8"))
    members = results["members"]
    assert members and all(m["status"] == "pass" and not m["errors"] for m in members), members
    assert {m["checks"][0]["check"] for m in members} == {"compression", "bending"}  # a post and a joist


def test_only_refuses_an_unknown_mark(tmp_path):
    from conftest import member_row, write_job

    job = write_job(tmp_path / "job", [member_row("C-1"), member_row("C-2")])
    done = cli("run", str(job), "--no-pdf", "--out", str(tmp_path / "out"), "--only", "C-1,ZZZ")
    assert done.returncode == 2
    assert "ZZZ" in done.stderr and "C-2" in done.stderr  # names the unknown mark and the marks there are
    assert not (tmp_path / "out" / "rev-A").exists()  # nothing was written


def test_help_is_specific_to_each_command():
    run_help = cli("run", "--help").stdout
    assert "--out OUTDIR" in run_help and "OUTDIR/rev-<R>/" in run_help
    assert "still designed" in " ".join(run_help.split())  # what --only does to the others
    run_exit = "1 a member fails or has an error"
    assert run_exit in " ".join(run_help.split())
    for command in ("new", "size", "diff", "review", "columns", "data", "doctor"):
        text = " ".join(cli(command, "--help").stdout.split())
        assert run_exit not in text, command
        assert "Exit status:" in text, command
    for command in ("diff", "review"):
        assert "--out OUTDIR" in cli(command, "--help").stdout, command


def test_outputs_go_by_where_the_job_is_never_by_where_the_command_runs(tmp_path):
    from conftest import member_row, write_job

    elsewhere = tmp_path / "somewhere-else"
    elsewhere.mkdir()
    loose = write_job(tmp_path / "jobs" / "loose-job", [member_row("C-1")])
    kept = write_job(tmp_path / "repo" / "calcsheets" / "kept-job", [member_row("C-1")])
    for job, expected in ((loose, tmp_path / "jobs" / "outputs" / "loose-job" / "rev-A"),
                          (kept, tmp_path / "repo" / "outputs" / "kept-job" / "rev-A")):
        done = cli("run", str(job), "--no-pdf", cwd=elsewhere)
        assert done.returncode == 0, done.stderr
        assert (expected / "results.json").exists()
        assert done.stdout.splitlines()[-1] == f"outputs: {expected.resolve()}"  # printed at the end
    assert not any(elsewhere.iterdir())  # nothing where the command was run
