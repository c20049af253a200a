"""Cold-plasma dielectric (Stix S, D, P, R, L) and refractive index of the two wave branches.

Conventions
-----------
* Time dependence exp(-i w t) (as Stix and PlasmaPy). B0 points along +z with magnitude
  ``b``; species s has the signed cyclotron frequency W_s = q_s B0 / m_s (negative for
  electrons). Stix-frame tensor K = [[S, -iD, 0], [iD, S, 0], [0, 0, P]]. The engineering
  exp(+j w t) convention flips the sign of the off-diagonal terms and of every imaginary part.
* Per species: X_s = w_ps^2 / w^2, Y_s = W_s / w (signed), U_s = 1 + i nu_s / w (collisions
  enter as w -> w + i nu_s in the species' equation of motion):

      R = 1 - sum X_s / (U_s + Y_s)           L = 1 - sum X_s / (U_s - Y_s)
      S = 1 - sum X_s U_s / (U_s^2 - Y_s^2)   D = sum X_s Y_s / (U_s^2 - Y_s^2)
      P = 1 - sum X_s / U_s

  so a lossy medium has Im > 0. For electrons alone with Y = w_ce / w > 0:
  R = 1 - X/(1 - Y), L = 1 - X/(1 + Y), D = -X Y / (1 - Y^2).
* Ions are species with fractions of the positive charge density: n_s = fraction_s n_e / Z_s
  (quasi-neutral). With ``ions=()`` only the electrons respond.
* Frequencies in Hz, fields in T, densities in m^-3, theta (between k and B0) in rad.

Numerics
--------
Per species the closed forms above are summed (W = U^2 - Y^2 in product form), so S is never
formed as (R + L)/2 (cancels for |Y| >> 1) nor D as (R - L)/2 (cancels for |Y| << 1).
K = RL - PS, whose X_s^2 terms cancel, is evaluated from the identity
    RL - PS = -sum_s h_s Y_s^2 + sum_{s<t} h_s h_t (U_t Y_s - U_s Y_t)^2,  h_s = X_s / (U_s W_s)
(electrons alone: K = -X Y^2 / (1 - Y^2)), which keeps full relative accuracy next to the
cyclotron resonances and in very dense plasma. Large inputs are processed in cache-sized
slices (same results, several times faster, little scratch memory).

References
----------
T.H. Stix, *Waves in Plasmas* (AIP, 1992), ch. 1-2.
D.G. Swanson, *Plasma Waves*, 2nd ed. (IOP, 2003), ch. 2.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Mapping
from typing import Any, NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

# the CMA diagram lives in rfcheck.physics.cma; re-exported here with the dispersion core
from rfcheck.physics.cma import CMA_REGIONS, CmaRegion, _scalar, cma_region
from rfcheck.physics.constants import E_CHARGE, EPS0, M_E, TWO_PI
from rfcheck.physics.species import ELECTRON, as_species, ion_mixture
from rfcheck.physics.domain import guard_public

__all__ = [
    "StixElements", "DispersionRoots", "CmaRegion", "CMA_REGIONS", "stix", "refractive_index_squared",
    "n2_branch", "n2_o_mode", "n2_x_mode", "n2_r_wave", "n2_l_wave", "cma_region",
]  # fmt: skip

_X_PER_N_OVER_F2 = E_CHARGE**2 / (EPS0 * M_E) / TWO_PI**2  # X_e = this * n_e / f^2
_Y_PER_B_OVER_F = E_CHARGE / M_E / TWO_PI  # |Y_e| = this * B / f
_ULP = float(np.finfo(float).eps)
_CHUNK = 16384  # points per slice for large inputs: a slice's temporaries stay in cache


class StixElements(NamedTuple):
    """Stix dielectric elements (dimensionless; complex when collisions are included)."""

    S: NDArray
    D: NDArray
    P: NDArray
    R: NDArray
    L: NDArray


class DispersionRoots(NamedTuple):
    """The two roots n^2 of the cold-plasma dispersion relation, labelled by branch.

    ``o`` is the branch equal to P at theta = pi/2 (ordinary), ``x`` the branch equal to RL/S
    there (extraordinary). Each label follows its root continuously in theta; at theta = 0 the
    pair is {R, L}, in an order set by the plasma (:func:`n2_branch` selects "R" or "L").
    """

    o: NDArray
    x: NDArray


# --------------------------------------------------------------------------- species terms


class _Coefficients(NamedTuple):
    """Per-species constants, electrons first."""

    names: tuple[str, ...]
    x_rows: tuple[float, ...]  # X_s f^2 / n_e
    y_rows: tuple[float, ...]  # Y_s f / B (signed)
    x_total: float  # sum_s X_s f^2 / n_e


@functools.lru_cache(maxsize=256)
def _coefficients_cached(key: Any) -> _Coefficients:
    names, x_ratio, y_ratio = [ELECTRON.name], [1.0], [-1.0]
    for sp, frac in ion_mixture(key):
        ratio = sp.charge_number * M_E / sp.mass  # (Z m_e / m_s); X_s / X_e = frac * ratio
        names.append(sp.name)
        x_ratio.append(frac * ratio)
        y_ratio.append(ratio)
    return _Coefficients(
        tuple(names),
        tuple(v * _X_PER_N_OVER_F2 for v in x_ratio),
        tuple(v * _Y_PER_B_OVER_F for v in y_ratio),
        math.fsum(x_ratio) * _X_PER_N_OVER_F2,
    )


def _species_coefficients(ions: Any) -> _Coefficients:
    try:
        return _coefficients_cached(ions)
    except TypeError:  # unhashable (e.g. a list): normalise first
        return _coefficients_cached(ion_mixture(ions))


def _is_number(value: Any) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _collision_list(collision_frequency: Any, names: tuple[str, ...]) -> list[Any] | None:
    """Per-species collision frequency (s^-1), or None when every one is zero."""
    if _is_number(collision_frequency) and collision_frequency == 0:
        return None
    if isinstance(collision_frequency, Mapping):
        per = {as_species(k).name: v for k, v in collision_frequency.items()}
        unknown = sorted(set(per) - set(names))
        if unknown:
            raise ValueError(f"collision frequency given for species not in the plasma: {unknown}")
        nus = [per.get(n, 0.0) for n in names]
    else:
        nus = [collision_frequency] * len(names)
    if all(np.all(np.asarray(nu) == 0.0) for nu in nus):
        return None
    return nus


def _in_chunks(func, arrays: tuple) -> tuple:
    """``func(*arrays)`` over the broadcast float inputs, in slices of _CHUNK points if large."""
    arrays = [np.asarray(a, dtype=float) for a in arrays]
    size = 0
    flat_inputs = True
    for a in arrays:
        size = max(size, a.size)
        flat_inputs = flat_inputs and a.ndim <= 1
    if not flat_inputs:  # n-d inputs may broadcast to more points than the largest holds
        size = math.prod(np.broadcast_shapes(*(a.shape for a in arrays)))
    if size <= 2 * _CHUNK:
        return func(*arrays)
    shape = np.broadcast_shapes(*(a.shape for a in arrays))
    flat = [np.broadcast_to(a, shape).reshape(-1) for a in arrays]
    outs = None
    for start in range(0, size, _CHUNK):
        part = func(*(a[start : start + _CHUNK] for a in flat))
        if outs is None:
            outs = [np.empty(size, dtype=np.result_type(q)) for q in part]
        for out, q in zip(outs, part):
            out[start : start + _CHUNK] = q
    return tuple(out.reshape(shape) for out in outs)


def _elements(f: ArrayLike, b: ArrayLike, n_e: ArrayLike, ions: Any, collision_frequency: Any,
              want_k: bool):
    """(S, D, P, R, L) and, if ``want_k``, K = RL - PS (see the module's Numerics notes)."""
    coeffs = _species_coefficients(ions)
    nus = _collision_list(collision_frequency, coeffs.names)
    if nus is None:
        return _in_chunks(lambda f, b, n_e: _real_elements(f, b, n_e, coeffs, want_k), (f, b, n_e))
    f = np.asarray(f, dtype=float)
    bf = np.asarray(b, dtype=float) / f
    nf2 = np.asarray(n_e, dtype=float) / (f * f)
    terms = [
        (nf2 * cx, bf * cy, 1.0 + 1j * (np.asarray(nu, dtype=float) / (TWO_PI * f)))
        for cx, cy, nu in zip(coeffs.x_rows, coeffs.y_rows, nus)
    ]
    return _complex_elements(terms, want_k)


def _selected(f: ArrayLike, b: ArrayLike, n_e: ArrayLike, ions: Any, collision_frequency: Any,
              names: tuple[str, ...]) -> dict[str, NDArray]:
    """Only the named Stix elements ("S", "D", "P", "R", "L"), with the same per-species sums
    as :func:`stix` (lossless inputs take the full real path, which is cheap)."""
    coeffs = _species_coefficients(ions)
    nus = _collision_list(collision_frequency, coeffs.names)
    if nus is None:
        e = StixElements(*_elements(f, b, n_e, ions, collision_frequency, want_k=False)[:5])
        return {k: getattr(e, k) for k in names}
    f = np.asarray(f, dtype=float)
    bf = np.asarray(b, dtype=float) / f
    nf2 = np.asarray(n_e, dtype=float) / (f * f)
    sums: dict[str, Any] = {}
    for cx, cy, nu in zip(coeffs.x_rows, coeffs.y_rows, nus):
        x, y = nf2 * cx, bf * cy
        u = 1.0 + 1j * (np.asarray(nu, dtype=float) / (TWO_PI * f))
        up = um = None
        terms = {}
        if "R" in names or "S" in names or "D" in names:
            up = u + y
        if "L" in names or "S" in names or "D" in names:
            um = u - y
        if "R" in names:
            terms["R"] = x / up
        if "L" in names:
            terms["L"] = x / um
        if "S" in names or "D" in names:
            w = x / (up * um)
            if "S" in names:
                terms["S"] = w * u
            if "D" in names:
                terms["D"] = w * y
        if "P" in names:
            terms["P"] = x / u
        for k, t in terms.items():
            sums[k] = t if k not in sums else sums[k] + t
    return {k: (sums[k] if k == "D" else 1.0 - sums[k]) for k in names}


def _real_elements(f: NDArray, b: NDArray, n_e: NDArray, coeffs: _Coefficients, want_k: bool):
    """Lossless elements: plain contiguous numpy operations, species by species."""
    bf = b / f
    nf2 = n_e / (f * f)
    hs = []
    for i, (cx, cy) in enumerate(zip(coeffs.x_rows, coeffs.y_rows)):
        x = nf2 * cx  # X_s
        y = bf * cy  # Y_s (signed)
        up = 1.0 + y  # U + Y
        um = 1.0 - y  # U - Y
        if want_k:
            # Exactly on a cyclotron resonance (U +- Y == 0 in floating point) the roots are still
            # finite for theta != 0: evaluate them one ulp off the resonance, not as inf/inf.
            up = np.where(up == 0.0, _ULP, up)
            um = np.where(um == 0.0, _ULP, um)
        tr = x / up  # R term
        tl = x / um  # L term
        ts = tr / um  # S term, X / W
        td = ts * y  # D term
        if want_k:
            hs.append((ts, y, None))
        if i == 0:
            r, l, s, d = tr, tl, ts, td
        else:
            r, l, s, d = r + tr, l + tl, s + ts, d + td
    out = (1.0 - s, d, 1.0 - nf2 * coeffs.x_total, 1.0 - r, 1.0 - l)
    return (*out, _k_from_terms(hs)) if want_k else out


def _complex_elements(terms, want_k: bool = True):
    """Elements with collisions from per-species (X, Y, U); K = RL − PS only if wanted."""
    hs = []
    for i, (x, y, u) in enumerate(terms):
        up = u + y
        um = u - y
        tr = x / up
        tl = x / um
        ts = tr * (u / um)  # X U / W
        td = tr * (y / um)  # X Y / W
        tp = x / u
        if want_k:
            hs.append((tr / (um * u), y, u))  # h = X / (U W)
        if i == 0:
            r, l, s, d, p = tr, tl, ts, td, tp
        else:
            r, l, s, d, p = r + tr, l + tl, s + ts, d + td, p + tp
    out = (1.0 - s, d, 1.0 - p, 1.0 - r, 1.0 - l)
    return (*out, _k_from_terms(hs)) if want_k else out


def _k_from_terms(hs) -> NDArray:
    """K = RL - PS from per-species (h_s, Y_s, U_s or None): the identity of the module notes."""
    k = None
    for i, (hi, yi, ui) in enumerate(hs):
        term = -(hi * (yi * yi))
        k = term if k is None else k + term
        for hj, yj, uj in hs[i + 1 :]:
            cross = yi - yj if ui is None else uj * yi - ui * yj
            k = k + hi * hj * (cross * cross)
    return k


def stix(f: ArrayLike, b: ArrayLike, n_e: ArrayLike, ions: Any = (),
         collision_frequency: Any = 0.0) -> StixElements:
    """Stix cold-plasma dielectric elements S, D, P, R, L.

    R = 1 - sum_s w_ps^2 / [w (w + i nu_s + W_s)],   L = 1 - sum_s w_ps^2 / [w (w + i nu_s - W_s)],
    P = 1 - sum_s w_ps^2 / [w (w + i nu_s)],          S = (R + L)/2,   D = (R - L)/2,

    with signed cyclotron frequencies W_s = q_s B / m_s and time dependence exp(-i w t) (module
    docstring). Exactly on a cyclotron resonance the diverging elements are +-inf.

    Parameters
    ----------
    f : array_like
        Wave frequency, Hz (> 0).
    b : array_like
        Magnetic field along +z, T (a negative value reverses B0, swapping the roles of R and L).
    n_e : array_like
        Electron density, m^-3.
    ions : str, Species or iterable, optional
        Ion species with fractions of the positive charge (see
        :func:`rfcheck.physics.species.ion_mixture`); ``()`` for electrons only.
    collision_frequency : float, array_like or Mapping, optional
        Momentum-transfer collision frequency nu, s^-1 (it enters as w -> w + i nu). A number
        or array applies to every species; a mapping {species name: nu} sets it per species
        (species not named: 0). Any non-zero value makes the elements complex.

    Returns
    -------
    StixElements
        Named tuple (S, D, P, R, L), broadcast over f, b, n_e (and nu).

    References
    ----------
    Stix (1992), ch. 1; the same definitions as PlasmaPy's ``cold_plasma_permittivity_SDP``.
    """
    return StixElements(*_elements(f, b, n_e, ions, collision_frequency, want_k=False)[:5])


# --------------------------------------------------------------------------- dispersion


def _sign_like(w: NDArray, ref: NDArray) -> NDArray:
    """+1 or -1 so that +-w points into the half-plane of ``ref`` (+1 where undecided)."""
    proj = (w * np.conj(ref)).real if (np.iscomplexobj(w) or np.iscomplexobj(ref)) else w * ref
    return np.where(proj < 0, -1.0, 1.0)


def _o_branch_is_l(p: NDArray, d: NDArray, k: NDArray) -> NDArray:
    """True where the o branch tends to L (and x to R) as theta -> 0.

    At theta = 0, F~ = +-2PD (the sign that points along K) and o = S - F~/(2P): o is L
    exactly when F~ = +2PD.
    """
    return _sign_like(2.0 * (p * d), k) > 0


def _roots(s, d, p, r, l, k, theta):
    """Labelled roots (o, x); see :func:`refractive_index_squared` for the method."""
    theta = np.asarray(theta, dtype=float)
    sin = np.sin(theta)
    cos = np.cos(theta)
    sin2 = sin * sin
    cos2 = cos * cos
    pd = p * d
    ks = k * sin2
    a = s * sin2 + p * cos2
    bb = 2.0 * (p * s) + ks  # = RL sin^2 + PS (1 + cos^2)
    c = p * (r * l)
    w = np.sqrt(ks * ks + 4.0 * (pd * pd) * cos2)  # |F|: sum of squares, no cancellation
    if np.iscomplexobj(w):
        ft = w * _sign_like(w, k)  # F~: the root of F^2 on the side of K (= K at pi/2)
        plus = _sign_like(bb, ft) > 0  # B + F~ is the sum free of cancellation
        q = np.where(plus, bb + ft, bb - ft)
    else:
        q = bb + np.copysign(w, bb)  # |B| + |F| with the sign of B
        plus = np.signbit(bb) == np.signbit(k)  # F~ = copysign(|F|, K) has the sign of B
    with np.errstate(divide="ignore", invalid="ignore"):
        big = q / (2.0 * a)
        small = (2.0 * c) / q
    o = np.where(plus, small, big)
    x = np.where(plus, big, small)
    degenerate = q == 0
    if np.any(degenerate):
        # B = F = 0: n^2 = 0 (double), except along B0 with P = 0, where R and L remain.
        o_is_l = _o_branch_is_l(p, d, k)
        along = np.broadcast_to(sin2 == 0, o.shape)
        o = np.where(degenerate, np.where(along, np.where(o_is_l, l, r), 0.0), o)
        x = np.where(degenerate, np.where(along, np.where(o_is_l, r, l), 0.0), x)
    return o, x



def _solve(f, b, n_e, theta, ions, collision_frequency, pick):
    def one(f, b, n_e, theta):
        s, d, p, r, l, k = _elements(f, b, n_e, ions, collision_frequency, want_k=True)
        return pick(*_roots(s, d, p, r, l, k, theta), p, d, k)

    args = (f, b, n_e, theta)
    # Slicing is only valid when nu is a plain number (an array nu would need slicing too).
    out = _in_chunks(one, args) if _is_number(collision_frequency) else one(*args)
    return tuple(_scalar(a) for a in out)


def refractive_index_squared(
    f: ArrayLike, b: ArrayLike, n_e: ArrayLike, theta: ArrayLike, ions: Any = (),
    collision_frequency: Any = 0.0,
) -> DispersionRoots:
    """Both roots n^2 of the cold-plasma dispersion relation A n^4 - B n^2 + C = 0.

    A = S sin^2 th + P cos^2 th,   B = RL sin^2 th + PS (1 + cos^2 th),   C = PRL,
    n^2 = (B -+ F~) / (2A),   F~^2 = (RL - PS)^2 sin^4 th + 4 P^2 D^2 cos^2 th.

    Mode labelling: F~ is the root of F~^2 on the side of K = RL - PS (its sign, for a
    lossless plasma; for a lossy one the root with Re(F~ conj K) >= 0). ``o`` = (B - F~)/(2A)
    and ``x`` = (B + F~)/(2A): at theta = pi/2 exactly n^2 = P and n^2 = RL/S. F~ does not
    vanish for theta in (0, pi/2] while K != 0, so each label is continuous in theta (passing
    through +-inf where it crosses the resonance cone A = 0). At theta = 0 the pair is
    {R, L}; which branch becomes R depends on the signs of K, P and D (see :func:`n2_branch`).
    For electrons without collisions these are the Appleton-Hartree roots, ``o`` taking the
    "+" sign of the square root.

    Numerics: K from the cancellation-free identity of the module notes, B = 2PS + K sin^2 th,
    |F| from a sum of squares; of B +- F~ only the sum without cancellation is formed, its root
    taken as (B +- F~)/(2A) and the other as 2C/(B +- F~). The finite root thus keeps full
    accuracy as A -> 0 on the resonance cone, at S = 0 and next to the cyclotron resonances
    (exactly on one, it is evaluated one ulp off it); a root exactly on the cone is +-inf. The
    root that diverges on the cone inherits the conditioning of A itself,
    (|S| sin^2 + |P| cos^2)/|A|, with respect to the inputs.

    Parameters
    ----------
    f, b, n_e : array_like
        Frequency (Hz), field magnitude (T), electron density (m^-3).
    theta : array_like
        Angle between the wave vector and B0, rad.
    ions, collision_frequency
        As for :func:`stix`.

    Returns
    -------
    DispersionRoots
        Named tuple (o, x) of n^2, broadcast over all inputs (complex with collisions).

    References
    ----------
    Stix (1992), ch. 1 (dispersion relation, its roots and the CMA diagram);
    W.H. Press et al., *Numerical Recipes*, 3rd ed. (2007), sec. 5.6 (quadratic roots).
    """
    both = _solve(f, b, n_e, theta, ions, collision_frequency, lambda o, x, p, d, k: (o, x))
    return DispersionRoots(*both)


def n2_branch(
    f: ArrayLike, b: ArrayLike, n_e: ArrayLike, theta: ArrayLike, mode: str, ions: Any = (),
    collision_frequency: Any = 0.0,
) -> NDArray:
    """n^2 of one named branch at angle theta: "O", "X", "R" or "L".

    "O"/"X" are the labels of :func:`refractive_index_squared`. "R"/"L" select, point by
    point, the branch that becomes R (resp. L) as theta -> 0 for the local plasma, so that
    ``n2_branch(f, b, n_e, 0.0, "R")`` equals R.

    Parameters
    ----------
    f, b, n_e, theta, ions, collision_frequency
        As for :func:`refractive_index_squared`.
    mode : {"O", "X", "R", "L"}
        Branch name (case-insensitive).
    """
    key = str(mode).upper()
    if key not in ("O", "X", "R", "L"):
        raise ValueError(f"mode must be one of 'O', 'X', 'R', 'L', got {mode!r}")

    def pick(o, x, p, d, k):
        if key in ("O", "X"):
            return (o if key == "O" else x,)
        o_is_l = _o_branch_is_l(p, d, k)
        return (np.where(o_is_l, o, x) if key == "L" else np.where(o_is_l, x, o),)

    return _solve(f, b, n_e, theta, ions, collision_frequency, pick)[0]


def n2_o_mode(f: ArrayLike, b: ArrayLike, n_e: ArrayLike, ions: Any = (),
              collision_frequency: Any = 0.0) -> NDArray:
    """Ordinary mode across B0 (theta = pi/2): n^2 = P (Stix 1992, ch. 1)."""
    return _scalar(_selected(f, b, n_e, ions, collision_frequency, ("P",))["P"])


def n2_x_mode(f: ArrayLike, b: ArrayLike, n_e: ArrayLike, ions: Any = (),
              collision_frequency: Any = 0.0) -> NDArray:
    """Extraordinary mode across B0 (theta = pi/2): n^2 = RL/S (Stix 1992, ch. 1); +-inf at S = 0."""
    e = _selected(f, b, n_e, ions, collision_frequency, ("R", "L", "S"))
    with np.errstate(divide="ignore", invalid="ignore"):
        return _scalar((e["R"] * e["L"]) / e["S"])


def n2_r_wave(f: ArrayLike, b: ArrayLike, n_e: ArrayLike, ions: Any = (),
              collision_frequency: Any = 0.0) -> NDArray:
    """Right-hand circularly polarised wave along B0 (theta = 0): n^2 = R (Stix 1992, ch. 1)."""
    return _scalar(_selected(f, b, n_e, ions, collision_frequency, ("R",))["R"])


def n2_l_wave(f: ArrayLike, b: ArrayLike, n_e: ArrayLike, ions: Any = (),
              collision_frequency: Any = 0.0) -> NDArray:
    """Left-hand circularly polarised wave along B0 (theta = 0): n^2 = L (Stix 1992, ch. 1)."""
    return _scalar(_selected(f, b, n_e, ions, collision_frequency, ("L",))["L"])


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
