"""Apertures below cutoff: vent honeycombs, viewport tubes and perforated plates.

A tube of cross-section smaller than half a wavelength carries no propagating mode; the
field of its lowest mode decays as exp(−α t) along its depth t, with

    α = (2π/λ_c) √(1 − (f/f_c)²)  Np/m,   A_tube = 20 log10(e) · α · t  dB

(Pozar, *Microwave Engineering*, 4th ed., §3.3–3.4). Lowest modes: TE11 of a circular tube,
f_c = p'11 c/(π d) with p'11 = 1.8412, so far below cutoff A ≈ 32.0 t/d dB; TE10 of a
rectangular tube of width w (the larger side), f_c = c/(2w), A ≈ 27.3 t/w dB (common
practice, both the f ≪ f_c limits of the closed form).

An array of n identical cells close together passes n times the power of one:
A_array = A_tube − 10 log10 n (common practice; H.W. Ott, *Electromagnetic Compatibility
Engineering* (Wiley 2009), ch. 6, from memory).

Conservative by construction: the reflection at the tube entrance (about 20 log10(λ/2l)
for a small aperture of length l) is not credited, and the whole forward power is taken as
incident on the aperture. A thin mesh (depth ≪ cell size) therefore gets little credit here;
credit its measured shielding effectiveness as a seam with a declared attenuation instead.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import C, TWO_PI
from rfcheck.physics.rfpower import below_cutoff_attenuation_db
from rfcheck.physics.waveguide import circular_te_cutoff
from rfcheck.physics.domain import guard_public

__all__ = ["tube_cutoff", "tube_attenuation_db", "array_attenuation_db", "NEPER_DB"]

#: one neper of field amplitude in dB: 20 log10(e)
NEPER_DB = 20.0 * math.log10(math.e)


def tube_cutoff(shape: str, *, diameter: float | None = None, width: float | None = None,
                height: float | None = None) -> float:
    """Cutoff of the lowest mode of a tube, Hz: TE11 (circular, `diameter`) or TE10
    (rectangular, the larger of `width`, `height`)."""
    if shape == "circular":
        return float(circular_te_cutoff(0.5 * diameter, 1, 1))
    if shape == "rectangular":
        return C / (2.0 * max(width, height))
    raise ValueError(f"unknown aperture shape {shape!r}; expected 'circular' or 'rectangular'")


def tube_attenuation_db(shape: str, depth: ArrayLike, f: ArrayLike, *,
                        diameter: float | None = None, width: float | None = None,
                        height: float | None = None) -> NDArray:
    """Evanescent attenuation of a tube of `depth` (m) at `f` (Hz), dB; 0 at and above the
    cutoff of its lowest mode, where the tube propagates (module docstring)."""
    if shape == "circular":
        return below_cutoff_attenuation_db(diameter, depth, f)
    fc = tube_cutoff(shape, width=width, height=height)
    x = 1.0 - (np.asarray(f, dtype=float) / fc) ** 2
    alpha = TWO_PI * fc / C * np.sqrt(np.clip(x, 0.0, None))
    return NEPER_DB * alpha * np.asarray(depth, dtype=float)


def array_attenuation_db(single_db: ArrayLike, count: int) -> NDArray:
    """Attenuation of `count` identical cells together, dB: A − 10 log10(count)."""
    return np.asarray(single_db, dtype=float) - 10.0 * math.log10(count)


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
