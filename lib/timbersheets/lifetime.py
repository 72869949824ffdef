"""Worker processes and kernels die with the run that started them.

A killed run must not leave workers (and, through them, notebook kernels) busy
for minutes: each worker and each kernel runs a watcher thread that ends it as
soon as its parent changes (the run is gone and it was re-parented).

Linux's PR_SET_PDEATHSIG is not used: its "parent" is the thread that created the
child, not the process, so a kernel launched from a short-lived thread (as the run
does, to boot it while the members are designed) would be killed as soon as that
thread finished.
"""

from __future__ import annotations

import os
import threading
import time

POLL_SECONDS = 0.25


def die_with_parent(parent: int | None = None) -> None:
    """End this process when the process that started it ends.

    `parent` is that process's pid when known (a process that may have been orphaned
    before it got here); by default the present parent."""
    parent = os.getppid() if parent is None else parent
    if os.getppid() != parent:  # already orphaned
        os._exit(1)
    threading.Thread(target=_watch, args=(parent,), daemon=True, name="die-with-parent").start()


def _watch(parent: int) -> None:
    while os.getppid() == parent:
        time.sleep(POLL_SECONDS)
    os._exit(1)


def pid_alive(pid: int) -> bool:
    """Whether a process `pid` exists (one of another user's counts as alive)."""
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    return True
