"""Coaxial line: impedance, TE11 cutoff, inner-conductor field, power capacity and wall loss,
against closed forms (Pozar, Microwave Engineering 4th ed. §2.2, §2.7, §3.5), a numerical
integration of the TEM Poynting flux, the exact TE11 root and scikit-rf's coaxial medium."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import quad
from scipy.optimize import brentq, minimize_scalar
from scipy.special import jvp, yvp

from rfcheck.physics import coaxial as cx
from rfcheck.physics import waveguide as wg
from rfcheck.physics.constants import C, ETA0

skrf = pytest.importorskip("skrf")

D_IN, D_OUT = 8.433e-3, 19.406e-3  # the EIA-7/8 catalogue entry (about 50 ohm)


def _freq(f):
    return skrf.Frequency.from_f(np.atleast_1d(f), unit="Hz")


def _poynting_power(v_peak, a, b, eps_r):
    """P = ∫ ½ E H 2πρ dρ over the annulus with E = V/(ρ ln(b/a)), H = E √ε_r / η0:
    the TEM field of Pozar §2.2 integrated numerically (scipy.integrate.quad)."""
    ln = math.log(b / a)
    integrand = lambda r: 0.5 * (v_peak / (r * ln)) ** 2 * math.sqrt(eps_r) / ETA0 * 2 * math.pi * r  # noqa: E731
    return quad(integrand, a, b, epsabs=0, epsrel=1e-12)[0]


@pytest.mark.parametrize("eps_r", [1.0, 2.1])
def test_field_amplitude_against_integrated_poynting_flux(eps_r):
    # choose V, integrate the flux to get P, then the field at ρ = a must be V/(a ln(b/a))
    a, b, v = D_IN / 2, D_OUT / 2, 1.0e4
    p = _poynting_power(v, a, b, eps_r)
    e = float(cx.coaxial_field_amplitude(p, D_IN, D_OUT, eps_r))
    assert e == pytest.approx(v / (a * math.log(b / a)), rel=1e-10)


def test_max_power_is_the_power_at_the_breakdown_field():
    # P_max inverts the field amplitude: E(P_max) = E_bd (closed form, Pozar §2.2)
    e_bd = 3e6
    p_max = float(cx.coaxial_max_power(D_IN, D_OUT, e_bd))
    assert float(cx.coaxial_field_amplitude(p_max, D_IN, D_OUT)) == pytest.approx(e_bd, rel=1e-12)
    # hand value: π a² E² ln(b/a) / η0 with a = 4.2165 mm, ln(2.3012) = 0.83343
    assert p_max == pytest.approx(math.pi * 4.2165e-3**2 * 9e12 * 0.833430 / 376.730313, rel=2e-5)
    # by hand: π · 1.77789e-5 m² · 9e12 V²/m² · 0.83343 / 376.73 ohm = 1.1121 MW (air 7/8 in line)
    assert p_max == pytest.approx(1.1121e6, rel=1e-4)


def test_max_power_at_fixed_outer_diameter_peaks_at_30_ohm():
    # textbook result (Pozar §2.2 problem; common practice "30 ohm for power"): for fixed b
    # the capacity a² ln(b/a) is largest at b/a = √e, Z0 = η0/(4π) = 29.98 ohm in air
    res = minimize_scalar(lambda d: -float(cx.coaxial_max_power(d, D_OUT, 3e6)),
                          bounds=(1e-3, D_OUT * 0.99), method="bounded",
                          options={"xatol": 1e-10})
    assert D_OUT / res.x == pytest.approx(math.sqrt(math.e), rel=1e-4)
    assert float(wg.coaxial_characteristic_impedance(res.x, D_OUT)) == pytest.approx(
        ETA0 / (4 * math.pi), rel=1e-4)


def test_standing_wave_raises_the_peak_field_by_one_plus_gamma():
    # Pozar §2.3: |V|max = |V+| (1 + |Γ|)
    e0 = float(cx.coaxial_peak_field(1e4, D_IN, D_OUT, 0.0))
    assert float(cx.coaxial_peak_field(1e4, D_IN, D_OUT, 0.5)) == pytest.approx(1.5 * e0, rel=1e-14)
    assert float(cx.coaxial_peak_field(1e4, D_IN, D_OUT, 1.0)) == pytest.approx(2 * e0, rel=1e-14)


@pytest.mark.parametrize("f, eps_r", [(13.56e6, 1.0), (1e8, 1.0), (1e9, 2.1)])
def test_conductor_attenuation_against_scikit_rf(f, eps_r):
    # scikit-rf media.Coaxial computes γ = √(ZY) from its distributed R (its own surface
    # resistance of both conductors); the low-loss form α = R/(2 Z0) of Pozar §2.7 agrees to
    # the 1e-3 level (the two R differ by ~4e-4 relative at these sizes)
    ref = skrf.media.Coaxial(_freq(f), Dint=D_IN, Dout=D_OUT, epsilon_r=eps_r, tan_delta=0,
                             sigma=cx.COPPER_CONDUCTIVITY)
    ours = float(cx.coaxial_conductor_attenuation(f, D_IN, D_OUT, eps_r))
    assert ours == pytest.approx(float(ref.alpha[0]), rel=1e-3)


def test_conductor_attenuation_hand_value():
    # Pozar §2.7 closed form by hand at 100 MHz, copper 5.8e7 S/m:
    # R_s = √(π f μ0/σ) = 2.6089e-3 ohm; (1/a + 1/b) = 237.16 + 103.06 = 340.22 /m;
    # α = R_s (1/a+1/b) / (2 η0 ln(b/a)) = 0.88762 / 627.95 = 1.41352e-3 Np/m (0.01228 dB/m)
    assert float(cx.coaxial_conductor_attenuation(1e8, D_IN, D_OUT)) == pytest.approx(1.41352e-3,
                                                                                      rel=2e-5)
    heat = float(cx.coaxial_wall_heating(1000.0, 1e8, D_IN, D_OUT))
    assert heat == pytest.approx(2 * 1.41352e-3 * 1000.0, rel=2e-5)  # 2.83 W/m per kW
    # at a current maximum of a |Γ| = 0.2 standing wave: (1 + 0.2)² times the matched heat
    assert float(cx.coaxial_wall_heating(1000.0, 1e8, D_IN, D_OUT, gamma_mag=0.2)) == \
        pytest.approx(1.44 * heat, rel=1e-12)


def test_attenuation_scales_as_root_frequency():
    # R_s ∝ √f (skin effect, Pozar §1.7)
    a1 = float(cx.coaxial_conductor_attenuation(1e8, D_IN, D_OUT))
    a4 = float(cx.coaxial_conductor_attenuation(4e8, D_IN, D_OUT))
    assert a4 / a1 == pytest.approx(2.0, rel=1e-12)


def test_characteristic_impedance_of_declared_lines_against_scikit_rf():
    # PTFE-filled 50 ohm: d = D / exp(50 · 2π √2.1 / η0) = 10 mm / 3.3693 = 2.968 mm
    for name, eps_r in (("coax:8.433/19.406 mm", 1.0), ("coax:2.968/10 mm, eps_r 2.1", 2.1)):
        line = wg.line_from_name(name)
        d, big_d = line.dimension("inner_diameter"), line.dimension("outer_diameter")
        assert line.eps_r == eps_r
        ref = skrf.media.Coaxial(_freq(1e8), Dint=d, Dout=big_d, epsilon_r=eps_r, tan_delta=0,
                                 sigma=1e30)
        ours = float(wg.coaxial_characteristic_impedance(d, big_d, eps_r))
        assert ours == pytest.approx(float(ref.z0_characteristic.real[0]), rel=1e-6)
        assert ours == pytest.approx(50.0, abs=0.3)  # both about 50 ohm (Pozar §2.2 closed form)


def _te11_exact(a, b, eps_r):
    """Smallest root of J1'(k a) Y1'(k b) − J1'(k b) Y1'(k a) = 0 (Marcuvitz §2.4), as Hz."""
    g = lambda k: jvp(1, k * a) * yvp(1, k * b) - jvp(1, k * b) * yvp(1, k * a)  # noqa: E731
    k0 = 2.0 / (a + b)
    return brentq(g, 0.7 * k0, 1.2 * k0) * C / (2 * math.pi * math.sqrt(eps_r))


@pytest.mark.parametrize("name", ["EIA-7/8", "coax:2.968/10 mm, eps_r 2.1"])
def test_declared_line_band_is_below_the_approximate_te11_cutoff(name):
    line = wg.line_from_name(name)
    a, b = line.dimension("inner_diameter") / 2, line.dimension("outer_diameter") / 2
    exact = _te11_exact(a, b, line.eps_r)
    # f_c ≈ c/(π (a+b) √ε_r) (Pozar §3.5): within 4 % of the exact root and below it
    assert line.next_cutoff == pytest.approx(C / (math.pi * (a + b) * math.sqrt(line.eps_r)), rel=1e-14)
    assert exact * 0.96 < line.next_cutoff <= exact
    assert line.recommended_band == (0.0, pytest.approx(0.95 * line.next_cutoff, rel=1e-14))


def test_eia_7_8_hand_values():
    # inner 0.332 in, outer bore 0.764 in: Z0 = 59.9585 ln(2.3012) = 49.97 ohm (air);
    # TE11 ≈ 2c / (π (d + D)) = 599.585e6 / (π · 27.839e-3) = 6.856 GHz
    line = wg.line_from_name("eia 7/8")
    assert float(wg.coaxial_characteristic_impedance(D_IN, D_OUT)) == pytest.approx(49.971, abs=2e-3)
    assert line.next_cutoff / 1e9 == pytest.approx(6.8556, abs=2e-4)


@pytest.mark.parametrize("bad", ["coax:10/5 mm", "coax:5/5 mm", "coax:1/2 mm, eps_r 0.5",
                                 "coax:0/2 mm", "coax:1/2e9 mm", "coax:1/2", "coax:1/2 mm eps_r"])
def test_bad_declared_coax_is_a_value_error_with_a_message(bad):
    with pytest.raises(ValueError, match=r"coax"):
        wg.line_from_name(bad)
