"""Report figures of the ray study (rfcheck.analysis.rays): the rays over the |B| map in the r–z
plane of the launch, with the resonance and cutoff surfaces and the deposition points; a
cross-section at the layer; the deposition profile along z. No verdicts here: the figures draw the study the rays.* rules
judged (cached on the run's Context)."""

from __future__ import annotations

import math

import numpy as np

from rfcheck.report.figures import Drawn, _mpl, _short, _svg

#: samples of the map (signed radius × z)
MAP_R, MAP_Z = 61, 121
#: bins of the deposition profile along the chamber
PROFILE_BINS = 40
_CORNER_COLOURS = ("#0072b2", "#d55e00", "#009e73", "#cc79a7")
#: the corners of a second aperture E orientation (corners 5–8): other markers and dashes
_MARKS, _STYLES = ("o", "s"), ("-", "--")


def _plane_angle(launch) -> float:
    """Azimuth of the drawing plane: the plane through the axis holding the launcher (or,
    for a launcher on the axis, the plane of the tilt)."""
    if launch.off_axis > 0:
        return math.atan2(launch.y, launch.x)
    return float(launch.tilt_azimuth)


def _in_plane(points: np.ndarray, phi: float) -> np.ndarray:
    """Coordinate of points along the drawing plane's transverse axis (the projection onto
    the plane through the axis at azimuth phi)."""
    return points[:, 0] * math.cos(phi) + points[:, 1] * math.sin(phi)


def _corner_text(c) -> str:
    return (f"n_peak {c.density:.3g} m^-3, current ×{c.scale:.4g}"
            + (f", {c.orientation}" if c.orientation else ""))


def _map_figure(run, study) -> dict:
    from rfcheck.physics.frequencies import critical_density, ecr_field
    from rfcheck.analysis.launch_path import profile_shape
    from rfcheck.analysis.rays import scaled_field

    model, feed = run.model, study.feed
    ch, launch = model.chamber, feed.launch
    phi = _plane_angle(launch)
    corner = max(study.corners, key=lambda k: k.density)
    r = np.linspace(-ch.radius, ch.radius, MAP_R)
    z = np.linspace(ch.z_start, ch.z_end, MAP_Z)
    rr, zz = np.meshgrid(r, z, indexing="ij")
    pts = np.stack([rr * math.cos(phi), rr * math.sin(phi), zz], axis=-1).reshape(-1, 3)
    bmag = np.linalg.norm(scaled_field(study.grid, corner.scale)(pts), axis=1).reshape(rr.shape)
    f = feed.frequency
    x = corner.density * profile_shape(model.plasma.profile, ch, zz) / float(critical_density(f))
    y = bmag / float(ecr_field(f))
    plt = _mpl()
    fig, ax = plt.subplots(figsize=(6.6, 3.4))
    drawn = Drawn()
    cs = ax.contourf(z * 1e3, r * 1e3, bmag * 1e3, levels=20, cmap="Greys", alpha=0.55)
    fig.colorbar(cs, ax=ax, label="|B| (mT)", shrink=0.85)
    if np.nanmin(bmag) < study.b_res < np.nanmax(bmag):
        drawn.tag(ax.contour(z * 1e3, r * 1e3, bmag, levels=[study.b_res], colors="#d55e00",
                             linewidths=1.4), "layer")
    cut = {"R": (x - (1 - y), "R cutoff X = 1 − Y"), "X": (x - (1 - y), "R cutoff X = 1 − Y"),
           "O": (x - 1.0, "O cutoff X = 1"), "L": (x - (1 + y), "L cutoff X = 1 + Y")}
    g, cut_name = cut[study.mode]
    if np.nanmin(g) < 0 < np.nanmax(g):
        drawn.tag(ax.contour(z * 1e3, r * 1e3, g, levels=[0.0], colors="#e69f00",
                             linewidths=1.2, linestyles="--"), "cutoff")
    for ray in corner.rays:
        drawn.tag(ax.plot(ray.path[:, 2] * 1e3, _in_plane(ray.path, phi) * 1e3,
                          color="#0072b2", lw=0.6, alpha=0.8)[0], "ray")
    ends = [ray.end for ray, e in zip(corner.rays, corner.ends) if e == "layer"]
    if ends:
        e = np.array(ends)
        drawn.tag(ax.plot(e[:, 2] * 1e3, _in_plane(e, phi) * 1e3, "o", ms=2.5,
                          color="#d55e00", zorder=5)[0], "layer-point")
    ax.set_xlabel("z (mm)")
    ax.set_ylabel(f"transverse position at {math.degrees(phi):.3g}° (mm)")
    ax.set_xlim(ch.z_start * 1e3, ch.z_end * 1e3)
    ax.set_ylim(-ch.radius * 1e3, ch.radius * 1e3)
    ax.grid(False)
    return {"id": f"rays-map-{feed.id}", "title": f"Rays of feed {_short(feed.id)} over |B|",
            "svg": _svg(fig, f"rays-map-{feed.id}"),
            "drawn": sorted(drawn.count),
            "caption": (f"Feed {feed.id}: the {len(corner.rays)} rays of the {study.mode} "
                        f"branch at the densest corner ({_corner_text(corner)}), projected "
                        f"onto the plane through the axis at azimuth {math.degrees(phi):.3g}° "
                        f"(transverse position against z), over |B| in that plane (grey, "
                        f"from the ray study's spline grid); "
                        + (f"solid red: the layer |B| = {study.b_res * 1e3:.4g} mT in that "
                           "plane; " if "layer" in drawn else
                           f"the layer |B| = {study.b_res * 1e3:.4g} mT does not cross that "
                           "plane; ")
                        + ("red dots: where the rays met the layer (projected); "
                           if "layer-point" in drawn else "no ray met the layer; ")
                        + (f"dashed orange: the {cut_name} of that corner in that plane. "
                           if "cutoff" in drawn else
                           f"the {cut_name} does not cross that plane at that corner. ")
                        + "A ray that leaves the plane is drawn by its projection, so it may "
                        "appear to cross the resonance curve of the plane without meeting it.")}


def _section_figure(run, study) -> dict | None:
    """|B| across the chamber (x–y) at the z where the densest corner's rays meet the layer
    (power-weighted mean), with the layer curve and the layer points of every corner."""
    from rfcheck.analysis.rays import scaled_field

    ch, feed = run.model.chamber, study.feed
    corner = max(study.corners, key=lambda k: k.density)
    hits = [(r.end, w * float(r.power[-1])) for r, e, w in
            zip(corner.rays, corner.ends, corner.weights) if e == "layer"]
    if not hits:
        return None
    z0 = float(sum(p[2] * w for p, w in hits) / sum(w for _, w in hits))
    u = np.linspace(-ch.radius, ch.radius, MAP_R)
    xx, yy = np.meshgrid(u, u, indexing="ij")
    pts = np.stack([xx, yy, np.full(xx.shape, z0)], axis=-1).reshape(-1, 3)
    bmag = np.linalg.norm(scaled_field(study.grid, corner.scale)(pts), axis=1).reshape(xx.shape)
    bmag = np.where(np.hypot(xx, yy) <= ch.radius, bmag, np.nan)
    plt = _mpl()
    fig, ax = plt.subplots(figsize=(4.6, 3.8))
    drawn = Drawn()
    cs = ax.contourf(u * 1e3, u * 1e3, bmag.T * 1e3, levels=20, cmap="Greys", alpha=0.55)
    fig.colorbar(cs, ax=ax, label="|B| (mT)", shrink=0.85)
    if np.nanmin(bmag) < study.b_res < np.nanmax(bmag):
        drawn.tag(ax.contour(u * 1e3, u * 1e3, bmag.T, levels=[study.b_res], colors="#d55e00",
                             linewidths=1.4), "layer")
    for i, c in enumerate(study.corners):
        e = np.array([r.end for r, end in zip(c.rays, c.ends) if end == "layer"]).reshape(-1, 3)
        if e.size:
            drawn.tag(ax.plot(e[:, 0] * 1e3, e[:, 1] * 1e3, _MARKS[i // 4 % len(_MARKS)],
                              ms=2.2, color=_CORNER_COLOURS[i % len(_CORNER_COLOURS)],
                              label=_corner_text(c))[0], "layer-point")
    t = np.linspace(0, 2 * math.pi, 181)
    drawn.tag(ax.plot(ch.radius * 1e3 * np.cos(t), ch.radius * 1e3 * np.sin(t), color="0.3",
                      lw=1.0)[0], "wall")
    ax.set_aspect("equal")
    ax.set_xlabel("x (mm)")
    ax.set_ylabel("y (mm)")
    ax.legend(loc="upper right", fontsize=6.5, framealpha=0.85)
    ax.grid(False)
    return {"id": f"rays-section-{feed.id}",
            "title": f"Cross-section at the layer, feed {_short(feed.id)}",
            "svg": _svg(fig, f"rays-section-{feed.id}"),
            "caption": (f"Feed {feed.id}: |B| across the chamber (grey, from the ray study's "
                        f"spline grid) in the plane z = {z0 * 1e3:.4g} mm, where the rays of "
                        f"the densest corner ({_corner_text(corner)}) meet the layer (their "
                        "power-weighted mean z); "
                        + (f"solid red: the layer |B| = {study.b_res * 1e3:.4g} mT in that "
                           "plane; " if "layer" in drawn else
                           f"|B| = {study.b_res * 1e3:.4g} mT is not reached in that plane "
                           "(the layer points lie at other z); ")
                        + "dots: the (x, y) of every ray's end on the layer, one colour per "
                        "envelope corner, each at its own z; grey circle: the chamber wall."),
            "drawn": sorted(drawn.count)}


def _profile_figure(run, study) -> dict:
    ch = run.model.chamber
    feed = study.feed
    edges = np.linspace(ch.z_start, ch.z_end, PROFILE_BINS + 1)
    width = edges[1] - edges[0]
    plt = _mpl()
    fig, ax = plt.subplots(figsize=(6.6, 2.6))
    drawn = Drawn()
    for i, c in enumerate(study.corners):
        d = c.deposits
        hist = (np.histogram(d[:, 2], bins=edges, weights=d[:, 3])[0] if d.size
                else np.zeros(PROFILE_BINS))
        drawn.tag(ax.step(edges[:-1] * 1e3, hist / (width * 1e3), where="post", lw=1.1,
                          ls=_STYLES[i // 4 % len(_STYLES)],
                          color=_CORNER_COLOURS[i % len(_CORNER_COLOURS)],
                          label=_corner_text(c))[0], "corner")
    target = feed.launch.target
    if target is not None:
        drawn.tag(ax.axvspan(target.z_start * 1e3, target.z_end * 1e3, color="#009e73",
                             alpha=0.15, lw=0, label=f"target ({target.label})"), "target")
    ax.set_xlabel("z (mm)")
    ax.set_ylabel("deposited power (fraction / mm)")
    ax.set_xlim(ch.z_start * 1e3, ch.z_end * 1e3)
    ax.legend(loc="best", fontsize=7, framealpha=0.85)
    return {"id": f"rays-deposition-{feed.id}",
            "title": f"Deposition profile of feed {_short(feed.id)}",
            "svg": _svg(fig, f"rays-deposition-{feed.id}"),
            "caption": (f"Feed {feed.id}: the power the first pass of the rays deposits per "
                        f"millimetre of z (fraction of the launched power; bins of "
                        f"{width * 1e3:.3g} mm; at the layer and by collisions along the "
                        "rays), one line per envelope corner"
                        + ("; shaded: the launch's intended region (z only)." if target
                           else ".")),
            "drawn": sorted(drawn.count)}


def ray_figures(run) -> list[dict]:
    """The ray figures of every traced feed (none for on-axis launches)."""
    ctx, model = run.context, run.model
    if ctx is None:
        return []
    from rfcheck.analysis.rays import ray_study
    from rfcheck.rules.rays import _skip

    out = []
    for feed in model.feeds:
        if _skip(ctx.for_rule("rays.figure", ctx.severity), feed, "") is not None:
            continue
        try:
            study = ray_study(ctx, feed)
        except Exception:  # the rules report a ray study that cannot be made
            continue
        out.append(_map_figure(run, study))
        section = _section_figure(run, study)
        if section:
            out.append(section)
        out.append(_profile_figure(run, study))
    return out
