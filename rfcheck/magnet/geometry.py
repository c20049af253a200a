"""Resonance geometry of a magnet in a chamber: profiles, extrema, closure, crossings, ratios.

Everything is SI (m, T, rad) and works on a :class:`~rfcheck.magnet.sources.FieldModel`
and a :class:`~rfcheck.model.Chamber` (axis along z from z_start to z_end, radius R).
Points are given in cylindrical coordinates (r, phi, z).

Conventions
-----------
* On-axis profile: signed B_z and |B| on a dense grid of the chamber length; crossings,
  gradients and axial extrema start from the grid and are refined on the field itself
  (the model's B_z on the axis, evaluated at the refined points): roots by safeguarded
  secant steps inside the bracketing grid cell, gradients by a central difference, extrema
  by successive parabolic steps inside the cell pair around the extreme node — not from
  grid nodes, and without an interpolant of the samples (nor the import of one).
* Injection side is the z_start side, extraction side the z_end side. B_inj (B_ext) is the
  largest on-axis |B| between z_start (z_end) and the on-axis minimum, inside the chamber.
* B_min is the smallest |B| in the plasma volume r <= R, z_start <= z <= z_end (a grid
  search refined by nested zooming); it may lie off axis.
* B_rad is the field of the multipole sources alone on the wall r = R at the axial position
  of B_min, largest over azimuth: the radial field of the published minimum-B ratios. The
  azimuth search resolves the segmentation ripple of a segmented multipole (GeometryGrid
  .pitch_azimuths samples per segment pitch, then refinement); for an array of M annular
  segments the 2-D bore field holds the harmonics N + jM (N = poles/2, j >= 0), so |B| of
  the array alone repeats every 2 pi / M and peaks at the joints between segments. Without
  a multipole B_rad is 0. The total |B| at the same place (largest over azimuth, with the
  solenoids' field) is reported beside it as the wall total.
* The last closed |B| surface is the smallest |B| on the chamber boundary (the wall and
  both end planes): every |B| surface below it closes inside the chamber.
* Mirror ratio: min(B_inj, B_ext) / (on-axis minimum of |B|): the weaker mirror governs.
* Resonance-zone width for a relative frequency tolerance delta (f +/- delta f): the
  resonance field spans B_res (1 +/- delta), so the zone half-width on the axis is
  B_res delta / |d|B|/dz| and the full width twice that (first order in delta).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from rfcheck.model import Chamber
from rfcheck.physics.constants import TWO_PI

__all__ = [
    "GeometryGrid", "FieldPoint", "AxisProfile", "Crossing", "WallField", "RZField",
    "TrapGeometry", "MinBRatios", "FieldUndefinedError",
    "axis_profile", "axis_profiles", "axial_extrema", "resonance_crossings", "wall_field",
    "multipole_field", "radial_wall_fields", "trap_geometry", "trap_geometries", "min_b_ratios",
    "rz_field",
]


class FieldUndefinedError(ValueError):
    """The field is NaN inside the chamber (measured data do not cover it)."""


#: points per free coordinate of each zoom level (odd: the best point is kept)
ZOOM_POINTS = 5


@dataclass(frozen=True)
class GeometryGrid:
    """Sampling of the chamber; searches refine from these grids by nested zooming."""

    axis_points: int = 801
    wall_z: int = 81
    azimuths: int = 36  # over 2 pi, for models that depend on azimuth
    pitch_azimuths: int = 8  # per segment pitch of a multipole, for the wall maxima (B_rad)
    volume_r: int = 9
    volume_z: int = 41
    volume_azimuths: int = 12
    end_r: int = 13
    zoom_levels: int = 8


@dataclass(frozen=True)
class FieldPoint:
    """|B| (T) at a point (r, phi, z) in m, rad, m; `where` names the part of the chamber."""

    b: float
    r: float
    phi: float
    z: float
    where: str = ""


@dataclass(frozen=True)
class AxisProfile:
    """On-axis field for one current scale: z (m), signed B_z (T) and |B| (T)."""

    z: np.ndarray
    b_z: np.ndarray
    b: np.ndarray
    scale: float
    #: B_z on the axis at any z (the field model's, at this scale); None: a cubic Hermite
    #: interpolant of the samples stands in for it
    exact: Callable[[np.ndarray], np.ndarray] | None = field(default=None, compare=False,
                                                             repr=False)

    def b_z_at(self, zq) -> np.ndarray:
        """Signed B_z (T) at axial positions zq (m)."""
        zq = np.asarray(zq, dtype=float)
        if self.exact is not None:
            return np.asarray(self.exact(zq), dtype=float)
        return _hermite(self.z, self.b_z, zq)


def _hermite(z, v, zq):
    """Cubic Hermite interpolation of samples v(z) with centred finite-difference slopes."""
    d = np.gradient(v, z)
    i = np.clip(np.searchsorted(z, zq) - 1, 0, len(z) - 2)
    h = z[i + 1] - z[i]
    t = (zq - z[i]) / h
    t2, t3 = t * t, t * t * t
    return ((2 * t3 - 3 * t2 + 1) * v[i] + (t3 - 2 * t2 + t) * h * d[i]
            + (-2 * t3 + 3 * t2) * v[i + 1] + (t3 - t2) * h * d[i + 1])


@dataclass(frozen=True)
class Crossing:
    """An on-axis crossing of |B| = b_res: position (m), gradient d|B|/dz (T/m, signed),
    zone half-width and full width (m) for the frequency tolerance."""

    z: float
    b: float
    gradient: float
    half_width: float
    width: float


@dataclass(frozen=True)
class WallField:
    """|B| (T) on the wall r = R: z (m), phi (rad), b shaped (len(z), len(phi))."""

    z: np.ndarray
    phi: np.ndarray
    b: np.ndarray
    scale: float


@dataclass(frozen=True)
class RZField:
    """|B| (T) in the r-z half plane at azimuth phi, b shaped (len(r), len(z)) (figures)."""

    r: np.ndarray
    z: np.ndarray
    b: np.ndarray
    phi: float
    scale: float


@dataclass(frozen=True)
class MinBRatios:
    """Field ratios of a minimum-B trap over B_ECR; `radial` is B_rad (the multipole field at
    the wall), `wall_total` the total |B| at the same place (shown beside it, not compared)."""

    injection: float
    extraction: float
    radial: float
    minimum: float
    wall_total: float


@dataclass(frozen=True)
class TrapGeometry:
    """The characteristic fields of one current scale (see the module conventions).

    `radial_wall` is B_rad, the multipole field alone at the wall (b = 0 without a
    multipole); `wall_total` the largest total |B| on the wall at the same axial position.
    """

    scale: float
    axis_min: FieldPoint
    injection_max: FieldPoint
    extraction_max: FieldPoint
    volume_min: FieldPoint
    radial_wall: FieldPoint
    last_closed: FieldPoint
    mirror_ratio: float
    wall_total: FieldPoint


# --------------------------------------------------------------------------- helpers


def _cartesian(r, phi, z) -> np.ndarray:
    r, phi, z = np.broadcast_arrays(r, phi, z)
    return np.stack([r * np.cos(phi), r * np.sin(phi), z], axis=-1)


def _defined(b: np.ndarray, what: str) -> np.ndarray:
    if np.isnan(b).any():
        raise FieldUndefinedError(
            f"the field is undefined (NaN) on the {what}; measured field data do not cover "
            "the chamber")
    return b


def _scales(scales) -> np.ndarray:
    s = np.atleast_1d(np.asarray(scales, dtype=float))
    if s.ndim != 1:
        raise ValueError("scales must be a scalar or a 1-D array")
    return s


def _zoom(model, scales, start, step, lower, upper, periodic, levels, maximise=False,
          field=None):
    """Nested-grid refinement of min (or max) |B| over cylindrical coordinates.

    `start` (S, 3) holds (r, phi, z) per scale; `step` (3,) the initial half-window; a
    zero step freezes a coordinate. Each level evaluates a 5-point grid per free
    coordinate within +/- step around the best point, then halves the step. `field`
    (points (S, K, 3) -> B (S, K, 3)) replaces the model's total field at each scale.
    """
    return _zoom_together(model, scales, [(start, step)], lower, upper, periodic, levels,
                          maximise, field)[0]


def _zoom_together(model, scales, searches, lower, upper, periodic, levels, maximise=False,
                   field=None):
    """:func:`_zoom` of several independent searches [(start, step), ...] in lockstep: the
    candidates of all searches at one level go to the field model in one call (fewer,
    larger evaluations; each search picks from its own candidates, as alone)."""
    if field is None:
        field = lambda p: model.field_per_scale(p, scales)  # noqa: E731
    units, xs, steps, counts = [], [], [], []
    for start, step in searches:
        free = np.nonzero(step > 0)[0]
        axes = np.meshgrid(*([np.linspace(-1.0, 1.0, ZOOM_POINTS)] * len(free)), indexing="ij")
        unit = np.zeros((axes[0].size if len(free) else 1, 3))
        for k, i in enumerate(free):
            unit[:, i] = axes[k].ravel()
        units.append(unit)
        xs.append(np.array(start, dtype=float))
        steps.append(np.array(step, dtype=float))
        counts.append(levels if len(free) else 1)
    values = [None] * len(searches)
    bounded = ~periodic
    for level in range(max(counts)):
        active = [i for i in range(len(searches)) if level < counts[i]]
        cands = []
        for i in active:
            cand = xs[i][:, None, :] + units[i][None] * steps[i]
            cand[..., bounded] = np.clip(cand[..., bounded], lower[bounded], upper[bounded])
            cands.append(cand)
        joined = np.concatenate(cands, axis=1)
        b_all = np.linalg.norm(field(_cartesian(joined[..., 0], joined[..., 1],
                                                joined[..., 2])), axis=-1)
        b_all = _defined(b_all, "chamber")
        edges = np.cumsum([0] + [c.shape[1] for c in cands])
        for i, cand, lo, hi in zip(active, cands, edges[:-1], edges[1:]):
            b = b_all[:, lo:hi]
            rows = np.arange(len(cand))
            best = _pick(b, maximise)
            xs[i] = cand[rows, best]
            values[i] = b[rows, best]
            steps[i] = steps[i] / 2.0
    return [(x, v) for x, v in zip(xs, values)]


def _pick(b, maximise: bool, rtol: float = 1e-9):
    """Index of the best value along the last axis, the first of those within rtol of it.

    Symmetric sources give equal extrema at mirror azimuths; which one wins must not depend
    on float noise (or on the NumPy build), so near-ties go to the first sample."""
    b = np.asarray(b)
    ref = b.max(axis=-1, keepdims=True) if maximise else b.min(axis=-1, keepdims=True)
    return np.argmax(np.abs(b - ref) <= rtol * np.abs(ref), axis=-1)


def _point(x, b, where) -> FieldPoint:
    return FieldPoint(float(b), float(x[0]), float(x[1]) % (2 * np.pi) if x[0] > 0 else 0.0,
                      float(x[2]), where)


# --------------------------------------------------------------------------- on the axis


def axis_profiles(model, chamber: Chamber, scales, grid: GeometryGrid | None = None):
    """On-axis profiles over the chamber for each scale (one field evaluation for all)."""
    grid = grid or GeometryGrid()
    s = _scales(scales)
    z = np.linspace(chamber.z_start, chamber.z_end, grid.axis_points)
    points = _cartesian(0.0, 0.0, z)
    b_field = model.field(points, s)
    _defined(b_field, "axis")

    def exact(scale):
        return lambda zq: model.axis_field(np.asarray(zq, dtype=float), float(scale),
                                           cache=False)

    return tuple(AxisProfile(z, b_field[i, :, 2].copy(), np.linalg.norm(b_field[i], axis=-1),
                             float(s[i]), exact(s[i])) for i in range(len(s)))


def axis_profile(model, chamber: Chamber, scale: float = 1.0,
                 grid: GeometryGrid | None = None) -> AxisProfile:
    """On-axis profile (z, signed B_z, |B|) over the chamber at one current scale."""
    return axis_profiles(model, chamber, [scale], grid)[0]


#: iterations of the refinements on the field (each converges superlinearly from a grid
#: cell; the counts bound the work and are far above what the examples need)
SECANT_STEPS = 8
PARABOLA_STEPS = 12


def _extremum(profile: AxisProfile, lo, hi, maximise) -> FieldPoint:
    """Extremum of |B_z| within [lo, hi]: the extreme grid node, then successive parabolic
    steps on the field inside its neighbouring cells (kept when they improve on the node)."""
    z, b = profile.z, np.abs(profile.b_z)
    inside = (z >= lo) & (z <= hi)
    idx = np.nonzero(inside)[0]
    pick = idx[_pick(b[idx], maximise)]
    sign = -1.0 if maximise else 1.0
    a, c = z[max(pick - 1, idx[0])], z[min(pick + 1, idx[-1])]
    best_z, best_b = float(z[pick]), float(b[pick])
    if c > a:
        def f(t):
            return sign * np.abs(profile.b_z_at(np.atleast_1d(t)))
        x = np.array([a, best_z, c], dtype=float)
        fx = f(x)
        for _ in range(PARABOLA_STEPS):
            (x0, x1, x2), (f0, f1, f2) = x, fx
            den = (x1 - x0) * (f1 - f2) - (x1 - x2) * (f1 - f0)
            if den == 0 or not np.isfinite(den):
                break
            v = x1 - 0.5 * ((x1 - x0) ** 2 * (f1 - f2) - (x1 - x2) ** 2 * (f1 - f0)) / den
            if not (x0 < v < x2) or abs(v - x1) <= 1e-12 * (abs(x1) + (c - a)):
                break
            fv = float(f(v)[0])
            # keep the three points bracketing the smallest value
            pts = sorted(zip(np.append(x, v), np.append(fx, fv)))
            k = int(np.argmin([q[1] for q in pts]))
            k = min(max(k, 1), 2)
            x = np.array([q[0] for q in pts[k - 1:k + 2]])
            fx = np.array([q[1] for q in pts[k - 1:k + 2]])
        j = int(np.argmin(fx))
        if fx[j] < sign * best_b:
            best_z, best_b = float(x[j]), float(abs(fx[j]))
    return FieldPoint(float(best_b), 0.0, 0.0, float(best_z), "axis")


def axial_extrema(profile: AxisProfile) -> tuple[FieldPoint, FieldPoint, FieldPoint]:
    """(on-axis minimum, injection-side maximum, extraction-side maximum) of |B|."""
    z = profile.z
    low = _extremum(profile, z[0], z[-1], maximise=False)
    inj = _extremum(profile, z[0], low.z, maximise=True)
    ext = _extremum(profile, low.z, z[-1], maximise=True)
    return low, inj, ext


def _roots(profile: AxisProfile, target: float, lo: np.ndarray, hi: np.ndarray,
           f_lo: np.ndarray, f_hi: np.ndarray) -> np.ndarray:
    """Roots of B_z − target in the cells [lo, hi] (sign change), all cells at once:
    safeguarded secant (regula falsi with the Illinois weighting) on the field."""
    a, b, fa, fb = lo.copy(), hi.copy(), f_lo.copy(), f_hi.copy()
    x = b - fb * (b - a) / (fb - fa)
    side = np.zeros(a.shape)
    for _ in range(SECANT_STEPS):
        fx = profile.b_z_at(x) - target
        left = np.sign(fx) == np.sign(fa)
        done = (fx == 0) | (np.abs(b - a) <= 4 * np.finfo(float).eps * np.abs(x))
        a, fa = np.where(left, x, a), np.where(left, fx, fa)
        b, fb = np.where(left, b, x), np.where(left, fb, fx)
        # Illinois: halve the value kept twice in a row on the same side
        fb = np.where(left & (side > 0), 0.5 * fb, fb)
        fa = np.where(~left & (side < 0), 0.5 * fa, fa)
        side = np.where(left, 1.0, -1.0)
        x_new = b - fb * (b - a) / (fb - fa)
        x = np.where(done, x, np.clip(x_new, np.minimum(a, b), np.maximum(a, b)))
        if done.all():
            break
    return x


def resonance_crossings_many(profile: AxisProfile, b_res_values,
                             relative_tolerance: float = 0.0) -> list[tuple[Crossing, ...]]:
    """:func:`resonance_crossings` for several resonance fields on one profile, with one
    secant iteration for the cells of all of them (each cell's iterates are those it has
    alone, so the crossings are the same to the last bit) and one field evaluation for all
    the gradients."""
    z = profile.z
    h = 1e-6 * (z[-1] - z[0])
    b_res_values = [float(b) for b in b_res_values]
    owners, targets, exact_roots = [], [], []
    lo, hi, f_lo, f_hi, cell_target, cell_owner = [], [], [], [], [], []
    for k, b_res in enumerate(b_res_values):
        for target in (b_res, -b_res):
            f = profile.b_z - target
            for r in z[np.nonzero(f == 0.0)[0]]:
                exact_roots.append((k, target, float(r)))
            br = np.nonzero(f[:-1] * f[1:] < 0)[0]
            lo.append(z[br])
            hi.append(z[br + 1])
            f_lo.append(f[br])
            f_hi.append(f[br + 1])
            cell_target.append(np.full(br.size, target))
            cell_owner.append(np.full(br.size, k))
    lo, hi = np.concatenate(lo), np.concatenate(hi)
    cell_target, cell_owner = np.concatenate(cell_target), np.concatenate(cell_owner)
    roots = (_roots(profile, cell_target, lo, hi, np.concatenate(f_lo), np.concatenate(f_hi))
             if lo.size else np.zeros(0))
    # per resonance field and sign: exact nodes first, then the cells' roots, as alone
    per: list[list[tuple[float, float]]] = [[] for _ in b_res_values]
    order: list[tuple[int, float, float]] = []
    for k, b_res in enumerate(b_res_values):
        for target in (b_res, -b_res):
            order += [(k, target, r) for kk, t, r in exact_roots if kk == k and t == target]
            sel = (cell_owner == k) & (cell_target == target)
            order += [(k, target, float(r)) for r in roots[sel]]
    if order:
        r = np.array([o[2] for o in order])
        fd = profile.b_z_at(np.concatenate([r + h, r - h]))
        grads = (fd[:r.size] - fd[r.size:]) / (2 * h)
        for (k, target, root), g in zip(order, grads):
            per[k].append((root, float(np.sign(target) * g)))
    out = []
    for k, b_res in enumerate(b_res_values):
        crossings = []
        for root, grad in sorted(per[k]):
            half = b_res * relative_tolerance / abs(grad) if grad != 0 else np.inf
            crossings.append(Crossing(float(root), float(b_res), float(grad), float(half),
                                      float(2.0 * half)))
        out.append(tuple(crossings))
    return out


def resonance_crossings(profile: AxisProfile, b_res: float,
                        relative_tolerance: float = 0.0) -> tuple[Crossing, ...]:
    """Where |B| = b_res on the axis, with d|B|/dz and the zone width there.

    Roots of B_z(z) = +b_res and B_z(z) = -b_res on the field itself, bracketed by the
    profile nodes (:func:`_roots`); d|B|/dz by a central difference of the field at each
    root (step 1e-6 of the chamber length). Zone half-width b_res * relative_tolerance /
    |d|B|/dz| (infinite where the gradient vanishes).
    """
    z = profile.z
    h = 1e-6 * (z[-1] - z[0])
    found = []
    for target in (b_res, -b_res):
        f = profile.b_z - target
        exact = np.nonzero(f == 0.0)[0]
        br = np.nonzero(f[:-1] * f[1:] < 0)[0]
        roots = list(z[exact])
        if br.size:
            roots += list(_roots(profile, target, z[br], z[br + 1], f[br], f[br + 1]))
        if roots:
            r = np.asarray(roots, dtype=float)
            fd = profile.b_z_at(np.concatenate([r + h, r - h]))
            grads = (fd[:r.size] - fd[r.size:]) / (2 * h)
            found += [(float(root), float(np.sign(target) * g)) for root, g in zip(r, grads)]
    crossings = []
    for root, grad in sorted(found):
        half = b_res * relative_tolerance / abs(grad) if grad != 0 else np.inf
        crossings.append(Crossing(float(root), float(b_res), float(grad), float(half),
                                  float(2.0 * half)))
    return tuple(crossings)


# --------------------------------------------------------------------------- wall, volume


def _azimuths(model, n: int) -> np.ndarray:
    """Azimuths for sweeps: one for axisymmetric models, else n per full turn spread over one
    symmetry period of |B| (FieldModel.azimuthal_period), at least 6."""
    if model.axisymmetric:
        return np.array([0.0])
    period = getattr(model, "azimuthal_period", 2 * np.pi)
    count = max(6, int(np.ceil(n * period / (2 * np.pi))))
    return np.linspace(0, period, count, endpoint=False)


def _pitch_azimuths(model, grid: GeometryGrid) -> np.ndarray:
    """Azimuths over one symmetry period of |B| that resolve the segment pitch 2 pi / M of
    every multipole (grid.pitch_azimuths per pitch) and keep at least the sweep's density."""
    if model.axisymmetric:
        return np.array([0.0])
    period = getattr(model, "azimuthal_period", 2 * np.pi)
    pitch = min((TWO_PI / s.mp.segments for s in _multipole_sources(model)), default=TWO_PI)
    count = max(6, int(np.ceil(grid.azimuths * period / TWO_PI)),
                int(np.ceil(grid.pitch_azimuths * period / pitch - 1e-9)))
    return np.linspace(0, period, count, endpoint=False)


def _multipole_sources(model) -> list:
    """The field model's sources that depend on azimuth (the multipoles)."""
    return [s for s in model.sources if not s.axisymmetric]


def multipole_field(model, points) -> np.ndarray:
    """B (T) of the multipole sources alone at Cartesian points (..., 3) in m.

    Permanent magnets: independent of the current scale. Zero for a model without a
    multipole.
    """
    p = np.asarray(points, dtype=float)
    flat = np.ascontiguousarray(p.reshape(-1, 3))
    out = np.zeros_like(flat)
    for src in _multipole_sources(model):
        out += src.field(flat)
    return out.reshape(p.shape)


def radial_wall_fields(model, chamber: Chamber, z, grid: GeometryGrid | None = None,
                       scales=None) -> tuple[tuple[FieldPoint, ...], tuple[FieldPoint, ...]]:
    """B_rad and the total |B| on the wall r = R at axial positions z, largest over azimuth.

    B_rad is the magnitude of the multipole field alone (:func:`multipole_field`); the total
    is the field of all sources at the current scale paired with each z (`scales`, default
    1). Both maxima start from azimuths that resolve the segment pitch of every multipole
    (``grid.pitch_azimuths`` per pitch 2 pi / M, over one symmetry period of |B|) and are
    refined by nested zooming to ~1e-3 of the sampling step, so the segmentation ripple of
    |B| (harmonics N + jM of an M-segment array, peaks at the joints between segments) is
    resolved. Without a multipole B_rad is 0 (at azimuth 0).

    Returns
    -------
    (radial, total) : tuples of FieldPoint, one per z, where = "wall".
    """
    grid = grid or GeometryGrid()
    z = np.atleast_1d(np.asarray(z, dtype=float))
    s = np.ones(len(z)) if scales is None else _scales(scales)
    if len(s) != len(z):
        raise ValueError("scales must pair one to one with z")
    radius = chamber.radius
    lower = np.array([0.0, -np.inf, chamber.z_start])
    upper = np.array([radius, np.inf, chamber.z_end])
    periodic = np.array([False, True, False])
    phi = _pitch_azimuths(model, grid)
    step = np.array([0.0, _spacing(phi), 0.0])
    points = _cartesian(radius, phi[None, :], z[:, None])

    def best(field):
        b = _defined(np.linalg.norm(field(points), axis=-1), "wall")
        start = np.stack([np.full(len(z), radius), phi[_pick(b, True)], z], axis=-1)
        if len(phi) == 1:
            return start, b[:, 0]
        return _zoom(model, s, start, step, lower, upper, periodic, grid.zoom_levels,
                     maximise=True, field=field)

    def wall(x, v):
        return tuple(FieldPoint(float(v[i]), radius, float(x[i, 1]) % TWO_PI, float(x[i, 2]),
                                "wall") for i in range(len(z)))

    x_t, b_t = best(lambda p: model.field_per_scale(p, s))
    if _multipole_sources(model):
        x_r, b_r = best(lambda p: multipole_field(model, p))
    else:
        x_r = np.stack([np.full(len(z), radius), np.zeros(len(z)), z], axis=-1)
        b_r = np.zeros(len(z))
    return wall(x_r, b_r), wall(x_t, b_t)


def wall_field(model, chamber: Chamber, scale: float = 1.0,
               grid: GeometryGrid | None = None) -> WallField:
    """|B| on the wall r = R over a z x azimuth grid (one azimuth for axisymmetric models)."""
    grid = grid or GeometryGrid()
    z = np.linspace(chamber.z_start, chamber.z_end, grid.wall_z)
    phi = _azimuths(model, grid.azimuths)
    zz, pp = np.meshgrid(z, phi, indexing="ij")
    b = _defined(model.magnitude(_cartesian(chamber.radius, pp, zz), scale), "wall")
    return WallField(z, phi, b, float(scale))


def rz_field(model, chamber: Chamber, scale: float = 1.0, phi: float = 0.0,
             n_r: int = 41, n_z: int = 161) -> RZField:
    """|B| over the r-z half plane at azimuth phi (for figures)."""
    r = np.linspace(0.0, chamber.radius, n_r)
    z = np.linspace(chamber.z_start, chamber.z_end, n_z)
    rr, zz = np.meshgrid(r, z, indexing="ij")
    b = model.magnitude(_cartesian(rr, phi, zz), scale)
    return RZField(r, z, b, float(phi), float(scale))


def _grid_best(model, s, r, phi, z, maximise=False):
    """Best |B| per scale over a (r, phi, z) tensor grid: (S, 3) coordinates and values."""
    rr, pp, zz = np.meshgrid(r, phi, z, indexing="ij")
    b = _defined(model.magnitude(_cartesian(rr, pp, zz), s), "chamber").reshape(len(s), -1)
    idx = _pick(b, maximise)
    coords = np.stack([rr.ravel(), pp.ravel(), zz.ravel()], axis=-1)
    return coords[idx], b[np.arange(len(s)), idx]


def _spacing(values: np.ndarray) -> float:
    return float(values[1] - values[0]) if len(values) > 1 else 0.0


def trap_geometries(model, chamber: Chamber, scales,
                    grid: GeometryGrid | None = None) -> tuple[TrapGeometry, ...]:
    """Trap geometry for each current scale; grids are evaluated once for all scales."""
    grid = grid or GeometryGrid()
    s = _scales(scales)
    lower = np.array([0.0, -np.inf, chamber.z_start])
    upper = np.array([chamber.radius, np.inf, chamber.z_end])
    periodic = np.array([False, True, False])
    levels = grid.zoom_levels

    # volume minimum
    r = np.linspace(0.0, chamber.radius, grid.volume_r)
    phi = _azimuths(model, grid.volume_azimuths)
    z = np.linspace(chamber.z_start, chamber.z_end, grid.volume_z)
    start, _ = _grid_best(model, s, r, phi, z)
    step = np.array([_spacing(r), _spacing(phi), _spacing(z)])
    searches = [(start, step)]

    # last closed surface: smallest |B| on the wall and on both end planes
    phi_w = _azimuths(model, grid.azimuths)
    z_w = np.linspace(chamber.z_start, chamber.z_end, grid.wall_z)
    r_e = np.linspace(0.0, chamber.radius, grid.end_r)
    pieces = [("wall", [chamber.radius], z_w, np.array([0.0, _spacing(phi_w), _spacing(z_w)])),
              ("injection end", r_e, [chamber.z_start],
               np.array([_spacing(r_e), _spacing(phi_w), 0.0])),
              ("extraction end", r_e, [chamber.z_end],
               np.array([_spacing(r_e), _spacing(phi_w), 0.0]))]
    for where, rr, zz, step in pieces:
        start, _ = _grid_best(model, s, np.asarray(rr), phi_w, np.asarray(zz))
        searches.append((start, step))
    # the volume minimum and the three surface minima are independent: zoom them together
    found = _zoom_together(model, s, searches, lower, upper, periodic, levels)
    vmin, vmin_b = found[0]
    closed = [(where,) + f for (where, *_), f in zip(pieces, found[1:])]

    # B_rad (multipole alone) and the total |B|: max over azimuth on the wall at z of B_min
    radial, total = radial_wall_fields(model, chamber, vmin[:, 2], grid, s)

    results = []
    for i, profile in enumerate(axis_profiles(model, chamber, s, grid)):
        low, inj, ext = axial_extrema(profile)
        where, x, b = min(((w, x[i], b[i]) for w, x, b in closed), key=lambda t: t[2])
        results.append(TrapGeometry(
            scale=float(s[i]), axis_min=low, injection_max=inj, extraction_max=ext,
            volume_min=_point(vmin[i], vmin_b[i], "volume"),
            radial_wall=radial[i], last_closed=_point(x, b, where),
            mirror_ratio=min(inj.b, ext.b) / low.b if low.b > 0 else np.inf,
            wall_total=total[i]))
    return tuple(results)


def trap_geometry(model, chamber: Chamber, scale: float = 1.0,
                  grid: GeometryGrid | None = None) -> TrapGeometry:
    """Trap geometry (extrema, B_rad, wall total, last closed |B|, mirror ratio) at one scale."""
    return trap_geometries(model, chamber, [scale], grid)[0]


def min_b_ratios(trap: TrapGeometry, b_ecr: float) -> MinBRatios:
    """B_inj/B_ECR, B_ext/B_ECR, B_rad/B_ECR and B_min/B_ECR of a minimum-B trap, and the
    total |B| at the wall over B_ECR beside B_rad.

    The semi-empirical ranges these are compared with (B_inj ~ 3-4, B_rad >= 2, B_ext ~ 2,
    B_min ~ 0.8 times B_ECR) are published by D. Hitz et al., Rev. Sci.
    Instrum. 73 (2002) 509 and V. Mironov et al., arXiv:2012.08776 (2020); the rules apply them.
    Their B_rad is the radial (multipole) field at the chamber wall, which is what
    ``trap.radial_wall`` holds.
    """
    return MinBRatios(trap.injection_max.b / b_ecr, trap.extraction_max.b / b_ecr,
                      trap.radial_wall.b / b_ecr, trap.volume_min.b / b_ecr,
                      trap.wall_total.b / b_ecr)
