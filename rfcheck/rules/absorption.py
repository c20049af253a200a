"""Absorption estimates: single-pass optical depth at the ECR layer and the collisional regime."""

from __future__ import annotations

import math
from collections.abc import Iterator

import numpy as np

from rfcheck.analysis.launch_path import LaunchPath, collision_frequency, launch_path, profile_shape
from rfcheck.analysis.parts import mode_content
from rfcheck.analysis.resonance import ECR_HARMONIC, path_crossing, resonance_tables
from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.physics.absorption import (collisional_regime, optical_depth_o1, optical_depth_o2,
                                        optical_depth_x2)
from rfcheck.physics.constants import TWO_PI
from rfcheck.physics.frequencies import ecr_field

from .context import Context
from .registry import Option, Range, rule

_RESONANT = ("ecr", "ecr-harmonic-2", "uhr")
_MULTIPASS = ("a low single pass is normal in a small device: it relies on multi-pass "
              "absorption after reflections from the cavity walls (and on non-thermal electrons)")


def _thermal(ctx, path, feed, h):
    """Single-pass τ over the envelope grid (lowest T_e: τ grows with T_e)."""
    grid = ctx.envelope.grid(feed)
    shape, l_b, zc = resonance_tables(ctx, path, h)
    t_e = float(path.temperatures.min())
    n_e = grid.density * shape[None, :, :]
    mode = path.mode
    if h == 1:
        name, od = "O1", optical_depth_o1(grid.frequency, n_e, t_e, l_b[None])
    elif mode == "O":
        name, od = "O2", optical_depth_o2(grid.frequency, n_e, t_e, l_b[None])
    else:
        name, od = "X2", optical_depth_x2(grid.frequency, n_e, t_e, l_b[None])
    absorbed = np.where(np.isnan(zc)[None], np.nan, od.absorbed_fraction)
    worst, where = grid.worst(absorbed, "min")
    key = np.where(np.isnan(np.broadcast_to(absorbed, grid.shape)), np.inf,
                   -np.broadcast_to(absorbed, grid.shape))
    i, j, k = np.unravel_index(int(np.argmax(key)), grid.shape)
    where["electron_temperature"] = Quantity(t_e, "eV")
    if np.isnan(zc[j, k]):
        why = (f"no {'ECR' if h == 1 else '2nd-harmonic ECR'} layer on the launch path at this "
               "envelope point")
        return worst, where, why + ": nothing absorbs the wave", why
    reason = str(np.broadcast_to(od.reason, grid.shape)[i, j, k])
    tau = float(np.broadcast_to(od.tau, grid.shape)[i, j, k])
    x = float(np.broadcast_to(od.density_ratio, grid.shape)[i, j, k])
    oblique = ("" if (mode == "O" and path.theta is None) or (mode == "X" and path.theta is None)
               else f"; the forms assume perpendicular launch (N∥ ≈ 0), the feed launches the "
                    f"{path.label}")
    at = f"at z = {zc[j, k] * 1e3:.4g} mm (X = {x:.3g}, L_B = {l_b[j, k] * 1e3:.4g} mm, T_e = " \
         f"{t_e:.3g} eV)"
    if not math.isfinite(worst):
        return worst, where, f"{name} optical depth undefined {at}: {reason}{oblique}", reason
    text = (f"{name} single-pass optical depth τ = {tau:.3g} {at}: absorbed fraction "
            f"1 − e^(−τ) = {worst:.3g}; validity: {reason or 'within the stated limits'}"
            f"{oblique}")
    return worst, where, text, ""


def _cold(path: LaunchPath, resonant: bool = True):
    """Cold full-wave first-pass absorbed fraction of a part (worst corner): the R/X wave at
    the fundamental, or the collisional absorption of a part without a resonance (L)."""
    worst = None
    for corner in path.corners():
        w = path.wave(corner)
        if worst is None or w.absorbed < worst[1].absorbed:
            worst = (corner, w)
    corner, w = worst
    a = w.absorbed
    if not resonant:
        text = (f"the {path.label} has no electron-cyclotron resonance: collisional first-pass "
                f"absorbed fraction {a:.3g} (reflected {w.reflected:.3g}, to the far end "
                f"{w.transmitted:.3g}); cold plasma with collisions")
        return a, path.worst_case(corner, temperature=True), text, ""
    text = (f"cold collisional full-wave absorbed fraction {a:.3g} of the {path.label} at the "
            f"fundamental (reflected {w.reflected:.3g}, transmitted {w.transmitted:.3g}); "
            "validity: cold plasma with collisions; no thermal optical-depth form exists for "
            "the fundamental R/X wave (Bornatici et al. 1983); the fraction includes the "
            "reflection at any cutoff in front of the resonance (Budden)")
    return a, path.worst_case(corner, temperature=True), text, ""


@rule("absorption.single-pass", severity=Severity.WARNING,
      summary="Single-pass absorption at the ECR layer (optical depth at the fundamental or "
              "second harmonic) is reported against a planning threshold.",
      options={"min_absorbed_fraction": Option(
          "ratio", "single-pass absorbed fraction below which the design relies on multi-pass "
                   "absorption (warning)",
          valid=Range(0.0, 1.0, "a fraction of the launched power", "%"))},
      applies="feeds with absorption = ecr or ecr-harmonic-2")
def single_pass(ctx: Context, *, min_absorbed_fraction: float) -> Iterator[Finding]:
    """What it checks
    The fraction of the launched power absorbed in one pass through the resonance layer met
    first from the launcher, summed over the parts of the launched power (its split into the
    plasma's characteristic waves, see cutoff.o-mode), each part at its own worst envelope
    point and the split at the end of its range that absorbs least. An L part has no
    electron-cyclotron resonance: only its collisional absorption counts. O mode at the fundamental: τ_O1 = π² (L_B/λ) μ X √(1 − X); at the
    second harmonic X (and R) mode τ_X2 = 4π² (L_B/λ) μ X and O mode τ_O2 = μ τ_X2
    (tenuous-plasma, perpendicular-launch forms), with μ = T_e/(m_e c²), X = n_e/n_c at the
    crossing, L_B = B/|dB/dz| from the on-axis gradient at the crossing; absorbed
    1 − e^(−τ), the lowest over the envelope grid at the lowest T_e, with the validity limits
    of the form printed. The R and X waves at the fundamental have no thermal form; their
    cold collisional full-wave absorbed fraction along the path is used (worst envelope
    corner). An L wave has no electron resonance.

    Why it matters
    What is not absorbed in one pass goes on to the walls and the windows, or back. A low
    single pass is normal in small devices (τ ~ 1e-4 at 2.45 GHz for X2): they rely on
    cavity multi-pass, the fundamental resonance and non-thermal electrons. The finding is
    a warning that states this reliance; it does not fail a review.

    Equation
    See above; the tenuous-plasma limits of Bornatici et al. (1983).

    Options
    min_absorbed_fraction: default 50 % (common practice: half the power absorbed in one
    pass).

    References
    M. Bornatici, R. Cano, O. De Barbieri, F. Engelmann, Nucl. Fusion 23 (1983) 1153;
    K. G. Budden, The Propagation of Radio Waves (Cambridge 1985), ch. 19.
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        requirement = f"single-pass absorbed fraction ≥ {min_absorbed_fraction:.0%}"
        h = ECR_HARMONIC.get(feed.absorption)
        if h is None:
            yield ctx.not_applicable(subject, requirement,
                                     f"absorption '{feed.absorption}' does not rely on an "
                                     "electron-cyclotron resonance")
            continue
        content = mode_content(ctx, feed)
        if not content.parts:
            yield ctx.not_applicable(subject, requirement, content.reason)
            continue
        per_part = {}
        for part in content.parts:
            path = launch_path(ctx, feed, part.mode)
            if part.mode == "L":
                a, where, text, why = _cold(path, resonant=False)
            elif h == 1 and path.mode in ("R", "X"):
                a, where, text, why = _cold(path)
            else:
                a, where, text, why = _thermal(ctx, path, feed, h)
            per_part[part.mode] = (part, a, where, text, why)
        # the worst split: each part at its own worst envelope point (conservative), the
        # fractions at the end of their range that gives the least absorbed power
        candidates = []
        first = content.parts[0]
        for f_first in {first.low, first.high}:
            split = {first.mode: f_first}
            if len(content.parts) > 1:
                split[content.parts[1].mode] = 1.0 - f_first
            total = sum(frac * per_part[m][1] for m, frac in split.items())
            candidates.append((total if math.isfinite(total) else -math.inf, split, total))
        _, split, absorbed = min(candidates, key=lambda t: t[0])
        main = min(per_part.values(), key=lambda t: (t[1] if math.isfinite(t[1]) else -1.0))
        where = dict(main[2])
        why = next((t[4] for t in per_part.values() if t[4]), "")
        texts = [f"{m} part ({_share(split.get(m, 0.0))}): {t[3]}" for m, t in per_part.items()]
        margin = absorbed - min_absorbed_fraction
        passed = bool(margin >= 0)
        lead = (f"single-pass absorbed fraction of the launched power {absorbed:.3g} "
                f"(each part at its own worst envelope point)" if len(per_part) > 1 else
                f"single-pass absorbed fraction {absorbed:.3g}")
        msg = f"{lead}: " + "; ".join(texts)
        if not passed and math.isfinite(absorbed):
            msg += f"; below {min_absorbed_fraction:.0%}: {_MULTIPASS}"
        details = {"polarisation": content.summary(),
                   "parts": [{"part": m, "fraction": split.get(m, 0.0),
                              "absorbed": t[1] if math.isfinite(t[1]) else None}
                             for m, t in per_part.items()]}
        yield ctx.finding(subject, requirement, passed=passed,
                          measured=Quantity(absorbed, "1", why),
                          limit=Quantity(min_absorbed_fraction, "1"),
                          margin=Quantity(margin, "1"), worst_case=where, message=msg,
                          details=details)


def _share(x: float) -> str:
    return f"{100 * x:.3g} %"


@rule("absorption.collisional-regime", severity=Severity.WARNING,
      summary="Electron collisions stay weak against the wave frequency (ν/ω) along the launch "
              "path, so the resonance is not collision-broadened.",
      options={"max_nu_over_omega": Option("ratio", "highest allowed ν/ω along the path",
          valid=Range(0.0, 1.0,
                      "nu/omega >= 1 is no longer resonant heating (the resonance is smeared over"
                      " the whole plasma); a limit of 0 no collisional plasma meets", "1", low_open=True))},
      applies="feeds with absorption = ecr, ecr-harmonic-2 or uhr")
def collisional_regime_rule(ctx: Context, *, max_nu_over_omega: float) -> Iterator[Finding]:
    """What it checks
    The electron collision frequency against the wave's angular frequency, ν/ω, with
    ν = ν_en + ν_ei: electron–neutral momentum transfer n_g ⟨σ_m v⟩ from the neutral gas
    (the tabulated cross section averaged over a Maxwellian at T_e) and electron–ion
    (Braginskii, NRL coefficient) at the path's highest density. The largest value over the
    envelope (density, frequency, both electron temperatures, the highest neutral pressure
    of its range) is compared with the limit; the value at the resonance
    crossing is printed beside it.

    Why it matters
    Resonant heating needs an electron to gyrate many times between collisions: the
    resonance is collision-broadened, ΔB/B ~ ν/ω, and above ν/ω ~ 0.1 absorption turns
    ohmic-like and spreads over the path instead of the resonance layer.

    Equation
    ν/ω = (ν_en + ν_ei)/(2π f); ν_en = (p / k_B T_g) K_m(T_e), with the rate coefficient
    K_m = ⟨σ_m v⟩ = ∫ σ_m(E) v(E) f_M(E) dE over the Maxwellian energy distribution
    f_M(E) = 2 (E/π)^½ T_e^(−3/2) e^(−E/T_e), v = (2eE/m_e)^½;
    ν_ei = 2.91e-12 Z n_e lnΛ T_e^(−3/2).

    Options
    max_nu_over_omega: default 0.1 (common practice: the weakly collisional limit of resonant
    heating, collisional broadening ΔB/B ~ ν/ω).

    References
    M. A. Lieberman & A. J. Lichtenberg, Principles of Plasma Discharges and Materials
    Processing, 2nd ed. (Wiley 2005), ch. 3; NRL Plasma Formulary (2019).
    """
    plasma = ctx.model.plasma
    gas = plasma.neutral
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        requirement = f"ν/ω ≤ {max_nu_over_omega:.3g}"
        if feed.absorption not in _RESONANT:
            yield ctx.not_applicable(subject, requirement,
                                     f"absorption '{feed.absorption}' is not an electron "
                                     "resonance (ecr, ecr-harmonic-2, uhr)")
            continue
        path = launch_path(ctx, feed)
        if path.problem:
            yield ctx.not_applicable(subject, requirement, path.problem)
            continue
        grid = ctx.envelope.grid(feed)
        peak = float(path.shape.max())
        temps = path.temperatures
        p_gas = gas.pressure.max if gas is not None else None  # the most collisional end
        nu = collision_frequency(plasma, grid.density[..., None] * peak, temps, p_gas)  # (nd,1,1,nt)
        ratio_t = nu / (TWO_PI * grid.frequency[..., None])
        t_idx = np.argmax(ratio_t, axis=-1)
        ratio = ratio_t.max(axis=-1)
        worst, where = grid.worst(ratio, "max")
        i, _, k = np.unravel_index(int(np.argmax(np.broadcast_to(ratio, grid.shape))), grid.shape)
        t_w = float(temps[int(np.broadcast_to(t_idx, grid.shape)[i, 0, k])])
        where["electron_temperature"] = Quantity(t_w, "eV")
        f_w = float(grid.frequency.reshape(-1)[k])
        n_w = float(grid.density.reshape(-1)[i])
        h = ECR_HARMONIC.get(feed.absorption, 1)
        j1 = int(np.argmin(np.abs(path.scales - 1.0)))
        c = path_crossing(ctx, path, j1, float(ecr_field(f_w, harmonic=h)), 0.0) \
            if feed.absorption != "uhr" else None
        at_res = ""
        if c is not None:
            n_res = n_w * float(profile_shape(plasma.profile, ctx.model.chamber, c.z))
            r_res = float(collision_frequency(plasma, n_res, t_w, p_gas)) / (TWO_PI * f_w)
            at_res = f"; {r_res:.3g} at the resonance z = {c.z * 1e3:.4g} mm"
        label = str(collisional_regime(f_w, worst * TWO_PI * f_w).regime)
        if gas is None:
            source = "electron–ion collisions only (the spec gives no neutral gas)"
        elif gas.species not in _known():
            source = (f"electron–ion collisions only (no cross section for {gas.species}; "
                      "electron–neutral collisions omitted)")
        else:
            source = f"{gas.species} at {gas.pressure.max:.3g} Pa and electron–ion collisions"
            if gas.pressure.max > gas.pressure.min:
                where["neutral_pressure"] = Quantity(gas.pressure.max, "Pa")
                source += (f" (the highest pressure of the range {gas.pressure.min:.3g}–"
                           f"{gas.pressure.max:.3g} Pa)")
        margin = max_nu_over_omega - worst
        passed = margin >= 0
        msg = (f"ν/ω = {worst:.3g} on the path ({label}){at_res}; ν = {worst * TWO_PI * f_w:.3g} "
               f"s⁻¹ from {source}; collisional broadening ΔB/B ~ ν/ω")
        if not passed:
            msg += f", above {max_nu_over_omega:.3g}: resonant absorption is collision-broadened"
        yield ctx.finding(subject, requirement, passed=passed, message=msg,
                          measured=Quantity(worst, "1"), limit=Quantity(max_nu_over_omega, "1"),
                          margin=Quantity(margin, "1"), worst_case=where)


def _known() -> tuple[str, ...]:
    from rfcheck.physics.collisions import known_gases

    return known_gases()
