"""What a rule receives: the model, the envelope and shared, cached physics results.

Expensive things (the magnet's unit fields, the on-axis profile over the current scales) are
computed once here and shared by every rule, so a run costs one field evaluation, not one per
rule.
"""

from __future__ import annotations

import hashlib
import pickle
from collections import OrderedDict
from dataclasses import dataclass, field

import numpy as np

from rfcheck.findings import Finding, Quantity, Severity, Status
from rfcheck.model import SourceModel

from .envelope import Envelope


class SharedCache:
    """Analyses kept across the runs of a sweep (rfcheck.sweep), keyed by a name and the
    exact bytes (pickled) of the model parts the analysis reads, so a run gets a shared
    result only where its own parts are equal to the last bit. Only analyses computed from
    those parts alone, from scratch, are shared, so a result never depends on which runs came
    before (serial, local processes and Dask agree). Bounded: at most `light` entries of
    small results (window analyses), `heavy` of large ones (field models, profiles, traps)."""

    def __init__(self, light: int = 512, heavy: int = 6):
        self._entries: dict[bool, OrderedDict] = {False: OrderedDict(), True: OrderedDict()}
        self._limits = {False: light, True: heavy}
        self.hits = 0
        self.misses = 0

    def get(self, name: str, parts: tuple, compute, *, heavy: bool = False):
        key = (name, hashlib.blake2b(pickle.dumps(parts, protocol=5), digest_size=20).digest())
        entries = self._entries[heavy]
        if key in entries:
            entries.move_to_end(key)
            self.hits += 1
            return entries[key]
        self.misses += 1
        value = compute()
        entries[key] = value
        while len(entries) > self._limits[heavy]:
            entries.popitem(last=False)
        return value



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

    # ---- shared physics

    def memo(self, name: str, parts: tuple, compute, *, heavy: bool = False):
        """compute() once per run under `name`; in a sweep also once per distinct `parts`
        (every model part the result depends on), through :class:`SharedCache`."""
        if name not in self._cache:
            self._cache[name] = (compute() if self.shared is None else
                                 self.shared.get(name, parts, compute, heavy=heavy))
        return self._cache[name]

    def _magnet_parts(self) -> tuple:
        return (self.model.magnet, self.model.chamber, self.envelope.current_scale)

    @property
    def field_model(self):
        if "field" not in self._cache:
            from rfcheck.magnet.sources import FieldModel

            def build():
                return FieldModel.for_chamber(self.model.magnet, self.model.chamber)

            # a field model with a multipole memoises points across calls (its values then
            # come from batches that depend on the calls before): shared only without one
            if self.shared is not None and not any(
                    type(s).__name__ == "Multipole" for s in self.model.magnet.sources):
                self._cache["field"] = self.shared.get("field", self._magnet_parts(), build,
                                                       heavy=True)
            else:
                self._cache["field"] = build()
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
        from rfcheck.magnet.geometry import axis_profiles

        return self.memo("axis_profiles", self._magnet_parts(), lambda: axis_profiles(
            self.field_model, self.model.chamber, self.envelope.current_scale), heavy=True)

    def nominal_profile(self):
        """The on-axis profile at current scale 1."""
        from rfcheck.magnet.geometry import axis_profile

        return self.memo("nominal_profile", self._magnet_parts(), lambda: axis_profile(
            self.field_model, self.model.chamber, 1.0), heavy=True)

    def trap_geometries(self):
        """Trap geometry (B_min, maxima, wall field, last closed |B|) per envelope current scale."""
        from rfcheck.magnet.geometry import trap_geometries

        return self.memo("trap", self._magnet_parts(), lambda: trap_geometries(
            self.field_model, self.model.chamber, self.envelope.current_scale), heavy=True)

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

