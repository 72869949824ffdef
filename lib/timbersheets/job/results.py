"""results.json and summary.csv: the machine-readable outcome of a run.

The numbers are rounded by the same rule the sheets use (three significant
figures, forces to 0.1 kN; utilization rounded *up* to three decimals), so a
sheet and results.json never disagree.
"""

from __future__ import annotations

import math
from pathlib import Path
from typing import Any

from .. import __version__
from ..constants import UNIT_TEXT
from ..engineering.calc import round_sig
from ..engineering.checks import CheckResult
from ..engineering.design import MemberDesign
from ..errors import TimbersheetsError
from ..fileio import write_csv, write_json


def round_utilization(u: float) -> float:
    """Utilization to 0.001; a value over 1.0 never shows as 1.000 (1.0004 → 1.001)."""
    if not math.isfinite(u):
        return u
    shown = round(u, 3)
    return 1.001 if u > 1.0 and shown <= 1.0 else shown


def _num(value: float, unit: str) -> float:
    """Demand and resistance exactly as the sheet prints them (calc.format_number)."""
    return round_sig(value, unit, 3)


def check_json(c: CheckResult) -> dict[str, Any]:
    unit = UNIT_TEXT.get(c.unit, c.unit)
    return {
        "check": c.check,
        "combination": c.combination,
        "K_D": None if c.check.startswith("deflection") else round(c.K_D, 3),
        "demand": _num(c.demand, c.unit),
        "resistance": _num(c.resistance, c.unit),
        "unit": unit,
        "utilization": round_utilization(c.utilization),
        "clause": c.clause,
        "factors": {k: round_sig(v, "", 4) for k, v in c.factors.items()},
        **({"where": c.where} if c.where else {}),
    }


def reactions_json(d: MemberDesign) -> dict[str, dict[str, float]] | None:
    """Specified reactions per support (R1, R2, … from the left) by load type, kN; None without a design."""
    from ..engineering.beamdesign import reactions_by_type
    from ..engineering.loadpath import source_reactions

    if d.errors or d.member is None or d.context is None:
        return None
    try:
        reactions = source_reactions(d, reactions_by_type)
    except TimbersheetsError:
        return None
    return {f"R{j}": {t: round_sig(v / 1000, "kN", 4) for t, v in by_type.items()} for j, by_type in reactions.items()}


def governing_utilization(d: MemberDesign) -> float | None:
    """The member's governing utilization as results.json gives it (None for a member in error)."""
    gov = d.governing
    return round_utilization(gov.utilization) if gov and not d.errors else None


def chart_rows(designs: list[MemberDesign]) -> list[dict[str, Any]]:
    """What the summary chart reads of each member (mark, utilization, status), as member_json gives it."""
    return [{"mark": d.mark, "utilization": governing_utilization(d), "status": d.status} for d in designs]


def member_json(d: MemberDesign, extra: dict[str, Any] | None = None) -> dict[str, Any]:
    gov = d.governing
    doc: dict[str, Any] = {
        "mark": d.mark,
        "row": d.row,
        "type": d.member.type if d.member else None,
        "material": d.member.material if d.member else None,
        "status": d.status,
        "size": d.size,
        "inputs_hash": d.member.inputs_hash if d.member else None,
        "utilization": governing_utilization(d),
        "governing": ({"check": gov.check, "combination": gov.combination,
                       "K_D": None if gov.check.startswith("deflection") else round(gov.K_D, 3)}
                      if gov and not d.errors else None),
        "checks": [check_json(c) for c in d.checks] if not d.errors else [],
        "data_warnings": d.data_warnings,
        "data_corrections": d.data_corrections,
        "data": [v.record() for v in d.data_values],
        "warnings": d.warnings,
        "changed_since": None,
        "review": {"status": "not-checked"},
        "errors": d.errors,
        "inputs": d.member.params() if d.member else None,
        "reactions": reactions_json(d),
        "carried": d.member.params()["carried"] if d.member else [],
    }
    if d.sizing is not None:
        doc["sizing"] = d.sizing.to_json()
    if extra:
        doc.update(extra)
    return doc


def results_doc(job: str, revision: str, codes: dict[str, str], designs: list[MemberDesign],
                data_manifest: list[dict[str, str]], data_hash: str, warnings: list[str],
                extra: dict[str, dict[str, Any]] | None = None) -> dict[str, Any]:
    extra = extra or {}
    return {
        "job": job,
        "revision": revision,
        "tool_version": __version__,
        "codes": codes,
        "data": {"hash": data_hash, "files": data_manifest},
        "schedule_warnings": warnings,
        "members": [member_json(d, extra.get(d.mark)) for d in designs],
    }


SUMMARY_HEADER = ["mark", "type", "material", "size", "status", "utilization", "governing_check",
                  "governing_combination", "K_D", "data_warnings", "errors"]


def write_results(outdir: Path, doc: dict[str, Any]) -> None:
    """results.json and summary.csv, each written atomically."""
    write_json(outdir / "results.json", doc)
    rows = []
    for m in doc["members"]:
        gov = m["governing"] or {}
        rows.append([m["mark"], m["type"] or "", m["material"] or "", m["size"], m["status"],
                     "" if m["utilization"] is None else f"{m['utilization']:.3f}", gov.get("check", ""),
                     gov.get("combination", ""), "" if gov.get("K_D") is None else f"{gov['K_D']:.3f}",
                     len(m["data_warnings"]), " | ".join(m["errors"])])
    write_csv(outdir / "summary.csv", SUMMARY_HEADER, rows)
