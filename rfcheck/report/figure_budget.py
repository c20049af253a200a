"""The power-budget figure: one horizontal bar per feed and state, the forward power split
into where it goes, drawn from the same accounting as the budget table (report/budget.py; no
physics here).

Each bar runs from 0 to 100 % of the feed's forward power; its segments are the budget's end
rows in table order (windows: reflected, absorbed; the plasma's parts: returned, absorbed,
through the far end; at ignition the unlit cavity: reflected, stays in the cavity). The kind of
end sets the fill (reflected, absorbed, transmitted: three colours of the Okabe–Ito set, each
with its own hatch so that a greyscale print still tells them apart); a segment wide enough
carries its share in percent, and every segment is an SVG element with an id
(``budget-el-<kind>-<bar>-<row>``) so that the caption can be checked against what is drawn.
"""

from __future__ import annotations

from .budget import IGNITION, power_budgets
from .figures import _mpl, _short, _svg

#: kind of end → (label in the legend, fill colour (Okabe & Ito 2008), hatch)
KINDS = {
    "reflected": ("reflected towards the generator", "#D55E00", "////"),
    "absorbed": ("absorbed (windows, plasma, cavity)", "#0072B2", ""),
    "transmitted": ("leaves through the far end", "#F0E442", "...."),
}
#: segments narrower than this share carry no text (it would run over its neighbours)
LABEL_MIN = 0.07


def budget_figure(run) -> dict | None:
    """The figure of every feed's budget (None when no feed has one)."""
    bars = [b for b in power_budgets(run) if b.rows]
    if not bars:
        return None
    plt = _mpl()
    fig, ax = plt.subplots(figsize=(6.6, 0.55 * len(bars) + 1.1))
    drawn: set[str] = set()
    labels = []
    for i, b in enumerate(bars):
        left = 0.0
        y = len(bars) - 1 - i
        for j, r in enumerate(x for x in b.rows if x.kind in KINDS):
            if r.fraction <= 0:
                continue
            _, colour, hatch = KINDS[r.kind]
            patch = ax.barh(y, 100.0 * r.fraction, left=100.0 * left, height=0.6,
                            color=colour, hatch=hatch, edgecolor="0.15", lw=0.5)[0]
            patch.set_gid(f"el-{r.kind}-{i}-{j}")
            drawn.add(r.kind)
            if r.fraction >= LABEL_MIN:
                ax.text(100.0 * (left + 0.5 * r.fraction), y, f"{100 * r.fraction:.3g} %",
                        ha="center", va="center", fontsize=7, color="white",
                        bbox={"boxstyle": "round,pad=0.15", "fc": "0.1", "alpha": 0.6,
                              "lw": 0})
            left += r.fraction
        labels.append(f"feed {_short(b.feed)}\n{b.state}")
    ax.set_yticks(range(len(bars)), labels[::-1], fontsize=7.5)
    ax.set_xlim(0, 100)
    ax.set_ylim(-0.6, len(bars) - 0.4)
    ax.set_xlabel("share of the peak forward power (%)")
    ax.grid(axis="y", visible=False)
    handles = [plt.Rectangle((0, 0), 1, 1, color=KINDS[k][1], hatch=KINDS[k][2], ec="0.15",
                             lw=0.5, label=KINDS[k][0]) for k in KINDS if k in drawn]
    ax.legend(handles=handles, loc="lower center", bbox_to_anchor=(0.5, 1.0),
              ncol=len(handles), fontsize=7, frameon=False)
    states = sorted({b.state for b in bars}, key=lambda s: s == IGNITION)
    ends = [KINDS[k][0] for k in KINDS if k in drawn]
    caption = (f"Where each feed's forward power goes ({' and '.join(states)} state"
               f"{'s' if len(states) > 1 else ''}): one bar per feed and state, its segments "
               f"the ends of the budget table in its order, by kind: {'; '.join(ends)} "
               "(colour and hatch). Segments of 7 % or more carry their share; the table "
               "below gives every row in watts.")
    return {"id": "power-budget", "title": "Power budget", "svg": _svg(fig, "budget"),
            "caption": caption, "drawn": sorted(drawn), "bars": len(bars)}
