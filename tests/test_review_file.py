"""review.csv: hand edits read by header names, bad rows reported by row, concurrent
reviews never lost, formulas neutralised, the file's mode kept."""

import os
import subprocess
import sys
import time
from pathlib import Path

import pytest

from timbersheets.job.review import Review, append_reviews, latest, load_review_file

HEAD = "mark,checker,date,verdict,comment,inputs_hash,revision\n"
H0, H1 = "sha256:" + "0" * 64, "sha256:" + "1" * 64
LIB = Path(__file__).resolve().parent.parent / "lib"


def review(mark="C-1", verdict="ok", h=H0, checker="RD", comment=""):
    return Review(mark, checker, "2026-12-01", verdict, comment, h, "A")


def test_missing_final_newline_does_not_merge_the_next_review(tmp_path):
    (tmp_path / "review.csv").write_text(HEAD + f"C-1,RD,2026-12-01,ok,,{H0},A")
    append_reviews(tmp_path, [review("C-2", h=H1)])
    assert [r.mark for r in load_review_file(tmp_path).reviews] == ["C-1", "C-2"]


def test_reordered_columns_are_read_and_written_by_name(tmp_path):
    (tmp_path / "review.csv").write_text(f"verdict,inputs_hash,mark,checker,date,comment,revision\nok,{H0},C-1,RD,d,,A\n")
    append_reviews(tmp_path, [review("C-2", verdict="revise", h=H1)])
    got = {r.mark: r for r in load_review_file(tmp_path).reviews}
    assert got["C-1"].verdict == "ok" and got["C-1"].inputs_hash == H0
    assert got["C-2"].verdict == "revise" and got["C-2"].inputs_hash == H1


@pytest.mark.parametrize("verdict", ["rejected", "", "passed"])
def test_unknown_or_blank_verdict_is_reported_by_row_and_not_counted(tmp_path, verdict):
    (tmp_path / "review.csv").write_text(HEAD + f"C-1,RD,d,{verdict},,{H0},A\nC-2,RD,d,ok,,{H1},A\n")
    record = load_review_file(tmp_path)
    assert [r.mark for r in record.reviews] == ["C-2"]
    assert record.problems and record.problems[0].startswith("review.csv, row 2: column 'verdict'")


def test_verdict_case_is_not_a_new_word(tmp_path):
    (tmp_path / "review.csv").write_text(HEAD + f"C-1,RD,d,OK,,{H0},A\n")
    assert load_review_file(tmp_path).reviews[0].verdict == "ok"


def test_unclosed_quote_spoils_only_its_row(tmp_path):
    (tmp_path / "review.csv").write_text(HEAD + f'C-1,RD,d,ok,"oops,{H0},A\nC-2,RD,d,ok,,{H1},A\n')
    record = load_review_file(tmp_path)
    assert [r.mark for r in record.reviews] == ["C-2"] and "row 2" in record.problems[0]


def test_malformed_hash_is_reported(tmp_path):
    (tmp_path / "review.csv").write_text(HEAD + "C-1,RD,d,ok,,sha256:12ab,A\n")
    record = load_review_file(tmp_path)
    assert not record.reviews and "inputs_hash" in record.problems[0]


@pytest.mark.parametrize("encoding", ["latin-1", "utf-16"])
def test_latin1_and_utf16_files_are_read_and_appended_in_their_encoding(tmp_path, encoding):
    (tmp_path / "review.csv").write_bytes((HEAD + f"C-1,RD,d,ok,vérifié,{H0},A\n").encode(encoding))
    append_reviews(tmp_path, [review("C-2", h=H1, comment="révisé")])
    got = {r.mark: r for r in load_review_file(tmp_path).reviews}
    assert got["C-1"].comment == "vérifié" and got["C-2"].comment == "révisé"


def test_zero_byte_file_gets_a_header(tmp_path):
    (tmp_path / "review.csv").write_bytes(b"")
    assert load_review_file(tmp_path).reviews == []
    append_reviews(tmp_path, [review()])
    assert (tmp_path / "review.csv").read_text().startswith(HEAD)


def test_formula_in_checker_is_neutralised_and_plain_values_kept(tmp_path):
    append_reviews(tmp_path, [review("-1", checker="=cmd|' /C calc'!A0", comment="-5 kN")])
    text = (tmp_path / "review.csv").read_text()
    assert "'=cmd|' /C calc'!A0" in text and "\n-1," in text and ",-5 kN," in text


def test_appending_keeps_the_files_mode(tmp_path):
    path = tmp_path / "review.csv"
    path.write_text(HEAD)
    path.chmod(0o640)
    append_reviews(tmp_path, [review()])
    assert path.stat().st_mode & 0o777 == 0o640


WORKER = """
import sys, time
from pathlib import Path
from timbersheets.job.review import Review, append_reviews
folder, who, start = Path(sys.argv[1]), sys.argv[2], float(sys.argv[3])
while time.time() < start:
    time.sleep(0.001)
for i in range(10):
    append_reviews(folder, [Review(f"M-{who}-{i}", who, "2026-12-01", "ok", "", "sha256:" + "a" * 64, "A")])
"""


def test_six_simultaneous_reviewers_lose_nothing(tmp_path):
    env = {**os.environ, "PYTHONPATH": str(LIB)}
    start = time.time() + 3  # every process waits for the same instant
    procs = [subprocess.Popen([sys.executable, "-c", WORKER, str(tmp_path), str(n), str(start)], env=env)
             for n in range(6)]
    assert all(p.wait(timeout=60) == 0 for p in procs)
    record = load_review_file(tmp_path)
    assert not record.problems
    assert len(latest(record.reviews)) == 60
