"""The package's front matter: cover wording, seal box, the index of members fitting the page."""

from __future__ import annotations

import json
import re
import shutil
import subprocess
from pathlib import Path

import pytest

from conftest import failing_templates, member_row, write_job
from timbersheets.build.package import package_tex
from timbersheets.build.typeset import typeset
from timbersheets.engineering.data import DataSet
from timbersheets.job.project import PROJECT_TEMPLATE, load_project
from timbersheets.run.runner import RunOptions, run_job

LONG_NOTE = ("Clubroom floor girder across the boat bay (wet service), on columns C-1; floor joists in "
             "top-flange hangers hold the top edge; the clubroom partition above bears on it at midspan "
             "through a doubled plate; supplementary notes from the framing plan follow here verbatim")


def front_matter(tmp_path: Path, rows: list[dict[str, str]], extra: str = "", checker: str = "RD") -> str:
    """The front matter's LaTeX for a job run without sheets (results only)."""
    job = write_job(tmp_path / "job", rows, extra=extra)
    toml = job / "project.toml"
    toml.write_text(toml.read_text().replace('checker = "RD"', f'checker = "{checker}"'))
    out = tmp_path / "out"
    run_job(job, RunOptions(out=out, sheets=False, progress=False))
    doc = json.loads((out / "rev-A" / "results.json").read_text())
    tex, _ = package_tex(load_project(job), doc, DataSet(), out / "rev-A", [], "", 2)
    return tex


def test_cover_grammar_and_a_blank_checker(tmp_path):
    # One member that fails (No.1/No.2 38x89, 3 m, 60 kN dead: hand calculation, far over any
    # 38x89 stud's capacity) and one that passes.
    rows = [member_row("A-1", size="38x89", P_D="60"), member_row("A-2")]
    tex = front_matter(tmp_path, rows[:1], checker="")
    assert "Checker & not named (0 of 1 member checked ok, 1 not checked)" in tex
    assert "1 member: 0 pass, 1 does not pass, 0 not designed" in tex
    assert "Review: 0 of 1 member checked ok, 1 not checked." in tex
    assert ";" not in tex.split("Checker &")[1].split("\\\\")[0]

    tex = front_matter(tmp_path / "two", rows)
    assert "Checker & RD (0 of 2 members checked ok, 2 not checked)" in tex
    assert "2 members: 1 passes, 1 does not pass, 0 not designed" in tex


def test_cover_seal_box_leaves_room_for_seal_signature_and_date(tmp_path):
    # Common practice (APEGBC/PEO seal sizes are about 40-45 mm across): the cover's seal box
    # must be at least 50 mm square, with separate places for the signature and the date.
    tex = front_matter(tmp_path, [member_row("A-1")])
    box = tex[tex.index("The seal box"):tex.index("\\end{minipage}}", tex.index("The seal box"))]
    height, width = (float(v) for v in re.search(r"\\begin\{minipage\}\[t\]\[([\d.]+)mm\]\[t\]\{([\d.]+)mm\}",
                                                 box).groups())
    assert width >= 50 and height >= 50 + 10
    assert "SEAL" in box and "SIGNATURE" in box and "DATE" in box


def test_scaffold_placeholder_title_warns(tmp_path):
    job = tmp_path / "job"
    job.mkdir()
    (job / "project.toml").write_text(PROJECT_TEMPLATE.format(date="2026-12-01"))
    warnings = load_project(job).warnings
    assert any("title is still the placeholder 'New project'" in w for w in warnings)
    assert any("number is still the placeholder '0000'" in w for w in warnings)
    demo = load_project(Path(__file__).resolve().parent.parent / "calcsheets" / "kestrel-cove-boathouse")
    assert demo.warnings == []


def test_index_descriptions_break_at_words(tmp_path):
    tex = front_matter(tmp_path, [member_row("A-1", note=LONG_NOTE)])
    row = next(line for line in tex.splitlines() if line.startswith("A-1 &"))
    description = row.split(" & ")[1]
    assert description.endswith("\u2026")
    words = description[:-1].split()
    assert words == LONG_NOTE.split()[:len(words)]  # every word whole, none cut


@pytest.mark.pipeline
@pytest.mark.skipif(shutil.which("xelatex") is None, reason="needs xelatex")
def test_index_fits_the_text_width(tmp_path):
    # A table wider than the text width is reported by TeX as an overfull box.
    rows = [member_row(f"RB-1{i}A", note=LONG_NOTE, size="38x184") for i in range(3)]
    tex = front_matter(tmp_path, rows)
    typeset(tex, tmp_path, "front", "package")  # raises on a TeX error, with its error lines
    assert "Overfull \\hbox" not in (tmp_path / "front.log").read_text(errors="replace")
    text = subprocess.run(["pdftotext", "-layout", str(tmp_path / "front.pdf"), "-"], capture_output=True,
                          text=True, check=True).stdout
    assert "verbatim" not in text and "Clubroom floor girder" in text


@pytest.mark.pipeline
def test_a_rerun_takes_its_front_matter_from_the_forecast_and_it_shows_the_new_results(tmp_path, monkeypatch):
    """A rerun typesets the package's front matter in a thread while its sheets are made, from the
    results as designed and the sheets' page counts as cached; the package then takes it from the
    cache. It must still be the front matter of this run: the index shows the changed member's
    new utilization, as results.json gives it."""
    import threading

    from timbersheets.build import package

    job = write_job(tmp_path / "job", [member_row("FA-1"), member_row("FA-2", P_D="6", P_L="4")])
    out = tmp_path / "out"
    run_job(job, RunOptions(out=out, progress=False, jobs=1))
    write_job(job, [member_row("FA-1"), member_row("FA-2", P_D="9", P_L="4")])
    threads = []
    typeset_front = package._typeset

    def recorded(tex, work, name):
        threads.append(threading.current_thread().name)
        return typeset_front(tex, work, name)

    monkeypatch.setattr(package, "_typeset", recorded)
    report = run_job(job, RunOptions(out=out, progress=False, jobs=1))
    assert report.executed == ["FA-2"]
    assert threads and set(threads) == {"front matter"}, threads  # the package typeset none of its own
    doc = json.loads((out / "rev-A" / "results.json").read_text())
    new = next(m for m in doc["members"] if m["mark"] == "FA-2")["utilization"]
    index = subprocess.run(["pdftotext", "-layout", "-f", "2", "-l", "2", str(out / "rev-A" / "package.pdf"), "-"],
                           capture_output=True, text=True, check=True).stdout
    line = next(ln for ln in index.splitlines() if ln.lstrip().startswith("FA-2"))
    assert f"{new:.3f}" in line, line


@pytest.mark.pipeline
def test_a_forecast_that_a_sheet_proves_wrong_is_not_used(tmp_path, monkeypatch):
    """The forecast takes every member as designed; a member whose notebook then fails is an error
    of this run, and the package's index says so (the forecast's front matter is not used)."""
    job = write_job(tmp_path / "job", [member_row("FB-1"), member_row("FB-2", P_D="6", P_L="4")])
    out = tmp_path / "out"
    run_job(job, RunOptions(out=out, progress=False, jobs=1))
    failing_templates(tmp_path / "templates", "FB-2", monkeypatch)
    run_job(job, RunOptions(out=out, progress=False, jobs=1))
    doc = json.loads((out / "rev-A" / "results.json").read_text())
    assert next(m for m in doc["members"] if m["mark"] == "FB-2")["status"] == "error"
    index = subprocess.run(["pdftotext", "-layout", "-f", "2", "-l", "2", str(out / "rev-A" / "package.pdf"), "-"],
                           capture_output=True, text=True, check=True).stdout
    lines = index.splitlines()
    at = next(i for i, ln in enumerate(lines) if ln.lstrip().startswith("FB-2"))
    assert " NOT" in lines[at] and "DESIGNED" in lines[at + 1], lines[at:at + 2]  # the verdict, in two lines


@pytest.mark.pipeline
def test_the_rerun_after_a_first_run_takes_the_package_from_the_cache(tmp_path, monkeypatch):
    """The demo's front matter is 4 pages, not a first run's guess of 2: its package must still be
    found by the next run with nothing changed (it was kept under the first guess's key, and the
    rerun, guessing 4 from the revision folder, built all of it again: 1.2 s of 100 members)."""
    from conftest import DEMO
    from timbersheets.build import package

    job = tmp_path / "kestrel-cove-boathouse"
    shutil.copytree(DEMO, job)
    out = tmp_path / "out"
    first = run_job(job, RunOptions(out=out, progress=False))
    assert first.package is not None
    before = (out / "rev-A" / "package.pdf").read_bytes()
    assert (out / "rev-A" / package.FRONT_HINT).read_text() != "2"  # the case this test is about
    laid = []
    monkeypatch.setattr(package, "PdfWriter", lambda path: laid.append(path))
    again = run_job(job, RunOptions(out=out, progress=False))
    assert again.package is not None and not again.executed
    assert not laid, "the package was built again, sheet by sheet"
    assert (out / "rev-A" / "package.pdf").read_bytes() == before


@pytest.mark.pipeline
def test_a_package_that_cannot_be_written_leaves_the_last_one_whole(tmp_path):
    """Nothing already written is lost or half-written (common practice for any output a seal goes
    on): a sheet that is no PDF stops the package; the package before it stays as it was, and the
    unfinished file is removed."""
    import pikepdf

    from timbersheets.build.package import build_package

    job = write_job(tmp_path / "job", [member_row("A-1"), member_row("A-2", type="tension")])
    out = tmp_path / "out"
    run_job(job, RunOptions(out=out, progress=False))
    rev = out / "rev-A"
    before = (rev / "package.pdf").read_bytes()
    doc = json.loads((rev / "results.json").read_text())
    pages = {}
    for mark in ("A-1", "A-2"):
        with pikepdf.open(rev / "sheets" / f"{mark}.pdf") as pdf:
            pages[mark] = len(pdf.pages)
    (rev / "sheets" / "A-2.pdf").write_bytes(b"%PDF-1.7\nnot a sheet\n")  # found once A-1 is written
    with pytest.raises(pikepdf.PdfError):
        build_package(load_project(job), doc, DataSet(), rev, [], pages=pages)
    assert (rev / "package.pdf").read_bytes() == before
    assert not list(rev.glob(".package.pdf.part*"))
