"""Operating windows and tolerance studies: the whole rule catalogue at many points.

A *study* is a list of points, each a set of spec values that replace the ones the spec file
declares; every point is checked exactly as `rfcheck check` would check a spec file holding
those values (the same validation, the same envelope, the same rules, the same policy), so a
point's statuses and margins are those of a check of that file.

* Grid (`rfcheck sweep --vary KEY=START:STOP:N ...`): the product of the axes, row-major.
* Monte Carlo (`--monte-carlo N --seed S`): N samples of the tolerances the spec declares
  (coil current scale within ± current_tolerance, each feed's frequency within ±
  frequency_tolerance, each window layer's thickness within ± thickness_tolerance, each spec
  material's permittivity and loss tangent within their declared ranges), uniform within the
  declared bounds (a declared tolerance is a bound, not a standard deviation: the uniform
  distribution is the conservative reading of a bound). Each sample is one built source: the
  sampled tolerances are set to zero in it; the operating envelope (density, temperature,
  pressure) and the shipped material spreads stay in its worst case.

Per point and per rule: the worst status of the rule's findings and the signed margin of its
least-margin finding (in the rule's own unit, and relative to the limit); per point: the
verdict (as a check's) and the *binding* rule, the one that decides the verdict (the worst
status, then the least relative margin).

Evaluation is chunked (CHUNK_POINTS per task): serial, in local processes (`jobs`), or on a
Dask distributed cluster (`scheduler`). Each point's result depends only on its own values,
never on which worker or in which order it ran, so all three give identical results.

Bad input (an unknown key path, a value that is not a number with a unit, a range in the
wrong unit, a grid over MAX_POINTS) is refused with :class:`rfcheck.spec.InputError` before
any point is evaluated.
"""

from __future__ import annotations

import copy
import datetime as dt
import math
import re
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from rfcheck.spec import InputError, LoadedSpec, Problem

SCHEMA_ID = "rfcheck-sweep/1"
#: the largest grid or sample count accepted (each point is a full check of the catalogue)
MAX_POINTS = 250_000
#: the most axes of a grid (one or two are mapped; more are written to the JSON)
MAX_AXES = 6
#: points per task handed to a worker
CHUNK_POINTS = 32
#: statuses of a rule at a point, in rank order for the binding rule (worst last)
STATUSES = ("not-applicable", "waived", "pass", "warn", "fail", "error")
_RANK = {s: i for i, s in enumerate(STATUSES)}
#: verdicts of a point: a check's four, and "invalid" for values the spec format refuses
VERDICTS = ("pass", "warn", "fail", "not-evaluated", "invalid")
_EVALUATED = ("pass", "warn", "fail", "waived")
#: two-sided 95 % normal quantile for the Wilson interval
_Z95 = 1.959963984540054

_SEGMENT = re.compile(r"([A-Za-z_][A-Za-z0-9_]*)((?:\[[^\[\]]+\])*)$")
_SELECTOR = re.compile(r"\[([^\[\]]+)\]")
_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")


# --------------------------------------------------------------------------- parameters


@dataclass(frozen=True)
class Param:
    """One value a study changes: where it sits in the spec data and how a value is written.

    kind "set": data[path] = value written as text "<value> <unit>" (or a bare number when
    the spec's value is one; an integer when it is an integer). kind "scale": every coil
    current and the uniform field are multiplied by the value (the magnet's current scale).
    `clear` lists paths set to `clear_value` in each point (the sampled tolerances)."""

    key: str
    unit: str
    nominal: float
    kind: str = "set"
    path: tuple = ()
    dimension: str | None = None
    integer: bool = False
    tolerance: tuple[float, float] | None = None
    clear: tuple = ()

    def apply(self, data: dict, value: float) -> None:
        if self.kind == "scale":
            magnet = data.get("magnet") or {}
            for coil in magnet.get("coils") or []:
                coil["current"] = _scaled_text(coil["current"], value)
            if isinstance(magnet.get("uniform"), dict) and "b" in magnet["uniform"]:
                magnet["uniform"]["b"] = _scaled_text(magnet["uniform"]["b"], value)
        else:
            node = data
            for part in self.path[:-1]:
                node = node[part]
            last = self.path[-1]
            if isinstance(last, tuple):  # a material range replaced by the sampled value
                node.pop(last[1], None)
                last = last[0]
            node[last] = _written(value, self.unit, self.dimension, self.integer)
        for path, cleared in self.clear:
            node = data
            for part in path[:-1]:
                node = node[part]
            node[path[-1]] = cleared

    def to_json(self) -> dict:
        return {"key": self.key, "unit": self.unit, "nominal": self.nominal,
                "tolerance": list(self.tolerance) if self.tolerance else None}


def _written(value: float, unit: str, dimension: str | None, integer: bool):
    if integer:
        return int(round(value))
    if dimension is None:
        return float(value)
    return f"{float(value)!r} {unit}".strip()


def _scaled_text(text: str, factor: float) -> str:
    got = _NUMBER.match(str(text))
    if not got:  # validated by the spec format already; kept as written
        return text
    return f"{float(got.group(1)) * factor!r} {got.group(2)}".strip()


def _split(text: str) -> tuple[float, str] | None:
    got = _NUMBER.match(text)
    if not got:
        return None
    value = float(got.group(1))
    return (value, got.group(2)) if math.isfinite(value) else None


def _dimensions_of(text: str) -> list[str]:
    """Every dimension whose units read `text` ("2 eV": energy and temperature)."""
    from rfcheck.units import DIMENSIONS, UnitError, parse_quantity

    out = []
    for dim in DIMENSIONS:
        try:
            parse_quantity(text, dim)
        except (UnitError, KeyError, ValueError, ArithmeticError):
            continue
        out.append(dim)
    return out


def resolve(key: str, data: dict) -> tuple[tuple, object]:
    """The data path of an entity key ("feed[main].frequency", "magnet.coils[0].current")
    and the value there. Elements of a list are selected by id, or by position."""
    if not key or len(key) > 200:
        raise ValueError("expected a key path such as magnet.coils[upstream].current")
    path: list = []
    node: object = data
    for seg in key.split("."):
        got = _SEGMENT.match(seg.strip())
        if not got:
            raise ValueError(f"'{seg}' is not a key; expected names and [id] or [index] "
                             "selectors, e.g. window[vacuum-window].layers[0].thickness")
        name, selectors = got.group(1), _SELECTOR.findall(got.group(2))
        if not isinstance(node, dict) or name not in node:
            where = ".".join(str(p) for p in path) or "the top level"
            raise ValueError(f"no key '{name}' under {where} in the spec (only values the "
                             "spec file writes can be swept; write it there first)")
        node = node[name]
        path.append(name)
        for sel in selectors:
            if not isinstance(node, list):
                raise ValueError(f"'{name}' is not a list; [{sel}] cannot select from it")
            ids = [e.get("id") if isinstance(e, dict) else None for e in node]
            if sel in ids:
                i = ids.index(sel)
            elif sel.isdigit() and int(sel) < len(node):
                i = int(sel)
            else:
                known = ", ".join(str(x) for x in ids if x) or f"indices 0..{len(node) - 1}"
                raise ValueError(f"no element [{sel}] in '{name}' (known: {known})")
            node = node[i]
            path.append(i)
    if isinstance(node, (dict, list)) or isinstance(node, bool) or node is None:
        raise ValueError("the key names a table or a list, not a value; name a numeric "
                         "value such as ...current or ...frequency")
    return tuple(path), node


def grid_axis(text: str, loaded: LoadedSpec, raw: dict) -> tuple[Param, np.ndarray]:
    """One `--vary KEY=START:STOP:N` argument as a parameter and its values (in START's unit).

    START and STOP carry units where the spec's value has one ("50 A:80 A:31"); a bare
    number is accepted only for a value the spec writes as a bare number (turns, ratios)."""
    from rfcheck.tomlines import LineIndex
    from rfcheck.units import UnitError, parse_quantity, scale_to_si

    spec = str(loaded.path)
    key, eq, rng = text.partition("=")
    key = key.strip()

    def bad(message: str, path: tuple = ()) -> InputError:
        line = LineIndex(loaded.text).line_of(path) if path else None
        return InputError([Problem(spec if line else "--vary", key or text, line, message)])

    if not eq:
        raise bad("expected KEY=START:STOP:N, e.g. "
                  "'magnet.coils[upstream].current=50 A:80 A:31'")
    try:
        path, value = resolve(key, raw)
    except ValueError as exc:
        raise bad(str(exc)) from None
    parts = rng.split(":")
    if len(parts) != 3:
        raise bad(f"found '{rng}'; expected START:STOP:N, e.g. 50 A:80 A:31", path)
    try:
        n = int(parts[2].strip())
    except ValueError:
        raise bad(f"the point count '{parts[2].strip()}' is not a whole number", path) from None
    if not 1 <= n <= MAX_POINTS:
        raise bad(f"the point count {n} is outside 1..{MAX_POINTS}", path)
    start, stop = _split(parts[0]), _split(parts[1])
    if start is None or stop is None:
        raise bad(f"found '{rng}'; START and STOP must be finite numbers, with a unit where "
                  "the spec's value has one", path)
    if isinstance(value, str):
        dims = _dimensions_of(value)
        if not dims:
            raise bad(f"the spec's value {value!r} is not a number with a unit; only numeric "
                      "values can be swept", path)
        if not start[1]:
            raise bad(f"START '{parts[0].strip()}' has no unit; write one like the spec's "
                      f"value {value!r}", path)
        dim = next((d for d in dims if _reads(parts[0], d) and _reads(parts[1], d)), None)
        if dim is None:
            from rfcheck.units import DIMENSIONS

            raise bad(f"the range '{rng}' is not in units of a {DIMENSIONS[dims[0]].name} "
                      f"(the spec's value is {value!r})", path)
        unit = start[1]
        try:
            per = scale_to_si(unit, dim)
            lo = start[0]
            hi = parse_quantity(parts[1].strip(), dim) / per
            nominal = parse_quantity(value, dim) / per
        except UnitError as exc:
            raise bad(str(exc), path) from None
        integer = False
    elif isinstance(value, (int, float)):
        if start[1] or stop[1]:
            raise bad(f"the spec writes this value as a bare number ({value!r}); give START "
                      "and STOP without a unit", path)
        dim, unit, lo, hi, nominal = None, "", start[0], stop[0], float(value)
        integer = isinstance(value, int)
    else:
        raise bad(f"the spec's value {value!r} is not numeric", path)
    values = np.linspace(lo, hi, n) if n > 1 else np.array([lo])
    if integer and not np.allclose(values, np.round(values), rtol=0, atol=1e-9):
        raise bad(f"the spec writes this value as a whole number; {n} points from {lo:g} to "
                  f"{hi:g} are not whole numbers", path)
    tolerance = _tolerance_of(path, raw, nominal, unit, dim)
    return Param(key, unit, nominal, "set", path, dim, integer, tolerance), values


def _reads(text: str, dim: str) -> bool:
    from rfcheck.units import UnitError, parse_quantity

    try:
        parse_quantity(text.strip(), dim)
    except (UnitError, KeyError, ValueError, ArithmeticError):
        return False
    return True


def _tolerance_of(path: tuple, raw: dict, nominal: float, unit: str,
                  dim: str | None) -> tuple[float, float] | None:
    """The declared tolerance box of a swept value, in its unit (for the map), or None."""
    from rfcheck.units import parse_quantity, scale_to_si

    try:
        if path[:2] == ("magnet", "coils") and path[-1] == "current":
            tol = parse_quantity(raw["magnet"].get("current_tolerance", "0 %"), "ratio")
            return (nominal * (1 - tol), nominal * (1 + tol)) if tol > 0 else None
        if path[0] == "feed" and path[-1] == "frequency" and dim:
            text = raw["feed"][path[1]].get("frequency_tolerance")
            tol = parse_quantity(text, dim) / scale_to_si(unit, dim) if text else 0.0
            return (nominal - tol, nominal + tol) if tol > 0 else None
        if path[0] == "window" and path[-1] == "thickness" and dim:
            layer = raw["window"][path[1]]["layers"][path[3]]
            text = layer.get("thickness_tolerance")
            tol = parse_quantity(text, dim) / scale_to_si(unit, dim) if text else 0.0
            return (nominal - tol, nominal + tol) if tol > 0 else None
    except (KeyError, IndexError, TypeError, ValueError):
        return None
    return None


def _plus_minus(key: str, raw: dict, at: tuple, name: str, tol_name: str, dimension: str,
                zero: str) -> list[Param]:
    """The value `name` of the table at `at` with its declared ± tolerance `tol_name`, as a
    Monte Carlo parameter in the value's own unit (none when no tolerance is declared)."""
    from rfcheck.units import parse_quantity, scale_to_si

    table = raw
    for part in at:
        table = table[part]
    text = table.get(tol_name)
    tol = parse_quantity(text, dimension) if text else 0.0
    if tol <= 0:
        return []
    unit = _split(table[name])[1]
    per = scale_to_si(unit, dimension)
    nominal = parse_quantity(table[name], dimension) / per
    return [Param(key, unit, nominal, "set", at + (name,), dimension,
                  tolerance=(nominal - tol / per, nominal + tol / per),
                  clear=((at + (tol_name,), zero),))]


def tolerance_params(loaded: LoadedSpec, raw: dict) -> tuple[list[Param], list[str]]:
    """The declared tolerances of a spec as Monte Carlo parameters, and notes on what stays
    in each sample's envelope instead of being sampled."""

    model = loaded.model
    params: list[Param] = []
    notes: list[str] = []
    mag = raw.get("magnet") or {}
    tol = model.magnet.current_tolerance
    if tol > 0:
        if mag.get("axis_table") or mag.get("field_map"):
            notes.append("the magnet's current tolerance stays in each sample's envelope: a "
                         "measured field table cannot be rescaled from the spec text")
        else:
            params.append(Param("magnet.current_scale", "", 1.0, "scale",
                                tolerance=(1 - tol, 1 + tol),
                                clear=((("magnet", "current_tolerance"), "0 %"),)))
    for i, f in enumerate(raw.get("feed") or []):
        params += _plus_minus(f"feed[{f.get('id', i)}].frequency", raw, ("feed", i),
                              "frequency", "frequency_tolerance", "frequency", "0 Hz")
    for i, w in enumerate(raw.get("window") or []):
        for j in range(len(w.get("layers") or [])):
            params += _plus_minus(f"window[{w.get('id', i)}].layers[{j}].thickness", raw,
                                  ("window", i, "layers", j), "thickness",
                                  "thickness_tolerance", "length", "0 mm")
    for i, mt in enumerate(raw.get("material") or []):
        for name, rng_key in (("permittivity", "permittivity_range"),
                              ("loss_tangent", "loss_tangent_range")):
            rng = mt.get(rng_key)
            if rng and rng[1] > rng[0]:
                params.append(Param(f"material[{mt.get('id', i)}].{name}", "",
                                    float(mt[name]), "set", ("material", i, (name, rng_key)),
                                    None, tolerance=(float(rng[0]), float(rng[1]))))
    if any(True for _ in (model.windows or ())):
        notes.append("spreads of shipped window materials stay in each sample's worst case")
    notes.append("the operating envelope (density, electron temperature, pressure) stays in "
                 "each sample's worst case: it is operation, not a build tolerance")
    return params, notes


# --------------------------------------------------------------------------- evaluation


@dataclass(frozen=True)
class Base:
    """What every worker needs: the spec data and text, the policy, the one instant."""

    raw: dict
    text: str
    path: str
    policy: object
    evaluated_at: str
    rule_ids: tuple[str, ...]


@dataclass
class Chunk:
    """Results of a run of consecutive points (arrays over points, and points x rules)."""

    start: int
    verdict: np.ndarray          # (n,) int8 index into VERDICTS
    status: np.ndarray           # (n, rules) int8 index into STATUSES, -1: no finding
    margin: np.ndarray           # (n, rules) float, NaN: none
    relative: np.ndarray         # (n, rules) float, NaN: none
    binding: np.ndarray          # (n,) int16 rule index, -1: none
    units: dict                  # rule index -> unit of its margin
    problems: dict               # point offset -> why the point is invalid


_SHARED = None  # per process: the analyses kept across points (rfcheck.analysis.state.SharedCache)


def _shared():
    global _SHARED
    if _SHARED is None:
        from rfcheck.analysis.state import SharedCache

        _SHARED = SharedCache()
    return _SHARED


def evaluate_chunk(base: Base, params: tuple[Param, ...], start: int,
                   values: np.ndarray) -> Chunk:
    """Check each point (a row of `values`, one value per parameter). Top level and
    picklable: it is what a local process or a Dask worker runs."""
    from rfcheck.run import run
    from rfcheck.spec import spec_from_data

    at = dt.datetime.fromisoformat(base.evaluated_at)
    n, nr = len(values), len(base.rule_ids)
    index = {r: i for i, r in enumerate(base.rule_ids)}
    out = Chunk(start, np.zeros(n, np.int8), np.full((n, nr), -1, np.int8),
                np.full((n, nr), np.nan), np.full((n, nr), np.nan), np.full(n, -1, np.int16),
                {}, {})
    shared = _shared()
    for k, row in enumerate(values):
        data = copy.deepcopy(base.raw)
        try:
            for p, v in zip(params, row):
                p.apply(data, float(v))
            loaded = spec_from_data(data, base.text, Path(base.path))
        except InputError as exc:
            out.verdict[k] = VERDICTS.index("invalid")
            out.problems[k] = "; ".join(f"{p.path}: {p.message}" if p.path else p.message
                                        for p in exc.problems)
            continue
        result = run(loaded, base.policy, at, detail=False, shared=shared)
        out.verdict[k] = VERDICTS.index(result.verdict)
        _summarise(result.findings, index, out, k)
    return out


def _summarise(findings, index: dict, out: Chunk, k: int) -> None:
    for f in findings:
        j = index.get(f.rule)
        if j is None:
            continue
        s = _RANK[f.status.value]
        if s > out.status[k, j]:
            out.status[k, j] = s
        if f.status.value not in _EVALUATED or f.margin is None:
            continue
        m = f.margin.value
        if not math.isfinite(m):
            continue
        lim = f.limit.value if f.limit is not None else math.nan
        rel = m / abs(lim) if math.isfinite(lim) and lim != 0 else math.nan
        old_rel, old_m = out.relative[k, j], out.margin[k, j]
        # the least relative margin where one is defined; else the least margin
        if math.isfinite(old_rel):
            better = math.isfinite(rel) and rel < old_rel
        else:
            better = math.isfinite(rel) or math.isnan(old_m) or m < old_m
        if better:
            out.margin[k, j], out.relative[k, j] = m, rel
            out.units.setdefault(j, f.margin.unit)
    out.binding[k] = _binding(out.status[k], out.relative[k])


def _binding(st: np.ndarray, rel: np.ndarray) -> int:
    """The rule that decides a point (index, -1 for none): a rule that could not be
    evaluated; else the failing rule with the least relative margin; else the rule with the
    least relative margin of all (where the margin is thinnest); else the worst status."""
    for worst in (_RANK["error"], _RANK["fail"]):
        cands = np.nonzero(st == worst)[0]
        if cands.size:
            key = np.where(np.isnan(rel[cands]), -np.inf, rel[cands])
            return int(cands[int(np.argmin(key))])
    finite = np.isfinite(rel) & (st >= _RANK["waived"])
    if finite.any():
        cands = np.nonzero(finite)[0]
        return int(cands[int(np.argmin(rel[cands]))])
    top = int(st.max()) if st.size else -1
    return int(np.argmax(st)) if top > _RANK["not-applicable"] else -1


# --------------------------------------------------------------------------- the study


@dataclass
class Study:
    """A grid or Monte Carlo study of one spec under one policy, and its results."""

    kind: str                       # "grid" or "monte-carlo"
    loaded: LoadedSpec
    policy: object
    params: tuple[Param, ...]
    values: np.ndarray              # (points, params), in each parameter's unit
    shape: tuple[int, ...]
    grid_values: tuple[np.ndarray, ...] = ()
    seed: int | None = None
    notes: tuple[str, ...] = ()
    evaluated_at: str = ""
    rule_ids: tuple[str, ...] = ()
    verdict: np.ndarray | None = None
    status: np.ndarray | None = None
    margin: np.ndarray | None = None
    relative: np.ndarray | None = None
    binding: np.ndarray | None = None
    units: dict = field(default_factory=dict)
    problems: dict = field(default_factory=dict)
    nominal: dict = field(default_factory=dict)

    @property
    def points(self) -> int:
        return len(self.values)

    def base(self) -> Base:
        import tomllib

        return Base(tomllib.loads(self.loaded.text), self.loaded.text, str(self.loaded.path),
                    self.policy, self.evaluated_at, self.rule_ids)

    def chunks(self, size: int | None = None) -> list[tuple[int, np.ndarray]]:
        size = size or CHUNK_POINTS
        return [(s, self.values[s:s + size]) for s in range(0, self.points, size)]

    def take(self, chunk: Chunk) -> None:
        """Store one chunk's results (in any order)."""
        s, n = chunk.start, len(chunk.verdict)
        self.verdict[s:s + n] = chunk.verdict
        self.status[s:s + n] = chunk.status
        self.margin[s:s + n] = chunk.margin
        self.relative[s:s + n] = chunk.relative
        self.binding[s:s + n] = chunk.binding
        for j, u in chunk.units.items():
            self.units.setdefault(j, u)
        self.problems.update({s + k: v for k, v in chunk.problems.items()})

    def _allocate(self) -> None:
        n, nr = self.points, len(self.rule_ids)
        self.verdict = np.zeros(n, np.int8)
        self.status = np.full((n, nr), -1, np.int8)
        self.margin = np.full((n, nr), np.nan)
        self.relative = np.full((n, nr), np.nan)
        self.binding = np.full(n, -1, np.int16)

    # ---- JSON

    def point_json(self, i: int, *, rules: bool = True) -> dict:
        idx = [int(x) for x in np.unravel_index(i, self.shape)]
        b = int(self.binding[i])
        out = {"index": idx,
               "values": {p.key: _num(v) for p, v in zip(self.params, self.values[i])},
               "verdict": VERDICTS[int(self.verdict[i])],
               "binding": self.rule_ids[b] if b >= 0 else None,
               "binding_margin": _num(self.relative[i, b]) if b >= 0 else None,
               "problem": self.problems.get(i)}
        if rules:
            out["rules"] = {
                r: {"status": STATUSES[int(self.status[i, j])],
                    "margin": _num(self.margin[i, j]), "unit": self.units.get(j, ""),
                    "relative_margin": _num(self.relative[i, j])}
                for j, r in enumerate(self.rule_ids) if self.status[i, j] >= 0}
        return out

    def header_json(self) -> dict:
        from rfcheck import __version__
        from rfcheck.run import RULESET_VERSION, sha256_text

        counts = {v: int(np.sum(self.verdict == i)) for i, v in enumerate(VERDICTS)}
        axes = []
        for k, p in enumerate(self.params):
            a = p.to_json()
            a["values"] = ([_num(v) for v in self.grid_values[k]] if self.kind == "grid"
                           else None)
            axes.append(a)
        return {
            "schema": SCHEMA_ID, "kind": self.kind,
            "tool": {"name": "rfcheck", "version": __version__, "ruleset": RULESET_VERSION},
            "spec": {"name": self.loaded.model.source.name,
                     "revision": self.loaded.model.source.revision,
                     "file": self.loaded.path.name, "sha256": sha256_text(self.loaded.text)},
            "policy": {"name": self.policy.name, "sha256": self.policy.sha256},
            "evaluated_at": self.evaluated_at,
            "axes": axes, "shape": list(self.shape), "rules": list(self.rule_ids),
            "nominal": self.nominal, "counts": counts, "notes": list(self.notes),
            "monte_carlo": self.monte_carlo() if self.kind == "monte-carlo" else None,
        }

    def to_json(self, *, rules: bool = True) -> dict:
        out = self.header_json()
        out["points"] = [self.point_json(i, rules=rules) for i in range(self.points)]
        return out

    def json_bytes(self) -> bytes:
        """The whole JSON, built point by point (no dict of every point held at once)."""
        from rfcheck import jsontext

        head = jsontext.dumps(self.header_json()).rstrip()
        parts = [head[:-1].rstrip(), ',\n  "points": [\n']
        for i in range(self.points):
            parts.append(("    " if i == 0 else ",\n    ")
                         + jsontext.compact(self.point_json(i)))
        parts.append("\n  ]\n}\n")
        return "".join(parts).encode()

    # ---- Monte Carlo statistics

    def monte_carlo(self) -> dict:
        ok_verdict = np.isin(self.verdict, [VERDICTS.index("pass"), VERDICTS.index("warn")])
        rules = {}
        for j, r in enumerate(self.rule_ids):
            st = self.status[:, j]
            if not np.any(st >= 0):
                continue
            ok = ~np.isin(st, [_RANK["fail"], _RANK["error"]])
            rules[r] = wilson(int(ok.sum()), len(st))
        failed = (~ok_verdict).astype(float)
        corr = []
        for k, p in enumerate(self.params):
            x = self.values[:, k]
            c = (float(np.corrcoef(x, failed)[0, 1])
                 if np.std(x) > 0 and np.std(failed) > 0 else None)
            corr.append({"key": p.key, "coefficient": c})
        corr.sort(key=lambda e: -abs(e["coefficient"]) if e["coefficient"] is not None else 1)
        return {"samples": self.points, "seed": self.seed,
                "distribution": "uniform within the declared tolerance",
                "pass_probability": {"overall": wilson(int(ok_verdict.sum()), self.points),
                                     "rules": rules},
                "passing_verdicts": ["pass", "warn"],
                "correlation": corr}


def binding_table(study: Study) -> list[dict]:
    """Each rule that binds at some point: how many points, its least relative margin there."""
    out = []
    for j, r in enumerate(study.rule_ids):
        at = study.binding == j
        if not at.any():
            continue
        rel = study.relative[at, j]
        rel = rel[np.isfinite(rel)]
        out.append({"rule": r, "points": int(at.sum()),
                    "least_relative_margin": float(rel.min()) if rel.size else None})
    out.sort(key=lambda e: -e["points"])
    return out


def summary_text(study: Study) -> str:
    """The terminal summary of an evaluated study."""
    counts = {v: int(np.sum(study.verdict == i)) for i, v in enumerate(VERDICTS)}
    what = ("grid " + " x ".join(str(n) for n in study.shape) if study.kind == "grid"
            else f"Monte Carlo, {study.points} samples, seed {study.seed}")
    lines = [f"{study.loaded.model.source.name} rev {study.loaded.model.source.revision}: "
             f"{what} ({study.points} points)"]
    for p in study.params:
        if study.kind == "grid":
            g = study.grid_values[study.params.index(p)]
            lines.append(f"  {p.key}: {g[0]:g} to {g[-1]:g} {p.unit}".rstrip()
                         + f" ({len(g)} points; spec {p.nominal:g})")
        else:
            lo, hi = p.tolerance
            lines.append(f"  {p.key}: {lo:g} to {hi:g} {p.unit}".rstrip()
                         + f" (uniform; spec {p.nominal:g})")
    lines.append("points: " + ", ".join(f"{n} {v}" for v, n in counts.items() if n))
    if study.nominal:
        lines.append(f"the spec as written: {study.nominal['verdict']}"
                     + (f" (binding {study.nominal['binding']})"
                        if study.nominal.get("binding") else ""))
    table = binding_table(study)
    if table:
        lines.append("binding rules (points, least relative margin):")
        for e in table:
            m = e["least_relative_margin"]
            lines.append(f"  {e['rule']}: {e['points']}"
                         + (f", {m:+.3g}" if m is not None else ""))
    if study.kind == "monte-carlo":
        mc = study.monte_carlo()
        o = mc["pass_probability"]["overall"]
        lines.append(f"pass probability (pass or warn): {o['p']:.3f} "
                     f"(95 % interval {o['low']:.3f} to {o['high']:.3f})")
        for e in mc["correlation"]:
            if e["coefficient"] is not None:
                lines.append(f"  correlation of {e['key']} with failure: "
                             f"{e['coefficient']:+.2f}")
    invalid = len(study.problems)
    if invalid:
        first = min(study.problems)
        lines.append(f"{invalid} point(s) the spec format refuses, e.g. point {first}: "
                     f"{study.problems[first]}")
    lines.append("This study is a design aid: it does not replace the review of the chosen "
                 "design (rfcheck check) under local RF-safety, radiation-protection and "
                 "electrical codes by qualified personnel.")
    return "\n".join(lines)


def wilson(k: int, n: int) -> dict:
    """Pass fraction k/n with its 95 % Wilson score interval (E. B. Wilson, J. Am. Stat.
    Assoc. 22 (1927) 209)."""
    if n == 0:
        return {"p": None, "low": None, "high": None, "passes": 0, "n": 0}
    p = k / n
    z2 = _Z95 * _Z95
    centre = (p + z2 / (2 * n)) / (1 + z2 / n)
    half = _Z95 * math.sqrt(p * (1 - p) / n + z2 / (4 * n * n)) / (1 + z2 / n)
    return {"p": p, "low": max(0.0, centre - half), "high": min(1.0, centre + half),
            "passes": k, "n": n}


def _num(x) -> float | None:
    x = float(x)
    return x if math.isfinite(x) else None


def _selected_rules(policy) -> tuple[str, ...]:
    from rfcheck.rules.registry import all_rules

    return tuple(r.id for r in all_rules() if policy.selected(r.id))


def _now() -> str:
    return dt.datetime.now().astimezone().replace(microsecond=0).isoformat()


def grid_study(loaded: LoadedSpec, policy, varies: list[str]) -> Study:
    """A grid study from `--vary` arguments; refuses bad arguments before any work."""
    import tomllib

    if not varies:
        raise InputError([Problem("--vary", "", None, "give at least one --vary "
                                  "KEY=START:STOP:N (or --monte-carlo N)")])
    if len(varies) > MAX_AXES:
        raise InputError([Problem("--vary", "", None, f"{len(varies)} axes; at most "
                                  f"{MAX_AXES} are accepted")])
    raw = tomllib.loads(loaded.text)
    params, grids = [], []
    for text in varies:
        p, v = grid_axis(text, loaded, raw)
        if any(q.path == p.path for q in params):
            raise InputError([Problem("--vary", p.key, None, "the same value is varied twice")])
        params.append(p)
        grids.append(v)
    shape = tuple(len(g) for g in grids)
    total = math.prod(shape)
    if total > MAX_POINTS:
        raise InputError([Problem("--vary", "", None,
                                  f"the grid has {total:,} points; at most {MAX_POINTS:,} are "
                                  "accepted (each point is a full check)")])
    mesh = np.meshgrid(*grids, indexing="ij")
    values = np.stack([m.reshape(-1) for m in mesh], axis=1)
    study = Study("grid", loaded, policy, tuple(params), values, shape, tuple(grids),
                  evaluated_at=_now(), rule_ids=_selected_rules(policy))
    _refuse_bad_corners(study, raw)
    return study


def _refuse_bad_corners(study: Study, raw: dict) -> None:
    """Every corner of the grid must be a spec the format accepts (else exit 2 up front)."""
    from rfcheck.spec import spec_from_data

    lows = [g[0] for g in study.grid_values]
    highs = [g[-1] for g in study.grid_values]
    corners = {tuple(c) for c in np.array(np.meshgrid(*zip(lows, highs), indexing="ij"))
               .reshape(len(lows), -1).T}
    for corner in sorted(corners):
        data = copy.deepcopy(raw)
        for p, v in zip(study.params, corner):
            p.apply(data, float(v))
        try:
            spec_from_data(data, study.loaded.text, study.loaded.path)
        except InputError as exc:
            shown = ", ".join(f"{p.key} = {_written(v, p.unit, p.dimension, p.integer)}"
                              for p, v in zip(study.params, corner))
            raise InputError([Problem(pr.file if pr.line else "--vary", pr.path, pr.line,
                                      f"at the grid corner {shown}: {pr.message}")
                              for pr in exc.problems]) from None


def monte_carlo_study(loaded: LoadedSpec, policy, samples: int, seed: int) -> Study:
    import tomllib

    if not 1 <= samples <= MAX_POINTS:
        raise InputError([Problem("--monte-carlo", "", None,
                                  f"{samples} samples; expected 1..{MAX_POINTS:,}")])
    raw = tomllib.loads(loaded.text)
    params, notes = tolerance_params(loaded, raw)
    if not params:
        raise InputError([Problem(str(loaded.path), "", None,
                                  "the spec declares no tolerance to sample (current_tolerance, "
                                  "frequency_tolerance, thickness_tolerance or a material "
                                  "range); a Monte Carlo study needs at least one")])
    rng = np.random.default_rng(seed)
    lows = np.array([p.tolerance[0] for p in params])
    highs = np.array([p.tolerance[1] for p in params])
    values = lows + (highs - lows) * rng.random((samples, len(params)))
    return Study("monte-carlo", loaded, policy, tuple(params), values, (samples,), (),
                 seed=seed, notes=tuple(notes), evaluated_at=_now(),
                 rule_ids=_selected_rules(policy))


def evaluate(study: Study, *, jobs: int = 1, scheduler: str | None = None,
             progress=None) -> Study:
    """Evaluate every point of `study` (serially, in `jobs` local processes, or on the Dask
    cluster at `scheduler`) and the nominal spec itself; `progress(done, total)` is called
    as chunks finish."""
    from rfcheck.run import run

    study._allocate()
    base = study.base()
    chunks = study.chunks()
    done = 0

    def took(chunk: Chunk) -> None:
        nonlocal done
        study.take(chunk)
        done += len(chunk.verdict)
        if progress is not None:
            progress(done, study.points)

    if scheduler:
        for chunk in _on_dask(scheduler, base, study.params, chunks):
            took(chunk)
    elif jobs > 1 and len(chunks) > 1:
        import multiprocessing
        from concurrent.futures import ProcessPoolExecutor, as_completed

        ctx = multiprocessing.get_context("spawn")
        with ProcessPoolExecutor(max_workers=jobs, mp_context=ctx) as pool:
            futures = [pool.submit(evaluate_chunk, base, study.params, s, v) for s, v in chunks]
            for fut in as_completed(futures):
                took(fut.result())
    else:
        for s, v in chunks:
            took(evaluate_chunk(base, study.params, s, v))
    nominal = run(study.loaded, study.policy, dt.datetime.fromisoformat(study.evaluated_at),
                  detail=False)
    binding = _binding_of(nominal.findings, study.rule_ids)
    study.nominal = {"values": {p.key: p.nominal for p in study.params},
                     "verdict": nominal.verdict, "binding": binding}
    return study


def _binding_of(findings, rule_ids) -> str | None:
    index = {r: i for i, r in enumerate(rule_ids)}
    one = Chunk(0, np.zeros(1, np.int8), np.full((1, len(rule_ids)), -1, np.int8),
                np.full((1, len(rule_ids)), np.nan), np.full((1, len(rule_ids)), np.nan),
                np.full(1, -1, np.int16), {}, {})
    _summarise(findings, index, one, 0)
    return rule_ids[int(one.binding[0])] if one.binding[0] >= 0 else None


def _on_dask(address: str, base: Base, params, chunks):
    """Chunks evaluated on the Dask distributed cluster at `address`, as they finish."""
    try:
        from dask.distributed import Client, as_completed
    except ImportError:
        from rfcheck.outputs import UsageProblem

        raise UsageProblem("--scheduler needs dask.distributed: pip install "
                           "'rfcheck[dask]'") from None
    client = Client(address, timeout="30s")
    try:
        scattered = client.scatter(base, broadcast=True)
        futures = [client.submit(evaluate_chunk, scattered, params, s, v, pure=False)
                   for s, v in chunks]
        for fut in as_completed(futures):
            yield fut.result()
    finally:
        client.close()


__all__ = ["CHUNK_POINTS", "MAX_POINTS", "Param", "SCHEMA_ID", "STATUSES", "Study", "VERDICTS",
           "evaluate", "evaluate_chunk", "grid_axis", "grid_study", "monte_carlo_study",
           "resolve", "tolerance_params", "wilson"]
