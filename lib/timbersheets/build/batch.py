"""Sheets typeset in batches, and their title blocks stamped afterwards.

A sheet PDF is made in two layers (see ``templates/latex/sheet/preamble.tex.j2``):

- the **body**: the calculation with the title block's rules, labels and fixed
  fields (project, member, designer, hashes). Many members are typeset in one
  xelatex run, each starting on a new page with its own page numbers; the
  batch is then split into one body per member by the page ranges xelatex
  reports. One pass: nothing on a body refers to another page.
- the **stamp**: the fields that change without the engineering changing
  (sheet n of N, revision with its "changed since", date, checked by), typeset
  for every sheet of a run in one small document with the same preamble and
  laid onto the body pages with pikepdf.

So a new revision or a review re-typesets no body, only stamps.
"""

from __future__ import annotations

import os
import re
import tempfile
import time
from dataclasses import dataclass
from functools import lru_cache, partial
from pathlib import Path
from typing import Callable, TypeVar

from ..fileio import file_hash
from .layers import Layer, lay, prepare
from .notebooks import templates_dir, to_latex
from .typeset import ConversionError, is_warm, typeset, warm_up

STAMPED = ("revision", "date", "checked")  # title-block fields set by the stamp, not the body
BEGIN, END = "%% timbersheets member begin", "%% timbersheets member end"
ENDS = re.compile(r"timbersheets-member (\d+) ends at page (\d+)")


def fixed_fields(titleblock: dict[str, str]) -> dict[str, str]:
    """The title-block fields typeset in the body."""
    return {k: v for k, v in titleblock.items() if k not in STAMPED}


def stamped_fields(titleblock: dict[str, str]) -> dict[str, str]:
    return {k: titleblock.get(k, "") for k in STAMPED}


@dataclass
class Body:
    mark: str
    notebook: Path
    titleblock: dict[str, str]  # fixed fields only
    pdf: Path  # where the body goes (the cache)
    stamp: dict[str, str] | None = None  # stamped fields: the stamped sheet is made in the same run
    sheet: Path | None = None  # where the stamped sheet goes (the cache), with `stamp`


@dataclass
class Stamp:
    mark: str
    body: Path
    pages: int
    titleblock: dict[str, str]  # stamped fields
    pdf: Path  # where the stamped sheet goes (the cache)


T = TypeVar("T")


def _one_by_one(items: list[T], run: Callable[[list[T]], dict[str, int]], mark: Callable[[T], str],
                what: str) -> dict[str, int | ConversionError]:
    """`run` on the whole list; when that fails, on each item alone, so one bad item costs only itself."""
    try:
        return dict(run(items))
    except ConversionError as exc:
        if len(items) == 1:
            return {mark(items[0]): ConversionError(mark(items[0]), f"xelatex could not typeset the {what}",
                                                    exc.log_tail)}
    out: dict[str, int | ConversionError] = {}
    for item in items:
        out.update(_one_by_one([item], run, mark, what))
    return out


def typeset_bodies(bodies: list[Body], times: dict[str, float]) -> dict[str, int | ConversionError]:
    """Typeset the bodies in one xelatex run and split them; per mark its page count, or the error.

    A body with `stamp` fields gets its stamp pages typeset in the same run, after the
    last body (TeX knows each member's page count by then), and its stamped sheet saved
    to `sheet`: a cold run needs no second TeX run for the title blocks.
    Seconds spent are added to `times` under "typeset" and "split"."""
    return _one_by_one(bodies, partial(_typeset_batch, times=times), lambda b: b.mark, "sheet")


def _typeset_batch(bodies: list[Body], times: dict[str, float]) -> dict[str, int]:
    import pikepdf

    started = time.monotonic()
    preamble, parts, files = "", [], {}
    for i, body in enumerate(bodies):
        tex, outputs = to_latex(body.notebook, body.titleblock, unique_key=f"m{i}")
        head, _, rest = tex.partition("\\begin{document}")
        preamble = preamble or head
        parts.append(rest[rest.index(BEGIN):rest.index(END)])
        files.update(outputs)
    stamps = [_stamp_fields().render(s=b.stamp, pages=f"\\tsmemberpages{{{i}}}")
              for i, b in enumerate(bodies, start=1) if b.stamp is not None]
    stamping = "\\tsstamptrue\n" + "\n".join(stamps) if stamps else ""
    source = preamble + "\\begin{document}\n" + "\n".join(parts) + stamping + "\\end{document}\n"
    with tempfile.TemporaryDirectory(prefix="ts-tex-") as tmp:
        done = typeset(source, Path(tmp), "sheets", "sheets", files)
        split = time.monotonic()
        times["typeset"] = times.get("typeset", 0.0) + split - started
        ends = {int(i): int(p) for i, p in ENDS.findall(done.log)}
        pages = {}
        with pikepdf.open(done.pdf) as batch:
            start = 0
            for i, body in enumerate(bodies, start=1):
                end = ends[i]
                with pikepdf.new() as sheet:
                    sheet.pages.extend(batch.pages[start:end])
                    _save(sheet, body.pdf)
                pages[body.mark] = end - start
                start = end
            for body in bodies:  # the stamp pages follow the last body, in the same order
                if body.stamp is not None:
                    _lay_stamp(body.pdf, [prepare(p) for p in batch.pages[start:start + pages[body.mark]]], body.sheet)
                    start += pages[body.mark]
    times["split"] = times.get("split", 0.0) + time.monotonic() - split
    return pages


STAMP_SHARE = 40  # sheets per xelatex run of stamps at least, before the stamps are shared among runs


def stamp_sheets(stamps: list[Stamp], runs: int = 1) -> dict[str, int | ConversionError]:
    """Lay each sheet's title-block stamp onto its body; per mark its page count, or the error.

    A new revision re-stamps every sheet: up to `runs` xelatex runs at once (one per CPU the
    run may use), each with an equal share of the pages."""
    # one run when one is waiting with the preamble read: its TeX time is then the pages alone
    runs = 1 if is_warm(sheet_preamble()) else max(1, min(runs, len(stamps) // STAMP_SHARE))
    if runs == 1:
        return _one_by_one(stamps, _stamp_batch, lambda s: s.mark, "title block")
    from concurrent.futures import ThreadPoolExecutor

    shares: list[list[Stamp]] = [[] for _ in range(runs)]
    for stamp in sorted(stamps, key=lambda s: -s.pages):  # the most pages to the share with fewest
        min(shares, key=lambda share: sum(s.pages for s in share)).append(stamp)
    out: dict[str, int | ConversionError] = {}
    with ThreadPoolExecutor(max_workers=runs) as pool:  # xelatex and qpdf do the work, outside the GIL
        for done in pool.map(lambda share: _one_by_one(share, _stamp_batch, lambda s: s.mark, "title block"),
                             shares):
            out.update(done)
    return out


@lru_cache(maxsize=1)
def _environment():
    """The stamp layouts' Jinja environment: ((( ))) values, as in the nbconvert sheet template."""
    import jinja2

    return jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(templates_dir() / "latex" / "sheet")),
        block_start_string="((*", block_end_string="*))", variable_start_string="(((",
        variable_end_string=")))", comment_start_string="((=", comment_end_string="=))",
        autoescape=False, undefined=jinja2.StrictUndefined, keep_trailing_newline=True)


def sheet_preamble() -> str:
    """The preamble of every sheet batch and stamp document (what precedes \\begin{document})."""
    path = templates_dir() / "latex" / "sheet" / "preamble.tex.j2"
    return _preamble(str(path), file_hash(path))


@lru_cache(maxsize=2)
def _preamble(path: str, version: str) -> str:
    """Rendered once per version (hash) of the file."""
    return _environment().get_template(Path(path).name).render()


def warm_sheets() -> None:
    """An xelatex run in this process that has read the sheets' preamble, for the next batch or stamps."""
    warm_up(sheet_preamble())


def _stamp_template():
    return _environment().get_template("stamp.tex.j2")


def _stamp_fields():
    return _environment().get_template("stampfields.tex.j2")


def _lay_stamp(body: Path, layer_pages: list[Layer], target: Path) -> None:
    """Lay stamp pages (one per body page, in order, each prepared by `layers.prepare`) onto the body
    PDF; save as `target`."""
    import pikepdf

    with pikepdf.open(body) as sheet:
        for page, stamp in zip(sheet.pages, layer_pages, strict=True):
            lay(sheet, page, stamp)
        _save(sheet, target)


def _stamp_batch(stamps: list[Stamp]) -> dict[str, int]:
    """The stamps' layer typeset once, then laid on each body.

    A stamp page holds only the revision, date, checker and "k of n", so sheets with the same
    fields and page count share their stamp pages: each different page is typeset once (a
    review of 100 sheets: about 70 pages, not 470)."""
    import pikepdf

    where: dict[tuple, int] = {}  # (fields, k, n) -> its page in the layer
    pages = []
    for s in stamps:
        fields = tuple(sorted(s.titleblock.items()))
        for k in range(1, s.pages + 1):
            if (fields, k, s.pages) not in where:
                where[(fields, k, s.pages)] = len(pages)
                pages.append({"s": s.titleblock, "page": k, "pages": s.pages})
    with tempfile.TemporaryDirectory(prefix="ts-stamp-") as tmp:
        done = typeset(_stamp_template().render(pages=pages), Path(tmp), "stamps", "stamps")
        with pikepdf.open(done.pdf) as layer:
            prepared = [prepare(page) for page in layer.pages]  # once: sheets share their stamp pages
            for s in stamps:
                fields = tuple(sorted(s.titleblock.items()))
                _lay_stamp(s.body, [prepared[where[(fields, k, s.pages)]] for k in range(1, s.pages + 1)], s.pdf)
    return {s.mark: s.pages for s in stamps}


def _save(pdf, target: Path) -> None:
    target.parent.mkdir(parents=True, exist_ok=True)
    staged = target.with_name(f".{target.name}.part")
    pdf.save(staged)
    os.replace(staged, target)
