"""The sheets' shear and moment pictures (sheet/diagrams.py, drawn with Pillow), read back from their pixels.

The curves are checked against the beam formulas of a simple span under uniform load,
V(x) = w (L/2 - x) and M(x) = w x (L - x) / 2 (published in every beam-formula table, e.g. the
AISC Steel Construction Manual's "Beam Diagrams and Formulas", case 1; common practice).
"""

import io
import warnings

import numpy as np
import pytest
from PIL import Image

from timbersheets.engineering.analysis import span_diagram
from timbersheets.sheet import diagrams

SPANS = [(7200, 30.4), (6000, 5.0), (3000, -2.0), (12000, 80.0), (4200, 0.8), (2500, 0.05), (9750, 250.0),
         (20000, 12.0), (1000, 2000.0), (5000, -40.0), (8000, 0.0), (3600, 9.9), (14400, 1.3), (600, 0.5),
         (1500, -900.0), (30000, 0.01), (4000, 16.0), (10000, 6.4)]


@pytest.fixture(autouse=True, params=["Latin Modern", "DejaVu Serif"])
def face(request, monkeypatch):
    """Every picture test runs in both faces the pictures use: Latin Modern where TeX's copy is found,
    DejaVu Serif (wider) where it is not, as on a machine that has not installed TeX yet."""
    if request.param == "DejaVu Serif":
        monkeypatch.setattr(diagrams, "LM_FOLDERS", ())
    elif diagrams._face_path("r") is None or "lmroman" not in diagrams._face_path("r"):
        pytest.skip("Latin Modern is not installed here (TeX's fonts-lmodern)")
    diagrams._face_path.cache_clear()
    diagrams._font.cache_clear()
    yield request.param
    diagrams._face_path.cache_clear()
    diagrams._font.cache_clear()


def pixels(png: bytes) -> np.ndarray:
    return np.asarray(Image.open(io.BytesIO(png)).convert("L"), dtype=int)


def panel_extent(half: np.ndarray) -> tuple[int, int, int]:
    """(row, first column, last column) of a panel: the row of the longest dark horizontal line (its
    bottom edge), the column of the longest dark vertical one (its left edge; the y ticks reach out
    beyond it) and where the bottom edge ends."""
    row, _, last = _longest_run(half)
    first = int(np.argmax(np.sum(half < 110, axis=0)))
    return row, first, last


def _longest_run(half: np.ndarray) -> tuple[int, int, int]:
    best = (0, 0, -1)
    for r, row in enumerate(half < 110):
        c = 0
        while c < len(row):
            if row[c]:
                start = c
                while c < len(row) and row[c]:
                    c += 1
                if c - 1 - start > best[2] - best[1]:
                    best = (r, start, c - 1)
            c += 1
    return best


def fill_height(column: np.ndarray, rows: slice = slice(None)) -> int:
    """Pixels of the diagram's grey fill in one column (its interior is exactly the fill's level)."""
    return int(np.sum(column[rows] == diagrams.FILL))


def _dark_run(column: np.ndarray, start: int, step: int) -> float:
    """From row `start`, past any dark run there, through the fill, to the next dark run: its middle row."""
    r = start
    while column[r] < 110:
        r += step
    while column[r] >= 110:
        r += step
    rows = []
    while column[r] < 110:
        rows.append(r)
        r += step
    return sum(rows) / len(rows)


def curve_height(column: np.ndarray, zero: int, step: int = -1) -> float:
    """Pixels from the zero line's middle to the curve's, in one column; `zero` a row of the zero line,
    `step` -1 for a curve above it, +1 below."""
    top = bottom = zero
    while column[top - 1] < 110:
        top -= 1
    while column[bottom + 1] < 110:
        bottom += 1
    return abs(_dark_run(column, zero, step) - (top + bottom) / 2)


@pytest.mark.parametrize("length, w", SPANS, ids=[f"{L}mm-{w}N/mm" for L, w in SPANS])
def test_nothing_runs_off_the_picture(length, w):
    """Spans from 0.6 m to 30 m, loads from none to 2000 N/mm, uplift: every label, tick and curve
    stays inside the picture (its outer 3 pixels are white), which is the picture's stated size."""
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        image = pixels(diagrams.shear_moment_png(span_diagram(w, length, 300.0)))
    assert image.shape == (round(diagrams.HEIGHT_IN * diagrams.DPI), round(diagrams.WIDTH_IN * diagrams.DPI))
    for edge in (image[:3], image[-3:], image[:, :3], image[:, -3:]):
        assert edge.min() == 255


@pytest.mark.parametrize("length, w", [(3400, 2.65), (7200, 30.4), (5000, -40.0)])
def test_the_moment_is_drawn_to_scale(length, w):
    """M(0.30 L) / M(0.15 L) = (0.30 x 0.70) / (0.15 x 0.85) = 1.647 (beam formula above); uplift draws it
    downwards alike. Columns clear of the M_f label and the title in either face (DejaVu Serif's label,
    used where TeX is not installed, is wider and reaches in to 0.35 L)."""
    image = pixels(diagrams.shear_moment_png(span_diagram(w, length, 240.0)))
    right = image[:, image.shape[1] // 2:]
    _, first, last = panel_extent(right)
    lines = [r for r in range(right.shape[0]) if np.sum(right[r, first:last] < 110) > 0.9 * (last - first)]
    zero, step = (max(lines), -1) if w > 0 else (min(lines), 1)  # sagging: the bottom edge is the zero line
    at = lambda k: right[:, round(first + k * (last - first))]  # noqa: E731
    near, far = curve_height(at(0.15), zero, step), curve_height(at(0.30), zero, step)
    assert near > 30
    assert far / near == pytest.approx(1.647, rel=0.02)


def test_the_shear_changes_sign_at_midspan_and_is_drawn_to_scale():
    """V(0.2 L) / V(0.4 L) = 0.3 / 0.1 = 3, positive left of midspan and negative right of it, V(0.8 L) =
    -V(0.2 L) (beam formula above). Columns clear of the V_f label."""
    image = pixels(diagrams.shear_moment_png(span_diagram(30.4, 7200.0, 240.0)))
    left = image[:, : image.shape[1] // 2]
    _, first, last = panel_extent(left)
    lines = [r for r in range(left.shape[0]) if np.sum(left[r, first:last] < 110) > 0.9 * (last - first)]
    zero = min(lines)  # the zero line; the panel's bottom edge is below it
    assert max(lines) - zero > 50
    above, below = slice(None, zero), slice(zero + 3, max(lines) - 2)
    at = lambda k: left[:, round(first + k * (last - first))]  # noqa: E731
    assert fill_height(at(0.2), below) == 0 and fill_height(at(0.8), above) == 0
    assert curve_height(at(0.2), zero) / curve_height(at(0.4), zero) == pytest.approx(3.0, rel=0.04)
    assert curve_height(at(0.8), zero, +1) == pytest.approx(curve_height(at(0.2), zero), abs=1.5)


def test_a_beam_model_picture_keeps_inside_its_frame():
    """A two-span beam with a band, point loads of three types at one point and uplift: nothing drawn
    outside the picture; the envelope of a span with no hogging keeps the axis short below zero."""
    from timbersheets.engineering.beammodel import Geometry

    geometry = Geometry(spans=(4800.0, 3600.0))
    loads = {"D": [("udl", 1.9, 0.0, 8400.0), ("point", 9700.0, 2800.0)], "S": [("point", 19200.0, 2800.0)],
             "W": [("point", -9100.0, 2800.0), ("udl", -0.8, 0.0, 8400.0)]}
    x = [8400.0 * i / 200 for i in range(201)]
    shear = [20e3 - 5.0 * xi for xi in x]
    moment = [1e3 * xi * (8400.0 - xi) / 2 for xi in x]
    image = pixels(diagrams.beam_model_png(geometry, loads, x, (shear, [v - 3e3 for v in shear]),
                                           (moment, moment), 240.0))
    assert image.shape == (round(diagrams.MODEL_IN[1] * diagrams.DPI), round(diagrams.MODEL_IN[0] * diagrams.DPI))
    for edge in (image[:3], image[-3:], image[:, :3], image[:, -3:]):
        assert edge.min() == 255


def test_labels_print_a_true_minus_and_never_a_negative_zero():
    # common practice in typeset numbers: U+2212 for minus; a value that rounds to zero prints as 0.0
    assert diagrams._number(-2.54, 1) == "\u22122.5" and diagrams._number(-0.04, 1) == "0.0"
    assert diagrams._number(0.04, 1) == "0.0" and diagrams._number(12.0, 0) == "12"
