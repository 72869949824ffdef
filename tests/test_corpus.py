"""The malformed-input corpus (tests/corpus.py): every case obeys every rule.

No traceback, exit status 0, 1 or 2, a message naming file and row (and column),
every good row designed, strict JSON, no .part file, nothing written outside the
outputs. `python tests/corpus.py` prints the counts.
"""

import pytest

from corpus import all_cases, run_case

CASES = all_cases()


def test_the_corpus_is_a_few_hundred_cases():
    assert len(CASES) >= 300
    assert len({c.name for c in CASES}) == len(CASES)


@pytest.mark.parametrize("case", CASES, ids=[c.name for c in CASES])
def test_case_obeys_every_rule(tmp_path, case):
    broken = run_case(case, tmp_path)
    assert not broken, "; ".join(broken)
