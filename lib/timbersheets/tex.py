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


#: Characters the sheet's typeface (Latin Modern) has, or the sheet template maps to maths.
_NATIVE = (set(range(0x20, 0x7F)) | set(range(0xA0, 0x180)) | set(range(0x3B1, 0x3CA))
           | {0x2013, 0x2014, 0x2018, 0x2019, 0x201A, 0x201C, 0x201D, 0x201E, 0x2020, 0x2021, 0x2022, 0x2026,
              0x2030, 0x2032, 0x2033, 0x2039, 0x203A, 0x20AC, 0x2122, 0x2264, 0x2265, 0x2260, 0x2248, 0x22C5})
#: Ranges DejaVu Sans (fonts-dejavu-core) covers: Greek, Cyrillic, Canadian syllabics, arrows,
#: mathematical operators, technical symbols, box drawing, shapes, dingbats.
_FALLBACK = ((0x180, 0x24F), (0x370, 0x52F), (0x1400, 0x167F), (0x2000, 0x2BFF))


def _covered_by_fallback(code: int) -> bool:
    return any(lo <= code <= hi for lo, hi in _FALLBACK)


def escape(text: object) -> str:
    """LaTeX-safe text: every special character printed literally.

    Characters outside the sheet's typeface are set in the fallback font
    (``\\tsfallback``, DejaVu Sans), so a place name in syllabics prints; a
    character no installed font covers (an emoji) prints as '?', never breaks
    the sheet.
    """
    out = []
    for ch in str(text):
        code = ord(ch)
        if ch in _LATEX:
            out.append(_LATEX[ch])
        elif code < 0x20:
            continue
        elif code in _NATIVE:
            out.append(ch)
        elif _covered_by_fallback(code):
            out.append(f"\\tsfallback{{{ch}}}")
        else:
            out.append("?")
    return "".join(out).replace("}\\tsfallback{", "")


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
