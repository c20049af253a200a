"""Helicon waves in a bounded plasma column: the m = ±1 whistler branch, its density–field
relation for a tube radius and an antenna's axial wavenumber, and the Trivelpiece–Gould
branch beside it.

Pure numpy on SI values: densities in m^-3, fields in T, frequencies in Hz (angular
frequency stays inside), lengths in m, wavenumbers in m^-1.

Dispersion
----------
For ω_ci ≪ ω ≪ ω_ce and ω ≪ ω_pe, with the ions immobile and the displacement current
neglected, the whistler at total wavenumber k (= β) and axial wavenumber k_z obeys
ω (ω_pe² + k² c²) = ω_ce k k_z c², i.e. with δ = ω/ω_ce and k_s = ω_pe/c

    δ k² − k_z k + δ k_s² = 0,    k = (k_z / 2δ) [1 ∓ √(1 − 4 δ² k_s² / k_z²)].

The smaller root is the helicon; the larger one the Trivelpiece–Gould (electron cyclotron)
wave, a quasi-electrostatic wave near the edge that damps strongly there. Neglecting the
electron mass (k² c² ≪ ω_pe², the helicon limit) leaves the familiar

    k k_z = e μ0 n ω / B    (Lieberman & Lichtenberg, ch. 13),

so n/B = k k_z / (e μ0 ω): at fixed wavenumbers the density rises linearly with the field.
With the electron mass kept the density of the bounded mode is
n = k k_z B / (e μ0 ω) − m_e k² / (μ0 e²) (:func:`helicon_density`).

Bounded column
--------------
In a column of radius a the radial structure of the m = 1 mode fixes the perpendicular
wavenumber. Where k_⊥ ≫ k_z (the usual case) the boundary condition reduces to J_1(k_⊥ a) = 0,
so k_⊥ = 3.8317 / a for the lowest radial mode (:func:`radial_wavenumber`; Lieberman &
Lichtenberg ch. 13), and k² = k_⊥² + k_z².

A given (k, k_z, B) lies on the helicon branch when k < k_z ω_ce / (2ω); the two branches
meet where the square root vanishes, i.e. at the field B_TG = 2 m_e ω k / (e k_z)
(:func:`branch_merge_field`): below it the bounded mode is a Trivelpiece–Gould wave.

Antennas
--------
A half-wavelength m = 1 antenna (Nagoya type III, half-turn helical, double saddle) of
length L has two end rings carrying opposite currents: its axial current spectrum is
∝ |sin(k_z L / 2)|, largest at k_z = π/L (λ_z = 2L) and at half power at k_z L = π/2 and
3π/2 (:func:`antenna_wavenumber`, :func:`antenna_band`). The half-turn helical antenna
favours m = +1 along the field; the others launch m = ±1 alike.

References
----------
M. A. Lieberman & A. J. Lichtenberg, *Principles of Plasma Discharges and Materials
Processing*, 2nd ed. (Wiley 2005), ch. 13 (helicon discharges: the dispersion, the bounded
column, antennas) — forms from memory; F. F. Chen & D. Arnush, Phys. Plasmas 4 (1997) 3411
(helicon and Trivelpiece–Gould roots of the quadratic, from memory); T. H. Stix, *Waves in
Plasmas* (AIP 1992), ch. 2 (the whistler). Checked by the tests against the worked case of
reference-values.md §7 and the quadratic itself.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import E_CHARGE, M_E, MU0, TWO_PI
from rfcheck.physics.domain import guard_public

__all__ = [
    "J11",
    "ANTENNA_TYPES",
    "BISECTIONS",
    "radial_wavenumber",
    "antenna_wavenumber",
    "antenna_band",
    "helicon_density",
    "helicon_wavenumber",
    "branch_merge_field",
    "on_helicon_branch",
]

#: first zero of J_1 (Abramowitz & Stegun table 9.5: 3.831705970)
J11 = 3.8317059702075125
#: antenna types and the factor of π/L their main axial wavenumber has
ANTENNA_TYPES: dict[str, float] = {"nagoya-iii": 1.0, "half-helical": 1.0, "saddle": 1.0}
#: halvings of the bracket in :func:`helicon_wavenumber` (relative width 2^-60)
BISECTIONS = 60


def radial_wavenumber(radius: ArrayLike) -> NDArray:
    """Perpendicular wavenumber of the lowest m = 1 radial mode, m^-1: k_⊥ = 3.8317 / a.

    The boundary condition J_1(k_⊥ a) = 0 of the k_⊥ ≫ k_z limit (Lieberman & Lichtenberg
    ch. 13). Inf at a = 0.
    """
    return J11 / np.asarray(radius, dtype=float)


def antenna_wavenumber(antenna_type: str, length: ArrayLike) -> NDArray:
    """Main axial wavenumber an antenna launches, m^-1: k_z = π / L for the half-wavelength
    types of :data:`ANTENNA_TYPES` (λ_z = 2L)."""
    if antenna_type not in ANTENNA_TYPES:
        raise ValueError(f"antenna type must be one of {', '.join(ANTENNA_TYPES)}, "
                         f"not {antenna_type!r}")
    return ANTENNA_TYPES[antenna_type] * math.pi / np.asarray(length, dtype=float)


def antenna_band(antenna_type: str, length: ArrayLike) -> tuple[NDArray, NDArray]:
    """Half-power band of the antenna's axial spectrum |sin(k_z L/2)|, m^-1: from
    k_z = π/(2L) to 3π/(2L) (half and one and a half times the main wavenumber)."""
    k0 = antenna_wavenumber(antenna_type, length)
    return 0.5 * k0, 1.5 * k0


def helicon_density(b: ArrayLike, f: ArrayLike, k_z: ArrayLike, radius: ArrayLike, *,
                    electron_inertia: bool = True) -> NDArray:
    """Density of the bounded m = 1 helicon mode at field B, m^-3.

    n = k k_z B / (e μ0 ω) − m_e k² / (μ0 e²), k = √(k_⊥² + k_z²), k_⊥ = 3.8317/a; without
    the electron inertia term (electron_inertia=False) the textbook n/B = k k_z / (e μ0 ω)
    (Lieberman & Lichtenberg ch. 13). Negative where the field is too low for the mode to
    exist at any density (below about B_TG/2: the term in B does not cover the inertia term).
    """
    omega = TWO_PI * np.asarray(f, dtype=float)
    kz = np.asarray(k_z, dtype=float)
    k = np.hypot(radial_wavenumber(radius), kz)
    n = k * kz * np.asarray(b, dtype=float) / (E_CHARGE * MU0 * omega)
    if electron_inertia:
        n = n - M_E * k**2 / (MU0 * E_CHARGE**2)
    return n


def helicon_wavenumber(n_e: ArrayLike, b: ArrayLike, f: ArrayLike, radius: ArrayLike) -> NDArray:
    """Axial wavenumber k_z the bounded helicon mode needs at density n_e and field B, m^-1.

    The root of (e B/(m_e ω)) k_z k − k² = μ0 e² n_e / m_e with k² = k_⊥² + k_z² (the
    dispersion with the electron mass, see the module docstring), found by bisection
    (:data:`BISECTIONS` halvings) on [0, k_hi]; its left side grows with k_z wherever
    ω < ω_ce, so the root is unique. NaN where ω ≥ ω_ce (no whistler) or n_e ≤ 0.
    """
    n = np.asarray(n_e, dtype=float)
    bb = np.abs(np.asarray(b, dtype=float))
    omega = TWO_PI * np.asarray(f, dtype=float)
    kp = radial_wavenumber(radius)
    n, bb, omega, kp = np.broadcast_arrays(n, bb, omega, kp)
    ratio = E_CHARGE * bb / (M_E * omega)  # ω_ce / ω
    target = MU0 * E_CHARGE**2 * n / M_E
    ok = (ratio > 1.0) & (n > 0) & np.isfinite(target) & np.isfinite(kp)
    r = np.where(ok, ratio, 2.0)
    t = np.where(ok, target, 1.0)
    k2 = np.where(ok, kp, 1.0) ** 2
    lo = np.zeros(n.shape)
    hi = np.sqrt((t + k2) / (r - 1.0))  # there g ≥ (r − 1) k_z² − k_⊥² ≥ target
    for _ in range(BISECTIONS):
        mid = 0.5 * (lo + hi)
        g = r * mid * np.sqrt(k2 + mid**2) - (k2 + mid**2)
        below = g < t
        lo = np.where(below, mid, lo)
        hi = np.where(below, hi, mid)
    return np.where(ok, 0.5 * (lo + hi), np.nan)


def branch_merge_field(f: ArrayLike, k_z: ArrayLike, radius: ArrayLike) -> NDArray:
    """Field at which the helicon and Trivelpiece–Gould roots merge for the bounded mode, T:
    B_TG = 2 m_e ω k / (e k_z), k = √(k_⊥² + k_z²). Above it the mode is a helicon."""
    omega = TWO_PI * np.asarray(f, dtype=float)
    kz = np.asarray(k_z, dtype=float)
    k = np.hypot(radial_wavenumber(radius), kz)
    return 2.0 * M_E * omega * k / (E_CHARGE * kz)


def on_helicon_branch(b: ArrayLike, f: ArrayLike, k_z: ArrayLike, radius: ArrayLike) -> NDArray:
    """True where the bounded mode (k, k_z) at field B is the helicon (smaller) root,
    k < k_z ω_ce / (2ω); False on the Trivelpiece–Gould branch (and where k_z is NaN)."""
    return np.abs(np.asarray(b, dtype=float)) > branch_merge_field(f, k_z, radius)


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
