"""The worst envelope corner of a ray study: a rounding difference never decides it."""

from types import SimpleNamespace

from rfcheck.analysis.rays import TIE, RayStudy


def _study(values):
    study = RayStudy(None, "R", 1, 0.0875, None, label="")
    study.corners = [SimpleNamespace(reach=v, name=i) for i, v in enumerate(values)]
    return study


def test_corners_equal_to_rounding_take_the_first_in_corner_order():
    # 0.9996645373720975 and …0974 differ by one unit in the last place: a tie
    s = _study([0.9996645373720975, 0.9996645373720974, 0.999])
    assert s.worst(lambda c: c.reach, "max").name == 0
    assert s.worst(lambda c: c.reach).name == 2


def test_a_real_difference_still_picks_the_worse_corner():
    s = _study([0.5, 0.5 - 10 * TIE, 0.7])
    assert s.worst(lambda c: c.reach).name == 1
    assert s.worst(lambda c: c.reach, "max").name == 2
