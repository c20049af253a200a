"""The rule catalogue: registry, policy, envelope and one module per rule family."""

from .registry import REGISTRY, Option, Rule, all_rules, get_rule, rule

__all__ = ["REGISTRY", "Option", "Rule", "all_rules", "get_rule", "rule"]
