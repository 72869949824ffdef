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
