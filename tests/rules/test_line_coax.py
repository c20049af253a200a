"""line.breakdown and line.waveguide-band on coaxial feeds, against the coaxial closed forms
(Pozar, Microwave Engineering 4th ed.: §2.2 TEM field E = V/(ρ ln(b/a)), P = V²/(2 Z0);
§2.3 standing wave; §2.7 conductor loss; §3.5 TE11 cutoff ≈ c/(π (a + b) √ε_r))."""

from __future__ import annotations

import math

import pytest

from rfcheck.findings import Status
from rfcheck.physics.constants import C, ETA0

from test_line_rules import E_AIR, evaluate, make_feed


def _p_max(d, big_d, eps_r=1.0, e=E_AIR):
    a, b = d / 2, big_d / 2
    z0 = ETA0 * math.log(b / a) / (2 * math.pi * math.sqrt(eps_r))
    v = e * a * math.log(b / a)          # the voltage that puts E at the inner conductor
    return v * v / (2 * z0)              # P = V² / (2 Z0)


@pytest.mark.parametrize("line, d, big_d, eps_r", [
    pytest.param("EIA-1-5/8", 16.866e-3, 38.786e-3, 1.0, id="EIA 1-5/8 air"),
    pytest.param("coax:2.968/10 mm, eps_r 2.1", 2.968e-3, 10e-3, 2.1, id="declared PTFE line"),
])
def test_coax_peak_field_at_p_max_is_the_breakdown_field(base_model, policy, line, d, big_d, eps_r):
    p = _p_max(d, big_d, eps_r)
    (fd,) = evaluate(base_model, "line.breakdown", policy, make_feed(line, 13.56e6, power=p),
                     state="ignition", safety_factor=1.0)
    assert fd.measured.value == pytest.approx(E_AIR, rel=1e-9)
    assert fd.status is Status.PASS  # exactly at the limit: margin 0 within rounding
    assert "Z0 " in fd.message and "conductor heat" in fd.message


def test_coax_full_reflection_doubles_the_field(base_model, policy):
    # unlit cavity not declared matched: |Γ| = 1, peak field (1 + 1) E0 (Pozar §2.3)
    p = _p_max(16.866e-3, 38.786e-3) / 4 * 1.01  # just above a quarter of P_max
    (fd,) = evaluate(base_model, "line.breakdown", policy,
                     make_feed("EIA-1-5/8", 13.56e6, power=p, cold_gamma=1.0),
                     state="ignition", safety_factor=1.0)
    # E0 = E_bd √(1.01/4) = E_bd √1.01 / 2, doubled: E_bd √1.01, just above the limit
    assert fd.measured.value == pytest.approx(E_AIR * math.sqrt(1.01), rel=1e-9)
    assert fd.status is Status.FAIL


def test_coax_message_heat_per_metre_hand_value(base_model, policy):
    # EIA 1-5/8 at 13.56 MHz, 1 kW, copper 5.8e7 S/m, matched (|Γ| = 0 declared):
    # R_s = √(π f μ0/σ) = 9.607e-4 ohm; (1/a + 1/b) = 118.58 + 51.57 = 170.15 /m;
    # α = R_s (1/a + 1/b) / (2 η0 ln(b/a)) = 0.16346 / 627.75 = 2.604e-4 Np/m;
    # heat 2 α P = 0.521 W/m (Pozar §2.7)
    (fd,) = evaluate(base_model, "line.breakdown", policy,
                     make_feed("EIA-1-5/8", 13.56e6, power=1e3), state="ignition")
    assert "conductor heat 521 mW/m" in fd.message, fd.message


def test_coax_band_declared_line_te11(base_model, policy):
    # declared 3.5/8 mm PTFE line at 12 GHz: TE11 ≈ c/(π (a+b) √2.1) = 11.45 GHz → two modes
    te11 = C / (math.pi * (1.75e-3 + 4e-3) * math.sqrt(2.1))
    assert te11 / 1e9 == pytest.approx(11.45, abs=0.01)
    (fd,) = evaluate(base_model, "line.waveguide-band", policy,
                     make_feed("coax:3.5/8 mm, eps_r 2.1", 12e9))
    assert fd.status is Status.FAIL and "TE11" in fd.requirement
    (ok,) = evaluate(base_model, "line.waveguide-band", policy,
                     make_feed("coax:3.5/8 mm, eps_r 2.1", 2.45e9))
    assert ok.status is Status.PASS
    assert ok.limit.value == pytest.approx(0.95 * te11, rel=1e-12)
