"""Beams in the schedule: geometry and load cells, pattern loading through the design, and load paths
(`carries`) from roof beam to girder to column, with reruns that follow the path."""

from __future__ import annotations

import json

import pytest

from conftest import write_job, write_schedule
from timbersheets.engineering.loadpath import design_all
from timbersheets.job.revisions import diff, format_diff
from timbersheets.run.runner import run_job
from timbersheets.schedule.read import load_schedule

# The hand calculations take the dead loads as given (own weight included): self_weight = no.
JOIST = {"type": "bending", "material": "sawn", "species": "S-P-F", "grade": "No.1/No.2", "size": "38x235",
         "Lu": "0", "bearing": "38", "self_weight": "no"}
GLULAM = {"type": "bending", "material": "glulam", "species": "D.Fir-L", "grade": "24f-E", "Lu": "0",
          "bearing": "140", "self_weight": "no"}
POST = {"type": "compression", "material": "sawn", "species": "D.Fir-L", "grade": "No.1", "size": "140x140",
        "length": "3.0", "self_weight": "no"}


def designs(tmp_path, rows, data):
    schedule = load_schedule(write_schedule(tmp_path, rows))
    return {d.mark: d for d in design_all(schedule.entries, data)}


def test_point_load_in_kips_at_feet_equals_the_si_entry(tmp_path, data):
    # units: 2.7 kip = 2.7 × 4.4482216 kN = 12.010198 kN; 8 ft = 2.4384 m (exact definitions of the units)
    rows = [{"mark": "H-1", **JOIST, "plies": "2", "length": "3.6", "w_D": "0.5", "point_L": "2.7 kip@8 ft"},
            {"mark": "H-2", **JOIST, "plies": "2", "length": "3.6", "w_D": "0.5", "point_L": "12.010198@2.4384"}]
    d = designs(tmp_path, rows, data)
    a, b = d["H-1"].member.values["point_L"], d["H-2"].member.values["point_L"]
    assert a[0][0] == pytest.approx(b[0][0], rel=1e-6) and a[0][1] == pytest.approx(b[0][1], rel=1e-9)
    ga, gb = d["H-1"].governing_by_check()["bending"], d["H-2"].governing_by_check()["bending"]
    assert ga.demand == pytest.approx(gb.demand, rel=1e-4)


def test_area_load_times_tributary_width_is_the_line_load(tmp_path, data):
    # w = q × trib: 1.9 kPa × 0.4 m = 0.76 kN/m (hand calculation)
    rows = [{"mark": "J-1", **JOIST, "length": "3.6", "q_L": "1.9", "trib": "0.4"},
            {"mark": "J-2", **JOIST, "length": "3.6", "w_L": "0.76"}]
    d = designs(tmp_path, rows, data)
    assert d["J-1"].member.w_L == pytest.approx(0.76)
    assert d["J-1"].governing.demand == pytest.approx(d["J-2"].governing.demand)


def test_two_span_joist_one_span_live_arrangement_governs_positive_moment(tmp_path, data):
    # AISC Table 3-23, two equal spans: +M with both spans loaded 0.0703 wL², one span loaded 0.0957 wL².
    # 1.25D + 1.5L, D = 0.2, L = 0.76 kN/m, L = 3.6 m: +M = 0.0703 × 1.25 × 0.2 × 3.6² + 0.0957 × 1.5 × 0.76 × 3.6²
    # = 0.228 + 1.414 = 1.642 kN·m (hand calculation; the two maxima are at 0.375 L and 0.4375 L, so the
    # true peak is a little below this sum; within 1 %)
    rows = [{"mark": "J-1", **JOIST, "spans": "3.6+3.6", "w_D": "0.2", "w_L": "0.76"}]
    d = designs(tmp_path, rows, data)["J-1"]
    positive = [c for c in d.checks if c.check == "bending" and c.combination == "1.25D + 1.5L" and c.demand > 0]
    span1 = next(c for c in positive if c.where.startswith("span 1"))
    assert span1.where.endswith("L on span 1")
    assert span1.demand == pytest.approx(1.642, rel=0.01)
    negative = [c for c in d.checks if c.check == "bending" and c.combination == "1.25D + 1.5L" and c.demand < 0]
    # support moment with both spans loaded: -wL²/8 = -(1.25 × 0.2 + 1.5 × 0.76) × 3.6² / 8 = -2.252 kN·m
    assert negative[0].demand == pytest.approx(-2.252, rel=0.005) and negative[0].where.endswith("L on all spans")
    live = [c for c in d.checks if c.check == "deflection-live"]
    assert {c.where.split(",")[0] for c in live} == {"span 1", "span 2"}


def test_overhang_tip_deflection_limit_is_twice_its_length(tmp_path, data):
    # common practice (and the schedule contract): an overhang's limit is 2 × overhang / n: 2 × 1.5 m / 180 = 16.7 mm
    rows = [{"mark": "CB-1", **GLULAM, "size": "130x304", "spans": "4.0", "overhang_right": "1.5", "Lu": "4",
             "w_D": "2", "w_S": "4", "defl_L": "180"}]
    d = designs(tmp_path, rows, data)["CB-1"]
    tip = next(c for c in d.checks if c.check == "deflection-live" and c.where.startswith("right overhang"))
    assert tip.resistance == pytest.approx(2 * 1500 / 180, rel=1e-3)
    assert d.member.length == pytest.approx(5500)


BAD = [
    ("point-outside", {"mark": "B-1", **JOIST, "length": "3.6", "point_L": "5@4.0"}, "point_L", "beyond"),
    ("negative-span", {"mark": "B-1", **JOIST, "spans": "3.6+-2"}, "spans", "greater than 0"),
    ("spans-on-a-column", {"mark": "B-1", **POST, "P_D": "10", "spans": "3+3"}, "spans", "does not apply to a compression member"),
    ("carries-missing", {"mark": "B-1", **POST, "P_D": "10", "carries": "RB-9.R1"}, "carries", "'RB-9'"),
    ("area-load-without-trib", {"mark": "B-1", **JOIST, "length": "3.6", "q_L": "1.9"}, "q_L", "tributary"),
    ("part-backwards", {"mark": "B-1", **JOIST, "length": "3.6", "part_L": "2@3-1"}, "part_L", "larger end"),
    ("point-without-position", {"mark": "B-1", **JOIST, "length": "3.6", "point_D": "5"}, "point_D",
     "value@position"),
    ("point-bad-unit", {"mark": "B-1", **JOIST, "length": "3.6", "point_D": "5 kN@2 kPa"}, "point_D", "not a length"),
    ("length-disagrees", {"mark": "B-1", **JOIST, "length": "7", "spans": "3.6+3.6"}, "length", "7.2 m"),
    ("carries-position-on-column", {"mark": "B-1", **POST, "P_D": "10", "carries": "OK-1.R1@2"}, "carries",
     "axial force"),
    ("carries-beam-without-position", {"mark": "B-1", **JOIST, "length": "3.6", "carries": "OK-1.R1"}, "carries",
     "position"),
    ("carries-no-such-support", {"mark": "B-1", **POST, "P_D": "10", "carries": "OK-1.R3"}, "carries",
     "OK-1 has 2 support(s)"),
]


@pytest.mark.parametrize("rows,column,words", [b[1:] for b in BAD], ids=[b[0] for b in BAD])
def test_bad_beam_cells_are_row_errors_and_others_run(tmp_path, rows, column, words):
    good = {"mark": "OK-1", **JOIST, "length": "3.6", "w_D": "0.3", "w_L": "0.5"}
    job = write_job(tmp_path / "job", [good, rows])
    report = run_job(job, out=tmp_path / "out", sheets=False)
    by_mark = {d.mark: d for d in report.designs}
    message = by_mark["B-1"].errors[0]
    assert "schedule.csv, row 3" in message and f"column '{column}'" in message and words in message, message
    assert by_mark["OK-1"].status == "pass"


def test_cycle_is_an_error_naming_both_marks(tmp_path, data):
    rows = [{"mark": "A", **GLULAM, "size": "130x304", "length": "4", "w_D": "1", "carries": "B.R1@2"},
            {"mark": "B", **GLULAM, "size": "130x304", "length": "4", "w_D": "1", "carries": "A.R1@2"},
            {"mark": "OK-1", **JOIST, "length": "3.6", "w_D": "0.3"}]
    d = designs(tmp_path, rows, data)
    for mark in ("A", "B"):
        assert d[mark].status == "error"
        assert "A carries B carries A" in d[mark].errors[0] or "B carries A carries B" in d[mark].errors[0]
    assert d["OK-1"].status == "pass"


CHAIN = [
    {"mark": "RB-1", **GLULAM, "size": "130x304", "length": "6.0", "w_D": "1.2", "w_S": "3.0"},
    {"mark": "G-1", **GLULAM, "size": "175x456", "length": "7.2", "w_D": "0.8", "carries": "RB-1.R2@3.6"},
    {"mark": "C-1", **POST, "carries": "G-1.R1"},
    {"mark": "X-1", **JOIST, "length": "3.6", "w_D": "0.3", "w_L": "0.8"},
]


def test_reactions_flow_from_roof_beam_to_girder_to_column(tmp_path, data):
    # hand calculation: RB-1 simple span 6 m: R = wL/2, D 1.2 × 3 = 3.6 kN, S 3.0 × 3 = 9.0 kN.
    # G-1 (7.2 m) takes them at midspan: R1 = P/2 + w L/2: D 1.8 + 0.8 × 3.6 = 4.68 kN, S 4.5 kN. C-1 takes G-1.R1.
    d = designs(tmp_path, CHAIN, data)
    (carried,) = d["G-1"].member.values["carried"]
    assert (carried.source, carried.reaction, carried.at) == ("RB-1", 2, 3600.0)
    assert carried.loads["D"] == pytest.approx(3600.0) and carried.loads["S"] == pytest.approx(9000.0)
    (post,) = d["C-1"].member.values["carried"]
    assert post.loads["D"] == pytest.approx(4680.0) and post.loads["S"] == pytest.approx(4500.0)
    # the column combines them under its own combinations: 1.25D + 1.5S = 1.25 × 4.68 + 1.5 × 4.5 = 12.6 kN
    gov = d["C-1"].governing
    assert gov.combination == "1.25D + 1.5S" and gov.demand == pytest.approx(12.6, rel=1e-3)


def test_results_list_reactions_and_carried(tmp_path):
    job = write_job(tmp_path / "job", CHAIN)
    run_job(job, out=tmp_path / "out", sheets=False)
    doc = json.loads((tmp_path / "out" / "rev-A" / "results.json").read_text())
    members = {m["mark"]: m for m in doc["members"]}
    assert members["RB-1"]["reactions"]["R2"]["S"] == pytest.approx(9.0)
    assert members["G-1"]["carried"][0]["from"] == "RB-1" and members["G-1"]["carried"][0]["reaction"] == 2


def test_a_change_follows_the_load_path(tmp_path):
    job = write_job(tmp_path / "job", CHAIN)
    run_job(job, out=tmp_path / "out", sheets=False)
    changed = [dict(r) for r in CHAIN]
    changed[0]["w_S"] = "3.6"
    write_job(tmp_path / "job", changed, revision="B")
    report = run_job(job, out=tmp_path / "out", sheets=False)
    doc = json.loads((tmp_path / "out" / "rev-B" / "results.json").read_text())
    since = {m["mark"]: m["changed_since"] for m in doc["members"]}
    assert since == {"RB-1": "A", "G-1": "A", "C-1": "A", "X-1": None}
    old = json.loads((tmp_path / "out" / "rev-A" / "results.json").read_text())
    text = format_diff(diff(old, doc), "A", "B")
    assert "G-1: changed because RB-1 changed" in text and "C-1: changed because G-1 changed" in text
    assert "X-1" not in text
    assert report.exit_code in (0, 1)


def test_beam_model_refuses_frame_forces_as_well(tmp_path, data):
    # common practice: a member's forces come from one analysis; mixing a frame model's M with a beam model is refused
    rows = [{"mark": "B-1", **JOIST, "spans": "3+3", "w_D": "0.5", "M_D": "2", "V_D": "3"}]
    d = designs(tmp_path, rows, data)["B-1"]
    assert d.status == "error" and "M_D" in d.errors[0] and "V_D" in d.errors[0]


def test_review_turns_stale_when_carried_loads_change(tmp_path):
    from timbersheets.job.review import Review, append_reviews

    job = write_job(tmp_path / "job", CHAIN)
    run_job(job, out=tmp_path / "out", sheets=False)
    checked = {m["mark"]: m for m in json.loads((tmp_path / "out" / "rev-A" / "results.json").read_text())["members"]}
    append_reviews(job, [Review("G-1", "RD", "2026-12-01", "ok", "", checked["G-1"]["inputs_hash"], "A")])
    changed = [dict(r) for r in CHAIN]
    changed[0]["w_S"] = "3.6"  # the roof beam, not the girder
    write_job(tmp_path / "job", changed, revision="B")
    run_job(job, out=tmp_path / "out", sheets=False)
    doc = json.loads((tmp_path / "out" / "rev-B" / "results.json").read_text())
    review = {m["mark"]: m["review"]["status"] for m in doc["members"]}
    assert review["G-1"] == "stale"


def test_what_if_scales_point_loads_and_follows_the_path(tmp_path):
    from timbersheets.run.whatif import what_if

    rows = [*CHAIN, {"mark": "H-1", **JOIST, "plies": "2", "length": "2.4", "w_D": "0.5", "point_S": "6@1.2"}]
    job = write_job(tmp_path / "job", rows)
    out = {w.mark: w for w in what_if(job, {"S": 2.0})}
    # hand calculation: with S doubled, C-1 takes G-1.R1 = D 4.68, S 9.0 kN: 1.25 × 4.68 + 1.5 × 9.0 = 19.35 kN
    assert out["C-1"].after.governing.demand == pytest.approx(19.35, rel=1e-3)
    # H-1: M under the point at midspan, PL/4: S part 1.5 × 12 × 2.4 / 4 = 10.8 kN·m, D 1.25 × 0.5 × 2.4² / 8 = 0.45
    assert out["H-1"].after.governing_by_check()["bending"].demand == pytest.approx(11.25, rel=1e-3)


def test_review_command_accepts_a_member_that_carries_others(tmp_path):
    # the review ties to the inputs as the run hashed them, carried reactions included
    from timbersheets.cli import main

    job = write_job(tmp_path / "job", CHAIN)
    run_job(job, out=tmp_path / "out", sheets=False)
    code = main(["review", str(job), "--mark", "G-1", "--by", "RD", "--verdict", "ok", "--out", str(tmp_path / "out")])
    assert code == 0
    assert "G-1,RD" in (job / "review.csv").read_text()


def test_purlins_hold_the_top_edge_only(tmp_path, data):
    # common practice: purlins or decking on top hold the compression edge of positive moment; under the negative
    # moment over a support the bottom edge is in compression and K_L is computed from its unsupported length
    rows = [{"mark": "B-1", **JOIST, "size": "38x184", "spans": "3.0", "overhang_right": "1.0", "Lu": "0.6",
             "restraint": "purlins", "w_D": "0.5", "w_S": "1.5"}]
    d = designs(tmp_path, rows, data)["B-1"]
    bending = [c for c in d.checks if c.check == "bending"]
    positive = next(c for c in bending if c.demand > 0)
    negative = next(c for c in bending if c.demand < 0)
    assert positive.factors["K_L"] == 1.0 and "C_B" not in positive.factors
    # bottom edge unsupported between supports and to the tip: over the support, the longer of span and overhang
    assert "C_B" in negative.factors and negative.factors["L_u"] == 3000.0  # the longer side of the support


def test_package_change_list_names_the_cause():
    # the package's "changes since" table carries the same cause as the diff
    from timbersheets.build.package import change_rows
    from timbersheets.job.revisions import MemberChange

    change = MemberChange("G-1", "changed", inputs=[("carried", "RB-1.R2: S 9 kN", "RB-1.R2: S 10.8 kN")],
                          because=["RB-1"])
    rows = change_rows([change])
    assert rows[0]["what"] == "because" and rows[0]["new"] == "RB-1 changed" and rows[1]["item"] == "carried"


def test_overhang_with_length_equals_spans_with_overhang(tmp_path, data):
    # the schedule contract: length is the whole member, overhangs included; span = 5.5 - 1.5 = 4.0 m
    base = {**GLULAM, "size": "130x304", "Lu": "4", "w_D": "2", "w_S": "4"}
    rows = [{"mark": "A-1", **base, "length": "5.5", "overhang_right": "1.5"},
            {"mark": "A-2", **base, "spans": "4.0", "overhang_right": "1.5"}]
    d = designs(tmp_path, rows, data)
    assert d["A-1"].member.values["spans"] == (4000.0,)
    a, b = d["A-1"].governing, d["A-2"].governing
    assert (a.check, a.combination, a.demand) == (b.check, b.combination, b.demand)


def test_the_members_a_review_names_hash_as_in_the_whole_job():
    """A review checks that a member's inputs (with the loads it carries) are those of the last run;
    it designs only the named members and what they carry, and must get the same inputs hash as the
    design of the whole job, for a member that carries others and for one that does not."""
    from conftest import DEMO
    from timbersheets.job.load import load_job

    whole = load_job(DEMO).members()
    carrying = [m for m, member in whole.items() if member.values.get("carries")]
    assert carrying  # the demo hands loads down its load path
    for mark in carrying + ["T-1"]:
        assert load_job(DEMO).members([mark])[mark].inputs_hash == whole[mark].inputs_hash, mark
    both = load_job(DEMO).members([carrying[0], "T-1"])
    assert sorted(both) == sorted([carrying[0], "T-1"])
