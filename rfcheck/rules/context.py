"""What a rule receives: the model, the envelope and shared, cached physics results.

Expensive things (the magnet's unit fields, the on-axis profile over the current scales) are
computed once here and shared by every rule, so a run costs one field evaluation, not one per
rule.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from rfcheck.findings import Finding, Quantity, Severity, Status
from rfcheck.model import SourceModel

from .envelope import Envelope



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
    shared: dict | None = None

    def for_rule(self, rule_id: str, severity: Severity) -> Context:
        """The same shared caches, labelled for one rule."""
        return Context(self.model, self.envelope, rule_id, severity, self._cache,
                       self.selected_options, self.shared)

    def option(self, rule_id: str, name: str) -> float | None:
        """Option `name` of another rule, or None when that rule is not selected."""
        return self.selected_options.get(rule_id, {}).get(name)

    # ---- shared physics

    @property
    def field_model(self):
        if "field" not in self._cache:
            from rfcheck.magnet.sources import FieldModel

            self._cache["field"] = FieldModel.for_chamber(self.model.magnet, self.model.chamber)
        return self._cache["field"]

    @property
    def axis_z(self) -> np.ndarray:
        """Axial sample points over the chamber (m), those of the on-axis profiles."""
        return self.axis_profiles()[0].z

    def axis_field(self, scale: np.ndarray | float | None = None) -> np.ndarray:
        """|B|(z) on the axis at `axis_z`, shape (n_scale, n_z), T.

        With `scale` None, the envelope's current scales (from the cached profiles); a scale of
        exactly 1 uses the cached nominal profile; other scales are evaluated on demand.
        """
        if scale is None:
            return np.stack([p.b for p in self.axis_profiles()])
        scales = np.atleast_1d(np.asarray(scale, dtype=float))
        if scales.size == 1 and scales[0] == 1.0:
            return self.nominal_profile().b[None, :]
        b = self.field_model.axis_field(self.axis_z, scale=scales)
        return np.abs(np.atleast_2d(b))

    def axis_profiles(self):
        """On-axis profiles (rfcheck.magnet.geometry.AxisProfile) for every envelope current scale."""
        if "axis_profiles" not in self._cache:
            from rfcheck.magnet.geometry import axis_profiles

            self._cache["axis_profiles"] = axis_profiles(
                self.field_model, self.model.chamber, self.envelope.current_scale)
        return self._cache["axis_profiles"]

    def nominal_profile(self):
        """The on-axis profile at current scale 1."""
        if "nominal_profile" not in self._cache:
            from rfcheck.magnet.geometry import axis_profile

            self._cache["nominal_profile"] = axis_profile(self.field_model, self.model.chamber, 1.0)
        return self._cache["nominal_profile"]

    def trap_geometries(self):
        """Trap geometry (B_min, maxima, wall field, last closed |B|) per envelope current scale."""
        if "trap" not in self._cache:
            from rfcheck.magnet.geometry import trap_geometries

            self._cache["trap"] = trap_geometries(self.field_model, self.model.chamber,
                                                  self.envelope.current_scale)
        return self._cache["trap"]

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

