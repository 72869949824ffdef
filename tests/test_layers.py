"""A layer page laid as page content (build/layers.py) looks as qpdf's overlay does, and its text reads.

Real xelatex (both documents use the same font name /F1, so the renaming is exercised), pdftoppm and
pdftotext (poppler) to read the pages back.
"""

from __future__ import annotations

import subprocess
from pathlib import Path

import pytest

from timbersheets.build.layers import PREFIX, lay, prepare
from timbersheets.build.typeset import typeset

pytestmark = pytest.mark.pipeline

DOC = ("\\documentclass{article}\n\\usepackage[letterpaper,margin=1in]{geometry}\n\\usepackage{fontspec}\n"
       "\\pagestyle{empty}\n\\begin{document}\n%s\n\\end{document}\n")
BODY = "Compression member C-1: $P_r = 456.9$ kN.\n\\newpage\nPage two, \\textbf{bold}.\n"
STAMP = ("\\setlength{\\unitlength}{1bp}\\begin{picture}(0,0)\\put(300,-600){\\textit{rev B, sheet 1 of 2}}\\end{picture}"
         "\\newpage\\begin{picture}(0,0)\\put(300,-600){\\textit{rev B, sheet 2 of 2}}\\end{picture}\n")


def pixels(pdf: Path, out: Path) -> list[bytes]:
    out.parent.mkdir(parents=True, exist_ok=True)
    subprocess.run(["pdftoppm", "-r", "40", "-gray", str(pdf), str(out)], check=True)
    return [p.read_bytes() for p in sorted(out.parent.glob(out.name + "*.pgm"))]


def text(pdf: Path) -> str:
    return subprocess.run(["pdftotext", str(pdf), "-"], capture_output=True, text=True, check=True).stdout


def test_a_laid_page_renders_as_an_overlay_and_its_text_reads(tmp_path):
    import pikepdf

    body = typeset(DOC % BODY, tmp_path / "body", "body", "test").pdf
    stamp = typeset(DOC % STAMP, tmp_path / "stamp", "stamp", "test").pdf
    with pikepdf.open(stamp) as layer:
        for name, how in (("overlay", None), ("laid", "lay")):
            with pikepdf.open(body) as sheet:
                layers = [prepare(p) for p in layer.pages]
                assert all(lr.content is not None for lr in layers)  # the fast path, not the fallback
                for page, lr in zip(sheet.pages, layers):
                    lay(sheet, page, lr) if how else page.add_overlay(lr.page)
                sheet.save(tmp_path / f"{name}.pdf")
    laid, overlay = tmp_path / "laid.pdf", tmp_path / "overlay.pdf"
    assert pixels(laid, tmp_path / "png" / "laid") == pixels(overlay, tmp_path / "png" / "overlay")
    got = text(laid)
    assert "456.9" in got and "rev B, sheet 1 of 2" in got and "rev B, sheet 2 of 2" in got
    assert got.count("\f") == 2
    with pikepdf.open(laid) as sheet:
        fonts = [str(k) for k in sheet.pages[0].Resources.Font.keys()]
    assert any(k.startswith(f"/{PREFIX}") for k in fonts) and any(not k.startswith(f"/{PREFIX}") for k in fonts)


def test_a_page_of_another_size_is_laid_as_an_overlay(tmp_path):
    import pikepdf

    body = typeset(DOC % BODY, tmp_path / "body", "body", "test").pdf
    a4 = typeset((DOC % STAMP).replace("letterpaper", "a4paper"), tmp_path / "a4", "a4", "test").pdf
    with pikepdf.open(a4) as layer, pikepdf.open(body) as sheet:
        lr = prepare(layer.pages[0])
        lay(sheet, sheet.pages[0], lr)
        sheet.save(tmp_path / "mixed.pdf")
    assert "rev B, sheet 1 of 2" in text(tmp_path / "mixed.pdf")
    with pikepdf.open(tmp_path / "mixed.pdf") as sheet:
        assert not any(str(k).startswith(f"/{PREFIX}") for k in sheet.pages[0].Resources.get("/Font", {}).keys())
