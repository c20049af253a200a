"""Exposure analyses shared by the exposure rules, the characteristics and the report: the
leak estimate at the occupied distance (survey or derived) and the static-field lines.
Pure functions of the model and the envelope, cached per run; no verdicts here.

Leak estimate, per feed at each of its envelope frequencies, worst frequency kept:

* survey: S = S_m · (P / P_m) · (d_m / d)², P the feed's average forward power and P_m the
  forward power during the survey (not declared: P_m = P, stated); a broadband reading
  (no feed named, several feeds) scales with the sum of the feeds' average powers and is
  judged against the strictest of their levels;
* derived: every leak path reached by the feed passes P 10^(−A(f)/10) (a seam's declared
  attenuation; an aperture's from its geometry) and radiates it as a small leak of
  directivity D_l: S = D_l P_leak / (4π d²), all paths taken to face the person (the
  worst case).

The exposure ratio is Σ over feeds of S_i / S_RL(f_i). The estimate holds only beyond the
far-field distance of every contributing leak (and, for a survey, outward of the reading).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from rfcheck.findings import quantity_json as _q
from rfcheck.model import Feed, LeakPath, SourceModel
from rfcheck.physics.apertures import array_attenuation_db, tube_attenuation_db, tube_cutoff
from rfcheck.physics.exposure import (
    ReferenceLevel,
    far_field_distance,
    leaked_power,
    point_leak_power_density,
    reference_level,
)

from . import magnet_field
from .state import RunState

__all__ = ["Contribution", "FeedExposure", "LeakAnalysis", "leak_analysis",
           "path_attenuation_db", "path_cutoff", "exposure_characteristics"]


@dataclass(frozen=True)
class Contribution:
    """One leak path or survey reading for one feed, at that feed's worst frequency."""

    source: str  # "path <id>" or "reading <n>"
    power_density: float  # W/m^2 at the occupied distance
    far_field: float  # m, far-field distance of the leaking spot
    attenuation_db: float | None = None  # derived paths
    leaked_power: float | None = None  # W, derived paths
    reading_distance: float | None = None  # m, survey readings


@dataclass(frozen=True)
class FeedExposure:
    """The exposure from one feed (or, id "broadband", from broadband survey readings)."""

    feed: str
    average_power: float  # W
    frequency: float  # Hz, the worst of the feed's envelope frequencies
    level: ReferenceLevel
    power_density: float  # W/m^2 at the occupied distance
    contributions: tuple[Contribution, ...]

    @property
    def ratio(self) -> float:
        return self.power_density / self.level.power_density

    @property
    def far_field(self) -> float:
        return max((c.far_field for c in self.contributions), default=0.0)


@dataclass(frozen=True)
class LeakAnalysis:
    model: str  # "survey" or "derived"
    occupied_distance: float
    directivity: float
    feeds: tuple[FeedExposure, ...]
    outside_table: tuple[str, ...]  # feeds whose frequency the table does not cover
    assumptions: tuple[str, ...]

    @property
    def ratio(self) -> float:
        return float(sum(f.ratio for f in self.feeds))

    @property
    def far_field(self) -> float:
        """Largest far-field distance of any contributing leak, m."""
        return max((f.far_field for f in self.feeds), default=0.0)

    @property
    def far_field_source(self) -> str:
        best, name = -1.0, ""
        for f in self.feeds:
            for c in f.contributions:
                if c.far_field > best:
                    best, name = c.far_field, c.source
        return name

    @property
    def reading_distance(self) -> float:
        """Largest survey distance (0 for derived leaks), m: the estimate goes outward only."""
        return max((c.reading_distance or 0.0 for f in self.feeds for c in f.contributions),
                   default=0.0)

    @property
    def in_far_field(self) -> bool:
        return self.occupied_distance >= max(self.far_field, self.reading_distance)

    def distance_to(self, fraction: float) -> float:
        """Distance at which the inverse-square estimate falls to `fraction` of the level, m."""
        return self.occupied_distance * math.sqrt(self.ratio / fraction)


def fringe_lines(ctx: RunState, levels: dict[str, float]):
    """{option name: FringeExtent} over the envelope's current scales (cached), or None for a
    magnet without a finite extent (a uniform field)."""
    key = ("fringe", tuple(sorted(levels.items())))
    if key not in ctx._cache:
        from rfcheck.magnet.fringe import fringe_extent

        names = list(levels)
        got = fringe_extent(magnet_field.field_model(ctx), ctx.model.magnet, ctx.model.chamber,
                            [levels[n] for n in names], ctx.envelope.current_scale)
        ctx._cache[key] = None if got is None else dict(zip(names, got))
    return ctx._cache[key]


def path_cutoff(path: LeakPath) -> float:
    """Cutoff (Hz) of an aperture path's cells."""
    return tube_cutoff(path.shape, diameter=path.diameter, width=path.width, height=path.height)


def path_attenuation_db(path: LeakPath, f) -> np.ndarray:
    """Attenuation (dB) of a leak path below the forward power at frequencies `f`."""
    f = np.asarray(f, dtype=float)
    if path.kind == "seam":
        return np.full(f.shape, float(path.attenuation_db))
    single = tube_attenuation_db(path.shape, path.depth, f, diameter=path.diameter,
                                 width=path.width, height=path.height)
    return array_attenuation_db(single, path.count)


def _reaches(path: LeakPath, feed: Feed) -> bool:
    return not path.feeds or feed.id in path.feeds


def _worst_level(table, freqs) -> list[ReferenceLevel]:
    return [reference_level(table, float(f)) for f in freqs]


def _derived(model: SourceModel, ctx: RunState, directivity: float):
    exp = model.exposure
    d = exp.occupied_distance
    out, outside = [], []
    for feed in model.feeds:
        freqs = ctx.envelope.frequencies(feed)
        levels = _worst_level(exp.table, freqs)
        if not all(np.isfinite(lv.power_density) for lv in levels):
            outside.append(feed.id)
            continue
        paths = [p for p in exp.leak.paths if _reaches(p, feed)]
        att = np.array([path_attenuation_db(p, freqs) for p in paths]).reshape(len(paths), -1)
        leaked = leaked_power(feed.average_power, att)  # (paths, f)
        s = point_leak_power_density(leaked, d, directivity)
        s_lim = np.array([lv.power_density for lv in levels])
        ratio = s.sum(axis=0) / s_lim if paths else np.zeros(len(freqs))
        k = int(np.argmax(ratio))
        contribs = tuple(
            Contribution(f"path {p.id}", float(s[j, k]),
                         float(np.max(far_field_distance(p.size, freqs))),
                         attenuation_db=float(att[j, k]), leaked_power=float(leaked[j, k]))
            for j, p in enumerate(paths))
        out.append(FeedExposure(feed.id, feed.average_power, float(freqs[k]), levels[k],
                                float(s[:, k].sum()) if paths else 0.0, contribs))
    return out, outside


def _survey(model: SourceModel, ctx: RunState):
    exp = model.exposure
    d = exp.occupied_distance
    feeds = {f.id: f for f in model.feeds}
    notes, out, outside = [], [], []
    readings = list(exp.leak.readings)
    if len(feeds) == 1:  # a reading without a feed is the one feed's
        only = next(iter(feeds))
        readings = [r if r.feed else replace(r, feed=only) for r in readings]
    groups: dict[str, list] = {}
    for i, r in enumerate(readings):
        groups.setdefault(r.feed or "broadband", []).append((i, r))
    for key, items in groups.items():
        members = [feeds[key]] if key in feeds else list(feeds.values())
        power = float(sum(f.average_power for f in members))
        best = None
        for f in members:
            freqs = ctx.envelope.frequencies(f)
            for lv in _worst_level(exp.table, freqs):
                if not np.isfinite(lv.power_density):
                    outside.append(f.id)
                    continue
                if best is None or lv.power_density < best.power_density:
                    best = lv
        if best is None:
            continue
        contribs = []
        for i, r in items:
            scale = power / r.forward_power if r.forward_power else 1.0
            if not r.forward_power:
                notes.append(f"reading {i + 1}: the survey's forward power is not declared; "
                             f"the reading is taken as made at the operating power "
                             f"({power:.4g} W average)")
            if r.size is None:
                notes.append(f"reading {i + 1}: the leaking spot's size is not declared; taken "
                             "as smaller than λ/2 (far field beyond one wavelength)")
            s = r.power_density * scale * (r.distance / d) ** 2
            contribs.append(Contribution(f"reading {i + 1}", float(s),
                                         float(far_field_distance(r.size or 0.0, best.frequency)),
                                         reading_distance=r.distance))
        total = float(sum(c.power_density for c in contribs))
        out.append(FeedExposure(key, power, best.frequency, best, total, tuple(contribs)))
        if key == "broadband":
            notes.append("broadband readings (no feed named) scale with the sum of the feeds' "
                         "average powers and are judged at the strictest of their levels")
    return out, sorted(set(outside)), notes


def leak_analysis(ctx: RunState, directivity: float) -> LeakAnalysis | None:
    """The leak estimate of the model's [exposure] section (None without a declared leak)."""
    exp = ctx.model.exposure
    if exp is None or exp.leak is None:
        return None
    key = ("leak", directivity)
    if key not in ctx._cache:
        if exp.leak.model == "derived":
            feeds, outside = _derived(ctx.model, ctx, directivity)
            notes = [f"every leak path is taken to face the person at {exp.occupied_distance:g} m "
                     "with the whole forward power incident on it (the worst case)"]
        else:
            feeds, outside, notes = _survey(ctx.model, ctx)
        ctx._cache[key] = LeakAnalysis(exp.leak.model, exp.occupied_distance, directivity,
                                       tuple(feeds), tuple(outside), tuple(notes))
    return ctx._cache[key]


def exposure_characteristics(ctx: RunState, directivity: float) -> dict:
    """JSON-ready numbers of the leak estimate (no verdicts)."""
    a = leak_analysis(ctx, directivity)
    if a is None:
        return {}
    return {
        "leak_model": a.model,
        "table": ctx.model.exposure.table.id,
        "occupied_distance": _q(a.occupied_distance, "m"),
        "exposure_ratio": _q(a.ratio, "1"),
        "far_field_distance": _q(a.far_field, "m"),
        "feeds": {f.feed: {"average_power": _q(f.average_power, "W"),
                           "frequency": _q(f.frequency, "Hz"),
                           "power_density": _q(f.power_density, "W/m^2"),
                           "reference_level": _q(f.level.power_density, "W/m^2"),
                           "ratio": _q(f.ratio, "1")} for f in a.feeds},
    }
