"""The "inputs at a glance" page: the cross-section drawn to scale shows exactly what its
caption promises (each drawn element carries an id in the SVG), the parts sit where the
specification puts them, and the page's tables repeat the declared inputs.

Outside references: the spec files themselves (what was declared, read back with tomllib,
the standard library's TOML reader) and the closed-form ECR field B = 2π f m_e / e (NRL
Plasma Formulary, 2019, p. 28) for the resonance surface named in the caption."""

from __future__ import annotations

import math
import re
import tomllib

import pytest

from conftest import EXAMPLES
from rfcheck.report.glance import _label_rows, glance
from rfcheck.rules.policy import load_policy
from rfcheck.run import run
from rfcheck.spec import load_spec

SPECS = sorted(p for p in EXAMPLES.glob("*.toml") if "[source]" in p.read_text("utf-8"))
_runs: dict = {}


def _run(path):
    if path not in _runs:
        _runs[path] = run(load_spec(path), load_policy(None))
    return _runs[path]


def _ids(svg: str, kind: str) -> set[str]:
    return set(re.findall(rf'id="glance-el-{kind}-([^"]+)"', svg))


@pytest.mark.parametrize("path", SPECS, ids=lambda p: p.stem)
def test_caption_promises_exactly_what_is_drawn(path):
    result = _run(path)
    g = glance(result)
    fig = g["figure"]
    assert fig is not None
    svg, caption = fig["svg"], fig["caption"]
    declared = tomllib.loads(path.read_text("utf-8"))
    magnet = declared.get("magnet", {})
    coils = magnet.get("coils", [])
    permanent = magnet.get("rings", []) + magnet.get("multipoles", [])
    windows = declared.get("window", [])
    feeds = declared["feed"]
    landmarks = declared.get("chamber", {}).get("landmarks", [])
    # both half planes of every coil and permanent magnet
    assert len(_ids(svg, "coil")) == 2 * len(coils)
    assert ("coils (orange)" in caption) == bool(coils)
    assert len(_ids(svg, "magnet")) == 2 * len(permanent)
    assert ("permanent magnets (grey)" in caption) == bool(permanent)
    assert len(_ids(svg, "window")) == len(windows)
    assert ("windows (bluish-green bars" in caption) == bool(windows)
    assert len(_ids(svg, "launcher")) == len(feeds)
    assert len(_ids(svg, "landmark")) == len(landmarks)
    assert ("landmarks (ticks" in caption) == bool(landmarks)
    assert {"wall-upper", "wall-lower"} <= _ids(svg, "chamber")
    ends = declared["chamber"].get("end_walls", {})
    open_ends = [k for k in ("start", "end") if ends.get(k) == "open"]
    for k in open_ends:
        assert f"{k}-open" in _ids(svg, "chamber")
        assert "dashed" in caption
    resonances = _ids(svg, "resonance")
    named = re.findall(r"\|B\| = B_res of (.+?), at nominal current", caption)
    assert bool(resonances) == bool(named)


def test_resonance_surface_named_at_the_closed_form_ecr_field():
    """Bench reactor, 2.45 GHz: B_ECR = 2π f m_e / e = 87.52 mT (NRL Plasma Formulary)."""
    path = EXAMPLES / "bench-ecr-reactor.toml"
    caption = glance(_run(path))["figure"]["caption"]
    m_e, e = 9.1093837015e-31, 1.602176634e-19  # CODATA 2018
    b = 2 * math.pi * 2.45e9 * m_e / e
    assert f"{b * 1e3:.4g} mT" == "87.52 mT"
    assert "main (87.52 mT, solid)" in caption


@pytest.mark.parametrize("path", SPECS, ids=lambda p: p.stem)
def test_tables_repeat_the_declared_inputs(path):
    g = glance(_run(path))
    declared = tomllib.loads(path.read_text("utf-8"))
    assert [f["id"] for f in g["feeds"]] == [f["id"] for f in declared["feed"]]
    assert [f["line"] for f in g["feeds"]] == [f["line"] for f in declared["feed"]]
    assert [w["id"] for w in g["windows"]] == [w["id"] for w in declared.get("window", [])]
    for row, w in zip(g["windows"], declared.get("window", [])):
        for layer, text in zip(w["layers"], row["layers"]):
            assert text.startswith(layer["material"])
    magnet = declared.get("magnet", {})
    ids = [s["id"] for key in ("coils", "rings", "multipoles") for s in magnet.get(key, [])]
    assert sorted(m["id"] for m in g["magnet"] if m["id"] in ids) == sorted(ids)
    names = [e["name"] for e in g["envelope"]]
    assert "peak electron density" in names and "chamber" in names


def test_label_rows_never_overlap_in_a_row():
    xs = [0.0, 5.0, 10.0, 200.0, 203.0]
    texts = ["launcher main", "window vacuum-window", "substrate", "a", "b"]
    rows = _label_rows(xs, texts, 3)
    spans = {}
    for x, t, r in zip(xs, texts, rows):
        half = 0.55 * 6.5 * len(t) / 2 + 2
        for lo, hi in spans.get(r, []):
            assert x - half >= hi or x + half <= lo
        spans.setdefault(r, []).append((x - half, x + half))
    assert rows[:3] == [0, 1, 2]
