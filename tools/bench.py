"""make bench: wall times of a 100-member package on this machine.

Builds a 100-member schedule from the demo job's member mix, then reports in one
run: a cold full run (empty cache), a warm rerun, a rerun after one member's
load changes, and a naive loop on the same members (papermill CLI, then
``jupyter nbconvert --to pdf``, one member after another). Targets on a 2-core
machine: cold run at least 5x faster than the naive loop; one-member change
within 10 s.

Beam models: the analysis time of each demo member analysed as a beam model (PyCBA, cache cleared)
and the sizing time of the two-span continuous floor joist FJ-1 (size = auto); targets <= 50 ms a
member's analysis, <= 0.5 s the joist's sizing. `--beams` reports only these.

    python tools/bench.py [--members 100] [--naive N] [--beams]   (N members for the naive loop; 0 skips it)
"""

from __future__ import annotations

import argparse
import csv
import json
import re
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent
DEMO = REPO / "calcsheets" / "kestrel-cove-boathouse"
BIN = Path(sys.executable).parent


def build_job(root: Path, members: int) -> Path:
    job = root / "bench-job"
    job.mkdir(parents=True)
    shutil.copy(DEMO / "project.toml", job / "project.toml")
    with open(DEMO / "schedule.csv", newline="", encoding="utf-8") as handle:
        rows = list(csv.DictReader(handle))
    header = list(rows[0])
    out = []
    for i in range(members):
        row = dict(rows[i % len(rows)])
        suffix = f"-{i // len(rows) + 1:02d}"
        row["mark"] += suffix
        if row.get("carries"):  # carry the member of the same copy
            row["carries"] = "; ".join(re.sub(r"^([^@]+?)(?=\.R\d+(@|$)|@|$)", lambda m: m.group(1) + suffix, e.strip())
                                       for e in row["carries"].split(";"))
        out.append(row)
    with open(job / "schedule.csv", "w", newline="", encoding="utf-8") as handle:
        writer = csv.DictWriter(handle, fieldnames=header, lineterminator="\n")
        writer.writeheader()
        writer.writerows(out)
    return job


def timed(cmd: list[str], **kw) -> float:
    start = time.monotonic()
    subprocess.run(cmd, check=False, capture_output=True, **kw)
    return time.monotonic() - start


def change_one_load(job: Path) -> str:
    path = job / "schedule.csv"
    with open(path, newline="", encoding="utf-8") as handle:
        rows = list(csv.DictReader(handle))
    target = next(r for r in rows if r.get("P_D"))
    target["P_D"] = f"{float(target['P_D']) * 1.1:.3f}"
    with open(path, "w", newline="", encoding="utf-8") as handle:
        writer = csv.DictWriter(handle, fieldnames=list(rows[0]), lineterminator="\n")
        writer.writeheader()
        writer.writerows(rows)
    return target["mark"]


def naive_loop(job: Path, out: Path, count: int) -> tuple[float, int]:
    """papermill CLI, then jupyter nbconvert --to pdf, per member, one after another.

    The naive loop uses the same sheet layout, so the two differ only in how the
    work is organised (a process and a kernel per member, three TeX passes, no cache).
    """
    sys.path.insert(0, str(REPO / "lib"))
    from timbersheets.membertypes import member_types
    from timbersheets.schedule import load_schedule

    members = load_schedule(job / "schedule.csv").members[:count]
    out.mkdir(parents=True, exist_ok=True)
    start = time.monotonic()
    for m in members:
        template = REPO / "templates" / member_types()[m.type].template
        notebook = out / f"{m.mark}.ipynb"
        params = json.dumps({"member": m.params(), "codes": {"nbc": "2020", "o86": "2019"}, "materials": ""})
        subprocess.run([str(BIN / "papermill"), str(template), str(notebook), "-y", params, "--cwd", str(job)],
                       check=True, capture_output=True)
        subprocess.run([str(BIN / "jupyter"), "nbconvert", "--to", "pdf", "--template", "sheet",
                        f"--TemplateExporter.extra_template_basedirs={REPO / 'templates' / 'latex'}",
                        str(notebook)], check=True, capture_output=True)
    return time.monotonic() - start, len(members)


def sizing_times(job: Path) -> list[str]:
    """Sizing time of every auto member, and of a full-catalogue sweep (the worst case)."""
    sys.path.insert(0, str(REPO / "lib"))
    from timbersheets.data import DataSet
    from timbersheets.design import design_function, effects_of
    from timbersheets.membertypes import member_type
    from timbersheets.loads import apply_combinations
    from timbersheets.schedule import load_schedule
    from timbersheets.sizing import catalogue, evaluate, size

    data = DataSet()
    members = [m for m in load_schedule(job / "schedule.csv").members if m.size == "auto"]
    lines, worst = [], 0.0
    for m in members:
        design = design_function(member_type(m.type))
        size(m, data, design)  # warm the data look-ups once
        start = time.perf_counter()
        result = size(m, data, design)
        took = time.perf_counter() - start
        worst = max(worst, took)
        cases = apply_combinations(effects_of(m), data, [], m.K_D)
        m.values["width"] = m.values["max_depth"] = None  # the whole catalogue, no constraint
        sections = catalogue(m, data)
        start = time.perf_counter()
        for section in sections:
            evaluate(m, data, section, cases, design)
        sweep = time.perf_counter() - start
        lines.append(f"    {m.mark:<10} search {took * 1000:6.1f} ms ({result.searched} tried); every one of "
                     f"{len(sections)} sections under {len(cases)} combinations {sweep * 1000:6.1f} ms")
        worst = max(worst, sweep)
    lines.append(f"  sizing: slowest {worst * 1000:.0f} ms a member   target <= 200 ms: {'met' if worst <= 0.2 else 'NOT met'}")
    return lines


def beam_times() -> list[str]:
    """Analysis time per beam-model member of the demo, and the sizing time of the continuous joist FJ-1."""
    sys.path.insert(0, str(REPO / "lib"))
    from timbersheets import beamdesign, beammodel
    from timbersheets.data import DataSet
    from timbersheets.design import design_all, design_member
    from timbersheets.schedule import load_schedule

    data = DataSet()
    schedule = load_schedule(DEMO / "schedule.csv")
    designs = design_all(schedule.entries, data)  # resolves carried loads; imports PyCBA once
    members = [d.member for d in designs if d.member is not None and beamdesign.is_model(d.member)]
    lines, worst = [], 0.0
    for m in members:
        beammodel.region_responses.cache_clear()
        beamdesign._model.cache_clear()
        start = time.perf_counter()
        design_member(m, data)
        took = time.perf_counter() - start
        worst = max(worst, took)
        lines.append(f"    {m.mark:<10} analysis and checks {took * 1000:6.1f} ms ({len(beamdesign.geometry_of(m).regions)} "
                     "regions)")
    lines.append(f"  beam model: slowest {worst * 1000:.0f} ms a member   target <= 50 ms: "
                 f"{'met' if worst <= 0.05 else 'NOT met'}")
    joist = next(m for m in members if m.mark == "FJ-1")
    auto = type(joist)(joist.mark, joist.row, {**joist.values, "size": "auto"}, joist.given)
    beammodel.region_responses.cache_clear()
    beamdesign._model.cache_clear()
    start = time.perf_counter()
    outcome = design_member(auto, data)
    took = time.perf_counter() - start
    chosen = outcome.sizing.chosen.label if outcome.sizing and outcome.sizing.chosen else "none"
    lines.append(f"  continuous joist FJ-1 sized in {took:.2f} s ({outcome.sizing.searched} tried, chose {chosen})   "
                 f"target <= 0.5 s: {'met' if took <= 0.5 else 'NOT met'}")
    return lines


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--members", type=int, default=100)
    parser.add_argument("--naive", type=int, default=None, help="members in the naive loop (default: all)")
    parser.add_argument("--beams", action="store_true", help="only the beam-model analysis and sizing figures")
    args = parser.parse_args()
    if args.beams:
        print("\n".join(beam_times()))
        return 0
    cli = [str(BIN / "timbersheets"), "run"]
    with tempfile.TemporaryDirectory(prefix="ts-bench-") as tmp:
        root = Path(tmp)
        job = build_job(root, args.members)
        out = root / "out"
        cold = timed([*cli, str(job), "--out", str(out)])
        warm = timed([*cli, str(job), "--out", str(out)])
        mark = change_one_load(job)
        one = timed([*cli, str(job), "--out", str(out)])
        log = (out / "rev-A" / "run.log").read_text().splitlines()[0]
        pages = len(__import__("pypdf").PdfReader(str(out / "rev-A" / "package.pdf")).pages)
        print(f"{args.members} members, package of {pages} pages, on {__import__('os').cpu_count()} CPUs")
        print(f"  cold full run          {cold:7.1f} s  ({cold / args.members:.2f} s a member)")
        print(f"  warm rerun             {warm:7.1f} s")
        print(f"  one load changed ({mark}) {one:7.1f} s   target <= 10 s: {'met' if one <= 10 else 'NOT met'}")
        print(f"  last run: {log}")
        print("\n".join(sizing_times(job)))
        print("\n".join(beam_times()))
        count = args.members if args.naive is None else args.naive
        if count:
            naive, n = naive_loop(job, root / "naive", count)
            per = naive / n
            print(f"  naive loop             {naive:7.1f} s for {n} members ({per:.2f} s a member; "
                  f"{per * args.members:.0f} s for {args.members})")
            ratio = per * args.members / cold
            print(f"  cold run vs naive      {ratio:7.1f}x faster   target >= 5x: {'met' if ratio >= 5 else 'NOT met'}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
