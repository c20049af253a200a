"""Inductive (13.56 MHz-class) feeds: skin depth against the plasma radius, and the
coil-plasma load of the transformer model over the envelope.

These rules speak only about feeds with ``absorption = "inductive"``; a source without one
gets no finding from them (they are about a source kind, not a check every source needs).
"""

from __future__ import annotations

import math
from collections.abc import Iterator
from dataclasses import dataclass

import numpy as np

from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.model import Feed
from rfcheck.physics.constants import TWO_PI
from rfcheck.physics.inductive import (coil_ac_resistance, coil_drive, collisional_skin_depth,
                                       collisionless_skin_depth, plasma_skin_depth,
                                       skin_depth_regime, transformer_load)

from .context import Context
from .path import collision_frequency
from .registry import Option, Range, rule

__all__ = ["InductiveEnvelope", "inductive_envelope"]


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


def inductive_envelope(ctx: Context, feed: Feed) -> InductiveEnvelope:
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


def _volts(x: float) -> str:
    return f"{x / 1e3:.3g} kV" if abs(x) >= 1e3 else f"{x:.3g} V"


def _mm(x: float) -> str:
    return Quantity(x, "m").text()


def _where(point: dict[str, float], has_gas: bool) -> dict[str, Quantity]:
    out = {"density": Quantity(point["density"], "m^-3"),
           "electron_temperature": Quantity(point["temperature"], "eV"),
           "frequency": Quantity(point["frequency"], "Hz")}
    if has_gas:
        out["pressure"] = Quantity(point["pressure"], "Pa")
    return out


@rule("inductive.skin-depth", severity=Severity.ERROR,
      summary="Over the envelope, the RF field of each inductive feed is confined to a skin "
              "layer thinner than a fraction of the plasma radius.",
      options={"max_fraction": Option("ratio", "largest allowed skin depth as a fraction of the "
                                               "plasma (chamber) radius",
          valid=Range(0.0, 1.0, "a skin depth of the whole radius or more means the field "
                                "fills the column: there is no skin layer left to bound", "%",
                      low_open=True))},
      applies="feeds with absorption = \"inductive\"")
def skin_depth(ctx: Context, *, max_fraction: float) -> Iterator[Finding]:
    """What it checks
    The skin depth δ of the plasma at the feed's frequency over the whole envelope (peak
    density, electron temperature, neutral pressure and frequency ranges), against
    max_fraction × R, R the chamber radius (the plasma column's radius). The worst point is
    the largest δ, at the lowest density. The finding names the regime there from ν/ω
    (collisionless below 0.1, collisional above 10, intermediate between) and gives both
    limiting forms beside the general one. ν is the electron collision frequency of the
    launch-path rules (electron-neutral from the declared gas's tabulated cross section plus
    electron-ion). Where the coil is declared, the message adds the load the coil presents
    over the envelope (transformer model; see inductive.coupling-efficiency).

    Why it matters
    An inductive source heats its electrons in the skin layer under the coil; the
    transformer picture of the load (and the dense, inductive H mode) rests on a layer thin
    against the radius. Where δ approaches R at the low end of the density range the field
    fills the column, the plasma's share of the load resistance collapses and the discharge
    can fall back to the weak capacitive E mode, or not re-ignite inductively after a
    density drop; the matching network then sees a very different load.

    Equation
    δ = 1 / Im k, k = (ω/c) √ε_p, ε_p = 1 − ω_pe² / (ω (ω + iν));
    limits δ_p = c / ω_pe (ν ≪ ω ≪ ω_pe) and δ_c = √(2 / (ω μ0 σ_dc)), σ_dc = e² n_e / (m_e ν)
    (ν ≫ ω).

    Options
    max_fraction: largest δ / R (default 50 %, common practice: a design estimate that keeps
    the layer distinct from the column; the transformer model assumes δ ≪ R).

    References
    M. A. Lieberman & A. J. Lichtenberg, Principles of Plasma Discharges and Materials
    Processing, 2nd ed. (Wiley 2005), §12.1 (skin depths), §12.2 (transformer model),
    §12.3 (E-H transitions). The local cold-plasma skin depth: the anomalous (warm,
    non-local) skin effect of very low pressure is not modelled.
    """
    radius = ctx.model.chamber.radius
    limit = max_fraction * radius
    requirement = (f"skin depth ≤ {max_fraction:.3g} × chamber radius {_mm(radius)} = "
                   f"{_mm(limit)} over the envelope")
    has_gas = ctx.model.plasma.neutral is not None
    for feed in ctx.model.feeds:
        if feed.absorption != "inductive":
            continue
        env = inductive_envelope(ctx, feed)
        delta = env.skin_depth
        key = np.where(np.isnan(delta), np.inf, delta)
        idx = np.unravel_index(int(np.argmax(key)), delta.shape)
        worst = float(delta[idx])
        point = env.at(idx)
        nu = float(env.nu[idx])
        f = point["frequency"]
        regime = str(skin_depth_regime(f, nu))
        dp = float(collisionless_skin_depth(point["density"]))
        dc = float(collisional_skin_depth(point["density"], f, nu)) if nu > 0 else math.nan
        lo = float(np.nanmin(delta))
        msg = (f"largest skin depth {_mm(worst)} at n_e = {point['density']:.3g} m^-3, "
               f"T_e = {point['temperature']:.3g} eV"
               + (f", p = {point['pressure']:.3g} Pa" if has_gas else "")
               + f": {regime} (ν/ω = {nu / (TWO_PI * f):.3g}; c/ω_pe = {_mm(dp)}"
               + (f", √(2/(ωμ0σ_dc)) = {_mm(dc)}" if math.isfinite(dc) else "")
               + f"), against {_mm(limit)} ({max_fraction:.3g} of the radius); over the "
                 f"envelope {_mm(lo)} to {_mm(worst)}")
        load = _load_text(ctx, feed, env)
        if load:
            msg += "; " + load
        if not math.isfinite(worst):
            msg = ("no skin depth: the field propagates through the plasma at the low end of "
                   "the envelope (ω above ω_pe without collisions); " + msg)
        yield ctx.finding(f"feed {feed.id}", requirement, passed=worst <= limit, message=msg,
                          measured=Quantity(worst if math.isfinite(worst) else None, "m",
                                            "" if math.isfinite(worst) else "no skin layer"),
                          limit=Quantity(limit, "m"),
                          margin=Quantity(limit - worst if math.isfinite(worst) else None, "m",
                                          "" if math.isfinite(worst) else "no skin layer"),
                          worst_case=_where(point, has_gas),
                          details={"regime": regime, "nu_over_omega": nu / (TWO_PI * f)})


# ----------------------------------------------------------------------------- the coil load

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


def coil_load(ctx: Context, feed: Feed) -> LoadRange | None:
    """The transformer-model load of one inductive feed's declared coil over the envelope
    (None without a coil). Cached per run."""
    if feed.coil is None:
        return None
    key = ("inductive-load", feed.id)
    if key not in ctx._cache:
        env = inductive_envelope(ctx, feed)
        c = feed.coil
        f = env.frequency
        if c.resistance is not None:
            r_coil, basis = np.full(f.shape, c.resistance), "declared"
        else:
            r_coil = coil_ac_resistance(c.conductor_length, c.conductor_diameter, f)
            basis = "skin effect of copper, a lower estimate"
        out = transformer_load(env.density, f, env.nu, turns=c.turns, coil_radius=c.radius,
                               coil_length=c.length, plasma_radius=ctx.model.chamber.radius,
                               coil_resistance=r_coil)
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


def _load_text(ctx: Context, feed: Feed, env: InductiveEnvelope) -> str:
    load = coil_load(ctx, feed)
    if load is None:
        return ""
    return (f"coil load over the envelope R = {load.resistance[0]:.3g}–{load.resistance[1]:.3g} Ω, "
            f"X = {load.reactance[0]:.4g}–{load.reactance[1]:.4g} Ω (transformer model)")


@rule("inductive.coupling-efficiency", severity=Severity.WARNING,
      summary="Over the envelope, the plasma takes at least a set share of the power the "
              "coil absorbs (transformer model of the coil-plasma load).",
      options={"min_efficiency": Option("ratio", "least share of the coil's absorbed power that "
                                                 "goes into the plasma",
          valid=Range(0.0, 1.0, "a share of the power is between 0 and 100 %", "%"))},
      applies="inductive feeds that declare their coil")
def coupling_efficiency(ctx: Context, *, min_efficiency: float) -> Iterator[Finding]:
    """What it checks
    The power-transfer efficiency R_plasma / (R_plasma + R_coil) of the transformer model
    over the envelope (density, temperature, pressure, frequency), its least value against
    min_efficiency. The message gives the load the coil presents to the matching network
    (R and X ranges), the coil's own resistance (declared, or estimated from its conductor
    with the skin effect only, which ignores the proximity effect between turns: a lower
    estimate, so the efficiency is an upper one), and the largest peak coil current and
    terminal voltage at the feed's peak power. The coil voltage is stated for the
    insulation and clearance review; rfcheck does not judge it against a limit.

    Why it matters
    Power the coil dissipates heats the coil and its cooling water, not the plasma; at low
    density the plasma resistance falls and the coil current (and the voltage across it)
    rises for the same delivered power. Several hundred volts to kilovolts across an RF
    coil need insulation and clearance to local codes: high voltage is present whenever the
    source runs.

    Equation
    Z = R_coil + jω L11 + ω² L12² / (R_p + jω (L_mp + L_e)) (Lieberman & Lichtenberg §12.2);
    efficiency = Re(reflected) / (Re(reflected) + R_coil); |I| = √(2P/Re Z), |V| = |I| |Z|.

    Options
    min_efficiency: default 70 % (common practice, from memory: well-designed inductive
    sources transfer most of the power to the plasma except near the E-H transition).

    References
    M. A. Lieberman & A. J. Lichtenberg, Principles of Plasma Discharges and Materials
    Processing, 2nd ed. (Wiley 2005), §12.2 (transformer model, power transfer efficiency).
    """
    requirement = f"plasma's share of the coil's absorbed power ≥ {min_efficiency:.0%}"
    has_gas = ctx.model.plasma.neutral is not None
    for feed in ctx.model.feeds:
        if feed.absorption != "inductive":
            continue
        load = coil_load(ctx, feed)
        if load is None:
            yield ctx.not_applicable(f"feed {feed.id}", requirement,
                                     "no coil declared for this inductive feed (feed.coil): the "
                                     "load cannot be estimated")
            continue
        worst = load.efficiency[0]
        at = load.worst_efficiency_at
        msg = (f"least efficiency {worst:.1%} at n_e = {at['density']:.3g} m^-3 (largest "
               f"{load.efficiency[1]:.1%}); load R = {load.resistance[0]:.3g}–"
               f"{load.resistance[1]:.3g} Ω (plasma {load.plasma_resistance[0]:.3g}–"
               f"{load.plasma_resistance[1]:.3g} Ω, coil {load.coil_resistance:.3g} Ω, "
               f"{load.coil_resistance_basis}), X = {load.reactance[0]:.4g}–"
               f"{load.reactance[1]:.4g} Ω; at {Quantity(feed.power, 'W').text()} the coil "
               f"carries up to {load.current:.3g} A peak with {_volts(load.voltage)} "
               "peak across it: insulation and clearance to local codes")
        yield ctx.finding(f"feed {feed.id}", requirement, passed=worst >= min_efficiency,
                          message=msg, measured=Quantity(worst, "1"),
                          limit=Quantity(min_efficiency, "1"),
                          margin=Quantity(worst - min_efficiency, "1"),
                          worst_case=_where(at, has_gas),
                          details={"coil_current_peak": load.current,
                                   "coil_voltage_peak": load.voltage,
                                   "resistance_ohm": list(load.resistance),
                                   "reactance_ohm": list(load.reactance)})
