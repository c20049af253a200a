"""Bounded helicon dispersion (rfcheck.physics.helicon) against the bounded-whistler formula
k k_z = e μ0 n ω / B (M. A. Lieberman & A. J. Lichtenberg, Principles of Plasma Discharges
and Materials Processing, 2nd ed., ch. 13) and its worked case in reference-values.md §7,
the cold whistler ω = ω_ce k k_z c² / (ω_pe² + k² c²) (T. H. Stix, Waves in Plasmas, ch. 2)
for the roots with the electron mass, and the first zero of J_1 (Abramowitz & Stegun
table 9.5; scipy.special)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.special import jn_zeros

from rfcheck.physics.constants import C, E_CHARGE, EPS0, M_E, MU0
from rfcheck.physics.helicon import (J11, antenna_band, antenna_wavenumber, branch_merge_field,
                                     helicon_density, helicon_wavenumber, on_helicon_branch,
                                     radial_wavenumber)

F = 13.56e6
W = 2 * math.pi * F


def test_first_zero_of_j1():
    assert J11 == pytest.approx(float(jn_zeros(1, 1)[0]), rel=1e-15)
    assert J11 == pytest.approx(3.831705970, abs=1e-9)  # A&S table 9.5


def test_worked_case_reference_values_7():
    # reference-values.md §7: a = 25 mm → k_⊥ = 153.27 m^-1; λ_z = 0.30 m; 13.56 MHz →
    # n/B = 1.8887e20 m^-3/T; n = 9.444e18 m^-3 at 0.05 T (electron mass neglected)
    assert float(radial_wavenumber(0.025)) == pytest.approx(153.27, abs=0.01)
    kz = 2 * math.pi / 0.30
    n = float(helicon_density(0.05, F, kz, 0.025, electron_inertia=False))
    assert n == pytest.approx(9.444e18, rel=2e-4)
    assert n / 0.05 == pytest.approx(1.8887e20, rel=2e-4)


def test_density_rises_linearly_with_field_without_electron_mass():
    b = np.array([0.01, 0.02, 0.04])
    n = helicon_density(b, F, 20.0, 0.05, electron_inertia=False)
    np.testing.assert_allclose(n / b, n[0] / b[0], rtol=1e-14)


@pytest.mark.parametrize("b, kz, a", [(0.035, 20.9, 0.05), (0.05, 2 * math.pi / 0.3, 0.025),
                                      (0.01, 10.0, 0.05), (0.1, 40.0, 0.02)])
def test_density_with_electron_mass_satisfies_the_cold_whistler(b, kz, a):
    # ω (ω_pe² + k² c²) = ω_ce k k_z c² (Stix ch. 2) at the returned density
    n = float(helicon_density(b, F, kz, a))
    k = math.hypot(J11 / a, kz)
    wpe2 = n * E_CHARGE**2 / (EPS0 * M_E)
    wce = E_CHARGE * b / M_E
    assert W * (wpe2 + k**2 * C**2) == pytest.approx(wce * k * kz * C**2, rel=1e-10)


def test_wavenumber_inverts_the_density():
    b = np.array([0.01, 0.035, 0.08])
    kz = np.array([8.0, 20.9, 45.0])
    n = helicon_density(b, F, kz, 0.05)
    np.testing.assert_allclose(helicon_wavenumber(n, b, F, 0.05), kz, rtol=1e-12)


def test_no_whistler_above_the_electron_cyclotron_frequency():
    # 13.56 MHz: ω_ce = ω at B = m_e ω / e = 0.4845 mT
    b_ce = M_E * W / E_CHARGE
    assert np.isnan(helicon_wavenumber(1e18, 0.9 * b_ce, F, 0.05))


def test_branches_merge_where_the_discriminant_vanishes():
    # k = (k_z/2δ)[1 ∓ √(1 − 4δ²k_s²/k_z²)]: the roots merge at k = k_z/(2δ), δ = ω/ω_ce,
    # i.e. B_TG = 2 m_e ω k / (e k_z)
    a, kz = 0.05, 20.9
    k = math.hypot(J11 / a, kz)
    b_tg = float(branch_merge_field(F, kz, a))
    delta = W / (E_CHARGE * b_tg / M_E)
    assert k == pytest.approx(kz / (2 * delta), rel=1e-12)
    assert on_helicon_branch(1.01 * b_tg, F, kz, a)
    assert not on_helicon_branch(0.99 * b_tg, F, kz, a)
    # on the helicon branch k is the smaller root of δk² − k_z k + δk_s² = 0
    b = 0.035
    n = float(helicon_density(b, F, kz, a))
    d = W / (E_CHARGE * b / M_E)
    ks2 = n * E_CHARGE**2 / (EPS0 * M_E) / C**2
    small = (kz / (2 * d)) * (1 - math.sqrt(1 - 4 * d**2 * ks2 / kz**2))
    assert k == pytest.approx(small, rel=1e-9)


def test_antenna_wavenumber_and_band():
    # half-wavelength antenna: λ_z = 2L, k_z = π/L; spectrum |sin(k_z L/2)| at half power
    # (|sin|² = 1/2) at the band edges
    L = 0.15
    assert float(antenna_wavenumber("nagoya-iii", L)) == pytest.approx(math.pi / L)
    lo, hi = antenna_band("half-helical", L)
    for k in (float(lo), float(hi)):
        assert math.sin(k * L / 2) ** 2 == pytest.approx(0.5, rel=1e-12)
    with pytest.raises(ValueError):
        antenna_wavenumber("loop", L)
