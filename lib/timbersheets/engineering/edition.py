"""Which edition each method follows, and the clauses the 2019 edition is known to have revised.

The methods, clause numbers and tables of this version follow CSA O86-14 (the
data files name the edition per row). Where O86:19 is known to have revised a
clause that a member relies on, its sheet carries a visible note that the
earlier form is used and must be verified (``data/o86_revisions.csv``).
"""

from __future__ import annotations

import csv
from importlib import resources

EDITION = "O86-14"
#: The code editions a job may name in project.toml [codes]; the first is the default.
SUPPORTED_CODES = {"nbc": ("2020",), "o86": ("2019",)}


def revisions() -> list[dict[str, str]]:
    """The rows of data/o86_revisions.csv."""
    text = (resources.files("timbersheets") / "data" / "o86_revisions.csv").read_text(encoding="utf-8")
    return list(csv.DictReader(text.splitlines()))


def _applies(key: str, design) -> bool:
    """Whether the revision `key` concerns this member (its type, material, grade category, loads)."""
    m, ctx = design.member, design.context
    sawn = m.material == "sawn"
    checks = {c.check for c in design.checks}
    if key == "sawn-compression":
        return sawn and "compression" in checks
    if key == "sawn-K_H":
        return sawn and m.K_H != 1.0
    if key == "hem-fir-beam-stringer":
        return sawn and m.species == "Hem-Fir" and ctx is not None and ctx.strengths.category == "beam-stringer"
    if key == "notch":
        return m.net_area < 1.0 and "bending" in checks
    if key == "floor":
        return "bending" in checks and any(m.values.get(f"{e}_L") for e in ("w", "M", "V", "q", "P"))
    return False


def revision_notes(design) -> list[str]:
    """Notes for the sheet: every known O86:19 revision this member relies on, with the form used."""
    if design.member is None or design.errors:
        return []
    return [f"{row['topic']}: {row['note']} (form used: {row['earlier_form']}; {row['status']})"
            for row in revisions() if _applies(row["applies_to"], design)]
