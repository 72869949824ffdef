"""A corpus of malformed inputs and the rules every one of them must obey.

Each case is a job folder (project.toml, a schedule, maybe review.csv or a firm
materials file) plus one command, run in-process with ``--no-pdf``. The rules:
no traceback, exit status 0, 1 or 2, the message names the file and row (and
column where there is one), every good row is designed, strict JSON, no
``.part`` file left, and no file written outside the outputs.

``python tests/corpus.py`` prints the counts (tried / failed) and each failure.
"""

from __future__ import annotations

import contextlib
import io
import json
import os
import shutil
import signal
import sys
import tempfile
import traceback
from dataclasses import dataclass, field
from pathlib import Path

PROJECT = ('[project]\ntitle = "Corpus job"\nnumber = "C-01"\nrevision = "A"\ndate = "2026-12-01"\n'
           'designer = "MT"\nchecker = "RD"\n')
HEADER = ["mark", "type", "material", "species", "grade", "size", "length", "Ly", "P_D", "note"]
GOOD = {  # two members that pass (hand-checked in test_schedule: 38x140 S-P-F No.1/No.2 at 5 kN)
    "G-1": ["G-1", "compression", "sawn", "S-P-F", "No.1/No.2", "38x140", "3.0", "0", "5", "post"],
    "G-2": ["G-2", "tension", "sawn", "S-P-F", "No.1/No.2", "38x140", "3.0", "0", "5", "tie"],
}
BAD_ROW = ["B-1", "compression", "sawn", "S-P-F", "No.1/No.2", "38x140", "3.0", "0", "5", "bad"]
NUMERIC = {  # column: a value in range, for the mutations below
    "K_T": "1", "K_H": "1", "length": "3", "Ke": "1", "Lx": "3", "Ly": "0", "Lu": "0", "net_area": "1",
    "bearing": "89", "P_D": "5", "P_L": "5", "P_S": "5", "P_W": "5", "P_E": "5", "w_D": "0", "M_D": "0",
    "V_D": "0", "defl_L": "360", "defl_total": "240", "K_D": "1", "plies": "1",
}
OUT_OF_RANGE = {  # values no building has
    "K_T": ["5", "1e308", "0.01"], "K_H": ["3", "1e308"], "Ke": ["50", "1e308", "0.1"],
    "length": ["1e308", "5000", "0.001"], "Lx": ["1e308"], "Lu": ["1e308"], "net_area": ["1e308"],
    "bearing": ["1e308", "1e7"], "P_D": ["1e308", "-1e308", "1e12"], "P_L": ["1e308", "1e12"],
    "P_S": ["1e308"], "P_W": ["1e308", "-1e308"], "P_E": ["1e308"], "w_D": ["1e308"], "M_D": ["1e308"],
    "V_D": ["1e308"], "defl_L": ["0.5", "1e308", "10"], "defl_total": ["0.5", "1e308"],
    "K_D": ["10", "1e308", "0.01"], "plies": ["99", "100000000000000000000"],
}
POSITIVE = ("K_T", "K_H", "length", "Ke", "net_area", "bearing", "defl_L", "defl_total", "K_D", "plies")
NON_FINITE = ["nan", "NaN", "inf", "-inf", "Infinity", "1e400", "nan kN", "inf m"]


@dataclass
class Case:
    """One malformed job and the command run on it."""

    name: str
    files: dict[str, bytes | None]  # path in the job folder -> bytes (None: a directory)
    argv: list[str] = field(default_factory=lambda: ["run", "{job}", "--no-pdf", "--jobs", "1", "--out", "{out}"])
    good: tuple[str, ...] = ("G-1", "G-2")  # marks that must be designed (pass or fail, not error)
    where: tuple[str, ...] = ()  # words one message must contain together (file, row, column)
    job_level: bool = False  # the job itself is unusable: exit 2, nothing designed
    prior_run: bool = False  # a clean run before (review and diff need results)
    may_write: tuple[str, ...] = ()  # job files the command may change (review.csv)
    rows: dict[str, int] = field(default_factory=dict)  # mark -> the row a spreadsheet shows it in


def csv_text(rows: list[list[str]], header: list[str] = HEADER, sep: str = ",") -> str:
    def cell(v: str) -> str:
        return f'"{v}"' if any(c in v for c in f'{sep}"\n') and not v.startswith('"') else v
    return "\n".join(sep.join(cell(v) for v in r) for r in [header, *rows]) + "\n"


def schedule(rows: list[list[str]], header: list[str] = HEADER) -> dict[str, bytes | None]:
    return {"project.toml": PROJECT.encode(), "schedule.csv": csv_text(rows, header).encode()}


def with_column(column: str, value: str) -> tuple[list[str], list[list[str]]]:
    """The header (gaining `column` unless it has it) and rows: good ones in range, the bad row `value`."""
    if column in HEADER:
        bad = list(BAD_ROW)
        bad[HEADER.index(column)] = value
        return HEADER, [GOOD["G-1"], bad, GOOD["G-2"]]
    return [*HEADER, column], [[*GOOD["G-1"], NUMERIC[column]], [*BAD_ROW, value], [*GOOD["G-2"], NUMERIC[column]]]


def cell_cases() -> list[Case]:
    cases = []
    for column, values in OUT_OF_RANGE.items():
        below = ["0", "-1"] if column in POSITIVE else []
        for value in [*values, *below] + (NON_FINITE if column != "plies" else []):
            header, rows = with_column(column, value)
            files = schedule(rows, header)
            cases.append(Case(f"cell-{column}={value}", files, where=("schedule.csv", "row 3", f"'{column}'")))
    mutations = {
        "mark-long": (0, "M" * 300), "mark-dot": (0, "."), "mark-dotdot": (0, ".."), "mark-slash": (0, "a/b"),
        "mark-nul": (0, "B\x00-1"), "type-bad": (1, "arch"), "size-huge": (5, "1e308x1e308"),
        "size-zero": (5, "0x0"), "size-nan": (5, "nanxnan"), "species-long": (3, "S" * 5000),
        "length-expr": (6, "2**1000 m"), "length-units": (6, "3 parsecs"), "length-bare-unit": (6, "m"),
        "note-huge": (9, "x" * 140_000), "grade-blank": (4, ""), "length-comma": (6, "3,5"),
        "note-latex": (9, "}\\input{/etc/passwd} $x^$ %"), "note-nul": (9, "a\x00b"),
    }
    for name, (index, value) in mutations.items():
        row = list(BAD_ROW)
        row[index] = value
        files = schedule([GOOD["G-1"], row, GOOD["G-2"]])
        good = ("G-1", "G-2")
        where = ("schedule.csv", "row 3", f"'{HEADER[index]}'")
        if name in ("note-latex",):
            where = ()
        cases.append(Case(f"cell-{name}", files, good=good, where=where))
    return cases


def text_cases() -> list[Case]:
    """Whole-file malformations of schedule.csv."""
    good1, good2 = csv_text([GOOD["G-1"]]).splitlines()[1], csv_text([GOOD["G-2"]]).splitlines()[1]
    head = ",".join(HEADER)
    bad_quote = ",".join(BAD_ROW[:-1]) + ',"post, see detail 4'
    texts = {
        "unclosed-quote-middle": (f"{head}\n{good1}\n{bad_quote}\n{good2}\n", "row 3"),
        "unclosed-quote-last": (f"{head}\n{good1}\n{good2}\n{bad_quote}\n", "row 4"),
        "unclosed-quote-then-quote": (f'{head}\n{good1}\n{bad_quote}\n{good2}\nX-9,"a",b\n', "row 3"),
        "form-feed": (f"{head}\n{good1}\n" + ",".join(BAD_ROW[:-1]) + ",see\fdetail\n" + f"{good2}\n", None),
        "line-separator": (f"{head}\n{good1}\n" + ",".join(BAD_ROW[:-1]) + ",see\u2028detail\n" + f"{good2}\n", None),
        "next-line": (f"{head}\n{good1}\n" + ",".join(BAD_ROW[:-1]) + ",see\x85detail\n" + f"{good2}\n", None),
        "vertical-tab": (f"{head}\n{good1}\n" + ",".join(BAD_ROW[:-1]) + ",see\vdetail\n" + f"{good2}\n", None),
        "quoted-newline": (f"{head}\n{good1}\n" + ",".join(BAD_ROW[:-1]) + ',"see\ndetail"\n' + f"{good2}\n", None),
        "extra-cell": (f"{head}\n{good1}\n" + ",".join(BAD_ROW) + ",surprise\n" + f"{good2}\n", "row 3"),
        "short-row": (f"{head}\n{good1}\nB-1,compression\n{good2}\n", "row 3"),
        "duplicate-header": (f"{head},P_D\n{good1},5\n" + ",".join(BAD_ROW) + f",50\n{good2},5\n", "row 1"),
        "duplicate-mark-header": (f"{head},mark\n{good1},X\n{good2},Y\n", "row 1"),
        "blank-header-cell": (f"{head},\n{good1},\n{good2},\n", None),
        "crlf": (f"{head}\r\n{good1}\r\n{good2}\r\n", None),
        "cr-only": (f"{head}\r{good1}\r{good2}\r", None),
        "no-final-newline": (f"{head}\n{good1}\n{good2}", None),
        "blank-lines": (f"{head}\n\n{good1}\n\n\n{good2}\n", None),
        "nul-byte": (f"{head}\n{good1}\n" + ",".join(BAD_ROW[:-1]) + ",a\x00b\n" + f"{good2}\n", None),
        "huge-cell-unquoted": (f"{head}\n{good1}\n" + ",".join(BAD_ROW[:-1]) + "," + "y" * 140_000 + f"\n{good2}\n",
                               "row 3"),
        "huge-cell-quoted": (f"{head}\n{good1}\n" + ",".join(BAD_ROW[:-1]) + ',"' + "y" * 140_000 + f'"\n{good2}\n',
                             "row 3"),
        "semicolons": (f"{head}\n{good1}\n{good2}\n".replace(",", ";"), None),
        "bom": ("\ufeff" + f"{head}\n{good1}\n{good2}\n", None),
        "stray-quote-mid-cell": (f'{head}\n{good1}\n' + ",".join(BAD_ROW[:-1]) + ',5 "inch\n' + f"{good2}\n", None),
    }
    control = ("form-feed", "next-line", "vertical-tab", "nul-byte")
    for name in control:
        texts[name] = (texts[name][0], "row 3")
    numbered = (*control, "line-separator", "quoted-newline", "stray-quote-mid-cell", "extra-cell", "short-row",
                "unclosed-quote-middle")
    cases = []
    for name, (text, row) in texts.items():
        files = {"project.toml": PROJECT.encode(), "schedule.csv": text.encode()}
        job_level = name.startswith("duplicate-")
        cases.append(Case(f"csv-{name}", files, where=("schedule.csv", row) if row else (), job_level=job_level,
                          good=() if job_level else ("G-1", "G-2"),
                          rows={"G-1": 2, "G-2": 4} if name in numbered else {}))
    whole = {  # the schedule as a whole is unusable
        "empty": b"", "header-only": (head + "\n").encode(), "no-required": b"a,b,c\n1,2,3\n",
        "latin1": csv_text([[*GOOD["G-1"][:-1], "poteau \xe9"]]).encode("latin-1"),
        "binary": bytes(range(256)) * 4, "only-quote": b'"', "only-newlines": b"\n\n\n",
    }
    for name, raw in whole.items():
        files = {"project.toml": PROJECT.encode(), "schedule.csv": raw}
        cases.append(Case(f"csv-whole-{name}", files, good=(), where=("schedule.csv",), job_level=True))
    cases.append(Case("csv-utf16", {"project.toml": PROJECT.encode(),
                                    "schedule.csv": csv_text([GOOD["G-1"], GOOD["G-2"]]).encode("utf-16")}))
    cases.append(Case("csv-directory", {"project.toml": PROJECT.encode(), "schedule.csv": None}, good=(),
                      where=("schedule.csv",), job_level=True))
    return cases


def project_cases() -> list[Case]:
    body = csv_text([GOOD["G-1"], GOOD["G-2"]]).encode()
    tomls = {
        "invalid": b"[project\ntitle = 1", "no-project": b'title = "x"\n', "project-string": b'project = "x"\n',
        "revision-blank": PROJECT.replace('"A"', '""').encode(),
        "revision-dot": PROJECT.replace('"A"', '"."').encode(),
        "revision-dotdot": PROJECT.replace('"A"', '".."').encode(),
        "revision-long": PROJECT.replace('"A"', '"' + "A" * 300 + '"').encode(),
        "revision-slash": PROJECT.replace('"A"', '"B/../../victim"').encode(),
        "codes-string": ('codes = "2020"\n' + PROJECT).encode(),
        "codes-unsupported": (PROJECT + '[codes]\nnbc = "1995"\n').encode(),
        "codes-table-in-table": (PROJECT + '[codes]\nnbc = {x = 1}\n').encode(),
        "data-string": ('data = "x"\n' + PROJECT).encode(),
        "deep-nesting": ("x = " + "[" * 5000 + "]" * 5000 + "\n" + PROJECT).encode(),
        "deep-tables": ("x = " + "{a = " * 3000 + "1" + "}" * 3000 + "\n" + PROJECT).encode(),
        "latin1": PROJECT.replace("Corpus job", "Caf\xe9").encode("latin-1"),
        "utf16": PROJECT.encode("utf-16"),
        "materials-passwd": (PROJECT + '[data]\nmaterials = "/etc/passwd"\n').encode(),
        "materials-escape": (PROJECT + '[data]\nmaterials = "../../../../etc/hostname"\n').encode(),
        "materials-missing": (PROJECT + '[data]\nmaterials = "nope.csv"\n').encode(),
        "materials-dir": (PROJECT + '[data]\nmaterials = "."\n').encode(),
    }
    cases = []
    for name, raw in tomls.items():
        cases.append(Case(f"toml-{name}", {"project.toml": raw, "schedule.csv": body}, good=(),
                          where=("project.toml",), job_level=True))
    cases.append(Case("toml-title-huge", {"project.toml": PROJECT.replace("Corpus job", "T" * 1_000_000).encode(),
                                          "schedule.csv": body}, good=(), where=("project.toml",), job_level=True))
    titles = {"mathtext": "$x^$", "mathtext2": r"$\frac{a}$ load", "dollar": "$5 $10", "long": "T" * 300,
              "latex": r"}\input{/etc/passwd}", "braces": "Load {D}\u2192 column C-1", "cyrillic": "}\u0416",
              "bar-check": "|\u2713", "emoji": "\U0001f600 hall", "nul": "a\\u0000b"}
    for name, title in titles.items():
        raw = PROJECT.replace("Corpus job", title.replace("\\", "\\\\").replace('"', '\\"')
                              if name != "nul" else title).encode()
        cases.append(Case(f"toml-title-{name}", {"project.toml": raw, "schedule.csv": body}))
    cases.append(Case("toml-revision-int", {"project.toml": PROJECT.replace('"A"', "7").encode(), "schedule.csv": body},
                      argv=["run", "{job}", "--no-pdf", "--jobs", "1", "--out", "{out}"], good=()))
    cases.append(Case("toml-directory", {"project.toml": None, "schedule.csv": body}, good=(),
                      where=("project.toml",), job_level=True))
    return cases


FIRM_HEADER = "table,species,grade,category,property,value,unit,source,status\n"


def firm_cases() -> list[Case]:
    body = csv_text([GOOD["G-1"], GOOD["G-2"]]).encode()
    firms = {"misspelt": b"tabel,specie,grde\nx,y,z\n", "abc": b"a,b,c\n1,2,3\n", "empty": b"",
             "latin1": FIRM_HEADER.encode() + "sawn,S-P-F,No.1/No.2,dimension,f_c,nan,MPa,caf\xe9,firm\n".encode("latin-1"),
             "nan": (FIRM_HEADER + "sawn,S-P-F,No.1/No.2,dimension,f_c,nan,MPa,test,firm\n").encode(),
             "binary": bytes(range(256))}
    cases = []
    for name, raw in firms.items():
        toml = (PROJECT + '[data]\nmaterials = "firm.csv"\n').encode()
        cases.append(Case(f"firm-{name}", {"project.toml": toml, "schedule.csv": body, "firm.csv": raw},
                          good=(), where=("firm.csv",), job_level=False))
    return cases


REVIEW_HEAD = "mark,checker,date,verdict,comment,inputs_hash,revision\n"


def review_cases() -> list[Case]:
    body = csv_text([GOOD["G-1"], GOOD["G-2"]]).encode()
    line = "G-1,RD,2026-12-01,{verdict},,sha256:{h},A\n"
    reviews = {
        "no-final-newline": (REVIEW_HEAD + line.format(verdict="ok", h="0" * 64)).rstrip("\n").encode(),
        "reordered": ("verdict,mark,checker,date,comment,inputs_hash,revision\nok,G-1,RD,2026-12-01,,sha256:"
                      + "0" * 64 + ",A\n").encode(),
        "unclosed-quote": (REVIEW_HEAD + 'G-1,RD,2026-12-01,ok,"oops,sha256:x,A\n'
                           + line.format(verdict="ok", h="1" * 64)).encode(),
        "verdict-rejected": (REVIEW_HEAD + line.format(verdict="rejected", h="0" * 64)).encode(),
        "verdict-OK": (REVIEW_HEAD + line.format(verdict="OK", h="0" * 64)).encode(),
        "verdict-blank": (REVIEW_HEAD + line.format(verdict="", h="0" * 64)).encode(),
        "hash-blank": (REVIEW_HEAD + "G-1,RD,2026-12-01,ok,,,A\n").encode(),
        "latin1": (REVIEW_HEAD + "G-1,RD,2026-12-01,ok,caf\xe9,sha256:x,A\n").encode("latin-1"),
        "utf16": (REVIEW_HEAD + line.format(verdict="ok", h="0" * 64)).encode("utf-16"),
        "empty": b"", "header-only": REVIEW_HEAD.encode(), "garbage": b"a,b\n1,2\n",
        "binary": bytes(range(256)), "extra-cells": (REVIEW_HEAD + "G-1,RD,2026-12-01,ok,,sha256:x,A,z,z\n").encode(),
        "formula": (REVIEW_HEAD + "=cmd|' /C calc'!A0,RD,2026-12-01,ok,,sha256:x,A\n").encode(),
    }
    commands = {
        "status": ["review", "{job}", "--status", "--out", "{out}"],
        "record": ["review", "{job}", "--mark", "G-1", "--by", "RD", "--verdict", "ok", "--out", "{out}"],
        "run": ["run", "{job}", "--no-pdf", "--jobs", "1", "--out", "{out}"],
    }
    bad_row = ("unclosed-quote", "verdict-rejected", "verdict-blank", "latin1", "extra-cells",
               "formula")
    cases = []
    for name, raw in reviews.items():
        for cmd, argv in commands.items():
            files = {"project.toml": PROJECT.encode(), "schedule.csv": body, "review.csv": raw}
            good = ("G-1", "G-2") if cmd == "run" else ()
            where = ("review.csv", "row 2") if name in bad_row and cmd != "record" else ()
            cases.append(Case(f"review-{name}-{cmd}", files, argv, good=good, prior_run=True, where=where,
                              may_write=("review.csv",) if cmd == "record" else ()))
    cases.append(Case("review-directory-run", {"project.toml": PROJECT.encode(), "schedule.csv": body,
                                               "review.csv": None}, prior_run=True))
    cases.append(Case("review-formula-by", {"project.toml": PROJECT.encode(), "schedule.csv": body},
                      ["review", "{job}", "--mark", "G-1", "--by", "=cmd|' /C calc'!A0", "--verdict", "ok",
                       "--out", "{out}"], good=(), prior_run=True, may_write=("review.csv",)))
    for label in ("B/../../victim", "..", ".", "A" * 300, "/tmp/x"):
        cases.append(Case(f"diff-to-{label[:12]}", {"project.toml": PROJECT.encode(), "schedule.csv": body},
                          ["diff", "{job}", "--from", "A", "--to", label, "--out", "{out}"], good=(), prior_run=True))
    return cases


def sizing_cases() -> list[Case]:
    header = [*HEADER, "max_depth", "width"]
    auto = ["S-1", "bending", "glulam", "D.Fir-L", "24f-E", "auto", "6", "0", "0", "beam"]
    cases = []
    for depth, width in (("1e308", ""), ("1e12", ""), ("1e308", "1e308"), ("", "1e308")):
        rows = [[*GOOD["G-1"], "", ""], [*auto, depth, width], [*GOOD["G-2"], "", ""]]
        files = schedule(rows, header)
        cases.append(Case(f"size-auto-depth={depth}-width={width}", files, where=("schedule.csv", "row 3")))
    return cases


def all_cases() -> list[Case]:
    return [*cell_cases(), *text_cases(), *project_cases(), *firm_cases(), *review_cases(), *sizing_cases()]


# --------------------------------------------------------------------------- running
class Timeout(Exception):
    pass


def _alarm(signum, frame):
    raise Timeout()


def _tree(root: Path) -> dict[str, tuple[int, int]]:
    out = {}
    for path in root.rglob("*"):
        with contextlib.suppress(OSError):
            st = path.lstat()
            is_dir = path.is_dir() and not path.is_symlink()
            out[str(path.relative_to(root))] = (0, 0) if is_dir else (st.st_size, st.st_mtime_ns)
    return out


def _materialise(case: Case, job: Path) -> None:
    job.mkdir(parents=True)
    for name, raw in case.files.items():
        path = job / name
        if raw is None:
            path.mkdir()
        else:
            path.write_bytes(raw)


def _strict_json(text: str):
    def refuse(token):
        raise ValueError(f"non-standard JSON token {token}")
    return json.loads(text, parse_constant=refuse)


#: Charts drawn by earlier cases, linked into each case's chart cache: most cases draw the same
#: chart, and drawing it is most of a case's time. (The cache is the run's own, keyed by content.)
CHARTS = Path(tempfile.mkdtemp(prefix="corpus-charts-"))


def _share_charts(cache: Path, into: bool) -> None:
    if into:
        cache.mkdir(parents=True, exist_ok=True)
    src, dst = (CHARTS, cache) if into else (cache, CHARTS)
    for png in src.glob("chart-*.png") if src.is_dir() else ():
        with contextlib.suppress(OSError):
            os.link(png, dst / png.name)


def run_case(case: Case, root: Path, timeout: int = 30) -> list[str]:
    """Run one case in `root`; the list of rules it broke (empty when it obeys them all)."""
    from timbersheets.cli import main

    job, out = root / "job", root / "out"
    _share_charts(out / ".cache", into=True)
    if case.prior_run:
        _materialise(Case(case.name, {k: v for k, v in case.files.items() if k != "review.csv"}), job)
        with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(io.StringIO()):
            main(["run", str(job), "--no-pdf", "--jobs", "1", "--out", str(out)])
        for name, raw in case.files.items():
            if name == "review.csv":
                (job / name).mkdir() if raw is None else (job / name).write_bytes(raw)
    else:
        _materialise(case, job)
    (root / "victim").mkdir()
    before = _tree(root)
    argv = [a.replace("{job}", str(job)).replace("{out}", str(out)) for a in case.argv]
    stdout, stderr = io.StringIO(), io.StringIO()
    broken: list[str] = []
    old = signal.signal(signal.SIGALRM, _alarm)
    signal.alarm(timeout)
    code = None
    try:
        with contextlib.redirect_stdout(stdout), contextlib.redirect_stderr(stderr):
            code = main(argv)
    except SystemExit as exc:
        code = exc.code
    except Timeout:
        broken.append(f"no answer within {timeout} s")
    except BaseException as exc:  # noqa: BLE001 - a traceback is what the corpus looks for
        broken.append("traceback: " + traceback.format_exception_only(type(exc), exc)[-1].strip()[:200])
    finally:
        signal.alarm(0)
        signal.signal(signal.SIGALRM, old)
    text = stdout.getvalue() + stderr.getvalue()
    if "Traceback" in text:
        broken.append("traceback in the output")
    if code is not None and code not in (0, 1, 2):
        broken.append(f"exit status {code}")
    if case.job_level and code not in (2, None):
        broken.append(f"exit status {code} for an unusable job (expected 2)")
    if case.where and code is not None:
        lines = text.splitlines()
        if not any(all(w in ln for w in case.where) for ln in lines):
            broken.append(f"no message names {' + '.join(case.where)}")
    for ln in stderr.getvalue().splitlines():
        if ln.startswith("timbersheets:") and not any(n in ln for n in (*case.files, "job", "rev ", "rev-")):
            broken.append(f"message names no file: {ln[:120]}")
    results = out / "rev-A" / "results.json"
    doc = None
    if results.exists() and code is not None:
        try:
            doc = _strict_json(results.read_text(encoding="utf-8"))
        except ValueError as exc:
            broken.append(f"results.json is not strict JSON ({str(exc)[:80]})")
    if case.good and code is not None:
        members = {m["mark"]: m for m in doc["members"]} if doc else {}
        for mark in case.good:
            m = members.get(mark)
            if m is None or m["status"] not in ("pass", "fail"):
                broken.append(f"good row {mark} not designed ({m['status'] if m else 'missing'})")
    if case.rows and doc:
        found = {m["mark"]: m["row"] for m in doc["members"]}
        for mark, row in case.rows.items():
            if found.get(mark) != row:
                broken.append(f"{mark} reported in row {found.get(mark)}, a spreadsheet shows row {row}")
    after = _tree(root)
    _share_charts(out / ".cache", into=False)
    for path in sorted(set(after) - set(before)) + [p for p in before if p in after and after[p] != before[p]]:
        inside = path.startswith("out")
        if not inside and path not in {f"job/{n}" for n in case.may_write}:
            broken.append(f"wrote outside the outputs: {path}")
        if path.endswith(".part"):
            broken.append(f"left a .part file: {path}")
    return broken


def run_corpus(base: Path, cases: list[Case] | None = None) -> tuple[int, dict[str, list[str]]]:
    cases = all_cases() if cases is None else cases
    failures = {}
    for i, case in enumerate(cases):
        root = base / f"c{i:03d}"
        root.mkdir(parents=True)
        broken = run_case(case, root)
        if broken:
            failures[case.name] = broken
        shutil.rmtree(root, ignore_errors=True)
    return len(cases), failures


if __name__ == "__main__":
    import resource

    sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "lib"))
    resource.setrlimit(resource.RLIMIT_AS, (3 << 30, 3 << 30))  # a runaway search fails, not the machine
    with tempfile.TemporaryDirectory() as tmp:
        tried, failed = run_corpus(Path(tmp))
    for name, broken in failed.items():
        print(f"{name}: {'; '.join(broken)}")
    print(f"corpus: {tried} tried, {len(failed)} failed")
    sys.stdout.flush()
    os._exit(0)
