"""Ray verdicts for launches that are off axis, oblique or a beam (rays.*).

Each rule reads the ray study of its feed (:mod:`rfcheck.analysis.rays`: the rays at the
envelope corners, where their power goes, what is absorbed at the layer and where), cached
for the run and shared with the report's ray figures; the rules only compare it with their
limits. A launch that is one ray on the axis is covered by the 1-D launch path
(:mod:`rfcheck.analysis.launch_path`), and these rules say so (not applicable).
"""

from __future__ import annotations

import math
from collections.abc import Iterator

import numpy as np

from rfcheck.analysis.launch_path import NEAR_FIELD
from rfcheck.analysis.load import plasma_return
from rfcheck.analysis.rays import RayCorner, RayStudy, ray_study, scaled_field, traced
from rfcheck.analysis.window import window_analysis
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


def _mm(x: float) -> str:
    return f"{x * 1e3:.4g} mm"


def _skip_traced(ctx: Context, feed: Feed, requirement: str) -> tuple[bool, Finding | None]:
    """(skip, finding): every feed the rays do not judge (an on-axis launch, near-field
    coupling, another absorption) gets the not-applicable finding of :func:`_skip`, as from
    the other rays.* rules, so that each rays.* rule says the same of a feed."""
    skipped = _skip(ctx, feed, requirement)
    return skipped is not None, skipped


@rule("rays.window-return", severity=Severity.ERROR,
      summary="Power the first pass of the rays returns onto the feed's window stays within "
              "what the window is rated for; what lands on the end wall around it is stated.",
      options={"max_window_fraction": _ratio("largest fraction of the forward power that may "
                                             "return onto the window when it declares no "
                                             "max_absorbed_power")},
      applies=_APPLIES)
def window_return(ctx: Context, *, max_window_fraction: float) -> Iterator[Finding]:
    """What it checks
    Where the rays that come back through the launcher plane cross it. Those within the
    window's radius (half its diameter) of the launcher position, in that plane, return onto
    the window's aperture; the others land on the end wall around the launcher. The power
    onto the window, P_fwd × its share, is compared per window of the feed with what the
    window is rated for: with a max_absorbed_power and a lossy window, the returned peak
    power whose absorption (the window's worst absorptance A of window.absorbed-power, at the
    duty cycle) together with the forward pass's keeps within that rating; otherwise
    max_window_fraction of the forward power. A window without a diameter takes all the
    returned power (the worst case, said in the finding). Worst envelope corner.

    Why it matters
    Power coming back onto the window heats it a second time and raises the field in it and
    in front of it (arcs on the vacuum face); it then goes on to the generator (rays.wall-load
    judges that total). What lands beside the window heats the end wall.

    Equation
    P_win = P_fwd Σ_{returned rays, |ρ_i − ρ_0| ≤ D/2} w_i P_i; limit
    (P_abs,max − A P_fwd δ) / (A δ) with the duty cycle δ, else max_window_fraction · P_fwd.

    Options
    max_window_fraction: limit without a rating (default 10 %, common practice, as
    rays.wall-load).

    References
    Stix (1992) ch. 4 (energy flow along rays); V. L. Ginzburg, The Propagation of
    Electromagnetic Waves in Plasmas (1970), the ray in a linear layer (where a tilted ray
    comes back); D. M. Pozar, Microwave Engineering (2012) §4.4 (absorption of a lossy
    two-port).
    """
    for feed in ctx.model.feeds:
        req = "first-pass power returning onto the window within its rating"
        skip, skipped = _skip_traced(ctx, feed, req)
        if skip:
            yield from ([skipped] if skipped else [])
            continue
        windows = [w for w in ctx.model.windows if w.feed == feed.id]
        if not windows:
            yield ctx.not_applicable(f"feed {feed.id}", req,
                                     "the feed declares no window: the power back at the "
                                     "launcher is judged by rays.wall-load")
            continue
        study = ray_study(ctx, feed)
        for window in windows:
            yield _window_finding(ctx, feed, window, study, max_window_fraction)


def _window_finding(ctx, feed, window, study, fraction) -> Finding:
    radius = None if window.diameter is None else window.diameter / 2.0
    c = study.worst(lambda k: k.window_split(radius)[0], "max")
    on, wall = c.window_split(radius)
    p_fwd = feed.power
    a = (window_analysis(ctx, window).absorption.value
         if window.max_absorbed_power is not None else float("nan"))
    if window.max_absorbed_power is not None and a > 0 and feed.duty_cycle > 0:
        p_avg = feed.average_power
        limit = max(0.0, window.max_absorbed_power - a * p_avg) / (a * feed.duty_cycle)
        why = (f"the returned peak power the window's max_absorbed_power "
               f"{window.max_absorbed_power:.4g} W leaves after the forward pass's "
               f"{a * p_avg:.3g} W, absorbed at the window's worst absorptance {a:.3g} "
               f"(window.absorbed-power) and duty {_frac(feed.duty_cycle)}; the same "
               f"absorptance from the plasma side (exact for a symmetric stack)")
        if limit == 0.0:
            why += "; the forward pass alone uses the whole rating (window.absorbed-power)"
        req = "first-pass power returning onto the window ≤ what its max_absorbed_power leaves"
    else:
        limit = fraction * p_fwd
        reason = ("the window declares no max_absorbed_power"
                  if window.max_absorbed_power is None else
                  "the window's absorptance is zero or undefined")
        why = f"max_window_fraction {_frac(fraction)} of the forward power ({reason})"
        req = f"first-pass power returning onto the window ≤ {_frac(fraction)} of forward"
    if radius is None:
        size = ("its size is not declared: all the returned power is taken onto the window "
                "(the worst case)")
    else:
        size = (f"aperture radius {_mm(radius)} round the launcher in the launcher plane (normal "
                "to the launch direction; the window seen through the launcher, the line "
                "between them not traced)")
    back = c.shares["launcher"]
    p_on = on * p_fwd
    msg = (f"{_frac(on)} of the forward power ({p_on:.4g} W) returns onto window {window.id} "
           f"on the first pass at the worst corner, {_frac(wall)} ({wall * p_fwd:.4g} W) lands "
           f"on the end wall around the launcher (back through the launcher plane: "
           f"{_frac(back)}); {size}; limit {limit:.4g} W: {why}; {study.assumptions()}")
    return ctx.finding(
        f"window {window.id}", req, passed=p_on <= limit,
        measured=Quantity(p_on, "W"), limit=Quantity(limit, "W"),
        margin=Quantity(limit - p_on, "W"), worst_case=_where(study, c), message=msg,
        details={"feed": feed.id, "window_share": on, "end_wall_share": wall,
                 "returned_share": back,
                 "window_radius": None if radius is None else radius})


#: the 1-D cold full wave along the axis stands for the rays where the launch is within this
#: angle of the axis (cos 10° = 0.985: the axial wave number within 1.5 % of k) ...
AXIS_TILT = math.radians(10.0)
#: ... and |B| at every failing point is within this of the on-axis |B| at the same z
AXIS_FIELD = 0.02


@rule("rays.geometric-optics", severity=Severity.WARNING,
      summary="The rays are in the geometric-optics regime (1/(kL) small) on their path; "
              "where not, the finding says which result takes over.",
      options={"max_go_parameter": Option(
                   "ratio", "largest 1/(kL) on a ray's path that geometric optics is trusted at",
                   valid=Range(0.0, 10.0, "1/(kL): the reduced wavelength over the gradient "
                               "scale; above 10 the wave does not see a gradient at all",
                               "1", low_open=True)),
               "max_doubtful_share": _ratio("largest share of the launched power on rays "
                                            "that exceed it")},
      applies=_APPLIES)
def geometric_optics(ctx: Context, *, max_go_parameter: float,
                     max_doubtful_share: float) -> Iterator[Finding]:
    """What it checks
    Every ray carries 1/(kL) along its path, k = n ω/c and L = n²/|∇n²| the scale length of
    its refractive index (rfcheck.physics.rays). Per envelope corner, the share of the
    launched power on rays whose largest 1/(kL) before their end exceeds max_go_parameter;
    points within the thermal Doppler width of the layer, |B/B_res − 1| ≤ √(2T_e/m_e)/c at
    the lowest T_e, are left out (the cold ray ends there by construction and the absorption
    model stands for it). Worst corner. Where the share exceeds max_doubtful_share and the
    launch is within 10° of the axis with |B| at every failing point within 2 % of the
    on-axis |B| at its z, the 1-D cold full wave along the axis (load.plasma-reflection,
    access.reaches-resonance) takes over, and its numbers for the feed's intended part are
    quoted; otherwise the finding says that no 1-D result covers it.

    Why it matters
    Ray tracing is the short-wavelength limit of the wave equation: where the medium changes
    within a reduced wavelength (a cutoff at normal incidence, a steep edge) the ray's path
    and power are not the wave's, and the rays.* findings built on them are doubtful.

    Equation
    1/(kL) = |∇n²| / (k0 n³); linear layer n² = 1 − z/L_n at normal incidence:
    1/(kL) = 1/(k0 L_n n³), which grows without bound at the cutoff n = 0; oblique at θ:
    largest at the turning point n = sin θ, 1/(k0 L_n sin³θ).

    Options
    max_go_parameter: default 1 (the reduced wavelength λ/2π equals the gradient scale;
    geometric optics needs 1/(kL) ≪ 1; from memory). max_doubtful_share: default 5 %
    (project choice).

    References
    Stix (1992) ch. 4; P. M. Bellan, Fundamentals of Plasma Physics (2006) ch. 5 (WKB
    validity); Ginzburg (1970) (the linear layer); M. Bornatici et al., Nucl. Fusion 23
    (1983) 1153 (resonance width).
    """
    for feed in ctx.model.feeds:
        req = (f"share of the launched power on rays with 1/(kL) > {max_go_parameter:.3g} ≤ "
               f"{_frac(max_doubtful_share)}")
        skip, skipped = _skip_traced(ctx, feed, req)
        if skip:
            yield from ([skipped] if skipped else [])
            continue
        study = ray_study(ctx, feed)
        if all(k.go_unread() >= float(np.sum(k.weights)) for k in study.corners):
            # nothing was read: no pass from rays that never left the launcher
            yield ctx.not_applicable(
                f"feed {feed.id}", req,
                "no ray has a point to read 1/(kL) at (every ray is evanescent at the start or "
                "ends at once, at every corner): there is no path to judge; "
                "rays.reaches-resonance judges where the power goes")
            continue

        def share(k):
            return float(np.sum(k.weights[k.go_failing(max_go_parameter)]))

        c = study.worst(share, "max")
        doubtful = share(c)
        fail = c.go_failing(max_go_parameter)
        read = ~np.isnan(c.go_max)
        i = int(np.flatnonzero(read)[np.argmax(c.go_max[read])]) if read.any() else 0
        top = float(c.go_max[i]) if read.any() else 0.0
        at = c.go_at[i] if read.any() else np.zeros(3)
        value = (f"{top:.3g}" if top <= 1e3 else
                 "above 1e3 (n → 0: a cutoff met at normal incidence)")
        where = (f"largest 1/(kL) {value} at z = {_mm(float(at[2]))}, r = "
                 f"{_mm(float(np.hypot(at[0], at[1])))}")
        band = (f"points within |B/B_res − 1| ≤ {c.go_band:.2g} of the layer (the Doppler "
                "width at the lowest T_e) left out")
        if c.go_unread() > 0:
            band += (f"; {_frac(c.go_unread())} of the launched power on rays with no point "
                     "to read (evanescent at the start or ended at once) is not judged here")
        passed = doubtful <= max_doubtful_share
        if passed:
            tail = "the ray results stand"
        else:
            tail = _handover(ctx, feed, study, c, fail)
        yield ctx.finding(
            f"feed {feed.id}", req, passed=passed,
            measured=Quantity(doubtful, "1"), limit=Quantity(max_doubtful_share, "1"),
            margin=Quantity(max_doubtful_share - doubtful, "1"), worst_case=_where(study, c),
            message=(f"{_frac(doubtful)} of the launched power is on rays with 1/(kL) > "
                     f"{max_go_parameter:.3g} before their end at the worst corner "
                     f"({int(fail.sum())} of {len(c.rays)} rays; {where}; {band}); {tail}; "
                     f"{study.assumptions()}"),
            details={"doubtful_share": doubtful, "largest_go_parameter": top,
                     "resonance_band": c.go_band})


def _handover(ctx, feed, study, c, fail) -> str:
    """What takes over where geometric optics fails (the 1-D axis result, where it applies)."""
    doubt = "the ray results (rays.*) are doubtful for that share"
    launch = feed.launch
    pts = c.go_at[fail]
    b = scaled_field(study.grid, c.scale)
    axis = pts.copy()
    axis[:, :2] = 0.0
    b_pt = np.linalg.norm(b(pts), axis=1)
    b_ax = np.linalg.norm(b(axis), axis=1)
    spread = float(np.max(np.abs(b_pt / np.maximum(b_ax, 1e-300) - 1.0))) if len(pts) else 0.0
    if launch.tilt > AXIS_TILT or spread > AXIS_FIELD:
        why = (f"tilt {math.degrees(launch.tilt):.3g}° > {math.degrees(AXIS_TILT):.3g}°"
               if launch.tilt > AXIS_TILT else
               f"|B| at the failing points differs from the axis by up to {_frac(spread)} "
               f"(> {_frac(AXIS_FIELD)})")
        return (f"{doubt}, and no 1-D result covers it ({why}): a 2-D/3-D full-wave "
                "calculation would settle it")
    ret = plasma_return(ctx, feed)
    if ret is None:
        return f"{doubt}; the 1-D axis path has no launched part to stand for it"
    mode = launch.mode if launch.mode in ret.parts else next(iter(ret.parts))
    ld = ret.parts[mode]
    first = ld.first
    return (f"{doubt}; the launch is within {math.degrees(AXIS_TILT):.3g}° of the axis and |B| "
            f"at the failing points within {_frac(AXIS_FIELD)} of the axis value (up to "
            f"{_frac(spread)}), so the 1-D cold full wave along the axis takes over "
            f"(load.plasma-reflection, access.reaches-resonance): the {mode} part at its worst "
            f"corner (peak density {ret.corner.density:.3g} m^-3, current scale "
            f"{ret.corner.scale:.3g}) reflects {_frac(first.reflected)}, absorbs "
            f"{_frac(first.absorbed)} and sends {_frac(first.transmitted)} to the far end on "
            f"the first pass, {_frac(ld.returned)} returned with the far end")
