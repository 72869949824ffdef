"""Small shear and moment diagrams for a sheet, drawn with Pillow (grey-level PNG bytes).

Black lines on a light grey fill, so the diagram reads without colour. Everything is drawn at SS
times the resolution and reduced, which smooths lines and text. Not matplotlib: laying out and
drawing its figure took about 0.38 s of a kernel's time for every beam (measured on a 2-core
machine: 10 s of the 16 s that 100 members' sheet cells took); these take a few hundredths.
The type is Latin Modern, as the sheet's, where TeX's copy is found, else DejaVu Serif.
"""

from __future__ import annotations

import glob
import importlib.util
import io
import math
from functools import lru_cache
from pathlib import Path
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from ..engineering.analysis import SpanDiagram

DPI, SS = 200, 3  # pixels per inch of the PNG; drawn at SS times that and reduced
WIDTH_IN, HEIGHT_IN = 5.2, 1.75  # 132 mm wide: 0.8 of the sheet's 165 mm line
MODEL_IN = (WIDTH_IN * 1.2, HEIGHT_IN * 2.2)
INK, FILL, BAND, SUPPORT_LINE, D_LINE = 0, 217, 224, 128, 77  # grey levels (0 black, 255 white)
SIZE, SMALL, TINY = 7.5, 6.5, 5.5  # type sizes, points
MINUS = "\u2212"
GAP = "0.22"  # em: the space between a word and an italic symbol

#: Where TeX distributions keep Latin Modern's OpenType files (Debian/Ubuntu's fonts-lmodern, TeX Live).
LM_FOLDERS = ("/usr/share/texmf/fonts/opentype/public/lm", "/usr/share/texlive/texmf-dist/fonts/opentype/public/lm",
              "/usr/local/texlive/*/texmf-dist/fonts/opentype/public/lm",
              "/opt/homebrew/share/texmf-dist/fonts/opentype/public/lm")
FACES = {"r": ("lmroman10-regular.otf", "DejaVuSerif.ttf"), "i": ("lmroman10-italic.otf", "DejaVuSerif-Italic.ttf")}


def _pt(points: float) -> float:
    """A length in points, in drawing pixels (SS times the PNG's)."""
    return points * DPI * SS / 72


def bundled_font(name: str) -> str | None:
    """The path of one of the DejaVu fonts matplotlib ships (found, not imported), or None."""
    spec = importlib.util.find_spec("matplotlib")
    for folder in (spec.submodule_search_locations or []) if spec else []:
        path = Path(folder) / "mpl-data" / "fonts" / "ttf" / name
        if path.exists():
            return str(path)
    return None


@lru_cache(maxsize=None)
def _face_path(face: str) -> str | None:
    latin_modern, dejavu = FACES[face]
    for pattern in LM_FOLDERS:
        for folder in sorted(glob.glob(pattern)):
            if (Path(folder) / latin_modern).exists():
                return str(Path(folder) / latin_modern)
    return bundled_font(dejavu)


@lru_cache(maxsize=32)
def _font(face: str, points: float):
    from PIL import ImageFont

    path = _face_path(face)
    return ImageFont.truetype(path, round(_pt(points))) if path else ImageFont.load_default(round(_pt(points)))


def _symbol(letter: str, sub: str = "", after: str = "", before: str = "") -> list[tuple[str, str, bool]]:
    """A label's runs: roman `before`, the italic `letter` with its italic subscript, roman `after`."""
    runs = [(before, "r", False), (GAP, "g", False)] if before else []
    runs += [(letter, "i", False)] + ([(sub, "i", True)] if sub else [])
    return runs + ([(after, "r", False)] if after else [])


def _number(value: float, decimals: int) -> str:
    value = value if round(value, decimals) != 0 else 0.0  # never "−0.0"
    return f"{value:.{decimals}f}".replace("-", MINUS)


class _Pen:
    """A white canvas in PNG pixels; lengths in points, positions in PNG pixels (floats)."""

    def __init__(self, width_in: float, height_in: float):
        from PIL import Image, ImageDraw

        self.width, self.height = round(width_in * DPI), round(height_in * DPI)
        self.image = Image.new("L", (self.width * SS, self.height * SS), 255)
        self.draw = ImageDraw.Draw(self.image)

    def line(self, points, width: float, fill: int = INK, dash: tuple[float, float] | None = None) -> None:
        pts = [(x * SS, y * SS) for x, y in points]
        px = max(1, round(_pt(width)))
        if dash is None:
            self.draw.line(pts, fill=fill, width=px, joint="curve")
            return
        on, off = _pt(dash[0]), _pt(dash[1])
        phase = 0.0  # distance along the current dash or gap
        drawing = True
        for (x0, y0), (x1, y1) in zip(pts, pts[1:]):
            length = math.hypot(x1 - x0, y1 - y0)
            at = 0.0
            while at < length:
                step = min((on if drawing else off) - phase, length - at)
                if drawing:
                    a, b = at / length, (at + step) / length
                    self.draw.line([(x0 + a * (x1 - x0), y0 + a * (y1 - y0)), (x0 + b * (x1 - x0), y0 + b * (y1 - y0))],
                                   fill=fill, width=px)
                at += step
                phase += step
                if phase >= (on if drawing else off) - 1e-9:
                    drawing, phase = not drawing, 0.0

    def polygon(self, points, fill: int, outline: int | None = None, width: float = 0.5) -> None:
        pts = [(x * SS, y * SS) for x, y in points]
        if len(pts) >= 3:
            self.draw.polygon(pts, fill=fill)
            if outline is not None:
                self.line(points + [points[0]], width, outline)

    def dot(self, x: float, y: float, diameter: float) -> None:
        r = _pt(diameter) / 2
        self.draw.ellipse([x * SS - r, y * SS - r, x * SS + r, y * SS + r], fill=INK)

    @staticmethod
    def _runs(text) -> list[tuple[str, str, bool]]:
        """A label as runs of (text, face, subscript): face 'r' roman, 'i' italic, 'g' a space of
        that many ems (a word space before an italic letter looks too wide)."""
        return [(text, "r", False)] if isinstance(text, str) else list(text)

    @staticmethod
    def _advance(s: str, face: str, sub: bool, points: float) -> float:
        """How far a run moves the pen, in drawing pixels."""
        return float(s) * _pt(points) if face == "g" else _font(face, points * (0.7 if sub else 1)).getlength(s)

    def text_width(self, text, points: float) -> float:
        """Width of a label in PNG pixels."""
        return sum(self._advance(s, face, sub, points) for s, face, sub in self._runs(text)) / SS

    def text(self, x: float, y: float, text, points: float, ha: str = "left", va: str = "baseline") -> tuple:
        """Draw a label; `ha` left, center or right of x; `va` the label's baseline, top (its capitals'
        top), center or bottom (its descenders) at y. Returns its box in PNG pixels."""
        runs = self._runs(text)
        width = self.text_width(runs, points)
        cap, desc = 0.7 * _pt(points) / SS, 0.22 * _pt(points) / SS
        x0 = {"left": x, "center": x - width / 2, "right": x - width}[ha]
        base = {"baseline": y, "top": y + cap, "center": y + cap / 2, "bottom": y - desc}[va]
        at = x0 * SS
        for s, face, sub in runs:
            if face != "g":
                self.draw.text((at, (base + (0.25 * _pt(points) / SS if sub else 0)) * SS), s, fill=INK,
                               font=_font(face, points * (0.7 if sub else 1)), anchor="ls")
            at += self._advance(s, face, sub, points)
        return x0, base - cap, x0 + width, base + desc

    def text_up(self, x: float, y: float, text, points: float) -> None:
        """A label read upwards (a y axis's), centred on (x, y)."""
        from PIL import Image, ImageDraw

        runs = self._runs(text)
        width, height = self.text_width(runs, points), _pt(points) * 1.3 / SS
        tile = Image.new("L", (math.ceil(width * SS) + 2, math.ceil(height * SS) + 2), 0)
        pen = ImageDraw.Draw(tile)
        at = 1.0
        for s, face, sub in runs:
            if face != "g":
                pen.text((at, _pt(points) + (0.25 * _pt(points) if sub else 0)), s, fill=255,
                         font=_font(face, points * (0.7 if sub else 1)), anchor="ls")
            at += self._advance(s, face, sub, points)
        tile = tile.rotate(90, expand=True)
        self.image.paste(INK, (round(x * SS - tile.width / 2), round(y * SS - tile.height / 2)), mask=tile)

    def png(self) -> bytes:
        buffer = io.BytesIO()
        self.image.reduce(SS).save(buffer, format="png", optimize=False, compress_level=6)
        return buffer.getvalue()


def ticks(low: float, high: float, most: int) -> tuple[list[float], int]:
    """Round tick values within [low, high], at most `most` (steps of 1, 2, 2.5 or 5 times a power of
    ten), and the decimals that print them all alike (as matplotlib's default axis does)."""
    span = max(high - low, 1e-12)
    power = 10 ** math.floor(math.log10(span / most))
    step = next(power * k for k in (1, 2, 2.5, 5, 10, 20) if span / (power * k) <= most)
    first = math.ceil(low / step - 1e-9)
    values = [round(i * step, 12) for i in range(first, math.floor(high / step + 1e-9) + 1)]
    decimals = next((k for k in range(8) if all(abs(round(v, k) - v) < 1e-9 * max(1.0, abs(v)) for v in values)), 8)
    return values, decimals


class _Axes:
    """A plot box (PNG pixels: left, top, right, bottom) with its data limits."""

    def __init__(self, pen: _Pen, box: tuple[float, float, float, float], xlim, ylim):
        self.pen, self.box, self.xlim, self.ylim = pen, box, xlim, ylim

    def at(self, x: float, y: float) -> tuple[float, float]:
        (l, t, r, b), (x0, x1), (y0, y1) = self.box, self.xlim, self.ylim
        return l + (x - x0) / (x1 - x0) * (r - l), b - (y - y0) / (y1 - y0) * (b - t)

    def area(self, xs, ys) -> None:
        """The grey fill between the curve and zero, then the curve."""
        self.pen.polygon([self.at(xs[0], 0.0)] + [self.at(x, y) for x, y in zip(xs, ys)] + [self.at(xs[-1], 0.0)],
                         FILL)

    def curve(self, xs, ys, width: float, dash=None) -> None:
        self.pen.line([self.at(x, y) for x, y in zip(xs, ys)], width, dash=dash)

    def vertical(self, x: float, fill: int, dash: tuple[float, float]) -> None:
        _, t, _, b = self.box
        px, _ = self.at(x, 0.0)
        self.pen.line([(px, t), (px, b)], 0.4, fill, dash=dash)

    def zero(self) -> None:
        l, _, r, _ = self.box
        _, y = self.at(0.0, 0.0)
        self.pen.line([(l, y), (r, y)], 0.6)

    def frame(self, xticks, yticks, x_labels: bool = True) -> None:
        """Left and bottom edges with outward ticks and their labels; `xticks`, `yticks` as ticks gives."""
        l, t, r, b = self.box
        tick, gap = _pt(2) / SS, _pt(1.5) / SS
        self.pen.line([(l, t), (l, b), (r, b)], 0.6)
        for value in xticks[0]:
            x, _ = self.at(value, 0.0)
            self.pen.line([(x, b), (x, b + tick)], 0.6)
            if x_labels:
                self.pen.text(x, b + tick + gap, _number(value, xticks[1]), SIZE, "center", "top")
        for value in yticks[0] if yticks else ():
            _, y = self.at(0.0, value)
            self.pen.line([(l - tick, y), (l, y)], 0.6)
            self.pen.text(l - tick - gap, y, _number(value, yticks[1]), SIZE, "right", "center")


def _yticks(ylim, height_px: float):
    return ticks(*ylim, most=max(3, min(8, round(height_px / 45))))


def _tick_label_width(pen: _Pen, ticks) -> float:
    return max((pen.text_width(_number(v, ticks[1]), SIZE) for v in ticks[0]), default=0.0)


def shear_moment_png(span: SpanDiagram) -> bytes:
    """PNG of V(x) and M(x) of a simple span under uniform load, drawn in kN, kN·m and m.

    `span` holds the values :func:`timbersheets.engineering.analysis.span_diagram` computed with the checks' Calcs:
    no formula is repeated here. Marks V_f at the supports, V_fd at d, and M_f at midspan.
    """
    xs = [x / 1000 for x in span.x]
    shear = [v / 1000 for v in span.V]
    moment = [m_ / 1e6 for m_ in span.M]
    length, d = span.x[-1] / 1000, span.d / 1000
    v0, vd, peak = span.V_f / 1000, span.V_fd / 1000, span.M_f / 1e6
    up = 1 if v0 >= 0 else -1  # uplift draws the diagram the other way up
    reach = abs(v0) or 1.0  # no load: an empty diagram, not a degenerate axis
    lo, hi = sorted((0.0, peak)) if peak else (-1.0, 1.0)
    limits = ((-1.35 * reach, 1.35 * reach), (lo * 1.08, hi * 1.08))

    pen = _Pen(WIDTH_IN, HEIGHT_IN)
    em = _pt(SIZE) / SS
    pad = 0.3 * em
    top = pad + _pt(3) / SS + 1.25 * em  # the title's line and its gap
    bottom = pen.height - (pad + _pt(3.5) / SS + 1.2 * em + _pt(1) / SS + 1.2 * em)  # ticks, labels, x label
    yticks = [_yticks(lim, bottom - top) for lim in limits]
    xticks = ticks(0.0, length, 7)
    lefts = [_tick_label_width(pen, t) + _pt(3.5) / SS for t in yticks]
    last = xticks[0][-1]
    right_overhang = pen.text_width(_number(last, xticks[1]), SIZE) / 2 if abs(last - length) < 1e-9 else 0.0
    gap = 2.0 * em
    width = (pen.width - 2 * pad - lefts[0] - lefts[1] - gap - 2 * right_overhang) / 2
    x_v = pad + lefts[0]
    x_m = x_v + width + right_overhang + gap + lefts[1]
    panels = []
    titles = (_symbol("V", after=" (kN)", before="Shear"), _symbol("M", after=" (kN\u00b7m)", before="Moment"))
    for x0, ys, lim, yt, title in ((x_v, shear, limits[0], yticks[0], titles[0]),
                                   (x_m, moment, limits[1], yticks[1], titles[1])):
        ax = _Axes(pen, (x0, top, x0 + width, bottom), (0.0, length), lim)
        ax.area(xs, ys)
        ax.curve(xs, ys, 0.9)
        ax.zero()
        ax.frame(xticks, yt)
        pen.text(x0 + width / 2, top - _pt(3) / SS, title, SIZE, "center", "bottom")
        pen.text(x0 + width / 2, pen.height - pad, _symbol("x", after=" (m)"), SIZE, "center", "bottom")
        panels.append(ax)
    ax_v, ax_m = panels
    x, y = ax_v.at(0.0, v0)
    pen.text(x + _pt(5) / SS, y - up * _pt(2) / SS, _symbol("V", "f", f" = {_number(v0, 1)}"), SIZE, "left",
             "bottom" if up > 0 else "top")
    dx, dy = ax_v.at(d, vd)
    lx, ly = ax_v.at(0.08 * length, -0.5 * (v0 or reach))  # unloaded: below the line, clear of V_f
    box = pen.text(lx, ly, _symbol("V", "fd", f" = {_number(vd, 1)}"), SIZE, "left", "center")
    reach_x, reach_y = lx + 0.2 * (box[2] - box[0]), box[1] - _pt(1) / SS if up > 0 else box[3] + _pt(1) / SS
    shorten = _pt(2.5) / SS / max(math.hypot(reach_x - dx, reach_y - dy), 1e-9)
    pen.line([(dx + (reach_x - dx) * shorten, dy + (reach_y - dy) * shorten), (reach_x, reach_y)], 0.5)
    pen.dot(dx, dy, 2.5)
    ex, ey = ax_v.at(length, shear[-1])  # beside the line's end, on the side the line leaves free
    pen.text(ex - _pt(6) / SS, ey + up * _pt(2) / SS, _number(shear[-1], 1), SIZE, "right",
             "top" if up > 0 else "bottom")
    mx, my = ax_m.at(length / 2, peak)
    pen.text(mx, my + (_pt(10) if peak >= 0 else -_pt(10)) / SS, _symbol("M", "f", f" = {_number(peak, 1)}"), SIZE,
             "center", "top" if peak >= 0 else "bottom")
    return pen.png()


def beam_model_png(geometry, loads: dict, x, v_env: tuple, m_env: tuple, d: float) -> bytes:
    """PNG of a beam model drawn to scale, with the shear and moment envelopes of one combination.

    `geometry` a beammodel.Geometry (mm); `loads` by type, each ("udl", w N/mm, a, b) or ("point", P N, x);
    `x` stations (mm); `v_env`, `m_env` (upper, lower) arrays in N and N·mm; `d` depth (mm) for the
    sections where shear is checked. Values are drawn in kN, kN·m and m.
    """
    xs = [xi / 1000 for xi in x]
    total = geometry.length / 1000
    xlim = (-0.02 * total, 1.02 * total)
    pen = _Pen(*MODEL_IN)
    em = _pt(SIZE) / SS
    pad = 0.3 * em
    envelopes = []
    for (hi, lo), scale in ((v_env, 1e-3), (m_env, 1e-6)):
        upper, lower = [h * scale for h in hi], [l_ * scale for l_ in lo]
        reach = max(max(upper), -min(lower), 1e-9)
        tiny = 1e-6 * reach  # a rounding error is not a hogging moment
        envelopes.append((upper, lower, (-1.35 * reach if min(lower) < -tiny else -0.15 * reach,
                                         1.35 * reach if max(upper) > tiny else 0.15 * reach)))
    title_h = 1.3 * _pt(7.0) / SS
    below = _pt(3.5) / SS + 1.2 * em + _pt(1) / SS + 1.2 * em
    plot_h = pen.height - 2 * pad - title_h - below - 2 * 0.6 * em
    heights = [plot_h * k / 3.0 for k in (0.9, 1.05, 1.05)]
    yticks = [_yticks(lim, heights[1]) for _, _, lim in envelopes]
    left = pad + 1.3 * em + max(_tick_label_width(pen, t) for t in yticks) + _pt(3.5) / SS
    xticks = ticks(0.0, total, 9)
    right = pen.width - pad - max(0.0, pen.text_width(_number(xticks[0][-1], xticks[1]), SIZE) / 2
                                  - (xlim[1] - xticks[0][-1]) / (xlim[1] - xlim[0]) * (pen.width - left))
    top = pad + title_h
    title = "Model to scale: supports R1\u2026 from the left; line loads in kN/m, point loads in kN (specified)"
    pen.text(left, pad, title, 7.0, "left", "top")
    model_box = (left, top, right, top + heights[0])
    _draw_model(pen, model_box, xlim, geometry, loads)
    y = model_box[3] + 0.6 * em
    names = (_symbol("V", after=" (kN)"), _symbol("M", after=", sagging + (kN\u00b7m)"))
    for k, ((upper, lower, lim), yt, name) in enumerate(zip(envelopes, yticks, names)):
        ax = _Axes(pen, (left, y, right, y + heights[1 + k]), xlim, lim)
        ax.area(xs, upper)
        ax.area(xs, lower)
        ax.curve(xs, upper, 0.8)
        ax.curve(xs, lower, 0.8, dash=(3.0, 1.5) if upper != lower else None)
        ax.zero()
        for s in geometry.supports:
            ax.vertical(s / 1000, SUPPORT_LINE, (0.6, 1.2))
            if k == 0:
                for side in (-1, 1):
                    at = (s + side * d) / 1000
                    if 0 <= at <= total:
                        ax.vertical(at, D_LINE, (0.4, 0.8))
        ax.frame(xticks, yt, x_labels=k == 1)
        pen.text_up(pad + 0.6 * em, y + heights[1 + k] / 2, name, SIZE)
        for values, pick in ((upper, max), (lower, min)):
            j = values.index(pick(values))
            if abs(values[j]) > 1e-9:
                side = "left" if xs[j] < 0.2 * total else "right" if xs[j] > 0.8 * total else "center"
                px, py = ax.at(xs[j], values[j])
                px += {"left": 4, "right": -4, "center": 0}[side] * _pt(1) / SS
                py -= (3 if values[j] >= 0 else -3) * _pt(1) / SS
                pen.text(px, py, f"{_number(values[j], 1)} at {xs[j]:.2f} m", SMALL, side,
                         "bottom" if values[j] >= 0 else "top")
        y += heights[1 + k] + 0.6 * em
    pen.text((left + right) / 2, pen.height - pad, _symbol("x", after=" from the left end (m)"), SIZE, "center",
             "bottom")
    return pen.png()


def _draw_model(pen: _Pen, box, xlim, geometry, loads: dict) -> None:
    """Beam line, supports (triangles), uniform loads as bands by type and point loads as arrows, to scale.
    Every arrow points down, the load's sign in its label (loads of several types at one point share
    one arrow's line; an arrow turned up among them would read as one double-headed arrow)."""
    total = geometry.length / 1000
    levels, level = [], 0.12
    for t in ("D", "L", "S", "W", "E"):
        if loads.get(t):
            levels.append((t, level))
            level += 0.2
    ax = _Axes(pen, box, xlim, (-0.55, max(level + 0.5, 0.9)))
    pen.line([ax.at(0.0, 0.0), ax.at(total, 0.0)], 2.0)
    for j, s in enumerate(geometry.supports):
        x, y = ax.at(s / 1000, 0.0)
        h = _pt(5) / SS
        apex = y + _pt(1.2) / SS  # just below the beam line
        pen.polygon([(x, apex), (x - 0.6 * h, apex + h), (x + 0.6 * h, apex + h)], INK)
        pen.text(x, y + h + _pt(4) / SS, f"R{j + 1}", SMALL, "center", "top")
    arrows = [ax.at(ld[2] / 1000, 0.0)[0] for t, _ in levels for ld in loads[t] if ld[0] == "point"]
    for t, level in levels:
        for _, w, a, b in (ld for ld in loads[t] if ld[0] == "udl"):
            (x0, y0), (x1, y1) = ax.at(a / 1000, level + 0.16), ax.at(b / 1000, level)
            pen.polygon([(x0, y0), (x1, y0), (x1, y1), (x0, y1)], BAND, outline=INK)
            label = f"{t} {_number(w, 2)}"
            half = pen.text_width(label, TINY) / 2 + _pt(2) / SS
            pen.text(_clear_of(arrows, x0, x1, half), (y0 + y1) / 2, label, TINY, "center", "center")
        for _, p, at in (ld for ld in loads[t] if ld[0] == "point"):
            (x, beam), (_, tail) = ax.at(at / 1000, 0.03), ax.at(at / 1000, level + 0.42)
            pen.line([(x, tail), (x, beam)], 0.7)
            head = _pt(4) / SS
            pen.polygon([(x, beam), (x - 0.35 * head, beam - head), (x + 0.35 * head, beam - head)], INK)
            pen.text(x + _pt(3) / SS, ax.at(0.0, level + 0.3)[1], f"{t} {_number(p / 1000, 1)}", TINY, "left", "center")


def _clear_of(arrows: list[float], x0: float, x1: float, half: float) -> float:
    """Where a band's label goes: its middle, or the middle of the widest stretch of the band between
    point-load arrows when an arrow would cross the label there."""
    middle = (x0 + x1) / 2
    if all(abs(a - middle) > half for a in arrows):
        return middle
    cuts = sorted([x0] + [a for a in arrows if x0 < a < x1] + [x1])
    a, b = max(zip(cuts, cuts[1:]), key=lambda ab: ab[1] - ab[0])
    return (a + b) / 2 if b - a > 2 * half else middle
