"""A waiting xelatex run (typeset.warm_up) typesets what a fresh run does, and fails as one does.

Real xelatex throughout; the page text is read back with pdftotext (poppler).
"""

from __future__ import annotations

import subprocess
from pathlib import Path

import pytest

from timbersheets.build import typeset as ts
from timbersheets.build.batch import sheet_preamble, warm_sheets

pytestmark = pytest.mark.pipeline

PREAMBLE = "\\documentclass{article}\n\\usepackage{fontspec}\n"
BODY = "\\begin{document}\nTension member T-1: $T_r = 412.6$ kN.\n\\newpage\nPage two.\n\\end{document}\n"


def text(pdf: Path) -> str:
    return subprocess.run(["pdftotext", str(pdf), "-"], capture_output=True, text=True, check=True).stdout


def test_a_waiting_run_typesets_the_same_pages_as_a_fresh_one(tmp_path):
    cold = ts.typeset(PREAMBLE + BODY, tmp_path / "cold", "doc", "test")
    ts.warm_up(PREAMBLE)
    assert ts.is_warm(PREAMBLE)
    warm = ts.typeset(PREAMBLE + BODY, tmp_path / "warm", "doc", "test")
    assert not cold.warm and warm.warm
    assert warm.pdf == tmp_path / "warm" / "doc.pdf" and warm.pdf.exists()
    assert text(warm.pdf) == text(cold.pdf)
    assert "412.6" in text(warm.pdf) and text(warm.pdf).count("\f") == 2  # two pages
    assert not ts.is_warm(PREAMBLE)  # used once, then gone


def test_a_waiting_run_leaves_the_labels_where_a_fresh_one_does(tmp_path):
    """The package reads its bookmarks' pages from the .aux beside the PDF (\\newlabel): a waiting run
    leaves it there too, with the same labels."""
    doc = PREAMBLE + "\\begin{document}\nFirst.\\newpage\nIndex.\\label{ts-index}\n\\end{document}\n"
    cold = ts.typeset(doc, tmp_path / "cold", "package", "test")
    ts.warm_up(PREAMBLE)
    warm = ts.typeset(doc, tmp_path / "warm", "package", "test")
    assert warm.warm
    labels = [(tmp_path / f / "package.aux").read_text() for f in ("cold", "warm")]
    assert "\\newlabel{ts-index}{{}{2}" in labels[0] and labels[0] == labels[1]


def test_a_waiting_run_serves_only_its_own_preamble(tmp_path):
    ts.warm_up(PREAMBLE)
    other = PREAMBLE + "\\usepackage{xcolor}\n"
    done = ts.typeset(other + BODY, tmp_path, "doc", "test")
    assert not done.warm and ts.is_warm(PREAMBLE)
    # blank lines before \begin{document} do nothing in TeX: the same preamble
    assert ts.typeset(PREAMBLE + "\n\n" + BODY, tmp_path / "again", "doc", "test").warm
    ts.discard_waiting()


def test_an_error_in_the_body_is_reported_and_the_next_run_still_works(tmp_path):
    ts.warm_up(PREAMBLE)
    broken = PREAMBLE + "\\begin{document}\n\\undefinedcommandhere\n\\end{document}\n"
    with pytest.raises(ts.ConversionError) as err:
        ts.typeset(broken, tmp_path / "bad", "doc", "member X")
    assert "Undefined control sequence" in err.value.log_tail
    ts.warm_up(PREAMBLE)
    assert ts.typeset(PREAMBLE + BODY, tmp_path / "good", "doc", "test").warm


def test_a_run_nobody_uses_is_ended(tmp_path):
    ts.warm_up(PREAMBLE)
    waiting = list(ts._waiting)
    assert waiting and all(w.proc.poll() is None for w in waiting)
    ts.discard_waiting()
    assert all(w.proc.poll() is not None for w in waiting)
    assert not any(w.work.exists() for w in waiting)  # its folder is removed too


def test_the_sheets_preamble_is_the_one_of_every_sheet_and_stamp_document():
    """The batch of bodies and the stamps start with the preamble warm_sheets reads ahead."""
    from timbersheets.build.batch import _stamp_template

    head = _stamp_template().render(pages=[]).partition("\\begin{document}")[0]
    assert ts._key(head) == ts._key(sheet_preamble())
    warm_sheets()
    assert ts.is_warm(head)
    ts.discard_waiting()
