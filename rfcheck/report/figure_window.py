"""Report figure: reflection |Γ| of each window against frequency (no verdicts drawn here).

The window numbers come from the same cached computation the window rules use
(rfcheck.analysis.window); the limit line is the max_gamma option the run applied.
"""

from __future__ import annotations

import math

import numpy as np

from rfcheck.report.figures import Drawn, _mpl, _short, _svg


#: Half-width of the plotted frequency range as a fraction of the feed frequency (at least
#: three times the feed's tolerance).
PLOT_SPAN = 0.1
PLOT_POINTS = 401


def _limit(run) -> float | None:
    """The |Γ| limit window.reflection used in this run (None if the rule was not run)."""
    for use in getattr(run, "rules", ()):
        if use.id == "window.reflection":
            opt = use.options.get("max_gamma")
            return None if opt is None else float(opt["si"])
    return None


def window_figure(run) -> dict | None:
    """|Γ| versus frequency for each window: nominal stack (line), the envelope of the worst
    combinations of thickness, ε_r and tan δ found by the window analysis (band), the feed's
    f ± tolerance (shaded) and the limit (dashed)."""
    ctx, model = run.context, run.model
    if ctx is None or model is None or not model.windows:
        return None
    from rfcheck.analysis.window import window_analysis

    analyses = []
    for w in model.windows:
        try:
            analyses.append(window_analysis(ctx, w))
        except (KeyError, ValueError):  # unknown feed, line or material: the rules report it
            continue
    if not analyses:
        return None
    limit = _limit(run)
    plt = _mpl()
    fig, axes = plt.subplots(len(analyses), 1, figsize=(6.6, 2.5 * len(analyses)), squeeze=False)
    drawn = Drawn()
    for ax, a in zip(axes[:, 0], analyses):
        feed = a.feed
        half = max(PLOT_SPAN * feed.frequency, 3.0 * feed.frequency_tolerance)
        half = min(half, 0.45 * feed.frequency)
        f = np.linspace(feed.frequency - half, feed.frequency + half, PLOT_POINTS)
        g = a.gamma_over(f)  # (n_combo, n_f), NaN where the line does not propagate
        fg = f / 1e9
        with np.errstate(invalid="ignore"):
            if g.shape[0] > 1 and np.isfinite(g).any():
                drawn.tag(ax.fill_between(fg, np.nanmin(g, axis=0), np.nanmax(g, axis=0),
                                          color="#56b4e9", alpha=0.5, lw=0,
                                          label="worst combinations found"), "worst-band")
        if np.isfinite(g[a.nominal]).any():
            drawn.tag(ax.plot(fg, g[a.nominal], color="#0072b2", lw=1.5,
                              label="nominal stack")[0], "nominal")
        lo, hi = feed.frequency - feed.frequency_tolerance, feed.frequency + feed.frequency_tolerance
        if hi > lo:
            drawn.tag(ax.axvspan(lo / 1e9, hi / 1e9, color="#e69f00", alpha=0.25, lw=0,
                                 label=f"feed {_short(feed.id)}: f ± tolerance"), "tolerance")
        else:
            drawn.tag(ax.axvline(feed.frequency / 1e9, color="#e69f00", lw=1.2,
                                 label=f"feed {_short(feed.id)}"), "frequency")
        if limit is not None:
            drawn.tag(ax.axhline(limit, color="#d55e00", lw=1.0, ls="--",
                                 label=f"limit |Γ| = {limit:.3g}"), "limit")
        worst, wf, _ = a.worst_gamma
        if math.isfinite(worst):
            drawn.tag(ax.plot([wf / 1e9], [worst], "o", ms=4, color="#d55e00")[0], "worst")
        stack = " + ".join(f"{la.thickness * 1e3:.4g} mm {la.material}" for la in a.window.layers)
        ax.set_title(f"window {_short(a.window.id)}: {stack} in {a.line.name}", fontsize=8.5)
        ax.set_xlabel("frequency (GHz)")
        ax.set_ylabel("|Γ|")
        ax.set_xlim(fg[0], fg[-1])
        ax.set_ylim(0.0, 1.0)
        ax.legend(loc="upper right", fontsize=7, framealpha=0.85)
    fig.tight_layout()
    parts = drawn.phrases([
        ("nominal", "nominal stack (line)"),
        ("worst-band", "the envelope of the worst combinations of thickness, permittivity "
                       "and loss tangent within their spreads that the window rules found "
                       "(band)")])
    marks = drawn.phrases([
        ("tolerance", "shaded: the feed's f ± tolerance"),
        ("frequency", "vertical line: the feed's frequency (no tolerance declared)"),
        ("limit", "dashed: the |Γ| limit of the policy"),
        ("worst", "dot: the worst point judged by window.reflection")])
    caption = ("Magnitude of the reflection coefficient of each window in its feed's line "
               "(TE10/TE11 guide mode, or a plane wave at normal incidence)"
               + (": " + " and ".join(parts) if parts else "")
               + ("; " + "; ".join(marks) if marks else "") + ".")
    return {"id": "window-reflection", "title": "Window reflection against frequency",
            "svg": _svg(fig, "window"), "caption": caption, "drawn": sorted(drawn.count)}
