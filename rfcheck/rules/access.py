"""Wave accessibility of each part of a feed's launched power: reaching the resonance,
overdense routes.

Each part (the launched power's split into the plasma's characteristic waves,
rfcheck.analysis.parts) travels its own launch path
(rfcheck.analysis.launch_path.launch_path), evaluated at the envelope corners (density
min/max × current scale min/max × frequency min/max). The findings name the part; a part
above its cutoff that relies on an overdense route is judged by access.overdense-route
alone, and cutoff.o-mode defers to it by name, so no two findings on one part contradict
each other.
"""

from __future__ import annotations

import math
from collections.abc import Iterator

import numpy as np

from rfcheck.analysis.launch_path import NEAR_FIELD, Corner, LaunchPath, launch_path
from rfcheck.analysis.parts import mode_content, part_subject
from rfcheck.analysis.resonance import ECR_HARMONIC
from rfcheck.analysis.window_material import resolve_material
from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.model import REFLECTING_WALLS
from rfcheck.physics.frequencies import critical_density
from rfcheck.physics.overdense import (cutoff_scale_length, ox_conversion_efficiency,
                                       ox_optimal_n_parallel, surface_wave_density)
from rfcheck.units import format_fraction as _frac
from rfcheck.units import format_si

from .context import Context
from .registry import Option, Range, rule

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
                       "blocked)",
          valid=Range(0.0, 1.0,
                      "a fraction of the power; a limit of 0 would count a layer that passes "
                      "nothing as access", "%", low_open=True)),
          "warn_tunnelling_factor": Option(
              "ratio", "tunnelling factor below which access only by tunnelling is a warning",
          valid=Range(0.0, 1.0, "a fraction of the power", "%", low_open=True)),
      },
      applies="every feed except inductive and helicon coupling (near field) and lower-hybrid "
              "feeds (N∥ accessibility not modelled)",
      ordered=(("min_tunnelling_factor", "warn_tunnelling_factor", "the failing threshold lies below the warning one"),))
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
        requirement = f"reaches its resonance with tunnelling factor ≥ {min_tunnelling_factor:.3g}"
        skipped = _skip(ctx, feed, requirement)
        if skipped:
            yield skipped
            continue
        content = mode_content(ctx, feed)
        if not content.parts:
            yield ctx.finding(f"feed {feed.id}", requirement, passed=False, message=content.reason)
            continue
        for part in content.parts:
            yield _reach_part(ctx, feed, part, content, requirement, min_tunnelling_factor,
                              warn_tunnelling_factor)


def resonant(feed, mode: str) -> bool:
    """Whether this part of the feed's power has the feed's kind of resonance: the L wave has
    no electron-cyclotron resonance, the R wave no ion-cyclotron resonance."""
    if feed.absorption == "icr":
        return mode != "R"
    return mode != "L"


def _who(path: LaunchPath, part, content) -> str:
    if content.unmagnetised:
        return "the wave (no magnetic field on the path, n² = P)"
    return f"the {path.label} ({part.share} of the power)"


def _details(part, content, **extra) -> dict:
    out = {"part": part.mode, "fraction": {"low": part.low, "high": part.high},
           "polarisation": content.summary()}
    out.update(extra)
    return out


def _one_fate(path: LaunchPath, corner: Corner) -> str:
    acc = path.access(corner)
    load = path.load(corner)
    if acc.first_cutoff and math.isfinite(acc.first_cutoff_z):
        where = ("from the launcher on" if acc.first_cutoff == "launcher"
                 else f"at {_z_text(path, abs(acc.first_cutoff_z - path.z0))} "
                      f"({_cutoff_text(acc.first_cutoff)})")
        text = f"is cut off {where} and returns towards the launcher"
    else:
        text = (f"crosses the plasma (a single pass absorbs {_frac(load.first.absorbed)}) to "
                "the far end")
        text += (" and comes back through it" if load.wall in REFLECTING_WALLS
                 else " and leaves there")
    return f"{text} ({_frac(load.returned)} returns)"


def fate_text(path: LaunchPath, harmonic: int = 1) -> str:
    """Where a part without a resonance goes over the envelope, in words: at the lowest and
    the highest peak density (each at its corner where most returns), and the far end."""
    corners = path.corners()
    by_density: dict[float, Corner] = {}
    for c in corners:
        best = by_density.get(c.density)
        if best is None or path.load(c).returned > path.load(best).returned:
            by_density[c.density] = c
    picks = [by_density[d] for d in sorted(by_density)]
    if len(picks) > 2:
        picks = [picks[0], picks[-1]]
    texts = []
    for c in picks:
        texts.append(f"at peak density {format_si(c.density, 'm^-3')} it {_one_fate(path, c)}")
    if len(texts) == 2 and texts[0].split(" it ", 1)[1] == texts[1].split(" it ", 1)[1]:
        texts = [f"over the envelope it {_one_fate(path, picks[-1])}"]
    return "; ".join(texts) + f"; {path.wall_text()}"


def _deferred_to_route(ctx, path: LaunchPath, harmonic: int, min_tf: float) -> str:
    """The overdense route (name) that delivers this part wherever the direct path fails it,
    when every such corner is above n_c and access.overdense-route accepts the route there;
    "" otherwise (the part is then judged here)."""
    route_limit = ctx.option("access.overdense-route", "min_route_efficiency")
    blocked = [c for c in path.corners() if path.reach(c, harmonic).factor < min_tf]
    if route_limit is None or not blocked or not all(path.above_cutoff(c) for c in blocked):
        return ""
    low = min((best_route(ctx, path, c, route_limit) for c in blocked), key=lambda t: t[0])
    return low[1] if low[0] >= 1.0 else ""


def _reach_part(ctx, feed, part, content, requirement, min_tf, warn_tf) -> Finding:
    subject = part_subject(feed, part.mode)
    path = launch_path(ctx, feed, part.mode)
    who = _who(path, part, content)
    harmonic = ECR_HARMONIC.get(feed.absorption, 1)
    if not resonant(feed, part.mode):
        kind = "ion-cyclotron" if feed.absorption == "icr" else "electron-cyclotron"
        return ctx.not_applicable(
            subject, requirement,
            f"{who} has no {kind} resonance to reach: {fate_text(path, harmonic)}; "
            "load.plasma-reflection counts what returns, absorption.single-pass what is absorbed",
            _details(part, content))
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
    details = _details(part, content)
    deferred = _deferred_to_route(ctx, path, harmonic, min_tf)
    if r.verdict == "no-resonance":
        msg = (f"{who} meets no {r.target} layer on the path from {path.start_text} to the far "
               "end of the chamber")
        if deferred:
            return ctx.not_applicable(subject, requirement,
                                      msg + f"; above n_c it relies on the overdense route "
                                            f"{deferred}: access.overdense-route judges it",
                                      details)
        return ctx.finding(subject, requirement, passed=False,
                           message=f"{who} meets no {r.target} layer on the path from "
                                   f"{path.start_text} to the far end of the chamber: it cannot "
                                   "reach a resonance",
                           measured=Quantity(0.0, "1"), limit=Quantity(min_tf, "1"),
                           margin=Quantity(-min_tf, "1"), worst_case=where, details=details)
    margin = factor - min_tf
    passed = margin >= 0
    warn = passed and r.verdict == "tunnelling" and factor < warn_tf
    target = f"the {r.target} at {_z_text(path, r.target_s)}"
    if verdicts == {"direct"}:  # every corner alike: no worst point to name
        lo, hi = min(targets), max(targets)
        span = f"z = {_mm(lo)}" if hi - lo < 1e-6 else f"z = {lo * 1e3:.4g}–{_mm(hi)}"
        where = {}
        msg = (f"{who} reaches the {r.target} ({span} over the envelope) directly at every "
               f"envelope corner: no cutoff between {path.start_text} and the layer")
    elif r.verdict == "direct":
        msg = (f"{who} reaches {target} directly (no cutoff between {path.start_text} and the "
               "layer)")
    else:
        share = f"{factor:.3g} of it" if factor >= 1e-3 else f"{factor:.2e} of it"
        msg = (f"{who} meets {_cutoff_text(r.cutoff)} at {_z_text(path, r.cutoff_s)} before "
               f"{target}: evanescent layer {_mm(r.width)} wide, tunnelling factor "
               f"exp(−2∫κ dz) = {share}")
        if not passed:
            if deferred:
                return ctx.not_applicable(
                    subject, requirement,
                    msg + f", below {min_tf:.3g}; above n_c it relies on the overdense route "
                          f"{deferred}: access.overdense-route judges it", details)
            msg += (f", below {min_tf:.3g}: the resonance is blocked and this part is reflected "
                    "or absorbed before it")
            if path.above_cutoff(corner):
                msg += "; the density exceeds n_c there and no overdense route delivers it"
        elif warn:
            msg += f", reached only by tunnelling (below {warn_tf:.3g})"
    return ctx.finding(subject, requirement, passed=passed, warn=warn, message=msg,
                       measured=Quantity(factor, "1"), limit=Quantity(min_tf, "1"),
                       margin=Quantity(margin, "1"), worst_case=where, details=details)


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
                   "(tunnelling factor or O–X conversion efficiency)",
          valid=Range(0.0, 1.0,
                      "a fraction of the power; a limit of 0 would accept a route that delivers "
                      "nothing", "%", low_open=True))},
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
        requirement = (f"an overdense route delivers ≥ {min_route_efficiency:.0%} (surface wave: "
                       "n_peak ≥ n_c(1 + ε_d))")
        skipped = _skip(ctx, feed, requirement)
        if skipped:
            yield skipped
            continue
        content = mode_content(ctx, feed)
        if not content.parts:
            yield ctx.not_applicable(f"feed {feed.id}", requirement, content.reason)
            continue
        for part in content.parts:
            yield _route_part(ctx, feed, part, content, requirement, min_route_efficiency)


def best_route(ctx: Context, path: LaunchPath, corner: Corner, min_efficiency: float):
    """The best overdense route of one part at one corner: (score, name, figure, limit,
    detail), score = figure / limit (the route delivers when score ≥ 1)."""
    eps_d, _ = _window_permittivity(ctx, path.feed)
    harmonic = ECR_HARMONIC.get(path.feed.absorption, 1)
    return max(_route_scores(path, corner, harmonic, eps_d, min_efficiency), key=lambda t: t[0])


def _route_part(ctx, feed, part, content, requirement, min_route_efficiency) -> Finding:
    subject = part_subject(feed, part.mode)
    path = launch_path(ctx, feed, part.mode)
    who = _who(path, part, content)
    details = _details(part, content)
    if not resonant(feed, part.mode):
        return ctx.not_applicable(subject, requirement,
                                  f"{who} has no resonance for an overdense route to deliver "
                                  "it to (cutoff.o-mode bounds its cutoff)", details)
    over = [c for c in path.corners() if path.above_cutoff(c)]
    if not over:
        n_c = float(critical_density(path.frequencies.min()))
        return ctx.not_applicable(
            subject, requirement,
            f"the density along the path stays below the cutoff density "
            f"{format_si(n_c, 'm^-3')} (peak {format_si(ctx.model.plasma.density.max, 'm^-3')}): "
            f"{who} needs no overdense route", details)
    eps_d, window_text = _window_permittivity(ctx, feed)
    worst = None
    for corner in over:
        best = best_route(ctx, path, corner, min_route_efficiency)
        if worst is None or best[0] < worst[1][0]:
            worst = (corner, best)
    corner, (score, name, figure, limit, detail) = worst
    n_c = float(critical_density(corner.frequency))
    passed = score >= 1.0
    lead = f"{who}, peak density {corner.density / n_c:.3g} n_c: "
    if passed:
        msg = lead + f"route {name} available — {detail}"
    else:
        msg = lead + (f"no overdense route reaches its limit; best is {name} — {detail}, "
                      f"below {limit:.3g}")
    if eps_d is not None and "surface" in name:
        msg += f" (window material {window_text})"
    return ctx.finding(subject, requirement, passed=passed, message=msg,
                       measured=Quantity(figure, "1"), limit=Quantity(limit, "1"),
                       margin=Quantity(figure - limit, "1"),
                       worst_case=path.worst_case(corner), details=details)
