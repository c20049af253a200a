"""Magnet rules: the semi-empirical field ratios of minimum-B ion sources, and the
high-field ("magnetic beach") launch of an R wave.

`magnet.min-b-ratios` gives one finding per ratio and feed (four per feed), each with its own
limit and source, rather than one finding naming the worst ratio: the ratios come from
different publications of different confidence and a reviewer weighs them separately.
"""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np

from rfcheck.analysis.resonance import ECR_HARMONIC
from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.physics.frequencies import ecr_field

from .context import Context
from .registry import Option, Range, rule

#: samples along the launch path (launcher to the far end of the chamber)
PATH_POINTS = 1201

#: (attribute of MinBRatios-like data, symbol, what it is)
_RATIOS = (
    ("injection", "B_inj/B_ECR", "the injection-side on-axis maximum"),
    ("extraction", "B_ext/B_ECR", "the extraction-side on-axis maximum"),
    ("radial", "B_rad/B_ECR", "the multipole field alone at the wall, largest over azimuth, at "
                              "the axial position of B_min"),
    ("minimum", "B_min/B_ECR", "the smallest |B| in the plasma volume"),
)


def _trap_fields(ctx: Context) -> dict[str, np.ndarray]:
    """Characteristic fields (T) per envelope current scale, and where they lie."""
    traps = ctx.trap_geometries()
    return {
        "injection": np.array([t.injection_max.b for t in traps]),
        "extraction": np.array([t.extraction_max.b for t in traps]),
        "radial": np.array([t.radial_wall.b for t in traps]),
        "minimum": np.array([t.volume_min.b for t in traps]),
        "_wall_total": [t.wall_total for t in traps],
        "_points": {"injection": [t.injection_max for t in traps],
                    "extraction": [t.extraction_max for t in traps],
                    "radial": [t.radial_wall for t in traps],
                    "minimum": [t.volume_min for t in traps]},
    }


def _scale_index(ctx: Context, where: dict) -> int:
    if "current_scale" not in where:
        return 0
    return int(np.argmin(np.abs(ctx.envelope.current_scale - where["current_scale"].value)))


@rule("magnet.min-b-ratios", severity=Severity.WARNING,
      summary="Injection, extraction, radial and minimum field of a minimum-B trap over B_ECR "
              "lie in the published semi-empirical ranges.",
      options={
          "injection_min": Option("ratio", "lowest B_inj/B_ECR",
          valid=Range(1.0, 10.0,
                      "the ratio must exceed 1 for the resonance to be closed at the injection "
                      "side; published designs lie between 2 and 5 (Hitz et al. 2002), 10 is "
                      "beyond any", "1", low_open=True)),
          "extraction_min": Option("ratio", "lowest B_ext/B_ECR",
          valid=Range(1.0, 10.0,
                      "the ratio must exceed 1 for the resonance to be closed at the extraction "
                      "side; 10 is beyond any published design", "1", low_open=True)),
          "radial_min": Option("ratio", "lowest B_rad/B_ECR (at the chamber wall)",
          valid=Range(1.0, 10.0,
                      "the ratio must exceed 1 for the resonance to lie inside the chamber wall; "
                      "10 is beyond any published design", "1", low_open=True)),
          "bmin_low": Option("ratio", "lowest B_min/B_ECR",
          valid=Range(0.0, 1.0,
                      "B_min must lie below B_ECR for a resonance surface to exist", "1", low_open=True, high_open=True)),
          "bmin_high": Option("ratio", "highest B_min/B_ECR",
          valid=Range(0.0, 1.0,
                      "B_min must lie below B_ECR for a resonance surface to exist", "1", low_open=True, high_open=True)),
      },
      applies="minimum-B traps ([magnet] trap = \"minimum-b\"), feeds with absorption = ecr",
      ordered=(("bmin_low", "bmin_high", "the useful B_min range runs from its low end to its high end"),))
def min_b_ratios(ctx: Context, *, injection_min: float, extraction_min: float,
                 radial_min: float, bmin_low: float, bmin_high: float) -> Iterator[Finding]:
    """What it checks
    For a magnet declared as a minimum-B trap and each fundamental-ECR feed, four ratios
    over B_ECR = 2π f m_e / e, each at the worst point of the envelope (current scale ×
    frequency band), each a finding of its own:
    B_inj/B_ECR ≥ injection_min (the injection-side on-axis maximum), B_ext/B_ECR ≥
    extraction_min (extraction side), B_rad/B_ECR ≥ radial_min and bmin_low ≤ B_min/B_ECR ≤
    bmin_high (smallest |B| in the plasma volume). B_rad is the radial field as the published
    ratios use it: the field of the multipole alone on the chamber wall at the axial position
    of B_min, largest over azimuth, with the segmentation ripple of a segmented multipole
    resolved (it peaks at the joints between segments). The total |B| there, which adds the
    solenoids' field, is printed beside it but not compared; without a multipole B_rad is 0.
    Fields come from the trap geometry shared by the magnet rules
    (rfcheck.magnet.geometry.trap_geometries).

    Why it matters
    These scaling laws summarise what the best-performing minimum-B ion sources share: a
    strong injection mirror, an extraction mirror weaker than the radial wall field so that
    ions leave towards the extraction, and a minimum field well below resonance. A design
    outside them is not necessarily wrong but needs a reason. B_min too close to B_ECR has
    been linked to kinetic (cyclotron) instabilities and bursts of hot-electron losses.

    Equation
    ratios B_x / B_ECR with B_ECR = 2π f m_e / e (0.5180 T at 14.5 GHz). For an ideal 2N-pole
    (Halbach) array of remanence B_r between radii r_i and r_o the multipole field grows as
    r^(N−1): B(r) = B_r N/(N−1) (1 − (r_i/r_o)^(N−1)) (r/r_i)^(N−1) (K. Halbach, Nucl.
    Instrum. Methods 169 (1980) 1); M annular segments multiply it by sin x / x,
    x = (N + 1) π / M, and add the ripple harmonics N + jM.

    Options
    injection_min (default 3): "standard model" B_inj ≈ 3–4 B_ECR, D. Hitz et al., Rev.
    Sci. Instrum. 73 (2002) 509 (medium confidence). extraction_min (default 1.8): B_ext ≈ 2
    B_ECR, ≈ 0.9 B_rad, same source (medium/low). radial_min (default 2): B_rad ≥ 2 B_ECR,
    same source (medium). bmin_low, bmin_high (defaults 0.4, 0.8): useful range of B_min;
    numerical optimum ≈ 0.8 "close to experimental observations", V. Mironov et al.,
    arXiv:2012.08776 (2020) (high); instabilities above ≈ 0.8, O. Tarvainen et al., Plasma
    Sources Sci. Technol. 23 (2014) 025020 (from memory, low).

    References
    D. Hitz et al., Rev. Sci. Instrum. 73 (2002) 509; S. Gammino and G. Ciavola, Plasma
    Sources Sci. Technol. 5 (1996) 19; V. Mironov et al., arXiv:2012.08776 (2020);
    O. Tarvainen et al., Plasma Sources Sci. Technol. 23 (2014) 025020.
    """
    trap_type = ctx.model.magnet.trap
    limits = {"injection": (injection_min, None), "extraction": (extraction_min, None),
              "radial": (radial_min, None), "minimum": (bmin_low, bmin_high)}
    fields = None
    overall = (f"B_inj/B_ECR ≥ {injection_min:.3g}, B_ext/B_ECR ≥ {extraction_min:.3g}, "
               f"B_rad/B_ECR ≥ {radial_min:.3g}, "
               f"{bmin_low:.3g} ≤ B_min/B_ECR ≤ {bmin_high:.3g}")
    for feed in ctx.model.feeds:
        if trap_type != "minimum-b":
            yield ctx.not_applicable(f"feed {feed.id}", overall,
                                     f"the magnet is declared trap = '{trap_type}'; the ratios "
                                     "are stated for minimum-B ion sources")
            continue
        if feed.absorption != "ecr":
            yield ctx.not_applicable(f"feed {feed.id}", overall,
                                     f"absorption '{feed.absorption}': the ratios are stated "
                                     "for fundamental ECR heating")
            continue
        for key, symbol, what in _RATIOS:
            lo, hi = limits[key]
            subject = f"feed {feed.id} {symbol}"
            requirement = (f"{symbol} ≥ {lo:.3g}" if hi is None
                           else f"{lo:.3g} ≤ {symbol} ≤ {hi:.3g}")
            if fields is None:
                fields = _trap_fields(ctx)
            grid = ctx.envelope.grid(feed)
            ratio = fields[key][None, :, None] / ecr_field(grid.frequency)
            if hi is None:
                slack = ratio - lo
            else:
                slack = np.minimum(ratio - lo, hi - ratio)
            worst_slack, where = grid.worst(slack, "min")
            i = _scale_index(ctx, where)
            f_w = where["frequency"].value if "frequency" in where else feed.frequency
            b_ecr = float(ecr_field(f_w))
            point = fields["_points"][key][i]
            value = point.b / b_ecr
            limit = lo if hi is None or value - lo <= hi - value else hi
            passed = worst_slack >= 0
            where[key + "_field"] = Quantity(point.b, "T")
            where["position"] = Quantity(point.z, "m")
            at = f"z = {point.z * 1e3:.1f} mm" + (f", r = {point.r * 1e3:.1f} mm"
                                                   if key == "minimum" and point.r > 0 else "")
            head = (f"{symbol} = {value:.3g} ({what}: {point.b:.4g} T at {at}; B_ECR "
                    f"{b_ecr:.4g} T)")
            if key == "radial":
                total = fields["_wall_total"][i]
                where["wall_total_field"] = Quantity(total.b, "T")
                beside = (f"the total |B| on the wall there (solenoids included), "
                          f"{total.b:.4g} T = {total.b / b_ecr:.3g} B_ECR")
                if point.b > 0:
                    head = (f"{symbol} = {value:.3g} (B_rad, {what}: {point.b:.4g} T at {at}, "
                            f"azimuth {np.degrees(point.phi):.1f}°; B_ECR {b_ecr:.4g} T; the "
                            f"ratio compares B_rad, not {beside})")
                else:
                    head = (f"{symbol} = 0 (the magnet has no multipole, so no radial field "
                            f"at the wall; {beside}, is not used)")
            if passed:
                msg = f"{head}, within {requirement.replace(symbol, 'the ratio')}"
            elif value < lo:
                msg = f"{head}, below the semi-empirical minimum {lo:.3g}"
            else:
                msg = f"{head}, above the semi-empirical maximum {hi:.3g}"
            yield ctx.finding(subject, requirement, passed=passed, message=msg,
                              measured=Quantity(value, "1"), limit=Quantity(limit, "1"),
                              margin=Quantity(worst_slack, "1"), worst_case=where)


# --------------------------------------------------------------------------- beach


def _launch_path(ctx: Context, feed) -> np.ndarray | None:
    """Axial positions from the launcher to the far end of the chamber, or None if the
    launcher lies at or beyond that end."""
    c = ctx.model.chamber
    z0, d = feed.launch.z, feed.launch.direction
    far = c.z_end if d > 0 else c.z_start
    if (far - z0) * d <= 0:
        return None
    return np.linspace(z0, far, PATH_POINTS)


def _path_field(ctx: Context, z: np.ndarray) -> np.ndarray:
    """|B| (T) on the axis at z for every envelope current scale, (n_scale, n_z)."""
    points = np.zeros(z.shape + (3,))
    points[:, 2] = z
    b = np.atleast_2d(ctx.field_model.magnitude(points, ctx.envelope.current_scale))
    if np.isnan(b).any():
        bad = z[np.isnan(b).any(axis=0)]
        raise ValueError(f"the field is undefined on the launch path from z = {bad[0] * 1e3:.1f} "
                         "mm: measured field data do not cover it")
    return b


def _descent(b: np.ndarray, b_ecr: float) -> tuple[int | None, float]:
    """(index of the first point with |B| ≤ B_ECR, largest dip before it, T).

    A dip is a fall of |B| followed by a rise before the resonance: at each point, the
    smaller of the highest field before it and the highest field after it (up to the
    crossing) minus the field there.
    """
    below = np.nonzero(b <= b_ecr)[0]
    k = int(below[0]) if below.size else None
    seg = b[:k] if k is not None else b
    if seg.size < 3:
        return k, 0.0
    left = np.maximum.accumulate(seg)
    right = np.maximum.accumulate(seg[::-1])[::-1]
    return k, float(np.max(np.minimum(left, right) - seg))


@rule("magnet.high-field-launch", severity=Severity.ERROR,
      summary="An R wave launched along B starts above B_ECR by a margin and meets the "
              "resonance on a falling field (magnetic beach).",
      options={
          "min_launch_margin": Option("ratio", "lowest (B_launch − B_ECR) / B_ECR",
          valid=Range(0.0, 1.0,
                      "below 0 the launch would be on the low-field side; a launch field more "
                      "than twice B_ECR is no requirement of a high-field launch", "%")),
          "max_field_dip": Option("ratio", "largest dip of |B| (a fall and rise again) between "
                                           "the launcher and the resonance, relative to B_ECR",
          valid=Range(0.0, 1.0,
                      "a dip is a fraction of B_ECR; a dip of B_ECR itself would bring the field "
                      "to zero", "%", high_open=True)),
      },
      applies="feeds launched with mode = \"R\" and absorption = ecr or ecr-harmonic-2")
def high_field_launch(ctx: Context, *, min_launch_margin: float,
                      max_field_dip: float) -> Iterator[Finding]:
    """What it checks
    For each feed launched as an R wave (mode "R"), at every current scale of the envelope
    and every frequency of its band, two findings:
    (1) launch field: the on-axis |B| at the launcher exceeds B_ECR = 2π f m_e / e by at
    least min_launch_margin; (2) path: following the axis from the launcher in the launch
    direction, |B| reaches B_ECR inside the chamber, and on the way there it never falls and
    rises again by more than max_field_dip × B_ECR. A rise right after the launcher (the
    launcher sits a little outside the peak of its coil) is allowed: for |B| > B_ECR the R
    wave has no cutoff; what spoils the beach is a local minimum of |B| on the way
    (resonance-like absorption at a weak gradient, or the wave meeting the resonance
    again), a launch field below B_ECR, or no resonance at all. The fundamental B_ECR is
    used also for ecr-harmonic-2 feeds: the R-wave cutoff and resonance structure is set by
    f_ce / f. The launch angle to the field is not judged here (the access.* rules follow
    the wave along its path).

    Why it matters
    Above the critical density the R wave is the only wave that reaches the resonance, and
    only from the high-field side (f_ce > f): launched below B_ECR it meets the R cutoff at
    n = n_c (1 − f_ce/f) and is reflected. Coming down a monotonic field to the resonance
    ("magnetic beach") it is absorbed almost completely in one pass. A launch field only
    just above B_ECR turns into a low-field launch with a small current drift.

    Equation
    R = 1 − X / (1 − Y), X = n/n_c, Y = f_ce/f: no cutoff for Y > 1; launch margin
    |B(z_launch)| / B_ECR − 1.

    Options
    min_launch_margin: default 5 % (common practice). max_field_dip: default 1 % of B_ECR
    (of the order of magnetic-mapping accuracy; from memory).

    References
    T. H. Stix, Waves in Plasmas (AIP 1992), ch. 1–2; R. Geller, Electron Cyclotron
    Resonance Ion Sources and ECR Plasmas (IOP 1996), ch. 2 (magnetic beach).
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        req_launch = f"|B| at the launcher ≥ (1 + {min_launch_margin:.0%}) B_ECR"
        req_path = (f"|B| falls to B_ECR along the launch direction with no dip above "
                    f"{max_field_dip:.1%} of B_ECR")
        reason = None
        if feed.launch.mode != "R":
            reason = f"the feed is launched as mode {feed.launch.mode}, not as an R wave"
        elif feed.absorption not in ECR_HARMONIC:
            reason = f"absorption '{feed.absorption}' relies on no electron-cyclotron resonance"
        if reason:
            yield ctx.not_applicable(subject, f"{req_launch}; {req_path}", reason)
            continue
        z = _launch_path(ctx, feed)
        if z is None:
            msg = (f"the launcher at z = {feed.launch.z * 1e3:.1f} mm lies at or beyond the "
                   "chamber end it points to: the wave does not cross the chamber")
            yield ctx.finding(f"{subject} launch field", req_launch, passed=False, message=msg)
            yield ctx.finding(f"{subject} launch path", req_path, passed=False, message=msg)
            continue
        b = _path_field(ctx, z)  # (ns, nz)
        grid = ctx.envelope.grid(feed)
        freqs = grid.frequency.reshape(-1)
        b_ecr = ecr_field(freqs)
        excess = (b[:, 0][:, None] / b_ecr[None, :] - 1.0)[None]  # (1, ns, nf)
        dip = np.zeros_like(excess)
        crossing = np.full(excess.shape, np.nan)
        for i in range(b.shape[0]):
            for j, be in enumerate(b_ecr):
                k, d = _descent(b[i], float(be))
                dip[0, i, j] = d / be
                if k is not None and k > 0:
                    crossing[0, i, j] = z[k]
        # (1) the launch field
        worst, where = grid.worst(excess, "min")
        i = _scale_index(ctx, where)
        f_w = where["frequency"].value if "frequency" in where else feed.frequency
        be_w = float(ecr_field(f_w))
        b0 = float(b[i, 0])
        margin = worst - min_launch_margin
        passed = margin >= 0
        if passed:
            msg = (f"|B| {b0:.4g} T at the launcher (z = {feed.launch.z * 1e3:.1f} mm) is "
                   f"{worst:.1%} above B_ECR {be_w:.4g} T")
        elif worst > 0:
            msg = (f"|B| {b0:.4g} T at the launcher is only {worst:.1%} above B_ECR "
                   f"{be_w:.4g} T (required {min_launch_margin:.0%}): a small drift makes it a "
                   "low-field launch")
        else:
            msg = (f"|B| {b0:.4g} T at the launcher (z = {feed.launch.z * 1e3:.1f} mm) is below "
                   f"B_ECR {be_w:.4g} T: a low-field launch; above n_c (1 − f_ce/f) the R wave "
                   "is cut off before the resonance")
        where["launch_field"] = Quantity(b0, "T")
        yield ctx.finding(f"{subject} launch field", req_launch, passed=passed, message=msg,
                          measured=Quantity(worst, "1"), limit=Quantity(min_launch_margin, "1"),
                          margin=Quantity(margin, "1"), worst_case=where)
        # (2) the path to the resonance
        low_launch = excess[0] <= 0
        missing = np.isnan(crossing[0]) & ~low_launch
        bad_dip = np.where(np.isnan(crossing[0]), -np.inf, dip[0])
        worst_dip, where = grid.worst(bad_dip[None], "max")
        if low_launch.any():
            msg = ("the field at the launcher is below B_ECR at some envelope points: there is "
                   "no high-field side to descend from")
            yield ctx.finding(f"{subject} launch path", req_path, passed=False, message=msg,
                              measured=None, limit=Quantity(max_field_dip, "1"))
            continue
        if missing.any():
            msg = (f"|B| stays above B_ECR from the launcher to the chamber end "
                   f"(z = {z[-1] * 1e3:.1f} mm) at {int(missing.sum())} envelope points: "
                   "the R wave meets no resonance on the axis")
            yield ctx.finding(f"{subject} launch path", req_path, passed=False, message=msg,
                              measured=None, limit=Quantity(max_field_dip, "1"))
            continue
        i = _scale_index(ctx, where)
        j = int(np.argmax(bad_dip[i]))
        z_res = float(crossing[0, i, j])
        where["resonance_position"] = Quantity(z_res, "m")
        margin = max_field_dip - worst_dip
        passed = margin >= 0
        travel = abs(z_res - feed.launch.z) * 1e3
        if worst_dip <= 0:
            shape = "falls without a dip"
        else:
            shape = f"dips by at most {worst_dip:.2%} of B_ECR"
        msg = (f"|B| {shape} over the {travel:.1f} mm from the launcher to the first resonance "
               f"crossing at z = {z_res * 1e3:.1f} mm" +
               ("" if passed else f", more than the allowed {max_field_dip:.1%}: the wave "
                                  "meets a field well before the resonance"))
        yield ctx.finding(f"{subject} launch path", req_path, passed=passed, message=msg,
                          measured=Quantity(worst_dip, "1"), limit=Quantity(max_field_dip, "1"),
                          margin=Quantity(margin, "1"), worst_case=where)


#: samples of the on-axis field between the chamber start and the nozzle's exit plane
NOZZLE_POINTS = 801


@rule("magnet.nozzle-expansion", severity=Severity.ERROR,
      summary="A declared magnetic nozzle: the on-axis |B| falls from the throat to the exit "
              "plane by the declared ratio, without a second rise or a field reversal.",
      applies="magnets that declare a nozzle (magnet.nozzle)")
def nozzle_expansion(ctx: Context) -> Iterator[Finding]:
    """What it checks
    For a magnet that declares a nozzle { exit, min_ratio }: on the axis from the chamber
    start to the exit plane z_exit, at every current scale of the envelope, the throat is
    the largest |B| (its position z_t) and the expansion ratio is B_throat / |B(z_exit)|; it
    must be at least min_ratio at the worst scale. From the throat to the exit |B| must fall
    all the way: a rise on the way by more than 1 % of B_throat (a second mirror) or a
    change of sign of B_z (a null and a reversed field: a cusp) fails the finding whatever
    the ratio, since the exhaust would be reflected or would cross field lines there.

    Why it matters
    A magnetic nozzle converts the electrons' perpendicular energy into axial flow as the
    field expands; the thrust and the detachment of the plume depend on how far the field
    falls along the exhaust, which the design states as its ratio. A second maximum traps
    and reflects part of the flow; a field reversal in the exhaust is a cusp, where the
    plasma meets field lines going back to the magnet.

    Equation
    ratio = max_{z_start ≤ z ≤ z_exit} |B_z(0, z)| / |B_z(0, z_exit)| (on-axis field of the
    magnet model); monotone fall from z_t to z_exit within 1 % of B_throat; no sign change of
    B_z on (z_t, z_exit].

    Options
    None: the ratio is the design's own declared value (magnet.nozzle.min_ratio).

    References
    Common practice of magnetic-nozzle design; the expansion ratio as the figure of a
    nozzle: M. Merino and E. Ahedo, Plasma Sources Sci. Technol. 23 (2014) 032001 (from
    memory).
    """
    nozzle = ctx.model.magnet.nozzle
    requirement = "B_throat / B_exit ≥ the declared ratio, falling all the way"
    if nozzle is None:
        yield ctx.not_applicable("magnet nozzle", requirement,
                                 "the magnet declares no nozzle (magnet.nozzle)")
        return
    requirement = (f"B_throat / B_exit ≥ {nozzle.min_ratio:.4g} at z_exit = "
                   f"{nozzle.exit_z * 1e3:.4g} mm, falling all the way")
    chamber = ctx.model.chamber
    if nozzle.exit_z <= chamber.z_start:
        yield ctx.finding("magnet nozzle", requirement, passed=False,
                          message=f"the exit plane z = {nozzle.exit_z * 1e3:.4g} mm lies at or "
                                  f"before the chamber start ({chamber.z_start * 1e3:.4g} mm)")
        return
    scales = np.atleast_1d(np.asarray(ctx.envelope.current_scale, dtype=float)).reshape(-1)
    z = np.linspace(chamber.z_start, nozzle.exit_z, NOZZLE_POINTS)
    bz = np.atleast_2d(ctx.field_model.axis_field(z, scale=scales))  # (ns, nz), signed
    ratios, notes = [], []
    for i in range(len(scales)):
        b = np.abs(bz[i])
        k = int(np.argmax(b))
        b_t, b_e = float(b[k]), float(b[-1])
        ratio = b_t / b_e if b_e > 0 else np.inf
        after = bz[i, k:]
        reversed_ = bool(np.any(np.sign(after[1:]) * np.sign(after[0]) < 0))
        # rise: the largest amount by which |B| climbs again after falling (downstream max
        # above the running value); 0 for a monotone fall
        rise = float(np.max(np.maximum.accumulate(b[k:][::-1])[::-1] - b[k:]))
        bad = reversed_ or rise > 0.01 * b_t or k == len(b) - 1
        ratios.append((ratio if not bad else -np.inf, ratio, k, b_t, b_e, reversed_, rise))
    worst = min(range(len(ratios)), key=lambda j: ratios[j][0])
    _, ratio, k, b_t, b_e, reversed_, rise = ratios[worst]
    where = {"current_scale": Quantity(float(scales[worst]), "1")} if len(scales) > 1 else {}
    where["position"] = Quantity(float(z[k]), "m")
    head = (f"B_throat {b_t * 1e3:.4g} mT at z = {z[k] * 1e3:.4g} mm, |B| {b_e * 1e3:.4g} mT at "
            f"the exit plane z = {nozzle.exit_z * 1e3:.4g} mm: ratio {ratio:.4g}")
    if k == len(z) - 1:
        notes.append("the field still rises at the exit plane: the throat is not upstream of it")
    if reversed_:
        notes.append("B_z changes sign between the throat and the exit plane (a null and a "
                     "reversed field, a cusp in the exhaust)")
    if rise > 0.01 * b_t:
        notes.append(f"|B| rises again by {rise * 1e3:.3g} mT on the way (a second mirror)")
    passed = not notes and ratio >= nozzle.min_ratio
    scale_text = f" at current scale {scales[worst]:.4g}" if len(scales) > 1 else ""
    message = (head + scale_text + ("; " + "; ".join(notes) if notes else "")
               + f"; declared ratio {nozzle.min_ratio:.4g}; on-axis field of the magnet "
                 "model, no iron")
    yield ctx.finding("magnet nozzle", requirement, passed=passed, message=message,
                      measured=Quantity(float(ratio), "1"),
                      limit=Quantity(float(nozzle.min_ratio), "1"),
                      margin=Quantity(float(ratio - nozzle.min_ratio), "1"), worst_case=where)
