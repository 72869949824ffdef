"""One exception family. The library raises; the CLI decides how to show it.

Every error carries structured context and builds its message in ``__str__``,
so it can be logged, pickled across worker processes and shown the same way.
"""

from __future__ import annotations

import errno
import shutil
from enum import IntEnum


class ExitCode(IntEnum):
    """The documented exit status of every command."""

    OK = 0  # every member passes (or the command did what was asked)
    MEMBERS = 1  # some member fails or has an error; or review --status: something left to check
    UNUSABLE = 2  # the job itself is unusable (no schedule, bad project.toml) or the command cannot act
    INTERRUPTED = 130  # Ctrl-C; files already written are complete


class TimbersheetsError(Exception):
    """Base of every error the program raises on purpose. The CLI exits with `exit_code`."""

    exit_code = ExitCode.UNUSABLE


class UsageError(TimbersheetsError):
    """A command was given something it cannot act on (an unknown mark, a missing option)."""

    def __init__(self, problem: str) -> None:
        super().__init__(problem)
        self.problem = problem

    def __str__(self) -> str:
        return self.problem


class JobError(TimbersheetsError):
    """The job as a whole is unusable (no schedule, bad project.toml): exit 2."""

    def __init__(self, path: str, problem: str, fix: str = "") -> None:
        super().__init__(path, problem, fix)
        self.path, self.problem, self.fix = path, problem, fix

    def __str__(self) -> str:
        text = f"{self.path}: {self.problem}"
        return f"{text}. {self.fix}" if self.fix else text


class OutputError(TimbersheetsError):
    """An output could not be written (disk full, read-only folder): exit 2, in one line."""

    def __init__(self, folder: object, cause: OSError) -> None:
        super().__init__(folder, cause)
        self.folder, self.cause = folder, cause

    def __str__(self) -> str:
        text = f"{self.folder}: cannot write ({self.cause.strerror or self.cause})"
        if self.cause.errno in (errno.ENOSPC, errno.EDQUOT):
            try:
                free = shutil.disk_usage(self.folder).free
                text += f"; {free / 1e6:.1f} MB free there. Free some space (a run needs a few MB a member)"
            except OSError:
                pass
        return text


class ScheduleError(TimbersheetsError):
    """One bad cell (or row) of the schedule.

    `row` is the row number as a spreadsheet shows it (the header is row 1).
    """

    def __init__(
        self,
        file: str,
        row: int | None,
        column: str | None,
        value: str | None,
        problem: str,
        allowed: str = "",
    ) -> None:
        super().__init__(file, row, column, value, problem, allowed)
        self.file, self.row, self.column = file, row, column
        self.value, self.problem, self.allowed = value, problem, allowed

    def __str__(self) -> str:
        where = self.file
        if self.row is not None:
            where += f", row {self.row}"
        if self.column:
            where += f", column '{self.column}'"
        text = f"{where}: "
        if self.value is not None:
            text += f"value '{self.value}' "
        text += self.problem
        if self.allowed:
            text += f"; allowed: {self.allowed}"
        return text


class DataRowError(ScheduleError):
    """One bad cell (or row) of a firm data file; `row` counts the header as row 1."""


class DataError(TimbersheetsError):
    """A data file (strengths, factors, sizes) is missing, malformed or lacks a value."""

    def __init__(self, file: str, problem: str) -> None:
        super().__init__(file, problem)
        self.file, self.problem = file, problem

    def __str__(self) -> str:
        return f"{self.file}: {self.problem}"


class DesignError(TimbersheetsError):
    """The member cannot be designed as described (e.g. slenderness C_c > 50).

    These are engineering limits of the standard, reported instead of a number.
    """

    def __init__(self, mark: str, problem: str, clause: str = "", fix: str = "") -> None:
        super().__init__(mark, problem, clause, fix)
        self.mark, self.problem, self.clause, self.fix = mark, problem, clause, fix

    def __str__(self) -> str:
        text = f"{self.mark}: {self.problem}"
        if self.clause:
            text += f" ({self.clause})"
        if self.fix:
            text += f". {self.fix}"
        return text


class ParameterError(TimbersheetsError):
    """Parameters for a template that it does not declare, or that are missing."""

    def __init__(self, unknown: list[str], missing: list[str], where: str = "member") -> None:
        super().__init__(unknown, missing, where)
        self.unknown, self.missing, self.where = unknown, missing, where

    def __str__(self) -> str:
        parts = []
        if self.unknown:
            parts.append(f"unknown {self.where} parameter(s): {', '.join(self.unknown)}")
        if self.missing:
            parts.append(f"missing {self.where} parameter(s): {', '.join(self.missing)}")
        return "; ".join(parts) + " (refused before execution)"
