"""Dielectric windows in each feed's line: reflection, reflection band and absorbed power.

All three rules read one shared computation (rfcheck.rules.window_data.window_analysis): the
window's response over f ± tolerance and every thickness-tolerance combination, cached on
the Context.
"""

from __future__ import annotations

import math
from collections.abc import Iterator

from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.physics.rfpower import absorbed_power, reflected_power, return_loss_db, vswr

from .context import Context
from .registry import Option, rule
from .window_data import BAND_SPAN, WindowAnalysis, embedding_text, window_analysis

_NO_WAVE = "the line does not propagate over f ± tolerance (see line.waveguide-band)"


def _mm(t: float) -> str:
    return f"{t * 1e3:.4g} mm"


def _where(a: WindowAnalysis, f: float, thickness: tuple[float, ...]) -> dict[str, Quantity]:
    out: dict[str, Quantity] = {}
    if a.frequency.size > 1:
        out["frequency"] = Quantity(f, "Hz")
    varied = [i for i, la in enumerate(a.window.layers) if la.thickness_tolerance > 0]
    for i in varied:
        name = "thickness" if len(a.window.layers) == 1 else f"thickness_{i + 1}"
        out[name] = Quantity(thickness[i], "m")
    return out


def _w(p: float) -> str:
    return Quantity(p, "W").text()


def _stack_text(thickness: tuple[float, ...]) -> str:
    return " + ".join(_mm(t) for t in thickness)


def _no_windows(ctx: Context, requirement: str) -> Iterator[Finding]:
    if not ctx.model.windows:
        yield ctx.not_applicable("windows", requirement, "the source declares no [[window]]")


@rule("window.reflection", severity=Severity.ERROR,
      summary="Each window's worst reflection |Γ| over f ± tolerance and the thickness "
              "tolerance stays under the limit.",
      options={"max_gamma": Option("ratio", "highest allowed |Γ| of a window "
                                            "(VSWR = (1 + |Γ|)/(1 − |Γ|))")},
      applies="every window, in the dominant mode of its feed's line (TE10/TE11 guide mode; "
              "plane wave at normal incidence for coaxial and free-space feeds)")
def window_reflection(ctx: Context, *, max_gamma: float) -> Iterator[Finding]:
    """What it checks
    The magnitude of the reflection coefficient |Γ| of each window (a stack of dielectric
    layers filling the line's cross-section) embedded in its feed's line: the TE10 wave
    impedances of a rectangular guide (TE11 of a circular guide), a plane wave at normal
    incidence for free space and coaxial line. The worst |Γ| over the feed's band
    f ± tolerance (41 frequencies) and every combination of the layer thicknesses at
    −tol, nominal and +tol is compared with the limit. The message also gives VSWR,
    return loss and the reflected power at the feed's peak power.

    Why it matters
    The reflected wave returns to the generator: it loads the circulator, pulls a magnetron
    off frequency and raises the standing wave (and so the peak field) between the
    generator and the window. A window near an odd quarter-wave thickness reflects most:
    VSWR = ε_r for a lossless slab in free space. The reflection of the plasma load adds to
    this and is judged by the load.* rules.

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
    (ε_r, tan δ at the stated frequency; measured values of the supplied part take precedence).
    """
    requirement = f"|Γ| ≤ {max_gamma:.3g} (VSWR ≤ {float(vswr(max_gamma)):.3g})"
    yield from _no_windows(ctx, requirement)
    for window in ctx.model.windows:
        a = window_analysis(ctx, window)
        subject = f"window {window.id}"
        g, f, t = a.worst_gamma
        where = _where(a, f, t)
        if math.isnan(g):
            yield ctx.finding(subject, requirement, passed=False,
                              message=f"|Γ| is undefined: {_NO_WAVE}",
                              measured=Quantity(None, "1", _NO_WAVE),
                              limit=Quantity(max_gamma, "1"), worst_case=where)
            continue
        p_r = float(reflected_power(a.feed.power, g))
        rl = float(return_loss_db(g)) if g > 0 else math.inf
        passed = g <= max_gamma
        verb = "within" if passed else "above"
        msg = (f"worst |Γ| {g:.3g} (VSWR {float(vswr(g)):.3g}, return loss {rl:.3g} dB) at "
               f"{f / 1e9:.5g} GHz and thickness {_stack_text(t)}, {verb} the limit {max_gamma:.3g}; "
               f"nominal |Γ| {a.nominal_gamma:.3g}; reflected power up to {_w(p_r)} of "
               f"{_w(a.feed.power)} peak; {embedding_text(a)}")
        yield ctx.finding(subject, requirement, passed=passed, message=msg,
                          measured=Quantity(g, "1"), limit=Quantity(max_gamma, "1"),
                          margin=Quantity(max_gamma - g, "1"), worst_case=where)


@rule("window.band", severity=Severity.WARNING,
      summary="The band where each window's |Γ| stays under the limit covers the feed's "
              "f ± tolerance with a frequency margin to spare.",
      options={
          "max_gamma": Option("ratio", "|Γ| that bounds the window's reflection band"),
          "min_margin": Option("ratio", "frequency margin required beyond f ± tolerance on "
                                        "each side, as a fraction of the feed frequency"),
      },
      applies="every window, embedded as for window.reflection")
def window_band(ctx: Context, *, max_gamma: float, min_margin: float) -> Iterator[Finding]:
    """What it checks
    The contiguous band around the feed frequency over which |Γ| of the window stays at or
    below max_gamma for every thickness within tolerance (the intersection of the bands of
    all thickness combinations). It must reach beyond f ± tolerance by min_margin · f on
    both sides. The finding reports the binding band edge, the edge it must reach and the
    margin in Hz; the band is searched over f (1 ± 0.5), and an edge beyond that span is
    reported as "at least".

    Why it matters
    window.reflection judges the feed's stated band. The resonance of a window also moves
    with the permittivity of the supplied part (grade and supplier spread, and ε_r rising
    with temperature under power) and with the thickness of the part as made; a window whose
    band just covers the feed has no room for either. A narrow band is a reason to measure
    the part, not always a reason to reject it: this rule warns.

    Equation
    |Γ(f)| ≤ max_gamma on [f − tol − m f, f + tol + m f]; band edges from
    rfcheck.physics.multilayer.reflection_band (sampled, then bisected).

    Options
    max_gamma: the |Γ| bounding the band (default 0.2, VSWR 1.5, as window.reflection).
    min_margin: required margin as a fraction of the feed frequency (default 1 %: the
    resonance of a half-wave window scales as 1/√ε_r, and the ε_r spread of 99.5 % alumina,
    9.7–9.9, shifts it by 1 %).

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
        lo, hi, lo_open, hi_open = a.band(max_gamma)
        if math.isnan(lo):
            g0 = a.nominal_gamma
            why = _NO_WAVE if math.isnan(g0) else \
                f"|Γ| exceeds {max_gamma:.3g} at the feed frequency for some thickness in tolerance"
            nominal = "" if math.isnan(g0) else f" (nominal |Γ| {g0:.3g})"
            yield ctx.finding(subject, requirement, passed=False,
                              message=f"no reflection band: {why}{nominal}",
                              measured=Quantity(None, "Hz", "no band: |Γ| above the limit at f"),
                              limit=Quantity(need_lo, "Hz"))
            continue
        m_lo, m_hi = need_lo - lo, hi - need_hi
        if m_lo <= m_hi:
            edge, need, margin, is_open, side = lo, need_lo, m_lo, lo_open, "low"
        else:
            edge, need, margin, is_open, side = hi, need_hi, m_hi, hi_open, "high"
        at_least = "at least " if is_open else ""

        def edge_text(x, op):
            return f"{'beyond ' if op else ''}{x / 1e9:.5g} GHz"

        msg = (f"|Γ| ≤ {max_gamma:.3g} from {edge_text(lo, lo_open)} to {edge_text(hi, hi_open)} "
               f"(searched ±{BAND_SPAN:.0%} of f); the {side} edge must reach {need / 1e9:.5g} GHz: "
               f"margin {at_least}{margin / 1e6:.4g} MHz")
        worst = {"band_low": Quantity(lo, "Hz"), "band_high": Quantity(hi, "Hz")}
        yield ctx.finding(subject, requirement, passed=margin >= 0, message=msg,
                          measured=Quantity(edge, "Hz"), limit=Quantity(need, "Hz"),
                          margin=Quantity(margin, "Hz"), worst_case=worst)


@rule("window.absorbed-power", severity=Severity.ERROR,
      summary="Power absorbed in each window at the feed's average power stays under the "
              "window's rated absorbed power.",
      options={"max_fraction": Option("ratio", "highest allowed fraction of the window's "
                                                "max_absorbed_power")},
      applies="windows with a max_absorbed_power")
def window_absorbed_power(ctx: Context, *, max_fraction: float) -> Iterator[Finding]:
    """What it checks
    The power dissipated in the window, P_abs = A · P_avg, with the absorbed fraction
    A = 1 − |Γ|² − |T|² at its worst over f ± tolerance and the thickness tolerance, and the
    feed's average power P_avg = peak × duty cycle, against max_fraction times the window's
    max_absorbed_power. For a single-layer window with a diameter and a material with a
    thermal conductivity, the message adds the centre-to-edge temperature rise of an
    edge-cooled disc, ΔT = P_abs / (4π k t), as an estimate.

    Why it matters
    Absorbed power heats the window. Ceramics crack under the radial thermal stress of a hot
    centre, brazes and seals fail, and the loss tangent of alumina rises steeply with
    temperature (thermal runaway in CW windows). The rating must come from the window's
    supplier or its thermal design; this rule carries the feed's power to it.

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
        frac, f, t = a.worst_absorptance
        where = _where(a, f, t)
        limit = max_fraction * window.max_absorbed_power
        if math.isnan(frac):
            yield ctx.finding(subject, requirement, passed=False,
                              message=f"absorbed power is undefined: {_NO_WAVE}",
                              measured=Quantity(None, "W", _NO_WAVE), limit=Quantity(limit, "W"),
                              worst_case=where)
            continue
        p_avg = a.feed.average_power
        p_abs = float(absorbed_power(p_avg, frac))
        rise, why = a.temperature_rise(p_abs, t)
        thermal = (f"; estimated centre-to-edge rise of the edge-cooled disc {rise:.3g} K "
                   f"(uniform-heating estimate, k = {a.materials[0].thermal_conductivity:.3g} W/(m K))"
                   if rise is not None else f"; no temperature estimate ({why})")
        msg = (f"{_w(p_abs)} absorbed ({frac:.3g} of {_w(p_avg)} average) at "
               f"{f / 1e9:.5g} GHz and thickness {_stack_text(t)}, against {_w(limit)}"
               f"{thermal}")
        yield ctx.finding(subject, requirement, passed=p_abs <= limit, message=msg,
                          measured=Quantity(p_abs, "W"), limit=Quantity(limit, "W"),
                          margin=Quantity(limit - p_abs, "W"), worst_case=where)
