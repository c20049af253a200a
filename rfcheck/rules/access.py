"""Wave accessibility along each feed's launch path: reaching the resonance, overdense routes.

Both rules read the shared launch path (rfcheck.rules.path.launch_path), evaluated at the
envelope corners (density min/max × current scale min/max × frequency min/max).
"""

from __future__ import annotations

import math
from collections.abc import Iterator

import numpy as np

from rfcheck.units import format_si
from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.physics.frequencies import critical_density
from rfcheck.physics.overdense import (cutoff_scale_length, ox_conversion_efficiency,
                                       ox_optimal_n_parallel, surface_wave_density)

from .context import Context
from .path import NEAR_FIELD, Corner, LaunchPath, launch_path
from .registry import Option, rule
from .resonance import ECR_HARMONIC
from .window_data import resolve_material

#: absorption mechanisms whose target layer the launch path does not model
_NOT_MODELLED = {"lh": "lower-hybrid accessibility depends on the parallel index N∥, which the "
                       "launch declaration does not carry"}


def _mm(s: float) -> str:
    return f"{s * 1e3:.4g} mm"


def _skip(ctx: Context, feed, requirement: str) -> Finding | None:
    """A not-applicable finding for near-field and unmodelled feeds, else None."""
    subject = f"feed {feed.id}"
    if feed.absorption in NEAR_FIELD:
        return ctx.not_applicable(subject, requirement,
                                  f"{feed.absorption} coupling works through the near field of "
                                  "an antenna, not by a wave launched along a path")
    if feed.absorption in _NOT_MODELLED:
        return ctx.not_applicable(subject, requirement, _NOT_MODELLED[feed.absorption])
    return None


def _cutoff_text(name: str) -> str:
    if name == "launcher":
        return "an evanescent region starting at the launcher"
    return f"the {name}" if name else "an evanescent layer"


def _z_text(path: LaunchPath, s: float) -> str:
    return f"z = {_mm(path.z_at(s))}"


@rule("access.reaches-resonance", severity=Severity.ERROR,
      summary="The launched wave reaches its resonance along the launch path without being "
              "cut off, over the envelope.",
      options={
          "min_tunnelling_factor": Option(
              "ratio", "smallest tunnelling factor exp(−2∫κ dz) counted as access (fail below: "
                       "blocked)"),
          "warn_tunnelling_factor": Option(
              "ratio", "tunnelling factor below which access only by tunnelling is a warning"),
      },
      applies="every feed except inductive and helicon coupling (near field) and lower-hybrid "
              "feeds (N∥ accessibility not modelled)")
def reaches_resonance(ctx: Context, *, min_tunnelling_factor: float,
                      warn_tunnelling_factor: float) -> Iterator[Finding]:
    """What it checks
    Along the launch path (the chamber axis from the launcher in its direction to the far
    end of the chamber; |B|(z) from the magnet model, n_e(z) from the density profile scaled
    to the envelope's peak density) the refractive index n²(z) of the launched mode: R and L
    along B (n² = R, L), O and X across B (n² = P, RL/S), any other declared angle the named
    branch of the cold dispersion relation. Every evanescent layer (n² < 0) between the
    launcher and the mode's target layer — the ECR for R and O, the upper-hybrid layer for
    X, ion-cyclotron layers for L, the second-harmonic field B_ECR/2 for ecr-harmonic-2
    feeds — is found and its WKB tunnelling factor exp(−2∫κ dz) taken. Verdict per envelope
    corner (density min/max × current scale min/max × frequency min/max): direct (no
    layer), by tunnelling, or blocked; the worst corner is reported.

    Why it matters
    A resonance inside the chamber delivers no power if a cutoff stands between it and the
    launcher: the wave is reflected at the cutoff back to the generator. The R wave reaches
    the ECR from the high-field side at any density (the whistler, "magnetic beach") but
    meets the R cutoff X = 1 − Y first from the low-field side; the X mode likewise; the O
    mode is cut off above n_c.

    Equation
    κ = k0 √(−n²) where n² < 0; factor T = exp(−2 Σ∫κ dz). For a cutoff followed directly by
    the resonance (Budden problem n² = 1 + β/z) T = e^(−πη) exactly, e.g. the R wave from the
    low-field side in a linear field B = B_ECR (1 − u/L_B) and uniform X: T = exp(−π k0 X L_B).

    Options
    min_tunnelling_factor: fail below this factor (default 10 %, project choice).
    warn_tunnelling_factor: a wave that reaches the resonance only by tunnelling with a
    factor below this is a warning (default 90 %, project choice).

    References
    T. H. Stix, Waves in Plasmas (AIP 1992), ch. 1–2 and 13; K. G. Budden, The Propagation of
    Radio Waves (Cambridge 1985), ch. 19.
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        requirement = f"reaches its resonance with tunnelling factor ≥ {min_tunnelling_factor:.3g}"
        skipped = _skip(ctx, feed, requirement)
        if skipped:
            yield skipped
            continue
        path = launch_path(ctx, feed)
        if path.problem:
            yield ctx.finding(subject, requirement, passed=False, message=path.problem)
            continue
        harmonic = ECR_HARMONIC.get(feed.absorption, 1)
        worst = None
        verdicts, targets = set(), []
        for corner in path.corners():
            r = path.reach(corner, harmonic)
            verdicts.add(r.verdict)
            targets.append(path.z_at(r.target_s))
            key = (r.factor, r.verdict != "no-resonance")
            if worst is None or key < worst[0]:
                worst = (key, corner, r)
        _, corner, r = worst
        where = path.worst_case(corner)
        factor = r.factor
        if r.verdict == "no-resonance":
            yield ctx.finding(subject, requirement, passed=False,
                              message=f"the {path.label} meets no {r.target} layer on the path "
                                      f"from {path.start_text} to the far end "
                                      f"of the chamber: it cannot reach a resonance",
                              measured=Quantity(0.0, "1"),
                              limit=Quantity(min_tunnelling_factor, "1"),
                              margin=Quantity(-min_tunnelling_factor, "1"), worst_case=where)
            continue
        margin = factor - min_tunnelling_factor
        passed = margin >= 0
        warn = passed and r.verdict == "tunnelling" and factor < warn_tunnelling_factor
        target = f"the {r.target} at {_z_text(path, r.target_s)}"
        if verdicts == {"direct"}:  # every corner alike: no worst point to name
            lo, hi = min(targets), max(targets)
            span = f"z = {_mm(lo)}" if hi - lo < 1e-6 else f"z = {lo * 1e3:.4g}–{_mm(hi)}"
            where = {}
            msg = (f"the {path.label} reaches the {r.target} ({span} over the envelope) "
                   f"directly at every envelope corner: no cutoff between {path.start_text} "
                   "and the layer")
        elif r.verdict == "direct":
            msg = (f"the {path.label} reaches {target} directly (no cutoff between "
                   f"{path.start_text} and the layer)")
        else:
            share = f"{factor:.3g} of the power" if factor >= 1e-3 else f"{factor:.2e} of the power"
            msg = (f"the {path.label} meets {_cutoff_text(r.cutoff)} at "
                   f"{_z_text(path, r.cutoff_s)} before {target}: evanescent layer "
                   f"{_mm(r.width)} wide, tunnelling factor exp(−2∫κ dz) = {share}")
            if not passed:
                msg += (f", below {min_tunnelling_factor:.3g}: the resonance is blocked and the "
                        "power is reflected or absorbed before it")
                if corner.density > float(critical_density(corner.frequency)):
                    msg += ("; the peak density exceeds n_c there: access.overdense-route judges "
                            "the overdense routes")
            elif warn:
                msg += f", reached only by tunnelling (below {warn_tunnelling_factor:.3g})"
        yield ctx.finding(subject, requirement, passed=passed, warn=warn, message=msg,
                          measured=Quantity(factor, "1"),
                          limit=Quantity(min_tunnelling_factor, "1"),
                          margin=Quantity(margin, "1"), worst_case=where)


def _route_scores(path: LaunchPath, corner: Corner, harmonic: int, eps_d: float | None,
                  min_efficiency: float) -> list[tuple[float, str, float, float, str]]:
    """Candidate overdense routes at one corner: (score, name, figure, limit, detail);
    score = figure / limit, the route is available when score ≥ 1."""
    out = []
    f = corner.frequency
    r = path.reach(corner, harmonic)
    direct = {"R": "whistler (R wave from the high-field side)",
              "X": "X mode from the high-field side"}.get(path.mode, f"{path.label} along the path")
    detail = ("reaches the resonance directly" if r.verdict == "direct" else
              "no resonance on the path" if r.verdict == "no-resonance" else
              f"tunnels through {_cutoff_text(r.cutoff)} at "
              f"{_z_text(path, r.cutoff_s)}")
    out.append((r.factor / min_efficiency, direct, r.factor, min_efficiency,
                f"tunnelling factor {r.factor:.3g}: {detail}"))
    if path.mode == "O":
        n_e = path.n_e(corner)
        s_c, l_n = cutoff_scale_length(path.s, n_e, f)
        if math.isfinite(s_c) and l_n > 0:
            b_c = float(np.interp(s_c, path.s, path.b_of(corner)))
            theta = math.pi / 2 if path.theta is None else path.theta
            n_par = abs(math.cos(theta))
            eff = float(ox_conversion_efficiency(f, l_n, b_c, n_par)) if math.isfinite(l_n) else 0.0
            n_opt = float(ox_optimal_n_parallel(f, b_c))
            out.append((eff / min_efficiency, "O–X conversion (Mjølhus)", eff, min_efficiency,
                        f"efficiency {eff:.3g} at N∥ = cos θ = {n_par:.3f} (optimum "
                        f"{n_opt:.3f}, θ = {math.degrees(math.acos(n_opt)):.1f}° to B) with "
                        f"L_n = {_mm(l_n)} and B = {b_c * 1e3:.4g} mT at the O cutoff "
                        f"({_z_text(path, s_c)})"))
    if eps_d is not None:
        n_sw = float(surface_wave_density(f, eps_d))
        ratio = corner.density / n_sw
        out.append((ratio, "surface wave on the dielectric window", ratio, 1.0,
                    f"peak density {format_si(corner.density, 'm^-3')} is {ratio:.3g} × the surface-wave "
                    f"density n_c(1 + ε_d) = {format_si(n_sw, 'm^-3')} (ε_d = {eps_d:.3g})"))
    return out


def _window_permittivity(ctx: Context, feed) -> tuple[float | None, str]:
    for w in ctx.model.windows:
        if w.feed == feed.id and w.layers:
            m = resolve_material(ctx.model, w.layers[0].material)
            return m.eps_r, f"{m.id} of window {w.id}"
    return None, ""


@rule("access.overdense-route", severity=Severity.ERROR,
      summary="Where the peak density exceeds the cutoff density, a recognised overdense route "
              "delivers the power.",
      options={"min_route_efficiency": Option(
          "ratio", "smallest fraction of the power an overdense route must deliver "
                   "(tunnelling factor or O–X conversion efficiency)")},
      applies="every feed except inductive and helicon coupling and lower-hybrid feeds, at the "
              "envelope corners where the peak density exceeds n_c")
def overdense_route(ctx: Context, *, min_route_efficiency: float) -> Iterator[Finding]:
    """What it checks
    At every envelope corner where the peak density exceeds the cutoff density
    n_c = ε0 m_e ω²/e² (P = 0: every mode across B is cut off there), whether a recognised
    overdense route delivers the power, and which one: (1) the launched wave reaching its
    resonance along the path without a cutoff — the whistler (R wave from the high-field
    side) or the X mode from the high-field side — with its tunnelling factor as the figure
    of merit; (2) for an O-mode launch, O–X conversion at the O cutoff with the Mjølhus
    efficiency from the density scale length L_n and the field there, at the parallel index
    N∥ = cos θ of the declared angle θ to B; (3) a surface wave on the feed's dielectric
    window (its first layer's material), which needs n_e > n_c (1 + ε_d). The best route at
    the worst corner is reported; the finding fails when no route reaches its limit.

    Why it matters
    Above n_c the ordinary and unmagnetised waves are reflected at the cutoff; an overdense
    design works only by one of these routes and should be reviewed on it (cutoff.o-mode is
    waived for it with a reference to this finding).

    Equation
    O–X: T = exp{−π k0 L_n √(Y/2) [2(1 + Y)(N∥ − N∥,opt)² + N⊥²]}, N∥,opt = √(Y/(1 + Y)),
    with N⊥ = 0 (wave vector in the plane of B and the gradient). Surface wave:
    n_sw = n_c (1 + ε_d). Whistler: the tunnelling factor of access.reaches-resonance.

    Options
    min_route_efficiency: a route counts when it delivers at least this fraction (default
    50 %, project choice); the surface wave counts when n_peak ≥ n_sw.

    Assumptions
    The Mjølhus formula assumes a slab with B perpendicular to the density gradient; on the
    axis of a solenoid B lies along the path, so the O–X figure is an estimate for the
    geometry the declared angle stands for, not a calculation of this chamber.

    References
    E. Mjølhus, J. Plasma Phys. 31 (1984) 7; M. Moisan & Z. Zakrzewski, J. Phys. D 24 (1991)
    1025; T. H. Stix, Waves in Plasmas (AIP 1992), ch. 2.
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        requirement = (f"an overdense route delivers ≥ {min_route_efficiency:.0%} (surface wave: "
                       "n_peak ≥ n_c(1 + ε_d))")
        skipped = _skip(ctx, feed, requirement)
        if skipped:
            yield skipped
            continue
        path = launch_path(ctx, feed)
        over = []
        if not path.problem:
            over = [c for c in path.corners() if c.density > float(critical_density(c.frequency))]
        if not over:
            n_c = float(critical_density(path.frequencies.min()))
            why = path.problem or (f"the peak density {format_si(ctx.model.plasma.density.max, 'm^-3')} "
                                   f"stays below the cutoff density {format_si(n_c, 'm^-3')}")
            yield ctx.not_applicable(subject, requirement, why)
            continue
        eps_d, window_text = _window_permittivity(ctx, feed)
        harmonic = ECR_HARMONIC.get(feed.absorption, 1)
        worst = None
        for corner in over:
            best = max(_route_scores(path, corner, harmonic, eps_d, min_route_efficiency),
                       key=lambda t: t[0])
            if worst is None or best[0] < worst[1][0]:
                worst = (corner, best)
        corner, (score, name, figure, limit, detail) = worst
        n_c = float(critical_density(corner.frequency))
        passed = score >= 1.0
        lead = f"peak density {corner.density / n_c:.3g} n_c: "
        if passed:
            msg = lead + f"route {name} available — {detail}"
        else:
            msg = lead + (f"no overdense route reaches its limit; best is {name} — {detail}, "
                          f"below {limit:.3g}")
        if eps_d is not None and "surface" in name:
            msg += f" (window material {window_text})"
        yield ctx.finding(subject, requirement, passed=passed, message=msg,
                          measured=Quantity(figure, "1"), limit=Quantity(limit, "1"),
                          margin=Quantity(figure - limit, "1"),
                          worst_case=path.worst_case(corner))
