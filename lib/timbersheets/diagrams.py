"""Small shear and moment diagrams for a sheet (matplotlib, Agg, PNG bytes).

Black lines on a light grey fill, so the diagram reads without colour. The
figure is drawn without pyplot, so nothing global (backend, state) changes.
"""

from __future__ import annotations

import io

WIDTH_IN, HEIGHT_IN, DPI = 5.2, 1.75, 200  # 132 mm wide: 0.8 of the sheet's 165 mm line
STYLE = {"font.family": "serif", "font.serif": ["Latin Modern Roman", "DejaVu Serif"], "font.size": 7.5,
         "mathtext.fontset": "cm", "axes.linewidth": 0.6, "xtick.major.width": 0.6, "ytick.major.width": 0.6}


def shear_moment_png(w_f: float, span: float, d: float) -> bytes:
    """PNG of V(x) and M(x) for a simple span under uniform load.

    `w_f` in kN/m, `span` and `d` in m. Marks V_f at the supports, V_fd at d,
    and M_f at midspan.
    """
    from matplotlib import rc_context
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    n = 41
    xs = [span * i / (n - 1) for i in range(n)]
    shear = [w_f * (span / 2 - x) for x in xs]
    moment = [w_f * x * (span - x) / 2 for x in xs]
    with rc_context(STYLE):
        fig = Figure(figsize=(WIDTH_IN, HEIGHT_IN), dpi=DPI)
        FigureCanvasAgg(fig)
        ax_v, ax_m = fig.subplots(1, 2)
        for ax, ys, name, unit in ((ax_v, shear, "Shear $V$", "kN"), (ax_m, moment, "Moment $M$", r"kN$\cdot$m")):
            ax.fill_between(xs, ys, 0, color="0.85", linewidth=0)
            ax.plot(xs, ys, color="black", linewidth=0.9)
            ax.axhline(0, color="black", linewidth=0.6)
            ax.set_xlim(0, span)
            ax.set_xlabel("$x$ (m)", labelpad=1)
            ax.set_title(f"{name} ({unit})", fontsize=7.5, pad=3)
            ax.spines[["top", "right"]].set_visible(False)
            ax.tick_params(length=2, pad=1.5)
        v0, vd = shear[0], w_f * max(span / 2 - d, 0.0)
        up = 1 if v0 >= 0 else -1  # uplift draws the diagram the other way up
        reach = abs(v0) or 1.0  # no load: an empty diagram, not a degenerate axis
        ax_v.set_ylim(-1.35 * reach, 1.35 * reach)
        ax_v.plot([d], [vd], marker="o", markersize=2.5, color="black")
        ax_v.annotate(f"$V_f = {v0:.1f}$", (0, v0), xytext=(5, 2 * up), textcoords="offset points",
                      va="bottom" if up > 0 else "top")
        ax_v.annotate(f"$V_{{fd}} = {vd:.1f}$", (d, vd), xytext=(0.08 * span, -0.5 * v0), textcoords="data",
                      va="center", arrowprops={"arrowstyle": "-", "linewidth": 0.5, "color": "black",
                                               "shrinkA": 1, "shrinkB": 2.5})
        ax_v.annotate(f"${-v0:.1f}$", (span, -v0), xytext=(-6, 0), textcoords="offset points", ha="right",
                      va="center")
        peak = w_f * span**2 / 8
        ax_m.annotate(f"$M_f = {peak:.1f}$", (span / 2, peak), xytext=(0, -10 if peak >= 0 else 10),
                      textcoords="offset points", ha="center", va="top" if peak >= 0 else "bottom")
        lo, hi = sorted((0.0, peak)) if peak else (-1.0, 1.0)
        ax_m.set_ylim(lo * 1.08, hi * 1.08)
        fig.tight_layout(pad=0.3, w_pad=2.0)
        buffer = io.BytesIO()
        fig.savefig(buffer, format="png", dpi=DPI)
    return buffer.getvalue()
