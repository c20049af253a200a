"""Density cutoffs met by a feed's wave over the envelope."""

from __future__ import annotations

from collections.abc import Iterator

from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.physics.frequencies import critical_density
from rfcheck.units import format_si

from .context import Context
from .registry import Option, rule

_NEAR_FIELD = ("inductive", "helicon")


@rule("cutoff.o-mode", severity=Severity.ERROR,
      summary="Peak density stays below the O-mode cutoff (critical) density of each feed.",
      options={
          "max_fraction": Option("ratio", "highest allowed n_max / n_c (fail above)"),
          "warn_fraction": Option("ratio", "n_max / n_c above which the finding is a warning"),
      },
      applies="every feed except inductive and helicon coupling (near-field, overdense by design)")
def o_mode_cutoff(ctx: Context, *, max_fraction: float, warn_fraction: float) -> Iterator[Finding]:
    """What it checks
    The peak electron density of the envelope against the O-mode cutoff density of each feed,
    n_c = ε0 m_e (2π f)² / e², at the lowest frequency of the feed's tolerance band (where n_c
    is smallest). The finding reports n_max / n_c at that worst point.

    Why it matters
    Above n_c the ordinary wave (and the unmagnetised wave, P = 0) is evanescent: the power
    is reflected at the cutoff layer before it reaches the resonance, raising the reflected
    power at the generator and starving the discharge. Designs that rely on an overdense
    route (R wave from the high-field side, O–X–B conversion, surface waves) must say so and
    are reviewed by the access.* rules; waive this rule for them with that reference.

    Equation
    n_c = ε0 m_e ω² / e²  (P = 0);  1.240443e-2 f² m^-3 with f in Hz.

    Options
    max_fraction: fail above this n_max / n_c (default 100 %: the cutoff itself).
    warn_fraction: warn above this (default 80 %, common practice: density profiles peak
    above their measured mean and drift with pressure and power).

    References
    T. H. Stix, Waves in Plasmas (AIP 1992), ch. 1; NRL Plasma Formulary (2019), p. 28.
    """
    n_max = ctx.model.plasma.density.max
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        requirement = f"n_max / n_c ≤ {max_fraction:.0%}"
        if feed.absorption in _NEAR_FIELD:
            yield ctx.not_applicable(subject, requirement,
                                     f"{feed.absorption} coupling works through the near field in "
                                     "an overdense plasma; the O-mode cutoff does not bound it")
            continue
        grid = ctx.envelope.grid(feed)
        ratio = grid.density / critical_density(grid.frequency)
        worst, where = grid.worst(ratio, "max")
        margin = max_fraction - worst
        passed = margin >= 0
        warn = passed and worst > warn_fraction
        n_c = float(critical_density(where["frequency"].value)) if "frequency" in where else \
            float(critical_density(feed.frequency))
        where.setdefault("density", Quantity(n_max, "m^-3"))
        if passed:
            msg = (f"peak density {format_si(n_max, 'm^-3')} is {worst:.1%} of the cutoff density "
                   f"{format_si(n_c, 'm^-3')}"
                   + (f" (above the {warn_fraction:.0%} warning level)" if warn else ""))
        else:
            msg = (f"peak density {format_si(n_max, 'm^-3')} exceeds {max_fraction:.0%} of the cutoff "
                   f"density {format_si(n_c, 'm^-3')} ({worst:.2f} n_c): the wave is cut off before "
                   "the resonance")
        yield ctx.finding(subject, requirement, passed=passed, warn=warn, message=msg,
                          measured=Quantity(worst, "1"), limit=Quantity(max_fraction, "1"),
                          margin=Quantity(margin, "1"), worst_case=where)
