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
from .errors import TimbersheetsError

EPILOG = "Exit status: 0 all members pass; 1 a member fails or has an error; 2 the job is unusable."


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="timbersheets",
        description="CSA O86 timber member calc sheets from a member schedule (NBC Part 4 load combinations).",
        epilog=EPILOG,
    )
    p.add_argument("--version", action="version", version=f"timbersheets {__version__}")
    sub = p.add_subparsers(dest="command", required=True, metavar="COMMAND")

    new = sub.add_parser("new", help="scaffold a job folder (project.toml, schedule.csv)",
                         description="Create DIR with a project.toml and a one-row schedule.csv to fill in.",
                         epilog=EPILOG)
    new.add_argument("dir", type=Path, help="the job folder to create, e.g. calcsheets/harbour-hall")

    run = sub.add_parser("run", help="validate the schedule, design every member, write the outputs",
                         description="Validate every row of DIR/schedule.csv, design every member and write "
                                     "outputs/<job>/rev-<R>/: results.json, summary.csv, run.log.",
                         epilog=EPILOG)
    run.add_argument("dir", type=Path, help="the job folder (holds project.toml and schedule.csv)")
    run.add_argument("--no-pdf", action="store_true", help="write results only; no notebooks or PDFs")
    run.add_argument("--out", type=Path, help="put the revision folder in OUTDIR/rev-<R>/ instead of outputs/<job>/")
    run.add_argument("--only", metavar="MARKS", help="comma-separated member marks to run (others are left out)")
    run.add_argument("--jobs", type=int, metavar="N", help="members executed at once (default: number of CPUs)")
    run.add_argument("--force", action="store_true", help="re-execute every member, ignoring the cache")
    run.add_argument("--format", choices=("pdf", "html"), default="pdf",
                     help="sheet format: pdf (xelatex) or html (needs no TeX); default pdf")
    return p


def cmd_new(args: argparse.Namespace) -> int:
    from .project import PROJECT_TEMPLATE, SCHEDULE_TEMPLATE

    folder: Path = args.dir
    if (folder / "project.toml").exists() or (folder / "schedule.csv").exists():
        print(f"timbersheets: {folder} already holds a job; nothing was changed", file=sys.stderr)
        return 2
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "project.toml").write_text(PROJECT_TEMPLATE.format(date=dt.date.today().isoformat()), encoding="utf-8")
    (folder / "schedule.csv").write_text(SCHEDULE_TEMPLATE, encoding="utf-8")
    print(f"created {folder}/project.toml and {folder}/schedule.csv")
    print(f"next: fill them in, then run: timbersheets run {folder}")
    return 0


def cmd_run(args: argparse.Namespace) -> int:
    from .results import round_utilization
    from .runner import run_job

    only = [m.strip() for m in args.only.split(",") if m.strip()] if args.only else None
    from .runner import RunOptions

    opts = RunOptions(out=args.out, only=only, sheets=not args.no_pdf, fmt=args.format, jobs=args.jobs,
                      force=args.force)
    report = run_job(args.dir, opts)
    for line in report.schedule_warnings:
        print(f"warning: {line}", file=sys.stderr)
    for d in report.designs:
        util = f"{round_utilization(d.governing.utilization):6.3f}" if d.governing and not d.errors else "     -"
        gov = f"{d.governing.check} under {d.governing.combination}" if d.governing and not d.errors else ""
        print(f"  {d.mark:<12} {d.size:<12} {d.status:<6} {util}  {gov}")
        for e in d.errors:
            print(f"      error: {e}")
    if report.package_error:
        print(f"error: package.pdf was not written: {report.package_error}", file=sys.stderr)
    c = report.counts()
    print(f"{c['pass']} pass, {c['fail']} fail, {c['error']} error -> {report.outdir}")
    return report.exit_code


COMMANDS = {"new": cmd_new, "run": cmd_run}


def main(argv: list[str] | None = None) -> int:
    args = _parser().parse_args(argv)
    try:
        return COMMANDS[args.command](args)
    except TimbersheetsError as exc:
        print(f"timbersheets: {exc}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("timbersheets: interrupted; files already written are complete", file=sys.stderr)
        return 130


if __name__ == "__main__":
    sys.exit(main())
