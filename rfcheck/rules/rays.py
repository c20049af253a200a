"""Ray verdicts for launches that are off axis, oblique or a beam (rays.*).

Each rule reads the ray study of its feed (:mod:`rfcheck.analysis.rays`: the rays at the
envelope corners, where their power goes, what is absorbed at the layer and where), cached
for the run and shared with the report's ray figures; the rules only compare it with their
limits. A launch that is one ray on the axis is covered by the 1-D launch path
(:mod:`rfcheck.analysis.launch_path`), and these rules say so (not applicable).
"""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np

from rfcheck.analysis.launch_path import NEAR_FIELD
from rfcheck.analysis.rays import RayCorner, RayStudy, ray_study, traced
from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.model import Feed
from rfcheck.units import format_fraction as _frac

from .context import Context
from .registry import Option, Range, rule


# --------------------------------------------------------------------------- the rules

_APPLIES = ("feeds whose launch is off axis, oblique or a Gaussian beam (launch x, y, tilt or "
            "beam), absorption ecr or ecr-harmonic-2")


def _skip(ctx: Context, feed: Feed, requirement: str) -> Finding | None:
    subject = f"feed {feed.id}"
    if feed.absorption in NEAR_FIELD:
        return ctx.not_applicable(subject, requirement,
                                  f"{feed.absorption} coupling works through the near field of "
                                  "an antenna, not by launched rays")
    if not traced(feed):
        return ctx.not_applicable(subject, requirement,
                                  "the launch is one ray on the axis along the launch direction: "
                                  "the 1-D axis results (access.*, load.*, absorption.*) "
                                  "cover it")
    if feed.absorption not in ("ecr", "ecr-harmonic-2"):
        return ctx.not_applicable(subject, requirement,
                                  f"the ray absorption models cover the electron-cyclotron "
                                  f"fundamental and second harmonic; a {feed.absorption} feed "
                                  "is judged on the axis")
    return None


def _where(study: RayStudy, c: RayCorner) -> dict:
    out = {}
    if len({k.density for k in study.corners}) > 1:
        out["density"] = Quantity(c.density, "m^-3")
    if len({k.scale for k in study.corners}) > 1:
        out["current_scale"] = Quantity(c.scale, "1")
    return out


def _split(c: RayCorner) -> str:
    parts = [f"{name} {_frac(v)}" for name, v in c.shares.items() if v > 0]
    return ", ".join(parts)


def _ratio(doc: str) -> Option:
    return Option("ratio", doc, valid=Range(0.0, 1.0, "a fraction of the launched power", "%"))


@rule("rays.reaches-resonance", severity=Severity.ERROR,
      summary="The launched rays carry enough of the power to the resonance layer, over the "
              "envelope.",
      options={"min_fraction": _ratio("least fraction of the launched power "
                                                      "that must meet the layer")},
      applies=_APPLIES)
def reaches_resonance(ctx: Context, *, min_fraction: float) -> Iterator[Finding]:
    """What it checks
    The fraction of the launched power that the rays carry to the target layer (|B| within
    1e-3 of B_ECR, or of B_ECR/2 for ecr-harmonic-2 feeds), each ray weighted by its share of
    the beam and by the power it still carries there; the worst envelope corner (peak density
    min/max × current scale min/max) is reported.

    Why it matters
    An oblique or off-axis wave refracts: it can miss the layer, meet a cutoff and turn back,
    or run into the wall first. The on-axis picture cannot say which.

    Equation
    dr/dτ = ∂H/∂N, dN/dτ = −∂H/∂r with H = N·N − n²(branch) (rfcheck.physics.rays);
    fraction = Σ_i w_i P_i(layer).

    Options
    min_fraction: fail below this fraction (default 80 %, project choice).

    References
    T. H. Stix, Waves in Plasmas (AIP 1992), ch. 4; D. G. Swanson, Plasma Waves (2003), ch. 5.
    """
    for feed in ctx.model.feeds:
        req = f"fraction of the launched power meeting the layer ≥ {_frac(min_fraction)}"
        skipped = _skip(ctx, feed, req)
        if skipped:
            yield skipped
            continue
        study = ray_study(ctx, feed)
        c = study.worst(lambda k: k.reach)
        yield ctx.finding(
            f"feed {feed.id}", req, passed=c.reach >= min_fraction,
            measured=Quantity(c.reach, "1"), limit=Quantity(min_fraction, "1"),
            margin=Quantity(c.reach - min_fraction, "1"), worst_case=_where(study, c),
            message=(f"{_frac(c.reach)} of the launched power meets the layer at the worst "
                     f"corner (where it goes: {_split(c)}); {study.assumptions()}"))


@rule("rays.first-pass-absorption", severity=Severity.WARNING,
      summary="The first pass of the rays absorbs enough of the launched power (planning "
              "threshold).",
      options={"min_absorbed_fraction": _ratio("first-pass absorbed fraction below which the "
                                                "design relies on multi-pass absorption")},
      applies=_APPLIES)
def first_pass(ctx: Context, *, min_absorbed_fraction: float) -> Iterator[Finding]:
    """What it checks
    The power absorbed on the rays' first pass: collisional damping along each ray plus, at
    the layer, the fraction A of what the ray still carries (R/X from the high-field side: 1,
    the cold magnetic beach; else the tenuous-plasma optical depth 1 − e^(−τ) at the lowest
    T_e with L_B along the ray; L: 0). Worst envelope corner.

    Why it matters
    What the first pass does not absorb goes on to the walls, the windows or back to the
    generator.

    Equation
    absorbed = Σ_i w_i [(1 − P_i) + P_i A_i]; τ_O1 = π² (L_B/λ) μ X √(1 − X), τ_X2 =
    4π² (L_B/λ) μ X, τ_O2 = μ τ_X2 (rfcheck.physics.absorption).

    Options
    min_absorbed_fraction: warn below it (default 50 %, common practice).

    References
    M. Bornatici et al., Nucl. Fusion 23 (1983) 1153; Stix (1992) ch. 13.
    """
    for feed in ctx.model.feeds:
        req = f"first-pass absorbed fraction ≥ {_frac(min_absorbed_fraction)}"
        skipped = _skip(ctx, feed, req)
        if skipped:
            yield skipped
            continue
        study = ray_study(ctx, feed)
        c = study.worst(lambda k: k.absorbed)
        yield ctx.finding(
            f"feed {feed.id}", req, passed=c.absorbed >= min_absorbed_fraction,
            measured=Quantity(c.absorbed, "1"), limit=Quantity(min_absorbed_fraction, "1"),
            margin=Quantity(c.absorbed - min_absorbed_fraction, "1"),
            worst_case=_where(study, c),
            message=(f"the first pass absorbs {_frac(c.absorbed)} at the worst corner "
                     f"({_frac(c.reach)} meets the layer; where it goes: {_split(c)}); "
                     f"{study.assumptions()}"))


@rule("rays.wall-load", severity=Severity.ERROR,
      summary="Power the first pass of the rays sends back to the launcher stays within the "
              "generator's reflected-power rating; wall and far-end loads are stated.",
      options={"max_returned_fraction": _ratio("largest fraction of the forward power sent "
                                               "back to the launcher when the feed declares no "
                                               "reflected-power rating")},
      applies=_APPLIES)
def wall_load(ctx: Context, *, max_returned_fraction: float) -> Iterator[Finding]:
    """What it checks
    Where the first pass of the rays ends: back through the launcher plane (towards the
    launcher and its window), on the side wall, on the far end wall, at the layer. The power
    returned towards the launcher bounds from below what reaches the generator after the
    first pass; everything the first pass does not absorb bounds it from above (metal walls
    send it on). The lower bound, P_fwd × returned share, is compared with the feed's
    max_reflected_power (else with max_returned_fraction of the forward power); the worst
    envelope corner is reported with the upper bound beside it.

    Why it matters
    A beam that refracts back out of the plasma comes home at the window and the generator;
    one that grazes the wall heats it.

    Equation
    P_returned ≥ P_fwd Σ_{returned rays} w_i P_i; P_returned ≤ P_fwd (1 − absorbed).

    Options
    max_returned_fraction: limit when no rating is declared (default 10 %, common practice).

    References
    Stix (1992) ch. 4 (energy flow along rays).
    """
    for feed in ctx.model.feeds:
        rating = feed.max_reflected_power
        limit = (rating / feed.power if rating is not None and feed.power > 0
                 else max_returned_fraction)
        why = ("the generator's rating max_reflected_power" if rating is not None
               else "max_returned_fraction (no rating declared)")
        req = f"first-pass power back at the launcher ≤ {_frac(limit)} of forward ({why})"
        skipped = _skip(ctx, feed, req)
        if skipped:
            yield skipped
            continue
        study = ray_study(ctx, feed)
        c = study.worst(lambda k: k.shares["launcher"], "max")
        back = c.shares["launcher"]
        upper = max(back, 1.0 - c.absorbed)
        yield ctx.finding(
            f"feed {feed.id}", req, passed=back <= limit,
            measured=Quantity(back, "1"), limit=Quantity(limit, "1"),
            margin=Quantity(limit - back, "1"), worst_case=_where(study, c),
            message=(f"{_frac(back)} of the forward power ({back * feed.power:.4g} W) comes "
                     f"back through the launcher plane on the first pass at the worst corner; "
                     f"at most {_frac(upper)} ({upper * feed.power:.4g} W) can reach the "
                     f"generator if every wall reflects; side wall {_frac(c.shares['side wall'])}"
                     f", far end {_frac(c.shares['far end'])}; {study.assumptions()}"))


@rule("rays.deposition-region", severity=Severity.WARNING,
      summary="The rays deposit their power in the launch's intended region (launch.target).",
      options={"min_share": _ratio("least share of the deposited power inside "
                                                "the intended region")},
      applies=_APPLIES + ", with launch.target declared")
def deposition_region(ctx: Context, *, min_share: float) -> Iterator[Finding]:
    """What it checks
    The deposited power (at the layer and by collisions along the rays) inside the launch's
    declared target: z within the slice (a landmark ± half width, or start–end) and within its
    radius of the axis. Share of the deposited power; the worst envelope corner.

    Why it matters
    A steered beam is aimed at a region (a resonance zone, a substrate's plasma); refraction
    and the field's shape can move the deposition away from it.

    Equation
    share = Σ_{deposits in region} p / Σ p.

    Options
    min_share: warn below it (default 80 %, project choice).

    References
    Stix (1992) ch. 4.
    """
    for feed in ctx.model.feeds:
        req = f"share of the deposited power inside the intended region ≥ {_frac(min_share)}"
        skipped = _skip(ctx, feed, req)
        if skipped:
            yield skipped
            continue
        target = feed.launch.target
        if target is None:
            yield ctx.not_applicable(f"feed {feed.id}", req, "no intended region declared "
                                     "(launch.target)")
            continue
        study = ray_study(ctx, feed)
        c = study.worst(lambda k: k.in_target)
        d = c.deposits
        total = float(d[:, 3].sum()) if d.size else 0.0
        if total > 0:
            zc = float((d[:, 2] * d[:, 3]).sum() / total)
            rc = float((np.hypot(d[:, 0], d[:, 1]) * d[:, 3]).sum() / total)
            centre = f"centroid z = {zc * 1e3:.4g} mm, r = {rc * 1e3:.3g} mm"
        else:
            centre = "nothing is deposited"
        yield ctx.finding(
            f"feed {feed.id}", req, passed=c.in_target >= min_share,
            measured=Quantity(c.in_target, "1"), limit=Quantity(min_share, "1"),
            margin=Quantity(c.in_target - min_share, "1"), worst_case=_where(study, c),
            message=(f"{_frac(c.in_target)} of the deposited power ({_frac(total)} of the "
                     f"launched power) lies in the target ({target.label}) at the worst "
                     f"corner; {centre}; {study.assumptions()}"))
