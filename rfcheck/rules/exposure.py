"""Exposure of people near the source: leaked RF power against the reference levels of a
named table, aperture attenuation below cutoff, and the static fringe-field lines."""

from __future__ import annotations

import math
from collections.abc import Iterator

import numpy as np

from rfcheck.analysis.exposure import leak_analysis, path_attenuation_db, path_cutoff
from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.units import format_si

from .context import Context
from .registry import Option, Range, rule

SUBJECT = "occupied distance"


def table_text(table) -> str:
    """The table as a finding names it: title, standard, edition, averaging, confidence."""
    origin = "" if table.origin == "shipped" else f", site table {table.origin}"
    confidence = table.confidence.split(" ", 1)[0]
    return (f"{table.title} (edition {table.edition}, {table.averaging_time} average, "
            f"confidence {confidence}{origin})")


def _mm(x: float) -> str:
    return f"{x * 1e3:.4g} mm" if x < 1.0 else f"{x:.4g} m"


@rule("exposure.leak-level", severity=Severity.ERROR,
      summary="The leak estimate at the occupied distance, summed over the feeds, stays below "
              "the reference levels of the named exposure table.",
      options={"max_fraction": Option("ratio", "highest allowed exposure ratio Σ S_i/S_RL(f_i)",
          valid=Range(0.0, 1.0,
                      "an exposure ratio above 1 exceeds the reference level of the table itself", "%", low_open=True)),
               "leak_directivity": Option("ratio", "directivity of a small leak in a wall",
          valid=Range(1.0, 1000.0,
                      "no radiator has a directivity below 1 (isotropic); 1000 (30 dBi) is a "
                      "large aperture antenna, far beyond any leak", "1"))},
      applies="sources with an [exposure] section giving a leak (survey or derived)")
def leak_level(ctx: Context, *, max_fraction: float, leak_directivity: float) -> Iterator[Finding]:
    """What it checks
    The power density at the occupied distance from the declared leak, for every feed at the
    worst of its envelope frequencies, and the exposure ratio R = Σ_i S_i / S_RL(f_i) (the
    sum over simultaneous frequencies the guidelines require) against `max_fraction`.
    The leak is either a survey reading (scaled with the forward power when the survey's
    power is declared) or derived from each feed's average forward power and the declared
    leak paths: seams with their attenuation (flange, choke, door), apertures below cutoff
    from their geometry. The finding names the leak model and the table (standard,
    edition, population, averaging time, confidence), and the distance at which the
    estimate falls to the level.

    Why it matters
    People near a source are exposed to leakage from flanges, windows, viewports and vents.
    The reference levels of the applicable standard bound that exposure; which standard,
    edition and population apply is for the site's RF-safety officer to say.

    Equation
    Survey: S = S_m (P/P_m)(d_m/d)². Derived: S = D_l P 10^(−A/10) / (4π d²) per path.
    R = Σ_i S_i/S_RL(f_i) (below 30 MHz S_RL = min(E²/η0, η0 H²)). Both laws hold only in the
    far field of each leak, beyond max(2D²/λ, λ): closer, the estimate does not hold, no
    distance is stated and the finding is a warning that asks for a survey.

    Options
    max_fraction: highest allowed exposure ratio (default 100 % of the level).
    leak_directivity: directivity of a small leak in a conducting wall (default 3).

    References
    ICNIRP, Health Phys. 118(5):483–524 (2020); IEEE Std C95.1-2019; 47 CFR §1.1310;
    Balanis, Antenna Theory (2005), ch. 2, 4. This estimate supports review and never
    replaces a survey with a calibrated instrument under the local codes.
    """
    exp = ctx.model.exposure
    a = leak_analysis(ctx, leak_directivity)
    if a is None:
        why = ("no [exposure] section" if exp is None else
               "no leak declared in [exposure]: give a survey reading or the leak paths")
        yield ctx.not_applicable(SUBJECT, "exposure ratio at the occupied distance ≤ limit", why)
        return
    table = exp.table
    d = exp.occupied_distance
    requirement = f"Σ S_i/S_RL(f_i) at {d:g} m ≤ {max_fraction:.3g} ({table.title})"
    if a.outside_table:
        yield ctx.finding(SUBJECT, requirement, passed=False,
                          message=f"feed(s) {', '.join(a.outside_table)} lie outside the "
                                  f"frequency range of table '{table.id}': choose a table that "
                                  "covers them")
        return
    parts = []
    for f in a.feeds:
        who = "broadband readings" if f.feed == "broadband" else f"feed {f.feed}"
        parts.append(f"{who} {format_si(f.power_density, 'W/m^2')} against "
                     f"{format_si(f.level.power_density, 'W/m^2')} at "
                     f"{format_si(f.frequency, 'Hz')} (ratio {f.ratio:.3g})")
    if a.model == "derived":
        biggest = max((c for f in a.feeds for c in f.contributions),
                      key=lambda c: c.power_density, default=None)
        source = (f"leak derived from the average forward power through "
                  f"{len(exp.leak.paths)} declared path(s)")
        if biggest is not None:
            source += (f", the largest {biggest.source} ({biggest.attenuation_db:.3g} dB, "
                       f"{format_si(biggest.leaked_power, 'W')} leaked)")
    else:
        source = f"leak from {sum(len(f.contributions) for f in a.feeds)} survey reading(s)"
    ratio = a.ratio
    limit_far = max(a.far_field, a.reading_distance)
    details = {"leak_model": a.model, "table": table.id, "standard": table.standard,
               "confidence": table.confidence, "ratio": ratio,
               "far_field_distance": a.far_field, "assumptions": list(a.assumptions),
               "feeds": {f.feed: {"power_density": f.power_density, "frequency": f.frequency,
                                  "reference_level": f.level.power_density, "ratio": f.ratio}
                         for f in a.feeds}}
    head = (f"exposure ratio {ratio:.3g} at {d:g} m ({'; '.join(parts)}); {source}; table: "
            f"{table_text(table)}")
    worst = {}
    if not a.in_far_field:
        if d < a.reading_distance:
            reason = (f"the occupied distance {d:g} m lies inside the survey distance "
                      f"{_mm(a.reading_distance)}: a reading is carried outward only")
        else:
            reason = (f"the occupied distance {d:g} m lies in the near field of "
                      f"{a.far_field_source} (far field beyond {_mm(a.far_field)}, "
                      "max(2D²/λ, λ))")
        msg = (f"{head}. The inverse-square estimate does not hold here: {reason}. Survey the "
               "installed source with a calibrated instrument at the occupied positions.")
        yield ctx.finding(SUBJECT, requirement, passed=True, warn=True, message=msg,
                          measured=Quantity(ratio, "1"), limit=Quantity(max_fraction, "1"),
                          margin=Quantity(max_fraction - ratio, "1"), details=details)
        return
    d_level = a.distance_to(max_fraction)
    if d_level >= limit_far:
        where = f"the estimate falls to the level at {_mm(d_level)}"
        worst["distance_to_level"] = Quantity(d_level, "m")
    else:
        where = (f"the estimate falls to the level inside the near field (beyond "
                 f"{_mm(limit_far)} only is the inverse-square law used), so no distance is "
                 "stated")
    notes = f" Assumed: {'; '.join(a.assumptions)}." if a.assumptions else ""
    msg = f"{head}. {where[0].upper() + where[1:]}. An estimate: survey the installed source.{notes}"
    yield ctx.finding(SUBJECT, requirement, passed=ratio <= max_fraction, message=msg,
                      measured=Quantity(ratio, "1"), limit=Quantity(max_fraction, "1"),
                      margin=Quantity(max_fraction - ratio, "1"), worst_case=worst,
                      details=details)


@rule("exposure.aperture-attenuation", severity=Severity.ERROR,
      summary="Every vent, viewport tube or perforated plate attenuates each feed below cutoff "
              "by at least what the reference level at the occupied distance needs.",
      options={"min_margin": Option("ratio", "attenuation required beyond the need (dB)",
          valid=Range(1.0, 1e10,
                      "below 0 dB the aperture would be allowed to leak more than the reference "
                      "level needs; 100 dB is beyond what a shielding measurement resolves", "dB")),
               "leak_directivity": Option("ratio", "directivity of a small leak in a wall",
          valid=Range(1.0, 1000.0,
                      "no radiator has a directivity below 1 (isotropic); 1000 (30 dBi) is a "
                      "large aperture antenna, far beyond any leak", "1"))},
      applies="derived leaks with aperture paths")
def aperture_attenuation(ctx: Context, *, min_margin: float,
                         leak_directivity: float) -> Iterator[Finding]:
    """What it checks
    For each aperture leak path (n identical tubes of circular or rectangular cross-section
    and depth t) and each feed whose power reaches it: that the cells are below the cutoff
    of their lowest mode over the feed's frequency tolerance, and that their attenuation
    A(f) = A_tube(f) − 10 log10 n is at least the attenuation needed for this aperture alone
    to bring the power density at the occupied distance to the reference level, plus
    `min_margin`, at the worst frequency. The sum over all paths is judged by
    exposure.leak-level.

    Why it matters
    A vent or viewport that propagates, or whose tubes are too short, leaks most of the
    power it sees; the sizes that keep it below cutoff are fixed at design time.

    Equation
    Circular TE11: f_c = 1.8412 c/(π d); rectangular TE10: f_c = c/(2w).
    A_tube = 8.686 (2π f_c/c) √(1 − (f/f_c)²) t dB (≈ 32.0 t/d and 27.3 t/w far below
    cutoff). A_need = 10 log10(D_l P / (4π d² S_RL(f))), floored at 0 dB.
    The entrance reflection of the tube is not credited (conservative).

    Options
    min_margin: attenuation beyond the need, dB (default 0 dB).
    leak_directivity: as exposure.leak-level.

    References
    D.M. Pozar, Microwave Engineering, 4th ed. (Wiley 2012), §3.3–3.4; H.W. Ott,
    Electromagnetic Compatibility Engineering (Wiley 2009), ch. 6 (arrays of holes);
    ICNIRP (2020). A design estimate: survey the installed source.
    """
    exp = ctx.model.exposure
    apertures = ([p for p in exp.leak.paths if p.kind == "aperture"]
                 if exp is not None and exp.leak is not None and exp.leak.model == "derived"
                 else [])
    if not apertures:
        yield ctx.not_applicable("apertures", "apertures below cutoff attenuate enough",
                                 "no aperture leak paths declared (a derived leak with "
                                 "kind = \"aperture\")")
        return
    from rfcheck.physics.exposure import far_field_distance, reference_level

    margin_db = 10.0 * math.log10(min_margin) if min_margin > 0 else 0.0
    d = exp.occupied_distance
    for p in apertures:
        fc = path_cutoff(p)
        shape = ("⌀" + _mm(p.diameter) if p.shape == "circular"
                 else f"{_mm(p.width)} × {_mm(p.height)}")
        cell = (f"{p.count} × {shape} cells, {_mm(p.depth)} deep" if p.count > 1
                else f"one {shape} tube, {_mm(p.depth)} deep")
        for feed in ctx.model.feeds:
            if p.feeds and feed.id not in p.feeds:
                continue
            subject = f"aperture {p.id}, feed {feed.id}"
            freqs = ctx.envelope.frequencies(feed)
            requirement = f"A(f) ≥ A_need(f) + {margin_db:.3g} dB over {format_si(freqs[0], 'Hz')}–{format_si(freqs[-1], 'Hz')}"
            if freqs[-1] >= fc:
                yield ctx.finding(subject, requirement, passed=False,
                                  message=f"{cell}: the cells propagate at "
                                          f"{format_si(freqs[-1], 'Hz')}, above their cutoff "
                                          f"{format_si(fc, 'Hz')}; below-cutoff attenuation needs "
                                          "cells whose lowest-mode cutoff lies well above the "
                                          "feed frequency",
                                  measured=Quantity(float(freqs[-1]), "Hz"),
                                  limit=Quantity(fc, "Hz"),
                                  margin=Quantity(fc - float(freqs[-1]), "Hz"))
                continue
            att = path_attenuation_db(p, freqs)
            levels = np.array([reference_level(exp.table, float(f)).power_density for f in freqs])
            if not np.isfinite(levels).all():
                yield ctx.finding(subject, requirement, passed=False,
                                  message=f"feed {feed.id} lies outside the frequency range of "
                                          f"table '{exp.table.id}'")
                continue
            need = np.maximum(10.0 * np.log10(leak_directivity * feed.average_power
                                              / (4 * math.pi * d * d * levels)), 0.0)
            slack = att - need - margin_db
            k = int(np.argmin(slack))
            r_ff = float(np.max(far_field_distance(p.size, freqs)))
            array = (f" ({att[k] + 10 * math.log10(p.count):.3g} dB per tube, "
                     f"−{10 * math.log10(p.count):.3g} dB for {p.count} cells)" if p.count > 1 else "")
            msg = (f"{cell}: cutoff {format_si(fc, 'Hz')}; attenuation {att[k]:.3g} dB{array} "
                   f"at {format_si(float(freqs[k]), 'Hz')} against "
                   f"{need[k]:.3g} dB needed for {format_si(feed.average_power, 'W')} average "
                   f"to fall to {format_si(float(levels[k]), 'W/m^2')} at {d:g} m")
            if margin_db:
                msg += f" plus a margin of {margin_db:.3g} dB"
            near = d < r_ff
            if near:
                msg += (f"; the occupied distance lies in the aperture's near field (far field "
                        f"beyond {_mm(r_ff)}): the need is a far-field estimate, survey the "
                        "installed source")
            yield ctx.finding(subject, requirement, passed=bool(slack[k] >= 0) or near,
                              warn=near, message=msg,
                              measured=Quantity(float(att[k]), "dB"),
                              limit=Quantity(float(need[k] + margin_db), "dB"),
                              margin=Quantity(float(slack[k]), "dB"),
                              worst_case={"frequency": Quantity(float(freqs[k]), "Hz")},
                              details={"cutoff": fc, "attenuation_db": float(att[k]),
                                       "needed_db": float(need[k]), "far_field": r_ff})


from .exposure_static import static_field_line  # noqa: E402,F401  (registers exposure.static-field-line)
