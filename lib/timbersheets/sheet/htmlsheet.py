"""The HTML sheet: the PDF sheet's own content, set for a browser, readable offline.

A member's executed notebook holds the sheet as LaTeX (one output per
section, from :mod:`timbersheets.sheet.sections`). The PDF typesets that LaTeX; this
module translates the same LaTeX, so the two sheets cannot differ in content
or rounding. It knows only the small set of commands the sheet code writes
(sections, ruled tables, lists, the verdict and caution boxes, emphasis, the
escapes of :func:`timbersheets.sheet.tex.escape`); an unknown command is dropped and
its argument kept as text. Equations become MathML (latex2mathml), which
browsers render natively: no script, no font or style sheet from the internet.
"""

from __future__ import annotations

import base64
import html
import re
from dataclasses import dataclass
from typing import Any

from latex2mathml.converter import convert as mathml

from ..constants import CAUTION

#: Escapes of tex.escape and the few text commands of the sheet, as characters.
_CHARS = {"textbackslash": "\\", "textasciicircum": "^", "textasciitilde": "~", "textless": "<",
          "textgreater": ">", "textbar": "|", "quad": "\u2003", "qquad": "\u2003\u2003", "hfill": " ",
          "ldots": "\u2026", "dots": "\u2026", "newline": "\n"}
#: One-character commands that are spaces.
_SPACES = {",": "\u2009", ";": " ", ":": " ", "!": "", " ": " ", "/": ""}
#: Commands with one argument and the element that sets it.
_WRAP = {"emph": "em", "textit": "em", "textbf": "strong", "texttt": "code", "textsc": "span", "mbox": "span",
         "text": "span", "tsfallback": "span", "underline": "u"}
#: Layout commands that carry nothing a browser needs.
_SILENT = {"par", "noindent", "raggedright", "raggedleft", "centering", "arraybackslash", "smallskip", "medskip",
           "bigskip", "footnotesize", "small", "normalsize", "scriptsize", "tiny", "large", "Large", "LARGE",
           "huge", "toprule", "midrule", "bottomrule", "hline", "linewidth", "boldmath", "itshape", "bfseries",
           "nopagebreak"}
_BREAK = "\x00par\x00"


def _group(tex: str, i: int) -> tuple[str, int]:
    """The brace group starting at tex[i] ('{'), and the index after it."""
    depth, j = 0, i
    while j < len(tex):
        ch = tex[j]
        if ch == "\\":
            j += 2
            continue
        if ch == "{":
            depth += 1
        elif ch == "}":
            depth -= 1
            if depth == 0:
                return tex[i + 1:j], j + 1
        j += 1
    return tex[i + 1:], len(tex)


def _skip_space(tex: str, i: int) -> int:
    while i < len(tex) and tex[i] in " \t":
        i += 1
    return i


def _math_end(tex: str, i: int, fence: str) -> int:
    j = i
    while True:
        j = tex.find(fence, j)
        if j < 0 or tex[j - 1] != "\\":
            return j if j >= 0 else len(tex)
        j += 1


def _split_top(tex: str, sep: str) -> list[str]:
    """Split at `sep` outside braces and maths (table rows at \\\\, cells at &)."""
    parts, depth, start, i, in_math = [], 0, 0, 0, False
    while i < len(tex):
        ch = tex[i]
        if ch == "\\" and tex.startswith(sep, i) and sep.startswith("\\") and depth == 0 and not in_math:
            parts.append(tex[start:i])
            i += len(sep)
            start = i
            continue
        if ch == "\\":
            i += 2
            continue
        if ch == "$":
            in_math = not in_math
        elif ch == "{":
            depth += 1
        elif ch == "}":
            depth -= 1
        elif ch == sep and depth == 0 and not in_math:
            parts.append(tex[start:i])
            start = i + 1
        i += 1
    parts.append(tex[start:])
    return parts


def _columns(spec: str) -> list[str]:
    """Column alignments from a tabular spec: 'l', 'r', 'c' (X and p{} are left, wrapping)."""
    spec = re.sub(r"[>@<]\{(?:[^{}]|\{[^{}]*\})*\}", "", spec)
    spec = re.sub(r"[pmb]\{[^{}]*\}", "l", spec)
    return ["r" if c in "rR" else "c" if c in "cC" else "l" for c in spec if c.isalpha()]


@dataclass
class _Counters:
    section: int = 0
    subsection: int = 0


class Converter:
    """LaTeX of the sheet code → HTML. Section numbers run on across calls, as in the PDF."""

    def __init__(self) -> None:
        self.n = _Counters()

    # -- blocks ------------------------------------------------------------------
    def blocks(self, tex: str) -> str:
        """A run of LaTeX as HTML paragraphs and block elements."""
        out, inline = [], []

        def flush() -> None:
            text = "".join(inline).strip()
            if text:
                out.append(f"<p>{text}</p>")
            inline.clear()

        for piece in self._pieces(tex):
            if piece == _BREAK:
                flush()
            elif piece.startswith("<block>"):
                flush()
                out.append(piece[len("<block>"):])
            else:
                inline.append(piece)
        flush()
        return "\n".join(out)

    def inline(self, tex: str) -> str:
        """LaTeX inside a paragraph or a table cell: no paragraph breaks."""
        return "".join(p if not p.startswith("<block>") else p[7:] for p in self._pieces(tex)
                       if p != _BREAK).strip()

    def _pieces(self, tex: str):
        i, n = 0, len(tex)
        while i < n:
            ch = tex[i]
            if tex.startswith("$$", i):
                end = _math_end(tex, i + 2, "$$")
                yield "<block>" + self.math(tex[i + 2:end], display=True)
                i = end + 2
            elif ch == "$":
                end = _math_end(tex, i + 1, "$")
                yield self.math(tex[i + 1:end], display=False)
                i = end + 1
            elif ch == "\\":
                piece, i = self._command(tex, i)
                if piece:
                    yield piece
            elif ch == "{":
                body, i = _group(tex, i)
                if body.lstrip().startswith(("\\Large", "\\large", "\\LARGE")):
                    yield f'<span class="large">{self.inline(body)}</span>'
                else:
                    yield self.inline(body)
            elif ch == "}":
                i += 1
            elif ch == "\n" and tex.startswith("\n\n", i):
                yield _BREAK
                i += 2
            elif ch == "~":
                yield "\u00a0"
                i += 1
            elif tex.startswith("---", i):
                yield "\u2014"
                i += 3
            elif tex.startswith("--", i):
                yield "\u2013"
                i += 2
            else:
                j = i
                while j < n and tex[j] not in "\\${}~\n-":
                    j += 1
                j = max(j, i + 1)
                yield html.escape(tex[i:j].replace("\n", " "), quote=False)
                i = j

    def _command(self, tex: str, i: int) -> tuple[str, int]:
        match = re.match(r"\\([A-Za-z]+|.)", tex[i:])
        assert match
        name, i = match.group(1), i + match.end()
        if name == "\\":
            if tex.startswith("[", i):
                i = tex.index("]", i) + 1
            return "<br>", i
        if not name.isalpha():
            return html.escape(_SPACES.get(name, name), quote=False), i
        if name in ("section", "subsection"):
            title, i = _group(tex, _skip_space(tex, i))
            return "<block>" + self.heading(name, title), i
        if name == "begin":
            env, i = _group(tex, i)
            return self._environment(tex, env, i)
        if name == "tsbreakable":  # a table that may break across pages: {spec}{header rows}{body rows}
            spec, i = _group(tex, i)
            head, i = _group(tex, _skip_space(tex, i))
            body, i = _group(tex, _skip_space(tex, i))
            return "<block>" + self.table(_columns(spec), head + "\\midrule" + body), i
        if name == "tsneedspace":  # a page-break hint: {room}; nothing to show
            _, i = _group(tex, i)
            return "", i
        if name == "tsvalue":
            number, i = _group(tex, i)
            unit, i = _group(tex, i)
            return self.math(number + (f"\\,\\mathrm{{{unit}}}" if unit else ""), display=False), i
        if name in _CHARS:
            if tex.startswith("{}", i):
                i += 2
            return _CHARS[name], _skip_space(tex, i) if name not in ("quad", "qquad") else i
        i_next = _skip_space(tex, i)
        if name in _WRAP and tex.startswith("{", i_next):
            body, i = _group(tex, i_next)
            tag = _WRAP[name]
            return f"<{tag}>{self.inline(body)}</{tag}>", i
        if name == "par":
            return _BREAK, i
        return "", i_next if name in _SILENT or not tex.startswith("{", i_next) else i

    def _environment(self, tex: str, env: str, i: int) -> tuple[str, int]:
        end = f"\\end{{{env}}}"
        j = self._env_end(tex, env, i)
        body, after = tex[i:j], j + len(end)
        if env in ("tabular", "tabularx"):
            if env == "tabularx":
                _, k = _group(body, body.index("{"))
                body = body[k:]
            spec, k = _group(body, body.index("{"))
            return "<block>" + self.table(_columns(spec), body[k:]), after
        if env in ("itemize", "enumerate"):
            items = [b for b in re.split(r"\\item\b", body)[1:]]
            tag = "ul" if env == "itemize" else "ol"
            return "<block>" + f"<{tag}>" + "".join(f"<li>{self.inline(b)}</li>" for b in items) + f"</{tag}>", after
        if env == "verdictbox":
            return "<block>" + f'<div class="verdict">{self.blocks(body)}</div>', after
        if env == "cautionbox":
            title = "Cautions"
            if body.startswith("["):
                title, body = body[1:body.index("]")], body[body.index("]") + 1:]
            return ("<block>" + f'<div class="caution"><p class="title">{html.escape(title)}</p>'
                    f"{self.blocks(body)}</div>"), after
        return "<block>" + self.blocks(body), after

    @staticmethod
    def _env_end(tex: str, env: str, i: int) -> int:
        depth, pos = 1, i
        begin, end = f"\\begin{{{env}}}", f"\\end{{{env}}}"
        while True:
            nb, ne = tex.find(begin, pos), tex.find(end, pos)
            if ne < 0:
                return len(tex)
            if 0 <= nb < ne:
                depth, pos = depth + 1, nb + len(begin)
                continue
            depth -= 1
            if depth == 0:
                return ne
            pos = ne + len(end)

    # -- parts -------------------------------------------------------------------
    def heading(self, level: str, title: str) -> str:
        if level == "section":
            self.n.section, self.n.subsection = self.n.section + 1, 0
            number, tag = f"{self.n.section}", "h2"
        else:
            self.n.subsection += 1
            number, tag = f"{self.n.section}.{self.n.subsection}", "h3"
        return f'<{tag}><span class="num">{number}</span> {self.inline(title)}</{tag}>'

    def table(self, align: list[str], body: str) -> str:
        head, _, rest = body.partition("\\midrule")
        if not rest:
            head, rest = "", head

        def rows(part: str) -> list[list[str]]:
            out = []
            for line in _split_top(part, "\\\\"):
                if re.sub(r"\\(toprule|midrule|bottomrule|hline)", "", line).strip():
                    out.append(_split_top(line, "&"))
            return out

        def cell(tag: str, k: int, text: str) -> str:
            cls = {"r": ' class="r"', "c": ' class="c"'}.get(align[k] if k < len(align) else "l", "")
            return f"<{tag}{cls}>{self.inline(text)}</{tag}>"

        header = rows(head)
        thead = ""
        if header:
            units = header[1] if len(header) > 1 else []
            cells = []
            for k, h in enumerate(header[0]):
                unit = self.inline(units[k]) if k < len(units) else ""
                text = self.inline(h) + (f'<br><span class="unit">{unit}</span>' if unit else "")
                cls = {"r": ' class="r"', "c": ' class="c"'}.get(align[k] if k < len(align) else "l", "")
                cells.append(f"<th{cls}>{text}</th>")
            thead = "<thead><tr>" + "".join(cells) + "</tr></thead>"
        tbody = "".join("<tr>" + "".join(cell("td", k, c) for k, c in enumerate(r)) + "</tr>" for r in rows(rest))
        return f"<table>{thead}<tbody>{tbody}</tbody></table>"

    @staticmethod
    def math(tex: str, display: bool) -> str:
        """MathML; an aligned block one line per row, a long row in the long form (one '=' a line)."""
        tex = _MATHRM.sub(lambda m: "\\text{" + m.group(1).replace("{\\cdot}", "\u00b7").replace("{", "")
                          .replace("}", "") + "}", tex.strip())
        if not display:
            return mathml(tex, display="inline")
        aligned = re.fullmatch(r"\\begin\{aligned\}(.*)\\end\{aligned\}", tex, re.S)
        lines = []
        for row in _split_top(aligned.group(1), "\\\\") if aligned else [tex]:
            row = row.replace("&", "").strip()
            if not row:
                continue
            pieces = _split_top(row, "=")
            if len(row) > LONG_ROW and len(pieces) > 2:
                lines += [f"{pieces[0]}={pieces[1]}"] + [f"={p}" for p in pieces[2:]]
            else:
                lines.append(row)
        return '<div class="eq">' + "".join(
            f'<div class="{"cont" if line.startswith("=") else "row"}">{mathml(line, display="block")}</div>'
            for line in lines) + "</div>"


#: \mathrm{kN{\cdot}m}: units, set upright as text (latex2mathml would set one letter italic).
_MATHRM = re.compile(r"\\mathrm\{((?:[^{}]|\{[^{}]*\})*)\}")
#: Characters of LaTeX beyond which an equation row is set in the long form, one '=' a line.
LONG_ROW = 320


def text(tex: str) -> str:
    """One escaped field (a title block value) as HTML text."""
    return Converter().inline(tex)


STYLE = """
body{font-family:"Latin Modern Roman","CMU Serif",Georgia,serif;max-width:190mm;margin:8mm auto;padding:0 6mm;
 color:#000;line-height:1.35;font-size:10.5pt}
h1{font-size:15pt;margin:4mm 0}h2{font-size:13pt;border-bottom:0.4pt solid #000;margin:6mm 0 2mm}
h3{font-size:11pt;margin:4mm 0 1.5mm}.num{display:inline-block;min-width:2.2em}
table{border-collapse:collapse;border-top:1pt solid #000;border-bottom:1pt solid #000;margin:2mm 0;font-size:9.5pt;
 width:100%}thead{border-bottom:0.5pt solid #000}th,td{padding:1mm 2mm;text-align:left;vertical-align:top}
th.r,td.r{text-align:right}th.c,td.c{text-align:center}.unit{font-weight:normal;font-size:8.5pt}
.eq{margin:2mm 0 2mm 6mm}.eq math{display:inline math;math-style:normal}.eq div{margin:0.8mm 0}.eq .cont{padding-left:8mm}
.verdict{border:1.2pt solid #000;padding:3mm;font-weight:bold;margin:4mm 0}.large{font-size:15pt}
.caution{border:0.4pt solid #000;padding:2.5mm;font-size:9.5pt;margin:4mm 0}.caution .title{font-weight:bold;margin:0}
.error{border:1.6pt solid #000;padding:3mm;margin:4mm 0}.error pre{white-space:pre-wrap;font-size:8pt}
.tb{display:grid;grid-template-columns:50fr 45fr 32fr 50mm;border:0.9pt solid #000;font-size:9pt}
.tb>div{border-right:0.4pt solid #000;padding:1.3mm 1.5mm}.tb .lab{font:5.5pt sans-serif;text-transform:uppercase}
.tb .mark{font-size:22pt;font-weight:bold;text-align:center}.tb .desc{text-align:center}
.tb .seal{grid-row:span 2;border-right:0;min-height:50mm}.tb .row2{border-top:0.4pt solid #000}
.tb .sub{display:grid;grid-template-columns:1fr 1fr;gap:1mm;margin-top:2mm}.incomplete{border:1pt solid #000;
 font-weight:bold;padding:0 1mm}.foot{border-top:0.4pt solid #000;margin-top:8mm;font-size:8pt}
table.facts{width:auto;border:0}table.facts td{padding:0.3mm 6mm 0.3mm 0}
.flag{font-weight:bold;font-style:italic}img{max-width:80%;display:block;margin:3mm auto}
@media print{@page{size:letter;margin:12mm}body{margin:0;max-width:none}}
"""


def _field(tb: dict[str, str], key: str) -> str:
    return text(tb.get(key, ""))


def title_block(tb: dict[str, str], incomplete: bool) -> str:
    """The PDF's title block fields, as a grid (the sheet has no pages in a browser)."""
    checked = _field(tb, "checked") or "not checked"
    if checked.lower().startswith(("not checked", "changed")):
        checked = f'<span class="flag">{checked}</span>'
    client = f"<br>for {_field(tb, 'client')}" if tb.get("client") else ""
    flag = '<p class="desc"><span class="incomplete">INCOMPLETE SHEET</span></p>' if incomplete else ""
    return f"""<div class="tb">
<div><div class="lab">Project</div><strong>{_field(tb, 'project')}</strong>{client}
 <div class="sub"><div><div class="lab">Job no.</div>{_field(tb, 'number')}</div>
 <div><div class="lab">Location</div>{_field(tb, 'location')}</div></div></div>
<div><div class="lab">Member</div><div class="mark">{_field(tb, 'mark')}</div>
 <div class="desc">{_field(tb, 'description')}</div>{flag}</div>
<div><div class="lab">Sheet</div>1 of 1 (HTML)<div class="lab" style="margin-top:2mm">Revision</div>
 {_field(tb, 'revision')}<div class="lab" style="margin-top:2mm">Date</div>
 {_field(tb, 'date')}</div>
<div class="seal"><div class="lab">Seal</div></div>
<div class="row2"><div class="lab">Designed by</div>{_field(tb, 'designed')}</div>
<div class="row2"><div class="lab">Checked by</div>{checked}</div>
<div class="row2"><div class="lab">Engineer of record</div>{_field(tb, 'engineer')}</div>
</div>"""


def _error(out: dict[str, Any]) -> str:
    trace = "\n".join(out.get("traceback", []))
    trace = re.sub(r"\x1b\[[0-9;]*m", "", trace)
    return (f'<div class="error"><p><strong>EXECUTION ERROR</strong> this sheet is incomplete</p>'
            f"<p>The calculation stopped here; nothing after this point was computed.</p>"
            f"<p><code>{html.escape(out.get('ename', 'Error'))}: {html.escape(out.get('evalue', ''))}</code></p>"
            f"<pre>{html.escape(trace)}</pre></div>")


def sheet_html(nb: Any, tb: dict[str, str]) -> str:
    """The member's sheet as one self-contained HTML page (what sheet.tex.j2 prints, in the same order)."""
    conv = Converter()
    parts, incomplete = [], False
    for cell in nb.cells:
        if cell.cell_type == "raw" and cell.metadata.get("raw_mimetype", "").lower() in ("text/latex", "text/tex"):
            parts.append(conv.blocks(cell.source))
        if cell.cell_type != "code":
            continue
        for out in cell.get("outputs", []):
            if out.get("output_type") == "error":
                incomplete = True
                parts.append(_error(out))
                continue
            data = out.get("data", {})
            if "text/latex" in data:
                parts.append(conv.blocks(data["text/latex"]))
            elif "image/png" in data:
                png = data["image/png"]
                png = png if isinstance(png, str) else base64.b64encode(png).decode()
                parts.append(f'<img alt="figure" src="data:image/png;base64,{png.strip()}">')
    if tb.get("review_comment"):  # as the PDF sheet: the checker's comment first
        parts.insert(0, f'<div class="caution"><p class="title">Checker\u2019s comment</p>'
                        f'<p>{_field(tb, "review_comment")}</p></div>')
    caution = _field(tb, "caution") or html.escape(CAUTION)
    stop = "<p><strong>INCOMPLETE: the calculation stopped with an error. Not for use.</strong></p>" if incomplete else ""
    title = f"{_field(tb, 'mark')} \u2014 {_field(tb, 'project')}"
    return (f'<!DOCTYPE html>\n<html lang="en"><head><meta charset="utf-8"><title>{title}</title>'
            f"<style>{STYLE}</style></head><body>\n{title_block(tb, incomplete)}\n" + "\n".join(parts)
            + f'\n<div class="foot">{stop}<p>{caution}</p><p>{_field(tb, "tool_version")} \u2014 inputs '
            f'<code>{_field(tb, "inputs_hash")[:12]}</code>, data <code>{_field(tb, "data_hash")[:12]}</code>'
            "</p></div>\n</body></html>\n")
