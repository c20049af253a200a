"""Dispersion of the unmagnetised electromagnetic wave and of warm electrostatic waves.

Thermal-speed convention: v_T = (k_B T / m)^(1/2), the one-dimensional rms speed used by the
NRL Plasma Formulary (4.19e7 T_e^1/2 cm/s for electrons, T in eV). Note that PlasmaPy's
default ``thermal_speed`` is the most-probable speed (2 k_B T / m)^(1/2); the adiabatic factors
below (3 for electron plasma waves) are written for the NRL convention.

Temperatures are in eV, wavenumbers in rad/m, frequencies in Hz (angular frequency is used
only inside), speeds in m/s.

References
----------
P.M. Bellan, *Fundamentals of Plasma Physics* (Cambridge 2006), ch. 4 (elementary plasma
waves: the EM wave in an unmagnetised plasma, the Langmuir (Bohm-Gross) wave, the ion
acoustic wave; written with kappa T / m, as here) and ch. 6 (electrostatic waves in a
magnetised plasma: upper-hybrid and electrostatic ion cyclotron); chapter numbers from memory.
V.L. Ginzburg, *The Propagation of Electromagnetic Waves in Plasmas*, 2nd ed. (Pergamon 1970),
ch. 2 (isotropic plasma, eps = 1 - w_pe^2/w^2; from memory).
T.H. Stix, *Waves in Plasmas* (AIP 1992), ch. 1-2 (the cold upper-hybrid frequency).
J.D. Huba, *NRL Plasma Formulary* (Naval Research Laboratory, 2019), pp. 28-29.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import C, E_CHARGE, EPS0, M_E, TWO_PI
from rfcheck.physics.species import Species, as_species
from rfcheck.physics.domain import guard_public

__all__ = [
    "thermal_speed",
    "em_wave_frequency",
    "phase_velocity",
    "group_velocity",
    "bohm_gross_frequency",
    "ion_acoustic_speed",
    "electrostatic_ion_cyclotron_frequency",
    "upper_hybrid_oscillation_frequency",
]

_WPE2_PER_N = E_CHARGE**2 / (EPS0 * M_E)


def _f(a: ArrayLike) -> NDArray:
    return np.asarray(a, dtype=float)


def thermal_speed(t_ev: ArrayLike, species: str | Species = "e-") -> NDArray:
    """Thermal speed v_T = (k_B T / m)^(1/2) in m/s (NRL convention; see module docstring).

    Parameters
    ----------
    t_ev : array_like
        Temperature, eV.
    species : str or Species, optional
        Particle species (default the electron).
    """
    return np.sqrt(E_CHARGE * _f(t_ev) / as_species(species).mass)


def em_wave_frequency(k: ArrayLike, n_e: ArrayLike) -> NDArray:
    """Frequency (Hz) of the transverse EM wave in an unmagnetised cold plasma.

    w^2 = w_pe^2 + c^2 k^2   (Bellan 2006, ch. 4; Ginzburg 1970, ch. 2: n^2 = 1 - w_pe^2/w^2;
    from memory)

    Parameters
    ----------
    k : array_like
        Wavenumber, rad/m.
    n_e : array_like
        Electron density, m^-3.
    """
    k = _f(k)
    return np.sqrt(_WPE2_PER_N * _f(n_e) + (C * k) ** 2) / TWO_PI


def _one_minus_x(f: ArrayLike, n_e: ArrayLike) -> NDArray:
    w = TWO_PI * _f(f)
    return 1.0 - _WPE2_PER_N * _f(n_e) / (w * w)


def phase_velocity(f: ArrayLike, n_e: ArrayLike) -> NDArray:
    """Phase velocity w/k (m/s) of the unmagnetised EM wave: c / (1 - f_pe^2/f^2)^(1/2).

    Above c wherever the wave propagates; NaN below the cutoff (f <= f_pe), where the wave is
    evanescent.

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    n_e : array_like
        Electron density, m^-3.
    """
    g = _one_minus_x(f, n_e)
    with np.errstate(divide="ignore", invalid="ignore"):
        out = np.where(g > 0, C / np.sqrt(np.where(g > 0, g, 1.0)), np.nan)
    return out[()] if out.ndim == 0 else out


def group_velocity(f: ArrayLike, n_e: ArrayLike) -> NDArray:
    """Group velocity dw/dk (m/s) of the unmagnetised EM wave: c (1 - f_pe^2/f^2)^(1/2).

    Below c; v_phase * v_group = c^2. NaN below the cutoff (f <= f_pe).

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz.
    n_e : array_like
        Electron density, m^-3.
    """
    g = _one_minus_x(f, n_e)
    out = np.where(g > 0, C * np.sqrt(np.where(g > 0, g, 0.0)), np.nan)
    return out[()] if out.ndim == 0 else out


def bohm_gross_frequency(k: ArrayLike, n_e: ArrayLike, t_e: ArrayLike, gamma: float = 3.0) -> NDArray:
    """Frequency (Hz) of the electron plasma (Langmuir) wave, Bohm-Gross dispersion.

    w^2 = w_pe^2 + gamma k^2 v_Te^2,   v_Te^2 = k_B T_e / m_e,   gamma = 3 (1-D adiabatic)

    (Bellan 2006, ch. 4, written there in the same form, w_pe^2 + 3 k^2 kappa T_e / m_e, the 3
    being the 1-D adiabatic gamma; from memory.) Valid for k lambda_De << 1, where Landau
    damping is weak.

    Parameters
    ----------
    k : array_like
        Wavenumber, rad/m.
    n_e : array_like
        Electron density, m^-3.
    t_e : array_like
        Electron temperature, eV.
    gamma : float, optional
        Ratio of specific heats of the electron fluid.
    """
    v2 = E_CHARGE * _f(t_e) / M_E
    return np.sqrt(_WPE2_PER_N * _f(n_e) + gamma * _f(k) ** 2 * v2) / TWO_PI


def ion_acoustic_speed(
    t_e: ArrayLike,
    ion: str | Species,
    t_i: ArrayLike = 0.0,
    gamma_e: float = 1.0,
    gamma_i: float = 3.0,
) -> NDArray:
    """Ion acoustic (sound) speed in m/s, long-wavelength limit (k lambda_De << 1).

    v_s = [(gamma_e Z k_B T_e + gamma_i k_B T_i) / m_i]^(1/2)

    Isothermal electrons (gamma_e = 1) and 1-D adiabatic ions (gamma_i = 3) by default: the
    k lambda_De -> 0 limit of w^2/k^2 = (kappa T_e / m_i)/(1 + k^2 lambda_De^2)
    + 3 kappa T_i / m_i (Bellan 2006, ch. 4, singly charged ions; from memory); NRL
    Formulary: C_s = 9.79e5 (gamma Z T_e / mu)^(1/2) cm/s, which puts the charge number on T_e.

    Parameters
    ----------
    t_e : array_like
        Electron temperature, eV.
    ion : str or Species
        Ion species (charge number Z from it).
    t_i : array_like, optional
        Ion temperature, eV.
    gamma_e, gamma_i : float, optional
        Ratios of specific heats.
    """
    sp = as_species(ion)
    energy = gamma_e * abs(sp.charge_number) * _f(t_e) + gamma_i * _f(t_i)
    return np.sqrt(E_CHARGE * energy / sp.mass)


def electrostatic_ion_cyclotron_frequency(
    k: ArrayLike,
    b: ArrayLike,
    t_e: ArrayLike,
    ion: str | Species,
    t_i: ArrayLike = 0.0,
) -> NDArray:
    """Frequency (Hz) of the electrostatic ion cyclotron wave (k nearly perpendicular to B).

    w^2 = W_ci^2 + k^2 v_s^2,   v_s = ion acoustic speed (isothermal electrons)

    (Bellan 2006, ch. 6, electrostatic ion cyclotron wave, with v_s as in
    :func:`ion_acoustic_speed`; from memory.)

    Parameters
    ----------
    k : array_like
        Perpendicular wavenumber, rad/m.
    b : array_like
        Magnetic field magnitude, T.
    t_e : array_like
        Electron temperature, eV.
    ion : str or Species
        Ion species.
    t_i : array_like, optional
        Ion temperature, eV (enters v_s with gamma_i = 3).
    """
    sp = as_species(ion)
    w_ci = abs(sp.charge_number) * E_CHARGE * np.abs(_f(b)) / sp.mass
    v_s = ion_acoustic_speed(t_e, sp, t_i)
    return np.sqrt(w_ci**2 + (_f(k) * v_s) ** 2) / TWO_PI


def upper_hybrid_oscillation_frequency(
    k: ArrayLike, n_e: ArrayLike, b: ArrayLike, t_e: ArrayLike = 0.0, gamma: float = 3.0
) -> NDArray:
    """Frequency (Hz) of the electrostatic upper-hybrid oscillation (k perpendicular to B).

    w^2 = w_pe^2 + w_ce^2 + gamma k^2 v_Te^2

    Cold (t_e = 0): the upper-hybrid frequency, S = 0 at 90 deg (Stix 1992, ch. 1-2). The
    thermal term is the fluid correction of the Bohm-Gross form, 3 k^2 kappa T_e / m_e as in
    Bellan 2006, ch. 6 (from memory); a kinetic treatment replaces it by the electron
    Bernstein branches, so use it only for k rho_e << 1.

    Parameters
    ----------
    k : array_like
        Perpendicular wavenumber, rad/m.
    n_e : array_like
        Electron density, m^-3.
    b : array_like
        Magnetic field magnitude, T.
    t_e : array_like, optional
        Electron temperature, eV.
    gamma : float, optional
        Ratio of specific heats of the electron fluid.
    """
    w_ce = E_CHARGE * np.abs(_f(b)) / M_E
    v2 = E_CHARGE * _f(t_e) / M_E
    return np.sqrt(_WPE2_PER_N * _f(n_e) + w_ce**2 + gamma * _f(k) ** 2 * v2) / TWO_PI


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
