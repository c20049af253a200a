"""Plain-text view of a Run for the terminal."""

from __future__ import annotations

import shutil
import textwrap

from rfcheck.findings import Status
from rfcheck.text import for_terminal

_COLOUR = {
    Status.PASS: "green", Status.WARN: "yellow", Status.FAIL: "red", Status.ERROR: "magenta",
    Status.WAIVED: "cyan", Status.NOT_APPLICABLE: None,
}
_LABEL = {
    Status.PASS: "PASS", Status.WARN: "WARN", Status.FAIL: "FAIL", Status.ERROR: "ERROR",
    Status.WAIVED: "WAIVED", Status.NOT_APPLICABLE: "n/a",
}


def text_table(run, *, colour: bool = False, width: int | None = None) -> str:
    """A compact listing: one line per finding (status, rule, subject), the message indented below."""
    import click

    width = width or min(shutil.get_terminal_size((100, 24)).columns, 120)
    w_rule = max([len(f.rule) for f in run.findings] + [4])
    title = for_terminal(run.spec_name + (f" (rev. {run.spec_revision})" if run.spec_revision else ""))
    lines = [title, "=" * min(len(title), width)]
    for f in run.findings:
        tag = f"{_LABEL[f.status]:<6}"
        if colour and _COLOUR[f.status]:
            tag = click.style(tag, fg=_COLOUR[f.status], bold=f.status is Status.FAIL)
        lines.append(f"{tag}  {for_terminal(f.rule):<{w_rule}}  {for_terminal(f.subject)}")
        lines += textwrap.wrap(for_terminal(f.message), width, initial_indent=" " * 8, subsequent_indent=" " * 8)
    counts = run.counts()
    summary = ", ".join(f"{n} {k}" for k, n in counts.items() if n)
    verdict = for_terminal(str(getattr(run, "verdict_label", None) or run.verdict.upper()))
    if colour:
        verdict = click.style(verdict, fg={"PASS": "green", "WARN": "yellow"}.get(verdict.upper(), "red"),
                              bold=True)
    lines.append(f"verdict: {verdict}  ({summary})")
    return "\n".join(lines)
