"""Characteristic numbers of the magnet for the JSON `characteristics.magnet` (no verdicts).

Everything is read from the run's shared caches (:mod:`rfcheck.analysis.magnet_field`: the
on-axis field and the trap geometry over the envelope's current scales), so the
characteristics cost no extra field evaluation beyond what the rules already use. Values are
JSON-ready: {"value", "unit"}, never NaN or infinity (None with a "reason" instead).

Conventions are those of rfcheck.magnet.geometry: injection side = z_start side, B_min is
the smallest |B| in the plasma volume (possibly off axis), B_rad ("radial_wall_field") the
field of the multipole alone on the wall at the axial position of B_min, largest over azimuth
(0 without a multipole), "wall_total_field" the largest total |B| at the same place, the last
closed |B| the smallest |B| on the chamber boundary,
the mirror ratio min(B_inj, B_ext) / on-axis minimum. Single values are at current scale 1;
"…_range" entries give [lowest, highest] over the current tolerance.
"""

from __future__ import annotations

import numpy as np

from rfcheck.findings import quantity_json as _q
from rfcheck.physics.frequencies import ecr_field

from . import magnet_field
from .state import RunState

__all__ = ["magnet_characteristics"]


def _range(values, unit: str) -> dict:
    v = np.asarray(values, dtype=float)
    if not np.isfinite(v).all():
        return {"value": None, "unit": unit, "reason": "undefined at some current scale"}
    return {"value": [float(v.min()), float(v.max())], "unit": unit}


def _nominal_index(ctx: RunState) -> int:
    return int(np.argmin(np.abs(np.asarray(ctx.envelope.current_scale) - 1.0)))


def magnet_characteristics(ctx: RunState) -> dict:
    """Axis extrema, trap geometry, mirror ratio and (minimum-B traps) the ratios over B_ECR.

    Never raises for a field that cannot be evaluated: the entry then carries a "reason".
    """
    model = ctx.model
    out: dict = {"trap": model.magnet.trap}
    try:
        z = magnet_field.axis_z(ctx)
        b_axis = magnet_field.axis_field(ctx, 1.0)[0]
        out["axis_field_max_position"] = _q(float(z[int(np.argmax(b_axis))]), "m")
        traps = magnet_field.trap_geometries(ctx)
    except ValueError as exc:  # FieldUndefinedError and malformed measured data
        out["geometry"] = {"value": None, "unit": "", "reason": str(exc)}
        return out
    t = traps[_nominal_index(ctx)]
    axis_min = t.axis_min
    out.update({
        "axis_minimum": _q(axis_min.b, "T"),
        "axis_minimum_position": _q(axis_min.z, "m"),
        "injection_max": _q(t.injection_max.b, "T"),
        "injection_max_position": _q(t.injection_max.z, "m"),
        "extraction_max": _q(t.extraction_max.b, "T"),
        "extraction_max_position": _q(t.extraction_max.z, "m"),
        "volume_min": _q(t.volume_min.b, "T"),
        "volume_min_r": _q(t.volume_min.r, "m"),
        "volume_min_z": _q(t.volume_min.z, "m"),
        "volume_min_azimuth": _q(t.volume_min.phi, "rad"),
        "radial_wall_field": _q(t.radial_wall.b, "T"),
        "radial_wall_z": _q(t.radial_wall.z, "m"),
        "radial_wall_azimuth": _q(t.radial_wall.phi, "rad"),
        "wall_total_field": _q(t.wall_total.b, "T"),
        "wall_total_azimuth": _q(t.wall_total.phi, "rad"),
        "last_closed_field": _q(t.last_closed.b, "T"),
        "last_closed_where": t.last_closed.where,
        "last_closed_r": _q(t.last_closed.r, "m"),
        "last_closed_z": _q(t.last_closed.z, "m"),
        "last_closed_azimuth": _q(t.last_closed.phi, "rad"),
        "mirror_ratio": _q(t.mirror_ratio, "1", "the on-axis minimum of |B| is zero"),
        "current_scales": {"value": [float(s) for s in ctx.envelope.current_scale], "unit": "1"},
        "injection_max_range": _range([x.injection_max.b for x in traps], "T"),
        "extraction_max_range": _range([x.extraction_max.b for x in traps], "T"),
        "volume_min_range": _range([x.volume_min.b for x in traps], "T"),
        "radial_wall_field_range": _range([x.radial_wall.b for x in traps], "T"),
        "wall_total_field_range": _range([x.wall_total.b for x in traps], "T"),
        "last_closed_field_range": _range([x.last_closed.b for x in traps], "T"),
    })
    if model.magnet.trap == "minimum-b":
        from rfcheck.magnet.geometry import min_b_ratios

        ratios = {}
        for feed in model.feeds:
            if feed.absorption != "ecr":
                continue
            b_ecr = float(ecr_field(feed.frequency))
            r = min_b_ratios(t, b_ecr)
            over = [min_b_ratios(x, b_ecr) for x in traps]
            entry = {"ecr_field": _q(b_ecr, "T")}
            for key in ("injection", "extraction", "radial", "minimum", "wall_total"):
                entry[key] = _q(getattr(r, key), "1")
                entry[key + "_range"] = _range([getattr(o, key) for o in over], "1")
            ratios[feed.id] = entry
        out["min_b_ratios"] = ratios
    out.update(field_arrays(ctx))
    return out


def _values(a, digits: int = 6) -> list:
    """Nested lists of floats rounded to `digits` significant figures (compact JSON)."""
    a = np.asarray(a, dtype=float)
    return np.vectorize(lambda x: float(f"{x:.{digits}g}"), otypes=[float])(a).tolist()


def field_arrays(ctx: RunState, *, axis_points: int = 201, wall_z: int = 41, wall_phi: int = 24,
                 map_r: int = 16, map_z: int = 61) -> dict:
    """The nominal field as arrays for figures and other tools: on-axis |B|(z), |B| on the wall
    over z × azimuth (azimuths over one symmetry period of |B|, see
    FieldModel.azimuthal_period), and |B|(r, z) in the half plane at azimuth 0 (current
    scale 1)."""
    from rfcheck.magnet.geometry import GeometryGrid, rz_field, wall_field

    chamber, fm = ctx.model.chamber, magnet_field.field_model(ctx)
    profile = magnet_field.nominal_profile(ctx)
    step = max(1, (len(profile.z) - 1) // (axis_points - 1))
    out = {"axis_profile": {"z": {"value": _values(profile.z[::step]), "unit": "m"},
                            "b": {"value": _values(profile.b[::step]), "unit": "T"}}}
    try:
        wall = wall_field(fm, chamber, 1.0, GeometryGrid(wall_z=wall_z, azimuths=wall_phi))
        rz = rz_field(fm, chamber, 1.0, 0.0, map_r, map_z)
    except ValueError as exc:  # measured data that do not cover the wall
        out["wall_field"] = {"value": None, "unit": "T", "reason": str(exc)}
        return out
    if np.isfinite(wall.b).all():
        out["wall_field"] = {"z": {"value": _values(wall.z), "unit": "m"},
                             "azimuth": {"value": _values(wall.phi), "unit": "rad"},
                             "b": {"value": _values(wall.b), "unit": "T"}}
    else:
        out["wall_field"] = {"value": None, "unit": "T", "reason": "undefined on the wall"}
    if np.isfinite(rz.b).all():
        out["rz_field"] = {"r": {"value": _values(rz.r), "unit": "m"},
                           "z": {"value": _values(rz.z), "unit": "m"},
                           "azimuth": {"value": float(rz.phi), "unit": "rad"},
                           "b": {"value": _values(rz.b), "unit": "T"}}
    else:
        out["rz_field"] = {"value": None, "unit": "T", "reason": "undefined in the chamber"}
    return out
