"""The combined package PDF: cover, index of members, every sheet.

Each member's sheet is included as typeset on its own (pdfpages), stamped with
a continuous package page number, with a PDF bookmark per member. The layout is
the Jinja template ``templates/latex/package/package.tex.j2``.
"""

from __future__ import annotations

import hashlib
import os
import re
import shutil
import subprocess
import tempfile
from pathlib import Path
from typing import Any

from . import __version__
from .data import DataSet
from .design import MemberDesign
from .pipeline import XELATEX, ConversionError, templates_dir
from .project import Project
from .results import round_utilization
from .sheets import CAUTION
from .symbols import ACTION_WORDS
from .tex import escape

VERDICT = {"pass": "passes", "fail": "does not pass", "error": "not designed"}


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


def member_rows(designs: list[MemberDesign], outdir: Path, flags: dict[str, str]) -> tuple[list[dict], list[str]]:
    rows, notes = [], []
    for i, d in enumerate(designs):
        sheet = outdir / "sheets" / f"{d.mark}.pdf"
        gov = d.governing
        description = d.member.note if d.member and d.member.note else (d.member.type if d.member else "")
        rows.append({
            "mark": escape(d.mark),
            "anchor": f"m{i}",
            "description": escape(description[:110] + ("..." if len(description) > 110 else "")),
            "size": escape(d.size),
            "governing": escape(ACTION_WORDS.get(gov.check, gov.check).split(" (")[0].lower()) if gov and not d.errors else "--",
            "utilization": f"{round_utilization(gov.utilization):.3f}" if gov and not d.errors else "--",
            "verdict": {"pass": "PASSES", "fail": "\\textbf{DOES NOT PASS}", "error": "\\textbf{NOT DESIGNED}"}[d.status],
            "verdict_word": VERDICT[d.status],
            "flag": escape(flags.get(d.mark, "")),
            "sheet": sheet.as_posix() if sheet.exists() else "",
            "pages": page_count(sheet) if sheet.exists() else 0,
        })
        if d.errors:
            notes.append(f"{escape(d.mark)}: {escape(d.errors[0])}")
    return rows, notes


def package_tex(project: Project, designs: list[MemberDesign], data: DataSet, outdir: Path,
                flags: dict[str, str] | None = None) -> str:
    rows, notes = member_rows(designs, outdir, flags or {})
    counts = {"total": len(designs), "pass": 0, "fail": 0, "error": 0}
    for d in designs:
        counts[d.status] += 1
    unverified = len({w for d in designs for w in d.data_warnings})
    context: dict[str, Any] = {
        "project": {k: escape(v) for k, v in project.fields.items()},
        "codes": {k: escape(v) for k, v in project.codes.items()},
        "counts": counts, "members": rows, "notes": notes, "unverified": unverified,
        "caution": escape("Review and seal by a licensed professional engineer required; the codes adopted by "
                          "the authority having jurisdiction govern."),
        "caution_long": escape(CAUTION),
        "tool_version": f"timbersheets {__version__}",
        "data_hash": data.hash.split(":")[1][:12],
    }
    return _environment().get_template("package.tex.j2").render(**context)


def build_package(project: Project, designs: list[MemberDesign], data: DataSet, outdir: Path,
                  sheets: dict | None = None, flags: dict[str, str] | None = None) -> Path:
    """Typeset package.pdf in `outdir` (two xelatex passes), written atomically."""
    tex = package_tex(project, designs, data, outdir, flags)
    target = outdir / "package.pdf"
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


def tex_hash(text: str) -> str:
    return hashlib.sha256(re.sub(r"\s+", " ", text).encode()).hexdigest()
