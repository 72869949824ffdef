"""The command line: gathers options, calls one library function, reports once.

Exit status: 0 every member passes; 1 some member fails or has an error;
2 the job itself is unusable (no schedule, bad project.toml).
"""

from __future__ import annotations

import argparse
import datetime as dt
import sys
from pathlib import Path

from . import __version__
from .errors import ExitCode, TimbersheetsError, UsageError
from .fileio import write_atomic
from .job.project import OUTPUT_RULE
from .job.review import VERDICTS

EPILOG = "Exit status: 0 all members pass; 1 a member fails or has an error; 2 the job is unusable."
SIZE_EPILOG = "Exit status: 0 every member named has a passing section; 1 one has none; 2 the job is unusable."
DIFF_EPILOG = "Exit status: 0 the changes were listed; 2 a revision or the job is unusable."
REVIEW_EPILOG = ("Exit status: 0 the verdicts were recorded (with --status: nothing left to check); "
                 "1 with --status, something is left to check; 2 the verdict was refused or the job is unusable.")


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="timbersheets",
        description="CSA O86 timber member calc sheets from a member schedule (NBC Part 4 load combinations).",
        epilog="Each command's --help gives its exit status.",
    )
    p.add_argument("--version", action="version", version=f"timbersheets {__version__}")
    sub = p.add_subparsers(dest="command", required=True, metavar="COMMAND")

    new = sub.add_parser("new", help="scaffold a job folder (project.toml, schedule.csv)",
                         description="Create DIR with a project.toml and a schedule.csv of two example members "
                                     "(a post and a floor joist) that design as written; replace them with yours.",
                         epilog="Exit status: 0 created; 2 DIR already holds a job.")
    new.add_argument("dir", type=Path, help="the job folder to create, e.g. calcsheets/harbour-hall")

    run = sub.add_parser("run", help="validate the schedule, design every member, write the outputs",
                         description="Validate every row of DIR/schedule.csv, design every member and write "
                                     "rev-<R>/ (results.json, summary.csv, run.log, sheets, package.pdf) in "
                                     f"{OUTPUT_RULE}. The folder is printed at the end.",
                         epilog=EPILOG)
    run.add_argument("dir", type=Path, help="the job folder (holds project.toml and schedule.csv)")
    run.add_argument("--no-pdf", action="store_true", help="write results only; no notebooks or PDFs")
    run.add_argument("--out", type=Path, metavar="OUTDIR",
                     help="put the revision folder in OUTDIR/rev-<R>/ instead")
    run.add_argument("--only", metavar="MARKS",
                     help="comma-separated marks whose notebooks and sheets to make; every member is still designed "
                          "and listed in results.json, and the others keep the sheets of the last run of this "
                          "revision that are still current (out-of-date ones are removed and listed in run.log)")
    run.add_argument("--jobs", type=int, metavar="N", help="members executed at once (default: number of CPUs)")
    run.add_argument("--force", action="store_true", help="re-execute every member, ignoring the cache")
    run.add_argument("--format", choices=("pdf", "html"), default="pdf",
                     help="sheet format: pdf (xelatex) or html (needs no TeX); default pdf")
    run.add_argument("--scale", action="append", metavar="TYPE=FACTOR", default=[],
                     help="what-if: scale a load type (D, L, S, W, E), e.g. S=1.2; repeatable. Reports which "
                          "members would fail or change governing case, and writes nothing. Members with size = auto "
                          "keep the sections sized for the scheduled loads")
    run.add_argument("--resize", action="store_true",
                     help="with --scale: size the auto members again for the scaled loads and show the new sections")

    size = sub.add_parser("size", help="size members: the lightest standard section that passes, and runners-up",
                          description="Search the standard catalogue (sawn dimension lumber in 1 to 4 plies, timbers, "
                                      "glulam widths by 38 mm laminations) for the lightest section that passes every "
                                      "check under every combination. Without --mark, sizes the members whose size is "
                                      "auto; with --mark, sizes those members whatever their scheduled size. Writes "
                                      "nothing.", epilog=SIZE_EPILOG)
    size.add_argument("dir", type=Path, help="the job folder")
    size.add_argument("--mark", action="append", metavar="M", help="member mark (repeatable)")

    diff = sub.add_parser("diff", help="what changed between two revisions",
                          description="Compare outputs/<job>/rev-R1 and rev-R2: members added and removed, changed "
                                      "inputs (old -> new), changed results, flipped verdicts. Prints the changes "
                                      "and writes them to rev-R2/diff.csv.", epilog=DIFF_EPILOG)
    diff.add_argument("dir", type=Path, help="the job folder")
    diff.add_argument("--from", dest="r1", required=True, metavar="R1", help="the earlier revision, e.g. A")
    diff.add_argument("--to", dest="r2", required=True, metavar="R2", help="the later revision, e.g. B")
    diff.add_argument("--out", type=Path, metavar="OUTDIR", help="the folder holding rev-<R>/ (as given to run --out)")

    review = sub.add_parser("review", help="record a checker's verdict on members, or list what needs checking",
                            description="Append the checker's verdict to DIR/review.csv, tied to the inputs hash of "
                                        "the member as last run. A member whose inputs change afterwards shows as "
                                        "changed since check. With --status, list what is not checked, stale or to "
                                        "revise.", epilog=REVIEW_EPILOG)
    review.add_argument("dir", type=Path, help="the job folder")
    which = review.add_mutually_exclusive_group(required=True)
    which.add_argument("--mark", action="append", metavar="M", help="member mark (repeatable)")
    which.add_argument("--all", action="store_true", help="every member of the current revision")
    which.add_argument("--status", action="store_true", help="list what still needs checking")
    review.add_argument("--by", metavar="INITIALS", help="the checker's initials or name")
    review.add_argument("--verdict", choices=VERDICTS, help="ok, or revise (needs changes)")
    review.add_argument("--comment", default="",
                        help="a note for the designer, printed on the sheet; required for ok on a member that "
                             "fails or has an error")
    review.add_argument("--out", type=Path, metavar="OUTDIR", help="the folder holding rev-<R>/ (as given to run --out)")

    sub.add_parser("doctor", help="check Python, the package, TeX and the fonts; say how to get what is missing",
                   description="Check what a run needs: Python, this package and its Jupyter kernel, xelatex with "
                               "every LaTeX package the sheet layouts load, and their fonts (a one-line test page is "
                               "typeset). Prints how to get TeX on Windows, macOS and Linux; HTML sheets "
                               "(run --format html) need no TeX. Changes nothing.",
                   epilog="Exit status: 0 ready; 1 PDF sheets cannot be made (HTML sheets and results can); "
                          "2 Python or the package is not usable.")
    columns = sub.add_parser("columns", help="the schedule column reference: meaning, unit, default, allowed values",
                             description="Print every schedule column with its meaning, unit, default and allowed "
                                         "values, from the column table in the code.",
                             epilog="Exit status: 0.")
    columns.add_argument("--markdown", action="store_true", help="print it as the Markdown table of docs/columns.md")

    data = sub.add_parser("data", help="list the data values a job uses, for checking against the standard",
                          description="List every tabled value (specified strengths, modification and resistance "
                                      "factors, load combination rows) the job's members use, grouped by table, with "
                                      "its source, status and the members that use it. A firm checks them once, in "
                                      "the file --firm-file writes, and names it in project.toml ([data] materials).",
                          epilog="Exit status: 0 listed; 1 the firm's file (or --compare FILE) has errors; "
                                 "2 the job is unusable.")
    data.add_argument("dir", type=Path, nargs="?", help="the job folder (not needed with --all or --compare)")
    data.add_argument("--all", action="store_true", help="list every value of the built-in tables instead")
    data.add_argument("--csv", action="store_true", help="write the list as CSV to standard output")
    data.add_argument("--sheet", action="store_true",
                      help="typeset the list as a verification sheet (PDF) with columns for the checker")
    data.add_argument("--firm-file", type=Path, metavar="FILE",
                      help="write a firm data file holding the values the job uses, status to-verify")
    data.add_argument("--compare", type=Path, metavar="FILE",
                      help="list where a firm data file differs from the built-in data")
    data.add_argument("--out", type=Path, metavar="OUTDIR",
                      help="with --sheet: the folder for the PDF (default: where run puts the job's outputs)")
    return p


def cmd_new(args: argparse.Namespace) -> int:
    from .job.project import PROJECT_TEMPLATE, SCHEDULE_TEMPLATE

    folder: Path = args.dir
    if (folder / "project.toml").exists() or (folder / "schedule.csv").exists():
        raise UsageError(f"{folder} already holds a job; nothing was changed")
    folder.mkdir(parents=True, exist_ok=True)
    write_atomic(folder / "project.toml", PROJECT_TEMPLATE.format(date=dt.date.today().isoformat()))
    write_atomic(folder / "schedule.csv", SCHEDULE_TEMPLATE)
    print(f"created {folder}/project.toml and {folder}/schedule.csv")
    print(f"next: fill them in, then run: timbersheets run {folder}")
    return ExitCode.OK


def cmd_run(args: argparse.Namespace) -> int:
    from .job.results import round_utilization
    from .run.runner import run_job

    if args.scale:
        return cmd_what_if(args)
    if args.resize:
        raise UsageError("--resize goes with --scale (a what-if); a run always sizes auto members")
    only = [m.strip() for m in args.only.split(",") if m.strip()] if args.only else None
    from .run.runner import RunOptions

    opts = RunOptions(out=args.out, only=only, sheets=not args.no_pdf, fmt=args.format, jobs=args.jobs,
                      force=args.force)
    report = run_job(args.dir, opts)
    for line in report.schedule_warnings:
        print(f"warning: {line}", file=sys.stderr)
    for line in report.data_errors:
        print(f"error: {line}", file=sys.stderr)
    for d in report.designs:
        util = f"{round_utilization(d.governing.utilization):6.3f}" if d.governing and not d.errors else "     -"
        gov = f"{d.governing.check} under {d.governing.combination}" if d.governing and not d.errors else ""
        print(f"  {d.mark:<12} {d.size:<12} {d.status:<6} {util}  {gov}")
        for e in d.errors:
            print(f"      error: {e}")
    for line in report.carried.log_lines():
        print(f"note: {line}")
    if report.package_error:
        print(f"error: package.pdf was not written: {report.package_error}", file=sys.stderr)
    c = report.counts()
    print(f"{c['pass']} pass, {c['fail']} fail, {c['error']} error")
    print(f"outputs: {report.outdir.resolve()}")
    return report.exit_code


def cmd_what_if(args: argparse.Namespace) -> int:
    from .job.results import round_utilization
    from .run.whatif import parse_scales, what_if

    try:
        scales = parse_scales(args.scale)
    except ValueError as exc:
        raise UsageError(str(exc)) from None
    rows = what_if(args.dir, scales, resize=args.resize)
    label = ", ".join(f"{k} x {v:g}" for k, v in scales.items())
    print(f"what-if ({label}); nothing is written")
    auto = [r for r in rows if r.auto and r.before.size]
    if auto and args.resize:
        print("auto members sized again for the scaled loads: "
              + ", ".join(f"{r.mark} {r.before.size} -> {r.after.size}" for r in auto))
    elif auto:
        print("auto members keep the sections sized for the scheduled loads (--resize sizes them again): "
              + ", ".join(f"{r.mark} {r.before.size}" for r in auto))
    changed = [r for r in rows if r.flipped or r.governing_changed or r.resized]
    for r in rows:
        b, a = r.before.governing, r.after.governing
        if not (b and a) or r.before.errors or r.after.errors:
            continue
        note = "VERDICT FLIPS" if r.flipped else "governing case changes" if r.governing_changed else ""
        if r.resized:
            note = f"{note}; " if note else ""
            note += f"section {r.before.size} -> {r.after.size}"
        print(f"  {r.mark:<12} {round_utilization(b.utilization):6.3f} -> {round_utilization(a.utilization):6.3f}  "
              f"{r.before.status:>4} -> {r.after.status:<4} {a.check} under {a.combination}  {note}")
    print(f"{sum(r.flipped for r in rows)} verdict(s) flip, {len(changed)} member(s) change")
    return ExitCode.MEMBERS if any(r.after.status != "pass" for r in rows) else ExitCode.OK


def cmd_size(args: argparse.Namespace) -> int:
    import time

    from .engineering.design import design_function
    from .job.load import load_job
    from .engineering.membertypes import member_type
    from .engineering.sizing import size

    job = load_job(args.dir)
    project, data = job.project, job.data
    members = job.members()  # with the loads they carry from other members
    marks = args.mark or [m.mark for m in members.values() if m.size == "auto"]
    unknown = [m for m in marks if m not in members]
    if unknown:
        raise UsageError(f"no valid member {', '.join(unknown)} in {project.schedule_path}")
    if not marks:
        print("no member has size = auto; name one with --mark M")
        return ExitCode.OK
    status = ExitCode.OK
    for mark in marks:
        member = members[mark]
        started = time.perf_counter()
        result = size(member, data, design_function(member_type(member.type)))
        ms = (time.perf_counter() - started) * 1000
        where = f" ({result.constraints})" if result.constraints else ""
        print(f"{mark}: {member.type} {member.material} {member.species} {member.grade}{where}; "
              f"{result.searched} sections tried in {ms:.0f} ms")
        if result.chosen is None:
            status = ExitCode.MEMBERS
            best = result.best
            print(f"  no standard section passes; best {best.label} at {best.utilization:.3f} ({best.governing})"
                  if best else "  no standard section can carry the loads")
            continue
        for word, c in [("chosen", result.chosen)] + [("runner-up", c) for c in result.runners_up]:
            print(f"  {word:<10} {c.label:<12} A = {c.section.A:>8.0f} mm²  utilization {c.utilization:.3f}  "
                  f"{c.governing}")
    return status


def cmd_diff(args: argparse.Namespace) -> int:
    from .fileio import write_csv
    from .job.project import load_project
    from .job.revisions import DIFF_HEADER, diff, diff_rows, format_diff, load_results
    from .schedule.labels import label_problem
    from .job.project import job_dir

    for option, label in (("--from", args.r1), ("--to", args.r2)):
        if label_problem(label):
            raise UsageError(f"{option} '{label[:50]}' {label_problem(label)}; give a revision label as in "
                             "project.toml, e.g. A")
    project = load_project(args.dir)
    base = job_dir(project, args.out)
    old, new = load_results(base / f"rev-{args.r1}"), load_results(base / f"rev-{args.r2}")
    changes = diff(old, new)
    print(format_diff(changes, args.r1, args.r2))
    write_csv(base / f"rev-{args.r2}" / "diff.csv", DIFF_HEADER, diff_rows(changes))
    print(f"written: {base / f'rev-{args.r2}' / 'diff.csv'}")
    return ExitCode.OK


def cmd_review(args: argparse.Namespace) -> int:
    from .job.project import load_project
    from .job.review import (Review, append_reviews, comment_text, count_text, latest, load_review_file,
                         refuse_unexplained_ok, standing, status, today)
    from .job.revisions import load_results
    from .job.project import job_dir

    project = load_project(args.dir)
    results = load_results(job_dir(project, args.out) / f"rev-{project.revision}")
    members = {m["mark"]: m for m in results["members"]}
    record = load_review_file(project.folder)
    for problem in record.problems:
        print(f"warning: {problem}", file=sys.stderr)
    if args.status:
        reviews = latest(record.reviews)
        states = {mark: status(reviews.get(mark), m.get("inputs_hash")) for mark, m in members.items()}
        pending = []
        for mark, state in states.items():
            word = standing(state)
            if word != "ok":
                comment = comment_text(state)
                pending.append(f"  {mark:<12} {word:<11} {comment}".rstrip())
        print(f"rev {project.revision}: {count_text(list(states.values()))}")
        print("\n".join(pending) if pending else "  nothing left to check")
        return ExitCode.MEMBERS if pending else ExitCode.OK
    if not args.by or not args.verdict:
        raise UsageError("review needs --by INITIALS and --verdict ok|revise (or --status)")
    marks = list(members) if args.all else args.mark
    unknown = [m for m in marks if m not in members]
    if unknown:
        raise UsageError(f"not in rev {project.revision}: {', '.join(unknown)}")
    from .engineering.data import DataSet
    from .run.inputs import INPUTS_KEY, inputs_key

    folder = job_dir(project, args.out)
    ran = folder / f"rev-{project.revision}" / INPUTS_KEY
    data = DataSet(project.materials)
    if ran.exists() and ran.read_text(encoding="utf-8") == inputs_key(project.folder / "project.toml",
                                                                       project.schedule_path, data.hash):
        stale = []  # the very files (and library) of the last run: every member's inputs are the ones it hashed
    else:
        from .job.load import job_of, use_stores

        use_stores(folder / ".cache")  # the run's beam analyses and sizing searches
        job = job_of(project, data)
        # the inputs as the run hashed them: with the reactions each member carries
        current = {mark: m.inputs_hash for mark, m in job.members(marks).items()}
        stale = [m for m in marks if current.get(m) != members[m].get("inputs_hash")]
    if stale:
        raise UsageError(f"the schedule changed after the last run for {', '.join(stale)}; "
                         "run it again so the sheets show what you check")
    refuse_unexplained_ok(args.verdict, args.comment, {m: members[m]["status"] for m in marks})
    records = [Review(m, args.by, today(), args.verdict, args.comment, members[m]["inputs_hash"], project.revision)
               for m in marks]
    append_reviews(project.folder, records)
    print(f"recorded {args.verdict} by {args.by} for {len(records)} member(s) in {project.folder / 'review.csv'}")
    print(f"next: timbersheets run {args.dir}  (prints the check on the sheets; nothing is re-executed)")
    return ExitCode.OK


def cmd_data(args: argparse.Namespace) -> int:
    from .engineering.data import DataSet
    from .job.datacheck import all_items, compare, csv_text, format_list, job_designs, used_items, write_firm_file

    if args.compare:
        lines, _ = compare(args.compare)
        print("\n".join(lines))
        return ExitCode.MEMBERS if any(line.startswith("  error:") for line in lines) else ExitCode.OK
    if args.all:
        data, items, title, project = DataSet(), all_items(DataSet()), "built-in data", None
    elif args.dir is None:
        raise UsageError("data needs a job folder DIR (or --all, or --compare FILE)")
    else:
        from .job.project import load_project

        project = load_project(args.dir)
        data, designs = job_designs(project)
        items = used_items(data, designs)
        title = f"{project.name} rev {project.revision}: data values used by {len(designs)} members"
        if data.firm:
            for e in data.firm.errors:
                print(f"error: {e}", file=sys.stderr)
        missing = [d.mark for d in designs if d.errors]
        if missing:
            print(f"warning: {', '.join(missing)} could not be designed (see timbersheets run); the values they "
                  "would use are not listed", file=sys.stderr)
    if args.csv:
        sys.stdout.write(csv_text(items))
    elif not (args.firm_file or args.sheet):
        print(format_list(items, title))
    if args.firm_file:
        count = write_firm_file(args.firm_file, items)
        print(f"wrote {count} values to {args.firm_file}, each with status to-verify")
        print("next: check each value against your licensed copy of the standard; correct it where the standard "
              "differs; set status verified with verified_by, verified_on and edition; then name the file in "
              "project.toml: [data] materials = \"...\"")
    if args.sheet:
        if project is None:
            raise UsageError("--sheet needs a job folder DIR")
        from .build.datasheet import write_sheet
        from .job.project import job_dir

        pdf = write_sheet(project, data, items, job_dir(project, args.out))
        print(f"written: {pdf}")
    return ExitCode.MEMBERS if data.firm and data.firm.errors else ExitCode.OK


def cmd_columns(args: argparse.Namespace) -> int:
    from .schedule.columnref import markdown, text

    print(markdown() if args.markdown else text(), end="")
    return ExitCode.OK


def cmd_doctor(args: argparse.Namespace) -> int:
    from .build.doctor import diagnose, report
    from .build.notebooks import templates_dir

    lines, code = report(diagnose(templates_dir()))
    print("\n".join(lines))
    return code


COMMANDS = {"new": cmd_new, "run": cmd_run, "size": cmd_size, "diff": cmd_diff, "review": cmd_review,
            "columns": cmd_columns, "data": cmd_data, "doctor": cmd_doctor}


def main(argv: list[str] | None = None) -> int:
    args = _parser().parse_args(argv)
    try:
        return int(COMMANDS[args.command](args))
    except TimbersheetsError as exc:
        print(f"timbersheets: {exc}", file=sys.stderr)
        return int(exc.exit_code)
    except KeyboardInterrupt:
        print("timbersheets: interrupted; files already written are complete", file=sys.stderr)
        return int(ExitCode.INTERRUPTED)


def entry() -> None:
    """The `timbersheets` command: `main`, then exit without the interpreter's last garbage
    collection over everything the command built (0.3 s after a 100-member run, measured): the
    objects are frozen out of it. Files are all written and closed by then; exit handlers still run."""
    import gc

    status = main()
    gc.freeze()
    sys.exit(status)


if __name__ == "__main__":
    entry()
