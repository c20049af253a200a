"""The rule registry: a rule is one decorated function whose docstring is its documentation."""

from __future__ import annotations

import inspect
import math
from collections.abc import Callable, Iterator
from dataclasses import dataclass

from rfcheck.findings import Finding, Severity

__all__ = ["Option", "Range", "Rule", "rule", "REGISTRY", "all_rules", "get_rule"]


#: how bounds are shown in messages: display unit -> (factor from SI, suffix)
_SHOWN = {"1": (1.0, ""), "%": (100.0, " %"), "mT": (1e3, " mT"), "mm": (1e3, " mm"),
          "m": (1.0, " m"), "dB": (None, " dB")}


@dataclass(frozen=True)
class Range:
    """The values an option may take, in SI, and why: a policy outside it is bad input.

    `shown` is the unit the bounds are written in for messages ("%", "1", "dB" for a
    linear power ratio shown in decibels, "mT", "mm", "m"). Open bounds exclude the bound.
    """

    low: float | None
    high: float | None
    why: str
    shown: str = "1"
    low_open: bool = False
    high_open: bool = False

    def __post_init__(self) -> None:
        if self.shown not in _SHOWN:
            raise ValueError(f"unknown display unit {self.shown!r}")
        if not self.why.strip():
            raise ValueError("a range states why it is the range")

    def contains(self, x: float) -> bool:
        if not math.isfinite(x):
            return False
        if self.low is not None and (x < self.low or (self.low_open and x == self.low)):
            return False
        return not (self.high is not None and (x > self.high or (self.high_open and x == self.high)))

    def _show(self, x: float) -> str:
        factor, suffix = _SHOWN[self.shown]
        y = 10.0 * math.log10(x) if factor is None else x * factor
        return f"{y:g}{suffix}"

    def text(self) -> str:
        """E.g. "more than 0 % and at most 100 %", "from 1 to 10"."""
        lo = None if self.low is None else self._show(self.low)
        hi = None if self.high is None else self._show(self.high)
        if lo is not None and hi is not None and not (self.low_open or self.high_open):
            return f"from {lo} to {hi}"
        parts = []
        if lo is not None:
            parts.append(f"more than {lo}" if self.low_open else f"at least {lo}")
        if hi is not None:
            parts.append(f"less than {hi}" if self.high_open else f"at most {hi}")
        return " and ".join(parts) or "any finite value"


@dataclass(frozen=True)
class Option:
    """A rule option: its dimension (see rfcheck.units.DIMENSIONS), what it means and the
    range of values it may take (with the reason), declared with the rule.

    The value and its source live in the policy file (default policy shipped as data).
    """

    dimension: str
    doc: str
    valid: Range | None = None


@dataclass(frozen=True)
class Rule:
    id: str
    summary: str
    severity: Severity
    options: dict[str, Option]
    func: Callable[..., Iterator[Finding]]
    applies: str = ""  # one line: to which sources/feeds the rule applies
    #: (lesser, greater, why): option `lesser` may not exceed option `greater`
    ordered: tuple[tuple[str, str, str], ...] = ()

    @property
    def family(self) -> str:
        return self.id.split(".", 1)[0]

    @property
    def doc(self) -> str:
        return inspect.cleandoc(self.func.__doc__ or "")


REGISTRY: dict[str, Rule] = {}


def rule(rule_id: str, *, severity: Severity, summary: str,
         options: dict[str, Option] | None = None, applies: str = "",
         ordered: tuple[tuple[str, str, str], ...] = ()):
    """Register `func(ctx, **options) -> Iterator[Finding]` under the dotted id `family.name`.

    Every option declares its valid range; `ordered` lists pairs of options whose values
    must not cross (a warning threshold that lies beyond the failing one, say).
    """
    if "." not in rule_id or rule_id != rule_id.lower():
        raise ValueError(f"rule id {rule_id!r} must be lower-case 'family.name'")
    for name, opt in (options or {}).items():
        if opt.valid is None:
            raise ValueError(f"option {name!r} of rule {rule_id!r} declares no valid range")
    for lesser, greater, why in ordered:
        if lesser not in (options or {}) or greater not in (options or {}) or not why.strip():
            raise ValueError(f"rule {rule_id!r}: ordering {lesser!r} <= {greater!r} needs two "
                             "declared options and a reason")

    def wrap(func):
        if rule_id in REGISTRY:
            raise ValueError(f"rule {rule_id!r} registered twice")
        if not (func.__doc__ or "").strip():
            raise ValueError(f"rule {rule_id!r} needs a docstring: it is its documentation")
        REGISTRY[rule_id] = Rule(rule_id, summary, severity, dict(options or {}), func, applies,
                                 tuple(ordered))
        return func

    return wrap


def all_rules() -> list[Rule]:
    """Every registered rule, sorted by id (imports the rule families on first use)."""
    from rfcheck.rules import families  # noqa: F401  (registers the rules)

    return [REGISTRY[k] for k in sorted(REGISTRY)]


def get_rule(rule_id: str) -> Rule:
    rules = {r.id: r for r in all_rules()}
    if rule_id not in rules:
        raise KeyError(rule_id)
    return rules[rule_id]
