"""Wave accessibility along a launch path: does the launched wave reach its resonance?

Along the path from the launcher (samples of B(z) and n_e(z)), n²(z) of the launched mode
is evaluated with the cold-plasma core, the target layer located, and every evanescent layer
(Re n² < 0) met before it measured, with the WKB tunnelling factor exp(−2∫κ dz),
κ = k0 √(−Re n²). Verdicts:

* ``"direct"``: no evanescent layer between the launcher and the target layer;
* ``"tunnelling"``: evanescent layers in the way, total factor ≥ ``blocked_below``;
* ``"blocked"``: factor < ``blocked_below`` (a project default of 1e-3, not a physical
  constant; the access rules pass their own limit);
* ``"no-resonance"``: the target layer is not on the path (factor over the whole path).

Target layers (cold plasma, electrons): R wave (along B) → electron cyclotron resonance
(Y = 1, R → ∞); L wave → ion cyclotron layers of the given ions (none for electrons only);
O mode (across B) → the ECR layer, where it is absorbed at the fundamental (it has no cold
resonance; P = 0 is its cutoff at n_c); X mode (across B) → upper-hybrid resonance
(S = 0, X = 1 − Y²); oblique θ → the resonance cone A = S sin²θ + P cos²θ = 0 where the
chosen branch is resonant, else the ECR layer. Landmarks are located with the
electron-only conditions in X = n_e/n_c and Y = f_ce/f (Stix 1992, ch. 1–2;
Stix 1992, ch. 1): ECR Y = 1, R cutoff X = 1 − Y, L cutoff X = 1 + Y, O cutoff X = 1,
UHR X = 1 − Y²; ions shift them by O(m_e/m_i). The standard consequences follow without
special cases: the R wave reaches the ECR from the high-field side (whistler, no density
cutoff: "magnetic beach") but meets the R cutoff from the low-field side; the X mode
reaches the UHR from the high-field side but meets the R cutoff first from the low-field
side; the O mode is blocked above n_c.

For a cutoff followed directly by the resonance (R wave or X mode from the low-field side)
the full-wave transmission of the Budden model profile n² = 1 + β/z equals the WKB factor
exactly (Budden 1985, ch. 19; checked in the tests against
:func:`rfcheck.physics.fullwave.slab_reflection`), and approximately for other profiles;
the rest is reflected or absorbed at the resonance (:mod:`rfcheck.physics.fullwave` gives
those fractions).

Integrals run on a grid refined between the samples (B and n_e interpolated linearly) and
clustered geometrically at the target layer, where κ has an integrable singularity. The grid
stops where the target's defining condition (above; for an ion cyclotron layer
|B − B_ci| / (B + B_ci)) falls below :data:`ROUNDING_FLOOR` relative to its terms: closer to a
resonance the sign of n², which runs through infinity there, is set by the rounding of B and
n_e rather than by the profile, and a sample there would open a layer of zero width (an X
wave from the high-field side, say, "tunnelling" into the upper-hybrid layer). The part of a
genuine layer left out is ~ 2 k0 √(A d) for n² ≈ −A/d at distance d (a few 1e-6 of the
exponent for a field scale length of 0.1 m at GHz frequencies). Each evanescent layer must
be resolved (:func:`rfcheck.physics.fullwave.evanescent_layers`): where dropping every other
point would move its exponent 2∫κ dz by more than EXPONENT_RTOL × max(1, 2∫κ dz), the cells
of that layer are split in four, up to :data:`MAX_LAYER_REFINEMENTS` times; a layer still
unresolved then raises ValueError.
"""

from __future__ import annotations

import math
from typing import Any, NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from rfcheck.physics.coldplasma import (cma_region, n2_branch, n2_l_wave, n2_o_mode,
                                        n2_r_wave, n2_x_mode)
from rfcheck.physics.frequencies import critical_density, ecr_field, ion_cyclotron_field
from rfcheck.physics.fullwave import EXPONENT_RTOL, EvanescentLayers, evanescent_layers
from rfcheck.physics.species import ion_mixture
from rfcheck.physics.domain import check_index, guard_public

__all__ = ["PathAccess", "launch_path_access", "path_landmarks", "mode_n2"]

#: Relative residual of the target layer's condition below which the path is not sampled:
#: rounding of B and n_e (relative 1e-16) decides the sign of n² there (margin ~1e3).
ROUNDING_FLOOR = 1e-12
#: Times the cells of an unresolved evanescent layer are split in four before giving up.
MAX_LAYER_REFINEMENTS = 6
#: most sub-steps per sample interval a caller may ask of launch_path_access
MAX_REFINE = 1024

_CUTOFFS = {"R": ("R cutoff",), "L": ("L cutoff",), "O": ("O cutoff",),
            "X": ("R cutoff", "L cutoff"), "oblique": ("O cutoff", "R cutoff", "L cutoff")}


class PathAccess(NamedTuple):
    """Accessibility of one launched mode along one path.

    verdict : "direct" | "tunnelling" | "blocked" | "no-resonance".
    target : name of the target layer; resonance_z : its crossings (m, in path order).
    first_cutoff, first_cutoff_z : the first layer edge met from the launcher before the
        target ("" and nan if none; "launcher" if the launcher sits in an evanescent region).
    layers : evanescent layers before the target (start = where the wave enters).
    tunnelling_factor : exp(−2 Σ∫κ dz) over those layers (1 if none).
    z, n2, x, y, region : the input grid, n² of the mode, X = n_e/n_c, Y = f_ce/f and the
        CMA region number along the path (for figures).
    landmarks : {"ECR", "UHR", "R cutoff", "L cutoff", "O cutoff"[, "resonance cone"]:
        array of crossing positions in path order}.
    """

    verdict: str
    mode: str
    target: str
    resonance_z: NDArray
    first_cutoff: str
    first_cutoff_z: float
    layers: EvanescentLayers
    tunnelling_factor: float
    z: NDArray
    n2: NDArray
    x: NDArray
    y: NDArray
    region: NDArray
    landmarks: dict


def mode_n2(f: float, b: ArrayLike, n_e: ArrayLike, mode: str, theta: float | None = None,
            ions: Any = (), collision_frequency: Any = 0.0) -> NDArray:
    """n² of a launched mode: "R", "L" along B (n² = R, L) and "O", "X" across B
    (n² = P, RL/S) when ``theta`` is None; any branch at angle θ (rad) to B otherwise
    (:func:`rfcheck.physics.coldplasma.n2_branch`)."""
    key = mode.upper()
    table = {"R": n2_r_wave, "L": n2_l_wave, "O": n2_o_mode, "X": n2_x_mode}
    if key not in table:
        raise ValueError(f"mode must be 'R', 'L', 'O' or 'X', got {mode!r}")
    with np.errstate(divide="ignore", invalid="ignore"):
        if theta is not None:
            return n2_branch(f, b, n_e, theta, key, ions, collision_frequency)
        return table[key](f, b, n_e, ions, collision_frequency)


def _conditions(x, y, theta):
    """Smooth functions of (X, Y) that vanish on each landmark (electron-only)."""
    out = {"ECR": y - 1.0, "UHR": 1.0 - y * y - x, "R cutoff": 1.0 - y - x,
           "L cutoff": 1.0 + y - x, "O cutoff": 1.0 - x}
    if theta is not None:
        c2 = math.cos(theta) ** 2
        out["resonance cone"] = (1.0 - y * y) - x * (1.0 - y * y * c2)
    return out


def _condition_scales(x, y, theta):
    """Sum of the magnitudes of the terms of each condition of :func:`_conditions`."""
    out = {"ECR": y + 1.0, "UHR": 1.0 + y * y + x, "R cutoff": 1.0 + y + x,
           "L cutoff": 1.0 + y + x, "O cutoff": 1.0 + x}
    if theta is not None:
        c2 = math.cos(theta) ** 2
        out["resonance cone"] = (1.0 + y * y) + x * (1.0 + y * y * c2)
    return out


def _crossings(s, g, g_at=None):
    """Positions where g changes sign along s, in increasing order: linear interpolation
    of the samples, or, with ``g_at`` (g at any point), bisection to full precision."""
    g = np.asarray(g, float)
    i = np.nonzero(np.sign(g[:-1]) * np.sign(g[1:]) < 0)[0]
    exact = s[1:-1][g[1:-1] == 0]
    if g_at is None:
        zc = s[i] + (s[i + 1] - s[i]) * g[i] / (g[i] - g[i + 1])
    else:
        lo, hi, g_lo = s[i].copy(), s[i + 1].copy(), g[i]
        for _ in range(60):
            mid = 0.5 * (lo + hi)
            same = np.sign(g_at(mid)) == np.sign(g_lo)
            lo, hi = np.where(same, mid, lo), np.where(same, hi, mid)
        zc = 0.5 * (lo + hi)
    return np.sort(np.concatenate([zc, exact]))


def _crossings_of(s, conditions: dict, conditions_at) -> dict:
    """:func:`_crossings` with bisection for several conditions at once: ``conditions`` maps
    names to samples along s, ``conditions_at(sq)`` gives every condition at points sq (a
    dict of arrays). The brackets of all conditions are bisected together, one evaluation
    per step instead of one per condition and step; each bracket follows exactly the steps
    it would alone (the conditions are evaluated point by point), so the crossings are the
    same to the last bit."""
    names = list(conditions)
    los, his, glos, owner, exacts = [], [], [], [], []
    for k, name in enumerate(names):
        g = np.asarray(conditions[name], float)
        i = np.nonzero(np.sign(g[:-1]) * np.sign(g[1:]) < 0)[0]
        exacts.append(s[1:-1][g[1:-1] == 0])
        los.append(s[i])
        his.append(s[i + 1])
        glos.append(g[i])
        owner.append(np.full(i.size, k))
    lo, hi = np.concatenate(los), np.concatenate(his)
    g_lo, who = np.concatenate(glos), np.concatenate(owner)
    if lo.size:
        pick = np.arange(lo.size)
        for _ in range(60):
            mid = 0.5 * (lo + hi)
            at = conditions_at(mid)
            vals = np.stack([np.asarray(at[name], float) for name in names])[who, pick]
            same = np.sign(vals) == np.sign(g_lo)
            lo, hi = np.where(same, mid, lo), np.where(same, hi, mid)
    zc = 0.5 * (lo + hi)
    return {name: np.sort(np.concatenate([zc[who == k], exacts[k]]))
            for k, name in enumerate(names)}


def path_landmarks(z: ArrayLike, b: ArrayLike, n_e: ArrayLike, f: float,
                   theta: float | None = None) -> dict:
    """Crossings of the ECR, UHR, R/L/O cutoffs (and resonance cone at θ) along z.

    Linear interpolation of the electron-only conditions in X = n_e/n_c, Y = B/B_ECR
    between samples (Stix 1992, ch. 1). Returns {name: array of z}.
    """
    z = np.asarray(z, float)
    x = np.asarray(n_e, float) / critical_density(f)
    y = np.asarray(b, float) / ecr_field(f)
    return {k: _crossings(z, g) for k, g in _conditions(x, y, theta).items()}


def _split_cells(grid, lo, hi, parts=4):
    """grid with each cell that overlaps [lo, hi] split into `parts` equal cells."""
    cells = np.nonzero((grid[1:] > lo) & (grid[:-1] < hi))[0]
    cells = np.unique(np.clip(np.concatenate([cells - 1, cells, cells + 1]), 0, grid.size - 2))
    frac = np.arange(1, parts) / parts
    new = (grid[cells, None] + (grid[cells + 1] - grid[cells])[:, None] * frac).ravel()
    return np.union1d(grid, new)


def _refined_grid(s, s_end, refine):
    """Points of [0, s_end): `refine` sub-steps per sample interval, and 64 per decade
    geometrically towards s_end (down to 1e-12 of the distance)."""
    pts = np.append(s[s < s_end], s_end)
    sub = np.linspace(0.0, 1.0, refine + 1)[:-1]
    grid = (pts[:-1, None] + np.diff(pts)[:, None] * sub).ravel()
    tail = s_end * (1.0 - 10.0 ** (-np.arange(1, 769) / 64.0))
    last = pts[-2] if pts.size > 1 else 0.0
    near = s_end - (s_end - last) * 10.0 ** (-np.arange(1, 769) / 64.0)
    out = np.unique(np.concatenate([grid, tail, near]))
    return out[(out >= 0) & (out < s_end)]


def launch_path_access(z: ArrayLike, b: ArrayLike, n_e: ArrayLike, f: float, mode: str,
                       theta: float | None = None, *, ions: Any = (),
                       collision_frequency: Any = 0.0, launch_from: str = "start",
                       blocked_below: float = 1e-3, refine: int = 8) -> PathAccess:
    """Accessibility of the target layer for one launched mode along a path.

    Parameters
    ----------
    z : array_like
        Positions along the path, m, strictly increasing.
    b : array_like
        Field magnitude |B| at z, T.
    n_e : array_like
        Electron density at z, m^-3.
    f : float
        Wave frequency, Hz.
    mode : {"R", "L", "O", "X"}
        R, L along B and O, X across B when ``theta`` is None; the branch name of
        :func:`rfcheck.physics.coldplasma.n2_branch` at angle ``theta`` otherwise.
    theta : float, optional
        Angle between k and B, rad.
    ions, collision_frequency : optional
        As in :func:`rfcheck.physics.coldplasma.stix`.
    launch_from : {"start", "end"}, optional
        Launcher at z[0] or at z[-1].
    blocked_below : float, optional
        Tunnelling factor under which the verdict is "blocked" (project default 1e-3).
    refine : int, optional
        Sub-steps per sample interval for the κ integral.

    Returns
    -------
    PathAccess

    References
    ----------
    Stix (1992) ch. 1–2 and 13; Budden (1985) ch. 19 (tunnelling).
    """
    refine = check_index("refine", refine, 1, MAX_REFINE)
    z = np.asarray(z, float)
    b = np.broadcast_to(np.asarray(b, float), z.shape)
    n_e = np.broadcast_to(np.asarray(n_e, float), z.shape)
    if z.ndim != 1 or z.size < 2 or np.any(np.diff(z) <= 0):
        raise ValueError("z must be a strictly increasing 1-D grid with at least 2 points")
    if launch_from not in ("start", "end"):
        raise ValueError("launch_from must be 'start' or 'end'")
    key = mode.upper()
    oblique = theta is not None
    n2 = mode_n2(f, b, n_e, key, theta, ions, collision_frequency)
    x = n_e / critical_density(f)
    y = b / ecr_field(f)

    # path coordinate s from the launcher
    forward = launch_from == "start"
    s = z - z[0] if forward else (z[-1] - z)[::-1]
    bs, ns = (b, n_e) if forward else (b[::-1], n_e[::-1])
    to_z = (lambda v: z[0] + v) if forward else (lambda v: z[-1] - v)
    xs, ys = (x, y) if forward else (x[::-1], y[::-1])

    def n2_at(sq):
        return mode_n2(f, np.interp(sq, s, bs), np.interp(sq, s, ns), key, theta, ions,
                       collision_frequency)

    def cond_at(sq):
        return _conditions(np.interp(sq, s, xs), np.interp(sq, s, ys), theta)

    landmarks_s = _crossings_of(s, _conditions(xs, ys, theta), cond_at)

    # target layer
    if key == "L" and theta is None:
        species = ion_mixture(ions)
        target = "ion cyclotron" if species else "none (electrons only)"
        hits = [_crossings(s, bs - ion_cyclotron_field(f, sp),
                           lambda sq, sp=sp: np.interp(sq, s, bs) - ion_cyclotron_field(f, sp))
                for sp, _ in species]
        res_s = np.sort(np.concatenate(hits)) if hits else np.zeros(0)
    elif theta is None:
        target = {"R": "ECR", "O": "ECR", "X": "UHR"}[key]
        res_s = landmarks_s[target]
    else:
        cone = landmarks_s.get("resonance cone", np.zeros(0))
        resonant = [sc for sc in cone if abs(n2_at(np.array([sc]))[0]) > 1e6]
        target = "resonance cone" if resonant else "ECR"
        res_s = np.array(resonant) if resonant else landmarks_s["ECR"]

    def target_residual(sq):
        """Relative residual of the target layer's defining condition at path points sq."""
        if key == "L" and theta is None:
            bq = np.interp(sq, s, bs)
            return np.min([np.abs(bq - bc) / (bq + bc) for bc in
                           (ion_cyclotron_field(f, sp) for sp, _ in species)], axis=0)
        xq, yq = np.interp(sq, s, xs), np.interp(sq, s, ys)
        return np.abs(_conditions(xq, yq, theta)[target]) / _condition_scales(xq, yq, theta)[target]

    s_end = float(res_s[0]) if res_s.size else float(s[-1])
    if res_s.size and s_end <= 0.0:
        grid = np.zeros(0)
    elif res_s.size:
        grid = _refined_grid(s, s_end, refine)  # refine checked below MAX_REFINE
        # stop short of the rounding zone of the target (module docstring)
        resolved = np.nonzero(target_residual(grid) >= ROUNDING_FLOOR)[0]
        grid = grid[:resolved[-1] + 1] if resolved.size else grid[:0]
    else:
        sub = np.linspace(0.0, 1.0, refine + 1)[:-1]
        grid = np.append((s[:-1, None] + np.diff(s)[:, None] * sub).ravel(), s[-1])
    for attempt in range(MAX_LAYER_REFINEMENTS + 1):
        n2_f = n2_at(grid)
        ok = np.isfinite(n2_f)
        if ok.sum() < 2:
            layers = EvanescentLayers(*(np.zeros(0),) * 4, np.zeros(0, bool), np.zeros(0))
            break
        final = attempt == MAX_LAYER_REFINEMENTS
        layers = evanescent_layers(grid[ok], n2_f[ok], f,
                                   exponent_rtol=EXPONENT_RTOL if final else None)
        coarse = layers.exponent_change > EXPONENT_RTOL * np.maximum(
            1.0, 2.0 * layers.kappa_integral)
        if not coarse.any():
            break
        for lo, hi in zip(layers.start[coarse], layers.end[coarse]):
            grid = _split_cells(grid, lo, hi)
    factor = float(np.exp(-2.0 * layers.kappa_integral.sum()))

    first, first_s = "", math.nan
    if layers.start.size:
        first_s = float(layers.start[0])
        if first_s == grid[ok][0] and np.real(n2_f[ok][0]) < 0:
            first = "launcher"
        else:
            sx = np.interp(first_s, s, xs)
            sy = np.interp(first_s, s, ys)
            names = _CUTOFFS["oblique" if oblique else key]
            vals = {k: abs(_conditions(sx, sy, None)[k]) for k in names}
            best = min(vals, key=vals.get)
            first = best if vals[best] < 1e-2 * (1.0 + sy) else "resonance (n² through ∞)"

    if not res_s.size:
        verdict = "no-resonance"
    elif not layers.start.size:
        verdict = "direct"
    else:
        verdict = "tunnelling" if factor >= blocked_below else "blocked"

    mapped = EvanescentLayers(to_z(layers.start), to_z(layers.end), layers.width,
                              layers.kappa_integral, layers.open_ends, layers.exponent_change)
    return PathAccess(
        verdict=verdict, mode=key if theta is None else f"{key} at {theta:.4g} rad",
        target=target, resonance_z=to_z(res_s), first_cutoff=first,
        first_cutoff_z=float(to_z(first_s)), layers=mapped, tunnelling_factor=factor,
        z=z, n2=n2, x=x, y=y, region=cma_region(x, y).region,
        landmarks={k: to_z(v) for k, v in landmarks_s.items()},
    )


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
