"""A worker's one kernel runs member after member with nothing carried from one to the next.

pipeline._Kernel keeps one kernel per worker process and clears its namespace between members
(IPython's reset, without its garbage collections). A name a member's notebook defined must be
gone when the next member's notebook runs, or a sheet could print a value of another member.
Real papermill and a real kernel; the notebooks are written here.
"""

import json
import subprocess
import sys

import nbformat
import pytest

from timbersheets.build import notebooks as pipeline


def notebook(path, *cells):
    nb = nbformat.v4.new_notebook()
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3", "language": "python"}
    nb.metadata["language_info"] = {"name": "python"}
    params = nbformat.v4.new_code_cell("mark = 'X-1'")
    params.metadata["tags"] = ["parameters"]
    nb.cells = [params, *(nbformat.v4.new_code_cell(c) for c in cells)]
    nbformat.write(nb, str(path))
    return path


def printed(path):
    nb = nbformat.read(str(path), as_version=4)
    return "".join(o.get("text", "") for c in nb.cells if c.cell_type == "code" for o in c.outputs)


@pytest.mark.pipeline
def test_nothing_carries_over_between_members(tmp_path):
    first = notebook(tmp_path / "first.ipynb", "import os\nleftover = mark\nprint(os.getpid())")
    second = notebook(tmp_path / "second.ipynb",
                      "import os, json\nprint(os.getpid())\n"
                      "print(json.dumps(sorted(n for n in globals() if n in ('leftover', 'first_only'))))",)
    assert pipeline.execute(first, tmp_path / "a.ipynb", {"mark": "A-1"}, tmp_path) is None
    assert pipeline.execute(second, tmp_path / "b.ipynb", {"mark": "B-1"}, tmp_path) is None
    pid_a = printed(tmp_path / "a.ipynb").split()[0]
    pid_b, names = printed(tmp_path / "b.ipynb").split("\n")[:2]
    assert pid_a == pid_b  # the same kernel ran both: the namespace was cleared, not a new kernel started
    assert json.loads(names) == []
    # the output cache of the first member is gone too
    assert pipeline.execute(notebook(tmp_path / "third.ipynb", "print(len(Out), len(In) < 4)"),
                            tmp_path / "c.ipynb", {"mark": "C-1"}, tmp_path) is None
    assert printed(tmp_path / "c.ipynb").split()[0] == "0"



@pytest.mark.pipeline
def test_the_kernel_writes_no_input_history(tmp_path):
    """IPython's history thread writes every cell to an SQLite file; on a sheet that was a quarter of
    the kernel's time (measured, 30 members: 8.7 s to 6.5 s). The run's kernel keeps none."""
    probe = notebook(tmp_path / "probe.ipynb", "print(get_ipython().history_manager.enabled)")
    assert pipeline.execute(probe, tmp_path / "p.ipynb", {"mark": "P-1"}, tmp_path) is None
    assert printed(tmp_path / "p.ipynb").split() == ["False"]

def test_the_warm_up_imports_what_exists():
    """The imports a kernel runs when it starts (pipeline.WARM_UP) name modules that exist: a renamed
    module would otherwise only cost every run its head start, silently."""
    done = subprocess.run([sys.executable, "-c", pipeline.WARM_UP], capture_output=True, text=True)
    assert done.returncode == 0, done.stderr


@pytest.mark.pipeline
def test_a_started_kernel_runs_the_first_member(tmp_path):
    """A kernel started ahead (runner: while the members are designed) runs the first member; its
    warm-up left no name behind."""
    pipeline._Kernel.shutdown()
    pipeline.start_kernel(tmp_path)
    assert pipeline._Kernel.starting is not None  # launched in the background: start returns at once
    first = notebook(tmp_path / "first.ipynb", "import json\nprint(json.dumps(sorted(n for n in globals() "
                                               "if n in ('timbersheets', 'handcalcs', 'matplotlib'))))")
    assert pipeline.execute(first, tmp_path / "a.ipynb", {"mark": "A-1"}, tmp_path) is None
    assert pipeline._Kernel.warming is None
    assert json.loads(printed(tmp_path / "a.ipynb").split("\n")[0]) == []


@pytest.mark.pipeline
def test_a_kernel_outlives_the_thread_that_launched_it(tmp_path, monkeypatch):
    """The kernel is launched from a short-lived thread. It must end with the run, not with that
    thread: Linux's parent-death signal follows the creating thread (prctl(2), PR_SET_PDEATHSIG), and
    a kernel that asked for it was killed whenever the thread ended after the kernel had booted that
    far, which under load made a run's first member wait 60 s and fail. Here the thread is held
    until the kernel has surely booted."""
    import time

    pipeline._Kernel.shutdown()
    manager = pipeline._kernel_manager_class()
    launch = manager.start_kernel

    def slow_launch(self, **kwargs):
        launch(self, **kwargs)
        time.sleep(3)

    monkeypatch.setattr(manager, "start_kernel", slow_launch)
    monkeypatch.setattr(pipeline._Kernel, "manager", manager)
    pipeline.start_kernel(tmp_path)
    pipeline._Kernel._join()
    time.sleep(1)
    try:
        assert pipeline._Kernel.km.is_alive()
        first = notebook(tmp_path / "first.ipynb", "print('ran')")
        assert pipeline.execute(first, tmp_path / "a.ipynb", {"mark": "A-1"}, tmp_path) is None
        assert printed(tmp_path / "a.ipynb").strip() == "ran"
    finally:
        pipeline._Kernel.shutdown()
        monkeypatch.undo()


@pytest.mark.pipeline
def test_a_kernel_never_imports_matplotlib(tmp_path):
    """Neither the kernel's warm-up nor a sheet imports matplotlib (0.3 s of a kernel's boot, and its
    figure 0.38 s a beam, measured): a beam's shear and moment diagram is drawn with Pillow."""
    from conftest import member_row, write_job
    from timbersheets.run.runner import RunOptions, run_job

    pipeline._Kernel.shutdown()
    job = write_job(tmp_path / "job", [member_row("T-9", type="tension", P_D="3"),
                                       member_row("B-9", type="bending", size="38x235", length="3.4", Ly="", Lu="0",
                                                  w_D="0.31", w_L="1.46", P_D="")])
    report = run_job(job, RunOptions(out=tmp_path / "out", jobs=1, progress=False))
    assert report.sheets["T-9"].executed and report.sheets["B-9"].executed
    from nbformat import read

    beam = read(tmp_path / "out" / "rev-A" / "notebooks" / "B-9.ipynb", as_version=4)
    assert any("image/png" in o.get("data", {}) for c in beam.cells for o in c.get("outputs", []))  # it has its diagram
    seen = []
    pipeline._Kernel.kc.execute_interactive("import sys; print('matplotlib' in sys.modules)", timeout=30,
                                            output_hook=lambda msg: seen.append(msg["content"].get("text", "")))
    assert "".join(seen).split() == ["False"]
