"""The RF line of each feed: operating band and (later) breakdown."""

from __future__ import annotations

import math
from collections.abc import Iterator

from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.physics.waveguide import line_from_name

from .context import Context
from .registry import rule


@rule("line.waveguide-band", severity=Severity.ERROR,
      summary="Each feed's frequency band lies in its line's single-mode band "
              "(warning outside the recommended band).",
      applies="feeds on a standard or user-defined waveguide or coaxial line; not free space")
def waveguide_band(ctx: Context) -> Iterator[Finding]:
    """What it checks
    The feed's frequency band f ± tolerance against its line: the dominant mode must
    propagate (f > f_c of TE10 / TE11) and the next mode must stay cut off (f below the
    lower of TE20 and TE01 for rectangular guide): a failure otherwise. Inside that
    single-mode band but outside the recommended operating band (about 1.25–1.9 f_c for
    rectangular guide, from the EIA band edges) the finding is a warning.

    Why it matters
    Near cutoff the guide wavelength and wave impedance change fast with frequency, wall
    loss and field strength rise, and tuners and windows designed at the nominal frequency
    mismatch. Above the next cutoff a second mode can carry power with another field pattern,
    spoiling the launch polarisation and heating unexpected places.

    Equation
    TE10: f_c = c / (2a); TE20: c / a; TE01: c / (2b); λ_g = λ0 / √(1 − (f_c/f)²).

    References
    EIA RS-261-B (1979) and IEC 60153-2 (rectangular waveguide sizes and bands);
    D. M. Pozar, Microwave Engineering, ch. 3.
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        line = line_from_name(feed.line)
        requirement = f"{line.name}: single-mode band, recommended band " \
                      f"{line.recommended_band[0] / 1e9:.3g}–{line.recommended_band[1] / 1e9:.3g} GHz" \
            if line.cutoff > 0 else f"{line.name}"
        if line.kind == "free-space":
            yield ctx.not_applicable(subject, requirement, "quasi-optical (free-space) feed: no "
                                     "waveguide cutoff")
            continue
        f_lo = feed.frequency - feed.frequency_tolerance
        f_hi = feed.frequency + feed.frequency_tolerance
        band_lo, band_hi = line.recommended_band
        # the binding edge: the one the band comes closest to (relative distance)
        low_gap = (f_lo - band_lo) / feed.frequency
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
        ratio = f"{feed.frequency / line.cutoff:.3f} f_c" if line.cutoff > 0 else ""
        if not propagates:
            msg = (f"{f_lo / 1e9:.4g} GHz is at or below the {line.dominant_mode} cutoff "
                   f"{line.cutoff / 1e9:.4g} GHz of {line.name}: the guide does not propagate")
        elif not single:
            msg = (f"{f_hi / 1e9:.4g} GHz is above the next-mode cutoff {line.next_cutoff / 1e9:.4g} GHz "
                   f"of {line.name}: more than one mode propagates")
        elif not in_band:
            edge = "below" if low_gap < 0 else "above"
            msg = (f"{feed.frequency / 1e9:.4g} GHz ({ratio}) lies {edge} the recommended band of "
                   f"{line.name} ({band_lo / 1e9:.3g}–{band_hi / 1e9:.3g} GHz) but in its "
                   "single-mode band")
        else:
            msg = (f"{feed.frequency / 1e9:.4g} GHz ± {feed.frequency_tolerance / 1e6:.3g} MHz "
                   f"({ratio}) lies in the recommended band of {line.name} "
                   f"({band_lo / 1e9:.3g}–{band_hi / 1e9:.3g} GHz)")
        yield ctx.finding(subject, requirement, passed=propagates and single,
                          warn=not in_band, message=msg,
                          measured=Quantity(measured, "Hz"), limit=Quantity(limit, "Hz"),
                          margin=Quantity(margin, "Hz"), worst_case=worst)
