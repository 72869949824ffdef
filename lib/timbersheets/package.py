"""The combined package PDF: cover, index of members (with the utilization
chart), the changes since the previous revision, then every sheet.

Each member's sheet is included as typeset on its own (pdfpages), stamped with
a continuous package page number, with a PDF bookmark per member. The layout is
the Jinja template ``templates/latex/package/package.tex.j2``. Everything comes
from the run's results document, so the package and results.json agree.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import tempfile
from pathlib import Path
from typing import Any

from . import __version__
from .data import DataSet
from .pipeline import XELATEX, ConversionError, templates_dir
from .project import Project
from .review import titleblock_text
from .revisions import MemberChange
from .sheets import CAUTION
from .symbols import ACTION_WORDS
from .tex import escape

VERDICT = {"pass": "passes", "fail": "does not pass", "error": "not designed"}
VERDICT_TEX = {"pass": "PASSES", "fail": r"\textbf{DOES NOT PASS}", "error": r"\textbf{NOT DESIGNED}"}
SHORT_CAUTION = ("Review and seal by a licensed professional engineer required; the codes adopted by the "
                 "authority having jurisdiction govern.")


def _environment():
    import jinja2

    return jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(templates_dir() / "latex" / "package")),
        block_start_string="((*", block_end_string="*))", variable_start_string="((",
        variable_end_string="))", comment_start_string="((=", comment_end_string="=))",
        autoescape=False, undefined=jinja2.StrictUndefined, keep_trailing_newline=True)


def page_count(pdf: Path) -> int:
    from pypdf import PdfReader

    return len(PdfReader(str(pdf)).pages)


def _governing(m: dict[str, Any]) -> str:
    gov = m.get("governing")
    if not gov or m["status"] == "error":
        return "--"
    return escape(ACTION_WORDS.get(gov["check"], gov["check"]).split(" (")[0].lower())


def member_rows(members: list[dict[str, Any]], outdir: Path) -> tuple[list[dict], list[str]]:
    rows, notes = [], []
    for i, m in enumerate(members):
        sheet = outdir / "sheets" / f"{m['mark']}.pdf"
        note = (m.get("inputs") or {}).get("note") or m.get("type") or ""
        review = m.get("review") or {"status": "not-checked"}
        flags = []
        if m.get("changed_since"):
            flags.append(f"changed since {m['changed_since']}")
        rows.append({
            "mark": escape(m["mark"]), "anchor": f"m{i}",
            "description": escape(note[:110] + ("..." if len(note) > 110 else "")),
            "size": escape(m.get("size") or ""),
            "governing": _governing(m),
            "utilization": "--" if m.get("utilization") is None or m["status"] == "error" else f"{m['utilization']:.3f}",
            "verdict": VERDICT_TEX[m["status"]], "verdict_word": VERDICT[m["status"]],
            "checked": escape(titleblock_text(review)),
            "flag": escape("; ".join(flags)),
            "sheet": sheet.resolve().as_posix() if sheet.exists() else "",
            "pages": page_count(sheet) if sheet.exists() else 0,
        })
        if m["errors"]:
            notes.append(f"{escape(m['mark'])}: {escape(m['errors'][0])}")
    return rows, notes


def change_rows(changes: list[MemberChange]) -> list[dict[str, str]]:
    out = []
    for c in changes:
        if c.kind != "changed":
            out.append({"mark": escape(c.mark), "what": escape(c.kind), "item": "", "old": "", "new": ""})
            continue
        items = [("input", k, a, b) for k, a, b in c.inputs] + [("result", k, a, b) for k, a, b in c.results]
        if c.verdict_flip:
            items.append(("verdict flipped", "status", *c.verdict_flip))
        for j, (what, k, a, b) in enumerate(items):
            out.append({"mark": escape(c.mark) if j == 0 else "", "what": escape(what), "item": escape(k),
                        "old": escape(a), "new": escape(b)})
    return out


def package_tex(project: Project, doc: dict[str, Any], data: DataSet, outdir: Path,
                changes: list[MemberChange], chart: str) -> str:
    members = doc["members"]
    rows, notes = member_rows(members, outdir)
    counts = {"total": len(members), "pass": 0, "fail": 0, "error": 0}
    for m in members:
        counts[m["status"]] += 1
    context: dict[str, Any] = {
        "project": {k: escape(v) for k, v in project.fields.items()},
        "codes": {k: escape(v) for k, v in project.codes.items()},
        "counts": counts, "members": rows, "notes": notes,
        "unverified": len({w for m in members for w in m["data_warnings"]}),
        "unchecked": sum(1 for m in members if (m.get("review") or {}).get("status") != "checked"),
        "checked": sum(1 for m in members if (m.get("review") or {}).get("status") == "checked"),
        "previous": escape(doc.get("previous_revision") or ""), "changes": change_rows(changes),
        "chart": chart, "caution": escape(SHORT_CAUTION), "caution_long": escape(CAUTION),
        "tool_version": f"timbersheets {__version__}", "data_hash": data.hash.split(":")[1][:12],
    }
    return _environment().get_template("package.tex.j2").render(**context)


def build_package(project: Project, doc: dict[str, Any], data: DataSet, outdir: Path,
                  changes: list[MemberChange]) -> Path:
    """Typeset package.pdf in `outdir` (two xelatex passes), written atomically."""
    target = outdir / "package.pdf"
    chart = outdir / "summary.png"
    tex = package_tex(project, doc, data, outdir, changes, chart.resolve().as_posix() if chart.exists() else "")
    with tempfile.TemporaryDirectory(prefix="ts-pkg-") as tmp:
        work = Path(tmp)
        (work / "package.tex").write_text(tex, encoding="utf-8")
        for _ in range(2):
            done = subprocess.run([*XELATEX, "package.tex"], cwd=work, capture_output=True, text=True,
                                  errors="replace")
            if done.returncode != 0:
                tail = "\n".join(ln for ln in done.stdout.splitlines() if ln.startswith("!"))[-1500:]
                raise ConversionError("package", "xelatex could not typeset the package", tail)
        staged = target.with_name(".package.pdf.part")
        shutil.copyfile(work / "package.pdf", staged)
        os.replace(staged, target)
    return target
