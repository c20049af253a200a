"""Launch-path numbers for the JSON and the report figures (no verdicts): n²(z) along each
feed's path at the envelope corners, the path's trajectory in the CMA plane (X(z), Y(z)),
the layers met and the full-wave fractions. JSON-ready: arrays decimated to at most
FIGURE_POINTS samples, never NaN or infinity (None with a reason instead)."""

from __future__ import annotations

import math

import numpy as np

from rfcheck.findings import quantity_json as _q
from rfcheck.physics.frequencies import critical_density, ecr_field

from .launch_path import NEAR_FIELD, Corner, LaunchPath, launch_path

__all__ = ["FIGURE_POINTS", "path_characteristics"]

#: largest number of samples of each array stored per corner
FIGURE_POINTS = 200
#: significant digits kept in those arrays (figures need no more)
DIGITS = 4


def _array(values, unit: str, reason: str = "not finite") -> dict:
    v = np.asarray(values, dtype=float)
    ok = np.isfinite(v)
    out: dict = {"value": [float(f"{x:.{DIGITS}g}") if o else None for x, o in zip(v, ok)],
                 "unit": unit}
    if not ok.all():
        out["reason"] = reason
    return out


def _decimation(n: int) -> np.ndarray:
    if n <= FIGURE_POINTS:
        return np.arange(n)
    return np.unique(np.round(np.linspace(0, n - 1, FIGURE_POINTS)).astype(int))


def _corner_entry(path: LaunchPath, corner: Corner, idx: np.ndarray, harmonic: int) -> dict:
    f = corner.frequency
    n_e = path.n_e(corner)
    n2 = np.asarray(path.n2(corner), dtype=complex)[idx]
    acc = path.access(corner)
    reach = path.reach(corner, harmonic)
    wave = path.wave(corner)
    to_z = path.z_at
    landmarks = {name: {"value": [float(to_z(s)) for s in pos], "unit": "m"}
                 for name, pos in acc.landmarks.items()}
    return {
        "density": _q(corner.density, "m^-3"),
        "current_scale": _q(corner.scale, "1"),
        "frequency": _q(f, "Hz"),
        "electron_temperature": _q(corner.electron_temperature, "eV"),
        "n2_real": _array(n2.real, "1"),
        "n2_imag": _array(n2.imag, "1"),
        "x": _array(n_e[idx] / float(critical_density(f)), "1"),
        "y": _array(path.b_of(corner)[idx] / float(ecr_field(f)), "1"),
        "verdict": reach.verdict,
        "target": reach.target,
        "target_z": _q(to_z(reach.target_s) if math.isfinite(reach.target_s) else None, "m",
                       "the target layer is not on the path"),
        "first_cutoff": reach.cutoff,
        "first_cutoff_z": _q(to_z(reach.cutoff_s) if math.isfinite(reach.cutoff_s) else None,
                             "m", "no cutoff before the target"),
        "tunnelling_factor": _q(reach.factor, "1"),
        "landmarks": landmarks,
        "plasma_returned": _q(path.load(corner).returned, "1"),
        "plasma_reflected": _q(wave.reflected, "1"),
        "plasma_absorbed": _q(wave.absorbed, "1"),
        "plasma_transmitted": _q(wave.transmitted, "1"),
        "energy_balance_residual": _q(wave.balance_residual, "1"),
    }


def path_characteristics(ctx) -> dict:
    """Per feed: the mode content (each part of the launched power with its share and, per
    corner, where its power goes), the launch path of the intended mode and, per envelope
    corner, n²(z) (real and imaginary part of
    the collisional n² of the launched wave), X(z) = n_e/n_c, Y(z) = f_ce/f, the target layer,
    first cutoff, tunnelling factor, landmark positions and the full-wave fractions.

    Returns ``{feed_id: {...}}``; a feed without a launched wave gets ``{"reason": ...}``.
    """
    from .resonance import ECR_HARMONIC

    out: dict = {}
    for feed in ctx.model.feeds:
        if feed.absorption in NEAR_FIELD:
            out[feed.id] = {"reason": f"{feed.absorption} coupling: no launched wave along a path"}
            continue
        try:
            out[feed.id] = _feed_entry(ctx, feed, ECR_HARMONIC.get(feed.absorption, 1))
        except Exception as exc:  # a broken field model is reported by the rules; keep the run
            out[feed.id] = {"reason": f"{type(exc).__name__}: {exc}"}
    return out


def _part_entries(ctx, feed) -> dict:
    """Per part of the launched power: its share and, per corner, where its power goes."""
    from .parts import mode_content

    content = mode_content(ctx, feed)
    out = {}
    for part in content.parts:
        path = launch_path(ctx, feed, part.mode)
        corners = []
        for c in path.corners():
            load = path.load(c)
            corners.append({"density": _q(c.density, "m^-3"), "current_scale": _q(c.scale, "1"),
                            "frequency": _q(c.frequency, "Hz"),
                            "fraction": {"value": list(content.fraction_range(part.mode, c)),
                                         "unit": "1"},
                            "returned": _q(load.returned, "1"),
                            "absorbed": _q(load.absorbed, "1"),
                            "escaped": _q(load.escaped, "1"),
                            "first_pass_reflected": _q(load.first.reflected, "1"),
                            "first_pass_absorbed": _q(load.first.absorbed, "1"),
                            "first_pass_transmitted": _q(load.first.transmitted, "1")})
        out[part.mode] = {"wave": path.label, "fraction_low": _q(part.low, "1"),
                          "fraction_high": _q(part.high, "1"), "far_end": path.wall,
                          "far_end_declared": path.wall_declared, "corners": corners}
    return {"polarisation": content.summary(), "parts": out}


def _feed_entry(ctx, feed, harmonic: int) -> dict:
    path = launch_path(ctx, feed)
    if path.problem:
        return {"reason": path.problem}
    idx = _decimation(path.s.size)
    return {
        "mode_content": _part_entries(ctx, feed),
        "wave": path.label,
        "mode": path.mode,
        "angle_to_field": _q(feed.launch.angle_to_field, "rad"),
        "launch_z": _q(path.z0, "m"),
        "direction": path.direction,
        "far_z": _q(path.z_at(path.length), "m"),
        "z": _array(path.z[idx], "m"),
        "distance": _array(path.s[idx], "m"),
        "corners": [_corner_entry(path, c, idx, harmonic) for c in path.corners()],
    }
