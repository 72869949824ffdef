"""summary.png: members by utilization, with the 1.0 line (matplotlib, Agg)."""

from __future__ import annotations

import io
from pathlib import Path
from typing import Any

from .fileio import write_atomic


def utilization_chart(members: list[dict[str, Any]], title: str) -> bytes:
    """A PNG of every designed member's governing utilization, highest first.

    Members that do not pass are hatched, so the chart reads without colour.
    """
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib import pyplot as plt

    rows = sorted((m for m in members if m.get("utilization") is not None), key=lambda m: -m["utilization"])
    height = max(1.6, 0.22 * len(rows) + 0.9)
    fig, ax = plt.subplots(figsize=(6.3, min(height, 9.0)), dpi=150)
    marks = [m["mark"] for m in rows]
    values = [m["utilization"] for m in rows]
    bars = ax.barh(range(len(rows)), values, color="0.75", edgecolor="0.15", linewidth=0.6)
    for bar, m in zip(bars, rows):
        if m["status"] != "pass":
            bar.set_hatch("////")
            bar.set_facecolor("white")
    ax.axvline(1.0, color="black", linewidth=1.2)
    # x in data units, y in axes units: the label sits at the top of the 1.0 line however many rows there
    # are (at a data y above the rows, it fell outside the axes when no member had a utilization)
    ax.text(1.0, 1.0, " 1.0", transform=ax.get_xaxis_transform(), va="bottom", ha="left", fontsize=7)
    ax.set_yticks(range(len(rows)), marks, fontsize=6 if len(rows) > 30 else 7)
    ax.invert_yaxis()
    ax.set_xlabel("governing utilization (demand / resistance)", fontsize=8)
    ax.set_xlim(0, max(1.2, max(values, default=1.0) * 1.05))
    ax.tick_params(axis="x", labelsize=7)
    ax.set_title(title, fontsize=9)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    fig.tight_layout()
    buffer = io.BytesIO()
    fig.savefig(buffer, format="png")
    plt.close(fig)
    return buffer.getvalue()


def write_chart(path: Path, members: list[dict[str, Any]], title: str, cache: Path | None = None) -> None:
    """Write the chart; an identical chart drawn before is taken from `cache`."""
    import hashlib
    import json

    key = hashlib.sha256(json.dumps([title, [(m["mark"], m.get("utilization"), m["status"]) for m in members]])
                         .encode()).hexdigest()
    cached = cache / f"chart-{key}.png" if cache else None
    if cached is not None and cached.exists():
        write_atomic(path, cached.read_bytes())
        return
    png = utilization_chart(members, title)
    if cached is not None:
        write_atomic(cached, png)
    write_atomic(path, png)
