"""Escaping user text for LaTeX and Markdown, and small table builders.

Every piece of user text (notes, project fields, marks) passes through
:func:`escape` before it reaches LaTeX, so ``\\input{/etc/passwd} 100% & #1_a $x$``
prints literally and reads no file.
"""

from __future__ import annotations

import subprocess
import unicodedata
from dataclasses import dataclass, field
from functools import lru_cache

_LATEX = {
    "\\": r"\textbackslash{}", "{": r"\{", "}": r"\}", "$": r"\$", "&": r"\&", "#": r"\#",
    "^": r"\textasciicircum{}", "_": r"\_", "%": r"\%", "~": r"\textasciitilde{}",
    "<": r"\textless{}", ">": r"\textgreater{}", "|": r"\textbar{}",
    # TeX ligatures would turn these into typographic quotes and dashes (-- into an en dash)
    "'": r"\textquotesingle{}", "`": r"\textasciigrave{}", '"': r"\textquotedbl{}",
}
_PAIRED = ("-", ",")  # doubled, TeX joins them (-- an en dash, ,, a low quote): kept apart by {}
_MARKDOWN = set("\\`*_{}[]()#+-.!|<>$")


#: Characters the sheet's typeface (Latin Modern) has, or the sheet template maps to maths.
_NATIVE = (set(range(0x20, 0x7F)) | set(range(0xA0, 0x180)) | set(range(0x3B1, 0x3CA))
           | {0x2013, 0x2014, 0x2018, 0x2019, 0x201A, 0x201C, 0x201D, 0x201E, 0x2020, 0x2021, 0x2022, 0x2026,
              0x2030, 0x2032, 0x2033, 0x2039, 0x203A, 0x20AC, 0x2122, 0x2264, 0x2265, 0x2260, 0x2248, 0x22C5})
#: Ranges DejaVu Sans (fonts-dejavu-core) covers, when its own character map cannot be read.
_FALLBACK = ((0x180, 0x24F), (0x370, 0x52F), (0x1400, 0x167F), (0x2010, 0x2027), (0x2030, 0x205E),
             (0x2190, 0x23FF), (0x2500, 0x27BF))
#: Unicode categories that print as nothing (format characters) or a space (separators).
_DROP, _SPACE = ("Cf", "Cc", "Cs", "Co", "Cn"), ("Zs", "Zl", "Zp")


@lru_cache(maxsize=1)
def fallback_characters() -> frozenset[int] | None:
    """The characters the installed DejaVu Sans has (read from the font), or None."""
    try:
        found = subprocess.run(["fc-match", "-f", "%{file}", "DejaVu Sans"], capture_output=True, text=True,
                               timeout=10, check=True).stdout.strip()
        from fontTools.ttLib import TTFont

        if "DejaVuSans" not in found:
            return None
        return frozenset(TTFont(found, lazy=True).getBestCmap())
    except (OSError, subprocess.SubprocessError, ImportError, ValueError):
        return None


def _covered_by_fallback(code: int) -> bool:
    cmap = fallback_characters()
    if cmap is not None:
        return code in cmap
    return any(lo <= code <= hi for lo, hi in _FALLBACK)


#: Characters `escape` prints as themselves (in a text with no doubled `_PAIRED` character).
_VERBATIM = frozenset({" "} | {chr(c) for c in _NATIVE if chr(c) not in _LATEX
                               and unicodedata.category(chr(c)) not in _DROP + _SPACE})


def escape(text: object) -> str:
    """LaTeX-safe text: every character printed as itself, or as '?' when no font has it.

    Characters outside the sheet's typeface are set in the fallback font
    (``\\tsfallback``, DejaVu Sans), a run of them in one group, so a place
    name in syllabics prints; a character neither font covers (an emoji) prints
    as '?', and a line break or other separator as a space: nothing breaks the sheet.
    """
    text = str(text)
    if _VERBATIM.issuperset(text) and "--" not in text and ",," not in text:
        return text  # most of a sheet's words: 0.04 ms a call less, 35,000 calls in 100 sheets
    return _escape_each(text)


def _escape_each(text: str) -> str:
    """`escape`, character by character."""
    out: list[str] = []
    run: list[str] = []

    def flush() -> None:
        if run:
            out.append("\\tsfallback{" + "".join(run) + "}")
            run.clear()

    for i, ch in enumerate(text):
        code = ord(ch)
        category = unicodedata.category(ch)
        if ch in _PAIRED:
            flush()
            out.append(ch + ("{}" if text[i + 1:i + 2] == ch else ""))
        elif ch in _LATEX:
            flush()
            out.append(_LATEX[ch])
        elif category in _SPACE or ch in "\n\r\t\f\v\x85":
            flush()
            out.append(" ")
        elif category in _DROP:
            continue
        elif code in _NATIVE:
            flush()
            out.append(ch)
        elif _covered_by_fallback(code):
            run.append(ch)
        else:
            flush()
            out.append("?")
    flush()
    return "".join(out)


def displays_noindent(latex: str) -> str:
    """`latex` with ``\\noindent`` before every opening ``$$``.

    A display that starts a paragraph (after a blank line, as each sheet block and
    handcalcs' equations do) otherwise sets an empty line above itself: TeX breaks the
    paragraph's indent box into a line of its own. ``\\noindent`` leaves it empty, so the
    display follows its text at the display skip; inside a paragraph it does nothing."""
    parts = latex.split("$$")
    if len(parts) % 2 == 0:  # an unpaired $$: leave the text as it is
        return latex
    return parts[0] + "".join(("\\noindent$$" if k % 2 == 0 else "$$") + part for k, part in enumerate(parts[1:]))


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


#: Rows from which a long table may break across pages (see Table.latex); shorter ones stay whole.
BREAKABLE_ROWS = 8
_WRAPPING = {"X": ">{\\raggedright\\arraybackslash}X",
             "W": ">{\\hsize=1.3\\hsize\\raggedright\\arraybackslash}X",
             "N": ">{\\hsize=0.7\\hsize\\raggedright\\arraybackslash}X"}


@dataclass
class Table:
    """A ruled table. `align` has one letter a column: l, r, or X (wrapping text).

    W and N are wrapping columns too, 1.3 and 0.7 times an X column's width: a W with an
    N beside a long column and a short one wraps fewer lines than two X (use them in pairs)."""

    header: list[object]
    rows: list[list[object]] = field(default_factory=list)
    align: str = ""
    units: list[object] | None = None

    def latex(self) -> str:
        """A tabular (tabularx with wrapping columns). A table of BREAKABLE_ROWS rows or more with
        no wrapping column, one X, or a W and an N is ``\\tsbreakable``: it breaks across pages,
        its header repeated, so it fills the page it starts on instead of leaving the rest empty."""
        align = self.align or "l" * len(self.header)
        spec = "".join(_WRAPPING[a] if a in _WRAPPING else a for a in align)
        env = "tabularx" if any(a in _WRAPPING for a in align) else "tabular"
        head = [" & ".join(as_cell(h).latex for h in self.header) + r" \\"]
        if self.units:
            head.append(" & ".join(f"\\footnotesize {as_cell(u).latex}" for u in self.units) + r" \\")
        body = [" & ".join(as_cell(c).latex for c in row) + r" \\" for row in self.rows]
        wrapping = [a for a in align if a in _WRAPPING]
        if len(self.rows) >= BREAKABLE_ROWS and wrapping in ([], ["X"], ["W", "N"]):  # what \tsbreakable sizes
            # The last row ends with a bare \cr: supertabular's \\ asks, after every row, whether another
            # would fit, and after the last would start a page holding only the repeated header.
            body[-1] = body[-1].removesuffix(r" \\") + r" \cr"
            return ("\\par\n\\tsbreakable{" + align + "}{\n" + "\n".join(head) + "}{\n" + "\n".join(body)
                    + "}\n\\par\n")
        width = "{\\linewidth}" if env == "tabularx" else ""
        lines = [f"\\begin{{{env}}}{width}{{{spec}}}", r"\toprule", *head, r"\midrule", *body,
                 r"\bottomrule", f"\\end{{{env}}}"]
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
