"""One-dimensional full-wave reflection of a stratified (layered) plasma slab.

The slab spans ``z[0]``..``z[-1]``; a plane wave comes in from a uniform medium on the left
(vacuum by default) and leaves into a uniform medium on the right (by default the profile's
end value continued). Time convention exp(−iωt) (Stix 1992): exp(i k0 n z) with Im n > 0
decays, so **Im n² > 0 means absorption** (collisions enter as ω → ω + iν).

Both problems are first-order systems ψ' = i k0 M(z) ψ in the tangential fields
ψ = (E, H̃), H̃ = η0 H (continuous at every interface):

* scalar: E'' + k0² (n² − n_t²) E = 0, M = [[0, 1], [n² − n_t², 0]]. Exact for the R and L
  waves along B, the O mode across B (n² = P), any s-polarised wave with tangential index
  n_t, and the X mode at exactly perpendicular incidence (n² = RL/S).
* X mode, oblique: B tangential to the layers, wave vector in the plane normal to B,
  tangential index n_t along b̂ × ẑ. Maxwell's equations with K = [[S, −iD, 0], [iD, S, 0],
  [0, 0, P]] give for ψ = (E_t, H̃_b): M = [[i n_t D/S, 1 − n_t²/S], [(S² − D²)/S,
  −i n_t D/S]], and E_n = (i D E_t − n_t H̃_b)/S along the gradient. The eigenvalues
  ±√(RL/S − n_t²) are the cold X-mode dispersion; the only singular layer is the
  upper-hybrid resonance S = 0 (regularised by collisions). B inclined to the gradient (the
  four-component system needed e.g. for O–X conversion) is **not** provided.

Method, chosen to stay accurate through cutoffs and resonances: fourth-order Magnus
integrator (two-point Gauss–Legendre; Iserles & Nørsett, Proc. R. Soc. A 455 (1999) 1021).
The grid is refined (i) for callable profiles, by bisection wherever the midpoint value of
M departs from linear interpolation by more than ``rtol`` (this clusters nodes
geometrically at resonances), and (ii) so that each step spans at most ``max_phase_step``
radians of phase or decay k0 h |N|. A step is a 2 × 2 matrix exponential: exact in a
uniform layer, smooth through n² = 0 (no WKB breakdown at cutoffs). The solution starts
from the outgoing wave at ``z[-1]`` and runs backwards — the stable direction through
evanescent layers — with the step propagators multiplied by a vectorised prefix scan in
log-scaled form (no overflow through thick barriers). Global error O(h⁴) (tested). Array
profiles are piecewise linear in the coefficients between samples (no bisection).

Power fractions: R = |r|² (−Re h₋)/Re h₊, T = |t|² Re h_t/Re h₊ (h = H̃/E of each
eigenwave); the absorbed fraction A = k0 ∫ E*·K_a·E dz / flux_in, K_a = (K − K†)/2i, by
Simpson's rule — computed independently, so 1 − R − T − A measures the numerical error.

References: K.G. Budden, *The Propagation of Radio Waves* (Cambridge 1985), ch. 7, 15–19;
T.H. Stix, *Waves in Plasmas* (AIP 1992), ch. 1 and 13.
"""

from __future__ import annotations

from typing import Callable, NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.constants import C, TWO_PI
from rfcheck.physics.domain import guard_public

__all__ = [
    "SlabResponse",
    "EvanescentLayers",
    "slab_reflection",
    "x_mode_slab_reflection",
    "evanescent_layers",
    "wkb_tunnelling_factor",
    "MirrorReturn",
    "mirror_return",
]

_GAUSS = 0.5 / np.sqrt(3.0)  # Gauss–Legendre nodes at the centre ± h/(2√3)
_MAX_STEPS = 4_000_000


class SlabResponse(NamedTuple):
    """Full-wave result. r is referred to z[0], t is the field at z[-1] per unit incident
    field at z[0] (X mode: the tangential component E_t). reflected + transmitted +
    absorbed + balance_residual = 1; field is E (or E_t) on the nodes z, per unit incident
    amplitude.

    r_right and t_right are the same for a wave incident from the exit medium onto z[-1]:
    its reflection referred to z[-1] and the field it transmits to z[0], both per unit
    incident field (NaN where the exit medium does not propagate). They come from the same
    transfer matrix: r_right from its columns, t_right from the conserved Wronskian
    (det = 1), t_right (h_in+ − h_in−) = t (h_out+ − h_out−)."""

    r: complex
    t: complex
    reflected: float
    transmitted: float
    absorbed: float
    balance_residual: float
    z: NDArray
    field: NDArray
    r_right: complex = complex("nan")
    t_right: complex = complex("nan")


class EvanescentLayers(NamedTuple):
    """Intervals where Re n² < 0 (m); kappa_integral = ∫ κ dz per layer (NaN without a
    frequency); open_ends is True where the layer runs into an end of the grid;
    exponent_change is the resolution estimate of each layer's exponent 2∫κ dz: how much it
    moves when every other sample is dropped (NaN without a frequency, None where unknown)."""

    start: NDArray
    end: NDArray
    width: NDArray
    kappa_integral: NDArray
    open_ends: NDArray
    exponent_change: NDArray | None = None


# --------------------------------------------------------------------------- profiles
def _profile(values, z, n_cols):
    """Return (evaluate(zq) -> list of complex arrays, is_callable)."""
    if callable(values):
        def evaluate(zq):
            out = values(zq)
            cols = [out] if n_cols == 1 else list(out)
            return [np.broadcast_to(np.asarray(c, complex), np.shape(zq)) for c in cols]
        return evaluate, True
    cols = [values] if n_cols == 1 else list(values)
    cols = [np.asarray(c, complex) for c in cols]
    if any(c.shape != z.shape for c in cols):
        raise ValueError("profile arrays must have the shape of z")

    def evaluate(zq):
        return [np.interp(zq, z, c.real) + 1j * np.interp(zq, z, c.imag) for c in cols]
    return evaluate, False


def _scalar_coefficients(cols, n_t):
    q = cols[0] - n_t**2
    return np.zeros_like(q), np.ones_like(q), q


def _x_coefficients(cols, n_t):
    s, d = cols
    return 1j * n_t * d / s, 1.0 - n_t**2 / s, (s * s - d * d) / s


def _bisect(z, evaluate, coefficients, rtol):
    """Insert midpoints until every coefficient is linear to rtol between nodes.

    Each round tests only the intervals made by the previous round's splits (an interval
    that passed keeps its nodes, so its test cannot change): the same grid as testing every
    interval every round, for a fraction of the profile evaluations."""
    vals = coefficients(evaluate(z))
    check = np.ones(z.size - 1, dtype=bool)  # intervals still to be tested
    span = np.ptp(z)
    for _ in range(80):
        idx = np.nonzero(check)[0]
        if idx.size == 0:
            return z
        zm = 0.5 * (z[idx] + z[idx + 1])
        vm = coefficients(evaluate(zm))
        err = np.zeros(zm.shape)
        for v, w in zip(vals, vm):
            err = np.maximum(err, np.abs(w - 0.5 * (v[idx] + v[idx + 1])) / (np.abs(w) + 1.0))
        bad = (err > rtol) & ((z[idx + 1] - z[idx]) > 1e-13 * (np.abs(zm) + span))
        if not bad.any():
            return z
        split = np.zeros(z.size - 1, dtype=bool)
        split[idx[bad]] = True
        pos = idx[bad] + 1
        z = np.insert(z, pos, zm[bad])
        vals = [np.insert(v, pos, w[bad]) for v, w in zip(vals, vm)]
        check = np.repeat(split, np.where(split, 2, 1))  # both halves of a split, nothing else
        if z.size > _MAX_STEPS:
            raise ValueError("profile refinement exceeded the step budget")
    return z


def _phase_subdivide(z, evaluate, coefficients, k0, max_phase_step):
    """Split each cell so that k0 h |N| <= max_phase_step (N² = m11² + m12 m21)."""
    h = np.diff(z)
    zm = 0.5 * (z[:-1] + z[1:])
    def wavenumber(zz):
        m11, m12, m21 = coefficients(evaluate(zz))
        return np.sqrt(np.abs(m11 * m11 + m12 * m21))
    kn = wavenumber(z)
    kmax = np.maximum(np.maximum(kn[:-1], kn[1:]), wavenumber(zm))
    m = np.maximum(1, np.ceil(k0 * h * kmax / max_phase_step)).astype(np.int64)
    if m.sum() > _MAX_STEPS:
        raise ValueError("phase refinement exceeded the step budget")
    start = np.repeat(z[:-1], m)
    frac = np.arange(m.sum()) - np.repeat(np.cumsum(m) - m, m)
    return np.append(start + np.repeat(h / m, m) * frac, z[-1])


# --------------------------------------------------------------------------- propagation
def _magnus_backward(za, zb, evaluate, coefficients, k0):
    """Backward Magnus-4 propagators P with ψ(za) = P ψ(zb), as (p11, p12, p21, p22)."""
    h = zb - za
    zc = 0.5 * (za + zb)
    a11, a12, a21 = (1j * k0 * c for c in coefficients(evaluate(zc - _GAUSS * h)))
    b11, b12, b21 = (1j * k0 * c for c in coefficients(evaluate(zc + _GAUSS * h)))
    w = np.sqrt(3.0) * h * h / 12.0
    o11 = 0.5 * h * (a11 + b11) + w * (b12 * a21 - a12 * b21)
    o12 = 0.5 * h * (a12 + b12) + w * 2.0 * (b11 * a12 - a11 * b12)
    o21 = 0.5 * h * (a21 + b21) + w * 2.0 * (a11 * b21 - b11 * a21)
    s = np.sqrt(o11 * o11 + o12 * o21)
    small = np.abs(s) < 1e-4
    s_nonzero = np.where(small, 1.0, s)
    sinhc = np.where(small, 1.0 + s * s / 6.0, np.sinh(s_nonzero) / s_nonzero)
    ch = np.cosh(s)
    return ch - sinhc * o11, -sinhc * o12, -sinhc * o21, ch + sinhc * o11


def _normalise(m):
    """m (4, ...) divided by its largest entry per position, and the log of that entry."""
    sc = np.max(np.abs(m), axis=0)
    sc = np.where(sc > 0, sc, 1.0)
    return m / sc, np.log(sc)


def _suffix_scan(p, log_p):
    """Q_k = P_k P_{k+1} ... P_{K-1} over ``p`` (4, K), normalised, with log scales
    (Hillis–Steele scan, log2 K passes). ``log_p`` are the log scales of the factors."""
    p, log_s = _normalise(p)
    p = list(p)
    log_s = log_s + log_p
    n = p[0].size
    d = 1
    while d < n:
        q11, q12, q21, q22 = (x[d:] for x in p)
        r11, r12, r21, r22 = (x[:-d] for x in p)
        nm, sc = _normalise(np.stack([r11 * q11 + r12 * q21, r11 * q12 + r12 * q22,
                                      r21 * q11 + r22 * q21, r21 * q12 + r22 * q22]))
        new_log = log_s[:-d] + log_s[d:] + sc
        for x, y in zip(p, nm):
            x[:-d] = y
        log_s = np.concatenate([new_log, log_s[-d:]])
        d *= 2
    return np.stack(p), log_s


#: factors multiplied in sequence inside one block of the suffix products
_BLOCK = 16


def _suffix_products(p):
    """Q_k = P_k P_{k+1} ... P_{K-1}, normalised, with log scales.

    Blocked: the K factors are cut into blocks of ``_BLOCK``; inside each block the suffix
    products are formed in sequence (one pass over the block's columns, vectorised over all
    blocks), the block totals are scanned (:func:`_suffix_scan`, log2(K/_BLOCK) passes) and
    each block's products are multiplied by the total of the blocks after it. The same
    products as scanning all K factors, in about a third of the time. Inside a block no
    rescaling is needed: every factor is divided by its largest entry first, so a product of
    _BLOCK factors has entries below 2**_BLOCK, and the determinant of each factor (1 before
    the division by a scale close to 1 for a cell of phase step <= max_phase_step) keeps it
    far from underflow."""
    m, log_p = _normalise(np.stack([np.asarray(x, complex) for x in p]))
    n = m.shape[1]
    nb = -(-n // _BLOCK)
    pad = nb * _BLOCK - n
    if pad:  # identity factors at the end change no product
        eye = np.zeros((4, pad), complex)
        eye[0] = eye[3] = 1.0
        m = np.concatenate([m, eye], axis=1)
        log_p = np.concatenate([log_p, np.zeros(pad)])
    m = m.reshape(4, nb, _BLOCK)
    log_p = log_p.reshape(nb, _BLOCK)
    q = np.empty_like(m)
    q[:, :, -1] = m[:, :, -1]
    a11, a12, a21, a22 = m[:, :, -1]
    for j in range(_BLOCK - 2, -1, -1):
        r11, r12, r21, r22 = m[:, :, j]
        a11, a12, a21, a22 = (r11 * a11 + r12 * a21, r11 * a12 + r12 * a22,
                              r21 * a11 + r22 * a21, r21 * a12 + r22 * a22)
        q[0, :, j], q[1, :, j], q[2, :, j], q[3, :, j] = a11, a12, a21, a22
    q, log_q = _normalise(q)
    log_q += np.cumsum(log_p[:, ::-1], axis=1)[:, ::-1]
    totals, log_t = _suffix_scan(q[:, :, 0], log_q[:, 0])
    after = np.zeros((4, nb), complex)  # the product of the blocks after each block
    after[0] = after[3] = 1.0
    after[:, :-1] = totals[:, 1:]
    log_after = np.zeros(nb)
    log_after[:-1] = log_t[1:]
    r11, r12, r21, r22 = (x[:, None] for x in after)
    q11, q12, q21, q22 = q
    out, log_out = _normalise(np.stack([q11 * r11 + q12 * r21, q11 * r12 + q12 * r22,
                                        q21 * r11 + q22 * r21, q21 * r12 + q22 * r22]))
    log_out += log_q + log_after[:, None]
    return list(out.reshape(4, -1)[:, :n]), log_out.reshape(-1)[:n]


def _eigen_h(m11, m12, m21):
    """Forward index N (Im N >= 0, else Re N >= 0) and h± = H̃/E for the two eigenwaves."""
    n = np.sqrt(complex(m11 * m11 + m12 * m21))
    if n.imag < 0 or (n.imag == 0 and n.real < 0):
        n = -n
    return n, (n - m11) / m12, (-n - m11) / m12


def _solve(z, evaluate, is_callable, coefficients, dissipation, frequency, left, right,
           rtol, max_phase_step):
    z = np.asarray(z, float)
    if z.ndim != 1 or z.size < 2 or np.any(np.diff(z) <= 0):
        raise ValueError("z must be a strictly increasing 1-D grid with at least 2 points")
    k0 = TWO_PI * float(frequency) / C
    if is_callable and rtol is not None:
        z = _bisect(z, evaluate, coefficients, rtol)
    cells = _phase_subdivide(z, evaluate, coefficients, k0, max_phase_step)
    nodes = np.empty(2 * cells.size - 1)
    nodes[0::2] = cells
    nodes[1::2] = 0.5 * (cells[:-1] + cells[1:])
    p = _magnus_backward(nodes[:-1], nodes[1:], evaluate, coefficients, k0)
    if not all(np.all(np.isfinite(x)) for x in p):
        raise ValueError("the profile is not finite on the grid (a resonance without "
                         "collisions? give n² a positive imaginary part)")
    q, log_s = _suffix_products(p)

    n_left, hp, hm = _eigen_h(*left)
    if abs(n_left.imag) > 1e-12 * abs(n_left) or n_left.real <= 0:
        raise ValueError("the incident medium must propagate without loss (real N > 0)")
    n_right, ht, ht_in = _eigen_h(*right)
    e_all = np.append(q[0] + q[1] * ht, 1.0)
    h_all = np.append(q[2] + q[3] * ht, ht)
    log_all = np.append(log_s, 0.0)
    a = (h_all[0] - hm * e_all[0]) / (hp - hm)
    b = (hp * e_all[0] - h_all[0]) / (hp - hm)
    rel = np.exp(log_all - log_all[0]) / a
    e, hf = e_all * rel, h_all * rel
    flux_in = hp.real
    log_t = -log_all[0] - np.log(a)
    reflected = abs(b / a) ** 2 * (-hm.real) / flux_in
    transmitted = float(np.exp(2.0 * log_t.real) * ht.real / flux_in)
    f = dissipation(nodes, e, hf, evaluate)
    hcell = nodes[2::2] - nodes[:-2:2]
    absorbed = k0 * np.sum(hcell / 6.0 * (f[:-2:2] + 4.0 * f[1::2] + f[2::2])) / flux_in
    t = complex(np.exp(log_t)) if log_t.real > -700 else 0j
    r_right = t_right = complex("nan")
    if abs(n_right.imag) <= 1e-12 * abs(n_right) and n_right.real > 0:
        # incidence from the exit side: u± = Q (1, h±) with Q the (normalised) transfer
        # matrix z[-1] -> z[0]; no wave may come in from the left: r_right = −α(u−)/α(u+)
        u_e, u_h = q[0][0] + q[1][0] * ht_in, q[2][0] + q[3][0] * ht_in
        alpha_in = (u_h - hm * u_e) / (hp - hm)
        alpha_out = (h_all[0] - hm * e_all[0]) / (hp - hm)
        r_right = complex(-alpha_in / alpha_out)
        t_right = complex(t * (ht - ht_in) / (hp - hm))
    return SlabResponse(complex(b / a), t, float(reflected), transmitted, float(absorbed),
                        float(1.0 - reflected - transmitted - absorbed), nodes, e,
                        r_right, t_right)


def slab_reflection(z: ArrayLike, n2: ArrayLike | Callable, frequency: float, *,
                    n2_left: complex = 1.0, n2_right: complex | None = None,
                    n_tangential: float = 0.0, max_phase_step: float = 0.05,
                    rtol: float | None = 1e-4) -> SlabResponse:
    """Reflection, transmission and absorption of E'' + k0² (n²(z) − n_t²) E = 0.

    Parameters
    ----------
    z : array_like
        Grid, m, strictly increasing; the slab spans z[0]..z[-1].
    n2 : array_like or callable
        Complex n² on the grid (piecewise linear between samples; Im n² > 0 absorbs), or
        a callable n2(z) taking arrays (then refined by bisection to ``rtol``).
    frequency : float
        Wave frequency, Hz.
    n2_left : complex, optional
        n² of the incident medium: real and > n_t² (default vacuum).
    n2_right : complex, optional
        n² of the exit medium (default: the profile's value at z[-1]). An evanescent exit
        medium (Re n² < n_t²) gives T = 0.
    n_tangential : float, optional
        Tangential index n_t for oblique s-polarised incidence (0 = normal incidence).
    max_phase_step : float, optional
        Largest phase (or decay) k0 h |N| per integration step, rad.
    rtol : float or None, optional
        Bisection tolerance for callables; None takes the grid as given.

    Returns
    -------
    SlabResponse
        ``absorbed`` is k0 ∫ Im(n²)|E|² dz / flux_in, so ``balance_residual`` =
        1 − R − T − A checks the numerics (Poynting's theorem; Budden 1985, ch. 7).
    """
    z = np.asarray(z, float)
    evaluate, is_callable = _profile(n2, z, 1)
    coefficients = lambda cols: _scalar_coefficients(cols, n_tangential)  # noqa: E731
    last = n2_right if n2_right is not None else evaluate(z[-1:])[0][0]
    left = _scalar_coefficients([np.complex128(n2_left)], n_tangential)
    right = _scalar_coefficients([np.complex128(last)], n_tangential)

    def dissipation(nodes, e, hf, ev):
        return ev(nodes)[0].imag * np.abs(e) ** 2

    return _solve(z, evaluate, is_callable, coefficients, dissipation, frequency, left,
                  right, rtol, max_phase_step)


class MirrorReturn(NamedTuple):
    """Power returned to the incident side by a slab backed by a mirror at an unknown distance.

    worst and best are the largest and smallest returned fractions |r_tot|² over the round-
    trip phase between the slab's exit and the mirror; the returned amplitude traces the
    circle ``centre`` + ``radius`` e^(iφ) in the complex plane as the phase runs over 2π.
    """

    worst: float
    best: float
    centre: complex
    radius: float


def mirror_return(response: SlabResponse, mirror: float = 1.0, *, n_left: float = 1.0,
                  n_right: float = 1.0) -> MirrorReturn:
    """Returned power of a slab with a mirror of amplitude reflectance ``mirror`` behind it.

    With the power-normalised scattering parameters of the slab between lossless port media
    of index n_left, n_right (s11 = r, s22 = r_right, s21 = t √(n_right/n_left),
    s12 = t_right √(n_left/n_right)) and the mirror's round trip u = m e^(iφ) (|u| = m), the
    returned amplitude is the Möbius map

        r_tot(u) = s11 + s12 s21 u / (1 − s22 u),

    which takes the circle |u| = m to the circle of centre s11 + k s22'*/(1 − |s22'|²) and
    radius |k|/(1 − |s22'|²), with s22' = m s22 and k = m s12 s21. The worst case over the
    unknown distance (phase) is |centre| + radius, the best ||centre| − radius| (the circle's
    nearest point to the origin). For a passive slab both lie in [0, 1]; a lossless
    slab gives the unit circle (everything returns at every phase). Checked in the tests
    against the Salisbury screen (a sheet of η0 a quarter wave in front of a metal plate
    returns nothing; at half a wave everything).

    Parameters
    ----------
    response : SlabResponse
        From :func:`slab_reflection` with a propagating, lossless exit medium (r_right and
        t_right defined).
    mirror : float, optional
        Amplitude reflectance of the mirror, 0..1 (1: a metal wall).
    n_left, n_right : float, optional
        Real refractive indices of the incident and exit media (1: vacuum).
    """
    m = float(mirror)
    if not 0.0 <= m <= 1.0:
        raise ValueError(f"mirror amplitude reflectance must lie in [0, 1], got {mirror!r}")
    s11 = complex(response.r)
    if m == 0.0:
        return MirrorReturn(abs(s11) ** 2, abs(s11) ** 2, s11, 0.0)
    if not (np.isfinite(response.r_right) and np.isfinite(response.t_right)):
        raise ValueError("the slab's exit medium does not propagate: no wave reaches the mirror")
    s21 = complex(response.t) * np.sqrt(n_right / n_left)
    s12 = complex(response.t_right) * np.sqrt(n_left / n_right)
    s22 = m * complex(response.r_right)
    k = m * s12 * s21
    denom = 1.0 - abs(s22) ** 2
    if denom <= 1e-15:  # total reflection from the exit side: nothing couples to the mirror
        return MirrorReturn(abs(s11) ** 2, abs(s11) ** 2, s11, 0.0)
    centre = s11 + k * np.conj(s22) / denom
    radius = float(abs(k) / denom)
    worst = min(1.0, (abs(centre) + radius) ** 2)
    best = min(1.0, abs(abs(centre) - radius) ** 2)
    return MirrorReturn(float(worst), float(best), complex(centre), radius)


def x_mode_slab_reflection(z: ArrayLike, stix_s_d, frequency: float, *,
                           n_tangential: float = 0.0, left: tuple = (1.0, 0.0),
                           right: tuple | None = None, max_phase_step: float = 0.05,
                           rtol: float | None = 1e-4) -> SlabResponse:
    """X mode through a slab with B tangential to the layers (coupled E_t, H̃_b system).

    Parameters
    ----------
    z : array_like
        Grid, m, strictly increasing.
    stix_s_d : pair of array_like, or callable
        (S, D) on the grid (complex with collisions, exp(−iωt)), or a callable
        z -> (S, D) taking arrays.
    frequency : float
        Wave frequency, Hz.
    n_tangential : float, optional
        n_t = k_t/k0 along b̂ × ẑ (its sign matters: the medium is gyrotropic).
    left, right : (S, D), optional
        Uniform incident and exit media (default vacuum / the profile's end value).
    max_phase_step, rtol : optional
        As in :func:`slab_reflection`.

    Returns
    -------
    SlabResponse
        ``field`` is the tangential component E_t; ``absorbed`` is
        k0 ∫ [Im S (|E_n|² + |E_t|²) + 2 Im D Im(E_n* E_t)] dz / flux_in, with E_n the
        component along the gradient. At n_t = 0 the result equals
        :func:`slab_reflection` with n² = RL/S = (S² − D²)/S exactly (Stix 1992, ch. 1).
    """
    z = np.asarray(z, float)
    evaluate, is_callable = _profile(stix_s_d, z, 2)
    coefficients = lambda cols: _x_coefficients(cols, n_tangential)  # noqa: E731
    end = right if right is not None else [c[0] for c in evaluate(z[-1:])]
    left_c = _x_coefficients([np.complex128(v) for v in left], n_tangential)
    right_c = _x_coefficients([np.complex128(v) for v in end], n_tangential)

    def dissipation(nodes, e, hf, ev):
        s, d = ev(nodes)
        en = (1j * d * e - n_tangential * hf) / s
        return (s.imag * (np.abs(en) ** 2 + np.abs(e) ** 2)
                + 2.0 * d.imag * np.imag(np.conj(en) * e))

    return _solve(z, evaluate, is_callable, coefficients, dissipation, frequency, left_c,
                  right_c, rtol, max_phase_step)


# --------------------------------------------------------------------------- WKB pieces
def _kappa_segments(z, p):
    """∫ √max(p, 0) dz on each segment for p piecewise linear (exact)."""
    h = np.diff(z)
    p0, p1 = p[:-1], p[1:]
    hi, lo = np.maximum(p0, p1), np.minimum(p0, p1)
    both = lo >= 0
    r0, r1 = np.sqrt(np.maximum(p0, 0)), np.sqrt(np.maximum(p1, 0))
    den = np.where(r0 + r1 > 0, r0 + r1, 1.0)
    full = (2.0 / 3.0) * h * (p0 + r0 * r1 + p1) / den
    frac = np.where(hi > lo, hi / np.where(hi > lo, hi - lo, 1.0), 0.0)
    part = (2.0 / 3.0) * h * frac * np.sqrt(np.maximum(hi, 0))
    return np.where(both, full, np.where(hi > 0, part, 0.0))


#: Default resolution demand on a layer's exponent 2∫κ dz: it may move by at most
#: EXPONENT_RTOL * max(1, 2∫κ dz) when every other sample is dropped (the factor to ~1 %).
EXPONENT_RTOL = 1e-2


def _layer_kappa(z, p, start, end, k0):
    """k0 ∫ √max(p, 0) dz over the segments of z that overlap each [start, end]."""
    seg = _kappa_segments(z, p)
    return np.array([k0 * seg[(z[1:] > a) & (z[:-1] < b)].sum() for a, b in zip(start, end)],
                    float)


def evanescent_layers(z: ArrayLike, n2: ArrayLike, frequency: float | None = None, *,
                      exponent_rtol: float | None = EXPONENT_RTOL) -> EvanescentLayers:
    """Intervals of the grid where Re n² < 0, edges interpolated linearly.

    The samples are taken as a piecewise-linear n²; for a sampled smooth profile that is an
    approximation whose quality depends on the grid. With a frequency each layer's exponent
    2∫κ dz, κ = k0 √(−Re n²), is integrated exactly for the piecewise-linear n², and also
    with every other sample dropped (first and last kept): the change, ``exponent_change``,
    estimates the grid error (it is about 3 times the error of the full grid where the
    error falls as h², e.g. a barrier between two cutoffs; less where a layer ends at a
    resonance, n² ~ 1/d, which needs samples clustered geometrically towards it). A layer
    that is not resolved - its exponent moves by more than ``exponent_rtol`` × max(1, 2∫κ dz),
    including a layer carried by a single sample that the thinned grid loses - raises
    ValueError rather than returning a factor the grid cannot support. A layer that runs
    into an end of the grid is integrated up to that end (``open_ends``).

    Parameters
    ----------
    z : array_like
        Grid, m, increasing.
    n2 : array_like
        n² samples on the grid.
    frequency : float, optional
        Hz; gives ∫ κ dz per layer (n² piecewise linear, integrated exactly) and the
        resolution check. Without it ``kappa_integral`` and ``exponent_change`` are NaN.
    exponent_rtol : float or None, optional
        Resolution demand (default :data:`EXPONENT_RTOL`); None takes the samples as the
        exact, piecewise-linear n² and skips the check (``exponent_change`` is still given).

    Returns
    -------
    EvanescentLayers

    Raises
    ------
    ValueError
        For a grid too coarse for a layer (with a frequency and ``exponent_rtol`` set): the
        message names the layer, its samples and both exponents.
    """
    z = np.asarray(z, float)
    p = -np.real(np.asarray(n2))
    neg = p > 0
    edges = np.diff(neg.astype(np.int8))
    z_cross = z[:-1] + (z[1:] - z[:-1]) * p[:-1] / np.where(p[:-1] != p[1:],
                                                             p[:-1] - p[1:], 1.0)
    starts = list(z_cross[edges == 1])
    ends = list(z_cross[edges == -1])
    if neg[0]:
        starts.insert(0, z[0])
    if neg[-1]:
        ends.append(z[-1])
    start, end = np.array(starts, float), np.array(ends, float)
    open_ends = (start == z[0]) & neg[0] | (end == z[-1]) & neg[-1]
    if frequency is None:
        kappa = np.full(start.shape, np.nan)
        change = np.full(start.shape, np.nan)
    else:
        k0 = TWO_PI * frequency / C
        kappa = _layer_kappa(z, p, start, end, k0)
        keep = np.unique(np.append(np.arange(0, z.size, 2), z.size - 1))
        thinned = _layer_kappa(z[keep], p[keep], start, end, k0)
        change = 2.0 * np.abs(kappa - thinned)
        if exponent_rtol is not None:
            allowed = exponent_rtol * np.maximum(1.0, 2.0 * kappa)
            bad = np.nonzero(change > allowed)[0]
            if bad.size:
                i = int(bad[0])
                inside = int(np.count_nonzero(neg & (z >= start[i]) & (z <= end[i])))
                raise ValueError(
                    f"grid too coarse for the evanescent layer at z = {start[i]:.6g}.."
                    f"{end[i]:.6g} m ({inside} samples with Re n² < 0): its exponent 2∫κ dz is "
                    f"{2 * kappa[i]:.4g} on the grid and {2 * thinned[i]:.4g} on every other "
                    f"sample, a change above the {allowed[i]:.3g} allowed; sample the layer "
                    "more finely (geometrically towards a resonance)")
    return EvanescentLayers(start, end, end - start, kappa, np.asarray(open_ends, bool), change)


def wkb_tunnelling_factor(z: ArrayLike, n2: ArrayLike, frequency: float, *,
                          exponent_rtol: float | None = EXPONENT_RTOL) -> float:
    """WKB power tunnelling factor exp(−2 ∫ κ dz), κ = k0 √(−Re n²) where Re n² < 0.

    n² is taken piecewise linear between samples and κ integrated exactly, so a cutoff
    edge costs nothing in accuracy; the grid must resolve each layer, which
    :func:`evanescent_layers` checks (ValueError for a grid too coarse for a layer; the
    demand ``exponent_rtol`` as there, None to take the samples as exact). For a
    cutoff–resonance pair (Budden problem, n² = 1 + β/z) the exact transmission e^(−πη)
    equals this factor (πη = 2∫κ dz = π k0 β; the reflection is (1 − e^(−πη))² from the
    cutoff side, 0 from the resonance side; Budden 1985, ch. 19; Stix 1992, ch. 13 — checked
    numerically by :func:`slab_reflection` in the tests), provided the samples reach the
    resonance geometrically (the part left between the last sample, at distance d, and the
    resonance is ~2 k0 √(β d)). For a barrier between two cutoffs it is the usual
    estimate, good when ∫ κ dz ≳ 1.
    """
    layers = evanescent_layers(z, n2, frequency, exponent_rtol=exponent_rtol)
    return float(np.exp(-2.0 * layers.kappa_integral.sum()))


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
