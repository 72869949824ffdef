"""Faults: a full disk, leftovers of killed runs, workers outliving a killed run."""

import os
import resource
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from conftest import member_row, write_job
from timbersheets.run.runner import run_job

LIB = Path(__file__).resolve().parent.parent / "lib"
DEAD_PID = 4_194_304  # never a process id: Linux pid_max is at most 2**22, ids are below it


def test_stale_staging_folders_and_part_files_of_killed_runs_are_removed(tmp_path):
    folder = write_job(tmp_path / "job", [member_row("C-1")])
    out = tmp_path / "out"
    stale = [out / f".rev-A.staging-{DEAD_PID}", out / f".rev-B.old-{DEAD_PID}"]
    live = out / f".rev-A.staging-{os.getppid()}"  # a run still going: left alone
    for path in (*stale, live):
        path.mkdir(parents=True)
    part = out / ".cache" / f".sheet.pdf.{DEAD_PID}.abc123.part"
    part.parent.mkdir(parents=True)
    part.write_bytes(b"")
    run_job(folder, out=out, sheets=False)
    assert not any(p.exists() for p in stale) and not part.exists()
    assert live.exists()


def test_disk_full_is_one_line_naming_the_folder(tmp_path):
    """RLIMIT_FSIZE makes every write past 20 kB fail as a full disk would (EFBIG instead of ENOSPC)."""
    folder = write_job(tmp_path / "job", [member_row(f"C-{i}") for i in range(30)])
    out = tmp_path / "out"

    def limit():
        signal.signal(signal.SIGXFSZ, signal.SIG_IGN)
        resource.setrlimit(resource.RLIMIT_FSIZE, (20_000, 20_000))

    done = subprocess.run([sys.executable, "-m", "timbersheets.cli", "run", str(folder), "--no-pdf", "--jobs", "1",
                           "--out", str(out)], capture_output=True, text=True, preexec_fn=limit,
                          env={**os.environ, "PYTHONPATH": str(LIB)}, timeout=300)
    assert done.returncode == 2, done.stderr
    assert "Traceback" not in done.stderr
    message = [ln for ln in done.stderr.splitlines() if ln.startswith("timbersheets:")]
    assert len(message) == 1 and str(out) in message[0] and "cannot write" in message[0], done.stderr
    assert not list(out.rglob("*.part")) and not list(out.glob(".rev-A.staging-*"))


def descendants(pid: int) -> set[int]:
    children: dict[int, list[int]] = {}
    for stat in Path("/proc").glob("[0-9]*/stat"):
        try:
            fields = stat.read_text().rsplit(")", 1)[1].split()
        except OSError:
            continue
        children.setdefault(int(fields[1]), []).append(int(stat.parent.name))
    out, todo = set(), [pid]
    while todo:
        for child in children.get(todo.pop(), []):
            out.add(child)
            todo.append(child)
    return out


def alive(pid: int) -> bool:
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state != "Z"


@pytest.mark.pipeline
def test_workers_and_kernels_die_with_a_killed_run(tmp_path):
    folder = write_job(tmp_path / "job", [member_row(f"C-{i}") for i in range(6)])
    run = subprocess.Popen([sys.executable, "-m", "timbersheets.cli", "run", str(folder), "--jobs", "2",
                            "--out", str(tmp_path / "out")], env={**os.environ, "PYTHONPATH": str(LIB)},
                           stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, start_new_session=True)
    seen: set[int] = set()
    try:
        deadline = time.time() + 120
        while time.time() < deadline:
            seen |= descendants(run.pid)
            kernels = [p for p in seen if alive(p) and any(name in Path(f"/proc/{p}/cmdline").read_bytes() for name in (b"ipykernel", b"timbersheets.kernel"))]
            if len(kernels) >= 1 and len(seen) >= 3:
                break
            time.sleep(0.2)
        assert kernels, "no kernel started within 120 s"
        seen |= descendants(run.pid)
        run.send_signal(signal.SIGKILL)
        run.wait()
        deadline = time.time() + 5
        while time.time() < deadline and any(alive(p) for p in seen):
            time.sleep(0.2)
        assert not [p for p in seen if alive(p)], "processes outlived the killed run"
    finally:  # whatever the outcome, nothing this test started keeps running
        if run.poll() is None:
            run.kill()
        for pid in seen:
            if alive(pid):
                os.kill(pid, signal.SIGKILL)
