"""Report figure: the static fringe field around the source in the r-z half plane, with the
implant-warning and projectile lines and the controlled-area boundary (no verdicts here).

|B| comes from the run's field model, the largest over the envelope's current scales (the
worst case the rule used), on a 64 x 48 grid; points inside a winding or magnet are left
blank and the sources drawn as grey boxes. The line levels are those of the
exposure.static-field-line findings.
"""

from __future__ import annotations

import numpy as np

from rfcheck.report.figures import Drawn, _mpl, _svg, sentence

#: grid of the map (axial x radial samples)
GRID_Z = 64
GRID_R = 48
_LINE_COLOURS = ("#d55e00", "#e69f00")


def _levels(run) -> list[tuple[str, float, dict]]:
    out = []
    for f in run.findings:
        if f.rule == "exposure.static-field-line" and "level" in f.details:
            out.append((f.subject.split(", ", 1)[-1], float(f.details["level"]), f.details))
    return out


def fringe_figure(run) -> dict | None:
    ctx, model = run.context, run.model
    if ctx is None or model is None:
        return None
    lines = _levels(run)
    if not lines:
        return None
    from rfcheck.magnet.fringe import magnet_extent
    from rfcheck.model import Coil, Multipole, RingMagnet

    extent = magnet_extent(model.magnet, model.chamber)
    if extent is None:
        return None
    z_lo, z_hi, r_out = extent
    area = model.exposure.controlled_area if model.exposure is not None else None
    zs = [z_lo, z_hi] + [d["z_low"] for _, _, d in lines] + [d["z_high"] for _, _, d in lines]
    rs = [r_out] + [d["radius"] for _, _, d in lines]
    if area is not None:
        zs += [area.z_start, area.z_end]
        rs.append(area.radius)
    span = max(zs) - min(zs)
    z = np.linspace(min(zs) - 0.1 * span, max(zs) + 0.1 * span, GRID_Z)
    r = np.linspace(0.0, 1.15 * max(rs), GRID_R)
    rr, zz = np.meshgrid(r, z, indexing="ij")
    points = np.stack([rr, np.zeros_like(rr), zz], axis=-1)
    inside = np.zeros(rr.shape, dtype=bool)
    boxes = []
    for s in model.magnet.sources:
        if isinstance(s, (Coil, RingMagnet, Multipole)):
            z1, z2 = s.z - 0.5 * s.length, s.z + 0.5 * s.length
            inside |= (zz >= z1) & (zz <= z2) & (rr >= s.inner_radius) & (rr <= s.outer_radius)
            boxes.append((z1, z2, s.inner_radius, s.outer_radius))
    try:
        b = ctx.field_model.magnitude(points, ctx.envelope.current_scale, cache=False).max(axis=0)
    except Exception:  # the rules already report a broken field model
        return None
    b = np.where(inside | ~np.isfinite(b) | (b <= 0), np.nan, b)
    plt = _mpl()
    fig, ax = plt.subplots(figsize=(6.6, 3.4))
    logb = np.log10(b * 1e3)  # log10 of mT
    finite = logb[np.isfinite(logb)]
    if finite.size == 0:
        plt.close(fig)
        return None
    lo, hi = np.floor(finite.min()), np.ceil(min(finite.max(), 3.0))
    mesh = ax.contourf(z, r, np.clip(logb, lo, hi), levels=np.arange(lo, hi + 0.25, 0.25),
                       cmap="Blues")
    bar = fig.colorbar(mesh, ax=ax, pad=0.02)
    bar.set_label("log10 |B| / mT")
    handles = []
    drawn = Drawn()
    missing = []
    for i, (name, level, _) in enumerate(lines):
        c = _LINE_COLOURS[i % len(_LINE_COLOURS)]
        if np.nanmin(b) < level < np.nanmax(b):
            drawn.tag(ax.contour(z, r, b, levels=[level], colors=[c], linewidths=1.6), "line")
            handles.append(plt.Line2D([], [], color=c, lw=1.6,
                                      label=f"{name}: |B| = {level * 1e3:.3g} mT"))
        else:
            missing.append(name)
    for z1, z2, r1, r2 in boxes:
        drawn.tag(ax.add_patch(plt.Rectangle((z1, r1), z2 - z1, r2 - r1, color="0.55", lw=0)),
                  "magnet")
    ch = model.chamber
    drawn.tag(ax.add_patch(plt.Rectangle((ch.z_start, 0.0), ch.length, ch.radius, fill=False,
                                         ec="black", lw=0.8)), "chamber")
    if area is not None:
        drawn.tag(ax.add_patch(plt.Rectangle((area.z_start, 0.0), area.z_end - area.z_start,
                                             area.radius, fill=False, ec="black", lw=1.2,
                                             ls="--")), "area")
        handles.append(plt.Line2D([], [], color="black", lw=1.2, ls="--",
                                  label="controlled-area boundary"))
    ax.set_xlabel("z (m)")
    ax.set_ylabel("r (m)")
    ax.set_xlim(z[0], z[-1])
    ax.set_ylim(0.0, r[-1])
    ax.grid(False)
    ax.legend(handles=handles, loc="upper right", fontsize=7, framealpha=0.85)
    summary = "; ".join(f"{name} at z = {d['z_low']:.3g} m and {d['z_high']:.3g} m on the axis, "
                        f"r = {d['radius']:.3g} m radially" for name, _, d in lines)
    caption = ("|B| around the source in the r-z half plane (azimuth 0), the largest over the "
               "current tolerance, from the run's field model without iron; "
               + ("grey: windings and magnets; " if "magnet" in drawn else "")
               + f"solid box: chamber. {sentence(summary)}."
               + (" Coloured lines: where |B| falls to each level." if "line" in drawn else "")
               + (f" Not within the map: {', '.join(missing)}." if missing else "")
               + (" Dashed: the declared controlled area." if area is not None else
                  " No controlled area is declared."))
    return {"id": "fringe-field", "title": "Static fringe field and its lines",
            "svg": _svg(fig, "fringe"), "caption": caption, "drawn": sorted(drawn.count)}
