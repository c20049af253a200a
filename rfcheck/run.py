"""One run: evaluate the selected rules over the envelope and keep everything outputs need.

`Run` is the single result object; the terminal table, the JSON and the PDF are views of it.
"""

from __future__ import annotations

import hashlib
import traceback
from dataclasses import dataclass, field, replace

from rfcheck import __version__
from rfcheck.findings import Finding, Status
from rfcheck.rules.context import Context
from rfcheck.rules.envelope import Envelope
from rfcheck.rules.policy import Policy
from rfcheck.rules.registry import all_rules
from rfcheck.spec import LoadedSpec

JSON_SCHEMA_ID = "rfcheck-run/1"
RULESET_VERSION = "1"


@dataclass(frozen=True)
class RuleUse:
    """A rule as it was used in this run: its definition and the option values applied."""

    id: str
    summary: str
    severity: str
    applies: str
    doc: str
    options: dict[str, dict]  # name -> {value (text), si, source, origin, doc}


@dataclass(frozen=True)
class Run:
    spec_name: str
    spec_revision: str
    spec_file: str
    spec_sha256: str
    spec_text: str
    spec_normalised: dict
    policy_name: str
    policy_sha256: str
    policy_texts: tuple[tuple[str, str], ...]
    findings: tuple[Finding, ...]
    characteristics: dict
    rules: tuple[RuleUse, ...]
    model: object = field(repr=False, compare=False, default=None)
    context: object = field(repr=False, compare=False, default=None)

    @property
    def verdict(self) -> str:
        statuses = {f.status for f in self.findings}
        if Status.FAIL in statuses or Status.ERROR in statuses:
            return "fail"
        if Status.WARN in statuses:
            return "warn"
        return "pass"

    def counts(self) -> dict[str, int]:
        out = {s.value: 0 for s in Status}
        for f in self.findings:
            out[f.status.value] += 1
        return out

    def to_json(self) -> dict:
        return {
            "schema": JSON_SCHEMA_ID,
            "tool": {"name": "rfcheck", "version": __version__, "ruleset": RULESET_VERSION},
            "spec": {"name": self.spec_name, "revision": self.spec_revision,
                     "file": self.spec_file, "sha256": self.spec_sha256},
            "policy": {"name": self.policy_name, "sha256": self.policy_sha256},
            "verdict": self.verdict,
            "counts": self.counts(),
            "findings": [f.to_json() for f in self.findings],
            "characteristics": self.characteristics,
            "rules": [{"id": r.id, "summary": r.summary, "severity": r.severity,
                       "options": {k: {"value": v["value"], "source": v["source"]}
                                   for k, v in r.options.items()}} for r in self.rules],
        }


def sha256_text(text: str) -> str:
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def run(loaded: LoadedSpec, policy: Policy) -> Run:
    """Evaluate every selected rule on the loaded spec; a rule that raises becomes an error finding."""
    model = loaded.model
    ctx = Context(model, Envelope.of(model))
    ctx.selected_options.update({r.id: policy.option_values(r) for r in all_rules()
                                 if policy.selected(r.id)})
    findings: list[Finding] = []
    used: list[RuleUse] = []
    for r in all_rules():
        if not policy.selected(r.id):
            continue
        opts = policy.option_values(r)
        used.append(RuleUse(
            r.id, r.summary, r.severity.value, r.applies, r.doc,
            {name: {"value": policy.options[r.id][name].text,
                    "si": policy.options[r.id][name].value,
                    "source": policy.options[r.id][name].source,
                    "origin": policy.options[r.id][name].origin,
                    "doc": r.options[name].doc} for name in r.options}))
        rctx = ctx.for_rule(r.id, r.severity)
        try:
            produced = list(r.func(rctx, **opts))
        except Exception as exc:  # a broken rule must not stop the review; it is reported
            tb = traceback.extract_tb(exc.__traceback__)[-1]
            produced = [Finding(r.id, "rule", Status.ERROR, r.severity, r.summary,
                                message=f"the rule could not be evaluated: {type(exc).__name__}: "
                                        f"{exc} (at {tb.name}, line {tb.lineno})")]
        for f in produced:
            if f.status in (Status.FAIL, Status.WARN):
                w, expired = policy.waiver_for(f.rule, f.subject)
                if w is not None:
                    f = f.waived(w.to_json())
                elif expired is not None:
                    f = replace(f, message=f"{f.message} [waiver {expired.reference} expired on "
                                           f"{expired.expires}: not applied]")
            findings.append(f)
    from rfcheck.characteristics import characteristics

    chars = characteristics(ctx)
    return Run(
        spec_name=model.source.name, spec_revision=model.source.revision,
        spec_file=loaded.path.name, spec_sha256=sha256_text(loaded.text), spec_text=loaded.text,
        spec_normalised=loaded.normalised, policy_name=policy.name,
        policy_sha256=policy.sha256, policy_texts=policy.texts, findings=tuple(findings),
        characteristics=chars, rules=tuple(used), model=model, context=ctx)


__all__ = ["Run", "RuleUse", "run"]
