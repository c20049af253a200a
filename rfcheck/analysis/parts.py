"""The parts of each feed's launched power: its split into the plasma's two characteristic
waves at the launcher (no verdicts; shared by the cutoff, access, load and absorption rules,
the characteristics and the report, cached for the run).

A feed declares what its launcher sends (`launch.polarisation`): linear with the E direction
relative to the static field, circular right or left (named relative to B: right is the R
wave), or "as-mode" (all power in the intended mode: an assumption, stated in every finding
that rests on it). Not declared, the launch is linear — the polarisation of every guide's
dominant mode and of a horn — with the E direction unknown, and every finding takes the worse
of the two extreme splits (E along and across the projection of B: the fraction of each wave
is a cos²ψ + b sin²ψ, so its extremes lie there).

The split is the projection of the launched Jones vector on the two characteristic waves of
the tenuous plasma edge for the launch angle θ and the field at the start of the path
(:mod:`rfcheck.physics.polarisation`): R and L along B (θ = 0: a linear launch is half R and
half L at any field), O and X across B (θ = 90°: E ∥ B is all O), elliptical in between.
The two waves are named R/L when the intended mode is R or L, O/X when it is O or X, as the
branches of :func:`rfcheck.physics.coldplasma.n2_branch`. The split depends on the envelope
only through the field at the launcher (current scale) and the frequency, and only for
oblique launches; it is computed at every current scale and frequency of the envelope.

A plasma without a magnetic field along the path has one wave (n² = P): the feed then has
a single part.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from rfcheck.model import Feed
from rfcheck.physics.frequencies import ecr_field
from rfcheck.physics.polarisation import (PARTNER, characteristic_polarisations, launched_jones,
                                          mode_fractions)

from .launch_path import NEAR_FIELD, Corner, launch_path

__all__ = ["Part", "ModeContent", "mode_content", "part_subject", "worst_split"]

#: a part carrying less than this fraction of the power at every envelope point is dropped
MIN_FRACTION = 1e-9
#: a path whose |B| stays below this fraction of B_ECR everywhere counts as unmagnetised
UNMAGNETISED_Y = 1e-6


@dataclass(frozen=True)
class Part:
    """One characteristic wave of a feed's launched power and its share (low..high over the
    envelope and over an undeclared E direction)."""

    mode: str
    low: float
    high: float

    @property
    def share(self) -> str:
        """The share in words, e.g. "50 %" or "0–100 %"."""
        if self.high - self.low < 5e-4:
            return _pct(self.high)
        return f"{_pct(self.low)}–{_pct(self.high)}"

    def text(self) -> str:
        return f"{self.mode} part ({self.share})"


def _pct(x: float) -> str:
    v = 100.0 * x
    return f"{v:.0f} %" if abs(v - round(v)) < 0.05 else f"{v:.3g} %"


def part_subject(feed: Feed, mode: str) -> str:
    return f"feed {feed.id}, {mode} part"


@dataclass
class ModeContent:
    """The parts of one feed's power and the candidate splits at every (scale, frequency).

    `splits[(j, k)]` is a list of {mode: fraction} candidates at current-scale index j and
    frequency index k of the launch path: one when the polarisation fixes the split, two
    (the extremes) when the E direction of a linear launch is not declared. Findings take
    the worst candidate.
    """

    feed: Feed
    pair: tuple[str, str]
    parts: tuple[Part, ...]
    polarisation: str
    assumption: str
    unmagnetised: bool
    reason: str = ""  # why the feed has no parts (near field, no path)
    splits: dict = field(default_factory=dict)

    def part(self, mode: str) -> Part | None:
        return next((p for p in self.parts if p.mode == mode), None)

    def splits_at(self, corner: Corner) -> list[dict[str, float]]:
        _, j, k = corner.index
        return self.splits[(j, k)]

    def fraction_range(self, mode: str, corner: Corner) -> tuple[float, float]:
        fr = [s.get(mode, 0.0) for s in self.splits_at(corner)]
        return min(fr), max(fr)

    def summary(self) -> str:
        """The split in words, with its assumption."""
        if not self.parts:
            return self.reason
        parts = " and ".join(p.text() for p in self.parts)
        return f"{self.polarisation}: {parts}; {self.assumption}"


def worst_split(content: ModeContent, corner: Corner, values: dict[str, float],
                sense: str = "max") -> tuple[float, dict[str, float]]:
    """The power-weighted sum Σ f_i values_i at the worst candidate split of `corner`
    (largest for sense "max", smallest for "min"), and that split."""
    best = None
    for split in content.splits_at(corner):
        total = sum(frac * values.get(mode, 0.0) for mode, frac in split.items()
                    if frac > MIN_FRACTION)
        if best is None or (total > best[0] if sense == "max" else total < best[0]):
            best = (total, split)
    return best


def _describe(feed: Feed) -> tuple[str, str]:
    """(the polarisation in words, the assumption it rests on)."""
    la = feed.launch
    if la.polarisation == "as-mode":
        return (f"declared as the {la.mode} mode",
                f"assumption: all power is launched in the {la.mode} mode (polarisation "
                "'as-mode' in the specification), not derived from the launcher")
    edge = ("split at the tenuous plasma edge into the characteristic waves for the launch "
            f"angle {math.degrees(la.angle_to_field):.3g}° to B")
    if la.polarisation in ("circular-right", "circular-left"):
        return f"{la.polarisation.replace('-', ' ')} polarisation (declared)", edge
    if la.polarisation == "linear" and la.e_angle_to_field is not None:
        return (f"linear polarisation with E at {math.degrees(la.e_angle_to_field):.3g}° to "
                "the projection of B (declared)", edge)
    what = ("linear polarisation (declared), E direction not declared" if la.polarisation
            else "polarisation not declared: linear (the dominant mode of the line), E direction "
                 "unknown")
    return what, edge + "; the worse of E along and across B is taken"


def _jones_candidates(feed: Feed) -> list[np.ndarray]:
    la = feed.launch
    if la.polarisation in ("circular-right", "circular-left"):
        return [launched_jones(la.polarisation)]
    if la.polarisation == "linear" and la.e_angle_to_field is not None:
        return [launched_jones("linear", la.e_angle_to_field)]
    return [launched_jones("linear", 0.0), launched_jones("linear", math.pi / 2)]


def _compute(ctx, feed: Feed) -> ModeContent:
    mode = feed.launch.mode.upper()
    pair = (mode, PARTNER[mode])
    polarisation, assumption = _describe(feed)
    if feed.absorption in NEAR_FIELD:
        return ModeContent(feed, pair, (), polarisation, assumption, False,
                           f"{feed.absorption} coupling works through the near field of an "
                           "antenna: no launched wave to split")
    path = launch_path(ctx, feed)
    if path.problem:
        return ModeContent(feed, pair, (), polarisation, assumption, False, path.problem)
    f_res = ecr_field(path.frequencies)
    unmagnetised = bool(np.max(path.b) < UNMAGNETISED_Y * float(np.min(f_res)))
    splits: dict = {}
    theta = float(feed.launch.angle_to_field)
    ions = ctx.model.plasma.ions
    jones = _jones_candidates(feed)
    for j in range(path.scales.size):
        for k, f in enumerate(path.frequencies):
            if unmagnetised:
                splits[(j, k)] = [{mode: 1.0}]
                continue
            if feed.launch.polarisation == "as-mode":
                splits[(j, k)] = [{mode: 1.0, PARTNER[mode]: 0.0}]
                continue
            # the field where the wave enters the plasma; a vanishing field is taken in its
            # limit (circular waves off 90°), not as the degenerate unmagnetised case
            b_edge = max(float(path.b[j, 0]), 1e-9 * float(ecr_field(f)))
            waves = characteristic_polarisations(float(f), b_edge, theta, pair, ions)
            cands = []
            for v in jones:
                fr = mode_fractions(waves, v)
                if not any(all(abs(fr[m] - c[m]) < 1e-12 for m in pair) for c in cands):
                    cands.append(fr)
            splits[(j, k)] = cands
    if unmagnetised:
        parts = (Part(mode, 1.0, 1.0),)
        polarisation = f"{polarisation}; no magnetic field on the path: one wave (n² = P)"
    else:
        parts = []
        for m in pair:
            values = [c.get(m, 0.0) for cands in splits.values() for c in cands]
            if max(values) > MIN_FRACTION:
                parts.append(Part(m, min(values), max(values)))
        parts = tuple(parts)
    return ModeContent(feed, pair, parts, polarisation, assumption, unmagnetised, "", splits)


def mode_content(ctx, feed: Feed) -> ModeContent:
    """The parts of `feed`'s launched power (cached for the run)."""
    key = ("mode-content", feed.id)
    if key not in ctx._cache:
        ctx._cache[key] = _compute(ctx, feed)
    return ctx._cache[key]
