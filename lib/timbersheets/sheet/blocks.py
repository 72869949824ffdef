"""The building blocks of a sheet's content: a :class:`Block` (Markdown in JupyterLab, LaTeX in the PDF),
headings, paragraphs, tables and table cells of numbers in their display units."""

from __future__ import annotations

from dataclasses import dataclass

from ..engineering.calc import format_number
from ..engineering.units import to_display
from .tex import Cell, Table, displays_noindent, escape, md_escape


@dataclass
class Block:
    """One output of a sheet cell."""

    latex: str
    markdown: str

    def _repr_latex_(self) -> str:
        return displays_noindent(self.latex)  # no empty line above a display that starts a paragraph

    def _repr_markdown_(self) -> str:
        return self.markdown

    def __add__(self, other: "Block") -> "Block":
        return Block(self.latex + "\n" + other.latex, self.markdown + "\n" + other.markdown)


def heading(title: str, level: int = 1) -> Block:
    cmd = "section" if level == 1 else "subsection"
    return Block(f"\\{cmd}{{{escape(title)}}}\n", f"{'#' * (level + 1)} {md_escape(title)}\n")


def para(text_latex: str, text_md: str | None = None) -> Block:
    return Block(text_latex + "\n\n", (text_md if text_md is not None else text_latex) + "\n\n")


def table(t: Table) -> Block:
    return Block(t.latex(), t.markdown())


def caption_para(text_latex: str, text_md: str | None = None) -> Block:
    """A paragraph that introduces the equations after it: no page break between them (a caption at the
    foot of a page, its equations on the next, reads as a caption of nothing)."""
    return Block(text_latex + "\\par\\nopagebreak\n\n", (text_md if text_md is not None else text_latex) + "\n\n")


def math_block(latex: str) -> Block:
    return Block(latex + "\n", latex + "\n")


def q(value: float, compute_unit: str) -> Cell:
    """A number in its display unit, as a right-aligned table cell (unit in the header)."""
    shown, unit = to_display(value, compute_unit)
    text = format_number(shown, unit)
    return Cell(f"${text}$", text)
