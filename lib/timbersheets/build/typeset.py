"""The one way the program runs xelatex: one pass, no shell escape, and on a
failure the error lines of its log, not the whole log.

Sheets, the title-block stamps and the package front matter all come through
``typeset``; nothing else starts TeX.

Most of a short run's time is xelatex reading the preamble (packages, fonts): about
0.6 s, against 0.1-0.2 s for a sheet's body. So a process that will typeset soon
starts a *waiting* run (``warm_up``): xelatex reads the preamble and
``\\begin{document}``, then waits on its standard input for the rest of the
document. ``typeset`` hands a source whose preamble is the same to a waiting run
instead of starting one; the PDF is the same. A waiting run that is never used is
ended with its process (``discard_waiting``, at exit; and its input closes when the
process dies, which ends it too).
"""

from __future__ import annotations

import atexit
import os
import shutil
import subprocess
import tempfile
import threading
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
    warm: bool = False  # typeset by a run that had read the preamble beforehand


BEGIN_DOCUMENT = "\\begin{document}"
# the primitive \input (LaTeX's \input opens a file twice: once to see that it exists)
READ_REST = "\\csname @@input\\endcsname /dev/stdin\n"
READ_ALL = "timbersheets-input-complete"  # typed out after the last line handed over
LOST_TO_BOM_CHECK = "\n" * 4


class _Waiting:
    """An xelatex run that has read `preamble` and \\begin{document} and waits for the rest on stdin."""

    def __init__(self, preamble: str) -> None:
        self.preamble = _key(preamble)
        self.work = Path(tempfile.mkdtemp(prefix="ts-warm-"))
        (self.work / "warm.tex").write_text(preamble + BEGIN_DOCUMENT + "\n" + READ_REST, encoding="utf-8")
        self.proc = subprocess.Popen([*XELATEX, "warm.tex"], cwd=self.work, stdin=subprocess.PIPE,
                                     stdout=subprocess.PIPE, stderr=subprocess.STDOUT, text=True, errors="replace")

    def finish(self, rest: str, files: dict[str, bytes]) -> tuple[int, str, Path]:
        """Hand over the document after \\begin{document}; xelatex's return code, its output and the PDF."""
        for filename, data in files.items():
            (self.work / filename).write_bytes(data)
        body, end, after = rest.rpartition("\\end{document}")
        rest = f"{body}\\typeout{{{READ_ALL}}}{end}{after}" if end else rest
        # XeTeX reads the first bytes of a file to look for a byte-order mark and cannot put them back
        # on a pipe: blank lines go first (a blank line at the start of the document does nothing)
        rest = LOST_TO_BOM_CHECK + rest
        out, _ = self.proc.communicate(rest)
        code = self.proc.returncode if READ_ALL in out else (self.proc.returncode or 1)
        return code, out, self.work / "warm.pdf"

    def close(self) -> None:
        if self.proc.poll() is None:
            self.proc.kill()
            self.proc.communicate()
        shutil.rmtree(self.work, ignore_errors=True)


def _key(preamble: str) -> str:
    """A preamble as runs are matched on it: the blank lines before \\begin{document} do nothing."""
    return preamble.rstrip()


_waiting: list[_Waiting] = []
_lock = threading.Lock()


def warm_up(preamble: str) -> None:
    """Have a run waiting with `preamble` read (one at most: a second would only take CPU time).

    Where there is no /dev/stdin (Windows), nothing waits and every run starts afresh."""
    if not os.path.exists("/dev/stdin"):
        return
    with _lock:
        if not any(w.preamble == _key(preamble) and w.proc.poll() is None for w in _waiting):
            _waiting.append(_Waiting(preamble))


def is_warm(preamble: str) -> bool:
    with _lock:
        return any(w.preamble == _key(preamble) and w.proc.poll() is None for w in _waiting)


def _take(preamble: str) -> _Waiting | None:
    """A waiting run with this preamble, now this caller's alone; runs that have ended are cleared."""
    with _lock:
        for w in list(_waiting):
            if w.proc.poll() is not None:
                _waiting.remove(w)
                w.close()
            elif w.preamble == _key(preamble):
                _waiting.remove(w)
                return w
    return None


def discard_waiting() -> None:
    """End the waiting runs nobody used."""
    with _lock:
        waiting = list(_waiting)
        _waiting.clear()
    for w in waiting:
        w.close()


atexit.register(discard_waiting)


def typeset(tex: str, work: Path, name: str, what: str, files: dict[str, bytes] | None = None) -> Typeset:
    """One xelatex pass over `tex`, its PDF `work`/`name`.pdf; raises ConversionError naming `what`.

    `files` (figures) are written beside the source first. A waiting run with the same
    preamble (warm_up) typesets it when there is one.
    """
    work.mkdir(parents=True, exist_ok=True)
    (work / f"{name}.tex").write_text(tex, encoding="utf-8")
    preamble, begins, rest = tex.partition(BEGIN_DOCUMENT)
    waiting = _take(preamble) if begins else None
    if waiting is not None:
        try:
            code, out, pdf = waiting.finish(rest, files or {})
            if code == 0 and pdf.exists():
                shutil.move(pdf, work / f"{name}.pdf")
                if pdf.with_suffix(".aux").exists():  # where a fresh run leaves it (the package reads its labels)
                    shutil.move(pdf.with_suffix(".aux"), work / f"{name}.aux")
            else:
                raise ConversionError(what, f"xelatex could not typeset the {name}", error_tail(out))
        finally:
            waiting.close()
        return Typeset(work / f"{name}.pdf", out, warm=True)
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
