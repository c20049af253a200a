"""The operating envelope as a grid, and the worst point of a quantity over it.

Axes: peak electron density (log-spaced from min to max), magnet current scale
(1 − tol … 1 + tol), feed frequency (f − tol … f + tol) and electron temperature (min, max).
Rules evaluate vectorised over the grid and report the worst point, never the nominal one.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from rfcheck.findings import Quantity
from rfcheck.model import Feed, SourceModel

AXES = ("density", "current_scale", "frequency")
_UNITS = {"density": "m^-3", "current_scale": "1", "frequency": "Hz"}
#: relative spread below which grid values count as one value when the worst is chosen
TIE_RTOL = 1e-9


@dataclass(frozen=True)
class Envelope:
    density: np.ndarray  # (nd,) m^-3
    current_scale: np.ndarray  # (ns,)
    electron_temperature: np.ndarray  # (nt,) eV
    frequency_points: int = 5

    @classmethod
    def of(cls, model: SourceModel, *, density_points: int = 9, scale_points: int = 3,
           frequency_points: int = 5) -> Envelope:
        d = model.plasma.density
        dens = np.geomspace(d.min, d.max, density_points) if d.max > d.min else np.array([d.min])
        tol = model.magnet.current_tolerance
        scale = np.linspace(1 - tol, 1 + tol, scale_points) if tol > 0 else np.array([1.0])
        t = model.plasma.electron_temperature
        temps = np.array([t.min, t.max]) if t.max > t.min else np.array([t.min])
        return cls(dens, scale, temps, frequency_points)

    def frequencies(self, feed: Feed) -> np.ndarray:
        if feed.frequency_tolerance <= 0:
            return np.array([feed.frequency])
        return np.linspace(feed.frequency - feed.frequency_tolerance,
                           feed.frequency + feed.frequency_tolerance, self.frequency_points)

    def grid(self, feed: Feed) -> Grid:
        """Broadcastable axes (density, current scale, frequency) for one feed."""
        f = self.frequencies(feed)
        return Grid(self.density[:, None, None], self.current_scale[None, :, None],
                    f[None, None, :])


@dataclass(frozen=True)
class Grid:
    density: np.ndarray  # (nd, 1, 1)
    current_scale: np.ndarray  # (1, ns, 1)
    frequency: np.ndarray  # (1, 1, nf)

    @property
    def shape(self) -> tuple[int, int, int]:
        return (self.density.shape[0], self.current_scale.shape[1], self.frequency.shape[2])

    def worst(self, values: np.ndarray, sense: str) -> tuple[float, dict[str, Quantity]]:
        """The largest (sense "max") or smallest ("min") value and where it occurs.

        `values` broadcasts against the grid; NaN counts as worst (undefined is never
        better than defined). Only axes the value depends on are named in the worst case.
        """
        v = np.broadcast_to(np.asarray(values, dtype=float), self.shape)
        key = np.where(np.isnan(v), np.inf, v if sense == "max" else -v)
        top = float(np.max(key))
        if math.isfinite(top):
            # values within TIE_RTOL of the extreme are one value computed along different
            # paths (e.g. a multipole's field, the same at every coil-current scale, to
            # rounding): the first grid point among them is the worst case, so the point
            # named does not depend on the last bits of a kernel
            key = np.where(key >= top - TIE_RTOL * max(abs(top), 1e-300), 1.0, 0.0)
        idx = np.unravel_index(int(np.argmax(key)), self.shape)
        raw = np.asarray(values, dtype=float)
        axes = {}
        for i, (name, arr) in enumerate(zip(AXES, (self.density, self.current_scale,
                                                    self.frequency))):
            varies = raw.ndim == 3 and raw.shape[i] > 1 and arr.size > 1
            if varies:
                axes[name] = Quantity(float(arr.reshape(-1)[idx[i]]), _UNITS[name])
        return float(v[idx]), axes
