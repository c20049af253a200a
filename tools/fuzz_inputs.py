"""Hostile inputs for rfcheck: mutated specs, policies and measured-field tables, and one run.

A *case* starts from one of the bundled example files and a list of mutations. Each
mutation is a plain tuple ``(kind, index, value)`` so that the same mutations can come from
hypothesis strategies (tests/test_fuzz.py, bounded for CI) or from :class:`random.Random`
(tools/fuzz.py, the long stand-alone run). :func:`run_case` writes the case into a fresh
folder, runs ``rfcheck check`` in-process through :func:`rfcheck.cli.main` and classifies the
outcome against the contract for hostile input:

- exit 0 or 1 (a run) with a complete JSON result free of NaN and Infinity, or
- exit 2 with every message line naming a file (``file:line:`` or ``file:``), and
- never exit 3, a traceback, a warning on the terminal, a file's content echoed back, or a run
  past its time budget.
"""

from __future__ import annotations

import contextlib
import datetime as dt
import io
import json
import math
import os
import random
import signal
import time
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

import tomli_w

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "examples"

#: seeds of spec cases (file name in examples/)
SPEC_SEEDS = ("starter.toml", "bench-ecr-reactor.toml", "min-b-ion-source.toml",
              "icp-etch-source.toml", "pm-ecr-thruster.toml", "ech-launcher-140ghz.toml",
              "helicon-source.toml", "bench-ecr-reactor-rev-d.toml",
              "dual-frequency-min-b.toml", "oblique-beam-reactor.toml")
#: the seeds quick enough for the test suite's fuzz (the minimum-B trap, two feeds into it
#: and the traced beam take seconds per case; the stand-alone tools/fuzz.py takes them all)
QUICK_SPEC_SEEDS = tuple(s for s in SPEC_SEEDS if s not in (
    "min-b-ion-source.toml", "dual-frequency-min-b.toml", "oblique-beam-reactor.toml"))
POLICY_SEED = "min-b-site-policy.toml"

#: mutation kinds on a parsed document
KINDS = ("number", "unit", "replace", "text", "delete", "add_key", "repeat", "nest",
         "raw_insert", "raw_delete", "truncate")
#: mutation kinds on a measured-field table
CSV_KINDS = ("cell", "row_repeat", "header", "raw_insert", "truncate", "empty", "binary")

NUMBERS = ("1e308", "-1e308", "1e-308", "0", "-0", "-1", "nan", "inf", "-inf", "1e400",
           "12abc", "", "1e30", "1e-30", "0x10", "1_000", "+5", ".", "1e", "3.0e+9")
UNITS = ("GHz", "Hz", "mm", "m", "km", "T", "G", "kG", "A", "kA", "W", "MW", "dB", "%", "rad/s",
         "rpm", "K", "eV", "keV", "Pa", "mbar", "m^-3", "cm^-3", "deg", "rad", "s", "ms",
         "furlong", "", "V/m", "1/s", "Gs", "mT^2")
TEXTS = ("", " ", "x" * 10_000, "\x00", "a\x01b", "a\x0bb", "line\u2028two", "\ufeffname",
         "\u202egnp.exe", "\x1b[2J\x1b[31mred", "{{ 7*7 }}", "{% include '/etc/passwd' %}",
         "<script>alert(1)</script>", "<img src='http://198.51.100.7/x.png'>",
         "&amp;&lt;", "試験炉", "*", "**", "?", "[!]", "../../etc/passwd", "/etc/passwd",
         "/proc/self/environ", "/dev/zero", "C:\\x", "a" * 300, "\t", "\n", "\r\n",
         "\U0001F4A5", "main", "Ar+", "Xe+", "R", "L", "O", "X", "circular-right", "linear")
SPECIAL_VALUES = (0, 1, -1, 10**30, -(10**30), 2**63, 1.5, -0.0, float("inf"), float("nan"),
                  True, False, [], {}, [1, 2], {"a": 1}, dt.date(2020, 1, 1),
                  dt.datetime(2030, 1, 1, 12, 0, tzinfo=dt.timezone.utc),
                  dt.datetime(2030, 1, 1, 12, 0), dt.time(12, 0))
KEYS = ("Bogus", "bogus_key", "ID", "Frequency", "frequency", "z", "extra", "ké", "a.b")

#: the budget for one run in the fuzz (s): far above any accepted spec (the min-B example
#: takes about 2 s on a loaded two-core machine)
TIME_BUDGET = 60.0


@dataclass
class Case:
    """One hostile input: spec text, optional policy text, and extra files beside the spec."""

    spec: str
    policy: str | None = None
    files: dict[str, bytes] = field(default_factory=dict)
    label: str = ""


@dataclass
class Outcome:
    code: int
    stderr: str
    seconds: float
    json_text: str | None
    problems: list[str]

    @property
    def ok(self) -> bool:
        return not self.problems


# --------------------------------------------------------------------------- documents


def _leaves(obj, path=()):
    """Paths to every value of a parsed TOML document (tables and arrays included)."""
    out = []
    if isinstance(obj, dict):
        for k, v in obj.items():
            out.append(path + (k,))
            out += _leaves(v, path + (k,))
    elif isinstance(obj, list):
        for i, v in enumerate(obj):
            out.append(path + (i,))
            out += _leaves(v, path + (i,))
    return out


def _get(doc, path):
    for p in path:
        doc = doc[p]
    return doc


def _set(doc, path, value):
    _get(doc, path[:-1])[path[-1]] = value


_NEST = "@@nest@@"


def _dump(doc) -> str:
    try:
        return tomli_w.dumps(doc)
    except (TypeError, ValueError, RecursionError):
        return tomli_w.dumps({"schema": 1})


def pick(seq, index: int):
    return seq[index % len(seq)]


def mutate_text(text: str, mutations) -> str:
    """Apply (kind, index, value) mutations to a TOML document; returns the new text."""
    for kind, index, value in mutations:
        if kind in ("raw_insert", "raw_delete", "truncate"):
            pos = index % (len(text) + 1)
            if kind == "raw_insert":
                text = text[:pos] + (value if isinstance(value, str) else str(value)) + text[pos:]
            elif kind == "raw_delete":
                text = text[:pos] + text[pos + 1 + (index // 7) % 40:]
            else:
                text = text[:pos]
            continue
        try:
            doc = tomllib.loads(text)
        except (tomllib.TOMLDecodeError, RecursionError):
            continue
        paths = _leaves(doc)
        if not paths:
            continue
        path = pick(paths, index)
        old = _get(doc, path)
        if kind == "number" and isinstance(old, str) and " " in old:
            _set(doc, path, f"{value if isinstance(value, str) else pick(NUMBERS, index)} "
                            f"{old.split(' ', 1)[1]}")
        elif kind == "unit" and isinstance(old, str) and " " in old:
            _set(doc, path, f"{old.split(' ', 1)[0]} {value if isinstance(value, str) else pick(UNITS, index)}")
        elif kind == "replace":
            _set(doc, path, value)
        elif kind == "text":
            _set(doc, path, value if isinstance(value, str) else pick(TEXTS, index))
        elif kind == "delete":
            del _get(doc, path[:-1])[path[-1]]
        elif kind == "add_key":
            target = old if isinstance(old, dict) else _get(doc, path[:-1])
            if isinstance(target, dict):
                target[pick(KEYS, index)] = value
        elif kind == "repeat":
            parent = _get(doc, path[:-1])
            if isinstance(parent, list):
                count = (1, 2, 17, 18, 101, 1000, 5000)[index % 7]
                parent.extend([parent[path[-1]]] * count)
        elif kind == "nest":
            depth = (3, 50, 500, 5000)[index % 4]
            _set(doc, path, _NEST)
            text = _dump(doc).replace(f'"{_NEST}"', "[" * depth + "1" + "]" * depth)
            continue
        text = _dump(doc)
    return text


def deep_text(depth: int) -> str:
    """A spec whose first value nests `depth` arrays (tomli_w cannot write that deep)."""
    return "schema = 1\nx = " + "[" * depth + "1" + "]" * depth + "\n"


# --------------------------------------------------------------------------- measured tables


def axis_table(n: int = 61) -> str:
    """An invented magnetic-beach profile, z from 0 to 300 mm, as a measured axis table."""
    rows = ["z [mm], B [G]"]
    for i in range(n):
        z = 300.0 * i / (n - 1)
        rows.append(f"{z:.3f}, {875.0 * (1.4 - 0.8 * math.sin(math.pi * z / 300.0)):.3f}")
    return "\n".join(rows) + "\n"


def measured_spec(name: str = "axis.csv") -> str:
    """The bench reactor with its coils replaced by a measured axis table."""
    doc = tomllib.loads((EXAMPLES / "bench-ecr-reactor.toml").read_text(encoding="utf-8"))
    doc["magnet"] = {"current_tolerance": "2 %", "trap": "none", "axis_table": {"file": name}}
    return _dump(doc)


def mutate_csv(text: str, mutations) -> bytes:
    lines = text.splitlines()
    for kind, index, value in mutations:
        if kind == "cell" and len(lines) > 1:
            row = 1 + index % (len(lines) - 1)
            cells = lines[row].split(",")
            cells[index % len(cells)] = value if isinstance(value, str) else pick(NUMBERS, index)
            lines[row] = ",".join(cells)
        elif kind == "row_repeat" and len(lines) > 1:
            lines += [lines[1 + index % (len(lines) - 1)]] * (1, 2, 1000, 200_000)[index % 4]
        elif kind == "header":
            lines[0] = value if isinstance(value, str) else pick(TEXTS, index)
        elif kind == "raw_insert":
            joined = "\n".join(lines)
            pos = index % (len(joined) + 1)
            lines = (joined[:pos] + str(value) + joined[pos:]).split("\n")
        elif kind == "truncate":
            joined = "\n".join(lines)
            lines = joined[: index % (len(joined) + 1)].split("\n")
        elif kind == "empty":
            lines = [""]
        elif kind == "binary":
            return bytes(random.Random(index).randrange(256) for _ in range(64 + index % 512))
    return ("\n".join(lines) + "\n").encode("utf-8", "surrogatepass")


# --------------------------------------------------------------------------- one run


class _Overtime(Exception):
    pass


def _alarm(signum, frame):
    raise _Overtime


def run_case(case: Case, folder: Path, budget: float = TIME_BUDGET) -> Outcome:
    """Write `case` into `folder`, run `rfcheck check` on it in-process, classify the outcome."""
    from rfcheck.cli import main

    folder.mkdir(parents=True, exist_ok=True)
    spec = folder / "spec.toml"
    spec.write_text(case.spec, encoding="utf-8", errors="surrogatepass")
    for name, data in case.files.items():
        (folder / name).write_bytes(data)
    out = folder / "result.json"
    if out.exists():
        out.unlink()
    argv = ["check", str(spec), "--json", str(out)]
    if case.policy is not None:
        policy = folder / "policy.toml"
        policy.write_text(case.policy, encoding="utf-8", errors="surrogatepass")
        argv += ["--policy", str(policy)]
    err, std = io.StringIO(), io.StringIO()
    use_alarm = hasattr(signal, "SIGALRM")
    if use_alarm:
        previous = signal.signal(signal.SIGALRM, _alarm)
        signal.setitimer(signal.ITIMER_REAL, budget)
    start = time.perf_counter()
    problems = []
    try:
        with contextlib.redirect_stderr(err), contextlib.redirect_stdout(std):
            code = main(argv)
    except _Overtime:
        code = -1
        problems.append(f"run past its time budget of {budget:.0f} s")
    except BaseException as exc:  # noqa: BLE001 - anything escaping main() is a defect
        code = -2
        problems.append(f"{type(exc).__name__} escaped main(): {exc}"[:300])
    finally:
        if use_alarm:
            signal.setitimer(signal.ITIMER_REAL, 0)
            signal.signal(signal.SIGALRM, previous)
    seconds = time.perf_counter() - start
    stderr = err.getvalue()
    json_text = out.read_text(encoding="utf-8") if out.exists() else None
    problems += classify(code, stderr, json_text, case)
    return Outcome(code, stderr, seconds, json_text, problems)


def classify(code: int, stderr: str, json_text: str | None, case: Case) -> list[str]:
    """What in one outcome breaks the contract for hostile input (empty when none)."""
    problems = []
    if code == 3:
        problems.append("exit 3 (internal error)")
    if "Traceback" in stderr:
        problems.append("traceback on the terminal")
    if "Warning" in stderr or "warning:" in stderr.lower():
        problems.append("warning on the terminal")
    if "\x1b" in stderr:
        problems.append("terminal escape sequence printed")
    for secret in ("root:x:0:0", "PATH=", "HOME="):
        if secret in stderr:
            problems.append(f"file content echoed ({secret!r})")
    if len(stderr) > 200_000:
        problems.append(f"{len(stderr)} characters on stderr")
    if code in (0, 1):
        if json_text is None:
            problems.append(f"exit {code} without a JSON result")
        else:
            def refuse(token):
                raise ValueError(token)
            try:
                json.loads(json_text, parse_constant=refuse)
            except ValueError as exc:
                problems.append(f"JSON not strict: {exc}"[:200])
    elif code == 2:
        if json_text is not None:
            problems.append("exit 2 but a JSON result was written")
        lines = [ln for ln in stderr.splitlines() if ln.startswith("error:")]
        if not lines:
            problems.append("exit 2 without an error line")
    elif code not in (-1, -2, 3):
        problems.append(f"unexpected exit code {code}")
    return problems


def message_shape(stderr: str) -> set[str]:
    """Distinct error messages of a run, with file names, lines, numbers and quoted input
    replaced by placeholders (so 'how many different things can rfcheck say' is countable)."""
    import re

    shapes = set()
    for ln in stderr.splitlines():
        if not ln.startswith("error:"):
            continue
        s = ln[len("error:"):].strip()
        s = re.sub(r"^\S+?:(\d+:)?\s", "FILE: ", s)
        s = re.sub(r"'[^']*'|\"[^\"]*\"", "'…'", s)
        s = re.sub(r"\[[^\]]*\]", "[…]", s)
        s = re.sub(r"[-+]?\d[\d.,_]*(e[-+]?\d+)?", "N", s)
        shapes.add(s[:160])
    return shapes


# --------------------------------------------------------------------------- random cases


def random_value(rng: random.Random):
    roll = rng.random()
    if roll < 0.35:
        return f"{rng.choice(NUMBERS)} {rng.choice(UNITS)}"
    if roll < 0.6:
        return rng.choice(TEXTS)
    if roll < 0.85:
        return rng.choice(SPECIAL_VALUES)
    return "".join(chr(rng.choice((rng.randrange(32), rng.randrange(32, 127),
                                   rng.randrange(0x80, 0x3000), rng.randrange(0xD800, 0xE000)
                                   if rng.random() < 0.1 else 65)))
                   for _ in range(rng.randrange(1, 12)))


def random_case(rng: random.Random) -> Case:
    """One random hostile case: a mutated spec (most), policy or measured table."""
    roll = rng.random()
    n = rng.choice((1, 1, 1, 2, 3))
    muts = [(rng.choice(KINDS), rng.randrange(10**6), random_value(rng)) for _ in range(n)]
    if roll < 0.6:
        # the slow seeds (minimum-B trap, two feeds into it, a traced beam) seen less often
        seed = rng.choices(SPEC_SEEDS, weights=[4 if s in QUICK_SPEC_SEEDS else 1
                                                for s in SPEC_SEEDS])[0]
        text = (EXAMPLES / seed).read_text(encoding="utf-8")
        if rng.random() < 0.01:
            return Case(deep_text(rng.choice((100, 1000, 100_000))), label="deep")
        return Case(mutate_text(text, muts), label=f"spec:{seed}")
    if roll < 0.8:
        spec = (EXAMPLES / rng.choices(SPEC_SEEDS[1:3], weights=(4, 1))[0]).read_text(
            encoding="utf-8")
        policy = mutate_text((EXAMPLES / POLICY_SEED).read_text(encoding="utf-8"), muts)
        return Case(spec, policy=policy, label="policy")
    cmuts = [(rng.choice(CSV_KINDS), rng.randrange(10**6), random_value(rng)) for _ in range(n)]
    return Case(measured_spec(), files={"axis.csv": mutate_csv(axis_table(), cmuts)},
                label="csv")


def special_cases(folder: Path) -> list[Case]:
    """Measured-table paths that name what a measured table must not be: system files,
    traversal, a symlink, a FIFO, a device, a folder, a huge file."""
    folder.mkdir(parents=True, exist_ok=True)
    cases = [Case(measured_spec(name), label=f"path:{name}") for name in (
        "/etc/passwd", "../../../../etc/passwd", "/proc/self/environ", "/dev/zero",
        "/dev/null", "/", ".", "missing.csv", "", "axis.csv\x00", "C:/x.csv")]
    link = folder / "link.csv"
    if not link.exists():
        link.symlink_to("/etc/passwd")
    cases.append(Case(measured_spec(str(link)), label="path:symlink"))
    fifo = folder / "fifo.csv"
    if not fifo.exists() and hasattr(os, "mkfifo"):
        os.mkfifo(fifo)
    cases.append(Case(measured_spec(str(fifo)), label="path:fifo"))
    big = folder / "big.csv"
    if not big.exists():
        with big.open("wb") as fh:
            fh.write(axis_table().encode())
            fh.write(b"0.0, 875.0\n" * 6_000_000)
    cases.append(Case(measured_spec(str(big)), label="path:big"))
    return cases
