"""The malformed-input corpus (tests/corpus.py): every case obeys every rule.

No traceback, exit status 0, 1 or 2, a message naming file and row (and column),
every good row designed, strict JSON, no .part file, nothing written outside the
outputs. `python tests/corpus.py` prints the counts.
"""

import tempfile
from pathlib import Path

import pytest

from corpus import GOOD, HEADER, all_cases, csv_text, run_case
from timbersheets.schedule.read import load_schedule

pytestmark = pytest.mark.corpus  # make test runs it; make check leaves it out to stay fast

CASES = all_cases()


def k_d_bounded() -> bool:
    """Whether the K_D override is bounded yet (0.65 to 1.15 comes with the K_D rules, another change)."""
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "schedule.csv"
        path.write_text(csv_text([[*GOOD["G-1"], "10"]], [*HEADER, "K_D"]))
        return bool(load_schedule(path).rejected)


PENDING = {"cell-K_D=10", "cell-K_D=1e308", "cell-K_D=0.01"} if not k_d_bounded() else set()


def marks(case):
    if case.name in PENDING:
        return [pytest.mark.xfail(strict=True, reason="the K_D override bounds are not on this branch yet")]
    return []


def test_the_corpus_is_a_few_hundred_cases():
    assert len(CASES) >= 300
    assert len({c.name for c in CASES}) == len(CASES)


@pytest.mark.parametrize("case", [pytest.param(c, marks=marks(c)) for c in CASES], ids=[c.name for c in CASES])
def test_case_obeys_every_rule(tmp_path, case):
    broken = run_case(case, tmp_path)
    assert not broken, "; ".join(broken)
