"""Benchmark: per-point cost of a coil-current x frequency map against single checks.

Both sides are the command line, on the bench reactor, in the same run, alternating:

* reference: ``rfcheck check SPEC --json FILE`` on a spec file holding one point's values
  (what a designer does today for each point);
* candidate: ``rfcheck sweep SPEC --vary 'magnet.coils[upstream].current=55 A:77 A:N'
  --vary 'feed[main].frequency=2.40 GHz:2.50 GHz:N' --jobs J --json FILE --quiet``, its wall
  time divided by its N x N points.

Printed: the ratio of the per-point medians (target: the sweep >= 100x cheaper per point),
points per second, and the peak memory of the evaluation (no JSON written: the study's arrays
only) at min(N, 21) squared points and at about a quarter of them, in one serial process
(target: flat, ratio <= 1.2).

    python benchmarks/bench_sweep.py [--quick]       # --quick: 3 x 3 (checks that it runs)
    RFCHECK_SWEEP_SIDE=101 RFCHECK_SWEEP_REPEAT=1 python benchmarks/bench_sweep.py
                                                     # the full 101 x 101 map (~15 min)
"""

from __future__ import annotations

import copy
import os
import sys
import tempfile
import tomllib
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from harness import Row, Timing, cli_main, peak_rss_mib, run_process  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
SPEC = ROOT / "examples" / "bench-ecr-reactor.toml"
CURRENT = "magnet.coils[upstream].current=55 A:77 A:{n}"
FREQUENCY = "feed[main].frequency=2.40 GHz:2.50 GHz:{n}"


def _vary(n: int) -> list[str]:
    return ["--vary", CURRENT.format(n=n), "--vary", FREQUENCY.format(n=n)]


def measure(quick: bool = False) -> list[Row]:
    import tomli_w

    side = 3 if quick else int(os.environ.get("RFCHECK_SWEEP_SIDE", "21"))
    jobs = 1 if quick else int(os.environ.get("RFCHECK_SWEEP_JOBS", "2"))
    repeat = 1 if quick else int(os.environ.get("RFCHECK_SWEEP_REPEAT", "3"))
    points = side * side
    with tempfile.TemporaryDirectory() as tmp:
        raw = tomllib.loads(SPEC.read_text())
        point = copy.deepcopy(raw)  # one interior point of the map
        point["magnet"]["coils"][0]["current"] = "60.5 A"
        point["feed"][0]["frequency"] = "2.425 GHz"
        point_spec = Path(tmp) / "point.toml"
        point_spec.write_text(tomli_w.dumps(point))
        out = str(Path(tmp) / "out.json")
        check_cmd = [sys.executable, "-m", "rfcheck.cli", "check", str(point_spec),
                     "--json", out]
        sweep_cmd = [sys.executable, "-m", "rfcheck.cli", "sweep", str(SPEC), *_vary(side),
                     "--jobs", str(jobs), "--json", out, "--quiet"]
        check, sweep = Timing("check of one point"), Timing(f"sweep {side}x{side}, per point")
        run_process(check_cmd)  # warm-up of the file caches
        for _ in range(repeat):
            check.times.append(run_process(check_cmd))
            sweep.times.append(run_process(sweep_cmd, ok_codes=(0,)) / points)
        check.times.append(run_process(check_cmd))  # the reference on both sides of the last
    ratio = check.median / sweep.median
    rows = [Row(f"check per point / sweep per point ({side}x{side}, --jobs {jobs})", ratio, "x",
                ">= 100", f"{sweep.text()}; {check.text()}; "
                          f"{1.0 / sweep.median:.1f} points/s")]
    # memory in one serial process (no JSON written), at up to 21 x 21 against a quarter of
    # the points: the study keeps a few bytes per point and rule, so the peak is flat
    big_side = min(side, 21)
    small = max(2, big_side // 2)
    code = ("from rfcheck.cli import main\n"
            f"assert main(['sweep', {str(SPEC)!r}, *{_vary(big_side)!r}, '--quiet']) == 0")
    code_small = code.replace(repr(_vary(big_side)), repr(_vary(small)))
    big, little = peak_rss_mib(code), peak_rss_mib(code_small)
    rows.append(Row(f"peak memory {big_side}x{big_side} / {small}x{small} (evaluation only)",
                    big / little, "x", "<= 1.2", f"{big:.0f} MiB against {little:.0f} MiB"))
    return rows


def main() -> None:
    cli_main(measure)


if __name__ == "__main__":
    main()
