"""A run that makes no PDFs (--no-pdf, --format html) or only some (--only) keeps the
revision's sheets that are still current and drops the out-of-date ones, saying which."""

from __future__ import annotations

import json

import pytest

from conftest import member_row, write_job
from timbersheets.run.runner import RunOptions, run_job

pytestmark = pytest.mark.pipeline


def run(job, out, **kw):
    report = run_job(job, RunOptions(out=out, jobs=1, progress=False, **kw))
    rev = out / "rev-A"
    return report, json.loads((rev / "results.json").read_text()), (rev / "run.log").read_text()


def test_runs_without_pdfs_keep_current_sheets_and_name_stale_ones(tmp_path):
    rows = [member_row("P-1"), member_row("P-2")]
    job, out = write_job(tmp_path / "job", rows), tmp_path / "out"
    rev = out / "rev-A"
    run(job, out)
    made = {name: (rev / name).read_bytes() for name in ("sheets/P-1.pdf", "sheets/P-2.pdf", "package.pdf")}

    _, results, log = run(job, out, sheets=False)  # nothing changed: every PDF is still current
    assert {name: (rev / name).read_bytes() for name in made} == made
    assert results["carried_over"]["out_of_date"] == []
    assert "sheets/P-1.pdf" in results["carried_over"]["kept"] and "package.pdf" in log

    write_job(tmp_path / "job", [member_row("P-1", P_D="6"), member_row("P-2")])  # P-1's load changes
    _, results, log = run(job, out, sheets=False)
    assert (rev / "sheets" / "P-2.pdf").read_bytes() == made["sheets/P-2.pdf"]
    assert not (rev / "sheets" / "P-1.pdf").exists() and not (rev / "package.pdf").exists()
    assert set(results["carried_over"]["out_of_date"]) == {"sheets/P-1.pdf", "notebooks/P-1.ipynb", "package.pdf"}
    assert "out of date" in log and "sheets/P-1.pdf" in log.split("out of date", 1)[1]

    _, results, _ = run(job, out, fmt="html")  # HTML sheets for both; P-2's PDF is still current
    assert (rev / "sheets" / "P-1.html").exists() and (rev / "sheets" / "P-2.html").exists()
    assert (rev / "sheets" / "P-2.pdf").read_bytes() == made["sheets/P-2.pdf"]
    assert "sheets/P-2.pdf" in results["carried_over"]["kept"]

    _, results, _ = run(job, out, sheets=False)  # the HTML sheets are still current, and so is their index
    assert {"sheets/P-1.html", "sheets/P-2.html", "sheets/P-2.pdf"} <= set(results["carried_over"]["kept"])
    assert "P-1.html" in (rev / "index.html").read_text(encoding="utf-8")
