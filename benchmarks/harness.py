"""Shared measurement for the benchmarks: both sides of a comparison on the same work, in the
same run, alternating, reported as medians with their spread.

A benchmark here never multiplies a time out, never compares a warm side with a cold one,
and never reports a best-of: each side is timed ``repeat`` times in the order
reference, candidate, reference, candidate, … after one warm-up call of each, and the ratio
is formed from the two medians. The spread is the interquartile range relative to the
median. Results are rows of a table (:class:`Row`) that ``run_all.py`` prints together.
"""

from __future__ import annotations

import resource
import statistics
import subprocess
import sys
import time
from collections.abc import Callable
from dataclasses import dataclass, field


@dataclass
class Timing:
    """Repeated wall times of one side, s."""

    label: str
    times: list[float] = field(default_factory=list)

    @property
    def median(self) -> float:
        return statistics.median(self.times)

    @property
    def spread(self) -> float:
        """Interquartile range over the median (0 for a single sample)."""
        if len(self.times) < 2:
            return 0.0
        q = statistics.quantiles(self.times, n=4, method="inclusive")
        return (q[2] - q[0]) / self.median if self.median > 0 else 0.0

    def text(self) -> str:
        return f"{self.label}: {self.median * 1e3:.1f} ms ±{self.spread:.0%} (n={len(self.times)})"


def alternate(reference: Callable[[], object], candidate: Callable[[], object], repeat: int,
              ref_label: str = "reference", cand_label: str = "candidate",
              warmup: bool = True) -> tuple[Timing, Timing]:
    """Time two functions alternately (same work, same run): medians are comparable."""
    ref, cand = Timing(ref_label), Timing(cand_label)
    if warmup:
        reference()
        candidate()
    for _ in range(repeat):
        for side, fn in ((ref, reference), (cand, candidate)):
            t0 = time.perf_counter()
            fn()
            side.times.append(time.perf_counter() - t0)
    return ref, cand


def run_process(cmd: list[str], ok_codes=(0, 1), cpu: Timing | None = None) -> float:
    """Wall time of a subprocess, s; raises SystemExit with its stderr if it fails.

    Its output is read through a pipe (as in a shell pipeline), never sent to a device.
    With `cpu`, the child's user + system CPU time is appended to it as well: on a shared
    machine the wall time of both sides swells with the load, the CPU time much less, so
    the two ratios side by side show whether a change in the wall ratio is real. (CPU time
    counts every thread of the child, so it may exceed the wall time.)"""
    r0 = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.perf_counter()
    proc = subprocess.run(cmd, capture_output=True, text=True)
    dt = time.perf_counter() - t0
    r1 = resource.getrusage(resource.RUSAGE_CHILDREN)
    if cpu is not None:
        cpu.times.append(r1.ru_utime + r1.ru_stime - r0.ru_utime - r0.ru_stime)
    if proc.returncode not in ok_codes:
        raise SystemExit(f"{' '.join(cmd)} exited {proc.returncode}: {proc.stderr[-800:]}")
    return dt


def peak_rss_mib(code: str) -> float:
    """Peak resident memory of a fresh interpreter running `code`, MiB.

    Read from the child's own /proc/self/status (VmHWM, reset at exec), not from ru_maxrss,
    which Linux carries over from the (possibly large) parent across fork and exec."""
    probe = (code + "\nimport sys\n"
             "sys.stderr.write([l for l in open('/proc/self/status') if l.startswith('VmHWM')][0])\n")
    proc = subprocess.run([sys.executable, "-c", probe], stdout=subprocess.DEVNULL,
                          stderr=subprocess.PIPE, text=True)
    for line in proc.stderr.splitlines()[::-1]:
        if line.startswith("VmHWM"):
            return int(line.split()[1]) / 1024.0
    raise SystemExit(f"memory probe failed: {proc.stderr[-800:]}")


def in_child(code: str, *, memory_mib: int = 3072, timeout: float = 120.0) -> str | None:
    """Run `code` in a fresh interpreter under an address-space limit and a time limit, so
    that a benchmark of an input that grows too fast reports the overrun instead of taking
    the machine's memory; returns the child's last stdout line, None if it hit a limit."""
    setup = ("import resource\nresource.setrlimit(resource.RLIMIT_AS, "
             f"({memory_mib} * 2**20, {memory_mib} * 2**20))\n")
    try:
        proc = subprocess.run([sys.executable, "-c", setup + code], capture_output=True,
                              text=True, timeout=timeout)
    except subprocess.TimeoutExpired:
        return None
    if proc.returncode != 0:
        return None
    lines = proc.stdout.strip().splitlines()
    return lines[-1] if lines else None


@dataclass
class Row:
    """One line of the benchmark table."""

    name: str
    value: float
    unit: str  # "x" (a ratio) or a unit such as "s", "MiB", "ms/layer"
    target: str  # e.g. "<= 1.5", ">= 100"
    detail: str = ""

    @property
    def met(self) -> bool | None:
        if not self.target:
            return None
        op, num = self.target.split()
        limit = float(num)
        return self.value <= limit if op == "<=" else self.value >= limit


def print_table(rows: list[Row], quick: bool = False) -> None:
    width = max(len(r.name) for r in rows)
    print(f"{'benchmark':<{width}}  {'measured':>12}  {'target':>10}  status")
    for r in rows:
        status = "" if r.met is None else ("met" if r.met else "NOT met")
        if quick:
            status = "(quick: not judged)"
        print(f"{r.name:<{width}}  {r.value:>10.3g} {r.unit:<2} {r.target:>10}  {status}")
        if r.detail:
            print(f"{'':<{width}}    {r.detail}")


def cli_main(measure: Callable[[bool], list[Row]]) -> None:
    """The command line of every benchmark: `--quick` for CI (checks that it runs)."""
    import argparse

    ap = argparse.ArgumentParser()
    ap.add_argument("--quick", action="store_true")
    args = ap.parse_args()
    print_table(measure(args.quick), args.quick)
