"""Density cutoffs met by the parts of a feed's launched power over the envelope."""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np

from rfcheck.analysis.launch_path import NEAR_FIELD, launch_path
from rfcheck.analysis.parts import ModeContent, mode_content, part_subject
from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.physics.frequencies import critical_density, ecr_field
from rfcheck.units import format_si

from .context import Context
from .registry import Option, Range, rule

#: parts whose cutoff this rule bounds: the O mode (P = 0, X = 1) and the L wave (L = 0,
#: X = 1 + Y); the R and X waves reach their resonance from the high-field side at any
#: density and are judged by the access rules
BOUNDED = ("O", "L")
ROUTE_RULE = "access.overdense-route"


def _ratio_over_envelope(ctx: Context, feed, mode: str, unmagnetised: bool):
    """n_e / n_cut along the path, largest over the path, on the envelope grid (nd, ns, nf):
    n_cut = n_c for the O part and an unmagnetised wave, n_c (1 + Y(z)) for the L part."""
    path = launch_path(ctx, feed, mode)
    grid = ctx.envelope.grid(feed)
    n_c = critical_density(grid.frequency)  # (1, 1, nf)
    if mode == "O" or unmagnetised:
        peak = float(path.shape.max()) if path.shape.size else 1.0
        return grid, path, grid.density * peak / n_c
    y = path.b[None, :, None, :] / ecr_field(grid.frequency)[..., None]  # (1, ns, nf, n_s)
    x_over = (grid.density[..., None] * path.shape) / (n_c[..., None] * (1.0 + y))
    return grid, path, x_over.max(axis=-1)


def _routes(ctx: Context, feed, mode: str, limit: float) -> tuple[bool, str]:
    """Whether every envelope corner where the part is above its cutoff has an overdense route
    that access.overdense-route accepts, and the route's name (the worst corner's)."""
    if limit is None:
        return False, ""
    from .access import best_route  # the route analysis the overdense-route rule judges

    path = launch_path(ctx, feed, mode)
    over = [c for c in path.corners() if path.above_cutoff(c)]
    if not over:
        return False, ""
    worst = None
    for corner in over:
        score, name, *_ = best_route(ctx, path, corner, limit)
        if worst is None or score < worst[0]:
            worst = (score, name)
    return worst[0] >= 1.0, worst[1]


@rule("cutoff.o-mode", severity=Severity.ERROR,
      summary="The density stays below the cutoff of each part of the launched power that has "
              "one: the O mode (n_c) and the L wave (n_c(1 + Y)).",
      options={
          "max_fraction": Option("ratio", "highest allowed n_e / n_cut along the path (fail above)",
          valid=Range(0.0, 1.0,
                      "n_e/n_cut above 100 % is beyond the cutoff: the wave is reflected, so a "
                      "larger limit would pass a cut-off feed", "%", low_open=True)),
          "warn_fraction": Option("ratio", "n_e / n_cut above which the finding is a warning",
          valid=Range(0.0, 1.0,
                      "n_e/n_cut above 100 % is beyond the cutoff itself", "%", low_open=True)),
      },
      applies="the O and L parts of every feed's launched power, and unmagnetised launches; not "
              "inductive and helicon coupling (near-field, overdense by design)",
      ordered=(("warn_fraction", "max_fraction", "the warning threshold lies below the failing one"),))
def o_mode_cutoff(ctx: Context, *, max_fraction: float, warn_fraction: float) -> Iterator[Finding]:
    """What it checks
    Each part of the feed's launched power (its split into the plasma's characteristic
    waves: R and L along B, O and X across B, see the mode content in the report) that has
    a density cutoff, against that cutoff along the launch path over the envelope:

    * the O part (and any wave in an unmagnetised plasma, n² = P): cut off where
      n_e > n_c = ε0 m_e (2π f)² / e²;
    * the L part: cut off where n_e > n_c (1 + Y), Y = f_ce/f the local field (L = 0).

    The finding reports max over the path of n_e / n_cut at the worst envelope point (peak
    density, current scale, lowest frequency of the tolerance band). The R and X parts reach
    their resonance from the high-field side at any density: this rule names them and
    leaves them to access.reaches-resonance and access.overdense-route. A part above its
    cutoff that has an overdense route (O–X conversion, a surface wave) accepted by
    access.overdense-route is deferred to that rule by name (not-applicable here), so the
    two never contradict each other.

    Why it matters
    Above its cutoff a wave is evanescent: its power is reflected at the cutoff layer before
    it reaches the resonance, returning to the generator and starving the discharge. A
    linearly polarised launch along B is half L wave: in a dense plasma that half is
    reflected whatever the field does.

    Equation
    n_c = ε0 m_e ω² / e² (P = 0), 1.240443e-2 f² m^-3 with f in Hz; L = 0 at X = 1 + Y
    (electrons; ions shift it by O(m_e/m_i)).

    Options
    max_fraction: fail above this n_e / n_cut (default 100 %: the cutoff itself).
    warn_fraction: warn above this (default 80 %, common practice: density profiles peak
    above their measured mean and drift with pressure and power).

    References
    T. H. Stix, Waves in Plasmas (AIP 1992), ch. 1–2; NRL Plasma Formulary (2019), p. 28.
    """
    route_limit = ctx.option(ROUTE_RULE, "min_route_efficiency")
    for feed in ctx.model.feeds:
        requirement = f"n_e / n_cut ≤ {max_fraction:.0%} along the path"
        if feed.absorption in NEAR_FIELD:
            yield ctx.not_applicable(f"feed {feed.id}", requirement,
                                     f"{feed.absorption} coupling works through the near field in "
                                     "an overdense plasma; no launched wave is cut off")
            continue
        content = mode_content(ctx, feed)
        if not content.parts:
            yield _no_path(ctx, feed, requirement, content, max_fraction, warn_fraction)
            continue
        for part in content.parts:
            subject = part_subject(feed, part.mode)
            details = {"part": part.mode, "fraction": {"low": part.low, "high": part.high},
                       "polarisation": content.summary()}
            if part.mode not in BOUNDED and not content.unmagnetised:
                yield ctx.not_applicable(
                    subject, requirement,
                    f"the {part.text()} is judged by access.reaches-resonance and "
                    "access.overdense-route: an R or X wave has no density cutoff before its "
                    "resonance from the high-field side, and the R cutoff it meets from the "
                    "low-field side is found along its path there", details)
                continue
            yield _bounded(ctx, feed, part, content, requirement, max_fraction, warn_fraction,
                           route_limit, subject, details)


def _bounded(ctx, feed, part, content: ModeContent, requirement, max_fraction, warn_fraction,
             route_limit, subject, details) -> Finding:
    grid, path, ratio = _ratio_over_envelope(ctx, feed, part.mode, content.unmagnetised)
    worst, where = grid.worst(ratio, "max")
    f_w = where["frequency"].value if "frequency" in where else feed.frequency
    n_w = where["density"].value if "density" in where else float(grid.density.reshape(-1)[-1])
    where.setdefault("density", Quantity(n_w, "m^-3"))
    n_c = float(critical_density(f_w))
    cut = ("n_c" if part.mode == "O" or content.unmagnetised else "n_c(1 + Y)")
    what = ("the wave (unmagnetised plasma, n² = P)" if content.unmagnetised
            else f"the {part.text()}")
    margin = max_fraction - worst
    passed = margin >= 0
    warn = passed and worst > warn_fraction
    common = dict(measured=Quantity(worst, "1"), limit=Quantity(max_fraction, "1"),
                  margin=Quantity(margin, "1"), worst_case=where, details=details)
    if passed:
        msg = (f"{what}: the density reaches {worst:.1%} of its cutoff density {cut} along the "
               f"path (peak {format_si(n_w, 'm^-3')}, n_c = {format_si(n_c, 'm^-3')})"
               + (f", above the {warn_fraction:.0%} warning level" if warn else ""))
        return ctx.finding(subject, requirement, passed=True, warn=warn, message=msg, **common)
    ok, route = _routes(ctx, feed, part.mode, route_limit)
    if ok:
        return ctx.not_applicable(
            subject, requirement,
            f"{what} is above its cutoff {cut} ({worst:.2f} × along the path at peak "
            f"{format_si(n_w, 'm^-3')}) and relies on the overdense route {route}: "
            f"{ROUTE_RULE} judges it", details)
    first = path.first_cutoff_text(part.mode, content.unmagnetised)
    msg = (f"{what} is cut off: the density reaches {worst:.2f} × its cutoff density {cut} "
           f"(peak {format_si(n_w, 'm^-3')}, n_c = {format_si(n_c, 'm^-3')}){first}; that part of "
           "the power is reflected before the resonance and returns towards the generator")
    if route_limit is None:
        msg += f" ({ROUTE_RULE} is not selected: no overdense route is considered)"
    elif part.mode == "O":
        msg += f"; no overdense route reaches the limit of {ROUTE_RULE}"
    return ctx.finding(subject, requirement, passed=False, message=msg, **common)


def _no_path(ctx, feed, requirement, content, max_fraction, warn_fraction) -> Finding:
    """No launch path: bound the peak density by n_c (the O cutoff) alone, and say why."""
    grid = ctx.envelope.grid(feed)
    ratio = grid.density / critical_density(grid.frequency)
    worst, where = grid.worst(ratio, "max")
    margin = max_fraction - worst
    msg = (f"no launch path ({content.reason}): the peak density is {worst:.1%} of the O-mode "
           "cutoff density n_c")
    return ctx.finding(f"feed {feed.id}", requirement, passed=margin >= 0,
                       warn=margin >= 0 and worst > warn_fraction, message=msg,
                       measured=Quantity(worst, "1"), limit=Quantity(max_fraction, "1"),
                       margin=Quantity(margin, "1"), worst_case=where)


__all__ = ["o_mode_cutoff", "BOUNDED"]
