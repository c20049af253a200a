"""Where the static fringe field falls to a level: along the axis and radially outside the
magnet (for the implant-warning and projectile lines of people near the source).

|B| is evaluated by the :class:`~rfcheck.magnet.sources.FieldModel` on a few hundred
points: two axial half-lines from the ends of the magnet and chamber outward, and radial
lines outside the outermost source at a few axial positions (the centre of the magnet and
its two ends; for a multipole at two azimuths, on and half a symmetry period off a pole).
Each line is sampled geometrically in distance from the start point out to
:data:`SEARCH_RANGE`; the outermost sample at or above the level and the next one bracket
the crossing, which is placed by log-log interpolation (exact for a power law, the dipole
far field |B| ∝ r⁻³; error second order in the step, ~1e-4 relative at 100 samples).

Worst case over the current scales: |B| is the largest over the scales given at each point.
Measured tables and maps end where their data end (NaN beyond): a line that has not fallen
to the level where the data end is reported as "beyond the data". No iron is modelled (a
yoke changes the fringe field; DEVELOPERS.md).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rfcheck.model import AxisTable, Chamber, Coil, FieldMap, Magnet, Multipole, RingMagnet, UniformField

__all__ = ["SEARCH_RANGE", "LINE_POINTS", "LineCrossing", "FringeExtent", "magnet_extent",
           "line_crossing", "fringe_extent"]

#: how far out each line is searched beyond its start, m
SEARCH_RANGE = 30.0
#: samples per line (geometric in distance)
LINE_POINTS = 96


@dataclass(frozen=True)
class LineCrossing:
    """Where |B| falls to the level along one line.

    status: "found" (`distance` from the line's origin), "inside" (already below the level
    at the start: the line lies within `start`), "beyond-range" (still above at
    SEARCH_RANGE) or "beyond-data" (the field data end first, at `distance`)."""

    status: str
    distance: float  # m from the line's origin (the magnet centre for axial, the axis for radial)
    start: float  # m, where the search began


@dataclass(frozen=True)
class FringeExtent:
    """The level's line along both axial directions and radially (the largest radius over
    the radial lines), in the spec's coordinates."""

    level: float  # T
    centre_z: float  # m, origin of the axial distances
    axial_low: LineCrossing  # towards −z
    axial_high: LineCrossing  # towards +z
    radial: LineCrossing  # largest over the radial lines
    radial_z: float  # m, axial position of that radial line
    points: int  # field evaluations used

    @property
    def z_low(self) -> float:
        return self.centre_z - self.axial_low.distance

    @property
    def z_high(self) -> float:
        return self.centre_z + self.axial_high.distance


def magnet_extent(magnet: Magnet, chamber: Chamber) -> tuple[float, float, float] | None:
    """(z_min, z_max, r_max) of the magnet's sources and the chamber, m; None when a
    source has no finite extent (a uniform field)."""
    z_lo, z_hi, r_out = chamber.z_start, chamber.z_end, chamber.radius
    for s in magnet.sources:
        if isinstance(s, UniformField):
            return None
        if isinstance(s, (Coil, RingMagnet, Multipole)):
            z_lo, z_hi = min(z_lo, s.z - 0.5 * s.length), max(z_hi, s.z + 0.5 * s.length)
            r_out = max(r_out, s.outer_radius)
        elif isinstance(s, AxisTable):
            z_lo, z_hi = min(z_lo, min(s.z)), max(z_hi, max(s.z))
        elif isinstance(s, FieldMap):
            z_lo, z_hi = min(z_lo, min(s.z)), max(z_hi, max(s.z))
            r_out = max(r_out, max(s.r))
    return z_lo, z_hi, r_out


def line_crossing(distance: np.ndarray, b: np.ndarray, level: float) -> LineCrossing:
    """The crossing of `level` along one sampled line (distance ascending, |B| in T)."""
    d = np.asarray(distance, dtype=float)
    b = np.asarray(b, dtype=float)
    finite = np.isfinite(b)
    if not finite[0]:
        return LineCrossing("beyond-data", float(d[0]), float(d[0]))
    above = np.flatnonzero(finite & (b >= level))
    # beyond the data: the first undefined sample after the last defined one above the level
    if above.size == 0:
        return LineCrossing("inside", float(d[0]), float(d[0]))
    k = int(above[-1])
    if k + 1 < d.size and not finite[k + 1]:
        return LineCrossing("beyond-data", float(d[k]), float(d[0]))
    if k == d.size - 1:
        return LineCrossing("beyond-range", float(d[-1]), float(d[0]))
    b0, b1, d0, d1 = b[k], b[k + 1], d[k], d[k + 1]
    if b1 > 0 and b0 > b1:
        t = (np.log(level) - np.log(b0)) / (np.log(b1) - np.log(b0))
        x = float(np.exp(np.log(d0) + t * (np.log(d1) - np.log(d0))))
    else:  # a field null just beyond: linear
        x = float(d0 + (b0 - level) / (b0 - b1) * (d1 - d0)) if b0 != b1 else float(d0)
    return LineCrossing("found", x, float(d[0]))


def _samples(start: float, points: int) -> np.ndarray:
    start = max(start, 1e-3)
    return np.geomspace(start, start + SEARCH_RANGE, points)


def fringe_extent(model, magnet: Magnet, chamber: Chamber, levels, scales, *,
                  points: int = LINE_POINTS) -> list[FringeExtent] | None:
    """The lines of each level in `levels` (T) for the worst of the current `scales`.

    `model` is the magnet's FieldModel. None when the magnet has a source without a finite
    extent (a uniform field, which has no fringe)."""
    extent = magnet_extent(magnet, chamber)
    if extent is None:
        return None
    z_lo, z_hi, r_out = extent
    zc = 0.5 * (z_lo + z_hi)
    half = 0.5 * (z_hi - z_lo)
    # a little outside the magnet: the coil kernel does not serve points inside a winding
    gap = max(0.01, 0.02 * max(half, r_out))
    s_axis = _samples(half + gap, points)
    s_rad = _samples(r_out + gap, points)
    scales = np.atleast_1d(np.asarray(scales, dtype=float))
    if model.axisymmetric:
        azimuths = np.array([0.0])
    else:
        azimuths = np.array([0.0, 0.5 * model.azimuthal_period])
    radial_z = np.unique(np.array([zc, z_lo, z_hi]))
    axis_pts = np.zeros((2, points, 3))
    axis_pts[0, :, 2] = zc - s_axis
    axis_pts[1, :, 2] = zc + s_axis
    rr, aa, zz = np.meshgrid(s_rad, azimuths, radial_z, indexing="ij")
    rad_pts = np.stack([rr * np.cos(aa), rr * np.sin(aa), zz], axis=-1)  # (n, a, z, 3)
    b_axis = model.magnitude(axis_pts, scales, cache=False).max(axis=0)  # (2, n)
    b_rad = model.magnitude(rad_pts, scales, cache=False).max(axis=0)  # (n, a, z)
    b_rad = b_rad.reshape(points, -1)
    used = axis_pts.size // 3 + rad_pts.size // 3
    out = []
    for level in np.atleast_1d(levels):
        low = line_crossing(s_axis, b_axis[0], float(level))
        high = line_crossing(s_axis, b_axis[1], float(level))
        radial, where = None, 0
        for j in range(b_rad.shape[1]):
            c = line_crossing(s_rad, b_rad[:, j], float(level))
            if radial is None or _worse(c, radial):
                radial, where = c, j
        z_of = np.broadcast_to(radial_z[None, :], (azimuths.size, radial_z.size)).reshape(-1)
        out.append(FringeExtent(float(level), zc, low, high, radial, float(z_of[where]), used))
    return out


_RANK = {"inside": 0, "found": 1, "beyond-data": 2, "beyond-range": 3}


def _worse(a: LineCrossing, b: LineCrossing) -> bool:
    if _RANK[a.status] != _RANK[b.status]:
        return _RANK[a.status] > _RANK[b.status]
    return a.distance > b.distance
