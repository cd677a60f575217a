"""Shape classification of wire sets (examples are invented geometries)."""

from __future__ import annotations

import pytest

from aerial.core.errors import ModelInputError
from aerial.models.segments import Segments, polyline_segments
from aerial.models.shapes import SHAPE_KINDS, classify

A = 1e-3


def test_vertical():
    s = classify(polyline_segments([[0, 0, 0.02], [0, 0, 5], [0, 0, 10]], A))
    assert s.kind == "vertical"
    assert s.vertical_height_m == pytest.approx(10.0)
    assert s.downlead_length_m == pytest.approx(9.98)
    assert s.top_lengths_m == ()


def test_inverted_l_with_subdivided_top():
    s = classify(polyline_segments([[0, 0, 0.02], [0, 0, 10], [10, 0, 10], [20, 0, 10]], A))
    assert s.kind == "inverted-L"
    assert s.top_lengths_m == pytest.approx((20.0,))
    assert s.top_heights_m == pytest.approx((10.0,))
    assert s.segment_section == (0, 1, 1)


def test_t_with_two_arms():
    seg = Segments([[0, 0, 0.02], [0, 0, 10], [0, 0, 10]], [[0, 0, 10], [10, 0, 10], [-12, 0, 10]], A, False, [0, 0, 0.02])
    s = classify(seg)
    assert s.kind == "T"
    assert sorted(s.top_lengths_m) == pytest.approx([10.0, 12.0])


def test_three_arms_is_t():
    seg = Segments(
        [[0, 0, 0.02], [0, 0, 8], [0, 0, 8], [0, 0, 8]],
        [[0, 0, 8], [10, 0, 8], [-10, 0, 8], [0, 10, 8]],
        A, False, [0, 0, 0.02],
    )
    assert classify(seg).kind == "T"
    assert len(classify(seg).top_lengths_m) == 3


def test_balcony_run_with_a_corner_is_inverted_l():
    s = classify(polyline_segments([[0, 0, 0.02], [0, 0, 6], [8, 0, 6], [8, 5, 6]], A))
    assert s.kind == "inverted-L"
    assert s.top_lengths_m == pytest.approx((13.0,))


def test_sagging_top_is_inverted_l_with_mean_height():
    s = classify(polyline_segments([[0, 0, 0.02], [0, 0, 10], [5, 0, 9.5], [10, 0, 9.3], [15, 0, 9.5], [20, 0, 10]], A))
    assert s.kind == "inverted-L"
    assert 9.3 < s.top_heights_m[0] < 10.0


def test_sloping_wire_shallow_and_steep():
    s = classify(polyline_segments([[0, 0, 0.02], [10, 0, 3], [20, 0, 6]], A))
    assert s.kind == "sloping wire"
    assert s.downlead_rise_m == pytest.approx(5.98)
    assert classify(polyline_segments([[0, 0, 0.02], [3, 0, 10]], A)).kind == "sloping wire"


@pytest.mark.parametrize(
    "points, reason",
    [
        ([[0, 0, 10], [30, 0, 10]], "barely rises"),
        ([[0, 0, 0.02], [0, 0, 10], [5, 0, 10], [5, 0, 3], [10, 0, 3]], "steep run"),
        ([[0, 0, 0.02], [0, 0, 10], [10, 0, 10], [10, 5, 10], [0, 0, 10]], "closed loop"),
        ([[0, 0, 0.02], [5, 0, 3], [10, 0, 0.5], [15, 0, 4]], "not a single straight"),
    ],
)
def test_irregular(points, reason):
    s = classify(polyline_segments(points, A))
    assert s.kind == "irregular"
    assert any(reason in n for n in s.notes)


def test_forked_top_is_irregular():
    seg = Segments(
        [[0, 0, 0.02], [0, 0, 10], [10, 0, 10], [10, 0, 10]],
        [[0, 0, 10], [10, 0, 10], [20, 5, 10], [20, -5, 10]],
        A, False, [0, 0, 0.02],
    )
    s = classify(seg)
    assert s.kind == "irregular" and any("branched" in n for n in s.notes)


def test_earth_lead_is_reported_not_classified():
    seg = Segments([[0, 0, 1], [0, 0, 1], [0, 0, 10]], [[0, 0, 0], [0, 0, 10], [20, 0, 10]], A, [True, False, False], [0, 0, 1])
    s = classify(seg)
    assert s.kind == "inverted-L"
    assert s.earth_lead_length_m == pytest.approx(1.0)
    assert s.segment_section == (-2, 0, 1)
    assert s.feed_height_m == pytest.approx(1.0)


def test_as_dict_is_plain():
    d = classify(polyline_segments([[0, 0, 0.02], [0, 0, 10], [20, 0, 10]], A)).as_dict()
    assert d["kind"] in SHAPE_KINDS
    assert isinstance(d["top_lengths_m"], list) and "segment_section" not in d


def test_feed_away_from_wire_is_rejected():
    with pytest.raises(ModelInputError, match="feed point"):
        classify(polyline_segments([[0, 0, 0.02], [0, 0, 10]], A, feed=[5, 5, 0]))
