"""Radiation patterns of waveguide mouths and horn apertures, and rays that sample them.

Two apertures in a conducting plane (the launcher's end wall), each carrying the field of its
guide's dominant mode with a uniform phase (Balanis, *Antenna Theory*, 3rd ed. (Wiley 2005),
ch. 12, §12.5.3 and §12.6.3; equation numbers from memory: (12-41)–(12-42), (12-59)):

* **rectangular, TE10**: width a (across which the field varies as cos(π x'/a): the H side),
  height b (along E). With X = (k a / 2) sinθ cosφ and Y = (k b / 2) sinθ sinφ (φ from the H
  axis towards the E axis),

      E_θ ∝ sinφ · h(X) · e(Y),   E_φ ∝ cosθ cosφ · h(X) · e(Y),
      h(X) = cos X / (1 − (2X/π)²),   e(Y) = sin Y / Y,

  so the E-plane (φ = 90°) pattern is sin Y / Y and the H-plane (φ = 0) cosθ · h(X). Half-power
  beamwidths of a large aperture ≈ 50.6° λ/b (E) and 68.8° λ/a (H) (Balanis Table 12.1, from
  memory). First nulls: Y = π (E), X = 3π/2 (H).
* **circular, TE11**: radius a, Z = k a sinθ, χ = χ'11 = 1.8412 (first zero of J1'),

      E_θ ∝ sinφ · 2 J1(Z)/Z,   E_φ ∝ cosθ cosφ · 2 J1'(Z) / (1 − (Z/χ)²),

  both 1 at θ = 0 (Balanis §12.6.3). First nulls: Z = j11 = 3.8317 (E) and Z = j'12 = 5.3314
  (H).

The power pattern P(θ, φ) = |E_θ|² + |E_φ|², normalised to 1 on the boresight. A pyramidal or
conical horn is treated as its mouth with a uniform phase: the quadratic phase error of a
flare is ignored (it fills the nulls and widens the beam; a horn with a large flare
angle radiates wider than this pattern says).

Rays (:func:`aperture_rays`): all start at the aperture's centre (the far-field phase
centre; the aperture's extent is not spread over the starts) and sample the **main lobe**:
for TE10 the rectangle |X| ≤ 3π/2, |Y| ≤ π of direction cosines (bounded by the first nulls of
the two principal planes, where the product pattern vanishes); for TE11 the ellipse through
the first nulls of its E- and H-planes (the circular pattern has no null along the planes
between). Directions outside the main lobe but in the forward hemisphere (side lobes, the
rim) are "not traced", as a beam's outer 3.4e-4. The main lobe is cut into a central cap
and `rings` rings in θ (the cap half a ring wide, as the beam's central disc), each cut into
`per_ring` sectors in φ (odd rings turned by half a sector); each sector's share is the
integral of P over its solid angle inside the main lobe (24 × 24 Gauss–Legendre nodes per
cell), divided by the power radiated into the forward hemisphere (composite Gauss–Legendre,
16 nodes per segment, at least 12 nodes per lobe of the pattern); its ray leaves along the
power-weighted mean direction of the cell. An aperture more than ``MAX_WAVELENGTHS`` (100)
across is refused: it radiates a beam (give it as one).
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy import special

from rfcheck.physics.constants import C as C_LIGHT
from rfcheck.physics.domain import check_index, guard_public

__all__ = ["te10_h_plane", "te11_h_plane", "aperture_power_pattern", "aperture_main_lobe",
           "aperture_radiated_power", "aperture_rays", "SHAPES", "MAX_WAVELENGTHS"]

SHAPES = ("rectangular", "circular")
#: χ'11, j11, j'12: first zero of J1', first zero of J1, second zero of J1'
CHI_11 = float(special.jnp_zeros(1, 1)[0])
J_11 = float(special.jn_zeros(1, 1)[0])
JP_12 = float(special.jnp_zeros(1, 2)[1])
#: the largest aperture (its larger side, or diameter) in wavelengths: the hemisphere
#: quadrature keeps ≥ 12 nodes per lobe up to here
MAX_WAVELENGTHS = 100
_GL16 = np.polynomial.legendre.leggauss(16)
_GL_CELL = np.polynomial.legendre.leggauss(24)


def te10_h_plane(x: ArrayLike) -> NDArray:
    """h(X) = cos X / (1 − (2X/π)²), the H-plane factor of the TE10 aperture (1 at X = 0;
    π/4 at the removable singularity X = ±π/2)."""
    x = np.asarray(x, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        den = 1.0 - (2.0 * x / math.pi) ** 2
        near = np.abs(np.abs(x) - math.pi / 2) < 1e-7
        out = np.cos(x) / np.where(near, 1.0, den)
    return np.where(near, math.pi / 4, out)


def te11_h_plane(z: ArrayLike) -> NDArray:
    """2 J1'(Z) / (1 − (Z/χ'11)²), the H-plane factor of the TE11 aperture (1 at Z = 0; the
    limit (χ − 1/χ) J1(χ) at Z = χ'11)."""
    z = np.asarray(z, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        near = np.abs(z - CHI_11) < 1e-7
        den = 1.0 - (z / CHI_11) ** 2
        out = 2.0 * special.jvp(1, z) / np.where(near, 1.0, den)
    return np.where(near, (CHI_11 - 1.0 / CHI_11) * special.j1(CHI_11), out)


def _te11_e_plane(z: np.ndarray) -> np.ndarray:
    small = np.abs(z) < 1e-8
    with np.errstate(divide="ignore", invalid="ignore"):
        out = 2.0 * special.j1(z) / np.where(small, 1.0, z)
    return np.where(small, 1.0, out)


def _sizes(frequency, shape, width, height, radius) -> tuple[float, tuple[float, ...]]:
    f = float(frequency)
    if not (math.isfinite(f) and f > 0):
        raise ValueError("frequency must be a positive finite number (Hz)")
    k = 2 * math.pi * f / C_LIGHT
    if shape == "rectangular":
        dims = (width, height)
        names = ("width", "height")
    elif shape == "circular":
        dims = (radius,)
        names = ("radius",)
    else:
        raise ValueError(f"unknown aperture shape {shape!r}; expected one of {SHAPES}")
    for n, v in zip(names, dims):
        if v is None or not (math.isfinite(float(v)) and float(v) > 0):
            raise ValueError(f"a {shape} aperture needs a positive finite {n} (m)")
    across = max(dims) if shape == "rectangular" else 2.0 * dims[0]
    if k * across > 2 * math.pi * MAX_WAVELENGTHS:
        raise ValueError(f"the aperture is more than {MAX_WAVELENGTHS} wavelengths across: "
                         "such a mouth radiates a beam (give it as a Gaussian beam)")
    if shape == "rectangular" and k * float(width) <= math.pi:
        raise ValueError("the TE10 guide is cut off: width must exceed half a wavelength")
    if shape == "circular" and k * float(radius) <= CHI_11:
        raise ValueError("the TE11 guide is cut off: radius must exceed χ'11 λ / (2π)")
    return k, tuple(float(v) for v in dims)


def aperture_power_pattern(frequency: float, theta: ArrayLike, phi: ArrayLike, shape: str, *,
                           width: float | None = None, height: float | None = None,
                           radius: float | None = None) -> NDArray:
    """Far-field power pattern P(θ, φ) of the aperture (module docstring), 1 on the boresight.

    θ from the boresight (rad, 0..π/2: the forward hemisphere), φ from the H axis (the
    aperture's `width` side, rectangular) towards the E axis. Rectangular: TE10 over `width`
    × `height` (m); circular: TE11 over `radius` (m)."""
    k, dims = _sizes(frequency, shape, width, height, radius)
    th, ph = np.broadcast_arrays(np.asarray(theta, dtype=float), np.asarray(phi, dtype=float))
    st, ct = np.sin(th), np.cos(th)
    sp2, cp2 = np.sin(ph) ** 2, np.cos(ph) ** 2
    if shape == "rectangular":
        a, b = dims
        x = 0.5 * k * a * st * np.cos(ph)
        y = 0.5 * k * b * st * np.sin(ph)
        common = (te10_h_plane(x) * np.sinc(y / math.pi)) ** 2
        return (sp2 + ct * ct * cp2) * common
    z = k * dims[0] * st
    return sp2 * _te11_e_plane(z) ** 2 + ct * ct * cp2 * te11_h_plane(z) ** 2


def aperture_main_lobe(frequency: float, theta: ArrayLike, phi: ArrayLike, shape: str, *,
                       width: float | None = None, height: float | None = None,
                       radius: float | None = None) -> NDArray:
    """True where (θ, φ) lies inside the main lobe that :func:`aperture_rays` traces (module
    docstring: the first-null rectangle of TE10, the first-null ellipse of TE11)."""
    k, dims = _sizes(frequency, shape, width, height, radius)
    u0, v0 = _lobe_half_widths(k, shape, dims)
    th, ph = np.broadcast_arrays(np.asarray(theta, dtype=float), np.asarray(phi, dtype=float))
    u = np.sin(th) * np.cos(ph)
    v = np.sin(th) * np.sin(ph)
    if shape == "rectangular":
        return (np.abs(u) <= u0) & (np.abs(v) <= v0)
    return (u / u0) ** 2 + (v / v0) ** 2 <= 1.0


def _lobe_half_widths(k: float, shape: str, dims) -> tuple[float, float]:
    """Direction cosines (along H, along E) of the first nulls of the principal planes."""
    if shape == "rectangular":
        a, b = dims
        return 3.0 * math.pi / (k * a), 2.0 * math.pi / (k * b)
    return JP_12 / (k * dims[0]), J_11 / (k * dims[0])


def _theta_max(k: float, shape: str, dims) -> float:
    u0, v0 = _lobe_half_widths(k, shape, dims)
    reach = math.hypot(u0, v0) if shape == "rectangular" else max(u0, v0)
    return math.asin(min(1.0, reach))


def _composite(lo: float, hi: float, segments: int) -> tuple[np.ndarray, np.ndarray]:
    edges = np.linspace(lo, hi, segments + 1)
    x, w = _GL16
    half = 0.5 * np.diff(edges)
    nodes = (edges[:-1, None] + half[:, None] * (x[None, :] + 1.0)).ravel()
    weights = (half[:, None] * w[None, :]).ravel()
    return nodes, weights


def aperture_radiated_power(frequency: float, shape: str, *, width: float | None = None,
                            height: float | None = None, radius: float | None = None) -> float:
    """∫ P sinθ dθ dφ over the forward hemisphere (sr, P normalised to 1 on the boresight),
    by composite Gauss–Legendre quadrature over one quadrant of φ (the pattern is mirror
    symmetric in both principal planes) times 4."""
    k, dims = _sizes(frequency, shape, width, height, radius)
    size = k * (max(dims) if shape == "rectangular" else 2.0 * dims[0])
    # ~k D / 4 lobes over θ and k D / 2π over a quadrant of φ: 16 nodes per segment, ≥ 12
    # nodes per lobe up to MAX_WAVELENGTHS
    t_nodes, t_w = _composite(0.0, math.pi / 2, math.ceil(size / 4) + 8)
    p_nodes, p_w = _composite(0.0, math.pi / 2, math.ceil(size / (2 * math.pi)) + 4)
    total = 0.0
    kw = dict(width=width, height=height, radius=radius)
    for i in range(0, len(t_nodes), 64):
        th = t_nodes[i:i + 64, None]
        p = aperture_power_pattern(frequency, th, p_nodes[None, :], shape, **kw)
        total += float(np.sum(t_w[i:i + 64, None] * np.sin(th) * p * p_w[None, :]))
    return 4.0 * total


def _frame(direction, e_direction) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    d = np.asarray(direction, dtype=float).reshape(3)
    norm = float(np.linalg.norm(d))
    if not (math.isfinite(norm) and norm > 0):
        raise ValueError("direction must be a finite non-zero 3-vector")
    d = d / norm
    if e_direction is None:
        helper = np.array([0.0, 1.0, 0.0]) if abs(d[1]) < 0.9 else np.array([1.0, 0.0, 0.0])
    else:
        helper = np.asarray(e_direction, dtype=float).reshape(3)
        if not np.all(np.isfinite(helper)):
            raise ValueError("e_direction must be a finite 3-vector")
    e_e = helper - np.dot(helper, d) * d
    n_e = float(np.linalg.norm(e_e))
    if not n_e > 1e-9 * max(1.0, float(np.linalg.norm(helper))):
        raise ValueError("e_direction must not be parallel to direction")
    e_e /= n_e
    e_h = np.cross(e_e, d)
    return d, e_h, e_e


def aperture_rays(frequency: float, centre, direction, shape: str, *,
                  width: float | None = None, height: float | None = None,
                  radius: float | None = None, e_direction=None, rings: int = 4,
                  per_ring: int = 16):
    """Start points, directions and power shares of rays sampling the main lobe of a TE10
    rectangular (`width` × `height`, m) or TE11 circular (`radius`, m) aperture at `centre`
    (m) radiating along `direction` (module docstring).

    `e_direction`: the aperture's E direction (projected onto the aperture plane; the
    rectangular `height` lies along it). Not given: any direction normal to `direction`
    (the +y axis projected, else +x). `per_ring` must be a multiple of 4, so that the sampling
    is mirror symmetric in both principal planes. Returns (points (K, 3), directions (K, 3),
    shares (K,)): every point is `centre`; the shares sum to the main lobe's share of the
    power radiated into the forward hemisphere (the rest is not traced); cells the main lobe
    does not reach carry no ray."""
    rings = check_index("rings", rings, 1, 50)
    per_ring = check_index("per_ring", per_ring, 4, 360)
    if per_ring % 4:
        raise ValueError("per_ring must be a multiple of 4 (symmetric in the E and H planes)")
    k, dims = _sizes(frequency, shape, width, height, radius)
    c = np.asarray(centre, dtype=float).reshape(3)
    if not np.all(np.isfinite(c)):
        raise ValueError("centre must be a finite 3-vector (m)")
    d, e_h, e_e = _frame(direction, e_direction)
    kw = dict(width=width, height=height, radius=radius)
    total = aperture_radiated_power(frequency, shape, **kw)
    t_max = _theta_max(k, shape, dims)
    cap = t_max / (2 * rings + 1)
    edges = np.concatenate([[0.0], np.linspace(cap, t_max, rings + 1)])
    x, w = _GL_CELL
    cells = [(0.0, cap, 0.0, 2 * math.pi)]
    for j in range(rings):
        step = 2 * math.pi / per_ring
        for m in range(per_ring):
            lo = (m - 0.5 + 0.5 * (j % 2)) * step
            cells.append((edges[1 + j], edges[2 + j], lo, lo + step))
    dirs, shares = [], []
    for t0, t1, p0, p1 in cells:
        th = 0.5 * (t0 + t1) + 0.5 * (t1 - t0) * x
        ph = 0.5 * (p0 + p1) + 0.5 * (p1 - p0) * x
        tt, pp = np.meshgrid(th, ph, indexing="ij")
        weight = (np.outer(w, w) * 0.25 * (t1 - t0) * (p1 - p0) * np.sin(tt)
                  * aperture_power_pattern(frequency, tt, pp, shape, **kw)
                  * aperture_main_lobe(frequency, tt, pp, shape, **kw))
        share = float(weight.sum())
        if not share > 0:
            continue
        st = np.sin(tt)
        mean = (np.sum(weight * st * np.cos(pp)) * e_h + np.sum(weight * st * np.sin(pp)) * e_e
                + np.sum(weight * np.cos(tt)) * d)
        dirs.append(mean / np.linalg.norm(mean))
        shares.append(share / total)
    dirs = np.array(dirs)
    return np.tile(c, (len(dirs), 1)), dirs, np.array(shares)


guard_public(globals())
