"""E-to-H transition density of the transformer model (rfcheck.physics.inductive): the first
maximum over density of the plasma's resistance seen by the coil. Checked against the
closed-form limits of that resistance (Lieberman & Lichtenberg, Principles of Plasma
Discharges, 2nd ed., §12.2: R_ind ∝ n while the skin depth exceeds the radius, ∝ n^-1/2 in
the thin-skin limit) and against an independent bounded maximisation (scipy.optimize)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

from rfcheck.physics.inductive import eh_transition_density, transformer_load

COIL = dict(turns=3, coil_radius=0.11, coil_length=0.08, plasma_radius=0.09)
F = 13.56e6


def _r_ind(n, nu):
    return float(transformer_load(n, F, nu, **COIL).plasma_resistance)


def test_limits_of_the_plasma_resistance():
    nu = 3e7
    # thick skin (δ capped at R): R_ind ∝ n; thin skin: ∝ n^-1/2
    lo = [_r_ind(n, nu) for n in (1e12, 2e12)]
    hi = [_r_ind(n, nu) for n in (1e21, 4e21)]
    assert lo[1] / lo[0] == pytest.approx(2.0, rel=1e-3)
    assert hi[1] / hi[0] == pytest.approx(0.5, rel=2e-2)


@pytest.mark.parametrize("nu", [1e7, 3e7, 1e8, 3e8])
def test_transition_is_the_maximum_of_the_plasma_resistance(nu):
    n_eh = float(eh_transition_density(np.geomspace(1e13, 1e20, 801), F, nu, **COIL))
    res = minimize_scalar(lambda x: -_r_ind(10**x, nu), bounds=(13, 18.5), method="bounded",
                          options={"xatol": 1e-6})
    assert math.log10(n_eh) == pytest.approx(res.x, abs=2e-3)
    # a density typical of argon E-H transitions (1e16-1e17 m^-3, L&L §12.3)
    assert 5e15 < n_eh < 1e17


def test_first_maximum_is_taken_and_an_unbracketed_grid_gives_nan():
    # a collision frequency rising with density (electron-ion) can add a second maximum
    n = np.geomspace(1e13, 1e21, 961)
    nu = 8.4e6 + 1e-11 * n
    r = transformer_load(n, F, nu, **COIL).plasma_resistance
    assert n[np.argmax(r)] > 1e19  # the larger maximum is the high-density one
    n_eh = float(eh_transition_density(n, F, nu, **COIL))
    assert 5e15 < n_eh < 5e16
    assert np.isnan(eh_transition_density(np.geomspace(1e12, 1e14, 50), F, 3e7, **COIL))
