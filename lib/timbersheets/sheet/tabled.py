"""Which checks of a sheet share one table of every combination.

A beam's strength checks (bending, shear, bearing) are made under the same combinations with the same
K_D, so one table, a row per combination, lists each check's effect, resistance and utilization side
by side: a checker reads across a row instead of paging between a table per check.
"""

from __future__ import annotations

from ..engineering.checks import CheckResult


def serviceability(c: CheckResult) -> bool:
    return c.check.startswith("deflection")


#: The most checks one table of every combination holds side by side (three columns each): more would
#: not fit the page's width at the sheet's type size.
SHARED_TABLE_CHECKS = 3


def shared_table_checks(cases: dict[str, list[CheckResult]]) -> list[str]:
    """The checks whose every-combination tables are one table: strength checks (not the interaction, whose
    limit is not a resistance, nor deflection) of one row per combination, with one K_D per combination.
    A check not made under some combination shows dashes there. Fewer than two such checks share nothing."""
    def fits(results: list[CheckResult]) -> bool:
        return (len(results) > 1 and not any(c.where for c in results) and not serviceability(results[0])
                and results[0].check != "interaction")

    names = [n for n, results in cases.items() if fits(results)
             and len({c.combination for c in results}) == len(results)]  # one row per combination
    kd: dict[str, float] = {}
    for name in names:
        for c in cases[name]:
            if kd.setdefault(c.combination, c.K_D) != c.K_D:
                return []  # K_D differs between checks of a combination: each check keeps its own table
    return names if len(names) > 1 else []


def interaction_joins(cases: dict[str, list[CheckResult]], shared: list[str]) -> bool:
    """The interaction of axial force and bending is one more column, its value, of the first shared table,
    when there is one and the interaction has one row per combination with the K_D the other checks have
    there (its limit, 1.0, is not a resistance: it takes no columns of its own)."""
    results = cases.get("interaction", [])
    if not shared or not results or any(c.where for c in results) \
            or len({c.combination for c in results}) != len(results):
        return False
    kd = {c.combination: c.K_D for name in shared for c in cases[name]}
    return all(kd.get(c.combination, c.K_D) == c.K_D for c in results)


def checks_by_name(design) -> dict[str, list[CheckResult]]:
    """A design's results grouped by check, in the order the sheet works the checks."""
    out: dict[str, list[CheckResult]] = {}
    for c in design.checks:
        out.setdefault(c.check, []).append(c)
    return out
