"""Small shear and moment diagrams for a sheet (matplotlib, Agg, PNG bytes).

Black lines on a light grey fill, so the diagram reads without colour. The
figure is drawn without pyplot, so nothing global (backend, state) changes.
"""

from __future__ import annotations

import io
from functools import lru_cache
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from ..engineering.analysis import SpanDiagram

WIDTH_IN, HEIGHT_IN, DPI = 5.2, 1.75, 200  # 132 mm wide: 0.8 of the sheet's 165 mm line
STYLE = {"font.family": "serif", "font.serif": ["Latin Modern Roman", "DejaVu Serif"], "font.size": 7.5,
         "mathtext.fontset": "cm", "axes.linewidth": 0.6, "xtick.major.width": 0.6, "ytick.major.width": 0.6}


def shear_moment_png(span: SpanDiagram) -> bytes:
    """PNG of V(x) and M(x) of a simple span under uniform load, drawn in kN, kN·m and m.

    `span` holds the values :func:`timbersheets.engineering.analysis.span_diagram` computed with the checks' Calcs:
    no formula is repeated here. Marks V_f at the supports, V_fd at d, and M_f at midspan.
    """
    from matplotlib import rc_context

    xs = [x / 1000 for x in span.x]
    shear = [v / 1000 for v in span.V]
    moment = [m_ / 1e6 for m_ in span.M]
    length, d = span.x[-1] / 1000, span.d / 1000
    with rc_context(STYLE):
        fig, ax_v, ax_m = _shear_moment_axes(xs, shear, moment, length)
        v0, vd = span.V_f / 1000, span.V_fd / 1000
        up = 1 if v0 >= 0 else -1  # uplift draws the diagram the other way up
        reach = abs(v0) or 1.0  # no load: an empty diagram, not a degenerate axis
        ax_v.set_ylim(-1.35 * reach, 1.35 * reach)
        ax_v.plot([d], [vd], marker="o", markersize=2.5, color="black")
        ax_v.annotate(f"$V_f = {v0:.1f}$", (0, v0), xytext=(5, 2 * up), textcoords="offset points",
                      va="bottom" if up > 0 else "top")
        ax_v.annotate(f"$V_{{fd}} = {vd:.1f}$", (d, vd), xytext=(0.08 * length, -0.5 * v0), textcoords="data",
                      va="center", arrowprops={"arrowstyle": "-", "linewidth": 0.5, "color": "black",
                                               "shrinkA": 1, "shrinkB": 2.5})
        ax_v.annotate(f"${shear[-1]:.1f}$", (length, shear[-1]), xytext=(-6, 0), textcoords="offset points", ha="right",
                      va="center")
        peak = span.M_f / 1e6
        ax_m.annotate(f"$M_f = {peak:.1f}$", (length / 2, peak), xytext=(0, -10 if peak >= 0 else 10),
                      textcoords="offset points", ha="center", va="top" if peak >= 0 else "bottom")
        lo, hi = sorted((0.0, peak)) if peak else (-1.0, 1.0)
        ax_m.set_ylim(lo * 1.08, hi * 1.08)
        _side_by_side(fig, ax_v, ax_m)
        buffer = io.BytesIO()
        fig.savefig(buffer, format="png", dpi=DPI)
    return buffer.getvalue()


PAD, W_PAD = 0.3, 2.0  # the margins and the gap between the two axes, in font sizes (as tight_layout's)


def _shear_moment_axes(xs, shear, moment, length: float):
    """The shear and moment figure's two axes with their curves, titles and labels (no annotations)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(WIDTH_IN, HEIGHT_IN), dpi=DPI)
    FigureCanvasAgg(fig)
    ax_v, ax_m = fig.subplots(1, 2)
    for ax, ys, name, unit in ((ax_v, shear, "Shear $V$", "kN"), (ax_m, moment, "Moment $M$", r"kN$\cdot$m")):
        ax.fill_between(xs, ys, 0, color="0.85", linewidth=0)
        ax.plot(xs, ys, color="black", linewidth=0.9)
        ax.axhline(0, color="black", linewidth=0.6)
        ax.set_xlim(0, length)
        ax.set_xlabel("$x$ (m)", labelpad=1)
        ax.set_title(f"{name} ({unit})", fontsize=7.5, pad=3)
        ax.spines[["top", "right"]].set_visible(False)
        ax.tick_params(length=2, pad=1.5)
    return fig, ax_v, ax_m


@lru_cache(maxsize=1)
def _below_above() -> tuple[float, float]:
    """The heights (px) that tight_layout leaves below and above the two axes. They hold the tick
    labels, the x label and the titles, whose fonts alone set them, so one figure measures them."""
    from matplotlib import rc_context

    with rc_context(STYLE):
        fig, ax_v, _ = _shear_moment_axes([0.0, 1.0], [1.0, -1.0], [0.0, 0.0], 1.0)
        fig.tight_layout(pad=PAD, w_pad=W_PAD)
        box, height = ax_v.get_position(), fig.bbox.height
    return box.y0 * height, (1 - box.y1) * height


def _side_by_side(fig, ax_v, ax_m) -> None:
    """Place the two axes where ``fig.tight_layout(pad=PAD, w_pad=W_PAD)`` would, from the widths of
    their tick labels: tight_layout measures every artist of the figure, 40 % of the diagram's time in
    a kernel. Left of each axes: its y tick labels, ticks and pads; right of it: the half of an x tick
    label at its right end. tests/test_render.py holds the two layouts within a pixel of each other."""
    renderer = fig.canvas.get_renderer()
    px = fig.dpi / 72
    pad, w_pad = (k * STYLE["font.size"] * px for k in (PAD, W_PAD))
    width, height = fig.bbox.width, fig.bbox.height

    def ticks(axis, lo: float, hi: float) -> tuple[list[float], list[float]]:
        slack = 1e-9 * max(1.0, abs(hi - lo))
        locs = [v for v in axis.get_major_locator()() if lo - slack <= v <= hi + slack]
        prop = axis.get_major_ticks()[0].label1.get_fontproperties()
        return locs, [renderer.get_text_width_height_descent(t, prop, ismath=False)[0]
                      for t in axis.get_major_formatter().format_ticks(locs)]

    def left_of(ax) -> float:
        tick = ax.yaxis.get_major_ticks()[0]
        widths = ticks(ax.yaxis, *sorted(ax.get_ylim()))[1]
        lo, _ = ax.get_xlim()
        locs, x_widths = ticks(ax.xaxis, *ax.get_xlim())
        start = [w / 2 for loc, w in zip(locs, x_widths) if abs(loc - lo) < 1e-9]  # a tick at the left end
        return max([max(widths, default=0.0) + (tick.get_tick_padding() + tick.get_pad()) * px] + start)

    def right_of(ax, axes_width: float) -> float:
        lo, hi = ax.get_xlim()
        locs, widths = ticks(ax.xaxis, lo, hi)
        return max([0.0] + [(loc - hi) / (hi - lo) * axes_width + w / 2 for loc, w in zip(locs, widths)])

    below, above = _below_above()
    left_v, left_m = left_of(ax_v), left_of(ax_m)
    axes_width = (width - 2 * pad - left_v - w_pad - left_m) / 2
    for _ in range(2):  # the overhang of an end tick depends a little on the width it leaves
        right_v, right_m = right_of(ax_v, axes_width), right_of(ax_m, axes_width)
        axes_width = (width - 2 * pad - left_v - right_m - w_pad - right_v - left_m) / 2
    x_v = pad + left_v
    x_m = x_v + axes_width + w_pad + right_v + left_m
    for ax, x in ((ax_v, x_v), (ax_m, x_m)):
        ax.set_position([x / width, below / height, axes_width / width, (height - below - above) / height])


def beam_model_png(geometry, loads: dict, x, v_env: tuple, m_env: tuple, d: float) -> bytes:
    """PNG of a beam model drawn to scale, with the shear and moment envelopes of one combination.

    `geometry` a beammodel.Geometry (mm); `loads` by type, each ("udl", w N/mm, a, b) or ("point", P N, x);
    `x` stations (mm); `v_env`, `m_env` (upper, lower) arrays in N and N·mm; `d` depth (mm) for the
    sections where shear is checked. Values are drawn in kN, kN·m and m.
    """
    from matplotlib import rc_context
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    xs = [xi / 1000 for xi in x]
    total = geometry.length / 1000
    with rc_context(STYLE):
        fig = Figure(figsize=(WIDTH_IN * 1.2, HEIGHT_IN * 2.6), dpi=DPI)
        FigureCanvasAgg(fig)
        ax_b, ax_v, ax_m = fig.subplots(3, 1, sharex=True, gridspec_kw={"height_ratios": [1.3, 1, 1]})
        _draw_model(ax_b, geometry, loads)
        for ax, (hi, lo), scale, name, unit in ((ax_v, v_env, 1e-3, "$V$", "kN"),
                                                (ax_m, m_env, 1e-6, "$M$, sagging +", r"kN$\cdot$m")):
            up, dn = [h * scale for h in hi], [lo_ * scale for lo_ in lo]
            ax.fill_between(xs, up, 0, color="0.85", linewidth=0)
            ax.fill_between(xs, dn, 0, color="0.85", linewidth=0)
            ax.plot(xs, up, color="black", linewidth=0.8)
            ax.plot(xs, dn, color="black", linewidth=0.8, linestyle="--" if up != dn else "-")
            ax.axhline(0, color="black", linewidth=0.6)
            ax.set_ylabel(f"{name} ({unit})", labelpad=1)
            ax.spines[["top", "right"]].set_visible(False)
            ax.tick_params(length=2, pad=1.5)
            for values, pick in ((up, max), (dn, min)):
                k = values.index(pick(values))
                if abs(values[k]) > 1e-9:
                    side = "left" if xs[k] < 0.2 * total else "right" if xs[k] > 0.8 * total else "center"
                    ax.annotate(f"${values[k]:.1f}$ at {xs[k]:.2f} m", (xs[k], values[k]), fontsize=6.5,
                                xytext=({"left": 4, "right": -4, "center": 0}[side], 3 if values[k] >= 0 else -3),
                                textcoords="offset points",
                                ha=side, va="bottom" if values[k] >= 0 else "top")
            span = max(max(up), -min(dn), 1e-9)
            ax.set_ylim(-1.35 * span if min(dn) < 0 else -0.15 * span, 1.35 * span if max(up) > 0 else 0.15 * span)
        for s in geometry.supports:
            for ax in (ax_v, ax_m):
                ax.axvline(s / 1000, color="0.5", linewidth=0.4, linestyle=":")
            for side in (-1, 1):
                at = (s + side * d) / 1000
                if 0 <= at <= total:
                    ax_v.axvline(at, color="0.3", linewidth=0.4, linestyle=(0, (1, 2)))
        ax_m.set_xlabel("$x$ from the left end (m)", labelpad=1)
        ax_m.set_xlim(-0.02 * total, 1.02 * total)
        fig.tight_layout(pad=0.3, h_pad=0.6)
        buffer = io.BytesIO()
        fig.savefig(buffer, format="png", dpi=DPI)
    return buffer.getvalue()


def _draw_model(ax, geometry, loads: dict) -> None:
    """Beam line, supports (triangles), uniform loads as bands by type and point loads as arrows, to scale."""
    total = geometry.length / 1000
    ax.plot([0, total], [0, 0], color="black", linewidth=2.0, solid_capstyle="butt")
    for j, s in enumerate(geometry.supports):
        ax.plot([s / 1000], [-0.12], marker="^", markersize=6, color="black")
        ax.annotate(f"R{j + 1}", (s / 1000, -0.3), ha="center", va="top", fontsize=6.5)
    level = 0.12
    for t in ("D", "L", "S", "W", "E"):
        bands = [ld for ld in loads.get(t, ()) if ld[0] == "udl"]
        points = [ld for ld in loads.get(t, ()) if ld[0] == "point"]
        if not bands and not points:
            continue
        for _, w, a, b in bands:
            ax.fill_between([a / 1000, b / 1000], level, level + 0.16, color="0.88", edgecolor="black", linewidth=0.5)
            ax.annotate(f"{t} {w:.2f}", ((a + b) / 2000, level + 0.08), ha="center", va="center", fontsize=5.5)
        for _, p, at in points:
            ax.annotate("", (at / 1000, 0.03), xytext=(at / 1000, level + 0.42),
                        arrowprops={"arrowstyle": "-|>", "linewidth": 0.7, "color": "black"})
            ax.annotate(f"{t} {p / 1000:.1f}", (at / 1000, level + 0.3), xytext=(3, 0), textcoords="offset points",
                        ha="left", va="center", fontsize=5.5)
        level += 0.2
    ax.set_ylim(-0.6, max(level + 0.75, 1.0))
    ax.set_yticks([])
    ax.spines[["top", "right", "left"]].set_visible(False)
    ax.set_title("Model to scale: supports R1… from the left; line loads in kN/m, point loads in kN (specified)",
                 fontsize=7.0, pad=2, loc="left")
