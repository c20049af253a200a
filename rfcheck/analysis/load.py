"""The plasma as a load (no verdicts): the power each feed's launched parts get back from the
plasma at the worst envelope corner (the 1-D full-wave reflection per part, the far end
included), the running state's bound on the reflection at the generator (window and plasma
together) and the unlit cavity's reflection at ignition. Read by the load.*, line.* and
ech.* rules and the report's power budget; the plasma return is cached per feed for the run."""

from __future__ import annotations

import math
from dataclasses import dataclass

from rfcheck.model import Feed
from rfcheck.units import format_fraction as _pct

from .launch_path import NEAR_FIELD, Corner, launch_path
from .parts import ModeContent, mode_content, worst_split
from .state import RunState
from .window import window_analysis

__all__ = ["PlasmaReturn", "plasma_return", "running_gamma", "cold_gamma", "RUNNING", "IGNITION"]

_BALANCE_CAUTION = 1e-3
RUNNING = "running"
IGNITION = "ignition"


@dataclass(frozen=True)
class PlasmaReturn:
    """The feed's power returned by the plasma at the worst envelope corner.

    returned: Σ f_i returned_i at the worst corner and the worst candidate split;
    split: that split {mode: fraction}; corner: the corner; parts: {mode: PlasmaLoad}."""

    returned: float
    split: dict
    corner: Corner
    parts: dict
    content: ModeContent

    def part_text(self, mode: str) -> str:
        load = self.parts[mode]
        share = self.split.get(mode, 0.0)
        first = load.first
        tail = "" if abs(first.balance_residual) <= _BALANCE_CAUTION else \
            f", energy balance residual {first.balance_residual:.2g}: treat with caution"
        return (f"{mode} part ({_pct(share)}) returns {_pct(load.returned)} of its power "
                f"(first pass: reflected {_pct(first.reflected)}, absorbed "
                f"{_pct(first.absorbed)}, to the far end {_pct(first.transmitted)}{tail})")

    def details(self) -> dict:
        return {"state": RUNNING, "polarisation": self.content.summary(),
                "parts": [{"part": m, "fraction": self.split.get(m, 0.0),
                           "returned": ld.returned, "absorbed": ld.absorbed,
                           "escaped": ld.escaped, "far_end": ld.wall,
                           "far_end_declared": ld.declared,
                           "first_pass": {"reflected": ld.first.reflected,
                                          "transmitted": ld.first.transmitted,
                                          "absorbed": ld.first.absorbed}}
                          for m, ld in self.parts.items()]}


def plasma_return(ctx: RunState, feed: Feed) -> PlasmaReturn | None:
    """The worst returned power fraction of `feed` over the envelope corners (cached), None
    for feeds without launched parts (near field, no path)."""
    key = ("plasma-return", feed.id)
    if key not in ctx._cache:
        content = mode_content(ctx, feed)
        out = None
        if content.parts:
            paths = {p.mode: launch_path(ctx, feed, p.mode) for p in content.parts}
            first = paths[content.parts[0].mode]
            for corner in first.corners():
                loads = {m: path.load(corner) for m, path in paths.items()}
                total, split = worst_split(content, corner,
                                           {m: ld.returned for m, ld in loads.items()}, "max")
                if out is None or total > out.returned:
                    out = PlasmaReturn(total, split, corner, loads, content)
        ctx._cache[key] = out
    return ctx._cache[key]


@dataclass(frozen=True)
class RunningGamma:
    window: float  # |Γ_w|, sum over the feed's windows
    plasma: float  # |Γ_p| = √(returned fraction)
    bound: float  # min(1, |Γ_w| + |Γ_p|)
    windows: tuple[str, ...]
    ret: PlasmaReturn | None


def running_gamma(ctx: RunState, feed: Feed) -> RunningGamma:
    """The running state's bound |Γ_total| ≤ |Γ_w| + |Γ_p| (amplitudes at their own worst
    points; NaN when a window's reflection is undefined)."""
    windows = [w for w in ctx.model.windows if w.feed == feed.id]
    g_w = sum(window_analysis(ctx, w).worst_gamma[0] for w in windows)
    ret = plasma_return(ctx, feed) if feed.absorption not in NEAR_FIELD else None
    g_p = math.sqrt(ret.returned) if ret is not None else 0.0
    bound = min(1.0, g_w + g_p) if math.isfinite(g_w) else math.nan
    return RunningGamma(g_w, g_p, bound, tuple(w.id for w in windows), ret)


def cold_gamma(feed: Feed) -> tuple[float, str]:
    """|Γ| of the unlit cavity seen by the generator and where it comes from."""
    if feed.cold_cavity_gamma is not None:
        return feed.cold_cavity_gamma, f"|Γ_cold| = {feed.cold_cavity_gamma:.3g} (declared)"
    return 1.0, ("|Γ_cold| = 1 (the cold cavity's reflection is not declared: the worst case, "
                 "a cavity that returns all the power)")
