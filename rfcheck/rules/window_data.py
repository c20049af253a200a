"""The window numbers shared by the window rules, `line.breakdown`, the characteristics and the
report figure: each window's response over its feed's frequency band and thickness corners,
computed once per run and cached on the Context.

Materials come from the library (``rfcheck/data/materials.toml``) and from the spec's
[[material]] tables; a spec material of the same id wins over the library.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass, field

import numpy as np

from rfcheck.findings import quantity_json as _q
from rfcheck.model import Feed, SourceModel, Window
from rfcheck.physics.multilayer import (
    Embedding,
    Layer,
    line_embedding,
    reflection_band,
    window_materials,
    window_response,
)
from rfcheck.physics.rfpower import disc_temperature_rise, return_loss_db, vswr
from rfcheck.physics.waveguide import Line, guide_wavelength, line_from_name

__all__ = ["FREQUENCY_POINTS", "BAND_POINTS", "BAND_SPAN", "WindowMaterial", "WindowAnalysis",
           "resolve_material", "window_analysis", "embedding_text", "window_characteristics"]

#: Frequencies sampled across f ± tolerance (odd: the nominal frequency is a sample; the
#: envelope's 5 frequencies are among them).
FREQUENCY_POINTS = 41
#: Half-width of the search for the reflection band, as a fraction of the feed frequency.
BAND_SPAN = 0.5
#: Samples over that search span before the band edges are refined by bisection.
BAND_POINTS = 2001
#: Above this many thickness combinations (3^n for n toleranced layers) only the corners
#: (2^n) are evaluated.
MAX_COMBINATIONS = 729


@dataclass(frozen=True)
class WindowMaterial:
    """A window material as used in one run (library values, or the spec's own)."""

    id: str
    eps_r: float
    tan_delta: float
    origin: str  # "library" or "spec"
    source: str = ""
    thermal_conductivity: float | None = None
    cautions: tuple[str, ...] = ()


def resolve_material(model: SourceModel, material_id: str) -> WindowMaterial:
    """A spec [[material]] of that id, else the library entry; ValueError if neither exists."""
    for m in model.materials:
        if m.id == material_id:
            return WindowMaterial(m.id, float(m.permittivity), float(m.loss_tangent), "spec",
                                  m.source, m.thermal_conductivity, tuple(m.cautions))
    table = window_materials()
    if material_id not in table:
        raise ValueError(f"unknown window material {material_id!r}: define it in a [[material]] "
                         f"table or use one of {', '.join(sorted(table))}")
    row = table[material_id]
    k = row.get("thermal_conductivity")
    return WindowMaterial(material_id, float(row["eps_r"]), float(row["tan_delta"]), "library",
                          str(row.get("source", "")), None if k is None else float(k),
                          tuple(row.get("cautions", ())))


def _levels(n_tol: int) -> tuple[float, ...]:
    return (-1.0, 0.0, 1.0) if 3 ** n_tol <= MAX_COMBINATIONS else (-1.0, 1.0)


@dataclass
class WindowAnalysis:
    """One window on its feed's line, evaluated over f ± tolerance × thickness combinations.

    ``thickness`` has shape (n_combo, n_layer); ``gamma`` and ``absorptance`` have shape
    (n_combo, n_freq). Row ``nominal`` is the nominal stack. NaN where the line does not
    propagate.
    """

    window: Window
    feed: Feed
    line: Line
    embedding: Embedding
    materials: tuple[WindowMaterial, ...]
    frequency: np.ndarray
    thickness: np.ndarray
    nominal: int
    gamma: np.ndarray
    absorptance: np.ndarray
    _bands: dict = field(default_factory=dict, repr=False)

    # ---- stacks

    def layers(self, row: int | None = None) -> list[Layer]:
        """The stack at thickness row ``row`` (nominal if None)."""
        t = self.thickness[self.nominal if row is None else row]
        return [Layer(m.eps_r, m.tan_delta, float(d)) for m, d in zip(self.materials, t)]

    def gamma_over(self, f: np.ndarray) -> np.ndarray:
        """|Γ| at frequencies ``f`` (1-D) for every thickness row: shape (n_combo, len(f))."""
        stack = [Layer(m.eps_r, m.tan_delta, self.thickness[:, i:i + 1])
                 for i, m in enumerate(self.materials)]
        f = np.asarray(f, dtype=float)
        return np.abs(window_response(f[None, :], stack, self.embedding).gamma)

    # ---- worst points (NaN counts as worst: a band the line does not carry is never better)

    def _worst(self, values: np.ndarray) -> tuple[float, float, tuple[float, ...]]:
        key = np.where(np.isnan(values), np.inf, values)
        i, j = np.unravel_index(int(np.argmax(key)), values.shape)
        return float(values[i, j]), float(self.frequency[j]), tuple(map(float, self.thickness[i]))

    @property
    def worst_gamma(self) -> tuple[float, float, tuple[float, ...]]:
        """(largest |Γ|, its frequency in Hz, the layer thicknesses in m)."""
        return self._worst(self.gamma)

    @property
    def worst_absorptance(self) -> tuple[float, float, tuple[float, ...]]:
        """(largest absorbed fraction, its frequency in Hz, the layer thicknesses in m)."""
        return self._worst(self.absorptance)

    @property
    def centre(self) -> int:
        return self.frequency.size // 2

    @property
    def nominal_gamma(self) -> float:
        return float(self.gamma[self.nominal, self.centre])

    @property
    def nominal_absorptance(self) -> float:
        return float(self.absorptance[self.nominal, self.centre])

    # ---- band

    def band(self, limit: float) -> tuple[float, float, bool, bool]:
        """Band around the feed frequency where |Γ| ≤ ``limit`` for every thickness row.

        The contiguous band of the worst case is the intersection of each row's contiguous
        band around the centre (physics.multilayer.reflection_band). Returns (low, high,
        low_open, high_open); NaN edges when |Γ| exceeds the limit at the feed frequency.
        An open edge reached the searched span (±BAND_SPAN of f): the true edge lies beyond.
        """
        key = round(float(limit), 12)
        if key not in self._bands:
            lo, hi, lo_open, hi_open = -math.inf, math.inf, False, False
            for row in range(self.thickness.shape[0]):
                b = reflection_band(self.layers(row), self.feed.frequency, limit, self.embedding,
                                    span=BAND_SPAN, points=BAND_POINTS)
                if math.isnan(b.low):
                    lo = hi = math.nan
                    lo_open = hi_open = False
                    break
                if b.low > lo or (b.low == lo and not b.low_open):
                    lo, lo_open = b.low, b.low_open
                if b.high < hi or (b.high == hi and not b.high_open):
                    hi, hi_open = b.high, b.high_open
            self._bands[key] = (lo, hi, lo_open, hi_open)
        return self._bands[key]

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
        t = (thickness or tuple(self.thickness[self.nominal]))[0]
        return float(disc_temperature_rise(absorbed, k, t)), ""

    def half_wave_thickness(self, layer: int = 0) -> float:
        """λ_g/2 of the feed's mode inside layer ``layer`` at the feed frequency, m.

        The filled-guide cutoff is the empty guide's divided by √ε_r (0 for a plane wave):
        a single lossless slab between equal media reflects nothing at d = N λ_g/2.
        """
        eps = self.materials[layer].eps_r
        cutoff = self.embedding.cutoff / math.sqrt(eps)
        return float(guide_wavelength(self.feed.frequency, cutoff, eps)) / 2.0


def _layer_tolerances(window: Window) -> np.ndarray:
    return np.array([la.thickness_tolerance for la in window.layers], dtype=float)


def _thickness_rows(window: Window) -> tuple[np.ndarray, int]:
    """Thickness combinations (n_combo, n_layer) over ±tolerance, and the nominal row."""
    nominal = np.array([la.thickness for la in window.layers], dtype=float)
    tol = _layer_tolerances(window)
    varied = np.nonzero(tol > 0)[0]
    levels = _levels(varied.size)
    product = list(itertools.product(levels, repeat=varied.size))
    combos = np.array(product, dtype=float).reshape(len(product), varied.size)
    rows = np.repeat(nominal[None, :], combos.shape[0], axis=0)
    rows[:, varied] += combos * tol[varied]
    rows = np.maximum(rows, 0.0)
    zero = np.all(combos == 0.0, axis=1)
    if not zero.any():  # corners only: add the nominal stack as its own row
        rows = np.vstack([rows, nominal])
        return rows, rows.shape[0] - 1
    return rows, int(np.nonzero(zero)[0][0])


def _frequencies(feed: Feed) -> np.ndarray:
    if feed.frequency_tolerance <= 0:
        return np.array([feed.frequency])
    f = np.linspace(feed.frequency - feed.frequency_tolerance,
                    feed.frequency + feed.frequency_tolerance, FREQUENCY_POINTS)
    f[FREQUENCY_POINTS // 2] = feed.frequency
    return f


def window_analysis(ctx, window: Window) -> WindowAnalysis:
    """The response of ``window`` over its feed's band and thickness tolerance (cached on ctx)."""
    key = ("window-analysis", window.id)
    if key not in ctx._cache:
        model = ctx.model
        feed = model.feed(window.feed)
        line = line_from_name(feed.line)
        emb = line_embedding(line)
        materials = tuple(resolve_material(model, la.material) for la in window.layers)
        f = _frequencies(feed)
        rows, nominal = _thickness_rows(window)
        stack = [Layer(m.eps_r, m.tan_delta, rows[:, i:i + 1]) for i, m in enumerate(materials)]
        resp = window_response(f[None, :], stack, emb)
        gamma = np.abs(resp.gamma)
        absorptance = np.broadcast_to(resp.absorptance, gamma.shape).copy()
        ctx._cache[key] = WindowAnalysis(window, feed, line, emb, materials, f, rows, nominal,
                                         gamma, absorptance)
    return ctx._cache[key]


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


def window_characteristics(ctx) -> dict:
    """Per-window numbers at the nominal frequency and thickness (and a few worst cases).

    Returns ``{window_id: {...}}`` with JSON-ready values ``{"value", "unit"}`` (``None``
    with a ``"reason"`` where a value is undefined; never NaN or infinity).
    """
    out: dict = {}
    for window in ctx.model.windows:
        a = window_analysis(ctx, window)
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
        }
        cautions = [c for m in a.materials for c in m.cautions]
        if cautions:
            entry["cautions"] = cautions
        out[window.id] = entry
    return out
