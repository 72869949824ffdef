"""The README's revision loop works as written (on a copy of the repository's jobs)."""

from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from conftest import REPO, readme_commands

pytestmark = pytest.mark.pipeline



def test_readme_loop_runs_as_written(tmp_path):
    root = tmp_path / "repo"
    shutil.copytree(REPO / "calcsheets", root / "calcsheets")
    venv_bin = Path(sys.executable).parent
    codes = []
    outputs = []
    for command in readme_commands("## The revision loop"):
        command = command.replace(".venv/bin/", f"{venv_bin}/")
        done = subprocess.run(command, shell=True, cwd=root, capture_output=True, text=True)
        codes.append(done.returncode)
        outputs.append(done.stdout + done.stderr)
    joined = "\n".join(outputs)
    assert codes[0] == 0 and codes[2] == 0  # cp; review
    assert codes[1] in (0, 1) and codes[5] in (0, 1)  # runs: the demo has one deliberately failing member
    assert "P_L: 62 kN -> 70 kN" in outputs[6]
    assert "C-3          stale" in outputs[7] and codes[7] == 1
    assert "nothing is written" in outputs[8]
    log_b = (root / "outputs" / "loop-demo" / "rev-B" / "run.log").read_text().splitlines()[0]
    assert " 1 executed" in log_b, log_b
    assert (root / "outputs" / "loop-demo" / "rev-A" / "package.pdf").exists(), joined
