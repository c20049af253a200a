"""Launched polarisation on the plasma's characteristic waves, against closed forms.

Sources beside each check:
* along B0 the characteristic waves are circularly polarised, the R wave with E_y = i E_x
  for exp(−iωt) (Stix, Waves in Plasmas, 1992, ch. 1: iE_x/E_y = (n² − S)/D = 1 for n² = R);
  a linear wave is the equal sum of R and L at any field;
* across B0 the O mode has E ∥ B0 and the X mode E ⊥ B0 in the wavefront (Stix 1992 ch. 1);
* in between, the Appleton–Hartree polarisation of magneto-ionic theory in the tenuous
  limit, E·e2 / E·e1 = i [Y sin²θ ± √(Y² sin⁴θ + 4 cos²θ)] / (2 cos θ) (Budden, The
  Propagation of Radio Waves, 1985, ch. 4; Swanson, Plasma Waves, 2nd ed., 2003, ch. 2), the
  two roots orthogonal (their product is −1 in this form);
* independently, the null vector of the Stix wave-equation matrix at a small density
  (Stix 1992 ch. 1, eq. for the wave equation in the k–B0 frame), projected on the
  wavefront.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from rfcheck.physics.coldplasma import n2_branch, stix
from rfcheck.physics.frequencies import critical_density, ecr_field
from rfcheck.physics.polarisation import (characteristic_polarisations, launched_jones,
                                          mode_fractions)

F = 2.45e9
B_ECR = float(ecr_field(F))


def _pair(theta):
    return ("R", "L") if theta < math.pi / 4 else ("O", "X")


@pytest.mark.parametrize("y", [0.3, 1.43, 3.0])
def test_linear_launch_along_b_is_half_r_half_l(y):
    waves = characteristic_polarisations(F, y * B_ECR, 0.0, ("R", "L"))
    for psi in (0.0, 0.4, math.pi / 2):
        fr = mode_fractions(waves, launched_jones("linear", psi))
        assert fr["R"] == pytest.approx(0.5, abs=1e-12)  # Stix 1992 ch. 1
        assert fr["L"] == pytest.approx(0.5, abs=1e-12)
    right = mode_fractions(waves, launched_jones("circular-right"))
    left = mode_fractions(waves, launched_jones("circular-left"))
    assert right["R"] == pytest.approx(1.0, abs=1e-12)  # E_y = i E_x is the R wave
    assert left["L"] == pytest.approx(1.0, abs=1e-12)
    (r_vec,) = [v for lab, v in zip(waves.labels, waves.vectors) if lab == "R"]
    assert r_vec[1] / r_vec[0] == pytest.approx(1j, abs=1e-12)


@pytest.mark.parametrize("psi", [0.0, 0.3, math.pi / 4, 1.2, math.pi / 2])
def test_linear_launch_across_b_splits_as_cos_squared(psi):
    waves = characteristic_polarisations(F, 1.2 * B_ECR, math.pi / 2, ("O", "X"))
    fr = mode_fractions(waves, launched_jones("linear", psi))
    assert fr["O"] == pytest.approx(math.cos(psi) ** 2, abs=1e-12)  # E ∥ B0: O (Stix ch. 1)
    assert fr["X"] == pytest.approx(math.sin(psi) ** 2, abs=1e-12)
    circ = mode_fractions(waves, launched_jones("circular-right"))
    assert circ["O"] == pytest.approx(0.5, abs=1e-12)


@pytest.mark.parametrize("y", [0.3, 0.8, 1.43, 3.0])
@pytest.mark.parametrize("theta_deg", [10.0, 30.0, 45.0, 60.0, 80.0])
def test_oblique_split_matches_appleton_hartree(y, theta_deg):
    theta = math.radians(theta_deg)
    c, s = math.cos(theta), math.sin(theta)
    # Budden 1985 ch. 4: the two axis ratios q of (1, i q) in (e1, e2), electrons, X -> 0
    q = [(y * s * s + sg * math.sqrt(y * y * s**4 + 4 * c * c)) / (2 * c) for sg in (1, -1)]
    assert q[0] * q[1] == pytest.approx(-1.0, rel=1e-12)  # orthogonal polarisations
    waves = characteristic_polarisations(F, y * B_ECR, theta, _pair(theta))
    got = sorted(abs(v[1] / v[0]) for v in waves.vectors)
    assert got == pytest.approx(sorted(abs(x) for x in q), rel=1e-9)
    for psi in (0.0, math.pi / 2, 0.7):
        fr = sorted(mode_fractions(waves, launched_jones("linear", psi)).values())
        expected = sorted((math.cos(psi) ** 2 + x * x * math.sin(psi) ** 2) / (1 + x * x)
                          for x in q)
        assert fr == pytest.approx(expected, abs=1e-9)


@pytest.mark.parametrize("theta_deg", [20.0, 50.0, 75.0])
def test_labels_match_the_null_vector_of_the_stix_wave_equation(theta_deg):
    # at a small density the null vector of the 3×3 wave-equation matrix (Stix 1992 ch. 1)
    # of the branch named L/R or O/X, projected on the wavefront, is the Jones vector
    theta = math.radians(theta_deg)
    y = 1.43
    pair = _pair(theta)
    waves = characteristic_polarisations(F, y * B_ECR, theta, pair, ions=("Ar+",))
    n_e = 1e-5 * float(critical_density(F))
    e = stix(F, y * B_ECR, n_e, ("Ar+",))
    c, s = math.cos(theta), math.sin(theta)
    for label, vec in zip(waves.labels, waves.vectors):
        n2 = float(np.real(n2_branch(F, y * B_ECR, n_e, theta, label, ("Ar+",))))
        m = np.array([[e.S - n2 * c * c, -1j * e.D, n2 * s * c],
                      [1j * e.D, e.S - n2, 0.0],
                      [n2 * s * c, 0.0, e.P - n2 * s * s]], dtype=complex)
        _, _, vh = np.linalg.svd(m)
        null = vh[-1].conj()
        jones = np.array([null @ np.array([c, 0.0, -s]), null[1]])
        jones /= np.linalg.norm(jones)
        assert abs(np.vdot(vec, jones)) == pytest.approx(1.0, abs=1e-4)  # O(X) = 1e-5


def test_bad_arguments_are_refused():
    with pytest.raises(ValueError):
        characteristic_polarisations(F, B_ECR, 2.0, ("O", "X"))
    with pytest.raises(ValueError):
        characteristic_polarisations(F, B_ECR, 0.1, ("R", "X"))
    with pytest.raises(ValueError):
        characteristic_polarisations(float("nan"), B_ECR, 0.1, ("R", "L"))
    with pytest.raises(ValueError):
        launched_jones("elliptic")


def test_no_field_is_one_unmagnetised_wave():
    waves = characteristic_polarisations(F, 0.0, 0.3, ("R", "L"))
    assert waves.degenerate
    assert mode_fractions(waves, launched_jones("linear", 0.2)) == {"R": 1.0, "L": 0.0}
