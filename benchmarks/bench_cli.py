"""Whole-run cost of `rfcheck check SPEC --json -` against importing its runtime dependencies.

Target (project-wide): the check takes at most 2x the time of merely importing numpy, scipy,
pint (with its registry), magpylib and jinja2, measured in the same run on the same machine.
Prints the ratio; it is a benchmark, not a test.

    python benchmarks/bench_cli.py [SPEC] [--repeat N]
"""

from __future__ import annotations

import argparse
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
REFERENCE = (
    "import numpy, scipy, scipy.special, scipy.optimize, scipy.interpolate, jinja2, magpylib\n"
    "import pint; pint.UnitRegistry()\n"
)


def timed(cmd: list[str]) -> float:
    t0 = time.perf_counter()
    proc = subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    dt = time.perf_counter() - t0
    if proc.returncode not in (0, 1):
        raise SystemExit(f"{' '.join(cmd)} exited {proc.returncode}: {proc.stderr[-500:]}")
    return dt


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("spec", nargs="?", default=str(ROOT / "examples" / "bench-ecr-reactor.toml"))
    ap.add_argument("--repeat", type=int, default=5)
    args = ap.parse_args()
    # an installed package runs from compiled bytecode (pip compiles it); do the same here even
    # where PYTHONDONTWRITEBYTECODE is set, so the ratio measures the product, not the compiler
    import compileall

    import rfcheck

    compileall.compile_dir(str(Path(rfcheck.__file__).parent), quiet=1)
    ref_cmd = [sys.executable, "-c", REFERENCE]
    run_cmd = [sys.executable, "-m", "rfcheck.cli", "check", args.spec, "--json", "-"]
    timed(ref_cmd), timed(run_cmd)  # warm the file cache
    ref, run = [], []
    for _ in range(args.repeat):  # interleave so drift hits both equally
        ref.append(timed(ref_cmd))
        run.append(timed(run_cmd))
    r, c = statistics.median(ref), statistics.median(run)
    print(f"import numpy+scipy+pint(registry)+magpylib+jinja2: {r * 1e3:8.1f} ms (median of {args.repeat})")
    print(f"rfcheck check {Path(args.spec).name} --json -:    {c * 1e3:8.1f} ms")
    print(f"ratio: {c / r:.2f}  (target <= 2.0) -> {'met' if c / r <= 2.0 else 'NOT met'}")
    # weasyprint and matplotlib must not be imported for a JSON-only run
    probe = subprocess.run(
        [sys.executable, "-c",
         "import sys, runpy; sys.argv=['rfcheck','check',%r,'--json','-'];\n"
         "from rfcheck.cli import main\nimport io, contextlib\n"
         "with contextlib.redirect_stdout(io.StringIO()):\n    main(sys.argv[1:])\n"
         "print(sorted(m for m in ('weasyprint','matplotlib') if m in sys.modules))" % args.spec],
        capture_output=True, text=True)
    print(f"heavy modules imported by a JSON-only run: {probe.stdout.strip() or probe.stderr[-300:]}")


if __name__ == "__main__":
    main()
