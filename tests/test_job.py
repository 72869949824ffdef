"""One way of loading a job: the run, the what-if and the size command read and design it alike."""

from conftest import member_row, write_job
from timbersheets.cli import main
from timbersheets.job.load import load_job
from timbersheets.run.runner import RunOptions, run_job

BEAM = member_row("B-1", type="bending", Ly="", P_D="", length="4.0", Lu="0", w_D="2.0", w_L="6.0")
POST = member_row("C-9", size="auto", material="glulam", species="Spruce-Pine", grade="12c-E", P_D="5",
                  carries="B-1.R1")


def test_size_command_sizes_with_the_carried_loads_as_the_run_does(tmp_path, capsys):
    # The post carries the beam's reaction: hand calculation, R1 = w·L/2 = 2.0·4.0/2 = 4 kN dead and
    # 6.0·4.0/2 = 12 kN live, on top of its own 5 kN dead.
    job = write_job(tmp_path / "job", [BEAM, POST])
    loaded = load_job(job)
    carried = loaded.members()["C-9"].values["carried"]
    assert [(c.source, c.loads) for c in carried] == [("B-1", {"D": 4000.0, "L": 12000.0})]
    report = run_job(job, RunOptions(out=tmp_path / "out", sheets=False, progress=False))
    ran = next(d for d in report.designs if d.mark == "C-9")
    assert ran.status == "pass"
    capsys.readouterr()
    assert main(["size", str(job), "--mark", "C-9"]) == 0
    chosen = next(line for line in capsys.readouterr().out.splitlines() if line.strip().startswith("chosen"))
    words = chosen.split()
    assert words[1] == ran.size
    # the same utilization: without the carried reaction the post would show about a quarter of it
    assert float(words[words.index("utilization") + 1]) == round(ran.governing.utilization, 3)


def test_a_kept_search_is_used_only_for_the_same_inputs(tmp_path, monkeypatch):
    """The run keeps each sizing search (deterministic in the member's inputs, the data and the library)
    and a rerun reads it; a member whose inputs change, here through the reaction it carries, is
    searched again, and every run's choice is the one a search without the store makes."""
    from timbersheets.engineering.sizing import STORE_ENV, design_sized

    monkeypatch.setenv(STORE_ENV, "")  # restored after the test (the run sets it for its own process)
    job = write_job(tmp_path / "job", [BEAM, POST])
    store = tmp_path / "out" / ".cache" / "sizing"

    def run() -> tuple[str, dict]:
        report = run_job(job, RunOptions(out=tmp_path / "out", sheets=False, progress=False))
        post = next(d for d in report.designs if d.mark == "C-9")
        return post.size, post.sizing.to_json()

    def searched() -> tuple[str, dict]:
        monkeypatch.setenv(STORE_ENV, "")
        post = design_sized(load_job(job).members()["C-9"], load_job(job).data)
        return post.size, post.sizing.to_json()

    first = run()
    assert len(list(store.glob("*.json"))) == 1
    assert run() == first == searched()
    # four times the live load on the beam: the post carries 48 kN live, not 12 (R1 = w·L/2)
    heavier = write_job(tmp_path / "job", [{**BEAM, "w_L": "24.0"}, POST])
    assert heavier == job
    second = run()
    assert len(list(store.glob("*.json"))) == 2
    assert second == searched() != first
