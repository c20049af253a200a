"""RF power in lines and windows: peak fields, breakdown bounds, absorbed power and heating.

Pure numpy on SI values (W, V/m, m, Hz, Pa, K). Every value here supports design review;
breakdown numbers are theoretical upper bounds for a clean, dry, matched line and defer to
local codes, supplier ratings and qualified practice.

References
----------
D.M. Pozar, *Microwave Engineering*, 4th ed. (Wiley 2012), §3.3 (TE10 power flow and
power capacity), §2.3 (standing waves).
A.D. MacDonald, *Microwave Breakdown in Gases* (Wiley 1966).
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import C, TWO_PI
from rfcheck.physics.waveguide import circular_te_cutoff, te_wave_impedance
from rfcheck.physics.domain import guard_public

__all__ = [
    "AIR_BREAKDOWN_FIELD",
    "REFERENCE_PRESSURE",
    "AIR_COLLISION_FREQUENCY_PER_PA",
    "vswr",
    "return_loss_db",
    "te10_field_amplitude",
    "te10_peak_field",
    "te10_max_power",
    "te11_field_amplitude",
    "te11_peak_field",
    "te11_max_power",
    "max_net_power",
    "max_forward_power",
    "air_collision_frequency",
    "breakdown_field",
    "below_cutoff_attenuation_db",
    "reflected_power",
    "transmitted_power",
    "absorbed_power",
    "average_power",
    "disc_temperature_rise",
]

#: Breakdown field of dry air at 1 atm, uniform field, cm gaps: 3 MV/m (30 kV/cm).
#: Common practice; microwave-engineering texts use about 3e6 V/m (Pozar, from memory).
AIR_BREAKDOWN_FIELD = 3.0e6
#: Reference pressure for :data:`AIR_BREAKDOWN_FIELD`: the standard atmosphere, Pa
#: (a unit definition, 101 325 Pa exactly).
REFERENCE_PRESSURE = 101_325.0
#: Electron momentum-transfer collision frequency in air per unit pressure, s^-1 Pa^-1:
#: ν_c ≈ 5.3e9 p[Torr] s^-1 (MacDonald 1966, from memory; L) = 5.3e9 / (101325/760).
AIR_COLLISION_FREQUENCY_PER_PA = 5.3e9 / (REFERENCE_PRESSURE / 760.0)


def vswr(gamma_mag: ArrayLike) -> NDArray:
    """Voltage standing-wave ratio (1 + |Γ|)/(1 − |Γ|) (Pozar §2.3); inf at |Γ| = 1."""
    g = np.asarray(gamma_mag, dtype=float)
    with np.errstate(divide="ignore"):
        return (1.0 + g) / (1.0 - g)


def return_loss_db(gamma_mag: ArrayLike) -> NDArray:
    """Return loss, dB: RL = −20 log10 |Γ| (positive for a passive load; Pozar §2.3)."""
    with np.errstate(divide="ignore"):
        return -20.0 * np.log10(np.asarray(gamma_mag, dtype=float))


def _te10_impedance(a, f):
    return te_wave_impedance(f, C / (2.0 * np.asarray(a, dtype=float)))


def te10_field_amplitude(power: ArrayLike, a: ArrayLike, b: ArrayLike, f: ArrayLike) -> NDArray:
    """Peak (crest) field E0 at the centre of the broad wall for a travelling TE10 wave, V/m.

    P = a b E0² / (4 Z_TE10)  ⇒  E0 = √(4 Z_TE10 P / (a b)),  Z_TE10 = η0/√(1 − (c/2af)²).
    Pozar §3.3. ``power`` is the forward power (W); NaN below cutoff.
    """
    return np.sqrt(4.0 * _te10_impedance(a, f) * np.asarray(power, dtype=float)
                   / (np.asarray(a, dtype=float) * np.asarray(b, dtype=float)))


def te10_peak_field(power: ArrayLike, a: ArrayLike, b: ArrayLike, f: ArrayLike,
                    gamma_mag: ArrayLike = 0.0) -> NDArray:
    """Largest field in a TE10 guide with a standing wave, V/m: (1 + |Γ|) E0.

    E0 from :func:`te10_field_amplitude` for the forward power; the forward and reflected
    waves add in phase at the standing-wave maxima (Pozar §2.3).
    """
    return (1.0 + np.asarray(gamma_mag, dtype=float)) * te10_field_amplitude(power, a, b, f)


def te10_max_power(a: ArrayLike, b: ArrayLike, f: ArrayLike,
                   breakdown: ArrayLike = AIR_BREAKDOWN_FIELD) -> NDArray:
    """Theoretical TE10 power capacity of a matched guide, W.

    P_max = (a b / 4) E_bd² / Z_TE10 = a b E_bd² √(1 − (f_c/f)²) / (4 η0)   (Pozar §3.3).

    A theoretical upper bound for a uniform, clean, dry, matched line: practical ratings
    apply a further factor for flange gaps, humidity, dust, surface finish and altitude
    (common practice). NaN below cutoff.
    """
    e = np.asarray(breakdown, dtype=float)
    return np.asarray(a, dtype=float) * np.asarray(b, dtype=float) * e * e / (4.0 * _te10_impedance(a, f))


def _te11_constant() -> float:
    """p'² / ((p'² − 1) J1(p')²) with p' = p'11, the first zero of J1' (1.841184)."""
    from scipy.special import jnp_zeros, jv

    p = float(jnp_zeros(1, 1)[0])
    return p * p / ((p * p - 1.0) * float(jv(1, p)) ** 2)


def _te11_impedance(radius, f):
    from scipy.special import jnp_zeros

    fc = float(jnp_zeros(1, 1)[0]) * C / (TWO_PI * np.asarray(radius, dtype=float))
    return te_wave_impedance(f, fc)


def te11_field_amplitude(power: ArrayLike, diameter: ArrayLike, f: ArrayLike) -> NDArray:
    """Largest transverse field of a travelling TE11 wave in an empty circular guide, V/m.

    The field of TE11 is largest on the axis, where E_ρ and E_φ both tend to
    ωμ A/(2 k_c) (J1(x)/x and J1'(x) → 1/2); with the mode's power flow
    P = π ωμ β |A|² (p'² − 1) J1(p')² / (4 k_c⁴) (Pozar §3.4) this gives

        E_axis² = Z_TE p'² P / (π a² (p'² − 1) J1(p')²) ≈ 1.333 Z_TE P / a²,

    a = diameter/2, Z_TE = η0 / √(1 − (f_c/f)²). NaN below cutoff.
    """
    a = 0.5 * np.asarray(diameter, dtype=float)
    z = _te11_impedance(a, f)
    return np.sqrt(_te11_constant() * z * np.asarray(power, dtype=float) / (math.pi * a * a))


def te11_peak_field(power: ArrayLike, diameter: ArrayLike, f: ArrayLike,
                    gamma_mag: ArrayLike = 0.0) -> NDArray:
    """Largest field in a circular TE11 guide with a standing wave, V/m: (1 + |Γ|) E_axis."""
    return (1.0 + np.asarray(gamma_mag, dtype=float)) * te11_field_amplitude(power, diameter, f)


def te11_max_power(diameter: ArrayLike, f: ArrayLike,
                   e_max: ArrayLike = AIR_BREAKDOWN_FIELD) -> NDArray:
    """Power of a matched TE11 wave whose axial field equals e_max, W (theoretical capacity):
    P_max = π a² e_max² / (Z_TE p'² / ((p'² − 1) J1(p')²))."""
    a = 0.5 * np.asarray(diameter, dtype=float)
    e = np.asarray(e_max, dtype=float)
    return math.pi * a * a * e * e / (_te11_constant() * _te11_impedance(a, f))


def max_net_power(p_max: ArrayLike, gamma_mag: ArrayLike) -> NDArray:
    """Largest net (forward − reflected) power before the standing-wave peak reaches breakdown, W.

    Peak field (1 + |Γ|) E_fwd = E_bd ⇒ P_fwd = P_max/(1 + |Γ|)², net = P_fwd (1 − |Γ|²)
    = P_max / VSWR.
    """
    return np.asarray(p_max, dtype=float) / vswr(gamma_mag)


def max_forward_power(p_max: ArrayLike, gamma_mag: ArrayLike) -> NDArray:
    """Largest forward power before the standing-wave peak reaches breakdown: P_max/(1 + |Γ|)², W."""
    return np.asarray(p_max, dtype=float) / (1.0 + np.asarray(gamma_mag, dtype=float)) ** 2


def air_collision_frequency(pressure: ArrayLike) -> NDArray:
    """Electron collision frequency in air, s^-1: ν_c ≈ 5.3e9 p[Torr] (MacDonald 1966; L)."""
    return AIR_COLLISION_FREQUENCY_PER_PA * np.asarray(pressure, dtype=float)


def breakdown_field(pressure: ArrayLike = REFERENCE_PRESSURE, gas_factor: ArrayLike = 1.0,
                    f: ArrayLike | None = None, e_reference: float = AIR_BREAKDOWN_FIELD) -> NDArray:
    """Breakdown field estimate, V/m, scaled from air at 1 atm.

    E_bd = g · E_ref · (p / p_atm) · √(1 + (ω/ν_c)²)   (the last factor only if ``f`` given).

    The linear pressure scaling is the similarity law E/p = const of the collision-dominated
    regime; ``gas_factor`` g is the ratio of a fill gas's breakdown field to air's at equal
    pressure (1 for air; a user value for N2, SF6 ...). The optional frequency factor is the
    effective-field relation E_eff = E ν_c/√(ν_c² + ω²) with ν_c from
    :func:`air_collision_frequency` (MacDonald 1966; L); at 1 atm and GHz it is ≈ 1.

    Validity: a theoretical bound for ν_c ≫ ω and gaps much larger than the diffusion
    length. It does not hold near the breakdown minimum (ν_c ≈ ω, about 3 Torr at
    2.45 GHz), at low pressure where diffusion controls breakdown, or in vacuum
    (multipactor). It supports review and defers to measured data and qualified practice.
    """
    e = (e_reference * np.asarray(gas_factor, dtype=float)
         * np.asarray(pressure, dtype=float) / REFERENCE_PRESSURE)
    if f is None:
        return e
    nu = air_collision_frequency(pressure)
    with np.errstate(divide="ignore"):
        return e * np.sqrt(1.0 + (TWO_PI * np.asarray(f, dtype=float) / nu) ** 2)


def below_cutoff_attenuation_db(diameter: ArrayLike, length: ArrayLike, f: ArrayLike) -> NDArray:
    """Attenuation of a circular tube (vent hole, mesh cell) below its TE11 cutoff, dB.

    f_c = p'11 c/(π d) (TE11, p'11 = 1.8412); α = (2π/λ_c) √(1 − (f/f_c)²) Np/m;
    A = 20 log10(e) · α · t. Far below cutoff A ≈ 32 t/d dB (common practice). Returns 0
    at and above cutoff, where the tube propagates. Evanescent-mode attenuation only: the
    entrance loss and the number of holes in an array are not included (Pozar §3.4).
    """
    fc = circular_te_cutoff(np.asarray(diameter, dtype=float) / 2.0, 1, 1)
    lam_c = C / fc
    x = 1.0 - (np.asarray(f, dtype=float) / fc) ** 2
    alpha = TWO_PI / lam_c * np.sqrt(np.clip(x, 0.0, None))
    return 20.0 * math.log10(math.e) * alpha * np.asarray(length, dtype=float)


def reflected_power(forward_power: ArrayLike, gamma_mag: ArrayLike) -> NDArray:
    """Reflected power |Γ|² P_fwd, W."""
    return np.asarray(forward_power, dtype=float) * np.asarray(gamma_mag, dtype=float) ** 2


def transmitted_power(forward_power: ArrayLike, transmittance: ArrayLike) -> NDArray:
    """Power passed through a window, T P_fwd, W."""
    return np.asarray(forward_power, dtype=float) * np.asarray(transmittance, dtype=float)


def absorbed_power(forward_power: ArrayLike, absorptance: ArrayLike) -> NDArray:
    """Power dissipated in a window, A P_fwd, W (use the average power for heating)."""
    return np.asarray(forward_power, dtype=float) * np.asarray(absorptance, dtype=float)


def average_power(peak_power: ArrayLike, duty_cycle: ArrayLike) -> NDArray:
    """Average power = peak × duty cycle (duty as a fraction 0…1), W."""
    duty = np.asarray(duty_cycle, dtype=float)
    if np.any((duty < 0.0) | (duty > 1.0)):
        raise ValueError("duty cycle must be a fraction between 0 and 1")
    return np.asarray(peak_power, dtype=float) * duty


def disc_temperature_rise(absorbed: ArrayLike, conductivity: ArrayLike, thickness: ArrayLike) -> NDArray:
    """Centre-to-edge temperature rise of an edge-cooled disc, K (an estimate).

    ΔT = P_abs / (4π k t) for power P_abs deposited uniformly in a disc of thickness t and
    thermal conductivity k, held at a fixed temperature at its rim, steady state, radial
    conduction only: q = P/(π R² t), ΔT = q R²/(4k), independent of the radius (standard
    conduction result, e.g. Carslaw & Jaeger, *Conduction of Heat in Solids*).

    An estimate only: the RF heating of a window is not uniform (a TE10 or Gaussian profile
    concentrates it on axis and raises the centre temperature above this value), k falls
    with temperature, and face cooling, radiation and thermal stress are not included.
    """
    return (np.asarray(absorbed, dtype=float)
            / (4.0 * math.pi * np.asarray(conductivity, dtype=float) * np.asarray(thickness, dtype=float)))


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
