"""The on-screen report (check --html): one self-contained page, written like the other outputs.

What the page may reference follows the HTML Living Standard's fetching attributes (src, href,
srcset, poster, data, action, formaction, xlink:href) and CSS url()/@import (CSS Values 4
§4.5): every one must be a fragment (#id) or a data: URI (RFC 2397). When Debian's Chromium is
installed at /usr/bin/chromium the page is also loaded in it headless: the screenshot must show
the report (not a blank page), the DOM the browser built must hold the verdict and every rule
id, no console message may be logged and Chromium's own network log must show no request
made by the page; a control page with a remote image and a console.error shows that both
detectors see what they are meant to see.
"""

from __future__ import annotations

import json
import os
import re
import shutil
import subprocess
import sys
from html.parser import HTMLParser
from pathlib import Path

import pytest

from conftest import DEMO, EXAMPLES
from rfcheck.cli import main
from rfcheck.views import verdict_word

CASES = {
    "bench": (DEMO, None),
    "min-b-waived": (EXAMPLES / "min-b-ion-source.toml", EXAMPLES / "min-b-site-policy.toml"),
    "icp": (EXAMPLES / "icp-etch-source.toml", None),
}
CHROMIUM = Path("/usr/bin/chromium")
_done: dict[str, tuple] = {}


def _case(name: str, tmp_path_factory):
    """(run, html text, path, stderr) for one example, written once by the CLI."""
    if name not in _done:
        from rfcheck.rules.policy import load_policy
        from rfcheck.run import run
        from rfcheck.spec import load_spec

        spec, pol = CASES[name]
        out = tmp_path_factory.mktemp(f"html-{name}") / f"{name}.html"
        args = ["check", str(spec), "--html", str(out)] + (["--policy", str(pol)] if pol else [])
        code = main(args)
        assert code in (0, 1), code
        _done[name] = (run(load_spec(spec), load_policy(pol)), out.read_text("utf-8"), out)
    return _done[name]


# ---------------------------------------------------------------- the page's references

#: attributes through which HTML or SVG makes the browser fetch (HTML Living Standard;
#: SVG 1.1 xlink:href)
FETCHING = {"src", "href", "srcset", "poster", "data", "action", "formaction", "xlink:href",
            "background", "longdesc", "manifest", "ping", "cite"}
_CSS_URL = re.compile(r"""url\(\s*['"]?([^'")\s]*)|@import\s+['"]([^'"]+)""", re.I)


class _References(HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.refs: list[tuple[str, str, str]] = []  # (tag, attribute, value)
        self.scripts = 0
        self._in_style = False

    def handle_starttag(self, tag, attrs):
        if tag == "script":
            self.scripts += 1
        if tag == "style":
            self._in_style = True
        for name, value in attrs:
            if name in FETCHING and value is not None:
                self.refs.append((tag, name, value))
            if name == "style" and value:
                self.refs += [(tag, "style url()", u or i) for u, i in _CSS_URL.findall(value)]

    handle_startendtag = handle_starttag

    def handle_endtag(self, tag):
        if tag == "style":
            self._in_style = False

    def handle_data(self, data):
        if self._in_style:
            self.refs += [("style", "url()", u or i) for u, i in _CSS_URL.findall(data)]


def external_references(html: str) -> list[tuple[str, str, str]]:
    """Every reference a browser would fetch: not a fragment, not a data: URI, and not a
    CSS local() font face (which names an installed font, no address)."""
    p = _References()
    p.feed(html)
    p.close()
    out = []
    for tag, attr, value in p.refs:
        v = value.strip()
        if v.startswith("#") or v.lower().startswith("data:"):
            continue
        out.append((tag, attr, v))
    return out


def test_reference_detector_sees_what_a_browser_fetches():
    """The detector itself, on markup that fetches in every way it looks for."""
    bad = ('<img src="http://x.invalid/a.png"><link href="file:///etc/passwd">'
           '<svg><image xlink:href="https://x.invalid/b"/><use href="#ok"/></svg>'
           '<div style="background:url(//x.invalid/c)"></div>'
           '<style>@import "s.css"; p { background: url("img.png") }</style>'
           '<img src="data:image/png;base64,AAAA"><a href="#top">top</a>')
    found = {v for _, _, v in external_references(bad)}
    assert found == {"http://x.invalid/a.png", "file:///etc/passwd", "https://x.invalid/b",
                     "//x.invalid/c", "s.css", "img.png"}


@pytest.mark.parametrize("name", list(CASES))
def test_page_references_nothing_outside_itself(name, tmp_path_factory):
    result, html, _ = _case(name, tmp_path_factory)
    assert external_references(html) == []
    assert not re.search(r"""(?:src|href)\s*=\s*["']?\s*https?://""", html, re.I)
    p = _References()
    p.feed(html)
    assert p.scripts == 0  # nothing to run
    # the figures are inline (the inductive source has no magnet and so no field figures;
    # its report draws only the cross-section of the source)
    assert "<svg" in html
    assert ("On-axis field and resonance bands" in html) == (name != "icp")


@pytest.mark.parametrize("name", list(CASES))
def test_page_is_the_report(name, tmp_path_factory):
    """The same report as the PDF: verdict words, every rule id, the sign-off, the standing
    statement; every id of the page is unique (the inline figures share one id space) and
    every fragment reference resolves."""
    result, html, _ = _case(name, tmp_path_factory)
    text = " ".join(re.sub(r"<[^>]+>", " ", html).split())
    assert verdict_word(result) in text
    for rule in {f.rule for f in result.findings}:
        assert rule in text, rule
    assert "Conditions of approval" in text and "does not replace" in text
    ids = re.findall(r'\bid="([^"]+)"', html)
    assert len(ids) == len(set(ids))
    refs = set(re.findall(r'(?:href="#|url\(#)([^")]+)', html))
    assert refs <= set(ids), sorted(refs - set(ids))[:5]
    assert "attached to this PDF" not in text  # the page carries no files and says so


def test_waived_case_lists_the_waivers_on_the_page(tmp_path_factory):
    result, html, _ = _case("min-b-waived", tmp_path_factory)
    assert "WAIVERS" in verdict_word(result)
    waived = [f for f in result.findings if f.status.value == "waived"]
    assert waived
    for f in waived:
        assert f.waiver["reference"] in html


# ---------------------------------------------------------------- as an output of check

def run_cli(args, capsys):
    code = main([str(a) for a in args])
    out = capsys.readouterr()
    return code, out.out, out.err


def test_html_written_with_the_other_outputs_and_said_on_stderr(tmp_path, capsys):
    js, page = tmp_path / "r.json", tmp_path / "r.html"
    code, out, err = run_cli(["check", DEMO, "--json", js, "--html", page], capsys)
    assert code in (0, 1)
    size = page.stat().st_size
    assert f"wrote HTML report {page} ({size:,} bytes".replace(",", " ") in err
    assert "wrote JSON results" in err
    assert page.read_bytes().startswith(b"<!DOCTYPE html>")
    assert json.loads(js.read_text())["schema"] == "rfcheck-run/1"
    assert not list(tmp_path.glob(".*.part"))  # committed together, no temporaries left


def test_html_target_checks(tmp_path, capsys, monkeypatch):
    """Refused before evaluating, like --json and --pdf (rfcheck.outputs.plan)."""
    import rfcheck.cli as cli

    def boom(*a, **k):
        raise AssertionError("evaluated although the outputs were refused")

    monkeypatch.setattr(cli, "_evaluate", boom)
    real = tmp_path / "real.html"
    real.write_text("keep")
    link = tmp_path / "link.html"
    link.symlink_to(real)
    code, _, err = run_cli(["check", DEMO, "--html", link], capsys)
    assert code == 2 and "--html" in err and "symbolic link" in err
    assert real.read_text() == "keep"
    fifo = tmp_path / "pipe.html"
    os.mkfifo(fifo)
    code, _, err = run_cli(["check", DEMO, "--html", fifo], capsys)
    assert code == 2 and "FIFO" in err
    same = tmp_path / "same.out"
    code, _, err = run_cli(["check", DEMO, "--pdf", same, "--html", same], capsys)
    assert code == 2 and "same file" in err and not same.exists()


def test_html_alone_does_not_import_weasyprint(tmp_path):
    page = tmp_path / "r.html"
    code = ("import sys; from rfcheck.cli import main; "
            f"c = main(['check', {str(DEMO)!r}, '--html', {str(page)!r}]); "
            "print('weasyprint' in sys.modules, c)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         timeout=300, check=True)
    assert out.stdout.split()[-2:] in (["False", "0"], ["False", "1"]), out.stdout[-300:]
    assert page.stat().st_size > 10_000


# ---------------------------------------------------------------- in a real browser

_FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
          "--disable-component-update", "--disable-sync", "--no-first-run",
          # no name resolves: nothing can leave the machine even if the page asked
          "--host-resolver-rules=MAP * ~NOTFOUND",
          "--enable-logging=stderr", "--v=0"]


def _chromium(page: Path, work: Path, *what: str) -> subprocess.CompletedProcess:
    profile = work / "profile"
    shutil.rmtree(profile, ignore_errors=True)
    return subprocess.run([str(CHROMIUM), *_FLAGS, f"--user-data-dir={profile}",
                           f"--log-net-log={work / 'net.json'}", *what, page.as_uri()],
                          capture_output=True, text=True, timeout=180)


def page_requests(netlog: Path) -> list[str]:
    """URLs of requests the page made, from Chromium's network log: those whose network
    isolation key is the page's own file:// site (the browser's background requests carry
    another key or none)."""
    data = json.loads(netlog.read_text())
    start = data["constants"]["logEventTypes"]["URL_REQUEST_START_JOB"]
    return [e["params"].get("url", "?") for e in data["events"]
            if e["type"] == start and "file://" in str(e["params"].get("network_isolation_key"))]


def console_lines(stderr: str) -> list[str]:
    return [line for line in stderr.splitlines() if ":CONSOLE" in line]


needs_chromium = pytest.mark.skipif(
    not CHROMIUM.exists(),
    reason="Debian's Chromium is not installed at /usr/bin/chromium (apt-get install chromium; "
           ".ci/run installs it where apt-get works); the page's references are still checked "
           "by test_page_references_nothing_outside_itself")


@needs_chromium
def test_browser_detectors_catch_a_fetch_and_a_console_error(tmp_path):
    bad = tmp_path / "control.html"
    bad.write_text('<html><body><img src="http://control.invalid/x.png">'
                   '<script>console.error("control")</script>control</body></html>')
    proc = _chromium(bad, tmp_path, "--dump-dom")
    assert proc.returncode == 0, proc.stderr[-500:]
    assert "http://control.invalid/x.png" in page_requests(tmp_path / "net.json")
    assert any("control" in line for line in console_lines(proc.stderr))


def _non_blank_share(png: Path) -> float:
    """Share of pixels that differ from the page background (the most common colour)."""
    from PIL import Image

    img = Image.open(png).convert("RGB")
    colours = img.getcolors(maxcolors=img.width * img.height)
    background = max(colours)[0]
    return 1 - background / (img.width * img.height)


@needs_chromium
@pytest.mark.parametrize("name", list(CASES))
def test_page_in_headless_chromium(name, tmp_path_factory, tmp_path):
    result, html, page = _case(name, tmp_path_factory)
    proc = _chromium(page, tmp_path, "--dump-dom")
    assert proc.returncode == 0, proc.stderr[-500:]
    dom = proc.stdout
    assert verdict_word(result) in dom
    for rule in {f.rule for f in result.findings}:
        assert rule in dom, rule
    assert dom.count("<svg") == html.count("<svg")
    assert html.count("<svg") > 0  # the icp source: only its cross-section
    assert external_references(dom) == []
    assert console_lines(proc.stderr) == []
    assert page_requests(tmp_path / "net.json") == []

    shot = tmp_path / "shot.png"
    proc = _chromium(page, tmp_path, "--window-size=1100,2400", f"--screenshot={shot}")
    assert proc.returncode == 0, proc.stderr[-500:]
    assert console_lines(proc.stderr) == []
    assert page_requests(tmp_path / "net.json") == []
    # the top of the report (cover, summary, first figure) fills a good part of the window;
    # a page that failed to render is one colour
    assert _non_blank_share(shot) > 0.05
