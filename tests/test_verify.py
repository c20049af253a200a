"""rfcheck verify: an archived report is proved from its own attachments, and every kind of
tampering is caught and described.

References: SHA-256 (FIPS 180-4, through hashlib); the PDF's embedded-file streams (ISO
32000-1, 7.11.4) are edited with pypdf, an outside PDF library, as an auditor's tool would.
"""

from __future__ import annotations

import datetime as dt
import hashlib
import io
import json
import os

import pypdf
import pytest

from conftest import DEMO, EXAMPLES
from rfcheck.cli import main
from rfcheck.rules.policy import load_policy
from rfcheck.run import run
from rfcheck.spec import load_spec
from rfcheck.verify import verify

#: a waiver that was in force when the report was made and has expired since
POLICY = """schema = 1
name = "Bench group policy (invented)"

[[waiver]]
rule = "spec.assumptions"
subject = "feed main"
reason = "the cold cavity's reflection is measured at commissioning"
reference = "plan B-2/7 (invented)"
expires = 2026-06-30
"""
EVALUATED = dt.datetime(2026, 6, 1, 9, 30, tzinfo=dt.timezone.utc)


@pytest.fixture(scope="module")
def report(tmp_path_factory):
    """The bench reactor's PDF under a site policy, evaluated on 2026-06-01."""
    from rfcheck.report.render import render_pdf

    folder = tmp_path_factory.mktemp("verify")
    (folder / "bench.toml").write_bytes(DEMO.read_bytes())
    (folder / "site.toml").write_text(POLICY, encoding="utf-8")
    result = run(load_spec(folder / "bench.toml"), load_policy(folder / "site.toml"),
                 evaluated_at=EVALUATED)
    assert [f.status.value for f in result.findings if f.rule == "spec.assumptions"] == ["waived"]
    path = folder / "bench.pdf"
    path.write_bytes(render_pdf(result))
    return path


def _edit(src, dst, name: str, change) -> None:
    """Rewrite attachment `name` of the PDF `src` with change(bytes) -> bytes, into `dst`."""
    writer = pypdf.PdfWriter(clone_from=pypdf.PdfReader(src))
    names = writer._root_object["/Names"]["/EmbeddedFiles"]["/Names"]
    for i in range(0, len(names), 2):
        if names[i] == name:
            stream = names[i + 1].get_object()["/EF"]["/F"].get_object()
            stream.set_data(change(stream.get_data()))
            break
    else:
        raise AssertionError(f"no attachment {name}")
    buf = io.BytesIO()
    writer.write(buf)
    dst.write_bytes(buf.getvalue())


def test_untouched_report_matches(report, capsys):
    outcome = verify(report)
    assert outcome.matches, outcome.differences
    assert main(["verify", str(report)]) == 0
    out = capsys.readouterr().out
    assert "re-run at 2026-06-01T09:30:00+00:00" in out and "matches its attachments" in out
    # the waiver has expired since: evaluated now, the finding warns, so the recorded
    # instant is what makes the re-run agree
    laid_now = run(load_spec(DEMO), load_policy(report.parent / "site.toml"))
    assert [f.status.value for f in laid_now.findings if f.rule == "spec.assumptions"] == ["warn"]


def test_one_character_edit_of_an_attachment(report, tmp_path, capsys):
    edited = tmp_path / "edited.pdf"
    _edit(report, edited, "bench.toml", lambda b: b.replace(b'"66 A"', b'"67 A"', 1))
    outcome = verify(edited)
    assert not outcome.matches
    text = "\n".join(outcome.differences)
    assert "specification bench.toml (attachment bench.toml): the attached file's SHA-256" in text
    assert "is not the file that was checked" in text
    # the re-run of the edited spec names the findings the edit moves
    assert "resonance.ecr-clearance (feed main): measured" in text
    assert main(["verify", str(edited)]) == 1
    assert "DIFFERS: specification bench.toml" in capsys.readouterr().out


def test_edited_policy_attachment(report, tmp_path):
    edited = tmp_path / "policy-edited.pdf"
    _edit(report, edited, "policy-site.toml", lambda b: b.replace(b"2026-06-30", b"2026-06-29"))
    text = "\n".join(verify(edited).differences)
    assert "policy site.toml (attachment policy-site.toml): the attached file's SHA-256" in text


def test_replaced_attachment_with_consistent_results(report, tmp_path):
    """The spec and the results both replaced by another revision's: the cover still prints
    the first spec's fingerprint, so the swap is caught."""
    other = run(load_spec(EXAMPLES / "bench-ecr-reactor-rev-d.toml"),
                load_policy(report.parent / "site.toml"), evaluated_at=EVALUATED)
    new_spec = (EXAMPLES / "bench-ecr-reactor-rev-d.toml").read_bytes()
    results = other.to_json()
    results["inputs"][0]["file"] = "bench.toml"  # keep the attachment names
    step = tmp_path / "step.pdf"
    _edit(report, step, "bench.toml", lambda _: new_spec)
    replaced = tmp_path / "replaced.pdf"
    _edit(step, replaced, "rfcheck-results.json",
          lambda _: json.dumps(results, indent=2).encode())
    outcome = verify(replaced)
    text = "\n".join(outcome.differences)
    digest = hashlib.sha256(new_spec).hexdigest()[:16]
    assert f"the results' SHA-256 {digest}… is not the one printed on the cover" in text
    assert not outcome.matches


def test_results_naming_an_unplaceable_file(report, tmp_path, capsys):
    """Results edited to name the spec '..': described, nothing written outside the folder."""
    def rename(data: bytes) -> bytes:
        results = json.loads(data)
        results["inputs"][0]["file"] = ".."
        return json.dumps(results).encode()

    edited = tmp_path / "dotdot.pdf"
    _edit(report, edited, "rfcheck-results.json", rename)
    assert main(["verify", str(edited)]) == 1
    out = capsys.readouterr().out
    assert "DIFFERS: the attachments cannot be re-run" in out
    assert "listed in the results but not attached" in out


def test_report_claiming_a_newer_rule_set(tmp_path, monkeypatch, capsys):
    import rfcheck.report.context as context
    import rfcheck.run as run_module
    from rfcheck.report.render import render_pdf

    from test_pdf_epoch import NARROW

    policy = tmp_path / "narrow.toml"  # a short report: the claim is on the cover either way
    policy.write_text(NARROW, encoding="utf-8")
    result = run(load_spec(DEMO), load_policy(policy))
    monkeypatch.setattr(run_module, "RULESET_VERSION", "2")
    monkeypatch.setattr(context, "RULESET_VERSION", "2")
    newer = tmp_path / "newer.pdf"
    newer.write_bytes(render_pdf(result))
    monkeypatch.undo()
    outcome = verify(newer)
    assert outcome.differences == [
        "the report was made with rule set 2; the installed rfcheck 0.1.0 has rule set 1: the "
        "re-run below uses the installed rules, and every finding that changed is listed"]
    assert main(["verify", str(newer)]) == 1
    capsys.readouterr()


def test_not_an_rfcheck_report(tmp_path, capsys):
    other = pypdf.PdfWriter()
    other.add_blank_page(200, 200)
    buf = io.BytesIO()
    other.write(buf)
    plain = tmp_path / "plain.pdf"
    plain.write_bytes(buf.getvalue())
    assert main(["verify", str(plain)]) == 2
    assert "not an rfcheck report (no rfcheck-results.json attached)" in capsys.readouterr().err
    garbage = tmp_path / "cut.pdf"
    garbage.write_bytes(b"%PDF-1.7\n" + b"\x00" * 100)
    assert main(["verify", str(garbage)]) == 2
    assert "cut.pdf: the PDF cannot be read" in capsys.readouterr().err
    assert main(["verify", str(DEMO)]) == 2
    assert "not a PDF file" in capsys.readouterr().err
    assert main(["verify", str(tmp_path)]) == 2
    assert "the report path is a folder; expected a PDF file" in capsys.readouterr().err
    fifo = tmp_path / "pipe.pdf"
    os.mkfifo(fifo)  # refused before it is opened: nothing blocks
    assert main(["verify", str(fifo)]) == 2
    assert "the report path is a FIFO (named pipe)" in capsys.readouterr().err
    assert main(["diff", str(fifo), str(DEMO)]) == 2
    assert "FIFO" in capsys.readouterr().err
