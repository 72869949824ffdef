"""Set-up without make or root: `timbersheets doctor`, and HTML sheets as the path without TeX."""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from conftest import REPO, member_row, write_job

VENV_BIN = str(Path(sys.executable).parent)


def doctor(path: str | None = None) -> subprocess.CompletedProcess:
    env = {**os.environ, "PATH": path if path is not None else os.environ["PATH"]}
    return subprocess.run([sys.executable, "-m", "timbersheets.cli", "doctor"], capture_output=True, text=True,
                          env=env)


def test_doctor_without_tex_says_how_to_get_it_and_offers_html():
    done = doctor(path=VENV_BIN)  # the virtual environment only: no xelatex on PATH
    assert done.returncode == 1, done.stdout + done.stderr
    out = " ".join(done.stdout.split())
    assert "ok Python: 3." in out and "ok timbersheets package" in out
    assert "MISSING xelatex" in out
    for system in ("Windows: install MiKTeX", "macOS: install MacTeX", "Linux: sudo apt-get install"):
        assert system in out
    assert "--format html" in out  # the path that needs no TeX


def test_doctor_checks_every_package_the_layouts_load():
    from timbersheets.build.doctor import layout_packages

    names = layout_packages(REPO / "templates")
    # read from the layouts themselves, so a package added to a layout is checked too
    assert {"fontspec", "fancyhdr", "lastpage", "titlesec", "longtable", "booktabs"} <= set(names)
    assert len(names) == len(set(names))


@pytest.mark.pipeline
@pytest.mark.skipif(shutil.which("xelatex") is None, reason="needs xelatex")
def test_doctor_ready_where_tex_and_fonts_are_installed():
    done = doctor()
    assert done.returncode == 0, done.stdout
    assert "ok      fonts: Latin Modern Roman, DejaVu Sans: typeset" in done.stdout
    assert "ready" in done.stdout.splitlines()[-1]


@pytest.mark.pipeline
def test_html_sheets_need_no_tex(tmp_path):
    job = write_job(tmp_path / "job", [member_row("C-1")])
    env = {**os.environ, "PATH": VENV_BIN}  # no xelatex
    done = subprocess.run([sys.executable, "-m", "timbersheets.cli", "run", str(job), "--format", "html", "--jobs",
                           "1", "--out", str(tmp_path / "out")], capture_output=True, text=True, env=env)
    assert done.returncode == 0, done.stdout + done.stderr
    assert (tmp_path / "out" / "rev-A" / "sheets" / "C-1.html").stat().st_size > 1000
    assert (tmp_path / "out" / "rev-A" / "index.html").exists()
