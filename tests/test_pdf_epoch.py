"""The PDF's bytes do not depend on SOURCE_DATE_EPOCH.

Where HarfBuzz's subsetter is missing, weasyprint subsets the embedded fonts with fontTools,
which writes SOURCE_DATE_EPOCH (else the present time) into each subset's `head.modified`
field (the OpenType specification, 'head' table; the reproducible-builds definition of
SOURCE_DATE_EPOCH). The test forces that path, renders the same run under two epochs and
compares the bytes. A control subsets one packaged font with fontTools under two epochs and
finds different bytes, so the comparison can fail (it did before render_pdf pinned the epoch:
32 215 bytes of the starter's PDF differed).
"""

from __future__ import annotations

import os

import pytest

from rfcheck.rules.policy import load_policy
from rfcheck.run import run
from rfcheck.spec import load_spec

from conftest import EXAMPLES


#: a narrow rule selection: a 17-page report instead of 43 (fonts are embedded either way),
#: so the two fontTools renders cost half as much
NARROW = 'schema = 1\nname = "narrow (test)"\n[select]\ninclude = ["spec.*", "resonance.ecr-in-chamber"]\n'


@pytest.fixture(scope="module")
def starter_run(tmp_path_factory):
    policy = tmp_path_factory.mktemp("epoch") / "narrow.toml"
    policy.write_text(NARROW, encoding="utf-8")
    return run(load_spec(EXAMPLES / "starter.toml"), load_policy(policy))


def _render(result, epoch: str, monkeypatch) -> bytes:
    import weasyprint.pdf.fonts as fonts

    from rfcheck.report.render import render_pdf

    monkeypatch.setattr(fonts, "harfbuzz_subset", None)  # the fontTools subsetter
    monkeypatch.setenv("SOURCE_DATE_EPOCH", epoch)
    data = render_pdf(result)
    assert os.environ["SOURCE_DATE_EPOCH"] == epoch  # the caller's value is given back
    return data


def test_pdf_bytes_do_not_depend_on_source_date_epoch(starter_run, monkeypatch):
    a = _render(starter_run, "946684800", monkeypatch)   # 2000-01-01
    b = _render(starter_run, "1700000000", monkeypatch)  # 2023-11-14
    assert a == b


def test_control_fonttools_stamps_the_epoch():
    """fontTools' subset of one packaged font differs between two epochs (what the pin
    removes from the PDF)."""
    import io
    from pathlib import Path

    import matplotlib
    from fontTools import subset
    from fontTools.ttLib import TTFont

    path = Path(matplotlib.get_data_path()) / "fonts" / "ttf" / "DejaVuSans.ttf"
    out = []
    saved = os.environ.get("SOURCE_DATE_EPOCH")
    try:
        for epoch in ("946684800", "1700000000"):
            os.environ["SOURCE_DATE_EPOCH"] = epoch
            font = TTFont(str(path))
            sub = subset.Subsetter(subset.Options())
            sub.populate(text="rfcheck")
            sub.subset(font)
            buf = io.BytesIO()
            font.save(buf)
            out.append(buf.getvalue())
    finally:
        if saved is None:
            os.environ.pop("SOURCE_DATE_EPOCH", None)
        else:
            os.environ["SOURCE_DATE_EPOCH"] = saved
    assert out[0] != out[1]
