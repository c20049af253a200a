"""The window numbers shared by the window rules, `line.breakdown`, the characteristics and the
report figure: each window's worst cases over its feed's frequency band and the spread of
every layer (thickness ± tolerance, ε_r and tan δ over their ranges), computed once per run
and cached on the Context.

Materials and their spreads come from :mod:`rfcheck.rules.window_material` (library, spec,
or the stated default spread; loss tangents scaled to the feed's frequency). The searches
are :func:`rfcheck.physics.window_spread.worst_over_spread` (|Γ| and the absorbed fraction)
and :func:`~rfcheck.physics.window_spread.band_over_spread` (the reflection band): bounded
in cost whatever the number of layers, with the argument in that module's docstring.

Budget of one analysis: two searches of at most ``MAX_COMBINATIONS`` combinations over
``FREQUENCY_POINTS`` frequencies, and per band limit asked for at most
``(1 + 2 · BAND_ITERATIONS) · BAND_COMBINATIONS`` combinations over ``BAND_SIDE_POINTS``
frequencies plus the band scans of at most ``BAND_ITERATIONS · 2 + 3`` stacks over
``BAND_POINTS`` frequencies: ``ANALYSIS_COMBINATIONS`` below, whatever the stack.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from rfcheck.findings import quantity_json as _q
from rfcheck.model import Feed, Window
from rfcheck.physics.multilayer import Embedding, line_embedding
from rfcheck.physics.rfpower import disc_temperature_rise, return_loss_db, vswr
from rfcheck.physics.waveguide import Line, guide_wavelength, line_from_name
from rfcheck.physics.window_spread import (
    BAND_COMBINATIONS,
    BAND_ITERATIONS,
    MAX_COMBINATIONS,
    MAX_LAYERS,
    LayerSpread,
    SpreadBand,
    SpreadWorst,
    StackPoint,
    band_over_spread,
    spread_response,
    worst_over_spread,
)

from .window_material import MaterialSpread, WindowMaterial, material_spread, resolve_material

__all__ = ["FREQUENCY_POINTS", "BAND_POINTS", "BAND_SPAN", "ANALYSIS_COMBINATIONS",
           "WindowMaterial", "WindowAnalysis", "resolve_material", "window_analysis",
           "embedding_text", "window_characteristics"]

#: Frequencies sampled across f ± tolerance (odd: the nominal frequency is a sample; the
#: envelope's 5 frequencies are among them).
FREQUENCY_POINTS = 41
#: Half-width of the search for the reflection band, as a fraction of the feed frequency.
BAND_SPAN = 0.5
#: Samples over that search span before the band edges are refined by bisection.
BAND_POINTS = 2001
#: Most stack combinations one analysis evaluates with one band limit (module docstring):
#: the reflection and absorption searches and one band, whatever the number of layers.
ANALYSIS_COMBINATIONS = 2 * MAX_COMBINATIONS + (1 + 2 * BAND_ITERATIONS) * BAND_COMBINATIONS

_KINDS = ("thickness", "permittivity", "loss_tangent")


@dataclass
class WindowAnalysis:
    """One window on its feed's line over f ± tolerance and the spread of its layers.

    ``spreads`` holds each layer's material spread at the feed (ε_r, tan δ scaled to the
    top of the band); ``box`` each layer's (low, nominal, high) of thickness, ε_r and tan δ.
    ``gamma`` and ``absorptance`` are the nominal stack's |Γ| and absorbed fraction over
    ``frequency``; ``reflection`` and ``absorption`` are the worst cases over the box
    (NaN where the line does not propagate).
    """

    window: Window
    feed: Feed
    line: Line
    embedding: Embedding
    materials: tuple[WindowMaterial, ...]
    spreads: tuple[MaterialSpread, ...]
    box: tuple[LayerSpread, ...]
    frequency: np.ndarray
    gamma: np.ndarray
    absorptance: np.ndarray
    reflection: SpreadWorst
    absorption: SpreadWorst
    _bands: dict = field(default_factory=dict, repr=False)

    # ---- the parameter box

    @property
    def nominal_point(self) -> StackPoint:
        return StackPoint(*(tuple(getattr(b, k)[1] for b in self.box) for k in LayerSpread._fields))

    def varied(self) -> list[tuple[int, str]]:
        """(layer index, parameter) of every parameter with a spread, in layer order."""
        return [(i, name) for i, b in enumerate(self.box)
                for name, (lo, _n, hi) in zip(_KINDS, b) if hi > lo]

    def notes(self) -> tuple[list[str], list[str]]:
        """(spreads included, spreads not declared or flagged), as phrases for messages."""
        included, missing = [], []
        multi = len(self.window.layers) > 1
        for i, la in enumerate(self.window.layers):
            where = f"layer {i + 1} " if multi else ""
            if la.thickness_tolerance > 0:
                included.append(f"{where}thickness ±{_mm(la.thickness_tolerance)}")
            else:
                missing.append(f"{where}thickness: no tolerance given, nominal "
                               f"{_mm(la.thickness)} only")
        seen = set()
        for sp in self.spreads:
            if sp.material.id in seen:
                continue
            seen.add(sp.material.id)
            inc, mis = sp.notes()
            included += inc
            missing += mis
        return included, missing

    @property
    def evaluations(self) -> int:
        """Stack combinations evaluated so far (searches and bands), each over its frequencies."""
        return (self.reflection.evaluations + self.absorption.evaluations
                + sum(b.evaluations for b in self._bands.values()))

    # ---- worst points (NaN counts as worst: a band the line does not carry is never better)

    @property
    def worst_gamma(self) -> tuple[float, float, tuple[float, ...]]:
        """(largest |Γ|, its frequency in Hz, the layer thicknesses in m); the full point,
        with ε_r and tan δ, is ``reflection.point``."""
        r = self.reflection
        return r.value, r.frequency, r.point.thickness

    @property
    def worst_absorptance(self) -> tuple[float, float, tuple[float, ...]]:
        """(largest absorbed fraction, its frequency in Hz, the layer thicknesses in m); the
        full point is ``absorption.point`` (every tan δ at the top of its range)."""
        a = self.absorption
        return a.value, a.frequency, a.point.thickness

    @property
    def centre(self) -> int:
        return self.frequency.size // 2

    @property
    def nominal_gamma(self) -> float:
        return float(self.gamma[self.centre])

    @property
    def nominal_absorptance(self) -> float:
        return float(self.absorptance[self.centre])

    # ---- stacks for the figure

    def points(self) -> list[StackPoint]:
        """The nominal stack first, then the worst combinations found (distinct)."""
        out = [self.nominal_point]
        cands = [self.reflection.point, self.absorption.point]
        for b in self._bands.values():
            cands += [p for p in (b.low_point, b.high_point) if p is not None]
        for p in cands:
            if p not in out:
                out.append(p)
        return out

    def gamma_over(self, f: np.ndarray) -> np.ndarray:
        """|Γ| at frequencies ``f`` (1-D) of each of :meth:`points` (row 0 nominal):
        shape (n_points, len(f))."""
        rows = np.array([np.array(p).T for p in self.points()])  # (k, n, 3)
        g, _a = spread_response(np.asarray(f, dtype=float), rows, self.embedding)
        return np.abs(g)

    nominal = 0  # row of the nominal stack in gamma_over

    # ---- band

    def band_detail(self, limit: float) -> SpreadBand:
        """Band around the feed frequency where |Γ| ≤ ``limit`` for the worst combinations
        of the box (physics.window_spread.band_over_spread), cached per limit."""
        key = round(float(limit), 12)
        if key not in self._bands:
            if math.isnan(self.reflection.value):
                nan = math.nan
                self._bands[key] = SpreadBand(nan, nan, False, False, None, None, 0, 0, True)
            else:
                self._bands[key] = band_over_spread(
                    self.feed.frequency, limit, self.box, self.embedding, span=BAND_SPAN,
                    points=BAND_POINTS, seeds=(self.reflection.point,))
        return self._bands[key]

    def band(self, limit: float) -> tuple[float, float, bool, bool]:
        """(low, high, low_open, high_open) of :meth:`band_detail`; NaN edges when |Γ|
        exceeds the limit at the feed frequency for some combination. An open edge reached
        the searched span (±BAND_SPAN of f): the true edge lies beyond."""
        b = self.band_detail(limit)
        return b.low, b.high, b.low_open, b.high_open

    # ---- thermal and thickness estimates

    def temperature_rise(self, absorbed: float, thickness: tuple[float, ...] | None = None
                         ) -> tuple[float | None, str]:
        """Centre-to-edge rise of an edge-cooled disc (physics.rfpower.disc_temperature_rise).

        Only for a single-layer window with a diameter and a material with a thermal
        conductivity; else (None, why not).
        """
        if len(self.materials) != 1:
            return None, "multilayer window: absorbed power is not split by layer"
        if self.window.diameter is None:
            return None, "no window diameter given"
        k = self.materials[0].thermal_conductivity
        if k is None:
            return None, f"no thermal conductivity for material {self.materials[0].id}"
        t = (thickness or (self.window.layers[0].thickness,))[0]
        return float(disc_temperature_rise(absorbed, k, t)), ""

    def half_wave_thickness(self, layer: int = 0) -> float:
        """λ_g/2 of the feed's mode inside layer ``layer`` at the feed frequency (nominal ε_r), m.

        The filled-guide cutoff is the empty guide's divided by √ε_r (0 for a plane wave):
        a single lossless slab between equal media reflects nothing at d = N λ_g/2.
        """
        eps = self.materials[layer].eps_r
        cutoff = self.embedding.cutoff / math.sqrt(eps)
        return float(guide_wavelength(self.feed.frequency, cutoff, eps)) / 2.0


def _mm(t: float) -> str:
    return f"{t * 1e3:.4g} mm"


def _frequencies(feed: Feed) -> np.ndarray:
    if feed.frequency_tolerance <= 0:
        return np.array([feed.frequency])
    f = np.linspace(feed.frequency - feed.frequency_tolerance,
                    feed.frequency + feed.frequency_tolerance, FREQUENCY_POINTS)
    f[FREQUENCY_POINTS // 2] = feed.frequency
    return f


def window_analysis(ctx, window: Window) -> WindowAnalysis:
    """The worst cases of ``window`` over its feed's band and its layers' spreads (cached on ctx).

    ValueError for an unknown material or more than MAX_LAYERS layers.
    """
    model = ctx.model
    # the parts it reads: the window, its feed (frequency band, line) and the materials
    return ctx.memo(("window-analysis", window.id),
                    (window, model.feed(window.feed), model.materials),
                    lambda: _window_analysis(model, window))


def _window_analysis(model, window: Window) -> WindowAnalysis:
    """The computation of :func:`window_analysis` from the model alone."""
    feed = model.feed(window.feed)
    line = line_from_name(feed.line)
    emb = line_embedding(line)
    if len(window.layers) > MAX_LAYERS:
        raise ValueError(f"window {window.id} has {len(window.layers)} layers; the window "
                         f"analysis evaluates at most {MAX_LAYERS}")
    materials = tuple(resolve_material(model, la.material) for la in window.layers)
    f = _frequencies(feed)
    # loss tangents at the top of the band, where the ∝ f rule makes them largest
    f_top = float(f.max())
    spreads = tuple(material_spread(m, f_top) for m in materials)
    box = tuple(LayerSpread((la.thickness - la.thickness_tolerance, la.thickness,
                             la.thickness + la.thickness_tolerance), sp.eps_r, sp.tan_delta)
                for la, sp in zip(window.layers, spreads))
    nominal = np.array([[[b.thickness[1], b.eps_r[1], b.tan_delta[1]] for b in box]])
    g, a = spread_response(f, nominal, emb)
    reflection = worst_over_spread(f, box, emb, quantity="reflection")
    absorption = worst_over_spread(f, box, emb, quantity="absorption")
    return WindowAnalysis(window, feed, line, emb, materials, spreads, box, f,
                          np.abs(g[0]), a[0], reflection, absorption)


def embedding_text(a: WindowAnalysis) -> str:
    """How the window is embedded, in words (for messages and characteristics)."""
    if a.line.kind == "free-space":
        return "plane wave at normal incidence in free space"
    if a.line.kind == "coaxial":
        return f"TEM mode of {a.line.name}"
    return f"{a.line.dominant_mode} mode of {a.line.name}"


# --------------------------------------------------------------------------------------
# characteristics (numbers for the JSON and the report; no verdicts)
# --------------------------------------------------------------------------------------
def _reflection_free(a: WindowAnalysis) -> dict:
    if len(a.materials) != 1:
        return {"value": None, "unit": "m",
                "reason": "multilayer window: no single reflection-free thickness"}
    half = a.half_wave_thickness(0)
    if not math.isfinite(half):
        return {"value": None, "unit": "m", "reason": "the mode does not propagate in the layer"}
    n0 = max(1, round(a.window.layers[0].thickness / half))
    return {"value": [float(n * half) for n in (n0 - 1, n0, n0 + 1) if n >= 1], "unit": "m"}


def _point_json(p: StackPoint) -> dict:
    """A combination as JSON: each layer's thickness (m), ε_r and tan δ."""
    return {"thickness": {"value": list(p.thickness), "unit": "m"},
            "permittivity": {"value": list(p.eps_r), "unit": "1"},
            "loss_tangent": {"value": list(p.tan_delta), "unit": "1"}}


def window_characteristics(ctx) -> dict:
    """Per-window numbers at the nominal frequency and stack, the worst cases over the
    spreads with their points, and which spreads were included.

    Returns ``{window_id: {...}}`` with JSON-ready values ``{"value", "unit"}`` (``None``
    with a ``"reason"`` where a value is undefined; never NaN or infinity).
    """
    out: dict = {}
    for window in ctx.model.windows:
        a = window_analysis(ctx, window)
        included, missing = a.notes()
        no_wave = "the line does not propagate at the feed frequency"
        g = a.nominal_gamma
        worst_g, worst_gf, _ = a.worst_gamma
        worst_a, _, worst_at = a.worst_absorptance
        p_abs = a.feed.average_power * worst_a
        rise, why = a.temperature_rise(p_abs, worst_at) if math.isfinite(p_abs) else (None, no_wave)
        entry = {
            "feed": a.feed.id,
            "line": a.line.name,
            "embedding": embedding_text(a),
            "materials": [m.id for m in a.materials],
            "gamma": _q(g, "1", no_wave),
            "vswr": _q(float(vswr(g)) if math.isfinite(g) else None, "1", no_wave),
            "return_loss": _q(float(return_loss_db(g)) if math.isfinite(g) and g > 0 else None,
                              "dB", no_wave if not math.isfinite(g) else "no reflection"),
            "absorbed_fraction": _q(a.nominal_absorptance, "1", no_wave),
            "gamma_worst": _q(worst_g, "1", no_wave),
            "gamma_worst_frequency": _q(worst_gf, "Hz"),
            "absorbed_fraction_worst": _q(worst_a, "1", no_wave),
            "absorbed_power_worst": _q(p_abs, "W", no_wave),
            "temperature_rise_estimate": _q(rise, "K", why),
            "reflection_free_thicknesses": _reflection_free(a),
            "total_thickness": _q(sum(la.thickness for la in window.layers), "m"),
            "gamma_worst_point": _point_json(a.reflection.point),
            "absorbed_fraction_worst_point": _point_json(a.absorption.point),
            "spreads_included": included,
            "spreads_not_declared": missing,
            "combinations_evaluated": a.evaluations,
        }
        cautions = [c for m in a.materials for c in m.cautions]
        if cautions:
            entry["cautions"] = cautions
        out[window.id] = entry
    return out
