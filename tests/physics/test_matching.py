"""Matching networks (rfcheck.physics.matching) against the closed forms of the L section
(D. M. Pozar, Microwave Engineering, 4th ed., §5.1; C. Bowick, RF Circuit Design, 2nd ed.,
ch. 4: Q = √(R_high/R_low − 1), X_series = Q R_low, B_shunt = Q/R_high) and against the
match condition itself (the input impedance of the solved ladder equals Z0)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from rfcheck.physics.matching import (Element, input_impedance, l_section_q, match_network)

F = 13.56e6
W = 2 * math.pi * F


@pytest.mark.parametrize("r_high, r_low, q", [
    pytest.param(50.0, 5.0, 3.0, id="50 to 5 ohm: Q = 3 (Bowick ch. 4 form)"),
    pytest.param(50.0, 25.0, 1.0, id="50 to 25 ohm: Q = 1"),
    pytest.param(50.0, 0.5, math.sqrt(99.0), id="50 to 0.5 ohm: Q = √99 (an ICP coil load)"),
])
def test_l_section_q(r_high, r_low, q):
    assert float(l_section_q(r_high, r_low)) == pytest.approx(q, rel=1e-12)


def test_resistive_load_shunt_c_series_l_closed_form():
    # 5 Ω load to 50 Ω: Q = 3, series X = Q R_low = 15 Ω, shunt B = Q / R_high = 0.06 S
    els = [Element("capacitor", "shunt", 1e-12, 1e-8), Element("inductor", "series", 1e-9, 1e-5)]
    m = match_network(els, 5.0 + 0j, F)
    assert W * m.values[0] == pytest.approx(0.06, rel=1e-12)  # B = ωC
    assert W * m.values[1] == pytest.approx(15.0, rel=1e-12)  # X = ωL
    assert complex(input_impedance(els, m.values, 5.0, F)) == pytest.approx(50.0, abs=1e-9)


def test_resistive_load_series_l_shunt_c_closed_form():
    # 200 Ω load (above Z0): shunt across the load, series on the generator side:
    # Q = √(200/50 − 1) = √3, shunt B = Q/R_high = √3/200 S, series X = Q R_low = 50√3 Ω
    els = [Element("inductor", "series", 1e-9, 1e-4), Element("capacitor", "shunt", 1e-13, 1e-8)]
    m = match_network(els, 200.0 + 0j, F)
    q = math.sqrt(3.0)
    assert W * m.values[0] == pytest.approx(50.0 * q, rel=1e-12)
    assert W * m.values[1] == pytest.approx(q / 200.0, rel=1e-12)


def test_inductive_coil_load_two_capacitor_l():
    # coil Z = R + jX: the series branch must keep X' = √(R (Z0 − R)) (Pozar §5.1), so
    # C_tune = 1/(ω (X − X')), C_load = X' / (ω R Z0)
    r, x = 1.2, 300.0
    xp = math.sqrt(r * (50.0 - r))
    els = [Element("capacitor", "shunt", 10e-12, 5000e-12),
           Element("capacitor", "series", 5e-12, 1000e-12)]
    m = match_network(els, r + 1j * x, F)
    assert m.values[0] == pytest.approx(xp / (W * r * 50.0), rel=1e-12)
    assert m.values[1] == pytest.approx(1.0 / (W * (x - xp)), rel=1e-12)
    # margins: distance to the nearer end as a fraction of the range
    c1, c2 = m.values
    want = min((c1 - 10e-12) / 4990e-12, (5000e-12 - c1) / 4990e-12,
               (c2 - 5e-12) / 995e-12, (1000e-12 - c2) / 995e-12)
    assert float(m.margin) == pytest.approx(want, rel=1e-12)


def test_out_of_range_and_wrong_kind():
    # a range that cannot hold the load capacitor: negative margin, still the exact solution
    els = [Element("capacitor", "shunt", 10e-12, 100e-12),
           Element("capacitor", "series", 5e-12, 1000e-12)]
    m = match_network(els, 1.2 + 300j, F)
    assert m.margin < 0 and m.tightest == 0
    # a capacitive load cannot be tuned out by a series capacitor alone: no solution
    m = match_network(els, 1.2 - 300j, F)
    assert m.margin == -np.inf


@pytest.mark.parametrize("els", [
    pytest.param([Element("capacitor", "shunt", 50e-12, 1500e-12),
                  Element("inductor", "series", 0.1e-6, 5e-6),
                  Element("capacitor", "shunt", 20e-12, 500e-12)], id="pi"),
    pytest.param([Element("capacitor", "series", 50e-12, 1500e-12),
                  Element("capacitor", "shunt", 50e-12, 2000e-12),
                  Element("capacitor", "series", 20e-12, 500e-12)], id="T"),
])
def test_three_element_networks_match(els):
    z = np.array([1 + 300j, 3 + 280j])
    m = match_network(els, z, F)
    assert np.all(np.isfinite(m.margin))
    zin = input_impedance(els, m.values, z, F)
    np.testing.assert_allclose(zin, 50.0, atol=1e-8)
    for el, v in zip(els, m.values):  # the chosen values sit in their ranges where margin ≥ 0
        ok = m.margin >= 0
        assert np.all((v[ok] >= el.low) & (v[ok] <= el.high))


def test_bad_ladders_refused():
    with pytest.raises(ValueError):
        match_network([Element("capacitor", "shunt", 1e-12, 1e-9)] * 2, 1 + 1j, F)
    with pytest.raises(ValueError):
        match_network([Element("capacitor", "shunt", 1e-9, 1e-12),
                       Element("capacitor", "series", 1e-12, 1e-9)], 1 + 1j, F)


def test_every_solution_matches_hypothesis():
    # property: wherever a solution exists its ladder's input impedance is Z0 (the match
    # condition that defines it), for loads across an ICP's range and all four L orders
    from hypothesis import given, settings
    from hypothesis import strategies as st

    orders = [
        [Element("capacitor", "shunt", 1e-13, 1e-7), Element("capacitor", "series", 1e-13, 1e-7)],
        [Element("capacitor", "shunt", 1e-13, 1e-7), Element("inductor", "series", 1e-10, 1e-3)],
        [Element("capacitor", "series", 1e-13, 1e-7), Element("capacitor", "shunt", 1e-13, 1e-7)],
        [Element("inductor", "series", 1e-10, 1e-3), Element("capacitor", "shunt", 1e-13, 1e-7)],
    ]

    @settings(max_examples=200, deadline=None)
    @given(st.floats(0.1, 500.0), st.floats(-1000.0, 1000.0), st.sampled_from(range(4)))
    def check(r, x, which):
        els = orders[which]
        m = match_network(els, complex(r, x), F)
        if np.isfinite(m.margin):
            zin = complex(input_impedance(els, m.values, complex(r, x), F))
            assert zin == pytest.approx(50.0, rel=1e-8, abs=1e-8)

    check()
