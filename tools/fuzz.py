"""Stand-alone fuzz of rfcheck's input boundary: thousands of hostile specs, policies and
measured-field tables, each run through `rfcheck check` in-process (tools/fuzz_inputs.py).

    nice python tools/fuzz.py [--cases 10000] [--seed 1] [--workers 2] [--show 20]

Prints how many cases ran, the exit codes, how many distinct error messages were seen, the
slowest case and every case that broke the contract (exit 3, traceback, terminal warning,
echoed file content, NaN/Infinity in the JSON, a run past its budget). Exit 1 if any did.
Each worker runs under an address-space limit (--memory-gb), so memory is bounded too.
"""

from __future__ import annotations

import argparse
import collections
import multiprocessing as mp
import random
import resource
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

import fuzz_inputs as fz  # noqa: E402


def _init(memory_gb: float) -> None:
    limit = int(memory_gb * 2**30)
    resource.setrlimit(resource.RLIMIT_AS, (limit, limit))
    import rfcheck.cli  # noqa: F401 - warm the imports once per worker


def _work(args):
    index, seed, folder = args
    rng = random.Random(f"{seed}:{index}")
    case = fz.random_case(rng)
    return _run(index, case, Path(folder) / f"w{index % 64}")


def _run(index, case, folder):
    out = fz.run_case(case, folder)
    return (index, case.label, out.code, round(out.seconds, 3), out.problems,
            sorted(fz.message_shape(out.stderr)), out.stderr[-600:] if out.problems else "")


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--cases", type=int, default=10_000)
    ap.add_argument("--seed", default="1")
    ap.add_argument("--workers", type=int, default=2)
    ap.add_argument("--memory-gb", type=float, default=3.0)
    ap.add_argument("--show", type=int, default=20, help="defective cases to print in full")
    args = ap.parse_args()
    start = time.perf_counter()
    codes, labels = collections.Counter(), collections.Counter()
    shapes: set[str] = set()
    bad, slowest = [], (0.0, None)
    with tempfile.TemporaryDirectory(prefix="rfcheck-fuzz-") as tmp:
        specials = fz.special_cases(Path(tmp) / "special")
        _init(args.memory_gb) if args.workers == 0 else None
        with mp.get_context("fork").Pool(max(args.workers, 1), initializer=_init,
                                         initargs=(args.memory_gb,)) as pool:
            jobs = [(i, args.seed, tmp) for i in range(args.cases)]
            results = list(pool.imap_unordered(_work, jobs, chunksize=8))
            results += [pool.apply(_run, (args.cases + k, c, Path(tmp) / "special-run"))
                        for k, c in enumerate(specials)]
    for index, label, code, seconds, problems, shape, tail in results:
        codes[code] += 1
        labels[label.split(":")[0]] += 1
        shapes.update(shape)
        if seconds > slowest[0]:
            slowest = (seconds, (index, label))
        if problems:
            bad.append((index, label, code, problems, tail))
    print(f"cases: {len(results)} (seed {args.seed}) in {time.perf_counter() - start:.0f} s")
    print("by kind: " + ", ".join(f"{k} {n}" for k, n in sorted(labels.items())))
    print("exit codes: " + ", ".join(f"{k}: {n}" for k, n in sorted(codes.items())))
    print(f"distinct error messages (numbers, names and quoted input as placeholders): "
          f"{len(shapes)}")
    print(f"slowest case: {slowest[0]:.2f} s ({slowest[1]})")
    print(f"cases that broke the contract: {len(bad)}")
    for index, label, code, problems, tail in bad[: args.show]:
        print(f"--- case {index} ({label}), exit {code}: {'; '.join(problems)}")
        print("    " + tail.replace("\n", "\n    "))
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
