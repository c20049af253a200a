"""Inductive (13.56 MHz-class) feeds: skin depth against the plasma radius, and the
coil-plasma load of the transformer model over the envelope. The numbers over the envelope
(skin depth, coil load, E-to-H transition density) are analyses of
:mod:`rfcheck.analysis.inductive`; these rules compare them with their limits.

These rules speak only about feeds with ``absorption = "inductive"``; a source without one
gets no finding from them (they are about a source kind, not a check every source needs).
"""

from __future__ import annotations

import math
from collections.abc import Iterator

import numpy as np

from rfcheck.analysis.inductive import (InductiveEnvelope, coil_impedance, coil_load,
                                        eh_transition, inductive_envelope)
from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.model import Feed
from rfcheck.physics.constants import TWO_PI
from rfcheck.physics.inductive import (coil_drive, collisional_skin_depth,
                                       collisionless_skin_depth, skin_depth_regime)
from rfcheck.physics.matching import Element, match_network

from .context import Context
from .registry import Option, Range, rule


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


# ----------------------------------------------------------------------------- matching network

_UNIT = {"capacitor": (1e-12, "pF"), "inductor": (1e-6, "µH")}
_CAUTION = ("high voltage: insulation, clearances, interlocks and any work on the coil and the "
            "matching network to the local electrical codes and by qualified personnel; this "
            "estimate does not replace that review")


def _element_text(i: int, el, value: float | None = None) -> str:
    scale, unit = _UNIT[el.kind]
    at = "" if value is None or not math.isfinite(value) else f" at {value / scale:.4g} {unit}"
    return (f"{el.connection} {el.kind} {i + 1}{at} (range {el.low / scale:.4g}–"
            f"{el.high / scale:.4g} {unit})")


@rule("inductive.matching-range", severity=Severity.ERROR,
      summary="Over the envelope, the declared matching network reaches the coil's load within "
              "its components' ranges, with travel left on the tightest one.",
      options={"min_margin": Option("ratio", "least distance of a matched component's value to "
                                             "the nearer end of its range, as a fraction of the "
                                             "range",
          valid=Range(0.0, 0.5, "the middle of a range is half of it away from either end",
                      "%"))},
      applies="inductive feeds that declare their coil and its matching network")
def matching_range(ctx: Context, *, min_margin: float) -> Iterator[Finding]:
    """What it checks
    At every point of the envelope (density, electron temperature, neutral pressure and
    frequency) the load the coil presents (the transformer model of
    inductive.coupling-efficiency) is matched to the generator's impedance by the declared L,
    pi or T network: the element values that give Z_in = Z0 are solved (an L section in
    closed form; a pi or T network by sweeping its generator-side element over its range,
    241 values, and solving the other two in closed form), and the least margin of an element
    to the nearer end of its range is taken at the best solution. The finding reports the
    worst point of the envelope, the element that binds there and its value.

    Why it matters
    A matching network that cannot reach the load at some point of the envelope leaves the
    generator looking into a mismatch: reflected power, a generator fold-back or trip, and a
    discharge that cannot be held at that density, pressure or after a density drop. An
    automatic match that runs to an end stop hunts; travel left on every element covers the
    drift of the load with wall state, temperature and the model's own uncertainty.

    Equation
    Z_L = R_coil + jωL11 + ω²L12²/(R_p + jω(L_mp + L_e)); L section (shunt on the generator
    side): X' = √(R_L/G_t − R_L²), B_a = B_t + X'/(R_L² + X'²), X_b = X' − X_L; for resistive
    ends Q = √(R_high/R_low − 1). Element margin min(v − low, high − v)/(high − low).

    Options
    min_margin: default 5 % of each element's range (common practice: keep the tuning
    elements off their end stops).

    References
    D. M. Pozar, Microwave Engineering, 4th ed. (Wiley 2012), §5.1 (L-section matching);
    C. Bowick, RF Circuit Design, 2nd ed. (Newnes 2008), ch. 4 (L, pi and T networks);
    M. A. Lieberman & A. J. Lichtenberg, Principles of Plasma Discharges and Materials
    Processing, 2nd ed. (Wiley 2005), §12.2 (the coil load). Lossless components: the
    network's own loss and stray capacitance are not modelled.
    """
    requirement = (f"matching network reaches the coil's load over the envelope with each "
                   f"element ≥ {min_margin:.0%} of its range from an end")
    has_gas = ctx.model.plasma.neutral is not None
    for feed in ctx.model.feeds:
        if feed.absorption != "inductive":
            continue
        subject = f"feed {feed.id}"
        if feed.coil is None:
            yield ctx.not_applicable(subject, requirement, "no coil declared for this inductive "
                                     "feed (feed.coil): the load cannot be estimated")
            continue
        mn = feed.coil.matching
        if mn is None:
            yield ctx.not_applicable(subject, requirement, "no matching network declared "
                                     "(feed.coil.matching): whether the load can be matched is "
                                     "not reviewed")
            continue
        env = inductive_envelope(ctx, feed)
        load, _, _ = coil_impedance(ctx, feed)
        z = load.impedance
        els = [Element(e.kind, e.connection, e.low, e.high) for e in mn.elements]
        m = match_network(els, z, np.broadcast_to(env.frequency, z.shape), mn.impedance)
        idx = np.unravel_index(int(np.argmin(m.margin)), z.shape)
        worst = float(m.margin[idx])
        tight = int(m.tightest[idx])
        zi = complex(z[idx])
        point = env.at(idx)
        reached = int(np.count_nonzero(m.margin >= 0))
        if math.isfinite(worst):
            values = [float(v[idx]) for v in m.values]
            binding = _element_text(tight, els[tight], values[tight])
            msg = (f"least margin {worst:.1%} of its range on the {binding}, at the load "
                   f"Z = {zi.real:.3g} {'+' if zi.imag >= 0 else '−'} j{abs(zi.imag):.4g} Ω "
                   f"(n_e = {point['density']:.3g} m^-3); {mn.topology} network into "
                   f"{mn.impedance:.3g} Ω reaches {reached} of {m.margin.size} envelope points")
            if worst < 0:
                msg += ": the element would have to be set outside its range"
        else:
            msg = (f"the {mn.topology} network cannot match the load Z = {zi.real:.3g} "
                   f"{'+' if zi.imag >= 0 else '−'} j{abs(zi.imag):.4g} Ω (n_e = "
                   f"{point['density']:.3g} m^-3) with these kinds of elements at any setting "
                   f"(it reaches {reached} of {m.margin.size} envelope points)")
        yield ctx.finding(subject, requirement, passed=worst >= min_margin, message=msg,
                          measured=Quantity(worst if math.isfinite(worst) else None, "1",
                                            "" if math.isfinite(worst) else "no solution"),
                          limit=Quantity(min_margin, "1"),
                          margin=Quantity(worst - min_margin if math.isfinite(worst) else None,
                                          "1", "" if math.isfinite(worst) else "no solution"),
                          worst_case=_where(point, has_gas),
                          details={"topology": mn.topology, "binding_element": tight + 1,
                                   "load_ohm": [zi.real, zi.imag],
                                   "points_reached": reached, "points": int(m.margin.size)})


@rule("inductive.coil-voltage", severity=Severity.ERROR,
      summary="At full power, the peak RF voltage across the coil stays below a fraction of "
              "the insulation and clearance rating declared for it.",
      options={"max_fraction": Option("ratio", "largest allowed peak coil voltage as a fraction "
                                               "of the declared rating",
          valid=Range(0.0, 1.0, "a voltage above the rating is not within it", "%",
                      low_open=True))},
      applies="inductive feeds that declare their coil")
def coil_voltage(ctx: Context, *, max_fraction: float) -> Iterator[Finding]:
    """What it checks
    The largest peak voltage across the coil terminals over the envelope when the coil absorbs
    the feed's peak power, |V| = |I| |Z| with |I| = √(2P/Re Z) (the transformer-model load,
    see inductive.coupling-efficiency), against max_fraction × the peak voltage the coil's
    insulation and clearances are rated for (feed.coil.max_voltage_kv). The largest voltage is
    at the least load resistance, usually the lowest density. The finding always carries a
    high-voltage caution.

    Why it matters
    The coil of an inductive source carries kilovolts at 13.56 MHz: across its turns, to the
    grounded enclosure and through the discharge tube (the capacitive coupling that sputters
    the window). Arcing or tracking over the insulation destroys the coil, the tube or the
    matching network, and an RF burn from a live coil is deep and severe. The rating comes
    from the insulation, the creepage and clearance distances and the local electrical
    codes; this check only compares the estimate with it.

    Equation
    |V| = √(2P/Re Z) |Z| (circuit theory; Z from the transformer model).

    Options
    max_fraction: default 80 % (common practice: a derating margin for the model's
    uncertainty, the short-coil inductance and transients at strike).

    References
    M. A. Lieberman & A. J. Lichtenberg, Principles of Plasma Discharges and Materials
    Processing, 2nd ed. (Wiley 2005), §12.2. The coil's voltage to ground depends on how it is
    connected (one end grounded, or balanced); the terminal voltage is the larger one.
    """
    requirement = f"peak coil voltage at full power ≤ {max_fraction:.0%} of its declared rating"
    has_gas = ctx.model.plasma.neutral is not None
    for feed in ctx.model.feeds:
        if feed.absorption != "inductive":
            continue
        subject = f"feed {feed.id}"
        if feed.coil is None:
            yield ctx.not_applicable(subject, requirement, "no coil declared for this inductive "
                                     "feed (feed.coil): the coil voltage cannot be estimated; "
                                     + _CAUTION)
            continue
        env = inductive_envelope(ctx, feed)
        out, _, _ = coil_impedance(ctx, feed)
        volts = coil_drive(feed.power, out.impedance).voltage
        idx = np.unravel_index(int(np.argmax(np.where(np.isnan(volts), np.inf, volts))),
                               volts.shape)
        worst = float(volts[idx])
        point = env.at(idx)
        rating = feed.coil.max_voltage
        found = (f"up to {_volts(worst)} peak across the coil at "
                 f"{Quantity(feed.power, 'W').text()} (n_e = {point['density']:.3g} m^-3, "
                 f"Re Z = {float(out.impedance[idx].real):.3g} Ω)")
        if rating is None:
            yield ctx.not_applicable(subject, requirement, found + "; no insulation and "
                                     "clearance rating declared (feed.coil.max_voltage_kv); "
                                     + _CAUTION, details={"coil_voltage_peak": worst})
            continue
        limit = max_fraction * rating
        msg = (found + f", against {_volts(limit)} ({max_fraction:.0%} of the declared "
               f"{_volts(rating)} rating); " + _CAUTION)
        yield ctx.finding(subject, requirement, passed=worst <= limit, message=msg,
                          measured=Quantity(worst, "V"), limit=Quantity(limit, "V"),
                          margin=Quantity(limit - worst, "V"), worst_case=_where(point, has_gas),
                          details={"coil_voltage_peak": worst, "rating": rating})


# ----------------------------------------------------------------------------- E-H transition

@rule("inductive.h-mode", severity=Severity.WARNING,
      summary="The lowest density of the envelope lies above the E-to-H transition density of "
              "the transformer model, so the discharge stays in the inductive (H) mode.",
      options={"min_ratio": Option("ratio", "least ratio of the envelope's lowest density to the "
                                            "E-to-H transition density",
          valid=Range(1.0, 100.0, "at or below the transition the inductive mode is not "
                                  "stable; a hundredfold margin is beyond any design", "1"))},
      applies="inductive feeds that declare their coil")
def h_mode(ctx: Context, *, min_ratio: float) -> Iterator[Finding]:
    """What it checks
    The E-to-H transition density n_EH of the coil and plasma (the density of the first
    maximum over density of the plasma's resistance seen by the coil, at fixed coil current;
    the transformer model over the envelope's electron temperature, neutral pressure and frequency, the
    largest n_EH taken) against the envelope's lowest density: n_min / n_EH ≥ min_ratio.
    The transition density is also stated as a characteristic of the source.

    Why it matters
    Below the transition the inductive absorption grows with density no faster than the
    losses and the discharge falls back to the capacitive E mode: dim, low density, with a
    large sheath voltage under the coil that sputters the window, and a jump (with
    hysteresis) in the load the matching network sees. A process run near the low end of its
    density range then flips between modes.

    Equation
    R_ind(n) = Re ω²L12²/(R_p + jω(L_mp + L_e)); n_EH = its first maximum over n (∝ n below,
    ∝ n^-1/2 above in the thin-skin limit).

    Options
    min_ratio: default 1.5 (common practice, from memory: transitions show hysteresis and the
    capacitive coupling of the coil shifts them; keep the envelope clear of the point).

    References
    M. A. Lieberman & A. J. Lichtenberg, Principles of Plasma Discharges and Materials
    Processing, 2nd ed. (Wiley 2005), §12.2 (absorbed power against density) and §12.3 (E-H
    transitions and hysteresis) — the criterion from memory, confidence medium.
    """
    requirement = f"lowest density ≥ {min_ratio:.3g} × the E-to-H transition density"
    has_gas = ctx.model.plasma.neutral is not None
    for feed in ctx.model.feeds:
        if feed.absorption != "inductive":
            continue
        subject = f"feed {feed.id}"
        if feed.coil is None:
            yield ctx.not_applicable(subject, requirement, "no coil declared for this inductive "
                                     "feed (feed.coil): the transition cannot be estimated")
            continue
        n_eh, at = eh_transition(ctx, feed)
        n_min = ctx.model.plasma.density.min
        if not math.isfinite(n_eh):
            yield ctx.finding(subject, requirement, passed=False, message=(
                "no E-to-H transition found between 1e13 and 1e21 m^-3 (the plasma's "
                "resistance has no maximum there)"), measured=Quantity(None, "1", "no transition"),
                limit=Quantity(min_ratio, "1"), worst_case=_where(at, has_gas))
            continue
        ratio = n_min / n_eh
        msg = (f"E-to-H transition at n_EH = {n_eh:.3g} m^-3 (largest over the envelope, at "
               f"T_e = {at['temperature']:.3g} eV" + (f", p = {at['pressure']:.3g} Pa" if has_gas
                                                      else "")
               + "; criterion: first maximum over density of the plasma's resistance seen by "
                 f"the coil, transformer model); lowest density {n_min:.3g} m^-3 is {ratio:.3g} × n_EH")
        yield ctx.finding(subject, requirement, passed=ratio >= min_ratio, message=msg,
                          measured=Quantity(ratio, "1"), limit=Quantity(min_ratio, "1"),
                          margin=Quantity(ratio - min_ratio, "1"),
                          worst_case=_where(at, has_gas),
                          details={"eh_transition_density": n_eh})
