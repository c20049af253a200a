"""The plasma as a load: its 1-D full-wave reflection, and the total reflected power at the
generator (window and plasma combined) against the feed's rating."""

from __future__ import annotations

import math
from collections.abc import Iterator

from rfcheck.findings import Finding, Quantity, Severity

from .context import Context
from .path import NEAR_FIELD, LaunchPath, launch_path
from .registry import Option, rule
from .window_data import window_analysis

_BALANCE_CAUTION = 1e-3


def _pct(x: float) -> str:
    return f"{x:.3g}" if x < 1e-3 else f"{x:.2%}"


def plasma_reflection_worst(path: LaunchPath):
    """(corner, SlabResponse) of the largest reflected fraction over the envelope corners."""
    worst = None
    for corner in path.corners():
        wave = path.wave(corner)
        if worst is None or wave.reflected > worst[1].reflected:
            worst = (corner, wave)
    return worst


def _model_note(path: LaunchPath) -> str:
    if path.theta is None:
        return ""
    return (" (declared oblique launch: the scalar wave equation with the branch's n² is an "
            "estimate without mode coupling)")


@rule("load.plasma-reflection", severity=Severity.ERROR,
      summary="The fraction of the launched power the plasma reflects (1-D full wave along the "
              "launch path) stays under the limit.",
      options={"max_reflected_fraction": Option(
          "ratio", "highest allowed reflected power fraction |Γ_p|² of the plasma")},
      applies="every feed except inductive and helicon coupling (near field)")
def plasma_reflection(ctx: Context, *, max_reflected_fraction: float) -> Iterator[Finding]:
    """What it checks
    The reflected, transmitted and absorbed fractions of a plane wave launched from vacuum
    at the launcher into the plasma along the launch path (the chamber axis to its far
    end), from the 1-D full-wave solution of the stratified problem with the collisional
    n²(z) of the launched mode: R and L along B, O and X across B are exact in this scalar
    form; a declared oblique angle uses the branch's n² at that angle (an estimate without
    mode coupling). Collisions ν = ν_en + ν_ei enter as ω → ω + iν. Evaluated at the envelope
    corners (density min/max × current scale min/max × frequency min/max, each with the
    electron temperature of least collisional damping); the largest reflected fraction is
    reported with the energy balance R + T + A = 1 of that solution.

    Why it matters
    What the plasma reflects returns to the generator together with the window's
    reflection (see load.reflected-power); a cutoff in front of the resonance reflects most
    of the power. The model is single pass: power transmitted beyond the far end of the
    chamber is counted as transmitted, not as returned, although a metal end wall sends it
    back; cavity multi-pass is not modelled.

    Equation
    E'' + k0² n²(z) E = 0 integrated by a fourth-order Magnus method with refinement at the
    resonances; R = |r|², absorbed A = k0 ∫ Im n² |E|² dz / flux. Checked against the
    Fabry–Perot slab and the Budden tunnelling problem (T = e^(−πη), R = (1 − T)² from the
    cutoff side, R = 0 from the resonance side).

    Options
    max_reflected_fraction: default 10 % (|Γ_p| = 0.32, common practice).

    References
    K. G. Budden, The Propagation of Radio Waves (Cambridge 1985), ch. 7, 15–19; T. H. Stix,
    Waves in Plasmas (AIP 1992), ch. 1 and 13.
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        requirement = f"|Γ_p|² ≤ {max_reflected_fraction:.0%}"
        if feed.absorption in NEAR_FIELD:
            yield ctx.not_applicable(subject, requirement,
                                     f"{feed.absorption} coupling loads the generator through its "
                                     "antenna and matching network, not as a launched plane wave")
            continue
        path = launch_path(ctx, feed)
        if path.problem:
            yield ctx.not_applicable(subject, requirement, path.problem)
            continue
        corner, wave = plasma_reflection_worst(path)
        margin = max_reflected_fraction - wave.reflected
        passed = margin >= 0
        msg = (f"the plasma reflects {_pct(wave.reflected)} of the {path.label} "
               f"(|Γ_p| = {math.sqrt(wave.reflected):.3g}); absorbed {_pct(wave.absorbed)}, "
               f"transmitted past the far end {_pct(wave.transmitted)}"
               f"{_model_note(path)}")
        if abs(wave.balance_residual) > _BALANCE_CAUTION:
            msg += f"; energy balance residual {wave.balance_residual:.2g}: treat with caution"
        if not passed:
            msg += f"; above the {max_reflected_fraction:.0%} limit"
        yield ctx.finding(subject, requirement, passed=passed, message=msg,
                          measured=Quantity(wave.reflected, "1"),
                          limit=Quantity(max_reflected_fraction, "1"),
                          margin=Quantity(margin, "1"),
                          worst_case=path.worst_case(corner, temperature=True))


@rule("load.reflected-power", severity=Severity.ERROR,
      summary="Window and plasma reflection together, as a bounded worst case, stay within the "
              "reflected power the generator tolerates.",
      options={"max_fraction": Option(
          "ratio", "allowed share of the feed's max_reflected_power")},
      applies="feeds that give max_reflected_power, except inductive and helicon coupling")
def reflected_power(ctx: Context, *, max_fraction: float) -> Iterator[Finding]:
    """What it checks
    The reflected power at the feed's peak forward power from the windows of the feed and
    the plasma together, P_r = P · |Γ_total|², with the amplitude bound
    |Γ_total| ≤ |Γ_w| + |Γ_p| (capped at 1), against the feed's max_reflected_power.
    |Γ_w| is each window's worst reflection over f ± tolerance and its thickness tolerance
    (window.reflection; several windows add), |Γ_p| = √R_p the plasma's worst reflection
    over the envelope corners (load.plasma-reflection).

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
        subject = f"feed {feed.id}"
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
        path = launch_path(ctx, feed)
        if path.problem:
            yield ctx.not_applicable(subject, requirement, path.problem)
            continue
        windows = [w for w in ctx.model.windows if w.feed == feed.id]
        g_w = sum(window_analysis(ctx, w).worst_gamma[0] for w in windows)
        corner, wave = plasma_reflection_worst(path)
        g_p = math.sqrt(wave.reflected)
        limit = max_fraction * feed.max_reflected_power
        if not math.isfinite(g_w):
            yield ctx.finding(subject, requirement, passed=False,
                              message="a window's reflection is undefined: the line does not "
                                      "propagate over f ± tolerance (see line.waveguide-band)",
                              limit=Quantity(limit, "W"))
            continue
        bound = min(1.0, g_w + g_p)
        p_r = feed.power * bound**2
        margin = limit - p_r
        w_text = (f"|Γ_w| = {g_w:.3g} ({', '.join(w.id for w in windows)})" if windows
                  else "no window (|Γ_w| = 0)")
        msg = (f"{w_text} + |Γ_p| = {g_p:.3g} (plasma) bound |Γ_total| ≤ {bound:.3g}: up to "
               f"{Quantity(p_r, 'W').text()} reflected at {Quantity(feed.power, 'W').text()} "
               f"peak forward power, against {Quantity(limit, 'W').text()}")
        where = path.worst_case(corner, temperature=True)
        yield ctx.finding(subject, requirement, passed=margin >= 0, message=msg,
                          measured=Quantity(p_r, "W"), limit=Quantity(limit, "W"),
                          margin=Quantity(margin, "W"), worst_case=where)
