"""HTML sheets: the PDF sheet's content, title block and rounding, readable offline."""

from __future__ import annotations

import html as htmllib
import re
import shutil
import subprocess

import nbformat
import pytest

from conftest import DEMO, write_job
from timbersheets.engineering.data import DataSet
from timbersheets.engineering.sizing import design_sized
from timbersheets.job.project import load_project
from timbersheets.run.runner import RunOptions, run_job, titleblock
from timbersheets.schedule.read import load_schedule
from timbersheets.sheet.htmlsheet import Converter, sheet_html
from timbersheets.sheet.sections import Sheet

SECTIONS = ("member_section", "sizing_section", "loads_section", "combinations_section", "factors_section",
            "checks_section", "summary_section", "cautions")


def visible_text(page: str) -> str:
    """What a reader sees: tags dropped (MathML numbers and symbols kept), entities decoded."""
    page = re.sub(r"<style>.*?</style>", " ", page, flags=re.S)
    return htmllib.unescape(re.sub(r"<[^>]+>", " ", page))


def offline(page: str) -> list[str]:
    """Everything in a page that a browser would fetch from the network."""
    return (re.findall(r"<script\b[^>]*>", page) + re.findall(r"<link\b[^>]*>", page)
            + re.findall(r"""(?:src|href)\s*=\s*["']?(?:https?:)?//[^"'\s>]*""", page)
            + re.findall(r"@import|url\(\s*['\"]?(?:https?:)?//", page))


def demo_notebook(mark: str):
    """The notebook a run writes, built in-process from the same sheet functions (no papermill)."""
    member = {m.mark: m for m in load_schedule(DEMO / "schedule.csv").members}[mark]
    data = DataSet()
    design = design_sized(member, data)
    sheet = Sheet(design, data, {"nbc": "2020", "o86": "2019"})
    nb = nbformat.v4.new_notebook()
    for name in SECTIONS:
        block = getattr(sheet, name)()
        nb.cells.append(nbformat.v4.new_code_cell(outputs=[nbformat.v4.new_output(
            "display_data", data={"text/latex": block.latex, "text/markdown": block.markdown})]))
    return nb, titleblock(load_project(DEMO), design, data)


def test_html_sheet_has_the_title_block_sections_and_verdict():
    page = sheet_html(*demo_notebook("C-1"))
    seen = visible_text(page)
    for label in ("Project", "Member", "Sheet", "Revision", "Designed by", "Checked by", "Engineer of record", "Seal"):
        assert f">{label}<" in page, label
    assert "Kestrel Cove Community Boathouse" in seen and "C-1" in seen and "not checked" in seen
    headings = re.findall(r'<h2><span class="num">(\d+)</span> ([^<]+)</h2>', page)
    assert [h[1] for h in headings] == ["Member", "Specified loads", "Load combinations",
                                       "Material and modification factors", "Checks", "Summary"]
    assert [h[0] for h in headings] == ["1", "2", "3", "4", "5", "6"]
    assert 'class="verdict"' in page and "PASSES" in seen
    assert 'class="caution"' in page and "licensed professional engineer" in seen
    assert page.count("<math") > 20 and page.count("<table") >= 5


def test_html_sheet_is_offline_and_free_of_raw_markup():
    page = sheet_html(*demo_notebook("J-1"))
    assert offline(page) == []
    prose = visible_text(re.sub(r"<math.*?</math>", " ", page, flags=re.S))
    assert "$" not in prose  # no raw maths such as $w$
    assert not re.search(r"\\[A-Za-z]+", prose), re.search(r".{30}\\[A-Za-z]+.{30}", prose)
    assert not re.search(r"\b[KfEPVM]_[A-Za-z]", prose)  # K_T, f_b … are typeset, not raw
    assert "result record for" not in prose and "calc-sheet template" not in prose


def test_table_cells_and_escapes_survive():
    conv = Converter()
    out = conv.blocks("\\begin{tabular}{lr}\\toprule\nA \\& B & $x_1$ \\\\\n\\midrule\n100\\% & 5 \\\\\n"
                      "\\bottomrule\n\\end{tabular}\n")
    assert "<th>A &amp; B</th>" in out and "<td>100%</td>" in out and '<td class="r">5</td>' in out


@pytest.mark.pipeline
@pytest.mark.skipif(shutil.which("pdftotext") is None, reason="needs poppler")
def test_html_sheet_holds_the_pdf_sheets_numbers(tmp_path):
    job = tmp_path / "kestrel-cove-boathouse"
    shutil.copytree(DEMO, job)
    marks = ["C-1", "J-1"]
    pdf = run_job(job, RunOptions(out=tmp_path / "pdf", only=marks, progress=False, jobs=1))
    web = run_job(job, RunOptions(out=tmp_path / "html", only=marks, fmt="html", progress=False, jobs=1))
    index = (web.outdir / "index.html").read_text()
    assert offline(index) == [] and 'href="sheets/C-1.html"' in index
    for mark in marks:
        text = subprocess.run(["pdftotext", str(pdf.outdir / "sheets" / f"{mark}.pdf"), "-"], capture_output=True,
                              text=True, check=True).stdout
        page = (web.outdir / "sheets" / f"{mark}.html").read_text()
        assert offline(page) == []
        numbers = set(re.findall(r"\d+\.\d+", text))  # every rounded value of the calculation
        missing = numbers - set(re.findall(r"\d+\.\d+", visible_text(page)))
        assert not missing, (mark, sorted(missing))
        assert len(numbers) > 40


def test_html_index_lists_every_member_offline(tmp_path):
    import json

    from conftest import member_row
    from timbersheets.build.htmlindex import index_html

    # A 38x89 stud of 3 m under 60 kN dead load is far over its capacity (hand calculation:
    # A = 38 x 89 = 3382 mm², 60 kN / 3382 mm² = 17.7 MPa, against f_c K_D = 11.5 x 0.65 = 7.5 MPa
    # before stability; f_c of S-P-F No.1/No.2 from memory).
    job = write_job(tmp_path / "job", [member_row("A-1"), member_row("A-2", size="38x89", P_D="60")])
    out = tmp_path / "out"
    run_job(job, RunOptions(out=out, sheets=False, progress=False))
    doc = json.loads((out / "rev-A" / "results.json").read_text())
    page = index_html(load_project(job), doc, out / "rev-A")
    seen = visible_text(page)
    assert offline(page) == []
    assert "A-1" in seen and "A-2" in seen and "DOES NOT PASS" in seen and "PASSES" in seen
    assert "2 members: 1 passes, 1 does not pass, 0 not designed" in seen
    assert "licensed professional engineer" in seen


def test_a_failed_cell_marks_the_html_sheet_incomplete():
    nb, tb = demo_notebook("T-1")
    nb.cells.insert(3, nbformat.v4.new_code_cell(outputs=[nbformat.v4.new_output(
        "error", ename="ZeroDivisionError", evalue="division by zero",
        traceback=["\x1b[0;31mZeroDivisionError\x1b[0m: division by zero <script>"])]))
    page = sheet_html(nb, tb)
    seen = visible_text(page)
    assert "INCOMPLETE SHEET" in seen and "EXECUTION ERROR" in seen and "Not for use" in seen
    assert "ZeroDivisionError: division by zero" in seen
    assert "<script>" not in page and "\x1b" not in page  # the traceback is text, escaped and without colours


def test_a_long_table_that_breaks_across_pages_reads_as_one_table():
    # A table of BREAKABLE_ROWS rows or more is \tsbreakable in the PDF; the HTML shows one table,
    # its header once and every row (20 rows written, hand count: 20 body rows plus the header).
    from timbersheets.sheet.tex import BREAKABLE_ROWS, Table

    rows = [[f"1.{k}D", f"{k}.5", f"0.{k:03d}"] for k in range(20)]
    latex = Table(["Combination", "Moment", "Utilization"], rows, "lrr", ["", "kN·m", ""]).latex()
    assert len(rows) >= BREAKABLE_ROWS and "\\tsbreakable{lrr}" in latex
    page = Converter().blocks(latex)
    assert page.count("<table>") == 1 and page.count("</th>") == 3 and "kN·m" in page
    assert page.count("<tr>") == 21 and "1.19D" in page and "0.019" in page


@pytest.mark.parametrize("mark", ["J-1", "PU-1"])
def test_page_break_hints_leave_nothing_on_the_html_sheet(mark):
    """The PDF's \\tsneedspace{room} before the "Every combination" table is layout only: the HTML shows
    no stray paragraph holding its argument (it once printed "9" above the heading)."""
    nb, tb = demo_notebook(mark)
    latex = "".join(o["data"]["text/latex"] for c in nb.cells for o in c.outputs)
    assert "\\tsneedspace" in latex and "Every combination" in latex
    page = sheet_html(nb, tb)
    assert re.findall(r"<p>\s*[\d.]+\s*</p>", page) == []
