"""Operating-window maps of every bundled example (for looking at them, and for the docs).

    python tools/example_maps.py OUT_DIR [--side N] [--jobs J] [--pdf] [--only NAME ...]

Each example is swept over two values a designer of that source would turn first (a coil
current or a magnet's remanence, and the frequency, a power or the density), N x N points
around the values the spec writes; JSON (and with --pdf the study report) per example in
OUT_DIR, and one line per example: the verdict counts and the verdict at the spec's own point.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from rfcheck.cli import main as rfcheck

ROOT = Path(__file__).resolve().parents[1]
EX = ROOT / "examples"

#: example -> (site policy or None, [(key, start, stop)] x 2)
MAPS = {
    "bench-ecr-reactor": (None, [("magnet.coils[upstream].current", "50 A", "80 A"),
                                 ("feed[main].frequency", "2.40 GHz", "2.50 GHz")]),
    "bench-ecr-reactor-rev-d": (None, [("magnet.coils[downstream].current", "25 A", "60 A"),
                                       ("feed[main].frequency", "2.40 GHz", "2.50 GHz")]),
    "min-b-ion-source": ("min-b-site-policy", [("magnet.coils[injection].current", "300 A", "400 A"),
                                               ("feed[klystron].frequency", "14.3 GHz", "14.7 GHz")]),
    "dual-frequency-min-b": (None, [("magnet.coils[injection].current", "380 A", "460 A"),
                                    ("feed[klystron].frequency", "14.3 GHz", "14.7 GHz")]),
    "ech-launcher-140ghz": (None, [("magnet.coils[upstream].current", "360 A", "400 A"),
                                   ("feed[gyrotron].frequency", "138 GHz", "142 GHz")]),
    "helicon-source": (None, [("magnet.coils[rear].current", "9 A", "15 A"),
                              ("plasma.density.max", "3e18 m^-3", "6e18 m^-3")]),
    "icp-etch-source": (None, [("feed[coil].power", "1 kW", "3 kW"),
                               ("plasma.neutral.pressure.max", "2 Pa", "8 Pa")]),
    "pm-ecr-thruster": (None, [("magnet.rings[rear-ring].remanence", "1.0 T", "1.4 T"),
                               ("feed[antenna].frequency", "2.40 GHz", "2.50 GHz")]),
    "oblique-beam-reactor": ("min-b-site-policy", [
        ("magnet.coils[injection].current", "320 A", "380 A"),
        ("feed[klystron].frequency", "14.3 GHz", "14.7 GHz")]),
    "starter": (None, [("magnet.coils[c1].current", "50 A", "80 A"),
                       ("feed[main].frequency", "2.40 GHz", "2.50 GHz")]),
}


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("out", type=Path)
    ap.add_argument("--side", type=int, default=11)
    ap.add_argument("--jobs", type=int, default=2)
    ap.add_argument("--pdf", action="store_true")
    ap.add_argument("--only", nargs="*")
    args = ap.parse_args()
    args.out.mkdir(parents=True, exist_ok=True)
    failed = 0
    for name, (policy, axes) in MAPS.items():
        if args.only and name not in args.only:
            continue
        side = min(args.side, 5) if name == "oblique-beam-reactor" else args.side
        argv = ["sweep", str(EX / f"{name}.toml"), "--quiet", "--jobs", str(args.jobs),
                "--json", str(args.out / f"{name}.json")]
        for key, lo, hi in axes:
            argv += ["--vary", f"{key}={lo}:{hi}:{side}"]
        if policy:
            argv += ["--policy", str(EX / f"{policy}.toml")]
        if args.pdf:
            argv += ["--pdf", str(args.out / f"{name}.pdf")]
        print(f"== {name}", flush=True)
        code = rfcheck(argv)
        failed += code != 0
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
