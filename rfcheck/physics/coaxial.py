"""Coaxial line (TEM mode): field at the inner conductor, power capacity and wall loss.

Pure numpy on SI values: diameters in m (d inner conductor outer diameter, D outer conductor
inner diameter; radii a = d/2, b = D/2), powers in W, fields in V/m, frequencies in Hz.
The characteristic impedance and the approximate TE11 cutoff live in
:mod:`rfcheck.physics.waveguide` beside the other line types.

The TEM field between the conductors is radial, E(ρ) = V / (ρ ln(b/a)), largest on the
surface of the inner conductor. With peak voltage V and characteristic impedance
Z0 = η0 ln(b/a) / (2π √ε_r), a matched line carries P = V² / (2 Z0). So

    E_max = √(2 Z0 P) / (a ln(b/a)),    P_max = π √ε_r a² E_bd² ln(b/a) / η0,

and with a standing wave of reflection |Γ| the field maximum is (1 + |Γ|) times the
travelling-wave one. The wall loss of copper-like conductors (surface resistance
R_s = √(π f μ0 / σ)) is α_c = R_s (1/a + 1/b) / (2 η ln(b/a)) Np/m, η = η0/√ε_r; a line
carrying average power P_avg heats by 2 α_c P_avg per metre near its input.

References
----------
D.M. Pozar, *Microwave Engineering*, 4th ed. (Wiley 2012), §2.2 (coaxial fields, voltage,
impedance), §2.7 (conductor loss of a coaxial line: Example 2.7 by the perturbation method),
§3.5 (coaxial line).
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import ETA0, MU0, TWO_PI
from rfcheck.physics.domain import guard_public

__all__ = [
    "COPPER_CONDUCTIVITY",
    "coaxial_field_amplitude",
    "coaxial_peak_field",
    "coaxial_max_power",
    "coaxial_conductor_attenuation",
    "coaxial_wall_heating",
]

#: Conductivity of annealed copper at 20 °C, S/m: 5.80e7 (IEC 60028 annealed-copper standard,
#: 100 % IACS = 58.0 MS/m). Rigid lines are copper or silver-plated copper or aluminium
#: (about 3.5e7 S/m): the default is the best case of the usual materials.
COPPER_CONDUCTIVITY = 5.8e7


def _log_ratio(inner_diameter, outer_diameter):
    return np.log(np.asarray(outer_diameter, dtype=float) / np.asarray(inner_diameter, dtype=float))


def coaxial_field_amplitude(power: ArrayLike, inner_diameter: ArrayLike, outer_diameter: ArrayLike,
                            eps_r: float = 1.0) -> NDArray:
    """Peak radial field on the inner conductor of a matched coaxial line, V/m.

    E_a = V / (a ln(b/a)) with V = √(2 Z0 P) the peak voltage of the TEM wave carrying
    ``power`` (W) and Z0 = η0 ln(b/a) / (2π √ε_r) (Pozar §2.2). NaN where D ≤ d.
    """
    ln = _log_ratio(inner_diameter, outer_diameter)
    ln = np.where(ln > 0, ln, np.nan)
    z0 = ETA0 * ln / (TWO_PI * math.sqrt(eps_r))
    a = np.asarray(inner_diameter, dtype=float) / 2.0
    return np.sqrt(2.0 * z0 * np.asarray(power, dtype=float)) / (a * ln)


def coaxial_peak_field(power: ArrayLike, inner_diameter: ArrayLike, outer_diameter: ArrayLike,
                       gamma_mag: ArrayLike = 0.0, eps_r: float = 1.0) -> NDArray:
    """Largest field in a coaxial line at a standing-wave maximum, V/m: (1 + |Γ|) E_a.

    ``power`` is the forward power (W); see :func:`coaxial_field_amplitude`. NaN where D ≤ d.
    """
    return (1.0 + np.asarray(gamma_mag, dtype=float)) * coaxial_field_amplitude(
        power, inner_diameter, outer_diameter, eps_r)


def coaxial_max_power(inner_diameter: ArrayLike, outer_diameter: ArrayLike, e_breakdown: ArrayLike,
                      eps_r: float = 1.0) -> NDArray:
    """Power a matched coaxial line carries when the inner-conductor field reaches E_bd, W.

    P_max = π √ε_r a² E_bd² ln(b/a) / η0 (Pozar §2.2, with P = V²/(2 Z0)). For a fixed
    outer diameter it is largest at b/a = √e (30 Ω in air), a textbook result; 50 Ω lines
    trade some of it for lower loss. A theoretical bound: surface finish, gaps at the
    inner-conductor supports, humidity and altitude lower it. NaN where D ≤ d.
    """
    ln = _log_ratio(inner_diameter, outer_diameter)
    ln = np.where(ln > 0, ln, np.nan)
    a = np.asarray(inner_diameter, dtype=float) / 2.0
    return math.pi * math.sqrt(eps_r) * a**2 * np.asarray(e_breakdown, dtype=float) ** 2 * ln / ETA0


def coaxial_conductor_attenuation(f: ArrayLike, inner_diameter: ArrayLike, outer_diameter: ArrayLike,
                                  eps_r: float = 1.0,
                                  conductivity: ArrayLike = COPPER_CONDUCTIVITY) -> NDArray:
    """Conductor attenuation of the TEM mode, Np/m (field; power falls as e^(−2 α z)).

    α_c = R_s (1/a + 1/b) / (2 η ln(b/a)), R_s = √(π f μ0 / σ), η = η0/√ε_r (Pozar §2.7,
    Example 2.7). Both conductors of the same ``conductivity`` (S/m); smooth walls (roughness
    raises it). NaN where D ≤ d.
    """
    ln = _log_ratio(inner_diameter, outer_diameter)
    ln = np.where(ln > 0, ln, np.nan)
    a = np.asarray(inner_diameter, dtype=float) / 2.0
    b = np.asarray(outer_diameter, dtype=float) / 2.0
    rs = np.sqrt(math.pi * np.asarray(f, dtype=float) * MU0 / np.asarray(conductivity, dtype=float))
    eta = ETA0 / math.sqrt(eps_r)
    return rs * (1.0 / a + 1.0 / b) / (2.0 * eta * ln)


def coaxial_wall_heating(average_power: ArrayLike, f: ArrayLike, inner_diameter: ArrayLike,
                         outer_diameter: ArrayLike, eps_r: float = 1.0,
                         conductivity: ArrayLike = COPPER_CONDUCTIVITY,
                         gamma_mag: ArrayLike = 0.0) -> NDArray:
    """Heat dissipated in the conductors per metre near the line's input, W/m.

    2 α_c P_avg for the forward wave; with a standing wave of reflection |Γ| the reflected
    wave heats as well and the current maxima heat locally more: the factor
    (1 + |Γ|²) is the line-averaged value, (1 + |Γ|)² the local worst at a current
    maximum (used here; Pozar §2.3 standing waves, §2.7 loss). The thermal rating of a line
    (the temperature rise its inner conductor can take) is the supplier's figure; this is the
    heat that rating has to carry.
    """
    g = np.asarray(gamma_mag, dtype=float)
    alpha = coaxial_conductor_attenuation(f, inner_diameter, outer_diameter, eps_r, conductivity)
    return 2.0 * alpha * np.asarray(average_power, dtype=float) * (1.0 + g) ** 2


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
