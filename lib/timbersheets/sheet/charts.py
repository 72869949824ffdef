"""summary.png: members by utilization, with the 1.0 line (matplotlib, Agg)."""

from __future__ import annotations

import io
import math
import textwrap
from pathlib import Path
from typing import Any

from ..fileio import write_atomic

DETAIL_LIMIT = 40  # members drawn one bar each; above this the chart summarises
WORST = 20  # members named in a summary
MAX_TITLE = 180  # characters of the title drawn: two lines of the figure's width


def utilization_chart(members: list[dict[str, Any]], title: str) -> bytes:
    """A PNG of the members' governing utilizations, readable at any number of members.

    Up to DETAIL_LIMIT members: one bar each, highest first. Beyond: the distribution,
    the WORST highest by name, and every member that does not pass listed by mark.
    Only finite utilizations are drawn (a member in error has none); the title is
    plain text, never parsed as mathematics. Members that do not pass are hatched,
    so the chart reads without colour.
    """
    # a bare Figure on an Agg canvas, as the diagrams: no pyplot (0.2 s more to import), no global state
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    rows = sorted((m for m in members if _finite(m.get("utilization"))), key=lambda m: -m["utilization"])
    title = "".join(ch if ch.isprintable() else " " for ch in title[:MAX_TITLE + 1])
    title = title if len(title) <= MAX_TITLE else title[:MAX_TITLE - 3].rstrip() + "..."
    if len(rows) <= DETAIL_LIMIT:
        fig = Figure(figsize=(6.3, min(max(1.6, 0.22 * len(rows) + 0.9), 9.0)), dpi=150)
        FigureCanvasAgg(fig)
        ax = fig.subplots()
        _bars(ax, rows)
    else:
        fig = Figure(figsize=(6.3, 9.0), dpi=150)
        FigureCanvasAgg(fig)
        top, low = fig.subplots(2, 1, height_ratios=(1, 2.2))
        _distribution(top, rows)
        _bars(low, rows[:WORST], f"the {WORST} highest of {len(rows)} members")
        fails = [m["mark"] for m in rows if m["status"] != "pass"]
        if fails:
            shown = ", ".join(fails[:30]) + (f" and {len(fails) - 30} more" if len(fails) > 30 else "")
            fig.text(0.02, 0.005, textwrap.fill(f"do not pass ({len(fails)}): {shown}", 130), fontsize=6,
                     parse_math=False)
    fig.suptitle(textwrap.fill(title, 90), fontsize=8, parse_math=False)
    fig.tight_layout(rect=(0, 0.04, 1, 0.97))
    buffer = io.BytesIO()
    fig.savefig(buffer, format="png")
    return buffer.getvalue()


def _finite(value: Any) -> bool:
    return isinstance(value, (int, float)) and math.isfinite(value)


def _bars(ax, rows: list[dict[str, Any]], caption: str = "") -> None:
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
    ax.set_yticks(range(len(rows)), [str(m["mark"]) for m in rows], fontsize=6 if len(rows) > 30 else 7)
    for label in ax.get_yticklabels():
        label.set_parse_math(False)
    ax.invert_yaxis()
    ax.set_xlabel("governing utilization (demand / resistance)" + (f": {caption}" if caption else ""), fontsize=8)
    ax.set_xlim(0, max(1.2, max(values, default=1.0) * 1.05))
    ax.tick_params(axis="x", labelsize=7)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)


def _distribution(ax, rows: list[dict[str, Any]]) -> None:
    """How many members fall in each band of 0.1 utilization; bands over 1.0 hatched."""
    top = max(1.2, math.ceil(max(m["utilization"] for m in rows) * 10) / 10)
    edges = [i / 10 for i in range(int(round(top * 10)) + 1)]
    counts = [sum(lo <= m["utilization"] < hi or (hi == edges[-1] and m["utilization"] == hi) for m in rows)
              for lo, hi in zip(edges, edges[1:])]
    bars = ax.bar(edges[:-1], counts, width=0.1, align="edge", color="0.75", edgecolor="0.15", linewidth=0.6)
    for bar, lo in zip(bars, edges):
        if lo >= 1.0:
            bar.set_hatch("////")
            bar.set_facecolor("white")
    ax.axvline(1.0, color="black", linewidth=1.2)
    from matplotlib.ticker import MaxNLocator

    ax.yaxis.set_major_locator(MaxNLocator(integer=True))  # a count of members: no 2.5 on the axis
    ax.set_ylabel("members", fontsize=8)
    ax.set_xlabel(f"governing utilization of all {len(rows)} members, in bands of 0.1", fontsize=8)
    ax.tick_params(labelsize=7)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)


def _chart_key(members: list[dict[str, Any]], title: str) -> str:
    import hashlib
    import json

    return hashlib.sha256(json.dumps([title, [(m["mark"], m.get("utilization"), m["status"]) for m in members]])
                          .encode()).hexdigest()


def chart_in(cache: Path, members: list[dict[str, Any]], title: str) -> Path:
    """Where the cache keeps the chart of these members under this title (named by what it shows)."""
    return cache.absolute() / f"chart-{_chart_key(members, title)}.png"


def write_chart(path: Path, members: list[dict[str, Any]], title: str, cache: Path | None = None) -> Path:
    """Write the chart; an identical chart drawn before (or ahead, see `draw_ahead`) is taken from
    `cache`. Returns the cache's copy (or `path` without a cache)."""
    cached = chart_in(cache, members, title) if cache else None
    if cached is not None and cached.exists():
        write_atomic(path, cached.read_bytes())
        return cached
    png = utilization_chart(members, title)
    if cached is not None:
        write_atomic(cached, png)
    write_atomic(path, png)
    return cached or path


def draw_ahead(members: list[dict[str, Any]], title: str, cache: Path):
    """Draw the chart into `cache` in a thread, from the members as designed; returns the thread.

    The run draws it while its sheets are made (its process mostly waits on kernels and TeX
    then), and `write_chart` afterwards takes it from the cache when the members' results are
    the same; a member whose sheet ended in error changes the chart, which is then drawn again."""
    import threading

    cached = chart_in(cache, members, title)  # absolute: papermill changes this process's folder meanwhile

    def draw() -> None:
        if not cached.exists():
            try:
                write_atomic(cached, utilization_chart(members, title))
            except Exception:  # noqa: BLE001 - only a head start: write_chart draws it and reports
                pass

    thread = threading.Thread(target=draw, name="chart", daemon=True)
    thread.start()
    return thread
