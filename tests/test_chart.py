"""summary.png: drawn from finite values only, the title as text, readable at any size."""

import io

import pytest

from timbersheets.sheet.charts import utilization_chart


def members(n, bad=()):
    out = [{"mark": f"M-{i}", "utilization": 0.3 + (i % 13) / 10, "status": "pass"} for i in range(n)]
    for m in out:
        m["status"] = "fail" if m["utilization"] > 1 else "pass"
    return out + [{"mark": f"X-{i}", "utilization": u, "status": "error"} for i, u in enumerate(bad)]


def size(png: bytes) -> tuple[int, int]:
    from PIL import Image

    return Image.open(io.BytesIO(png)).size


@pytest.mark.parametrize("title", ["$x^$", r"$\frac{a}$ hall", "T" * 1_000_000, "Load {D}\u2192 column"],
                         ids=["mathtext", "frac", "1-MB", "arrow"])
def test_any_title_draws_as_text(title):
    assert utilization_chart(members(5), title).startswith(b"\x89PNG")


def test_non_finite_values_are_left_out():
    png = utilization_chart(members(5, bad=[float("nan"), float("inf"), float("-inf"), None]), "job")
    assert png.startswith(b"\x89PNG")


def test_two_thousand_members_make_a_summary_of_bounded_size():
    """One bar a member would be a smear; the summary has the size of a page."""
    w, h = size(utilization_chart(members(2000), "job"))
    assert (w, h) == (945, 1350)  # 6.3 x 9.0 in at 150 dpi


def test_a_chart_drawn_ahead_is_used_only_for_the_same_results(tmp_path):
    """The run draws the chart from the designs while its sheets are made; a member whose sheet then
    ends in error changes the chart, which must show that, not the chart drawn ahead."""
    from timbersheets.sheet.charts import draw_ahead, write_chart

    designed = members(6)
    draw_ahead(designed, "job rev A", tmp_path / "cache").join()
    ahead = list((tmp_path / "cache").glob("chart-*.png"))
    assert len(ahead) == 1
    write_chart(tmp_path / "same.png", designed, "job rev A", tmp_path / "cache")
    assert (tmp_path / "same.png").read_bytes() == ahead[0].read_bytes()
    final = [dict(m) for m in designed]
    final[2].update(status="error", utilization=None)
    write_chart(tmp_path / "final.png", final, "job rev A", tmp_path / "cache")
    assert (tmp_path / "final.png").read_bytes() == utilization_chart(final, "job rev A")
    assert (tmp_path / "final.png").read_bytes() != ahead[0].read_bytes()


def test_a_bar_ends_at_its_utilization_on_the_axis():
    """A bar's length is its utilization on the x axis: the member at 0.5 ends halfway from the axis
    to the 1.0 line, the member at 1.0 on it (read from the pixels of the PNG; the chart is drawn
    directly, so this is what an engineer reads off it)."""
    from PIL import Image

    rows = [{"mark": "A", "utilization": 1.0, "status": "pass"}, {"mark": "B", "utilization": 0.5, "status": "pass"}]
    image = Image.open(io.BytesIO(utilization_chart(rows, "job"))).convert("L")
    w, h = image.size
    px = image.load()
    grey = [[x for x in range(w) if px[x, y] == 191] for y in range(h)]  # the bars' fill
    spans = sorted({(xs[0], xs[-1]) for xs in grey if len(xs) > 20})
    assert len(spans) == 2, spans
    (start_b, end_b), (start_a, end_a) = sorted(spans, key=lambda s: s[1])
    assert start_a == start_b  # both from the axis
    axis = start_a - 1
    line = [x for x in range(w) if all(px[x, y] < 60 for y in range(h // 2 - 3, h // 2 + 3))]
    one = [x for x in line if x > axis + 5]  # the 1.0 line, three pixels wide
    assert one, line
    centre = sum(one) / len(one)
    assert abs(end_a + 1 - centre) <= 2.5
    assert abs((end_b + 1 - axis) - (centre - axis) / 2) <= 2.5
