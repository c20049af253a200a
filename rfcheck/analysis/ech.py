"""The single-pass optical depth of an electron-cyclotron heating feed over the envelope (no
verdicts): the first resonance crossing of its launch path at every current scale and
frequency, the local density there and τ of the scheme's tenuous-plasma form
(:mod:`rfcheck.physics.absorption`) at the lowest and highest T_e. Read by the ech.* rules;
cached per feed for the run."""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from rfcheck.model import Feed
from rfcheck.physics.absorption import optical_depth_o1, optical_depth_o2, optical_depth_x2

from .envelope import Grid
from .launch_path import LaunchPath, launch_path
from .resonance import resonance_tables
from .state import RunState


class HeatingDepth(NamedTuple):
    path: LaunchPath
    grid: Grid
    shape: np.ndarray  # (n_scale, n_freq): profile shape at the crossing (NaN: none)
    l_b: np.ndarray  # (n_scale, n_freq): B/|dB/dz| at the crossing, m
    z: np.ndarray  # (n_scale, n_freq): z of the crossing, m (NaN: none)
    #: {T_e (eV): (τ over the grid, NaN where no crossing; the form's full result)}
    depths: dict


def heating_optical_depth(ctx: RunState, feed: Feed, scheme: str) -> HeatingDepth:
    """τ over the envelope grid (density × current scale × frequency) at T_e min and max, with
    the crossing's L_B and X, for the heating scheme `scheme` ("O1", "O2" or "X2") of `feed`:
    cached per feed."""
    key = ("ech-optical-depth", feed.id)
    if key in ctx._cache:
        return ctx._cache[key]
    path = launch_path(ctx, feed, feed.launch.mode)
    h = 1 if scheme == "O1" else 2
    shape, l_b, zc = resonance_tables(ctx, path, h)
    grid = ctx.envelope.grid(feed)
    n_e = grid.density * shape[None, :, :]
    form = {"O1": optical_depth_o1, "O2": optical_depth_o2, "X2": optical_depth_x2}[scheme]
    temps = ctx.envelope.electron_temperature
    out = {}
    for t_e in (float(temps.min()), float(temps.max())):
        od = form(grid.frequency, n_e, t_e, l_b[None])
        tau = np.where(np.isnan(zc)[None], np.nan, np.broadcast_to(od.tau, grid.shape))
        out[t_e] = (tau, od)
    ctx._cache[key] = HeatingDepth(path, grid, shape, l_b, zc, out)
    return ctx._cache[key]
