"""Report figure: the cold-plasma dispersion f(k) of the electromagnetic waves at each feed's
launcher, with the light line and the feed's frequency band (no verdicts drawn here).

For each feed, at the peak density of the envelope and the nominal |B| on the axis at the
launcher: the R and L waves along B (n² = R, L) and the O wave across B (n² = P), from the
dispersion core (rfcheck.physics.coldplasma), drawn where they propagate (n² > 0) as
f against k = 2π f n / c; the light line f = c k / 2π; the feed's f ± tolerance as a band;
the cutoffs f_pe (P = 0), f_R (R = 0), f_L (L = 0) and the electron-cyclotron resonance
f_ce as marked levels (T. H. Stix, Waves in Plasmas, AIP 1992, ch. 1-2).
"""

from __future__ import annotations

import numpy as np

from rfcheck.report.figures import _mpl, _short, _svg, plain_log_ticks
from rfcheck.units import format_si

#: branch colours and line styles (distinct in greyscale print too)
BRANCHES = (("R", "R wave along B", "#d55e00", "-"), ("L", "L wave along B", "#56b4e9", "--"),
            ("O", "O wave across B", "#009e73", "-."))
#: frequency samples per panel
SAMPLES = 600


def _launcher_field(run, feed) -> float:
    ctx = run.context
    try:
        prof = ctx.nominal_profile()
    except Exception:  # the rules report a broken field model
        return 0.0
    z = float(np.clip(feed.launch.z, prof.z[0], prof.z[-1]))
    return float(np.interp(z, prof.z, prof.b))


def dispersion_figure(run) -> dict | None:
    from rfcheck.physics.coldplasma import n2_l_wave, n2_o_mode, n2_r_wave
    from rfcheck.physics.constants import C, TWO_PI
    from rfcheck.physics.frequencies import electron_cyclotron_frequency, electron_plasma_frequency

    model = run.model
    if model is None or run.context is None or not model.feeds:
        return None
    feeds = model.feeds[:4]
    n_e = model.plasma.density.max
    ions = model.plasma.ions
    plt = _mpl()
    cols = 1 if len(feeds) == 1 else 2
    rows = (len(feeds) + cols - 1) // cols
    fig, axes = plt.subplots(rows, cols, figsize=(6.6 if cols == 2 else 5.2, 2.9 * rows),
                             squeeze=False)
    notes = []
    magnetised = any_log = False
    for ax, feed in zip(axes.ravel(), feeds):
        b = _launcher_field(run, feed)
        magnetised |= b > 0
        f_pe = float(electron_plasma_frequency(n_e))
        f_ce = float(electron_cyclotron_frequency(b)) if b > 0 else 0.0
        # a drive far below f_pe (inductive, helicon) is drawn on log axes, where its
        # whistler branch and the cutoffs above it can all be seen
        logarithmic = feed.frequency < 0.2 * f_pe
        any_log |= logarithmic
        if logarithmic:
            f_top = 2.2 * max(feed.frequency, f_pe, f_ce)
            f = np.geomspace(feed.frequency / 30.0, f_top, SAMPLES)
        else:
            f_top = 2.2 * max(feed.frequency, f_pe)
            f = np.linspace(f_top / SAMPLES, f_top, SAMPLES)
        k_max = 0.0
        for key, label, colour, style in BRANCHES:
            if key != "O" and b <= 0:
                continue  # without a field R and L are the O wave
            fn = {"R": n2_r_wave, "L": n2_l_wave, "O": n2_o_mode}[key]
            with np.errstate(invalid="ignore", divide="ignore"):
                n2 = np.real(np.asarray(fn(f, b, n_e, ions), dtype=complex))
            k = np.where(n2 > 0, TWO_PI * f * np.sqrt(np.clip(n2, 0, None)) / C, np.nan)
            k = np.where(np.isfinite(k), k, np.nan)
            if np.isfinite(k).any():
                ax.plot(k, f / 1e9, color=colour, ls=style, lw=1.3, label=label)
        k_line = TWO_PI * f / C
        k_max = 1.6 * TWO_PI * max(feed.frequency, f_pe) / C
        ax.plot(k_line, f / 1e9, color="0.4", lw=0.8, ls=":", label="light line f = ck/2π")
        lo, hi = feed.frequency - feed.frequency_tolerance, feed.frequency + feed.frequency_tolerance
        ax.axhspan(lo / 1e9, hi / 1e9, color="#e69f00", alpha=0.35, lw=0)
        ax.axhline(feed.frequency / 1e9, color="#e69f00", lw=1.2, label="feed frequency ± tolerance")
        levels = [("f_pe", f_pe)]
        if b > 0:
            x = (f_pe / f_ce) ** 2 if f_ce > 0 else np.inf
            f_r = 0.5 * f_ce * (1 + np.sqrt(1 + 4 * x)) if f_ce > 0 else f_pe
            f_l = 0.5 * f_ce * (-1 + np.sqrt(1 + 4 * x)) if f_ce > 0 else f_pe
            levels += [("f_R", f_r), ("f_L", f_l), ("f_ce", f_ce)]
        above = [name for name, value in levels if value >= f_top]
        shown = [(n, v) for n, v in levels if f[0] < v < f_top]
        for j, (name, value) in enumerate(shown):
            # a label moves right of any earlier level it would touch
            near = sum((abs(np.log(value / v)) < 0.08) if logarithmic else
                       (abs(value - v) < 0.04 * f_top) for _, v in shown[:j])
            ax.axhline(value / 1e9, color="0.25", lw=0.6, ls=(0, (2, 2)))
            ax.annotate(name, (1.0, value / 1e9), xycoords=("axes fraction", "data"),
                        xytext=(3 + 18 * near, 0), textcoords="offset points", va="center",
                        fontsize=6.5, color="0.25", annotation_clip=False)
        if logarithmic:
            ax.set_xscale("log")
            ax.set_yscale("log")
            ax.set_ylim(f[0] / 1e9, f_top / 1e9)
            ax.autoscale_view()
            plain_log_ticks(ax)
        else:
            ax.set_xlim(0, k_max)
            ax.set_ylim(0, f_top / 1e9)
        ax.set_xlabel("k (rad/m)")
        ax.set_ylabel("f (GHz)")
        ax.set_title(f"feed {_short(feed.id)}, {format_si(feed.frequency, 'Hz')}: n_e {n_e:.3g} m⁻³, "
                     f"|B| {b * 1e3:.4g} mT" + (f"\n({', '.join(above)} above the plot)"
                                                 if above else ""), fontsize=7.5)
    for ax in axes.ravel()[len(feeds):]:
        ax.set_visible(False)
    if len(model.feeds) > len(feeds):
        notes.append(f"the first {len(feeds)} of {len(model.feeds)} feeds are drawn")
    handles, labels = axes.ravel()[0].get_legend_handles_labels()
    fig.tight_layout(rect=(0, 0.09 if rows == 1 else 0.05, 1, 1))
    fig.legend(handles, labels, loc="lower center", ncol=3, fontsize=6.8, frameon=False)
    branches = ("R wave (solid) and L wave (dashed) along B, O wave across B (dash-dot)"
                if magnetised else "the O wave (dash-dot; without a static field the R, L and "
                                   "O waves are one)")
    caption = ("Cold-plasma dispersion at each feed's launcher, at the peak density of the "
               "envelope and the nominal on-axis |B| there: " + branches + ", drawn where "
               "they propagate; dotted: the light line; orange line and band: the feed's "
               "frequency ± tolerance; fine dashed levels, labelled at the right (a level above "
               "the plot is named in its title): the cutoff f_pe"
               + (", the cutoffs f_R, f_L and the electron-cyclotron resonance f_ce"
                  if magnetised else "")
               + ". A wave whose branch is absent at the feed's frequency is evanescent there."
               + (" A drive far below f_pe is drawn on logarithmic axes." if any_log else "")
               + (f" ({'; '.join(notes)}.)" if notes else ""))
    return {"id": "dispersion", "title": "Dispersion of the waves at the launchers",
            "svg": _svg(fig, "dispersion"), "caption": caption}
