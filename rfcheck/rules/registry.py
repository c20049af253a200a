"""The rule registry: a rule is one decorated function whose docstring is its documentation."""

from __future__ import annotations

import inspect
from collections.abc import Callable, Iterator
from dataclasses import dataclass

from rfcheck.findings import Finding, Severity

__all__ = ["Option", "Rule", "rule", "REGISTRY", "all_rules", "get_rule"]


@dataclass(frozen=True)
class Option:
    """A rule option: its dimension (see rfcheck.units.DIMENSIONS) and what it means.

    The value and its source live in the policy file (default policy shipped as data).
    """

    dimension: str
    doc: str


@dataclass(frozen=True)
class Rule:
    id: str
    summary: str
    severity: Severity
    options: dict[str, Option]
    func: Callable[..., Iterator[Finding]]
    applies: str = ""  # one line: to which sources/feeds the rule applies

    @property
    def family(self) -> str:
        return self.id.split(".", 1)[0]

    @property
    def doc(self) -> str:
        return inspect.cleandoc(self.func.__doc__ or "")


REGISTRY: dict[str, Rule] = {}


def rule(rule_id: str, *, severity: Severity, summary: str,
         options: dict[str, Option] | None = None, applies: str = ""):
    """Register `func(ctx, **options) -> Iterator[Finding]` under the dotted id `family.name`."""
    if "." not in rule_id or rule_id != rule_id.lower():
        raise ValueError(f"rule id {rule_id!r} must be lower-case 'family.name'")

    def wrap(func):
        if rule_id in REGISTRY:
            raise ValueError(f"rule {rule_id!r} registered twice")
        if not (func.__doc__ or "").strip():
            raise ValueError(f"rule {rule_id!r} needs a docstring: it is its documentation")
        REGISTRY[rule_id] = Rule(rule_id, summary, severity, dict(options or {}), func, applies)
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
