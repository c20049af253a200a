"""The change-control report: `check --previous` and `diff --pdf/--html`.

What it must carry (the change board's page, DESIGN.md §6): the previous revision's
fingerprint (SHA-256, FIPS 180-4, through hashlib), what changed, which verdicts moved and
the new verdict on the first page, then the new review; both revisions' files attached.
Text is read back with pypdfium2 and attachments with pypdf, outside libraries.
"""

from __future__ import annotations

import hashlib
import json

import pypdf
import pypdfium2
import pytest

from conftest import DEMO, EXAMPLES
from rfcheck.cli import main

REV_D = EXAMPLES / "bench-ecr-reactor-rev-d.toml"


@pytest.fixture(scope="module")
def change_pdf(tmp_path_factory):
    folder = tmp_path_factory.mktemp("change")
    pdf, js = folder / "rev-d.pdf", folder / "rev-d.json"
    code = main(["check", str(REV_D), "--previous", str(DEMO), "--pdf", str(pdf), "--json", str(js)])
    assert code == 1  # revision D fails
    return pdf, json.loads(js.read_text(encoding="utf-8"))


def test_check_previous_records_the_previous_fingerprint(change_pdf):
    _, results = change_pdf
    prev = results["previous"]
    assert prev["spec_sha256"] == hashlib.sha256(DEMO.read_bytes()).hexdigest()
    assert prev["revision"] == "C" and prev["verdict"] == "warn"
    assert prev["inputs"][0]["sha256"] == prev["spec_sha256"]
    assert prev["change"]["moved_rules"] == ["load.plasma-reflection", "load.reflected-power"]
    assert "evaluated_at" in results


def test_change_request_page_comes_first(change_pdf):
    pdf, _ = change_pdf
    doc = pypdfium2.PdfDocument(str(pdf))
    first = doc[0].get_textpage().get_text_range()
    cover = doc[1].get_textpage().get_text_range()
    assert "Change request" in first
    for text in ("Bench ECR reactor B-2 rev. C", "Bench ECR reactor B-2 rev. D", "FAIL",
                 "magnet.coils[downstream].current", '"35 A"', '"55 A"',
                 "load.plasma-reflection", "load.reflected-power", "PASS → FAIL",
                 hashlib.sha256(DEMO.read_bytes()).hexdigest()[:32]):
        assert text in first, text
    assert "Verdict over the declared operating envelope" in cover  # the review follows


def test_both_specs_attached(change_pdf):
    pdf, _ = change_pdf
    attached = pypdf.PdfReader(str(pdf)).attachments
    assert attached[REV_D.name][0] == REV_D.read_bytes()
    assert attached["previous-" + DEMO.name][0] == DEMO.read_bytes()


def test_change_report_verifies(change_pdf):
    from rfcheck.verify import verify

    outcome = verify(change_pdf[0])
    assert outcome.matches, outcome.differences


def test_diff_html_has_the_change_page(tmp_path):
    page = tmp_path / "change.html"
    assert main(["diff", str(DEMO), str(REV_D), "--html", str(page)]) == 1
    html = page.read_text(encoding="utf-8")
    assert html.index("Change request") < html.index("Verdict over the declared operating envelope")
    assert "magnet.coils[downstream].current" in html
