"""The plasma as a load, in its two states: running (the plasma's 1-D full-wave reflection
per part of the launched power, the far end included, and the total reflected power at the
generator, window and plasma combined) and ignition (no plasma: the generator looks into the
unlit cavity). The numbers are analyses (:mod:`rfcheck.analysis.load`); the rules judge them."""

from __future__ import annotations

import math
from collections.abc import Iterator

from rfcheck.analysis.launch_path import NEAR_FIELD, launch_path
from rfcheck.analysis.load import (IGNITION, RUNNING, PlasmaReturn, cold_gamma, plasma_return,
                                   running_gamma)
from rfcheck.analysis.parts import mode_content
from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.model import REFLECTING_WALLS, Feed
from rfcheck.units import format_fraction as _pct

from .context import Context
from .registry import Option, Range, rule


def _wall_note(ret: PlasmaReturn, ctx: Context, feed: Feed) -> str:
    path = launch_path(ctx, feed, ret.content.parts[0].mode)
    note = path.wall_text()
    if path.wall in REFLECTING_WALLS:
        note += ("; what reaches it comes back through the plasma, at the worst round-trip "
                 "phase between plasma and wall (a bound: the distance in wavelengths is not "
                 "known)")
    return note


def _model_note(ctx: Context, feed: Feed) -> str:
    if launch_path(ctx, feed).theta is None:
        return ""
    return (" (declared oblique launch: the scalar wave equation with each branch's n² is an "
            "estimate without mode coupling)")


@rule("load.plasma-reflection", severity=Severity.ERROR,
      summary="The fraction of the launched power the plasma returns towards the launcher (1-D "
              "full wave per part of the power, far end included) stays under the limit.",
      options={"max_reflected_fraction": Option(
          "ratio", "highest allowed fraction |Γ_p|² of the launched power the plasma returns",
          valid=Range(0.0, 1.0,
                      "a fraction of the launched power; a limit of 0 no plasma meets", "%", low_open=True))},
      applies="every feed except inductive and helicon coupling (near field)")
def plasma_reflection(ctx: Context, *, max_reflected_fraction: float) -> Iterator[Finding]:
    """What it checks
    The fraction of the feed's launched power that the plasma sends back towards the
    launcher in the running state, summed over the parts of the launched power (its split
    into the plasma's characteristic waves: R and L along B, O and X across B; see
    cutoff.o-mode and the mode content in the report). Each part travels its own path (the
    chamber axis from the launcher to the far end) and is solved as a 1-D full wave with
    its collisional n²(z), incident from vacuum: reflected, absorbed and transmitted to the
    far end. The far end is what the spec declares for that end of the chamber: a metal
    wall, electrode or substrate reflects (not declared: a metal wall, the conservative
    choice), so what crosses the plasma comes back through it — at the worst round-trip
    phase between the plasma and the wall, since the distance in wavelengths is not known
    — while a dump or an open end lets it go. Returned power of the feed = Σ f_i R_i over
    the parts (the parts are orthogonal waves: their powers add), at the worst candidate
    split where the polarisation leaves it open, at the worst envelope corner (density
    min/max × current scale min/max × frequency min/max, each with the electron temperature
    and neutral pressure of least collisional damping).

    Why it matters
    What returns goes to the generator together with the window's reflection (see
    load.reflected-power). A cutoff in front of the resonance reflects a part; a part with
    no resonance (the L half of a linearly polarised launch along B into an ECR source)
    crosses the plasma nearly unabsorbed and comes back from the end wall.

    Equation
    E'' + k0² n²(z) E = 0 by a fourth-order Magnus method with refinement at the
    resonances; R = |r|², A = k0 ∫ Im n² |E|² dz / flux. Behind a reflecting wall the
    returned amplitude r_tot = s11 + s12 s21 u/(1 − s22 u), |u| = 1, traces a circle; the
    worst case is |centre| + radius (checked against the Salisbury screen). Checked against
    the Fabry–Perot slab and the Budden tunnelling problem.

    Options
    max_reflected_fraction: default 10 % (|Γ_p| = 0.32, common practice).

    Assumptions
    1-D along the axis: the wall returns the wave into the same path and polarisation (a
    metal wall at normal incidence keeps the rotation sense about B), no conversion between
    the parts, no depolarisation by the cavity's other walls; multi-mode cavity effects are
    not modelled. These make the figure an upper bound for a well-declared far end.

    References
    K. G. Budden, The Propagation of Radio Waves (Cambridge 1985), ch. 7, 15–19; T. H. Stix,
    Waves in Plasmas (AIP 1992), ch. 1 and 13; D. M. Pozar, Microwave Engineering, 4th ed.
    (Wiley 2012), ch. 4 (scattering matrices).
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}, {RUNNING}"
        requirement = f"|Γ_p|² ≤ {max_reflected_fraction:.0%} of the launched power"
        if feed.absorption in NEAR_FIELD:
            yield ctx.not_applicable(subject, requirement,
                                     f"{feed.absorption} coupling loads the generator through its "
                                     "antenna and matching network, not as a launched plane wave")
            continue
        ret = plasma_return(ctx, feed)
        if ret is None:
            yield ctx.not_applicable(subject, requirement, mode_content(ctx, feed).reason)
            continue
        margin = max_reflected_fraction - ret.returned
        passed = margin >= 0
        parts = "; ".join(ret.part_text(m) for m in ret.parts if ret.split.get(m, 0.0) > 0)
        msg = (f"the plasma returns {_pct(ret.returned)} of the launched power "
               f"(|Γ_p| = {math.sqrt(ret.returned):.3g}): {parts}; "
               f"{ret.content.summary()}; {_wall_note(ret, ctx, feed)}{_model_note(ctx, feed)}")
        if not passed:
            msg += f"; above the {max_reflected_fraction:.0%} limit"
        path = launch_path(ctx, feed, ret.content.parts[0].mode)
        yield ctx.finding(subject, requirement, passed=passed, message=msg,
                          measured=Quantity(ret.returned, "1"),
                          limit=Quantity(max_reflected_fraction, "1"),
                          margin=Quantity(margin, "1"),
                          worst_case=path.worst_case(ret.corner, temperature=True),
                          details=ret.details())


@rule("load.reflected-power", severity=Severity.ERROR,
      summary="Running state: window and plasma reflection together, as a bounded worst case, "
              "stay within the reflected power the generator tolerates.",
      options={"max_fraction": Option(
          "ratio", "allowed share of the feed's max_reflected_power",
          valid=Range(0.0, 1.0,
                      "a share of the specification's own rating: above 100 % would exceed what "
                      "the generator or circulator tolerates", "%", low_open=True))},
      applies="feeds that give max_reflected_power, except inductive and helicon coupling")
def reflected_power(ctx: Context, *, max_fraction: float) -> Iterator[Finding]:
    """What it checks
    In the running state, the reflected power at the feed's peak forward power from the
    windows of the feed and the plasma together, P_r = P · |Γ_total|², with the amplitude
    bound |Γ_total| ≤ |Γ_w| + |Γ_p| (capped at 1), against the feed's max_reflected_power.
    |Γ_w| is each window's worst reflection over f ± tolerance and its spreads
    (window.reflection; several windows add), |Γ_p|² the plasma's returned fraction of the
    launched power, summed over its parts, far end included, at the worst envelope corner
    (load.plasma-reflection). The ignition state (no plasma) is judged by
    load.ignition-reflection.

    Why it matters
    The circulator load or the generator must absorb what comes back; a magnetron pulled by
    a large reflection changes frequency and can be damaged. The limit is the rating the
    feed declares.

    Equation
    |Γ_total| ≤ |Γ_w| + |Γ_p|. Assumption: the reflections add in phase at worst, since the
    electrical distance between window and plasma and the plasma's reflection phase are not
    known and move with the discharge. The exact worst case of two lossless reflectors in
    cascade, (|Γ_w| + |Γ_p|)/(1 + |Γ_w||Γ_p|) (VSWR_total ≤ VSWR_w · VSWR_p), never exceeds
    the sum, so the bound is conservative; taking each term at its own worst envelope point
    adds to that.

    Options
    max_fraction: share of the declared max_reflected_power allowed (default 100 %).

    References
    D. M. Pozar, Microwave Engineering, 4th ed. (Wiley 2012), ch. 2 (reflection, VSWR);
    common practice for the VSWR product bound.
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}, {RUNNING}"
        requirement = "P (|Γ_w| + |Γ_p|)² ≤ max_reflected_power" + (
            f" × {max_fraction:.0%}" if max_fraction != 1 else "")
        if feed.max_reflected_power is None:
            yield ctx.not_applicable(subject, requirement,
                                     "the feed gives no max_reflected_power")
            continue
        if feed.absorption in NEAR_FIELD:
            yield ctx.not_applicable(subject, requirement,
                                     f"{feed.absorption} coupling: the plasma's load is set by "
                                     "the antenna and its matching network (not modelled)")
            continue
        g = running_gamma(ctx, feed)
        if g.ret is None:
            yield ctx.not_applicable(subject, requirement, mode_content(ctx, feed).reason)
            continue
        limit = max_fraction * feed.max_reflected_power
        if not math.isfinite(g.window):
            yield ctx.finding(subject, requirement, passed=False,
                              message="a window's reflection is undefined: the line does not "
                                      "propagate over f ± tolerance (see line.waveguide-band)",
                              limit=Quantity(limit, "W"), details={"state": RUNNING})
            continue
        p_r = feed.power * g.bound**2
        margin = limit - p_r
        w_text = (f"|Γ_w| = {g.window:.3g} ({', '.join(g.windows)})" if g.windows
                  else "no window (|Γ_w| = 0)")
        msg = (f"{w_text} + |Γ_p| = {g.plasma:.3g} (plasma, all parts of the launched power) "
               f"bound |Γ_total| ≤ {g.bound:.3g}: up to {Quantity(p_r, 'W').text()} reflected at "
               f"{Quantity(feed.power, 'W').text()} peak forward power, against "
               f"{Quantity(limit, 'W').text()}")
        path = launch_path(ctx, feed, g.ret.content.parts[0].mode)
        details = g.ret.details()
        details.update({"gamma_window": g.window, "gamma_plasma": g.plasma,
                        "gamma_bound": g.bound})
        yield ctx.finding(subject, requirement, passed=margin >= 0, message=msg,
                          measured=Quantity(p_r, "W"), limit=Quantity(limit, "W"),
                          margin=Quantity(margin, "W"),
                          worst_case=path.worst_case(g.ret.corner, temperature=True),
                          details=details)


@rule("load.ignition-reflection", severity=Severity.ERROR,
      summary="Ignition state: the power the unlit cavity reflects stays within the generator's "
              "or circulator load's rating for the time it lasts.",
      options={"max_fraction": Option(
          "ratio", "allowed share of the applicable reflected-power rating",
          valid=Range(0.0, 1.0,
                      "a share of the specification's own rating: above 100 % would exceed what "
                      "the generator or circulator tolerates", "%", low_open=True))},
      applies="every feed that gives a reflected-power rating (continuous or time-limited)")
def ignition_reflection(ctx: Context, *, max_fraction: float) -> Iterator[Finding]:
    """What it checks
    Before breakdown, and whenever the plasma goes out, the generator looks into the empty
    cavity: the reflected power is P · |Γ_cold|² at the feed's peak forward power, with the
    cold cavity's reflection as the spec declares it (|Γ| or VSWR, measured on the unlit
    source) or, not declared, |Γ_cold| = 1 (the worst case: an unlit cavity can return all
    the power). It lasts the declared ignition time; not declared, it is taken as
    continuous (the plasma can go out and the generator keep running into the empty cavity
    until an interlock trips). The limit is the feed's time-limited rating
    (max_reflected_power_short) when one is declared and lasts at least the ignition time,
    else its continuous max_reflected_power.

    Why it matters
    A circulator load or magnetron rated for the running reflection is destroyed by full
    reflection at ignition or after a plasma drop-out; the rating must cover the ignition
    state for as long as it lasts (or an interlock must end it sooner).

    Equation
    P_r = P |Γ_cold|²; |Γ| = (VSWR − 1)/(VSWR + 1).

    Options
    max_fraction: share of the applicable rating allowed (default 100 %).

    References
    D. M. Pozar, Microwave Engineering, 4th ed. (Wiley 2012), ch. 2; common practice: size
    the circulator load for the full forward power unless an interlock limits the time of a
    full reflection.
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}, {IGNITION}"
        requirement = "P |Γ_cold|² ≤ the reflected-power rating for the ignition time" + (
            f" × {max_fraction:.0%}" if max_fraction != 1 else "")
        gamma, g_text = cold_gamma(feed)
        duration = feed.ignition_time
        short = feed.short_rating
        if short is not None and duration is not None and duration <= short.duration:
            rating, r_text = short.power, (f"the time-limited rating {Quantity(short.power, 'W').text()} "
                                           f"for {short.duration:.3g} s")
        elif feed.max_reflected_power is not None:
            rating, r_text = feed.max_reflected_power, (
                f"the continuous rating {Quantity(feed.max_reflected_power, 'W').text()}")
            if short is not None:
                r_text += (f" (the time-limited rating lasts {short.duration:.3g} s, "
                           + ("less than the ignition time" if duration is not None else
                              "but the ignition time is not declared") + ")")
        else:
            yield ctx.not_applicable(subject, requirement,
                                     "the feed gives no reflected-power rating (max_reflected_power "
                                     "or max_reflected_power_short)", {"state": IGNITION})
            continue
        t_text = (f"for an ignition time of {duration:.3g} s" if duration is not None
                  else "for an ignition time not declared (taken as continuous)")
        limit = max_fraction * rating
        p_r = feed.power * gamma**2
        margin = limit - p_r
        msg = (f"before breakdown the generator sees the unlit cavity, {g_text}: "
               f"{Quantity(p_r, 'W').text()} reflected at {Quantity(feed.power, 'W').text()} peak "
               f"forward power {t_text}, against {r_text}")
        if margin < 0:
            msg += ("; size the circulator load for this reflection, declare a measured cold-"
                    "cavity reflection, or declare the interlock time and a time-limited rating")
        yield ctx.finding(subject, requirement, passed=margin >= 0, message=msg,
                          measured=Quantity(p_r, "W"), limit=Quantity(limit, "W"),
                          margin=Quantity(margin, "W"),
                          details={"state": IGNITION, "gamma_cold": gamma,
                                   "gamma_cold_declared": feed.cold_cavity_gamma is not None,
                                   "ignition_time": duration})
