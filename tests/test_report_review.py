"""The report a change board signs: verdict words, one status vocabulary, unbroken rule ids,
the sign-off block on one page, what the terminal says it wrote, and inert hostile text.

The example PDFs are rendered once for the module (each takes several seconds) and read back
with pypdfium2's text extraction, i.e. what a reader of the PDF gets, not the HTML behind it.
"""

from __future__ import annotations

import re
import tomllib
import types

import pytest

from conftest import DEMO, EXAMPLES
from rfcheck.findings import Status
from rfcheck.report.render import render_html, render_pdf
from rfcheck.rules.policy import load_policy
from rfcheck.run import run
from rfcheck.spec import load_spec
from rfcheck.views import STATUS_WORDS, text_table, verdict_word

SITE_POLICY = EXAMPLES / "min-b-site-policy.toml"
#: (spec, policy) of every bundled example; the minimum-B source with the site policy that
#: waives two of its findings
CASES = {
    "bench": (DEMO, None),
    "min-b-waived": (EXAMPLES / "min-b-ion-source.toml", SITE_POLICY),
    "starter": (EXAMPLES / "starter.toml", None),
}
_rendered: dict[str, tuple] = {}


def _case(name: str):
    """(run, pdf bytes, text of each page), rendered once per module."""
    if name not in _rendered:
        spec, pol = CASES[name]
        result = run(load_spec(spec), load_policy(pol))
        pdf = render_pdf(result)
        _rendered[name] = (result, pdf, _pages(pdf))
    return _rendered[name]


def _pages(data: bytes) -> list[str]:
    import pypdfium2 as pdfium

    doc = pdfium.PdfDocument(data)
    return [doc[i].get_textpage().get_text_range() for i in range(len(doc))]


def _flat(text: str) -> str:
    return " ".join(text.split())


def unbroken_id_problems(ids, text: str) -> list[str]:
    """Rule ids that the text shows broken across a line (with or without a hyphen added).

    An id broken at a line end appears more often once the line breaks (and a hyphen put
    before one) are taken out than in the text as it stands.
    """
    joined = re.sub(r"[ \t]*\r?\n[ \t]*", "", text)
    dehyphenated = re.sub(r"[-\u00ad\u2010\x02][ \t]*\r?\n[ \t]*", "", text)
    out = []
    for rid in ids:
        n = text.count(rid)
        if joined.count(rid) > n or dehyphenated.count(rid) > n or n == 0:
            out.append(f"{rid}: {n} unbroken, {joined.count(rid)} joined, "
                       f"{dehyphenated.count(rid)} with hyphens removed")
    return out


# --------------------------------------------------------------------------- verdict words


def _fake(verdict: str, statuses):
    findings = [types.SimpleNamespace(status=s) for s in statuses]
    return types.SimpleNamespace(verdict=verdict, findings=findings)


@pytest.mark.parametrize("verdict, statuses, word", [
    ("pass", [Status.PASS], "PASS"),
    ("pass", [Status.PASS, Status.WAIVED], "PASS WITH WAIVERS"),
    ("warn", [Status.PASS, Status.WARN], "PASS WITH WARNINGS"),
    ("warn", [Status.WARN, Status.WAIVED], "PASS WITH WARNINGS AND WAIVERS"),
    ("fail", [Status.FAIL, Status.WAIVED], "FAIL"),
    ("not-evaluated", [Status.WAIVED], "NOT EVALUATED"),
], ids=lambda v: v if isinstance(v, str) else None)
def test_verdict_word_never_claims_more_than_the_findings(verdict, statuses, word):
    # the five words of the review board's verdict list; plain PASS only without any waiver
    assert verdict_word(_fake(verdict, statuses)) == word


def test_waived_cover_names_the_waivers_with_reason_reference_and_expiry():
    result, _, pages = _case("min-b-waived")
    assert result.verdict == "warn"  # the JSON key keeps its value; the words present it
    cover = _flat(pages[0])
    assert "PASS WITH WARNINGS AND WAIVERS" in cover
    assert "PASS" not in [line.strip() for line in pages[0].splitlines()]  # never bare PASS
    # each waiver as the site policy file states it (the input, read here independently)
    waivers = tomllib.loads(SITE_POLICY.read_text(encoding="utf-8"))["waiver"]
    assert len(waivers) == 2
    for w in waivers:
        for text in (w["rule"], w["subject"], w["reference"], str(w["expires"])):
            assert _flat(text) in cover, text
        # the reason wraps inside its table cell: compare without line breaks
        assert _flat(w["reason"]).replace(" ", "") in cover.replace(" ", ""), w["reason"]


def test_cover_says_pass_with_waivers_when_only_waivers_qualify_the_pass(tmp_path):
    # the site policy plus waivers for the two findings that warn with it alone
    text = SITE_POLICY.read_text(encoding="utf-8")
    for rule, subject in (("absorption.single-pass", "feed klystron"),
                          ("spec.assumptions", "feed klystron")):
        text += (f'\n[[waiver]]\nrule = "{rule}"\nsubject = "{subject}"\n'
                 'reason = "accepted for the test"\nreference = "TEST-1"\nexpires = 2099-12-31\n')
    pol = tmp_path / "all-waived.toml"
    pol.write_text(text, encoding="utf-8")
    result = run(load_spec(EXAMPLES / "min-b-ion-source.toml"), load_policy(pol))
    assert result.verdict == "pass" and result.counts()["waived"] == 4
    html = render_html(result)
    cover = html[:html.index('<h2 id="s-summary">Summary</h2>')]
    assert '<div class="word">PASS WITH WAIVERS</div>' in cover
    assert cover.count("TEST-1") == 2 and "2099-12-31" in cover
    assert "verdict: PASS WITH WAIVERS" in text_table(result)


# --------------------------------------------------------------------------- one vocabulary


@pytest.mark.parametrize("name", list(CASES))
def test_every_rule_id_is_unbroken_in_the_pdf(name):
    result, _, pages = _case(name)
    ids = {f.rule for f in result.findings} | {r.id for r in result.rules}
    assert not unbroken_id_problems(sorted(ids), "\n".join(pages))


def test_unbroken_id_check_catches_a_broken_id():
    # the check itself can fail: an id wrapped mid-word, with and without a hyphen
    assert unbroken_id_problems(["resonance.harmonic"], "see resonance.harmon\r\nic here")
    assert unbroken_id_problems(["resonance.harmonic"], "resonance.harmonic; resonance.har-\nmonic")
    assert not unbroken_id_problems(["resonance.harmonic"], "resonance.harmonic\r\nnext line")


@pytest.mark.parametrize("name", ["bench", "min-b-waived"])
def test_status_words_are_the_same_in_terminal_pdf_and_json(name):
    result, _, pages = _case(name)
    flat = _flat("\n".join(pages))
    table = text_table(result, colour=False, width=200).splitlines()
    statuses = result.to_json()["findings"]
    assert len(statuses) == len(result.findings)
    for f, js in zip(result.findings, statuses):
        # the printed word is the JSON value in capitals, hyphen as a space
        word = js["status"].replace("-", " ").upper()
        assert STATUS_WORDS[f.status] == word
        assert _flat(f"{f.rule} · {f.subject} {word}") in flat, (f.rule, f.subject)
        assert any(line.split()[:len(word.split())] == word.split() and f" {f.rule} " in line
                   and line.rstrip().endswith(f.subject) for line in table), (f.rule, word)
    # the words of the earlier reports are gone from the summary and the findings
    body = _flat(" ".join(p for p in pages if "Appendix" not in p))
    assert " n/a " not in f" {body} " and "warning | FAIL" not in body


# --------------------------------------------------------------------------- sign-off


#: the standing statement (DESIGN.md §7: the report supports, never replaces, review under
#: local codes by qualified personnel)
STANDING = ("This report supports, and does not replace, review under the local RF-safety, "
            "radiation-protection and electrical codes by licensed or otherwise qualified "
            "personnel.")


@pytest.mark.parametrize("name", list(CASES))
def test_signoff_block_is_whole_on_one_page(name):
    result, _, pages = _case(name)
    parts = ("Sign-off", "Prepared by", "Checked by", "Approved by", "NAME", "ROLE",
             "SIGNATURE", "DATE", "Conditions of approval",
             "Further conditions, written in by the signers", STANDING)
    where = {part: [i for i, p in enumerate(pages) if _flat(part) in _flat(p)] for part in parts}
    signoff = [i for i in where["Conditions of approval"]]
    assert len(signoff) == 1, where
    page = _flat(pages[signoff[0]])
    for part in parts:
        assert _flat(part) in page, part
    # the names the spec gives ("A. Invented (RF engineer)"), split into name and role
    for who in (result.model.review.prepared_by, result.model.review.checked_by,
                result.model.review.approved_by):
        for piece in who.rstrip(")").split(" ("):
            assert _flat(piece) in page, piece
    for w in (f for f in result.findings if f.status is Status.WAIVED):
        assert w.waiver["reference"] in page and str(w.waiver["expires"]) in page


# --------------------------------------------------------------------------- terminal


def test_check_says_on_stderr_what_it_wrote(tmp_path, capsys):
    from rfcheck.cli import main

    out = tmp_path / "results.json"
    code = main(["check", str(DEMO), "--json", str(out)])
    err = capsys.readouterr().err
    assert code in (0, 1)
    size = out.stat().st_size  # the file on disk, as the operating system reports it
    assert f"wrote JSON results {out} ({size:,} bytes".replace(",", " ") in err


# --------------------------------------------------------------------------- hostile text

HOSTILE = {
    "name": '<img src="http://127.0.0.1:9/name.png"> <b>bold</b>',
    "lab": '<iframe src="https://127.0.0.1:9/lab"></iframe> &amp; {{ 7*7 }}',
    "description": ('<link rel="stylesheet" href="file:///etc/passwd">'
                    '<style>@import url(http://127.0.0.1:9/a.css);</style>'
                    '<script>document.write(1)</script> see file:///etc/passwd'),
}


def _hostile_spec(tmp_path):
    text = DEMO.read_text(encoding="utf-8")
    for key, value in HOSTILE.items():
        text = re.sub(rf'(?m)^{key} = ".*"$', f"{key} = '{value}'", text, count=1)
    text = text.replace('notes = "Example source for the rfcheck demo; all names are invented."',
                        "notes = '<object data=\"file:///etc/passwd\"></object> notes'")
    p = tmp_path / "hostile.toml"
    p.write_text(text, encoding="utf-8")
    return p


@pytest.fixture
def no_network(monkeypatch):
    """Every socket connection attempted during the test, refused and recorded."""
    import socket

    tried = []

    def refuse(self, address, *a, **k):
        tried.append(address)
        raise OSError("network refused by the test")

    monkeypatch.setattr(socket.socket, "connect", refuse)
    monkeypatch.setattr(socket.socket, "connect_ex", refuse)
    return tried


def _spy_fetcher(monkeypatch):
    from rfcheck.report import render

    made = []
    real = render._fetcher

    def spy():
        made.append(real())
        return made[-1]

    monkeypatch.setattr(render, "_fetcher", spy)
    return made


def test_hostile_spec_text_renders_as_inert_text(tmp_path, monkeypatch, no_network):
    result = run(load_spec(_hostile_spec(tmp_path)), load_policy(None))
    assert result.spec_name == HOSTILE["name"]
    html = render_html(result)
    for value in HOSTILE.values():
        assert value not in html  # never as markup …
    assert "&lt;img src=&#34;http://127.0.0.1:9/name.png&#34;&gt;" in html  # … but escaped
    assert "<script>" not in html and "49" not in re.findall(r"&amp;amp; (\S+)", html)
    made = _spy_fetcher(monkeypatch)
    pages = _pages(render_pdf(result))
    text = _flat("\n".join(pages))
    for value in (HOSTILE["name"], "{{ 7*7 }}", "<script>document.write(1)</script>",
                  '<object data="file:///etc/passwd"></object> notes'):
        assert _flat(value) in text, value  # shown as the characters written
    assert "root:" not in text  # /etc/passwd's first field (POSIX passwd format)
    fetcher, = made
    assert fetcher.refused == [] and no_network == []  # nothing outside the package was asked for
    # the packaged fonts by file: URL, and the figures as data: URIs of SVG (render.svg_image)
    assert fetcher.served and all((u.startswith("file://") and u.endswith(".ttf"))
                                  or u.startswith("data:image/svg+xml;base64,")
                                  for u in fetcher.served)
    assert any(u.endswith(".ttf") for u in fetcher.served)


def test_fetcher_refuses_files_outside_the_package_and_every_network_scheme(no_network):
    import weasyprint

    from rfcheck.report.render import _fetcher, templates_dir

    fetcher = _fetcher()
    outside = templates_dir().as_uri() + "/../../../../../../etc/passwd"
    html = ('<img src="http://127.0.0.1:9/a.png"><img src="https://127.0.0.1:9/b.png">'
            '<img src="ftp://127.0.0.1:9/c.png"><link rel="stylesheet" href="file:///etc/passwd">'
            f'<img src="{outside}"><img src="FILE:///etc/hostname">'
            '<img src="data:image/png;base64,iVBORw0KGgo="><p>text</p>')
    pdf = weasyprint.HTML(string=html, url_fetcher=fetcher).write_pdf()
    assert pdf.startswith(b"%PDF-") and b"root:" not in pdf
    assert no_network == []
    assert sorted(fetcher.refused) == sorted([
        "http://127.0.0.1:9/a.png", "https://127.0.0.1:9/b.png", "ftp://127.0.0.1:9/c.png",
        "file:///etc/passwd", outside, "FILE:///etc/hostname"])
    assert [u[:5] for u in fetcher.served] == ["data:"]


def test_longest_accepted_names_keep_the_verdict_on_the_cover(tmp_path):
    # the longest texts the spec accepts (rfcheck.limits.TEXT: name 200, description 4000
    # characters, unbroken): the cover wraps them and cuts the description, so the verdict
    # and the fingerprint stay on page 1 and the whole description is in the appendix
    from rfcheck.limits import TEXT

    text = DEMO.read_text(encoding="utf-8")
    text = re.sub(r'(?m)^name = "[^"]*"', 'name = "' + "N" * TEXT["name"][0] + '"', text, count=1)
    text = re.sub(r'(?m)^description = "[^"]*"',
                  'description = "' + "x" * TEXT["description"][0] + '"', text, count=1)
    spec = tmp_path / "long.toml"
    spec.write_text(text, encoding="utf-8")
    result = run(load_spec(spec), load_policy(None))
    pages = _pages(render_pdf(result))
    cover = _flat(pages[0])
    assert verdict_word(result) in cover
    assert "Fingerprint" in cover
    assert "whole in the specification appendix" in cover
    assert ("x" * 4000) in "".join("".join(p.split()) for p in pages[1:])


# ---------------------------------------------------------------- compact appendices
def _appendix(pages, start: str, end: str | None) -> str:
    text = _flat(" ".join(pages))
    a = text.rindex(start)  # the heading, not the cover's contents list
    b = text.index(end, a) if end else len(text)
    return text[a:b]


@pytest.mark.parametrize("name", list(CASES))
def test_rules_appendix_holds_exactly_the_rules_that_evaluated_the_source(name):
    """Appendix B documents each rule with an evaluated finding (id, equation, references)
    and names every selected rule whose findings are all not applicable in one sentence;
    the policy table lists the options of the documented rules with their values."""
    result, _, pages = _case(name)
    evaluated = {f.rule for f in result.findings if f.status is not Status.NOT_APPLICABLE}
    idle = {r.id for r in result.rules} - evaluated
    b = _appendix(pages, "Appendix B —", "Appendix C —")
    heads = set(re.findall(r"([a-z]+\.[a-z0-9-]+) \((?:error|warning)\)", b))
    assert heads == evaluated
    if idle:
        sentence = b[b.index("Selected but not applicable"):]
        for rid in idle:
            assert rid in sentence
    # option names may wrap at their underscores: compare without white space
    c = re.sub(r"[\s\u200b\ufffe-]", "", _appendix(pages, "Appendix C —", "Appendix D —"))
    for r in result.rules:
        if r.id in evaluated:
            for opt, o in r.options.items():
                assert opt.replace("-", "") in c, (r.id, opt)
                assert re.sub(r"[\s-]", "", o["value"]) in c, (r.id, opt, o["value"])


def test_appendices_are_compact():
    """The bench reactor's report: the source-specific part (everything before Appendix A)
    is most of its pages; the rules and policy appendices fit in a few pages (they took 27
    pages when each rule's whole text was printed on a page of its own)."""
    _, _, pages = _case("bench")
    first_appendix = next(i for i, p in enumerate(pages) if i > 0 and "Appendix A" in p)
    rules_and_policy = [i for i, p in enumerate(pages)
                        if i > first_appendix and "Appendix D" not in p]
    assert len(rules_and_policy) <= 6
    assert first_appendix >= len(pages) / 2


def test_cover_lists_the_contents_with_the_page_of_each_part():
    """The cover's contents list names every part of the body and the appendices, each with
    the page its heading is on (read back from the PDF's text)."""
    _, _, pages = _case("bench")
    cover = _flat(pages[0])
    for part in ("Summary", "Inputs at a glance", "Power budget", "Findings",
                 "Characteristics", "Cautions", "Sign-off", "Appendix D — Input files"):
        m = re.search(re.escape(part) + r"[ .]*?(\d+)(?!\d)", cover[cover.index("Contents"):])
        assert m, part
        page = int(m.group(1))
        heading = "Appendix D — Input files" if part.startswith("Appendix") else part
        assert heading in _flat(pages[page - 1]), (part, page)
