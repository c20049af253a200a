"""Characteristic plasma frequencies, and cutoff/resonance densities and fields at fixed frequency.

All inputs and outputs are SI: frequencies in Hz (never rad/s), fields in T, densities in
m^-3, kinetic energies in eV. Every function is pure numpy and broadcasts its arguments.
Cyclotron frequencies are returned as positive magnitudes; the signed form used in the
dielectric tensor lives in :mod:`rfcheck.physics.coldplasma`.

Cutoff and resonance *densities* use the electron-only shorthand
X = f_pe^2 / f^2 (= n_e / n_c) and Y = f_ce / f; ions are neglected, which is exact to
O(m_e / m_i) for f far above the lower-hybrid frequency (every microwave feed).

References
----------
T.H. Stix, *Waves in Plasmas* (AIP, 1992), ch. 1-2.
J.D. Huba, *NRL Plasma Formulary* (Naval Research Laboratory, 2019), pp. 28-29.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import E_CHARGE, EPS0, M_E, M_E_C2_EV, TWO_PI
from rfcheck.physics.species import Species, as_species
from rfcheck.physics.domain import guard_public

__all__ = [
    "electron_plasma_frequency",
    "ion_plasma_frequency",
    "electron_cyclotron_frequency",
    "ion_cyclotron_frequency",
    "upper_hybrid_frequency",
    "lower_hybrid_frequency",
    "r_cutoff_frequency",
    "l_cutoff_frequency",
    "critical_density",
    "ecr_field",
    "r_cutoff_density",
    "l_cutoff_density",
    "upper_hybrid_density",
    "ion_cyclotron_field",
]

# omega_pe^2 = _WPE2_PER_N * n_e ;  omega_ce = _WCE_PER_T * |B|
_WPE2_PER_N = E_CHARGE**2 / (EPS0 * M_E)
_WCE_PER_T = E_CHARGE / M_E


def _scalar(a: NDArray) -> NDArray:
    """Return 0-d arrays as numpy scalars, others unchanged."""
    return a[()] if isinstance(a, np.ndarray) and a.ndim == 0 else a


def _ion(ion: str | Species) -> Species:
    sp = as_species(ion)
    if sp.charge_number == 0:
        raise ValueError(f"{sp.name!r} is neutral; an ion species is needed")
    return sp


def electron_plasma_frequency(n_e: ArrayLike) -> NDArray:
    """Electron plasma frequency f_pe in Hz.

    f_pe = (1 / 2 pi) sqrt(n_e e^2 / (eps0 m_e))   (NRL Formulary: 8.98e3 n^1/2 Hz, n in cm^-3)

    Parameters
    ----------
    n_e : array_like
        Electron density, m^-3.
    """
    return np.sqrt(_WPE2_PER_N * np.asarray(n_e, dtype=float)) / TWO_PI


def ion_plasma_frequency(n_i: ArrayLike, ion: str | Species) -> NDArray:
    """Ion plasma frequency f_pi in Hz.

    f_pi = (1 / 2 pi) sqrt(n_i Z^2 e^2 / (eps0 m_i))   (NRL Formulary: 2.10e2 Z mu^-1/2 n_i^1/2 Hz)

    Parameters
    ----------
    n_i : array_like
        Density of this ion species, m^-3.
    ion : str or Species
        Ion species, e.g. ``"Ar+"``.
    """
    sp = _ion(ion)
    w2_per_n = (sp.charge_number * E_CHARGE) ** 2 / (EPS0 * sp.mass)
    return np.sqrt(w2_per_n * np.asarray(n_i, dtype=float)) / TWO_PI


def electron_cyclotron_frequency(b: ArrayLike) -> NDArray:
    """Electron cyclotron frequency f_ce = e |B| / (2 pi m_e) in Hz (NRL: 2.80e6 B Hz, B in G).

    Parameters
    ----------
    b : array_like
        Magnetic field magnitude, T.
    """
    return _WCE_PER_T * np.abs(np.asarray(b, dtype=float)) / TWO_PI


def ion_cyclotron_frequency(b: ArrayLike, ion: str | Species) -> NDArray:
    """Ion cyclotron frequency f_ci = |Z| e |B| / (2 pi m_i) in Hz (NRL: 1.52e3 Z mu^-1 B Hz, B in G).

    Parameters
    ----------
    b : array_like
        Magnetic field magnitude, T.
    ion : str or Species
        Ion species.
    """
    sp = _ion(ion)
    return abs(sp.charge_number) * E_CHARGE / sp.mass * np.abs(np.asarray(b, dtype=float)) / TWO_PI


def upper_hybrid_frequency(n_e: ArrayLike, b: ArrayLike) -> NDArray:
    """Upper-hybrid frequency f_UH = sqrt(f_pe^2 + f_ce^2) in Hz (Stix 1992, S = 0 at 90 deg).

    Parameters
    ----------
    n_e : array_like
        Electron density, m^-3.
    b : array_like
        Magnetic field magnitude, T.
    """
    return np.hypot(electron_plasma_frequency(n_e), electron_cyclotron_frequency(b))


def lower_hybrid_frequency(n_e: ArrayLike, b: ArrayLike, ion: str | Species) -> NDArray:
    """Lower-hybrid frequency in Hz: the exact lower root of S = 0 for electrons and one ion species.

    With n_i = n_e / Z (quasi-neutral), S = 1 - w_pe^2/(w^2 - w_ce^2) - w_pi^2/(w^2 - W_ci^2)
    (Stix 1992, ch. 1) vanishes where u = w^2 solves

        u^2 - (w_ce^2 + W_ci^2 + w_pe^2 + w_pi^2) u + (w_ce^2 W_ci^2 + w_pe^2 W_ci^2 + w_pi^2 w_ce^2) = 0;

    the upper root is the upper hybrid, the lower one, taken here in the cancellation-free
    form u_LH = 2c / (b + sqrt(b^2 - 4c)), the lower hybrid. The often quoted
    1/w_LH^2 = 1/(W_ci^2 + w_pi^2) + 1/(W_ci w_ce) (Stix 1992, ch. 2) drops terms of order
    Z m_e/m_i and differs from this root by up to about that (5e-4 for H+); its dense limit is
    sqrt(W_ci w_ce), its tenuous limit sqrt(W_ci^2 + w_pi^2). Returns 0 at B = 0 (S = 0 has
    then only the plasma-frequency root) and the ion cyclotron frequency at n_e = 0.

    Parameters
    ----------
    n_e : array_like
        Electron density, m^-3.
    b : array_like
        Magnetic field magnitude, T.
    ion : str or Species
        The ion species.

    References
    ----------
    T. H. Stix, Waves in Plasmas (AIP 1992), ch. 1 (S) and ch. 2 (hybrid resonances, from
    memory); NRL Plasma Formulary (2019), p. 28 (the approximate form).
    """
    sp = _ion(ion)
    z = abs(sp.charge_number)
    b = np.abs(np.asarray(b, dtype=float))
    n_e = np.asarray(n_e, dtype=float)
    w_ci2 = (z * E_CHARGE / sp.mass * b) ** 2
    w_ce2 = (_WCE_PER_T * b) ** 2
    w_pe2 = _WPE2_PER_N * n_e
    w_pi2 = (z * E_CHARGE) ** 2 / (EPS0 * sp.mass) * (n_e / z)
    lin = w_ce2 + w_ci2 + w_pe2 + w_pi2
    const = w_ce2 * w_ci2 + w_pe2 * w_ci2 + w_pi2 * w_ce2
    with np.errstate(divide="ignore", invalid="ignore"):
        u = 2.0 * const / (lin + np.sqrt(np.maximum(lin * lin - 4.0 * const, 0.0)))
        out = np.where(b > 0, np.sqrt(u), 0.0)
    return _scalar(out / TWO_PI)


def r_cutoff_frequency(n_e: ArrayLike, b: ArrayLike) -> NDArray:
    """R-wave cutoff frequency (R = 0), electrons only, in Hz.

    f_R = [f_ce + sqrt(f_ce^2 + 4 f_pe^2)] / 2

    the positive root of R = 1 - f_pe^2 / (f (f - f_ce)) = 0 (Stix 1992, ch. 1, R with the
    signed electron cyclotron frequency -f_ce; D.G. Swanson, Plasma Waves, 2nd ed. (IOP 2003),
    ch. 2, cutoff frequencies, from memory)

    Parameters
    ----------
    n_e : array_like
        Electron density, m^-3.
    b : array_like
        Magnetic field magnitude, T.
    """
    f_pe = electron_plasma_frequency(n_e)
    f_ce = electron_cyclotron_frequency(b)
    return 0.5 * (f_ce + np.sqrt(f_ce**2 + 4.0 * f_pe**2))


def l_cutoff_frequency(n_e: ArrayLike, b: ArrayLike) -> NDArray:
    """L-wave cutoff frequency (L = 0), electrons only, in Hz.

    f_L = [-f_ce + sqrt(f_ce^2 + 4 f_pe^2)] / 2, evaluated as f_pe^2 / f_R (f_L f_R = f_pe^2)
    so that it keeps full relative accuracy when f_ce >> f_pe. Zero where n_e = 0.

    Parameters
    ----------
    n_e : array_like
        Electron density, m^-3.
    b : array_like
        Magnetic field magnitude, T.
    """
    f_pe = electron_plasma_frequency(n_e)
    f_r = r_cutoff_frequency(n_e, b)
    with np.errstate(divide="ignore", invalid="ignore"):
        out = np.where(f_r > 0, f_pe**2 / f_r, 0.0)
    return _scalar(out)


def critical_density(f: ArrayLike) -> NDArray:
    """Critical (O-mode cutoff) density n_c = eps0 m_e (2 pi f)^2 / e^2 in m^-3.

    n_c = 1.2404e-2 f^2 m^-3 with f in Hz (= 1.2404e4 f^2 cm^-3 with f in MHz).

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    """
    w = TWO_PI * np.asarray(f, dtype=float)
    return w * w / _WPE2_PER_N


def ecr_field(f: ArrayLike, harmonic: ArrayLike = 1, kinetic_energy_ev: ArrayLike = 0.0) -> NDArray:
    """Electron-cyclotron resonance field in T: harmonic * f_ce(B) / gamma = f.

    B = gamma 2 pi f m_e / (e * harmonic),  gamma = 1 + E_k / (m_e c^2)

    ``kinetic_energy_ev`` = 0 gives the cold (non-relativistic) field, 87.5 mT at 2.45 GHz.

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    harmonic : array_like, optional
        Cyclotron harmonic number (1 = fundamental).
    kinetic_energy_ev : array_like, optional
        Electron kinetic energy for the relativistic mass shift, eV.
    """
    gamma = 1.0 + np.asarray(kinetic_energy_ev, dtype=float) / M_E_C2_EV
    return gamma * TWO_PI * np.asarray(f, dtype=float) / (_WCE_PER_T * np.asarray(harmonic, dtype=float))


def _y(f: ArrayLike, b: ArrayLike) -> NDArray:
    return electron_cyclotron_frequency(b) / np.asarray(f, dtype=float)


def r_cutoff_density(f: ArrayLike, b: ArrayLike) -> NDArray:
    """Electron density at which the R wave is cut off (R = 0), in m^-3.

    n_R = n_c (1 - Y), Y = f_ce / f; only where Y < 1. For Y >= 1 the R wave (whistler side)
    has no cutoff at any density and NaN is returned.

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    b : array_like
        Magnetic field magnitude, T.

    References
    ----------
    Stix (1992), ch. 1-2.
    """
    y = _y(f, b)
    return _scalar(np.where(y < 1.0, critical_density(f) * (1.0 - y), np.nan))


def l_cutoff_density(f: ArrayLike, b: ArrayLike) -> NDArray:
    """Electron density at which the L wave is cut off (L = 0), in m^-3: n_L = n_c (1 + Y).

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    b : array_like
        Magnetic field magnitude, T.
    """
    return critical_density(f) * (1.0 + _y(f, b))


def upper_hybrid_density(f: ArrayLike, b: ArrayLike) -> NDArray:
    """Electron density of the upper-hybrid resonance (S = 0), in m^-3.

    n_UH = n_c (1 - Y^2), only where Y < 1; NaN for Y >= 1 (no upper-hybrid layer exists at
    that frequency and field).

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    b : array_like
        Magnetic field magnitude, T.
    """
    y = _y(f, b)
    return _scalar(np.where(y < 1.0, critical_density(f) * (1.0 - y) * (1.0 + y), np.nan))


def ion_cyclotron_field(f: ArrayLike, ion: str | Species, harmonic: ArrayLike = 1) -> NDArray:
    """Field in T at which harmonic * f_ci = f for the given ion: B = 2 pi f m_i / (Z e harmonic).

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    ion : str or Species
        Ion species.
    harmonic : array_like, optional
        Cyclotron harmonic number.
    """
    sp = _ion(ion)
    w = TWO_PI * np.asarray(f, dtype=float)
    return w * sp.mass / (abs(sp.charge_number) * E_CHARGE * np.asarray(harmonic, dtype=float))


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
