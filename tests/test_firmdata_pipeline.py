"""Firm data on the typeset sheets, the package cover and the verification sheet (real xelatex)."""

from __future__ import annotations

import csv
import json
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from conftest import REPO, readme_commands
from test_firmdata import firm_csv, tension_job, verified
from timbersheets.build.datasheet import write_sheet
from timbersheets.job.datacheck import firm_rows, job_designs, used_items
from timbersheets.job.project import load_project
from timbersheets.run.runner import RunOptions, run_job

pytestmark = pytest.mark.pipeline


def pdf_text(path: Path, layout: bool = False) -> str:
    args = ["pdftotext", *(["-layout"] if layout else []), str(path), "-"]
    return subprocess.run(args, capture_output=True, text=True, check=True).stdout


def pdf_words(path: Path) -> str:
    return re.sub(r"\s+", " ", pdf_text(path))


@pytest.fixture(scope="module")
def verified_job(tmp_path_factory):
    """A two-member job whose firm file verifies every value it uses, one of them corrected (f_t 6.0)."""
    root = tmp_path_factory.mktemp("firm")
    job = tension_job(root, [verified({"data": "resistance_factors", "key": "action=tension", "value": 0.9})])
    data, designs = job_designs(load_project(job))
    rows = [verified(r, value=6.0 if r["item"] == "f_t S-P-F No.1/No.2 dimension" else r["value"])
            for r in firm_rows(used_items(data, designs))]
    (job / "firm.csv").write_text(firm_csv(rows), encoding="utf-8")
    report = run_job(job, RunOptions(out=root / "out", jobs=1, progress=False))
    return job, report, load_project(job)


def test_sheets_and_cover_name_the_firm_file_and_list_nothing_unverified(verified_job):
    job, report, project = verified_job
    data, _ = job_designs(project)
    short = data.firm.short_hash
    assert {d.mark: d.status for d in report.designs} == {"T-1": "pass", "C-1": "pass"}
    cover = pdf_words(report.outdir / "package.pdf")
    assert "firm data file firm.csv" in cover and short in cover and "RD on 2026-11-30" in cover
    assert "No data value used in this package is unverified" in cover
    for mark in ("T-1", "C-1"):
        sheet = pdf_words(report.outdir / "sheets" / f"{mark}.pdf")
        assert "not yet verified" not in sheet and "memory, unverified (" not in sheet
        assert "firm.csv" in sheet and short in sheet
    t1 = pdf_words(report.outdir / "sheets" / "T-1.pdf")
    assert "differs from the built-in value 5.5" in t1 and "firm value, built-in 5.5" in t1


def test_verification_sheet_holds_every_value_the_job_uses(verified_job, tmp_path):
    job, _, project = verified_job
    data, designs = job_designs(project)
    items = used_items(data, designs)
    pdf = write_sheet(project, data, items, tmp_path)
    text, lines = pdf_words(pdf), pdf_text(pdf, layout=True).splitlines()
    assert "DATA VERIFICATION" in text and "licensed professional engineer" in text
    assert all(word in text for word in ("Tick", "correct", "Checked by", "Date", "Edition checked"))
    assert any(i.datum.label == "f_t S-P-F No.1/No.2 dimension" and i.datum.value == 6.0 for i in items)
    for item in items:  # each value on the line that names it, as the sheet's table prints it
        keys = item.keys
        what = (" ".join(keys[k] for k in ("species", "grade", "category") if keys.get(k)) + f", {item.what}"
                if keys.get("species") else item.what)
        pattern = re.compile(re.escape(what) + r"\s+" + re.escape(f"{item.datum.value:g}") + r"\s")
        assert any(pattern.search(line) for line in lines), (what, item.datum.value)



def test_readme_steps_reach_zero_unverified_values(tmp_path):
    root = tmp_path / "repo"
    shutil.copytree(REPO / "calcsheets", root / "calcsheets")
    venv_bin = Path(sys.executable).parent
    outputs = []
    for step in readme_commands("## Verified data"):
        if step.startswith("# edit"):  # what the engineer does: verify every row (values as the standard gives)
            firm = root / "calcsheets" / "data-demo" / "firm-data.csv"
            rows = list(csv.DictReader(firm.open(encoding="utf-8")))
            firm.write_text(firm_csv([verified(r) for r in rows]), encoding="utf-8")
            continue
        command = step.replace(".venv/bin/", f"{venv_bin}/")
        if " run " in command:
            command += " --no-pdf"  # the typeset sheets and cover are checked above, on a smaller job
        done = subprocess.run(command, shell=True, cwd=root, capture_output=True, text=True)
        assert done.returncode in (0, 1), (step, done.stderr)  # the demo has one deliberately failing member
        outputs.append(done.stdout)
    assert "; 0 unverified" not in outputs[1].splitlines()[0]
    assert (root / "outputs" / "data-demo" / "data-verification-rev-A.pdf").exists()
    assert "; 0 unverified," in outputs[-2].splitlines()[0]
    results = json.loads((root / "outputs" / "data-demo" / "rev-A" / "results.json").read_text())
    assert all(m["data_warnings"] == [] for m in results["members"])
    assert any(f.get("name") == "firm-data.csv" for f in results["data"]["files"])
