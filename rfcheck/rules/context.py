"""What a rule receives: the model, the envelope and shared, cached physics results.

Expensive things (the magnet's unit fields, the on-axis profile over the current scales, and
every other analysis of rfcheck.analysis) are computed once per run, cached in `_cache` and
shared by every rule, so a run costs one field evaluation, not one per rule.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from rfcheck.analysis import magnet_field
from rfcheck.analysis.envelope import Envelope
from rfcheck.analysis.state import SharedCache, memo
from rfcheck.findings import Finding, Quantity, Severity, Status
from rfcheck.model import SourceModel


@dataclass
class Context:
    model: SourceModel
    envelope: Envelope
    rule_id: str = ""
    severity: Severity = Severity.ERROR
    _cache: dict = field(default_factory=dict)
    #: option values (SI) of every selected rule: {rule id: {option: value}}; a rule that
    #: defers to another (e.g. a cutoff to the overdense route that judges it) reads its limit
    selected_options: dict = field(default_factory=dict)
    #: a cache kept across the runs of a sweep (rfcheck.sweep), or None: entries are keyed by
    #: the exact model parts they depend on, so a run reads only what its own model gives
    shared: SharedCache | None = None

    def for_rule(self, rule_id: str, severity: Severity) -> Context:
        """The same shared caches, labelled for one rule."""
        return Context(self.model, self.envelope, rule_id, severity, self._cache,
                       self.selected_options, self.shared)

    def option(self, rule_id: str, name: str) -> float | None:
        """Option `name` of another rule, or None when that rule is not selected."""
        return self.selected_options.get(rule_id, {}).get(name)

    # ---- shared physics (rfcheck.analysis.magnet_field, cached in _cache)

    def memo(self, name: str, parts: tuple, compute, *, heavy: bool = False):
        """compute() once per run under `name`; in a sweep also once per distinct `parts`
        (every model part the result depends on), through :class:`SharedCache`
        (:func:`rfcheck.analysis.state.memo`)."""
        return memo(self, name, parts, compute, heavy=heavy)

    @property
    def field_model(self):
        return magnet_field.field_model(self)

    @property
    def axis_z(self) -> np.ndarray:
        """Axial sample points over the chamber (m), those of the on-axis profiles."""
        return magnet_field.axis_z(self)

    def axis_field(self, scale: np.ndarray | float | None = None) -> np.ndarray:
        """|B|(z) on the axis at `axis_z`, shape (n_scale, n_z), T (see
        :func:`rfcheck.analysis.magnet_field.axis_field`)."""
        return magnet_field.axis_field(self, scale)

    def axis_profiles(self):
        """On-axis profiles (rfcheck.magnet.geometry.AxisProfile) for every envelope current scale."""
        return magnet_field.axis_profiles(self)

    def nominal_profile(self):
        """The on-axis profile at current scale 1."""
        return magnet_field.nominal_profile(self)

    def trap_geometries(self):
        """Trap geometry (B_min, maxima, wall field, last closed |B|) per envelope current scale."""
        return magnet_field.trap_geometries(self)

    # ---- finding helpers

    def not_applicable(self, subject: str, requirement: str, why: str,
                       details: dict | None = None) -> Finding:
        return Finding(self.rule_id, subject, Status.NOT_APPLICABLE, self.severity, requirement,
                       message=why, details=dict(details or {}))

    def finding(self, subject: str, requirement: str, *, passed: bool, message: str,
                measured: Quantity | None = None, limit: Quantity | None = None,
                margin: Quantity | None = None, worst_case: dict | None = None,
                warn: bool = False, details: dict | None = None) -> Finding:
        """A finding whose status follows from `passed`, `warn` and the rule's severity."""
        if passed:
            status = Status.WARN if warn else Status.PASS
        else:
            status = Status.FAIL if self.severity is Severity.ERROR else Status.WARN
        return Finding(self.rule_id, subject, status, self.severity, requirement, measured, limit,
                       margin, dict(worst_case or {}), message, details=dict(details or {}))

