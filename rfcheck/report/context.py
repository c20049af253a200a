"""Run → plain dicts for the templates. No physics here: only selection and formatting."""

from __future__ import annotations

from pathlib import PurePath

from rfcheck import __version__
from rfcheck.run import RULESET_VERSION, InputRecord
from rfcheck.findings import Finding, Status
from rfcheck.views import (STATUS_MEANINGS, STATUS_ORDER, STATUS_WORDS, VERDICT_SENTENCES,
                           counts_text, verdict_word, waived_findings)

FAMILY_TITLES = {
    "spec": "Specification sanity",
    "cutoff": "Cutoffs",
    "access": "Access to the resonance",
    "resonance": "Resonances",
    "magnet": "Magnet field",
    "line": "RF lines",
    "window": "Windows",
    "load": "Load and reflected power",
    "absorption": "Absorption",
    "exposure": "Exposure",
    "inductive": "Inductive coupling",
    "helicon": "Helicon waves",
    "ech": "Electron-cyclotron heating",
    "rays": "Rays of off-axis, oblique and beam launches",
}
#: name of the results attachment
RESULTS_ATTACHMENT = "rfcheck-results.json"
#: attachment name of each kind of input file: a prefix before the file's base name
_ATTACHMENT_PREFIX = {"specification": "", "policy": "policy-", "measured axis table": "axis-table-",
                      "measured field map": "field-map-", "site exposure table": "site-table-"}
#: how many hex digits of an input file's SHA-256 the cover shows (the appendix shows all)
HASH_PREFIX = 16


def policy_attachment_name(name: str) -> str:
    return f"policy-{name}" if name.endswith(".toml") else f"policy-{name}.toml"


def _distinct(name: str, taken: set[str]) -> str:
    """`name`, or `name` with -2, -3 … before its extension, whichever is not taken yet
    (compared without case: the files may be extracted on a case-insensitive system)."""
    stem, dot, ext = name.rpartition(".")
    if not dot or not stem:
        stem, dot, ext = name, "", ""
    candidate, k = name, 2
    while candidate.casefold() in taken:
        candidate, k = f"{stem}-{k}{dot}{ext}", k + 1
    taken.add(candidate.casefold())
    return candidate


def input_records(run) -> tuple[InputRecord, ...]:
    """The run's input files; for a Run built without them, the spec and user policy texts."""
    if run.inputs:
        return run.inputs
    return ((InputRecord("specification", run.spec_file, run.spec_text.encode("utf-8")),)
            + tuple(InputRecord("policy", n, t.encode("utf-8")) for n, t in run.policy_texts[1:]))


def input_attachments(run) -> tuple[list[tuple[InputRecord, str]], str | None]:
    """(each input file with its attachment name, the shipped default policy's attachment
    name or None). Names are distinct over the whole PDF, even for files that share a base
    name: the results and the default policy keep theirs, then each file in order gets its
    role's prefix and its base name, numbered where that is taken."""
    taken = {RESULTS_ATTACHMENT.casefold()}
    default = None
    if run.policy_texts and run.policy_texts[0][0] == "default":
        default = _distinct(policy_attachment_name("default"), taken)
    out = []
    for rec in input_records(run):
        base = PurePath(rec.file).name or rec.role.replace(" ", "-")
        name = (policy_attachment_name(base) if rec.role == "policy"
                else _ATTACHMENT_PREFIX.get(rec.role, "") + base)
        out.append((rec, _distinct(name, taken)))
    return out, default


def _input_rows(run) -> list[dict]:
    rows = []
    for rec, name in input_attachments(run)[0]:
        rows.append({"role": rec.role, "file": rec.file, "bytes": rec.size,
                     "size": f"{rec.size:,} B".replace(",", "\u2009"), "sha256": rec.sha256,
                     "sha256_prefix": rec.sha256[:HASH_PREFIX], "attachment": name})
    return rows


def _finding_row(f: Finding) -> dict:
    worst = "; ".join(f"{k.replace('_', ' ')} {v.text()}" for k, v in f.worst_case.items())
    return {
        "rule": f.rule,
        "subject": f.subject,
        "status": f.status.value,
        "status_text": STATUS_WORDS[f.status],
        "requirement": f.requirement,
        "found": f.measured.text() if f.measured else "—",
        "limit": f.limit.text() if f.limit else "—",
        "margin": f.margin.text() if f.margin else "—",
        "worst_case": worst or "—",
        "message": f.message,
        "waiver": f.waiver,
    }


def _person(text: str) -> tuple[str, str]:
    """('A. Invented', 'RF engineer') from 'A. Invented (RF engineer)'; an empty role when
    the text ends in no parenthesis (a blank line to fill in)."""
    text = (text or "").strip()
    if text.endswith(")") and " (" in text:
        name, _, role = text[:-1].rpartition(" (")
        if name:
            return name.strip(), role.strip()
    return text, ""


def _signers(review) -> list[dict]:
    """The three sign-off steps with the names the specification gives (blank lines else)."""
    out = []
    for step, key in (("Prepared by", "prepared_by"), ("Checked by", "checked_by"),
                      ("Approved by", "approved_by")):
        name, role = _person(getattr(review, key, "") if review is not None else "")
        out.append({"step": step, "name": name, "role": role})
    return out


def _verdict_class(run) -> str:
    """CSS class of the cover's verdict box: green only for a plain PASS."""
    word = verdict_word(run)
    if word.startswith("PASS"):
        return "pass" if word == "PASS" else "warn"
    return run.verdict


def _waiver_row(f: Finding) -> dict:
    w = f.waiver or {}
    return {"rule": f.rule, "subject": f.subject, "reason": w.get("reason", ""),
            "reference": w.get("reference", ""), "expires": w.get("expires") or "no expiry",
            "approved_by": w.get("approved_by") or ""}


def _characteristic_rows(chars: dict) -> list[dict]:
    from rfcheck.units import format_si

    rows = []
    for group, title in (("plasma", "Plasma envelope"), ("magnet", "Magnet")):
        for key, val in chars.get(group, {}).items():
            if key in ARRAY_ENTRIES:
                continue
            rows.append({"group": title, "name": key.replace("_", " "), "value": _fmt(val, format_si)})
    for kind, label in (("feeds", "Feed"), ("windows", "Window")):
        for ident, entry in chars.get(kind, {}).items():
            for key, val in entry.items():
                rows.append({"group": f"{label} {ident}", "name": key.replace("_", " "),
                             "value": _fmt(val, format_si)})
    return rows


#: characteristics that are arrays for figures and tools: named in the JSON, not tabulated
ARRAY_ENTRIES = {"axis_profile", "wall_field", "rz_field", "current_scales"}


def _fmt(val, format_si) -> str:
    if isinstance(val, dict) and "unit" in val:
        v, unit = val.get("value"), val["unit"]
        if isinstance(v, list) and v and isinstance(v[0], list):
            return f"[{unit}] array, see the JSON"
        if isinstance(v, list):
            if unit == "m":
                return ", ".join(f"{x * 1e3:.1f} mm" for x in v) or "none"
            return ", ".join(format_si(x, unit) for x in v) or "none"
        if v is None:
            return f"— ({val.get('reason', 'undefined')})"
        if unit == "1":
            return f"{v:.4g}"
        if unit == "m":
            return f"{v * 1e3:.2f} mm"
        if unit == "T":
            return f"{v * 1e3:.4g} mT"
        return format_si(v, unit)
    if isinstance(val, dict):
        return "; ".join(f"{k}: {_fmt(v, format_si)}" for k, v in val.items())
    if isinstance(val, (list, tuple)):
        return "; ".join(str(v) for v in val) or "none"
    return str(val)


def build(run, figures: list[dict] | None = None) -> dict:
    """Everything the report template shows, as plain data."""
    families: dict[str, list] = {}
    for f in run.findings:
        families.setdefault(f.rule.split(".", 1)[0], []).append(_finding_row(f))
    order = list(FAMILY_TITLES)
    sections = [{"id": fam, "title": FAMILY_TITLES.get(fam, fam), "rows": rows}
                for fam, rows in sorted(families.items(),
                                        key=lambda kv: order.index(kv[0]) if kv[0] in order else 99)]
    attention = [_finding_row(f) for f in run.findings
                 if f.status in (Status.FAIL, Status.ERROR, Status.WARN, Status.WAIVED)]
    m = run.model
    from .budget import budget_rows
    from .glance import glance
    from .cautions import select_cautions

    cautions, cautions_omitted = select_cautions(m, run.findings)
    return {
        "title": "RF and plasma-source design review",
        "source": {"name": run.spec_name, "revision": run.spec_revision,
                   "lab": m.source.lab if m else "", "description": m.source.description if m else ""},
        "verdict": run.verdict,
        "verdict_text": VERDICT_SENTENCES[verdict_word(run)],
        "verdict_label": verdict_word(run),
        "verdict_class": _verdict_class(run),
        "waivers": [_waiver_row(f) for f in waived_findings(run)],
        "counts_text": counts_text(run),
        "statuses": [{"value": s.value, "word": STATUS_WORDS[s], "meaning": STATUS_MEANINGS[s]}
                     for s in STATUS_ORDER],
        "verdict_reasons": list(run.verdict_reasons),
        "unused_waivers": [dict(u) for u in run.unused_waivers],
        "counts": run.counts(),
        "fingerprint": {"spec_file": run.spec_file, "spec_sha256": run.spec_sha256,
                        "policy_name": run.policy_name, "policy_sha256": run.policy_sha256,
                        "tool_version": __version__, "ruleset": RULESET_VERSION,
                        "inputs": _input_rows(run), "hash_prefix": HASH_PREFIX},
        "sections": sections,
        "attention": attention,
        "characteristics": _characteristic_rows(run.characteristics),
        "figures": figures or [],
        "power_budget": budget_rows(run),
        "glance": glance(run),
        "cautions": cautions,
        "cautions_omitted": cautions_omitted,
        "signers": _signers(m.review if m else None),
        "review": {"prepared_by": m.review.prepared_by if m else "",
                   "checked_by": m.review.checked_by if m else "",
                   "approved_by": m.review.approved_by if m else "",
                   "notes": m.review.notes if m else ""},
        "spec_text": run.spec_text,
        "policy_texts": [{"name": n, "text": t} for n, t in run.policy_texts],
        **_rule_appendix(run),
        # the change-request page (templates/change-summary.html.j2), when a previous
        # revision was given: rfcheck.changes.ChangeSet.summary()
        "change": (getattr(run, "previous", None) or {}).get("change"),
    }


def previous_attachments(run, taken: set[str]) -> list[tuple[InputRecord, str]]:
    """The previous revision's input files (rfcheck diff, check --previous), each under
    ``previous-`` and its own attachment name, distinct from the names in `taken`."""
    out = []
    for rec in getattr(run, "previous_inputs", ()) or ():
        base = PurePath(rec.file).name or rec.role.replace(" ", "-")
        name = (policy_attachment_name(base) if rec.role == "policy"
                else _ATTACHMENT_PREFIX.get(rec.role, "") + base)
        out.append((rec, _distinct("previous-" + name, taken)))
    return out


#: headings of a rule's docstring, in order (DEVELOPERS.md, "Adding a rule")
DOC_HEADINGS = ("What it checks", "Why it matters", "Equation", "Options", "References")


def doc_sections(doc: str) -> dict[str, str]:
    """A rule's docstring split at its headings: {heading: text with lines joined}."""
    out: dict[str, list[str]] = {}
    current = None
    for line in (doc or "").splitlines():
        stripped = line.strip()
        if stripped in DOC_HEADINGS:
            current = stripped
            out[current] = []
        elif current is not None:
            out[current].append(stripped)
    return {k: " ".join(x for x in v if x) for k, v in out.items()}


def _rule_appendix(run) -> dict:
    """The rules appendix and the effective-policy table, compactly.

    Appendix B documents the rules that evaluated something for this source (id, severity,
    summary, equation, references); the selected rules whose every finding is not
    applicable are named in one sentence (each finding says why). The effective policy is
    one table of every option of those rules: value, where the value came from (default or
    site policy) and its source (the options of the rules that did not apply are in the
    attached policy files). The full texts of the rules are in
    `rfcheck explain`, the policy files are attached to the PDF."""
    evaluated = {f.rule for f in run.findings if f.status is not Status.NOT_APPLICABLE}
    rules, idle = [], []
    for r in run.rules:
        if r.id not in evaluated:
            idle.append(r.id)
            continue
        sec = doc_sections(r.doc)
        rules.append({"id": r.id, "summary": r.summary, "severity": r.severity,
                      "applies": r.applies, "equation": sec.get("Equation", ""),
                      "references": sec.get("References", "")})
    policy_rows = [{"rule": r.id, "severity": r.severity, "option": name, "value": o["value"],
                    "origin": o["origin"], "source": o["source"], "doc": o["doc"]}
                   for r in run.rules if r.id in evaluated for name, o in r.options.items()]
    site_texts = [{"name": n, "text": t} for n, t in run.policy_texts if n != "default"]
    return {"rules": rules, "rules_idle": idle, "policy_rows": policy_rows,
            "site_policy_texts": site_texts,
            "rules_without_options": [r.id for r in run.rules
                                      if not r.options and r.id in evaluated]}
