"""Cold-plasma geometric-optics rays in 3-D (Hamiltonian ray tracing).

A ray of the labelled branch ``mode`` ("R", "L", "O", "X", as in
:func:`rfcheck.physics.coldplasma.n2_branch`) at frequency f follows

    dr/dτ = ∂H/∂N,      dN/dτ = −∂H/∂r,      ds/dτ = |∂H/∂N|,

with H(r, N) = N·N − n²(f, |B(r)|, n_e(r), θ(N, B(r))), N = c k / ω the refractive-index
vector, θ the angle between N and B, τ the Hamiltonian ray parameter and s the arc length along
the ray (m). This is dr/dt = ∂D/∂k, dk/dt = −∂D/∂r (Stix 1992, ch. 4; Swanson 2003, ch. 5;
Bellan 2006, ch. 5) with the parameter rescaled by ω/c; integrating in τ rather than in s keeps
the equations smooth through a turning point at normal incidence, where |∂H/∂N| → 0.
H = 0 is the dispersion relation; the integrator holds it to its tolerance and the largest
|H| / max(1, N·N) met along the ray is returned (``residual``) so a caller can see how well
it held.

Derivatives: ∂H/∂N and ∂H/∂r by central differences (n² is a closed form of the dispersion
core, smooth away from cutoffs and resonances); one call of ``b_field`` and of ``density`` per
right-hand side evaluation, on the 7 points r, r ± h e_i.

Power: with a collision frequency ν, the remaining power fraction P obeys, in the ray
parameter,

    d ln P/dτ = −2 k0 Im n²_ν · |N̂·∂H/∂N| / (2|N|) = −2 k0 Im n²_ν,     k0 = ω/c,

n²_ν the same branch with ω → ω + iν, evaluated at the ray's own real N (weak damping: the
correction iN_i that keeps H = 0 has N_i·∂H/∂N = Im n²_ν, and P falls as exp(−2 k0 ∫ N_i·dr)
with dr = ∂H/∂N dτ; in arc length Im N ≈ Im n²_ν/(2|N|) along ds = |∂H/∂N| dτ; Stix 1992
ch. 4, Bornatici et al., Nucl. Fusion 23 (1983) 1153, from memory). It is 2 k0 Im H_ν with
H_ν = N·N − n²_ν; |Im n²_ν| is taken (≥ 0 for a passive medium with ω → ω + iν: power
never grows along a ray). The factor |N̂·∂H/∂N|/(2|N|) is 1 identically, since n² depends
on the direction of N only (Euler: N·∂n²/∂N = 0), and is taken as 1 rather than from the
central differences, which lose it where |N| is as small as their step. The rate is finite where
N → 0 at a turning point and linear in ν; it agrees with 2 k0 Im√n²_ν along the ray to
O((ν/ω)²) where Re n² is not small, and unlike that root it does not grow as √(Im n²_ν)
where Re n² → 0 (or turns slightly negative after a step past a turning point).

Where the ray ends (``stop``):

* ``"max_length"``: the arc length reached ``max_length``;
* ``"wall"``: ``inside(r)`` (positive inside the plasma vessel) fell to zero;
* ``"resonance"``: |N| reached ``n_max`` (a cyclotron or hybrid resonance: the wavelength
  shrinks to zero and geometric optics ends there; the power still carried is deposited at
  the resonance by a kinetic process the cold ray does not describe);
* ``"absorbed"``: the remaining power fell below ``power_floor``;
* ``"returned"``: the ray came back through the launch plane (the plane through ``start``
  normal to ``direction``): a reflection out of the plasma;
* ``"evanescent_start"``: the branch does not propagate at the start point (n² ≤ 0);
* ``"cyclotron_layer"`` (bundles, when asked): |B| reached the edge of a cyclotron layer;
* ``"step_failure"``: the integrator could not continue (reported, never hidden).

Validity: ``go_parameter`` holds 1/(k L) along the path, L = n²/|∇n²| the scale length of the
refractive index; geometric optics needs it small (≲ 0.1; it grows without bound at a cutoff,
where the full-wave solution of :mod:`rfcheck.physics.fullwave` applies on the axis).

References
----------
T.H. Stix, *Waves in Plasmas* (AIP, 1992), ch. 4 (rays and energy flow).
D.G. Swanson, *Plasma Waves*, 2nd ed. (IOP, 2003), ch. 5 (ray tracing).
P.M. Bellan, *Fundamentals of Plasma Physics* (CUP, 2006), ch. 5 (WKB, rays).
V.L. Ginzburg, *The Propagation of Electromagnetic Waves in Plasmas* (Pergamon, 1970), the
ray in a linear layer (turning point and displacement; checked in the tests).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from rfcheck.physics.aperture_pattern import aperture_rays
from rfcheck.physics.coldplasma import n2_branch
from rfcheck.physics.constants import C as C_LIGHT
from rfcheck.physics.domain import check_index, guard_public

__all__ = ["Ray", "Beam", "GridField", "trace_ray", "trace_rays", "trace_beam", "beam_samples",
           "aperture_rays", "STOPS"]

#: every reason a ray can end (see the module docstring)
STOPS = ("max_length", "wall", "resonance", "absorbed", "returned", "evanescent_start",
         "cyclotron_layer", "step_failure")

_OFFSETS = np.vstack([np.zeros(3), np.eye(3), -np.eye(3)])  # r, r + h e_i, r − h e_i


@dataclass(frozen=True)
class Ray:
    """One traced ray; arrays have one row per output point along the arc length ``s``."""

    s: np.ndarray                  # (M,) arc length, m
    path: np.ndarray               # (M, 3) positions, m
    refractive_index: np.ndarray   # (M, 3) N vectors
    power: np.ndarray              # (M,) remaining power fraction
    go_parameter: np.ndarray       # (M,) 1/(k L): geometric optics needs it small
    stop: str                      # why the ray ended (one of STOPS)
    residual: float                # largest |N·N − n²| / max(1, N·N) met along the ray
    mode: str
    frequency: float

    @property
    def end(self) -> np.ndarray:
        return self.path[-1]


def _unit(v: np.ndarray) -> np.ndarray:
    norm = float(np.linalg.norm(v))
    if not norm > 0 or not math.isfinite(norm):
        raise ValueError("direction must be a non-zero finite 3-vector")
    return v / norm


def _common_arguments(frequency, max_length, mode, max_evaluations) -> tuple[float, str]:
    """The checked frequency (Hz) and branch name shared by every tracer."""
    f = float(frequency)
    if not (math.isfinite(f) and f > 0):
        raise ValueError("frequency must be a positive finite number (Hz)")
    if not (math.isfinite(max_length) and max_length > 0):
        raise ValueError("max_length must be a positive finite length (m)")
    key = str(mode).upper()
    if key not in ("R", "L", "O", "X"):
        raise ValueError(f"mode must be one of 'R', 'L', 'O', 'X', got {mode!r}")
    check_index("max_evaluations", max_evaluations, 1, 10_000_000)
    return f, key


def _medium(b_field, density, grouped: bool = False):
    """(field vectors, non-negative densities) of the user's callables at (N, 3) points
    (with `grouped`, called as ``medium(points, group)`` and passing the group on)."""
    def medium(points, *group):
        b = np.asarray(b_field(points, *group), dtype=float).reshape(-1, 3)
        n = np.asarray(density(points, *group), dtype=float).reshape(-1)
        return b, np.maximum(n, 0.0)

    return medium


def _branch(f: float, key: str, ions):
    """n²(field vectors, densities, N vectors[, ν]) of one labelled branch (broadcast rows);
    θ from N·B, taken as 0 where B or N vanishes."""
    def n2(bvec, n_e, nvec, nu_=0.0):
        bmag = np.linalg.norm(bvec, axis=-1)
        nmag = np.linalg.norm(nvec, axis=-1)
        with np.errstate(invalid="ignore", divide="ignore"):
            cos = np.einsum("...i,...i->...", bvec, nvec) / (bmag * nmag)
        cos = np.where(np.isfinite(cos), np.clip(np.abs(cos), 0.0, 1.0), 1.0)
        return n2_branch(f, bmag, n_e, np.arccos(cos), key, ions, nu_)

    return n2


def _diagnostics(n2, medium, path, nvecs, omega_c: float, h: float) -> tuple[float, np.ndarray]:
    """(residual, go_parameter) along one path (see :func:`_diagnostics_rows`)."""
    res, go = _diagnostics_rows(n2, medium, path, nvecs, omega_c, h)
    return float(res.max()), go


def _diagnostics_rows(n2, medium, path, nvecs, omega_c: float, h: float):
    """(residual, go_parameter) along a path: the largest |N·N − n²| / max(1, N·N) and
    1/(k L) with L = n²/|∇n²| (one medium call on 7 points per path point)."""
    pts = (path[:, None, :] + h * _OFFSETS[None, :, :]).reshape(-1, 3)
    b, n_e = medium(pts)
    rows = np.repeat(nvecs, 7, axis=0)
    v = np.real(np.asarray(n2(b, n_e, rows))).reshape(-1, 7)
    nn = np.einsum("ij,ij->i", nvecs, nvecs)
    residual = np.abs(nn - v[:, 0]) / np.maximum(1.0, nn)
    grad = np.linalg.norm((v[:, 1:4] - v[:, 4:7]) / (2.0 * h), axis=1)
    k = omega_c * np.sqrt(np.maximum(v[:, 0], 1e-300))
    with np.errstate(divide="ignore", invalid="ignore"):
        go = np.where(grad > 0, grad / (k * np.abs(v[:, 0])), 0.0)
    return residual, np.where(np.isfinite(go), go, np.inf)


class GridField:
    """A vector function sampled once on a regular 3-D grid and read back by cubic splines.

    ``GridField(values, low, high, spacing)`` evaluates ``values(points) -> (N, C)`` once on
    the grid of the box ``low``–``high`` (m, 3-vectors), extended by ``pad`` cells on every
    side so that the spline's end conditions fall outside the box, with cells of at most
    ``spacing`` (m; one length or one per axis); calling it on (N, 3) points gives the (N, C)
    values of the cubic B-spline interpolant (scipy.ndimage, coefficients computed once).
    Outside the extended grid the nearest edge value is used. With ``radius``, a node farther
    than that from the z axis takes the value at its radial projection onto that cylinder
    (for a field whose sources sit just outside the region of use).

    What for: a ray bundle calls its field 6 times per step on 7 points per ray; a magnet
    model of many source elements (a segmented multipole) costs about 20 µs per point and
    a few ms per call, the spline a few µs per call and point. The interpolation error of a
    cubic spline falls as (spacing / L)^4 with L the field's scale length: checked against a
    dipole's closed-form field in the tests; for the grid of :mod:`rfcheck.analysis.rays` on the
    minimum-B example see DEVELOPERS.md "Rays" (1e-4 near the axis, a few % at the wall near
    the ends of the segmented hexapole).
    """

    def __init__(self, values: Callable[[np.ndarray], np.ndarray], low, high,
                 spacing: float, *, pad: int = 3, max_points: int = 400_000,
                 radius: float | None = None):
        from scipy.ndimage import spline_filter

        lo = np.asarray(low, dtype=float).reshape(3)
        hi = np.asarray(high, dtype=float).reshape(3)
        h = np.broadcast_to(np.asarray(spacing, dtype=float), (3,))
        if not (np.all(np.isfinite(lo)) and np.all(np.isfinite(hi)) and np.all(hi > lo)):
            raise ValueError("the grid box needs finite corners with high > low")
        if not (np.all(np.isfinite(h)) and np.all(h > 0)):
            raise ValueError("spacing must be a positive finite length (m), or three")
        check_index("pad", pad, 2, 20)
        cells = np.maximum(np.ceil((hi - lo) / h), 1).astype(int)
        self.step = (hi - lo) / cells
        self.low = lo - pad * self.step
        shape = tuple(int(c) + 1 + 2 * pad for c in cells)
        if math.prod(shape) > max_points:
            raise ValueError(f"the grid would hold {math.prod(shape)} points, above "
                             f"max_points = {max_points}: give a coarser spacing")
        self.shape = shape
        axes = [self.low[i] + self.step[i] * np.arange(shape[i]) for i in range(3)]
        pts = np.stack(np.meshgrid(*axes, indexing="ij"), axis=-1).reshape(-1, 3)
        if radius is not None:
            # sample only within `radius` of the z axis: a node beyond it takes the value at
            # its radial projection onto that cylinder (a field source may sit just outside)
            rho = np.hypot(pts[:, 0], pts[:, 1])
            out = rho > radius
            pts[out, :2] *= (radius / rho[out])[:, None]
        vals = np.asarray(values(pts), dtype=float).reshape(len(pts), -1)
        if not np.all(np.isfinite(vals)):
            raise ValueError("the sampled function is not finite everywhere on the grid")
        self.components = vals.shape[1]
        self.points = len(pts)
        self._coef = [spline_filter(vals[:, c].reshape(shape), order=3, mode="nearest")
                      for c in range(self.components)]

    def combined(self, weights) -> "GridField":
        """The grid of the linear combinations ``values @ weights.T`` ((M, C) weights: M new
        components), without sampling again: the spline coefficients are linear in the
        sampled values, so combining them gives the interpolant of the combined values
        (to rounding). One call then interpolates M components instead of C."""
        w = np.asarray(weights, dtype=float)
        if w.ndim != 2 or w.shape[1] != self.components or not np.all(np.isfinite(w)):
            raise ValueError(f"weights must be a finite (M, {self.components}) array")
        out = object.__new__(GridField)
        out.step, out.low, out.shape, out.points = self.step, self.low, self.shape, self.points
        out.components = w.shape[0]
        out._coef = [sum(wi * c for wi, c in zip(row, self._coef) if wi != 0.0)
                     + np.zeros(self.shape) for row in w]
        return out

    def __call__(self, points) -> np.ndarray:
        from scipy.ndimage import map_coordinates

        p = np.asarray(points, dtype=float).reshape(-1, 3)
        idx = ((p - self.low) / self.step).T
        return np.stack([map_coordinates(c, idx, order=3, mode="nearest", prefilter=False)
                         for c in self._coef], axis=-1)


def trace_ray(frequency: float, start, direction, mode: str,
              b_field: Callable[[np.ndarray], np.ndarray],
              density: Callable[[np.ndarray], np.ndarray], *,
              max_length: float, ions=(), collision_frequency: float = 0.0,
              inside: Callable[[np.ndarray], np.ndarray] | None = None,
              n_max: float = 100.0, power_floor: float = 1e-4, rtol: float = 1e-9,
              max_step: float | None = None, max_evaluations: int = 200_000,
              h_position: float = 1e-6, h_index: float = 1e-7) -> Ray:
    """Trace one cold-plasma ray of branch `mode` from `start` along `direction`.

    Parameters
    ----------
    frequency : float
        Wave frequency, Hz.
    start, direction : array_like, shape (3,)
        Launch point (m) and direction of the wave vector there (any length).
    mode : {"R", "L", "O", "X"}
        The branch traced (labels of :func:`rfcheck.physics.coldplasma.n2_branch`).
    b_field : callable
        ``b_field(points)`` → (N, 3) magnetic field in T at (N, 3) positions in m.
    density : callable
        ``density(points)`` → (N,) electron density in m^-3.
    max_length : float
        Longest arc length traced, m.
    ions, collision_frequency
        As for :func:`rfcheck.physics.coldplasma.stix` (ν in s^-1, a number).
    inside : callable, optional
        ``inside(points)`` → (N,) positive inside the vessel, zero on its wall.
    n_max : float
        |N| at which the ray is said to have reached a resonance.
    power_floor : float
        Remaining power fraction at which the ray is said to be absorbed.
    rtol : float
        Relative tolerance of the integrator (scipy's DOP853).
    max_step : float, optional
        Largest integration step, m (default max_length / 50).
    max_evaluations : int
        Bound on right-hand-side evaluations (the work of one ray).
    h_position, h_index : float
        Central-difference steps in position (m) and in N (relative).
    """
    from scipy.integrate import solve_ivp

    f, key = _common_arguments(frequency, max_length, mode, max_evaluations)
    r0 = np.asarray(start, dtype=float).reshape(3)
    if not np.all(np.isfinite(r0)):
        raise ValueError("start must be a finite 3-vector (m)")
    d0 = _unit(np.asarray(direction, dtype=float).reshape(3))
    omega_c = 2.0 * math.pi * f / C_LIGHT
    nu = float(collision_frequency)
    lossy = nu > 0.0

    medium = _medium(b_field, density)
    n2 = _branch(f, key, ions)

    evaluations = [0]

    def gradients(r, nvec):
        """H and its gradients at one point (7 medium points, 7 + 6 branch evaluations)."""
        evaluations[0] += 1
        pts = r + h_position * _OFFSETS
        b, n_e = medium(pts)
        hn = h_index * max(float(np.linalg.norm(nvec)), 1.0)
        nrows = np.vstack([np.repeat(nvec[None, :], 7, axis=0),
                           nvec + hn * np.eye(3), nvec - hn * np.eye(3)])
        brows = np.vstack([b, np.repeat(b[:1], 6, axis=0)])
        erows = np.concatenate([n_e, np.repeat(n_e[:1], 6)])
        n2v = np.real(n2(brows, erows, nrows))
        h0 = float(nvec @ nvec - n2v[0])
        dn2_dr = (n2v[1:4] - n2v[4:7]) / (2.0 * h_position)
        dn2_dn = (n2v[7:10] - n2v[10:13]) / (2.0 * hn)
        dh_dr = -dn2_dr
        dh_dn = 2.0 * nvec - dn2_dn
        return h0, dh_dr, dh_dn, n2v[0], dn2_dr, b[0], n_e[0]

    def rhs(tau, y):
        # in the Hamiltonian parameter τ (smooth through a turning point, where |∂H/∂N| → 0);
        # the arc length s is carried as y[7]
        r, nvec = y[:3], y[3:6]
        h0, dh_dr, dh_dn, n2_here, _, b0, ne0 = gradients(r, nvec)
        speed = float(np.linalg.norm(dh_dn))
        if not math.isfinite(speed) or not np.all(np.isfinite(dh_dr)):
            raise _Singular
        dlnp = 0.0
        if lossy and speed > 0:
            n2c = complex(np.asarray(n2(b0[None, :], np.array([ne0]), nvec[None, :], nu)
                                     ).reshape(-1)[0])
            # weak damping in τ at the ray's own real N (module docstring, "Power"):
            # d ln P/dτ = −2 k0 Im n²_ν, finite at a turning point and linear in ν
            dlnp = -2.0 * omega_c * abs(n2c.imag)
        return np.concatenate([dh_dn, -dh_dr, [dlnp, speed]])

    # the wave vector at the start: on the branch's dispersion surface
    b_start, ne_start = medium(r0[None, :])
    n2_start = float(np.real(n2(b_start, ne_start, d0[None, :])).reshape(-1)[0])
    if not (n2_start > 0 and math.isfinite(n2_start)):
        nvec0 = d0 * 0.0
        return Ray(np.array([0.0]), r0[None, :].copy(), nvec0[None, :], np.array([1.0]),
                   np.array([math.inf]), "evanescent_start", 0.0, key, f)
    nvec0 = d0 * math.sqrt(n2_start)

    def ev_resonance(s, y):
        return n_max - float(np.linalg.norm(y[3:6]))

    def ev_absorbed(s, y):
        return y[6] - math.log(power_floor)

    def ev_returned(s, y):
        return float((y[:3] - r0) @ d0) + 1e-12 * max_length

    def ev_length(s, y):
        return float(max_length) - y[7]

    events = [ev_length, ev_resonance, ev_absorbed, ev_returned]
    names = ["max_length", "resonance", "absorbed", "returned"]
    if inside is not None:
        def ev_wall(s, y):
            return float(np.asarray(inside(y[None, :3])).reshape(-1)[0])
        events.append(ev_wall)
        names.append("wall")
    for ev in events:
        ev.terminal = True
        ev.direction = -1

    class _Singular(Exception):
        pass

    class _Stop(Exception):
        pass

    seen: list[tuple[float, np.ndarray]] = []

    def bounded_rhs(tau, y):
        if evaluations[0] >= max_evaluations:
            raise _Stop
        if len(seen) < 4096 or evaluations[0] % 16 == 0:
            seen.append((tau, y.copy()))
        try:
            return rhs(tau, y)
        except _Singular:
            raise _Stop from None

    y0 = np.concatenate([r0, nvec0, [0.0, 0.0]])
    stop = "max_length"
    # τ advances about s / (2|N|): its span is bounded by the length event and the budget
    step = float(max_step or max_length / 50.0) / (2.0 * max(1.0, math.sqrt(n2_start)))
    try:
        sol = solve_ivp(bounded_rhs, (0.0, 1e6 * float(max_length)), y0, method="DOP853",
                        rtol=rtol, atol=rtol * 1e-3, events=events, dense_output=False,
                        max_step=step)
        ys = sol.y.T
        if sol.status == 1:
            hit = [i for i, t in enumerate(sol.t_events) if len(t)]
            stop = names[hit[0]] if hit else "max_length"
            if hit:  # the event point closes the path
                ys = np.vstack([ys, sol.y_events[hit[0]][0]])
        elif sol.status < 0:
            stop = "step_failure"
        else:
            stop = "step_failure"  # τ span exhausted without reaching any end: never silent
    except _Stop:
        # the budget ran out or the medium became singular: keep the path traced so far
        stop = "step_failure"
        seen.sort(key=lambda item: item[0])
        ys = np.vstack([y0] + [y for _, y in seen])
    ss = ys[:, 7]

    path, nvecs = ys[:, :3], ys[:, 3:6]
    power = np.exp(ys[:, 6])
    residual, go = _diagnostics(n2, medium, path, nvecs, omega_c, h_position)
    return Ray(ss, path, nvecs, power, go, stop, residual, key, f)


@dataclass(frozen=True)
class Beam:
    """A Gaussian beam sampled by rays: each ray with the share of the beam power it carries."""

    rays: tuple[Ray, ...]
    weights: np.ndarray  # (K,) power shares; their sum is the share inside the sampled radius

    @property
    def sampled_share(self) -> float:
        return float(self.weights.sum())

    def share(self, stop: str) -> float:
        """Share of the launched power carried by rays that ended with `stop`."""
        return float(sum(w for ray, w in zip(self.rays, self.weights) if ray.stop == stop))

    def remaining(self) -> float:
        """Share of the launched power still carried at the rays' ends."""
        return float(sum(w * ray.power[-1] for ray, w in zip(self.rays, self.weights)))


def beam_samples(waist_position, direction, waist: float, *, rings: int = 3,
                 per_ring: int = 8, extent: float = 2.0):
    """Start points and power shares of rays sampling a Gaussian beam at its waist.

    Intensity I(ρ) ∝ exp(−2ρ²/w²) (the TEM00 beam; e.g. Siegman, *Lasers*, ch. 17). The disc
    ρ ≤ extent·w is cut into a central disc and `rings` annuli of equal width; each carries the
    exact Gaussian share exp(−2ρ1²/w²) − exp(−2ρ2²/w²), split equally among its `per_ring`
    rays at the annulus' mid radius. Returns (points (K, 3), shares (K,)); the shares sum to
    1 − exp(−2 extent²). At the waist the phase front is flat: geometric rays start parallel
    to `direction` (diffraction, a wave effect, is not in the rays).
    """
    check_index("rings", rings, 0, 50)
    check_index("per_ring", per_ring, 1, 360)
    w = float(waist)
    if not (math.isfinite(w) and w > 0):
        raise ValueError("waist must be a positive finite length (m)")
    d = _unit(np.asarray(direction, dtype=float).reshape(3))
    c = np.asarray(waist_position, dtype=float).reshape(3)
    if not np.all(np.isfinite(c)):
        raise ValueError("waist_position must be a finite 3-vector (m)")
    helper = np.array([1.0, 0.0, 0.0]) if abs(d[0]) < 0.9 else np.array([0.0, 1.0, 0.0])
    e1 = _unit(np.cross(d, helper))
    e2 = np.cross(d, e1)
    outer = extent * w
    centre = outer / (2 * rings + 1)  # the central disc: half the width of a ring
    edges = np.concatenate([[0.0], np.linspace(centre, outer, rings + 1)])
    share = lambda a, b: math.exp(-2 * (a / w) ** 2) - math.exp(-2 * (b / w) ** 2)  # noqa: E731
    points, shares = [c.copy()], [share(0.0, edges[1])]
    for j in range(rings):
        lo, hi = edges[1 + j], edges[2 + j]
        rho = 0.5 * (lo + hi)
        for k in range(per_ring):
            phi = 2 * math.pi * (k + 0.5 * (j % 2)) / per_ring
            points.append(c + rho * (math.cos(phi) * e1 + math.sin(phi) * e2))
            shares.append(share(lo, hi) / per_ring)
    return np.array(points), np.array(shares)


def trace_rays(frequency: float, starts, directions, mode: str, b_field, density, *,
               max_length: float, ions=(), collision_frequency: float = 0.0,
               inside=None, n_max: float = 100.0, power_floor: float = 1e-4,
               rtol: float = 1e-8, max_step: float | None = None,
               max_evaluations: int = 20_000, h_position: float = 1e-6,
               h_index: float = 1e-7, cyclotron_field: float | None = None,
               cyclotron_band: float = 1e-3, groups=None) -> tuple[Ray, ...]:
    """Trace a bundle of K rays together, one field and one density call per step for all.

    The same equations and stops as :func:`trace_ray`, integrated as one system: a ray whose
    state meets a stop (|N| ≥ n_max, power below the floor, back through its launch plane,
    outside the wall, arc length ≥ max_length) is frozen there (its derivatives are zero, so its
    state keeps meeting the stop), and its end is interpolated back onto the stop between the
    last two steps. Use it where a call of ``b_field`` costs more than the arithmetic (a
    magnet model); for one ray, :func:`trace_ray` locates the end exactly.

    `cyclotron_field` (T, e.g. the ECR field of the feed): a ray also ends (``"cyclotron_layer"``)
    where |B| comes within the relative band `cyclotron_band` of it (on the side it starts).
    Close to the layer the cold R branch turns its N towards B and |N| grows without bound
    while the ray slows (the cold resonance, exactly at Y = 1 only along B); the band stops it
    at the layer's edge in a bounded number of steps, where the kinetic absorption of
    :mod:`rfcheck.physics.absorption` takes over (Doppler-broadened layers are wider than
    the default band of 1e-3 in |B| for any electron temperature above a few eV).

    `groups` ((K,) non-negative integers, optional): rays of different media traced as one
    bundle (e.g. the corners of an envelope). Each ray belongs to group ``groups[i]``;
    ``b_field(points, group)`` and ``density(points, group)`` are then called with the (N,)
    group of each point as a second argument, and `collision_frequency` may be a sequence
    with one ν per group. Every ray keeps its own steps, so a ray's path is the one it has
    when its group is traced alone; the bundle shares the calls (and `max_evaluations`).
    """

    f, key = _common_arguments(frequency, max_length, mode, max_evaluations)
    r0 = np.asarray(starts, dtype=float).reshape(-1, 3)
    d0 = np.asarray(directions, dtype=float).reshape(-1, 3)
    if d0.shape[0] == 1 and r0.shape[0] > 1:
        d0 = np.repeat(d0, r0.shape[0], axis=0)
    if d0.shape != r0.shape:
        raise ValueError("starts and directions must both be (K, 3) (or one direction)")
    check_index("number of rays", r0.shape[0], 1, 10_000)
    if not (np.all(np.isfinite(r0)) and np.all(np.isfinite(d0))):
        raise ValueError("starts and directions must be finite")
    norms = np.linalg.norm(d0, axis=1)
    if not np.all(norms > 0):
        raise ValueError("every direction must be a non-zero 3-vector")
    d0 = d0 / norms[:, None]
    k_rays = r0.shape[0]
    omega_c = 2.0 * math.pi * f / C_LIGHT
    n2 = _branch(f, key, ions)
    if groups is None:
        nu = float(collision_frequency)
        nu_of = lambda rays: nu  # noqa: E731
        medium_of = _medium(b_field, density)
        medium = lambda points, rays: medium_of(points)  # noqa: E731
    else:
        group = np.asarray(groups).reshape(-1)
        if group.shape != (k_rays,) or not np.issubdtype(group.dtype, np.integer) \
                or np.any(group < 0):
            raise ValueError("groups must hold one non-negative integer per ray")
        nus = np.broadcast_to(np.asarray(collision_frequency, dtype=float).reshape(-1),
                              (int(group.max()) + 1,)).copy()
        nu = float(nus.max())
        nu_of = lambda rays: nus[group[rays]]  # noqa: E731
        medium_of = _medium(b_field, density, grouped=True)
        medium = lambda points, rays: medium_of(points, group[rays])  # noqa: E731
    if not (np.all(np.isfinite(nu)) and np.all(np.asarray(nu) >= 0)):
        raise ValueError("collision_frequency must be finite and non-negative (s^-1)")
    everyone = np.arange(k_rays)

    b_s, n_s = medium(r0, everyone)
    n2_s = np.real(np.asarray(n2(b_s, n_s, d0))).reshape(-1)
    alive = (n2_s > 0) & np.isfinite(n2_s)
    nvec0 = d0 * np.sqrt(np.where(alive, n2_s, 0.0))[:, None]
    log_floor = math.log(power_floor)
    evaluations = [0]

    side = (np.sign(np.linalg.norm(b_s, axis=1) - cyclotron_field)
            if cyclotron_field is not None else None)

    def stopped(y, idx, bmag=None):
        """(stop names, {name: g}) of rows y of rays idx: a stop is met where its g ≥ 0."""
        r, nv, lnp, s_ = y[:, :3], y[:, 3:6], y[:, 6], y[:, 7]
        out = np.full(len(y), "", dtype=object)
        conditions = {"max_length": s_ - max_length,
                      "resonance": np.linalg.norm(nv, axis=1) - n_max,
                      "absorbed": log_floor - lnp,
                      "returned": -np.einsum("ij,ij->i", r - r0[idx], d0[idx])
                      - 1e-12 * max_length}
        if inside is not None:
            conditions["wall"] = 1e-12 * max_length - np.asarray(inside(r),
                                                                  dtype=float).reshape(-1)
        if cyclotron_field is not None:
            if bmag is None:
                bmag = np.linalg.norm(medium(r, idx)[0], axis=1)
            sgn = side[idx]
            edge = cyclotron_field * (1.0 + sgn * cyclotron_band)
            conditions["cyclotron_layer"] = sgn * (edge - bmag)
        for name, g in conditions.items():
            out = np.where((out == "") & (g >= 0), name, out)
        return out, conditions

    def rhs(y, rays):
        """(dy/dτ, |B| at r) for rows y (A, 8) of the rays `rays`: 7 medium points per ray,
        one call for all."""
        dy = np.zeros_like(y)
        r, nv = y[:, :3], y[:, 3:6]
        pts = (r[:, None, :] + h_position * _OFFSETS[None, :, :]).reshape(-1, 3)
        b, n_e = medium(pts, np.repeat(rays, 7))
        b, n_e = b.reshape(-1, 7, 3), n_e.reshape(-1, 7)
        hn = h_index * np.maximum(np.linalg.norm(nv, axis=1), 1.0)
        eye = np.eye(3)[None, :, :] * hn[:, None, None]
        nrows = np.concatenate([np.repeat(nv[:, None, :], 7, axis=1), nv[:, None, :] + eye,
                                nv[:, None, :] - eye], axis=1)            # (A, 13, 3)
        brows = np.concatenate([b, np.repeat(b[:, :1], 6, axis=1)], axis=1)
        erows = np.concatenate([n_e, np.repeat(n_e[:, :1], 6, axis=1)], axis=1)
        v = np.real(np.asarray(n2(brows, erows, nrows)))                  # (A, 13)
        dn2_dr = (v[:, 1:4] - v[:, 4:7]) / (2.0 * h_position)
        dn2_dn = (v[:, 7:10] - v[:, 10:13]) / (2.0 * hn[:, None])
        dh_dn = 2.0 * nv - dn2_dn
        dh_dr = -dn2_dr
        speed = np.linalg.norm(dh_dn, axis=1)
        good = np.isfinite(speed) & np.all(np.isfinite(dh_dr), axis=1)
        dh_dn[~good], dh_dr[~good], speed[~good] = 0.0, 0.0, 0.0
        dy[:, :3], dy[:, 3:6], dy[:, 7] = dh_dn, -dh_dr, speed
        if nu > 0:
            nu_r = nu_of(rays)
            n2c = np.asarray(n2(b[:, 0], n_e[:, 0], nv, nu_r))
            # weak damping in τ at the ray's own real N (module docstring, "Power"):
            # d ln P/dτ = −2 k0 Im n²_ν, finite at a turning point and linear in ν
            dy[:, 6] = np.where(nu_r > 0, -2.0 * omega_c * np.abs(np.imag(n2c)), 0.0)
        return dy, np.linalg.norm(b[:, 0], axis=1), good

    y0 = np.concatenate([r0, nvec0, np.zeros((k_rays, 2))], axis=1)
    step = float(max_step or max_length / 50.0) / (2.0 * max(1.0, float(np.sqrt(n2_s.max()))
                                                           if np.any(alive) else 1.0))
    history, evaluations[0] = _bundle_steps(rhs, stopped, y0, alive, step, rtol,
                                            max_evaluations)
    # diagnostics of every path in one medium call
    live = [i for i in range(k_rays) if alive[i]]
    diag = {}
    if live:
        paths = np.concatenate([history[i][0] for i in live])
        owner = np.repeat(np.asarray(live), [len(history[i][0]) for i in live])
        res_all, go_all = _diagnostics_rows(
            n2, lambda points: medium(points, np.repeat(owner, 7)), paths[:, :3],
            paths[:, 3:6], omega_c, h_position)
        at = 0
        for i in live:
            m_i = len(history[i][0])
            diag[i] = (float(res_all[at:at + m_i].max()), go_all[at:at + m_i])
            at += m_i
    out = []
    for i in range(k_rays):
        if not alive[i]:
            out.append(Ray(np.array([0.0]), r0[i:i + 1].copy(), np.zeros((1, 3)), np.array([1.0]),
                           np.array([math.inf]), "evanescent_start", 0.0, key, f))
            continue
        ys, name = history[i]
        residual, go = diag[i]
        out.append(Ray(ys[:, 7].copy(), ys[:, :3].copy(), ys[:, 3:6].copy(), np.exp(ys[:, 6]),
                       go, name, residual, key, f))
    return tuple(out)


def _bundle_steps(rhs, stopped, y0: np.ndarray, alive: np.ndarray, h_max: float, rtol: float,
                  budget: int):
    """Integrate every live ray of a bundle with its own step (Dormand–Prince 5(4), the
    tableau of scipy's RK45, vectorised over the rays): each stage is one `rhs` call on the
    rays still running, so a ray that has ended costs nothing and a stiff ray near a layer
    does not shorten the steps of the others. A ray ends at the first accepted step where a
    stop's g turns ≥ 0; the end is placed on g = 0 by regula falsi on the step's 4th-order
    dense output (4 rounds). Work: at most `budget` calls of `rhs` (rays still running then
    end with "step_failure"). Returns ({ray: (states (M, 8), stop)}, calls of rhs)."""
    from scipy.integrate import RK45

    a_tab, b_tab, c_tab, e_tab, p_tab = RK45.A, RK45.B, RK45.C, RK45.E, RK45.P
    k_rays = len(y0)
    atol = rtol * 1e-3
    rows: dict[int, list[np.ndarray]] = {i: [y0[i].copy()] for i in range(k_rays) if alive[i]}
    ends: dict[int, str] = {}
    act = np.nonzero(alive)[0]
    y = y0[act].copy()
    h = np.full(act.size, 0.1 * h_max)
    calls = 0
    if act.size:
        f0, _, _ = rhs(y, act)
        calls += 1
    while act.size and calls + 6 <= budget:
        n_a = act.size
        k = np.empty((7, n_a, 8))
        k[0] = f0
        for st in range(1, 6):
            dy = np.einsum("s,sij->ij", a_tab[st, :st], k[:st]) if st > 1 else a_tab[1, 0] * k[0]
            k[st], _, _ = rhs(y + h[:, None] * dy, act)
        y_new = y + h[:, None] * np.einsum("s,sij->ij", b_tab, k[:6])
        k[6], bmag, good = rhs(y_new, act)
        calls += 6
        err = h[:, None] * np.einsum("s,sij->ij", e_tab, k)
        scale = atol + rtol * np.maximum(np.abs(y), np.abs(y_new))
        # position, N and the log of the power are controlled; the arc length follows
        enorm = np.sqrt(np.mean((err[:, :7] / scale[:, :7]) ** 2, axis=1))
        enorm = np.where(np.isfinite(enorm), enorm, np.inf)
        ok = (enorm <= 1.0) & good
        factor = np.where(enorm > 0, 0.9 * np.maximum(enorm, 1e-10) ** -0.2, 5.0)
        h_next = np.minimum(h * np.clip(factor, 0.2, 5.0), h_max)
        h_next = np.where(ok | good, h_next, 0.25 * h)
        names, conds = stopped(y_new, act, bmag)
        done = np.zeros(n_a, dtype=bool)
        hit = ok & (names != "")
        if np.any(hit):
            j = np.nonzero(hit)[0]
            q = np.einsum("sij,sp->ijp", k[:, j], p_tab)  # (J, 8, 4)
            y_end = _locate_stops(stopped, act[j], y[j], y_new[j], h[j], q, names[j])
            for n, jj in enumerate(j):
                rows[int(act[jj])].append(y_end[n])
                ends[int(act[jj])] = str(names[jj])
            done[j] = True
        for jj in np.nonzero(ok & ~done)[0]:
            rows[int(act[jj])].append(y_new[jj].copy())
        tiny = h_next < 1e-12 * h_max  # the step collapsed: the medium is singular there
        for jj in np.nonzero(tiny & ~done)[0]:
            ends[int(act[jj])] = "step_failure"
        done |= tiny
        y = np.where(ok[:, None], y_new, y)
        f0 = np.where(ok[:, None], k[6], f0)
        h = h_next
        keep = ~done
        act, y, f0, h = act[keep], y[keep], f0[keep], h[keep]
    for i in act:
        ends[int(i)] = "step_failure"
    return {i: (np.array(rows[i]), ends.get(i, "step_failure")) for i in rows}, calls


def _locate_stops(stopped, idx, y0, y1, h, q, names, rounds: int = 4):
    """States on the stops met in one step: regula falsi on x ∈ (0, 1] of the dense output
    y(x) = y0 + h Σ q_p x^(p+1) for each ray's stop g (g(0) < 0 ≤ g(1))."""
    def state(x):
        powers = np.cumprod(np.repeat(x[:, None], q.shape[2], axis=1), axis=1)  # x, x², …
        return y0 + h[:, None] * np.einsum("ijp,ip->ij", q, powers)

    def g_of(yy):
        _, conds = stopped(yy, idx)
        return np.array([conds[str(n)][m] for m, n in enumerate(names)])

    lo, hi = np.zeros(len(idx)), np.ones(len(idx))
    g_lo, g_hi = g_of(y0), g_of(y1)
    for _ in range(rounds):
        with np.errstate(divide="ignore", invalid="ignore"):
            x = lo - g_lo * (hi - lo) / (g_hi - g_lo)
        x = np.where(np.isfinite(x), np.clip(x, lo, hi), 0.5 * (lo + hi))
        g_x = g_of(state(x))
        below = g_x < 0
        lo, g_lo = np.where(below, x, lo), np.where(below, g_x, g_lo)
        hi, g_hi = np.where(below, hi, x), np.where(below, g_hi, g_x)
    with np.errstate(divide="ignore", invalid="ignore"):
        x = lo - g_lo * (hi - lo) / (g_hi - g_lo)
    x = np.where(np.isfinite(x), np.clip(x, lo, hi), hi)
    return state(x)


def _beam_rays(frequency: float, start, direction, waist: float, *, waist_distance: float = 0.0,
              rings: int = 3, per_ring: int = 8):
    """Start points, directions and power shares of rays sampling a Gaussian beam on the plane
    through `start` normal to `direction`, the waist lying `waist_distance` (m) ahead of it
    (negative: behind it).

    TEM00 beam in free space (Siegman, *Lasers*, ch. 17): Rayleigh length z_R = π w0²/λ, at a
    distance z from the waist the radius w(z) = w0 √(1 + (z/z_R)²) and the phase front's
    radius of curvature R(z) = z (1 + (z_R/z)²). The samples of :func:`beam_samples` are
    scaled to w(z) (same power shares: the profile keeps its shape) and each ray leaves
    normal to the phase front, at the angle atan(ρ/R(z)) from the axis: converging towards a
    waist ahead, diverging from one behind. At the waist (waist_distance 0) this is
    :func:`beam_samples` with parallel rays. Returns (points (K, 3), directions (K, 3), shares
    (K,)).
    """
    f = float(frequency)
    if not (math.isfinite(f) and f > 0):
        raise ValueError("frequency must be a positive finite number (Hz)")
    zd = float(waist_distance)
    if not math.isfinite(zd):
        raise ValueError("waist_distance must be a finite length (m)")
    d = _unit(np.asarray(direction, dtype=float).reshape(3))
    c = np.asarray(start, dtype=float).reshape(3)
    points, shares = beam_samples(c, d, waist, rings=rings, per_ring=per_ring)
    z = -zd  # position of the sample plane measured from the waist along the beam
    z_r = math.pi * float(waist) ** 2 * f / C_LIGHT
    grow = math.sqrt(1.0 + (z / z_r) ** 2)
    offsets = (points - c) * grow
    # slope of a ray at radius ρ: ρ / R(z) = ρ z / (z² + z_R²)
    slope = z / (z * z + z_r * z_r)
    dirs = d[None, :] + slope * offsets
    dirs /= np.linalg.norm(dirs, axis=1)[:, None]
    return c + offsets, dirs, shares


def trace_beam(frequency: float, waist_position, direction, waist: float, mode: str,
               b_field, density, *, rings: int = 3, per_ring: int = 8,
               waist_distance: float = 0.0, **options) -> Beam:
    """Trace a Gaussian beam as a bundle of rays (:func:`_beam_rays`, :func:`trace_rays`).

    With `waist_distance` 0 the rays start at the waist (`waist_position`), parallel; else
    they start on the plane through `waist_position` with the waist that far ahead."""
    points, dirs, shares = _beam_rays(frequency, waist_position, direction, waist,
                                     waist_distance=waist_distance, rings=rings,
                                     per_ring=per_ring)
    rays = trace_rays(frequency, points, dirs, mode, b_field, density, **options)
    return Beam(rays, shares)


guard_public(globals())
