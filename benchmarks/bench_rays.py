"""Benchmark: a 49-ray Gaussian beam through the minimum-B example against one check of it.

Both sides run in a fresh interpreter (same start-up, same imports of the field engine),
alternating, in the same run: the reference is ``rfcheck check
examples/min-b-ion-source.toml --json FILE``; the candidate loads the same spec, builds the
ray study's field grid (rfcheck.analysis.rays.ray_grid) and traces one beam of 1 + 3 × 16 = 49
rays (waist 10 mm at the injection plug, 0.05 rad off the axis, the R branch at the peak
density and nominal current, the rules' tolerance and budget) to the ECR layer. The ratio of
the medians is printed (target ≤ 2); CPU times are reported beside the wall times.

Run: python benchmarks/bench_rays.py [--quick]
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from harness import Row, Timing, cli_main, run_process  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
SPEC = ROOT / "examples" / "min-b-ion-source.toml"

BEAM = f"""
import math, numpy as np
from rfcheck.spec import load_spec
from rfcheck.rules.context import Context
from rfcheck.analysis.envelope import Envelope
from rfcheck.analysis import rays as R
from rfcheck.analysis.launch_path import profile_shape, collision_frequency
from rfcheck.physics.frequencies import ecr_field
from rfcheck.physics.rays import trace_beam
model = load_spec({str(SPEC)!r}).model
ctx = Context(model, Envelope.of(model))
ch, feed, plasma = model.chamber, model.feeds[0], model.plasma
grid = R.ray_grid(ctx)
n_peak = plasma.density.max
nu = float(collision_frequency(plasma, n_peak, plasma.electron_temperature.min,
                               plasma.neutral.pressure.min))
beam = trace_beam(feed.frequency, [0.0, 0.0, ch.z_start], [math.sin(0.05), 0.0, math.cos(0.05)],
                  0.01, "R", R.scaled_field(grid, 1.0),
                  lambda p: n_peak * profile_shape(plasma.profile, ch, p[:, 2]),
                  rings=R.BEAM_RINGS, per_ring=R.BEAM_PER_RING,
                  max_length=R.LENGTH_FACTOR * ch.length, ions=plasma.ions,
                  collision_frequency=nu,
                  inside=lambda p: np.minimum(ch.radius - np.hypot(p[:, 0], p[:, 1]),
                                              ch.z_end - p[:, 2]),
                  cyclotron_field=float(ecr_field(feed.frequency)), rtol=R.RAY_RTOL,
                  max_evaluations=R.RAY_BUDGET)
assert len(beam.rays) == 49
print(len(beam.rays), beam.share("cyclotron_layer"))
"""


def measure(quick: bool = False) -> list[Row]:
    repeat = 1 if quick else 5
    with tempfile.TemporaryDirectory() as tmp:
        out = str(Path(tmp) / "check.json")
        check_cmd = [sys.executable, "-m", "rfcheck.cli", "check", str(SPEC), "--json", out]
        beam_cmd = [sys.executable, "-c", BEAM]
        check, beam = Timing("check --json"), Timing("49-ray beam")
        check_cpu, beam_cpu = Timing("check cpu"), Timing("beam cpu")
        run_process(check_cmd)  # warm-up of both (file caches)
        run_process(beam_cmd, ok_codes=(0,))
        for _ in range(repeat):
            check.times.append(run_process(check_cmd, cpu=check_cpu))
            beam.times.append(run_process(beam_cmd, ok_codes=(0,), cpu=beam_cpu))
    return [Row("49-ray beam through min-B / one check of min-B", beam.median / check.median,
                "x", "<= 2",
                f"{beam.text()}; {check.text()}; CPU ratio "
                f"{beam_cpu.median / check_cpu.median:.2f}")]


def main() -> None:
    cli_main(measure)


if __name__ == "__main__":
    main()
