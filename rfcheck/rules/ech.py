"""Electron-cyclotron heating feeds: optical depth, cutoff densities and stray radiation of a
heating scheme (fundamental O, second-harmonic X), and the checks of sources fed at more than
one frequency (resonance surfaces apart, a shared circulator, power crossing between feeds).

Which feeds: a *heating scheme* is a feed with `mode = "O"` and `absorption = "ecr"` (O1),
`mode = "O"` and `"ecr-harmonic-2"` (O2) or `mode = "X"` and `"ecr-harmonic-2"` (X2). The
R-wave ECR sources (2.45-18 GHz ion sources along the axis) are judged by the access and
absorption rules; they get no finding from the scheme rules here. The multi-feed rules speak
only where a source has two or more ECR feeds (separation, cross-coupling) or feeds that name
one circulator (shared circulator). The optical depth over the envelope is an analysis
(:func:`rfcheck.analysis.ech.heating_optical_depth`); the rules here judge it.
"""

from __future__ import annotations

import math
from collections.abc import Iterator

import numpy as np

from rfcheck.analysis.ech import heating_optical_depth
from rfcheck.analysis.launch_path import NEAR_FIELD
from rfcheck.analysis.load import cold_gamma, plasma_return, running_gamma
from rfcheck.analysis.resonance import ECR_HARMONIC
from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.model import Feed
from rfcheck.physics.absorption import MAX_TEMPERATURE_EV
from rfcheck.physics.constants import M_E_C2_EV
from rfcheck.physics.frequencies import critical_density, ecr_field
from rfcheck.physics.waveguide import line_from_name

from .context import Context
from .registry import Option, Range, rule

__all__ = ["heating_scheme", "ech_feeds"]

#: the validity of the optical-depth forms, stated in every finding
VALIDITY = ("tenuous-plasma, weakly relativistic forms (Bornatici et al. 1983, Nucl. Fusion 23, "
            "1153): valid for X = n_e/n_c ≪ 1 (X2 and O2 forms taken to X ≤ 0.3), a Maxwellian "
            "with 0 < T_e ≤ 20 keV, N∥ ≈ 0 (perpendicular propagation), one pass through the "
            "layer, L_B = B/|∇B| along the ray")


def heating_scheme(feed: Feed) -> str | None:
    """"O1", "O2" or "X2" for an electron-cyclotron heating feed, else None."""
    h = ECR_HARMONIC.get(feed.absorption)
    mode = feed.launch.mode.upper()
    if h == 1 and mode == "O":
        return "O1"
    if h == 2 and mode in ("O", "X"):
        return f"{mode}2"
    return None


def ech_feeds(ctx: Context) -> list[tuple[Feed, str]]:
    return [(f, s) for f in ctx.model.feeds if (s := heating_scheme(f)) is not None]


def _oblique_text(path) -> tuple[str, float]:
    """N∥ of the launch (vacuum: N = 1) and what it means for the forms."""
    if path.theta is None:
        return "N∥ = 0 (perpendicular launch)", 0.0
    theta = path.theta
    return f"N∥ = cos θ = {math.cos(theta):.3g} at θ = {math.degrees(theta):.3g}° to B", \
        math.cos(theta)


@rule("ech.optical-depth", severity=Severity.WARNING,
      summary="Heating feeds (fundamental O, second-harmonic X or O): the single-pass optical "
              "depth of the first resonance layer over the envelope, with the validity of the "
              "tenuous, weakly relativistic forms stated.",
      options={"min_optical_depth": Option(
          "ratio", "least single-pass optical depth τ (3: 95 % absorbed in one pass)",
          valid=Range(0.0, 50.0, "τ = 50 absorbs all but e^-50 of the power: beyond is no "
                                 "different", "1", low_open=True))},
      applies="feeds with mode O and absorption ecr (O1), or mode X/O and ecr-harmonic-2")
def optical_depth(ctx: Context, *, min_optical_depth: float) -> Iterator[Finding]:
    """What it checks
    For an electron-cyclotron heating feed, the optical depth τ of the first resonance layer
    met from the launcher (|B| = B_ce(f) for O1, B_ce(f)/2 for X2 and O2, on the axis), at
    every point of the envelope (peak density × magnet current scale × f ± tolerance) at the
    lowest T_e (τ grows with T_e; the highest is reported beside it), against
    min_optical_depth. The local density at the layer is the peak density times the profile
    shape there; L_B = B/|dB/dz| from the on-axis gradient at the crossing.

    Every finding states the validity of the forms: tenuous plasma (X ≪ 1), weakly
    relativistic Maxwellian (T_e ≤ 20 keV), perpendicular propagation (N∥ ≈ 0), one pass.
    An oblique launch has N∥ = cos θ ≠ 0: the resonance is then Doppler-broadened
    (N∥ > √(T_e/m_e c²)) and absorbed over a wider layer; the perpendicular τ is then an
    estimate of the order of magnitude, and the finding says so with the numbers.

    Why it matters
    A heating feed at 0.1–1 MW that is not absorbed in one pass spends its power on the
    vessel walls, windows, diagnostics and seals (see ech.stray-radiation). Low τ is normal at
    start-up (low T_e and density): the finding warns and states where.

    Equation
    τ_O1 = π² (L_B/λ) μ X √(1 − X); τ_X2 = 4π² (L_B/λ) μ X; τ_O2 = μ τ_X2;
    μ = T_e/(m_e c²), X = n_e/n_c(f), λ = c/f; absorbed 1 − e^(−τ).

    Options
    min_optical_depth: default 3 (95 % single-pass absorption; common practice for a heating
    scheme that does not rely on wall reflections).

    References
    M. Bornatici, R. Cano, O. De Barbieri, F. Engelmann, Nucl. Fusion 23 (1983) 1153 (the
    tenuous-plasma limits of their results).
    """
    requirement = f"single-pass optical depth τ ≥ {min_optical_depth:.3g}"
    for feed, scheme in ech_feeds(ctx):
        subject = f"feed {feed.id}"
        path, grid, shape, l_b, zc, out = heating_optical_depth(ctx, feed, scheme)
        t_lo, t_hi = min(out), max(out)
        tau_lo, od_lo = out[t_lo]
        worst, where = grid.worst(tau_lo, "min")
        where["electron_temperature"] = Quantity(t_lo, "eV")
        tau_best = float(np.nanmax(out[t_hi][0])) if np.isfinite(out[t_hi][0]).any() else math.nan
        oblique, n_par = _oblique_text(path)
        mu_lo = t_lo / M_E_C2_EV
        x_all = np.broadcast_to(od_lo.density_ratio, grid.shape)
        x_ok = x_all[np.isfinite(x_all) & np.isfinite(tau_lo)]
        x_lo, x_hi = (float(x_ok.min()), float(x_ok.max())) if x_ok.size else (math.nan, math.nan)
        doppler = (f"; {oblique} > √(T_e/m_e c²) = {math.sqrt(mu_lo):.3g} at the lowest T_e: "
                   "Doppler-broadened layer, the perpendicular τ is an order-of-magnitude "
                   "estimate" if n_par > math.sqrt(mu_lo) else f"; {oblique}")
        x_text = (f"X at the layer {x_lo:.3g}–{x_hi:.3g}" if math.isfinite(x_lo)
                  else "X at the layer undefined (no layer)")
        limits = (f"{x_text}, T_e {t_lo:.4g}–{t_hi:.4g} eV "
                  f"(form limit {MAX_TEMPERATURE_EV / 1e3:.3g} keV)")
        if not math.isfinite(worst):
            idx = np.unravel_index(int(np.argmax(np.where(np.isnan(tau_lo), 1, 0))), grid.shape)
            missing = bool(np.isnan(zc[idx[1], idx[2]]))
            why = ("no resonance layer on the launch path at this envelope point" if missing
                   else str(np.broadcast_to(od_lo.reason, grid.shape)[idx]))
            yield ctx.finding(subject, requirement, passed=False,
                              message=f"{scheme} optical depth undefined: {why}. Validity: "
                                      f"{VALIDITY}; {limits}{doppler}",
                              measured=Quantity(None, "1", why),
                              limit=Quantity(min_optical_depth, "1"), worst_case=where)
            continue
        i, j, k = np.unravel_index(int(np.nanargmin(np.where(np.isnan(tau_lo), np.inf, tau_lo))),
                                   grid.shape)
        reason = str(np.broadcast_to(od_lo.reason, grid.shape)[i, j, k])
        msg = (f"{scheme} τ = {worst:.3g} at the least absorbing envelope point (layer at z = "
               f"{zc[j, k] * 1e3:.4g} mm, B = {float(ecr_field(grid.frequency.reshape(-1)[k], harmonic=1 if scheme == 'O1' else 2)):.4g} T, "
               f"L_B = {l_b[j, k] * 1e3:.4g} mm, X = {float(x_all[i, j, k]):.3g}, T_e = "
               f"{t_lo:.4g} eV): absorbed in one pass {-math.expm1(-worst):.3g}; at the highest "
               f"T_e ({t_hi:.4g} eV) τ reaches {tau_best:.3g}. Validity: {VALIDITY}; {limits}"
               f"{doppler}" + (f"; at this point: {reason}" if reason else ""))
        yield ctx.finding(subject, requirement, passed=worst >= min_optical_depth, message=msg,
                          measured=Quantity(worst, "1"), limit=Quantity(min_optical_depth, "1"),
                          margin=Quantity(worst - min_optical_depth, "1"), worst_case=where)


@rule("ech.cutoff-density", severity=Severity.ERROR,
      summary="Heating feeds: the envelope's peak density stays below the cutoff density of the "
              "heating wave (O mode: n_c; X mode at the second harmonic: n_c/2) with a margin.",
      options={"max_fraction": Option(
          "ratio", "largest allowed share of the cutoff density",
          valid=Range(0.0, 1.0, "beyond 100 % the wave is cut off", "%", low_open=True))},
      applies="feeds with mode O and absorption ecr (O1), or mode X/O and ecr-harmonic-2")
def cutoff_density(ctx: Context, *, max_fraction: float) -> Iterator[Finding]:
    """What it checks
    The envelope's peak electron density n_max against the cutoff density of the heating
    wave at the lowest frequency of f ± tolerance (where it is least):
    O mode (O1, O2): the plasma cutoff P = 0, n = n_c = ε0 m_e ω²/e², at any angle to B;
    X mode at the second harmonic from the low-field side: the R cutoff X = 1 − Y met in
    front of the layer, which at the layer itself (Y = ω_ce/ω = 1/2) is n = n_c/2.
    The limit is max_fraction times that density; the margin is in m^-3.

    Why it matters
    Above cutoff the wave is reflected before it reaches the layer: no heating, and the
    full power goes back to the launcher and into the vessel. Heating schemes therefore
    keep a margin below cutoff.

    Equation
    n_c = ε0 m_e (2π f)²/e² (= 2.431e20 m^-3 at 140 GHz); X2: n_c/2.

    Options
    max_fraction: default 90 % (common practice: a margin for the profile's peaking and
    density fluctuations).

    References
    T. H. Stix, Waves in Plasmas (AIP 1992), ch. 1 (cutoffs P = 0, R = 0); NRL Plasma
    Formulary (2019), critical density.
    """
    n_max = ctx.model.plasma.density.max
    for feed, scheme in ech_feeds(ctx):
        subject = f"feed {feed.id}"
        f_lo = feed.frequency - feed.frequency_tolerance
        n_c = float(critical_density(f_lo))
        if scheme == "X2":
            cut, what = 0.5 * n_c, "R cutoff of the X mode at the second-harmonic layer, n_c/2"
        else:
            cut, what = n_c, "O-mode cutoff n_c (P = 0)"
        limit = max_fraction * cut
        requirement = f"peak density ≤ {max_fraction:.0%} of the {what}"
        msg = (f"peak density {n_max:.4g} m^-3 against the {what} = {cut:.4g} m^-3 at "
               f"{f_lo / 1e9:.5g} GHz (n_c = {n_c:.4g} m^-3): {n_max / cut:.3g} of cutoff, "
               f"allowed {max_fraction:.0%}")
        yield ctx.finding(subject, requirement, passed=n_max <= limit, message=msg,
                          measured=Quantity(n_max, "m^-3"), limit=Quantity(limit, "m^-3"),
                          margin=Quantity(limit - n_max, "m^-3"),
                          worst_case={"density": Quantity(n_max, "m^-3"),
                                      "frequency": Quantity(f_lo, "Hz")})


@rule("ech.stray-radiation", severity=Severity.WARNING,
      summary="Heating feeds: the average power not absorbed in the first pass (stray "
              "radiation in the vessel) against a planning level; a caution that defers to "
              "the local RF-safety codes.",
      options={"max_stray_power": Option(
          "power", "average power left after the first pass above which the finding warns",
          valid=Range(0.0, 1e8, "a power up to the spec's own bound (100 MW), in W", "1",
                      low_open=True))},
      applies="feeds with mode O and absorption ecr (O1), or mode X/O and ecr-harmonic-2")
def stray_radiation(ctx: Context, *, max_stray_power: float) -> Iterator[Finding]:
    """What it checks
    The feed's average power that the first pass leaves unabsorbed, P_avg e^(−τ), with τ
    the least optical depth over the envelope at the lowest T_e (ech.optical-depth), against
    max_stray_power. This power fills the vessel as stray radiation until the walls, windows,
    ports and diagnostics absorb it.

    This is a caution, not a judgement of exposure: the finding never calls a level
    acceptable for people. Stray millimetre-wave power leaves through viewports, bellows,
    gaps and diagnostic feedthroughs; what reaches people is for exposure.* and a survey
    under the local RF-safety codes and their qualified personnel.

    Why it matters
    At 0.1–1 MW, a few per cent unabsorbed is kilowatts on surfaces that are not cooled for
    it: melted seals and viewports, burnt cables, arcing of in-vessel components, leakage
    through unshielded ports. Start-up and low-density phases are the worst.

    Equation
    P_stray = P_peak · duty · e^(−τ_min).

    Options
    max_stray_power: default 1 kW (from memory: the order of what uncooled in-vessel parts
    and port seals tolerate; set the site's own level).

    References
    M. Bornatici et al., Nucl. Fusion 23 (1983) 1153 (τ); local RF-safety codes and the
    ICNIRP (2020) guidelines for exposure.
    """
    requirement = f"average power unabsorbed after one pass ≤ {Quantity(max_stray_power, 'W').text()}"
    for feed, scheme in ech_feeds(ctx):
        subject = f"feed {feed.id}"
        path, grid, shape, l_b, zc, out = heating_optical_depth(ctx, feed, scheme)
        tau_lo = out[min(out)][0]
        worst, where = grid.worst(tau_lo, "min")
        where["electron_temperature"] = Quantity(min(out), "eV")
        tau = worst if math.isfinite(worst) else 0.0
        stray = feed.average_power * math.exp(-tau)
        caution = ("Caution: stray millimetre-wave power can leave through viewports, bellows, "
                   "gaps and diagnostic ports; shielding, interlocks and surveys follow the "
                   "local RF-safety codes and their qualified personnel, which this finding "
                   "does not replace")
        basis = (f"τ = {worst:.3g} ({scheme})" if math.isfinite(worst)
                 else "no optical depth (taken as none absorbed)")
        msg = (f"{Quantity(stray, 'W').text()} of {Quantity(feed.average_power, 'W').text()} "
               f"average left after the first pass at the least absorbing envelope point "
               f"({basis}, lowest T_e {min(out):.4g} eV), against "
               f"{Quantity(max_stray_power, 'W').text()}. {caution}")
        yield ctx.finding(subject, requirement, passed=stray <= max_stray_power, message=msg,
                          measured=Quantity(stray, "W"), limit=Quantity(max_stray_power, "W"),
                          margin=Quantity(max_stray_power - stray, "W"), worst_case=where)


# --------------------------------------------------------------------------------------
# sources fed at more than one frequency
# --------------------------------------------------------------------------------------
def _ecr_feeds(ctx: Context) -> list[Feed]:
    return [f for f in ctx.model.feeds if f.absorption in ECR_HARMONIC]


def _b_res(feed: Feed, f: float) -> float:
    return float(ecr_field(f, harmonic=ECR_HARMONIC[feed.absorption]))


def _radial_crossing(ctx: Context, z: float, phi: float, scale: float, b_res: float) -> float:
    """Smallest r ≤ chamber radius where |B|(r, φ, z) = b_res (NaN if none)."""
    r = np.linspace(0.0, ctx.model.chamber.radius, 161)
    pts = np.column_stack([r * math.cos(phi), r * math.sin(phi), np.full_like(r, z)])
    b = np.asarray(ctx.field_model.magnitude(pts, scale), dtype=float) - b_res
    idx = np.nonzero(np.sign(b[:-1]) * np.sign(b[1:]) <= 0)[0]
    if idx.size == 0:
        return math.nan
    i = int(idx[0])
    if b[i + 1] == b[i]:
        return float(r[i])
    return float(r[i] - b[i] * (r[i + 1] - r[i]) / (b[i + 1] - b[i]))


@rule("ech.resonance-separation", severity=Severity.WARNING,
      summary="Sources fed at two or more frequencies: the resonance surfaces of the feeds stay "
              "apart by at least a set distance on the axis and across the trap centre.",
      options={"min_separation": Option(
          "length", "least distance between the resonance surfaces of two feeds",
          valid=Range(0.0, 1.0, "up to 1 m: beyond any trap's size", "mm", low_open=True))},
      applies="sources with two or more ECR feeds at different resonance fields")
def resonance_separation(ctx: Context, *, min_separation: float) -> Iterator[Finding]:
    """What it checks
    For each pair of ECR feeds, the distance between their resonance surfaces |B| = B_ECR(f)
    on the axis (the nearest crossings of the two surfaces on each flank of the trap) and
    across the trap centre (at the z of the on-axis field minimum, along the radius at four
    azimuths: the poles and the gaps of a hexapole among them), over the magnet current
    scales and with each feed at the edge of its band that brings the surfaces closest
    (the lower field of the higher-frequency feed, the higher field of the other). The
    least distance is judged against min_separation.

    Why it matters
    A second frequency helps a minimum-B source (more charge states, steadier plasma)
    because it heats on a second, separate surface: electrons that pass one resonance meet
    another with other phase and pitch. Surfaces that nearly coincide heat the same
    electrons, and a frequency drift can merge them.

    Equation
    B_ECR = 2π f m_e / e (0.5179 T at 14.5 GHz, 0.6430 T at 18 GHz); separation = least
    |z_1 − z_2| on the axis and |r_1 − r_2| across the centre.

    Options
    min_separation: default 2 mm (four Larmor radii of a 10 keV electron at 0.6 T, 0.52 mm
    each: an electron heated on one surface does not gyrate across the other; a planning
    value, from memory).

    References
    Z. Q. Xie & C. M. Lyneis, Rev. Sci. Instrum. 66 (1995) 4218 (two-frequency heating,
    from memory); R. Geller, Electron Cyclotron Resonance Ion Sources and ECR Plasmas
    (IOP 1996).
    """
    from rfcheck.magnet.geometry import resonance_crossings

    feeds = _ecr_feeds(ctx)
    if len(feeds) < 2:
        return
    requirement = f"resonance surfaces ≥ {min_separation * 1e3:.3g} mm apart"
    profiles = ctx.axis_profiles()
    for i, a in enumerate(feeds):
        for b in feeds[i + 1:]:
            lo, hi = sorted((a, b), key=lambda f: _b_res(f, f.frequency))
            b_low = _b_res(lo, lo.frequency + lo.frequency_tolerance)
            b_high = _b_res(hi, hi.frequency - hi.frequency_tolerance)
            subject = f"feeds {lo.id} and {hi.id}"
            if b_high <= b_low:
                yield ctx.finding(subject, requirement, passed=False,
                                  message=f"the resonance fields overlap over the bands: "
                                          f"{b_low:.4g} T ({lo.id}) ≥ {b_high:.4g} T ({hi.id})",
                                  measured=Quantity(0.0, "m"), limit=Quantity(min_separation, "m"),
                                  margin=Quantity(-min_separation, "m"))
                continue
            best = (math.inf, "", 1.0)
            for prof in profiles:
                c_lo = resonance_crossings(prof, b_low)
                c_hi = resonance_crossings(prof, b_high)
                for c in c_lo:
                    for d in c_hi:
                        gap = abs(c.z - d.z)
                        if gap < best[0]:
                            best = (gap, f"on the axis between z = {c.z * 1e3:.4g} mm and "
                                         f"{d.z * 1e3:.4g} mm", prof.scale)
                z_min = float(prof.z[int(np.argmin(prof.b))])
                for phi in np.linspace(0.0, math.pi / 2, 4, endpoint=False):
                    r1 = _radial_crossing(ctx, z_min, phi, prof.scale, b_low)
                    r2 = _radial_crossing(ctx, z_min, phi, prof.scale, b_high)
                    if math.isfinite(r1) and math.isfinite(r2) and abs(r2 - r1) < best[0]:
                        best = (abs(r2 - r1), f"across the centre (z = {z_min * 1e3:.4g} mm, "
                                              f"φ = {math.degrees(phi):.3g}°) between r = "
                                              f"{r1 * 1e3:.4g} mm and {r2 * 1e3:.4g} mm",
                                prof.scale)
            gap, where, scale = best
            if not math.isfinite(gap):
                yield ctx.not_applicable(subject, requirement,
                                         "the two surfaces do not both cross the axis or the "
                                         "centre plane inside the chamber (resonance.* judges "
                                         "where they are)")
                continue
            msg = (f"least distance {gap * 1e3:.3g} mm {where}, |B| = {b_low:.4g} T ({lo.id} at "
                   f"{(lo.frequency + lo.frequency_tolerance) / 1e9:.5g} GHz) and {b_high:.4g} T "
                   f"({hi.id} at {(hi.frequency - hi.frequency_tolerance) / 1e9:.5g} GHz), "
                   f"current scale {scale:.4g}")
            yield ctx.finding(subject, requirement, passed=gap >= min_separation, message=msg,
                              measured=Quantity(gap, "m"), limit=Quantity(min_separation, "m"),
                              margin=Quantity(gap - min_separation, "m"),
                              worst_case={"current_scale": Quantity(scale, "1")})


@rule("ech.shared-circulator", severity=Severity.ERROR,
      summary="Feeds whose lines pass one circulator: the sum of their reflected powers stays "
              "within the circulator load's rating.",
      options={"max_fraction": Option(
          "ratio", "allowed share of the shared load's rating",
          valid=Range(0.0, 1.0, "a share of the specification's own rating: above 100 % would "
                                "exceed it", "%", low_open=True))},
      applies="two or more feeds that give the same circulator id")
def shared_circulator(ctx: Context, *, max_fraction: float) -> Iterator[Finding]:
    """What it checks
    For every circulator id given by two or more feeds, the reflected power reaching its
    load in the running state: Σ_i P_i (|Γ_w| + |Γ_p|)_i², each feed's bound of
    load.reflected-power (windows and plasma, amplitudes added at worst phase), against the
    smallest max_reflected_power the sharing feeds declare (the one load's rating) times
    max_fraction. Powers at different frequencies add (their cross terms average to zero);
    feeds whose bands overlap add in amplitude, (Σ √P_i)², the worst phase.

    Why it matters
    A circulator load is rated for the power it dissipates; two generators reflecting into
    it at once can exceed a rating each would meet alone.

    Equation
    P_load = Σ P_r,i (bands apart) or (Σ √P_r,i)² (bands overlapping).

    Options
    max_fraction: default 100 % of the smallest declared rating.

    References
    D. M. Pozar, Microwave Engineering, 4th ed. (2012), §9.6 (circulators), ch. 2 (power of
    superposed waves).
    """
    groups: dict[str, list[Feed]] = {}
    for feed in ctx.model.feeds:
        if feed.circulator is not None:
            groups.setdefault(feed.circulator, []).append(feed)
    for cid, feeds in groups.items():
        if len(feeds) < 2:
            continue
        subject = f"circulator {cid}"
        requirement = f"Σ reflected power ≤ {max_fraction:.0%} of the load's rating"
        rated = [f.max_reflected_power for f in feeds if f.max_reflected_power is not None]
        if not rated:
            yield ctx.not_applicable(subject, requirement,
                                     "none of the feeds sharing it gives max_reflected_power")
            continue
        parts, powers = [], []
        for f in feeds:
            if f.absorption in NEAR_FIELD:
                continue
            g = running_gamma(ctx, f)
            p = f.power * g.bound ** 2 if math.isfinite(g.bound) else math.nan
            powers.append((f, p))
            parts.append(f"{f.id} {Quantity(p, 'W').text()} (|Γ| ≤ {g.bound:.3g} at "
                         f"{Quantity(f.power, 'W').text()})")
        bands = sorted((f.frequency - f.frequency_tolerance, f.frequency + f.frequency_tolerance)
                       for f, _ in powers)
        overlap = any(b[0] <= a[1] for a, b in zip(bands, bands[1:]))
        total = (sum(math.sqrt(p) for _, p in powers) ** 2 if overlap
                 else sum(p for _, p in powers))
        limit = max_fraction * min(rated)
        how = ("bands overlap: amplitudes added at worst phase" if overlap
               else "bands apart: powers add")
        msg = (f"{' + '.join(parts)} = {Quantity(total, 'W').text()} into the load ({how}), "
               f"against {Quantity(limit, 'W').text()} (the least rating the sharing feeds "
               "declare)")
        yield ctx.finding(subject, requirement, passed=total <= limit, message=msg,
                          measured=Quantity(total, "W"), limit=Quantity(limit, "W"),
                          margin=Quantity(limit - total, "W"))


@rule("ech.cross-coupling", severity=Severity.WARNING,
      summary="Sources with two or more ECR feeds: the power of the other feeds that can leave "
              "through each feed's port, running and at ignition, against that feed's "
              "reflected-power rating (a caution: a circulator isolates only in its band).",
      options={"max_fraction": Option(
          "ratio", "allowed share of the receiving feed's max_reflected_power",
          valid=Range(0.0, 1.0, "a share of the specification's own rating", "%",
                      low_open=True))},
      applies="sources with two or more ECR feeds; receiving feeds with max_reflected_power")
def cross_coupling(ctx: Context, *, max_fraction: float) -> Iterator[Finding]:
    """What it checks
    For each ECR feed of a source with several, the power of the *other* feeds that can
    leave the cavity through this feed's launcher: running, what the plasma returns of
    each other feed (its returned fraction |Γ_p|² of load.plasma-reflection, all parts, far
    end included); ignition, what the unlit cavity returns of each other feed (|Γ_cold|²,
    declared, else 1). The bound takes all of it into this port (the split between the
    ports is set by their apertures and the cavity's modes, which are not modelled). A
    frequency below the cutoff of this feed's line cannot enter it and is not counted. The
    sum is judged against max_fraction of this feed's max_reflected_power.

    This is a caution. A circulator isolates only inside its band: power of another feed
    outside it can pass the circulator and reach this feed's generator (a klystron or TWT
    output is not rated for it). A filter, a diplexer or a guide that cuts the other
    frequency off are the remedies; the spec does not describe them.

    Why it matters
    The other generator's power can enter a feed's line through the cavity, above all at
    ignition, when no plasma absorbs it; a klystron or TWT output taking it is not protected
    by its own circulator if the frequency lies outside that circulator's band.

    Equation
    P_in,i = Σ_{j≠i} P_j · |Γ_p,j|² (running), Σ_{j≠i} P_j · |Γ_cold,j|² (ignition).

    Options
    max_fraction: default 50 % (common practice: leave room for the feed's own reflection).

    References
    D. M. Pozar, Microwave Engineering, 4th ed. (2012), §9.6 (circulator bandwidth);
    common practice of dual-frequency ECR ion sources (from memory).
    """
    feeds = [f for f in _ecr_feeds(ctx) if f.absorption not in NEAR_FIELD]
    if len(feeds) < 2:
        return
    for feed in feeds:
        line = line_from_name(feed.line)
        others = [o for o in feeds if o is not feed]
        for state in ("running", "ignition"):
            subject = f"feed {feed.id}, {state}"
            requirement = (f"other feeds' power into this port ≤ {max_fraction:.0%} of "
                           "max_reflected_power")
            if feed.max_reflected_power is None:
                yield ctx.not_applicable(subject, requirement,
                                         "the feed gives no max_reflected_power")
                continue
            total, parts = 0.0, []
            for o in others:
                f_min = o.frequency - o.frequency_tolerance
                if line.cutoff > 0 and o.frequency + o.frequency_tolerance < line.cutoff:
                    parts.append(f"{o.id} at {o.frequency / 1e9:.4g} GHz below the "
                                 f"{line.dominant_mode} cutoff {line.cutoff / 1e9:.4g} GHz of "
                                 f"{line.name}: cannot enter")
                    continue
                if state == "running":
                    ret = plasma_return(ctx, o)
                    share = ret.returned if ret is not None else 1.0
                    src = (f"|Γ_p|² = {share:.3g}" if ret is not None
                           else "no launch path: all of it")
                else:
                    g, _ = cold_gamma(o)
                    share = g * g
                    src = (f"|Γ_cold|² = {share:.3g}" + ("" if o.cold_cavity_gamma is not None
                                                         else " (not declared: the worst case)"))
                p = o.power * share
                total += p
                parts.append(f"{o.id} at {f_min / 1e9:.4g}–"
                             f"{(o.frequency + o.frequency_tolerance) / 1e9:.4g} GHz: "
                             f"{Quantity(p, 'W').text()} ({src} of "
                             f"{Quantity(o.power, 'W').text()})")
            limit = max_fraction * feed.max_reflected_power
            msg = (f"{state}: up to {Quantity(total, 'W').text()} of the other feeds can leave "
                   f"through this port ({'; '.join(parts)}; all of it taken into this port: the "
                   f"split between the ports is not modelled), against "
                   f"{Quantity(limit, 'W').text()}. A circulator isolates only in its band: "
                   "power at another frequency can reach this generator unless a filter, a "
                   "diplexer or a guide below its cutoff stops it")
            yield ctx.finding(subject, requirement, passed=total <= limit, message=msg,
                              measured=Quantity(total, "W"), limit=Quantity(limit, "W"),
                              margin=Quantity(limit - total, "W"), details={"state": state})
