"""The full-wave solver at the launch paths' phase step
(rfcheck.analysis.launch_path.WAVE_PHASE_STEP, 0.2 rad against the physics default 0.05)
against the closed forms the solver is tested with at its default: the Airy linear layer and
the Budden tunnelling layer (K. G. Budden, The Propagation of Radio Waves, Cambridge 1985,
ch. 15-16 and 19; T. H. Stix, Waves in Plasmas, AIP 1992, ch. 13) and Poynting's theorem
R + T + A = 1 (Budden §7)."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.special import airy

from rfcheck.analysis.launch_path import WAVE_PHASE_STEP, WAVE_RTOL
from rfcheck.physics.constants import C, TWO_PI
from rfcheck.physics.fullwave import slab_reflection

F_UNIT = C / TWO_PI  # k0 = 1 m^-1: lengths in units of 1/k0


def test_path_step_is_the_documented_value():
    assert WAVE_PHASE_STEP == 0.2


@pytest.mark.parametrize("k0l", [40.0, 160.0, 2000.0])
def test_airy_layer_at_the_path_step(k0l):
    """n² = 1 − z/L: r = (i − g)/(i + g), g = α Ai'(−αL)/Ai(−αL), α = L^(-1/3) (k0 = 1)."""
    alpha = (1.0 / k0l) ** (1 / 3)
    z = np.linspace(0.0, k0l + 14.0 / alpha, 400)
    res = slab_reflection(z, lambda zz: 1.0 - zz / k0l + 0j, F_UNIT, rtol=WAVE_RTOL,
                          max_phase_step=WAVE_PHASE_STEP)
    ai, aip, _, _ = airy(-alpha * k0l)
    g = alpha * aip / ai
    r_exact = (1j - g) / (1j + g)
    assert abs(res.r - r_exact) < 2e-6
    assert abs(res.reflected - 1.0) < 1e-9


@pytest.mark.parametrize("eta", [0.1, 1.0, 2.0])
def test_budden_layer_at_the_path_step(eta):
    """n² = 1 + β/z from the cutoff side: T = e^(−πη), R = (1 − T)², A = T (1 − T)."""
    beta, delta = eta, 1e-7
    t = np.exp(-np.pi * eta)
    z = np.linspace(-beta - 400.0, 400.0, 2001)
    n2 = lambda zz: 1 + beta / (zz - 1j * delta)  # noqa: E731
    res = slab_reflection(z, n2, F_UNIT, n2_left=n2(z[0]).real, rtol=WAVE_RTOL,
                          max_phase_step=WAVE_PHASE_STEP)
    assert res.transmitted == pytest.approx(t, rel=1e-4)
    assert res.reflected == pytest.approx((1 - t) ** 2, abs=1e-5)
    assert res.absorbed == pytest.approx(t * (1 - t), abs=1e-5)


def test_energy_balance_of_a_long_smooth_collisional_path():
    """A path of ~3000 wavelengths with a smooth collisional layer (the 140 GHz launcher's
    situation): R + T + A = 1 to 1e-6, and the fractions agree with the default step's."""
    length = 2.0e4
    prof = lambda zz: 1 - 0.6 * np.exp(-(((zz - length / 2) / (length / 8)) ** 2)) \
        + 2e-4j * np.exp(-(((zz - 0.6 * length) / (length / 20)) ** 2))  # noqa: E731
    z = np.linspace(0.0, length, 601)
    coarse = slab_reflection(z, prof, F_UNIT, rtol=WAVE_RTOL, max_phase_step=WAVE_PHASE_STEP)
    fine = slab_reflection(z, prof, F_UNIT, rtol=WAVE_RTOL)
    assert abs(coarse.balance_residual) < 1e-6
    for a, b in ((coarse.reflected, fine.reflected), (coarse.transmitted, fine.transmitted),
                 (coarse.absorbed, fine.absorbed)):
        assert abs(a - b) < 1e-7
