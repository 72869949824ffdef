"""project.toml, labels and output files: clear errors, nothing written outside the
outputs, file modes as the user's umask says."""

import os
import stat

import pytest

from conftest import member_row, write_job
from timbersheets.cli import main
from timbersheets.errors import JobError
from timbersheets.job.project import load_project
from timbersheets.run.runner import run_job

PROJECT = '[project]\ntitle = "T"\nrevision = "{rev}"\n'


def job(tmp_path, toml: str):
    folder = write_job(tmp_path / "job", [member_row("C-1")])
    (folder / "project.toml").write_text(toml)
    return folder


@pytest.mark.parametrize("toml,words", [
    ('codes = "2020"\n' + PROJECT.format(rev="A"), "'codes' is a str, not a table"),
    ('data = "x"\n' + PROJECT.format(rev="A"), "'data' is a str, not a table"),
    ("x = " + "[" * 5000 + "]" * 5000 + "\n" + PROJECT.format(rev="A"), "too deeply"),
    (PROJECT.format(rev="."), "only dots"),
    (PROJECT.format(rev=".."), "only dots"),
    (PROJECT.format(rev="A" * 300), "300 characters long"),
    (PROJECT.format(rev="B/../../victim"), "characters a file name cannot carry"),
    (PROJECT.format(rev="A").replace('"T"', '"' + "T" * 400 + '"'), "title is 400 characters"),
    (PROJECT.format(rev="A") + '[data]\nmaterials = "/etc/passwd"\n', "outside the job folder"),
    (PROJECT.format(rev="A") + '[data]\nmaterials = "../outside.csv"\n', "outside the job folder"),
], ids=["codes-string", "data-string", "deep-nesting", "rev-dot", "rev-dotdot", "rev-long", "rev-path",
        "long-title", "materials-passwd", "materials-escape"])
def test_project_file_faults_are_clear_errors(tmp_path, toml, words):
    with pytest.raises(JobError, match="project.toml") as caught:
        load_project(job(tmp_path, toml))
    assert words in str(caught.value)


def test_project_file_that_is_a_directory(tmp_path):
    folder = tmp_path / "job"
    (folder / "project.toml").mkdir(parents=True)
    with pytest.raises(JobError, match="is not a file"):
        load_project(folder)


def test_firm_folder_named_in_the_user_config_is_allowed(tmp_path, monkeypatch):
    firm = tmp_path / "firm-data"
    firm.mkdir()
    (firm / "strengths.csv").write_text("material,species,grade,category,property,value\n")
    (tmp_path / "cfg" / "timbersheets").mkdir(parents=True)
    (tmp_path / "cfg" / "timbersheets" / "config.toml").write_text(f'[data]\nfirm_folders = ["{firm}"]\n')
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "cfg"))
    folder = job(tmp_path, PROJECT.format(rev="A") + f'[data]\nmaterials = "{firm / "strengths.csv"}"\n')
    assert load_project(folder).materials == (firm / "strengths.csv").resolve()


@pytest.mark.parametrize("mark,words", [("M" * 300, "300 characters long"), (".", "only dots"), ("..", "only dots")])
def test_mark_length_and_dots_are_row_errors(tmp_path, mark, words):
    folder = write_job(tmp_path / "job", [member_row("C-1"), member_row(mark)])
    report = run_job(folder, out=tmp_path / "out", sheets=False)
    bad = report.designs[1]
    assert bad.status == "error" and "row 3, column 'mark'" in bad.errors[0] and words in bad.errors[0]
    assert report.designs[0].status == "pass"


@pytest.mark.parametrize("label", ["B/../../victim", "..", "A" * 300])
def test_diff_refuses_labels_that_leave_the_outputs(tmp_path, capsys, label):
    folder = write_job(tmp_path / "job", [member_row("C-1")])
    assert main(["run", str(folder), "--no-pdf", "--jobs", "1", "--out", str(tmp_path / "out")]) == 0
    before = sorted(p for p in tmp_path.rglob("*"))
    assert main(["diff", str(folder), "--from", "A", "--to", label, "--out", str(tmp_path / "out")]) == 2
    assert "--to" in capsys.readouterr().err
    assert sorted(p for p in tmp_path.rglob("*")) == before


def test_outputs_follow_the_umask_and_copies_keep_their_mode(tmp_path):
    folder = write_job(tmp_path / "job", [member_row("C-1")])
    (folder / "project.toml").chmod(0o600)
    old = os.umask(0o022)
    try:
        run_job(folder, out=tmp_path / "out", sheets=False)
    finally:
        os.umask(old)
    rev = tmp_path / "out" / "rev-A"
    for name in ("results.json", "summary.csv", "run.log", "diff.csv", "summary.png", "inputs/schedule.csv"):
        assert stat.S_IMODE((rev / name).stat().st_mode) == 0o644, name
    assert stat.S_IMODE((rev / "inputs" / "project.toml").stat().st_mode) == 0o600  # a private file stays private


def test_sizing_search_is_bounded_by_the_standard_catalogue(tmp_path, data):
    """A max_depth beyond any glulam does not grow the search: it ends at the standard depth."""
    from conftest import write_schedule
    from timbersheets.engineering.sizing import design_sized
    from timbersheets.schedule.read import load_schedule

    row = member_row("S-1", type="bending", material="glulam", species="D.Fir-L", grade="24f-E", size="auto",
                     length="6", Ly="", P_D="", w_D="2", w_L="3", Lu="0")
    free = design_sized(load_schedule(write_schedule(tmp_path, [row])).members[0], data)
    deep = design_sized(load_schedule(write_schedule(tmp_path, [{**row, "max_depth": "2500"}])).members[0], data)
    assert deep.sizing.searched == free.sizing.searched
    huge = load_schedule(write_schedule(tmp_path, [{**row, "max_depth": "1e308"}]))
    assert "column 'max_depth'" in str(huge.rejected[0].errors[0])
