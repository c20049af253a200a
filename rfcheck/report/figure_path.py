"""Report figures of the launch path: n² along each feed's path at the envelope corners, and
the CMA diagram with the paths' trajectories (no verdicts drawn here).

Both plot what the Run holds (``run.characteristics["paths"]``, written by
rfcheck.analysis.launch_path_data.path_characteristics).
"""

from __future__ import annotations

import numpy as np

from rfcheck.report.figures import Drawn, _mpl, _short, _svg, plain_log_ticks, sentence


_COLOURS = ["#0072b2", "#009e73", "#cc79a7", "#e69f00", "#000000"]


def _paths(run) -> dict:
    chars = getattr(run, "characteristics", None) or {}
    return {fid: p for fid, p in (chars.get("paths") or {}).items() if p.get("corners")}


def _values(entry: dict) -> np.ndarray:
    return np.array([np.nan if v is None else v for v in entry["value"]], dtype=float)


def _positions(corners: list[dict], key: str) -> list[float]:
    out = sorted({round(c[key]["value"], 6) for c in corners if c[key]["value"] is not None})
    return out


def launch_path_figure(run) -> dict | None:
    """Re n²(z) of the launched wave along each feed's path at the envelope corners, with
    the target resonance (dashed) and the first cutoff (dotted) marked."""
    paths = _paths(run)
    if not paths:
        return None
    plt = _mpl()
    fig, axes = plt.subplots(len(paths), 1, figsize=(6.6, 2.8 * len(paths)), squeeze=False)
    drawn = Drawn()
    for ax, (fid, p) in zip(axes[:, 0], paths.items()):
        z = _values(p["z"]) * 1e3
        densities = sorted({c["density"]["value"] for c in p["corners"]})
        shades = dict(zip(densities, np.linspace(0.45, 1.0, len(densities))))
        labelled = set()
        for c in p["corners"]:
            n = c["density"]["value"]
            label = f"n_peak = {n:.3g} m^-3" if n not in labelled else None
            labelled.add(n)
            drawn.tag(ax.plot(z, _values(c["n2_real"]), color=_COLOURS[0],
                              alpha=float(shades[n]), lw=0.9, label=label)[0], "corner")
        ax.axhline(0.0, color="0.3", lw=0.8)
        for i, zz in enumerate(_positions(p["corners"], "target_z")):
            drawn.tag(ax.axvline(zz * 1e3, color="#d55e00", lw=0.9, ls="--",
                                 label=f"{p['corners'][0]['target']} (target)" if i == 0
                                 else None), "target")
        for i, zz in enumerate(_positions(p["corners"], "first_cutoff_z")):
            drawn.tag(ax.axvline(zz * 1e3, color="#56b4e9", lw=0.9, ls=":",
                                 label="first cutoff" if i == 0 else None), "cutoff")
        ax.set_yscale("symlog", linthresh=1.0)
        plain_log_ticks(ax, "y")
        ax.set_xlim(min(z[0], z[-1]), max(z[0], z[-1]))
        ax.set_xlabel("z (mm)")
        ax.set_ylabel("Re n²")
        ax.set_title(f"feed {_short(fid)}: {p['wave']}, launched at z = "
                     f"{p['launch_z']['value'] * 1e3:.4g} mm towards "
                     f"{'+' if p['direction'] > 0 else '−'}z", fontsize=8.5)
        ax.legend(loc="best", fontsize=7, framealpha=0.85)
    fig.tight_layout()
    marks = drawn.phrases([("target", "dashed: the target resonance"),
                           ("cutoff", "dotted: the first cutoff met from the launcher")])
    caption = ("Real part of n² of each feed's launched wave (collisional, cold plasma) "
               "along its path on the axis, at the envelope corners (density min/max, "
               "current scale min/max, frequency min/max; darker: higher density), "
               "on a symmetric log scale (linear within ±1). n² < 0: evanescent."
               + (" " + sentence("; ".join(marks)) + "." if marks else
                  " No target resonance or cutoff lies on the paths drawn."))
    return {"id": "launch-path", "title": "Refractive index along the launch path",
            "svg": _svg(fig, "path"), "caption": caption, "drawn": sorted(drawn.count)}


def cma_figure(run) -> dict | None:
    """The electron CMA diagram (X = n_e/n_c, Y = f_ce/f) with the cutoffs P = 0, R = 0,
    L = 0, the upper-hybrid resonance S = 0 and the ECR Y = 1, and each feed's path
    trajectories at the envelope corners."""
    paths = _paths(run)
    if not paths:
        return None
    xs, ys = [1.0], [1.0]
    for p in paths.values():
        for c in p["corners"]:
            xs.append(np.nanmax(_values(c["x"])))
            ys.append(np.nanmax(_values(c["y"])))
    x_max = max(2.0, 1.1 * float(np.nanmax(xs)))
    y_max = max(2.0, 1.1 * float(np.nanmax(ys)))
    plt = _mpl()
    fig, ax = plt.subplots(figsize=(6.0, 4.6))
    y = np.linspace(0.0, y_max, 400)
    below = y <= 1.0
    curves = [(np.ones_like(y), y, "P = 0 (O cutoff, X = 1)", "-"),
              (1.0 - y[below], y[below], "R = 0 (R cutoff, X = 1 − Y)", "--"),
              (1.0 + y, y, "L = 0 (L cutoff, X = 1 + Y)", "-."),
              (1.0 - y[below] ** 2, y[below], "S = 0 (upper hybrid, X = 1 − Y²)", ":")]
    drawn = Drawn()
    for (cx, cy, label, ls), name in zip(curves, ("p-cutoff", "r-cutoff", "l-cutoff",
                                                    "upper-hybrid")):
        drawn.tag(ax.plot(cx, cy, color="0.25", lw=1.0, ls=ls, label=label)[0], name)
    drawn.tag(ax.axhline(1.0, color="#d55e00", lw=1.0, label="Y = 1 (ECR)"), "ecr")
    for i, (fid, p) in enumerate(paths.items()):
        colour = _COLOURS[1 + i % (len(_COLOURS) - 1)]
        for j, c in enumerate(p["corners"]):
            x, yy = _values(c["x"]), _values(c["y"])
            drawn.tag(ax.plot(x, yy, color=colour, lw=0.9, alpha=0.7,
                              label=f"feed {_short(fid)}: {p['wave']}" if j == 0 else None)[0],
                      "path")
            if np.isfinite(x[:1]).all() and np.isfinite(yy[:1]).all():
                drawn.tag(ax.plot(x[:1], yy[:1], "o", ms=3, color=colour)[0], "launcher")
    ax.set_xlim(0.0, x_max)
    ax.set_ylim(0.0, y_max)
    ax.set_xlabel("X = n_e / n_c = ω_pe² / ω²")
    ax.set_ylabel("Y = f_ce / f = ω_ce / ω")
    ax.legend(loc="upper right", fontsize=7, framealpha=0.85)
    caption = ("Electron-only CMA diagram: cutoffs P = 0, R = 0, L = 0, the upper-hybrid "
               "resonance S = 0 and the electron cyclotron resonance Y = 1. Coloured: "
               "each feed's path from the launcher"
               + (" (dot)" if "launcher" in drawn else "")
               + " to the far end of the chamber at the envelope corners (density min/max, "
               "current scale min/max, frequency min/max).")
    return {"id": "cma-diagram", "title": "CMA diagram with the launch paths",
            "svg": _svg(fig, "cma"), "caption": caption, "drawn": sorted(drawn.count)}
