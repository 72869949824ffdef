"""Worker processes die with the run that started them.

A killed run must not leave workers (and, through them, notebook kernels) busy
for minutes: each worker asks the kernel to kill it when its parent dies (Linux
PR_SET_PDEATHSIG), and elsewhere a watcher thread ends it when its parent
changes. Kernels already end themselves when their worker goes (ipykernel's
parent poller, JPY_PARENT_PID).
"""

from __future__ import annotations

import ctypes
import os
import signal
import sys
import threading
import time

PR_SET_PDEATHSIG = 1  # linux/prctl.h


def die_with_parent() -> None:
    """Initializer of a worker process: end it when the process that started it ends."""
    parent = os.getppid()
    if sys.platform.startswith("linux"):
        try:
            libc = ctypes.CDLL(None, use_errno=True)
            if libc.prctl(PR_SET_PDEATHSIG, signal.SIGKILL, 0, 0, 0) == 0:
                if os.getppid() != parent:  # the parent died before the request took effect
                    os._exit(1)
                return
        except (OSError, AttributeError):
            pass
    threading.Thread(target=_watch, args=(parent,), daemon=True, name="die-with-parent").start()


def _watch(parent: int) -> None:
    while os.getppid() == parent:
        time.sleep(0.5)
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
