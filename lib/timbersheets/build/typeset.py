"""The one way the program runs xelatex: one pass, no shell escape, and on a
failure the error lines of its log, not the whole log.

Sheets, the title-block stamps and the package front matter all come through
``typeset``; nothing else starts TeX.
"""

from __future__ import annotations

import subprocess
from dataclasses import dataclass
from pathlib import Path

from ..errors import TimbersheetsError

# xelatex's own driver command ("xdvipdfmx -q -E") with zlib level 6 for 9: half the driver's time
# (a third of a sheet batch's TeX time goes to compressing streams and figures) for files about 2 % larger.
XELATEX = ["xelatex", "-interaction=nonstopmode", "-halt-on-error", "-no-shell-escape",
           "-output-driver=xdvipdfmx -q -E -z6"]
TAIL_CHARS = 1500  # of the "!" error lines: enough for the failing command and its context


class ConversionError(TimbersheetsError):
    def __init__(self, mark: str, problem: str, log_tail: str = "") -> None:
        super().__init__(mark, problem, log_tail)
        self.mark, self.problem, self.log_tail = mark, problem, log_tail

    def __str__(self) -> str:
        tail = f"\n{self.log_tail}" if self.log_tail else ""
        return f"{self.mark}: {self.problem}{tail}"


@dataclass(frozen=True)
class Typeset:
    pdf: Path
    log: str  # xelatex's terminal output (it carries our \typeout lines)


def typeset(tex: str, work: Path, name: str, what: str, files: dict[str, bytes] | None = None) -> Typeset:
    """One xelatex pass over `tex` in folder `work`; raises ConversionError naming `what`.

    `files` (figures) are written beside the source first.
    """
    work.mkdir(parents=True, exist_ok=True)
    (work / f"{name}.tex").write_text(tex, encoding="utf-8")
    for filename, data in (files or {}).items():
        (work / filename).write_bytes(data)
    done = subprocess.run([*XELATEX, f"{name}.tex"], cwd=work, capture_output=True, text=True, errors="replace")
    if done.returncode != 0 or not (work / f"{name}.pdf").exists():
        raise ConversionError(what, f"xelatex could not typeset the {name}", error_tail(done.stdout))
    return Typeset(work / f"{name}.pdf", done.stdout)


def error_tail(log: str) -> str:
    """The lines of a TeX log that state an error ("! ..."), last ones kept."""
    return "\n".join(line for line in log.splitlines() if line.startswith("!"))[-TAIL_CHARS:]


def layout_environment(folder: Path):
    """The Jinja environment of our LaTeX layouts in `folder`: ((* *)) blocks and (( )) values, so the
    templates' own braces stay plain LaTeX; a missing value is an error, never an empty string."""
    import jinja2

    return jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(folder)),
        block_start_string="((*", block_end_string="*))", variable_start_string="((",
        variable_end_string="))", comment_start_string="((=", comment_end_string="=))",
        autoescape=False, undefined=jinja2.StrictUndefined, keep_trailing_newline=True)
