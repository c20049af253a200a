"""One run: evaluate the selected rules over the envelope and keep everything outputs need.

`Run` is the single result object; the terminal table, the JSON and the PDF are views of it.

Verdict (`Run.verdict`, reasons in `Run.verdict_reasons`):

* ``fail``: a finding fails or could not be evaluated (status error);
* ``not-evaluated``: nothing failed, but the review did not happen — the policy selects no
  rule, the selected rules gave no finding, no finding of an error-severity rule was
  evaluated (all not applicable, waived, or only warning-level checks ran), or every
  evaluated finding of an error-severity family is waived;
* ``warn``: a finding warns; ``pass``: otherwise.

So a pass never comes from nothing evaluated. `Run.exit_fails` says whether the command
line should exit 1 (fail or not evaluated).

Input files (`Run.inputs`, JSON ``inputs``, the PDF cover and attachments): every file the
user's run read — the specification, the user policy, measured axis tables and field maps, a
site exposure table — with its role, its name as given, its size and the SHA-256 of its bytes
(:func:`input_files`). Shipped data (the default policy, the built-in tables) are not input
files.
"""

from __future__ import annotations

import datetime as dt
import hashlib
import traceback
from dataclasses import dataclass, field, replace
from pathlib import Path

from rfcheck import __version__
from rfcheck.findings import Finding, Status
from rfcheck.rules.context import Context
from rfcheck.rules.envelope import Envelope
from rfcheck.rules.policy import Policy
from rfcheck.rules.registry import all_rules
from rfcheck.spec import LoadedSpec

JSON_SCHEMA_ID = "rfcheck-run/1"
RULESET_VERSION = "1"
#: every verdict a run can have
VERDICTS = ("pass", "warn", "fail", "not-evaluated")
#: statuses of findings that were evaluated against their requirement
_EVALUATED = (Status.PASS, Status.WARN, Status.FAIL, Status.WAIVED)


@dataclass(frozen=True)
class RuleUse:
    """A rule as it was used in this run: its definition and the option values applied."""

    id: str
    summary: str
    severity: str
    applies: str
    doc: str
    options: dict[str, dict]  # name -> {value (text), si, source, origin, doc}


#: roles of input files, in the order they are listed
INPUT_ROLES = ("specification", "policy", "measured axis table", "measured field map",
               "site exposure table")


@dataclass(frozen=True)
class InputRecord:
    """One input file of a run: its role (one of INPUT_ROLES), its name as the user gave it
    (the specification and the policy: their file names; a measured or site file: the path
    written in the spec), and the exact bytes (their size and SHA-256)."""

    role: str
    file: str
    data: bytes = field(repr=False)
    sha256: str = ""

    def __post_init__(self):
        if not self.sha256:
            object.__setattr__(self, "sha256", hashlib.sha256(self.data).hexdigest())

    @property
    def size(self) -> int:
        return len(self.data)

    def to_json(self) -> dict:
        return {"role": self.role, "file": self.file, "bytes": self.size, "sha256": self.sha256}


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
    #: how many rules the catalogue holds (the policy selected `len(rules)` of them)
    rules_total: int = 0
    #: waivers of the policy that waived no finding: {"waiver", "file", "line", "why"}
    unused_waivers: tuple[dict, ...] = ()
    #: every input file of the run, in INPUT_ROLES order (see :func:`input_files`)
    inputs: tuple[InputRecord, ...] = ()
    #: the instant the waivers were evaluated at (ISO 8601 with offset, to the second): the
    #: one wall-clock value of a run, kept because a waiver's expiry depends on it
    evaluated_at: str = ""
    #: the previous revision this run is reviewed against (`check --previous`): its role,
    #: file, SHA-256 and the change summary (rfcheck.changes), or None
    previous: dict | None = None
    #: the previous revision's input files (attached to the PDF beside this run's own)
    previous_inputs: tuple[InputRecord, ...] = field(default=(), repr=False, compare=False)

    def coverage_problems(self) -> tuple[str, ...]:
        """Why this run did not review the design, if it did not (empty when it did)."""
        if not self.rules:
            return ("the policy selects no rule (see its [select] include and exclude)",)
        if not self.findings:
            return ("the selected rules gave no finding",)
        error_rules = {r.id for r in self.rules if r.severity == "error"}
        out = []
        if all(f.status is Status.NOT_APPLICABLE for f in self.findings):
            out.append("every finding is not applicable: nothing was evaluated")
        elif not any(f.status in _EVALUATED and f.status is not Status.WAIVED
                     and f.rule in error_rules for f in self.findings):
            out.append("no requirement of error severity was evaluated (every such finding is "
                       "not applicable or waived, or no such rule is selected)")
        families: dict[str, list[Finding]] = {}
        for f in self.findings:
            if f.rule in error_rules and f.status in _EVALUATED:
                families.setdefault(f.rule.split(".", 1)[0], []).append(f)
        for fam, fs in sorted(families.items()):
            if all(f.status is Status.WAIVED for f in fs):
                out.append(f"every evaluated finding of the {fam} family is waived "
                           f"({len(fs)} finding{'s' if len(fs) != 1 else ''}): the family was "
                           "not reviewed")
        return tuple(out)

    @property
    def verdict(self) -> str:
        statuses = {f.status for f in self.findings}
        if Status.FAIL in statuses or Status.ERROR in statuses:
            return "fail"
        if self.coverage_problems():
            return "not-evaluated"
        if Status.WARN in statuses:
            return "warn"
        return "pass"

    @property
    def verdict_reasons(self) -> tuple[str, ...]:
        """Sentences that say why the verdict is what it is (the coverage problems included
        whatever the verdict)."""
        c = self.counts()
        out = []
        if c["fail"]:
            out.append(f"{c['fail']} finding{'s' if c['fail'] != 1 else ''} fail")
        if c["error"]:
            out.append(f"{c['error']} finding{'s' if c['error'] != 1 else ''} could not be "
                       "evaluated")
        out += self.coverage_problems()
        if not out:
            out.append(f"{c['warn']} warning{'s' if c['warn'] != 1 else ''}" if c["warn"]
                       else "every evaluated requirement is met")
        if self.rules and self.rules_total and len(self.rules) < self.rules_total:
            out.append(f"the policy selects {len(self.rules)} of {self.rules_total} rules")
        if self.unused_waivers:
            n = len(self.unused_waivers)
            out.append(f"{n} waiver{'s' if n != 1 else ''} of the policy waived no finding")
        return tuple(out)

    @property
    def verdict_reason(self) -> str:
        """The reasons as one line, for the text view."""
        return "; ".join(self.verdict_reasons)

    @property
    def verdict_label(self) -> str:
        """The verdict as printed: PASS, WARN, FAIL, NOT EVALUATED."""
        return self.verdict.replace("-", " ").upper()

    @property
    def exit_fails(self) -> bool:
        """Whether the command line exits 1 without --strict: a failed review or none."""
        return self.verdict in ("fail", "not-evaluated")

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
            "inputs": [i.to_json() for i in self.inputs],
            **({"evaluated_at": self.evaluated_at} if self.evaluated_at else {}),
            **({"previous": self.previous} if self.previous else {}),
            "verdict": self.verdict,
            "verdict_reasons": list(self.verdict_reasons),
            "counts": self.counts(),
            "unused_waivers": [dict(u) for u in self.unused_waivers],
            "findings": [f.to_json() for f in self.findings],
            "characteristics": self.characteristics,
            "rules": [{"id": r.id, "summary": r.summary, "severity": r.severity,
                       "options": {k: {"value": v["value"], "source": v["source"]}
                                   for k, v in r.options.items()}} for r in self.rules],
        }


def sha256_text(text: str) -> str:
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def run(loaded: LoadedSpec, policy: Policy, evaluated_at: dt.datetime | None = None, *,
        detail: bool = True, shared: dict | None = None) -> Run:
    """Evaluate every selected rule on the loaded spec; a rule that raises becomes an error finding.

    Waivers are evaluated at `evaluated_at` (an aware date-time; default: now, to the second),
    which the run records (`Run.evaluated_at`), so that `rfcheck verify` can evaluate them at
    the same instant years later.

    With `detail` False (one point of a sweep: rfcheck.sweep) the run is the verdicts only:
    no characteristics and no second read of the input files (the sweep fingerprints them
    once). `shared` is a cache the caller keeps across runs of models that differ only in
    swept values (rfcheck.rules.context.Context.shared); results are the same with or
    without it."""
    model = loaded.model
    # before evaluating: as close to the load as can be
    inputs = input_files(loaded, policy) if detail else ()
    ctx = Context(model, Envelope.of(model), shared=shared)
    ctx.selected_options.update({r.id: policy.option_values(r) for r in all_rules()
                                 if policy.selected(r.id)})
    findings: list[Finding] = []
    used: list[RuleUse] = []
    # one instant for every waiver expiry of the run, recorded to the second
    now = (evaluated_at if evaluated_at is not None
           else dt.datetime.now().astimezone()).replace(microsecond=0)
    if now.tzinfo is None:
        now = now.astimezone()
    matched: set[int] = set()  # waivers (by index) whose rule and subject met a finding
    applied: set[int] = set()  # waivers (by id) that waived a finding
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
            for i, w in enumerate(policy.waivers):
                if w.matches(f.rule, f.subject):
                    matched.add(i)
            if f.status in (Status.FAIL, Status.WARN):
                w, expired = policy.waiver_for(f.rule, f.subject, now=now)
                if w is not None:
                    f = f.waived(w.to_json())
                    applied.add(id(w))
                elif expired is not None:
                    f = replace(f, message=f"{f.message} [waiver {expired.reference} expired on "
                                           f"{expired.expires}: not applied]")
            findings.append(f)
    if detail:
        from rfcheck.characteristics import characteristics

        chars = characteristics(ctx)
    else:
        chars = {}
    return Run(
        spec_name=model.source.name, spec_revision=model.source.revision,
        spec_file=loaded.path.name, spec_sha256=sha256_text(loaded.text), spec_text=loaded.text,
        spec_normalised=loaded.normalised, policy_name=policy.name,
        policy_sha256=policy.sha256, policy_texts=policy.texts, findings=tuple(findings),
        characteristics=chars, rules=tuple(used), model=model, context=ctx,
        rules_total=len(all_rules()),
        unused_waivers=_unused_waivers(policy, used, matched, applied, now), inputs=inputs,
        evaluated_at=now.isoformat())


def input_files(loaded: LoadedSpec, policy: Policy) -> tuple[InputRecord, ...]:
    """Every input file of the run with the bytes that were evaluated, as far as they are known.

    * Specification and user policy: the text the loader kept, encoded as UTF-8. The reader
      (`rfcheck.inputfiles.read_input`) decoded the file's bytes strictly as UTF-8, so the
      encoding gives back exactly the bytes read (a byte-order mark included); no second read.
    * Site exposure table: read again next to the spec (the same guards) and its SHA-256
      compared with the one the model kept from the first read (`ReferenceTable.sha256`):
      a file changed in between is refused (InputError), never fingerprinted wrongly.
    * Measured axis tables and field maps: the model keeps the parsed numbers and the SHA-256
      of the bytes they were parsed from (`AxisTable.sha256`), so the file is read again (the
      same guards) and its hash compared, as for the site table: a file rewritten in between is
      refused, never fingerprinted wrongly. (Parsing again instead would cost 0.57 s on the
      largest accepted map, 500 x 500 nodes, against 9 ms for this read and hash.) A file that
      vanished or stopped being readable is refused (InputError).

    The default policy and the shipped tables are not input files.
    """
    from rfcheck.inputfiles import InputFileError, read_input
    from rfcheck.model import AxisTable, FieldMap
    from rfcheck.spec import InputError, Problem
    from rfcheck.tomlines import LineIndex

    model = loaded.model
    spec_file = str(loaded.path)

    def refused(key: tuple, message: str) -> InputError:
        line = LineIndex(loaded.text).line_of(key)
        return InputError([Problem(spec_file, ".".join(key), line, message)])

    def read_again(key: tuple, path, what: str) -> bytes:
        try:
            return read_input(path, what).data
        except FileNotFoundError:
            raise refused(key, f"the {what} {path} was read when the spec was loaded but is "
                               "gone now; run again") from None
        except InputFileError as exc:
            raise refused(key, f"the {what} {path} was read when the spec was loaded but "
                               f"cannot be read again: {exc.message}; run again") from None

    out = [InputRecord("specification", loaded.path.name, loaded.text.encode("utf-8"))]
    # policy.texts[0] is the shipped default policy; a user policy file follows it
    out += [InputRecord("policy", name, text.encode("utf-8")) for name, text in policy.texts[1:]]
    magnet = loaded.normalised.get("magnet") or {}
    for source in model.magnet.sources:
        if isinstance(source, (AxisTable, FieldMap)):
            key = "axis_table" if isinstance(source, AxisTable) else "field_map"
            given = (magnet.get(key) or {}).get("file") or Path(source.path).name
            data = read_again(("magnet", key, "file"), source.path, "measured field file")
            record = InputRecord("measured axis table" if key == "axis_table"
                                 else "measured field map", given, data)
            if source.sha256 and record.sha256 != source.sha256:
                raise refused(("magnet", key, "file"),
                              f"the measured field file {source.path} changed while the spec "
                              "was being checked (its SHA-256 differs from the bytes parsed); "
                              "run again")
            out.append(record)
    table = model.exposure.table if model.exposure is not None else None
    if table is not None and table.origin != "shipped":
        key = ("exposure", "table_file")
        path = loaded.path.resolve().parent / table.origin
        data = read_again(key, path, "site table")
        record = InputRecord("site exposure table", table.origin, data)
        if table.sha256 and record.sha256 != table.sha256:
            raise refused(key, f"the site table {path} changed while the spec was being "
                               "checked (its SHA-256 differs from the one read first); run "
                               "again")
        out.append(record)
    return tuple(out)


def _unused_waivers(policy: Policy, used: list[RuleUse], matched: set[int], applied: set[int],
                    now: dt.datetime) -> tuple[dict, ...]:
    """Each waiver that waived no finding, with why."""
    import fnmatch

    selected = [r.id for r in used]
    out = []
    for i, w in enumerate(policy.waivers):
        if id(w) in applied:
            continue
        if not any(fnmatch.fnmatchcase(r, w.rule) for r in selected):
            why = "its rule is not selected by the policy"
        elif i not in matched:
            why = ("no finding of this rule has this subject" if w.subject is not None
                   else "the rule gave no finding")
        elif w.expired(now):
            why = f"it expired ({w.expires})"
        else:
            why = "the findings it matches need no waiver (they pass or are not applicable)"
        out.append({"waiver": w.to_json(), "file": w.origin, "line": w.line, "why": why})
    return tuple(out)


__all__ = ["INPUT_ROLES", "InputRecord", "Run", "RuleUse", "VERDICTS", "input_files", "run"]
