"""Launch keys for off-axis, oblique and beam launches: read into the model in SI, and every
bad value refused with its key path, its line and what was expected."""

import math
import re

import pytest

from rfcheck.spec import InputError, load_spec

ON_AXIS = ('launch = { z = "0 mm", direction = "+z", mode = "R", angle_to_field = "0 deg", '
           'polarisation = "circular-right"')


def _with(text: str, extra: str) -> str:
    line = re.search(r"^launch = .*$", text, re.M).group(0)
    assert line.startswith(ON_AXIS)
    return text.replace(line, ON_AXIS + ", " + extra + " }")


def test_the_on_axis_launch_stays_the_default(write_spec, demo_text):
    launch = load_spec(write_spec(demo_text)).model.feeds[0].launch
    assert (launch.x, launch.y, launch.tilt, launch.beam, launch.target) == (0, 0, 0, None, None)
    assert not launch.traced
    assert list(launch.wave_direction) == [0.0, 0.0, 1.0]


def test_off_axis_oblique_beam_keys_reach_the_model_in_si(write_spec, demo_text):
    text = _with(demo_text, 'x = "10 mm", y = "-5 mm", tilt = "30 deg", tilt_azimuth = "90 deg", '
                            'beam = { waist = "5 cm", waist_distance = "-2 cm" }, '
                            'target = { landmark = "substrate", half_width = "15 mm" }')
    launch = load_spec(write_spec(text)).model.feeds[0].launch
    assert (launch.x, launch.y) == pytest.approx((0.010, -0.005))
    assert launch.off_axis == pytest.approx(math.hypot(0.010, 0.005))
    assert launch.traced
    # tilt 30° in the plane at 90° from +x: k = (0, sin 30°, cos 30°)
    assert list(launch.wave_direction) == pytest.approx([0.0, 0.5, math.sqrt(3) / 2])
    assert (launch.beam.waist, launch.beam.waist_distance) == pytest.approx((0.05, -0.02))
    # the landmark substrate sits at z = 260 mm in the bench reactor
    assert (launch.target.z_start, launch.target.z_end) == pytest.approx((0.245, 0.275))


@pytest.mark.parametrize("extra, path, words", [
    pytest.param('x = "80 mm"', "feed[main].launch.x", "chamber radius (75 mm)", id="off-wall"),
    pytest.param('tilt = "90 deg"', "feed[main].launch.tilt", "below 90 deg", id="tilt-90"),
    pytest.param('tilt = "-5 deg"', "feed[main].launch.tilt", "≥ 0", id="tilt-negative"),
    pytest.param('tilt = "5 mm"', "feed[main].launch.tilt", "angle", id="tilt-unit"),
    pytest.param('tilt_azimuth = "10 deg"', "feed[main].launch.tilt_azimuth", "give tilt too",
                 id="azimuth-alone"),
    # λ/π at 2.45 GHz: c / (π f) = 38.95 mm (CODATA c)
    pytest.param('beam = { waist = "20 mm" }', "feed[main].launch.beam.waist",
                 "below λ/π = 38.95 mm", id="waist-not-paraxial"),
    pytest.param('x = "30 mm", beam = { waist = "50 mm" }', "feed[main].launch.beam.waist",
                 "does not fit", id="beam-too-wide"),
    pytest.param('beam = { waist = "0 mm" }', "feed[main].launch.beam.waist", "positive",
                 id="waist-zero"),
    pytest.param('target = { landmark = "nowhere", half_width = "5 mm" }',
                 "feed[main].launch.target.landmark", "expected one of substrate",
                 id="unknown-landmark"),
    pytest.param('target = { landmark = "substrate" }', "feed[main].launch.target.half_width",
                 "needs half_width", id="landmark-without-width"),
    pytest.param('target = { start = "100 mm" }', "feed[main].launch.target.end",
                 "both start and end", id="slice-half"),
    pytest.param('target = { start = "100 mm", end = "50 mm" }', "feed[main].launch.target.end",
                 "beyond start", id="slice-reversed"),
    pytest.param('target = { start = "1 mm", end = "5 mm", landmark = "substrate" }',
                 "feed[main].launch.target", "not both", id="slice-and-landmark"),
])
def test_bad_ray_launch_keys_name_key_line_and_expectation(write_spec, demo_text, extra, path,
                                                           words):
    text = _with(demo_text, extra)
    line = next(i for i, s in enumerate(text.splitlines(), start=1) if s.startswith("launch ="))
    with pytest.raises(InputError) as info:
        load_spec(write_spec(text))
    problems = [p for p in info.value.problems if p.path == path]
    assert problems, [str(p) for p in info.value.problems]
    assert problems[0].line == line
    assert words in problems[0].message
