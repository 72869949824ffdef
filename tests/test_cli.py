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
