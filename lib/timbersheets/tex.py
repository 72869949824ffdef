"""Escaping user text for LaTeX and Markdown, and small table builders.

Every piece of user text (notes, project fields, marks) passes through
:func:`escape` before it reaches LaTeX, so ``\\input{/etc/passwd} 100% & #1_a $x$``
prints literally and reads no file.
"""

from __future__ import annotations

from dataclasses import dataclass, field

_LATEX = {
    "\\": r"\textbackslash{}", "{": r"\{", "}": r"\}", "$": r"\$", "&": r"\&", "#": r"\#",
    "^": r"\textasciicircum{}", "_": r"\_", "%": r"\%", "~": r"\textasciitilde{}",
    "<": r"\textless{}", ">": r"\textgreater{}", "|": r"\textbar{}", "\n": " ", "\r": " ", "\t": " ",
}
_MARKDOWN = set("\\`*_{}[]()#+-.!|<>$")


def escape(text: object) -> str:
    """LaTeX-safe text: every special character printed literally."""
    return "".join(_LATEX.get(ch, ch) for ch in str(text) if ch >= " " or ch in "\n\r\t")


def md_escape(text: object) -> str:
    """Markdown-safe text for JupyterLab output."""
    return "".join("\\" + ch if ch in _MARKDOWN else ch for ch in str(text).replace("\n", " "))


@dataclass
class Cell:
    """A table cell in both forms: LaTeX (PDF) and Markdown (JupyterLab)."""

    latex: str
    markdown: str

    @classmethod
    def text(cls, value: object) -> "Cell":
        return cls(escape(value), md_escape(value))

    @classmethod
    def math(cls, expr: str) -> "Cell":
        return cls(f"${expr}$", f"${expr}$")


def as_cell(value: object) -> Cell:
    return value if isinstance(value, Cell) else Cell.text(value)


@dataclass
class Table:
    """A ruled table. `align` has one letter a column: l, r, or X (wrapping text)."""

    header: list[object]
    rows: list[list[object]] = field(default_factory=list)
    align: str = ""
    units: list[object] | None = None

    def latex(self) -> str:
        align = self.align or "l" * len(self.header)
        spec = "".join(">{\\raggedright\\arraybackslash}X" if a == "X" else a for a in align)
        env = "tabularx" if "X" in align else "tabular"
        width = "{\\linewidth}" if env == "tabularx" else ""
        lines = [f"\\begin{{{env}}}{width}{{{spec}}}", r"\toprule"]
        lines.append(" & ".join(as_cell(h).latex for h in self.header) + r" \\")
        if self.units:
            lines.append(" & ".join(f"\\footnotesize {as_cell(u).latex}" for u in self.units) + r" \\")
        lines.append(r"\midrule")
        for row in self.rows:
            lines.append(" & ".join(as_cell(c).latex for c in row) + r" \\")
        lines += [r"\bottomrule", f"\\end{{{env}}}"]
        return "\\par\\noindent\n" + "\n".join(lines) + "\n\\par\n"

    def markdown(self) -> str:
        head = [as_cell(h).markdown for h in self.header]
        if self.units:
            head = [f"{h} ({as_cell(u).markdown})" if as_cell(u).markdown else h for h, u in zip(head, self.units)]
        align = self.align or "l" * len(self.header)
        rule = ["---:" if a == "r" else "---" for a in align]
        out = ["| " + " | ".join(head) + " |", "| " + " | ".join(rule) + " |"]
        out += ["| " + " | ".join(as_cell(c).markdown for c in row) + " |" for row in self.rows]
        return "\n".join(out) + "\n"
