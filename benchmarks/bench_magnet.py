"""Magnet field engine: a current-scale envelope against the same envelope done naively, and
the facet multipole kernel against magpylib's CylinderSegment — each pair measured on the
same work in the same run, alternating, medians (benchmarks/harness.py).

A minimum-B style magnet (4 coils + a 24-segment hexapole):

* envelope: a fresh FieldModel, |B| at 41 current scales (1 ± 2 %) in one call, using the
  unit fields of each source (linear in each current);
* naive: 41 fresh FieldModels, one per scale, each evaluated — actually computed, not
  multiplied out (target: the envelope costs ≤ 1.5 × one evaluation and so ≥ 20 × less than
  the naive 41);
* the facet multipole engine against magpylib's exact CylinderSegment on 2000 points, both
  with a fresh model each call (cold on both sides).

Run: python benchmarks/bench_magnet.py [--quick]
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
from harness import Row, alternate, cli_main  # noqa: E402

from rfcheck.magnet.sources import FieldModel
from rfcheck.model import Coil, Magnet, Multipole

N_POINTS = 20_000
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


def _scaled(mag: Magnet, k: float) -> Magnet:
    import dataclasses

    return dataclasses.replace(mag, sources=tuple(
        dataclasses.replace(src, current=src.current * k) if isinstance(src, Coil) else src
        for src in mag.sources))


def measure(quick: bool = False, repeat: int = 5) -> list[Row]:
    n = 2_000 if quick else N_POINTS
    scales = SCALES[::10] if quick else SCALES
    repeat = 1 if quick else repeat
    p = points(n)
    mag = magnet()
    magnets = [_scaled(mag, k) for k in scales]

    def envelope():
        return FieldModel(mag, bore_radius=CHAMBER_RADIUS).magnitude(p, scales)

    def naive():
        return [FieldModel(m, bore_radius=CHAMBER_RADIUS).magnitude(p) for m in magnets]

    def one():
        return FieldModel(mag, bore_radius=CHAMBER_RADIUS).magnitude(p)

    env_t, naive_t = alternate(envelope, naive, repeat, "envelope", "naive")
    one_t, env2_t = alternate(one, envelope, repeat, "one evaluation", "envelope")
    got = envelope()
    ref = np.stack([np.asarray(x).reshape(-1) for x in naive()])
    diff = float(np.max(np.abs(got.reshape(ref.shape) - ref)) / np.max(np.abs(ref)))
    rows = [
        Row(f"magnet envelope of {scales.size} scales / one evaluation",
            env2_t.median / one_t.median, "x", "<= 1.5", f"{env2_t.text()}; {one_t.text()}"),
        Row(f"magnet naive {scales.size} evaluations / envelope", naive_t.median / env_t.median,
            "x", ">= 20", f"{naive_t.text()}; {env_t.text()}; max |d|B||/max|B| {diff:.1e}"),
    ]
    q = points(200 if quick else 2000, seed=1)
    hexapole = Magnet((mag.sources[-1],))

    def facets():
        return FieldModel(hexapole, bore_radius=CHAMBER_RADIUS).field(q)

    def segments():
        return FieldModel(hexapole, multipole_engine="segments").field(q)

    seg_t, fac_t = alternate(segments, facets, repeat, "CylinderSegment", "facets")
    exact = segments()
    err = float(np.linalg.norm(facets() - exact, axis=1).max()
                / np.linalg.norm(exact, axis=1).max())
    rows.append(Row("hexapole: magpylib CylinderSegment / facets", seg_t.median / fac_t.median,
                    "x", "", f"{seg_t.text()}; {fac_t.text()}; max |dB|/max|B| {err:.1e}"))
    return rows


def main() -> None:
    cli_main(measure)


if __name__ == "__main__":
    main()
