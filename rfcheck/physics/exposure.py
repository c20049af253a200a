"""RF exposure: reference levels from named tables, leak estimates and their validity.

Reference levels are plane-wave-equivalent power densities S (W/m²). Where a table gives S
it is used (in the far field one of S, E or H suffices, ICNIRP 2020); where it gives only E
and H (below 30 MHz in ICNIRP 2020) the equivalent is the lower of E²/η0 and η0 H² (the
far-field relation; near a source E and H must be checked separately with a survey
instrument, which a design review cannot replace).

Leak estimates:

* survey reading S_m at d_m, carried outward by the inverse-square law and scaled with the
  forward power: S(d) = S_m (P / P_m) (d_m / d)²;
* derived from the forward power: a leak path passes P_leak = P 10^(−A/10) (A: its
  attenuation below the forward power, dB) and radiates it as a small source of
  directivity D_l: S(d) = D_l P_leak / (4π d²).

Both hold only in the far field of the leaking spot, beyond
r_ff = max(2 D²/λ, λ) (D its largest dimension): 2D²/λ is the usual far-field distance of
an aperture (phase error π/8 across it); λ is the floor for small leaks, where kr = 2π and
the reactive terms of a small radiator's fields change E² and H² by under 3 %
(|E|² ∝ 1 − (kr)⁻² + (kr)⁻⁴ broadside of a short dipole; closed form).

Simultaneous exposure to several frequencies adds the exposure ratios:
R = Σ_i S_i / S_RL(f_i), with S_RL the level above (the quantity the table uses at f_i);
R ≤ 1 is the guidelines' summation condition (ICNIRP 2020, simultaneous exposure; taking
the stricter of E and H per frequency bounds both of their sums).

References: ICNIRP, Health Phys. 118(5):483–524 (2020); IEEE Std C95.1-2019; 47 CFR §1.1310;
C.A. Balanis, *Antenna Theory*, 3rd ed. (Wiley 2005), ch. 2 and 4 (far-field distance,
short-dipole fields and directivity).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.model import ReferenceTable
from rfcheck.physics.constants import C, ETA0
from rfcheck.physics.domain import guard_public

__all__ = ["ReferenceLevel", "reference_level", "leak_power_density", "distance_for_level",
           "point_leak_power_density", "leaked_power", "far_field_distance", "exposure_ratio",
           "SMALL_LEAK_DIRECTIVITY"]

#: Directivity of a small leak in a conducting wall: a short (magnetic or electric) dipole
#: has directivity 1.5; its image in the wall doubles it to 3 (Balanis ch. 4; closed form).
SMALL_LEAK_DIRECTIVITY = 3.0


@dataclass(frozen=True)
class ReferenceLevel:
    table: str
    title: str
    standard: str
    edition: str
    population: str
    scope: str
    averaging_time: str
    confidence: str
    frequency: float  # Hz
    power_density: float  # W/m^2, plane-wave equivalent; NaN outside the table's range
    basis: str  # "S", "E" or "H": which law set the level ("" outside the range)
    e_field: float  # V/m, NaN where the table gives none
    h_field: float  # A/m, NaN where the table gives none


def _table(table) -> ReferenceTable:
    if isinstance(table, str):
        from rfcheck.levels import shipped_table

        return shipped_table(table)
    return table


def reference_level(table: ReferenceTable | str, f: float) -> ReferenceLevel:
    """The plane-wave-equivalent reference level of `table` (a table or a shipped id) at
    frequency `f` (Hz): S where the table gives S, else min(E²/η0, η0 H²); NaN outside."""
    t = _table(table)
    found: dict[str, float] = {}
    for seg in t.segments:
        if seg.f_min < f <= seg.f_max:
            found[seg.quantity] = seg.coefficient * (f / seg.frequency_unit) ** seg.exponent
    if "S" in found:
        s, basis = found["S"], "S"
    elif found:
        candidates = {}
        if "E" in found:
            candidates["E"] = found["E"] ** 2 / ETA0
        if "H" in found:
            candidates["H"] = ETA0 * found["H"] ** 2
        basis = min(candidates, key=candidates.get)
        s = candidates[basis]
    else:
        s, basis = math.nan, ""
    return ReferenceLevel(t.id, t.title, t.standard, t.edition, t.population, t.scope,
                          t.averaging_time, t.confidence, f, s, basis,
                          found.get("E", math.nan), found.get("H", math.nan))


def leak_power_density(s_measured: ArrayLike, d_measured: ArrayLike, d: ArrayLike) -> NDArray:
    """Inverse-square estimate S(d) = S_m (d_m / d)² from a leak S_m at distance d_m (W/m², m).

    A point-source far-field law: it holds beyond :func:`far_field_distance` only.
    """
    return np.asarray(s_measured, dtype=float) * (np.asarray(d_measured, dtype=float)
                                                  / np.asarray(d, dtype=float)) ** 2


def distance_for_level(s_measured: ArrayLike, d_measured: ArrayLike, s_limit: ArrayLike) -> NDArray:
    """Distance (m) at which the inverse-square estimate S_m (d_m/d)² falls to `s_limit`:
    d = d_m √(S_m / S_limit)."""
    return np.asarray(d_measured, dtype=float) * np.sqrt(np.asarray(s_measured, dtype=float)
                                                         / np.asarray(s_limit, dtype=float))


def leaked_power(forward_power: ArrayLike, attenuation_db: ArrayLike) -> NDArray:
    """Power through a leak path of attenuation A (dB below the forward power), W:
    P 10^(−A/10), never more than P (a passive path: A is floored at 0 dB)."""
    a = np.maximum(np.asarray(attenuation_db, dtype=float), 0.0)
    return np.asarray(forward_power, dtype=float) * 10.0 ** (-a / 10.0)


def point_leak_power_density(power: ArrayLike, d: ArrayLike,
                             directivity: ArrayLike = SMALL_LEAK_DIRECTIVITY) -> NDArray:
    """Far-field power density of a small leak radiating `power` (W) with `directivity`,
    at distance d (m): S = D P / (4π d²), W/m²."""
    d = np.asarray(d, dtype=float)
    return np.asarray(directivity, dtype=float) * np.asarray(power, dtype=float) / (4.0 * math.pi * d * d)


def far_field_distance(size: ArrayLike, f: ArrayLike) -> NDArray:
    """Start of the far field of a leaking spot of largest dimension `size` (m) at `f` (Hz):
    r_ff = max(2 D²/λ, λ), m (module docstring)."""
    lam = C / np.asarray(f, dtype=float)
    size = np.asarray(size, dtype=float)
    return np.maximum(2.0 * size * size / lam, lam)


def exposure_ratio(power_densities: ArrayLike, levels: ArrayLike) -> float:
    """Exposure ratio of simultaneous exposure at several frequencies: Σ S_i / S_RL,i."""
    return float(np.sum(np.asarray(power_densities, dtype=float) / np.asarray(levels, dtype=float)))


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
