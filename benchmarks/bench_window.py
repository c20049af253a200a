"""Benchmark: a 3-layer window in WR-340 over 1001 frequencies, rfcheck vs scikit-rf.

Both sides compute the complex reflection coefficient of the same stack (perfect walls,
travelling-wave S-parameters); the script prints the times, their ratio (target ≥ 10×)
and the largest |Γ| difference, all measured in the same run.

Run: python benchmarks/bench_window.py
"""

from __future__ import annotations

import timeit

import numpy as np
import skrf
from skrf.media import RectangularWaveguide
from skrf.network import cascade_list

from rfcheck.physics.multilayer import Layer, te10_embedding, window_response

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


def best_time(fn, number):
    return min(timeit.repeat(fn, number=number, repeat=5)) / number


def main():
    diff = float(np.max(np.abs(with_rfcheck() - with_scikit_rf())))
    t_ours = best_time(with_rfcheck, 200)
    t_ref = best_time(with_scikit_rf, 5)
    print(f"3-layer window, WR-340, {F.size} frequencies")
    print(f"  rfcheck    {t_ours * 1e3:9.3f} ms")
    print(f"  scikit-rf  {t_ref * 1e3:9.3f} ms")
    print(f"  ratio      {t_ref / t_ours:9.1f} x  (target >= 10 x)")
    print(f"  max |dGamma| {diff:.2e}")


if __name__ == "__main__":
    main()
