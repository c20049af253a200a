"""The words every output prints for a run, and the plain-text view for the terminal.

One vocabulary, defined here and nowhere else:

* a finding's status is printed as its JSON value in capitals (``not-applicable`` →
  ``NOT APPLICABLE``): :data:`STATUS_WORDS`, with one sentence each in
  :data:`STATUS_MEANINGS` (the PDF prints them as a legend);
* the verdict is printed in words that never claim more than the run shows
  (:func:`verdict_word`): ``PASS`` only when nothing warned and nothing was waived, ``PASS
  WITH WAIVERS`` / ``PASS WITH WARNINGS`` / ``PASS WITH WARNINGS AND WAIVERS`` otherwise,
  ``FAIL``, ``NOT EVALUATED``. The JSON ``verdict`` key keeps its four values
  (``rfcheck.run.VERDICTS``); the words are a presentation of it and of the waived findings.

The terminal table, the PDF summary and findings tables (and their column heads) all read
these; a test checks that the PDF and the terminal print the same word for each finding.
"""

from __future__ import annotations

import shutil
import textwrap

from rfcheck.findings import Status
from rfcheck.text import for_terminal

#: status of a finding → the word printed for it in every output
STATUS_WORDS = {s: s.value.replace("-", " ").upper() for s in Status}
#: what each word means (the PDF's legend)
STATUS_MEANINGS = {
    Status.PASS: "the requirement holds at the worst point of the envelope",
    Status.WARN: "a warning-level requirement does not hold, or holds only under a stated "
                 "assumption: a reviewer decides",
    Status.FAIL: "the requirement does not hold at the worst point of the envelope",
    Status.WAIVED: "the requirement does not hold and a policy waiver (reason, reference, "
                   "expiry) accepts it for now",
    Status.NOT_APPLICABLE: "the requirement does not apply to this source, for the reason given",
    Status.ERROR: "the rule could not be evaluated; counted as a failure",
}
#: the order statuses are counted and listed in
STATUS_ORDER = (Status.FAIL, Status.ERROR, Status.WARN, Status.WAIVED, Status.PASS,
                Status.NOT_APPLICABLE)

_COLOUR = {
    Status.PASS: "green", Status.WARN: "yellow", Status.FAIL: "red", Status.ERROR: "magenta",
    Status.WAIVED: "cyan", Status.NOT_APPLICABLE: None,
}


def status_word(status) -> str:
    """The printed word of a status (a Status or its JSON value)."""
    return STATUS_WORDS[Status(status)]


def waived_findings(run) -> list:
    return [f for f in run.findings if f.status is Status.WAIVED]


def verdict_word(run) -> str:
    """The verdict in words that never overstate (see the module docstring)."""
    verdict = run.verdict
    if verdict == "fail":
        return "FAIL"
    if verdict == "not-evaluated":
        return "NOT EVALUATED"
    waived = bool(waived_findings(run))
    if verdict == "warn":
        return "PASS WITH WARNINGS AND WAIVERS" if waived else "PASS WITH WARNINGS"
    return "PASS WITH WAIVERS" if waived else "PASS"


#: one sentence under the verdict word on the cover
VERDICT_SENTENCES = {
    "PASS": "Every evaluated requirement holds over the declared envelope; no finding warns "
            "and none is waived.",
    "PASS WITH WAIVERS": "Every evaluated requirement holds over the declared envelope except "
                         "those waived by the policy, listed below: the waivers are part of "
                         "this verdict.",
    "PASS WITH WARNINGS": "No requirement of error severity fails over the declared envelope; "
                          "the warnings below need a reviewer's decision.",
    "PASS WITH WARNINGS AND WAIVERS": "No requirement of error severity fails over the declared "
                                      "envelope except those waived by the policy, listed "
                                      "below; the warnings need a reviewer's decision.",
    "FAIL": "One or more requirements do not hold (or could not be evaluated) over the declared "
            "envelope.",
    "NOT EVALUATED": "The design was not reviewed: no requirement was evaluated over the declared "
                     "envelope (see the reasons below). This is not a pass.",
}


def verdict_colour(word: str) -> str:
    if word == "PASS":
        return "green"
    if word.startswith("PASS"):
        return "yellow"
    return "red" if word == "FAIL" else "magenta"


def counts_text(run) -> str:
    """'26 PASS, 2 WARN, …' in STATUS_ORDER, zero counts left out."""
    counts = run.counts()
    return ", ".join(f"{counts[s.value]} {STATUS_WORDS[s]}" for s in STATUS_ORDER
                     if counts.get(s.value))


def text_table(run, *, colour: bool = False, width: int | None = None) -> str:
    """A compact listing: one line per finding (status, rule, subject), the message indented below."""
    import click

    width = width or min(shutil.get_terminal_size((100, 24)).columns, 120)
    w_rule = max([len(f.rule) for f in run.findings] + [4])
    w_tag = max(len(w) for w in STATUS_WORDS.values())
    title = for_terminal(run.spec_name + (f" (rev. {run.spec_revision})" if run.spec_revision else ""))
    lines = [title, "=" * min(len(title), width)]
    indent = " " * 8
    for f in run.findings:
        tag = f"{STATUS_WORDS[f.status]:<{w_tag}}"
        if colour and _COLOUR[f.status]:
            tag = click.style(tag, fg=_COLOUR[f.status], bold=f.status is Status.FAIL)
        lines.append(f"{tag}  {for_terminal(f.rule):<{w_rule}}  {for_terminal(f.subject)}")
        lines += textwrap.wrap(for_terminal(f.message), width, initial_indent=indent,
                               subsequent_indent=indent)
        if f.status is Status.WAIVED and getattr(f, "waiver", None):
            lines += textwrap.wrap(for_terminal(_waiver_line(f.waiver)), width,
                                   initial_indent=indent, subsequent_indent=indent)
    verdict = for_terminal(verdict_word(run))
    if colour:
        verdict = click.style(verdict, fg=verdict_colour(verdict), bold=True)
    lines.append(f"verdict: {verdict}  ({counts_text(run)})")
    return "\n".join(lines)


def _waiver_line(w: dict) -> str:
    out = f"waiver: {w.get('reason', '')}; reference {w.get('reference', '')}"
    out += f"; expires {w['expires']}" if w.get("expires") else "; no expiry"
    return out + (f"; approved by {w['approved_by']}" if w.get("approved_by") else "")
