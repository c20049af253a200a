"""Sanity of the specification itself: legal inputs that are physically odd, and the
assumptions a run makes where the specification is silent (family ``spec.*``).

These never reject a spec (that is the spec loader's job, with exit code 2); they are
warnings with the reason, listed in ``rfcheck rules`` like every other rule.
"""

from __future__ import annotations

from collections.abc import Iterator

from rfcheck.analysis.launch_path import NEAR_FIELD, far_wall
from rfcheck.findings import Finding, Quantity, Severity

from .context import Context
from .registry import rule


@rule("spec.generator-rating", severity=Severity.WARNING,
      summary="A feed's reflected-power rating does not exceed its forward power (a rating above "
              "it makes the reflected-power rules unable to fail).",
      applies="feeds that give max_reflected_power or max_reflected_power_short")
def generator_rating(ctx: Context) -> Iterator[Finding]:
    """What it checks
    That the reflected power a feed's generator or circulator load is declared to tolerate
    (max_reflected_power, and the time-limited max_reflected_power_short) is not above the
    feed's peak forward power.

    Why it matters
    Nothing can reflect more than the forward power: a rating above it usually means a
    wrong unit or the circulator's forward rating typed in place of its load's rating, and
    it makes load.reflected-power and load.ignition-reflection pass whatever the load does.

    Equation
    max_reflected_power ≤ power.

    References
    Common practice (a reflected-power rating is at most the full forward power).
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        requirement = "reflected-power rating ≤ forward power"
        ratings = [(name, p) for name, p in
                   (("max_reflected_power", feed.max_reflected_power),
                    ("max_reflected_power_short",
                     feed.short_rating.power if feed.short_rating else None)) if p is not None]
        if not ratings:
            yield ctx.not_applicable(subject, requirement, "the feed declares no reflected-power "
                                                           "rating")
            continue
        name, worst = max(ratings, key=lambda t: t[1])
        margin = feed.power - worst
        if margin >= 0:
            msg = (f"{name} {Quantity(worst, 'W').text()} is within the forward power "
                   f"{Quantity(feed.power, 'W').text()}")
        else:
            msg = (f"{name} {Quantity(worst, 'W').text()} exceeds the forward power "
                   f"{Quantity(feed.power, 'W').text()}: nothing can reflect more than is sent, "
                   "so the reflected-power rules cannot fail; check the unit and that the load's "
                   "rating (not the circulator's forward rating) is given")
        yield ctx.finding(subject, requirement, passed=margin >= 0, message=msg,
                          measured=Quantity(worst, "W"), limit=Quantity(feed.power, "W"),
                          margin=Quantity(margin, "W"))


@rule("spec.feed-window", severity=Severity.WARNING,
      summary="Every feed that launches a wave declares the vacuum window it passes.",
      applies="every feed except inductive and helicon coupling")
def feed_window(ctx: Context) -> Iterator[Finding]:
    """What it checks
    That each feed with a launched wave names at least one [[window]] on its line.

    Why it matters
    Between the generator and the plasma there is a vacuum barrier (a window or a
    dielectric-filled feedthrough): it reflects, absorbs and can break down. Without it
    the window.* rules judge nothing for that feed, the running-state reflection leaves out
    the window's share, and the breakdown rule sees a matched line.

    Equation
    Count of windows with feed = this feed ≥ 1.

    References
    Common practice.
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        requirement = "at least one window on the feed's line"
        if feed.absorption in NEAR_FIELD:
            yield ctx.not_applicable(subject, requirement,
                                     f"{feed.absorption} coupling: the antenna sits outside a "
                                     "dielectric vessel, not behind a line window")
            continue
        windows = [w.id for w in ctx.model.windows if w.feed == feed.id]
        if windows:
            yield ctx.finding(subject, requirement, passed=True,
                              message=f"window{'s' if len(windows) > 1 else ''} "
                                      f"{', '.join(windows)} on the feed's line")
        else:
            yield ctx.finding(subject, requirement, passed=False,
                              message="no [[window]] declared on this feed: the window rules judge "
                                      "nothing for it and the running reflection leaves out the "
                                      "vacuum barrier's share; declare the window (its layers and "
                                      "materials)")


@rule("spec.density-envelope", severity=Severity.WARNING,
      summary="The density envelope spans a range and a tabulated profile covers the chamber.",
      applies="every specification")
def density_envelope(ctx: Context) -> Iterator[Finding]:
    """What it checks
    (1) That the declared peak density is a range (min < max), not one value; (2) that a
    tabulated density profile (profile kind "table") covers the chamber from z_start to
    z_end.

    Why it matters
    A source runs from ignition to full power: its peak density moves over a decade or
    more, and the cutoff, access and load findings are taken at the worst point of that
    range. A single density makes them nominal, not worst-case. A profile table that stops
    short of a chamber end holds its last value beyond it, which silently sets the density
    at the launcher or at the far wall.

    Equation
    density.min < density.max; table z covers [z_start, z_end].

    References
    Common practice.
    """
    d = ctx.model.plasma.density
    req = "density.min < density.max"
    if d.max > d.min:
        yield ctx.finding("plasma density", req, passed=True,
                          message=f"the envelope spans {d.max / d.min:.3g}× in peak density")
    else:
        yield ctx.finding("plasma density", req, passed=False,
                          message="the density envelope is a single value: the worst case over "
                                  "density is the nominal point; give the range from ignition to "
                                  "full power (min and max)")
    prof = ctx.model.plasma.profile
    req = "the profile table covers the chamber"
    if prof.kind != "table":
        yield ctx.not_applicable("plasma profile", req, f"profile '{prof.kind}' is defined over "
                                                        "the whole chamber")
        return
    c = ctx.model.chamber
    lo, hi = min(prof.z), max(prof.z)
    tol = 1e-6 * c.length
    short = [f"starts at z = {lo * 1e3:.4g} mm" if lo > c.z_start + tol else "",
             f"ends at z = {hi * 1e3:.4g} mm" if hi < c.z_end - tol else ""]
    short = [t for t in short if t]
    if not short:
        yield ctx.finding("plasma profile", req, passed=True,
                          message="the profile table covers the chamber")
    else:
        yield ctx.finding("plasma profile", req, passed=False,
                          message=f"the profile table {' and '.join(short)}, inside the chamber "
                                  f"({c.z_start * 1e3:.4g}–{c.z_end * 1e3:.4g} mm): its end "
                                  "values are held beyond; extend the table to the walls")


@rule("spec.assumptions", severity=Severity.WARNING,
      summary="Lists what the specification leaves undeclared and the worst case each finding "
              "assumes for it.",
      applies="every feed")
def assumptions(ctx: Context) -> Iterator[Finding]:
    """What it checks
    Whether the specification declares, for each feed: the launched polarisation (and the
    E direction of a linear launch across or oblique to B), the far end of its launch path,
    the cold cavity's reflection and the ignition time; and for each window material on the
    feed whether the library or the spec gives the spread of its permittivity and loss
    tangent and the frequency its loss tangent is quoted at. Each item left
    open is named with the worst case the rules take for it.

    Why it matters
    A review is conservative where the designer has not said, and a reviewer must see where
    a verdict rests on such an assumption rather than on the design: undeclared polarisation
    (the worse split), far end (a reflecting metal wall), cold cavity (|Γ| = 1), ignition
    time (continuous).

    Equation
    Each feed: polarisation, launch.e_angle_to_field (linear, θ > 0), chamber.end_walls at
    its far end, cold_cavity, ignition_time declared.

    References
    Common practice of design review.
    """
    chamber = ctx.model.chamber
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        requirement = "every worst-case input declared"
        if feed.absorption in NEAR_FIELD:
            yield ctx.not_applicable(subject, requirement,
                                     f"{feed.absorption} coupling: no launched wave")
            continue
        open_items = []
        la = feed.launch
        if la.polarisation is None:
            open_items.append("launch.polarisation (taken as linear with the worse E direction)")
        elif la.polarisation == "linear" and la.e_angle_to_field is None and la.angle_to_field > 0:
            open_items.append("launch.e_angle_to_field (the worse E direction is taken)")
        elif la.polarisation == "as-mode":
            open_items.append(f"the mode content (declared 'as-mode': all power assumed in the "
                              f"{la.mode} mode, not derived from the launcher)")
        direction = 1 if la.direction >= 0 else -1
        _, declared = far_wall(chamber, direction)
        if not declared:
            end = "end" if direction > 0 else "start"
            open_items.append(f"chamber.end_walls.{end} (the far end, taken as a reflecting metal "
                              "wall)")
        if feed.cold_cavity_gamma is None:
            open_items.append("cold_cavity (taken as |Γ| = 1)")
        if feed.ignition_time is None:
            open_items.append("ignition_time (taken as continuous)")
        open_items += _material_assumptions(ctx, feed)
        if open_items:
            msg = (f"{len(open_items)} input{'s' if len(open_items) > 1 else ''} left open, each "
                   f"taken at its worst case: {'; '.join(open_items)}")
        else:
            msg = ("the polarisation, far end, cold cavity, ignition time and the window "
                   "materials' spreads are declared")
        yield ctx.finding(subject, requirement, passed=not open_items, message=msg,
                          details={"undeclared": open_items})


def _material_assumptions(ctx: Context, feed) -> list[str]:
    """Window materials on this feed whose spread or quoted frequency is not declared."""
    from rfcheck.analysis.window_material import default_spread, resolve_material

    d = default_spread()
    out, seen = [], set()
    for w in ctx.model.windows:
        if w.feed != feed.id:
            continue
        for layer in w.layers:
            if layer.material in seen:
                continue
            seen.add(layer.material)
            m = resolve_material(ctx.model, layer.material)
            if m.eps_r_range is None:
                out.append(f"the permittivity spread of {m.id} (taken as ±"
                           f"{100 * float(d['eps_r_relative']):.3g} %)")
            if m.tan_delta_range is None:
                out.append(f"the loss-tangent spread of {m.id} (taken up to "
                           f"{float(d['tan_delta_factor']):.3g}× the nominal)")
            if m.frequency is None:
                out.append(f"the frequency at which the loss tangent of {m.id} is quoted "
                           "(used unscaled and flagged)")
    return out
