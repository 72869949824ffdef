"""`timbersheets doctor`: is this machine ready to make sheets, and how to get what is missing.

The checks look at what a run actually uses: the Python version, the package and
the Jupyter kernel papermill starts, xelatex with every LaTeX package the sheet
and package layouts load (read from the layouts themselves), and the two fonts
the layouts name. A last check typesets a one-line document with both fonts, so
"ready" means xelatex really found them. Nothing is installed or changed.
"""

from __future__ import annotations

import re
import shutil
import subprocess
import sys
import tempfile
from dataclasses import dataclass
from pathlib import Path

PYTHON_MIN = (3, 11)
FONTS = ("Latin Modern Roman", "DejaVu Sans")  # the text font and the fallback (sheet.tex.j2 \tsfallback)
LATIN_MODERN_FILE = "lmroman10-regular.otf"

GET_TEX = {
    "Windows": "install MiKTeX (miktex.org; 'install for me only' needs no administrator rights) and let it "
               "install missing packages on the fly, or TeX Live (tug.org/texlive); the DejaVu fonts come with "
               "MiKTeX's 'dejavu' package",
    "macOS": "install MacTeX (tug.org/mactex, or: brew install --cask mactex-no-gui); it includes every package "
             "and font the sheets use",
    "Linux": "sudo apt-get install --no-install-recommends texlive-xetex texlive-fonts-recommended "
             "texlive-plain-generic texlive-latex-extra lmodern fonts-dejavu-core (Debian, Ubuntu); without root, "
             "TeX Live's own installer (tug.org/texlive) installs into your home folder",
}
NO_TEX = "Without TeX: timbersheets run DIR --format html makes HTML sheets, and --no-pdf results only."


@dataclass(frozen=True)
class Finding:
    """One thing checked: what, whether it is there, what was found, how to fix it."""

    what: str
    ok: bool
    found: str
    fix: str = ""
    needed_for: str = "everything"  # everything | PDF sheets


def check_python() -> Finding:
    version = ".".join(str(v) for v in sys.version_info[:3])
    ok = sys.version_info[:2] >= PYTHON_MIN
    return Finding("Python", ok, f"{version} ({sys.executable})",
                   "" if ok else f"install Python {'.'.join(map(str, PYTHON_MIN))} or newer from python.org")


def check_package() -> Finding:
    """The package, the libraries a run imports, and the Jupyter kernel the templates name."""
    from .. import __version__

    missing = []
    for name in ("pint", "handcalcs", "papermill", "nbconvert", "nbformat", "ipykernel", "matplotlib", "PIL", "pikepdf"):
        try:
            __import__(name)
        except ImportError:
            missing.append(name)
    try:
        from jupyter_client.kernelspec import find_kernel_specs

        kernels = find_kernel_specs()
    except ImportError:
        kernels = {}
    if "python3" not in kernels:
        missing.append("the python3 Jupyter kernel (python -m ipykernel install --user)")
    found = f"timbersheets {__version__} ({Path(__file__).resolve().parents[1]})"
    return Finding("timbersheets package", not missing, found if not missing else f"{found}; missing: "
                   + ", ".join(missing), "" if not missing else "in the virtual environment: python -m pip install .")


def layout_packages(templates: Path) -> list[str]:
    """Every LaTeX package the sheet and package layouts load, in order."""
    names: list[str] = []
    for layout in sorted((templates / "latex").rglob("*.tex.j2")):  # every layout, so a new one is checked too
        text = layout.read_text(encoding="utf-8")
        for group in re.findall(r"\\usepackage(?:\[[^\]]*\])?\{([^}]*)\}", text):
            names += [n.strip() for n in group.split(",") if n.strip() and n.strip() not in names]
    return names


def check_tex(templates: Path) -> list[Finding]:
    """xelatex, the layouts' LaTeX packages and the fonts; the last finding typesets both fonts."""
    xelatex = shutil.which("xelatex")
    if xelatex is None:
        return [Finding("xelatex", False, "not found on PATH", "see 'Getting TeX' below", "PDF sheets")]
    findings = [Finding("xelatex", True, xelatex, needed_for="PDF sheets")]
    kpsewhich = shutil.which("kpsewhich")
    if kpsewhich is not None:
        wanted = [f"{name}.sty" for name in layout_packages(templates)] + [LATIN_MODERN_FILE]
        done = subprocess.run([kpsewhich, *wanted], capture_output=True, text=True)
        have = {Path(line.strip()).name for line in done.stdout.splitlines() if line.strip()}
        absent = [w for w in wanted if w not in have]
        findings.append(Finding("LaTeX packages of the layouts", not absent,
                                f"{len(wanted) - len(absent)} of {len(wanted)} found"
                                + (f"; missing: {', '.join(absent)}" if absent else ""),
                                "" if not absent else "install them with your TeX distribution's package manager "
                                "(MiKTeX Console, tlmgr install, or apt-get)", "PDF sheets"))
    findings.append(_typeset_fonts(xelatex))
    return findings


def _typeset_fonts(xelatex: str) -> Finding:
    """Typeset one line in each font the layouts name: the proof that xelatex finds them."""
    body = "".join(f"{{\\fontspec{{{family}}}{family} }}" for family in FONTS)
    doc = f"\\documentclass{{article}}\\usepackage{{fontspec}}\\begin{{document}}{body}\\end{{document}}\n"
    with tempfile.TemporaryDirectory(prefix="ts-doctor-") as tmp:
        (Path(tmp) / "fonts.tex").write_text(doc, encoding="utf-8")
        try:
            done = subprocess.run([xelatex, "-interaction=nonstopmode", "-halt-on-error", "-no-shell-escape",
                                   "fonts.tex"], cwd=tmp, capture_output=True, text=True, errors="replace",
                                  timeout=120)
        except subprocess.TimeoutExpired:
            return Finding("fonts", False, "xelatex did not finish within 2 minutes (it may be building its font "
                           "cache; run doctor again)", "", "PDF sheets")
    fonts = ", ".join(FONTS)
    if done.returncode == 0:
        return Finding("fonts", True, f"{fonts}: typeset", needed_for="PDF sheets")
    problem = next((ln.strip() for ln in done.stdout.splitlines() if ln.startswith("!") or "not found" in ln),
                   "xelatex stopped")
    return Finding("fonts", False, f"a test page with {fonts} failed: {problem}",
                   "install Latin Modern (lmodern) and DejaVu Sans (fonts-dejavu-core, or MiKTeX's dejavu)",
                   "PDF sheets")


def diagnose(templates: Path) -> list[Finding]:
    """Every finding, in the order a user would fix them."""
    findings = [check_python(), check_package()]
    return findings + check_tex(templates)


def report(findings: list[Finding]) -> tuple[list[str], int]:
    """Printable lines and the exit status: 0 ready; 1 PDF sheets cannot be made; 2 nothing can run."""
    lines = [f"  {'ok     ' if f.ok else 'MISSING'} {f.what}: {f.found}" + ("" if f.ok or not f.fix else f"\n"
             f"          fix: {f.fix}") for f in findings]
    broken = [f for f in findings if not f.ok]
    if not broken:
        lines.append("ready: PDF and HTML sheets can be made")
        return lines, 0
    everything = any(f.needed_for == "everything" for f in broken)
    if any(f.needed_for == "PDF sheets" for f in broken):
        lines.append("PDF sheets cannot be made yet. " + NO_TEX)
        lines.append("Getting TeX:")
        lines += [f"  {system}: {how}" for system, how in GET_TEX.items()]
    if everything:
        lines.append("not ready: fix the Python or package lines marked MISSING first")
    return lines, 2 if everything else 1
