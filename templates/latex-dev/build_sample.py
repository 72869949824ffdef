"""Convert the sample notebooks with the "sheet" template, two ways, and time it.

    python build_sample.py [NOTEBOOK ...]     (default: sample.ipynb sample-stopped.ipynb)

For each notebook NAME.ipynb in this folder:
  NAME.pdf           PDFExporter, latex_count=2, xelatex -no-shell-escape
  tex/NAME/NAME.tex  LatexExporter, figures written beside it, xelatex run twice by hand
  NAME-<n>.png       pages of NAME.pdf at 80 dpi (pdftoppm)
"""

from __future__ import annotations

import subprocess
import sys
import time
from pathlib import Path

import nbformat
from nbconvert import LatexExporter, PDFExporter

HERE = Path(__file__).resolve().parent
TEMPLATES = HERE.parent / "latex"          # templates/latex, holds sheet/
XELATEX = ["xelatex", "-interaction=nonstopmode", "-no-shell-escape", "-halt-on-error"]


def to_pdf(nb: nbformat.NotebookNode) -> bytes:
    exporter = PDFExporter(template_name="sheet", extra_template_basedirs=[str(TEMPLATES)])
    exporter.latex_count = 2
    exporter.latex_command = ["xelatex", "-interaction=nonstopmode", "-no-shell-escape", "{filename}"]
    pdf, _ = exporter.from_notebook_node(nb)
    return pdf


def to_tex(nb: nbformat.NotebookNode, name: str, outdir: Path) -> Path:
    exporter = LatexExporter(template_name="sheet", extra_template_basedirs=[str(TEMPLATES)])
    tex, resources = exporter.from_notebook_node(
        nb, resources={"unique_key": name, "output_files_dir": f"{name}_files"}
    )
    outdir.mkdir(parents=True, exist_ok=True)
    for rel, data in resources.get("outputs", {}).items():   # extracted figures
        path = outdir / rel
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_bytes(data)
    tex_path = outdir / f"{name}.tex"
    tex_path.write_text(tex, encoding="utf-8")
    return tex_path


def main(names: list[str]) -> None:
    for nb_name in names or ["sample.ipynb", "sample-stopped.ipynb"]:
        stem = Path(nb_name).stem
        nb = nbformat.read(HERE / nb_name, as_version=4)

        t0 = time.perf_counter()
        pdf = to_pdf(nb)
        t_pdf = time.perf_counter() - t0
        (HERE / f"{stem}.pdf").write_bytes(pdf)

        t0 = time.perf_counter()
        tex_path = to_tex(nb, stem, HERE / "tex" / stem)
        t_tex = time.perf_counter() - t0
        t0 = time.perf_counter()
        for _ in range(2):
            subprocess.run(XELATEX + [tex_path.name], cwd=tex_path.parent, check=True,
                           stdout=subprocess.DEVNULL)
        t_xe = time.perf_counter() - t0

        for old in HERE.glob(f"{stem}-*.png"):
            old.unlink()
        subprocess.run(["pdftoppm", "-png", "-r", "80", str(HERE / f"{stem}.pdf"), str(HERE / stem)], check=True)
        print(f"{stem}: PDFExporter {t_pdf:.2f} s | LatexExporter {t_tex:.2f} s + 2 xelatex {t_xe:.2f} s")


if __name__ == "__main__":
    main(sys.argv[1:])
