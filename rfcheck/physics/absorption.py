"""Absorption estimates: collisional attenuation, collisional regime, ECR optical depth.

Every estimate returns its validity with it, so that a caller can print the limits next to
the number: ``valid`` (bool array, True where the inputs lie inside the stated limits of the
formula) and ``reason`` (str array; where ``valid`` is False it says which limit is broken,
where ``valid`` is True a non-empty ``reason`` is a caution, empty means nothing to add).

Time convention exp(−iωt) (as :mod:`rfcheck.physics.coldplasma`): collisions enter as
ω → ω + iν and a decaying wave has Im n > 0. Attenuation coefficients are for the wave
*power*, α = 2 k0 Im n (m^-1).

References
----------
T.H. Stix, *Waves in Plasmas* (AIP 1992), ch. 1; K.G. Budden, *The Propagation of Radio
Waves* (Cambridge 1985), ch. 3; M. Bornatici, R. Cano, O. De Barbieri, F. Engelmann,
Nucl. Fusion 23 (1983) 1153 (ECR absorption; the tenuous-plasma limits
of their results).
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import C, M_E_C2_EV, TWO_PI
from rfcheck.physics.frequencies import critical_density
from rfcheck.physics.domain import check_index, guard_public

__all__ = [
    "Estimate",
    "CollisionalRegime",
    "OpticalDepth",
    "collisional_attenuation",
    "collisional_attenuation_weak",
    "attenuation_from_index",
    "collisional_regime",
    "optical_depth_o1",
    "optical_depth_o2",
    "optical_depth_x2",
    "optical_depth_xm",
]

#: ν/ω limits of the regime labels and of the weak-collision expansion (common practice)
WEAK_COLLISION_LIMIT = 0.1
#: weakly relativistic limit of the optical-depth forms, eV (validity of the tenuous, weakly relativistic forms)
MAX_TEMPERATURE_EV = 20e3
#: highest harmonic of optical_depth_xm (ValueError above)
MAX_HARMONIC = 20


class Estimate(NamedTuple):
    """A value with its validity: value, valid (bool array), reason (str array)."""

    value: NDArray
    valid: NDArray
    reason: NDArray


class CollisionalRegime(NamedTuple):
    """ν/ω and its label: "weakly collisional" (< 0.1), "transitional", "collisional" (≥ 1)."""

    nu_over_omega: NDArray
    regime: NDArray


class OpticalDepth(NamedTuple):
    """Single-pass optical depth τ, absorbed fraction 1 − e^(−τ), X = n_e/n_c, validity."""

    tau: NDArray
    absorbed_fraction: NDArray
    density_ratio: NDArray
    valid: NDArray
    reason: NDArray


def _reasons(shape, checks):
    """Join the messages of failed checks: checks = [(mask, message, is_hard), ...]."""
    valid = np.ones(shape, bool)
    reason = np.full(shape, "", dtype=object)
    for mask, message, hard in checks:
        mask = np.broadcast_to(mask, shape)
        reason = np.where(mask, np.where(reason == "", message, reason + "; " + message), reason)
        if hard:
            valid &= ~mask
    return valid, reason.astype(str)


def _x_z(f, n_e, nu):
    f = np.asarray(f, float)
    x = np.asarray(n_e, float) / critical_density(f)
    z = np.asarray(nu, float) / (TWO_PI * f)
    return f, x, z


def collisional_attenuation(f: ArrayLike, n_e: ArrayLike,
                            collision_frequency: ArrayLike) -> Estimate:
    """Power attenuation α = 2 k0 Im n of a cold unmagnetised collisional plasma, m^-1.

    ε = 1 − X/(1 + iν/ω), X = n_e/n_c, n = √ε (Im n ≥ 0) — exact for the cold Drude model.

    Validity: cold electrons, ν independent of speed, no magnetic field (or the O mode with
    E ∥ B). Invalid where an input is negative. Caution where X ≥ 1: the decay is then
    largely evanescent (skin effect), not dissipation along a propagating path.
    Reference: Stix (1992) ch. 1.

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    n_e : array_like
        Electron density, m^-3.
    collision_frequency : array_like
        Electron momentum-transfer collision frequency ν, s^-1.

    Returns
    -------
    Estimate
        α in m^-1 with ``valid`` and ``reason``.
    """
    f, x, z = _x_z(f, n_e, collision_frequency)
    eps = 1.0 - x / (1.0 + 1j * z)
    alpha = 2.0 * TWO_PI * f / C * np.sqrt(eps).imag
    valid, reason = _reasons(alpha.shape, [
        ((x < 0) | (z < 0), "negative density or collision frequency", True),
        (x >= 1, "X >= 1: mostly evanescent (skin-effect) decay, not propagation loss", False),
    ])
    return Estimate(alpha, valid, reason)


def collisional_attenuation_weak(f: ArrayLike, n_e: ArrayLike,
                                 collision_frequency: ArrayLike) -> Estimate:
    """Weak-collision power attenuation α ≈ (ν/c) X/√(1 − X), m^-1.

    First order in Z = ν/ω of the exact form (:func:`collisional_attenuation`). Validity:
    X < 1, Z ≤ 0.1 and X Z/(1 − X) ≤ 0.1 (the neglected terms are of relative order Z² and
    [XZ/(1 − X)]²; the form degrades near cutoff). NaN where X ≥ 1.
    Reference: standard weak-collision expansion; Stix (1992) ch. 1.

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    n_e : array_like
        Electron density, m^-3.
    collision_frequency : array_like
        Electron momentum-transfer collision frequency ν, s^-1.

    Returns
    -------
    Estimate
        α in m^-1 with ``valid`` and ``reason``.
    """
    f, x, z = _x_z(f, n_e, collision_frequency)
    nu = np.asarray(collision_frequency, float)
    below = x < 1
    alpha = np.where(below, nu / C * x / np.sqrt(np.where(below, 1.0 - x, 1.0)), np.nan)
    expansion = np.where(below, x * z / np.where(below, 1.0 - x, 1.0), np.inf)
    valid, reason = _reasons(alpha.shape, [
        (~below, "X >= 1: no propagating wave", True),
        (z > WEAK_COLLISION_LIMIT, "nu/omega > 0.1: not weakly collisional", True),
        (below & (expansion > WEAK_COLLISION_LIMIT),
         "X nu/omega/(1 - X) > 0.1: too close to cutoff for the weak-collision form", True),
    ])
    return Estimate(alpha, valid, reason)


def attenuation_from_index(f: ArrayLike, n2: ArrayLike) -> Estimate:
    """Power attenuation α = 2 k0 Im √(n²) for a complex n² (any cold mode), m^-1.

    Use with n² from :mod:`rfcheck.physics.coldplasma` evaluated with a collision
    frequency (R, L, O, X, oblique). Caution where Re n² < 0 (evanescent decay, not
    absorption). Reference: Stix (1992) ch. 1.

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    n2 : array_like
        Complex n² (exp(−iωt): Im n² > 0 absorbs).
    """
    n2 = np.asarray(n2, complex)
    alpha = 2.0 * TWO_PI * np.asarray(f, float) / C * np.sqrt(n2).imag
    valid, reason = _reasons(alpha.shape, [
        (n2.imag < 0, "Im n^2 < 0: gain, not absorption (sign convention exp(-i omega t))", True),
        (n2.real < 0, "Re n^2 < 0: mostly evanescent decay, not absorption", False),
    ])
    return Estimate(alpha, valid, reason)


def collisional_regime(f: ArrayLike, collision_frequency: ArrayLike) -> CollisionalRegime:
    """Collisionality indicator ν/ω and its label.

    ν/ω < 0.1 "weakly collisional" (resonant ECR heating possible; the resonance width
    is ΔB/B ~ ν/ω), 0.1 ≤ ν/ω < 1 "transitional", ν/ω ≥ 1 "collisional" (collisional,
    ohmic-like absorption). The thresholds are common practice, not sharp physics.
    Reference: common practice (collisional broadening of a resonance, ΔB/B ~ ν/ω).

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    collision_frequency : array_like
        Electron collision frequency ν, s^-1.
    """
    ratio = np.asarray(collision_frequency, float) / (TWO_PI * np.asarray(f, float))
    regime = np.where(ratio < WEAK_COLLISION_LIMIT, "weakly collisional",
                      np.where(ratio < 1.0, "transitional", "collisional"))
    return CollisionalRegime(ratio, regime)


def _optical_depth(coefficient, power_mu, f, n_e, t_e_ev, l_b, x_limit, x_soft, label,
                   density_factor=False):
    f = np.asarray(f, float)
    x = np.asarray(n_e, float) / critical_density(f)
    t_e = np.asarray(t_e_ev, float)
    l_b = np.asarray(l_b, float)
    mu = t_e / M_E_C2_EV
    tau = coefficient * math.pi**2 * l_b * f / C * x * mu**power_mu
    if density_factor:
        tau = tau * np.sqrt(np.clip(1.0 - x, 0.0, None))
    tau, x, t_e, l_b = np.broadcast_arrays(tau, x, t_e, l_b)
    valid, reason = _reasons(tau.shape, [
        ((x < 0) | (t_e <= 0) | (l_b <= 0), "density < 0, T_e <= 0 or L_B <= 0", True),
        (x >= x_limit, f"X >= {x_limit:g}: {label} cannot reach the resonance", True),
        ((x > x_soft) & (x < x_limit),
         f"X > {x_soft:g}: tenuous-plasma form, finite-density corrections neglected", True),
        (t_e > MAX_TEMPERATURE_EV, "T_e > 20 keV: beyond the weakly relativistic form", True),
    ])
    tau = np.where(x >= x_limit, np.nan, tau)
    return OpticalDepth(tau, -np.expm1(-tau), x, valid, reason)


def optical_depth_o1(f: ArrayLike, n_e: ArrayLike, t_e_ev: ArrayLike,
                     l_b: ArrayLike) -> OpticalDepth:
    """Single-pass optical depth of the O mode at the fundamental ECR.

    τ_O1 = π² (L_B/λ) μ X √(1 − X), μ = T_e/(m_e c²), X = n_e/n_c(f), λ = c/f;
    absorbed fraction 1 − e^(−τ).

    Validity (returned as ``valid`` / ``reason``): perpendicular launch (N∥ ≈ 0),
    Maxwellian electrons, 0 < T_e ≤ 20 keV, single pass (wall reflections ignored),
    |∇B| = B/L_B along the ray; X < 1 (O cutoff; τ is NaN beyond). The √(1 − X) factor
    keeps the finite density to leading order.

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    n_e : array_like
        Electron density, m^-3.
    t_e_ev : array_like
        Electron temperature, eV.
    l_b : array_like
        Magnetic scale length B/|∇B| at the resonance, m.

    Returns
    -------
    OpticalDepth

    References
    ----------
    Tenuous-plasma limit of M. Bornatici et al., Nucl. Fusion 23 (1983) 1153.
    """
    return _optical_depth(1.0, 1, f, n_e, t_e_ev, l_b, 1.0, 1.0, "the O mode",
                          density_factor=True)


def optical_depth_o2(f: ArrayLike, n_e: ArrayLike, t_e_ev: ArrayLike, l_b: ArrayLike, *,
                     max_density_ratio: float = 0.3) -> OpticalDepth:
    """Single-pass optical depth of the O mode at the second harmonic.

    τ_O2 = 4π² (L_B/λ) μ² X (= μ τ_X2); symbols as in :func:`optical_depth_o1`.

    Validity: as :func:`optical_depth_o1`, and X ≤ ``max_density_ratio`` (the form assumes
    X ≪ 1; 0.3 is a project default, not a literature value).

    References
    ----------
    Tenuous-plasma limit of M. Bornatici et al., Nucl. Fusion 23 (1983) 1153.
    """
    return _optical_depth(4.0, 2, f, n_e, t_e_ev, l_b, 1.0, max_density_ratio, "the O mode")


def optical_depth_xm(harmonic: int, f: ArrayLike, n_e: ArrayLike, t_e_ev: ArrayLike,
                     l_b: ArrayLike, *, max_density_ratio: float = 0.3) -> OpticalDepth:
    """Single-pass optical depth of the X mode at harmonic m ≥ 2.

    τ_Xm = π² (L_B/λ) · m^(2m−1)/(2^(m−1) (m−1)!) · X · μ^(m−1)  (m = 2: 4; m = 3: 30.375);
    symbols as in :func:`optical_depth_o1`.

    Validity: as :func:`optical_depth_o1`, with X < 1 − 1/m (the R cutoff in front of the
    m-th harmonic layer seen from the low-field side; τ is NaN beyond) and
    X ≤ ``max_density_ratio`` (X ≪ 1 assumed; 0.3 is a project default). The fundamental
    X1 is not given (it is polarisation-limited and density dependent): ValueError.

    References
    ----------
    Tenuous-plasma limit of M. Bornatici et al., Nucl. Fusion 23 (1983) 1153.
    """
    if isinstance(harmonic, (int, float)) and harmonic < 2 and float(harmonic) == int(harmonic):
        raise ValueError("X-mode optical depth is given for harmonics m >= 2 only (X1 needs "
                         "the full finite-density treatment)")
    # the tenuous-plasma coefficient m^(2m-1)/(2^(m-1)(m-1)!) is meaningless far beyond the
    # harmonics a source heats at; the bound also keeps the factorial small
    m = check_index("harmonic", harmonic, 2, MAX_HARMONIC)
    coefficient = m ** (2 * m - 1) / (2 ** (m - 1) * math.factorial(m - 1))
    return _optical_depth(coefficient, m - 1, f, n_e, t_e_ev, l_b, 1.0 - 1.0 / m,
                          max_density_ratio, "the X mode from the low-field side (R cutoff)")


def optical_depth_x2(f: ArrayLike, n_e: ArrayLike, t_e_ev: ArrayLike, l_b: ArrayLike, *,
                     max_density_ratio: float = 0.3) -> OpticalDepth:
    """Single-pass optical depth of the X mode at the second harmonic.

    τ_X2 = 4π² (L_B/λ) μ X; validity as :func:`optical_depth_xm` with m = 2 (X < 0.5).

    References
    ----------
    Tenuous-plasma limit of M. Bornatici et al., Nucl. Fusion 23 (1983) 1153.
    """
    return optical_depth_xm(2, f, n_e, t_e_ev, l_b, max_density_ratio=max_density_ratio)


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
