"""Where the intended resonance of each feed lies in the magnet's field."""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np

from rfcheck.findings import Finding, Quantity, Severity
from rfcheck.physics.frequencies import ecr_field

from .context import Context
from .registry import Option, Range, rule

#: harmonic number of the electron-cyclotron resonance each absorption mechanism relies on
ECR_HARMONIC = {"ecr": 1, "ecr-harmonic-2": 2}


@rule("resonance.ecr-in-chamber", severity=Severity.ERROR,
      summary="The ECR field of each ECR-heated feed is crossed on the axis inside the chamber.",
      options={"min_field_margin": Option(
          "ratio", "how far inside the on-axis field range B_res must lie, relative to B_res",
          valid=Range(0.0, 1.0,
                      "a negative margin would accept a resonance field outside the field range; "
                      "100 % of B_res is beyond any field range", "%", high_open=True))},
      applies="feeds with absorption = ecr or ecr-harmonic-2")
def ecr_in_chamber(ctx: Context, *, min_field_margin: float) -> Iterator[Finding]:
    """What it checks
    For every current scale of the envelope (1 ± current tolerance) and every frequency of
    the feed's tolerance band, the on-axis |B|(z) between the chamber's end planes must take
    the resonance value B_res = h · 2π f m_e / e (h = 1 for ecr, 2 for ecr-harmonic-2 at half
    the field): min |B| ≤ B_res ≤ max |B|. The measured value is the smaller of
    (max |B| − B_res) and (B_res − min |B|), relative to B_res, at the worst envelope point;
    negative means the resonance is missing.

    Why it matters
    Without a resonance surface inside the plasma the wave has no collisionless absorption
    layer: power goes to the walls and windows or back to the generator, and the discharge is
    weak or unstable. A resonance that only just exists at nominal current disappears with a
    small magnet drift.

    Equation
    B_ECR = 2π f m_e / (h e) (non-relativistic; 87.5235 mT at 2.45 GHz, h = 1).

    Options
    min_field_margin: required relative margin (default 0 %: the envelope already spans the
    current and frequency tolerances).

    References
    NRL Plasma Formulary (2019), p. 28; R. Geller, Electron Cyclotron Resonance Ion Sources
    and ECR Plasmas (IOP 1996), ch. 1.
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        h = ECR_HARMONIC.get(feed.absorption)
        requirement = f"min |B| ≤ B_res ≤ max |B| on axis, margin ≥ {min_field_margin:.0%}"
        if h is None:
            yield ctx.not_applicable(subject, requirement,
                                     f"absorption '{feed.absorption}' does not rely on an "
                                     "electron-cyclotron resonance")
            continue
        label = "ECR field" if h == 1 else f"ECR harmonic {h} field"
        yield _on_axis_range(ctx, feed, subject, requirement, label,
                             lambda f, h=h: ecr_field(f, harmonic=h), min_field_margin,
                             "no resonance on axis")


# --------------------------------------------------------------------------- shared helpers


def _label(h: int) -> str:
    return "ECR" if h == 1 else f"ECR harmonic {h}"


def _scale_index(ctx: Context, where: dict) -> int:
    """Index of the envelope current scale named in a worst case (0 if the scale is fixed)."""
    if "current_scale" not in where:
        return 0
    return int(np.argmin(np.abs(ctx.envelope.current_scale - where["current_scale"].value)))


def _frequency_at(feed, where: dict) -> float:
    return where["frequency"].value if "frequency" in where else feed.frequency


def _on_axis_range(ctx: Context, feed, subject: str, requirement: str, label: str, field_of,
                   min_field_margin: float, absent: str) -> Finding:
    """Whether the resonance field `field_of(f)` lies in the on-axis |B| range of the chamber.

    Measured: min(max |B| − B_res, B_res − min |B|) / B_res at the worst envelope point
    (current scale × frequency); negative when the resonance is missing.
    """
    grid = ctx.envelope.grid(feed)
    b = ctx.axis_field()  # (n_scale, n_z)
    b_lo = b.min(axis=1)[None, :, None]
    b_hi = b.max(axis=1)[None, :, None]
    b_res = field_of(grid.frequency)
    rel = np.minimum(b_hi - b_res, b_res - b_lo) / b_res
    worst, where = grid.worst(rel, "min")
    margin = worst - min_field_margin
    passed = margin >= 0
    s_idx = _scale_index(ctx, where)
    b_w = float(field_of(_frequency_at(feed, where)))
    lo, hi = float(b[s_idx].min()), float(b[s_idx].max())
    span = f"{lo * 1e3:.2f}–{hi * 1e3:.2f} mT"
    if passed:
        msg = f"{label} {b_w * 1e3:.4g} mT lies within the on-axis range {span} (margin {worst:.1%})"
    elif worst < 0:
        side = "above the highest" if b_w > hi else "below the lowest"
        msg = f"{label} {b_w * 1e3:.4g} mT is {side} on-axis field in the chamber ({span}): {absent}"
    else:
        msg = (f"{label} {b_w * 1e3:.4g} mT is inside {span} by only {worst:.1%} "
               f"(required {min_field_margin:.0%})")
    return ctx.finding(subject, requirement, passed=passed, message=msg,
                       measured=Quantity(worst, "1"), limit=Quantity(min_field_margin, "1"),
                       margin=Quantity(margin, "1"), worst_case=where)


def envelope_crossings(ctx: Context, feed, harmonic: int) -> list[list[tuple]]:
    """On-axis crossings of the resonance field of `feed` for every envelope point.

    Returns ``out[i][j]``: the :class:`~rfcheck.magnet.geometry.Crossing` tuple for current
    scale i (``ctx.axis_profiles()``) and frequency j (``ctx.envelope.frequencies(feed)``),
    from spline roots (not grid nodes). Cached on the context.
    """
    key = ("crossings", feed.id, harmonic)
    if key not in ctx._cache:
        from rfcheck.magnet.geometry import resonance_crossings_many

        fields = [float(ecr_field(f, harmonic=harmonic))
                  for f in ctx.envelope.frequencies(feed)]
        ctx._cache[key] = [resonance_crossings_many(p, fields) for p in ctx.axis_profiles()]
    return ctx._cache[key]


def _clearance_objects(ctx: Context, feed) -> list[tuple[str, float]]:
    objects = [(f"window {w.id}", w.z) for w in ctx.model.windows]
    objects.append((f"launcher of feed {feed.id}", feed.launch.z))
    objects += [(f"landmark {lm.id}", lm.z) for lm in ctx.model.chamber.landmarks]
    return objects


# --------------------------------------------------------------------------- clearance


@rule("resonance.ecr-clearance", severity=Severity.ERROR,
      summary="Every on-axis resonance crossing keeps a minimum distance from the windows, "
              "the launcher and each chamber landmark.",
      options={"min_distance": Option(
          "length", "smallest allowed on-axis distance between a resonance crossing and a "
                    "window, the feed's launcher or a landmark",
          valid=Range(0.0, 10.0,
                      "a negative distance would accept a resonance on a window or electrode; 10 "
                      "m is beyond any source chamber", "mm"))},
      applies="feeds with absorption = ecr or ecr-harmonic-2")
def ecr_clearance(ctx: Context, *, min_distance: float) -> Iterator[Finding]:
    """What it checks
    For every current scale of the envelope and every frequency of the feed's tolerance
    band, the on-axis positions z_res where |B| = B_res (roots of a cubic spline of the
    on-axis profile, not grid nodes) and their distance |z_res − z_obj| to every window
    (of any feed), to the feed's launcher and to every chamber landmark (extraction
    electrode, bias disc, substrate...). The measured value is the smallest distance at the
    worst envelope point; the message names the closest object and the resonance position.
    Because the frequency band and the current tolerance are part of the envelope, the
    resonance-zone width for the frequency tolerance and the drift with the magnet current
    are both included.

    Why it matters
    The resonance is where electrons are heated. A resonance on a window puts the hot
    electrons and the plasma's power density on the dielectric (heating, coating, cracking);
    on the launcher or a coupling structure it detunes or arcs it; on the extraction
    electrode or the substrate it changes the beam or the process and can sputter the
    electrode. A resonance that clears an object at nominal current may reach it with a
    small current drift.

    Equation
    B_res = 2π f m_e / (h e); distance = min over crossings and objects of |z_res − z_obj|;
    to first order a current change Δs moves a crossing by Δz = −(Δs / (1 + Δs)) B_res /
    (d|B|/dz).

    Options
    min_distance: required distance (default 10 mm, common practice).

    References
    NRL Plasma Formulary (2019), p. 28 (B_ECR); R. Geller, Electron Cyclotron Resonance Ion
    Sources and ECR Plasmas (IOP 1996), ch. 1 and 4.
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        h = ECR_HARMONIC.get(feed.absorption)
        requirement = (f"on-axis distance from each resonance crossing to the windows, the "
                       f"launcher and each landmark ≥ {min_distance * 1e3:.4g} mm")
        if h is None:
            yield ctx.not_applicable(subject, requirement,
                                     f"absorption '{feed.absorption}' does not rely on an "
                                     "electron-cyclotron resonance")
            continue
        objects = _clearance_objects(ctx, feed)
        crossings = envelope_crossings(ctx, feed, h)
        ns, nf = len(crossings), len(crossings[0])
        dist = np.full((1, ns, nf), np.inf)
        closest: dict[tuple[int, int], tuple[float, str, float]] = {}
        for i in range(ns):
            for j in range(nf):
                for c in crossings[i][j]:
                    for name, z_obj in objects:
                        d = abs(c.z - z_obj)
                        if d < dist[0, i, j]:
                            dist[0, i, j] = d
                            closest[(i, j)] = (c.z, name, z_obj)
        if not np.isfinite(dist).any():
            yield ctx.not_applicable(subject, requirement,
                                     f"no on-axis crossing of the {_label(h)} field anywhere "
                                     "in the envelope (resonance.ecr-in-chamber reports the "
                                     "missing resonance)")
            continue
        grid = ctx.envelope.grid(feed)
        worst, where = grid.worst(np.where(np.isfinite(dist), dist, np.inf), "min")
        i, j = np.unravel_index(int(np.argmin(dist[0])), (ns, nf))
        z_res, name, z_obj = closest[(int(i), int(j))]
        where["resonance_position"] = Quantity(z_res, "m")
        where["object_position"] = Quantity(z_obj, "m")
        margin = worst - min_distance
        passed = margin >= 0
        n_missing = int((~np.isfinite(dist)).sum())
        note = (f"; at {n_missing} of {ns * nf} envelope points there is no crossing"
                if n_missing else "")
        verb = "clears" if passed else "comes within"
        msg = (f"the {_label(h)} resonance at z = {z_res * 1e3:.1f} mm {verb} {name} "
               f"(z = {z_obj * 1e3:.1f} mm) by {worst * 1e3:.1f} mm against "
               f"{min_distance * 1e3:.4g} mm" + note)
        yield ctx.finding(subject, requirement, passed=passed, message=msg,
                          measured=Quantity(worst, "m"), limit=Quantity(min_distance, "m"),
                          margin=Quantity(margin, "m"), worst_case=where)


# --------------------------------------------------------------------------- closure


@rule("resonance.ecr-closed", severity=Severity.ERROR,
      summary="In a minimum-B trap the resonance surface is closed: B_min < B_res < the last "
              "closed |B| over the envelope.",
      options={"min_field_margin": Option(
          "ratio", "how far B_res must lie above B_min and below the last closed |B|, "
                   "relative to B_res",
          valid=Range(0.0, 1.0,
                      "a negative margin would accept a resonance field outside the field range; "
                      "100 % of B_res is beyond any field range", "%", high_open=True))},
      applies="minimum-B traps ([magnet] trap = \"minimum-b\"), feeds with absorption = ecr "
              "or ecr-harmonic-2")
def ecr_closed(ctx: Context, *, min_field_margin: float) -> Iterator[Finding]:
    """What it checks
    For a magnet declared as a minimum-B trap, at every current scale of the envelope and
    every frequency of the feed's band: B_min < B_res < B_lcs, where B_min is the smallest
    |B| in the plasma volume (r ≤ R, z_start ≤ z ≤ z_end, found off axis too) and B_lcs the
    last closed |B|: the smallest |B| on the chamber boundary (wall and both end planes).
    The measured value is the smaller of (B_res − B_min)/B_res and (B_lcs − B_res)/B_res at
    the worst envelope point.

    Why it matters
    In a minimum-B ion source the electrons are heated on a closed |B| = B_ECR surface that
    lies wholly inside the plasma: hot electrons stay confined and the charge-state
    distribution builds up. If B_res ≥ B_lcs the resonance surface meets the wall or an end
    plane: hot electrons are lost there (wall heating, x-rays, sputtering). If B_res ≤
    B_min there is no resonance in the volume at all.

    Equation
    B_res = 2π f m_e / (h e); margins (B_res − B_min)/B_res and (B_lcs − B_res)/B_res.

    Options
    min_field_margin: required relative margin on both sides (default 0 %: the envelope
    already spans the current and frequency tolerances).

    References
    R. Geller, Electron Cyclotron Resonance Ion Sources and ECR Plasmas (IOP 1996), ch. 4;
    D. Hitz et al., Rev. Sci. Instrum. 73 (2002) 509.
    """
    trap_type = ctx.model.magnet.trap
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        h = ECR_HARMONIC.get(feed.absorption)
        requirement = (f"B_min < B_res < last closed |B| over the envelope, margin ≥ "
                       f"{min_field_margin:.0%}")
        if trap_type != "minimum-b":
            yield ctx.not_applicable(subject, requirement,
                                     f"the magnet is declared trap = '{trap_type}', not a "
                                     "minimum-B trap: its resonance surfaces are not meant "
                                     "to close")
            continue
        if h is None:
            yield ctx.not_applicable(subject, requirement,
                                     f"absorption '{feed.absorption}' does not rely on an "
                                     "electron-cyclotron resonance")
            continue
        traps = ctx.trap_geometries()
        grid = ctx.envelope.grid(feed)
        b_min = np.array([t.volume_min.b for t in traps])[None, :, None]
        b_lcs = np.array([t.last_closed.b for t in traps])[None, :, None]
        b_res = ecr_field(grid.frequency, harmonic=h)
        below = (b_res - b_min) / b_res
        above = (b_lcs - b_res) / b_res
        worst, where = grid.worst(np.minimum(below, above), "min")
        margin = worst - min_field_margin
        passed = margin >= 0
        t = traps[_scale_index(ctx, where)]
        br = float(ecr_field(_frequency_at(feed, where), harmonic=h))
        lo, hi = (br - t.volume_min.b) / br, (t.last_closed.b - br) / br
        lcs = (f"last closed |B| {t.last_closed.b:.4g} T (on the {t.last_closed.where} at "
               f"z = {t.last_closed.z * 1e3:.1f} mm, r = {t.last_closed.r * 1e3:.1f} mm)")
        head = (f"B_min {t.volume_min.b:.4g} T, {_label(h)} field {br:.4g} T, {lcs}: "
                f"margins {lo:.1%} below and {hi:.1%} above")
        if passed:
            msg = head
        elif lo < 0:
            msg = head + "; B_min is above the resonance field: no resonance in the volume"
        elif hi < 0:
            msg = head + ("; the resonance surface is not closed: it meets the chamber "
                          "boundary and hot electrons are lost there")
        else:
            msg = head + f"; closer than the required {min_field_margin:.0%}"
        where["volume_min"] = Quantity(t.volume_min.b, "T")
        where["last_closed_field"] = Quantity(t.last_closed.b, "T")
        yield ctx.finding(subject, requirement, passed=passed, message=msg,
                          measured=Quantity(worst, "1"), limit=Quantity(min_field_margin, "1"),
                          margin=Quantity(margin, "1"), worst_case=where)


# --------------------------------------------------------------------------- harmonics


def _intended_resonance(ctx: Context, feed):
    """(label, field as a function of frequency) of the feed's intended harmonic resonance,
    or None when the feed does not rely on one."""
    if feed.absorption == "ecr-harmonic-2":
        return "second-harmonic ECR field B_ECR/2", lambda f: ecr_field(f, harmonic=2)
    if feed.absorption == "icr":
        from rfcheck.physics.frequencies import ion_cyclotron_field

        ion = ctx.model.plasma.ions[0].species
        return f"ion-cyclotron field of {ion}", lambda f: ion_cyclotron_field(f, ion)
    return None


@rule("resonance.harmonic", severity=Severity.ERROR,
      summary="The intended harmonic or ion-cyclotron resonance of each feed is present on "
              "the axis inside the chamber.",
      options={"min_field_margin": Option(
          "ratio", "how far inside the on-axis field range the resonance field must lie, "
                   "relative to it",
          valid=Range(0.0, 1.0,
                      "a negative margin would accept a resonance field outside the field range; "
                      "100 % of B_res is beyond any field range", "%", high_open=True))},
      applies="feeds with absorption = ecr-harmonic-2 (B_ECR/2) or icr (the ion-cyclotron "
              "field of the first ion species)")
def harmonic_resonance(ctx: Context, *, min_field_margin: float) -> Iterator[Finding]:
    """What it checks
    For feeds that rely on a resonance other than the fundamental ECR: the field of that
    resonance, B_ECR/2 = π f m_e / e for second-harmonic ECR heating and
    B_ci = 2π f m_i / (Z e) of the first ion species for ion-cyclotron heating, must lie
    within the on-axis |B| range between the chamber's end planes at every current scale and
    frequency of the envelope. The measured value is the smaller of (max |B| − B_res) and
    (B_res − min |B|), relative to B_res, at the worst point; negative means the resonance
    is missing. (For ecr-harmonic-2 this restates resonance.ecr-in-chamber, which already
    uses the harmonic field; both stay so that a policy selecting one family keeps it.)

    Why it matters
    A feed designed for harmonic or ion-cyclotron absorption has no absorption layer when its
    resonance is not in the chamber: the power is reflected or lost on the walls. Ion-
    cyclotron resonance fields are large (tens of tesla at 13.56 MHz for argon), so this
    catches a frequency or species chosen for another magnet.

    Equation
    B_ECR/h = 2π f m_e / (h e); B_ci = 2π f m_i / (Z e).

    Options
    min_field_margin: required relative margin (default 0 %, as resonance.ecr-in-chamber).

    References
    NRL Plasma Formulary (2019), p. 28; T. H. Stix, Waves in Plasmas (AIP 1992), ch. 2.
    """
    for feed in ctx.model.feeds:
        subject = f"feed {feed.id}"
        requirement = f"min |B| ≤ B_res ≤ max |B| on axis, margin ≥ {min_field_margin:.0%}"
        intended = _intended_resonance(ctx, feed)
        if intended is None:
            yield ctx.not_applicable(subject, requirement,
                                     f"absorption '{feed.absorption}' relies on no harmonic "
                                     "or ion-cyclotron resonance")
            continue
        label, field_of = intended
        yield _on_axis_range(ctx, feed, subject, requirement, label, field_of, min_field_margin,
                             "the intended resonance is absent")
