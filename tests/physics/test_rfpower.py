"""Peak fields, power capacity, breakdown scaling, below-cutoff tubes and disc heating."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import dblquad, solve_bvp

from rfcheck.physics import rfpower as rp
from rfcheck.physics import waveguide as wg
from rfcheck.physics.constants import C, ETA0

# reference-values §5 P_max table, E_bd = 3 MV/m; values as printed (MW), so the tolerance
# is half a unit of the last printed digit
P_MAX_TABLE = [
    ("WR-975", 915e6, "137.3"), ("WR-430", 2.45e9, "29.51"), ("WR-340", 2.45e9, "15.72"),
    ("WR-284", 2.45e9, "7.768"), ("WR-284", 3.0e9, "10.58"), ("WR-187", 5.8e9, "5.280"),
    ("WR-137", 6.4e9, "2.435"), ("WR-90", 10e9, "1.047"), ("WR-62", 14.5e9, "0.564"),
    ("WR-62", 18e9, "0.633"), ("WR-42", 24e9, "0.223"), ("WR-28", 28e9, "0.099"),
]


@pytest.mark.parametrize("name, f, printed", P_MAX_TABLE,
                         ids=[f"{n} @ {f / 1e9:g} GHz reference-values §5 (Pozar §3.3 P_max)"
                              for n, f, _ in P_MAX_TABLE])
def test_te10_power_capacity_table(name, f, printed):
    line = wg.line_from_name(name)
    p = rp.te10_max_power(line.dimension("a"), line.dimension("b"), f) / 1e6
    decimals = len(printed.split(".")[1])
    assert float(p) == pytest.approx(float(printed), abs=0.5 * 10 ** -decimals)


def test_power_density_coefficient():
    # reference-values §5: E²/(4η0) = 5.9724e9 W/m² = 597.24 kW/cm² at 3 MV/m
    a = b = 1.0
    p = rp.te10_max_power(a, b, 1e15)  # far above cutoff: √(1 − (f_c/f)²) → 1
    assert float(p) == pytest.approx(5.9724e9, rel=1e-5)
    assert rp.AIR_BREAKDOWN_FIELD == 3.0e6  # common practice, 30 kV/cm


@pytest.mark.parametrize("s, fraction", [(1.5, 0.667), (2.0, 0.5), (3.0, 0.333)],
                         ids=["VSWR 1.5 (reference-values §5)", "VSWR 2", "VSWR 3"])
def test_mismatch_derating(s, fraction):
    g = (s - 1) / (s + 1)
    assert float(rp.vswr(g)) == pytest.approx(s, rel=1e-14)
    assert float(rp.max_net_power(1.0, g)) == pytest.approx(fraction, abs=5e-4)
    # the derated forward power puts the standing-wave maximum exactly at breakdown
    a, b, f = 86.36e-3, 43.18e-3, 2.45e9
    p_max = rp.te10_max_power(a, b, f)
    p_fwd = rp.max_forward_power(p_max, g)
    assert float(rp.te10_peak_field(p_fwd, a, b, f, g)) == pytest.approx(rp.AIR_BREAKDOWN_FIELD, rel=1e-12)
    # net = forward − reflected
    assert float(p_fwd - rp.reflected_power(p_fwd, g)) == pytest.approx(float(rp.max_net_power(p_max, g)),
                                                                         rel=1e-12)


def test_te10_field_amplitude_against_poynting_integral():
    # P = ∫∫ |E_y|²/(2 Z_TE) dx dy with E_y = E0 sin(πx/a) (Pozar §3.3), integrated numerically
    a, b, f, e0 = 86.36e-3, 43.18e-3, 2.45e9, 1.0e5
    z = ETA0 / math.sqrt(1 - (C / (2 * a * f)) ** 2)
    p, _ = dblquad(lambda y, x: (e0 * math.sin(math.pi * x / a)) ** 2 / (2 * z), 0, a, 0, b)
    assert float(rp.te10_field_amplitude(p, a, b, f)) == pytest.approx(e0, rel=1e-10)
    assert float(rp.te10_peak_field(p, a, b, f, 0.5)) == pytest.approx(1.5 * e0, rel=1e-10)
    assert np.isnan(rp.te10_field_amplitude(1.0, a, b, 1.0e9))  # below cutoff


def test_return_loss():
    # RL = −20 log10 |Γ| (Pozar §2.3): |Γ| = 0.2 → 13.979 dB, VSWR 1.5
    assert float(rp.return_loss_db(0.2)) == pytest.approx(13.9794, abs=1e-4)
    assert float(rp.vswr(0.2)) == pytest.approx(1.5, rel=1e-14)


def test_breakdown_scaling():
    # 1 atm air: the common-practice 3 MV/m; linear in pressure (E/p similarity) and gas factor
    assert float(rp.breakdown_field()) == pytest.approx(3.0e6, rel=1e-14)
    assert float(rp.breakdown_field(2 * rp.REFERENCE_PRESSURE, gas_factor=2.5)) == pytest.approx(15e6)
    # reference-values §5: ν_c = ω at p ≈ 2.9 Torr for 2.45 GHz (with ν_c = 5.3e9 p[Torr], MacDonald)
    p_torr = 2 * math.pi * 2.45e9 / 5.3e9
    assert p_torr == pytest.approx(2.9, abs=0.01)
    p_pa = p_torr * 101325 / 760
    assert float(rp.air_collision_frequency(p_pa)) == pytest.approx(2 * math.pi * 2.45e9, rel=1e-12)
    # at 1 atm the effective-field correction is below 0.1 % at 2.45 GHz
    assert float(rp.breakdown_field(f=2.45e9)) == pytest.approx(3.0e6, rel=1e-3)
    assert float(rp.breakdown_field(p_pa, f=2.45e9)) == pytest.approx(
        3.0e6 * p_pa / 101325 * math.sqrt(2), rel=1e-12)


P11 = 1.841184  # first zero of J1', Pozar table 3.3 (from memory; also scipy.special.jnp_zeros)


@pytest.mark.parametrize("d, t, f", [(5e-3, 10e-3, 2.45e9), (3e-3, 6e-3, 28e9), (20e-3, 25e-3, 5.8e9),
                                     (8e-3, 4e-3, 18e9)])
def test_below_cutoff_tube_closed_form(d, t, f):
    # α = (2π/λ_c)√(1 − (f/f_c)²), f_c = p'11 c/(π d) (TE11), A = 8.686 α t dB (Pozar §3.4)
    fc = P11 * C / (math.pi * d)
    alpha = 2 * math.pi * fc / C * math.sqrt(1 - (f / fc) ** 2)
    expected = 20 / math.log(10) * alpha * t
    assert float(rp.below_cutoff_attenuation_db(d, t, f)) == pytest.approx(expected, rel=1e-6)


def test_below_cutoff_tube_limits():
    # far below cutoff: A ≈ 32 t/d dB (common practice: 20 log10(e)·2 p'11 = 31.99)
    assert float(rp.below_cutoff_attenuation_db(1e-3, 3e-3, 1e6)) == pytest.approx(32 * 3, rel=2e-3)
    # above cutoff the tube propagates: no evanescent attenuation
    d = 50e-3
    fc = P11 * C / (math.pi * d)
    assert float(rp.below_cutoff_attenuation_db(d, 0.1, 1.2 * fc)) == 0.0
    out = rp.below_cutoff_attenuation_db(np.array([[5e-3], [10e-3]]), 10e-3, np.array([1e9, 2.45e9, 5.8e9]))
    assert out.shape == (2, 3) and np.all(np.diff(out, axis=1) < 0)


def test_disc_temperature_rise_against_numerical_conduction():
    # steady radial conduction with uniform heating q, rim held at 0 (Carslaw & Jaeger):
    # (1/r) d/dr(r k dT/dr) = −q, dT/dr(0) = 0, T(R) = 0 — solved with scipy solve_bvp
    p_abs, k, t, radius = 40.0, 30.0, 10e-3, 0.05
    q = p_abs / (math.pi * radius ** 2 * t)

    # y = (T, dT/dr): y' = S y / r + (dT/dr, −q/k) with S = [[0, 0], [0, −1]] (solve_bvp's
    # singular-term form, regular at r = 0)
    def rhs(r, y):
        return np.vstack([y[1], np.full_like(r, -q / k)])

    r = np.linspace(0.0, radius, 51)
    sol = solve_bvp(rhs, lambda ya, yb: np.array([ya[1], yb[0]]), r, np.zeros((2, r.size)),
                    S=np.array([[0.0, 0.0], [0.0, -1.0]]), tol=1e-10)
    assert sol.success
    assert float(rp.disc_temperature_rise(p_abs, k, t)) == pytest.approx(sol.sol(0.0)[0], rel=1e-6)
    # independent of the radius for the same absorbed power (closed form P/(4π k t))
    assert float(rp.disc_temperature_rise(p_abs, k, t)) == pytest.approx(p_abs / (4 * math.pi * k * t))


def test_power_bookkeeping():
    assert float(rp.average_power(10e3, 0.25)) == 2.5e3
    with pytest.raises(ValueError):
        rp.average_power(1.0, 25.0)  # a percentage, not a fraction
    assert float(rp.reflected_power(1500.0, 0.2)) == pytest.approx(60.0)
    assert float(rp.absorbed_power(1e6, 2.64e-4)) == pytest.approx(264.0)  # reference-values §4: 264 W/MW
    assert float(rp.transmitted_power(100.0, 0.9)) == pytest.approx(90.0)


def test_te11_axis_field_against_the_integrated_poynting_flux():
    # integrate |E|²/(2 Z_TE) of Pozar's TE11 fields (§3.4: E_ρ ∝ J1(k_c ρ)/(k_c ρ) cos φ,
    # E_φ ∝ J1'(k_c ρ) sin φ) over the cross-section of an 85 mm guide at 2.45 GHz and compare
    # the field on the axis, ωμA/(2 k_c), with te11_field_amplitude of that power
    import math

    from scipy.integrate import dblquad
    from scipy.special import jnp_zeros, jv, jvp

    from rfcheck.physics.constants import C, MU0
    from rfcheck.physics.rfpower import te11_field_amplitude, te11_max_power

    d, f = 0.085, 2.45e9
    a = d / 2
    kc = float(jnp_zeros(1, 1)[0]) / a
    w = 2 * math.pi * f
    beta = math.sqrt((w / C) ** 2 - kc * kc)
    z = w * MU0 / beta

    def flux(r, ph):
        er = w * MU0 / (kc * kc * r) * math.cos(ph) * jv(1, kc * r)
        ep = w * MU0 / kc * math.sin(ph) * jvp(1, kc * r)
        return (er * er + ep * ep) / (2 * z) * r

    power, _ = dblquad(flux, 0.0, 2 * math.pi, 1e-12, a, epsabs=0, epsrel=1e-11)
    e_axis = w * MU0 / (2 * kc)
    assert float(te11_field_amplitude(power, d, f)) == pytest.approx(e_axis, rel=1e-8)
    assert float(te11_max_power(d, f, e_axis)) == pytest.approx(power, rel=1e-8)
