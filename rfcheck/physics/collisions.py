"""Electron collision frequencies: electron-ion (Coulomb) and electron-neutral.

Temperatures in eV (electrons) and K (neutral gas), pressures in Pa, densities in m^-3,
collision frequencies in s^-1 (they enter the dielectric as w -> w + i nu, see
:mod:`rfcheck.physics.coldplasma`).

References
----------
J.D. Huba, *NRL Plasma Formulary* (Naval Research Laboratory, 2019): "Collisions and
Transport" (Coulomb logarithm) and "Fundamental Plasma Parameters" (electron collision rate
nu_e = 2.91e-6 n_e lnL T_e^-3/2 s^-1, n_e in cm^-3).
S.I. Braginskii, "Transport processes in a plasma", Rev. Plasma Phys. 1 (1965) 205
(electron collision time tau_e).
M.A. Lieberman & A.J. Lichtenberg, *Principles of Plasma Discharges and Materials Processing*,
2nd ed. (Wiley, 2005), ch. 3 (electron-neutral collision frequency n_g K_m, rate
coefficients as Maxwellian averages <sigma v>).
"""

from __future__ import annotations

import functools
import math
import tomllib
from importlib import resources
from collections.abc import Callable
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import E_CHARGE, EPS0, K_B, M_E
from rfcheck.physics.domain import guard_public

__all__ = [
    "coulomb_logarithm",
    "electron_ion_collision_frequency",
    "neutral_density",
    "mean_electron_speed",
    "momentum_transfer_cross_section",
    "maxwellian_rate_coefficient",
    "momentum_transfer_rate_coefficient",
    "electron_neutral_collision_frequency",
    "known_gases",
]

# Braginskii: tau_e = 6 sqrt(2) pi^(3/2) eps0^2 m_e^(1/2) (e T_e)^(3/2) / (lnL e^4 Z n_e),
# i.e. nu_ei = 1/tau_e = _NU_EI * Z n_e lnL T_e^(-3/2) (T_e in eV, n_e in m^-3). Evaluated with
# CODATA constants this is 2.907e-12, the NRL Formulary's 2.91e-6 in cgs density units.
_NU_EI = E_CHARGE**4 / (6.0 * math.sqrt(2.0) * math.pi**1.5 * EPS0**2 * math.sqrt(M_E) * E_CHARGE**1.5)


def _f(a: ArrayLike) -> NDArray:
    return np.asarray(a, dtype=float)


def coulomb_logarithm(n_e: ArrayLike, t_e: ArrayLike, z: ArrayLike = 1) -> NDArray:
    """Electron-ion Coulomb logarithm lnL (NRL Plasma Formulary, "Collisions and Transport").

    lnL = 23 - ln(n_e^1/2 Z T_e^-3/2)   for T_e < 10 Z^2 eV
    lnL = 24 - ln(n_e^1/2 T_e^-1)       for T_e >= 10 Z^2 eV
    with n_e in cm^-3 and T_e in eV. Both forms assume T_i m_e / m_i < T_e (always the case in
    RF sources; the hot-ion branch of the Formulary is not implemented).

    Parameters
    ----------
    n_e : array_like
        Electron density, m^-3.
    t_e : array_like
        Electron temperature, eV.
    z : array_like, optional
        Ion charge number.
    """
    n_cc = _f(n_e) * 1e-6  # m^-3 -> cm^-3 (unit conversion, the Formulary's form)
    t = _f(t_e)
    z = _f(z)
    cold = 23.0 - np.log(np.sqrt(n_cc) * z * t**-1.5)
    hot = 24.0 - np.log(np.sqrt(n_cc) / t)
    return np.where(t < 10.0 * z**2, cold, hot)[()]


def electron_ion_collision_frequency(
    n_e: ArrayLike, t_e: ArrayLike, z: ArrayLike = 1, coulomb_log: ArrayLike | None = None
) -> NDArray:
    """Electron-ion collision frequency nu_ei = 1/tau_e (Braginskii), s^-1.

    nu_ei = Z n_e e^4 lnL / (6 sqrt(2) pi^(3/2) eps0^2 m_e^(1/2) (k_B T_e)^(3/2))
          = 2.91e-12 Z n_e[m^-3] lnL T_e[eV]^(-3/2)   (NRL: 2.91e-6 n_e[cm^-3] lnL T_e^-3/2, Z = 1)

    Parameters
    ----------
    n_e : array_like
        Electron density, m^-3.
    t_e : array_like
        Electron temperature, eV.
    z : array_like, optional
        Ion charge number (the rate scales as n_i Z^2 = Z n_e).
    coulomb_log : array_like, optional
        Coulomb logarithm; by default :func:`coulomb_logarithm`.
    """
    ln_l = coulomb_logarithm(n_e, t_e, z) if coulomb_log is None else _f(coulomb_log)
    return _NU_EI * _f(z) * _f(n_e) * ln_l * _f(t_e) ** -1.5


def neutral_density(pressure: ArrayLike, temperature: ArrayLike = 300.0) -> NDArray:
    """Neutral gas density n_g = p / (k_B T) in m^-3 (ideal gas).

    Parameters
    ----------
    pressure : array_like
        Gas pressure, Pa.
    temperature : array_like, optional
        Gas temperature, K.
    """
    return _f(pressure) / (K_B * _f(temperature))


def mean_electron_speed(t_e: ArrayLike) -> NDArray:
    """Mean speed of a Maxwellian electron, (8 k_B T_e / (pi m_e))^(1/2), m/s.

    Parameters
    ----------
    t_e : array_like
        Electron temperature, eV.
    """
    return np.sqrt(8.0 * E_CHARGE * _f(t_e) / (math.pi * M_E))


@functools.cache
def _gas_table() -> dict[str, Any]:
    text = resources.files("rfcheck").joinpath("data/gases.toml").read_text(encoding="utf-8")
    return tomllib.loads(text)["gases"]


def known_gases() -> tuple[str, ...]:
    """Names of the gases with a cross-section table in ``rfcheck/data/gases.toml``."""
    return tuple(sorted(_gas_table()))


@functools.cache
def _log_table(gas: str) -> tuple[NDArray, NDArray]:
    table = _gas_table()
    if gas not in table:
        raise ValueError(f"no cross-section data for gas {gas!r}; known: {', '.join(known_gases())}")
    entry = table[gas]
    log_e = np.log(np.asarray(entry["energy_ev"], dtype=float))
    sigma = np.asarray(entry["cross_section_m2"], dtype=float)
    log_e.flags.writeable = sigma.flags.writeable = False
    return log_e, sigma


def momentum_transfer_cross_section(gas: str, energy_ev: ArrayLike) -> NDArray:
    """Electron momentum-transfer cross section of a gas, m^2, from ``gases.toml``.

    Linear in log(E) between tabulated energies, held at the end values outside the table.
    Each table names its source, its kind (elastic or effective momentum transfer) and its
    confidence (see the data file).

    Parameters
    ----------
    gas : str
        Gas name as in the table ("Ar", "He", "N2", ...).
    energy_ev : array_like
        Electron energy, eV (> 0).

    Raises
    ------
    ValueError
        For a gas that is not in the table.
    """
    log_e, sigma = _log_table(gas)
    return np.interp(np.log(_f(energy_ev)), log_e, sigma)[()]


# Maxwellian average <sigma v> = v_mean * Integral_0^inf sigma(x T_e) x exp(-x) dx, x = E/T_e.
# Quadrature: the trapezoidal rule in u = ln x on a fixed grid x = 1e-5 ... 60 (481 nodes).
# For a smooth sigma the rule converges geometrically (the integrand vanishes at both ends of
# the u axis); the parts cut off below 1e-5 and above 60 are < 3e-8 of the integral for any
# sigma ~ E^a with a > -1.5. Interpolated tables (kinks at the table energies) are integrated
# to ~1e-4 relative (checked against scipy.integrate.quad in the tests).
_X = np.geomspace(1e-5, 60.0, 481)
_H = float(np.log(_X[1] / _X[0]))
_W = _H * _X**2 * np.exp(-_X)
_W[0] *= 0.5
_W[-1] *= 0.5
_X.flags.writeable = _W.flags.writeable = False


def _check_temperature(t_e: ArrayLike) -> NDArray:
    t = _f(t_e)
    if not np.all(np.isfinite(t) & (t > 0)):
        raise ValueError(f"electron temperature must be finite and > 0 eV, got {t_e!r}")
    return t


def maxwellian_rate_coefficient(
    cross_section: Callable[[NDArray], ArrayLike], t_e: ArrayLike
) -> NDArray:
    """Rate coefficient <sigma v> of a cross section over a Maxwellian electron distribution, m^3/s.

    K(T_e) = Integral_0^inf sigma(E) v(E) f_M(E) dE,
    f_M(E) = 2 (E/pi)^(1/2) T_e^(-3/2) exp(-E/T_e),  v(E) = (2 e E / m_e)^(1/2),
    i.e. K = v_mean * Integral_0^inf sigma(x T_e) x exp(-x) dx with v_mean = (8 e T_e/(pi m_e))^(1/2)
    (Lieberman & Lichtenberg, Principles of Plasma Discharges and Materials Processing, 2nd ed.
    (Wiley 2005), ch. 3). Exact limits: a constant sigma gives sigma v_mean; sigma ~ 1/v gives
    sigma v, independent of T_e.

    Parameters
    ----------
    cross_section : callable
        sigma(E) in m^2 for an array of electron energies E in eV (vectorised).
    t_e : array_like
        Electron temperature, eV (> 0). Any shape; the result has the same shape.

    Raises
    ------
    ValueError
        For a non-positive or non-finite temperature.
    """
    t = _check_temperature(t_e)
    energies = _X.reshape((-1,) + (1,) * t.ndim) * t  # (nodes, *t.shape)
    sigma = np.asarray(cross_section(energies), dtype=float)
    return (mean_electron_speed(t) * np.tensordot(_W, sigma, axes=(0, 0)))[()]


def momentum_transfer_rate_coefficient(gas: str, t_e: ArrayLike) -> NDArray:
    """Maxwellian momentum-transfer rate coefficient K_m(T_e) = <sigma_m v> of a gas, m^3/s.

    :func:`maxwellian_rate_coefficient` of the tabulated cross section
    (:func:`momentum_transfer_cross_section`).

    Parameters
    ----------
    gas : str
        Gas name as in ``gases.toml``.
    t_e : array_like
        Electron temperature, eV (> 0).
    """
    log_e, sigma = _log_table(gas)
    return maxwellian_rate_coefficient(lambda e: np.interp(np.log(e), log_e, sigma), t_e)


def electron_neutral_collision_frequency(
    gas: str,
    pressure: ArrayLike,
    t_e: ArrayLike,
    gas_temperature: ArrayLike = 300.0,
    cross_section: ArrayLike | None = None,
) -> NDArray:
    """Electron-neutral momentum-transfer collision frequency nu_en = n_g <sigma_m v>, s^-1.

    n_g = p / (k_B T_g); <sigma_m v> = K_m(T_e) is the Maxwellian average of the tabulated
    momentum-transfer cross section of ``gases.toml``
    (:func:`momentum_transfer_rate_coefficient`; Lieberman & Lichtenberg 2005, ch. 3). A
    constant ``cross_section`` gives its exact Maxwellian average sigma v_mean,
    v_mean = (8 k_B T_e / (pi m_e))^(1/2).

    Parameters
    ----------
    gas : str
        Gas name ("Ar", "He", ...); used only when ``cross_section`` is None.
    pressure : array_like
        Gas pressure, Pa.
    t_e : array_like
        Electron temperature, eV (> 0).
    gas_temperature : array_like, optional
        Neutral gas temperature, K.
    cross_section : array_like, optional
        Constant momentum-transfer cross section to use instead of the table, m^2.
    """
    if cross_section is None:
        rate = momentum_transfer_rate_coefficient(gas, t_e)
    else:
        rate = _f(cross_section) * mean_electron_speed(_check_temperature(t_e))
    return neutral_density(pressure, gas_temperature) * rate


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
