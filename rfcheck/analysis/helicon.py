"""The magnet's field under a helicon feed's antenna (no verdicts): |B| on the axis over the
antenna's length at every envelope current scale, read by the helicon.* rules and cached per
feed for the run."""

from __future__ import annotations

import numpy as np

from rfcheck.model import Feed

from . import magnet_field
from .state import RunState

__all__ = ["antenna_field"]


def antenna_field(ctx: RunState, feed: Feed) -> np.ndarray:
    """|B| on the axis under the antenna (from launch.z − L/2 to launch.z + L/2), T, shape
    (current scales, points): the chamber's axis samples inside the span plus its two ends."""
    key = ("helicon-antenna-field", feed.id)
    if key not in ctx._cache:
        z = magnet_field.axis_z(ctx)
        b = magnet_field.axis_field(ctx)
        half = feed.antenna.length / 2.0
        lo, hi = feed.launch.z - half, feed.launch.z + half
        inside = (z > lo) & (z < hi)
        ends = np.stack([np.interp([lo, hi], z, row) for row in b])
        ctx._cache[key] = np.concatenate([ends, b[:, inside]], axis=1)
    return ctx._cache[key]
