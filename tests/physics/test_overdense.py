"""Overdense routes: Mjølhus O–X conversion and the surface-wave density."""

import numpy as np
import pytest

from rfcheck.physics.constants import C, TWO_PI
from rfcheck.physics.frequencies import ecr_field
from rfcheck.physics.overdense import (cutoff_scale_length, n_components_from_angles,
                                       ox_conversion_efficiency, ox_conversion_window,
                                       ox_optimal_angle, ox_optimal_n_parallel,
                                       surface_wave_density)

MJOLHUS = "Mjølhus, J. Plasma Phys. 31 (1984) 7"


@pytest.mark.parametrize("f, y, l_n", [
    pytest.param(2.45e9, 0.5, 0.02, id="2.45 GHz Y=0.5; " + MJOLHUS),
    pytest.param(28e9, 0.8, 0.05, id="28 GHz Y=0.8; " + MJOLHUS),
    pytest.param(140e9, 0.3, 0.1, id="140 GHz Y=0.3; " + MJOLHUS),
])
def test_ox_efficiency_is_one_at_optimum(f, y, l_n):
    b = y * ecr_field(f)
    n_opt = ox_optimal_n_parallel(f, b)
    # optimum N_par = sqrt(Y/(1+Y)) (Mjølhus 1984): the O cutoff and L cutoff coincide
    assert n_opt == pytest.approx(np.sqrt(y / (1 + y)), rel=1e-12)
    assert ox_conversion_efficiency(f, l_n, b, n_opt, 0.0) == pytest.approx(1.0, abs=1e-14)
    # the launch angle from the density gradient: sin(theta_opt) = N_opt
    n_par, n_perp = n_components_from_angles(ox_optimal_angle(f, b), 0.0)
    assert n_par == pytest.approx(n_opt, rel=1e-12) and abs(n_perp) < 1e-15
    assert ox_conversion_efficiency(f, l_n, b, n_par, n_perp) == pytest.approx(1.0, abs=1e-12)
    # both windows +-N_opt (symmetric, from memory) and a drop away from the optimum
    assert ox_conversion_efficiency(f, l_n, b, -n_opt) == pytest.approx(1.0, abs=1e-14)
    assert ox_conversion_efficiency(f, l_n, b, 0.0) < 1.0
    assert ox_conversion_efficiency(f, l_n, b, n_opt, 0.1) < 1.0


def test_ox_window_half_widths_and_scale_length_dependence():
    # at the 1/e half widths of the window the Mjølhus exponent equals -1 (closed form)
    f, y, l_n = 28e9, 0.6, 0.03
    b = y * ecr_field(f)
    w = ox_conversion_window(f, l_n, b)
    assert ox_conversion_efficiency(f, l_n, b, w.n_parallel + w.n_parallel_half_width) == \
        pytest.approx(np.exp(-1.0), rel=1e-12)
    assert ox_conversion_efficiency(f, l_n, b, w.n_parallel, w.n_perp_half_width) == \
        pytest.approx(np.exp(-1.0), rel=1e-12)
    # exponent pi k0 L_n sqrt(Y/2) N_perp^2 at the optimal N_par (the formula's own form)
    k0 = TWO_PI * f / C
    assert ox_conversion_efficiency(f, l_n, b, w.n_parallel, 0.05) == pytest.approx(
        np.exp(-np.pi * k0 * l_n * np.sqrt(y / 2) * 0.05**2), rel=1e-12)
    # a steeper density gradient (shorter L_n) widens the window (Mjølhus 1984)
    assert ox_conversion_window(f, l_n / 4, b).n_parallel_half_width == pytest.approx(
        2 * w.n_parallel_half_width, rel=1e-12)


def test_surface_wave_density_quartz():
    # n_c(1 + eps_d): 4.8 n_c for quartz eps_d = 3.8 (reference-values §7, Moisan &
    # Zakrzewski 1991); n_c(2.45 GHz) = 7.446e16 m^-3 (reference-values §1.3)
    assert surface_wave_density(2.45e9, 3.8) == pytest.approx(4.8 * 7.446e16, rel=2e-4)


def test_cutoff_scale_length_linear_ramp():
    # linear ramp n = n_c z / L: cutoff at z = L, L_n = n_c / |dn/dz| = L (closed form)
    f, length = 2.45e9, 0.04
    z = np.linspace(0.0, 0.1, 101)
    n_c = 7.446e16  # reference-values §1.3
    zc, ln = cutoff_scale_length(z, n_c * z / length, f)
    assert zc == pytest.approx(length, rel=2e-4) and ln == pytest.approx(length, rel=2e-4)
    assert np.isnan(cutoff_scale_length(z, np.full(z.shape, 0.5 * n_c), f)[0])
