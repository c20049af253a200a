"""Inductive (transformer) coupling of an RF coil to a plasma: skin depth and load impedance.

Pure numpy on SI values: densities in m^-3, frequencies in Hz (angular frequency stays
inside), collision frequencies in s^-1, lengths in m, impedances in ohm.

Skin depth
----------
The RF field of a coil enters an overdense plasma only a skin depth δ. For a cold,
unmagnetised plasma with electron collision frequency ν (time dependence e^(−iωt)),
ε_p = 1 − ω_pe² / (ω (ω + iν)) and k = (ω/c) √ε_p; the field falls as e^(−z/δ) with
δ = 1 / Im k (:func:`plasma_skin_depth`, the general form). Its two limits are

* collisionless, ν ≪ ω ≪ ω_pe:  δ_p = c / ω_pe  (the electron inertial length);
* collisional, ν ≫ ω:  δ_c = √(2 / (ω μ0 σ_dc)), σ_dc = e² n_e / (m_e ν), the skin depth of
  an ordinary conductor.

:func:`skin_depth_regime` names the regime from ν/ω (below 0.1: collisionless; above 10:
collisional; between: the general form, neither limit within ~5 %). The anomalous
(non-local, warm-electron) skin effect of low-pressure sources, where the electrons cross
the skin layer within an RF period, is not modelled: this is the local cold-plasma result.

Transformer model
-----------------
A coil of N turns and radius b, length l, around a plasma column of radius R (the plasma
fills the tube; the current flows in one skin layer at its edge) is a transformer whose
secondary is a single turn of plasma (Lieberman & Lichtenberg §12.2):

* coil (primary) inductance L11 = μ0 π b² N² / l (long solenoid);
* mutual inductance L12 = μ0 π R² N / l;
* plasma loop: resistance R_p = 2π R m_e ν / (e² n_e l δ) (= 2πR / (σ_dc l δ)), magnetising
  inductance L_mp = μ0 π R² / l and electron-inertia inductance L_e = R_p / ν
  = 2π R m_e / (e² n_e l δ);
* seen from the coil: Z = R_coil + jω L11 + ω² L12² / (R_p + jω (L_mp + L_e)).

Limits that check it (tests): a vanishing plasma (n_e → 0) leaves jω L11; a dense plasma
(δ → 0) excludes the flux from the column, Z → jω μ0 π N² (b² − R²)/l, and its resistance
tends to N² R_p. The long-solenoid forms overstate the inductance of a short coil (Nagaoka
factor below 1); the model is a design estimate of the load, not a field solution.

References
----------
M. A. Lieberman & A. J. Lichtenberg, *Principles of Plasma Discharges and Materials
Processing*, 2nd ed. (Wiley 2005): ch. 12 (inductive discharges: §12.1 skin depths δ_p and
δ_c; §12.2 the transformer model) — forms from memory, checked here against their closed
limits. J. D. Jackson, *Classical Electrodynamics*, 3rd ed., §5.18 (skin depth of a
conductor, δ = √(2/(μσω))).
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import C, E_CHARGE, EPS0, M_E, MU0, TWO_PI
from rfcheck.physics.domain import guard_public

__all__ = [
    "COLLISIONLESS_BELOW",
    "COLLISIONAL_ABOVE",
    "collisionless_skin_depth",
    "collisional_skin_depth",
    "dc_conductivity",
    "plasma_skin_depth",
    "skin_depth_regime",
    "solenoid_inductance",
    "coil_ac_resistance",
    "CoilLoad",
    "transformer_load",
    "coil_drive",
    "CoilDrive",
    "eh_transition_density",
]

#: ν/ω below which the skin depth is named collisionless (c/ω_pe within ~5 % where ω ≪ ω_pe)
COLLISIONLESS_BELOW = 0.1
#: ν/ω above which it is named collisional (√(2/(ωμ0σ)) within ~5 %)
COLLISIONAL_ABOVE = 10.0


def _omega_pe2(n_e: ArrayLike) -> NDArray:
    return np.asarray(n_e, dtype=float) * E_CHARGE**2 / (EPS0 * M_E)


def collisionless_skin_depth(n_e: ArrayLike) -> NDArray:
    """Collisionless skin depth δ_p = c / ω_pe, m (the electron inertial length).

    L&L §12.1; NRL Plasma Formulary ("electron inertial length" c/ω_pe = 5.31e5 n_e^-1/2 cm,
    n_e in cm^-3). 16.8 mm at 1e17 m^-3. Inf at n_e = 0.
    """
    return C / np.sqrt(_omega_pe2(n_e))


def dc_conductivity(n_e: ArrayLike, nu: ArrayLike) -> NDArray:
    """DC conductivity of the electrons, S/m: σ_dc = e² n_e / (m_e ν) (L&L §2.4). Inf at ν = 0."""
    return np.asarray(n_e, dtype=float) * E_CHARGE**2 / (M_E * np.asarray(nu, dtype=float))


def collisional_skin_depth(n_e: ArrayLike, f: ArrayLike, nu: ArrayLike) -> NDArray:
    """Collisional skin depth δ_c = √(2 / (ω μ0 σ_dc)), m (L&L §12.1; Jackson §5.18).

    Valid for ν ≫ ω (then σ is real and equal to σ_dc). 0 at ν = 0 (no collisions: this form
    does not apply; see :func:`plasma_skin_depth`).
    """
    omega = TWO_PI * np.asarray(f, dtype=float)
    return np.sqrt(2.0 / (omega * MU0 * dc_conductivity(n_e, nu)))


def plasma_skin_depth(n_e: ArrayLike, f: ArrayLike, nu: ArrayLike = 0.0) -> NDArray:
    """Skin depth of a cold unmagnetised plasma, m: δ = 1 / Im k, k = (ω/c) √ε_p.

    ε_p = 1 − ω_pe² / (ω (ω + iν)) (e^(−iωt)). For ν = 0 and ω < ω_pe it is
    c / √(ω_pe² − ω²) exactly; it tends to c/ω_pe for ν ≪ ω ≪ ω_pe and to
    √(2/(ω μ0 σ_dc)) for ν ≫ ω. Inf where the wave propagates without loss (ν = 0, ω ≥ ω_pe).
    """
    omega = TWO_PI * np.asarray(f, dtype=float)
    nu = np.asarray(nu, dtype=float)
    eps = 1.0 - _omega_pe2(n_e) / (omega * (omega + 1j * nu))
    k_im = (omega / C) * np.sqrt(eps.astype(complex)).imag
    return 1.0 / np.abs(k_im)


def skin_depth_regime(f: ArrayLike, nu: ArrayLike) -> NDArray:
    """Name of the skin-depth regime from ν/ω: "collisionless", "intermediate" or "collisional".

    ν/ω < :data:`COLLISIONLESS_BELOW` (0.1): collisionless; > :data:`COLLISIONAL_ABOVE` (10):
    collisional; between, neither limit holds and the general form is the one to read
    (L&L §12.1 name the two limits; the thresholds are common practice).
    """
    ratio = np.asarray(nu, dtype=float) / (TWO_PI * np.asarray(f, dtype=float))
    return np.where(ratio < COLLISIONLESS_BELOW, "collisionless",
                    np.where(ratio > COLLISIONAL_ABOVE, "collisional", "intermediate"))


def solenoid_inductance(turns: ArrayLike, radius: ArrayLike, length: ArrayLike) -> NDArray:
    """Long-solenoid inductance, H: L = μ0 π r² N² / l (L&L §12.2; any electromagnetism text).

    A short coil has less (Nagaoka's factor, 0.69 at l = 2r): an upper estimate.
    """
    n = np.asarray(turns, dtype=float)
    r = np.asarray(radius, dtype=float)
    return MU0 * math.pi * r**2 * n**2 / np.asarray(length, dtype=float)


def coil_ac_resistance(conductor_length: ArrayLike, conductor_diameter: ArrayLike, f: ArrayLike,
                       conductivity: ArrayLike = 5.8e7) -> NDArray:
    """AC resistance of a round conductor in the skin-effect limit, ohm.

    R = ℓ R_s / (π d), R_s = √(π f μ0 / σ) (current in one skin depth round the perimeter;
    valid for d ≫ δ, 18 µm in copper at 13.56 MHz). Proximity effect between turns raises it
    (typically 1.5-3×, common practice): a lower estimate. Copper 5.8e7 S/m by default.
    """
    rs = np.sqrt(math.pi * np.asarray(f, dtype=float) * MU0 / np.asarray(conductivity, dtype=float))
    return np.asarray(conductor_length, dtype=float) * rs / (math.pi * np.asarray(conductor_diameter,
                                                                                    dtype=float))


class CoilLoad(NamedTuple):
    """Impedance the coil presents to the matching network, and its parts (ohm, H, m)."""

    impedance: NDArray  # complex Z = R + jX seen at the coil terminals
    plasma_resistance: NDArray  # the plasma's share of Re Z, ohm
    coil_resistance: NDArray  # the coil's own resistance, ohm
    inductance: NDArray  # Im Z / ω, H
    skin_depth: NDArray  # δ used for the plasma loop, m
    efficiency: NDArray  # plasma_resistance / (plasma_resistance + coil_resistance)


def transformer_load(n_e: ArrayLike, f: ArrayLike, nu: ArrayLike, *, turns: float,
                     coil_radius: float, coil_length: float, plasma_radius: float,
                     coil_resistance: ArrayLike = 0.0) -> CoilLoad:
    """Coil-plasma load of a cylindrical inductive source (transformer model, L&L §12.2).

    Z = R_coil + jω L11 + ω² L12² / (R_p + jω (L_mp + L_e)) with the elements in the module
    docstring and δ from :func:`plasma_skin_depth` (the general form, so the collisionless
    and collisional ends are both covered). The skin depth is taken no larger than the
    plasma radius (a thicker layer carries the current across the whole column).

    Parameters
    ----------
    n_e, f, nu : array_like
        Electron density (m^-3), drive frequency (Hz), electron collision frequency (s^-1);
        broadcast together.
    turns, coil_radius, coil_length : float
        Coil: number of turns N, radius b (m), axial length l (m).
    plasma_radius : float
        Radius R of the plasma column (the tube's inner radius), m; R < b.
    coil_resistance : array_like
        The coil's own series resistance, ohm (:func:`coil_ac_resistance`).
    """
    if not 0 < plasma_radius < coil_radius:
        raise ValueError("transformer_load needs 0 < plasma radius < coil radius")
    if not (coil_length > 0 and turns > 0):
        raise ValueError("transformer_load needs a positive coil length and number of turns")
    omega = TWO_PI * np.asarray(f, dtype=float)
    n = np.asarray(n_e, dtype=float)
    nu = np.asarray(nu, dtype=float)
    delta = np.minimum(plasma_skin_depth(n, f, nu), plasma_radius)
    l11 = MU0 * math.pi * coil_radius**2 * turns**2 / coil_length
    l12 = MU0 * math.pi * plasma_radius**2 * turns / coil_length
    l_mp = MU0 * math.pi * plasma_radius**2 / coil_length
    inertia = TWO_PI * plasma_radius * M_E / (E_CHARGE**2 * n * coil_length * delta)
    r_p = inertia * nu
    l_e = inertia
    secondary = r_p + 1j * omega * (l_mp + l_e)
    reflected = omega**2 * l12**2 / secondary
    r_coil = np.asarray(coil_resistance, dtype=float)
    z = r_coil + 1j * omega * l11 + reflected
    r_plasma = reflected.real
    with np.errstate(invalid="ignore", divide="ignore"):
        eff = r_plasma / (r_plasma + r_coil)
    return CoilLoad(z, r_plasma, r_coil * np.ones_like(r_plasma), z.imag / omega, delta, eff)


class CoilDrive(NamedTuple):
    """Coil current and voltage (peak values) when the coil absorbs a power P."""

    current: NDArray  # A, peak
    voltage: NDArray  # V, peak, across the coil terminals


def coil_drive(power: ArrayLike, impedance: ArrayLike) -> CoilDrive:
    """Peak coil current and terminal voltage at absorbed power P, for a load Z = R + jX.

    P = ½ |I|² R, so |I| = √(2P/R) and |V| = |I| |Z| (circuit theory; the voltage is nearly
    all reactive, ωL |I|, since X ≫ R in an inductive source). NaN where R ≤ 0.
    """
    z = np.asarray(impedance, dtype=complex)
    r = np.where(z.real > 0, z.real, np.nan)
    current = np.sqrt(2.0 * np.asarray(power, dtype=float) / r)
    return CoilDrive(current, current * np.abs(z))


def eh_transition_density(n_e: ArrayLike, f: ArrayLike, nu: ArrayLike, *, turns: float,
                          coil_radius: float, coil_length: float,
                          plasma_radius: float) -> NDArray:
    """Density of the E-to-H transition by the transformer model, m^-3.

    Criterion: the density at which the plasma's resistance seen by the coil,
    R_ind(n) = Re ω² L12² / (R_p + jω (L_mp + L_e)) of :func:`transformer_load`, has its
    first maximum (lowest density; where ν grows with n through electron-ion collisions a
    second, high-density maximum can follow, which is not a mode transition).
    At a fixed coil current the inductively absorbed power ½ I² R_ind rises with the density
    below that point (∝ n while the skin depth exceeds the radius) and falls above it
    (∝ n^-1/2 in the thin-skin limit), while the particle and energy losses grow ∝ n: only
    above the maximum is the inductive (H-mode) equilibrium stable; below it the discharge
    falls back to capacitive (E-mode) coupling. Lieberman & Lichtenberg, 2nd ed., §12.2
    (absorbed power against density) and §12.3 (E-H transitions, hysteresis) — criterion
    from memory, confidence medium; real transitions show hysteresis and depend on the
    capacitive coupling of the coil, which the model leaves out.

    Parameters
    ----------
    n_e : array_like
        Ascending density grid, m^-3, on the last axis (geometric spacing; the maximum is
        refined by a parabola in log n through the three grid points round it).
    f, nu : array_like
        Frequency (Hz) and collision frequency (s^-1), broadcast with n_e.
    turns, coil_radius, coil_length, plasma_radius : float
        As for :func:`transformer_load`.

    Returns
    -------
    ndarray
        The transition density (the grid's last axis removed); NaN where the grid holds no
        interior maximum (it does not bracket one).
    """
    n = np.asarray(n_e, dtype=float)
    load = transformer_load(n, f, nu, turns=turns, coil_radius=coil_radius,
                            coil_length=coil_length, plasma_radius=plasma_radius)
    r = np.broadcast_to(load.plasma_resistance, np.broadcast_shapes(n.shape,
                                                                   load.plasma_resistance.shape))
    x = np.log(np.broadcast_to(n, r.shape))
    rr = np.where(np.isnan(r), -np.inf, r)
    local = np.zeros(r.shape, dtype=bool)
    local[..., 1:-1] = (rr[..., 1:-1] > rr[..., :-2]) & (rr[..., 1:-1] >= rr[..., 2:])
    i = np.where(local.any(axis=-1), np.argmax(local, axis=-1), 0)
    inner = (i > 0) & (i < r.shape[-1] - 1)
    j = np.clip(i, 1, r.shape[-1] - 2)[..., None]
    x0, x1, x2 = (np.take_along_axis(x, j + k, axis=-1)[..., 0] for k in (-1, 0, 1))
    y0, y1, y2 = (np.take_along_axis(r, j + k, axis=-1)[..., 0] for k in (-1, 0, 1))
    den = (x0 - x1) * (x0 - x2) * (x1 - x2)
    a = (x2 * (y1 - y0) + x1 * (y0 - y2) + x0 * (y2 - y1)) / den
    b = (x2**2 * (y0 - y1) + x1**2 * (y2 - y0) + x0**2 * (y1 - y2)) / den
    peak = np.where(a < 0, -b / (2 * a), x1)
    return np.where(inner, np.exp(np.clip(peak, x0, x2)), np.nan)


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
