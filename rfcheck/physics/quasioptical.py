"""Corrugated (HE11) transmission lines: field, power capacity and transmission loss.

Pure numpy on SI values: lengths in m, frequencies in Hz, powers in W, fields in V/m, losses
in dB where the name says so.

Model. In an oversized corrugated guide of radius a (grooves about λ/4 deep, a ≫ λ) the HE11
mode is, to order (λ/a)², a linearly polarised TEM-like wave with the transverse profile
E(r) = E0 J0(j01 r / a) and H = E/η0; it vanishes at the wall (j01 = 2.405 the first zero of
J0). Its power is

    P = (1/(2η0)) ∫ |E|² dA = E0² π a² J1(j01)² / (2 η0)

(∫0^a J0²(j01 r/a) r dr = a² J1(j01)²/2, since J0(j01) = 0; Abramowitz & Stegun 11.3.35 with
Watson's Lommel integral). So the largest field, on the axis, is
E0 = √(2 η0 P / (π a² J1(j01)²)); 98 % of the HE11 power couples to a free-space Gaussian
beam of waist 0.643 a (J.L. Doane, *Infrared and Millimeter Waves* 13 (1985) ch. 4, from memory).

Loss. The wall loss of HE11 in a well-made corrugated guide is tiny (≈1e-4 dB/m for
63.5 mm at 140-170 GHz); what a real line loses is set by mitre bends, gaps, tilts and offsets
and by mode conversion. rfcheck therefore takes the loss per metre and per mitre bend from
the spec where declared, else from the defaults in ``rfcheck/data/lines.toml`` ``[he11]``
(each with its source). The diffraction (mode-conversion) loss of a 90° mitre bend is
estimated as ΔP/P ≈ 0.39 (λ/a)^(3/2) (J.L. Doane & C.P. Moeller, "HE11 mitre bends and gaps
in a circular corrugated waveguide", Int. J. Electronics 77 (1994) 489, from memory,
confidence L), the larger of that and the tabulated default is used.
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import C, ETA0
from rfcheck.physics.domain import guard_public

__all__ = [
    "HE11_J01",
    "HE11_J1_AT_J01",
    "he11_field_amplitude",
    "he11_peak_field",
    "he11_max_power",
    "mitre_bend_loss",
    "db_to_fraction",
    "LineRunLoss",
    "line_run_loss",
    "he11_defaults",
]

#: first zero of J0 (Abramowitz & Stegun table 9.5)
HE11_J01 = 2.404825557695773
#: J1(j01) (Abramowitz & Stegun table 9.5: 0.5191474973)
HE11_J1_AT_J01 = 0.5191474972894669
#: coefficient of the mitre-bend diffraction loss ΔP/P ≈ 0.39 (λ/a)^(3/2)
#: (Doane & Moeller 1994, from memory, L)
MITRE_COEFFICIENT = 0.39


def he11_field_amplitude(power: ArrayLike, diameter: ArrayLike) -> NDArray:
    """On-axis field E0 of a travelling HE11 wave of power P in a corrugated guide, V/m.

    E0 = √(2 η0 P / (π a² J1(j01)²)), a = diameter/2 (see the module docstring).
    """
    a = 0.5 * np.asarray(diameter, dtype=float)
    p = np.asarray(power, dtype=float)
    return np.sqrt(2.0 * ETA0 * p / (math.pi * a * a * HE11_J1_AT_J01 ** 2))


def he11_peak_field(power: ArrayLike, diameter: ArrayLike, gamma_mag: ArrayLike = 0.0) -> NDArray:
    """Largest field with a standing wave of reflection |Γ|, V/m: (1 + |Γ|) E0."""
    return (1.0 + np.asarray(gamma_mag, dtype=float)) * he11_field_amplitude(power, diameter)


def he11_max_power(diameter: ArrayLike, e_max: ArrayLike) -> NDArray:
    """Power of a matched HE11 wave whose axial field equals e_max, W:
    P_max = π a² J1(j01)² e_max² / (2 η0)."""
    a = 0.5 * np.asarray(diameter, dtype=float)
    e = np.asarray(e_max, dtype=float)
    return math.pi * a * a * HE11_J1_AT_J01 ** 2 * e * e / (2.0 * ETA0)


def mitre_bend_loss(f: ArrayLike, diameter: ArrayLike) -> NDArray:
    """Diffraction loss fraction of one 90° mitre bend in HE11 guide: 0.39 (λ/a)^(3/2).

    From memory (Doane & Moeller 1994, confidence L): an estimate of the mode-conversion
    loss of the open corner; the mirror's ohmic loss is extra.
    """
    lam = C / np.asarray(f, dtype=float)
    a = 0.5 * np.asarray(diameter, dtype=float)
    return MITRE_COEFFICIENT * (lam / a) ** 1.5


def db_to_fraction(loss_db: ArrayLike) -> NDArray:
    """Lost fraction of the power for a loss in dB: 1 − 10^(−dB/10)."""
    return -np.expm1(-np.asarray(loss_db, dtype=float) * math.log(10.0) / 10.0)


@lru_cache(maxsize=1)
def _defaults() -> dict:
    text = resources.files("rfcheck.data").joinpath("lines.toml").read_text(encoding="utf-8")
    return dict(tomllib.loads(text).get("he11", {}))


def he11_defaults() -> dict:
    """The ``[he11]`` table of ``rfcheck/data/lines.toml`` (default losses with sources)."""
    return dict(_defaults())


@dataclass(frozen=True)
class LineRunLoss:
    """Loss of a line run: per metre and per bend (dB), their sources, the total (dB), the
    lost fraction and the transmitted fraction."""

    per_metre_db: float
    per_bend_db: float
    per_metre_source: str
    per_bend_source: str
    total_db: float
    lost_fraction: float
    transmitted_fraction: float


def line_run_loss(f: float, diameter: float, length: float, bends: int,
                  per_metre_db: float | None = None, per_bend_db: float | None = None) -> LineRunLoss:
    """Total loss of an HE11 line run of ``length`` m with ``bends`` mitre bends at ``f`` Hz.

    Declared values are used as given; where one is not declared, the ``[he11]`` default of
    ``lines.toml`` (per bend: the larger of the default and :func:`mitre_bend_loss` in dB).
    """
    d = _defaults()
    if per_metre_db is None:
        per_metre_db, m_src = float(d["loss_db_per_m"]), f"default: {d['loss_db_per_m_source']}"
    else:
        m_src = "declared"
    if per_bend_db is None:
        diffraction = float(-10.0 * np.log10(1.0 - mitre_bend_loss(f, diameter)))
        tabulated = float(d["bend_loss_db"])
        per_bend_db = max(diffraction, tabulated)
        b_src = (f"default: the larger of 0.39 (λ/a)^1.5 = {diffraction:.3g} dB (Doane & Moeller "
                 f"1994, from memory) and {tabulated:.3g} dB ({d['bend_loss_db_source']})")
    else:
        b_src = "declared"
    total = per_metre_db * length + per_bend_db * bends
    lost = float(db_to_fraction(total))
    return LineRunLoss(float(per_metre_db), float(per_bend_db), m_src, b_src, float(total),
                       lost, 1.0 - lost)


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
