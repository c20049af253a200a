"""Inductive coupling: plasma skin depth and the transformer model of the coil-plasma load.

Sources beside each check: Lieberman & Lichtenberg, Principles of Plasma Discharges and
Materials Processing, 2nd ed. (2005), §12.1 (δ_p = c/ω_pe, δ_c = √(2/(ωμ0σ_dc))) and §12.2
(transformer model, R_s → N² R_p at high density); reference-values.md §7 (16.8 mm at 1e17)
and §8.2 (13.56 MHz, 1e17 m^-3, ν = 1e8: ε = −18439 + 21643i, 1/k_i = 23 mm); PlasmaPy's
inertial_length (test-only reference); the flux-excluding conductor inside a long solenoid
(Jackson, Classical Electrodynamics 3rd ed., §5.18 and the long-solenoid field).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from rfcheck.physics import inductive as ind
from rfcheck.physics.constants import E_CHARGE, EPS0, M_E, MU0, TWO_PI

F = 13.56e6
W = TWO_PI * F
COIL = dict(turns=3, coil_radius=0.10, coil_length=0.10, plasma_radius=0.08)


@pytest.mark.parametrize("n_e", [1e16, 1e17, 1e18])
def test_collisionless_skin_depth_against_plasmapy_inertial_length(n_e):
    u = pytest.importorskip("astropy.units")
    lengths = pytest.importorskip("plasmapy.formulary.lengths")
    ref = lengths.inertial_length(n_e * u.m**-3, "e-").to(u.m).value
    assert float(ind.collisionless_skin_depth(n_e)) == pytest.approx(ref, rel=1e-9)


def test_collisionless_skin_depth_reference_value():
    # reference-values §7: δ ≈ c/ω_pe = 16.8 mm at 1e17 m^-3 (computed, H)
    assert float(ind.collisionless_skin_depth(1e17)) * 1e3 == pytest.approx(16.8, abs=0.05)


def test_general_skin_depth_reference_case():
    # reference-values §8.2: 13.56 MHz, n = 1e17, ν = 1e8 s^-1: ε = −18439 + 21643i and a
    # power attenuation 87.0 m^-1, i.e. 1/k_i = 23 mm
    wpe2 = 1e17 * E_CHARGE**2 / (EPS0 * M_E)
    eps = 1 - wpe2 / (W * (W + 1j * 1e8))
    assert eps.real == pytest.approx(-18439, rel=1e-3) and eps.imag == pytest.approx(21643, rel=1e-3)
    delta = float(ind.plasma_skin_depth(1e17, F, 1e8))
    assert 2 / delta == pytest.approx(87.0, abs=0.1)
    assert delta * 1e3 == pytest.approx(23.0, abs=0.05)
    # ν/ω = 1e8 / 8.52e7 = 1.17: neither limit; the general form is the one to read
    assert str(ind.skin_depth_regime(F, 1e8)) == "intermediate"
    assert delta > 1.05 * float(ind.collisionless_skin_depth(1e17))


def test_exact_collisionless_form_below_the_plasma_frequency():
    # ν = 0: ε = 1 − ω_pe²/ω² < 0, k = i √(ω_pe² − ω²)/c, δ = c/√(ω_pe² − ω²) (closed form)
    from rfcheck.physics.constants import C
    n = 1e16
    wpe2 = n * E_CHARGE**2 / (EPS0 * M_E)
    assert float(ind.plasma_skin_depth(n, F, 0.0)) == pytest.approx(C / math.sqrt(wpe2 - W**2),
                                                                    rel=1e-12)
    # lossless propagation above ω_pe: no skin depth (inf, documented)
    assert float(ind.plasma_skin_depth(1e10, 2.45e9, 0.0)) == math.inf


@pytest.mark.parametrize("n_e, nu, regime", [
    (1e17, 1e6, "collisionless"),  # ν/ω = 0.0117 (L&L §12.1, δ_p)
    (1e17, 5e9, "collisional"),    # ν/ω = 58.7 (L&L §12.1, δ_c)
])
def test_general_form_tends_to_the_named_limit(n_e, nu, regime):
    delta = float(ind.plasma_skin_depth(n_e, F, nu))
    assert str(ind.skin_depth_regime(F, nu)) == regime
    limit = (ind.collisionless_skin_depth(n_e) if regime == "collisionless"
             else ind.collisional_skin_depth(n_e, F, nu))
    assert delta == pytest.approx(float(limit), rel=0.05)


def test_collisional_skin_depth_is_the_conductor_formula():
    # Jackson §5.18: δ = √(2/(μ0 σ ω)); σ_dc = e² n/(m ν) (L&L §2.4). Copper-like check:
    # σ = 5.8e7 S/m at 13.56 MHz: 1/√(π f μ0 σ) = 1/√(3.1046e9) = 17.95 µm by hand, the
    # copper rule of thumb 66.1 µm / √(f/MHz) (common practice)
    nu = 1e9
    n = 5.8e7 * M_E * nu / E_CHARGE**2  # the density whose σ_dc is copper's
    assert float(ind.dc_conductivity(n, nu)) == pytest.approx(5.8e7, rel=1e-12)
    assert float(ind.collisional_skin_depth(n, F, nu)) * 1e6 == pytest.approx(17.95, abs=0.01)


def test_long_solenoid_inductance():
    # L = μ0 π r² N² / l: 3 turns, r = 0.1 m, l = 0.1 m → 3.553 µH (by hand: 1.2566e-6 · 0.031416 · 9 / 0.1)
    assert float(ind.solenoid_inductance(3, 0.1, 0.1)) == pytest.approx(3.5531e-6, rel=1e-4)


def test_coil_ac_resistance_hand_value():
    # 1 m of 6 mm copper tube at 13.56 MHz: R_s = √(π f μ0/σ) = 9.607e-4 ohm, R = R_s/(π d)
    # = 9.607e-4 / 0.018850 = 0.05097 ohm/m (skin-effect conductor, Pozar §1.7)
    assert float(ind.coil_ac_resistance(1.0, 6e-3, F)) == pytest.approx(0.05097, rel=1e-3)


def test_transformer_load_without_plasma_is_the_bare_coil():
    # n_e → 0: nothing to induce current in; Z = R_coil + jω L11
    z = ind.transformer_load(1e6, F, 1e7, coil_resistance=0.1, **COIL).impedance
    l11 = MU0 * math.pi * 0.1**2 * 9 / 0.1
    assert complex(z).real == pytest.approx(0.1, rel=1e-6)
    assert complex(z).imag == pytest.approx(W * l11, rel=1e-6)


def test_transformer_load_of_a_dense_plasma_excludes_the_flux():
    # δ → 0 (n = 1e24, ν ≪ ω): the column is a flux-excluding conductor inside the solenoid,
    # L → μ0 π N² (b² − R²)/l (long-solenoid field, flux only in the annulus); and the
    # reflected resistance → N² R_p (L&L §12.2, high-density limit). The approach is first
    # order in L_e/L_mp ∝ δ (the flux carried inside the skin layer): 2.3e-4 here
    n, nu = 1e24, 1e6
    load = ind.transformer_load(n, F, nu, **COIL)
    l_annulus = MU0 * math.pi * 9 * (0.1**2 - 0.08**2) / 0.1
    assert float(load.inductance) == pytest.approx(l_annulus, rel=3e-4)
    assert float(load.inductance) > l_annulus
    lower = ind.transformer_load(1e22, F, nu, **COIL)  # 10x the skin depth: 10x the excess
    assert (float(lower.inductance) - l_annulus) / (float(load.inductance) - l_annulus) == \
        pytest.approx(10.0, rel=0.01)
    delta = float(ind.plasma_skin_depth(n, F, nu))
    r_p = TWO_PI * 0.08 * M_E * nu / (E_CHARGE**2 * n * 0.1 * delta)
    assert float(load.plasma_resistance) == pytest.approx(9 * r_p, rel=2e-3)


def test_transformer_load_against_the_two_loop_circuit_solved_numerically():
    # the same transformer as two coupled loops, solved with numpy.linalg.solve:
    # [R1 + jωL11, jωL12; jωL12, R_p + jω L22] [I1, I2] = [V, 0], Z = V / I1; and the power
    # the plasma loop dissipates, ½|I2|² R_p, equals the plasma's share ½|I1|² R_plasma
    n, nu, r1 = np.array([3e16, 1e17, 1e18]), 3e7, 0.15
    load = ind.transformer_load(n, F, nu, coil_resistance=r1, **COIL)
    b, R, l, N = 0.10, 0.08, 0.10, 3
    for i, ni in enumerate(n):
        delta = min(float(ind.plasma_skin_depth(ni, F, nu)), R)
        l_e = TWO_PI * R * M_E / (E_CHARGE**2 * ni * l * delta)
        r_p = l_e * nu
        l11, l12, l22 = MU0 * math.pi * b * b * N * N / l, MU0 * math.pi * R * R * N / l, \
            MU0 * math.pi * R * R / l + l_e
        m = np.array([[r1 + 1j * W * l11, 1j * W * l12], [1j * W * l12, r_p + 1j * W * l22]])
        i1, i2 = np.linalg.solve(m, np.array([1.0, 0.0]))
        assert complex(load.impedance[i]) == pytest.approx(1 / i1, rel=1e-12)
        assert 0.5 * abs(i2) ** 2 * r_p == pytest.approx(0.5 * abs(i1) ** 2 * load.plasma_resistance[i],
                                                        rel=1e-9)


def test_coil_drive_current_and_voltage():
    # P = ½ I² R → I = √(2P/R); V = I |Z| (circuit theory): 1 kW into 10 + 200j ohm
    drive = ind.coil_drive(1000.0, 10 + 200j)
    assert float(drive.current) == pytest.approx(math.sqrt(200.0), rel=1e-12)
    assert float(drive.voltage) == pytest.approx(math.sqrt(200.0) * math.hypot(10, 200), rel=1e-12)
    assert math.isnan(float(ind.coil_drive(1000.0, 0 + 200j).current))  # no resistance: undefined


def test_transformer_load_refuses_a_coil_inside_the_plasma():
    with pytest.raises(ValueError, match="plasma radius"):
        ind.transformer_load(1e17, F, 1e7, turns=3, coil_radius=0.05, coil_length=0.1,
                             plasma_radius=0.08)
