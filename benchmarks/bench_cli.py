"""Whole-run cost of `rfcheck check SPEC --json -` on every bundled example against the
import floor, and of `--pdf` against `--json`.

The import floor is exactly what the target names: a fresh interpreter running
``import numpy, scipy, pint, magpylib, jinja2`` and building one pint ``UnitRegistry`` —
nothing else. Each example's check and the floor are timed alternately in the same run
(medians). Every file in examples/ is benchmarked: each spec on its own, and each site
policy with the spec it was written for (``RUNS_WITH_POLICY``; an example that is neither
a spec nor a listed policy stops the benchmark). The JSON goes to a pipe that the
benchmark reads, as it would in a shell pipeline. Targets: check --json ≤ 1.5 × floor on
every example (project-wide), check --pdf ≤ 3 × check --json (report issue); the target is
judged on wall time, and the ratio of the children's CPU time (user + system, same runs) is
printed beside it because it moves far less with the load of a shared machine. A JSON-only
run must not import weasyprint or matplotlib (checked on every example).

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
    return "[source]" in p.read_text(encoding="utf-8")


#: site policies in examples/ and the spec each was written for (as in tools/approve.py)
RUNS_WITH_POLICY = {"min-b-site-policy.toml": "min-b-ion-source.toml"}


def runs() -> list[tuple[str, list[str]]]:
    """(name, arguments after `check`) for every example: each spec alone, and each site
    policy with its spec. Raises SystemExit if an example would be left out."""
    out, left = [], []
    for p in examples():
        if _is_spec(p):
            out.append((p.stem, [str(p)]))
        elif p.name in RUNS_WITH_POLICY:
            spec = p.parent / RUNS_WITH_POLICY[p.name]
            out.append((f"{spec.stem} --policy {p.stem}", [str(spec), "--policy", str(p)]))
        else:
            left.append(p.name)
    if left:
        raise SystemExit(f"examples not benchmarked (neither a spec nor a listed policy): "
                         f"{', '.join(left)}")
    return out


def _heavy_modules(args: list[str]) -> int:
    """How many of weasyprint and matplotlib a JSON-only run imports (fresh interpreter)."""
    probe = subprocess.run(
        [sys.executable, "-c",
         "import sys, io, contextlib\nfrom rfcheck.cli import main\n"
         "with contextlib.redirect_stdout(io.StringIO()):\n"
         f"    main(['check', *{args!r}, '--json', '-'])\n"
         "print(len([m for m in ('weasyprint', 'matplotlib') if m in sys.modules]))"],
        capture_output=True, text=True, env={**os.environ})
    return int(probe.stdout.strip().splitlines()[-1]) if probe.stdout.strip() else 99


def measure(quick: bool = False, repeat: int = 7, pdf: bool = True) -> list[Row]:
    _compile()
    repeat = 1 if quick else repeat
    rows: list[Row] = []
    floor_cmd = [sys.executable, "-c", FLOOR]
    cases = runs()
    with tempfile.TemporaryDirectory() as tmp:
        for i, (name, args) in enumerate(cases):
            json_cmd = [sys.executable, "-m", "rfcheck.cli", "check", *args, "--json", "-"]
            floor, check = Timing("floor"), Timing("check --json")
            floor_cpu, check_cpu = Timing("floor CPU"), Timing("check --json CPU")
            run_process(floor_cmd), run_process(json_cmd)  # warm the file cache
            for _ in range(repeat):
                floor.times.append(run_process(floor_cmd, cpu=floor_cpu))
                check.times.append(run_process(json_cmd, cpu=check_cpu))
            rows.append(Row(f"check --json {name} / import floor",
                            check.median / floor.median, "x", "<= 1.5",
                            f"{check.text()}; {floor.text()}; CPU time ratio "
                            f"{check_cpu.median / floor_cpu.median:.2f} ({check_cpu.text()}; "
                            f"{floor_cpu.text()})"))
            if not pdf or (quick and i > 0):
                continue  # quick mode: one PDF shows that the comparison runs
            out = Path(tmp) / f"review-{i}.pdf"
            pdf_cmd = [sys.executable, "-m", "rfcheck.cli", "check", *args, "--pdf", str(out)]
            js, pd = Timing("check --json"), Timing("check --pdf")
            for _ in range(1 if quick else max(3, repeat // 2)):
                js.times.append(run_process(json_cmd))
                pd.times.append(run_process(pdf_cmd))
            rows.append(Row(f"check --pdf {name} / check --json", pd.median / js.median,
                            "x", "<= 3", f"{pd.text()}; {js.text()}"))
    heavy = {name: _heavy_modules(args) for name, args in cases}
    rows.append(Row("heavy modules (weasyprint, matplotlib) in a JSON-only run",
                    max(heavy.values()), "", "<= 0",
                    "; ".join(f"{name}: {n}" for name, n in heavy.items())))
    return rows


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=7)
    ap.add_argument("--quick", action="store_true", help="run once: checks that it executes")
    ap.add_argument("--no-pdf", action="store_true", help="only the check --json ratios")
    args = ap.parse_args()
    print_table(measure(args.quick, args.repeat, pdf=not args.no_pdf), args.quick)


if __name__ == "__main__":
    main()
