"""The largest specs rfcheck accepts, run once each: wall time and peak memory against the
stated limit (DEVELOPERS.md "The spec boundary": every count at its bound must stay under
PEAK_LIMIT_MB of resident memory and finish).

    python tools/budgets.py [--only NAME]

Each case is the bench reactor with one count of rfcheck.limits pushed to its bound (and one
case with all the window counts at once); each runs `rfcheck check --json` in a fresh process
and the peak resident set of that process is read from getrusage.
"""

from __future__ import annotations

import argparse
import copy
import math
import resource
import subprocess
import sys
import tempfile
import time
import tomllib
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

import fuzz_inputs as fz  # noqa: E402

from rfcheck.limits import COUNTS  # noqa: E402
from rfcheck.measured import MAX_ROWS  # noqa: E402

#: stated peak resident memory of any accepted spec, MB
PEAK_LIMIT_MB = 1024

BENCH = (fz.EXAMPLES / "bench-ecr-reactor.toml").read_text(encoding="utf-8")


def _layers(doc: dict, n: int) -> None:
    for w in doc["window"]:
        w["layers"] = [{"material": "fused-silica", "thickness": "0.35 mm",
                        "thickness_tolerance": "0.01 mm"}] * n


def case_layers() -> tuple[str, dict]:
    doc = tomllib.loads(BENCH)
    _layers(doc, COUNTS["layers"][0])
    return fz._dump(doc), {}


def case_coils() -> tuple[str, dict]:
    doc = tomllib.loads(BENCH)
    n = COUNTS["coils"][0]
    doc["magnet"]["coils"] = [
        {"id": f"c{k}", "inner_radius": "110 mm", "outer_radius": "160 mm",
         "z": f"{300.0 * k / n:.2f} mm", "length": f"{300.0 / n * 0.9:.3f} mm", "turns": 4,
         "current": "33 A"} for k in range(n)]
    return fz._dump(doc), {}


def case_field_map() -> tuple[str, dict]:
    side = int(math.isqrt(MAX_ROWS))
    rows = ["r [mm], z [mm], Br [T], Bz [T]"]
    for a in range(side):
        r = 80.0 * a / (side - 1)
        for b in range(side):
            z = -5.0 + 310.0 * b / (side - 1)
            rows.append(f"{r:.4f}, {z:.4f}, 0.0, "
                        f"{0.0875 * (1.4 - 0.8 * math.sin(math.pi * z / 300.0)):.6f}")
    doc = tomllib.loads(BENCH)
    doc["magnet"] = {"current_tolerance": "2 %", "trap": "none", "field_map": {"file": "map.csv"}}
    return fz._dump(doc), {"map.csv": ("\n".join(rows) + "\n").encode()}


def case_feeds_windows_layers() -> tuple[str, dict]:
    doc = tomllib.loads(BENCH)
    feed, window = doc["feed"][0], doc["window"][0]
    feeds, per = COUNTS["feed"][0], COUNTS["window"][0] // COUNTS["feed"][0]
    doc["feed"], doc["window"] = [], []
    for k in range(feeds):
        f = copy.deepcopy(feed)
        f["id"] = f"f{k}"
        doc["feed"].append(f)
        for j in range(per):
            w = copy.deepcopy(window)
            w["id"], w["feed"] = f"w{k}-{j}", f["id"]
            doc["window"].append(w)
    _layers(doc, COUNTS["layers"][0])
    for path in doc.get("exposure", {}).get("leak", {}).get("paths", []):
        path["feeds"] = []
    return fz._dump(doc), {}


CASES = {"layers": case_layers, "coils": case_coils, "field-map": case_field_map,
         "feeds-windows-layers": case_feeds_windows_layers}


def run(name: str, folder: Path) -> tuple[int, float, float]:
    spec, files = CASES[name]()
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "spec.toml").write_text(spec, encoding="utf-8")
    for fname, data in files.items():
        (folder / fname).write_bytes(data)
    code = ("import resource, sys\nfrom rfcheck.cli import main\n"
            f"rc = main(['check', {str(folder / 'spec.toml')!r}, '--json', "
            f"{str(folder / 'out.json')!r}])\n"
            "print(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss, file=sys.stderr)\n"
            "sys.exit(rc)\n")
    start = time.perf_counter()
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    seconds = time.perf_counter() - start
    peak_kb = float(proc.stderr.strip().splitlines()[-1]) if proc.stderr.strip() else math.nan
    return proc.returncode, seconds, peak_kb / 1024.0


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--only", choices=sorted(CASES))
    args = ap.parse_args()
    worst = 0.0
    with tempfile.TemporaryDirectory(prefix="rfcheck-budget-") as tmp:
        print(f"{'case':24s} {'exit':>4s} {'seconds':>8s} {'peak MB':>8s}")
        for name in ([args.only] if args.only else CASES):
            rc, seconds, peak = run(name, Path(tmp) / name)
            worst = max(worst, peak)
            print(f"{name:24s} {rc:4d} {seconds:8.1f} {peak:8.0f}")
            if rc not in (0, 1):
                print(f"  {name}: exit {rc}: an accepted spec at its bound must run", file=sys.stderr)
                return 1
    print(f"largest peak {worst:.0f} MB; stated limit {PEAK_LIMIT_MB} MB: "
          + ("within" if worst <= PEAK_LIMIT_MB else "EXCEEDED"))
    return 0 if worst <= PEAK_LIMIT_MB else 1


if __name__ == "__main__":
    raise SystemExit(main())
