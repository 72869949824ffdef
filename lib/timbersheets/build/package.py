"""The combined package PDF: cover, index of members (with the utilization
chart), the changes since the previous revision, then every sheet.

The front matter is typeset (``templates/latex/package/package.tex.j2``) with
its page numbers computed from the sheets' page counts; the member sheets are
then copied in as typeset on their own (one at a time, straight to the file: `pdfwrite`), each page
stamped with a continuous package page number, with a PDF bookmark per member. Copying instead of
re-typesetting every sheet page keeps a rerun after one change fast.
Everything comes from the run's results document, so package and results.json agree.
"""

from __future__ import annotations

import hashlib
import os
import re
from functools import lru_cache
import tempfile
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path
from typing import Any

from .. import __version__
from ..constants import CAUTION, SHORT_CAUTION
from ..engineering.data import DataSet
from ..fileio import copy_atomic, library_fingerprint, write_atomic
from ..job.project import Project
from ..job.review import count_text, standing, titleblock_text
from ..job.revisions import MemberChange
from ..sheet.symbols import ACTION_WORDS
from ..sheet.tex import escape
from .pdfwrite import Outline, PdfWriter
from .notebooks import templates_dir
from .typeset import layout_environment, typeset

VERDICT = {"pass": "passes", "fail": "does not pass", "error": "not designed"}
VERDICT_TEX = {"pass": "PASSES", "fail": r"\textbf{DOES NOT PASS}", "error": r"\textbf{NOT DESIGNED}"}



def page_count(pdf: Path) -> int:
    stat = pdf.stat()
    return _page_count(str(pdf), stat.st_mtime_ns, stat.st_size)


@lru_cache(maxsize=4096)
def _page_count(path: str, mtime_ns: int, size: int) -> int:
    import pikepdf

    with pikepdf.open(path) as pdf:
        return len(pdf.pages)


def _governing(m: dict[str, Any]) -> str:
    gov = m.get("governing")
    if not gov or m["status"] == "error":
        return "--"
    return escape(ACTION_WORDS.get(gov["check"], gov["check"]).split(" (")[0].lower())


def member_rows(members: list[dict[str, Any]], outdir: Path, first: int = 1,
                pages: dict[str, int] | None = None, present: set[str] | None = None) -> tuple[list[dict], list[str]]:
    """Index rows; sheets start at package page `first` in member order.

    `pages` holds the page counts xelatex reported for the sheets (read from
    the PDFs where it is missing). `present` names the members with a sheet, when the
    sheets are not written yet (a forecast: `front_ahead`); else a sheet is one in `outdir`."""
    pages = pages or {}
    rows, notes = [], []
    page = first
    for i, m in enumerate(members):
        sheet = outdir / "sheets" / f"{m['mark']}.pdf"
        exists = m["mark"] in present if present is not None else sheet.exists()
        note = (m.get("inputs") or {}).get("note") or m.get("type") or ""
        review = m.get("review") or {"status": "not-checked"}
        flags = []
        if m.get("changed_since"):
            flags.append(f"changed since {m['changed_since']}")
        rows.append({
            "mark": escape(m["mark"]), "plain": m["mark"], "anchor": f"m{i}",
            "description": escape(shorten(note)),
            "size": escape(m.get("size") or ""),
            "governing": _governing(m),
            "utilization": "--" if m.get("utilization") is None or m["status"] == "error" else f"{m['utilization']:.3f}",
            "verdict": VERDICT_TEX[m["status"]], "verdict_word": VERDICT[m["status"]],
            "checked": escape(titleblock_text(review)),
            "flag": escape("; ".join(flags)),
            "sheet": sheet.resolve().as_posix() if exists else "",
            "pages": (pages.get(m["mark"]) or page_count(sheet)) if exists else 0,
            "start": page,
        })
        page += rows[-1]["pages"]
        if m["errors"]:
            notes.append(f"{escape(m['mark'])}: {escape(m['errors'][0])}")
    return rows, notes


def shorten(text: str, limit: int = 200) -> str:
    """Text of at most `limit` characters, cut only between words (then an ellipsis)."""
    if len(text) <= limit:
        return text
    return text[:limit - 1].rsplit(" ", 1)[0].rstrip(" ,;:") + "\u2026"


def plural(n: int, one: str, many: str) -> str:
    """'1 member', '2 members'."""
    return f"{n} {one if n == 1 else many}"


def cover_lines(project: Project, counts: dict[str, int], review_counts: str) -> dict[str, str]:
    """The cover's and index's sentences about the members, in plain grammar (escaped).

    `review_counts` is review.count_text: the one count of verdicts, also used by review --status.
    """
    total = counts["total"]
    checker = project.fields["checker"] or "not named"
    members = (f"{plural(total, 'member', 'members')}: {counts['pass']} {'passes' if counts['pass'] == 1 else 'pass'}, "
               f"{counts['fail']} {'does' if counts['fail'] == 1 else 'do'} not pass, {counts['error']} not designed")
    return {
        "checker": escape(f"{checker} ({review_counts})"),
        "members": escape(members),
        "unchecked": escape(f"Review: {review_counts}."),
    }


def change_rows(changes: list[MemberChange]) -> list[dict[str, str]]:
    out = []
    for c in changes:
        if c.kind != "changed":
            out.append({"mark": escape(c.mark), "what": escape(c.kind), "item": "", "old": "", "new": ""})
            continue
        items = [("because", "carried", "", f"{source} changed") for source in c.because]
        items += [("input", k, a, b) for k, a, b in c.inputs] + [("result", k, a, b) for k, a, b in c.results]
        if c.verdict_flip:
            items.append(("verdict flipped", "status", *c.verdict_flip))
        for j, (what, k, a, b) in enumerate(items):
            out.append({"mark": escape(c.mark) if j == 0 else "", "what": escape(what), "item": escape(k),
                        "old": escape(a), "new": escape(b)})
    return out


def package_tex(project: Project, doc: dict[str, Any], data: DataSet, outdir: Path,
                changes: list[MemberChange], chart: str, front_pages: int = 2,
                pages: dict[str, int] | None = None, present: set[str] | None = None) -> tuple[str, list[dict]]:
    """The front matter's LaTeX, given how many pages it takes, and the index rows."""
    members = doc["members"]
    rows, notes = member_rows(members, outdir, front_pages + 1, pages, present)
    counts = {"total": len(members), "pass": 0, "fail": 0, "error": 0}
    for m in members:
        counts[m["status"]] += 1
    states = [m.get("review") or {"status": "not-checked"} for m in members]
    review_counts = count_text(states)
    all_ok = all(standing(s) == "ok" for s in states)
    context: dict[str, Any] = {
        "project": {k: escape(v) for k, v in project.fields.items()},
        "codes": {k: escape(v) for k, v in project.codes.items()},
        "counts": counts, "members": rows, "notes": notes,
        "unverified": len({w for m in members for w in m["data_warnings"]}),
        "firm": escape(data.firm.description) if data.firm else "",
        "corrections": len({c for m in members for c in m.get("data_corrections", [])}),
        "unchecked": not all_ok, "lines": cover_lines(project, counts, review_counts),
        "previous": escape(doc.get("previous_revision") or ""), "changes": change_rows(changes),
        "chart": chart, "caution": escape(SHORT_CAUTION), "caution_long": escape(CAUTION),
        "tool_version": f"timbersheets {__version__}", "data_hash": data.hash.split(":")[1][:12],
        "total_pages": front_pages + sum(r["pages"] for r in rows),
    }
    return layout_environment(templates_dir() / "latex" / "package").get_template("package.tex.j2").render(**context), rows


def _typeset(tex: str, work: Path, name: str) -> tuple[Path, str]:
    done = typeset(tex, work, name, "package")
    aux = work / f"{name}.aux"
    return done.pdf, aux.read_text(encoding="utf-8", errors="replace") if aux.exists() else ""


def _front(tex: str, chart: Path | None, work: Path, cache: Path | None) -> tuple[Path, str]:
    """The front matter typeset: its PDF and its .aux text. The same source with the same chart,
    typeset before (by an earlier run, or ahead by this one: `front_ahead`), comes from `cache`."""
    if cache is None:
        return _typeset(tex, work, "package")
    digest = hashlib.sha256(tex.encode())
    if chart is not None and chart.exists():
        digest.update(chart.read_bytes())
    pdf, aux = cache / f"{digest.hexdigest()}.front.pdf", cache / f"{digest.hexdigest()}.front.aux"
    if pdf.exists() and aux.exists():
        return pdf, aux.read_text(encoding="utf-8", errors="replace")
    made, text = _typeset(tex, work, "package")
    write_atomic(aux, text)
    copy_atomic(made, pdf)
    return made, text


def _first_guess(hint: Path | None) -> int:
    """The front matter's length in pages, as the revision folder `hint` last had it (else 2)."""
    if hint is not None and (hint / FRONT_HINT).exists():
        return int((hint / FRONT_HINT).read_text() or 2)
    return 2


def front_ahead(project: Project, doc: dict[str, Any], data: DataSet, outdir: Path, changes: list[MemberChange],
                chart: Path, hint: Path | None, pages: dict[str, int], present: set[str], cache: Path) -> None:
    """Typeset into `cache` the front matter and page stamps a package would have from a forecast of
    the run: the results as designed, and each sheet's page count as cached or as last typeset.

    The run calls this in a thread while its sheets are made; `build_package` then takes both from
    the cache when its own source is the same (nothing in the forecast changed), and typesets them
    itself when not. A wrong forecast costs only this thread's work."""
    import pikepdf

    chart_path = chart.resolve().as_posix() if chart.exists() else ""
    front_pages = _first_guess(hint)
    with tempfile.TemporaryDirectory(prefix="ts-front-") as tmp:
        for attempt in range(4):
            tex, rows = package_tex(project, doc, data, outdir, changes, chart_path, front_pages, pages, present)
            front, _ = _front(tex, chart, Path(tmp) / f"front-{attempt}", cache)
            with pikepdf.open(front) as typeset:
                actual = len(typeset.pages)
            if actual == front_pages:
                break
            front_pages = actual
        sheet_pages = sum(r["pages"] for r in rows)
        if sheet_pages and actual == front_pages:
            _stamps(project, front_pages + 1, front_pages + sheet_pages, Path(tmp), cache)


def _stamps(project: Project, first: int, total: int, work: Path, cache: Path | None) -> Path:
    """One page per sheet page, blank but for 'package page k of N' where the sheets leave room.

    The same pages typeset before are taken from `cache` (a review changes no page number)."""
    stamp = (r"{\footnotesize %s \quad rev %s \quad package page %d of %d}")
    pages = "".join(
        r"\begin{picture}(0,0)\put(548,-776){\makebox(0,0)[r]{" + stamp % (escape(project.fields["number"]),
        escape(project.revision), k, total) + r"}}\end{picture}\newpage" + "\n" for k in range(first, total + 1))
    tex = ("\\documentclass[10pt]{article}\n\\usepackage[letterpaper,margin=0pt]{geometry}\n\\usepackage{fontspec}\n"
           "\\pagestyle{empty}\\setlength{\\parindent}{0pt}\\setlength{\\unitlength}{1bp}\n"
           "\\begin{document}\n" + pages + "\\end{document}\n")
    cached = cache / f"{hashlib.sha256(tex.encode()).hexdigest()}.pagestamps.pdf" if cache is not None else None
    if cached is not None and cached.exists():
        return cached
    pdf = _typeset(tex, work, "stamps")[0]
    if cached is not None:
        copy_atomic(pdf, cached)
    return pdf


FRONT_HINT = ".front-pages"


def _package_key(tex: str, outdir: Path, rows: list[dict]) -> str:
    """What the package is made of: the front matter's source (the staging folder's name left
    out), the chart, every sheet's bytes and the library (which draws the page stamps)."""
    digest = hashlib.sha256(tex.replace(outdir.resolve().as_posix(), "").encode())
    for path in [outdir / "summary.png"] + [Path(r["sheet"]) for r in rows if r["sheet"]]:
        digest.update(hashlib.sha256(path.read_bytes()).digest() if path.exists() else b"-")
    digest.update(library_fingerprint().encode())
    return digest.hexdigest()


def build_package(project: Project, doc: dict[str, Any], data: DataSet, outdir: Path,
                  changes: list[MemberChange], hint: Path | None = None,
                  pages: dict[str, int] | None = None, cache: Path | None = None, chart: Path | None = None) -> Path:
    """package.pdf in `outdir`: front matter typeset, sheets appended and stamped; written atomically.

    `hint` is the previous revision folder: its front-matter length is the first
    guess, which saves a second typesetting of the front matter on a rerun. A
    package made of exactly the same parts before is taken from `cache`. `chart` is the
    summary chart to show (the run names its copy in the cache, by its content), else
    `outdir`'s summary.png.
    """
    import pikepdf

    target = outdir / "package.pdf"
    chart = chart if chart is not None and chart.exists() else outdir / "summary.png"
    chart_path = chart.resolve().as_posix() if chart.exists() else ""
    front_pages = _first_guess(hint)
    tex, rows = package_tex(project, doc, data, outdir, changes, chart_path, front_pages, pages)
    guessed_tex = tex
    cached = cache / f"{_package_key(tex, outdir, rows)}.package.pdf" if cache is not None else None
    if cached is not None and cached.exists():
        copy_atomic(cached, target)
        write_atomic(outdir / FRONT_HINT, str(front_pages))
        return target
    with tempfile.TemporaryDirectory(prefix="ts-pkg-") as tmp, ThreadPoolExecutor(max_workers=2) as ahead:
        work = Path(tmp)
        sheet_pages = sum(r["pages"] for r in rows)
        # beside the front matter's xelatex run (for the guessed front-matter length): the page stamps
        # for that length, and in this thread the sheets' pages gathered into the package body
        guessed = front_pages
        stamps = ahead.submit(_stamps, project, guessed + 1, guessed + sheet_pages, work, cache) if sheet_pages else None
        first_front = ahead.submit(_front, tex, chart, work / "front", cache)
        sheets = [r for r in rows if r["sheet"]]
        staged = target.with_name(".package.pdf.part")
        writer = PdfWriter(staged)
        try:
            slots: list[int] = []  # each sheet page's package stamp, written once the front matter settles
            for r in sheets:  # beside the front matter's typesetting: one sheet open at a time
                with pikepdf.open(r["sheet"]) as src:
                    mine = [writer.stamp_slot() for _ in src.pages]
                    writer.add_pages(src, stamps=mine)
                    slots += mine
            front, aux = first_front.result()
            for attempt in range(4):  # the front matter's length sets the page numbers it prints
                actual = page_count(front)
                if actual == front_pages:
                    break
                front_pages = actual
                tex, rows = package_tex(project, doc, data, outdir, changes, chart_path, front_pages, pages)
                front, aux = _front(tex, chart, work / f"front-{attempt}", cache)
            front_pages = page_count(front)  # the last one typeset, if it never settled
            total = front_pages + sum(r["pages"] for r in rows)
            labels = {k: int(v) - 1 for k, v in re.findall(r"\\newlabel\{ts-(\w+)\}\{\{[^}]*\}\{(\d+)\}", aux)}
            sheets = [r for r in rows if r["sheet"]]
            if slots:
                made = stamps.result() if stamps is not None else None
                if made is None or front_pages != guessed:
                    made = _stamps(project, front_pages + 1, total, work, cache)
                with pikepdf.open(made) as overlay:
                    if len(overlay.pages) != len(slots):
                        raise RuntimeError(f"the sheets have {len(slots)} pages, the index counted "
                                           f"{len(overlay.pages)}: a sheet changed while the package was made")
                    memo: dict = {}  # the stamps' font, written once for all of them
                    for slot, page in zip(slots, overlay.pages):
                        writer.stamp(slot, overlay, page, memo)
            with pikepdf.open(front) as cover:
                writer.add_pages(cover)  # the few front pages go before the many sheet pages
            outline = [Outline("Cover", 0), Outline("Index of members", labels.get("index", 1))]
            if "changes" in labels:
                outline.append(Outline(f"Changes since rev {doc.get('previous_revision')}", labels["changes"]))
            if sheets:
                outline.append(Outline("Member sheets", front_pages, [
                    Outline(f"{r['plain']} — {r['verdict_word']}", r["start"] - 1) for r in sheets]))
            order = list(range(len(slots), len(slots) + front_pages)) + list(range(len(slots)))
            writer.close(order, outline, {
                "Title": f"{project.fields['title']} - calculation package rev {project.revision}",
                "Creator": f"timbersheets {__version__}", "Producer": f"timbersheets {__version__}"})
        except BaseException:
            writer.abandon()
            raise
        write_atomic(outdir / FRONT_HINT, str(front_pages))
        os.replace(staged, target)
    if cached is not None:
        # kept under the key of the front matter as it settled: the next run's first guess is that
        # length (FRONT_HINT), so the same parts find it (under the first guess's key, a first run
        # whose front matter was not 2 pages long missed the cache on its next rerun: 1.2 s of 100 members)
        settled = cached if tex == guessed_tex else cache / f"{_package_key(tex, outdir, rows)}.package.pdf"
        copy_atomic(target, settled)
    return target

