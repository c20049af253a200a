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


class Drawn:
    """What a figure draws, by element name: each element a caption promises is tagged with
    an SVG id ``el-<name>-<n>`` (the figure's prefix is added by :func:`_svg`), and the
    caption is assembled from the names actually drawn, so that it never promises an element
    the figure lacks (tests read the ids back from the SVG)."""

    def __init__(self) -> None:
        self.count: dict[str, int] = {}

    def tag(self, artist, name: str):
        n = self.count.get(name, 0)
        self.count[name] = n + 1
        artist.set_gid(f"el-{name}-{n}")
        return artist

    def __contains__(self, name: str) -> bool:
        return name in self.count

    def phrases(self, parts: list[tuple[str, str]]) -> list[str]:
        """The phrases of `parts` ((element name, phrase) pairs) whose element is drawn."""
        return [text for name, text in parts if name in self]


_SUPERSCRIPT = str.maketrans("-0123456789", "⁻⁰¹²³⁴⁵⁶⁷⁸⁹")


def power_label(value: float, pos=None) -> str:
    """A tick label of a log or symlog axis in plain text: 0, 1, 10, 10², −10³, 0.5 (powers
    of ten with Unicode superscripts; matplotlib's default writes them as mathtext, whose
    parser costs ~0.3 s to build in every process that draws one)."""
    import math

    v = float(value)
    if v == 0 or not math.isfinite(v):
        return "0" if v == 0 else ""
    a, sign = abs(v), ("−" if v < 0 else "")
    k = round(math.log10(a))
    if math.isclose(a, 10.0 ** k, rel_tol=1e-9):
        return sign + ("1" if k == 0 else "10" if k == 1 else "10" + str(k).translate(_SUPERSCRIPT))
    return sign + f"{a:g}"


def plain_log_ticks(ax, which: str = "xy") -> None:
    """Label the log/symlog axes of `ax` with :func:`power_label` (major ticks; the minor
    ticks of a log axis get plain numbers only where the axis spans less than a decade)."""
    import math

    from matplotlib.ticker import FuncFormatter, NullFormatter

    for name in which:
        axis = ax.xaxis if name == "x" else ax.yaxis
        axis.set_major_formatter(FuncFormatter(power_label))
        if axis.get_scale() == "log":
            lo, hi = sorted(ax.get_xlim() if name == "x" else ax.get_ylim())
            few = lo > 0 and math.log10(hi / lo) < 1.0
            axis.set_minor_formatter(FuncFormatter(power_label) if few else NullFormatter())
        else:
            axis.set_minor_formatter(NullFormatter())


def sentence(text: str) -> str:
    """`text` with its first letter in upper case (the rest as it is: ids, units, ECR)."""
    return text[:1].upper() + text[1:]


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
    drawn = Drawn()
    zm = z * 1e3
    mid = b.shape[0] // 2
    if b.shape[0] > 1:
        drawn.tag(ax.fill_between(zm, b.min(axis=0) * 1e3, b.max(axis=0) * 1e3, color="#56b4e9",
                                  alpha=0.5, lw=0,
                                  label=f"current ±{model.magnet.current_tolerance:.1%}"),
                  "current-band")
    drawn.tag(ax.plot(zm, b[mid] * 1e3, color="#0072b2", lw=1.6, label="|B| on axis, nominal")[0],
              "nominal")
    colours = ["#d55e00", "#e69f00", "#cc79a7", "#009e73"]
    for i, feed in enumerate(model.feeds):
        h = ECR_HARMONIC.get(feed.absorption)
        if h is None:
            continue
        lo = float(ecr_field(feed.frequency - feed.frequency_tolerance, harmonic=h)) * 1e3
        hi = float(ecr_field(feed.frequency + feed.frequency_tolerance, harmonic=h)) * 1e3
        c = colours[i % len(colours)]
        if hi > lo:
            drawn.tag(ax.axhspan(lo, hi, color=c, alpha=0.25, lw=0), "resonance-band")
        drawn.tag(ax.axhline(float(ecr_field(feed.frequency, harmonic=h)) * 1e3, color=c, lw=1,
                             ls="--", label=f"resonance, feed {_short(feed.id)} "
                                            f"({feed.frequency / 1e9:.4g} GHz, h={h})"),
                  "resonance")
    ymax = ax.get_ylim()[1]
    marks: dict[float, list[tuple[str, str]]] = {}
    outside: list[str] = []
    for kind, name, zz in ([("landmark", _short(lm.id), lm.z) for lm in model.chamber.landmarks]
                           + [("window", f"window {_short(w.id)}", w.z) for w in model.windows]
                           + [("launcher", f"launch {_short(f.id)}", f.launch.z)
                              for f in model.feeds]):
        marks.setdefault(round(zz, 6), []).append((kind, name))
    z_lo, z_hi = float(z[0]), float(z[-1])
    for zz, items in sorted(marks.items()):
        names = [name for _, name in items]
        if not z_lo <= zz <= z_hi:  # outside the chamber: named in the caption instead
            outside.append(f"{' / '.join(names)} at z = {zz * 1e3:g} mm")
            continue
        for kind in dict.fromkeys(k for k, _ in items):  # one line per kind (they coincide)
            drawn.tag(ax.axvline(zz * 1e3, color="0.35", lw=0.8, ls=":"), kind)
        ax.text(zz * 1e3, ymax * 0.98, " " + " / ".join(names), rotation=90, va="top", ha="left",
                fontsize=7, color="0.25")
    ax.set_xlabel("z (mm)")
    ax.set_ylabel("|B| (mT)")
    ax.set_xlim(zm[0], zm[-1])
    ax.legend(loc="best", fontsize=7, framealpha=0.85)
    caption = ("Magnitude of B on the chamber axis at nominal current (line)"
               + (" and over the current tolerance (band)" if "current-band" in drawn else ""))
    if "resonance" in drawn:
        caption += ("; dashed: each ECR feed's resonance field at its nominal frequency"
                    + (", shaded: over its frequency tolerance" if "resonance-band" in drawn
                       else ""))
    dotted = drawn.phrases([("landmark", "landmarks"), ("window", "windows"),
                            ("launcher", "launchers")])
    if dotted:
        caption += "; dotted: " + ", ".join(dotted)
    caption += "." + (f" Outside the chamber: {'; '.join(outside)}." if outside else "")
    return {"id": "axis-field", "title": "On-axis field and resonance bands",
            "svg": _svg(fig, "axis"), "caption": caption, "drawn": sorted(drawn.count)}


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
