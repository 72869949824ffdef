"""The bending template through the real pipeline (papermill, nbconvert, xelatex):
the PDF text, read back with pdftotext, shows the values of results.json, and the
shear and moment diagram is embedded as an image."""

from __future__ import annotations

import json

import pytest
from pypdf import PdfReader

from conftest import write_job
from test_pipeline import on_sheet, pdf_text, table_rows, worked_on_sheet
from timbersheets.run.runner import RunOptions, run_job

pytestmark = pytest.mark.pipeline

ROW = {"mark": "RB-9", "type": "bending", "material": "glulam", "species": "Spruce-Pine", "grade": "20f-E",
       "size": "130x456", "length": "6.0", "Lu": "0", "w_D": "3.0", "w_S": "7.0", "bearing": "100",
       "note": "Test roof beam, braced by decking"}


def test_bending_sheet_shows_results_and_diagram(tmp_path):
    job = write_job(tmp_path / "beam", [ROW])
    report = run_job(job, RunOptions(out=tmp_path / "out", progress=False))
    member = json.loads((report.outdir / "results.json").read_text())["members"][0]
    assert member["status"] == "pass", member["errors"]
    names = {c["check"] for c in member["checks"]}
    assert names == {"bending", "shear", "bearing", "deflection-live", "deflection-total"}
    pdf = report.outdir / "sheets" / "RB-9.pdf"
    text = pdf_text(pdf)
    by_name = {c["check"]: c for c in member["checks"] if c["combination"] in ("1.25D + 1.5S", "1.0S", "1.0D + 1.0S")}
    assert f"{by_name['bending']['resistance']:.1f} kN·m" in text or f"{by_name['bending']['resistance']:.1f} kN" in text
    assert f"{by_name['shear']['resistance']:.1f} kN" in text  # W_r (method b, more favourable)
    assert f"{by_name['shear']['factors']['V_r']:.1f} kN" in text  # V_r (method a), shown too
    rows = table_rows(text)
    for name in ("deflection-live", "deflection-total"):
        assert by_name[name]["unit"] == "mm"
        assert on_sheet(rows, by_name[name]) or worked_on_sheet(text, by_name[name]), name
    words = " ".join(text.split())  # prose wraps across lines
    assert "1.0D + 1.0S" in words and "does not apply to stiffness" in words
    assert "more favourable" in words and "75 mm from the end" in words
    assert "PASSES" in text
    images = [img for page in PdfReader(str(pdf)).pages for img in page.images]
    assert images, "the shear and moment diagram is not embedded"
