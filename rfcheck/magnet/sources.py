"""The field engine: every source of a :class:`rfcheck.model.Magnet`, added together.

Points are Cartesian (..., 3) in m, fields (..., 3) in T; z is the chamber axis.

* Coil (thick solenoid, uniform current density J = N I / ((R2 - R1) L)): nested current
  sheets. A sheet K = J dR at radius R has the field of an axially magnetised cylinder of
  polarisation mu0 K (equivalent bound current), evaluated by magpylib in closed form
  (Derby & Olbert, Am. J. Phys. 78 (2010) 229). The integral over R1..R2 uses
  `coil_sheets` Gauss-Legendre nodes (default 8). Measured against the closed-form axis
  field: 5e-15 relative for a 50 mm winding on a 110 mm bore, 1e-9 for a winding three
  times thicker than its bore radius; off axis <= 2e-6 at 5 mm from a 50 mm winding (against
  64 nodes). Points inside a winding are not supported.
* Ring magnet (axial remanence B_r): outer minus inner axially magnetised magpylib cylinder.
* Multipole: `segments` annular sectors, segment k centred at theta_k = orientation +
  k 2 pi / segments and magnetised in-plane at (N + 1) theta_k - N orientation, N = poles/2
  (rotating Halbach pattern, K. Halbach, Nucl. Instrum. Methods 169 (1980) 1); orientation 0
  puts segment 0 on +x, magnetised radially outward. Engine "facets" (default, see
  :mod:`rfcheck.magnet.facets`): <= 1e-4 of |B| against magpylib's exact CylinderSegment
  inside `bore_radius`, ~100x faster. Engine "segments": magpylib CylinderSegment objects.
* Uniform field: (0, 0, b) everywhere; it scales with the current (it models a solenoid).
* Measured on-axis table: cubic spline B0(z); off axis the first-order paraxial expansion
  B_z(r, z) = B0(z), B_r(r, z) = -(r / 2) dB0/dz (from div B = 0); NaN outside the table.
* Measured 2-D map: scipy RegularGridInterpolator (cubic) on the grid mirrored to r < 0
  (B_r odd, B_z even in r) so that the axis is interpolated smoothly; NaN outside the map.

Coils, the uniform field and measured data flagged `scales_with_current` scale with the
current scale s; permanent magnets do not. :class:`FieldModel` computes the nominal field of
every source once per points array (cached) and scales. Relative permeability is 1
everywhere: no iron yokes or pole pieces, no demagnetisation.
"""

from __future__ import annotations

import math

import hashlib
from collections import OrderedDict
from typing import Literal, NamedTuple

import numpy as np

from rfcheck.magnet.facets import MIN_CHORDS, chord_counts, facet_field, polygon_faces
from rfcheck.model import AxisTable, Coil, FieldMap, Magnet, Multipole, RingMagnet, UniformField
from rfcheck.physics.constants import MU0, TWO_PI

__all__ = ["FieldModel", "UnitFields", "COIL_SHEETS", "MULTIPOLE_CHORDS", "CHUNK_POINTS",
           "CACHE_BYTES", "MEMO_BYTES", "MEMO_MIN_POINTS", "UNIFORM_FIELD_SCALES_WITH_CURRENT",
           "magpylib_collection"]

#: Gauss-Legendre nodes across the winding of a thick coil
COIL_SHEETS = 8
#: fewest chords per inner arc of a multipole segment in the facet model
MULTIPOLE_CHORDS = MIN_CHORDS
#: points per magpylib call
CHUNK_POINTS = 100_000
#: memory kept for cached nominal fields (the newest entry is always kept)
CACHE_BYTES = 256 * 2**20
#: memory kept for the per-point memo of source fields (see FieldModel._compute)
MEMO_BYTES = 64 * 2**20
#: batches of at most this many points bypass the memo
MEMO_MIN_POINTS = 16
#: a UniformField models a large solenoid: it scales with the current (stated choice)
UNIFORM_FIELD_SCALES_WITH_CURRENT = True


class UnitFields(NamedTuple):
    """Nominal fields split by how they scale: B(s) = s * scaled + fixed, (..., 3) in T."""

    scaled: np.ndarray
    fixed: np.ndarray


def _cyl_to_cart(points: np.ndarray, br: np.ndarray, bz: np.ndarray) -> np.ndarray:
    """Axisymmetric (B_r, B_z) at points (n, 3) -> Cartesian (n, 3)."""
    x, y = points[:, 0], points[:, 1]
    r = np.hypot(x, y)
    with np.errstate(invalid="ignore", divide="ignore"):
        f = np.where(r > 0, br / np.where(r > 0, r, 1.0), 0.0)
    return np.stack([f * x, f * y, bz], axis=-1)


def _cylinder_kernel(r: np.ndarray, dz: np.ndarray, radius, half_length: float):
    """(B_r, B_z) of an axially magnetised cylinder, unit polarisation (magpylib core).

    `radius` may be a scalar or an array shaped like `r` (several cylinders in one call).
    """
    from magpylib.core import magnet_cylinder_axial_Bfield

    b = magnet_cylinder_axial_Bfield(half_length / np.broadcast_to(radius, r.shape), r / radius,
                                     dz / radius)
    return b[0], b[2]


# --------------------------------------------------------------------------- sources


class _Source:
    id: str
    scales_with_current: bool = False
    axisymmetric: bool = True

    def field(self, points: np.ndarray) -> np.ndarray:  # (n, 3) -> (n, 3), nominal
        raise NotImplementedError


class _CoilSource(_Source):
    scales_with_current = True

    def __init__(self, coil: Coil, sheets: int):
        self.id, self.coil = coil.id, coil
        a1, a2 = coil.inner_radius, coil.outer_radius
        ni = coil.turns * coil.current
        if a2 > a1:
            x, w = np.polynomial.legendre.leggauss(sheets)
            self.radii = 0.5 * (a1 + a2) + 0.5 * (a2 - a1) * x
            weights = 0.5 * w  # fraction of the ampere-turns carried by each sheet
        else:
            self.radii, weights = np.array([a1]), np.array([1.0])
        if coil.length > 0:  # sheet current K_k = N I w_k / L -> polarisation mu0 K_k
            self.weights = MU0 * ni * weights / coil.length
        else:  # a flat winding: loops of current N I w_k
            self.weights = MU0 * ni * weights

    def axis_bz(self, dz: np.ndarray) -> np.ndarray:
        """B_z on the axis at axial offsets dz from the coil centre, T: the closed form of a
        thick solenoid of rectangular winding section (uniform current density), or of a flat
        annular winding for length 0 (Montgomery, Solenoid Magnet Design, 1969, ch. 1, from
        memory; checked against the current-sheet sum in the tests)."""
        c = self.coil
        a1, a2 = c.inner_radius, c.outer_radius
        ni = c.turns * c.current
        if a2 <= a1:  # a thin winding: the current sheet (or loop) itself
            return self._sheet_axis(dz, np.array([a1]), self.weights)
        if c.length > 0:
            def g(x):
                return x * np.log((a2 + np.hypot(a2, x)) / (a1 + np.hypot(a1, x)))
            h = 0.5 * c.length
            return MU0 * ni / (2.0 * c.length * (a2 - a1)) * (g(dz + h) - g(dz - h))

        def f(a):
            rho = np.hypot(a, dz)
            return np.log(a + rho) - a / rho
        return MU0 * ni / (2.0 * (a2 - a1)) * (f(a2) - f(a1))

    def _sheet_axis(self, dz, radii, weights):
        if self.coil.length > 0:
            h = 0.5 * self.coil.length
            terms = [(dz + h) / np.hypot(a, dz + h) - (dz - h) / np.hypot(a, dz - h)
                     for a in radii]
            return sum(0.5 * w * t for w, t in zip(weights, terms))
        return sum(0.5 * w * a * a / np.hypot(a, dz) ** 3 for w, a in zip(weights, radii))

    def field(self, points):
        r = np.hypot(points[:, 0], points[:, 1])
        on_axis = r == 0.0
        if on_axis.all():
            out = np.zeros_like(points)
            out[:, 2] = self.axis_bz(points[:, 2] - self.coil.z)
            return out
        if on_axis.any():
            out = np.empty_like(points)
            out[on_axis] = self.field(points[on_axis])
            out[~on_axis] = self.field(points[~on_axis])
            return out
        dz = points[:, 2] - self.coil.z
        # all sheets in one kernel call: shape (sheets, n) flattened
        radii = self.radii[:, None]
        rr = np.broadcast_to(r, (len(self.radii), len(r)))
        zz = np.broadcast_to(dz, rr.shape)
        if self.coil.length > 0:
            kr, kz = _cylinder_kernel(rr.ravel(), zz.ravel(),
                                      np.broadcast_to(radii, rr.shape).ravel(),
                                      0.5 * self.coil.length)
        else:
            from magpylib.core import current_circle_Hfield

            h = current_circle_Hfield(np.broadcast_to(radii, rr.shape).ravel(), rr.ravel(),
                                      zz.ravel(), np.ones(rr.size))
            kr, kz = h[0], h[2]
        w = self.weights[:, None]
        br = (w * kr.reshape(rr.shape)).sum(axis=0)
        bz = (w * kz.reshape(rr.shape)).sum(axis=0)
        return _cyl_to_cart(points, br, bz)


class _RingSource(_Source):
    def __init__(self, ring: RingMagnet):
        self.id, self.ring = ring.id, ring

    def field(self, points):
        ring = self.ring
        r = np.hypot(points[:, 0], points[:, 1])
        dz = points[:, 2] - ring.z
        br, bz = _cylinder_kernel(r, dz, ring.outer_radius, 0.5 * ring.length)
        if ring.inner_radius > 0:
            ir, iz = _cylinder_kernel(r, dz, ring.inner_radius, 0.5 * ring.length)
            br, bz = br - ir, bz - iz
        return _cyl_to_cart(points, ring.remanence * br, ring.remanence * bz)


class _UniformSource(_Source):
    scales_with_current = UNIFORM_FIELD_SCALES_WITH_CURRENT

    def __init__(self, uniform: UniformField):
        self.id, self.b = uniform.id, uniform.b

    def field(self, points):
        out = np.zeros((len(points), 3))
        out[:, 2] = self.b
        return out


class _AxisTableSource(_Source):
    """Measured B0(z) on the axis; first-order paraxial expansion off axis."""

    def __init__(self, table: AxisTable):
        from scipy.interpolate import CubicSpline

        self.id = table.id
        self.scales_with_current = table.scales_with_current
        self.spline = CubicSpline(np.asarray(table.z), np.asarray(table.b), extrapolate=False)
        self.slope = self.spline.derivative()

    def field(self, points):
        z = points[:, 2]
        b0 = self.spline(z)
        half_slope = -0.5 * self.slope(z)  # B_r / r
        return np.stack([half_slope * points[:, 0], half_slope * points[:, 1], b0], axis=-1)


class _FieldMapSource(_Source):
    """Measured (B_r, B_z)(r, z) on a rectilinear grid, mirrored to r < 0, cubic."""

    def __init__(self, fmap: FieldMap):
        from scipy.interpolate import RegularGridInterpolator

        self.id = fmap.id
        self.scales_with_current = fmap.scales_with_current
        r = np.asarray(fmap.r)
        br, bz = np.asarray(fmap.br), np.asarray(fmap.bz)
        keep = r > 0  # the mirror image of r = 0 is itself
        r_full = np.concatenate([-r[keep][::-1], r])
        br_full = np.concatenate([-br[keep][::-1], br])
        bz_full = np.concatenate([bz[keep][::-1], bz])
        z = np.asarray(fmap.z)
        method = "cubic" if min(len(r_full), len(z)) >= 4 else "linear"
        opts = dict(method=method, bounds_error=False, fill_value=np.nan)
        self.interp_br = RegularGridInterpolator((r_full, z), br_full, **opts)
        self.interp_bz = RegularGridInterpolator((r_full, z), bz_full, **opts)

    def field(self, points):
        rz = np.column_stack([np.hypot(points[:, 0], points[:, 1]), points[:, 2]])
        return _cyl_to_cart(points, self.interp_br(rz), self.interp_bz(rz))


class _MultipoleSource(_Source):
    axisymmetric = False

    def __init__(self, mp: Multipole, chords: int | None, engine: str,
                 bore_radius: float | None):
        if mp.poles < 2 or mp.poles % 2 or mp.segments < 1:
            raise ValueError(f"multipole {mp.id}: poles must be even and >= 2 and segments >= 1;"
                             f" found poles={mp.poles}, segments={mp.segments}")
        self.id, self.mp, self.engine = mp.id, mp, engine
        n = mp.poles // 2
        step = TWO_PI / mp.segments
        self.step = step
        self.chords = chord_counts(mp, step, chords, bore_radius)
        self.centres = mp.orientation + step * np.arange(mp.segments)
        beta = (n + 1) * self.centres - n * mp.orientation
        self.polarisation = mp.remanence * np.stack([np.cos(beta), np.sin(beta)], axis=-1)
        self.z1, self.z2 = mp.z - 0.5 * mp.length, mp.z + 0.5 * mp.length
        self.faces = polygon_faces(mp, self.centres, self.polarisation, step, self.chords)

    def field(self, points):
        if self.engine == "segments":
            return np.asarray(magpylib_collection_of(self).getB(points)).reshape(-1, 3)
        if self.mp.poles >= 4:
            # on the axis the field of a segmented multipole of four or more poles vanishes
            # by its rotational symmetry (a turn by one pole pitch reverses the magnetisation):
            # skip those points (the kernel gives ~1e-16 T there; tested)
            off = (points[:, 0] != 0.0) | (points[:, 1] != 0.0)
            out = np.zeros_like(points)
            if off.any():
                q = points[off]
                out[off] = facet_field(q, self.faces, self.z1, self.z2) + self._inside(q)
            return out
        out = facet_field(points, self.faces, self.z1, self.z2)
        return out + self._inside(points)

    def _inside(self, points):
        """Polarisation J at points inside a segment (B = mu0 H + J there)."""
        mp = self.mp
        r = np.hypot(points[:, 0], points[:, 1])
        inside = (r >= mp.inner_radius) & (r <= mp.outer_radius)
        inside &= (points[:, 2] >= self.z1) & (points[:, 2] <= self.z2)
        out = np.zeros_like(points)
        if inside.any():
            phi = np.arctan2(points[inside, 1], points[inside, 0])
            k = np.floor(((phi - mp.orientation + 0.5 * self.step) % TWO_PI) / self.step)
            k = np.minimum(k.astype(int), mp.segments - 1)
            out[inside, :2] = self.polarisation[k]
        return out


# --------------------------------------------------------------------------- magpylib objects


def magpylib_collection_of(source: _Source):
    """magpylib objects of one source (coils as nested Cylinder sheets, rings as
    CylinderSegment with a hole, multipoles as CylinderSegments); measured data and
    uniform fields have none."""
    import magpylib as magpy

    objects = []
    if isinstance(source, _CoilSource) and source.coil.length > 0:
        coil = source.coil
        for radius, weight in zip(source.radii, source.weights):
            objects.append(magpy.magnet.Cylinder(
                polarization=(0, 0, weight), dimension=(2 * radius, coil.length),
                position=(0, 0, coil.z)))
    elif isinstance(source, _CoilSource):
        for radius, weight in zip(source.radii, source.weights):
            objects.append(magpy.current.Circle(current=weight / MU0, diameter=2 * radius,
                                                position=(0, 0, source.coil.z)))
    elif isinstance(source, _RingSource):
        ring = source.ring
        objects.append(magpy.magnet.CylinderSegment(
            polarization=(0, 0, ring.remanence),
            dimension=(ring.inner_radius, ring.outer_radius, ring.length, 0, 360),
            position=(0, 0, ring.z)))
    elif isinstance(source, _MultipoleSource):
        mp = source.mp
        half = np.degrees(0.5 * source.step)
        for centre, (jx, jy) in zip(np.degrees(source.centres), source.polarisation):
            objects.append(magpy.magnet.CylinderSegment(
                polarization=(jx, jy, 0),
                dimension=(mp.inner_radius, mp.outer_radius, mp.length, centre - half,
                           centre + half),
                position=(0, 0, mp.z)))
    return magpy.Collection(*objects)


def magpylib_collection(magnet: Magnet, *, coil_sheets: int = COIL_SHEETS):
    """All magpylib objects of a magnet (for cross-checks and 3-D views), nominal currents."""
    import magpylib as magpy

    model = FieldModel(magnet, coil_sheets=coil_sheets)
    return magpy.Collection(*[magpylib_collection_of(s) for s in model.sources])


# --------------------------------------------------------------------------- the model


def _as_points(points) -> np.ndarray:
    p = np.asarray(points, dtype=float)
    if p.shape[-1:] != (3,):
        raise ValueError(f"points must have shape (..., 3); found {p.shape}")
    return p


class FieldModel:
    """The field of a :class:`~rfcheck.model.Magnet`, linear in the current scale.

    Parameters
    ----------
    magnet : rfcheck.model.Magnet
        All field sources, in SI.
    coil_sheets : int
        Gauss-Legendre current sheets across each coil winding.
    multipole_chords : int, optional
        Chords per arc of a multipole segment (engine "facets"); by default chosen so that
        no chord is longer than the gap between `bore_radius` and the arc (error <= 1e-4
        of |B| inside `bore_radius`), at least 4 on the inner and 2 on the outer arc.
    bore_radius : float, optional
        Largest radius (m) at which the field must be accurate: normally the chamber
        radius. Without it the default chords serve points at least one inner chord
        (inner radius x 2 pi / (4 segments)) away from the magnet.
    multipole_engine : {"facets", "segments"}
        Closed-form polygonal surface charges (fast) or magpylib CylinderSegment (exact).
    cache_size : int
        Number of points arrays whose nominal source fields are kept (and at most
        CACHE_BYTES of them; the newest is always kept).

    Notes
    -----
    B(P, s) = s * sum(current-scaled sources) + sum(fixed sources), evaluated from cached
    nominal fields. `scale` may be a scalar (result (..., 3)) or a 1-D array of S scales
    (result (S, ..., 3)).
    """

    def __init__(self, magnet: Magnet, *, coil_sheets: int = COIL_SHEETS,
                 multipole_chords: int | None = None, bore_radius: float | None = None,
                 multipole_engine: Literal["facets", "segments"] = "facets",
                 cache_size: int = 16):
        if multipole_engine not in ("facets", "segments"):
            raise ValueError(f"unknown multipole engine {multipole_engine!r}")
        self.magnet = magnet
        sources: list[_Source] = []
        for src in magnet.sources:
            if isinstance(src, Coil):
                sources.append(_CoilSource(src, coil_sheets))
            elif isinstance(src, RingMagnet):
                sources.append(_RingSource(src))
            elif isinstance(src, Multipole):
                sources.append(_MultipoleSource(src, multipole_chords, multipole_engine,
                                                bore_radius))
            elif isinstance(src, UniformField):
                sources.append(_UniformSource(src))
            elif isinstance(src, AxisTable):
                sources.append(_AxisTableSource(src))
            elif isinstance(src, FieldMap):
                sources.append(_FieldMapSource(src))
            else:
                raise TypeError(f"unsupported magnet source {type(src).__name__}")
        self.sources: tuple[_Source, ...] = tuple(sources)
        self._cache: OrderedDict = OrderedDict()
        self._cache_size = cache_size
        self._memo: dict[bytes, int] = {}  # point bytes -> row of _memo_values
        self._memoise = any(isinstance(src, _MultipoleSource) for src in self.sources)
        self._memo_values = np.empty((0, len(self.sources), 3))

    @classmethod
    def for_chamber(cls, magnet: Magnet, chamber, **options) -> "FieldModel":
        """The model with multipole chords sized for the chamber radius (the usual choice)."""
        return cls(magnet, bore_radius=chamber.radius, **options)

    @property
    def axisymmetric(self) -> bool:
        """True when no source depends on azimuth (no multipole)."""
        return all(s.axisymmetric for s in self.sources)

    @property
    def azimuthal_period(self) -> float:
        """Smallest rotation about z (rad) that leaves |B| unchanged: 2π/g.

        A multipole of n = poles/2 pole pairs whose segment count is a multiple of n is
        invariant under a rotation by 2π/n (segment centres map onto centres and the
        magnetisation angle (n+1)θ − n·orientation turns by 2π/n + 2π); axisymmetric sources
        are invariant under any rotation. g is the greatest common divisor of the n of all
        multipoles (1, i.e. no symmetry used, when a segment count breaks it).
        """
        g = 0
        for s in self.sources:
            if s.axisymmetric:
                continue
            n = s.mp.poles // 2
            if not isinstance(s, _MultipoleSource) or s.mp.segments % n:
                return TWO_PI
            g = math.gcd(g, n)
        return TWO_PI / g if g else TWO_PI

    @property
    def current_tolerance(self) -> float:
        return self.magnet.current_tolerance

    # ---------------------------------------------------------------- evaluation

    def _evaluate(self, flat: np.ndarray) -> np.ndarray:
        """Nominal field of every source at points (n, 3): (n, sources, 3), in chunks."""
        out = np.empty((len(flat), len(self.sources), 3))
        for start in range(0, len(flat), CHUNK_POINTS):
            chunk = flat[start:start + CHUNK_POINTS]
            for j, src in enumerate(self.sources):
                out[start:start + CHUNK_POINTS, j] = src.field(chunk)
        return out

    def _direct(self, flat: np.ndarray) -> list[np.ndarray]:
        """Nominal field of each source at points (n, 3), evaluated as asked, in chunks."""
        fields = [np.empty_like(flat) for _ in self.sources]
        for start in range(0, len(flat), CHUNK_POINTS):
            chunk = flat[start:start + CHUNK_POINTS]
            for out, src in zip(fields, self.sources):
                out[start:start + CHUNK_POINTS] = src.field(chunk)
        return fields

    def _compute(self, flat: np.ndarray) -> list[np.ndarray]:
        """Nominal field of each source at points (n, 3).

        The searches of :mod:`rfcheck.magnet.geometry` ask for many points more than once
        (several current scales starting from the same grid point, nested grids sharing
        nodes, the multipole alone on the points of the total). Where a source is costly
        (a multipole: ~15 us per point against ~2 us for a coil), each distinct point (by
        its bytes, so -0.0 is not 0.0) is evaluated once per model and its fields are kept
        in a memo of at most MEMO_BYTES, started afresh when full; a batch larger than the
        memo is evaluated without keeping it. Models of coils, rings and measured data, and
        batches of at most MEMO_MIN_POINTS points, are evaluated directly: there the
        book-keeping would cost more than it saves.
        """
        if not self._memoise or len(flat) <= MEMO_MIN_POINTS:
            return self._direct(flat)
        n_src = len(self.sources)
        capacity = max(1, MEMO_BYTES // (24 * max(n_src, 1)))
        points = flat.view(np.dtype((np.void, 24))).ravel()
        distinct, first, inverse = np.unique(points, return_index=True, return_inverse=True)
        keys = distinct.tolist()
        memo = self._memo
        rows = np.array([memo.get(k, -1) for k in keys], dtype=np.intp)
        miss = rows < 0
        values = np.empty((len(keys), n_src, 3))
        hit = ~miss
        if hit.any():
            values[hit] = self._memo_values[rows[hit]]
        if miss.any():
            new = self._evaluate(flat[first[miss]])
            values[miss] = new
            if len(new) <= capacity:
                if len(memo) + len(new) > capacity:
                    memo.clear()
                size, need = len(memo), len(memo) + len(new)
                if self._memo_values.shape[0] < need:
                    grown = np.empty((min(capacity, max(need, 2 * self._memo_values.shape[0])),
                                      n_src, 3))
                    grown[:size] = self._memo_values[:size]
                    self._memo_values = grown
                self._memo_values[size:need] = new
                memo.update(zip((keys[i] for i in np.nonzero(miss)[0]), range(size, need)))
        out = values[inverse.reshape(-1)]
        return [out[:, j] for j in range(n_src)]

    def _source_fields(self, points: np.ndarray, cache: bool):
        flat = np.ascontiguousarray(points.reshape(-1, 3))
        key = (flat.shape, hashlib.blake2b(flat.tobytes(), digest_size=16).digest())
        entry = self._cache.get(key) if cache else None
        if entry is not None:
            self._cache.move_to_end(key)
        else:
            fields = self._compute(flat)
            scaled = np.zeros_like(flat)
            fixed = np.zeros_like(flat)
            for f, src in zip(fields, self.sources):
                if src.scales_with_current:
                    scaled += f
                else:
                    fixed += f
            entry = (fields, UnitFields(scaled, fixed))
            if cache:
                self._cache[key] = entry
                while len(self._cache) > 1 and (len(self._cache) > self._cache_size
                                                or self._cached_bytes() > CACHE_BYTES):
                    self._cache.popitem(last=False)
        fields, unit = entry  # flat (n, 3); the caller's shape is restored on the way out
        return ([f.reshape(points.shape) for f in fields],
                UnitFields(unit.scaled.reshape(points.shape), unit.fixed.reshape(points.shape)))

    def _cached_bytes(self) -> int:
        return sum(sum(f.nbytes for f in fields) + unit.scaled.nbytes + unit.fixed.nbytes
                   for fields, unit in self._cache.values())

    def source_fields(self, points, *, cache: bool = True) -> dict[str, np.ndarray]:
        """Nominal field of each source by id, (..., 3) in T (for per-source sweeps)."""
        p = _as_points(points)
        fields, _ = self._source_fields(p, cache)
        return {s.id: f for s, f in zip(self.sources, fields)}

    def unit_fields(self, points, *, cache: bool = True) -> UnitFields:
        """Nominal fields split into the current-scaled and the fixed part, (..., 3) in T."""
        return self._source_fields(_as_points(points), cache)[1]

    def field(self, points, scale=1.0, *, cache: bool = True) -> np.ndarray:
        """B (T) at Cartesian points (..., 3) in m for current scale(s) `scale`.

        A scalar scale gives (..., 3); a 1-D array of S scales gives (S, ..., 3).
        """
        unit = self.unit_fields(points, cache=cache)
        s = np.asarray(scale, dtype=float)
        if s.ndim == 0:
            return float(s) * unit.scaled + unit.fixed
        if s.ndim != 1:
            raise ValueError("scale must be a scalar or a 1-D array")
        shape = (len(s),) + (1,) * unit.scaled.ndim
        return s.reshape(shape) * unit.scaled + unit.fixed

    def field_per_scale(self, points, scales) -> np.ndarray:
        """B for batches of points, each at its own scale: points (S, ..., 3), scales (S,)."""
        p = _as_points(points)
        s = np.asarray(scales, dtype=float).reshape((-1,) + (1,) * (p.ndim - 1))
        unit = self.unit_fields(p, cache=False)
        return s * unit.scaled + unit.fixed

    def magnitude(self, points, scale=1.0, *, cache: bool = True) -> np.ndarray:
        """|B| (T) at points (..., 3); (S, ...) for a 1-D array of scales.

        For several scales |B|^2 = s^2 |B_s|^2 + 2 s B_s . B_f + |B_f|^2 is formed from three
        dot products, without the (S, ..., 3) vectors (absolute error <~ 1e-8 max |B|).
        """
        s = np.asarray(scale, dtype=float)
        if s.ndim == 0:
            return np.linalg.norm(self.field(points, scale, cache=cache), axis=-1)
        unit = self.unit_fields(points, cache=cache)
        a = np.einsum("...i,...i->...", unit.scaled, unit.scaled)
        b = np.einsum("...i,...i->...", unit.scaled, unit.fixed)
        c = np.einsum("...i,...i->...", unit.fixed, unit.fixed)
        s = s.reshape((-1,) + (1,) * a.ndim)
        return np.sqrt(np.maximum(s * s * a + 2.0 * s * b + c, 0.0))

    def axis_field(self, z, scale=1.0, *, cache: bool = True) -> np.ndarray:
        """Signed B_z (T) on the axis at positions z (m); (S, ...) for S scales."""
        z = np.asarray(z, dtype=float)
        points = np.zeros(z.shape + (3,))
        points[..., 2] = z
        return self.field(points, scale, cache=cache)[..., 2]
