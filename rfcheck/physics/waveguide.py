"""Guided-wave lines: rectangular and circular waveguide, coaxial line and free space.

Pure numpy on SI values: lengths in m, frequencies in Hz, impedances in ohm. Quantities
that do not exist below a mode's cutoff (guide wavelength, wave impedance) are NaN there.

The catalogue of standard sizes (EIA WR / IEC R rectangular guides, a few rigid coaxial
lines) is read lazily from ``rfcheck/data/lines.toml`` on first use and cached.

References
----------
D.M. Pozar, *Microwave Engineering*, 4th ed. (Wiley 2012), ch. 3 (rectangular guide §3.3,
circular guide §3.4, coaxial-line higher modes §3.5).
N. Marcuvitz, *Waveguide Handbook* (McGraw-Hill 1951), ch. 2.
EIA RS-261-B, *Rectangular Waveguides (WR3 to WR2300)* (1979); IEC 60153-2.
"""

from __future__ import annotations

import math
import re
import tomllib
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import C, ETA0, TWO_PI
from rfcheck.physics.domain import check_index, guard_public

#: largest mode index (and mode count) the mode functions accept (ValueError above)
MAX_MODE_INDEX = 50

__all__ = [
    "RECOMMENDED_BAND_FACTORS",
    "NEXT_MODE_MARGIN",
    "Line",
    "rectangular_cutoff",
    "rectangular_mode_cutoffs",
    "circular_te_cutoff",
    "circular_tm_cutoff",
    "circular_mode_cutoffs",
    "coaxial_te11_cutoff",
    "coaxial_characteristic_impedance",
    "guide_wavelength",
    "te_wave_impedance",
    "tm_wave_impedance",
    "rectangular_guide",
    "circular_guide",
    "coaxial_line",
    "corrugated_guide",
    "free_space",
    "line_from_name",
    "line_names",
]

#: Rule-of-thumb band of a rectangular guide without a tabulated band, as multiples of the
#: TE10 cutoff: 1.25-1.9 f_c. Common practice; the published EIA RS-261-B band edges of the
#: standard sizes spread around it (f_L/f_c 1.23-1.36, f_U/f_c 1.85-1.91 across WR-2300 ...
#: WR-28), so a standard guide uses its own tabulated band instead.
RECOMMENDED_BAND_FACTORS = (1.25, 1.9)
#: Upper edge of any recommended band as a fraction of the next mode's cutoff. 0.95 is the
#: same convention as 1.9 f_c in a 2:1 guide (TE20 at 2 f_c); common practice.
NEXT_MODE_MARGIN = 0.95
#: Lower edge of the recommended band of a circular guide as a multiple of the TE11 cutoff.
#: The TE11-TM01 single-mode range is only 1.306:1; 1.1 f_c keeps clear of the dispersive
#: region next to cutoff. From memory (L): a configurable default, not a standard.
CIRCULAR_LOW_FACTOR = 1.1


# --------------------------------------------------------------------------------------
# mode cutoffs
# --------------------------------------------------------------------------------------
def rectangular_cutoff(a: ArrayLike, b: ArrayLike, m: int, n: int, eps_r: float = 1.0) -> NDArray:
    """Cutoff frequency of the TE_mn / TM_mn mode of a rectangular guide, in Hz.

    f_c = c / (2 √ε_r) · √((m/a)² + (n/b)²)   (Pozar §3.3).

    Parameters
    ----------
    a, b : array_like
        Broad and narrow inner dimensions, m.
    m, n : int
        Mode indices (TE needs m + n ≥ 1, TM needs m, n ≥ 1; not checked here).
    eps_r : float
        Relative permittivity of a uniform filling.
    """
    a = np.asarray(a, dtype=float)
    b = np.asarray(b, dtype=float)
    return C / (2.0 * math.sqrt(eps_r)) * np.sqrt((m / a) ** 2 + (n / b) ** 2)


def rectangular_mode_cutoffs(a: float, b: float, count: int = 6) -> list[tuple[str, float]]:
    """The ``count`` lowest modes of a rectangular guide as ``(label, f_c)``, sorted by f_c.

    TE_mn for m + n ≥ 1 and TM_mn for m, n ≥ 1 (Pozar §3.3). Degenerate modes are listed
    separately (TE first).
    """
    count = check_index("count", count, 1, MAX_MODE_INDEX)
    span = count + 2
    modes = []
    for m in range(span):
        for n in range(span):
            if m + n == 0:
                continue
            fc = float(rectangular_cutoff(a, b, m, n))
            modes.append((fc, 0, f"TE{m}{n}"))
            if m >= 1 and n >= 1:
                modes.append((fc, 1, f"TM{m}{n}"))
    modes.sort()
    return [(label, fc) for fc, _, label in modes[:count]]


def circular_te_cutoff(radius: ArrayLike, m: int, n: int, eps_r: float = 1.0) -> NDArray:
    """Cutoff frequency of the TE_mn mode of a circular guide, in Hz.

    f_c = p'_mn c / (2π r √ε_r), p'_mn the n-th zero of J_m' (Pozar §3.4;
    zeros from :func:`scipy.special.jnp_zeros`, which skips the trivial zero of J_0').
    """
    from scipy.special import jnp_zeros

    p = jnp_zeros(check_index("m", m, 0, MAX_MODE_INDEX), check_index("n", n, 1, MAX_MODE_INDEX))[-1]
    return p * C / (TWO_PI * np.asarray(radius, dtype=float) * math.sqrt(eps_r))


def circular_tm_cutoff(radius: ArrayLike, m: int, n: int, eps_r: float = 1.0) -> NDArray:
    """Cutoff frequency of the TM_mn mode of a circular guide, in Hz.

    f_c = p_mn c / (2π r √ε_r), p_mn the n-th zero of J_m (Pozar §3.4;
    zeros from :func:`scipy.special.jn_zeros`).
    """
    from scipy.special import jn_zeros

    p = jn_zeros(check_index("m", m, 0, MAX_MODE_INDEX), check_index("n", n, 1, MAX_MODE_INDEX))[-1]
    return p * C / (TWO_PI * np.asarray(radius, dtype=float) * math.sqrt(eps_r))


def circular_mode_cutoffs(radius: float, count: int = 6) -> list[tuple[str, float]]:
    """The ``count`` lowest modes of a circular guide as ``(label, f_c)``, sorted by f_c.

    Lowest modes: TE11 (p' = 1.841), TM01 (2.405), TE21 (3.054), TE01 (3.832) and TM11
    (3.832, degenerate with TE01), TE31 (4.201) (Pozar tables 3.3/3.4).
    """
    from scipy.special import jn_zeros, jnp_zeros

    modes = []
    count = check_index("count", count, 1, MAX_MODE_INDEX)
    for m in range(count + 1):
        for n, p in enumerate(jnp_zeros(m, count), start=1):
            modes.append((p, 0, f"TE{m}{n}"))
        for n, p in enumerate(jn_zeros(m, count), start=1):
            modes.append((p, 1, f"TM{m}{n}"))
    modes.sort()
    return [(label, float(p * C / (TWO_PI * radius))) for p, _, label in modes[:count]]


def coaxial_te11_cutoff(inner_diameter: ArrayLike, outer_diameter: ArrayLike,
                        eps_r: float = 1.0) -> NDArray:
    """Approximate cutoff of the first higher-order (TE11) mode of a coaxial line, in Hz.

    k_c ≈ 2/(a + b) with a, b the inner and outer radii, i.e. the cutoff wavelength is the
    mean circumference: f_c ≈ c / (π (a + b) √ε_r) = 2c / (π (d + D) √ε_r).
    Pozar §3.5; Marcuvitz §2.4. Within a few per cent of the exact root of the
    Bessel cross-product equation for the usual D/d (≈ 2.3 for 50 Ω air line), and on the low
    side (0.6 % low at D/d = 1.5, 2 % at 2.3, 2.8 % at 3.6): a conservative single-mode ceiling.
    """
    d = np.asarray(inner_diameter, dtype=float)
    big_d = np.asarray(outer_diameter, dtype=float)
    return 2.0 * C / (math.pi * (d + big_d) * math.sqrt(eps_r))


def coaxial_characteristic_impedance(inner_diameter: ArrayLike, outer_diameter: ArrayLike,
                                     eps_r: float = 1.0) -> NDArray:
    """Characteristic impedance of a lossless coaxial line, ohm: Z0 = η0/(2π√ε_r) · ln(D/d).

    Pozar §2.2 / §3.5.
    """
    ratio = np.asarray(outer_diameter, dtype=float) / np.asarray(inner_diameter, dtype=float)
    return ETA0 / (TWO_PI * math.sqrt(eps_r)) * np.log(ratio)


# --------------------------------------------------------------------------------------
# mode quantities
# --------------------------------------------------------------------------------------
def _cutoff_ratio_factor(f: ArrayLike, cutoff: ArrayLike) -> NDArray:
    """√(1 − (f_c/f)²), NaN at and below cutoff."""
    f = np.asarray(f, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        x = 1.0 - (np.asarray(cutoff, dtype=float) / f) ** 2
        return np.where(x > 0.0, np.sqrt(np.where(x > 0.0, x, 1.0)), np.nan)


def guide_wavelength(f: ArrayLike, cutoff: ArrayLike, eps_r: float = 1.0) -> NDArray:
    """Guide wavelength, m: λ_g = λ / √(1 − (f_c/f)²), λ = c/(f √ε_r); NaN below cutoff.

    ``cutoff`` is the cutoff of the mode in the filled guide (0 for TEM). Pozar §3.3.
    """
    f = np.asarray(f, dtype=float)
    return C / (f * math.sqrt(eps_r)) / _cutoff_ratio_factor(f, cutoff)


def te_wave_impedance(f: ArrayLike, cutoff: ArrayLike, eps_r: float = 1.0) -> NDArray:
    """TE-mode wave impedance, ohm: Z_TE = η / √(1 − (f_c/f)²), η = η0/√ε_r; NaN below cutoff.

    With cutoff 0 this is the TEM/plane-wave impedance η. Pozar §3.3.
    """
    return ETA0 / math.sqrt(eps_r) / _cutoff_ratio_factor(f, cutoff)


def tm_wave_impedance(f: ArrayLike, cutoff: ArrayLike, eps_r: float = 1.0) -> NDArray:
    """TM-mode wave impedance, ohm: Z_TM = η √(1 − (f_c/f)²); NaN below cutoff. Pozar §3.3."""
    return ETA0 / math.sqrt(eps_r) * _cutoff_ratio_factor(f, cutoff)


# --------------------------------------------------------------------------------------
# the Line object
# --------------------------------------------------------------------------------------
@dataclass(frozen=True)
class Line:
    """A feed line and its dominant mode.

    Attributes
    ----------
    name : str
        Catalogue name (``"WR-340"``) or a descriptive name.
    kind : str
        ``"rectangular"``, ``"circular"``, ``"coaxial"`` or ``"free-space"``.
    cutoff : float
        Cutoff of the dominant mode, Hz (0 for TEM and free space).
    next_cutoff : float
        Cutoff of the next mode, Hz: the single-mode ceiling (``math.inf`` if none).
    dominant_mode, next_mode : str
        Mode labels (``"TE10"``, ``"TE11"``, ``"TEM"``; ``""`` where there is none).
    recommended_band : tuple of float
        (low, high) operating band, Hz: the published band of a standard rectangular size
        (``catalogue_band``), else the rule of thumb named in ``band_basis``.
    source : str
        Where the dimensions come from.
    eps_r : float
        Relative permittivity of the filling (1 for air-filled guides).
    dimensions : tuple of (str, float)
        Geometry in m: ``a``/``b``, ``diameter``, ``inner_diameter``/``outer_diameter``.
    iec : str
        IEC 60153-2 designation of a standard rectangular size (else ``""``).
    catalogue_band : tuple of float or None
        The band tabulated for a standard size (EIA), Hz.
    confidence : str
        H/M/L confidence of the catalogue data (``""`` for user-defined geometry).
    band_basis : str
        What ``recommended_band`` is: ``"EIA RS-261-B band"`` for a tabulated standard size,
        else the rule of thumb (``"1.25-1.9 f_c rule of thumb"``, ...).
    """

    name: str
    kind: str
    cutoff: float
    next_cutoff: float
    dominant_mode: str
    next_mode: str
    recommended_band: tuple[float, float]
    source: str
    eps_r: float = 1.0
    dimensions: tuple[tuple[str, float], ...] = ()
    iec: str = ""
    catalogue_band: tuple[float, float] | None = None
    confidence: str = ""
    band_basis: str = ""

    def dimension(self, key: str) -> float:
        """One geometric dimension in m (``"a"``, ``"b"``, ``"diameter"``, ...)."""
        return dict(self.dimensions)[key]

    @property
    def single_mode_band(self) -> tuple[float, float]:
        """(dominant cutoff, next cutoff), Hz: where exactly one mode propagates."""
        return (self.cutoff, self.next_cutoff)

    @property
    def cutoff_wavenumber(self) -> float:
        """Transverse wavenumber k_c = 2π f_c √ε_r / c of the dominant mode, rad/m."""
        return TWO_PI * self.cutoff * math.sqrt(self.eps_r) / C

    def guide_wavelength(self, f: ArrayLike) -> NDArray:
        """Guide wavelength of the dominant mode, m (NaN below cutoff); see :func:`guide_wavelength`."""
        return guide_wavelength(f, self.cutoff, self.eps_r)

    def wave_impedance(self, f: ArrayLike) -> NDArray:
        """Wave impedance of the dominant mode, ohm (TE form; η for TEM); NaN below cutoff."""
        return te_wave_impedance(f, self.cutoff, self.eps_r)

    def normalised_frequency(self, f: ArrayLike) -> NDArray:
        """f / f_c of the dominant mode (inf for TEM)."""
        with np.errstate(divide="ignore"):
            return np.asarray(f, dtype=float) / self.cutoff


def _upper_edge(cutoff: float, next_cutoff: float, factor: float) -> float:
    return min(factor * cutoff, NEXT_MODE_MARGIN * next_cutoff)


def rectangular_guide(a: float, b: float, name: str = "", *, iec: str = "", source: str = "user-defined",
                      catalogue_band: tuple[float, float] | None = None, confidence: str = "") -> Line:
    """Air-filled rectangular guide with inner dimensions a ≥ b (m), dominant mode TE10.

    f_c = c/(2a); next mode TE20 (c/a) or TE01 (c/(2b)), whichever is lower. Recommended
    band: ``catalogue_band`` where given (the published EIA RS-261-B / IEC 60153-2 band edges
    of a standard size, e.g. WR-62 12.4-18.0 GHz = 1.307-1.897 f_c), else the rule of thumb
    1.25 f_c … min(1.9 f_c, 0.95 f_next) (common practice).

    Raises
    ------
    ValueError
        For non-positive dimensions, b > a, or a catalogue band outside the single-mode band.
    """
    if not (a > 0 and b > 0):
        raise ValueError(f"rectangular guide needs positive dimensions, got a={a}, b={b}")
    if b > a:
        raise ValueError(f"rectangular guide expects a ≥ b (broad wall first), got a={a}, b={b}")
    fc = float(rectangular_cutoff(a, b, 1, 0))
    te20 = float(rectangular_cutoff(a, b, 2, 0))
    te01 = float(rectangular_cutoff(a, b, 0, 1))
    nxt, nxt_mode = (te20, "TE20") if te20 <= te01 else (te01, "TE01")
    if catalogue_band is not None:
        band, basis = (float(catalogue_band[0]), float(catalogue_band[1])), "EIA RS-261-B band"
        if not fc < band[0] < band[1] < nxt:
            raise ValueError(f"band {band} of {name or 'guide'} is not inside its single-mode "
                             f"band {fc:.6g}-{nxt:.6g} Hz")
    else:
        lo, hi = RECOMMENDED_BAND_FACTORS
        band, basis = (lo * fc, _upper_edge(fc, nxt, hi)), "1.25-1.9 f_c rule of thumb"
    return Line(
        name=name or f"rectangular {a * 1e3:g} mm x {b * 1e3:g} mm", kind="rectangular",
        cutoff=fc, next_cutoff=nxt, dominant_mode="TE10", next_mode=nxt_mode,
        recommended_band=band, source=source,
        dimensions=(("a", a), ("b", b)), iec=iec, catalogue_band=catalogue_band,
        confidence=confidence, band_basis=basis)


def circular_guide(diameter: float, name: str = "", *, source: str = "user-defined",
                   confidence: str = "") -> Line:
    """Air-filled circular guide of inner diameter ``diameter`` (m), dominant mode TE11.

    Next mode TM01; recommended band 1.1 f_c … 0.95 f_TM01 (see :data:`CIRCULAR_LOW_FACTOR`).
    """
    if not diameter > 0:
        raise ValueError(f"circular guide needs a positive diameter, got {diameter}")
    r = diameter / 2.0
    fc = float(circular_te_cutoff(r, 1, 1))
    nxt = float(circular_tm_cutoff(r, 0, 1))
    return Line(
        name=name or f"circular {diameter * 1e3:g} mm", kind="circular", cutoff=fc,
        next_cutoff=nxt, dominant_mode="TE11", next_mode="TM01",
        recommended_band=(CIRCULAR_LOW_FACTOR * fc, NEXT_MODE_MARGIN * nxt), source=source,
        dimensions=(("diameter", diameter),), confidence=confidence,
        band_basis="1.1 f_TE11-0.95 f_TM01 rule of thumb")


def coaxial_line(inner_diameter: float, outer_diameter: float, eps_r: float = 1.0, name: str = "", *,
                 source: str = "user-defined", confidence: str = "") -> Line:
    """Coaxial line (TEM); next mode TE11 from :func:`coaxial_te11_cutoff` (approximate).

    Recommended band 0 … 0.95 f_TE11 (common practice margin, as for the guides).
    """
    if not 0 < inner_diameter < outer_diameter:
        raise ValueError(f"coaxial line needs 0 < d < D, got d={inner_diameter}, D={outer_diameter}")
    nxt = float(coaxial_te11_cutoff(inner_diameter, outer_diameter, eps_r))
    return Line(
        name=name or f"coaxial {inner_diameter * 1e3:g}/{outer_diameter * 1e3:g} mm", kind="coaxial",
        cutoff=0.0, next_cutoff=nxt, dominant_mode="TEM", next_mode="TE11",
        recommended_band=(0.0, NEXT_MODE_MARGIN * nxt), source=source, eps_r=eps_r,
        dimensions=(("inner_diameter", inner_diameter), ("outer_diameter", outer_diameter)),
        confidence=confidence, band_basis="0.95 f_TE11 rule of thumb")


#: smallest a/λ (guide radius over free-space wavelength) at which the HE11 forms of
#: rfcheck.physics.quasioptical are used: the J0 profile and the loss laws are asymptotic in
#: ka ≫ 1; lines in use run at a/λ ≈ 5-30 (from memory, L; a configurable default)
HE11_MIN_RADIUS_WAVELENGTHS = 3.0


def corrugated_guide(diameter: float, name: str = "", *, source: str = "declared in the spec") -> Line:
    """Oversized corrugated circular guide (or quasi-optical line) carrying the HE11 mode.

    An oversized line has no cutoff in its band and many modes above cutoff: what keeps the
    power in HE11 is the corrugated wall (grooves ≈ λ/4 deep), not a single-mode band, so the
    line has no recommended band (0 … ∞) and no "next mode"; ``line.waveguide-band`` checks
    instead that the guide is oversized (a/λ ≥ :data:`HE11_MIN_RADIUS_WAVELENGTHS`). Field,
    power capacity and loss: :mod:`rfcheck.physics.quasioptical`.
    """
    if not diameter > 0:
        raise ValueError(f"corrugated guide needs a positive diameter, got {diameter}")
    return Line(
        name=name or f"HE11 {diameter * 1e3:g} mm", kind="corrugated", cutoff=0.0,
        next_cutoff=math.inf, dominant_mode="HE11", next_mode="",
        recommended_band=(0.0, math.inf), source=source, dimensions=(("diameter", diameter),),
        band_basis=f"oversized HE11 guide, a/λ ≥ {HE11_MIN_RADIUS_WAVELENGTHS:g}")


def free_space() -> Line:
    """Free space (quasi-optical feed): TEM plane wave, no cutoff, no next mode."""
    return Line(name="free-space", kind="free-space", cutoff=0.0, next_cutoff=math.inf,
                dominant_mode="TEM", next_mode="", recommended_band=(0.0, math.inf),
                source="plane wave in vacuum")


# --------------------------------------------------------------------------------------
# catalogue and name lookup
# --------------------------------------------------------------------------------------
@lru_cache(maxsize=1)
def _catalogue() -> dict[str, Line]:
    """Standard lines from ``rfcheck/data/lines.toml``, keyed by canonical name (read once)."""
    text = resources.files("rfcheck.data").joinpath("lines.toml").read_text(encoding="utf-8")
    data = tomllib.loads(text)
    lines: dict[str, Line] = {}
    for row in data.get("rectangular", []):
        band = tuple(1e9 * v for v in row["band_ghz"])
        src = f"{row['source']}; {row['iec_source']}; band: {row['band_source']}"
        lines[row["name"]] = rectangular_guide(
            row["a_mm"] * 1e-3, row["b_mm"] * 1e-3, row["name"], iec=row["iec"], source=src,
            catalogue_band=band, confidence=row["confidence"])
    for row in data.get("coaxial", []):
        lines[row["name"]] = coaxial_line(
            row["inner_diameter_mm"] * 1e-3, row["outer_diameter_mm"] * 1e-3, row["eps_r"],
            row["name"], source=row["source"], confidence=row["confidence"])
    return lines


def line_names() -> list[str]:
    """Canonical names accepted by :func:`line_from_name` (besides the parametric forms)."""
    return [*_catalogue(), "free-space"]


def _squash(name: str) -> str:
    return re.sub(r"[\s_\-]", "", name).upper()


_CIRCULAR = re.compile(r"^\s*circular\s*[:\s]\s*([0-9]*\.?[0-9]+(?:[eE][+-]?[0-9]+)?)\s*mm\s*$",
                       re.IGNORECASE)
_NUMBER = r"([0-9]*\.?[0-9]+(?:[eE][+-]?[0-9]+)?)"
#: ``coax:<d>/<D> mm`` or ``coax:<d>/<D> mm eps_r <ε_r>`` (d inner conductor, D outer bore)
_COAX = re.compile(r"^\s*coax(?:ial)?\s*[:\s]\s*" + _NUMBER + r"\s*/\s*" + _NUMBER
                   + r"\s*mm(?:\s*,?\s*eps_?r\s*=?\s*" + _NUMBER + r")?\s*$", re.IGNORECASE)


#: ``he11:<D> mm``: an oversized corrugated guide of inner diameter D carrying HE11
_HE11 = re.compile(r"^\s*he11\s*[:\s]\s*" + _NUMBER + r"\s*mm\s*$", re.IGNORECASE)


def line_from_name(name: str) -> Line:
    """Look up a line by name.

    Accepts EIA names with or without the hyphen (``"WR-340"``, ``"WR340"``, ``"wr 340"``),
    IEC designations (``"R26"``), the coaxial catalogue names (``"EIA-1-5/8"``),
    ``"free-space"`` / ``"free space"``, ``"circular:<diameter> mm"`` (inner diameter;
    only a plain number followed by ``mm`` is parsed here) and a declared coaxial line
    ``"coax:<d>/<D> mm"`` (inner conductor diameter d, outer conductor bore D, air) or
    ``"coax:<d>/<D> mm, eps_r <ε_r>"`` (a uniform dielectric filling), and an oversized
    corrugated guide carrying the HE11 mode ``"he11:<D> mm"`` (D the inner diameter at the
    groove tips; see :func:`corrugated_guide`).

    Raises
    ------
    ValueError
        For an unknown name; the message lists the valid choices.
    """
    if not isinstance(name, str):
        raise ValueError(f"line name must be a string, got {name!r}")
    m = _CIRCULAR.match(name)
    if m:
        return circular_guide(float(m.group(1)) * 1e-3, name=f"circular {m.group(1)} mm")
    m = _COAX.match(name)
    if m:
        return _coax_from_match(m)
    m = _HE11.match(name)
    if m:
        d = float(m.group(1)) * 1e-3
        lo, hi = COAX_DIAMETER_RANGE
        if not lo <= d <= hi:
            raise ValueError(f"HE11 guide diameter must lie between {lo * 1e3:g} mm and "
                             f"{hi * 1e3:g} mm")
        return corrugated_guide(d, name=f"HE11 {m.group(1)} mm corrugated")
    key = _squash(name)
    if key == "FREESPACE":
        return free_space()
    catalogue = _catalogue()
    for canonical, line in catalogue.items():
        if key == _squash(canonical) or (line.iec and key == line.iec.upper()):
            return line
    choices = ", ".join(line_names())
    raise ValueError(f"unknown line {name!r}; valid names: {choices}; IEC designations "
                     f"(e.g. R26); 'circular:<diameter> mm'; 'coax:<d>/<D> mm' "
                     f"(optionally ', eps_r <ε_r>'); or 'he11:<diameter> mm' (corrugated "
                     f"HE11 guide)")


#: bounds of a declared coaxial line: ε_r of real fillings (air 1 ... ceramics ~10, with room),
#: diameters as the spec's lengths (1 µm ... 100 m; rfcheck/limits.py RANGES["length"])
COAX_EPS_R_RANGE = (1.0, 100.0)
COAX_DIAMETER_RANGE = (1e-6, 100.0)


def _coax_from_match(m: re.Match) -> Line:
    d_text, big_text, eps_text = m.group(1), m.group(2), m.group(3)
    d, big_d = float(d_text) * 1e-3, float(big_text) * 1e-3
    eps = float(eps_text) if eps_text is not None else 1.0
    lo, hi = COAX_DIAMETER_RANGE
    if not (lo <= d <= hi and lo <= big_d <= hi):
        raise ValueError(f"coaxial diameters must lie between {lo * 1e3:g} mm and {hi * 1e3:g} mm")
    if not d < big_d:
        raise ValueError("coaxial line needs the inner conductor diameter d below the outer "
                         "conductor's inner diameter D ('coax:<d>/<D> mm')")
    if not COAX_EPS_R_RANGE[0] <= eps <= COAX_EPS_R_RANGE[1]:
        raise ValueError(f"coaxial filling eps_r must lie between {COAX_EPS_R_RANGE[0]:g} and "
                         f"{COAX_EPS_R_RANGE[1]:g}")
    label = f"coax {d_text}/{big_text} mm" + (f", eps_r {eps_text}" if eps_text is not None else "")
    return coaxial_line(d, big_d, eps, name=label, source="declared in the spec")


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
