"""How the cost of one check grows with the size of the source, and its peak memory.

Each variant of the bundled bench reactor is loaded once and run (rfcheck.run, in process,
imports warm) with a fresh Context each time; the variants of one series are timed
alternately, medians. Printed per series: the slope (seconds per added coil, feed or window
layer, least squares over the series) and the non-linearity, the largest cost over the
straight line through the first two points (target ≤ 1.3: linear cost). Also the time of
the window analysis of one 20-layer window with every layer toleranced (target < 1 s), and
the peak resident memory of `rfcheck check --json` on every example (target < 200 MiB).

    python benchmarks/bench_scaling.py [--quick]
"""

from __future__ import annotations

import dataclasses
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
from harness import Row, Timing, peak_rss_mib, cli_main  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "examples" / "bench-ecr-reactor.toml"


def _base():
    from rfcheck.spec import load_spec

    return load_spec(DEMO)


def _run(loaded, model):
    from rfcheck.rules.policy import load_policy
    from rfcheck.run import run

    return run(dataclasses.replace(loaded, model=model), load_policy(None))


def with_coils(model, n: int):
    from rfcheck.model import Coil

    first = next(s for s in model.magnet.sources if isinstance(s, Coil))
    coils = tuple(dataclasses.replace(first, id=f"c{i}", z=first.z + 0.04 * i,
                                      current=first.current / n) for i in range(n))
    return dataclasses.replace(model, magnet=dataclasses.replace(model.magnet, sources=coils))


def with_feeds(model, n: int):
    feed, window = model.feeds[0], model.windows[0]
    feeds = tuple(dataclasses.replace(feed, id=f"f{i}", frequency=feed.frequency * (1 + 0.004 * i))
                  for i in range(n))
    windows = tuple(dataclasses.replace(window, id=f"w{i}", feed=f"f{i}") for i in range(n))
    return dataclasses.replace(model, feeds=feeds, windows=windows)


def with_layers(model, n: int):
    from rfcheck.model import WindowLayer

    window = model.windows[0]
    total = sum(la.thickness for la in window.layers)
    layers = tuple(WindowLayer("fused-silica", total / n, 0.1e-3) for _ in range(n))
    return dataclasses.replace(model, windows=(dataclasses.replace(window, layers=layers),))


def series(loaded, make, sizes, repeat: int) -> tuple[list[Timing], np.ndarray]:
    models = [make(loaded.model, n) for n in sizes]
    timings = [Timing(f"n={n}") for n in sizes]
    for m in models:  # warm-up
        _run(loaded, m)
    for _ in range(repeat):
        for m, t in zip(models, timings):
            t0 = time.perf_counter()
            _run(loaded, m)
            t.times.append(time.perf_counter() - t0)
    return timings, np.array([t.median for t in timings])


def _slope_rows(name: str, unit: str, sizes, timings, medians) -> list[Row]:
    x = np.asarray(sizes, dtype=float)
    slope, icpt = np.polyfit(x, medians, 1)
    line = medians[0] + (medians[1] - medians[0]) / (x[1] - x[0]) * (x - x[0])
    nonlin = float(np.max(medians / np.maximum(line, 1e-9)))
    detail = "; ".join(t.text() for t in timings)
    return [Row(f"cost per {unit} ({name})", slope, "s", "", detail),
            Row(f"non-linearity of the cost in {unit}s", nonlin, "x", "<= 1.3")]


_CHILD = """
import sys, time, statistics
sys.path.insert(0, {here!r})
import bench_scaling as b
loaded = b._base()
{body}
"""


def _child(body: str, timeout: float = 120.0):
    from harness import in_child

    out = in_child(_CHILD.format(here=str(Path(__file__).resolve().parent), body=body),
                   timeout=timeout)
    return None if out is None else [float(x) for x in out.split()]


def layer_series(sizes, repeat: int):
    """The window-layer series in a child process under memory and time limits (a window
    analysis that grows exponentially must report its overrun, not exhaust the machine)."""
    body = (f"sizes = {tuple(sizes)!r}\nmodels = [b.with_layers(loaded.model, n) for n in sizes]\n"
            "for m in models: b._run(loaded, m)\n"
            f"ts = [[] for _ in sizes]\nfor _ in range({repeat}):\n"
            "    for m, t in zip(models, ts):\n"
            "        t0 = time.perf_counter(); b._run(loaded, m); t.append(time.perf_counter() - t0)\n"
            "print(' '.join(str(statistics.median(t)) for t in ts))")
    return _child(body, timeout=60.0 + 30.0 * repeat * len(sizes))


def twenty_layer_window(repeat: int) -> Row:
    body = ("from rfcheck.rules.context import Context\n"
            "from rfcheck.analysis.envelope import Envelope\n"
            "from rfcheck.analysis.window import window_analysis\n"
            "model = b.with_layers(loaded.model, 20)\nts = []\n"
            f"for _ in range({repeat}):\n"
            "    ctx = Context(model, Envelope.of(model)); t0 = time.perf_counter()\n"
            "    a = window_analysis(ctx, model.windows[0]); a.band(0.2)\n"
            "    ts.append(time.perf_counter() - t0)\nprint(statistics.median(ts))")
    got = _child(body)
    if got is None:
        return Row("20-layer toleranced window (analysis + band)", float("inf"), "s", "<= 1",
                   "exceeded the benchmark's limits (3 GiB, 120 s)")
    return Row("20-layer toleranced window (analysis + band)", got[0], "s", "<= 1",
               f"median of {repeat}")


def measure(quick: bool = False) -> list[Row]:
    loaded = _base()
    repeat = 1 if quick else 5
    rows = []
    for name, make, sizes, unit in (
            ("coils", with_coils, (1, 2, 4, 8) if not quick else (1, 2), "coil"),
            ("feeds", with_feeds, (1, 2, 3, 4) if not quick else (1, 2), "feed")):
        timings, med = series(loaded, make, sizes, repeat)
        rows += _slope_rows(name, unit, sizes, timings, med)
    sizes = (1, 2, 4, 8, 16) if not quick else (1, 2)
    med = layer_series(sizes, repeat)
    if med is None:
        rows.append(Row("cost per window layer (layers)", float("inf"), "s", "",
                        "exceeded the benchmark's limits (3 GiB, time)"))
    else:
        timings = [Timing(f"n={n}", [t]) for n, t in zip(sizes, med)]
        rows += _slope_rows("layers", "window layer", sizes, timings, np.array(med))
    rows.append(twenty_layer_window(repeat))
    for spec in sorted((ROOT / "examples").glob("*.toml")):
        text = spec.read_text(encoding="utf-8")
        if "[source]" not in text:
            continue
        code = (f"import io, contextlib\nfrom rfcheck.cli import main\n"
                f"with contextlib.redirect_stdout(io.StringIO()):\n"
                f"    main(['check', {str(spec)!r}, '--json', '-'])")
        rows.append(Row(f"peak memory of check --json {spec.stem}", peak_rss_mib(code), "MiB",
                        "<= 200"))
    return rows


def main() -> None:
    cli_main(measure)


if __name__ == "__main__":
    main()
