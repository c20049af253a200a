"""Dielectric windows in each feed's line: reflection, reflection band and absorbed power.

All three rules read one shared computation (rfcheck.analysis.window.window_analysis): the
window's worst cases over f ± tolerance and the spread of every layer (thickness tolerance,
ε_r and tan δ ranges of its material, tan δ scaled to the feed frequency), found by the
bounded search of rfcheck.physics.window_spread and cached on the Context.
"""

from __future__ import annotations

import math
from collections.abc import Iterator

from rfcheck.analysis.window import BAND_SPAN, WindowAnalysis, embedding_text, window_analysis
from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.physics.rfpower import absorbed_power, reflected_power, return_loss_db, vswr

from .context import Context
from .registry import Option, Range, rule
from rfcheck.physics.window_spread import SpreadWorst, StackPoint


_NO_WAVE = "the line does not propagate over f ± tolerance (see line.waveguide-band)"


def _mm(t: float) -> str:
    return f"{t * 1e3:.4g} mm"


_FIELD = {"thickness": "thickness", "permittivity": "eps_r", "loss_tangent": "tan_delta"}
_UNIT = {"thickness": "m", "permittivity": "1", "loss_tangent": "1"}


def _where(a: WindowAnalysis, f: float | None, point: StackPoint) -> dict[str, Quantity]:
    """The worst-case point: frequency and every parameter that has a spread."""
    out: dict[str, Quantity] = {}
    if f is not None and a.frequency.size > 1:
        out["frequency"] = Quantity(f, "Hz")
    multi = len(a.window.layers) > 1
    for i, kind in a.varied():
        name = f"{kind}_{i + 1}" if multi else kind
        out[name] = Quantity(getattr(point, _FIELD[kind])[i], _UNIT[kind])
    return out


def _w(p: float) -> str:
    return Quantity(p, "W").text()


def _point_text(a: WindowAnalysis, point: StackPoint) -> str:
    """Each layer's thickness, ε_r and tan δ at a combination, in words."""
    parts = [f"{_mm(t)}, ε_r {e:.4g}, tan δ {d:.3g}"
             for t, e, d in zip(point.thickness, point.eps_r, point.tan_delta)]
    if len(parts) == 1:
        return parts[0]
    return "; ".join(f"layer {i + 1} ({la.material}) {p}"
                     for i, (la, p) in enumerate(zip(a.window.layers, parts)))


def _spread_text(a: WindowAnalysis) -> str:
    included, missing = a.notes()
    text = ("spreads included: " + "; ".join(included)) if included else "no spread included"
    if missing:
        text += "; not declared or flagged: " + "; ".join(missing)
    return text


def _search_text(w: SpreadWorst, nf: int) -> str:
    return (f"{w.evaluations} combinations × {nf} frequencies searched ({w.method})"
            + ("" if w.converged else "; the search stopped at its budget, so a worse "
               "combination may exist"))


def _no_windows(ctx: Context, requirement: str) -> Iterator[Finding]:
    if not ctx.model.windows:
        yield ctx.not_applicable("windows", requirement, "the source declares no [[window]]")


@rule("window.reflection", severity=Severity.ERROR,
      summary="Each window's worst reflection |Γ| over f ± tolerance, the thickness "
              "tolerance and the material spreads stays under the limit.",
      options={"max_gamma": Option("ratio", "highest allowed |Γ| of a window "
                                            "(VSWR = (1 + |Γ|)/(1 − |Γ|))",
          valid=Range(0.0, 1.0,
                      "|Gamma| of a passive window lies between 0 and 1; a limit of 1 (total "
                      "reflection) would accept any window, 0 none", "1", low_open=True, high_open=True))},
      applies="every window, in the dominant mode of its feed's line (TE10/TE11 guide mode; "
              "plane wave at normal incidence for coaxial and free-space feeds)")
def window_reflection(ctx: Context, *, max_gamma: float) -> Iterator[Finding]:
    """What it checks
    The magnitude of the reflection coefficient |Γ| of each window (a stack of dielectric
    layers filling the line's cross-section) embedded in its feed's line: the TE10 wave
    impedances of a rectangular guide (TE11 of a circular guide), a plane wave at normal
    incidence for free space and coaxial line. The worst |Γ| over the feed's band
    f ± tolerance (41 frequencies) and the box of every layer's parameters (thickness
    ± tolerance; ε_r and tan δ over the material's range: declared in the spec, from the
    library, or the stated default spread where none is declared; tan δ scaled to the top
    of the band) is compared with the limit. The worst case is found by the bounded search
    of rfcheck.physics.window_spread (the whole three-level grid for up to five varied
    parameters, else the worst vertices of the linearised response and a coordinate ascent,
    at most 4096 combinations). The finding names the frequency and each varied parameter
    at the worst point, which spreads were included and which were not declared. The
    message also gives VSWR, return loss and the reflected power at the feed's peak power.

    Why it matters
    The reflected wave returns to the generator: it loads the circulator, pulls a magnetron
    off frequency and raises the standing wave (and so the peak field) between the
    generator and the window. A window near an odd quarter-wave thickness reflects most:
    VSWR = ε_r for a lossless slab in free space. A half-wave window is matched only at its
    nominal permittivity and thickness: the part as supplied, from another lot or grade,
    reflects. The reflection of the plasma load adds to this and is judged by the load.*
    rules.

    Equation
    Transfer (ABCD) matrix of the stack, each layer ε = ε_r(1 − j tan δ), in the mode's
    wave impedances Z_TE = η0 k0 / β (β² = k0² ε − k_c²); Γ = S11 with equal real port
    impedances. VSWR = (1 + |Γ|)/(1 − |Γ|); RL = −20 log10 |Γ|.

    Options
    max_gamma: highest allowed |Γ| (default 0.2, i.e. VSWR 1.5, return loss 14 dB; common
    practice for a window in a high-power line).

    References
    M. Born & E. Wolf, Principles of Optics, 7th ed. (1999), §1.6; D. M. Pozar, Microwave
    Engineering, 4th ed. (2012), §2.3, §3.3, §4.4. Material data: rfcheck/data/materials.toml
    (ε_r, tan δ and their ranges at the stated frequency; measured values of the supplied
    part take precedence); loss-tangent frequency rule:
    rfcheck.physics.multilayer.loss_tangent_scale.
    """
    requirement = f"|Γ| ≤ {max_gamma:.3g} (VSWR ≤ {float(vswr(max_gamma)):.3g})"
    yield from _no_windows(ctx, requirement)
    for window in ctx.model.windows:
        a = window_analysis(ctx, window)
        subject = f"window {window.id}"
        w = a.reflection
        g, f = w.value, w.frequency
        if math.isnan(g):
            yield ctx.finding(subject, requirement, passed=False,
                              message=f"|Γ| is undefined: {_NO_WAVE}",
                              measured=Quantity(None, "1", _NO_WAVE),
                              limit=Quantity(max_gamma, "1"),
                              worst_case=_where(a, f, a.nominal_point))
            continue
        p_r = float(reflected_power(a.feed.power, g))
        rl = float(return_loss_db(g)) if g > 0 else math.inf
        passed = g <= max_gamma
        verb = "within" if passed else "above"
        msg = (f"worst |Γ| {g:.3g} (VSWR {float(vswr(g)):.3g}, return loss {rl:.3g} dB) at "
               f"{f / 1e9:.5g} GHz with {_point_text(a, w.point)}, {verb} the limit "
               f"{max_gamma:.3g}; nominal |Γ| {a.nominal_gamma:.3g}; reflected power up to "
               f"{_w(p_r)} of {_w(a.feed.power)} peak; {embedding_text(a)}. {_spread_text(a)}. "
               f"{_search_text(w, a.frequency.size)}")
        yield ctx.finding(subject, requirement, passed=passed, message=msg,
                          measured=Quantity(g, "1"), limit=Quantity(max_gamma, "1"),
                          margin=Quantity(max_gamma - g, "1"), worst_case=_where(a, f, w.point))


@rule("window.band", severity=Severity.WARNING,
      summary="The band where each window's |Γ| stays under the limit covers the feed's "
              "f ± tolerance with a frequency margin to spare.",
      options={
          "max_gamma": Option("ratio", "|Γ| that bounds the window's reflection band",
          valid=Range(0.0, 1.0,
                      "|Gamma| of a passive window lies between 0 and 1; a limit of 1 (total "
                      "reflection) would accept any window, 0 none", "1", low_open=True, high_open=True)),
          "min_margin": Option("ratio", "frequency margin required beyond f ± tolerance on "
                                        "each side, as a fraction of the feed frequency",
          valid=Range(0.0, 0.5,
                      "a fraction of the feed frequency beyond its tolerance; a negative margin "
                      "would accept a band edge inside f +/- tolerance, 50 % is beyond any window"
                      " band", "%")),
      },
      applies="every window, embedded as for window.reflection")
def window_band(ctx: Context, *, max_gamma: float, min_margin: float) -> Iterator[Finding]:
    """What it checks
    The contiguous band around the feed frequency over which |Γ| of the window stays at or
    below max_gamma for every combination of its layers' thicknesses, permittivities and
    loss tangents within their spreads (as window.reflection): the intersection of the
    bands of the worst combinations, found by searching each side of the band for a
    combination that exceeds the limit inside it until none does (at most four rounds,
    rfcheck.physics.window_spread.band_over_spread). It must reach beyond f ± tolerance by
    min_margin · f on both sides. The finding reports the binding band edge, the
    combination that binds it, the edge it must reach and the margin in Hz; the band is
    searched over f (1 ± 0.5), and an edge beyond that span is reported as "at least".

    Why it matters
    window.reflection judges the feed's stated band. The resonance of a window moves with
    the permittivity of the supplied part (grade and supplier spread, included here, and ε_r
    rising with temperature under power, not included) and with the thickness of the part
    as made (included); a window whose band just covers the feed has no room for the rest.
    A narrow band is a reason to measure the part, not always a reason to reject it: this
    rule warns.

    Equation
    |Γ(f)| ≤ max_gamma on [f − tol − m f, f + tol + m f]; band edges from
    rfcheck.physics.multilayer.reflection_band (sampled, then bisected).

    Options
    max_gamma: the |Γ| bounding the band (default 0.2, VSWR 1.5, as window.reflection).
    min_margin: required margin as a fraction of the feed frequency (default 1 %: the
    resonance of a half-wave window scales as 1/√ε_r, and the ε_r spread of 99.5 % alumina,
    9.7–9.9, shifts it by 1 %; the declared spreads now enter the band itself, so the margin
    is headroom for what is not declared, such as the rise of ε_r with temperature).

    References
    D. M. Pozar, Microwave Engineering, 4th ed. (2012), §2.3, §4.4; ε_r spreads:
    rfcheck/data/materials.toml (eps_r_range, with its sources).
    """
    requirement = (f"|Γ| ≤ {max_gamma:.3g} over f ± tolerance and {min_margin:.2%} of f "
                   "beyond each edge")
    yield from _no_windows(ctx, requirement)
    for window in ctx.model.windows:
        a = window_analysis(ctx, window)
        feed = a.feed
        subject = f"window {window.id}"
        need_lo = feed.frequency - feed.frequency_tolerance - min_margin * feed.frequency
        need_hi = feed.frequency + feed.frequency_tolerance + min_margin * feed.frequency
        b = a.band_detail(max_gamma)
        lo, hi, lo_open, hi_open = b.low, b.high, b.low_open, b.high_open
        if math.isnan(lo):
            g0 = a.nominal_gamma
            if math.isnan(g0) or b.low_point is None:
                why = _NO_WAVE
            else:
                why = (f"|Γ| exceeds {max_gamma:.3g} at the feed frequency with "
                       f"{_point_text(a, b.low_point)}")
            nominal = "" if math.isnan(g0) else f" (nominal |Γ| {g0:.3g})"
            worst = {} if b.low_point is None else _where(a, None, b.low_point)
            yield ctx.finding(subject, requirement, passed=False,
                              message=f"no reflection band: {why}{nominal}. {_spread_text(a)}",
                              measured=Quantity(None, "Hz", "no band: |Γ| above the limit at f"),
                              limit=Quantity(need_lo, "Hz"), worst_case=worst)
            continue
        m_lo, m_hi = need_lo - lo, hi - need_hi
        if m_lo <= m_hi:
            edge, need, margin, is_open, side, point = lo, need_lo, m_lo, lo_open, "low", b.low_point
        else:
            edge, need, margin, is_open, side, point = hi, need_hi, m_hi, hi_open, "high", b.high_point
        at_least = "at least " if is_open else ""

        def edge_text(x, op):
            return f"{'beyond ' if op else ''}{x / 1e9:.5g} GHz"

        binding = "" if is_open else f", bound by {_point_text(a, point)}"
        msg = (f"|Γ| ≤ {max_gamma:.3g} from {edge_text(lo, lo_open)} to {edge_text(hi, hi_open)} "
               f"for every combination searched (searched ±{BAND_SPAN:.0%} of f); the {side} "
               f"edge must reach {need / 1e9:.5g} GHz: margin {at_least}{margin / 1e6:.4g} MHz"
               f"{binding}. {_spread_text(a)}. {b.evaluations} combinations searched, "
               f"{b.combinations} in the worst set"
               + ("" if b.converged else "; the last search still found a worse combination"))
        worst = {"band_low": Quantity(lo, "Hz"), "band_high": Quantity(hi, "Hz")}
        worst |= _where(a, None, point)
        yield ctx.finding(subject, requirement, passed=margin >= 0, message=msg,
                          measured=Quantity(edge, "Hz"), limit=Quantity(need, "Hz"),
                          margin=Quantity(margin, "Hz"), worst_case=worst)


@rule("window.absorbed-power", severity=Severity.ERROR,
      summary="Power absorbed in each window at the feed's average power stays under the "
              "window's rated absorbed power.",
      options={"max_fraction": Option("ratio", "highest allowed fraction of the window's "
                                                "max_absorbed_power",
          valid=Range(0.0, 1.0,
                      "a share of the window's own rating (max_absorbed_power): above 100 % would"
                      " exceed it", "%", low_open=True))},
      applies="windows with a max_absorbed_power")
def window_absorbed_power(ctx: Context, *, max_fraction: float) -> Iterator[Finding]:
    """What it checks
    The power dissipated in the window, P_abs = A · P_avg, with the absorbed fraction
    A = 1 − |Γ|² − |T|² at its worst over f ± tolerance, the thickness tolerance and the
    permittivity range, every loss tangent at the top of its range (scaled up ∝ f above the
    frequency it is quoted at, never down; flagged where no frequency is quoted), and the
    feed's average power P_avg = peak × duty cycle, against max_fraction times the window's
    max_absorbed_power. For a single-layer window with a diameter and a material with a
    thermal conductivity, the message adds the centre-to-edge temperature rise of an
    edge-cooled disc, ΔT = P_abs / (4π k t), as an estimate.

    Why it matters
    Absorbed power heats the window. Ceramics crack under the radial thermal stress of a hot
    centre, brazes and seals fail, and the loss tangent of alumina rises steeply with
    temperature (thermal runaway in CW windows). The rating must come from the window's
    supplier or its thermal design; this rule carries the feed's power to it. To first order
    in the losses A = Σ tan δ_i · ω ε0 ε_i ∫|E|² dV / P_inc over the layers: it grows with
    every tan δ, which is why the top of each range is the worst case.

    Equation
    P_abs = (1 − |Γ|² − |T|²) · P_peak · duty;  ΔT ≈ P_abs / (4π k t) (uniform heating,
    rim held at fixed temperature; RF heating peaks on axis, so the true centre rise is
    higher, and k falls with temperature: an estimate only).

    Options
    max_fraction: fraction of the rating allowed (default 100 %: the rating itself).

    References
    D. M. Pozar, Microwave Engineering, 4th ed. (2012), §4.4 (S-parameters of a lossy
    two-port); H. S. Carslaw & J. C. Jaeger, Conduction of Heat in Solids (1959) (steady
    radial conduction with uniform source). Not applicable without a rating. The plasma's
    reflected wave also passes the window and adds heating not counted here.
    """
    requirement = f"P_abs at average power ≤ {max_fraction:.0%} of max_absorbed_power"
    yield from _no_windows(ctx, requirement)
    for window in ctx.model.windows:
        subject = f"window {window.id}"
        if window.max_absorbed_power is None:
            yield ctx.not_applicable(subject, requirement,
                                     "the window gives no max_absorbed_power")
            continue
        a = window_analysis(ctx, window)
        w = a.absorption
        frac, f, t = w.value, w.frequency, w.point.thickness
        limit = max_fraction * window.max_absorbed_power
        if math.isnan(frac):
            yield ctx.finding(subject, requirement, passed=False,
                              message=f"absorbed power is undefined: {_NO_WAVE}",
                              measured=Quantity(None, "W", _NO_WAVE), limit=Quantity(limit, "W"),
                              worst_case=_where(a, f, a.nominal_point))
            continue
        p_avg = a.feed.average_power
        p_abs = float(absorbed_power(p_avg, frac))
        rise, why = a.temperature_rise(p_abs, t)
        thermal = (f"; estimated centre-to-edge rise of the edge-cooled disc {rise:.3g} K "
                   f"(uniform-heating estimate, k = {a.materials[0].thermal_conductivity:.3g} W/(m K))"
                   if rise is not None else f"; no temperature estimate ({why})")
        msg = (f"{_w(p_abs)} absorbed ({frac:.3g} of {_w(p_avg)} average) at "
               f"{f / 1e9:.5g} GHz with {_point_text(a, w.point)} (every tan δ at the top of "
               f"its range: the absorbed power grows with each), against {_w(limit)}"
               f"{thermal}; nominal {_w(float(absorbed_power(p_avg, a.nominal_absorptance)))}. "
               f"{_spread_text(a)}. {_search_text(w, a.frequency.size)}")
        yield ctx.finding(subject, requirement, passed=p_abs <= limit, message=msg,
                          measured=Quantity(p_abs, "W"), limit=Quantity(limit, "W"),
                          margin=Quantity(limit - p_abs, "W"), worst_case=_where(a, f, w.point))


@rule("window.disc-temperature", severity=Severity.ERROR,
      summary="Edge-cooled disc windows: the centre's temperature rise over the cooled rim at "
              "the feed's average power stays under the declared max_temperature_rise.",
      applies="single-layer windows that declare max_temperature_rise (and a diameter; the "
              "material a thermal conductivity)")
def window_disc_temperature(ctx: Context) -> Iterator[Finding]:
    """What it checks
    For a window that declares max_temperature_rise: the absorbed power P_abs at the feed's
    average power, at its worst over f ± tolerance and the layer's spreads (as
    window.absorbed-power), spread uniformly through a disc of thickness t and the declared
    diameter 2R, cooled at its rim and insulated on its faces; the steady centre-over-rim rise
    ΔT against max_temperature_rise. Windows that do not declare it get no finding.

    Derivation: steady radial conduction with a uniform volumetric source q (W/m³) in a solid
    cylinder, (k/r) d/dr (r dT/dr) + q = 0, T(R) = T_rim, finite at r = 0, gives
    T(r) − T_rim = q (R² − r²)/(4k), so ΔT = q R²/(4k) at the centre. With the absorbed power
    P_abs = q π R² t this is ΔT = P_abs/(4π k t): independent of the radius (per unit face
    area q_s = P_abs/(π R²), ΔT = q_s R²/(4 k t)).

    An estimate: a beam heats the centre more than the rim (an HE11 or Gaussian beam
    deposits most of its power within about half the radius, raising the centre above this
    value), the conductivity falls as the disc warms (diamond: by about a third from 300 K to
    400 K), and face cooling, radiation and the thermal stress are not included.

    Why it matters
    CVD-diamond windows carry 0.5–1 MW because their conductivity keeps the centre within a
    few tens of kelvin of the cooled rim; a disc of a lossier grade, or one of another
    material at that power, runs away thermally or cracks. The limit is the window's thermal
    design or the supplier's figure.

    Equation
    ΔT = q R²/(4k) = P_abs/(4π k t), P_abs = (1 − |Γ|² − |T|²) P_peak · duty.

    References
    F. P. Incropera, D. P. DeWitt, T. L. Bergman, A. S. Lavine, Fundamentals of Heat and Mass
    Transfer, 6th ed. (Wiley 2007), §3.5.2 (radial conduction with thermal energy generation
    in a solid cylinder, T(r) = q r0²/(4k) (1 − r²/r0²) + T_s); H. S. Carslaw & J. C. Jaeger,
    Conduction of Heat in Solids (1959).
    """
    for window in ctx.model.windows:
        limit = window.max_temperature_rise
        if limit is None:
            continue
        subject = f"window {window.id}"
        requirement = f"centre-over-rim rise ≤ {limit:.4g} K (edge-cooled disc)"
        a = window_analysis(ctx, window)
        w = a.absorption
        if math.isnan(w.value):
            yield ctx.finding(subject, requirement, passed=False,
                              message=f"absorbed power is undefined: {_NO_WAVE}",
                              measured=Quantity(None, "K", _NO_WAVE), limit=Quantity(limit, "K"))
            continue
        p_abs = float(absorbed_power(a.feed.average_power, w.value))
        rise, why = a.temperature_rise(p_abs, w.point.thickness)
        if rise is None:
            yield ctx.not_applicable(subject, requirement, f"no temperature estimate: {why}")
            continue
        k = a.materials[0].thermal_conductivity
        t = w.point.thickness[0]
        r = window.diameter / 2.0
        q = p_abs / (math.pi * r * r * t)
        msg = (f"ΔT = q R²/(4k) = P_abs/(4π k t) = {rise:.3g} K with P_abs {_w(p_abs)} ("
               f"{w.value:.3g} of {_w(a.feed.average_power)} average, at {w.frequency / 1e9:.5g} "
               f"GHz, {_point_text(a, w.point)}), q = {q:.3g} W/m³, R = {_mm(r)}, t = {_mm(t)}, "
               f"k = {k:.4g} W/(m K), against {limit:.4g} K. Uniform heating: a beam peaked on "
               "the axis heats the centre more, and k falls as the disc warms")
        yield ctx.finding(subject, requirement, passed=rise <= limit, message=msg,
                          measured=Quantity(rise, "K"), limit=Quantity(limit, "K"),
                          margin=Quantity(limit - rise, "K"), worst_case=_where(a, w.frequency, w.point))
