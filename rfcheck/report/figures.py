"""Report figures as SVG strings (matplotlib, Agg, deterministic ids, no timestamps).

Figures plot what the Run holds, or evaluate public physics functions on a grid; they make
no verdicts.
"""

from __future__ import annotations

import io
from rfcheck.text import shorten


def _short(ident: str) -> str:
    """An id as a figure label: long ids are cut so they never squeeze the plot."""
    return shorten(ident, 16)


def _mpl():
    import matplotlib

    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt

    plt.rcParams.update({
        "font.family": "DejaVu Sans", "font.size": 8.5, "axes.titlesize": 9,
        "axes.grid": True, "grid.alpha": 0.3, "figure.dpi": 100, "svg.fonttype": "none",
    })
    return plt


def _svg(fig, salt: str) -> str:
    import matplotlib

    plt = _mpl()
    matplotlib.rcParams["svg.hashsalt"] = f"rfcheck-{salt}"
    buf = io.StringIO()
    fig.savefig(buf, format="svg", metadata={"Date": None}, bbox_inches="tight")
    plt.close(fig)
    text = buf.getvalue()
    text = text[text.index("<svg"):]
    # the RDF block names its vocabularies by http: address; nothing reads it, and the
    # on-screen page is to carry no network address at all
    start, end = text.find("<metadata>"), text.find("</metadata>")
    if 0 <= start < end:
        text = text[:start] + text[end + len("</metadata>"):].lstrip("\n")
    return _prefix_ids(text, salt)


def _prefix_ids(svg: str, prefix: str) -> str:
    """Every id of one figure's SVG (and every reference to it) prefixed with the figure's
    name: matplotlib numbers its groups figure_1, axes_1 … in each figure, and the figures
    of one HTML page share one id space."""
    import re

    ids = set(re.findall(r'\bid="([^"]+)"', svg))
    if not ids:
        return svg

    def rename(m: re.Match) -> str:
        ident = m.group(2)
        return f"{m.group(1)}{prefix}-{ident}{m.group(3)}" if ident in ids else m.group(0)

    return re.sub(r'(\bid="|href="#|url\(#)([^")]+)([")])', rename, svg)


def axis_field_figure(run) -> dict | None:
    """On-axis |B|(z) over the current tolerance, resonance bands of each feed, landmarks."""
    ctx, model = run.context, run.model
    if ctx is None:
        return None
    try:
        z = ctx.axis_z
        b = ctx.axis_field()  # (ns, nz)
    except Exception:  # the rules already report a broken field model
        return None
    from rfcheck.physics.frequencies import ecr_field
    from rfcheck.analysis.resonance import ECR_HARMONIC

    plt = _mpl()
    fig, ax = plt.subplots(figsize=(6.6, 3.0))
    zm = z * 1e3
    mid = b.shape[0] // 2
    if b.shape[0] > 1:
        ax.fill_between(zm, b.min(axis=0) * 1e3, b.max(axis=0) * 1e3, color="#4c72b0", alpha=0.25,
                        lw=0, label=f"current ±{model.magnet.current_tolerance:.1%}")
    ax.plot(zm, b[mid] * 1e3, color="#1f3f73", lw=1.6, label="|B| on axis, nominal")
    colours = ["#c44e52", "#dd8452", "#8172b3", "#55a868"]
    for i, feed in enumerate(model.feeds):
        h = ECR_HARMONIC.get(feed.absorption)
        if h is None:
            continue
        lo = float(ecr_field(feed.frequency - feed.frequency_tolerance, harmonic=h)) * 1e3
        hi = float(ecr_field(feed.frequency + feed.frequency_tolerance, harmonic=h)) * 1e3
        c = colours[i % len(colours)]
        ax.axhspan(lo, hi, color=c, alpha=0.25, lw=0)
        ax.axhline(float(ecr_field(feed.frequency, harmonic=h)) * 1e3, color=c, lw=1, ls="--",
                   label=f"resonance, feed {_short(feed.id)} ({feed.frequency / 1e9:.4g} GHz, h={h})")
    ymax = ax.get_ylim()[1]
    marks: dict[float, list[str]] = {}
    outside: list[str] = []
    for name, zz in ([(_short(lm.id), lm.z) for lm in model.chamber.landmarks]
                     + [(f"window {_short(w.id)}", w.z) for w in model.windows]
                     + [(f"launch {_short(f.id)}", f.launch.z) for f in model.feeds]):
        marks.setdefault(round(zz, 6), []).append(name)
    z_lo, z_hi = float(z[0]), float(z[-1])
    for zz, names in sorted(marks.items()):
        if not z_lo <= zz <= z_hi:  # outside the chamber: named in the caption instead
            outside.append(f"{' / '.join(names)} at z = {zz * 1e3:g} mm")
            continue
        ax.axvline(zz * 1e3, color="0.35", lw=0.8, ls=":")
        ax.text(zz * 1e3, ymax * 0.98, " " + " / ".join(names), rotation=90, va="top", ha="left",
                fontsize=7, color="0.25")
    ax.set_xlabel("z (mm)")
    ax.set_ylabel("|B| (mT)")
    ax.set_xlim(zm[0], zm[-1])
    ax.legend(loc="best", fontsize=7, framealpha=0.85)
    return {"id": "axis-field", "title": "On-axis field and resonance bands", "svg": _svg(fig, "axis"),
            "caption": "Magnitude of B on the chamber axis at nominal current (line) and over the "
                       "current tolerance (band); horizontal bands: resonance fields over each "
                       "feed's frequency tolerance; dotted: landmarks, windows, launchers."
                       + (f" Outside the chamber: {'; '.join(outside)}." if outside else "")}


def all_figures(run) -> list[dict]:
    from .figure_dispersion import dispersion_figure
    from .figure_fringe import fringe_figure
    from .figure_magnet import field_map_figure
    from .figure_path import cma_figure, launch_path_figure
    from .figure_window import window_figure

    out = []
    magnet_figures = (axis_field_figure, field_map_figure, fringe_figure)
    sources = run.model.magnet.sources if getattr(run.model, "magnet", None) else ()
    has_magnet = any(not (type(src).__name__ == "UniformField" and src.b == 0.0)
                     for src in sources)
    for make in (axis_field_figure, field_map_figure, window_figure, launch_path_figure, cma_figure,
                 dispersion_figure, fringe_figure):
        if make in magnet_figures and not has_magnet:
            continue  # a source without a magnet (inductive): a flat zero field says nothing
        fig = make(run)
        if fig:
            out.append(fig)
    from .figure_rays import ray_figures

    out.extend(ray_figures(run))  # off-axis, oblique and beam launches only
    from .figure_budget import budget_figure

    fig = budget_figure(run)  # drawn in the budget section, beside its table
    if fig:
        out.append(fig)
    return out
