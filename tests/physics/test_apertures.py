"""Below-cutoff attenuation of tubes and arrays (rfcheck.physics.apertures) against closed forms.

References beside each check:
* circular TE11: f_c = p'11 c/(π d), p'11 = 1.841184 (first zero of J1'; Abramowitz & Stegun
  Table 9.5), α = (2π f_c/c) √(1 − (f/f_c)²) (Pozar, Microwave Engineering, 4th ed., §3.4);
* rectangular TE10: f_c = c/(2w), α likewise (Pozar §3.3);
* far below cutoff: 8.686 · 2 p'11 / d = 31.98 dB per diameter of length (circular) and
  8.686 · π / w = 27.29 dB per width of length (rectangular) (common practice: "32 t/d" and
  "27.3 t/w");
* n cells: −10 log10 n (common practice; Ott 2009, from memory).
"""

import math

import pytest

from rfcheck.physics.apertures import array_attenuation_db, tube_attenuation_db, tube_cutoff
from rfcheck.physics.constants import C

P11 = 1.841184  # first zero of J1' (Abramowitz & Stegun, Table 9.5)


def test_circular_cutoff_and_attenuation_closed_form():
    d, t, f = 0.010, 0.030, 2.45e9
    fc = P11 * C / (math.pi * d)
    assert tube_cutoff("circular", diameter=d) == pytest.approx(fc, rel=1e-6)
    expected = 20 * math.log10(math.e) * (2 * math.pi * fc / C) * math.sqrt(1 - (f / fc) ** 2) * t
    assert tube_attenuation_db("circular", t, f, diameter=d) == pytest.approx(expected, rel=1e-6)


def test_rectangular_cutoff_and_attenuation_closed_form():
    w, h, t, f = 0.006, 0.004, 0.012, 2.45e9
    fc = C / (2 * w)
    assert tube_cutoff("rectangular", width=w, height=h) == pytest.approx(fc)
    assert tube_cutoff("rectangular", width=h, height=w) == pytest.approx(fc)  # larger side
    expected = 20 * math.log10(math.e) * (math.pi / w) * math.sqrt(1 - (f / fc) ** 2) * t
    assert tube_attenuation_db("rectangular", t, f, width=w, height=h) == pytest.approx(expected)


@pytest.mark.parametrize("shape, dims, per_length", [
    pytest.param("circular", {"diameter": 0.004}, 20 * math.log10(math.e) * 2 * P11,
                 id="TE11: 31.98 dB per diameter of length (common practice 32 t/d)"),
    pytest.param("rectangular", {"width": 0.004, "height": 0.004}, 20 * math.log10(math.e) * math.pi,
                 id="TE10: 27.29 dB per width of length (common practice 27.3 t/w)"),
])
def test_far_below_cutoff_limits(shape, dims, per_length):
    size = dims.get("diameter", dims.get("width"))
    a = tube_attenuation_db(shape, 3 * size, 1e6, **dims)  # f/f_c ~ 3e-5
    assert a / 3 == pytest.approx(per_length, rel=1e-6)
    assert per_length == pytest.approx(31.98 if shape == "circular" else 27.29, abs=0.01)


def test_at_and_above_cutoff_there_is_no_attenuation():
    fc = tube_cutoff("circular", diameter=0.01)
    assert tube_attenuation_db("circular", 0.03, fc, diameter=0.01) == pytest.approx(0.0, abs=1e-9)
    assert tube_attenuation_db("rectangular", 0.03, 30e9, width=0.01, height=0.01) == 0.0


def test_array_of_cells_loses_10_log_n():
    assert array_attenuation_db(60.0, 100) == pytest.approx(40.0)
    assert array_attenuation_db(60.0, 1) == pytest.approx(60.0)
