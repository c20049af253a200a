"""The RF line of each feed: operating band and air breakdown."""

from __future__ import annotations

import math
from collections.abc import Iterator

import numpy as np

from rfcheck.analysis.launch_path import NEAR_FIELD
from rfcheck.analysis.load import IGNITION, RUNNING, cold_gamma, running_gamma
from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.physics.rfpower import (breakdown_field, max_forward_power, max_net_power,
                                     te10_max_power, te10_peak_field, te11_max_power,
                                     te11_peak_field, vswr)
from rfcheck.physics.coaxial import (COPPER_CONDUCTIVITY, coaxial_max_power, coaxial_peak_field,
                                     coaxial_wall_heating)
from rfcheck.physics.waveguide import (HE11_MIN_RADIUS_WAVELENGTHS,
                                       coaxial_characteristic_impedance, line_from_name)
from rfcheck.physics.quasioptical import (he11_max_power, he11_peak_field, line_run_loss)
from rfcheck.physics.constants import C

from .context import Context
from .registry import Option, Range, rule


@rule("line.waveguide-band", severity=Severity.ERROR,
      summary="Each feed's frequency band lies in its line's single-mode band "
              "(warning outside the recommended band).",
      applies="feeds on a rectangular, circular or coaxial line; not free space")
def waveguide_band(ctx: Context) -> Iterator[Finding]:
    """What it checks
    The feed's frequency band f ± tolerance against its line: the dominant mode must
    propagate (f > f_c of TE10 for rectangular, TE11 for circular guide; the TEM mode of a
    coaxial line has no cutoff) and the next mode must stay cut off (the lower of TE20 and
    TE01 for rectangular guide, TM01 for circular guide, TE11 for coaxial line): a failure
    otherwise. Inside that single-mode band but outside the recommended operating band the
    finding is a warning. The recommended band of a standard rectangular guide is its
    published EIA RS-261-B / IEC 60153-2 band (WR-340 2.20–3.30 GHz, WR-62 12.4–18.0 GHz: the
    edges sit at 1.23–1.36 f_c and 1.85–1.91 f_c, not at a fixed multiple); a rectangular
    guide of other dimensions uses the rule of thumb 1.25 f_c … min(1.9 f_c, 0.95 f_next),
    circular guide 1.1 f_c … 0.95 f_TM01, coaxial line up to 0.95 f_TE11. The message names
    the band it used.
    Free-space (quasi-optical) feeds are not applicable. An oversized corrugated line
    ("he11:<D> mm") has no single-mode band: the check is that it is oversized for the HE11
    forms, a/λ ≥ 3 at the bottom of f ± tolerance (the corrugation depth sets the real band
    and is the supplier's figure).

    Why it matters
    Near cutoff the guide wavelength and wave impedance change fast with frequency, wall
    loss and field strength rise, and tuners and windows designed at the nominal frequency
    mismatch. Above the next cutoff a second mode can carry power with another field pattern,
    spoiling the launch polarisation and heating unexpected places.

    Equation
    TE10: f_c = c / (2a); TE20: c / a; TE01: c / (2b); λ_g = λ0 / √(1 − (f_c/f)²).
    Circular: f_c = p c / (π d) with p'11 = 1.841 (TE11), p01 = 2.405 (TM01).
    Coaxial TE11: f_c ≈ 2c / (π (d + D)) (mean circumference; slightly low, conservative).

    References
    EIA RS-261-B (1979) and IEC 60153-2 (rectangular waveguide sizes and bands);
    D. M. Pozar, Microwave Engineering, ch. 3 (§3.3 rectangular, §3.4 circular, §3.5 coaxial).
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        line = line_from_name(feed.line)
        if line.kind == "corrugated":
            yield _he11_band(ctx, feed, line, subject)
            continue
        if line.cutoff > 0:
            lo, hi = line.recommended_band
            requirement = (f"{line.name}: single-mode band, recommended band "
                           f"{lo / 1e9:.4g}–{hi / 1e9:.4g} GHz ({line.band_basis})")
        elif math.isfinite(line.next_cutoff):  # TEM line: bounded above by its first higher mode
            requirement = (f"{line.name}: below the {line.next_mode} cutoff "
                           f"{line.next_cutoff / 1e9:.3g} GHz, recommended ≤ "
                           f"{line.recommended_band[1] / 1e9:.3g} GHz")
        else:
            requirement = line.name
        if line.kind == "free-space":
            yield ctx.not_applicable(subject, requirement, "quasi-optical (free-space) feed: no "
                                     "waveguide cutoff")
            continue
        f_lo = feed.frequency - feed.frequency_tolerance
        f_hi = feed.frequency + feed.frequency_tolerance
        band_lo, band_hi = line.recommended_band
        # the binding edge: the one the band comes closest to (relative distance)
        # a TEM line has no lower edge (its band starts at 0 Hz): only the upper one can bind
        low_gap = (f_lo - band_lo) / feed.frequency if line.cutoff > 0 else math.inf
        high_gap = (band_hi - f_hi) / feed.frequency if math.isfinite(band_hi) else math.inf
        if low_gap <= high_gap:
            measured, limit, margin = f_lo, band_lo, f_lo - band_lo
            worst = {"frequency": Quantity(f_lo, "Hz")}
        else:
            measured, limit, margin = f_hi, band_hi, band_hi - f_hi
            worst = {"frequency": Quantity(f_hi, "Hz")}
        propagates = f_lo > line.cutoff
        single = f_hi < line.next_cutoff
        in_band = low_gap >= 0 and high_gap >= 0
        ratio = f" ({feed.frequency / line.cutoff:.3f} f_c)" if line.cutoff > 0 else ""
        if not propagates:
            msg = (f"{f_lo / 1e9:.4g} GHz is at or below the {line.dominant_mode} cutoff "
                   f"{line.cutoff / 1e9:.4g} GHz of {line.name}: the guide does not propagate")
        elif not single:
            msg = (f"{f_hi / 1e9:.4g} GHz is above the next-mode cutoff {line.next_cutoff / 1e9:.4g} GHz "
                   f"of {line.name}: more than one mode propagates")
        elif not in_band:
            edge = "below" if low_gap < 0 else "above"
            msg = (f"{feed.frequency / 1e9:.4g} GHz{ratio} lies {edge} the recommended band of "
                   f"{line.name} ({band_lo / 1e9:.4g}–{band_hi / 1e9:.4g} GHz, {line.band_basis}) "
                   "but in its single-mode band")
        else:
            msg = (f"{feed.frequency / 1e9:.4g} GHz ± {feed.frequency_tolerance / 1e6:.3g} MHz"
                   f"{ratio} lies in the recommended band of {line.name} "
                   f"({band_lo / 1e9:.4g}–{band_hi / 1e9:.4g} GHz, {line.band_basis})")
        yield ctx.finding(subject, requirement, passed=propagates and single,
                          warn=not in_band, message=msg,
                          measured=Quantity(measured, "Hz"), limit=Quantity(limit, "Hz"),
                          margin=Quantity(margin, "Hz"), worst_case=worst)


def _he11_band(ctx: Context, feed, line, subject: str) -> Finding:
    """An oversized corrugated (HE11) line has no single-mode band: what the rule can check is
    that the guide is oversized enough for the HE11 forms, a/λ ≥ HE11_MIN_RADIUS_WAVELENGTHS,
    at the top of the band (the smallest λ gives the largest a/λ, so the bottom binds)."""
    f_lo = feed.frequency - feed.frequency_tolerance
    a = line.dimension("diameter") / 2.0
    ratio = a * f_lo / C
    need = HE11_MIN_RADIUS_WAVELENGTHS
    requirement = (f"{line.name}: oversized guide, a/λ ≥ {need:g} (no single-mode band: the "
                   "corrugated wall keeps the power in HE11)")
    msg = (f"a/λ = {ratio:.3g} at {f_lo / 1e9:.5g} GHz (a = {a * 1e3:.4g} mm): "
           + ("oversized; no TE/TM cutoff or single-mode band applies to a corrugated HE11 line. "
              "The corrugation depth (about λ/4) sets its band: rfcheck does not know it, so "
              "check the supplier's design frequency" if ratio >= need else
              "too small for the HE11 forms (J0 profile, loss laws): the guide is not the "
              "oversized line they describe"))
    return ctx.finding(subject, requirement, passed=ratio >= need, message=msg,
                       measured=Quantity(ratio, "1"), limit=Quantity(need, "1"),
                       margin=Quantity(ratio - need, "1"),
                       worst_case={"frequency": Quantity(f_lo, "Hz")})


def _watts(x: float) -> str:
    return Quantity(x, "W").text()


@rule("line.breakdown", severity=Severity.ERROR,
      summary="Peak field in each feed's guide at peak power, with the standing wave of the "
              "running and of the ignition state, stays under the air breakdown field divided "
              "by a safety factor.",
      options={"safety_factor": Option("ratio", "factor (in field) between the breakdown "
                                                "field of air at 1 atm and the allowed peak field",
          valid=Range(1.0, 10.0,
                      "below 1 the allowed peak field would exceed the breakdown field itself; "
                      "practical ratings stay within 2 to 4 in field (1/4 to 1/16 in power), and "
                      "10 (1/100 in power) is beyond any", "1"))},
      applies="feeds on rectangular (TE10) and circular (TE11) guide and on coaxial line (TEM); "
              "not free-space feeds")
def breakdown(ctx: Context, *, safety_factor: float) -> Iterator[Finding]:
    """What it checks
    The largest electric field in the feed's guide — at the centre of the broad wall of a
    rectangular guide (TE10), on the axis of a circular guide (TE11), on the surface of the
    inner conductor of a coaxial line (TEM) — at a standing-wave
    maximum: E_pk = (1 + |Γ|) E0 at the feed's peak forward power,
    at the frequency of f ± tolerance where E0 is largest, in both states of the load:
    running, with |Γ| the bound of load.reflected-power (the windows' worst reflection plus
    the plasma's returned share, all parts of the launched power); ignition, with the unlit
    cavity's reflection (declared, else |Γ| = 1: the full standing wave, twice the
    travelling-wave field). The limit is the breakdown field of dry air at 1 atm,
    3 MV/m, divided by safety_factor. The message gives the theoretical power capacity
    P_max of the matched guide, P_max/VSWR (largest net power with that mismatch) and the
    peak forward power the limit allows.

    This is an upper bound, not a rating: it holds for a clean, dry, smooth guide at sea
    level with its field uniform over centimetre gaps. Flange gaps and misaligned joints,
    humidity, dust and swarf, burrs, altitude (lower pressure) and long pulses all lower the
    real threshold; pressurising with dry air, N2 or SF6 raises it. On the vacuum side of a window the limit is not air breakdown but
    multipactor and surface flashover, which this rule does not assess. It supports review
    and defers to the line supplier's ratings, local codes and qualified practice.

    A coaxial line's message adds its characteristic impedance and the heat its copper
    conductors take per metre at the feed's average power (at a current maximum of the
    standing wave), the figure the supplier's thermal rating must carry. A line filled with a
    solid dielectric is held to the same air limit: the gaps beside the inner-conductor
    supports are air, and the filling's own strength is the supplier's figure.

    Not applicable to free-space feeds (no guide).

    Why it matters
    An arc in the air-filled guide runs back towards the generator, burns flanges and
    windows and can destroy the circulator or the magnetron. A window that reflects strongly
    raises the standing-wave maximum between it and the generator.

    Equation
    E0 = √(4 Z_TE10 P / (a b)), Z_TE10 = η0 / √(1 − (f_c/f)²); TE11 on the axis of a guide of
    radius a: E0² = Z_TE p'² P / (π a² (p'² − 1) J1(p')²) ≈ 1.333 Z_TE P / a²;
    coaxial TEM (inner radius a, outer b): E0 = √(2 Z0 P) / (a ln(b/a)),
    corrugated HE11 (radius a, profile E0 J0(j01 r/a)): E0 = √(2 η0 P / (π a² J1(j01)²)),
    P_max = π a² J1(j01)² E_bd² / (2 η0), j01 = 2.405;
    Z0 = η0 ln(b/a) / (2π √ε_r), P_max = π √ε_r a² E_bd² ln(b/a) / η0;
    E_pk = (1 + |Γ|) E0;
    limit E_bd / s with E_bd = 3 MV/m;  P_max = a b E_bd² √(1 − (f_c/f)²) / (4 η0);
    largest net power P_max / VSWR; largest peak forward power P_max / (s² (1 + |Γ|)²).

    Options
    safety_factor: s, in field (default 2, i.e. a quarter of the theoretical power; common
    practice applies 2 to 4 in field for flange gaps, humidity, dust and finish).

    References
    D. M. Pozar, Microwave Engineering, 4th ed. (2012), §2.3 (standing waves), §3.3 (TE10
    power flow and power capacity), §3.4 (TE11 fields and power flow), §2.2 and §2.7 (coaxial
    fields and conductor loss); A. D. MacDonald, Microwave Breakdown in Gases (Wiley
    1966). Air at 1 atm: 3 MV/m (30 kV/cm), common practice.
    """
    e_bd = float(breakdown_field())
    limit = e_bd / safety_factor
    requirement = (f"peak field ≤ E_bd(air, 1 atm) / {safety_factor:.3g} = "
                   f"{limit / 1e6:.3g} MV/m (theoretical upper bound)")
    for feed in ctx.model.feeds:
        line = line_from_name(feed.line)
        if line.kind not in ("rectangular", "circular", "coaxial", "corrugated"):
            why = ("quasi-optical (free-space) feed: no guide to break down" if line.kind == "free-space"
                   else f"{line.kind} line ({line.dominant_mode}): no peak-field formula in rfcheck "
                        "yet; check against the supplier's power rating")
            yield ctx.not_applicable(f"feed {feed.id}", requirement, why)
            continue
        running = running_gamma(ctx, feed)
        if running.ret is None and feed.absorption not in NEAR_FIELD:
            r_gamma, r_source = running.window, "windows only: no launch path for the plasma's share"
        elif feed.absorption in NEAR_FIELD:
            r_gamma, r_source = running.window, ("windows only: the near-field coupling's "
                                                 "matching network is not modelled")
        else:
            r_gamma = running.bound
            r_source = (f"|Γ_w| {running.window:.3g} ({', '.join(running.windows) or 'no window'}) "
                        f"+ |Γ_p| {running.plasma:.3g} (plasma), as load.reflected-power")
        c_gamma, c_source = cold_gamma(feed)
        for state, gamma, source in ((RUNNING, r_gamma, r_source),
                                     (IGNITION, c_gamma, "unlit cavity, " + c_source)):
            yield _breakdown_state(ctx, feed, line, state, gamma, source, requirement, limit,
                                   e_bd, safety_factor)


def _breakdown_state(ctx, feed, line, state, gamma, source, requirement, limit, e_bd,
                     safety_factor) -> Finding:
    subject = f"feed {feed.id}, {state}"
    f = ctx.envelope.frequencies(feed)
    extra = ""
    if line.kind == "coaxial":
        d_in, d_out, eps = line.dimension("inner_diameter"), line.dimension("outer_diameter"), line.eps_r
        e_pk = coaxial_peak_field(feed.power, d_in, d_out, gamma, eps) * np.ones_like(f)
        capacity = lambda fw: float(coaxial_max_power(d_in, d_out, e_bd, eps))  # noqa: E731
        z0 = float(coaxial_characteristic_impedance(d_in, d_out, eps))
        heat = float(np.max(coaxial_wall_heating(feed.average_power, f, d_in, d_out, eps,
                                                 gamma_mag=min(gamma, 1.0))))
        extra = (f"; Z0 {z0:.4g} Ω; conductor heat {_watts(heat)}/m at "
                 f"{_watts(feed.average_power)} average power (copper, σ = "
                 f"{COPPER_CONDUCTIVITY:.3g} S/m, at a current maximum): the line's thermal "
                 "rating must carry it")
    elif line.kind == "corrugated":
        d_dim = line.dimension("diameter")
        e_pk = he11_peak_field(feed.power, d_dim, gamma) * np.ones_like(f)
        capacity = lambda fw: float(he11_max_power(d_dim, e_bd))  # noqa: E731
        extra = ("; HE11 on the axis of the corrugated guide (E0 J0(2.405 r/a) profile). An "
                 "evacuated line has no gas breakdown but its mitre mirrors and window faces "
                 "arc where they are contaminated: the supplier's rating governs")
    elif line.kind == "circular":
        d_dim = line.dimension("diameter")
        e_pk = te11_peak_field(feed.power, d_dim, f, gamma)
        capacity = lambda fw: float(te11_max_power(d_dim, fw, e_bd))  # noqa: E731
    else:
        a_dim, b_dim = line.dimension("a"), line.dimension("b")
        e_pk = te10_peak_field(feed.power, a_dim, b_dim, f, gamma)
        capacity = lambda fw: float(te10_max_power(a_dim, b_dim, fw, e_bd))  # noqa: E731
    i = int(np.argmax(np.where(np.isnan(e_pk), np.inf, e_pk)))
    worst_f, worst_e = float(f[i]), float(e_pk[i])
    where = {"frequency": Quantity(worst_f, "Hz")} if f.size > 1 else {}
    where["gamma"] = Quantity(gamma, "1")
    details = {"state": state, "gamma": gamma if math.isfinite(gamma) else None}
    if math.isnan(worst_e):
        return ctx.finding(subject, requirement, passed=False,
                           message=f"peak field undefined: {line.name} does not propagate over "
                                   f"f ± tolerance, or the window reflection is undefined "
                                   f"(see line.waveguide-band)",
                           measured=Quantity(None, "V/m", f"no propagating {line.dominant_mode} wave"),
                           limit=Quantity(limit, "V/m"), worst_case=where, details=details)
    p_max = capacity(worst_f)
    p_net = float(max_net_power(p_max, gamma))
    p_fwd = float(max_forward_power(p_max, gamma)) / safety_factor ** 2
    margin = limit - worst_e
    msg = (f"{state}: peak field {Quantity(worst_e, 'V/m').text()} at {_watts(feed.power)} peak "
           f"forward power with 1 + |Γ| = {1 + gamma:.3g} ({source}) at {worst_f / 1e9:.5g} GHz, "
           f"against {limit / 1e6:.3g} MV/m (air at 1 atm {e_bd / 1e6:.3g} MV/m / "
           f"{safety_factor:.3g}); theoretical P_max of matched {line.name} {_watts(p_max)}, "
           + (f"P_max/VSWR {_watts(p_net)} at VSWR {float(vswr(gamma)):.3g}" if gamma < 1
              else "no net power at full reflection")
           + f"; the limit allows {_watts(p_fwd)} peak forward" + extra
           + ". An upper bound: flange gaps, humidity and dust lower it")
    return ctx.finding(subject, requirement, passed=margin >= 0, message=msg,
                       measured=Quantity(worst_e, "V/m"), limit=Quantity(limit, "V/m"),
                       margin=Quantity(margin, "V/m"), worst_case=where, details=details)


@rule("line.transmission-loss", severity=Severity.WARNING,
      summary="The loss of each declared line run (per metre and per mitre bend) stays under a "
              "share of the forward power; the heat it leaves in the line is stated.",
      options={"max_loss_fraction": Option(
          "ratio", "largest share of the forward power the line run may lose",
          valid=Range(0.0, 1.0, "a share of the forward power", "%", low_open=True))},
      applies="feeds that declare a transmission run (defaults for he11 lines)")
def transmission_loss(ctx: Context, *, max_loss_fraction: float) -> Iterator[Finding]:
    """What it checks
    For a feed that declares its line run (`transmission = { length, mitre_bends, ... }`),
    the loss L = α L_run + n_bends · L_bend in dB, with α and L_bend as declared, else (for
    an HE11 line) the defaults of rfcheck/data/lines.toml [he11] (per bend the larger of the
    tabulated value and the mitre-bend diffraction estimate 0.39 (λ/a)^(3/2)); the lost
    fraction 1 − 10^(−L/10) against max_loss_fraction. The message gives the power reaching
    the launcher and the average power left as heat in the line and its mirrors. A feed
    without a declared run gets no finding; a non-HE11 line without declared losses is not
    applicable (no default for it).

    Why it matters
    At 0.1–1 MW a few per cent of loss is kilowatts of heat in mitre mirrors and couplings
    (they need cooling), and power lost to mode conversion travels on as stray modes that
    heat the line and leave the launcher outside the intended beam.

    Equation
    L_dB = α_dB/m · L + n · L_bend; lost = 1 − 10^(−L_dB/10); heat = lost · P_avg.

    Options
    max_loss_fraction: default 10 % (from memory: heating lines are designed to deliver
    about 90 % or more of the generator's power).

    References
    J. L. Doane, in Infrared and Millimeter Waves 13 (Academic Press 1985), ch. 4
    (corrugated waveguide); J. L. Doane & C. P. Moeller, Int. J. Electronics 77 (1994) 489
    (mitre bends and gaps). Both from memory: declare the supplier's figures.
    """
    requirement = f"line-run loss ≤ {max_loss_fraction:.0%} of the forward power"
    for feed in ctx.model.feeds:
        run = feed.transmission
        if run is None:
            continue
        subject = f"feed {feed.id}"
        line = line_from_name(feed.line)
        declared = run.loss_db_per_m is not None and (run.bend_loss_db is not None
                                                      or run.mitre_bends == 0)
        if line.kind != "corrugated" and not declared:
            yield ctx.not_applicable(subject, requirement,
                                     f"{line.name}: no default loss for a {line.kind} line; "
                                     "declare loss_db_per_m (and bend_loss_db for bends)")
            continue
        diameter = line.dimension("diameter") if line.kind in ("corrugated", "circular") else 1.0
        f_lo = feed.frequency - feed.frequency_tolerance
        loss = line_run_loss(f_lo, diameter, run.length, run.mitre_bends,
                             run.loss_db_per_m if run.loss_db_per_m is not None else
                             (0.0 if line.kind != "corrugated" else None),
                             run.bend_loss_db if run.bend_loss_db is not None else
                             (0.0 if line.kind != "corrugated" else None))
        heat = loss.lost_fraction * feed.average_power
        msg = (f"{run.length:.4g} m × {loss.per_metre_db:.3g} dB/m ({loss.per_metre_source}) + "
               f"{run.mitre_bends} mitre bend(s) × {loss.per_bend_db:.3g} dB "
               f"({loss.per_bend_source}) = {loss.total_db:.3g} dB: {loss.lost_fraction:.3g} of "
               f"the forward power lost, {_watts(loss.transmitted_fraction * feed.power)} of "
               f"{_watts(feed.power)} peak reaches the launcher; {_watts(heat)} average left "
               "in the line, its mirrors and loads (they need cooling rated for it)")
        yield ctx.finding(subject, requirement, passed=loss.lost_fraction <= max_loss_fraction,
                          message=msg, measured=Quantity(loss.lost_fraction, "1"),
                          limit=Quantity(max_loss_fraction, "1"),
                          margin=Quantity(max_loss_fraction - loss.lost_fraction, "1"),
                          details={"loss_db": loss.total_db, "heat_w": heat})
