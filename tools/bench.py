"""make bench: wall times of a 100-member package on this machine, side by side.

Builds a 100-member schedule from the demo job's member mix, then reports in one
run, each with its phase breakdown (from run.log) and the peak memory of the
whole process tree (main process, workers, kernels, xelatex):

- cold package (empty cache), warm rerun, one load changed (same revision),
  new revision with one member changed, review of all members then rerun;
- pages per member by type;
- the naive loop on 20 of the same members, spread over the schedule and extrapolated to all (papermill CLI, then
  ``jupyter nbconvert --to pdf``, one member after another);
- a 2,000-member ``--no-pdf`` run, and the same job's full run (PDFs and package; about 5 min on
  2 CPUs, ``--no-large-full`` skips it) with its phases and whole-tree peak memory, its time against
  the cold package's time a member, and the package writer's memory a sheet;
- the cold package's floor: the CPU a notebook of empty cells takes through papermill, nbclient and
  the reused kernel, plus xelatex's time a member, over the CPUs;
- a rerun's floor: the program's imports and a kernel's boot (no notebook runs sooner), and the
  imports of papermill, nbconvert and jupyter_client the main process needs meanwhile.

Each scenario's phases end with the CPU seconds of the command's processes (that it waited for).

The commands run with Python's default of keeping compiled modules (PYTHONDONTWRITEBYTECODE
unset), as on a user's machine.

``--baseline DIR`` runs the same scenarios with the library of another checkout
(e.g. an older commit unpacked with ``git archive``), under the same load.

Targets on a 2-core machine: cold 100-member package <= 20 s and at least 20x
the naive loop; one load changed <= 3 s; new revision with one change <= 4 s;
review then rerun <= 3 s; 2,000 members --no-pdf <= 30 s; peak memory <= 1.5 GB.

Beam models: the analysis time of each demo member analysed as a beam model (PyCBA, cache cleared)
and the sizing time of the two-span continuous floor joist FJ-1 (size = auto); targets <= 50 ms a
member's analysis, <= 0.5 s the joist's sizing. `--beams` reports only these.

    python tools/bench.py [--members 100] [--naive 20] [--large 2000] [--no-large-full] [--baseline DIR] [--beams]
"""

from __future__ import annotations

import argparse
import csv
import json
import os
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


def timed(cmd: list[str], lib: Path = REPO / "lib", **kw) -> tuple[float, float]:
    """Wall time of `cmd` with `lib` first on the path, and the peak resident memory (MB) of its process tree."""
    import psutil

    env = {**os.environ, "PYTHONPATH": str(lib)}
    # Python's default, as on a user's machine: compiled modules are kept in __pycache__. Where
    # PYTHONDONTWRITEBYTECODE is set (some CI images set it) every process, the kernels too, would
    # compile the library's 12,000 lines again: about 0.5 s a command, not what a user waits for.
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    start = time.monotonic()
    proc = psutil.Popen(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env, **kw)
    peak = 0
    while proc.poll() is None:
        total = 0
        try:
            for p in [proc, *proc.children(recursive=True)]:
                total += p.memory_info().rss
        except psutil.Error:  # a child ended while being read
            pass
        peak = max(peak, total)
        time.sleep(0.05)
    return time.monotonic() - start, peak / 2**20


def change_one_load(job: Path, skip: int = 0) -> str:
    """Raise the dead load of one member (the `skip`+1-th with a P_D) by 10 %; returns its mark."""
    path = job / "schedule.csv"
    with open(path, newline="", encoding="utf-8") as handle:
        rows = list(csv.DictReader(handle))
    target = [r for r in rows if r.get("P_D")][skip]
    target["P_D"] = f"{float(target['P_D']) * 1.1:.3f}"
    with open(path, "w", newline="", encoding="utf-8") as handle:
        writer = csv.DictWriter(handle, fieldnames=list(rows[0]), lineterminator="\n")
        writer.writeheader()
        writer.writerows(rows)
    return target["mark"]


NAIVE_SAMPLE = 20  # members the naive loop runs by default; its time a member is extrapolated


def sample(members: list, count: int) -> list:
    """`count` members with the job's mix of types: the first of each type in turn, then the second, ..."""
    by_type: dict[str, list] = {}
    for m in members:
        by_type.setdefault(m.type, []).append(m)
    chosen: list = []
    depth = 0
    while len(chosen) < min(count, len(members)):
        chosen += [group[depth] for group in by_type.values() if depth < len(group)][:count - len(chosen)]
        depth += 1
    return chosen


def naive_loop(job: Path, out: Path, count: int) -> tuple[float, int]:
    """papermill CLI, then jupyter nbconvert --to pdf, per member, one after another.

    The naive loop uses the same sheet layout, so the two differ only in how the
    work is organised (a process and a kernel per member, three TeX passes, no cache).
    It runs on a sample of `count` members (every member takes about 8 s).
    """
    sys.path.insert(0, str(REPO / "lib"))
    from timbersheets.engineering.membertypes import member_types
    from timbersheets.schedule.read import load_schedule

    members = sample(load_schedule(job / "schedule.csv").members, count)
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
    from timbersheets.engineering.data import DataSet
    from timbersheets.engineering.design import design_function, effects_of
    from timbersheets.engineering.membertypes import member_type
    from timbersheets.engineering.loads import apply_combinations
    from timbersheets.schedule.read import load_schedule
    from timbersheets.engineering.sizing import catalogue, evaluate, size

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
        m = m.with_values({"width": None, "max_depth": None})  # the whole catalogue, no constraint
        sections = catalogue(m, data)
        start = time.perf_counter()
        for section in sections:
            evaluate(m, data, section, cases, design)
        sweep = time.perf_counter() - start
        lines.append(f"    {m.mark:<10} search {took * 1000:6.1f} ms ({result.searched} tried); every one of "
                     f"{len(sections)} sections under {len(cases)} combinations {sweep * 1000:6.1f} ms")
        worst = max(worst, sweep)
    if not members:
        return ["  sizing: no auto members"]
    lines.append(f"  sizing: slowest {worst * 1000:.0f} ms a member   target <= 200 ms: {'met' if worst <= 0.2 else 'NOT met'}")
    return lines


def beam_times(repeat: int = 5) -> list[str]:
    """Analysis time per beam-model member of the demo, and the sizing time of the continuous joist FJ-1.

    Each figure is the best of `repeat` runs with the model caches cleared (a shared machine's load
    only ever adds time).
    """
    sys.path.insert(0, str(REPO / "lib"))
    from timbersheets.engineering import beamdesign, beammodel
    from timbersheets.job.load import load_job
    from timbersheets.engineering.sizing import design_sized

    job = load_job(DEMO)
    data = job.data
    designs = job.designs  # resolves carried loads; imports PyCBA once
    models = {d.mark: d for d in designs if d.member is not None and beamdesign.is_model(d.member)}

    def best(action) -> float:
        times = []
        for _ in range(repeat):
            beammodel.region_responses.cache_clear()
            beamdesign._model.cache_clear()
            start = time.perf_counter()
            action()
            times.append(time.perf_counter() - start)
        return min(times)

    def analyse(d) -> None:
        model = beamdesign.model_of(d.context.member)
        for case in d.cases:
            model.targets("strength", case.combination.factors, d.context.section.d)

    lines, worst = [], 0.0
    for mark, d in models.items():
        took = best(lambda: analyse(d))
        whole = best(lambda: design_sized(d.member, data))
        worst = max(worst, took)
        lines.append(f"    {mark:<10} analysis {took * 1000:6.1f} ms ({len(beamdesign.geometry_of(d.member).regions)} "
                     f"regions, {len(d.cases)} combinations); with every check {whole * 1000:6.1f} ms")
    lines.append(f"  beam model: slowest analysis {worst * 1000:.0f} ms a member   target <= 50 ms: "
                 f"{'met' if worst <= 0.05 else 'NOT met'}")
    joist = models["FJ-1"].member
    auto = joist.with_values({"size": "auto"})
    outcomes = []
    took = best(lambda: outcomes.append(design_sized(auto, data)))
    sizing = outcomes[-1].sizing
    chosen = sizing.chosen.label if sizing and sizing.chosen else "none"
    lines.append(f"  continuous joist FJ-1 sized in {took:.2f} s ({sizing.searched} tried, chose {chosen})   "
                 f"target <= 0.5 s: {'met' if took <= 0.5 else 'NOT met'}")
    return lines


TARGETS = {"cold package": 20.0, "one load changed": 3.0, "new revision, one change": 4.0,
           "review of all, then rerun": 3.0}
PAGE_TARGETS = {"tension": 2, "compression": 2, "bending": 4, "beam-column": 5, "tension-bending": 5}


FLOOR_NOTEBOOKS = 30  # trivial notebooks run through the machinery for its floor


def machinery_floor(root: Path, count: int = FLOOR_NOTEBOOKS) -> tuple[float, float, int]:
    """CPU seconds a notebook takes in the run's machinery alone: the axial template's parameters cell
    and as many code cells as it has, each doing nothing, run with papermill into the reused kernel as
    a sheet is (`build.notebooks.execute`). Returns (kernel CPU, main-process CPU, cells) a notebook.
    No sheet of that template can take less: its cells only add work."""
    import nbformat
    import psutil

    from timbersheets.build import notebooks

    template = json.loads((notebooks.templates_dir() / "axial.ipynb").read_text(encoding="utf-8"))
    code = [c for c in template["cells"] if c["cell_type"] == "code"]
    nb = nbformat.v4.new_notebook(metadata=template["metadata"])
    for c in code:
        tags = c.get("metadata", {}).get("tags", [])
        nb.cells.append(nbformat.v4.new_code_cell("".join(c["source"]) if "parameters" in tags else "pass",
                                                  metadata={"tags": tags}))
    root.mkdir(parents=True)
    empty = root / "empty.ipynb"
    nbformat.write(nb, empty)
    parameters = {name: None for name in notebooks.template_parameters(empty)}
    notebooks.start_kernel(root)
    assert notebooks.execute(empty, root / "first.ipynb", parameters, root) is None  # the kernel is up
    kernel = psutil.Process(notebooks._Kernel.km.provisioner.process.pid)

    def kernel_cpu() -> float:
        return sum(sum(p.cpu_times()[:2]) for p in [kernel, *kernel.children(recursive=True)])

    k0, m0 = kernel_cpu(), time.process_time()
    for i in range(count):
        assert notebooks.execute(empty, root / f"n{i}.ipynb", parameters, root) is None
    k1, m1 = kernel_cpu(), time.process_time()
    notebooks._Kernel.shutdown()
    return (k1 - k0) / count, (m1 - m0) / count, len(code)


def children_cpu() -> float:
    """CPU seconds of this process's ended children and what they waited for (a command's main process,
    its workers and xelatex runs; a kernel it killed at exit is not waited for)."""
    import resource

    used = resource.getrusage(resource.RUSAGE_CHILDREN)
    return used.ru_utime + used.ru_stime


def _cpu_of(code: str) -> float:
    """CPU seconds `code` takes in a fresh interpreter (compiled modules kept, as a user's machine keeps them)."""
    env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
    probe = f"import time\nstart = time.process_time()\n{code}\nprint(time.process_time() - start)"
    for _ in range(2):  # the first may write the compiled modules
        done = subprocess.run([str(BIN / "python"), "-c", probe], capture_output=True, text=True, env=env, check=True)
    return float(done.stdout.split()[-1])


def kernel_boot(root: Path) -> tuple[float, float]:
    """Wall seconds from starting a sheet kernel to its being ready for a member (build.notebooks), and
    the kernel process's own CPU seconds in that time."""
    import psutil

    from timbersheets.build import notebooks

    root.mkdir(parents=True, exist_ok=True)
    os.environ.pop("PYTHONDONTWRITEBYTECODE", None)  # the kernel keeps compiled modules, as the runs' did
    start = time.monotonic()
    notebooks.start_kernel(root)
    notebooks._Kernel.get("python3", str(root))
    took = time.monotonic() - start
    kernel = psutil.Process(notebooks._Kernel.km.provisioner.process.pid)
    cpu = sum(sum(p.cpu_times()[:2]) for p in [kernel, *kernel.children(recursive=True)])
    notebooks._Kernel.shutdown()
    return took, cpu


def rerun_floor_lines(root: Path) -> list[str]:
    """What a rerun with one notebook to run pays before its own work: the imports of the tools the
    design card names (in the main process), the program's own imports, and a kernel's boot (its own
    process, on another CPU, while the main process designs)."""
    tools = _cpu_of("import papermill, nbconvert, jupyter_client")
    own = _cpu_of("import timbersheets.cli, timbersheets.run.runner")
    wall, cpu = kernel_boot(root)
    return [f"  floor of a rerun with one notebook to run: the program's imports {own:.2f} s CPU, then a kernel's "
            f"boot {wall:.2f} s (launch to ready; {cpu:.2f} s CPU of its own): no notebook runs before "
            f"{own + wall:.1f} s; meanwhile the main process imports papermill, nbconvert and jupyter_client "
            f"({tools:.2f} s CPU) and designs the members. The sheet, its typesetting and the package come after"]


ASSEMBLY = """
import os, sys, tempfile, pikepdf
from pathlib import Path
from timbersheets.build.pdfwrite import PdfWriter
sheets = sys.argv[1:]
half = len(sheets) // 2
rss = lambda: int(open("/proc/self/statm").read().split()[1]) * os.sysconf("SC_PAGE_SIZE") / 2**20
with tempfile.TemporaryDirectory() as tmp:
    writer = PdfWriter(Path(tmp) / "package.pdf")
    for k, sheet in enumerate(sheets):
        if k == half:
            first = rss()
        with pikepdf.open(sheet) as src:
            writer.add_pages(src)
    writer.close()
    print(half, first, len(sheets), rss())
"""


def assembly_memory(sheets: list[Path], lib: Path) -> tuple[float, float]:
    """The package's assembly as build/package.py does it (each sheet's pages copied to the file by
    pdfwrite, one sheet open at a time), in a process of its own: (MB before any sheet, MB a sheet),
    from its resident memory with half and with all of `sheets` copied (Linux's /proc)."""
    done = subprocess.run([str(BIN / "python"), "-c", ASSEMBLY, *map(str, sheets)], capture_output=True,
                          text=True, check=True, env={**os.environ, "PYTHONPATH": str(lib)})
    half, first, count, last = (float(v) for v in done.stdout.split())
    per = max(0.0, (last - first) / (count - half))
    return first - per * half, per


def floor_lines(root: Path, members: int, cold_phases: str) -> list[str]:
    """The cold package's floor on this machine: the machinery's CPU a notebook and the typesetting a
    member (from the cold run's run.log), over the CPUs; what the engineering, design and package add
    comes on top."""
    kernel, main, cells = machinery_floor(root)
    found = re.search(r"typeset ([\d.]+) s", cold_phases)
    typeset = float(found.group(1)) / members if found else 0.0
    cpus = os.cpu_count() or 1
    floor = members * (kernel + main + typeset) / cpus
    return [f"  floor of the cold package: papermill + nbclient + ipykernel {1000 * (kernel + main):.0f} ms CPU a "
            f"notebook of {cells} empty cells (kernel {1000 * kernel:.0f}, main {1000 * main:.0f}), xelatex "
            f"{1000 * typeset:.0f} ms a member: {floor:.1f} s for {members} members on {cpus} CPUs, "
            "before any sheet's own cells, the design or the package"]


def phase_line(out: Path, rev: str) -> str:
    """The phase times a run wrote to the first line of its run.log."""
    line = (out / f"rev-{rev}" / "run.log").read_text().splitlines()[0]
    return line[line.index("(") + 1:] if "(" in line else line


def set_revision(job: Path, revision: str) -> None:
    path = job / "project.toml"
    path.write_text(re.sub(r'(?m)^revision = ".*"$', f'revision = "{revision}"', path.read_text()))


def scenarios(root: Path, lib: Path, members: int) -> tuple[list[tuple[str, float, float, str]], Path, Path]:
    """The five scenarios on a fresh job, run with the library in `lib`: (name, seconds, peak MB, phases)."""
    job = build_job(root, members)
    out = root / "out"
    # the command through `python -m timbersheets.cli`, which every checkout's cli.py runs as the
    # program (a baseline's library may not have this one's console entry point)
    exe = [str(BIN / "python"), "-m", "timbersheets.cli"]
    run = [*exe, "run", str(job), "--out", str(out)]
    rows = []

    def step(name: str, rev: str, before: float = 0.0) -> None:
        used = children_cpu()
        took, peak = timed(run, lib)
        cpu = children_cpu() - used
        rows.append((name, before + took, peak, f"{phase_line(out, rev)}; CPU {cpu:.1f} s"))
        print(f"  ... {lib.parent.name}: {name} {before + took:.1f} s", file=sys.stderr, flush=True)

    step("cold package", "A")
    step("warm rerun", "A")
    change_one_load(job)
    step("one load changed", "A")
    set_revision(job, "B")
    change_one_load(job, skip=1)
    step("new revision, one change", "B")
    # The checker's verdict on every member, no comment (a comment is printed in the sheet body):
    # ok where it passes, revise where it does not (ok on a failing member needs a comment).
    members = json.loads((out / "rev-B" / "results.json").read_text())["members"]
    review, commands = 0.0, 0
    for verdict, marks in (("ok", [m["mark"] for m in members if m["status"] == "pass"]),
                           ("revise", [m["mark"] for m in members if m["status"] != "pass"])):
        if marks:
            review += timed([*exe, "review", str(job), *[a for m in marks for a in ("--mark", m)], "--by", "QC",
                             "--verdict", verdict, "--out", str(out)], lib)[0]
            commands += 1
    step("review of all, then rerun", "B", review)
    # the same, split: the review commands, and the rerun that prints the verdicts on the sheets
    rows.append((f"  of which {commands} review commands", review, 0.0, ""))
    rows.append(("  and the rerun", rows[-2][1] - review, rows[-2][2], ""))
    return rows, job, out


def pages_by_type(out: Path, rev: str) -> list[str]:
    import pikepdf

    doc = json.loads((out / f"rev-{rev}" / "results.json").read_text())
    pages: dict[str, list[int]] = {}
    for m in doc["members"]:
        sheet = out / f"rev-{rev}" / "sheets" / f"{m['mark']}.pdf"
        if sheet.exists():
            with pikepdf.open(sheet) as pdf:
                pages.setdefault(m["type"], []).append(len(pdf.pages))
    lines = []
    for kind, counts in sorted(pages.items()):
        target = PAGE_TARGETS.get(kind)
        met = "" if target is None else f"   target <= {target}: {'met' if max(counts) <= target else 'NOT met'}"
        lines.append(f"    {kind:<16} {min(counts)}-{max(counts)} pages, mean {sum(counts) / len(counts):.1f} "
                     f"({len(counts)} sheets){met}")
    return lines


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--members", type=int, default=100)
    parser.add_argument("--naive", type=int, default=NAIVE_SAMPLE,
                        help=f"members in the naive loop, spread over the schedule; its time is extrapolated to "
                             f"--members (default {NAIVE_SAMPLE}; 0 skips it)")
    parser.add_argument("--large", type=int, default=2000, help="members in the --no-pdf run (0 skips it)")
    parser.add_argument("--large-full", action=argparse.BooleanOptionalAction, default=True,
                        help="also the full run of the --large job, with PDFs (about 5 min for 2,000 on 2 CPUs)")
    parser.add_argument("--baseline", type=Path, help="a checkout whose library runs the same scenarios")
    parser.add_argument("--beams", action="store_true", help="only the beam-model analysis and sizing figures")
    args = parser.parse_args()
    if args.beams:
        print("\n".join(beam_times()))
        return 0
    import pikepdf

    cpus = os.cpu_count()
    load = os.getloadavg()[0]
    with tempfile.TemporaryDirectory(prefix="ts-bench-") as tmp:
        root = Path(tmp)
        mine, job, out = scenarios(root / "this", REPO / "lib", args.members)
        base = scenarios(root / "baseline", args.baseline.resolve() / "lib", args.members)[0] if args.baseline else None
        with pikepdf.open(out / "rev-B" / "package.pdf") as pdf:
            package_pages = len(pdf.pages)
        print(f"{args.members} members, package of {package_pages} pages, on {cpus} CPUs "
              f"(load average {load:.1f} at the start: timings include other work on this machine)")
        head = f"  {'scenario':<28} {'this code':>10} {'peak MB':>8}"
        print(head + (f" {'baseline':>10} {'peak MB':>8}" if base else "") + "   target")
        for i, (name, took, peak, _) in enumerate(mine):
            line = f"  {name:<28} {took:8.1f} s " + (f"{peak:8.0f}" if peak else f"{'-':>8}")  # review: not measured
            if base:
                line += f" {base[i][1]:8.1f} s {base[i][2]:8.0f}"
            target = TARGETS.get(name)
            line += f"   <= {target:.0f} s: {'met' if took <= target else 'NOT met'}" if target else ""
            print(line)
        print("  phases (run.log; sheet work is summed over the workers; CPU: the command's processes it waited for):")
        for name, _, _, phases in mine:
            if phases:
                print(f"    {name:<28} {phases}")
        if base:
            print("  baseline phases:")
            for name, _, _, phases in base:
                if phases:
                    print(f"    {name:<28} {phases}")
        print("  pages per member by type:")
        print("\n".join(pages_by_type(out, "B")))
        print("\n".join(sizing_times(job)))
        print("\n".join(beam_times()))
        cold = mine[0][1]
        print("\n".join(floor_lines(root / "floor", args.members, mine[0][3])))
        print("\n".join(rerun_floor_lines(root / "rerun-floor")))
        if args.naive:
            naive, n = naive_loop(job, root / "naive", args.naive)
            per = naive / n
            ratio = per * args.members / cold
            print(f"  naive loop                 {naive:8.1f} s for {n} members ({per:.2f} s a member; "
                  f"{per * args.members:.0f} s for {args.members}, extrapolated)")
            print(f"  cold package vs naive      {ratio:8.1f}x faster   target >= 20x: {'met' if ratio >= 20 else 'NOT met'}")
        if args.large:
            large = build_job(root / "large", args.large)
            took, peak = timed([str(BIN / "timbersheets"), "run", str(large), "--out", str(root / "large" / "out"),
                                "--no-pdf"])
            print(f"  {args.large} members --no-pdf   {took:8.1f} s, peak {peak:.0f} MB   target <= 30 s: "
                  f"{'met' if took <= 30 else 'NOT met'}")
            base_mb, per_mb = assembly_memory(sorted((out / "rev-B" / "sheets").glob("*.pdf")), REPO / "lib")
            print(f"  package writer             {base_mb:.0f} MB, {per_mb:.3f} MB more a sheet (measured on the "
                  f"{args.members}-member package's sheets, one open at a time): {base_mb + per_mb * args.large:.0f} MB "
                  f"for {args.large} sheets")
            if args.large_full:
                took, peak = timed([str(BIN / "timbersheets"), "run", str(large), "--out",
                                    str(root / "large" / "full")])
                per = took / args.large
                print(f"  {args.large} members full run {took:8.1f} s ({1000 * per:.0f} ms a member; the cold "
                      f"package {1000 * cold / args.members:.0f} ms a member), peak {peak:.0f} MB   target whole "
                      f"run <= 1500 MB: {'met' if peak <= 1500 else 'NOT met'}")
                print(f"    {phase_line(root / 'large' / 'full', 'A')}")
            else:
                print(f"  {args.large} members full run, projected linearly from the cold package: "
                      f"{cold / args.members * args.large:.0f} s (--no-large-full: memory not measured)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
