"""Plain-text view of a Run for the terminal."""

from __future__ import annotations

import shutil
import textwrap

from rfcheck.findings import Status

_COLOUR = {
    Status.PASS: "green", Status.WARN: "yellow", Status.FAIL: "red", Status.ERROR: "magenta",
    Status.WAIVED: "cyan", Status.NOT_APPLICABLE: None,
}
_LABEL = {
    Status.PASS: "PASS", Status.WARN: "WARN", Status.FAIL: "FAIL", Status.ERROR: "ERROR",
    Status.WAIVED: "WAIVED", Status.NOT_APPLICABLE: "n/a",
}


def text_table(run, *, colour: bool = False, width: int | None = None) -> str:
    """A compact table: status, rule, subject, message; then the verdict line."""
    import click

    width = width or min(shutil.get_terminal_size((110, 24)).columns, 140)
    rows = [(f, _LABEL[f.status], f.rule, f.subject) for f in run.findings]
    w_rule = max([len(r[2]) for r in rows] + [4])
    w_subj = max([len(r[3]) for r in rows] + [7])
    indent = 7 + 2 + w_rule + 2 + w_subj + 2
    msg_width = max(30, width - indent)
    lines = [f"{run.spec_name}" + (f" (rev. {run.spec_revision})" if run.spec_revision else ""),
             f"{'status':<7}  {'rule':<{w_rule}}  {'subject':<{w_subj}}  finding"]
    for f, label, rule, subject in rows:
        tag = f"{label:<7}"
        if colour and _COLOUR[f.status]:
            tag = click.style(tag, fg=_COLOUR[f.status], bold=f.status is Status.FAIL)
        wrapped = textwrap.wrap(f.message, msg_width) or [""]
        lines.append(f"{tag}  {rule:<{w_rule}}  {subject:<{w_subj}}  {wrapped[0]}")
        lines += [" " * indent + more for more in wrapped[1:]]
    counts = run.counts()
    summary = ", ".join(f"{n} {k}" for k, n in counts.items() if n)
    verdict = run.verdict.upper()
    if colour:
        verdict = click.style(verdict, fg={"PASS": "green", "WARN": "yellow"}.get(verdict, "red"),
                              bold=True)
    lines.append(f"verdict: {verdict}  ({summary})")
    return "\n".join(lines)
