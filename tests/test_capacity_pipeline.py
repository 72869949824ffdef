"""Capacity rules through the real pipeline (papermill, nbconvert, xelatex): the PDF text, read back
with pdftotext, works the uplift branch in full and states the own weight and the lateral support."""

from __future__ import annotations

import json

import pytest

from conftest import write_job
from test_pipeline import pdf_text
from timbersheets.run.runner import RunOptions, run_job

pytestmark = pytest.mark.pipeline

# tests/test_capacity.py::test_lu_bottom_governs_an_uplift_case_hand_calculation, through the sheet
PURLIN = {"mark": "PU-9", "type": "bending", "material": "sawn", "species": "S-P-F", "grade": "No.1/No.2",
          "size": "38x184", "K_H": "1.1", "length": "3.2", "Lu": "0", "Lu_bottom": "1.6", "w_D": "0.46",
          "w_W": "-1.5", "self_weight": "no", "note": "Test purlin, strapped at midspan on its bottom edge"}


def test_uplift_branch_is_worked_in_full_on_the_sheet(tmp_path):
    # Hand calculation (see test_capacity.py): 0.9D + 1.4W, bottom edge over Lu_bottom = 1.6 m:
    #   C_B = 19.78, K_L = 0.714, M_r = 2.47 kN·m against M_f = −2.16 kN·m
    job = write_job(tmp_path / "uplift", [PURLIN])
    report = run_job(job, RunOptions(out=tmp_path / "out", progress=False))
    member = json.loads((report.outdir / "results.json").read_text())["members"][0]
    assert member["status"] == "pass", member["errors"]
    words = " ".join(pdf_text(report.outdir / "sheets" / "PU-9.pdf").split())
    assert "Negative moment (bottom edge in compression)" in words
    assert "Positive moment (top edge in compression)" in words
    assert "held at intervals of Lu_bottom = 1.6 m" in words
    assert "0.9D + 1.4W" in words
    for value in ("19.8", "0.714", "2.47"):  # C_B, K_L and M_r of the bottom edge, each on the page
        assert value in words, value
