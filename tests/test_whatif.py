"""What-if (`run --scale`): the members as sized, unless --resize asks for new sections."""

from __future__ import annotations

import pytest

from conftest import member_row, write_job
from timbersheets.cli import main
from timbersheets.run.whatif import what_if

# A sawn tie sized by the tool; snow governs, and K_D = 1.0 both before and after
# (P_D < P_S: O86 5.3.2.3 gives K_D = 1.0 for the standard term).
TIE = member_row("T-9", type="tension", size="auto", P_D="10", P_S="20")


def test_scale_keeps_the_sections_of_the_scheduled_loads(tmp_path, capsys):
    job = write_job(tmp_path / "job", [TIE, member_row("C-1")])
    (row,) = [r for r in what_if(job, {"S": 1.5}) if r.mark == "T-9"]
    assert row.auto and row.after.size == row.before.size
    # Hand calculation: same section and K_D, so utilization scales with T_f:
    # T_f before = 1.25·10 + 1.5·20 = 42.5 kN; after = 1.25·10 + 1.5·30 = 57.5 kN; ratio 57.5 / 42.5.
    assert row.after.governing.utilization == pytest.approx(row.before.governing.utilization * 57.5 / 42.5,
                                                            rel=1e-9)
    main(["run", str(job), "--scale", "S=1.5"])
    printed = capsys.readouterr().out
    assert f"auto members keep the sections sized for the scheduled loads (--resize sizes them again): " \
           f"T-9 {row.before.size}" in printed


def test_resize_shows_the_new_sections(tmp_path, capsys):
    job = write_job(tmp_path / "job", [TIE])
    (kept,) = what_if(job, {"S": 3.0})
    (resized,) = what_if(job, {"S": 3.0}, resize=True)
    assert kept.after.status == "fail"  # 1.25·10 + 1.5·60 = 102.5 kN on the section sized for 42.5 kN
    assert resized.after.status == "pass" and resized.resized
    assert resized.after.context.section.A > resized.before.context.section.A
    main(["run", str(job), "--scale", "S=3", "--resize"])
    printed = capsys.readouterr().out
    assert f"T-9 {resized.before.size} -> {resized.after.size}" in printed
    assert f"section {resized.before.size} -> {resized.after.size}" in printed


def test_resize_without_scale_is_refused(tmp_path, capsys):
    job = write_job(tmp_path / "job", [TIE])
    assert main(["run", str(job), "--resize", "--no-pdf", "--out", str(tmp_path / "out")]) == 2
    assert "--scale" in capsys.readouterr().err
