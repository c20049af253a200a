"""line.* rules on corrugated HE11 feeds ("he11:<D> mm"), against the closed forms of the HE11
mode: E(r) = E0 J0(j01 r/a), P = E0² π a² J1(j01)²/(2η0) (Lommel integral; J1(j01) = 0.519147,
Abramowitz & Stegun table 9.5), the air limit 3 MV/m (reference values §5, common practice)
and the oversize a/λ ≥ 3 the HE11 forms need."""

from __future__ import annotations

import math

import pytest

from rfcheck.findings import Status
from rfcheck.physics.constants import C, ETA0

from test_line_rules import E_AIR, evaluate, make_feed


def _p_max(diameter, e=E_AIR):
    a = diameter / 2
    return e * e * math.pi * a * a * 0.5191474973 ** 2 / (2 * ETA0)


def test_he11_axis_field_at_p_max_is_the_breakdown_field(base_model, policy):
    p = _p_max(0.0635)
    assert p == pytest.approx(10.2e6, rel=2e-3)  # 10.2 MW for 63.5 mm at 3 MV/m (hand)
    (fd,) = evaluate(base_model, "line.breakdown", policy, make_feed("he11:63.5 mm", 140e9, power=p),
                     state="ignition", safety_factor=1.0)
    assert fd.measured.value == pytest.approx(E_AIR, rel=1e-9)
    assert "HE11" in fd.message
    (fd,) = evaluate(base_model, "line.breakdown", policy,
                     make_feed("he11:63.5 mm", 140e9, power=0.999 * p),
                     state="ignition", safety_factor=1.0)
    assert fd.measured.value == pytest.approx(E_AIR * math.sqrt(0.999), rel=1e-9)
    assert fd.status is Status.PASS


def test_full_reflection_doubles_the_he11_field(base_model, policy):
    p = _p_max(0.0635) / 4 * 1.01  # just above a quarter of P_max: (1 + 1) E0 > E_bd
    (fd,) = evaluate(base_model, "line.breakdown", policy,
                     make_feed("he11:63.5 mm", 140e9, power=p, cold_gamma=1.0),
                     state="ignition", safety_factor=1.0)
    assert fd.measured.value == pytest.approx(2 * E_AIR * math.sqrt(1.01 / 4), rel=1e-9)
    assert fd.status is Status.FAIL


@pytest.mark.parametrize("line, f, ratio, status", [
    pytest.param("he11:63.5 mm", 140e9, 0.03175 * 140e9 / C, Status.PASS, id="63.5 mm, 140 GHz: a/λ 14.8"),
    pytest.param("he11:12 mm", 140e9, 0.006 * 140e9 / C, Status.FAIL, id="12 mm, 140 GHz: a/λ 2.8"),
])
def test_waveguide_band_checks_the_oversize(base_model, policy, line, f, ratio, status):
    (fd,) = evaluate(base_model, "line.waveguide-band", policy, make_feed(line, f))
    assert fd.measured.value == pytest.approx(ratio, rel=1e-12)
    assert fd.limit.value == 3.0
    assert fd.status is status
    assert "TE10" not in fd.message or "no TE/TM cutoff" in fd.message
