"""A stored beam-model analysis is the analysis, and reading it needs no PyCBA.

The run keeps each PyCBA analysis in the job's cache (beammodel.STORE_ENV), keyed by its inputs,
so a rerun and the kernels that render the sheets do not import PyCBA (about 2 s a process).
What is read back must equal, number for number, what PyCBA computes.
"""

import json
import os
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from timbersheets.engineering import beammodel
from timbersheets.engineering.beammodel import Geometry

TWO_SPANS = Geometry((3600.0, 4200.0), right=900.0)
LOADS = (("udl", 2.5, 0.0, 8700.0), ("point", 6000.0, 5100.0))


def test_a_stored_analysis_reads_back_the_same_without_pycba(tmp_path, monkeypatch):
    monkeypatch.delenv(beammodel.STORE_ENV, raising=False)
    direct = beammodel.analyse(TWO_SPANS, LOADS, (450.0,))
    monkeypatch.setenv(beammodel.STORE_ENV, str(tmp_path))
    first = beammodel.analyse(TWO_SPANS, LOADS, (450.0,))
    assert len(list(tmp_path.glob("*.npz"))) == 1 and not list(tmp_path.glob("*.part*"))
    code = ("import json, sys; from timbersheets.engineering import beammodel as b\n"
            f"r = b.analyse(b.Geometry((3600.0, 4200.0), right=900.0), {LOADS!r}, (450.0,))\n"
            "print(json.dumps({'pycba': 'pycba' in sys.modules, 'M': r.M.tolist(), 'V': r.V.tolist(),"
            " 'D': r.D.tolist(), 'R': r.R.tolist(), 'x': r.x.tolist()}))")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          env={**os.environ, beammodel.STORE_ENV: str(tmp_path)})
    assert done.returncode == 0, done.stderr
    read = json.loads(done.stdout)
    assert read["pycba"] is False
    for name in ("x", "M", "V", "D", "R"):
        assert np.array_equal(np.array(read[name]), getattr(direct, name)), name
        assert np.array_equal(getattr(first, name), getattr(direct, name)), name


def test_other_inputs_are_analysed_anew(tmp_path, monkeypatch):
    monkeypatch.setenv(beammodel.STORE_ENV, str(tmp_path))
    a = beammodel.analyse(TWO_SPANS, LOADS)
    b = beammodel.analyse(TWO_SPANS, (("udl", 2.5, 0.0, 8700.0), ("point", 6000.0, 5200.0)))
    assert len(list(tmp_path.glob("*.npz"))) == 2
    assert not np.array_equal(a.M, b.M)


def test_an_unreadable_entry_is_analysed_again(tmp_path, monkeypatch):
    monkeypatch.setenv(beammodel.STORE_ENV, str(tmp_path))
    good = beammodel.analyse(TWO_SPANS, LOADS)
    (entry,) = tmp_path.glob("*.npz")
    entry.write_bytes(b"not an array file")
    again = beammodel.analyse(TWO_SPANS, LOADS)
    assert np.array_equal(again.M, good.M)


@pytest.mark.pipeline
@pytest.mark.parametrize("relative", [False, True], ids=["absolute-out", "relative-out"])
def test_the_kernel_that_renders_a_beam_model_sheet_reads_the_run_s_store(tmp_path, monkeypatch, relative):
    """The run names its store before it starts its kernel (a kernel keeps the environment it was
    launched with): the sheet of a beam-model member is rendered from the analysis the design
    stored, and the kernel never imports PyCBA. Started once: a kernel launched before the store was
    named would have to be started again, losing the head start it had while the members were designed.
    With --out relative to where the run starts the store is named absolute: the kernel runs in the
    job's folder, where the relative name would be another (new, empty) folder."""
    import shutil

    from conftest import DEMO
    from timbersheets.build import notebooks
    from timbersheets.run.runner import RunOptions, run_job

    from timbersheets.engineering import beamdesign

    monkeypatch.delenv(beammodel.STORE_ENV, raising=False)
    beammodel.region_responses.cache_clear()  # analysed afresh, so the design writes this run's store
    beamdesign._model.cache_clear()
    notebooks._Kernel.shutdown()
    launches = []
    launch = notebooks._Kernel._launch.__func__
    monkeypatch.setattr(notebooks._Kernel, "_launch",
                        classmethod(lambda cls, *args: (launches.append(args), launch(cls, *args))[1]))
    job = tmp_path / "job"
    shutil.copytree(DEMO, job)
    monkeypatch.chdir(tmp_path)
    out = Path("out") if relative else tmp_path / "out"
    report = run_job(job, RunOptions(out=out, only=["GR-1"], jobs=1, progress=False))
    assert report.sheets["GR-1"].executed
    assert list((tmp_path / "out" / ".cache" / "beam").glob("*.npz"))
    seen = []
    notebooks._Kernel.kc.execute_interactive(
        "import os, sys; print('pycba' in sys.modules, os.environ.get('%s'))" % beammodel.STORE_ENV,
        timeout=30, output_hook=lambda msg: seen.append(msg["content"].get("text", "")))
    assert "".join(seen).split() == ["False", str(tmp_path / "out" / ".cache" / "beam")]
    assert len(launches) == 1
    assert not (job / "out").exists()  # nothing written into the job's folder
