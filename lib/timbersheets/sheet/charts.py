"""summary.png: members by utilization, with the 1.0 line (drawn with Pillow).

Drawn directly with Pillow, not matplotlib: importing matplotlib and laying out a figure cost about
1 s of the run's own process for one picture (measured on a 2-core machine: 0.6 s import, 0.4 s
drawing), which every run that changes a result paid; the bars, axes and labels below take ~50 ms.
The font is the DejaVu Sans that matplotlib ships (found, not imported); the sheets' diagrams are
drawn the same way (`diagrams.py`).
"""

from __future__ import annotations

import io
import math
import textwrap
from functools import lru_cache
from pathlib import Path
from typing import Any

from ..fileio import write_atomic

DETAIL_LIMIT = 40  # members drawn one bar each; above this the chart summarises
WORST = 20  # members named in a summary
MAX_TITLE = 180  # characters of the title drawn: two lines of the figure's width
DPI = 150
WIDTH = round(6.3 * DPI)  # px: 6.3 in, the width of a page's text
GREY, EDGE, HATCH_STEP = 191, 38, 9  # bar fill, bar edge (grey levels), px between hatch lines


def _px(points: float) -> int:
    """A length in typographic points, in pixels at DPI."""
    return round(points * DPI / 72)


@lru_cache(maxsize=8)
def _font(points: float):
    from PIL import ImageFont

    from .diagrams import bundled_font

    path = bundled_font("DejaVuSans.ttf")
    return ImageFont.truetype(path, _px(points)) if path else ImageFont.load_default(_px(points))


def utilization_chart(members: list[dict[str, Any]], title: str) -> bytes:
    """A PNG of the members' governing utilizations, readable at any number of members.

    Up to DETAIL_LIMIT members: one bar each, highest first. Beyond: the distribution,
    the WORST highest by name, and every member that does not pass listed by mark.
    Only finite utilizations are drawn (a member in error has none); the title is
    plain text. Members that do not pass are hatched, so the chart reads without colour.
    """
    from PIL import Image, ImageDraw

    rows = sorted((m for m in members if _finite(m.get("utilization"))), key=lambda m: -m["utilization"])
    title = "".join(ch if ch.isprintable() else " " for ch in title[:MAX_TITLE + 1])
    title = title if len(title) <= MAX_TITLE else title[:MAX_TITLE - 3].rstrip() + "..."
    detail = len(rows) <= DETAIL_LIMIT
    height = round((min(max(1.6, 0.22 * len(rows) + 0.9), 9.0) if detail else 9.0) * DPI)
    image = Image.new("L", (WIDTH, height), "white")  # grey levels only: a third of an RGB PNG to make
    draw = ImageDraw.Draw(image)
    top = 12
    for line in textwrap.wrap(title, 90) or [""]:
        draw.text((WIDTH / 2, top), line, fill="black", font=_font(8), anchor="mt")
        top += _px(8) + 4
    top += 12
    if detail:
        _bars(image, draw, (0, top, WIDTH, height - 4), rows)
    else:
        foot = _px(6) * 2 + 14
        split = top + round((height - top - foot) / 3.2)
        _distribution(image, draw, (0, top, WIDTH, split - 10), rows)
        _bars(image, draw, (0, split + 20, WIDTH, height - foot), rows[:WORST], f"the {WORST} highest of {len(rows)} members")
        fails = [m["mark"] for m in rows if m["status"] != "pass"]
        if fails:
            shown = ", ".join(fails[:30]) + (f" and {len(fails) - 30} more" if len(fails) > 30 else "")
            y = height - foot + 6
            for line in textwrap.wrap(f"do not pass ({len(fails)}): {shown}", 130)[:2]:
                draw.text((18, y), line, fill="black", font=_font(6))
                y += _px(6) + 3
    buffer = io.BytesIO()
    image.save(buffer, format="PNG", dpi=(DPI, DPI))
    return buffer.getvalue()


def _finite(value: Any) -> bool:
    return isinstance(value, (int, float)) and math.isfinite(value)


def _ticks(low: float, high: float, most: int = 10) -> list[float]:
    """Round tick values from `low` to `high`, at most `most` of them (the diagrams' rule)."""
    from .diagrams import ticks

    return ticks(low, high, most)[0]


def _tick_text(value: float) -> str:
    return f"{value:g}" if value != int(value) else f"{int(value)}"


def _bar(image, box: tuple[float, float, float, float], hatched: bool) -> None:
    """A bar with a dark edge: grey, or white with diagonal hatching (a member that does not pass)."""
    from PIL import Image, ImageDraw

    x0, y0, x1, y1 = (round(v) for v in box)
    if x1 - x0 < 1 or y1 - y0 < 1:
        return
    tile = Image.new("L", (x1 - x0 + 1, y1 - y0 + 1), "white" if hatched else GREY)
    pen = ImageDraw.Draw(tile)
    w, h = tile.size
    if hatched:
        for k in range(-h, w, HATCH_STEP):
            pen.line([(k, h), (k + h, 0)], fill=EDGE, width=1)
    pen.rectangle([0, 0, w - 1, h - 1], outline=EDGE, width=1)
    image.paste(tile, (x0, y0))


def _x_axis(draw, left: float, right: float, bottom: float, ticks: list[float], scale, label: str) -> None:
    draw.line([(left, bottom), (right, bottom)], fill="black", width=1)
    for value in ticks:
        x = scale(value)
        draw.line([(x, bottom), (x, bottom + 5)], fill="black", width=1)
        draw.text((x, bottom + 8), _tick_text(value), fill="black", font=_font(7), anchor="mt")
    draw.text(((left + right) / 2, bottom + 12 + _px(7)), label, fill="black", font=_font(8), anchor="mt")


def _bars(image, draw, box: tuple[int, int, int, int], rows: list[dict[str, Any]], caption: str = "") -> None:
    """One horizontal bar a member, highest first, in `box`; the 1.0 line drawn across."""
    x0, y0, x1, y1 = box
    marks = [str(m["mark"]) for m in rows]
    font = _font(6 if len(rows) > 30 else 7)
    left = x0 + 18 + max((draw.textlength(m, font=font) for m in marks), default=0) + 10
    right, top, bottom = x1 - 25, y0 + _px(7) + 6, y1 - (_px(7) + _px(8) + 24)
    values = [m["utilization"] for m in rows]
    high = max(1.2, max(values, default=1.0) * 1.05)

    def scale(v: float) -> float:
        return left + (right - left) * v / high

    step = (bottom - top) / max(len(rows), 1)
    for i, (m, v) in enumerate(zip(rows, values)):
        mid = top + step * (i + 0.5)
        _bar(image, (left, mid - 0.4 * step, scale(v), mid + 0.4 * step), m["status"] != "pass")
        draw.line([(left - 5, mid), (left, mid)], fill="black", width=1)
        draw.text((left - 8, mid), marks[i], fill="black", font=font, anchor="rm")
    draw.line([(left, top - 6), (left, bottom)], fill="black", width=1)
    one = scale(1.0)
    draw.line([(one, top - 6), (one, bottom)], fill="black", width=3)
    draw.text((one + 4, top - 8), "1.0", fill="black", font=_font(7), anchor="lb")
    _x_axis(draw, left, right, bottom, _ticks(0.0, high), scale,
            "governing utilization (demand / resistance)" + (f": {caption}" if caption else ""))


def _distribution(image, draw, box: tuple[int, int, int, int], rows: list[dict[str, Any]]) -> None:
    """How many members fall in each band of 0.1 utilization; bands over 1.0 hatched."""
    x0, y0, x1, y1 = box
    high = max(1.2, math.ceil(max(m["utilization"] for m in rows) * 10) / 10)
    edges = [i / 10 for i in range(int(round(high * 10)) + 1)]
    counts = [sum(lo <= m["utilization"] < hi or (hi == edges[-1] and m["utilization"] == hi) for m in rows)
              for lo, hi in zip(edges, edges[1:])]
    count_ticks = [t for t in _ticks(0, max(counts, default=1), 8) if t == int(t)]  # a count: no 2.5
    most = max(count_ticks[-1] if count_ticks else 1, max(counts, default=1))
    label_w = max(draw.textlength(_tick_text(t), font=_font(7)) for t in count_ticks or [0])
    left, right = x0 + 18 + _px(8) + 12 + label_w + 10, x1 - 25
    top, bottom = y0 + 6, y1 - (_px(7) + _px(8) + 24)
    pad = 0.05 * high

    def scale(v: float) -> float:
        return left + (right - left) * (v + pad) / (high + 2 * pad)

    def level(c: float) -> float:
        return bottom - (bottom - top) * c / most

    for lo, c in zip(edges, counts):
        if c:
            _bar(image, (scale(lo), level(c), scale(lo + 0.1), bottom), lo >= 1.0 - 1e-9)
    draw.line([(left, top), (left, bottom)], fill="black", width=1)
    for t in count_ticks:
        y = level(t)
        draw.line([(left - 5, y), (left, y)], fill="black", width=1)
        draw.text((left - 8, y), _tick_text(t), fill="black", font=_font(7), anchor="rm")
    _vertical_text(image, "members", (x0 + 18, (top + bottom) / 2))
    one = scale(1.0)
    draw.line([(one, top), (one, bottom)], fill="black", width=3)
    _x_axis(draw, left, right, bottom, [t for t in _ticks(0.0, high) if t <= high], scale,
            f"governing utilization of all {len(rows)} members, in bands of 0.1")


def _vertical_text(image, text: str, at: tuple[float, float]) -> None:
    """`text` turned a quarter left, its middle at `at` (an axis label)."""
    from PIL import Image, ImageDraw

    font = _font(8)
    w = round(ImageDraw.Draw(image).textlength(text, font=font)) + 4
    tile = Image.new("L", (w, _px(8) + 6), "white")
    ImageDraw.Draw(tile).text((2, 1), text, fill="black", font=font)
    tile = tile.rotate(90, expand=True)
    image.paste(tile, (round(at[0]), round(at[1] - tile.height / 2)))


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
