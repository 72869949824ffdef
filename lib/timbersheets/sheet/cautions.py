"""The sheet's list of unverified data values, in typeset symbols and plain words.

results.json keeps each value's data label (``K_St sawn small wet service``);
a sheet says the same thing as a checker reads it: the symbol set as maths, what
it stands for, the case it applies to, and the table it should be checked
against. Load combinations are named as the sheet's combination table numbers
them (the NBC case labels, 1, 2a, 2b …).
"""

from __future__ import annotations

import re

from ..engineering.data import Datum
from .symbols import meaning, symbol_latex
from .tex import escape, md_escape

#: Data-file names that appear in labels, in words.
PLAIN = {
    "K_X_straight": "straight members",
    "shear_method_a_volume_max": "",  # the symbol Z_max says it
    "C_V_simple_span_udl": "simple span under uniform load",
    "simple-udl": "simple span under uniform load",
}
_IDENT = re.compile(r"[A-Za-z][A-Za-z0-9]*(?:_[A-Za-z0-9]+)+")


def _qualifier(label: str, symbol: str) -> str:
    """The label without its symbol, data names turned into words."""
    words = [PLAIN.get(w, w) for w in label.split(" ") if w != symbol]
    return re.sub(r"^limit, ", "", " ".join(w for w in words if w)).strip()


def _text(qualifier: str) -> tuple[str, str]:
    """LaTeX and Markdown of a qualifier; a symbol in it (K_Zb) set as maths, other names in words."""
    latex, md, pos = [], [], 0
    for match in _IDENT.finditer(qualifier):
        name = match.group(0)
        head = name.split("_")[0]
        typeset = meaning(name) or (head[:1].isupper() or head in ("f", "phi")) and len(head) <= 2
        latex.append(escape(qualifier[pos:match.start()]))
        md.append(md_escape(qualifier[pos:match.start()]))
        if typeset:
            latex.append(f"${symbol_latex(name)}$")
            md.append(f"${symbol_latex(name)}$")
        else:
            latex.append(escape(name.replace("_", " ")))
            md.append(md_escape(name.replace("_", " ")))
        pos = match.end()
    return "".join(latex) + escape(qualifier[pos:]), "".join(md) + md_escape(qualifier[pos:])


def _file(name: str) -> tuple[str, str]:
    return f"\\texttt{{{escape(name)}}}", f"`{name}`"


def _source(d: Datum, tabled: bool = False) -> tuple[str, str]:
    """Where to check the value: its table and data file; the file alone when the factor table names the table."""
    if tabled:
        return _file(d.file)
    return f"{escape(d.table)}; {_file(d.file)[0]}", f"{md_escape(d.table)}; {_file(d.file)[1]}"


def unverified_items(used: list[Datum], described: frozenset[str] = frozenset()) -> list[tuple[str, str]]:
    """(LaTeX, Markdown) per unverified value used; the load combinations together in one item, and the
    serviceability load factors in one.

    A symbol in `described` (the sheet's factor table gives its meaning, value and table) is named by
    its data file only, symbols of one file in one item (K_Sb, K_Sv, K_SE (service_factors.csv)): the
    row it was read from is the member's own case (species, grade, size, service, support), which the
    member table states."""
    items: dict[object, tuple[str, str]] = {}
    shared: dict[str, list[str]] = {}  # file → symbols, for those the factor table gives
    sls: dict[str, None] = {}  # the loads whose SLS factors are used, in order
    sls_datum: Datum | None = None
    combos: dict[str, Datum] = {}
    seen: set[str] = set()
    for d in used:
        if d.verified or d.warning in seen:
            continue
        seen.add(d.warning)
        if d.label.startswith("NBC combination "):
            combos.setdefault(d.label.split(" ", 2)[2], d)
            continue
        if d.label.startswith("SLS combination "):
            sls[d.label.split(" ")[3]] = None
            sls_datum = sls_datum or d
            items.setdefault("sls", ("", ""))  # its place in the list
            continue
        symbol = d.symbol or d.label.split(" ")[0]
        sym = f"${symbol_latex(symbol)}$"
        q_latex, q_md = _text(_qualifier(d.label, symbol))
        if symbol in described and not q_latex.startswith("="):
            if d.file not in shared:
                shared[d.file] = []
                items[("file", d.file)] = ("", "")  # its place in the list
            if sym not in shared[d.file]:
                shared[d.file].append(sym)
            continue
        src_latex, src_md = _source(d, symbol in described)
        what = "" if symbol in described else meaning(symbol)
        if q_latex.startswith("="):  # E05 = 0.87 E of …: the rule itself, after the symbol (again)
            if not what:
                items[d.warning] = (f"{sym} {q_latex} ({src_latex})", f"{sym} {q_md} ({src_md})")
                continue
            q_latex, q_md = f"{sym} {q_latex}", f"{sym} {q_md}"
        head_latex = sym + (f", {escape(what)}" if what else "") + (f": {q_latex}" if q_latex else "")
        head_md = sym + (f", {md_escape(what)}" if what else "") + (f": {q_md}" if q_md else "")
        items[d.warning] = (f"{head_latex} ({src_latex})", f"{head_md} ({src_md})")
    for file, symbols in shared.items():
        items[("file", file)] = (", ".join(symbols) + f" ({_file(file)[0]})", ", ".join(symbols) + f" ({_file(file)[1]})")
    # the combination tables of sections 3 and 3.2 name their NBC table and mark the unverified rows:
    # the list names the data file
    if sls_datum is not None:
        src_latex, src_md = _source(sls_datum, tabled=True)
        words = f"SLS load factor{'s' if len(sls) > 1 else ''} on {', '.join(sls)}"
        items["sls"] = (f"{escape(words)} ({src_latex})", f"{md_escape(words)} ({src_md})")
    if combos:
        first = next(iter(combos.values()))
        src_latex, src_md = _source(first, tabled=True)
        words = f"load factors of NBC cases {', '.join(combos)}"
        items["combinations"] = (f"{escape(words)} ({src_latex})", f"{md_escape(words)} ({src_md})")
    return list(items.values())


#: The head of the sheet's list; every value in it was recorded from memory.
LISTING_HEAD = "Values used here that are not yet verified against the standard (recorded from memory): "


def unverified_listing(used: list[Datum], described: frozenset[str] = frozenset()) -> tuple[str, str]:
    """The cautions' list of unverified values (LaTeX, Markdown), or two empty strings.

    A run-in paragraph, the values one after another separated by semicolons: every value
    is named with its symbol, case, table and data file, as in a bulleted list, in about
    half its height. Symbols in `described` are in the sheet's factor table, which gives
    their meaning and marks them unverified, so the list does not say the meaning again."""
    entries = unverified_items(used, described)
    if not entries:
        return "", ""
    # "NBC 2020", "Table 7.3", "O86-14" kept on one line: a run-in line never starts with a bare number
    latex = re.sub(r"\b(NBC|Table|Cl\.) (?=\d)", r"\1~", "; ".join(item for item, _ in entries))
    latex = re.sub(r"\b([A-Z]+\d+-\d+)\b", r"\\mbox{\1}", latex)
    # ragged right: file names do not hyphenate, and a justified line would open wide gaps before them
    return (f"\\par\\smallskip {{\\raggedright {escape(LISTING_HEAD)}{latex}.\\par}}\n",
            "\n\n" + md_escape(LISTING_HEAD) + "\n" + "".join(f"- {text}\n" for _, text in entries))
