"""Batch typesetting and title-block stamps, read back from the real PDFs.

Several members share one xelatex run (``--jobs 1``: one batch); their title
blocks' revision, date, checked by and "sheet n of N" are stamped afterwards.
A checker must read the same title block as if each sheet had been typeset on
its own (common practice: every page of a calculation names its revision and
its checker, and numbers itself n of N).
"""

from __future__ import annotations

import json
import re
import shutil
import subprocess
from pathlib import Path

import pytest
from pypdf import PdfReader

from conftest import failing_templates, member_row, write_job
from timbersheets.cli import main
from timbersheets.run.runner import RunOptions, RunReport, run_job

pytestmark = pytest.mark.pipeline


def page_text(pdf: Path, page: int) -> str:
    return subprocess.run(["pdftotext", "-layout", "-f", str(page), "-l", str(page), str(pdf), "-"],
                          capture_output=True, text=True, check=True).stdout


def title_block(pdf: Path, page: int) -> str:
    """The title block's text: what pdftotext reads above the first section of the first page, and
    the one-row block of a following page (its labels' line and its values' line), not the body
    that a full page sets close under it."""
    if page == 1:
        return page_text(pdf, page).split("\n1 Member")[0]
    return "\n".join([line for line in page_text(pdf, page).splitlines() if line.strip()][:2])


ROWS = [member_row("BA-1"), member_row("BA-2", P_D="6", P_L="4"), member_row("BA-3", type="tension", P_D="3"),
        member_row("BA-4", type="bending", size="38x235", length="3.4", Ly="", Lu="0", w_D="0.31", w_L="1.46",
                   P_D="")]


@pytest.fixture(scope="module")
def batch_job(tmp_path_factory):
    root = tmp_path_factory.mktemp("batch")
    job = write_job(root / "job", [dict(r) for r in ROWS])
    out = root / "out"
    first = run_job(job, RunOptions(out=out, progress=False, jobs=1))
    return job, out, first


def test_every_page_numbers_itself_n_of_N_and_bookmarks_land_on_first_pages(batch_job):
    job, out, first = batch_job
    assert sorted(first.converted) == ["BA-1", "BA-2", "BA-3", "BA-4"]
    rev = out / "rev-A"
    starts = {}
    for mark in ("BA-1", "BA-2", "BA-3", "BA-4"):
        sheet = rev / "sheets" / f"{mark}.pdf"
        total = len(PdfReader(str(sheet)).pages)
        assert total == first.sheets[mark].pages
        for k in range(1, total + 1):
            block = title_block(sheet, k)
            assert f"{k} of {total}" in block and mark in block and "not checked" in block, (mark, k)
            if k == 1:
                assert "2026-12-01" in block and "SEAL" in block, mark
    package = rev / "package.pdf"
    reader = PdfReader(str(package))
    nested = next(item for item in reader.outline if isinstance(item, list))
    for item in nested:
        mark = item.title.split(" ")[0]
        starts[mark] = reader.get_destination_page_number(item) + 1
        text = page_text(package, starts[mark])
        assert mark in text and "1 of " in text and "SEAL" in text, mark  # the first page, with its seal box
    assert list(starts) == ["BA-1", "BA-2", "BA-3", "BA-4"]


def test_a_review_restamps_every_sheet_and_typesets_no_body(batch_job, monkeypatch):
    """Every sheet is restamped with the checker; a stamp page that several sheets show alike (the
    same fields, page k of n) is typeset once."""
    from timbersheets.build import batch

    job, out, _ = batch_job
    assert main(["review", str(job), "--all", "--by", "QZ", "--verdict", "ok", "--out", str(out)]) == 0
    layers = []

    def typeset_and_count(tex, work, name, what, files=None):
        done = typeset(tex, work, name, what, files)
        layers.append(len(PdfReader(str(done.pdf)).pages))
        return done

    typeset = batch.typeset
    monkeypatch.setattr(batch, "typeset", typeset_and_count)
    after = run_job(job, RunOptions(out=out, progress=False, jobs=1))
    assert after.executed == [] and after.converted == []
    assert sorted(after.stamped) == ["BA-1", "BA-2", "BA-3", "BA-4"]
    counts = {mark: len(PdfReader(str(out / "rev-A" / "sheets" / f"{mark}.pdf")).pages) for mark in after.stamped}
    assert layers == [sum(set(counts.values()))], (layers, counts)  # one page per (k, n): the fields are alike
    for mark in ("BA-1", "BA-2", "BA-3", "BA-4"):
        sheet = out / "rev-A" / "sheets" / f"{mark}.pdf"
        for k in range(1, len(PdfReader(str(sheet)).pages) + 1):
            block = title_block(sheet, k)
            assert "QZ 20" in block and "not checked" not in block, (mark, k)
    again = run_job(job, RunOptions(out=out, progress=False, jobs=1))
    assert again.converted == [] and again.stamped == []  # the stamped sheets come from the cache


def test_a_new_revision_with_one_change_typesets_one_body_and_restamps_all(batch_job, monkeypatch):
    job, out, _ = batch_job
    rows = [dict(r) for r in ROWS]
    rows[1]["P_L"] = "9"
    write_job(job, rows, revision="B")
    monkeypatch.setattr("timbersheets.build.batch.STAMP_SHARE", 1)  # the re-stamping shared by two xelatex runs
    second = run_job(job, RunOptions(out=out, progress=False, jobs=2))
    assert second.executed == ["BA-2"] and second.converted == ["BA-2"]
    assert sorted(second.stamped) == ["BA-1", "BA-2", "BA-3", "BA-4"]
    for mark in ("BA-1", "BA-2", "BA-3", "BA-4"):
        sheet = out / "rev-B" / "sheets" / f"{mark}.pdf"
        total = len(PdfReader(str(sheet)).pages)
        for k in range(1, total + 1):
            block = title_block(sheet, k)
            assert f"{k} of {total}" in block, (mark, k)
            if mark == "BA-2":
                assert "B, changed since A" in block and "changed since check" in block, k
            else:
                assert "changed since" not in block and "QZ 20" in block, (mark, k)
                assert re.search(r"(^|\s)B(\s|$)", block) and not re.search(r"(^|\s)A(\s|$)", block), (mark, k)
    body = page_text(out / "rev-B" / "sheets" / "BA-2.pdf", 1)
    assert re.search(r"Live \(use and occupancy\)\s+L\s+9\.0\s", body)  # the new body, not the old


def relative_first_run(tmp_path, monkeypatch) -> list[dict[str, str]]:
    """Two members run once from `tmp_path` with `--out out` given relative; their rows."""
    monkeypatch.chdir(tmp_path)
    rows = [dict(r) for r in ROWS[:2]]
    write_job(tmp_path / "job", rows)
    assert main(["run", "job", "--out", "out", "--jobs", "1"]) in (0, 1)
    return rows


def wait_until_moved(start: Path) -> bool:
    """Wait (20 s at most) until papermill has moved the process out of `start`; whether it did."""
    import os
    import time

    deadline = time.monotonic() + 20
    while Path(os.getcwd()) == start and time.monotonic() < deadline:
        time.sleep(0.005)
    return Path(os.getcwd()) != start


def test_sheets_restamped_while_another_executes_keep_relative_paths(tmp_path, monkeypatch):
    """A new revision stamps the unchanged sheets in a thread while the changed member executes, and
    papermill changes the process's folder while it executes: with `--out` given relative, a stamp
    once opened a cached body by a relative path in the wrong folder and the run stopped (seen when
    the execution outlasted the stamps' typesetting). The stamps handed to the thread name their
    files by absolute paths, and this run stamps while the execution is in the job's folder."""
    from timbersheets.build import sheetjobs

    rows = relative_first_run(tmp_path, monkeypatch)
    stamp = sheetjobs.stamp_sheets
    handed = []

    def stamp_once_moved(stamps, runs=1):
        handed.extend((s.body, s.pdf) for s in stamps)
        wait_until_moved(tmp_path)
        return stamp(stamps, runs)

    monkeypatch.setattr(sheetjobs, "stamp_sheets", stamp_once_moved)
    rows[1]["P_L"] = "9"
    write_job(tmp_path / "job", rows, revision="B")
    second = run_job(Path("job"), RunOptions(out=Path("out"), progress=False, jobs=1))
    assert second.executed == ["BA-2"] and sorted(second.stamped) == ["BA-1", "BA-2"]
    assert all(o.error is None for o in second.sheets.values()), {m: o.error for m, o in second.sheets.items()}
    assert handed and all(path.is_absolute() for pair in handed for path in pair), handed
    for row in rows:
        block = title_block(tmp_path / "out" / "rev-B" / "sheets" / f"{row['mark']}.pdf", 1)
        assert re.search(r"(^|\s)B(\s|,|$)", block), (row["mark"], block)


def test_cached_notebooks_copied_while_another_executes_land_in_the_revision(tmp_path, monkeypatch):
    """The unchanged members' notebooks are copied into the revision in a thread while the changed
    member executes, and papermill moves the process into the job's folder meanwhile: with `--out`
    relative, each copy must still land in the revision folder under where the run started (not in
    an `out/` inside the job's folder), whole, with the member's result record."""
    from timbersheets.build import sheetjobs

    rows = relative_first_run(tmp_path, monkeypatch)
    take = sheetjobs._take_notebook
    moved = []

    def take_once_moved(task, outcome, base=Path()):
        moved.append(wait_until_moved(tmp_path))
        return take(task, outcome, base)

    monkeypatch.setattr(sheetjobs, "_take_notebook", take_once_moved)
    rows[1]["P_L"] = "9"
    write_job(tmp_path / "job", rows)
    second = run_job(Path("job"), RunOptions(out=Path("out"), progress=False, jobs=1))
    assert second.executed == ["BA-2"]
    assert moved and moved[0], "the copy was meant to run while papermill had moved the process"
    assert not (tmp_path / "job" / "out").exists()
    kept = tmp_path / "out" / "rev-A" / "notebooks" / "BA-1.ipynb"
    cached = [f.read_bytes() for f in (tmp_path / "out" / ".cache").glob("*.ipynb")]
    assert kept.read_bytes() in cached, "the revision's copy is the cached notebook, whole"
    assert second.sheets["BA-1"].record is not None and second.sheets["BA-1"].error is None


def test_an_interrupted_run_leaves_no_staging_folder_behind_its_copies(tmp_path, monkeypatch):
    """The cached notebooks are still being copied into the staging folder when the changed member's
    batch is interrupted (Ctrl-C): the run removes its staging folder, and no copy may recreate it
    afterwards (an orphan `.rev-A.staging-<pid>` beside the revisions)."""
    import time

    from timbersheets.build import sheetjobs

    rows = [dict(r) for r in ROWS[:2]]
    job = write_job(tmp_path / "job", rows)
    out = tmp_path / "out"
    assert main(["run", str(job), "--out", str(out), "--jobs", "1"]) in (0, 1)
    take = sheetjobs._take_notebook

    def slow_take(task, outcome, base=Path()):
        time.sleep(1.0)
        return take(task, outcome, base)

    def interrupted(tasks):
        raise KeyboardInterrupt

    monkeypatch.setattr(sheetjobs, "_take_notebook", slow_take)
    monkeypatch.setattr(sheetjobs, "_safe_batch", interrupted)
    rows[1]["P_L"] = "9"
    write_job(tmp_path / "job", rows)
    with pytest.raises(KeyboardInterrupt):
        run_job(job, RunOptions(out=out, progress=False, jobs=1))
    time.sleep(1.5)  # what a copy still under way would have written by now
    assert not list(out.glob(".rev-*")), list(out.glob(".rev-*"))
    assert (out / "rev-A" / "notebooks" / "BA-1.ipynb").exists()  # the revision as it was


def test_a_sheet_that_cannot_be_typeset_leaves_the_batch_standing(tmp_path, monkeypatch):
    import nbformat

    from timbersheets.build.notebooks import templates_dir

    templates = tmp_path / "templates"
    shutil.copytree(templates_dir(), templates)
    nb = nbformat.read(templates / "axial.ipynb", 4)
    nb.cells.insert(5, nbformat.v4.new_code_cell(
        'from IPython.display import Latex, display\n'
        'if member["mark"] == "TEX-1":\n    display(Latex(r"\\undefinedmacro{}"))'))
    nbformat.write(nb, templates / "axial.ipynb")
    monkeypatch.setenv("TIMBERSHEETS_TEMPLATES", str(templates))
    job = write_job(tmp_path / "tex", [member_row("OK-1"), member_row("TEX-1"), member_row("OK-2")])
    report = run_job(job, RunOptions(out=tmp_path / "out", progress=False, jobs=1))
    assert sorted(report.converted) == ["OK-1", "OK-2"]
    assert not (report.outdir / "sheets" / "TEX-1.pdf").exists()
    assert any("xelatex could not typeset" in e and "Undefined control sequence" in e
               for e in next(d for d in report.designs if d.mark == "TEX-1").errors)
    for mark in ("OK-1", "OK-2"):
        assert "1 of " in title_block(report.outdir / "sheets" / f"{mark}.pdf", 1)


def test_a_notebook_that_fails_leaves_the_other_sheets_standing_on_two_workers(tmp_path, monkeypatch):
    """Two workers (a pool process and the run's own), two batches; one member's notebook raises.
    Its batch's other sheets, and the other batch, are made and numbered; the failed member keeps
    its notebook with the error marked, and its sheet says it is incomplete."""
    import nbformat

    failing_templates(tmp_path / "templates", "ERR-1", monkeypatch)
    marks = ["OK-1", "ERR-1", "OK-2", "OK-3"]
    job = write_job(tmp_path / "nb", [member_row(m) for m in marks])
    report = run_job(job, RunOptions(out=tmp_path / "out", progress=False, jobs=2))
    assert sorted(report.executed) == sorted(marks)
    failed = next(d for d in report.designs if d.mark == "ERR-1")
    assert any("RuntimeError: stopped here" in e for e in failed.errors)
    # results.json is made before the sheets (the package's forecast): a failed sheet remakes it
    results = {m["mark"]: m for m in json.loads((report.outdir / "results.json").read_text())["members"]}
    assert results["ERR-1"]["status"] == "error" and results["ERR-1"]["utilization"] is None
    assert any("RuntimeError: stopped here" in e for e in results["ERR-1"]["errors"])
    assert results["OK-1"]["status"] != "error"
    kept = nbformat.read(report.outdir / "notebooks" / "ERR-1.ipynb", 4)
    assert any(o.get("output_type") == "error" for c in kept.cells if c.cell_type == "code" for o in c.outputs)
    for mark in ("OK-1", "OK-2", "OK-3"):
        sheet = report.outdir / "sheets" / f"{mark}.pdf"
        total = len(PdfReader(str(sheet)).pages)
        assert all(f"{k} of {total}" in title_block(sheet, k) for k in range(1, total + 1)), mark
    text = subprocess.run(["pdftotext", str(report.outdir / "sheets" / "ERR-1.pdf"), "-"], capture_output=True,
                          text=True, check=True).stdout
    assert "EXECUTION ERROR" in text and "RuntimeError: stopped here" in text


def words(pdf: Path, page: int) -> list[tuple[str, float, float, float, float]]:
    """(word, xMin, yMin, xMax, yMax) in points from the top-left corner, as pdftotext reads them."""
    out = subprocess.run(["pdftotext", "-bbox", "-f", str(page), "-l", str(page), str(pdf), "-"],
                         capture_output=True, text=True, check=True).stdout
    return [(w, float(a), float(b), float(c), float(d)) for a, b, c, d, w in
            re.findall(r'<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">([^<]*)</word>', out)]


def test_stamped_values_sit_in_their_boxes_under_their_labels(batch_job):
    # The stamp is typeset apart from the body: each value must land in its own cell, under its
    # label (the body's) and left-aligned with it, as if both had been typeset together.
    job, out, _ = batch_job
    sheet = out / ("rev-B" if (out / "rev-B").exists() else "rev-A") / "sheets" / "BA-1.pdf"
    found = words(sheet, 1)
    for label, value in (("SHEET", "1"), ("DATE", "2026-12-01"), ("REVISION", None)):
        lx, ly = next((x0, y1) for w, x0, y0, x1, y1 in found if w == label)
        below = sorted((y0, w, x0) for w, x0, y0, x1, y1 in found if abs(x0 - lx) < 1.0 and ly < y0 < ly + 20)
        assert below, label
        assert value is None or below[0][1] == value, (label, below)


def test_the_seal_box_is_at_least_45_mm_square(batch_job):
    # Room for a seal with signature and date: at least 45 mm on every sheet (the cover has its
    # own). The box is measured from the labels: SEAL sits 1.5 mm right of the box's left rule and
    # 1.3 mm under its top; the box reaches the right edge of the 165 mm text block (27 mm left
    # margin) and the block's foot, 9 mm under the top of the DESIGNED BY row.
    job, out, _ = batch_job
    found = words(out / "rev-A" / "sheets" / "BA-3.pdf", 1)
    mm = 72 / 25.4
    seal_x, seal_y = next((x0, y0) for w, x0, y0, *_ in found if w == "SEAL")
    designed_y = next(y0 for w, x0, y0, *_ in found if w == "DESIGNED")
    width = (27 + 165) - (seal_x / mm - 1.5)
    height = designed_y / mm - seal_y / mm + 9
    assert width >= 45 and height >= 45, (width, height)


def test_a_rerun_with_every_notebook_cached_starts_no_kernel(tmp_path, monkeypatch):
    """The run boots a kernel ahead of the design only when a notebook may have to run: not on a rerun
    of the same files whose notebooks are all in the cache, again when a load changes or a cached
    notebook is gone. The sheets come out the same either way."""
    from timbersheets.run import runner

    started = []
    real = runner.start_kernel
    monkeypatch.setattr(runner, "start_kernel", lambda cwd=None: (started.append(cwd), real(cwd)))
    job = write_job(tmp_path / "job", [member_row("T-1", P_D="20", P_L="30"), member_row("T-2", P_D="10")])
    out = tmp_path / "out"

    def run() -> RunReport:
        return run_job(job, RunOptions(out=out, jobs=1, progress=False))

    first = run()
    assert len(started) == 1 and first.executed
    sheet = (out / "rev-A" / "sheets" / "T-1.pdf").read_bytes()
    again = run()
    assert len(started) == 1 and not again.executed  # nothing to run: no kernel
    assert (out / "rev-A" / "sheets" / "T-1.pdf").read_bytes() == sheet
    next((out / ".cache").glob("*.ipynb")).unlink()  # a notebook the record names is gone
    third = run()
    assert len(started) == 2 and len(third.executed) == 1
    write_job(tmp_path / "job", [member_row("T-1", P_D="25", P_L="30"), member_row("T-2", P_D="10")])
    fourth = run()
    assert len(started) == 3 and fourth.executed == ["T-1"]
    assert "T-1" in page_text(out / "rev-A" / "sheets" / "T-1.pdf", 1)
