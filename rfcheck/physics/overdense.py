"""Overdense routes: O–X mode conversion and surface-wave sustained plasmas.

When the density exceeds the O-mode cutoff n_c, a wave can still deliver power by
(i) O–X(–B) conversion at the O cutoff for an oblique launch near the optimal parallel
index, (ii) the whistler (R wave) launched from the high-field side, which has no density
cutoff (see :mod:`rfcheck.physics.access`), or (iii) a surface wave along a dielectric
wall, which needs n_e > n_c (1 + ε_d) at the wall.

Conventions: f in Hz, B in T, lengths in m, angles in rad. Y = f_ce/f is evaluated at the
O-cutoff layer; N∥ (``n_parallel``) is the refractive-index component along B and
N⊥ (``n_perp``) the component perpendicular to both B and the density gradient, both
conserved in a slab.
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import C, TWO_PI
from rfcheck.physics.frequencies import critical_density, electron_cyclotron_frequency
from rfcheck.physics.domain import guard_public

__all__ = [
    "OXWindow",
    "ox_conversion_efficiency",
    "ox_optimal_n_parallel",
    "ox_optimal_angle",
    "ox_conversion_window",
    "n_components_from_angles",
    "cutoff_scale_length",
    "surface_wave_density",
]


class OXWindow(NamedTuple):
    """Optimal N∥, launch angle to the density gradient (rad), and the 1/e half widths of
    the conversion window in N∥ and N⊥."""

    n_parallel: NDArray
    angle: NDArray
    n_parallel_half_width: NDArray
    n_perp_half_width: NDArray


def _y(f, b):
    return electron_cyclotron_frequency(b) / np.asarray(f, float)


def _exponent_scale(f, l_n, y):
    """π k0 L_n √(Y/2)."""
    k0 = TWO_PI * np.asarray(f, float) / C
    return math.pi * k0 * np.asarray(l_n, float) * np.sqrt(y / 2.0)


def ox_optimal_n_parallel(f: ArrayLike, b: ArrayLike) -> NDArray:
    """Optimal parallel index of O–X conversion, N∥,opt = √(Y/(1 + Y)).

    At this N∥ the O cutoff (P = 0) and the X-mode L cutoff coincide, so the O wave converts
    to the (slow) X wave without tunnelling. Reference: E. Mjølhus, J. Plasma Phys. 31
    (1984) 7; J. Preinhaelter & V. Kopecký, J. Plasma Phys. 10 (1973) 1 (from memory).

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    b : array_like
        Field magnitude at the O-cutoff layer, T.
    """
    y = _y(f, b)
    return np.sqrt(y / (1.0 + y))


def ox_optimal_angle(f: ArrayLike, b: ArrayLike) -> NDArray:
    """Optimal launch angle (rad) between the vacuum wave vector and the density gradient,
    tilted towards B: θ_opt = arcsin N∥,opt = arcsin √(Y/(1 + Y)) (Mjølhus 1984)."""
    return np.arcsin(ox_optimal_n_parallel(f, b))


def ox_conversion_efficiency(f: ArrayLike, l_n: ArrayLike, b: ArrayLike,
                             n_parallel: ArrayLike, n_perp: ArrayLike = 0.0) -> NDArray:
    """O–X mode-conversion (power) efficiency of the Mjølhus formula.

    T = exp{ −π k0 L_n √(Y/2) [ 2(1 + Y)(|N∥| − N∥,opt)² + N⊥² ] },  N∥,opt = √(Y/(1 + Y)),

    with k0 = 2πf/c, L_n = n_e/|∇n_e| at the O cutoff and Y = f_ce/f there. T = 1 at the
    optimum (N∥ = ±N∥,opt, N⊥ = 0); the two windows ±N∥,opt are taken as symmetric.

    Validity: slab (1-D) density profile, B perpendicular to ∇n_e, linear density near the
    cutoff over the conversion region (k0 L_n ≫ 1), cold plasma; the formula is the
    leading-order result near the optimum and underestimates the tails far from it. The
    converted X wave must still reach the upper-hybrid layer (X–B conversion) to be absorbed.

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    l_n : array_like
        Density scale length n_e/|∇n_e| at the O cutoff, m.
    b : array_like
        Field magnitude at the O cutoff, T.
    n_parallel, n_perp : array_like
        Refractive-index components of the launched wave along B and perpendicular to B
        within the cutoff surface (conserved in a slab).

    References
    ----------
    E. Mjølhus, J. Plasma Phys. 31 (1984) 7 (formula in the form commonly quoted in
    ECRH/EBW reviews; from memory).
    """
    y = _y(f, b)
    n_opt = np.sqrt(y / (1.0 + y))
    bracket = (2.0 * (1.0 + y) * (np.abs(np.asarray(n_parallel, float)) - n_opt) ** 2
               + np.asarray(n_perp, float) ** 2)
    return np.exp(-_exponent_scale(f, l_n, y) * bracket)


def ox_conversion_window(f: ArrayLike, l_n: ArrayLike, b: ArrayLike) -> OXWindow:
    """Optimum and 1/e half widths of the Mjølhus O–X window.

    ΔN∥ = [π k0 L_n √(Y/2) · 2(1 + Y)]^(−1/2), ΔN⊥ = [π k0 L_n √(Y/2)]^(−1/2)
    (from :func:`ox_conversion_efficiency`; Mjølhus 1984).
    """
    y = _y(f, b)
    scale = _exponent_scale(f, l_n, y)
    n_opt = np.sqrt(y / (1.0 + y))
    return OXWindow(n_opt, np.arcsin(n_opt), 1.0 / np.sqrt(scale * 2.0 * (1.0 + y)),
                    1.0 / np.sqrt(scale))


def n_components_from_angles(polar: ArrayLike, azimuth: ArrayLike) -> tuple[NDArray, NDArray]:
    """(N∥, N⊥) of a vacuum wave from its polar angle to the density gradient and the
    azimuth of its tangential part measured from B: N∥ = sin θ cos φ, N⊥ = sin θ sin φ."""
    s = np.sin(np.asarray(polar, float))
    a = np.asarray(azimuth, float)
    return s * np.cos(a), s * np.sin(a)


def cutoff_scale_length(z: ArrayLike, n_e: ArrayLike, f: float) -> tuple[float, float]:
    """Position (m) of the first O cutoff (n_e = n_c) along z and L_n = n_e/|dn_e/dz| there.

    Linear interpolation between samples; the gradient is the slope of the straddling
    segment. Returns (nan, nan) when the density never reaches n_c.
    """
    z = np.asarray(z, float)
    n = np.asarray(n_e, float)
    n_c = float(critical_density(f))
    above = n >= n_c
    if not above.any():
        return math.nan, math.nan
    i = int(np.argmax(above))
    if i == 0:
        i = 1
    slope = (n[i] - n[i - 1]) / (z[i] - z[i - 1])
    if slope == 0:
        return float(z[i]), math.inf
    z_c = z[i - 1] + (n_c - n[i - 1]) / slope
    return float(z_c), float(n_c / abs(slope))


def surface_wave_density(f: ArrayLike, eps_d: ArrayLike) -> NDArray:
    """Density above which a surface wave propagates along a plasma–dielectric interface.

    n_sw = n_c (1 + ε_d): the planar surface-wave resonance ε_p = 1 − n/n_c = −ε_d
    (e.g. 4.8 n_c for fused quartz, ε_d ≈ 3.8). Surface-wave sustained discharges need
    n_e above this at the wall. Cold, collisionless, planar (large radius) limit.
    Reference: M. Moisan & Z. Zakrzewski, J. Phys. D 24 (1991) 1025 (from memory).

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    eps_d : array_like
        Relative permittivity of the dielectric wall.
    """
    return critical_density(f) * (1.0 + np.asarray(eps_d, float))


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
