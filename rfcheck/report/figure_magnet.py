"""Report figure: |B|(r, z) over the chamber with the resonance surfaces (no verdicts here).

The field comes from the run's cached field model (rfcheck.magnet.geometry.rz_field at
current scale 1). For a magnet with a multipole the upper half plane is drawn at the azimuth
of the strongest wall field (B_rad, from the trap geometry the rules used) and the lower half
plane half a pole pitch away, where the wall field is weakest; for an axisymmetric magnet the
lower half mirrors the upper.
"""

from __future__ import annotations

import numpy as np

from rfcheck.report.figures import Drawn, _mpl, _short, _svg, sentence


#: grid of the map (radial × axial samples per half plane)
MAP_R = 41
MAP_Z = 161
#: filled-contour levels of |B| (vector paths keep the SVG small and reproducible)
MAP_LEVELS = 24
_COLOURS = ("#d55e00", "#e69f00", "#cc79a7", "#009e73")


def _half_planes(ctx, model):
    """(upper, lower, note): RZField at two azimuths and a caption note."""
    from rfcheck.magnet.geometry import rz_field
    from rfcheck.model import Multipole

    fm, chamber = ctx.field_model, model.chamber
    if fm.axisymmetric:
        upper = rz_field(fm, chamber, 1.0, 0.0, MAP_R, MAP_Z)
        return upper, upper, "axisymmetric field: the lower half mirrors the upper"
    poles = next((s.poles for s in model.magnet.sources if isinstance(s, Multipole)), 6)
    traps = ctx.trap_geometries()
    phi = traps[int(np.argmin(np.abs(ctx.envelope.current_scale - 1.0)))].radial_wall.phi
    lower_phi = phi + np.pi / poles
    upper = rz_field(fm, chamber, 1.0, phi, MAP_R, MAP_Z)
    lower = rz_field(fm, chamber, 1.0, lower_phi, MAP_R, MAP_Z)
    note = (f"upper half at azimuth {np.degrees(phi) % 360:.0f}° (strongest wall field), lower "
            f"half at {np.degrees(lower_phi) % 360:.0f}° (half a pole pitch away)")
    return upper, lower, note


def field_map_figure(run) -> dict | None:
    """|B|(r, z) map at nominal current with each ECR feed's resonance contour, the chamber
    landmarks, and the window and launcher positions."""
    ctx, model = run.context, run.model
    if ctx is None or model is None:
        return None
    try:
        upper, lower, note = _half_planes(ctx, model)
    except Exception:  # the rules already report a broken field model
        return None
    if not (np.isfinite(upper.b).all() and np.isfinite(lower.b).all()):
        return None
    from rfcheck.physics.frequencies import ecr_field
    from rfcheck.analysis.resonance import ECR_HARMONIC

    r = np.concatenate([-lower.r[::-1], upper.r[1:]]) * 1e3
    b = np.concatenate([lower.b[::-1], upper.b[1:]], axis=0)
    zm = upper.z * 1e3
    plt = _mpl()
    fig, ax = plt.subplots(figsize=(6.6, 3.2))
    drawn = Drawn()
    mesh = ax.contourf(zm, r, b, levels=MAP_LEVELS, cmap="viridis")
    bar = fig.colorbar(mesh, ax=ax, pad=0.02)
    bar.set_label("|B| (T)")
    handles = []
    for i, feed in enumerate(model.feeds):
        h = ECR_HARMONIC.get(feed.absorption)
        if h is None:
            continue
        b_res = float(ecr_field(feed.frequency, harmonic=h))
        if not b.min() < b_res < b.max():
            continue
        c = _COLOURS[i % len(_COLOURS)]
        # a white halo under the coloured line keeps it visible over the map in greyscale
        ax.contour(zm, r, b, levels=[b_res], colors=["white"], linewidths=3.4)
        drawn.tag(ax.contour(zm, r, b, levels=[b_res], colors=[c], linewidths=1.6), "resonance")
        handles.append(plt.Line2D([], [], color=c, lw=1.6,
                                  label=f"|B| = {b_res:.4g} T, feed {_short(feed.id)} "
                                        f"({feed.frequency / 1e9:.4g} GHz, h={h})"))
    ax.axhline(0.0, color="white", lw=0.6, ls="--", alpha=0.7)
    r_top = r[-1]
    outside = []
    for lm in model.chamber.landmarks:
        if not zm[0] <= lm.z * 1e3 <= zm[-1]:
            outside.append(f"landmark {_short(lm.id)} at z = {lm.z * 1e3:.0f} mm")
            continue
        drawn.tag(ax.axvline(lm.z * 1e3, color="white", lw=0.9, ls=":"), "landmark")
        ax.text(lm.z * 1e3, r_top * 0.95, f" {_short(lm.id)}", color="white", fontsize=7, va="top",
                rotation=90)
    markers = ([("window", f"window {_short(w.id)}", w.z, "s") for w in model.windows]
               + [("launcher", f"launcher {_short(f.id)}", f.launch.z,
                   ">" if f.launch.direction > 0 else "<") for f in model.feeds])
    labels: dict[float, list[str]] = {}
    for kind, name, z, marker in markers:
        if zm[0] <= z * 1e3 <= zm[-1]:
            drawn.tag(ax.plot([z * 1e3], [0.0], marker=marker, color="#f0e442", ms=7,
                              mec="black", ls="none")[0], kind)
            labels.setdefault(round(z * 1e3, 3), []).append(name)
        else:
            outside.append(f"{name} at z = {z * 1e3:.0f} mm")
    for z, names in sorted(labels.items()):
        ax.annotate(" / ".join(names), (z, 0.0), xytext=(4, 6), textcoords="offset points",
                    fontsize=7, color="white")
    ax.set_xlabel("z (mm)")
    ax.set_ylabel("r (mm)")
    ax.set_xlim(zm[0], zm[-1])
    ax.set_ylim(r[0], r[-1])
    ax.grid(False)
    if handles:
        ax.legend(handles=handles, loc="lower right", fontsize=7, framealpha=0.85)
    marks = drawn.phrases([("resonance", "lines: resonance surfaces of the ECR feeds "
                                          "whose resonance field lies within the map"),
                           ("landmark", "dotted: landmarks")])
    on_axis = drawn.phrases([("window", "windows (squares)"),
                             ("launcher", "launchers (triangles, pointing along the launch)")])
    if on_axis:
        marks.append("markers on the axis: " + " and ".join(on_axis))
    caption = ("|B| over the chamber (r, z) at nominal current, from the run's field model; "
               f"{note}." + (" " + sentence("; ".join(marks)) + "." if marks else "")
               + ("" if "resonance" in drawn else
                  " No feed's resonance field lies within the map."))
    if outside:
        caption += " Outside the chamber: " + "; ".join(outside) + "."
    return {"id": "field-map", "title": "Field map and resonance surfaces",
            "svg": _svg(fig, "field-map"), "caption": caption, "drawn": sorted(drawn.count)}
