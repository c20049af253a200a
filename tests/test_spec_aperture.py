"""The launch.aperture key (a waveguide mouth or horn): read into the model in SI, and every
bad aperture refused with its key path, its line and what was expected (also by the CLI,
exit 2)."""

import re

import pytest

from rfcheck.cli import main
from rfcheck.spec import InputError, load_spec

ON_AXIS = ('launch = { z = "0 mm", direction = "+z", mode = "R", angle_to_field = "0 deg", '
           'polarisation = "circular-right"')
WR340 = 'aperture = { shape = "rectangular", width = "86.36 mm", height = "43.18 mm" }'


def _with(text: str, extra: str) -> str:
    line = re.search(r"^launch = .*$", text, re.M).group(0)
    assert line.startswith(ON_AXIS)
    return text.replace(line, ON_AXIS + ", " + extra + " }")


def _launch_line(text: str) -> int:
    return next(i for i, s in enumerate(text.splitlines(), start=1) if s.startswith("launch ="))


def test_an_aperture_reaches_the_model_in_si_and_makes_the_launch_traced(write_spec, demo_text):
    launch = load_spec(write_spec(_with(demo_text, WR340))).model.feeds[0].launch
    assert launch.traced
    assert (launch.aperture.shape, launch.aperture.width, launch.aperture.height) == (
        "rectangular", pytest.approx(0.08636), pytest.approx(0.04318))
    circ = load_spec(write_spec(_with(demo_text, 'aperture = { shape = "circular", '
                                                 'radius = "45 mm" }'))).model.feeds[0].launch
    assert (circ.aperture.shape, circ.aperture.radius) == ("circular", pytest.approx(0.045))
    plain = load_spec(write_spec(demo_text)).model.feeds[0].launch
    assert plain.aperture is None and not plain.traced


@pytest.mark.parametrize("extra, path, words", [
    pytest.param(WR340[:-2] + ' }, beam = { waist = "50 mm" }', "feed[main].launch.aperture",
                 "not both", id="beam-and-aperture"),
    # λ/2 at 2.45 GHz: c / (2 f) = 61.18 mm (CODATA c)
    pytest.param('aperture = { shape = "rectangular", width = "60 mm", height = "30 mm" }',
                 "feed[main].launch.aperture.width", "below λ/2 = 61.18 mm", id="TE10-cut-off"),
    # TE11 cutoff radius at 2.45 GHz: χ'11 c / (2π f) = 1.84118 × 122.366 mm / 2π = 35.86 mm
    # (χ'11 from Abramowitz & Stegun Table 9.5, from memory; Pozar §3.4)
    pytest.param('aperture = { shape = "circular", radius = "30 mm" }',
                 "feed[main].launch.aperture.radius", "radius above 35.86 mm", id="TE11-cut-off"),
    pytest.param('aperture = { shape = "rectangular", width = "86.36 mm" }',
                 "feed[main].launch.aperture.height", "needs height", id="missing-height"),
    pytest.param('aperture = { shape = "circular", radius = "45 mm", width = "80 mm" }',
                 "feed[main].launch.aperture.width", "takes radius, not width",
                 id="wrong-size-key"),
    pytest.param('aperture = { shape = "rectangular", width = "-86 mm", height = "43 mm" }',
                 "feed[main].launch.aperture.width", "positive", id="negative-width"),
    pytest.param('aperture = { shape = "horn", radius = "45 mm" }',
                 "feed[main].launch.aperture.shape", "rectangular", id="unknown-shape"),
    # 100 λ at 2.45 GHz: 100 c / f = 12.236 m (CODATA c); (nor does it fit the chamber:
    # both are reported)
    pytest.param('aperture = { shape = "circular", radius = "7 m" }',
                 "feed[main].launch.aperture.radius", "expected at most 100 (12236 mm)",
                 id="too-large"),
    # half the WR-340 diagonal: √(86.36² + 43.18²) / 2 = 48.28 mm; + 30 mm > 75 mm
    pytest.param('x = "30 mm", ' + WR340, "feed[main].launch.aperture.width",
                 "does not fit", id="rectangle-off-the-wall"),
    pytest.param('y = "20 mm", aperture = { shape = "circular", radius = "60 mm" }',
                 "feed[main].launch.aperture.radius", "does not fit", id="circle-off-the-wall"),
])
def test_bad_apertures_name_key_line_and_expectation(write_spec, demo_text, extra, path, words):
    text = _with(demo_text, extra)
    with pytest.raises(InputError) as info:
        load_spec(write_spec(text))
    problems = [p for p in info.value.problems if p.path == path]
    assert problems, [str(p) for p in info.value.problems]
    assert problems[0].line == _launch_line(text)
    assert words in problems[0].message


def test_the_cli_refuses_a_cut_off_aperture_with_exit_2_and_the_line(tmp_path, capsys,
                                                                      demo_text):
    text = _with(demo_text, 'aperture = { shape = "rectangular", width = "50 mm", '
                            'height = "25 mm" }')
    spec = tmp_path / "bad.toml"
    spec.write_text(text, encoding="utf-8")
    code = main(["check", str(spec), "--json", str(tmp_path / "r.json")])
    out = capsys.readouterr()
    assert code == 2
    assert f"bad.toml:{_launch_line(text)}:" in out.err
    assert "feed[main].launch.aperture.width" in out.err
    assert "expected a width above λ/2" in out.err
    assert "Traceback" not in out.err + out.out
    assert not (tmp_path / "r.json").exists()
