"""Reruns follow the load path through the real pipeline (papermill, nbconvert, xelatex): a change to a
roof beam re-executes the girder and the column that carry it, and nothing else."""

from __future__ import annotations

import pytest

from conftest import write_job
from test_load_path import CHAIN
from test_pipeline import pdf_text
from timbersheets.run.runner import run_job

pytestmark = pytest.mark.pipeline


def test_changing_a_roof_beam_reexecutes_what_carries_it(tmp_path):
    job = write_job(tmp_path / "job", CHAIN)
    first = run_job(job, out=tmp_path / "out", jobs=1, progress=False)
    assert sorted(first.executed) == ["C-1", "G-1", "RB-1", "X-1"]
    assert all(d.status == "pass" for d in first.designs), [(d.mark, d.errors) for d in first.designs]
    changed = [dict(r) for r in CHAIN]
    changed[0]["w_S"] = "3.6"
    write_job(tmp_path / "job", changed)
    second = run_job(job, out=tmp_path / "out", jobs=1, progress=False)
    assert sorted(second.executed) == ["C-1", "G-1", "RB-1"]
    text = " ".join(pdf_text(tmp_path / "out" / "rev-A" / "sheets" / "G-1.pdf").split())
    # the girder's sheet names the analysis package and the carried reaction with its source and new value:
    # RB-1.R2 under S = 3.6 kN/m × 6 m / 2 = 10.8 kN (hand calculation)
    assert "PyCBA" in text and "RB-1.R2: reaction of RB-1, support 2" in text and "10.8" in text
