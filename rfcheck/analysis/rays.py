"""The ray study of launches that are off axis, oblique or a beam (no verdicts): read by the
rays.* rules and the report's ray figures, cached per feed for the run.

A launch with ``x``/``y`` (off axis), ``tilt`` (oblique) or ``beam`` (a Gaussian beam) is
traced in 3-D (:func:`rfcheck.physics.rays.trace_rays`) through the source's own field and
density; every other launch is one ray on the axis, which the 1-D launch path
(:mod:`rfcheck.analysis.launch_path`) already covers, and the rays.* rules say so (not
applicable).

The study, per feed, at each envelope corner of peak density (min, max) × current scale
(min, max), at the feed's nominal frequency:

* **Rays.** A beam: ``BEAM_RINGS`` rings of ``BEAM_PER_RING`` rays round a central one
  (49 rays) with their exact TEM00 power shares, started on the launcher plane normal to the
  phase front (:func:`rfcheck.physics.rays.trace_beam`); the 1/e² radius × 2 holds
  1 − e^−8 of the power and the rest (3.4e-4) is counted as not traced. Otherwise one ray.
  An aperture (``launch.aperture``, a waveguide mouth or horn): the rays of
  :func:`rfcheck.physics.aperture_pattern.aperture_rays` (from its centre over its main lobe,
  each with its share of the radiated power; the side lobes are not traced), for each
  orientation of E the spec leaves open (:func:`aperture_launch`), so the study holds the
  corners of every orientation and each rule takes the worst.
  The branch is the feed's intended mode (the other parts of a linear launch are judged by
  the 1-D rules).
* **Medium.** |B| from the magnet model sampled once on a spline grid over the chamber
  (:class:`rfcheck.physics.rays.GridField`, cells of R/``GRID_XY`` across and L/``GRID_Z``
  along; the current scale applied to its scaled part); n_e = n_peak · shape(z), the
  declared axial profile, uniform across the radius; one collision frequency ν (electron–ion
  at the peak density and the lowest T_e, plus electron–neutral at the lowest pressure).
* **Ends.** The side wall (r = R) and the far end wall; back through the launcher plane
  ("returned": towards the launcher and its window); the band |B| = B_res (1 ± 1e-3) of the
  target layer (fundamental, or B_ECR/2 for ecr-harmonic-2); a power floor; the length
  budget 3 L (what ends there is "not ended").
* **Power.** What a ray still carries when it meets the layer is absorbed there by the
  fraction A: the R or X wave met from the high-field side is absorbed whole (cold theory:
  the magnetic beach has no transmitted wave; Stix 1992 ch. 13); otherwise the tenuous-plasma
  optical depths of :mod:`rfcheck.physics.absorption` (O1, O2, X2; the O1 form stands in
  for the R/X wave met from the low-field side, a lower estimate) at the lowest T_e, with
  L_B = |B| / |dB/ds| along the ray at the layer; the L wave has no electron resonance
  (A = 0). Collisional damping along the way is deposited where it happens.
* **Returns.** Where each ray that comes back crosses the launcher plane, and its distance
  there from the launcher position (in the plane): the rules split the returned power into
  what falls on the feed's window aperture and what lands on the end wall around it.
* **Validity.** The largest 1/(kL) (``Ray.go_parameter``) on each ray's path before its end,
  leaving out the points within the thermal Doppler width of the layer
  (:func:`resonance_band`), where the cold ray ends by construction and the absorption model
  takes over; the rules compare it with their threshold.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from rfcheck.model import FieldMap, Feed
from rfcheck.physics.absorption import optical_depth_o1, optical_depth_o2, optical_depth_x2
from rfcheck.physics.constants import C, E_CHARGE, M_E
from rfcheck.physics.frequencies import ecr_field
from rfcheck.physics.aperture_pattern import aperture_rays
from rfcheck.physics.rays import GridField, trace_rays
from rfcheck.physics.rays import _beam_rays as beam_rays

from . import magnet_field
from .launch_path import collision_frequency, profile_shape
from .resonance import ECR_HARMONIC

#: beam sampling: rings of rays round the central one (1 + 3 × 16 = 49 rays)
BEAM_RINGS, BEAM_PER_RING = 3, 16
#: aperture sampling: rings of angular cells round the boresight cap (1 + 4 × 16 = 65 rays,
#: fewer where the main lobe does not reach a cell)
APERTURE_RINGS, APERTURE_PER_RING = 4, 16
#: B within this relative projection of the boresight gives no reference for E
ALONG_FIELD = 1e-3
#: field grid: cells across the chamber radius and along its length
GRID_XY, GRID_Z = 12, 30
#: relative tolerance of the ray integration (Dormand–Prince 5(4) per ray): on the examples
#: D = 0 holds to ~1e-3 relative and the layer points move by < 1 µm against 1e-6
RAY_RTOL = 1e-5
#: right-hand-side evaluations allowed per bundle
RAY_BUDGET = 6000
#: values of two corners closer than this (relative, or absolute below 1) are a tie: far
#: below what the integration tolerance resolves
TIE = 1e-9
#: longest ray, in chamber lengths
LENGTH_FACTOR = 3.0
#: relative half-width of the band that ends a ray at its layer
LAYER_BAND = 1e-3
#: ray ends, as the findings and figures name them
ENDS = ("layer", "launcher", "side wall", "far end", "absorbed", "not ended")
_STOP_END = {"cyclotron_layer": "layer", "resonance": "layer", "returned": "launcher",
             "evanescent_start": "launcher", "absorbed": "absorbed"}


def traced(feed: Feed) -> bool:
    return bool(getattr(feed.launch, "traced", False))


@dataclass
class RayCorner:
    """The rays of one envelope corner and where their power goes (fractions of the launched
    power)."""

    density: float
    scale: float
    rays: tuple
    weights: np.ndarray
    ends: list[str]
    layer_absorbed: np.ndarray       # A per ray (0 where the ray did not meet the layer)
    shares: dict[str, float]          # power carried to each end (ENDS), "not traced"
    reach: float                      # power that meets the layer
    absorbed: float                   # first pass: collisional + at the layer
    deposits: np.ndarray              # (M, 4): x, y, z (m), power fraction
    in_target: float = math.nan       # share of the deposited power inside the target
    # where each returning ray crosses the launcher plane (nan rows for the others) and its
    # distance there from the launcher position, in the plane (m)
    return_points: np.ndarray = field(default_factory=lambda: np.zeros((0, 3)))
    return_offsets: np.ndarray = field(default_factory=lambda: np.zeros(0))
    # per ray: the largest 1/(kL) on the path before its end outside the resonance band, and
    # where it is (m)
    go_max: np.ndarray = field(default_factory=lambda: np.zeros(0))
    go_at: np.ndarray = field(default_factory=lambda: np.zeros((0, 3)))
    go_band: float = 0.0              # relative half-width of |B| round B_res left out
    orientation: str = ""             # the aperture's E orientation ("" where only one)

    def window_split(self, radius: float | None) -> tuple[float, float]:
        """(on the window, on the end wall): the returned share ("launcher") split by the
        distance from the launcher at which each ray crosses the launcher plane; within
        `radius` is on the window. `radius` None (the window's size not declared): all of it
        on the window, the worst case for the window."""
        total = self.shares.get("launcher", 0.0)
        if radius is None or not self.return_offsets.size:
            return total, 0.0
        back = np.array([e == "launcher" for e in self.ends])
        p_end = np.array([float(r.power[-1]) for r in self.rays])
        on = back & (self.return_offsets <= radius)
        window = float(np.sum(self.weights[on] * p_end[on]))
        return window, max(0.0, total - window)

    def go_failing(self, limit: float) -> np.ndarray:
        """Mask of the rays on which 1/(kL) exceeds `limit` before their end."""
        return self.go_max > limit

    def go_unread(self) -> float:
        """Share of the launched power on rays with no point to read 1/(kL) at."""
        return float(np.sum(self.weights[np.isnan(self.go_max)]))


@dataclass
class RayStudy:
    feed: Feed
    mode: str
    harmonic: int
    b_res: float
    grid: GridField
    corners: list[RayCorner] = field(default_factory=list)
    label: str = ""
    #: an aperture launch: how it is sampled and how E is oriented ("", "": a beam or one ray)
    sampling: tuple[str, str] = ("", "")

    def worst(self, key, sense: str = "min") -> RayCorner:
        """The corner with the least (``"min"``) or largest value of `key`; corners within
        ``TIE`` of it count as equal and the first in the corner order is taken, so that a
        difference of rounding (far below the integration tolerance) never picks the corner."""
        values = [float(key(c)) for c in self.corners]
        best = min(values) if sense == "min" else max(values)
        tie = TIE * max(1.0, abs(best))
        return next(c for c, v in zip(self.corners, values) if abs(v - best) <= tie)

    def assumptions(self) -> str:
        launch = self.feed.launch
        what = (f"a Gaussian beam of waist {launch.beam.waist * 1e3:.3g} mm sampled by "
                f"{len(self.corners[0].rays)} rays" if launch.beam
                else self.sampling[0] if self.sampling[0] else "one ray")
        return (f"{what} of the {self.mode} branch from {self.label}; cold plasma; n_e from "
                f"the declared axial profile, uniform across the radius; |B| from the magnet "
                f"model on a {'×'.join(str(n) for n in self.grid.shape)} spline grid; rays "
                f"end at |B| = B_res (1 ± {LAYER_BAND:g}); integration rtol {RAY_RTOL:g}; "
                "other parts of a linear launch: the 1-D rules"
                + (f"; {self.sampling[1]}" if self.sampling[1] else ""))


def aperture_launch(launch, f: float, origin: np.ndarray, direction: np.ndarray, b_nominal):
    """Rays of an aperture launch (:func:`rfcheck.physics.aperture_pattern.aperture_rays`):
    (starts, directions, shares, orientations, (sampling text, orientation text), names of
    the orientations for legends).

    The E direction: at ``e_angle_to_field`` from the projection of B (nominal currents, at
    the launcher) on the aperture plane, both senses of the angle unless it is 0 or 90° (the
    pattern is mirror symmetric, but which way the angle turns is not declared). Where no
    angle is declared, the launch is circularly polarised, or B lies within ``ALONG_FIELD``
    of the boresight (no projection to measure the angle from): two orientations, E along
    the launcher's radial direction (x on the axis) and E across it. Each orientation's rays
    follow the other's; the study keeps the corners of every orientation, so every rule
    takes the worse."""
    ap = launch.aperture
    sizes = (dict(width=ap.width, height=ap.height) if ap.shape == "rectangular"
             else dict(radius=ap.radius))
    b = np.asarray(b_nominal(origin[None, :])[0], dtype=float)
    b_perp = b - np.dot(b, direction) * direction
    declared = launch.e_angle_to_field is not None and launch.polarisation in (None, "linear")
    reference = float(np.linalg.norm(b_perp)) > ALONG_FIELD * float(np.linalg.norm(b))
    if declared and reference:
        e1 = b_perp / np.linalg.norm(b_perp)
        e2 = np.cross(direction, e1)
        alpha = launch.e_angle_to_field
        signs = (1.0,) if min(alpha, abs(alpha - math.pi / 2)) < 1e-9 else (1.0, -1.0)
        e_dirs = [math.cos(alpha) * e1 + sg * math.sin(alpha) * e2 for sg in signs]
        names = [""] if len(signs) == 1 else ["E at +angle", "E at −angle"]
        how = (f"aperture E at {math.degrees(alpha):.3g}° to the projection of B on it"
               + (" (both senses of the angle traced, each rule takes the worse)"
                  if len(signs) > 1 else ""))
    else:
        radial = np.array([origin[0], origin[1], 0.0])
        if np.linalg.norm(radial) <= 0:
            radial = np.array([1.0, 0.0, 0.0])
        e1 = radial - np.dot(radial, direction) * direction
        if np.linalg.norm(e1) < 1e-6:
            e1 = np.array([0.0, 1.0, 0.0]) - direction[1] * direction
        e1 /= np.linalg.norm(e1)
        e_dirs = [e1, np.cross(direction, e1)]
        names = ["E radial", "E across"]
        why = ("not fixed (a circular polarisation turns E)" if launch.polarisation
               in ("circular-right", "circular-left") else
               "not declared" if launch.e_angle_to_field is None else
               "B at the launcher lies along the boresight, so e_angle_to_field fixes no "
               "direction")
        how = (f"aperture E direction {why}: E along the launcher's radial direction and E "
               "across it both traced at every corner, each rule takes the worse (the worst "
               "case)")
    parts = [aperture_rays(f, origin, direction, ap.shape, e_direction=e, rings=APERTURE_RINGS,
                           per_ring=APERTURE_PER_RING, **sizes) for e in e_dirs]
    starts = np.vstack([p[0] for p in parts])
    dirs = np.vstack([p[1] for p in parts])
    shares = np.concatenate([p[2] for p in parts])
    lobe = float(parts[0][2].sum())
    reach = ("the main lobe fills the forward hemisphere" if lobe > 1.0 - 1e-6 else
             f"{100 * lobe:.3g} % of the power radiated into the forward hemisphere; the side "
             "lobes not traced")
    text = (f"{ap.describe()} (uniform phase: a horn's flare phase error ignored) sampled by "
            f"{len(parts[0][2])} rays from its centre over its main lobe (to the first nulls "
            f"of its E- and H-planes: {reach})", how)
    return starts, dirs, shares, len(parts), text, names


def ray_grid(ctx) -> GridField:
    """The magnet's scaled and fixed field (6 components) on the ray grid (cached)."""
    if "ray-grid" not in ctx._cache:
        ch = ctx.model.chamber
        r = ch.radius
        spacing = np.array([r / GRID_XY, r / GRID_XY, ch.length / GRID_Z])
        fm = magnet_field.field_model(ctx)
        # nodes beyond the wall take their radial projection (a magnet may sit just outside);
        # a measured map may end at the wall and at the chamber ends
        measured = any(isinstance(s, FieldMap) for s in ctx.model.magnet.sources)
        reach = r * (1.0 - 1e-9) if measured else r * (1.0 + 0.5 / GRID_XY)

        def values(p):
            if measured:  # a measured map covers the chamber only: clamp the end pads
                p = p.copy()
                p[:, 2] = np.clip(p[:, 2], ch.z_start, ch.z_end)
            return np.concatenate(node_fields(fm, p), axis=1)

        ctx._cache["ray-grid"] = GridField(values, [-r, -r, ch.z_start], [r, r, ch.z_end],
                                           spacing, radius=reach)
    return ctx._cache["ray-grid"]


def node_fields(fm, points: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(scaled, fixed) nominal fields of the field model at points (n, 3), as
    ``FieldModel.unit_fields`` gives them, with every axisymmetric source evaluated once per
    distinct (r, z) of the points and turned to each point's azimuth (a grid of n × n nodes
    across holds about n²/8 distinct radii), the others at every point (in chunks)."""
    from rfcheck.magnet.sources import CHUNK_POINTS

    p = np.asarray(points, dtype=float).reshape(-1, 3)
    scaled, fixed = np.zeros_like(p), np.zeros_like(p)
    rho = np.hypot(p[:, 0], p[:, 1])
    rz, inverse = np.unique(np.column_stack([rho, p[:, 2]]), axis=0, return_inverse=True)
    inverse = inverse.reshape(-1)
    half_plane = np.column_stack([rz[:, 0], np.zeros(len(rz)), rz[:, 1]])
    with np.errstate(invalid="ignore", divide="ignore"):
        cos_phi = np.where(rho > 0, p[:, 0] / np.where(rho > 0, rho, 1.0), 0.0)
        sin_phi = np.where(rho > 0, p[:, 1] / np.where(rho > 0, rho, 1.0), 0.0)

    def chunked(src, q):
        return np.concatenate([src.field(q[i:i + CHUNK_POINTS])
                               for i in range(0, len(q), CHUNK_POINTS)]) if len(q) else q

    for src in fm.sources:
        if src.axisymmetric:
            f = chunked(src, half_plane)[inverse]  # (B_r, 0, B_z) on the half plane y = 0
            b = np.column_stack([f[:, 0] * cos_phi, f[:, 0] * sin_phi, f[:, 2]])
        else:
            b = chunked(src, p)
        if src.scales_with_current:
            scaled += b
        else:
            fixed += b
    return scaled, fixed


def scaled_field(grid: GridField, scale: float):
    """|B| vector at points (n, 3) for one current scale, from the grid's (scaled, fixed)
    parts: scale · scaled + fixed, combined once on the spline coefficients (3 components
    interpolated per point instead of 6)."""
    key = float(scale)
    cache = grid.__dict__.setdefault("_scaled", {})
    if key not in cache:
        cache[key] = grid.combined(np.hstack([key * np.eye(3), np.eye(3)]))
    return cache[key]


def ray_study(ctx, feed: Feed) -> RayStudy:
    """The ray study of one traced feed (cached for the run)."""
    key = ("ray-study", feed.id)
    if key not in ctx._cache:
        ctx._cache[key] = compute_ray_study(ctx, feed)
    return ctx._cache[key]


def compute_ray_study(ctx, feed: Feed) -> RayStudy:
    model, env = ctx.model, ctx.envelope
    ch, plasma, launch = model.chamber, model.plasma, feed.launch
    h = ECR_HARMONIC.get(feed.absorption, 1)
    f = feed.frequency
    b_res = float(ecr_field(f, harmonic=h))
    grid = ray_grid(ctx)
    origin = launch.origin.copy()
    origin[2] = min(max(origin[2], ch.z_start), ch.z_end)
    direction = launch.wave_direction
    label = (f"(x, y, z) = ({origin[0] * 1e3:.4g}, {origin[1] * 1e3:.4g}, "
             f"{origin[2] * 1e3:.4g}) mm, {math.degrees(launch.tilt):.3g}° from "
             f"{'+' if launch.direction > 0 else '-'}z")
    orientations = 1
    sampling, names = ("", ""), [""]
    if launch.beam:
        starts, dirs, weights = beam_rays(f, origin, direction, launch.beam.waist,
                                          waist_distance=launch.beam.waist_distance,
                                          rings=BEAM_RINGS, per_ring=BEAM_PER_RING)
    elif launch.aperture is not None:
        starts, dirs, weights, orientations, sampling, names = aperture_launch(
            launch, f, origin, direction, scaled_field(grid, 1.0))
    else:
        starts, dirs, weights = origin[None, :], direction[None, :], np.ones(1)
    far, sign = (ch.z_end, 1.0) if launch.direction > 0 else (ch.z_start, -1.0)

    def inside(p):
        return np.minimum(ch.radius - np.hypot(p[:, 0], p[:, 1]), sign * (far - p[:, 2]))

    t_e = float(np.min(env.electron_temperature))
    pressure = None if plasma.neutral is None else plasma.neutral.pressure.min
    study = RayStudy(feed, launch.mode, h, b_res, grid, label=label, sampling=sampling)
    densities = sorted({float(np.min(env.density)), float(np.max(env.density))})
    scales = sorted({float(np.min(env.current_scale)), float(np.max(env.current_scale))})
    corners = [(n_peak, scale) for n_peak in densities for scale in scales]
    peak = np.array([c[0] for c in corners])
    scale_of = np.array([c[1] for c in corners])
    nus = [float(collision_frequency(plasma, n_peak, t_e, pressure)) for n_peak, _ in corners]

    def dens_all(p, group):
        return peak[group] * profile_shape(plasma.profile, ch, p[:, 2])

    by_scale = {s: scaled_field(grid, s) for s in scales}

    def b_all(points, group):
        out = np.empty((len(points), 3))
        s_pts = scale_of[group]
        for s, b in by_scale.items():
            m = s_pts == s
            if np.any(m):
                out[m] = b(points[m])
        return out

    # every corner's bundle traced as one (each ray keeps its own steps: the same paths as
    # corner by corner, in a quarter of the calls)
    # (an aperture whose E direction is open: each orientation's rays after the other's, its
    # corners after the other's; every rule then takes the worse)
    k = len(starts) // orientations
    tiles = [np.tile(a.reshape(orientations, k, -1), (1, len(corners), 1)).reshape(-1, 3)
             for a in (starts, dirs)]
    rays = trace_rays(f, tiles[0], tiles[1],
                      launch.mode, b_all, dens_all, max_length=LENGTH_FACTOR * ch.length,
                      ions=plasma.ions, collision_frequency=nus, inside=inside,
                      cyclotron_field=b_res, cyclotron_band=LAYER_BAND, rtol=RAY_RTOL,
                      max_evaluations=RAY_BUDGET,
                      groups=np.tile(np.repeat(np.arange(len(corners)), k), orientations))
    for o in range(orientations):
        w_o = weights[o * k:(o + 1) * k]
        for i, (n_peak, scale) in enumerate(corners):
            def dens(p, n_peak=n_peak):
                return n_peak * profile_shape(plasma.profile, ch, p[:, 2])

            j = o * len(corners) + i
            study.corners.append(_corner(study, rays[j * k:(j + 1) * k], w_o, n_peak, scale,
                                         scaled_field(grid, scale), dens, t_e, ch, far, f))
            study.corners[-1].orientation = names[o]
    target = launch.target
    if target is not None:
        r_t = ch.radius if target.radius is None else target.radius
        for c in study.corners:
            d = c.deposits
            total = float(d[:, 3].sum()) if d.size else 0.0
            inn = ((d[:, 2] >= target.z_start) & (d[:, 2] <= target.z_end)
                   & (np.hypot(d[:, 0], d[:, 1]) <= r_t)) if d.size else np.zeros(0, bool)
            c.in_target = float(d[inn, 3].sum()) / total if total > 0 else 0.0
    return study


def _end_of(ray, ch, far) -> str:
    if ray.stop in _STOP_END:
        return _STOP_END[ray.stop]
    if ray.stop == "wall":
        p = ray.end
        return "side wall" if ch.radius - math.hypot(p[0], p[1]) < abs(far - p[2]) else "far end"
    return "not ended"


def _layer_fraction(study: RayStudy, ray, b, dens, t_e: float, f: float) -> float:
    """A of one ray at the layer (see the module docstring)."""
    mode, h = study.mode, study.harmonic
    if mode == "L":
        return 0.0
    end = ray.end
    step = ray.path[-1] - ray.path[-2] if len(ray.path) > 1 else np.array([0.0, 0.0, 1.0])
    s_hat = step / max(float(np.linalg.norm(step)), 1e-300)
    delta = 1e-4
    pts = np.vstack([end - delta * s_hat, end + delta * s_hat])
    bm = np.linalg.norm(b(pts), axis=1)
    grad = abs(bm[1] - bm[0]) / (2 * delta)
    b_end = float(np.linalg.norm(b(end[None, :])[0]))
    high_side = float(np.linalg.norm(b(ray.path[:1])[0])) > study.b_res
    if h == 1 and mode in ("R", "X") and high_side:
        return 1.0
    l_b = b_end / grad if grad > 0 else math.inf
    n_e = float(dens(end[None, :])[0])
    form = optical_depth_o2 if (h == 2 and mode == "O") else (
        optical_depth_x2 if h == 2 else optical_depth_o1)
    tau = float(np.asarray(form(f, n_e, t_e, l_b).tau))
    return float(1.0 - math.exp(-tau)) if math.isfinite(tau) and tau > 0 else 0.0


def launcher_point(launch, ch) -> np.ndarray:
    """The launcher position the study starts from (z within the chamber)."""
    origin = launch.origin.copy()
    origin[2] = min(max(origin[2], ch.z_start), ch.z_end)
    return origin


def resonance_band(t_e: float) -> float:
    """Relative half-width of |B| round the layer left out of the geometric-optics reading:
    the thermal Doppler width of the cyclotron resonance, |ω − lω_c| ≲ k∥ v_te, with
    v_te = √(2 T_e/m_e) and |N∥| = 1 (Bornatici et al. 1983, the resonance width of the weakly
    relativistic absorption; |N∥| = 1 from memory as the lower bound of a launched vacuum
    wave's). Within it the cold dispersion itself fails (the wave's n → ∞ there in cold
    theory) and the absorption model of the layer stands for the rays; the lowest T_e gives
    the narrowest band, the most points read."""
    return math.sqrt(2.0 * t_e * E_CHARGE / M_E) / C


def _go_reading(study, ray, b, band: float) -> tuple[float, np.ndarray]:
    """The largest 1/(kL) on `ray` before its end outside the resonance band, and where;
    NaN where the ray has no such point (evanescent at the start, or ended at once): nothing
    was read, which is not the same as a ray in the geometric-optics regime."""
    go = np.asarray(ray.go_parameter, dtype=float)
    keep = np.ones(go.shape, bool)
    keep[-1] = False  # the end point: the stop itself (the layer, a wall, the plane)
    if len(ray.path) > 1:
        y = np.linalg.norm(b(ray.path), axis=1) / study.b_res - 1.0
        keep &= np.abs(y) > band
    if not np.any(keep):
        return math.nan, ray.path[0].copy()
    i = int(np.flatnonzero(keep)[np.argmax(go[keep])])
    return float(go[i]), ray.path[i].copy()


def _corner(study, rays, weights, n_peak, scale, b, dens, t_e, ch, far, f) -> RayCorner:
    ends = [_end_of(r, ch, far) for r in rays]
    a = np.array([_layer_fraction(study, r, b, dens, t_e, f) if e == "layer" else 0.0
                  for r, e in zip(rays, ends)])
    p_end = np.array([float(r.power[-1]) for r in rays])
    shares = {e: 0.0 for e in ENDS}
    deposits = []
    for r, e, w, pe, ai in zip(rays, ends, weights, p_end, a):
        if e == "layer":
            shares["layer"] += w * pe
            if ai > 0:
                deposits.append([*r.end, w * pe * ai])
        else:
            shares[e] += w * pe
        dp = -np.diff(r.power) * w  # collisional damping, where it happens
        mids = 0.5 * (r.path[1:] + r.path[:-1])
        keep = dp > 0
        deposits.extend(np.column_stack([mids[keep], dp[keep]]).tolist())
    collisional = float(np.sum(weights * (1.0 - p_end)))
    shares["absorbed"] += collisional
    shares["not traced"] = max(0.0, 1.0 - float(weights.sum()))
    reach = shares["layer"]
    absorbed = collisional + float(np.sum(weights * p_end * a))
    # where the returning rays cross the launcher plane (their ends lie on it), and their
    # distance from the launcher in that plane
    origin = launcher_point(study.feed.launch, ch)
    u = study.feed.launch.wave_direction
    points = np.full((len(rays), 3), np.nan)
    offsets = np.full(len(rays), np.nan)
    for i, (r, e) in enumerate(zip(rays, ends)):
        if e == "launcher":
            d = r.end - origin
            points[i] = r.end
            offsets[i] = float(np.linalg.norm(d - np.dot(d, u) * u))
    band = resonance_band(t_e)
    go = [_go_reading(study, r, b, band) for r in rays]
    return RayCorner(n_peak, scale, tuple(rays), weights, ends, a, shares, reach, absorbed,
                     np.array(deposits, dtype=float).reshape(-1, 4),
                     return_points=points, return_offsets=offsets,
                     go_max=np.array([g for g, _ in go]),
                     go_at=np.array([p for _, p in go]).reshape(-1, 3), go_band=band)
