"""Where the electron-cyclotron resonance of each feed lies on the axis (no verdicts): the
harmonic each absorption mechanism relies on, the resonance crossings of the on-axis field at
every current scale and frequency of the envelope (cached per run), and the first crossing a
launch path meets with the profile shape and field scale length there."""

from __future__ import annotations

import numpy as np

from rfcheck.physics.frequencies import ecr_field

from . import magnet_field
from .launch_path import LaunchPath, profile_shape
from .state import RunState

#: harmonic number of the electron-cyclotron resonance each absorption mechanism relies on
ECR_HARMONIC = {"ecr": 1, "ecr-harmonic-2": 2}


def envelope_crossings(ctx: RunState, feed, harmonic: int) -> list[list[tuple]]:
    """On-axis crossings of the resonance field of `feed` for every envelope point.

    Returns ``out[i][j]``: the :class:`~rfcheck.magnet.geometry.Crossing` tuple for current
    scale i (:func:`rfcheck.analysis.magnet_field.axis_profiles`) and frequency j
    (``ctx.envelope.frequencies(feed)``), from spline roots (not grid nodes). Cached per run.
    """
    key = ("crossings", feed.id, harmonic)
    if key not in ctx._cache:
        from rfcheck.magnet.geometry import resonance_crossings_many

        fields = [float(ecr_field(f, harmonic=harmonic))
                  for f in ctx.envelope.frequencies(feed)]
        ctx._cache[key] = [resonance_crossings_many(p, fields)
                           for p in magnet_field.axis_profiles(ctx)]
    return ctx._cache[key]


def path_crossing(ctx: RunState, path: LaunchPath, scale_index: int, b_res: float, rel_tol: float):
    """The first on-axis crossing of |B| = b_res met from the launcher (or None)."""
    from rfcheck.magnet.geometry import resonance_crossings

    profile = magnet_field.axis_profiles(ctx)[scale_index]
    ahead = [c for c in resonance_crossings(profile, b_res, rel_tol)
             if path.direction * (c.z - path.z0) >= 0]
    return min(ahead, key=lambda c: abs(c.z - path.z0)) if ahead else None


def resonance_tables(ctx: RunState, path: LaunchPath, h: int):
    """Per (scale, frequency): profile shape and L_B at the first crossing, and its z (NaN
    where the resonance is not on the path)."""
    ns, nf = path.scales.size, path.frequencies.size
    shape, l_b, z = (np.full((ns, nf), np.nan) for _ in range(3))
    for j in range(ns):
        for k, f in enumerate(path.frequencies):
            b_res = float(ecr_field(f, harmonic=h))
            c = path_crossing(ctx, path, j, b_res, 0.0)
            if c is None:
                continue
            z[j, k] = c.z
            l_b[j, k] = b_res / abs(c.gradient) if c.gradient != 0 else np.inf
            shape[j, k] = float(profile_shape(ctx.model.plasma.profile, ctx.model.chamber, c.z))
    return shape, l_b, z
