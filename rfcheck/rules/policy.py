"""Site policy: rule selection, thresholds (each with its source) and waivers.

The default policy ships as ``rfcheck/data/policy.toml``. A user policy file has the same
form; it may override option values (the source must be restated), narrow the selection
and add waivers. A waived finding stays visible with its reason and reference.

What a policy cannot do (DEVELOPERS.md, "What a policy cannot do"): set an option outside
the range its rule declares (`rfcheck.rules.registry.Range`), cross two ordered options,
write a waiver whose rule pattern spans more than one family (``rule = "*"``), or exceed
the budgets below. `include = []` selects no rule; the run's verdict is then "not
evaluated" (`rfcheck.run`), never pass.
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
from rfcheck.text import text_problem
from rfcheck.tomlines import LineIndex
from rfcheck.units import UnitError, parse_quantity

from .registry import Rule, all_rules

#: budgets of a policy file's own structure (the TOML reader itself is shared with the spec)
MAX_WAIVERS = 200
MAX_PATTERNS = 100  # entries of select.include or select.exclude
#: longest accepted text of each free-text field (characters)
TEXT_LIMITS = {"name": 200, "pattern": 100, "rule": 100, "subject": 200, "reason": 1000,
               "reference": 200, "approved_by": 200, "source": 1000}
WAIVER_KEYS = ("rule", "subject", "reason", "reference", "expires", "approved_by")


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
    expires: str | None = None  # as written: an ISO date or date-time
    approved_by: str | None = None
    #: the expiry as read: a date (applies through it, local date of the run), an aware
    #: date-time (applies until that instant) or a naive one (local time of the run)
    expires_at: dt.date | dt.datetime | None = field(default=None, compare=False)
    origin: str = ""  # the policy file that holds it
    line: int | None = None  # its line in that file

    def matches(self, rule_id: str, subject: str) -> bool:
        return fnmatch.fnmatchcase(rule_id, self.rule) and (
            self.subject is None or self.subject == subject)

    def expired(self, now: dt.datetime) -> bool:
        """Whether the waiver no longer applies at `now` (an aware date-time)."""
        at = self.expires_at
        if at is None:
            return False
        if isinstance(at, dt.datetime):
            # a naive date-time is read as local time where the check runs
            return now >= (at if at.tzinfo is not None else at.astimezone())
        return at < now.astimezone().date()

    def to_json(self) -> dict:
        out = {"rule": self.rule, "subject": self.subject, "reason": self.reason,
               "reference": self.reference, "expires": self.expires}
        if self.approved_by:
            out["approved_by"] = self.approved_by
        return out


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

    def waiver_for(self, rule_id: str, subject: str, today: dt.date | None = None,
                   now: dt.datetime | None = None) -> tuple[Waiver | None, Waiver | None]:
        """(the waiver that applies, or None; an expired waiver that would have applied, or None).

        A waiver with an expiry date applies through that date inclusive (the local date);
        one with a date-time applies until that instant (a date-time without offset is local
        time). `now` defaults to the present moment; `today` alone stands for its midnight.
        """
        if now is None:
            now = (dt.datetime.combine(today, dt.time.min).astimezone() if today is not None
                   else dt.datetime.now().astimezone())
        elif now.tzinfo is None:
            now = now.astimezone()
        expired = None
        for w in self.waivers:
            if w.matches(rule_id, subject):
                if w.expired(now):
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
        _check_order(base["options"], rules, "rfcheck/data/policy.toml", LineIndex(default_text),
                     set())
        return Policy(base["name"], base["include"], base["exclude"], base["options"],
                      base["waivers"], tuple(texts))
    path = Path(path)
    raw, text = _read_toml(path, "policy")
    lines = LineIndex(text)
    user = _parse(path.name, raw, lines, rules, path, require_all=False)
    texts.append((path.name, text))
    options = {rid: dict(opts) for rid, opts in base["options"].items()}
    for rid, opts in user["options"].items():
        options[rid].update(opts)
    _check_order(options, rules, str(path), lines,
                 {(rid, o) for rid, opts in user["options"].items() for o in opts})
    # `include` absent: the default selection; `include = []`: no rule at all
    include = base["include"] if user["include"] is None else user["include"]
    return Policy(user["name"] or base["name"], include,
                  user["exclude"] + base["exclude"], options,
                  base["waivers"] + user["waivers"], tuple(texts))


def _check_order(options: dict, rules: dict[str, Rule], file: str, lines: LineIndex,
                 set_here: set) -> None:
    """Refuse ordered option pairs that cross (a warning threshold beyond the failing one)."""
    problems = []
    for rid, r in rules.items():
        for lesser, greater, why in r.ordered:
            a, b = options.get(rid, {}).get(lesser), options.get(rid, {}).get(greater)
            if a is None or b is None or a.value <= b.value:
                continue
            name = greater if (rid, greater) in set_here and (rid, lesser) not in set_here \
                else lesser
            loc = ("options", rid, name)
            problems.append(Problem(
                file, f"options.{rid}.{name}", lines.line_of(loc),
                f"{lesser} = {a.text!r} lies above {greater} = {b.text!r}; expected "
                f"{lesser} ≤ {greater} ({why})"))
    if problems:
        raise InputError(problems)


_TOP = {"schema", "name", "select", "options", "waiver"}


def _families(pattern: str, rules: dict[str, Rule]) -> set[str]:
    """The families of the rules a waiver pattern matches."""
    return {r.split(".", 1)[0] for r in rules if fnmatch.fnmatchcase(r, pattern)}


def _parse(origin: str, raw: dict, lines: LineIndex, rules: dict[str, Rule],
           path: Path | None, *, require_all: bool) -> dict:
    file = str(path) if path else "rfcheck/data/policy.toml"
    problems: list[Problem] = []

    def fail(loc: tuple, msg: str) -> None:
        dotted = ".".join(f"[{p}]" if isinstance(p, int) else str(p) for p in loc).replace(".[", "[")
        problems.append(Problem(file, dotted, lines.line_of(loc), msg))

    def text_ok(loc: tuple, value: str, kind: str) -> bool:
        why = text_problem(value, TEXT_LIMITS[kind])
        if why:
            fail(loc, why)
        return why is None

    for key in raw:
        if key not in _TOP:
            fail((key,), f"unknown key; expected one of: {', '.join(sorted(_TOP))}")
    if raw.get("schema", 1) != 1:
        fail(("schema",), f"found {raw.get('schema')!r}; expected 1")
    name = raw.get("name", "")
    if not isinstance(name, str):
        fail(("name",), "expected a string: the policy's name")
        name = ""
    else:
        text_ok(("name",), name, "name")
    select = raw.get("select", {})
    include: tuple[str, ...] | None = None  # None: not given (the default selection applies)
    exclude: tuple[str, ...] = ()
    if not isinstance(select, dict):
        fail(("select",), "expected a table with 'include' and 'exclude' lists of rule-id prefixes")
    else:
        for key in select:
            if key not in ("include", "exclude"):
                fail(("select", key), "unknown key; expected 'include' or 'exclude'")
        for key in ("include", "exclude"):
            if key not in select:
                continue
            val = select[key]
            if not (isinstance(val, list) and all(isinstance(v, str) for v in val)):
                fail(("select", key), "expected a list of rule-id prefixes such as \"cutoff.\"")
                continue
            if len(val) > MAX_PATTERNS:
                fail(("select", key), f"{len(val)} entries; at most {MAX_PATTERNS} are accepted")
                continue
            good = True
            for v in val:
                if not text_ok(("select", key), v, "pattern"):
                    good = False
                    continue
                prefix = v.rstrip("*").rstrip(".")
                if v != "*" and not any(r == prefix or r.startswith(prefix + ".") or
                                        fnmatch.fnmatchcase(r, v) for r in rules):
                    fail(("select", key), f"'{v}' matches no rule; see `rfcheck rules`")
            if not good:
                continue
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
            if not text_ok(loc + ("source",), spec["source"], "source"):
                continue
            option = rules[rid].options[oname]
            try:
                val = parse_quantity(spec["value"], option.dimension)
            except UnitError as exc:
                fail(loc + ("value",), str(exc))
                continue
            if not option.valid.contains(val):
                fail(loc + ("value",), f"'{spec['value']}' is outside the valid range of "
                                       f"{rid} {oname}: expected {option.valid.text()} "
                                       f"({option.valid.why})")
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
    if len(raw_w) > MAX_WAIVERS:
        fail(("waiver",), f"{len(raw_w)} waivers; at most {MAX_WAIVERS} are accepted in one "
                          "policy (a waiver is a reviewed exception, not a rule selection)")
        raw_w = []
    for i, w in enumerate(raw_w):
        loc = ("waiver", i)
        if not isinstance(w, dict):
            fail(loc, "expected a table")
            continue
        before = len(problems)
        for k in sorted(set(w) - set(WAIVER_KEYS)):
            fail(loc + (k,), "unknown key; expected " + ", ".join(WAIVER_KEYS))
        for k in ("rule", "reason", "reference"):
            if not (isinstance(w.get(k), str) and w[k].strip()):
                fail(loc + (k,), f"a waiver needs a non-empty '{k}'")
            else:
                text_ok(loc + (k,), w[k], k)
        for k in ("subject", "approved_by"):
            if k in w:
                if not (isinstance(w[k], str) and w[k].strip()):
                    fail(loc + (k,), f"expected a non-empty string; leave '{k}' out "
                                     + ("to waive every subject of the rule" if k == "subject"
                                        else "if nobody is named"))
                else:
                    text_ok(loc + (k,), w[k], k)
        rid = w.get("rule")
        if isinstance(rid, str) and rid.strip() and len(problems) == before:
            families = _families(rid, rules)
            if not families:
                fail(loc + ("rule",), f"'{rid}' matches no rule; see `rfcheck rules`")
            elif len(families) > 1:
                fail(loc + ("rule",), f"'{rid}' matches rules of {len(families)} families; a "
                                      "waiver covers one rule or the rules of one family: name "
                                      "the rule (\"cutoff.o-mode\") or the family (\"cutoff.*\")"
                                      " and, where you can, the subject")
        expires, expires_at = _expiry(w.get("expires"), loc, fail)
        if len(problems) == before:
            waivers.append(Waiver(w["rule"], w.get("subject"), w["reason"], w["reference"],
                                  expires, w.get("approved_by"), expires_at, origin,
                                  lines.line_of(loc)))
    if problems:
        raise InputError(problems)
    if include is None and not path:
        include = ("*",)
    return {"name": name, "include": include, "exclude": exclude, "options": options,
            "waivers": tuple(waivers)}


def _expiry(value, loc: tuple, fail) -> tuple[str | None, dt.date | dt.datetime | None]:
    """(the expiry as ISO text, as a date or date-time) of a waiver; TOML dates and
    date-times (with or without offset) and ISO strings of either are accepted."""
    if value is None:
        return None, None
    if isinstance(value, str):
        text = value.strip()
        try:
            value = dt.date.fromisoformat(text)
        except ValueError:
            try:
                value = dt.datetime.fromisoformat(text)
            except ValueError:
                value = None
    if isinstance(value, dt.datetime) or (isinstance(value, dt.date)):
        return value.isoformat(), value
    fail(loc + ("expires",), "expected a date such as 2027-06-30 or a date-time such as "
                             "2027-06-30T18:00:00+02:00 (without offset: local time)")
    return None, None
