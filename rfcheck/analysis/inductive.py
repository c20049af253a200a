"""Inductive feeds over the envelope (no verdicts): the plasma's collision frequency and skin
depth on the feed's envelope grid (density × temperature × pressure × frequency), the
transformer-model load of a declared coil and its range, and the E-to-H transition density.
Read by the inductive.* rules and the characteristics; each cached per feed for the run.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rfcheck.model import Feed
from rfcheck.physics.inductive import (coil_ac_resistance, coil_drive, eh_transition_density,
                                       plasma_skin_depth, transformer_load)

from .launch_path import collision_frequency
from .state import RunState

__all__ = ["EH_GRID", "InductiveEnvelope", "LoadRange", "coil_impedance", "coil_load",
           "eh_transition", "inductive_envelope"]


@dataclass(frozen=True)
class InductiveEnvelope:
    """One inductive feed's envelope as broadcast axes (density, temperature, pressure,
    frequency), with the collision frequency and skin depth on the grid."""

    density: np.ndarray  # (nd, 1, 1, 1) m^-3
    temperature: np.ndarray  # (1, nt, 1, 1) eV
    pressure: np.ndarray  # (1, 1, np, 1) Pa (0 without a neutral gas)
    frequency: np.ndarray  # (1, 1, 1, nf) Hz
    nu: np.ndarray  # full grid, s^-1
    skin_depth: np.ndarray  # full grid, m

    def at(self, idx: tuple[int, ...]) -> dict[str, float]:
        return {"density": float(self.density.reshape(-1)[idx[0]]),
                "temperature": float(self.temperature.reshape(-1)[idx[1]]),
                "pressure": float(self.pressure.reshape(-1)[idx[2]]),
                "frequency": float(self.frequency.reshape(-1)[idx[3]])}


def inductive_envelope(ctx: RunState, feed: Feed) -> InductiveEnvelope:
    """The skin depth of the plasma over the envelope of one feed (cached per run)."""
    key = ("inductive-envelope", feed.id)
    if key not in ctx._cache:
        plasma = ctx.model.plasma
        n = ctx.envelope.density[:, None, None, None]
        t = ctx.envelope.electron_temperature[None, :, None, None]
        gas = plasma.neutral
        p = (np.unique([gas.pressure.min, gas.pressure.max]) if gas is not None
             else np.array([0.0]))[None, None, :, None]
        f = ctx.envelope.frequencies(feed)[None, None, None, :]
        shape = np.broadcast_shapes(n.shape, t.shape, p.shape, f.shape)
        nu = np.broadcast_to(collision_frequency(plasma, n, t, p if gas is not None else None),
                             shape)
        delta = plasma_skin_depth(n, f, nu)
        ctx._cache[key] = InductiveEnvelope(n, t, p, f, np.array(nu), np.asarray(delta))
    return ctx._cache[key]


@dataclass(frozen=True)
class LoadRange:
    resistance: tuple[float, float]  # ohm, Re Z over the envelope
    reactance: tuple[float, float]  # ohm, Im Z
    plasma_resistance: tuple[float, float]
    coil_resistance: float
    coil_resistance_basis: str
    efficiency: tuple[float, float]
    worst_efficiency_at: dict[str, float]
    current: float  # A, peak, largest over the envelope at full power
    voltage: float  # V, peak, largest


def _coil_resistance(feed: Feed, f: np.ndarray) -> tuple[np.ndarray, str]:
    c = feed.coil
    if c.resistance is not None:
        return np.full(f.shape, c.resistance), "declared"
    return (coil_ac_resistance(c.conductor_length, c.conductor_diameter, f),
            "skin effect of copper, a lower estimate")


def coil_impedance(ctx: RunState, feed: Feed):
    """The transformer-model load of a declared coil on the whole envelope grid of the feed
    (CoilLoad, the coil resistance and its basis). Cached per run."""
    key = ("inductive-impedance", feed.id)
    if key not in ctx._cache:
        env = inductive_envelope(ctx, feed)
        c = feed.coil
        r_coil, basis = _coil_resistance(feed, env.frequency)
        out = transformer_load(env.density, env.frequency, env.nu, turns=c.turns,
                               coil_radius=c.radius, coil_length=c.length,
                               plasma_radius=ctx.model.chamber.radius, coil_resistance=r_coil)
        ctx._cache[key] = (out, r_coil, basis)
    return ctx._cache[key]


def coil_load(ctx: RunState, feed: Feed) -> LoadRange | None:
    """The transformer-model load of one inductive feed's declared coil over the envelope
    (None without a coil). Cached per run."""
    if feed.coil is None:
        return None
    key = ("inductive-load", feed.id)
    if key not in ctx._cache:
        env = inductive_envelope(ctx, feed)
        out, r_coil, basis = coil_impedance(ctx, feed)
        drive = coil_drive(feed.power, out.impedance)
        z = out.impedance
        eff = np.broadcast_to(out.efficiency, z.shape)
        idx = np.unravel_index(int(np.argmin(np.where(np.isnan(eff), -np.inf, eff))), z.shape)
        ctx._cache[key] = LoadRange(
            (float(np.min(z.real)), float(np.max(z.real))),
            (float(np.min(z.imag)), float(np.max(z.imag))),
            (float(np.min(out.plasma_resistance)), float(np.max(out.plasma_resistance))),
            float(np.max(r_coil)), basis,
            (float(np.min(eff)), float(np.max(eff))), env.at(idx),
            float(np.max(drive.current)), float(np.max(drive.voltage)))
    return ctx._cache[key]


#: density grid of the E-to-H transition search, m^-3 (geometric)
EH_GRID = np.geomspace(1e13, 1e21, 961)


def eh_transition(ctx: RunState, feed: Feed) -> tuple[float, dict[str, float]]:
    """The largest E-to-H transition density over the envelope's temperature, pressure and
    frequency, and the point where it is largest (cached per run)."""
    key = ("inductive-eh", feed.id)
    if key not in ctx._cache:
        env = inductive_envelope(ctx, feed)
        plasma = ctx.model.plasma
        n = EH_GRID[None, None, None, :]
        t = env.temperature.reshape(-1)[:, None, None, None]
        p = env.pressure.reshape(-1)[None, :, None, None]
        f = env.frequency.reshape(-1)[None, None, :, None]
        nu = collision_frequency(plasma, n, t, p if plasma.neutral is not None else None)
        c = feed.coil
        n_eh = eh_transition_density(n, f, nu, turns=c.turns, coil_radius=c.radius,
                                     coil_length=c.length,
                                     plasma_radius=ctx.model.chamber.radius)
        n_eh = np.broadcast_to(n_eh, np.broadcast_shapes(t.shape, p.shape, f.shape)[:3])
        i = np.unravel_index(int(np.argmax(np.where(np.isnan(n_eh), np.inf, n_eh))), n_eh.shape)
        at = {"density": float(n_eh[i]), "temperature": float(t.reshape(-1)[i[0]]),
              "pressure": float(p.reshape(-1)[i[1]]), "frequency": float(f.reshape(-1)[i[2]])}
        ctx._cache[key] = (float(n_eh[i]), at)
    return ctx._cache[key]
