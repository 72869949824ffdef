"""Shared helpers: build schedules from rows, design one member."""

from __future__ import annotations

import csv
import io
import re
import shutil
from pathlib import Path

import pytest

from timbersheets.engineering.data import DataSet
from timbersheets.engineering.sizing import design_sized
from timbersheets.schedule.read import load_schedule

REPO = Path(__file__).resolve().parent.parent


def readme_commands(heading: str) -> list[str]:
    """The shell commands of the first ```sh block under `heading` in README.md, comments cut off."""
    section = (REPO / "README.md").read_text(encoding="utf-8").split(heading, 1)[1]
    block = re.search(r"```sh\n(.*?)```", section, re.S).group(1)
    return [line.split("  #")[0].strip() for line in block.splitlines() if line.strip()]
DEMO = REPO / "calcsheets" / "kestrel-cove-boathouse"


@pytest.fixture(scope="session")
def data() -> DataSet:
    return DataSet()


@pytest.fixture(scope="session")
def demo_run(tmp_path_factory):
    """One full run of the demo job (notebooks, sheets, package), shared by the pipeline tests."""
    import json

    from timbersheets.run.runner import RunOptions, run_job

    root = tmp_path_factory.mktemp("demo")
    job = root / "kestrel-cove-boathouse"
    shutil.copytree(DEMO, job)
    report = run_job(job, RunOptions(out=root / "out", progress=False))
    return report, json.loads((report.outdir / "results.json").read_text())


def write_schedule(folder: Path, rows: list[dict[str, str]], name: str = "schedule.csv") -> Path:
    header: list[str] = []
    for row in rows:
        header += [k for k in row if k not in header]
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=header, lineterminator="\n")
    writer.writeheader()
    writer.writerows(rows)
    path = folder / name
    path.write_text(buffer.getvalue(), encoding="utf-8")
    return path


def write_job(folder: Path, rows: list[dict[str, str]], revision: str = "A", extra: str = "") -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "project.toml").write_text(
        f'[project]\ntitle = "Test job"\nnumber = "T-01"\nrevision = "{revision}"\ndate = "2026-12-01"\n'
        f'designer = "MT"\nchecker = "RD"\n{extra}', encoding="utf-8")
    write_schedule(folder, rows)
    return folder


# The hand calculations and published examples of the tests take the dead load as given (it includes the
# member's own weight), so the base row says self_weight = no; the own-weight tests set it to yes.
BASE = {"type": "compression", "material": "sawn", "species": "S-P-F", "grade": "No.1/No.2",
        "size": "38x140", "length": "3.0", "Ly": "0", "P_D": "5", "self_weight": "no"}



def failing_templates(folder: Path, mark: str, monkeypatch, message: str = "stopped here") -> Path:
    """A copy of the templates in `folder` whose axial notebook raises RuntimeError(`message`) for
    member `mark` (a real failing execution, not a mock), in use through $TIMBERSHEETS_TEMPLATES."""
    import nbformat

    from timbersheets.build.notebooks import templates_dir

    shutil.copytree(templates_dir(), folder)
    nb = nbformat.read(folder / "axial.ipynb", 4)
    nb.cells.insert(5, nbformat.v4.new_code_cell(f'if member["mark"] == {mark!r}:\n    raise RuntimeError({message!r})'))
    nbformat.write(nb, folder / "axial.ipynb")
    monkeypatch.setenv("TIMBERSHEETS_TEMPLATES", str(folder))
    return folder


def member_row(mark: str = "M-1", **cells: str) -> dict[str, str]:
    return {"mark": mark, **BASE, **cells}


def design_row(tmp_path: Path, data: DataSet, **cells: str):
    """Validate one row through the real schedule reader and design it."""
    schedule = load_schedule(write_schedule(tmp_path, [member_row(**cells)]))
    assert not schedule.rejected, [str(e) for r in schedule.rejected for e in r.errors]
    return design_sized(schedule.members[0], data)
