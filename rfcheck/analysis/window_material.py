"""Window materials as a run uses them: nominal values, the spreads that enter the worst
cases, and the loss tangent at the feed's frequency, each with a note saying where it came
from.

Materials come from the library (``rfcheck/data/materials.toml``) and from the spec's
[[material]] tables; a spec material of the same id wins over the library. A spread comes
from the spec (``permittivity_range``, ``loss_tangent_range``) or the library (``eps_r_range``,
``tan_delta_range``); where none is declared, the default spread of the library's
``[default_spread]`` table is assumed (worst case where the user has not said) and the
findings say so. Loss tangents are scaled to the feed's frequency by
:func:`rfcheck.physics.multilayer.loss_tangent_scale` (up ∝ f, never down).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

from rfcheck import data
from rfcheck.model import SourceModel
from rfcheck.physics.multilayer import loss_tangent_scale, window_materials

__all__ = ["WindowMaterial", "MaterialSpread", "resolve_material", "default_spread",
           "material_spread"]


@dataclass(frozen=True)
class WindowMaterial:
    """A window material as used in one run (library values, or the spec's own).

    ``eps_r_range`` / ``tan_delta_range``: the declared spread (low, high), None if none is
    declared; ``frequency``: where the values are quoted (Hz), None if unknown.
    """

    id: str
    eps_r: float
    tan_delta: float
    origin: str  # "library" or "spec"
    source: str = ""
    thermal_conductivity: float | None = None
    cautions: tuple[str, ...] = ()
    eps_r_range: tuple[float, float] | None = None
    tan_delta_range: tuple[float, float] | None = None
    frequency: float | None = None


@dataclass(frozen=True)
class MaterialSpread:
    """A material's values at one feed: (low, nominal, high) of ε_r and of tan δ (the latter
    scaled to the feed's frequency), how each spread was obtained ("library", "spec" or
    "default") and the loss-tangent scale factor."""

    material: WindowMaterial
    eps_r: tuple[float, float, float]
    tan_delta: tuple[float, float, float]
    eps_r_from: str
    tan_delta_from: str
    loss_scale: float
    frequency: float  # Hz, where the loss tangent is evaluated

    def notes(self) -> tuple[list[str], list[str]]:
        """(spreads included, spreads not declared or flagged), as phrases for messages."""
        m = self.material
        included, missing = [], []
        lo, _, hi = self.eps_r
        if self.eps_r_from == "default":
            missing.append(f"{m.id}: no ε_r spread declared, ±{default_spread()['eps_r_relative']:.0%} "
                           f"assumed ({lo:.4g}–{hi:.4g})")
        else:
            included.append(f"{m.id} ε_r {lo:.4g}–{hi:.4g} ({self.eps_r_from})")
        lo, _, hi = self.tan_delta
        s = self.loss_scale
        f_ghz = self.frequency / 1e9
        if self.tan_delta_from == "default":
            missing.append(f"{m.id}: no tan δ range declared, up to "
                           f"{default_spread()['tan_delta_factor']:.3g}× the stated value assumed "
                           f"({lo / s:.3g}–{hi / s:.3g})")
        else:
            included.append(f"{m.id} tan δ {lo / s:.3g}–{hi / s:.3g} ({self.tan_delta_from})")
        if m.frequency is None:
            missing.append(f"{m.id}: tan δ has no quoted frequency, used unscaled at "
                           f"{f_ghz:.4g} GHz (give the frequency it was measured at)")
        elif s > 1.0:
            included.append(f"{m.id} tan δ quoted at {m.frequency / 1e9:.4g} GHz, scaled ∝ f to "
                            f"{f_ghz:.4g} GHz (×{s:.3g}: {lo:.3g}–{hi:.3g})")
        elif m.frequency != self.frequency:
            included.append(f"{m.id} tan δ quoted at {m.frequency / 1e9:.4g} GHz, not scaled down "
                            f"to {f_ghz:.4g} GHz")
        return included, missing


def resolve_material(model: SourceModel, material_id: str) -> WindowMaterial:
    """A spec [[material]] of that id, else the library entry; ValueError if neither exists."""
    for m in model.materials:
        if m.id == material_id:
            return WindowMaterial(m.id, float(m.permittivity), float(m.loss_tangent), "spec",
                                  m.source, m.thermal_conductivity, tuple(m.cautions),
                                  _pair(m.permittivity_range), _pair(m.loss_tangent_range),
                                  m.frequency)
    table = window_materials()
    if material_id not in table:
        raise ValueError(f"unknown window material {material_id!r}: define it in a [[material]] "
                         f"table or use one of {', '.join(sorted(table))}")
    row = table[material_id]
    k = row.get("thermal_conductivity")
    f = row.get("frequency_hz")
    return WindowMaterial(material_id, float(row["eps_r"]), float(row["tan_delta"]), "library",
                          str(row.get("source", "")), None if k is None else float(k),
                          tuple(row.get("cautions", ())), _pair(row.get("eps_r_range")),
                          _pair(row.get("tan_delta_range")), None if f is None else float(f))


def _pair(x) -> tuple[float, float] | None:
    return None if x is None else (float(x[0]), float(x[1]))


@lru_cache(maxsize=1)
def default_spread() -> dict:
    """The library's ``[default_spread]`` table (relative ε_r spread, tan δ factor, sources)."""
    return dict(data.load("materials.toml")["default_spread"])


def material_spread(m: WindowMaterial, frequency: float) -> MaterialSpread:
    """The spreads of ``m`` used at ``frequency`` (Hz: the top of the feed's band, where the
    scaled loss is largest)."""
    d = default_spread()
    origin = "library range" if m.origin == "library" else "spec range"
    if m.eps_r_range is not None:
        eps, eps_from = (m.eps_r_range[0], m.eps_r, m.eps_r_range[1]), origin
    else:
        rel = float(d["eps_r_relative"])
        eps, eps_from = (max(1.0, m.eps_r * (1 - rel)), m.eps_r, m.eps_r * (1 + rel)), "default"
    if m.tan_delta_range is not None:
        tand, tand_from = (m.tan_delta_range[0], m.tan_delta, m.tan_delta_range[1]), origin
    else:
        tand = (m.tan_delta, m.tan_delta, m.tan_delta * float(d["tan_delta_factor"]))
        tand_from = "default"
    scale = loss_tangent_scale(m.frequency, frequency)
    return MaterialSpread(m, tuple(map(float, eps)), tuple(float(t * scale) for t in tand),
                          eps_from, tand_from, scale, float(frequency))
