"""Worst cases of a multilayer window over the spread of its layers' parameters.

Each layer's thickness, relative permittivity and loss tangent lies in a closed interval
(the tolerance of the part as made; the spread of the material between grades, lots and
suppliers). A review needs the largest reflection |Γ| and the largest absorbed fraction
over that box of parameters and over the feed's band, not at the nominal stack. Every
corner of the box costs 2^m stack evaluations for m varied parameters (3^m with the
mid-points), out of reach beyond a dozen layers; this module finds the worst case with a
bounded number of evaluations, each an array over (combinations × frequencies).

Why a bounded search finds the worst case
-----------------------------------------
1. Small boxes. Tolerances and material spreads are small against a quarter wavelength in
   the layer (0.2 mm on a 33.7 mm silica disc; ε_r ± 1 %). Over such a box the complex
   Γ(f) of the stack, analytic in every ε and d, is close to a quadratic with no cross
   terms that matter: in normalised coordinates s ∈ [−1, 1]^m,
   Γ ≈ Γ_0 + Σ_j (g_j s_j + c_j s_j²), with g_j and c_j from the 2m face centres of the box
   (central differences, exact for a quadratic along each axis).
2. The worst case of that model is a vertex, and one of at most 2m candidates. At a vertex
   s_j² = 1, so Γ ≈ Γ_0' + Σ g_j s_j with Γ_0' = Γ_0 + Σ c_j; |·| of an affine function is
   convex, so its maximum over the box is at a vertex, and
   max_s |Γ_0' + Σ g_j s_j| = max_θ [Re(e^{−jθ} Γ_0') + Σ_j |Re(e^{−jθ} g_j)|], reached at
   s_j = sign Re(e^{−jθ} g_j). As θ turns once round each sign flips twice, so at most 2m
   sign patterns occur and the model's worst vertex is one of them. They are enumerated at
   every frequency and the best ``VERTICES_PER_FREQUENCY`` per frequency are evaluated
   exactly (a real quantity such as the absorbed fraction is the special case of real g_j:
   the worst vertex is the corner along the sign of the gradient).
3. Where the model is not close enough (a tolerance spanning a noticeable part of a quarter
   wave, |Γ| stationary inside the box: a resonance of the absorbed power), a
   deterministic coordinate ascent on the exact response, over five levels per parameter
   (ends, quarter points, centre), moves from each of the best ``ASCENT_STARTS`` distinct
   points found (budget permitting) until no
   single-parameter change improves the worst case by more than 1e-9 (relative); a
   compass refinement (steps of 1/8, 1/16 and 1/32 of each range) then settles an
   interior maximum. It stops early only when the budget is spent, and says so.
4. Small boxes are searched exhaustively first: the whole three-level grid where
   3^m ≤ ``GRID_LIMIT``, every corner where 2^m ≤ ``CORNER_LIMIT``.
5. Loss tangent. Γ is analytic in the complex permittivity ε_r(1 − j tan δ), so
   |∂Γ/∂(ε_r tan δ)| = |∂Γ/∂ε_r|: a tan δ range moves Γ by ε_r Δtan δ / Δε_r of what the
   permittivity spread does — about 1 % for alumina (9.8 × 2.5e-4 against 0.2). It is
   searched with the other parameters for |Γ|. The absorbed fraction is, to first order in
   the losses, A = Σ_i tan δ_i · ω ε0 ε_i ∫_i |E|² dV / P_inc with the field of the lossless
   stack: it grows with every tan δ, so the absorption search holds every tan δ at the top
   of its range and searches thickness and permittivity (valid while each layer is thin
   against its attenuation length, as every window is).

Budget
------
At most ``MAX_COMBINATIONS`` stack combinations per search (each over all the frequencies
asked for) and ``MAX_LAYERS`` layers: the time is bounded by MAX_COMBINATIONS × layers ×
frequencies layer-matrix products and the memory by ``CHUNK_ELEMENTS`` (combinations ×
frequencies evaluated at a time). The exhaustive and vertex stages fit in the budget for
every accepted stack (2·3·MAX_LAYERS + 1 face centres, ≤ 2 vertices per frequency); the
ascent uses what is left and reports whether it converged.

All functions are pure numpy on SI values (m, Hz).
"""

from __future__ import annotations

import itertools
import math
from typing import NamedTuple, Sequence

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.multilayer import (Embedding, Layer, embedding_ports, layer_matrix,
                                       reflection_band, scattering, window_response)
from rfcheck.physics.domain import check_index, guard_public

#: largest budget a caller may give worst_over_spread (combinations)
MAX_BUDGET = 1_000_000

__all__ = [
    "MAX_COMBINATIONS",
    "MAX_LAYERS",
    "GRID_LIMIT",
    "CORNER_LIMIT",
    "LayerSpread",
    "StackPoint",
    "SpreadWorst",
    "SpreadBand",
    "spread_response",
    "worst_over_spread",
    "band_over_spread",
]

#: Largest number of stack combinations one search evaluates (each over all its frequencies).
#: 4096 keeps a search of a 20-layer window (60 varied parameters) over 41 frequencies to
#: 0.1-0.4 s on one core and a few MB, leaves the ascent ~15 sweeps of single-parameter moves
#: at 60 parameters, and holds the face centres of the largest accepted stack (601 at
#: MAX_LAYERS) well inside it.
MAX_COMBINATIONS = 4096
#: Most layers a window may have for the search: real windows have one to five; beyond 100
#: the search would spend the budget on the face centres alone.
MAX_LAYERS = 100
#: Exhaustive three-level grid when 3^m is at most this (m ≤ 5).
GRID_LIMIT = 243
#: All 2^m corners when 2^m is at most this (m ≤ 8).
CORNER_LIMIT = 256
#: Vertices of the linear model evaluated exactly at each frequency.
VERTICES_PER_FREQUENCY = 2
#: Combinations × frequencies evaluated in one array call (bounds the memory to a few MB).
CHUNK_ELEMENTS = 1 << 16
#: Points the coordinate ascent starts from (the best distinct ones found before it).
ASCENT_STARTS = 3
#: Levels of the coordinate ascent, in normalised coordinates.
ASCENT_LEVELS = (-1.0, -0.5, 0.0, 0.5, 1.0)
#: Band iterations: each adds the worst combination found on either side of the band.
BAND_ITERATIONS = 4
#: Frequencies sampled on each side of the band when searching for a worse combination.
BAND_SIDE_POINTS = 21
#: Budget of each band-side search.
BAND_COMBINATIONS = 1024

_KINDS = ("thickness", "eps_r", "tan_delta")
_IMPROVEMENT = 1e-9


class LayerSpread(NamedTuple):
    """One layer's parameters as (low, nominal, high): thickness (m), ε_r, tan δ."""

    thickness: tuple[float, float, float]
    eps_r: tuple[float, float, float]
    tan_delta: tuple[float, float, float]


class StackPoint(NamedTuple):
    """One combination: every layer's thickness (m), ε_r and tan δ."""

    thickness: tuple[float, ...]
    eps_r: tuple[float, ...]
    tan_delta: tuple[float, ...]


class SpreadWorst(NamedTuple):
    """The worst value of a search and where it occurs.

    value: the largest |Γ| or absorbed fraction found (NaN where the embedding does not
    propagate at some frequency); frequency: Hz; point: the combination; evaluations: how
    many combinations were evaluated (each over every frequency); method: the stages used;
    converged: False if the ascent stopped at the budget.
    """

    value: float
    frequency: float
    point: StackPoint
    evaluations: int
    method: str
    converged: bool


class SpreadBand(NamedTuple):
    """Contiguous band around the centre where every combination of the worst set keeps
    |Γ| ≤ limit (NaN edges if the worst combination exceeds it at the centre).

    low_point/high_point: the combination that binds each edge (without a band: the worst
    combination at the centre, which exceeds the limit there); combinations: size of the
    worst set; evaluations: combinations evaluated by the searches behind it; converged:
    False if the last band iteration still found a worse combination.
    """

    low: float
    high: float
    low_open: bool
    high_open: bool
    low_point: StackPoint | None
    high_point: StackPoint | None
    combinations: int
    evaluations: int
    converged: bool


# --------------------------------------------------------------------------- the box


class _Box:
    """The parameter box of a stack: nominal, low and high per layer and kind (n, 3)."""

    def __init__(self, spreads: Sequence[LayerSpread]):
        if len(spreads) > MAX_LAYERS:
            raise ValueError(f"{len(spreads)} layers: the window search evaluates at most "
                             f"{MAX_LAYERS}")
        arr = np.array([[list(getattr(s, k)) for k in _KINDS] for s in spreads],
                       dtype=float).reshape(len(spreads), 3, 3)
        self.low, self.nominal, self.high = arr[:, :, 0], arr[:, :, 1], arr[:, :, 2]
        if np.any(self.low > self.nominal) or np.any(self.nominal > self.high):
            raise ValueError("each layer parameter needs low ≤ nominal ≤ high")
        if np.any(self.low[:, 0] <= 0) or np.any(self.low[:, 1] < 1) or np.any(self.low[:, 2] < 0):
            raise ValueError("thickness must stay positive, ε_r ≥ 1 and tan δ ≥ 0")
        self.varied = np.argwhere(self.high > self.low)  # (m, 2): (layer, kind)
        lo = self.low[self.varied[:, 0], self.varied[:, 1]]
        hi = self.high[self.varied[:, 0], self.varied[:, 1]]
        self.lo, self.hi = lo, hi
        self.centre, self.half = 0.5 * (lo + hi), 0.5 * (hi - lo)

    @property
    def m(self) -> int:
        return int(self.varied.shape[0])

    def values(self, s: NDArray) -> NDArray:
        """Normalised points s (k, m) → parameter values (k, n, 3); the nominal row for None."""
        k = s.shape[0]
        out = np.repeat(self.nominal[None, :, :], k, axis=0)
        if self.m:  # the ends exactly as given (reported as the values used)
            x = np.where(s <= -1.0, self.lo, np.where(s >= 1.0, self.hi, self.centre + self.half * s))
            out[:, self.varied[:, 0], self.varied[:, 1]] = x
        return out

    def nominal_s(self) -> NDArray:
        """The nominal point in normalised coordinates (tan δ nominal need not be central)."""
        nom = self.nominal[self.varied[:, 0], self.varied[:, 1]]
        return np.where(self.half > 0, (nom - self.centre) / np.where(self.half > 0, self.half, 1), 0)

    def point(self, values_row: NDArray) -> StackPoint:
        return StackPoint(*(tuple(float(x) for x in values_row[:, k]) for k in range(3)))

    def kind_index(self, kind: str) -> NDArray:
        """Positions in s of the varied parameters of one kind."""
        return np.nonzero(self.varied[:, 1] == _KINDS.index(kind))[0]


def _layers(values: NDArray) -> list[Layer]:
    """(k, n, 3) parameter values → layers whose parameters are (k, 1) arrays."""
    return [Layer(values[:, i, 1:2], values[:, i, 2:3], values[:, i, 0:1])
            for i in range(values.shape[1])]


def spread_response(f: ArrayLike, values: ArrayLike, embedding: Embedding = Embedding()
                    ) -> tuple[NDArray, NDArray]:
    """Complex Γ and absorbed fraction of k combinations at frequencies f.

    values: (k, n, 3) — thickness (m), ε_r, tan δ of each of n layers; f: 1-D, Hz. Returns
    two arrays of shape (k, len(f)), evaluated in chunks of at most CHUNK_ELEMENTS.
    """
    values = np.asarray(values, dtype=float)
    f = np.atleast_1d(np.asarray(f, dtype=float)).ravel()
    k = values.shape[0]
    gamma = np.empty((k, f.size), dtype=complex)
    absorbed = np.empty((k, f.size), dtype=float)
    step = max(1, CHUNK_ELEMENTS // max(f.size, 1))
    for a in range(0, k, step):
        r = window_response(f[None, :], _layers(values[a:a + step]), embedding)
        gamma[a:a + step] = np.broadcast_to(r.gamma, (min(step, k - a), f.size))
        absorbed[a:a + step] = np.broadcast_to(r.absorptance, (min(step, k - a), f.size))
    return gamma, absorbed


# --------------------------------------------------------------------------- the search


class _Search:
    """Bookkeeping of one search: evaluated count, best value, its point and frequency."""

    def __init__(self, box: _Box, f: NDArray, embedding: Embedding, quantity: str, budget: int):
        self.box, self.f, self.embedding, self.quantity = box, f, embedding, quantity
        self.budget, self.evaluations = budget, 0
        self.best, self.best_s, self.best_j = -math.inf, None, 0

    def signal(self, s: NDArray) -> NDArray:
        """Complex quantity whose magnitude is the objective, (k, nf)."""
        self.evaluations += s.shape[0]
        gamma, absorbed = spread_response(self.f, self.box.values(s), self.embedding)
        return gamma if self.quantity == "reflection" else absorbed.astype(complex)

    def signal_moves(self, base: NDArray, moves: NDArray, coords: NDArray) -> NDArray:
        """The signal of ``moves`` that each differ from ``base`` in one coordinate (``coords``).

        The stack matrix is P_i · L_i' · S_i with the products P_i of the layers before layer
        i and S_i of those after it taken once at ``base``: one layer matrix per move instead
        of one per layer (same combinations, same result to rounding).
        """
        self.evaluations += moves.shape[0]
        box, f = self.box, self.f
        ports = embedding_ports(f, self.embedding)
        vb = box.values(base[None, :])[0]  # (n, 3)
        a, b, c, d = layer_matrix(ports, Layer(vb[:, 1:2], vb[:, 2:3], vb[:, 0:1]))  # (n, nf)
        n = vb.shape[0]
        pre = np.empty((4, n, f.size), dtype=complex)
        suf = np.empty((4, n, f.size), dtype=complex)
        acc = (np.ones(f.size, complex), np.zeros(f.size, complex),
               np.zeros(f.size, complex), np.ones(f.size, complex))
        for i in range(n):
            pre[:, i] = acc
            acc = _product(acc, (a[i], b[i], c[i], d[i]))
        acc = (np.ones(f.size, complex), np.zeros(f.size, complex),
               np.zeros(f.size, complex), np.ones(f.size, complex))
        for i in range(n - 1, -1, -1):
            suf[:, i] = acc
            acc = _product((a[i], b[i], c[i], d[i]), acc)
        layer_of = box.varied[coords, 0]
        v = box.values(moves)[np.arange(moves.shape[0]), layer_of, :]  # (k, 3)
        out = np.empty((moves.shape[0], f.size), dtype=complex)
        step = max(1, CHUNK_ELEMENTS // max(f.size, 1))
        for r0 in range(0, moves.shape[0], step):
            rows = slice(r0, r0 + step)
            li = layer_of[rows]
            new = layer_matrix(ports, Layer(v[rows, 1:2], v[rows, 2:3], v[rows, 0:1]))
            abcd = _product(_product(tuple(pre[:, li]), new), tuple(suf[:, li]))
            r = scattering(ports, *abcd)
            out[rows] = r.gamma if self.quantity == "reflection" else r.absorptance
        return out

    def score(self, s: NDArray, sig: NDArray | None = None) -> NDArray:
        """Objective of each row (its worst over frequency); updates the best."""
        sig = self.signal(s) if sig is None else sig
        obj = np.abs(sig)
        per_row = obj.max(axis=1)
        i = int(np.argmax(per_row))
        if per_row[i] > self.best:
            self.best, self.best_s, self.best_j = float(per_row[i]), s[i].copy(), int(np.argmax(obj[i]))
        return per_row

    def left(self) -> int:
        return self.budget - self.evaluations


def _product(p, q):
    """Product of two ABCD matrices given as (a, b, c, d) tuples of broadcastable arrays."""
    a, b, c, d = p
    e, f_, g, h = q
    return a * e + b * g, a * f_ + b * h, c * e + d * g, c * f_ + d * h


def _linear_worst_vertices(const: NDArray, g: NDArray, keep: int, limit: int) -> NDArray:
    """The best ``keep`` vertices of |const + Σ g_j s_j| at each frequency (±1 patterns),
    at most ``limit`` of them in all (those of the largest model value).

    const: (nf,) complex; g: (m, nf) complex. Enumerates the ≤ 2m sign patterns
    s_j = sign Re(e^{−jθ} g_j) between the breakpoints θ = arg g_j ± π/2.
    """
    m, nf = g.shape
    pats_all, vals_all = [], []
    step = max(1, CHUNK_ELEMENTS * 4 // max(2 * m * m, 1))  # frequencies per array call
    for k0 in range(0, nf, step):
        gk = g[:, k0:k0 + step].T  # (K, m)
        ang = np.angle(gk)
        breaks = np.sort(np.mod(np.concatenate([ang + 0.5 * math.pi, ang - 0.5 * math.pi],
                                               axis=1), 2 * math.pi), axis=1)  # (K, 2m)
        nxt = np.concatenate([breaks[:, 1:], breaks[:, :1] + 2 * math.pi], axis=1)
        theta = 0.5 * (breaks + nxt)
        # s_j = sign Re(e^{-jθ} g_j) = sign(cos θ Re g_j + sin θ Im g_j): (K, 2m, m)
        proj = (np.cos(theta)[:, :, None] * gk.real[:, None, :]
                + np.sin(theta)[:, :, None] * gk.imag[:, None, :])
        pats = np.where(proj >= 0, 1.0, -1.0)
        re = const[k0:k0 + step].real[:, None] + np.matmul(pats, gk.real[:, :, None])[..., 0]
        im = const[k0:k0 + step].imag[:, None] + np.matmul(pats, gk.imag[:, :, None])[..., 0]
        vals = np.hypot(re, im)  # (K, 2m)
        top = np.argsort(-vals, axis=1, kind="stable")[:, :keep]
        pats_all.append(np.take_along_axis(pats, top[:, :, None], axis=1).reshape(-1, m))
        vals_all.append(np.take_along_axis(vals, top, axis=1).ravel())
    pats, first = np.unique(np.concatenate(pats_all), axis=0, return_index=True)
    vals = np.concatenate(vals_all)[first]
    return pats[np.argsort(-vals, kind="stable")[:max(1, limit)]]


def _climb(search: _Search, s: NDArray, value: float, moves_of) -> tuple[NDArray, float, bool]:
    """Repeat the best of the moves ``moves_of(s)`` (and their combination) while it improves.

    Returns the final point, its value and True if it stopped because nothing improved
    (False: the budget ran out).
    """
    while True:
        moves_a, coords_a = moves_of(s)
        if moves_a.shape[0] == 0:
            return s, value, True
        if moves_a.shape[0] + 1 > search.left():
            return s, value, False
        per_row = search.score(moves_a, search.signal_moves(s, moves_a, coords_a))
        best_i = int(np.argmax(per_row))
        candidates = [(float(per_row[best_i]), moves_a[best_i])]
        combined = s.copy()
        for j in np.unique(coords_a):  # every coordinate at its own best improving move
            mine = np.nonzero(coords_a == j)[0]
            b = mine[int(np.argmax(per_row[mine]))]
            if per_row[b] > value:
                combined[j] = moves_a[b, j]
        if np.count_nonzero(combined != s) > 1:
            candidates.append((float(search.score(combined[None, :])[0]), combined))
        top_value, top = max(candidates, key=lambda c: c[0])
        if not top_value > value + _IMPROVEMENT * abs(value) + 1e-15:
            return s, value, True
        s, value = top, top_value


def _level_moves(s: NDArray) -> tuple[NDArray, NDArray]:
    """Every single-parameter move of ``s`` to another of the ASCENT_LEVELS."""
    rows, coords = [], []
    for j in range(s.size):
        for lv in ASCENT_LEVELS:
            if abs(lv - s[j]) > 1e-12:
                row = s.copy()
                row[j] = lv
                rows.append(row)
                coords.append(j)
    return np.array(rows).reshape(-1, s.size), np.array(coords, dtype=int)


def _step_moves(step: float):
    def moves(s: NDArray) -> tuple[NDArray, NDArray]:
        rows, coords = [], []
        for j in range(s.size):
            for sign in (-1.0, 1.0):
                x = min(1.0, max(-1.0, s[j] + sign * step))
                if abs(x - s[j]) > 1e-12:
                    row = s.copy()
                    row[j] = x
                    rows.append(row)
                    coords.append(j)
        return np.array(rows).reshape(-1, s.size), np.array(coords, dtype=int)
    return moves


#: Step sizes (normalised) of the local refinement after the level ascent.
REFINE_STEPS = (0.25, 0.125, 0.0625)


def _ascent(search: _Search, start: NDArray, start_value: float) -> bool:
    """Coordinate ascent over the levels, then a compass refinement with shrinking steps.

    True if every stage stopped because nothing improved (False: the budget ran out).
    """
    s, value, done = _climb(search, start, start_value, _level_moves)
    for step in REFINE_STEPS:
        if not done:
            break
        s, value, done = _climb(search, s, value, _step_moves(step))
    return done


def worst_over_spread(f: ArrayLike, spreads: Sequence[LayerSpread],
                      embedding: Embedding = Embedding(), *, quantity: str = "reflection",
                      budget: int = MAX_COMBINATIONS) -> SpreadWorst:
    """The largest |Γ| (``quantity="reflection"``) or absorbed fraction (``"absorption"``) of
    a stack over frequencies ``f`` and the parameter box ``spreads`` (module docstring).

    The absorption search holds every tan δ at the top of its range (A grows with each).
    NaN (with the first such frequency) where the embedding does not propagate.
    """
    if quantity not in ("reflection", "absorption"):
        raise ValueError(f"quantity must be 'reflection' or 'absorption', got {quantity!r}")
    if quantity == "absorption":
        spreads = [s._replace(tan_delta=(s.tan_delta[2],) * 3) for s in spreads]
        if all(s.tan_delta[2] == 0.0 for s in spreads):  # lossless: nothing is absorbed
            spreads = [LayerSpread(*((v[1],) * 3 for v in s)) for s in spreads]
    box = _Box(spreads)
    f = np.atleast_1d(np.asarray(f, dtype=float)).ravel()
    budget = check_index("budget", budget, 1, MAX_BUDGET)
    search = _Search(box, f, embedding, quantity, max(budget, 2 * box.m + 1))
    m = box.m
    centre = np.zeros((1, m))
    sig_c = search.signal(centre)
    if np.any(np.isnan(sig_c)):
        j = int(np.argmax(np.isnan(sig_c[0])))
        nominal = box.point(box.values(box.nominal_s()[None, :])[0])
        return SpreadWorst(math.nan, float(f[j]), nominal, search.evaluations, "undefined", True)
    search.score(centre, sig_c)
    stages = []
    pool = [(np.zeros(m), float(np.abs(sig_c).max()))]  # evaluated points the ascent may start from
    if m == 0:
        stages.append("nominal only")
    elif 3 ** m <= GRID_LIMIT:
        grid = np.array(list(itertools.product((-1.0, 0.0, 1.0), repeat=m)))
        pool += list(zip(grid, search.score(grid)))
        stages.append(f"all {grid.shape[0]} points of the three-level grid")
    else:
        eye = np.eye(m)
        faces = np.vstack([eye, -eye])
        sig = search.signal_moves(np.zeros(m), faces, np.concatenate([np.arange(m)] * 2))
        pool += list(zip(faces, search.score(faces, sig)))
        plus, minus = sig[:m], sig[m:]
        g = 0.5 * (plus - minus)
        const = sig_c[0] + (0.5 * (plus + minus) - sig_c[0]).sum(axis=0)
        cands = [_linear_worst_vertices(const, g, VERTICES_PER_FREQUENCY, search.left() // 4),
                 np.ones((1, m)), -np.ones((1, m))]
        if 2 ** m <= CORNER_LIMIT:
            cands.append(np.array(list(itertools.product((-1.0, 1.0), repeat=m))))
            stages.append(f"all {2 ** m} corners")
        rows = np.unique(np.vstack(cands), axis=0)
        pool += list(zip(rows, search.score(rows)))
        stages.append("the worst vertices of the linearised response at each frequency")
    converged = True
    if m:
        pool.sort(key=lambda p: -p[1])
        starts = [pool[0]]
        for p in pool[1:]:
            if len(starts) == ASCENT_STARTS:
                break
            if all(np.any(p[0] != q[0]) for q in starts):
                starts.append(p)
        climbed = 0
        for start, value in starts:
            if climbed and search.left() < 8 * m + 2:
                break
            converged = _ascent(search, start, value) and converged
            climbed += 1
        stages.append(f"coordinate ascent from the best {climbed} point"
                      + ("s" if climbed > 1 else "")
                      + ("" if converged else " (stopped at the budget)"))
    point = box.point(box.values(search.best_s[None, :])[0])
    return SpreadWorst(search.best, float(f[search.best_j]), point, search.evaluations,
                       ", ".join(stages), converged)


# --------------------------------------------------------------------------- the band


def band_over_spread(f_centre: float, limit: float, spreads: Sequence[LayerSpread],
                     embedding: Embedding = Embedding(), *, span: float = 0.5,
                     points: int = 2001, seeds: Sequence[StackPoint] = (),
                     rtol: float = 1e-10) -> SpreadBand:
    """Band around ``f_centre`` where |Γ| ≤ ``limit`` for the worst combinations of the box.

    The worst set starts with the nominal stack, the ``seeds`` and the worst combination at
    the centre frequency; the band of the set is found by
    :func:`rfcheck.physics.multilayer.reflection_band`; then each side of that band is
    searched (``BAND_SIDE_POINTS`` frequencies, :func:`worst_over_spread`) for a
    combination that exceeds the limit inside it, which joins the set, up to
    ``BAND_ITERATIONS`` times. The result is the band of the set: where every combination
    found stays under the limit.
    """
    box = _Box(spreads)
    nominal = box.values(box.nominal_s()[None, :])[0]
    rows = [nominal] + [np.array([p.thickness, p.eps_r, p.tan_delta]).T for p in seeds]
    evaluations = 0
    w0 = worst_over_spread([f_centre], spreads, embedding, budget=BAND_COMBINATIONS)
    evaluations += w0.evaluations
    nan_band = SpreadBand(math.nan, math.nan, False, False, w0.point, w0.point, len(rows) + 1,
                          evaluations, True)
    if not w0.value <= limit:
        return nan_band
    rows.append(np.array([w0.point.thickness, w0.point.eps_r, w0.point.tan_delta]).T)
    converged = False
    for iteration in range(BAND_ITERATIONS + 1):
        # edges to 1e-6 while the set grows (they only place the side searches), then to rtol
        b = reflection_band(_layers(np.array(rows)), f_centre, limit, embedding, span=span,
                            points=points, rtol=max(rtol, 1e-6))
        if math.isnan(b.low):
            g, _a = spread_response([f_centre], np.array(rows), embedding)
            worst_row = box.point(np.array(rows)[int(np.argmax(np.abs(g[:, 0])))])
            return nan_band._replace(low_point=worst_row, high_point=worst_row,
                                     combinations=len(rows), evaluations=evaluations)
        if iteration == BAND_ITERATIONS:
            break
        added = False
        for lo, hi in ((b.low, f_centre), (f_centre, b.high)):
            w = worst_over_spread(np.linspace(lo, hi, BAND_SIDE_POINTS), spreads, embedding,
                                  budget=BAND_COMBINATIONS)
            evaluations += w.evaluations
            if w.value > limit * (1.0 + 1e-6):
                rows.append(np.array([w.point.thickness, w.point.eps_r, w.point.tan_delta]).T)
                added = True
        if not added:
            converged = True
            break
    values = np.array(rows)
    if rtol < 1e-6:
        b = reflection_band(_layers(values), f_centre, limit, embedding, span=span,
                            points=points, rtol=rtol)
    binding = []
    for edge in (b.low, b.high):
        g, _a = spread_response([edge], values, embedding)
        binding.append(box.point(values[int(np.argmax(np.abs(g[:, 0])))]))
    return SpreadBand(b.low, b.high, b.low_open, b.high_open, binding[0], binding[1],
                      len(rows), evaluations, converged)


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
