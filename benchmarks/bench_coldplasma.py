"""Cold-plasma core against PlasmaPy, timed in the same run; prints ratios, agreement, memory.

    python benchmarks/bench_coldplasma.py

1. Stix S, D, P for N = 1e3 and 1e6 random points (electrons + D+, 10 MHz-200 GHz,
   1e12-1e21 m^-3, 0-10 T): rfcheck ``stix`` vs PlasmaPy ``cold_plasma_permittivity_SDP``
   (array inputs, ion mass pinned to the same value on both sides).
2. Refractive index on 200 (B, n) points x 91 angles: rfcheck ``refractive_index_squared``
   (one broadcast call) vs PlasmaPy's ``stix`` dispersion solver (scalar B: one call per point).
3. Peak traced memory (tracemalloc) of ``stix`` at N = 1e6.

Targets: >= 100x at N = 1e3, >= 4x at N = 1e6, >= 1000x on the angle grid. Both codes do
the same work in the same run, alternating, and the ratio is that of the medians
(benchmarks/harness.py); a call at N = 1e3 is repeated in a loop of fixed length on both sides
so that each timed sample lasts a few milliseconds.

    python benchmarks/bench_coldplasma.py [--quick]
"""

from __future__ import annotations

import sys
import tracemalloc
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
from harness import Row, alternate, cli_main  # noqa: E402

from rfcheck.physics.coldplasma import refractive_index_squared, stix
from rfcheck.physics.constants import C
from rfcheck.physics.species import parse_species


def looped(func, number: int):
    """`func` called `number` times: one timed sample of a short call."""
    def run():
        for _ in range(number):
            func()
    return run


def random_points(n: int, seed: int):
    rng = np.random.default_rng(seed)
    f = 10 ** rng.uniform(7, np.log10(2e11), n)
    dens = 10 ** rng.uniform(12, 21, n)
    b = rng.uniform(0, 10, n)
    return f, b, dens


def bench_sdp(u, dielectric, pinned_deuteron, quick: bool) -> list[Row]:
    rows = []
    cases = ((1_000, 3, 5), (20_000, 1, 1)) if quick else ((1_000, 15, 20), (1_000_000, 5, 1))
    for n, repeat, number in cases:
        f, b, dens = random_points(n, seed=n)

        def theirs():
            density = dens * u.m**-3
            return dielectric.cold_plasma_permittivity_SDP(
                b * u.T, ["e-", pinned_deuteron], [density, density], 2 * np.pi * f * u.rad / u.s
            )

        def ours():
            return stix(f, b, dens, ions="D+")

        ref_t, our_t = alternate(looped(theirs, number), looped(ours, number), repeat,
                                 "PlasmaPy", "rfcheck")
        ref, got = theirs(), ours()
        rel = [np.abs(getattr(got, k) / r.value - 1) for k, r in zip("SDP", ref)]
        median = max(np.median(r[np.isfinite(r)]) for r in rel)
        target = ">= 100" if n == 1_000 else ">= 4"
        rows.append(Row(f"Stix S, D, P at N = {n:,}: PlasmaPy / rfcheck",
                        ref_t.median / our_t.median, "x", "" if quick and n != 1_000 else target,
                        f"{ref_t.text()}; {our_t.text()} ({number} calls per sample); "
                        f"median rel. diff {median:.1e}"))
    return rows


def bench_angles(u, stix_solver, particle_cls, quick: bool) -> list[Row]:
    rng = np.random.default_rng(200)
    f = 2.45e9
    b = rng.uniform(0.01, 0.3, 200)
    n_e = 10 ** rng.uniform(15, 18, 200)
    theta = np.linspace(0, np.pi / 2, 91)
    proton = particle_cls("p+")
    w = 2 * np.pi * f

    def theirs():
        out = np.empty((200, 91, 4), dtype=complex)
        for i in range(200):
            out[i] = stix_solver(
                B=b[i] * u.T, w=w * u.rad / u.s, ions=proton, n_i=n_e[i] * u.m**-3, theta=theta * u.rad
            ).value
        return out

    def ours():
        return refractive_index_squared(f, b[:, None], n_e[:, None], theta, ions="H+")

    ref_t, our_t = alternate(theirs, looped(ours, 20), 1 if quick else 3, "PlasmaPy", "rfcheck")
    t_ref, t_ours = ref_t.median, our_t.median / 20
    k = theirs()
    n2_ref = (k * C / w) ** 2
    ref_pair = np.sort(np.stack([n2_ref[..., 0].real, n2_ref[..., 2].real]), axis=0)
    got = ours()
    got_pair = np.sort(np.stack([got.o, got.x]), axis=0)
    # PlasmaPy's solver uses the textbook quadratic formula, which loses digits on the
    # resonance cone: compare where |A| is not small.
    e = stix(f, b[:, None], n_e[:, None], ions="H+")
    a = e.S * np.sin(theta) ** 2 + e.P * np.cos(theta) ** 2
    scale = np.abs(e.S) * np.sin(theta) ** 2 + np.abs(e.P) * np.cos(theta) ** 2
    away = np.abs(a) > 1e-3 * scale
    rel = np.abs(got_pair / ref_pair - 1)[:, away]
    return [Row("n² on 200 points x 91 angles: PlasmaPy / rfcheck", t_ref / t_ours, "x",
                ">= 1000", f"PlasmaPy {t_ref * 1e3:.1f} ms (200 calls), rfcheck "
                           f"{t_ours * 1e3:.3f} ms (1 call); away from the cone "
                           f"({away.mean():.1%}): max rel. diff {rel.max():.1e}")]


def peak_memory(quick: bool) -> list[Row]:
    n = 20_000 if quick else 1_000_000
    f, b, dens = random_points(n, seed=1)
    stix(f, b, dens, ions="D+")  # warm caches
    tracemalloc.start()
    stix(f, b, dens, ions="D+")
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    return [Row(f"stix peak traced memory at N = {n:,}", peak / 2**20, "MiB", "",
                "the five outputs included (8 MB each at 1e6); inputs not counted")]


def measure(quick: bool = False) -> list[Row]:
    import astropy.units as u
    from plasmapy.dispersion.analytical.stix_ import stix as stix_solver
    from plasmapy.formulary import dielectric
    from plasmapy.particles import CustomParticle, Particle

    deuteron = parse_species("D+")
    pinned = CustomParticle(mass=deuteron.mass * u.kg, charge=deuteron.charge * u.C)
    return (bench_sdp(u, dielectric, pinned, quick) + bench_angles(u, stix_solver, Particle, quick)
            + peak_memory(quick))


def main() -> None:
    cli_main(measure)


if __name__ == "__main__":
    main()
