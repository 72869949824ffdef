"""Executing a member's notebook (papermill) and converting it to PDF (nbconvert, xelatex).

Both steps are plain functions of files, so the runner can call them in worker
processes. A failed execution still leaves the executed notebook, with the
error marked in place by papermill, before the failure is reported.
"""

from __future__ import annotations

import hashlib
import os
import shutil
import subprocess
import tempfile
from functools import lru_cache
from pathlib import Path
from typing import Any

from .errors import ParameterError, TimbersheetsError

XELATEX = ["xelatex", "-interaction=nonstopmode", "-halt-on-error", "-no-shell-escape"]


class ConversionError(TimbersheetsError):
    def __init__(self, mark: str, problem: str, log_tail: str = "") -> None:
        super().__init__(mark, problem, log_tail)
        self.mark, self.problem, self.log_tail = mark, problem, log_tail

    def __str__(self) -> str:
        tail = f"\n{self.log_tail}" if self.log_tail else ""
        return f"{self.mark}: {self.problem}{tail}"


def templates_dir() -> Path:
    """The repository's templates/ folder (or $TIMBERSHEETS_TEMPLATES)."""
    env = os.environ.get("TIMBERSHEETS_TEMPLATES")
    return Path(env) if env else Path(__file__).resolve().parents[2] / "templates"


def file_hash(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


@lru_cache(maxsize=1)
def library_fingerprint() -> str:
    """A hash of the library's own source and data: any change re-executes members."""
    from . import __version__

    root = Path(__file__).resolve().parent
    digest = hashlib.sha256(__version__.encode())
    for path in sorted(root.rglob("*")):
        if path.suffix in (".py", ".csv", ".toml") and "__pycache__" not in path.parts:
            digest.update(path.relative_to(root).as_posix().encode())
            digest.update(path.read_bytes())
    return digest.hexdigest()


@lru_cache(maxsize=16)
def template_parameters(template: Path) -> frozenset[str]:
    import papermill

    return frozenset(papermill.inspect_notebook(str(template)))


def check_parameters(template: Path, parameters: dict[str, Any]) -> None:
    """Refuse parameters the template does not declare, and declared ones not given."""
    declared = template_parameters(template)
    unknown, missing = sorted(set(parameters) - declared), sorted(declared - set(parameters))
    if unknown or missing:
        raise ParameterError(unknown, missing, where=f"template {template.name}")


def execute(template: Path, out: Path, parameters: dict[str, Any], cwd: Path) -> str | None:
    """Run `template` with `parameters` into `out`. Returns None, or the error text.

    The output notebook is always written (to a temporary name, then renamed),
    with a failing cell's error kept in it.
    """
    import papermill
    from papermill.exceptions import PapermillExecutionError

    check_parameters(template, parameters)
    out.parent.mkdir(parents=True, exist_ok=True)
    tmp = out.with_name(f".{out.stem}.part.ipynb")
    error = None
    try:
        papermill.execute_notebook(str(template), str(tmp), parameters=parameters, progress_bar=False,
                                   log_output=False, kernel_name="python3", cwd=str(cwd),
                                   extra_arguments=["--IPKernelApp.log_level=ERROR"])
    except PapermillExecutionError as exc:
        error = f"{exc.ename}: {exc.evalue}"
    if tmp.exists():
        os.replace(tmp, out)
    return error


def to_latex(notebook: Path, titleblock: dict[str, str]) -> tuple[str, dict[str, bytes]]:
    """The sheet's LaTeX source (and images) with the title block set."""
    import nbformat
    from nbconvert import LatexExporter

    nb = nbformat.read(str(notebook), as_version=4)
    nb.metadata.setdefault("timbersheets", {})["titleblock"] = titleblock
    exporter = LatexExporter(template_name="sheet", extra_template_basedirs=[str(templates_dir() / "latex")])
    body, resources = exporter.from_notebook_node(nb)
    return body, dict(resources.get("outputs", {}))


def compile_pdf(tex: str, files: dict[str, bytes], pdf: Path, mark: str, passes: int = 2) -> None:
    """xelatex `tex` (no shell escape) and move the PDF into place atomically."""
    with tempfile.TemporaryDirectory(prefix="ts-tex-") as tmp:
        work = Path(tmp)
        (work / "sheet.tex").write_text(tex, encoding="utf-8")
        for name, data in files.items():
            (work / name).write_bytes(data)
        for _ in range(passes):
            done = subprocess.run([*XELATEX, "sheet.tex"], cwd=work, capture_output=True, text=True,
                                  errors="replace")
            if done.returncode != 0:
                tail = "\n".join(line for line in done.stdout.splitlines() if line.startswith("!"))[-1500:]
                raise ConversionError(mark, "xelatex could not typeset the sheet", tail)
        pdf.parent.mkdir(parents=True, exist_ok=True)
        staged = pdf.with_name(f".{pdf.name}.part")
        shutil.copyfile(work / "sheet.pdf", staged)
        os.replace(staged, pdf)


def notebook_to_pdf(notebook: Path, pdf: Path, titleblock: dict[str, str], mark: str) -> None:
    tex, files = to_latex(notebook, titleblock)
    compile_pdf(tex, files, pdf, mark)


def to_html(notebook: Path, html: Path, titleblock: dict[str, str]) -> None:
    """An HTML sheet (no TeX needed): the same outputs, inputs hidden."""
    import nbformat
    from nbconvert import HTMLExporter

    nb = nbformat.read(str(notebook), as_version=4)
    nb.metadata.setdefault("timbersheets", {})["titleblock"] = titleblock
    exporter = HTMLExporter(exclude_input=True, exclude_input_prompt=True, exclude_output_prompt=True)
    body, _ = exporter.from_notebook_node(nb)
    html.parent.mkdir(parents=True, exist_ok=True)
    staged = html.with_name(f".{html.name}.part")
    staged.write_text(body, encoding="utf-8")
    os.replace(staged, html)
