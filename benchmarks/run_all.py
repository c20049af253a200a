"""Every benchmark in one table of measured values against their targets.

    python benchmarks/run_all.py            # full measurement (several minutes, 2 cores)
    python benchmarks/run_all.py --quick    # one pass at small sizes: checks that every
                                            # benchmark executes (CI); timings not judged

Each benchmark measures both sides of its comparison on the same work in the same run,
alternating, and reports medians (benchmarks/harness.py). Exit code 0 unless a benchmark
failed to run (targets that are not met are reported, not raised).
"""

from __future__ import annotations

import argparse
import importlib
import sys
import traceback
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from harness import print_table  # noqa: E402

BENCHMARKS = ("bench_cli", "bench_scaling", "bench_magnet", "bench_coldplasma", "bench_window",
              "bench_rays", "bench_sweep")


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--quick", action="store_true")
    ap.add_argument("--only", nargs="*", default=None, help="names of benchmarks to run")
    args = ap.parse_args()
    rows, failed = [], []
    for name in args.only or BENCHMARKS:
        try:
            rows += importlib.import_module(name).measure(quick=args.quick)
        except (Exception, SystemExit) as exc:  # report and go on: one table in the end
            failed.append(name)
            print(f"{name} failed: {exc}", file=sys.stderr)
            traceback.print_exc()
    print_table(rows, args.quick)
    if failed:
        print(f"benchmarks that did not run: {', '.join(failed)}", file=sys.stderr)
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
