"""Command line: parse arguments, call run, choose the view, map errors to exit codes.

Results go to stdout, messages to stderr. Exceptions are mapped to exit codes once, in
:func:`main`. Output files are written atomically: a failed run leaves any earlier file as
it was.
"""

from __future__ import annotations

import enum
import json
import os
import sys
from importlib import resources
from pathlib import Path

import click

# rfcheck's spec and policy models use no pydantic plugin; without this, importing pydantic's
# model machinery scans every installed package's entry points for plugins (~10 ms of a
# check, measured with `python -X importtime`). A user who sets the variable keeps their value.
os.environ.setdefault("PYDANTIC_DISABLE_PLUGINS", "__all__")


class Exit(enum.IntEnum):
    PASS = 0
    FAIL = 1
    BAD_INPUT = 2
    INTERNAL = 3


from rfcheck.outputs import UsageProblem, check_destination, write_atomic  # noqa: E402,F401


def _examples_dir():
    return resources.files("rfcheck.examples")


DEMO_SPEC = "bench-ecr-reactor.toml"


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(package_name="rfcheck", prog_name="rfcheck")
def cli() -> None:
    """Design-review checks for RF- and microwave-heated plasma sources."""


def _evaluate(spec: Path, policy_path: Path | None):
    from rfcheck.rules.policy import load_policy
    from rfcheck.run import run
    from rfcheck.spec import load_spec

    policy = load_policy(policy_path)
    loaded = load_spec(spec)
    return run(loaded, policy)


def _targets(json_out: str | None, pdf_out: str | None, html_out: str | None = None) -> list:
    out = []
    if json_out is not None and json_out != "-":
        out.append(("--json", Path(json_out)))
    if pdf_out is not None:
        out.append(("--pdf", Path(pdf_out)))
    if html_out is not None:
        out.append(("--html", Path(html_out)))
    return out


#: what each output option writes, in the stderr line
_WHAT = {"--json": "JSON results", "--pdf": "PDF report", "--html": "HTML report"}


def _emit(result, json_out: str | None, pdf_out: str | None, quiet_table: bool,
          html_out: str | None = None) -> None:
    from rfcheck import jsontext
    from rfcheck.outputs import commit
    from rfcheck.text import for_terminal
    from rfcheck.views import text_table

    items = []
    payload = None
    if json_out is not None:
        payload = jsontext.dumps(result.to_json()).encode()
        if json_out != "-":
            items.append(("--json", Path(json_out), payload))
    if pdf_out is not None:
        from rfcheck.report.render import render_pdf

        items.append(("--pdf", Path(pdf_out), render_pdf(result)))
    if html_out is not None:
        from rfcheck.report.render import render_screen_html  # never imports weasyprint

        items.append(("--html", Path(html_out), render_screen_html(result)))
    if items:
        commit(items)
        for opt, path, data in items:  # what was written, on stderr (stdout keeps the results)
            click.echo(f"wrote {_WHAT[opt]} {for_terminal(str(path))} ({_size_text(len(data))})",
                       err=True)
    if json_out == "-":
        sys.stdout.write(payload.decode())
        sys.stdout.flush()
    if not (json_out == "-" or quiet_table):
        click.echo(text_table(result, colour=sys.stdout.isatty()))
    elif json_out == "-":
        from rfcheck.views import verdict_word

        click.echo(f"verdict: {verdict_word(result)}", err=True)


def _size_text(n: int) -> str:
    """'412 345 bytes, 403 KiB': the exact count, and a rounded one from 1 KiB up."""
    exact = f"{n:,} bytes".replace(",", " ")
    if n < 1024:
        return exact
    if n < 1024 ** 2:
        return f"{exact}, {n / 1024:.0f} KiB"
    return f"{exact}, {n / 1024 ** 2:.1f} MiB"


def _exit_for(result, strict: bool) -> Exit:
    fails = getattr(result, "exit_fails", result.verdict == "fail")
    if fails or (strict and result.verdict == "warn"):
        return Exit.FAIL
    return Exit.PASS


@cli.command()
@click.argument("spec", type=click.Path(path_type=Path))
@click.option("--policy", "policy_path", type=click.Path(path_type=Path),
              help="Site policy file (thresholds, rule selection, waivers).")
@click.option("--json", "json_out", metavar="PATH|-", help="Write the results as JSON ('-' for stdout).")
@click.option("--pdf", "pdf_out", metavar="PATH", type=str, help="Write the PDF review report.")
@click.option("--html", "html_out", metavar="PATH", type=str,
              help="Write the same report as one self-contained HTML page for on-screen review.")
@click.option("--strict", is_flag=True, help="Exit 1 on warnings too.")
@click.option("--previous", "previous", type=click.Path(path_type=Path), metavar="OLD",
              help="The previous revision (a spec or an archived rfcheck PDF): the results "
                   "record its fingerprint and the report opens with the change summary.")
def check(spec: Path, policy_path: Path | None, json_out: str | None, pdf_out: str | None,
          html_out: str | None, strict: bool, previous: Path | None = None) -> None:
    """Check a source specification SPEC against the rule catalogue."""
    from rfcheck.outputs import plan

    plan(_targets(json_out, pdf_out, html_out))
    if previous is None:
        result = _evaluate(spec, policy_path)
    else:
        from rfcheck.changes import compare

        result = _with_previous(compare(previous, spec, policy_path))
    _emit(result, json_out, pdf_out, quiet_table=False, html_out=html_out)
    raise SystemExit(_exit_for(result, strict))


def _with_previous(changes):
    """The new revision's run carrying the previous one's fingerprint, the change summary
    and its input files (attached to the PDF)."""
    from dataclasses import replace

    old = changes.old
    record = {**old.fingerprint(), "inputs": [i.to_json() for i in old.run.inputs],
              "change": changes.summary()}
    return replace(changes.new.run, previous=record, previous_inputs=old.run.inputs)


@cli.command()
@click.argument("old", type=click.Path(path_type=Path))
@click.argument("new", type=click.Path(path_type=Path))
@click.option("--policy", "policy_path", type=click.Path(path_type=Path),
              help="Site policy for OLD and NEW where they are specs (an archived PDF uses the "
                   "policy attached to it).")
@click.option("--json", "json_out", metavar="PATH|-", help="Write the diff as JSON ('-' for stdout).")
@click.option("--pdf", "pdf_out", metavar="PATH", type=str,
              help="Write the change-control PDF: the change request, then the new review.")
@click.option("--html", "html_out", metavar="PATH", type=str,
              help="Write the same change-control report as one HTML page.")
def diff(old: Path, new: Path, policy_path: Path | None, json_out: str | None,
         pdf_out: str | None, html_out: str | None) -> None:
    """Compare two revisions OLD and NEW (specs or archived rfcheck PDFs): what changed and
    which verdicts moved. Exit 0 when no verdict moved and nothing worsened, 1 otherwise."""
    from rfcheck.changes import compare
    from rfcheck.outputs import commit, plan
    from rfcheck.text import for_terminal

    plan(_targets(json_out, pdf_out, html_out))
    changes = compare(old, new, policy_path)
    if policy_path is not None:
        for side in (changes.old, changes.new):
            if side.kind == "report":
                click.echo(for_terminal(f"note: {side.origin} is an archived report: its "
                                        "attached policy was used, not --policy"), err=True)
    items = []
    payload = None
    if json_out is not None:
        payload = (json.dumps(changes.to_json(), indent=2, allow_nan=False) + "\n").encode()
        if json_out != "-":
            items.append(("--json", Path(json_out), payload))
    if pdf_out is not None or html_out is not None:
        result = _with_previous(changes)
        if pdf_out is not None:
            from rfcheck.report.render import render_pdf

            items.append(("--pdf", Path(pdf_out), render_pdf(result)))
        if html_out is not None:
            from rfcheck.report.render import render_screen_html

            items.append(("--html", Path(html_out), render_screen_html(result)))
    if items:
        commit(items)
        for opt, path, data in items:
            what = {"--json": "JSON diff", "--pdf": "change-control PDF",
                    "--html": "change-control HTML"}[opt]
            click.echo(f"wrote {what} {for_terminal(str(path))} ({_size_text(len(data))})", err=True)
    if json_out == "-":
        sys.stdout.write(payload.decode())
        sys.stdout.flush()
    else:
        click.echo(for_terminal(changes.text()))
    if changes.exit_code:
        moved = sorted({c.rule for c in changes.moved})
        worse = sorted({c.rule for c in changes.worsened if not c.moved})
        from rfcheck.views import verdict_word

        parts = ([f"verdict {verdict_word(changes.old.run)} → {verdict_word(changes.new.run)}"]
                 if changes.verdict_moved else [])
        parts += [f"moved: {', '.join(moved)}"] if moved else []
        parts += [f"margin worsened: {', '.join(worse)}"] if worse else []
        click.echo(for_terminal("; ".join(parts)), err=True)
    raise SystemExit(Exit.FAIL if changes.exit_code else Exit.PASS)


@cli.command()
@click.argument("spec", type=click.Path(path_type=Path))
@click.option("--vary", "varies", multiple=True, metavar="KEY=START:STOP:N",
              help="Vary one spec value over N points, e.g. "
                   "'magnet.coils[upstream].current=50 A:80 A:31' (repeat for more axes).")
@click.option("--monte-carlo", "samples", type=int, metavar="N",
              help="Instead of a grid: N samples of the tolerances the spec declares.")
@click.option("--seed", type=int, default=1, show_default=True,
              help="Seed of the Monte Carlo samples (the same seed gives the same study).")
@click.option("--policy", "policy_path", type=click.Path(path_type=Path),
              help="Site policy file (thresholds, rule selection, waivers).")
@click.option("--json", "json_out", metavar="PATH|-", help="Write the study as JSON ('-' for stdout).")
@click.option("--pdf", "pdf_out", metavar="PATH", type=str,
              help="Write the study report (operating-window maps, binding rules).")
@click.option("--jobs", type=int, default=1, show_default=True,
              help="Local worker processes.")
@click.option("--scheduler", metavar="ADDRESS",
              help="Run the chunks on the Dask distributed scheduler at ADDRESS "
                   "(needs the dask extra; workers must see the spec's files).")
@click.option("--quiet", is_flag=True, help="No progress line on the terminal.")
def sweep(spec: Path, varies: tuple[str, ...], samples: int | None, seed: int,
          policy_path: Path | None, json_out: str | None, pdf_out: str | None, jobs: int,
          scheduler: str | None, quiet: bool) -> None:
    """Map where every rule passes over a grid of spec values (--vary), or the pass
    probability over the declared tolerances (--monte-carlo). Each point is a full check.
    Exit 0 when the study ran (a map is a design aid, not a review), 2 on bad input."""
    from rfcheck import sweep as study_mod
    from rfcheck.outputs import UsageProblem, commit, plan
    from rfcheck.rules.policy import load_policy
    from rfcheck.spec import load_spec
    from rfcheck.text import for_terminal

    if samples is not None and varies:
        raise UsageProblem("give either --vary or --monte-carlo, not both")
    if not 1 <= jobs <= 256:
        raise UsageProblem(f"--jobs {jobs}: expected 1..256 worker processes")
    if scheduler is not None and jobs != 1:
        raise UsageProblem("--jobs is for local processes; with --scheduler the cluster's "
                           "workers run the chunks")
    plan(_targets(json_out, pdf_out))
    policy = load_policy(policy_path)
    loaded = load_spec(spec)
    if samples is not None:
        study = study_mod.monte_carlo_study(loaded, policy, samples, seed)
    else:
        study = study_mod.grid_study(loaded, policy, list(varies))
    progress = None
    if not quiet and sys.stderr.isatty():
        def progress(done: int, total: int) -> None:
            end = "\n" if done >= total else ""
            click.echo(f"\r{done}/{total} points ({100 * done // total} %)", err=True, nl=False)
            if end:
                click.echo("", err=True)
    study_mod.evaluate(study, jobs=jobs, scheduler=scheduler, progress=progress)
    items = []
    payload = None
    if json_out is not None:
        payload = study.json_bytes()
        if json_out != "-":
            items.append(("--json", Path(json_out), payload))
    if pdf_out is not None:
        from rfcheck.report.sweep_report import render_sweep_pdf

        items.append(("--pdf", Path(pdf_out), render_sweep_pdf(study.to_json())))
    if items:
        commit(items)
        for opt, path, data in items:
            what = {"--json": "JSON study", "--pdf": "study PDF"}[opt]
            click.echo(f"wrote {what} {for_terminal(str(path))} ({_size_text(len(data))})",
                       err=True)
    summary = for_terminal(study_mod.summary_text(study))
    if json_out == "-":
        sys.stdout.write(payload.decode())
        sys.stdout.flush()
        click.echo(summary, err=True)
    else:
        click.echo(summary)
    raise SystemExit(Exit.PASS)


@cli.command()
@click.argument("report", type=click.Path(path_type=Path))
def verify(report: Path) -> None:
    """Prove an archived rfcheck PDF REPORT from its own attachments: fingerprints, rule set,
    and a re-run at the recorded evaluation instant. Exit 0 match, 1 differ, 2 unreadable."""
    from rfcheck.text import for_terminal
    from rfcheck.verify import verify as verify_report

    outcome = verify_report(report)
    for line in outcome.lines():
        click.echo(for_terminal(line))
    raise SystemExit(Exit.PASS if outcome.matches else Exit.FAIL)


@cli.command()
@click.option("--out", "out_dir", type=click.Path(path_type=Path), default=Path("rfcheck-demo"),
              show_default=True, help="Folder for the example spec, its JSON and PDF report.")
@click.option("--force", is_flag=True, help="Overwrite files of an earlier demo in the folder.")
def demo(out_dir: Path, force: bool) -> None:
    """Write the bundled example source, check it and render its PDF review report.

    Never overwrites an existing file unless --force is given.
    """
    from rfcheck.outputs import commit, plan

    if out_dir.exists() and not out_dir.is_dir():
        raise UsageProblem(f"--out {out_dir} is not a folder")
    examples = _examples_dir()
    spec_path = out_dir / DEMO_SPEC
    inputs = [(out_dir / item.name, item) for item in sorted(examples.iterdir(), key=lambda i: i.name)
              if item.name == DEMO_SPEC or item.name.endswith(".csv")]
    pdf = out_dir / (spec_path.stem + ".pdf")
    js = out_dir / (spec_path.stem + ".json")
    every = [p for p, _ in inputs] + [js, pdf]
    if not force:
        existing = [str(p) for p in every if os.path.lexists(p)]
        if existing:
            raise UsageProblem("these files exist: " + ", ".join(existing)
                               + "; use --force to overwrite them or choose another --out "
                                 "folder (nothing was written)")
    out_dir.mkdir(parents=True, exist_ok=True)
    plan([(None, p) for p in every])
    commit([(None, p, item.read_bytes()) for p, item in inputs])
    result = _evaluate(spec_path, None)
    _emit(result, str(js), str(pdf), quiet_table=False)
    click.echo(f"wrote {spec_path}, {js} and {pdf}")
    raise SystemExit(_exit_for(result, False))


@cli.command(name="rules")
def list_rules() -> None:
    """List the rule catalogue."""
    from rfcheck.rules.registry import all_rules

    rules = all_rules()
    width = max(len(r.id) for r in rules)
    for r in rules:
        click.echo(f"{r.id:<{width}}  {r.severity.value:<7}  {r.summary}")


@cli.command()
@click.argument("rule_id")
def explain(rule_id: str) -> None:
    """Show the documentation of one rule and its default options."""
    from rfcheck.rules.policy import load_policy
    from rfcheck.rules.registry import get_rule

    try:
        r = get_rule(rule_id)
    except KeyError:
        from rfcheck.rules.registry import all_rules

        import difflib

        close = difflib.get_close_matches(rule_id, [x.id for x in all_rules()], n=3)
        hint = f"; did you mean {', '.join(close)}?" if close else "; see `rfcheck rules`"
        raise UsageProblem(f"unknown rule '{rule_id}'{hint}") from None
    policy = load_policy(None)
    click.echo(f"{r.id}  ({r.severity.value})\n{r.summary}\n")
    if r.applies:
        click.echo(f"Applies to: {r.applies}\n")
    click.echo(r.doc)
    if r.options:
        click.echo("\nDefault options:")
        for name, opt in r.options.items():
            val = policy.options[r.id][name]
            click.echo(f"  {name} = {val.text}   ({opt.doc}; source: {val.source})")


@cli.command()
@click.argument("path", type=click.Path(path_type=Path))
def init(path: Path) -> None:
    """Write a commented starter specification to PATH (never overwrites)."""
    if path.exists():
        raise UsageProblem(f"{path} exists; choose another name (nothing was overwritten)")
    text = resources.files("rfcheck.examples").joinpath("starter.toml").read_bytes()
    write_atomic(path, text)
    click.echo(f"wrote {path}; edit it, then run: rfcheck check {path}")


@cli.command()
def schema() -> None:
    """Print the JSON Schema of the specification format (for editors)."""
    from rfcheck.spec import json_schema

    click.echo(json.dumps(json_schema(), indent=2))


#: internal numerical warnings captured in the last :func:`main` call (never printed)
last_warning_count = 0


def main(argv: list[str] | None = None) -> int:
    """Entry point: map every outcome to an exit code, once.

    Python warnings (e.g. NumPy RuntimeWarnings) raised during the command are captured and
    counted in :data:`last_warning_count`, never printed; with RFCHECK_DEBUG set one line
    says how many occurred.
    """
    import warnings

    global last_warning_count
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        code = _main(argv)
    last_warning_count = len(caught)
    if caught and os.environ.get("RFCHECK_DEBUG"):
        click.echo(f"debug: {len(caught)} internal numerical warning(s) occurred "
                   f"(first: {caught[0].category.__name__})", err=True)
    return code


def _main(argv: list[str] | None) -> int:
    from rfcheck.spec import InputError
    from rfcheck.text import for_terminal
    from rfcheck.verify import ArchiveError

    try:
        cli.main(args=argv, prog_name="rfcheck", standalone_mode=False)
    except SystemExit as exc:
        code = exc.code if isinstance(exc.code, int) else (0 if exc.code is None else 3)
        return code
    except InputError as exc:
        for p in exc.problems:
            click.echo(f"error: {for_terminal(str(p))}", err=True)
        n = len(exc.problems)
        click.echo(f"{n} problem{'s' if n != 1 else ''} in the input; nothing was written.", err=True)
        return Exit.BAD_INPUT
    except UsageProblem as exc:
        click.echo(f"error: {for_terminal(str(exc))}", err=True)
        return Exit.BAD_INPUT
    except ArchiveError as exc:  # an archived report that is not rfcheck's or is unreadable
        click.echo(f"error: {for_terminal(str(exc))}", err=True)
        return Exit.BAD_INPUT
    except click.exceptions.Abort:
        click.echo("aborted", err=True)
        return Exit.BAD_INPUT
    except click.ClickException as exc:  # usage errors: unknown option, missing argument
        click.echo(for_terminal(f"error: {exc.format_message()}"), err=True)
        return Exit.BAD_INPUT
    except KeyboardInterrupt:
        return 130
    except Exception as exc:  # noqa: BLE001 - the one place unexpected failures are mapped
        import traceback

        click.echo(for_terminal(f"internal error: {type(exc).__name__}: {exc}"), err=True)
        if os.environ.get("RFCHECK_DEBUG"):
            traceback.print_exc()
        else:
            click.echo("(set RFCHECK_DEBUG=1 for the traceback; please report it)", err=True)
        return Exit.INTERNAL
    return Exit.PASS


def entry() -> None:
    sys.exit(main())


if __name__ == "__main__":
    entry()
