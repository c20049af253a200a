"""Whole-run cost of `rfcheck check SPEC --json -` on every bundled example against the
import floor, and of `--pdf` against `--json`.

The import floor is exactly what the target names: a fresh interpreter running
``import numpy, scipy, pint, magpylib, jinja2`` and building one pint ``UnitRegistry`` —
nothing else. Each example's check and the floor are timed alternately in the same run
(medians). Targets: check --json ≤ 1.5 × floor on every example (project-wide), check --pdf ≤
3 × check --json (report issue). A JSON-only run must not import weasyprint or matplotlib.

    python benchmarks/bench_cli.py [--repeat N] [--quick]
"""

from __future__ import annotations

import argparse
import os
import subprocess
import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from harness import Row, Timing, print_table, run_process  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
FLOOR = "import numpy, scipy, pint, magpylib, jinja2\npint.UnitRegistry()\n"


def examples() -> list[Path]:
    return sorted((ROOT / "examples").glob("*.toml"))


def _compile() -> None:
    # an installed package runs from compiled bytecode (pip compiles it); do the same here
    # even where PYTHONDONTWRITEBYTECODE is set, so the ratio measures the product
    import compileall

    import rfcheck

    compileall.compile_dir(str(Path(rfcheck.__file__).parent), quiet=1)


def _is_spec(p: Path) -> bool:
    return "schema" in p.read_text(encoding="utf-8")[:2000] and "[source]" in p.read_text(
        encoding="utf-8")


def measure(quick: bool = False, repeat: int = 7) -> list[Row]:
    _compile()
    repeat = 1 if quick else repeat
    rows: list[Row] = []
    floor_cmd = [sys.executable, "-c", FLOOR]
    specs = [p for p in examples() if _is_spec(p)]
    with tempfile.TemporaryDirectory() as tmp:
        for spec in specs:
            json_cmd = [sys.executable, "-m", "rfcheck.cli", "check", str(spec), "--json", "-"]
            floor, check = Timing("floor"), Timing("check --json")
            run_process(floor_cmd), run_process(json_cmd)  # warm the file cache
            for _ in range(repeat):
                floor.times.append(run_process(floor_cmd))
                check.times.append(run_process(json_cmd))
            rows.append(Row(f"check --json {spec.stem} / import floor",
                            check.median / floor.median, "x", "<= 1.5",
                            f"{check.text()}; {floor.text()}"))
            if quick and spec != specs[0]:
                continue  # quick mode: one PDF shows that the comparison runs
            pdf = Path(tmp) / f"{spec.stem}.pdf"
            pdf_cmd = [sys.executable, "-m", "rfcheck.cli", "check", str(spec), "--pdf", str(pdf)]
            js, pd = Timing("check --json"), Timing("check --pdf")
            for _ in range(1 if quick else max(3, repeat // 2)):
                js.times.append(run_process(json_cmd))
                pd.times.append(run_process(pdf_cmd))
            rows.append(Row(f"check --pdf {spec.stem} / check --json", pd.median / js.median,
                            "x", "<= 3", f"{pd.text()}; {js.text()}"))
    probe = subprocess.run(
        [sys.executable, "-c",
         "import sys, io, contextlib\nfrom rfcheck.cli import main\n"
         f"with contextlib.redirect_stdout(io.StringIO()):\n    main(['check', {str(specs[0])!r}, '--json', '-'])\n"
         "print(len([m for m in ('weasyprint', 'matplotlib') if m in sys.modules]))"],
        capture_output=True, text=True, env={**os.environ})
    heavy = int(probe.stdout.strip().splitlines()[-1]) if probe.stdout.strip() else 99
    rows.append(Row("heavy modules (weasyprint, matplotlib) in a JSON-only run", heavy, "",
                    "<= 0"))
    return rows


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=7)
    ap.add_argument("--quick", action="store_true", help="run once: checks that it executes")
    args = ap.parse_args()
    print_table(measure(args.quick, args.repeat), args.quick)


if __name__ == "__main__":
    main()
