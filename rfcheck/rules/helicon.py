"""Helicon feeds: whether the declared antenna can launch the bounded m = 1 helicon over the
envelope, and the drive frequency against the lower-hybrid frequency.

These rules speak only about feeds with ``absorption = "helicon"``; a source without one
gets no finding from them (they are about a source kind, as the ``inductive.*`` rules).
The field under the antenna is the analysis :func:`rfcheck.analysis.helicon.antenna_field`.
"""

from __future__ import annotations

import math
from collections.abc import Iterator

import numpy as np

from rfcheck.analysis.helicon import antenna_field
from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.physics.frequencies import lower_hybrid_frequency
from rfcheck.physics.helicon import (antenna_band, antenna_wavenumber, branch_merge_field,
                                     helicon_density, helicon_wavenumber, on_helicon_branch,
                                     radial_wavenumber)

from .context import Context
from .registry import Option, Range, rule


def _helicon_feeds(ctx: Context):
    return [f for f in ctx.model.feeds if f.absorption == "helicon"]


def _mt(b: float) -> str:
    return f"{b * 1e3:.4g} mT"


@rule("helicon.antenna-coupling", severity=Severity.ERROR,
      summary="Over the envelope, the bounded helicon mode the plasma supports has an axial "
              "wavenumber inside the antenna's launched band, on the helicon branch.",
      options={"max_offset": Option("ratio", "largest relative distance of the needed axial "
                                             "wavenumber from the antenna's main wavenumber π/L",
          valid=Range(0.0, 1.0, "at twice or zero times π/L a half-wavelength antenna launches "
                                "nothing (the zeros of its spectrum)", "%", low_open=True,
                      high_open=True))},
      applies="feeds with absorption = \"helicon\" that declare their antenna")
def antenna_coupling(ctx: Context, *, max_offset: float) -> Iterator[Finding]:
    """What it checks
    For every density of the envelope, every field on the axis under the antenna (its span
    round launch.z, at each current scale of the magnet's tolerance) and every frequency of
    the feed's band, the axial wavenumber k_z of the lowest bounded m = 1 helicon mode of the
    tube (radius a = the chamber radius, k_⊥ = 3.8317/a) is solved from the dispersion with
    the electron mass kept, and its distance from the antenna's main wavenumber
    k_0 = π/L (a half-wavelength antenna: Nagoya type III, half-turn helical, double saddle;
    λ_z = 2L) is compared with max_offset: |k_z/k_0 − 1| ≤ max_offset. Each point must also
    lie on the helicon branch (field above B_TG = 2 m_e ω k/(e k_z), where the helicon and
    Trivelpiece–Gould roots merge); a point below it is on the Trivelpiece–Gould branch and
    fails, named so. The message gives the density the antenna's k_0 needs at the lowest
    and the highest field (the density–field relation), and names the Trivelpiece–Gould
    branch where the axis field along the column (the whole chamber, every current scale)
    falls below B_TG for the antenna's k_0 (there the bounded mode at k_0 is on that branch).

    Why it matters
    A helicon source reaches its high density only where the plasma's bounded mode matches
    what the antenna launches: the density rises with the field along n ∝ B at fixed k_z.
    Outside the antenna's spectrum the discharge drops to a low-density inductive or
    capacitive mode (density jumps, a load the match cannot follow); on the
    Trivelpiece–Gould branch the power goes into an electrostatic edge wave that heats the
    tube wall under the antenna.

    Equation
    δ k² − k_z k + δ k_s² = 0 (δ = ω/ω_ce, k_s = ω_pe/c, k² = k_⊥² + k_z²); without the
    electron mass k k_z = e μ0 n ω / B; antenna spectrum ∝ |sin(k_z L/2)|, half power at
    k_z = k_0/2 and 3k_0/2.

    Options
    max_offset: default 50 % (the half-power points of the antenna's axial spectrum).

    References
    M. A. Lieberman & A. J. Lichtenberg, Principles of Plasma Discharges and Materials
    Processing, 2nd ed. (Wiley 2005), ch. 13 (helicon dispersion, bounded column, antennas);
    F. F. Chen & D. Arnush, Phys. Plasmas 4 (1997) 3411 (helicon and Trivelpiece–Gould
    roots) — forms from memory. The J_1(k_⊥ a) = 0 boundary condition is the k_⊥ ≫ k_z limit;
    higher radial modes and the plasma's radial profile shift the density by tens of per cent.
    """
    requirement = (f"axial wavenumber of the bounded helicon within ±{max_offset:.0%} of the "
                   "antenna's π/L over the envelope, on the helicon branch")
    radius = ctx.model.chamber.radius
    for feed in _helicon_feeds(ctx):
        subject = f"feed {feed.id}"
        ant = feed.antenna
        if ant is None:
            yield ctx.not_applicable(subject, requirement, "no antenna declared for this helicon "
                                     "feed (feed.antenna): its launched wavenumber is unknown")
            continue
        k0 = float(antenna_wavenumber(ant.type, ant.length))
        b = antenna_field(ctx, feed)  # (scales, points)
        n = ctx.envelope.density[:, None, None, None]
        bb = b[None, :, :, None]
        f = ctx.envelope.frequencies(feed)[None, None, None, :]
        kz = helicon_wavenumber(n, bb, f, radius)
        offset = np.abs(kz / k0 - 1.0)
        helicon = on_helicon_branch(bb, f, kz, radius)
        bad = np.where(np.isnan(offset) | ~helicon, np.inf, offset)
        idx = np.unravel_index(int(np.argmax(bad)), bad.shape)
        worst = float(offset[idx])
        kz_w = float(kz[idx])
        b_w = float(bb.reshape(bb.shape[1], bb.shape[2])[idx[1], idx[2]])
        f_w = float(f.reshape(-1)[idx[3]])
        n_w = float(n.reshape(-1)[idx[0]])
        b_lo, b_hi = float(np.min(b)), float(np.max(b))
        k_lo, k_hi = (float(x) for x in antenna_band(ant.type, ant.length))
        n_at = [float(helicon_density(x, feed.frequency, k0, radius)) for x in (b_lo, b_hi)]
        b_tg = float(branch_merge_field(feed.frequency, k0, radius))
        k_perp = float(radial_wavenumber(radius))
        relation = (f"the antenna's k_0 = π/L = {k0:.4g} m^-1 (λ_z = {2 * ant.length:.3g} m, "
                    f"k_⊥ = 3.832/a = {k_perp:.4g} m^-1) needs n = {n_at[0]:.3g} m^-3 at "
                    f"{_mt(b_lo)} and {n_at[1]:.3g} m^-3 at {_mt(b_hi)} (field under the "
                    f"antenna); its half-power band {k_lo:.4g}–{k_hi:.4g} m^-1; the "
                    f"Trivelpiece–Gould branch takes over below about {_mt(b_tg)}")
        axis = ctx.axis_field()
        j = np.unravel_index(int(np.argmin(axis)), axis.shape)
        b_axis_min, z_axis_min = float(axis[j]), float(ctx.axis_z[j[1]])
        if b_axis_min < b_tg:
            relation += (f"; along the column the axis field falls to {_mt(b_axis_min)} at "
                         f"z = {z_axis_min * 1e3:.4g} mm, below that: there the bounded "
                         "mode at the antenna's k_0 is a Trivelpiece–Gould wave (damped near "
                         "the wall), not a helicon")
        on_tg = not bool(helicon[idx]) and math.isfinite(kz_w)
        if not math.isfinite(kz_w):
            msg = (f"no helicon at n_e = {n_w:.3g} m^-3, B = {_mt(b_w)}: the drive is not below "
                   "the electron cyclotron frequency there; " + relation)
        else:
            msg = (f"needed k_z = {kz_w:.4g} m^-1 ({kz_w / k0:.3g} × k_0) at n_e = {n_w:.3g} "
                   f"m^-3, B = {_mt(b_w)}"
                   + (": on the Trivelpiece–Gould branch (field below "
                      f"{_mt(float(branch_merge_field(f_w, kz_w, radius)))} for this mode), "
                      "not a helicon" if on_tg else ", helicon branch")
                   + f"; offset {worst:.1%} against ±{max_offset:.0%}; " + relation)
        passed = math.isfinite(worst) and not on_tg and worst <= max_offset
        yield ctx.finding(subject, requirement, passed=passed, message=msg,
                          measured=Quantity(worst if math.isfinite(worst) else None, "1",
                                            "" if math.isfinite(worst) else "no helicon"),
                          limit=Quantity(max_offset, "1"),
                          margin=Quantity(max_offset - worst if math.isfinite(worst) else None,
                                          "1", "" if math.isfinite(worst) else "no helicon"),
                          worst_case={"density": Quantity(n_w, "m^-3"),
                                      "field": Quantity(b_w, "T"),
                                      "frequency": Quantity(f_w, "Hz")},
                          details={"k0_per_m": k0, "kz_per_m": kz_w, "branch":
                                   "trivelpiece-gould" if on_tg else "helicon",
                                   "density_at_k0": n_at, "field_range_t": [b_lo, b_hi],
                                   "branch_merge_field_t": b_tg})


@rule("helicon.lower-hybrid", severity=Severity.WARNING,
      summary="The drive frequency of each helicon feed lies well above the lower-hybrid "
              "frequency over the envelope.",
      options={"min_ratio": Option("ratio", "least ratio of the drive frequency to the largest "
                                            "lower-hybrid frequency",
          valid=Range(1.0, 100.0, "below the lower-hybrid frequency the whistler branch is "
                                  "gone; a hundredfold margin is beyond any design", "1"))},
      applies="feeds with absorption = \"helicon\"")
def lower_hybrid(ctx: Context, *, min_ratio: float) -> Iterator[Finding]:
    """What it checks
    The lower-hybrid frequency f_LH (the exact lower root of S = 0 for electrons and the
    plasma's main ion species) over the envelope's densities and the field along the whole
    axis of the chamber at every current scale, its largest value against the lowest drive
    frequency of the feed: f_min / f_LH,max ≥ min_ratio. The message gives the ion and the
    electron cyclotron frequencies at that field, the ordering the helicon form assumes
    (f_ci ≪ f ≪ f_ce).

    Why it matters
    The helicon dispersion treats the ions as immobile; near the lower-hybrid frequency
    their motion enters at order (f_LH/f)², the whistler turns into the lower-hybrid wave
    and the density–field relation of helicon.antenna-coupling no longer holds (in a strong
    field, a heavy gas or a long high-field region the ordering fails first downstream of the
    antenna, where the wave propagates along the column).

    Equation
    S = 1 − ω_pe²/(ω² − ω_ce²) − ω_pi²/(ω² − Ω_ci²) = 0, lower root (dense limit
    f_LH ≈ √(f_ci f_ce)).

    Options
    min_ratio: default 2 (common practice: the ion correction of order (f_LH/f)² stays
    below about 25 %).

    References
    T. H. Stix, Waves in Plasmas (AIP 1992), ch. 1-2 (S, the hybrid resonances);
    M. A. Lieberman & A. J. Lichtenberg, Principles of Plasma Discharges and Materials
    Processing, 2nd ed. (Wiley 2005), ch. 13 (the helicon frequency ordering).
    """
    requirement = f"lowest drive frequency ≥ {min_ratio:.3g} × the largest lower-hybrid frequency"
    feeds = _helicon_feeds(ctx)
    if not feeds:
        return
    ions = ctx.model.plasma.ions
    ion = max(ions, key=lambda i: i.fraction).species
    b = ctx.axis_field()  # (scales, z)
    b_max = float(np.max(b))
    n = ctx.envelope.density
    f_lh = lower_hybrid_frequency(n, b_max, ion)  # f_LH grows with density and field
    i = int(np.argmax(f_lh))
    lh = float(f_lh[i])
    from rfcheck.physics.frequencies import electron_cyclotron_frequency, ion_cyclotron_frequency

    f_ce = float(electron_cyclotron_frequency(b_max))
    f_ci = float(ion_cyclotron_frequency(b_max, ion))
    for feed in feeds:
        f_min = float(np.min(ctx.envelope.frequencies(feed)))
        ratio = f_min / lh
        msg = (f"largest lower-hybrid frequency {lh / 1e6:.4g} MHz ({ion}, n_e = {n[i]:.3g} "
               f"m^-3, B = {_mt(b_max)}, the highest field on the axis); drive "
               f"{f_min / 1e6:.6g} MHz is {ratio:.3g} × f_LH (f_ci = {f_ci / 1e3:.4g} kHz, "
               f"f_ce = {f_ce / 1e6:.4g} MHz there)")
        if f_min >= f_ce:
            msg += "; the drive is above the electron cyclotron frequency: no whistler branch"
        yield ctx.finding(f"feed {feed.id}", requirement,
                          passed=ratio >= min_ratio and f_min < f_ce, message=msg,
                          measured=Quantity(ratio, "1"), limit=Quantity(min_ratio, "1"),
                          margin=Quantity(ratio - min_ratio, "1"),
                          worst_case={"density": Quantity(float(n[i]), "m^-3"),
                                      "field": Quantity(b_max, "T")},
                          details={"lower_hybrid_frequency": lh, "ion": ion})
