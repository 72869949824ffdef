"""make bench's own logic (not its timings: those are reported by the bench, never asserted here)."""

from __future__ import annotations

import importlib.util

from conftest import REPO, member_row, write_job


def bench():
    spec = importlib.util.spec_from_file_location("bench", REPO / "tools" / "bench.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_naive_loop_samples_the_member_mix(tmp_path):
    b = bench()
    job = b.build_job(tmp_path, 100)
    from timbersheets.schedule.read import load_schedule

    members = load_schedule(job / "schedule.csv").members
    chosen = b.sample(members, b.NAIVE_SAMPLE)
    assert len(chosen) == b.NAIVE_SAMPLE < len(members)
    assert len({m.mark for m in chosen}) == len(chosen)
    assert len({m.type for m in chosen}) >= 3  # spread over the schedule, not its first rows
    assert sorted(m.mark for m in b.sample(members[:4], 6)) == sorted(m.mark for m in members[:4])


def test_sizing_line_says_when_there_is_nothing_to_size(tmp_path):
    job = write_job(tmp_path / "job", [member_row("C-1")])
    assert bench().sizing_times(job) == ["  sizing: no auto members"]
