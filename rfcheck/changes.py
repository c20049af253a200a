"""Change control: what changed between two revisions of a source, and which verdicts moved.

Two parts, both plain data (every output is a view of them):

* **Spec diff** (:func:`spec_changes`): both specs are loaded by `rfcheck.spec`, and their
  normalised forms (every quantity in SI, defaults filled in) are compared, so formatting,
  comments, key order, inline versus full tables and unit spelling never show ("875 G"
  equals "87.5 mT"). Numbers are equal within a relative tolerance of :data:`VALUE_RTOL`
  (float noise of a unit conversion is far below it). Entries of a list that carry an
  ``id`` (coils, rings, feeds, windows, landmarks, leak paths …) are matched by id: a
  renamed coil is one removal and one addition. Other lists (ions, layers, profile points)
  are matched by position. Beside the values, each input file's fingerprint is compared
  (a measured table may change under the same name), and the policies' option values and
  selections.
* **Verdict diff** (:func:`verdict_changes`): findings are matched by rule id and subject.
  Status changes come first (worse, better, then new and gone findings), then margin
  changes beyond :data:`MARGIN_RTOL` of the larger of the two margins and the limit, each
  with the numbers before and after and the worst-case point.

A revision is a spec file or an archived rfcheck PDF (its attached spec and policy are used,
see `rfcheck.verify`). :func:`compare` evaluates both and returns a :class:`ChangeSet`.
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

#: relative tolerance of equal spec values in SI (a unit conversion's float noise is ~1e-16)
VALUE_RTOL = 1e-9
#: relative tolerance of a margin change, of max(|old margin|, |new margin|, |limit|): the
#: re-run noise across NumPy and BLAS builds reaches 1e-6 (tests/test_approved.py)
MARGIN_RTOL = 1e-6

#: how bad a status is, for ordering and for "worse"/"better"
_RANK = {"not-applicable": 0, "pass": 0, "waived": 1, "warn": 2, "fail": 3, "error": 3}


@dataclass(frozen=True)
class ValueChange:
    """One changed value of the spec (or one added or removed entity)."""

    path: str  # entity path, e.g. "magnet.coils[downstream].current"
    kind: str  # "changed", "added", "removed"
    old: object = None  # SI (the normalised value)
    new: object = None
    old_text: str = ""  # as written in the file, where it was written
    new_text: str = ""

    def line(self) -> str:
        if self.kind == "added":
            return f"{self.path}: added ({self.new_text})"
        if self.kind == "removed":
            return f"{self.path}: removed (was {self.old_text})"
        return f"{self.path}: {self.old_text} → {self.new_text}"

    def to_json(self) -> dict:
        return {"path": self.path, "kind": self.kind, "old": self.old, "new": self.new,
                "old_text": self.old_text, "new_text": self.new_text}


@dataclass(frozen=True)
class FindingChange:
    """One finding whose status moved, that is new or gone, or whose margin changed."""

    rule: str
    subject: str
    kind: str  # "worse", "better", "moved", "new", "gone", "margin"
    old: dict | None  # the finding's JSON before (None when new)
    new: dict | None  # after (None when gone)

    @property
    def old_status(self) -> str | None:
        return self.old["status"] if self.old else None

    @property
    def new_status(self) -> str | None:
        return self.new["status"] if self.new else None

    @property
    def moved(self) -> bool:
        return self.kind != "margin"

    @property
    def worsened(self) -> bool:
        if self.kind in ("worse", "new"):
            return self.kind == "worse" or _RANK.get(self.new_status, 0) > 0
        if self.kind == "margin":
            a, b = _num(self.old, "margin"), _num(self.new, "margin")
            return a is not None and b is not None and b < a
        return False

    def numbers(self) -> str:
        """'margin 23.1 mm → 3.8 mm; measured … → …' for the values that changed."""
        from rfcheck.units import format_si

        parts = []
        for key in ("measured", "margin", "limit"):
            a, b = _q(self.old, key), _q(self.new, key)
            if a is None and b is None:
                continue
            ta = format_si(a["value"], a["unit"]) if a and a.get("value") is not None else "—"
            tb = format_si(b["value"], b["unit"]) if b and b.get("value") is not None else "—"
            if ta != tb or key == "margin":
                parts.append(f"{key} {ta} → {tb}")
        return "; ".join(parts)

    def worst_case(self) -> str:
        from rfcheck.units import format_si

        f = self.new or self.old or {}
        out = []
        for k, v in (f.get("worst_case") or {}).items():
            if isinstance(v, dict) and v.get("value") is not None:
                out.append(f"{k.replace('_', ' ')} {format_si(v['value'], v['unit'])}")
        return "; ".join(out)

    def line(self) -> str:
        head = f"{self.rule} ({self.subject})"
        word = {None: "—"}
        a = word.get(self.old_status, str(self.old_status).upper())
        b = word.get(self.new_status, str(self.new_status).upper())
        if self.kind == "new":
            text = f"{head}: new, {b}"
        elif self.kind == "gone":
            text = f"{head}: gone (was {a})"
        elif self.kind == "margin":
            text = f"{head}: {b}, margin {'worse' if self.worsened else 'better'}"
        else:
            text = f"{head}: {a} → {b}"
        nums, worst = self.numbers(), self.worst_case()
        return text + (f"; {nums}" if nums else "") + (f"; worst case {worst}" if worst else "")

    def to_json(self) -> dict:
        return {"rule": self.rule, "subject": self.subject, "kind": self.kind,
                "old_status": self.old_status, "new_status": self.new_status,
                "old": {k: (self.old or {}).get(k) for k in ("measured", "limit", "margin",
                                                             "worst_case", "message")}
                if self.old else None,
                "new": {k: (self.new or {}).get(k) for k in ("measured", "limit", "margin",
                                                             "worst_case", "message")}
                if self.new else None}


def _q(f: dict | None, key: str) -> dict | None:
    v = (f or {}).get(key)
    return v if isinstance(v, dict) else None


def _num(f: dict | None, key: str) -> float | None:
    q = _q(f, key)
    v = q.get("value") if q else None
    return float(v) if isinstance(v, (int, float)) else None


# --------------------------------------------------------------------------- spec diff


def _tol(x: float) -> str:
    """1e-09 -> '1e-9'."""
    return f"{x:g}".replace("e-0", "e-")


def _same(a, b) -> bool:
    if isinstance(a, bool) or isinstance(b, bool):
        return a is b
    if isinstance(a, (int, float)) and isinstance(b, (int, float)):
        return math.isclose(a, b, rel_tol=VALUE_RTOL, abs_tol=0.0)
    return a == b


def _by_id(items) -> dict | None:
    """{id: entry} when every entry of the list is a table with a distinct string id."""
    if not items or not all(isinstance(x, dict) and isinstance(x.get("id"), str) for x in items):
        return None
    ids = [x["id"] for x in items]
    return dict(zip(ids, items)) if len(set(ids)) == len(ids) else None


def _raw_at(raw, steps):
    """The value as written at `steps` (keys, ("id", x) or list indices), or None."""
    node = raw
    for s in steps:
        if isinstance(s, tuple):
            if not isinstance(node, list):
                return None
            node = next((x for x in node if isinstance(x, dict) and x.get("id") == s[1]), None)
        elif isinstance(s, int):
            node = node[s] if isinstance(node, list) and s < len(node) else None
        else:
            node = node.get(s) if isinstance(node, dict) else None
        if node is None:
            return None
    return node


def _written(raw, steps, si) -> str:
    w = _raw_at(raw, steps)
    if w is None:
        return _plain(si) + " (default)" if si is not None and not isinstance(si, (dict, list)) \
            else _plain(si)
    return _plain(w)


def _plain(v) -> str:
    if isinstance(v, str):
        return f'"{v}"'
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, float):
        return f"{v:.6g}"
    if isinstance(v, dict):
        if "id" in v:
            return f"id {v['id']}"
        return "{" + ", ".join(f"{k} = {_plain(x)}" for k, x in v.items()) + "}"
    if isinstance(v, list):
        return "[" + ", ".join(_plain(x) for x in v) + "]"
    return "none" if v is None else str(v)


def _path(steps) -> str:
    out = ""
    for s in steps:
        if isinstance(s, tuple):
            out += f"[{s[1]}]"
        elif isinstance(s, int):
            out += f"[{s}]"
        else:
            out += ("." if out else "") + s
    return out


def spec_changes(old: dict, new: dict, old_raw: dict | None = None,
                 new_raw: dict | None = None) -> list[ValueChange]:
    """Every difference between two normalised specs (rfcheck.spec.LoadedSpec.normalised),
    in the new spec's key order; `old_raw`/`new_raw` (the TOML as parsed) give the values as
    written."""
    old_raw, new_raw = old_raw or {}, new_raw or {}
    out: list[ValueChange] = []

    def walk(a, b, steps):
        if isinstance(a, dict) and isinstance(b, dict):
            for k in list(b) + [k for k in a if k not in b]:
                if k not in a:
                    out.append(ValueChange(_path(steps + [k]), "added", None, b[k], "",
                                           _written(new_raw, steps + [k], b[k])))
                elif k not in b:
                    out.append(ValueChange(_path(steps + [k]), "removed", a[k], None,
                                           _written(old_raw, steps + [k], a[k]), ""))
                else:
                    walk(a[k], b[k], steps + [k])
            return
        if isinstance(a, list) and isinstance(b, list):
            ia, ib = _by_id(a), _by_id(b)
            if ia is not None and ib is not None or (ia is not None and not b) \
                    or (ib is not None and not a):
                ia, ib = ia or {}, ib or {}
                for k in list(ib) + [k for k in ia if k not in ib]:
                    s = steps + [("id", k)]
                    if k not in ia:
                        out.append(ValueChange(_path(s), "added", None, ib[k], "",
                                               _plain(_raw_at(new_raw, s) or ib[k])))
                    elif k not in ib:
                        out.append(ValueChange(_path(s), "removed", ia[k], None,
                                               _plain(_raw_at(old_raw, s) or ia[k]), ""))
                    else:
                        walk(ia[k], ib[k], s)
                return
            if all(not isinstance(x, (dict, list)) for x in a + b):
                if len(a) != len(b) or not all(_same(x, y) for x, y in zip(a, b)):
                    out.append(ValueChange(_path(steps), "changed", a, b,
                                           _written(old_raw, steps, a), _written(new_raw, steps, b)))
                return
            for k in range(max(len(a), len(b))):
                s = steps + [k]
                if k >= len(a):
                    out.append(ValueChange(_path(s), "added", None, b[k], "",
                                           _plain(_raw_at(new_raw, s) or b[k])))
                elif k >= len(b):
                    out.append(ValueChange(_path(s), "removed", a[k], None,
                                           _plain(_raw_at(old_raw, s) or a[k]), ""))
                else:
                    walk(a[k], b[k], s)
            return
        if a is None and b is not None or b is None and a is not None:
            kind = "added" if a is None else "removed"
            out.append(ValueChange(_path(steps), kind, a, b,
                                   _written(old_raw, steps, a) if a is not None else "",
                                   _written(new_raw, steps, b) if b is not None else ""))
            return
        if not _same(a, b):
            out.append(ValueChange(_path(steps), "changed", a, b,
                                   _written(old_raw, steps, a), _written(new_raw, steps, b)))

    walk(old, new, [])
    return out


def input_changes(old_run, new_run) -> list[ValueChange]:
    """Input files other than the spec whose bytes differ (a measured table rewritten under
    the same name changes no spec value), and policies whose text differs."""
    def files(run):
        return {(i.role, i.file): i for i in run.inputs if i.role != "specification"}

    a, b = files(old_run), files(new_run)
    out = []
    for key in list(b) + [k for k in a if k not in b]:
        role, name = key
        path = f"input[{role}: {name}]"
        if key not in a:
            out.append(ValueChange(path, "added", None, b[key].sha256, "",
                                   f"SHA-256 {b[key].sha256[:16]}…"))
        elif key not in b:
            out.append(ValueChange(path, "removed", a[key].sha256, None,
                                   f"SHA-256 {a[key].sha256[:16]}…", ""))
        elif a[key].sha256 != b[key].sha256:
            out.append(ValueChange(path, "changed", a[key].sha256, b[key].sha256,
                                   f"SHA-256 {a[key].sha256[:16]}…",
                                   f"SHA-256 {b[key].sha256[:16]}…"))
    return out


def policy_changes(old_run, new_run) -> list[ValueChange]:
    """Rules selected or dropped, and option values changed (in SI), between two runs."""
    a = {r.id: r for r in old_run.rules}
    b = {r.id: r for r in new_run.rules}
    out = []
    for rid in list(b) + [r for r in a if r not in b]:
        if rid not in a:
            out.append(ValueChange(f"policy.select[{rid}]", "added", None, rid, "", "selected"))
        elif rid not in b:
            out.append(ValueChange(f"policy.select[{rid}]", "removed", rid, None, "selected", ""))
        else:
            for name, opt in b[rid].options.items():
                before = a[rid].options.get(name)
                if before is None or not _same(before["si"], opt["si"]):
                    out.append(ValueChange(
                        f"policy.{rid}.{name}", "changed", before and before["si"], opt["si"],
                        _plain(before["value"]) if before else "", _plain(opt["value"])))
    return out


# --------------------------------------------------------------------------- verdict diff


def _margin_changed(a: dict, b: dict) -> bool:
    x, y = _num(a, "margin"), _num(b, "margin")
    if x is None or y is None:
        x, y = _num(a, "measured"), _num(b, "measured")
        if x is None or y is None:
            return (x is None) != (y is None)
        scale = max(abs(x), abs(y))
    else:
        lim = _num(b, "limit") or _num(a, "limit") or 0.0
        scale = max(abs(x), abs(y), abs(lim))
    return abs(x - y) > MARGIN_RTOL * scale


def verdict_changes(old: list[dict], new: list[dict]) -> list[FindingChange]:
    """Findings (their JSON) matched by rule and subject: status changes first (worse, better,
    other moves), then new and gone findings, then margin changes (worse first)."""
    def index(fs):
        out: dict[tuple, dict] = {}
        for f in fs:
            k = (f["rule"], f["subject"])
            n = 2
            while k in out:  # a rule that repeats a subject: keep each, numbered in order
                k = (f["rule"], f"{f['subject']} #{n}")
                n += 1
            out[k] = f
        return out

    a, b = index(old), index(new)
    groups: dict[str, list[FindingChange]] = {k: [] for k in
                                              ("worse", "better", "moved", "new", "gone", "margin")}
    for key, f in b.items():
        if key not in a:
            groups["new"].append(FindingChange(key[0], key[1], "new", None, f))
            continue
        g = a[key]
        if g["status"] != f["status"]:
            ra, rb = _RANK.get(g["status"], 0), _RANK.get(f["status"], 0)
            kind = "worse" if rb > ra else "better" if rb < ra else "moved"
            groups[kind].append(FindingChange(key[0], key[1], kind, g, f))
        elif _margin_changed(g, f):
            groups["margin"].append(FindingChange(key[0], key[1], "margin", g, f))
    for key, g in a.items():
        if key not in b:
            groups["gone"].append(FindingChange(key[0], key[1], "gone", g, None))
    groups["margin"].sort(key=lambda c: not c.worsened)
    return [c for k in groups for c in groups[k]]


# --------------------------------------------------------------------------- both revisions


@dataclass
class Revision:
    """One side of a comparison: where it came from, the loaded spec and its run."""

    origin: Path
    kind: str  # "spec" or "report"
    run: object
    raw: dict = field(default_factory=dict)

    @property
    def label(self) -> str:
        r = self.run
        return f"{r.spec_name} rev. {r.spec_revision}" if r.spec_revision else r.spec_name

    def fingerprint(self) -> dict:
        r = self.run
        return {"file": str(self.origin), "kind": self.kind, "name": r.spec_name,
                "revision": r.spec_revision, "spec_file": r.spec_file,
                "spec_sha256": r.spec_sha256, "policy_sha256": r.policy_sha256,
                "verdict": r.verdict}


def load_revision(path: Path, policy_path: Path | None, workdir: Path) -> Revision:
    """Evaluate one revision: a spec (with `policy_path`, or the defaults) or an archived
    rfcheck PDF (its attached spec and policy; `policy_path` does not apply to it)."""
    from rfcheck.rules.policy import load_policy
    from rfcheck.run import run
    from rfcheck.spec import load_spec
    from rfcheck.verify import is_pdf, materialise, read_report, recorded_instant

    path = Path(path)
    if is_pdf(path):
        archive = read_report(path)
        laid = materialise(archive, workdir)
        loaded = load_spec(laid.spec)
        result = run(loaded, load_policy(laid.policy), evaluated_at=recorded_instant(archive.results))
        kind = "report"
    else:
        loaded = load_spec(path)
        result = run(loaded, load_policy(policy_path))
        kind = "spec"
    try:
        raw = tomllib.loads(loaded.text)
    except tomllib.TOMLDecodeError:  # the loader read it already; cannot happen
        raw = {}
    return Revision(path, kind, result, raw)


@dataclass
class ChangeSet:
    """Everything `rfcheck diff` reports."""

    old: Revision
    new: Revision
    values: list[ValueChange]
    inputs: list[ValueChange]
    policy: list[ValueChange]
    findings: list[FindingChange]

    @property
    def moved(self) -> list[FindingChange]:
        return [c for c in self.findings if c.moved]

    @property
    def worsened(self) -> list[FindingChange]:
        return [c for c in self.findings if c.worsened]

    @property
    def verdict_moved(self) -> bool:
        return self.old.run.verdict != self.new.run.verdict

    @property
    def exit_code(self) -> int:
        """0 when no verdict moved and nothing worsened, 1 otherwise."""
        return 1 if (self.verdict_moved or self.moved or self.worsened) else 0

    def spec_empty(self) -> bool:
        return not (self.values or self.inputs or self.policy)

    def summary(self) -> dict:
        """Plain data for the change-request page and the JSON."""
        from rfcheck.views import verdict_word

        return {
            "old": {**self.old.fingerprint(), "label": self.old.label,
                    "verdict_word": verdict_word(self.old.run)},
            "new": {**self.new.fingerprint(), "label": self.new.label,
                    "verdict_word": verdict_word(self.new.run)},
            "verdict_moved": self.verdict_moved,
            "value_tolerance": VALUE_RTOL,
            "margin_tolerance": MARGIN_RTOL,
            "spec_changes": [c.to_json() | {"line": c.line()} for c in self.values],
            "input_changes": [c.to_json() | {"line": c.line()} for c in self.inputs],
            "policy_changes": [c.to_json() | {"line": c.line()} for c in self.policy],
            "finding_changes": [c.to_json() | {"line": c.line(), "moved": c.moved,
                                               "worsened": c.worsened}
                                for c in self.findings],
            "moved_rules": sorted({c.rule for c in self.moved}),
            "worsened_rules": sorted({c.rule for c in self.worsened}),
        }

    def to_json(self) -> dict:
        return {"schema": "rfcheck-diff/1", **self.summary(), "exit": self.exit_code}

    def text(self) -> str:
        """The terminal view."""
        s = self.summary()
        out = [f"old: {s['old']['label']} ({self.old.origin}, {s['old']['verdict_word']}, "
               f"spec SHA-256 {self.old.run.spec_sha256[:16]}…)",
               f"new: {s['new']['label']} ({self.new.origin}, {s['new']['verdict_word']}, "
               f"spec SHA-256 {self.new.run.spec_sha256[:16]}…)", ""]
        changes = self.values + self.inputs + self.policy
        out.append(f"What changed ({len(changes)}; values in SI, relative tolerance "
                   f"{_tol(VALUE_RTOL)}):" if changes else
                   f"What changed: nothing (values in SI, relative tolerance {_tol(VALUE_RTOL)})")
        out += [f"  {c.line()}" for c in changes]
        out.append("")
        moved = self.moved
        out.append(f"Verdicts moved ({len(moved)}):" if moved else "Verdicts moved: none")
        out += [f"  {c.line()}" for c in moved]
        margins = [c for c in self.findings if not c.moved]
        if margins:
            out.append(f"Margins changed beyond {_tol(MARGIN_RTOL)} relative ({len(margins)}):")
            out += [f"  {c.line()}" for c in margins]
        out.append("")
        word = s["new"]["verdict_word"]
        if self.verdict_moved:
            out.append(f"Verdict: {s['old']['verdict_word']} → {word}")
        else:
            out.append(f"Verdict: {word} (unchanged)")
        return "\n".join(out)


def compare(old_path: Path, new_path: Path, policy_path: Path | None = None) -> ChangeSet:
    """Evaluate both revisions and diff them."""
    import tempfile

    with tempfile.TemporaryDirectory(prefix="rfcheck-diff-") as tmp:
        old = load_revision(old_path, policy_path, Path(tmp) / "old")
        new = load_revision(new_path, policy_path, Path(tmp) / "new")
    return changeset(old, new)


def changeset(old: Revision, new: Revision) -> ChangeSet:
    a, b = old.run, new.run
    return ChangeSet(
        old, new,
        values=spec_changes(a.spec_normalised, b.spec_normalised, old.raw, new.raw),
        inputs=input_changes(a, b), policy=policy_changes(a, b),
        findings=verdict_changes([f.to_json() for f in a.findings],
                                 [f.to_json() for f in b.findings]))


__all__ = ["ChangeSet", "FindingChange", "MARGIN_RTOL", "Revision", "VALUE_RTOL", "ValueChange",
           "changeset", "compare", "load_revision", "spec_changes", "verdict_changes"]
