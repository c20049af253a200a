"""Magnet field engine: cost of a current-scale envelope relative to one evaluation.

A minimum-B style magnet (4 coils + a 24-segment hexapole) on 1e5 points in the chamber:

* one evaluation: a fresh FieldModel, B at nominal current;
* envelope: a fresh FieldModel, B at 41 current scales (1 +/- 2 %) in one call, using the
  cached nominal fields of each source (target: <= 1.5x one evaluation);
* the same 41 scales computed naively (a new magnet per scale) is estimated as 41x one
  evaluation, for context;
* the facet multipole engine against magpylib's exact CylinderSegment on 2000 points.

Run: python benchmarks/bench_magnet.py
"""

from __future__ import annotations

import time

import numpy as np

from rfcheck.magnet.sources import FieldModel
from rfcheck.model import Coil, Magnet, Multipole

N_POINTS = 100_000
SCALES = np.linspace(0.98, 1.02, 41)
CHAMBER_RADIUS = 0.035


def magnet() -> Magnet:
    return Magnet((
        Coil("injection", 0.08, 0.14, 0.02, 0.08, 900, 300.0),
        Coil("injection-2", 0.08, 0.14, 0.10, 0.04, 300, 150.0),
        Coil("extraction-2", 0.08, 0.14, 0.20, 0.04, 300, 120.0),
        Coil("extraction", 0.08, 0.14, 0.28, 0.06, 900, 260.0),
        Multipole("hexapole", 0.04, 0.09, 0.15, 0.34, 1.3, poles=6, segments=24),
    ), current_tolerance=0.02, trap="minimum-b")


def points(n: int, seed: int = 0) -> np.ndarray:
    rng = np.random.default_rng(seed)
    r = CHAMBER_RADIUS * np.sqrt(rng.uniform(0, 1, n))
    phi = rng.uniform(0, 2 * np.pi, n)
    return np.column_stack([r * np.cos(phi), r * np.sin(phi), rng.uniform(0.0, 0.3, n)])


def timed(fn, repeat: int = 3) -> float:
    best = np.inf
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best


def main() -> None:
    p = points(N_POINTS)
    mag = magnet()
    one = timed(lambda: FieldModel(mag, bore_radius=CHAMBER_RADIUS).field(p))
    envelope = timed(lambda: FieldModel(mag, bore_radius=CHAMBER_RADIUS).field(p, SCALES))
    env_mag = timed(lambda: FieldModel(mag, bore_radius=CHAMBER_RADIUS).magnitude(p, SCALES))
    print(f"points: {N_POINTS}, sources: 4 coils + 24-segment hexapole")
    print(f"one evaluation:                       {one:8.3f} s")
    print(f"envelope of {len(SCALES)} scales, B vectors:      {envelope:8.3f} s  "
          f"ratio {envelope / one:5.2f}  (target <= 1.5)")
    print(f"envelope of {len(SCALES)} scales, |B|:            {env_mag:8.3f} s  "
          f"ratio {env_mag / one:5.2f}")
    print(f"naive envelope (41 evaluations), est.: {41 * one:8.3f} s  ratio {41.0:5.2f}")

    q = points(2000, seed=1)
    hexapole = Magnet((mag.sources[-1],))
    facets = timed(lambda: FieldModel(hexapole, bore_radius=CHAMBER_RADIUS).field(q))
    exact_model = FieldModel(hexapole, multipole_engine="segments")
    t0 = time.perf_counter()
    exact = exact_model.field(q)
    segments = time.perf_counter() - t0
    diff = np.linalg.norm(FieldModel(hexapole, bore_radius=CHAMBER_RADIUS).field(q) - exact,
                          axis=1).max() / np.linalg.norm(exact, axis=1).max()
    print(f"hexapole on 2000 points: facets {facets:.3f} s, magpylib CylinderSegment "
          f"{segments:.3f} s, speed-up {segments / facets:5.1f}x, max |dB|/max|B| {diff:.1e}")


if __name__ == "__main__":
    main()
