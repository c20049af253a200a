"""Exposure of people near the source to leaked RF power."""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np

from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.physics.exposure import distance_for_level, leak_power_density, reference_level

from .context import Context
from .registry import Option, rule


@rule("exposure.leak-level", severity=Severity.ERROR,
      summary="The leak estimate at the occupied distance stays below the reference level "
              "of the named exposure table.",
      options={"max_fraction": Option("ratio", "highest allowed fraction of the reference level")},
      applies="sources with an [exposure] section giving a leak")
def leak_level(ctx: Context, *, max_fraction: float) -> Iterator[Finding]:
    """What it checks
    The leak power density declared in [exposure] (a survey value or a design allowance at a
    stated distance, at the operating power and duty) carried to the occupied distance by the
    inverse-square law, against the plane-wave-equivalent reference level of the named table
    at each feed's frequency (lowest level over the frequency tolerance). It also reports the
    distance beyond which the estimate falls to the level.

    Why it matters
    People near a source are exposed to leakage from flanges, windows, viewports and vents.
    The reference levels of the applicable standard bound that exposure; which standard,
    edition and population apply is for the site's RF-safety officer to say.

    Equation
    S(d) = S_m (d_m / d)²; limit from the table (below 30 MHz: the lower of E²/η0 and η0 H²).

    Options
    max_fraction: fraction of the reference level allowed (default 100 %).

    References
    ICNIRP, Health Phys. 118(5):483–524 (2020); 47 CFR §1.1310. This estimate supports review
    and never replaces a survey with a calibrated instrument under the local codes.
    """
    exp = ctx.model.exposure
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        if exp is None or exp.leak is None:
            yield ctx.not_applicable(subject, "leak at occupied distance ≤ reference level",
                                     "no [exposure] leak declared")
            continue
        freqs = ctx.envelope.frequencies(feed)
        levels = [reference_level(exp.table, float(f)) for f in freqs]
        worst = min(levels, key=lambda lv: lv.power_density if np.isfinite(lv.power_density) else -1)
        requirement = (f"S at {exp.occupied_distance:g} m ≤ {max_fraction:.0%} of {worst.title} "
                       f"({worst.averaging_time} average)")
        if not np.isfinite(worst.power_density):
            yield ctx.finding(subject, requirement, passed=False,
                              message=f"{feed.frequency / 1e9:.4g} GHz lies outside the range of "
                                      f"table '{exp.table}': choose a table that covers it")
            continue
        s = leak_power_density(exp.leak.power_density, exp.leak.distance, exp.occupied_distance)
        limit = max_fraction * worst.power_density
        d_ok = distance_for_level(exp.leak.power_density, exp.leak.distance, limit)
        passed = s <= limit
        msg = (f"leak estimate {s:.3g} W/m² at {exp.occupied_distance:g} m against "
               f"{limit:.3g} W/m² ({worst.title}); the estimate reaches the level at "
               f"{d_ok * 1e3:.3g} mm. An estimate: survey the installed source.")
        yield ctx.finding(subject, requirement, passed=passed, message=msg,
                          measured=Quantity(s, "W/m^2"), limit=Quantity(limit, "W/m^2"),
                          margin=Quantity(limit - s, "W/m^2"),
                          worst_case={"frequency": Quantity(worst.frequency, "Hz"),
                                      "distance_to_level": Quantity(d_ok, "m")})
