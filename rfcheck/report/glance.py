"""The "inputs at a glance" page: a cross-section of the source drawn to scale, and the
tables of feeds, windows, magnet and envelope a reviewer checks the specification against.

Everything here is what the spec declared (the model, in SI) plus the resonance surfaces
|B| = B_res of each feed, drawn from the |B|(r, z) map the run already computed for its
characteristics (no new field evaluation). No verdicts.
"""

from __future__ import annotations

import math

import numpy as np

from rfcheck.text import shorten
from rfcheck.units import format_si

#: colours of the feeds (the palette of the other figures: colour-blind-safe, and each
#: feed also gets its own line style so that a greyscale print keeps them apart)
FEED_COLOURS = ("#d55e00", "#56b4e9", "#cc79a7", "#009e73")
FEED_STYLES = ("-", "--", "-.", ":")
COIL = "#e69f00"
MAGNET = "#7f7f7f"
WINDOW = "#009e73"
CHAMBER = "#333333"


def _mm(x: float) -> str:
    return f"{x * 1e3:.4g} mm"


def _range(lo: float, hi: float, unit: str) -> str:
    if lo == hi:
        return format_si(lo, unit)
    return f"{format_si(lo, unit)} – {format_si(hi, unit)}"


# --------------------------------------------------------------------------- tables


def feed_rows(model) -> list[dict]:
    rows = []
    for f in model.feeds:
        la = f.launch
        pol = la.polarisation or "not declared (linear assumed)"
        rating = format_si(f.max_reflected_power, "W") if f.max_reflected_power is not None \
            else "not declared"
        rows.append({
            "id": f.id,
            "frequency": f"{format_si(f.frequency, 'Hz')} ± {format_si(f.frequency_tolerance, 'Hz')}",
            "power": f"{format_si(f.power, 'W')} peak, duty {f.duty_cycle:.0%}",
            "line": f.line,
            "launch": (f"z = {_mm(la.z)}, towards {'+' if la.direction > 0 else '−'}z; "
                       f"{la.mode} wave at {math.degrees(la.angle_to_field):.3g}° to B; "
                       f"polarisation {pol}"),
            "absorption": f.absorption,
            "reflected": rating,
        })
    return rows


def window_rows(model) -> list[dict]:
    from rfcheck.analysis.window_material import resolve_material

    rows = []
    for w in model.windows:
        layers = []
        for la in w.layers:
            try:
                m = resolve_material(model, la.material)
            except ValueError:  # an unknown material: the window rules report it
                m = None
            data = ""
            if m is not None:
                spread = (f", ε_r {m.eps_r_range[0]:.4g}–{m.eps_r_range[1]:.4g} declared"
                          if m.eps_r_range else "")
                data = (f" (ε_r {m.eps_r:.4g}, tan δ {m.tan_delta:.2g}{spread}; {m.origin}"
                        + (f": {shorten(m.source, 90)}" if m.source else "") + ")")
            tol = f" ± {_mm(la.thickness_tolerance)}" if la.thickness_tolerance else ""
            layers.append(f"{la.material} {_mm(la.thickness)}{tol}{data}")
        rows.append({
            "id": w.id, "feed": w.feed, "z": _mm(w.z),
            "layers": layers,
            "rating": format_si(w.max_absorbed_power, "W") if w.max_absorbed_power else "not declared",
            "diameter": _mm(w.diameter) if w.diameter else "—",
        })
    return rows


def magnet_rows(model) -> list[dict]:
    from rfcheck.model import AxisTable, Coil, FieldMap, Multipole, RingMagnet, UniformField

    rows = []
    for s in model.magnet.sources:
        if isinstance(s, Coil):
            what = (f"coil, {s.turns} turns × {format_si(s.current, 'A')}, r {_mm(s.inner_radius)}"
                    f"–{_mm(s.outer_radius)}, z = {_mm(s.z)}, length {_mm(s.length)}")
        elif isinstance(s, RingMagnet):
            what = (f"ring magnet, B_r {format_si(s.remanence, 'T')} "
                    f"({'towards +z' if s.remanence > 0 else 'towards −z'}), r {_mm(s.inner_radius)}"
                    f"–{_mm(s.outer_radius)}, z = {_mm(s.z)}, length {_mm(s.length)}")
        elif isinstance(s, Multipole):
            what = (f"{s.poles}-pole array of {s.segments} segments, B_r "
                    f"{format_si(s.remanence, 'T')}, r {_mm(s.inner_radius)}–{_mm(s.outer_radius)}, "
                    f"z = {_mm(s.z)}, length {_mm(s.length)}")
        elif isinstance(s, UniformField):
            what = f"uniform field {format_si(s.b, 'T')}"
        elif isinstance(s, AxisTable):
            what = f"measured on-axis table {s.path} ({len(s.z)} points)"
        elif isinstance(s, FieldMap):
            what = f"measured (r, z) field map {s.path} ({len(s.r)} × {len(s.z)})"
        else:  # pragma: no cover - every source kind is listed above
            what = type(s).__name__
        rows.append({"id": s.id, "what": what})
    return rows


def envelope_rows(model) -> list[dict]:
    p, c, mg = model.plasma, model.chamber, model.magnet
    rows = [
        ("peak electron density", _range(p.density.min, p.density.max, "m^-3")),
        ("electron temperature", _range(p.electron_temperature.min, p.electron_temperature.max, "eV")),
        ("density profile", p.profile.kind),
        ("ions", ", ".join(f"{i.species} {i.fraction:.0%}" for i in p.ions) or "—"),
    ]
    if p.neutral is not None:
        rows.append(("neutral gas", f"{p.neutral.species}, "
                     f"{_range(p.neutral.pressure.min, p.neutral.pressure.max, 'Pa')}"))
    rows += [
        ("magnet current tolerance", f"± {100 * mg.current_tolerance:.3g} %"
         if mg.current_tolerance else "none declared"),
        ("trap", mg.trap),
        ("chamber", f"radius {_mm(c.radius)}, z {_mm(c.z_start)} to {_mm(c.z_end)}; ends: "
                    f"{c.start_wall or 'not declared (metal assumed)'} / "
                    f"{c.end_wall or 'not declared (metal assumed)'}"),
    ]
    return [{"name": n, "value": v} for n, v in rows]


# --------------------------------------------------------------------------- drawing


def _rects(model):
    """(kind, id, r_in, r_out, z_lo, z_hi) of every drawn magnet source."""
    from rfcheck.model import Coil, Multipole, RingMagnet

    out = []
    for s in model.magnet.sources:
        if isinstance(s, (Coil, RingMagnet, Multipole)):
            kind = "coil" if isinstance(s, Coil) else "multipole" if isinstance(s, Multipole) \
                else "ring"
            out.append((kind, s, s.inner_radius, s.outer_radius, s.z - s.length / 2,
                        s.z + s.length / 2))
    return out


def _resonance_field(run):
    """(r, z, |B|) arrays of the run's |B| map over the chamber, or None."""
    rz = (run.characteristics or {}).get("magnet", {}).get("rz_field") \
        if isinstance(run.characteristics, dict) else None
    if not isinstance(rz, dict) or not isinstance(rz.get("b"), dict):
        return None
    try:
        r = np.asarray(rz["r"]["value"], float)
        z = np.asarray(rz["z"]["value"], float)
        b = np.asarray(rz["b"]["value"], float)
    except (KeyError, TypeError, ValueError):
        return None
    if b.shape != (r.size, z.size) or not np.isfinite(b).all():
        return None
    return r, z, b


def _label_rows(x_points, texts, max_rows: int) -> list[int]:
    """Row of each label (0 nearest the drawing) so that no two labels of a row overlap:
    labels at x (points, sorted) of width ~0.55 em per character at 6.5 pt; a label goes to
    the first row whose last label ends before it starts (the last row if none does)."""
    ends = [-math.inf] * max(1, max_rows)
    out = []
    for x, text in zip(x_points, texts):
        half = 0.55 * 6.5 * len(text) / 2 + 2
        row = next((k for k, e in enumerate(ends) if e < x - half), len(ends) - 1)
        ends[row] = max(ends[row], x + half)
        out.append(row)
    return out


def cross_section(run) -> dict | None:
    """The source to scale in the r–z plane (both half planes): chamber, coils and
    permanent magnets as outlines, windows, launchers, landmarks and, where the run has a
    |B| map, each feed's resonance surface. Labels sit outside the drawn parts."""
    from rfcheck.physics.frequencies import ecr_field
    from rfcheck.analysis.resonance import ECR_HARMONIC

    from .figures import _mpl, _short, _svg

    model = run.model
    if model is None:
        return None
    c = model.chamber
    plt = _mpl()
    rects = _rects(model)
    r_top = max([c.radius] + [r[3] for r in rects] + [(w.diameter or 0) / 2 for w in model.windows])
    z_all = [c.z_start, c.z_end] + [r[4] for r in rects] + [r[5] for r in rects] \
        + [w.z for w in model.windows] + [f.launch.z for f in model.feeds]
    z_lo, z_hi = min(z_all), max(z_all)
    span = max(z_hi - z_lo, 2 * r_top)
    pad = 0.06 * span
    mm = 1e3
    # labels are placed in points (they keep their size however the drawing scales): work
    # out the label rows first, then leave room for them inside the axes
    marks = sorted([(w.z, f"window {_short(w.id)}") for w in model.windows]
                   + [(f.launch.z, f"launcher {_short(f.id)}") for f in model.feeds]
                   + [(lm.z, _short(lm.id)) for lm in c.landmarks])
    width, max_height = 6.6, 3.8
    x_range = (span + 2 * pad) * mm
    below_rows = min(len(marks), 3)
    pts = 12 + 9 * below_rows + (34 if rects else 4)  # label rows below and above
    # points per mm of the drawing: the width fills the figure unless the height would pass
    # its limit, then the height sets the scale (the aspect stays 1:1 either way)
    ppm = min(0.82 * width * 72.0 / x_range,
              max(0.05, ((max_height - 0.6) * 72.0 - pts) / (2 * r_top * mm)))
    levels = _label_rows([zz * mm * ppm for zz, _ in marks], [t for _, t in marks], below_rows)
    room_below = (12 + 9 * below_rows) / ppm
    room_above = (34 if rects else 4) / ppm
    height = (2 * r_top * mm * ppm + pts) / 72.0 + 0.6
    fig, ax = plt.subplots(figsize=(width, height))
    ax.grid(False)
    ax.set_aspect("equal", adjustable="box")
    drawn = []
    # chamber: the wall and the two ends (an open end dashed)
    for sign in (1, -1):
        ax.plot([c.z_start * mm, c.z_end * mm], [sign * c.radius * mm] * 2, color=CHAMBER, lw=1.4,
                gid=f"el-chamber-wall-{'upper' if sign > 0 else 'lower'}")
    open_ends = []
    for zz, kind, name in ((c.z_start, c.start_wall, "start"), (c.z_end, c.end_wall, "end")):
        ax.plot([zz * mm] * 2, [-c.radius * mm, c.radius * mm], color=CHAMBER,
                lw=1.4 if kind != "open" else 0.9, ls="-" if kind != "open" else "--",
                gid=f"el-chamber-{name}{'-open' if kind == 'open' else ''}")
        if kind == "open":
            open_ends.append(name)
    drawn.append("the chamber wall and ends" + (f" (the open {' and '.join(open_ends)} dashed)"
                                                if open_ends else ""))
    ax.axhline(0.0, color="0.6", lw=0.6, ls=(0, (6, 3)))
    # magnets: outlines in both half planes, labelled above the top one
    kinds = set()
    order = sorted(range(len(rects)), key=lambda k: (rects[k][4] + rects[k][5]) / 2)
    placed = _label_rows([(rects[k][4] + rects[k][5]) / 2 * mm * ppm for k in order],
                         [_short(rects[k][1].id) for k in order], 3)
    rows = dict(zip(order, placed))
    for i, (kind, s, r_in, r_out, z0, z1) in enumerate(rects):
        colour = COIL if kind == "coil" else MAGNET
        for sign in (1, -1):
            lo, hi = (r_in, r_out) if sign > 0 else (-r_out, -r_in)
            ax.add_patch(plt.Rectangle((z0 * mm, lo * mm), (z1 - z0) * mm, (hi - lo) * mm,
                                       facecolor=colour, alpha=0.35 if kind == "coil" else 0.3,
                                       edgecolor=colour, lw=1.0,
                                       gid=f"el-{'coil' if kind == 'coil' else 'magnet'}-{i}-"
                                           f"{'upper' if sign > 0 else 'lower'}"))
        ax.annotate(_short(s.id), ((z0 + z1) / 2 * mm, r_out * mm),
                    xytext=(0, (r_top - r_out) * mm * ppm + 3 + 9 * rows[i]),
                    textcoords="offset points", ha="center", va="bottom", fontsize=6.5,
                    color="0.2", arrowprops={"arrowstyle": "-", "color": "0.5", "lw": 0.5})
        kinds.add(kind)
    if "coil" in kinds:
        drawn.append("coils (orange)")
    if kinds & {"ring", "multipole"}:
        drawn.append("permanent magnets (grey)")
    # windows, launchers, landmarks: on the axis, labelled below the drawing
    for w in model.windows:
        half = (w.diameter / 2 if w.diameter else c.radius) * mm
        thick = max(sum(la.thickness for la in w.layers), 0.004 * span) * mm
        ax.add_patch(plt.Rectangle((w.z * mm - thick / 2, -half), thick, 2 * half,
                                   facecolor=WINDOW, edgecolor=WINDOW, alpha=0.6, lw=0.8,
                                   gid=f"el-window-{model.windows.index(w)}"))
    if model.windows:
        drawn.append("windows (bluish-green bars, their thickness to scale)")
    for i, f in enumerate(model.feeds):
        colour = FEED_COLOURS[i % len(FEED_COLOURS)]
        ax.plot([f.launch.z * mm], [0.0], marker=">" if f.launch.direction > 0 else "<",
                ms=7, color=colour, mec="black", mew=0.5, zorder=5, ls="none",
                gid=f"el-launcher-{i}")
    if model.feeds:
        drawn.append("launchers (triangles on the axis, pointing where they launch)")
    for k, lm in enumerate(c.landmarks):
        ax.plot([lm.z * mm] * 2, [-0.15 * c.radius * mm, 0.15 * c.radius * mm], color="0.3", lw=0.8,
                gid=f"el-landmark-{k}")
    if c.landmarks:
        drawn.append("landmarks (ticks on the axis)")
    x_lo, x_hi = (z_lo - pad) * mm, (z_hi + pad) * mm
    for (zz, text), level in zip(marks, levels):
        half = (0.55 * 6.5 * len(text) / 2 + 2) / ppm  # mm
        ha = "left" if zz * mm - half < x_lo else "right" if zz * mm + half > x_hi else "center"
        ax.annotate(text, (zz * mm, -c.radius * mm),
                    xytext=(0, -((r_top - c.radius) * mm * ppm + 6 + 9 * level)),
                    textcoords="offset points", ha=ha, va="top", fontsize=6.5, color="0.2",
                    arrowprops={"arrowstyle": "-", "color": "0.55", "lw": 0.5, "ls": ":"})
    # resonance surfaces from the run's |B| map
    field = _resonance_field(run)
    resonance_feeds = []
    if field is not None:
        r, z, b = field
        for i, f in enumerate(model.feeds):
            h = ECR_HARMONIC.get(f.absorption)
            if h is None:
                continue
            level_b = float(ecr_field(f.frequency, harmonic=h))
            if not (b.min() < level_b < b.max()):
                continue
            colour = FEED_COLOURS[i % len(FEED_COLOURS)]
            style = FEED_STYLES[i % len(FEED_STYLES)]
            for sign in (1, -1):
                cs = ax.contour(z * mm, sign * r * mm, b, levels=[level_b], colors=[colour],
                                linewidths=1.2, linestyles=[style])
                cs.set_gid(f"el-resonance-{i}-{'upper' if sign > 0 else 'lower'}")
            resonance_feeds.append(f"{_short(f.id)} ({format_si(level_b, 'T')}, "
                                   f"{'solid' if style == '-' else 'dashed' if style == '--' else 'dash-dot' if style == '-.' else 'dotted'})")
    if resonance_feeds:
        drawn.append("the resonance surface |B| = B_res of " + "; ".join(resonance_feeds)
                     + ", at nominal current, azimuth 0")
    ax.set_xlim(x_lo, x_hi)
    ax.set_ylim(-r_top * mm - room_below, r_top * mm + room_above)
    ax.set_xlabel("z (mm)")
    ax.set_ylabel("r (mm)")
    ax.spines[["top", "right"]].set_visible(False)
    # every element drawn carries an id "el-KIND-…" in the SVG (tests match the caption to them)
    caption = ("The source to scale in the r–z plane (both half planes; axis dashed): "
               + "; ".join(drawn) + ". Labels sit outside the parts they name.")
    return {"id": "cross-section", "title": "The source to scale", "svg": _svg(fig, "glance"),
            "caption": caption, "drawn": drawn}


def glance(run) -> dict:
    """Everything the page shows, as plain data."""
    model = run.model
    if model is None:
        return {}
    try:
        figure = cross_section(run)
    except Exception:  # a drawing problem must not cost the report; the tables still show
        figure = None
    return {"figure": figure, "feeds": feed_rows(model), "windows": window_rows(model),
            "magnet": magnet_rows(model), "envelope": envelope_rows(model)}
