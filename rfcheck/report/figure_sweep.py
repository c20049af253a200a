"""Figures of a sweep or tolerance study (the ``rfcheck-sweep/1`` dict of ``rfcheck sweep``).

They draw what the study holds and compute nothing but geometry (cell edges, the edges
where the binding rule changes): no rule is evaluated here and no verdict made.

* two-axis grid: :func:`operating_window_figure` (the verdict of every point as regions,
  the boundaries where the binding rule changes, the nominal point and its tolerance box)
  and :func:`margin_contour_figure` (contours of the binding relative margin, zero bold);
* one-axis grid: :func:`margin_line_figure` (the verdict as a band along the axis, the
  relative margin of each rule that binds somewhere, the nominal value);
* Monte Carlo: :func:`pass_probability_figure` (each rule's pass probability with its 95 %
  Wilson interval) and :func:`sample_figure` (the samples over the parameters most
  correlated with failure, marked by verdict).

Every figure returns ``{"id", "title", "svg", "caption"}`` like the report's other figures;
each drawn element carries an SVG id ``el-KIND-…`` and the caption is built from the list of
what was drawn, so it names nothing that is not in the figure (tests read both). The five
verdicts differ by fill (Okabe-Ito tints), by grey level (BT.709 luma 0.91, 0.79, 0.64,
0.44, 0.33) and by hatching, so they stay apart in greyscale print.

One module for the study's figures (about 500 lines): they share the verdict styles, the
cell geometry and the caption discipline, and only the sweep report reads them.

A tolerance ``[low, high]`` on an axis is taken as the absolute bounds of the parameter, in
the axis unit (the range Monte Carlo samples are drawn from).
"""

from __future__ import annotations

import math

import numpy as np

from rfcheck.report.figures import _mpl, _svg, plain_log_ticks


def _patch(**kw):
    """A legend patch (matplotlib.patches imported when a figure is drawn)."""
    from matplotlib.patches import Patch

    return Patch(**kw)

#: the verdicts of a point, in the order they are counted and drawn
VERDICTS = ("pass", "warn", "fail", "not-evaluated", "invalid")
#: the printed word of each (rfcheck.views: a warning verdict is "pass with warnings")
VERDICT_WORDS = {"pass": "PASS", "warn": "PASS WITH WARNINGS", "fail": "FAIL",
                 "not-evaluated": "NOT EVALUATED", "invalid": "INVALID"}
#: fill, hatch, hatch colour, scatter marker of each verdict (Okabe-Ito hues; luma in the
#: module docstring)
STYLE = {
    "pass": ("#d4efe2", "", "#2f6b4f", "o"),
    "warn": ("#e69f00", "//", "#3a2800", "^"),
    "fail": ("#d55e00", "xx", "#1b1b1b", "X"),
    "not-evaluated": ("#9fd3f0", "..", "#1d4e6b", "s"),
    "invalid": ("#555555", "\\\\", "#e6e6e6", "D"),
}
#: line colour and style of each boundary or rule curve, in turn (distinct without colour)
LINES = (("#000000", "-"), ("#0072b2", "--"), ("#cc79a7", "-."), ("#009e73", ":"),
         ("#5a3d00", (0, (5, 1, 1, 1, 1, 1))), ("#56b4e9", (0, (8, 2))))
#: the tolerance box: a heavy dash-dot-dot line, unlike every line above
TOLERANCE_STYLE = (0, (6, 1.5, 1, 1.5, 1, 1.5))
#: at most this many boundaries or rule curves are drawn one by one (the rest together)
MAX_LINES = len(LINES)


def _plain(text: str) -> str:
    """Text for a matplotlib label: a '$' would start mathtext."""
    return str(text).replace("$", r"\$")


def _label(axis: dict) -> str:
    return _plain(f"{axis['key']} ({axis['unit']})" if axis.get("unit") else axis["key"])


def _edges(values) -> np.ndarray:
    """Cell edges around grid values (midpoints, the ends a half step out)."""
    v = np.asarray(values, dtype=float)
    if v.size == 1:
        half = 0.05 * abs(v[0]) or 0.5
        return np.array([v[0] - half, v[0] + half])
    mid = 0.5 * (v[1:] + v[:-1])
    return np.concatenate([[2 * v[0] - mid[0]], mid, [2 * v[-1] - mid[-1]]])


def grid_arrays(sweep: dict):
    """(verdict, binding, binding margin) of every grid point as arrays of ``shape``."""
    shape = tuple(int(n) for n in sweep["shape"])
    verdict = np.full(shape, "invalid", dtype=object)
    binding = np.full(shape, None, dtype=object)
    margin = np.full(shape, np.nan)
    for p in sweep["points"]:
        idx = tuple(p["index"])
        verdict[idx] = p["verdict"]
        binding[idx] = p.get("binding")
        if p.get("binding_margin") is not None:
            margin[idx] = float(p["binding_margin"])
    return verdict, binding, margin


def region_rectangles(sweep: dict) -> dict[str, list[tuple[float, float, float, float]]]:
    """Each verdict's part of a two-axis grid as rectangles (x0, y0, x1, y1): runs of equal
    verdict along the first axis, one row of cells of the second axis each."""
    verdict, _, _ = grid_arrays(sweep)
    xe, ye = (_edges(a["values"]) for a in sweep["axes"][:2])
    out: dict[str, list] = {}
    n1, n2 = verdict.shape
    for j in range(n2):
        i0 = 0
        for i in range(1, n1 + 1):
            if i == n1 or verdict[i, j] != verdict[i0, j]:
                out.setdefault(verdict[i0, j], []).append((xe[i0], ye[j], xe[i], ye[j + 1]))
                i0 = i
    return out


def binding_boundaries(sweep: dict) -> dict[tuple[str, str], list[tuple]]:
    """Cell edges of a two-axis grid where the binding rule changes between neighbours, by
    pair of rule ids (sorted), as segments ((x0, y0), (x1, y1)), collinear runs joined.
    Edges next to a point without a binding rule (invalid, not evaluated) are not drawn."""
    _, binding, _ = grid_arrays(sweep)
    xe, ye = (_edges(a["values"]) for a in sweep["axes"][:2])
    n1, n2 = binding.shape
    raw: dict[tuple, list] = {}
    for i in range(n1):
        for j in range(n2):
            a = binding[i, j]
            for di, dj in ((1, 0), (0, 1)):
                ii, jj = i + di, j + dj
                if ii >= n1 or jj >= n2:
                    continue
                b = binding[ii, jj]
                if a is None or b is None or a == b:
                    continue
                key = tuple(sorted((a, b)))
                if di:  # the edge between columns i and i+1: x fixed
                    raw.setdefault(key, []).append(("x", xe[ii], ye[j], ye[j + 1]))
                else:
                    raw.setdefault(key, []).append(("y", ye[jj], xe[i], xe[i + 1]))
    out = {}
    for key, segs in raw.items():
        joined = []
        for seg in sorted(segs):
            if joined and joined[-1][:2] == seg[:2] and math.isclose(joined[-1][3], seg[2]):
                joined[-1] = (*joined[-1][:3], seg[3])
            else:
                joined.append(seg)
        out[key] = [((c, s0), (c, s1)) if kind == "x" else ((s0, c), (s1, c))
                    for kind, c, s0, s1 in joined]
    return out


def _nominal(sweep: dict, axis: dict) -> float | None:
    value = (sweep.get("nominal") or {}).get("values", {}).get(axis["key"], axis.get("nominal"))
    return None if value is None else float(value)


def _tolerance(axis: dict):
    tol = axis.get("tolerance")
    return None if not tol else (min(map(float, tol)), max(map(float, tol)))


def _legend_below(ax, handles, ncol=2, offset=-0.17):
    ax.legend(handles=handles, loc="upper center", bbox_to_anchor=(0.5, offset), ncol=ncol,
              fontsize=6.8, frameon=False, handlelength=2.6)


def _verdict_patch(plt, v: str, n: int):
    fill, hatch, hatch_colour, _ = STYLE[v]
    return _patch(facecolor=fill, hatch=hatch, edgecolor=hatch_colour,
                                        lw=0.5, label=f"{VERDICT_WORDS[v]} ({n})")


def _nominal_and_box(plt, ax, sweep, ax_x, ax_y, handles, drawn):
    """The nominal point (star) and the rectangle of the two axes' tolerances, when known."""
    x0, y0 = _nominal(sweep, ax_x), _nominal(sweep, ax_y)
    tx, ty = _tolerance(ax_x), _tolerance(ax_y)
    if tx and ty:
        box = plt.Rectangle((tx[0], ty[0]), tx[1] - tx[0], ty[1] - ty[0], fill=False,
                            ec="0.1", lw=1.8, ls=TOLERANCE_STYLE, zorder=5, gid="el-tolerance")
        ax.add_patch(box)
        handles.append(plt.Line2D([], [], color="0.1", lw=1.8, ls=TOLERANCE_STYLE,
                                  label="tolerance box"))
        drawn.append("dash-dot-dot rectangle: the tolerance box of the two parameters")
    if x0 is not None and y0 is not None:
        ax.plot([x0], [y0], marker="*", ms=12, mfc="white", mec="black", mew=1.2, ls="none",
                zorder=6, gid="el-nominal")
        handles.append(plt.Line2D([], [], marker="*", ms=10, mfc="white", mec="black",
                                  ls="none", label=f"nominal ({x0:.4g}, {y0:.4g})"))
        drawn.append(f"star: the nominal point ({_with_unit(x0, ax_x)}, {_with_unit(y0, ax_y)})")


def _with_unit(value: float, axis: dict) -> str:
    return f"{value:.4g} {axis.get('unit') or ''}".rstrip()


def _two_axes(sweep: dict) -> bool:
    return sweep.get("kind") == "grid" and len(sweep.get("axes", ())) == 2


def operating_window_figure(sweep: dict) -> dict | None:
    """The operating window of a two-axis grid: the verdict of each point as regions."""
    if not _two_axes(sweep):
        return None
    from matplotlib.collections import LineCollection, PolyCollection

    plt = _mpl()
    ax_x, ax_y = sweep["axes"]
    fig, ax = plt.subplots(figsize=(6.0, 4.0))
    handles, drawn, words = [], [], []
    verdict, _, _ = grid_arrays(sweep)
    for v, rects in sorted(region_rectangles(sweep).items(), key=lambda kv: VERDICTS.index(kv[0])):
        fill, hatch, hatch_colour, _ = STYLE[v]
        # an edge in the fill colour closes the hairline seams between cells; the hatch
        # pattern is laid in page space, so neighbouring cells' hatching lines up
        coll = PolyCollection([[(x0, y0), (x1, y0), (x1, y1), (x0, y1)] for x0, y0, x1, y1 in rects],
                              facecolors=fill, edgecolors=fill, linewidths=0.3, hatch=hatch or None,
                              zorder=1, gid=f"el-region-{v}")
        if hatch:
            coll.set_hatchcolor(hatch_colour)
        ax.add_collection(coll)
        n = int((verdict == v).sum())
        handles.append(_verdict_patch(plt, v, n))
        words.append(f"{VERDICT_WORDS[v]} ({'plain' if not hatch else hatch_name(hatch)})")
    drawn.append("regions by verdict of the grid point: " + ", ".join(words))
    bounds = binding_boundaries(sweep)
    ordered = sorted(bounds, key=lambda k: -sum(abs(a[0] - b[0]) + abs(a[1] - b[1])
                                                for a, b in bounds[k]))
    rest = []
    for k, pair in enumerate(ordered):
        if k < MAX_LINES - 1 or len(ordered) == MAX_LINES:
            colour, style = LINES[k]
            label = f"binding rule changes: {pair[0]} ↔ {pair[1]}"
            ax.add_collection(LineCollection(bounds[pair], colors=colour, linestyles=[style],
                                             linewidths=1.6, zorder=4, gid=f"el-boundary-{k}"))
            handles.append(plt.Line2D([], [], color=colour, ls=style, lw=1.6, label=_plain(label)))
        else:
            rest.extend(bounds[pair])
    if rest:
        ax.add_collection(LineCollection(rest, colors="0.35", linewidths=1.0, zorder=3,
                                         gid="el-boundary-other"))
        handles.append(plt.Line2D([], [], color="0.35", lw=1.0,
                                  label=f"binding rule changes: {len(ordered) - MAX_LINES + 1} more pairs"))
    if ordered:
        drawn.append(f"lines: the {len(ordered)} boundar{'y' if len(ordered) == 1 else 'ies'} "
                     "where the binding rule (least relative margin) changes between neighbouring "
                     "points, named by rule id in the legend")
    _nominal_and_box(plt, ax, sweep, ax_x, ax_y, handles, drawn)
    xe, ye = _edges(ax_x["values"]), _edges(ax_y["values"])
    ax.set_xlim(min(xe), max(xe))
    ax.set_ylim(min(ye), max(ye))
    ax.set_xlabel(_label(ax_x))
    ax.set_ylabel(_label(ax_y))
    ax.grid(False)
    _legend_below(ax, handles, ncol=2)
    n1, n2 = verdict.shape
    caption = (f"Operating window over {n1} × {n2} grid points, each cell the verdict of the "
               "full rule catalogue at that point: " + "; ".join(drawn) + ". Each cell is drawn "
               "around its grid point; nothing between the points was evaluated. A design aid: "
               "a PASS region is no sign-off.")
    return {"id": "operating-window", "title": "Operating window", "caption": caption,
            "svg": _svg(fig, "sweep-window"), "drawn": drawn}


def hatch_name(hatch: str) -> str:
    return {"//": "hatched /", "xx": "cross-hatched", "..": "dotted",
            "\\\\": "hatched \\"}.get(hatch, "hatched")


def margin_contour_figure(sweep: dict) -> dict | None:
    """Contours of the binding relative margin over a two-axis grid; the zero contour bold."""
    if not _two_axes(sweep):
        return None
    _, _, margin = grid_arrays(sweep)
    finite = margin[np.isfinite(margin)]
    if min(margin.shape) < 2 or finite.size < 4:
        return None
    from matplotlib.ticker import MaxNLocator

    plt = _mpl()
    ax_x, ax_y = sweep["axes"]
    x, y = np.asarray(ax_x["values"], float), np.asarray(ax_y["values"], float)
    lo, hi = float(finite.min()), float(finite.max())
    if hi - lo < 1e-12 * max(1.0, abs(hi)):
        lo, hi = lo - 0.5, hi + 0.5
    # the shading resolves the margins near zero: below -1 (the limit overshot by more than
    # its own size) every point takes the lowest shade
    floor = max(lo, min(-1.0, hi - 1.0))
    levels = MaxNLocator(10).tick_values(floor, hi)
    levels = levels[levels >= floor - 1e-12]  # the top level stays at or above the largest
    if levels.size < 2:
        levels = np.linspace(floor, hi, 6)
    fig, ax = plt.subplots(figsize=(6.0, 4.2))
    handles, drawn = [], []
    z = np.ma.masked_invalid(margin.T)
    clipped = lo < levels[0]
    filled = ax.contourf(x, y, z, levels=levels, cmap="cividis",
                         extend="min" if clipped else "neither")
    filled.set_gid("el-margin-fill")
    bar = fig.colorbar(filled, ax=ax, pad=0.02)
    bar.set_label("binding relative margin (margin / |limit|)")
    drawn.append("shading and thin contours: the relative margin of the binding rule (the least "
                 "over the catalogue) at each grid point, on the colour bar"
                 + (f" (margins below {levels[0]:g} in its lowest shade, down to {lo:.3g})"
                    if clipped else ""))
    lines = ax.contour(x, y, z, levels=levels, colors="0.15", linewidths=0.4)
    lines.set_gid("el-margin-lines")
    if lo < 0 < hi:
        neg = ax.contourf(x, y, z, levels=[lo, 0.0], colors="none", hatches=["//"])
        neg.set_gid("el-margin-negative")
        handles.append(_patch(facecolor="none", hatch="//", edgecolor="black",
                              label="margin below zero"))
        drawn.append("hatched: margin below zero")
        zero = ax.contour(x, y, z, levels=[0.0], colors="black", linewidths=2.4)
        zero.set_gid("el-margin-zero")
        handles.append(plt.Line2D([], [], color="black", lw=2.4, label="zero margin"))
        drawn.append("bold line: the zero-margin contour")
    else:
        drawn.append(f"no zero contour: the binding margin is {'positive' if lo >= 0 else 'negative'}"
                     " at every point with a margin")
    if np.isnan(margin).any():
        drawn.append("blank: points without a margin (invalid or not evaluated)")
    _nominal_and_box(plt, ax, sweep, ax_x, ax_y, handles, drawn)
    ax.set_xlabel(_label(ax_x))
    ax.set_ylabel(_label(ax_y))
    ax.grid(False)
    if handles:
        _legend_below(ax, handles, ncol=3)
    caption = ("Binding relative margin over the grid, interpolated between the grid points by "
               "the contouring: " + "; ".join(drawn) + ".")
    return {"id": "margin-contours", "title": "Binding margin", "caption": caption,
            "svg": _svg(fig, "sweep-margin"), "drawn": drawn}


def _binding_rules(sweep: dict) -> list[str]:
    """Rule ids that bind at some point, most points first, then by id."""
    counts: dict[str, int] = {}
    for p in sweep["points"]:
        if p.get("binding"):
            counts[p["binding"]] = counts.get(p["binding"], 0) + 1
    return sorted(counts, key=lambda r: (-counts[r], r))


def margin_line_figure(sweep: dict) -> dict | None:
    """A one-axis grid: the verdict band along the axis over the relative margin of each rule
    that binds somewhere, the nominal value marked."""
    if sweep.get("kind") != "grid" or len(sweep.get("axes", ())) != 1:
        return None
    from matplotlib.collections import PolyCollection

    plt = _mpl()
    axis = sweep["axes"][0]
    x = np.asarray(axis["values"], float)
    xe = _edges(x)
    verdict, _, _ = grid_arrays(sweep)
    fig, (band, ax) = plt.subplots(2, 1, figsize=(6.2, 3.9), sharex=True,
                                   gridspec_kw={"height_ratios": [1, 6], "hspace": 0.08})
    handles, drawn, words = [], [], []
    for v in VERDICTS:
        cells = [i for i in range(len(x)) if verdict[i] == v]
        if not cells:
            continue
        fill, hatch, hatch_colour, _ = STYLE[v]
        coll = PolyCollection([[(xe[i], 0), (xe[i + 1], 0), (xe[i + 1], 1), (xe[i], 1)] for i in cells],
                              facecolors=fill, edgecolors=fill, linewidths=0.3, hatch=hatch or None,
                              gid=f"el-region-{v}")
        if hatch:
            coll.set_hatchcolor(hatch_colour)
        band.add_collection(coll)
        handles.append(_verdict_patch(plt, v, len(cells)))
        words.append(f"{VERDICT_WORDS[v]} ({'plain' if not hatch else hatch_name(hatch)})")
    drawn.append("top band: the verdict of each grid point, " + ", ".join(words))
    band.set_ylim(0, 1)
    band.set_yticks([])
    band.grid(False)
    rules = _binding_rules(sweep)
    curves = LINES[1:] + (("#e69f00", (0, (3, 1, 1, 1, 1, 1, 1, 1))),)  # black is the zero line
    shown = rules[:len(curves)]
    values = np.full((len(shown), len(x)), np.nan)
    for p in sweep["points"]:
        for k, rid in enumerate(shown):
            rm = (p.get("rules") or {}).get(rid, {}).get("relative_margin")
            if rm is not None:
                values[k, p["index"][0]] = float(rm)
    for k, rid in enumerate(shown):
        colour, style = curves[k]
        ax.plot(x, values[k], color=colour, ls=style, lw=1.5, marker="os^vD<"[k], ms=3,
                gid=f"el-rule-{k}", label=_plain(rid))
    handles.extend(plt.Line2D([], [], color=curves[k][0], ls=curves[k][1], lw=1.5, marker="os^vD<"[k],
                              ms=3, label=_plain(shown[k])) for k in range(len(shown)))
    if shown:
        drawn.append(f"curves: the relative margin (margin / |limit|) of each of the {len(shown)} "
                     "rules that bind at some point, named in the legend"
                     + (f" (the {len(rules) - len(shown)} binding fewest points left out)"
                        if len(rules) > len(shown) else ""))
    finite = values[np.isfinite(values)]
    if finite.size and np.abs(finite).max() > 5:
        ax.set_yscale("symlog", linthresh=0.1)
        plain_log_ticks(ax, "y")
        drawn.append("margin axis linear within ±0.1, logarithmic beyond")
    ax.axhline(0.0, color="black", lw=2.0, gid="el-margin-zero")
    drawn.append("bold line: zero margin")
    x0 = _nominal(sweep, axis)
    tol = _tolerance(axis)
    if tol:
        ax.axvspan(tol[0], tol[1], facecolor="0.88", lw=0, zorder=0, gid="el-tolerance")
        handles.append(_patch(facecolor="0.88", label="tolerance"))
        drawn.append("grey span: the tolerance")
    if x0 is not None:
        for a in (band, ax):
            a.axvline(x0, color="black", lw=1.0, ls=(0, (1, 1.5)), gid="el-nominal")
        handles.append(plt.Line2D([], [], color="black", lw=1.0, ls=(0, (1, 1.5)),
                                  label=f"nominal {x0:.4g}"))
        drawn.append(f"dotted vertical: the nominal value {x0:.4g} {axis.get('unit', '')}".rstrip())
    ax.set_xlim(min(xe), max(xe))
    ax.set_xlabel(_label(axis))
    ax.set_ylabel("relative margin")
    _legend_below(ax, handles, ncol=2, offset=-0.2)
    caption = (f"Verdict and margins along {len(x)} grid points: " + "; ".join(drawn)
               + ". Each cell is drawn around its grid point; nothing between the points was "
                 "evaluated. A design aid: a PASS stretch is no sign-off.")
    return {"id": "margin-line", "title": "Verdict and margins along the axis", "caption": caption,
            "svg": _svg(fig, "sweep-line"), "drawn": drawn}


def pass_probability_figure(sweep: dict) -> dict | None:
    """Monte Carlo: the estimated pass probability overall and of each rule, with its 95 %
    Wilson interval (values from the study)."""
    mc = sweep.get("monte_carlo")
    if sweep.get("kind") != "monte-carlo" or not mc:
        return None
    prob = mc["pass_probability"]
    rows = [(rid, r) for rid, r in prob.get("rules", {}).items() if r.get("n")]
    rows.sort(key=lambda kv: (kv[1]["p"], kv[0]))
    limit = 14
    left_out = max(0, len(rows) - limit)
    rows = rows[:limit]
    entries = [("overall (every rule)", prob["overall"])] + rows
    plt = _mpl()
    fig, ax = plt.subplots(figsize=(6.0, 0.8 + 0.24 * len(entries)))
    ys = np.arange(len(entries))[::-1]
    for y, (name, r) in zip(ys, entries):
        overall = name.startswith("overall")
        ax.errorbar([r["p"]], [y], xerr=[[max(0.0, r["p"] - r["low"])], [max(0.0, r["high"] - r["p"])]],
                    fmt="D" if overall else "o", color="black" if overall else "#0072b2",
                    ms=5 if overall else 4, capsize=3, lw=1.2,
                    gid="el-probability-overall" if overall else f"el-probability-{y}")
    ax.set_yticks(ys, [_plain(name) for name, _ in entries], fontsize=7)
    ax.set_xlim(-0.02, 1.02)
    ax.set_xlabel("pass probability")
    ax.grid(True, axis="x")
    n = prob["overall"]["n"]
    caption = (f"Estimated pass probability over {n} samples drawn {mc['distribution']} "
               f"(seed {mc['seed']}): diamond, every rule together; dots, each rule evaluated "
               "in the samples; bars, the 95 % Wilson score interval"
               + (f"; the {left_out} rules with the highest probability left out (all in the "
                  "table)" if left_out else "")
               + ". An estimate of the spread of the declared tolerances only, not of every "
                 "way the source can depart from its specification.")
    return {"id": "pass-probability", "title": "Pass probability", "caption": caption,
            "svg": _svg(fig, "sweep-probability"), "drawn": [name for name, _ in entries]}


def sample_figure(sweep: dict) -> dict | None:
    """Monte Carlo: the samples over the two parameters most correlated with failure (one
    parameter: against the binding margin), marked by verdict."""
    if sweep.get("kind") != "monte-carlo" or not sweep.get("axes"):
        return None
    axes = {a["key"]: a for a in sweep["axes"]}
    # a null coefficient is undefined (no sample failed, or every one did): not an order
    order = [c["key"] for c in (sweep.get("monte_carlo") or {}).get("correlation") or ()
             if c["key"] in axes and c.get("coefficient") is not None]
    correlated = bool(order)
    order += [k for k in axes if k not in order]
    plt = _mpl()
    fig, ax = plt.subplots(figsize=(6.0, 4.0))
    handles, drawn, words = [], [], []
    ax_x = axes[order[0]]
    ax_y = axes[order[1]] if len(order) > 1 else None
    for v in VERDICTS:
        pts = [p for p in sweep["points"] if p["verdict"] == v]
        if not pts:
            continue
        xs = [p["values"][ax_x["key"]] for p in pts]
        ys = ([p["values"][ax_y["key"]] for p in pts] if ax_y else
              [np.nan if p.get("binding_margin") is None else p["binding_margin"] for p in pts])
        fill, _, edge, marker = STYLE[v]
        ax.scatter(xs, ys, s=14, marker=marker, facecolors=fill, edgecolors=edge, linewidths=0.6,
                   zorder=3, gid=f"el-samples-{v}")
        handles.append(plt.Line2D([], [], marker=marker, mfc=fill, mec=edge, ls="none",
                                  label=f"{VERDICT_WORDS[v]} ({len(pts)})"))
        words.append(f"{VERDICT_WORDS[v]} ({ {'o': 'circles', '^': 'triangles', 'X': 'crosses', 's': 'squares', 'D': 'diamonds'}[marker]})")
    drawn.append("each sample marked by its verdict: " + ", ".join(words))
    if ax_y:
        _nominal_and_box(plt, ax, sweep, ax_x, ax_y, handles, drawn)
        ax.set_ylabel(_label(ax_y))
        what = ("the two sampled parameters most correlated with failure" if correlated else
                "the first two sampled parameters (no correlation with failure is defined)")
    else:
        ax.axhline(0.0, color="black", lw=2.0, gid="el-margin-zero")
        drawn.append("bold line: zero margin")
        x0 = _nominal(sweep, ax_x)
        if x0 is not None:
            ax.axvline(x0, color="black", lw=1.0, ls=(0, (1, 1.5)), gid="el-nominal")
            handles.append(plt.Line2D([], [], color="black", lw=1.0, ls=(0, (1, 1.5)),
                                      label=f"nominal {x0:.4g}"))
            drawn.append(f"dotted vertical: the nominal value {x0:.4g}")
        ax.set_ylabel("binding relative margin")
        what = "the sampled parameter against the binding relative margin"
    ax.set_xlabel(_label(ax_x))
    _legend_below(ax, handles, ncol=3)
    others = len(order) - (2 if ax_y else 1)
    caption = (f"Monte Carlo samples over {what}: " + "; ".join(drawn)
               + (f". {others} further sampled parameter{'s are' if others > 1 else ' is'} "
                  "not drawn (see the correlation table)" if others > 0 else "") + ".")
    return {"id": "samples", "title": "Samples by verdict", "caption": caption,
            "svg": _svg(fig, "sweep-samples"), "drawn": drawn}


def sweep_figures(sweep: dict) -> list[dict]:
    """The figures that apply to the study: 2-axis grid, 1-axis grid or Monte Carlo."""
    makers = (operating_window_figure, margin_contour_figure, margin_line_figure,
              pass_probability_figure, sample_figure)
    return [fig for make in makers if (fig := make(sweep))]
