"""Site policy: rule selection, thresholds (each with its source) and waivers.

The default policy ships as ``rfcheck/data/policy.toml``. A user policy file has the same
form; it may override option values (the source must be restated), narrow the selection
and add waivers. A waived finding stays visible with its reason and reference.
"""

from __future__ import annotations

import datetime as dt
import fnmatch
import hashlib
import tomllib
from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path

from rfcheck.spec import InputError, Problem, _read_toml
from rfcheck.tomlines import LineIndex
from rfcheck.units import UnitError, parse_quantity

from .registry import Rule, all_rules


@dataclass(frozen=True)
class OptionValue:
    text: str  # as written, e.g. "80 %"
    value: float  # SI
    source: str
    origin: str  # "default policy" or the user policy file name


@dataclass(frozen=True)
class Waiver:
    rule: str
    subject: str | None
    reason: str
    reference: str
    expires: str | None = None

    def matches(self, rule_id: str, subject: str) -> bool:
        return fnmatch.fnmatchcase(rule_id, self.rule) and (
            self.subject is None or self.subject == subject)

    def to_json(self) -> dict:
        return {"rule": self.rule, "subject": self.subject, "reason": self.reason,
                "reference": self.reference, "expires": self.expires}


@dataclass(frozen=True)
class Policy:
    name: str
    include: tuple[str, ...]
    exclude: tuple[str, ...]
    options: dict[str, dict[str, OptionValue]]
    waivers: tuple[Waiver, ...]
    texts: tuple[tuple[str, str], ...] = field(default_factory=tuple)  # (name, TOML text)

    @property
    def sha256(self) -> str:
        h = hashlib.sha256()
        for name, text in self.texts:
            h.update(name.encode() + b"\0" + text.encode("utf-8") + b"\0")
        return h.hexdigest()

    def selected(self, rule_id: str) -> bool:
        def hit(patterns):
            return any(rule_id == p or rule_id.startswith(p.rstrip("*").rstrip(".") + ".")
                       or fnmatch.fnmatchcase(rule_id, p) for p in patterns)

        return hit(self.include) and not hit(self.exclude)

    def option_values(self, rule: Rule) -> dict[str, float]:
        return {name: self.options[rule.id][name].value for name in rule.options}

    def waiver_for(self, rule_id: str, subject: str,
                   today: dt.date | None = None) -> tuple[Waiver | None, Waiver | None]:
        """(the waiver that applies, or None; an expired waiver that would have applied, or None).

        A waiver applies through its expiry date inclusive; `today` defaults to the local date.
        """
        today = today or dt.date.today()
        expired = None
        for w in self.waivers:
            if w.matches(rule_id, subject):
                if w.expires and dt.date.fromisoformat(w.expires) < today:
                    expired = expired or w
                    continue
                return w, None
        return None, expired


def _default_text() -> str:
    return resources.files("rfcheck.data").joinpath("policy.toml").read_text(encoding="utf-8")


def load_policy(path: str | Path | None = None) -> Policy:
    """The default policy, overlaid with the user policy at `path` if given."""
    rules = {r.id: r for r in all_rules()}
    default_text = _default_text()
    texts = [("default", default_text)]
    base = _parse("default policy", tomllib.loads(default_text), LineIndex(default_text), rules,
                  None, require_all=True)
    if path is None:
        return Policy(base["name"], base["include"], base["exclude"], base["options"],
                      base["waivers"], tuple(texts))
    path = Path(path)
    raw, text = _read_toml(path, "policy")
    user = _parse(path.name, raw, LineIndex(text), rules, path, require_all=False)
    texts.append((path.name, text))
    options = {rid: dict(opts) for rid, opts in base["options"].items()}
    for rid, opts in user["options"].items():
        options[rid].update(opts)
    return Policy(user["name"] or base["name"], user["include"] or base["include"],
                  user["exclude"] + base["exclude"], options,
                  base["waivers"] + user["waivers"], tuple(texts))


_TOP = {"schema", "name", "select", "options", "waiver"}


def _parse(origin: str, raw: dict, lines: LineIndex, rules: dict[str, Rule],
           path: Path | None, *, require_all: bool) -> dict:
    file = str(path) if path else "rfcheck/data/policy.toml"
    problems: list[Problem] = []

    def fail(loc: tuple, msg: str) -> None:
        dotted = ".".join(f"[{p}]" if isinstance(p, int) else str(p) for p in loc).replace(".[", "[")
        problems.append(Problem(file, dotted, lines.line_of(loc), msg))

    for key in raw:
        if key not in _TOP:
            fail((key,), f"unknown key; expected one of: {', '.join(sorted(_TOP))}")
    if raw.get("schema", 1) != 1:
        fail(("schema",), f"found {raw.get('schema')!r}; expected 1")
    select = raw.get("select", {})
    include: tuple[str, ...] = ()
    exclude: tuple[str, ...] = ()
    if not isinstance(select, dict):
        fail(("select",), "expected a table with 'include' and 'exclude' lists of rule-id prefixes")
    else:
        for key in select:
            if key not in ("include", "exclude"):
                fail(("select", key), "unknown key; expected 'include' or 'exclude'")
        for key in ("include", "exclude"):
            val = select.get(key, [])
            if not (isinstance(val, list) and all(isinstance(v, str) for v in val)):
                fail(("select", key), "expected a list of rule-id prefixes such as \"cutoff.\"")
                continue
            for v in val:
                prefix = v.rstrip("*").rstrip(".")
                if v != "*" and not any(r == prefix or r.startswith(prefix + ".") or
                                        fnmatch.fnmatchcase(r, v) for r in rules):
                    fail(("select", key), f"'{v}' matches no rule; see `rfcheck rules`")
            if key == "include":
                include = tuple(val)
            else:
                exclude = tuple(val)
    options: dict[str, dict[str, OptionValue]] = {}
    raw_opts = raw.get("options", {})
    if not isinstance(raw_opts, dict):
        fail(("options",), "expected a table of rule ids")
        raw_opts = {}
    for rid, opts in raw_opts.items():
        if rid not in rules:
            fail(("options", rid), f"unknown rule '{rid}'; see `rfcheck rules`")
            continue
        if not isinstance(opts, dict):
            fail(("options", rid), "expected a table of options")
            continue
        for oname, spec in opts.items():
            loc = ("options", rid, oname)
            if oname not in rules[rid].options:
                known = ", ".join(rules[rid].options) or "none"
                fail(loc, f"rule '{rid}' has no option '{oname}' (options: {known})")
                continue
            if not (isinstance(spec, dict) and isinstance(spec.get("value"), str)
                    and isinstance(spec.get("source"), str) and spec["source"].strip()):
                fail(loc, 'expected { value = "<number> <unit>", source = "<where it comes from>" }')
                continue
            extra = set(spec) - {"value", "source"}
            if extra:
                fail(loc, f"unknown key(s) {', '.join(sorted(extra))}; expected value and source")
            try:
                val = parse_quantity(spec["value"], rules[rid].options[oname].dimension)
            except UnitError as exc:
                fail(loc + ("value",), str(exc))
                continue
            options.setdefault(rid, {})[oname] = OptionValue(spec["value"], val, spec["source"],
                                                              origin)
    if require_all:
        for rid, r in rules.items():
            for oname in r.options:
                if oname not in options.get(rid, {}):
                    fail(("options", rid), f"default policy lacks option '{oname}' of rule '{rid}'")
    waivers: list[Waiver] = []
    raw_w = raw.get("waiver", [])
    if not isinstance(raw_w, list):
        fail(("waiver",), "expected [[waiver]] tables")
        raw_w = []
    for i, w in enumerate(raw_w):
        loc = ("waiver", i)
        if not isinstance(w, dict):
            fail(loc, "expected a table")
            continue
        extra = set(w) - {"rule", "subject", "reason", "reference", "expires"}
        for k in sorted(extra):
            fail(loc + (k,), "unknown key; expected rule, subject, reason, reference, expires")
        for k in ("rule", "reason", "reference"):
            if not (isinstance(w.get(k), str) and w[k].strip()):
                fail(loc + (k,), f"a waiver needs a non-empty '{k}'")
        rid = w.get("rule")
        if isinstance(rid, str) and not any(fnmatch.fnmatchcase(r, rid) for r in rules):
            fail(loc + ("rule",), f"'{rid}' matches no rule; see `rfcheck rules`")
        expires = w.get("expires")
        if expires is not None:
            if isinstance(expires, dt.date):
                expires = expires.isoformat()
            else:
                try:
                    expires = dt.date.fromisoformat(str(expires)).isoformat()
                except ValueError:
                    fail(loc + ("expires",), f"found {expires!r}; expected a date such as 2027-06-30")
                    expires = None
        if not problems:
            waivers.append(Waiver(w["rule"], w.get("subject"), w["reason"], w["reference"],
                                  expires))
    if problems:
        raise InputError(problems)
    name = raw.get("name", "")
    return {"name": name if isinstance(name, str) else "", "include": include or (() if path else ("*",)),
            "exclude": exclude, "options": options, "waivers": tuple(waivers)}
