"""Multilayer dielectric windows by the characteristic (ABCD, transfer) matrix.

A window is a stack of homogeneous layers, each with relative permittivity ε_r, loss
tangent tan δ and thickness d, between two lossless embedding media. The stack sits either
in a hollow guide, for one TE (or TM) mode, or in a plane wave at normal or oblique
incidence (TE = s, TM = p polarisation). Both cases are the same one-dimensional problem
with a fixed transverse wavenumber k_t:

* guide mode: k_t = k_c = 2π f_c/c of the empty guide (TE10 of a rectangular guide:
  k_c = π/a). A layer of permittivity ε then has the cutoff f_c/√ε ("filled-guide
  scaling");
* plane wave: k_t = k0 √ε_1 sin θ (phase matching, Snell's law), θ in the incident medium.

Time convention: engineering exp(+jωt); fields vary as exp(jωt − γz) with the propagation
constant γ = α + jβ = √(k_t² − k0² ε), Re γ ≥ 0, and ε = ε_r (1 − j tan δ).

Per layer (normalised to η0): TE z = j k0/γ, TM z = γ/(j k0 ε). Layer matrix
[[cosh γd, z sinh γd], [sinh γd / z, cosh γd]]; the stack matrix is the ordered product.
With real embedding impedances z1 (incident side) and z2 (exit side):

    Γ   = (A z2 + B − C z1 z2 − D z1) / (A z2 + B + C z1 z2 + D z1)
    S21 = 2 √(z1 z2) / (A z2 + B + C z1 z2 + D z1)

Γ is the travelling-wave reflection coefficient of the transverse electric field at the
first face; S21 is referred to the last face. Reflectance R = |Γ|², transmittance
T = |S21|², absorptance A = 1 − R − T. Where an embedding medium does not propagate
(below the guide's cutoff), all outputs are NaN.

References
----------
M. Born & E. Wolf, *Principles of Optics*, 7th ed. (Cambridge 1999), §1.6 (characteristic
matrix of stratified media). D.M. Pozar, *Microwave Engineering*, 4th ed. (Wiley 2012),
§3.3 (TE10 mode), §4.4 (ABCD matrix), table 4.2 (ABCD to S with unequal real reference
impedances). S.J. Orfanidis, *Electromagnetic Waves and Antennas* (2016), ch. 6-8.
"""

from __future__ import annotations

import itertools
import math
import tomllib
from functools import lru_cache
from importlib import resources
from typing import NamedTuple, Sequence

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import C, TWO_PI
from rfcheck.physics.domain import check_index, guard_public

#: grid of reflection_band: at most this many points; its edges: at most this many halvings
#: (64 halve any float interval to its last bit)
MAX_BAND_POINTS = 1_000_001
MAX_BISECTIONS = 64

__all__ = [
    "Layer",
    "Embedding",
    "WindowResponse",
    "ReflectionBand",
    "ThicknessWorstCase",
    "complex_permittivity",
    "loss_tangent_scale",
    "te10_embedding",
    "guide_embedding",
    "plane_wave_embedding",
    "line_embedding",
    "window_response",
    "Ports",
    "embedding_ports",
    "layer_matrix",
    "scattering",
    "reflection_band",
    "worst_reflection_over_thickness",
    "window_materials",
    "material_layer",
]


class Layer(NamedTuple):
    """One homogeneous window layer.

    eps_r: real relative permittivity ε'; tan_delta: loss tangent; thickness: m. Each is a
    scalar or an array that broadcasts against the frequency array (e.g. shape (n, 1)
    against f of shape (nf,): n variants of the stack evaluated in one call).
    """

    eps_r: ArrayLike
    tan_delta: ArrayLike
    thickness: ArrayLike


class Embedding(NamedTuple):
    """Where the stack sits.

    cutoff: cutoff frequency (Hz) of the guide mode in the *empty* guide; 0 for a plane
    wave or TEM line. angle: plane-wave incidence angle (rad) in the incident medium (must
    be 0 for a guide mode). polarisation: "TE" or "TM" (for a guide: the mode type).
    eps_incident, eps_exit: real permittivities of the lossless media on either side.
    """

    cutoff: float = 0.0
    angle: float = 0.0
    polarisation: str = "TE"
    eps_incident: float = 1.0
    eps_exit: float = 1.0


class WindowResponse(NamedTuple):
    """Scattering of a window (all arrays of the broadcast shape of f and thicknesses)."""

    gamma: NDArray
    transmission: NDArray
    reflectance: NDArray
    transmittance: NDArray
    absorptance: NDArray


class ReflectionBand(NamedTuple):
    """Contiguous band around a centre where |Γ| ≤ limit, Hz.

    ``low_open``/``high_open`` are True where the band reaches the edge of the searched span
    (the true edge lies further out). NaN edges mean |Γ| exceeds the limit at the centre.
    """

    low: float
    high: float
    low_open: bool
    high_open: bool


class ThicknessWorstCase(NamedTuple):
    """Worst reflection over a thickness tolerance.

    gamma_mag: worst |Γ| at each frequency (shape of f); worst: its maximum; thickness:
    the layer thicknesses (m) at that maximum; frequency: where it occurs (Hz).
    """

    gamma_mag: NDArray
    worst: float
    thickness: tuple[float, ...]
    frequency: float


def complex_permittivity(eps_r: ArrayLike, tan_delta: ArrayLike) -> NDArray:
    """Complex relative permittivity ε = ε_r (1 − j tan δ) (engineering exp(+jωt) convention)."""
    return np.asarray(eps_r, dtype=float) * (1.0 - 1j * np.asarray(tan_delta, dtype=float))


def loss_tangent_scale(quoted_frequency: float | None, frequency: float) -> float:
    """Factor on a loss tangent quoted at ``quoted_frequency`` for use at ``frequency`` (Hz).

    A conservative rule: scaled up ∝ f above the quoted frequency, never scaled down
    (factor max(1, f / f_quoted)); 1 when no quoted frequency is known.

    Why ∝ f: the intrinsic (lattice-phonon) loss of low-loss crystals and ceramics far below
    their infrared resonances gives ε'' ∝ ω, i.e. tan δ ∝ f at constant ε', which is why
    microwave-ceramic suppliers quote a Q·f product (Q = 1/tan δ) that holds roughly
    constant with frequency (V. L. Gurevich & A. K. Tagantsev, Adv. Phys. 40 (1991) 719;
    the Q·f figure of merit is common practice; both from memory). Sapphire follows it:
    ~1e-5 at 10 GHz, ~1e-4 to 2e-4 at 100–170 GHz (J. Krupka et al., Meas. Sci. Technol. 10
    (1999) 387, from memory). Glasses such as fused silica rise more slowly, so the rule
    over-estimates their loss above the quoted frequency: conservative. Why never down:
    below the quoted frequency, defect, impurity and conduction losses (roughly constant or
    rising as f falls) can dominate, so a smaller tan δ is not assured.
    """
    if quoted_frequency is None or not quoted_frequency > 0:
        return 1.0
    return max(1.0, float(frequency) / float(quoted_frequency))


def te10_embedding(a: float) -> Embedding:
    """TE10 mode of an air-filled rectangular guide of broad inner dimension a (m): f_c = c/(2a)."""
    return Embedding(cutoff=C / (2.0 * a))


def guide_embedding(cutoff: float, polarisation: str = "TE") -> Embedding:
    """A TE or TM guide mode with the given empty-guide cutoff (Hz)."""
    return Embedding(cutoff=float(cutoff), polarisation=polarisation)


def plane_wave_embedding(angle: float = 0.0, polarisation: str = "TE", eps_incident: float = 1.0,
                         eps_exit: float = 1.0) -> Embedding:
    """A plane wave at incidence angle ``angle`` (rad) in the incident medium."""
    return Embedding(angle=float(angle), polarisation=polarisation,
                     eps_incident=float(eps_incident), eps_exit=float(eps_exit))


def line_embedding(line) -> Embedding:
    """Embedding for the dominant mode of a :class:`rfcheck.physics.waveguide.Line`.

    Hollow guides (TE10, TE11): the TE guide mode; coaxial line and free space: a plane wave
    at normal incidence in the line's filling (TEM: the geometry factor of the line
    impedance is common to all layers and drops out of Γ).
    """
    eps = float(line.eps_r)
    if line.cutoff > 0.0:
        return Embedding(cutoff=line.cutoff * math.sqrt(eps), eps_incident=eps, eps_exit=eps)
    return Embedding(eps_incident=eps, eps_exit=eps)


def _propagation_constant(kt2: ArrayLike, k0sq: NDArray, eps_r: ArrayLike,
                          tan_delta: ArrayLike) -> NDArray:
    """γ = √(k_t² − k0² ε_r (1 − j tan δ)), principal root (Re γ ≥ 0).

    The argument is assembled from its real part and a non-negative imaginary part
    k0² ε_r tan δ (tan δ ≥ 0, passive layer), so a lossless propagating layer lands on the
    +j branch (γ = jβ) and never on the −j branch through a signed zero.
    """
    x = np.empty(np.broadcast(kt2, k0sq, eps_r, tan_delta).shape, dtype=complex)
    x.real = kt2 - k0sq * eps_r
    x.imag = k0sq * (eps_r * tan_delta)
    return np.sqrt(x)


def _layer_matrix(gamma, k0, eps, d, te: bool):
    """ABCD entries of one layer (impedances normalised to η0).

    TE: z = j k0/γ, TM: z = γ/(j k0 ε); B = z sinh γd, C = sinh γd / z, written with
    sinh(γd)/γ so that γ = 0 (a layer exactly at its own cutoff) stays finite.
    """
    gd = gamma * d
    ex = np.exp(gd)
    exi = 1.0 / ex
    ch = 0.5 * (ex + exi)
    sh = 0.5 * (ex - exi)
    zero = gamma == 0.0
    sh_over_g = sh / np.where(zero, 1.0, gamma)
    if np.any(zero):
        sh_over_g = np.where(zero, d, sh_over_g)
    gsh = gamma * sh
    if te:
        return ch, (1j * k0) * sh_over_g, gsh / (1j * k0), ch
    return ch, gsh / (1j * k0 * eps), (1j * k0 * eps) * sh_over_g, ch


def _embedding_impedance(kt2, k0, eps: float, te: bool) -> NDArray:
    """Real normalised wave impedance of a lossless embedding medium; NaN if evanescent."""
    beta2 = k0 * k0 * eps - kt2
    with np.errstate(divide="ignore", invalid="ignore"):
        beta = np.sqrt(np.where(beta2 > 0.0, beta2, np.nan))
        return k0 / beta if te else beta / (k0 * eps)


def _check_embedding(emb: Embedding) -> bool:
    pol = emb.polarisation.upper()
    if pol not in ("TE", "TM"):
        raise ValueError(f"polarisation must be 'TE' or 'TM', got {emb.polarisation!r}")
    if emb.cutoff > 0.0 and emb.angle != 0.0:
        raise ValueError("a guide mode (cutoff > 0) has no incidence angle; use angle = 0")
    if not -math.pi / 2 < emb.angle < math.pi / 2:
        raise ValueError(f"incidence angle must lie in (-pi/2, pi/2) rad, got {emb.angle}")
    return pol == "TE"


def window_response(f: ArrayLike, layers: Sequence[Layer],
                    embedding: Embedding = Embedding()) -> WindowResponse:
    """Reflection, transmission and absorption of a multilayer window.

    Parameters
    ----------
    f : array_like
        Frequency, Hz (any shape; no loop over frequency).
    layers : sequence of Layer
        From the incident side to the exit side. Thicknesses may be arrays that broadcast
        against ``f`` (e.g. shape (n, 1) against f of shape (nf,)).
    embedding : Embedding
        Guide mode or plane wave (see the module docstring); default: plane wave, normal
        incidence, vacuum on both sides.

    Returns
    -------
    WindowResponse
        Complex Γ (= S11) and S21, R = |Γ|², T = |S21|², absorptance 1 − R − T.

    Notes
    -----
    ABCD (characteristic) matrix, Born & Wolf §1.6; ABCD → S with unequal real reference
    impedances, Pozar table 4.2. exp(+jωt) convention, ε = ε_r(1 − j tan δ). A layer whose
    attenuation exceeds ~700 Np (far beyond any window) overflows to NaN.
    """
    ports = embedding_ports(f, embedding)
    a = b = c = d = None
    for layer in layers:
        la, lb, lc, ld = layer_matrix(ports, layer)
        if a is None:
            a, b, c, d = la, lb, lc, ld
        else:
            a, b, c, d = a * la + b * lc, a * lb + b * ld, c * la + d * lc, c * lb + d * ld
    if a is None:  # no layers: the identity
        a = d = np.ones_like(ports.k0, dtype=complex)
        b = c = np.zeros_like(a)
    return scattering(ports, a, b, c, d)


class Ports(NamedTuple):
    """What every layer and the ABCD → S conversion share at one set of frequencies:
    k0 (rad/m), the transverse wavenumber squared kt2, the normalised real impedances z1,
    z2 of the incident and exit media (NaN where they do not propagate) and the polarisation."""

    k0: NDArray
    kt2: ArrayLike
    z1: NDArray
    z2: NDArray
    te: bool


def embedding_ports(f: ArrayLike, embedding: Embedding = Embedding()) -> Ports:
    """The :class:`Ports` of ``embedding`` at frequencies ``f`` (Hz)."""
    te = _check_embedding(embedding)
    f = np.asarray(f, dtype=float)
    k0 = TWO_PI * f / C
    if embedding.cutoff > 0.0:
        kt2 = (TWO_PI * embedding.cutoff / C) ** 2
    else:
        kt2 = (k0 * math.sqrt(embedding.eps_incident) * math.sin(embedding.angle)) ** 2
    z1 = _embedding_impedance(kt2, k0, embedding.eps_incident, te)
    z2 = _embedding_impedance(kt2, k0, embedding.eps_exit, te)
    return Ports(k0, kt2, z1, z2, te)


def layer_matrix(ports: Ports, layer: Layer) -> tuple[NDArray, NDArray, NDArray, NDArray]:
    """ABCD entries (normalised to η0) of one layer at the frequencies of ``ports``."""
    eps_r = np.asarray(layer.eps_r, dtype=float)
    tan_delta = np.asarray(layer.tan_delta, dtype=float)
    if np.any(tan_delta < 0.0):
        raise ValueError(f"loss tangent must be non-negative (passive layer), got {layer.tan_delta}")
    eps = complex_permittivity(eps_r, tan_delta)
    gamma = _propagation_constant(ports.kt2, ports.k0 * ports.k0, eps_r, tan_delta)
    return _layer_matrix(gamma, ports.k0, eps, np.asarray(layer.thickness, dtype=float), ports.te)


def scattering(ports: Ports, a, b, c, d) -> WindowResponse:
    """Γ, S21, R, T and A of a stack with ABCD matrix (a, b, c, d) between the ports
    (Pozar table 4.2, unequal real reference impedances)."""
    z1, z2 = ports.z1, ports.z2
    with np.errstate(invalid="ignore"):
        den = a * z2 + b + c * z1 * z2 + d * z1
        gam = (a * z2 + b - c * z1 * z2 - d * z1) / den
        s21 = 2.0 * np.sqrt(z1 * z2) / den
    refl = np.abs(gam) ** 2
    trans = np.abs(s21) ** 2
    return WindowResponse(gam, s21, refl, trans, 1.0 - refl - trans)


def reflection_band(layers: Sequence[Layer], f_centre: float, limit: float,
                    embedding: Embedding = Embedding(), *, span: float = 0.5, points: int = 2001,
                    rtol: float = 1e-10) -> ReflectionBand:
    """Band around ``f_centre`` over which |Γ| stays at or below ``limit``.

    |Γ| is sampled on ``points`` frequencies over f_centre·(1 ± span) (vectorised), the
    first crossings on either side of the centre are bracketed on that grid and refined by
    bisection (both edges at once) to a relative width ``rtol``. Frequencies where the
    embedding does not propagate count as above the limit. Only the contiguous band that
    contains the centre is returned; a ripple that dips under the limit again further out
    is not joined to it. If the grid is too coarse, a narrow excursion above the limit
    between two samples can be missed: raise ``points`` for thick or many-layer stacks.

    Layer parameters may be arrays of shape (k, 1) (k variants of the stack): the band is
    then the one where every variant stays under the limit (the worst of them at each
    frequency), which is the intersection of their contiguous bands.
    """
    if not 0.0 < span < 1.0:
        raise ValueError(f"span must lie in (0, 1), got {span}")
    if not 0.0 < rtol < 1.0:
        raise ValueError(f"rtol must lie in (0, 1), got {rtol}")
    points = max(check_index("points", points, 3, MAX_BAND_POINTS) | 1, 3)  # odd: centre on grid
    grid = f_centre * np.linspace(1.0 - span, 1.0 + span, points)
    ic = points // 2
    grid[ic] = f_centre

    def below(freq):
        g = np.nan_to_num(np.abs(window_response(freq, layers, embedding).gamma), nan=np.inf)
        if g.ndim > 1:  # variants of the stack (leading axes): the worst of them
            g = g.reshape(-1, g.shape[-1]).max(axis=0)
        return g <= limit

    ok = below(grid)
    if not ok[ic]:
        return ReflectionBand(math.nan, math.nan, False, False)
    bad_lo = np.nonzero(~ok[:ic])[0]
    bad_hi = np.nonzero(~ok[ic:])[0]
    low_open, high_open = bad_lo.size == 0, bad_hi.size == 0
    inside = np.array([grid[ic] if low_open else grid[bad_lo[-1] + 1],
                       grid[ic] if high_open else grid[ic + bad_hi[0] - 1]])
    outside = np.array([grid[0] if low_open else grid[bad_lo[-1]],
                        grid[-1] if high_open else grid[ic + bad_hi[0]]])
    if not (low_open and high_open):
        steps = int(math.ceil(math.log2(max(grid[1] - grid[0], 1e-300) / (rtol * f_centre)))) + 1
        for _ in range(min(max(steps, 1), MAX_BISECTIONS)):
            mid = 0.5 * (inside + outside)
            good = below(mid)
            inside = np.where(good, mid, inside)
            outside = np.where(good, outside, mid)
    low = float(grid[0]) if low_open else float(inside[0])
    high = float(grid[-1]) if high_open else float(inside[1])
    return ReflectionBand(low, high, bool(low_open), bool(high_open))


def worst_reflection_over_thickness(f: ArrayLike, layers: Sequence[Layer], tolerance: float | Sequence[float],
                                    embedding: Embedding = Embedding(), *,
                                    levels: Sequence[float] = (-1.0, 0.0, 1.0),
                                    max_combinations: int = 4096) -> ThicknessWorstCase:
    """Worst |Γ| when each layer thickness varies within ± its tolerance.

    Every combination of ``d_i + level · tol_i`` over ``levels`` (default −1, 0, +1: all
    corners, the nominal stack and the edge mid-points; 3^n combinations for n layers) is
    evaluated in one broadcast call. |Γ| is smooth in the thicknesses, and for tolerances
    well below a quarter wavelength in the material its extremes lie on these points; for
    wider tolerances pass finer ``levels`` (e.g. ``np.linspace(-1, 1, 7)``).

    Parameters
    ----------
    f : array_like
        Frequencies, Hz (scalar or 1-D).
    layers : sequence of Layer
        Nominal stack (scalar thicknesses).
    tolerance : float or sequence of float
        Thickness tolerance in m, one for all layers or one per layer (symmetric ±).
    """
    n = len(layers)
    tol = np.broadcast_to(np.asarray(tolerance, dtype=float), (n,))
    combos = np.array(list(itertools.product(levels, repeat=n)), dtype=float).reshape(-1, n)
    if combos.shape[0] > max_combinations:
        raise ValueError(f"{combos.shape[0]} thickness combinations exceed {max_combinations}; "
                         "pass fewer levels")
    f = np.asarray(f, dtype=float)
    f1 = np.atleast_1d(f).ravel()
    nominal = np.array([float(layer.thickness) for layer in layers])
    thick = nominal + combos * tol  # (ncombo, n)
    stack = [Layer(layer.eps_r, layer.tan_delta, np.maximum(thick[:, i:i + 1], 0.0))
             for i, layer in enumerate(layers)]
    g = np.abs(window_response(f1[None, :], stack, embedding).gamma)  # (ncombo, nf)
    g_filled = np.nan_to_num(g, nan=-np.inf)
    per_f = np.max(g_filled, axis=0)
    per_f = np.where(np.isfinite(per_f), per_f, np.nan)
    if np.all(np.isnan(per_f)):
        return ThicknessWorstCase(per_f.reshape(f.shape), math.nan, tuple(nominal), math.nan)
    ic, jf = np.unravel_index(np.argmax(g_filled), g.shape)
    return ThicknessWorstCase(per_f.reshape(f.shape), float(g[ic, jf]),
                              tuple(float(t) for t in thick[ic]), float(f1[jf]))


@lru_cache(maxsize=1)
def window_materials() -> dict[str, dict]:
    """The window-material library (``rfcheck/data/materials.toml``), keyed by material id."""
    text = resources.files("rfcheck.data").joinpath("materials.toml").read_text(encoding="utf-8")
    return tomllib.loads(text)["material"]


def material_layer(name: str, thickness: ArrayLike) -> Layer:
    """A :class:`Layer` of a library material (ε_r and tan δ from ``materials.toml``)."""
    table = window_materials()
    if name not in table:
        raise ValueError(f"unknown window material {name!r}; valid names: {', '.join(table)}")
    row = table[name]
    return Layer(float(row["eps_r"]), float(row["tan_delta"]), thickness)


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
