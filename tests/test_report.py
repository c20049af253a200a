"""The PDF review report: readable text, every rule, cautions, attachments, reproducibility."""

import io
import json

import pytest

from conftest import DEMO
from rfcheck.report.render import render_html, render_pdf
from rfcheck.rules.policy import load_policy
from rfcheck.run import run
from rfcheck.spec import load_spec


@pytest.fixture(scope="module")
def demo_run():
    return run(load_spec(DEMO), load_policy(None))


@pytest.fixture(scope="module")
def demo_pdf(demo_run):
    return render_pdf(demo_run)


def _pdf_text(data: bytes) -> str:
    import pypdfium2 as pdfium

    doc = pdfium.PdfDocument(data)
    return "\n".join(doc[i].get_textpage().get_text_range() for i in range(len(doc)))


def test_pdf_holds_verdict_rules_and_cautions(demo_run, demo_pdf):
    assert demo_pdf.startswith(b"%PDF-")
    text = _pdf_text(demo_pdf)
    flat = " ".join(text.split())
    assert demo_run.verdict.upper() in text
    for rule in {f.rule for f in demo_run.findings}:
        assert rule in flat, rule
    for caution in ("RF exposure and burns", "High voltage", "X-rays from hot electrons",
                    "Strong static magnetic fields", "Cryogens", "Toxic window materials",
                    "Pressure and vacuum windows"):
        assert caution in flat, caution
    assert demo_run.spec_sha256 in flat
    assert "Prepared by" in flat and "Approved by" in flat
    # the report defers to local codes and never declares anything harmless
    assert "qualified" in flat
    assert " safe " not in f" {flat.lower()} ".replace("safety", "")


def test_pdf_is_archival_with_attachments(demo_run, demo_pdf):
    from pypdf import PdfReader

    reader = PdfReader(io.BytesIO(demo_pdf))
    names = set(reader.attachments)
    assert {DEMO.name, "rfcheck-results.json"} <= names
    attached = json.loads(reader.attachments["rfcheck-results.json"][0])
    assert attached == demo_run.to_json()
    assert reader.attachments[DEMO.name][0].decode() == DEMO.read_text(encoding="utf-8")
    xmp = reader.xmp_metadata
    assert xmp is not None and "pdfaid" in str(reader.trailer["/Root"]["/Metadata"].get_object().get_data())


def test_pdf_is_reproducible(demo_run, demo_pdf):
    assert render_pdf(demo_run) == demo_pdf


def test_html_has_figures_as_inline_svg_on_screen_and_as_svg_images_for_the_pdf(demo_run):
    import base64
    import re

    screen = render_html(demo_run, medium="screen")
    assert screen.count("<svg") >= 1
    assert "On-axis field" in screen
    pdf_html = render_html(demo_run)
    assert "<svg" not in pdf_html and "On-axis field" in pdf_html
    images = re.findall(r'<img class="figure" alt="" src="data:image/svg\+xml;base64,([^"]+)">',
                        pdf_html)
    # the same figures, one image per inline SVG of the screen page
    assert len(images) == screen.count("<svg")
    assert all(base64.b64decode(i).decode("utf-8").startswith("<svg") for i in images)


@pytest.mark.parametrize("name", ["bench-ecr-reactor.toml", "min-b-ion-source.toml", "starter.toml"])
def test_every_bundled_example_renders(name):
    from conftest import EXAMPLES

    result = run(load_spec(EXAMPLES / name), load_policy(None))
    assert not [f for f in result.findings if f.status.value == "error"], name
    html = render_html(result)
    for f in result.findings:
        assert f.rule in html
    json.dumps(result.to_json(), allow_nan=False)


def test_cover_states_not_evaluated_with_its_reason_and_unused_waivers(tmp_path):
    p = tmp_path / "empty.toml"
    p.write_text('[select]\ninclude = []\n[[waiver]]\nrule = "window.reflection"\n'
                 'reason = "tuned on site"\nreference = "ECN-77"\n', encoding="utf-8")
    result = run(load_spec(DEMO), load_policy(p))
    assert result.verdict == "not-evaluated"
    doc = pdfium_pages(render_pdf(result))
    cover = " ".join(doc[0].split())
    assert "NOT EVALUATED" in cover and "This is not a pass" in cover
    assert "the policy selects no rule" in cover
    assert "PASS" not in cover
    rest = " ".join(" ".join(doc[1:]).split())
    assert "Waivers that waived no finding" in rest and "ECN-77" in rest
    assert "its rule is not selected by the policy" in rest


def pdfium_pages(data: bytes) -> list[str]:
    import pypdfium2 as pdfium

    pdf = pdfium.PdfDocument(data)
    return [pdf[i].get_textpage().get_text_range() for i in range(len(pdf))]
