"""Benchmark: a 3-layer window in WR-340 over 1001 frequencies, rfcheck vs scikit-rf.

Both sides compute the complex reflection coefficient of the same stack (perfect walls,
travelling-wave S-parameters), alternating in the same run; the ratio of the medians
(target ≥ 15×) and the largest |Γ| difference are reported.

Run: python benchmarks/bench_window.py [--quick]
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import skrf
from skrf.media import RectangularWaveguide
from skrf.network import cascade_list

from rfcheck.physics.multilayer import Layer, te10_embedding, window_response

sys.path.insert(0, str(Path(__file__).resolve().parent))
from harness import Row, alternate, cli_main  # noqa: E402

A, B = 86.36e-3, 43.18e-3  # WR-340 (EIA RS-261-B)
F = np.linspace(2.2e9, 3.3e9, 1001)
LAYERS = [Layer(9.8, 1e-4, 3.0e-3), Layer(2.1, 2e-4, 12.0e-3), Layer(9.8, 1e-4, 3.0e-3)]


def with_rfcheck():
    return window_response(F, LAYERS, te10_embedding(A)).gamma


def with_scikit_rf():
    freq = skrf.Frequency.from_f(F, unit="Hz")
    empty = RectangularWaveguide(freq, a=A, b=B, rho=0)
    nets = [RectangularWaveguide(freq, a=A, b=B, ep_r=layer.eps_r * (1 - 1j * layer.tan_delta), rho=0)
            .line(layer.thickness, unit="m", s_def="traveling") for layer in LAYERS]
    net = cascade_list(nets)
    net.renormalize(empty.z0_characteristic, s_def="traveling")
    return net.s[:, 0, 0]


def looped(fn, number):
    def run():
        for _ in range(number):
            fn()
    return run


def measure(quick: bool = False) -> list[Row]:
    diff = float(np.max(np.abs(with_rfcheck() - with_scikit_rf())))
    ref, ours = alternate(with_scikit_rf, looped(with_rfcheck, 20), 1 if quick else 7,
                          "scikit-rf", "rfcheck (20 calls)")
    return [Row(f"3-layer WR-340 window, {F.size} frequencies: scikit-rf / rfcheck",
                ref.median / (ours.median / 20), "x", ">= 15",
                f"{ref.text()}; {ours.text()}; max |dGamma| {diff:.1e}")]


def main() -> None:
    cli_main(measure)


if __name__ == "__main__":
    main()
