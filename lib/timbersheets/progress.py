"""A one-line progress bar on the terminal (nothing when output is not a terminal)."""

from __future__ import annotations

import sys
import time


class Progress:
    def __init__(self, total: int, label: str, stream=None) -> None:
        self.total, self.label, self.done = total, label, 0
        self.stream = stream or sys.stderr
        self.live = hasattr(self.stream, "isatty") and self.stream.isatty()
        self.started = time.monotonic()

    def step(self, what: str) -> None:
        self.done += 1
        if not self.live:
            return
        width = 28
        filled = int(width * self.done / max(self.total, 1))
        bar = "#" * filled + "." * (width - filled)
        elapsed = time.monotonic() - self.started
        self.stream.write(f"\r{self.label} [{bar}] {self.done}/{self.total} {elapsed:5.1f} s  {what:<14}")
        self.stream.flush()

    def close(self) -> None:
        if self.live:
            self.stream.write("\n")
            self.stream.flush()
