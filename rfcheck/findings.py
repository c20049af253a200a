"""What a rule reports: typed findings with measured value, limit and signed margin kept apart.

A finding's message is built from its fields, never the other way round, so the JSON, the
terminal table and the PDF all show the same numbers.
"""

from __future__ import annotations

import enum
import math
from dataclasses import dataclass, field, replace

from rfcheck.units import format_si


class Status(str, enum.Enum):
    PASS = "pass"
    WARN = "warn"
    FAIL = "fail"
    NOT_APPLICABLE = "not-applicable"
    WAIVED = "waived"
    ERROR = "error"


class Severity(str, enum.Enum):
    """What a violated requirement means for the verdict: fail (error) or warn (warning)."""

    ERROR = "error"
    WARNING = "warning"


@dataclass(frozen=True)
class Quantity:
    """A value in SI with its unit; `value` None means undefined, with `reason` saying why."""

    value: float | None
    unit: str
    reason: str = ""

    def __post_init__(self) -> None:
        if self.value is not None:
            v = float(self.value)
            if not math.isfinite(v):
                object.__setattr__(self, "value", None)
                if not self.reason:
                    object.__setattr__(self, "reason", "not finite" if math.isnan(v) else "unbounded")
            else:
                object.__setattr__(self, "value", v)

    def text(self) -> str:
        if self.value is None:
            return f"— ({self.reason})" if self.reason else "—"
        return format_si(self.value, self.unit)

    def to_json(self) -> dict:
        out: dict = {"value": self.value, "unit": self.unit}
        if self.value is None:
            out["reason"] = self.reason or "undefined"
        return out


def _finite(obj):
    """A JSON-ready copy with every non-finite float replaced by None."""
    if isinstance(obj, dict):
        return {k: _finite(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_finite(v) for v in obj]
    if isinstance(obj, float) and not math.isfinite(obj):
        return None
    return obj


def quantity_json(value, unit: str, reason: str = "") -> dict:
    """JSON form ``{"value", "unit"}`` of a value in SI; None or non-finite becomes null with a
    reason, so no NaN or Infinity ever reaches the JSON."""
    return Quantity(None if value is None else float(value), unit, reason).to_json()


@dataclass(frozen=True)
class Finding:
    """One verdict of one rule on one subject, at the worst point of the envelope."""

    rule: str
    subject: str
    status: Status
    severity: Severity
    requirement: str
    measured: Quantity | None = None
    limit: Quantity | None = None
    margin: Quantity | None = None
    worst_case: dict[str, Quantity] = field(default_factory=dict)
    message: str = ""
    waiver: dict | None = None
    #: JSON-ready numbers behind the message that are not the measured value: the parts of
    #: the launched power and their shares, the state (ignition / running) and the like
    details: dict = field(default_factory=dict)

    def waived(self, waiver: dict) -> Finding:
        return replace(self, status=Status.WAIVED, waiver=waiver,
                       message=f"{self.message} [waived: {waiver.get('reason', '')}]")

    def to_json(self) -> dict:
        out = {
            "rule": self.rule,
            "subject": self.subject,
            "status": self.status.value,
            "severity": self.severity.value,
            "requirement": self.requirement,
            "measured": self.measured.to_json() if self.measured else None,
            "limit": self.limit.to_json() if self.limit else None,
            "margin": self.margin.to_json() if self.margin else None,
            "worst_case": {k: v.to_json() for k, v in self.worst_case.items()},
            "message": self.message,
        }
        if self.waiver:
            out["waiver"] = dict(self.waiver)
        if self.details:
            out["details"] = _finite(self.details)
        return out


def compare(
    *,
    rule: str,
    severity: Severity,
    subject: str,
    requirement: str,
    measured: float,
    limit: float,
    unit: str,
    sense: str,
    worst_case: dict[str, Quantity] | None = None,
    what: str = "",
    warn_within: float = 0.0,
) -> Finding:
    """A finding for `measured` ≤ `limit` (sense "max") or `measured` ≥ `limit` (sense "min").

    The margin is signed: positive means the requirement holds by that much. When
    `warn_within` > 0, a passing value closer to the limit than that fraction of it is a
    warning (e.g. 0.05: within 5 % of the limit).
    """
    if sense not in ("max", "min"):
        raise ValueError(sense)
    margin = (limit - measured) if sense == "max" else (measured - limit)
    if not (math.isfinite(measured) and math.isfinite(limit)):
        ok = math.isfinite(limit) if sense == "max" else math.isfinite(measured)
        ok = ok and margin >= 0 if math.isfinite(margin) else ok
    else:
        ok = margin >= 0
    if ok:
        close = warn_within > 0 and math.isfinite(margin) and margin < warn_within * abs(limit)
        status = Status.WARN if close else Status.PASS
    else:
        status = Status.FAIL if severity is Severity.ERROR else Status.WARN
    m, lim, mar = Quantity(measured, unit), Quantity(limit, unit), Quantity(margin, unit)
    relation = "≤" if sense == "max" else "≥"
    subject_what = f"{what} " if what else ""
    if status is Status.PASS:
        message = f"{subject_what}{m.text()} {relation} {lim.text()} (margin {mar.text()})"
    elif ok:
        message = f"{subject_what}{m.text()} {relation} {lim.text()} but within {warn_within:.0%} of it"
    else:
        message = f"{subject_what}{m.text()} exceeds the limit {lim.text()} by {Quantity(-margin, unit).text()}" \
            if sense == "max" else \
            f"{subject_what}{m.text()} falls short of {lim.text()} by {Quantity(-margin, unit).text()}"
    return Finding(rule=rule, subject=subject, status=status, severity=severity,
                   requirement=requirement, measured=m, limit=lim, margin=mar,
                   worst_case=dict(worst_case or {}), message=message)
