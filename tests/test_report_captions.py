"""Every report figure's caption names exactly the elements the figure draws: each element a
caption can promise carries an SVG id (``<figure>-el-<name>-<n>``), and for every bundled
example the caption holds an element's phrase if and only if the SVG holds its id.

The outside reference is the specification itself (read with the standard library's
tomllib): a figure draws a landmark, window or launcher line only where the spec declares one
inside the drawn range, and the window figure's limit only where the policy ran the rule."""

from __future__ import annotations

import re
import tomllib

import pytest

from conftest import EXAMPLES
from rfcheck.report.figures import all_figures
from rfcheck.rules.policy import load_policy
from rfcheck.run import run
from rfcheck.spec import load_spec

SPECS = sorted(p for p in EXAMPLES.glob("*.toml") if "[source]" in p.read_text("utf-8"))

#: figure id (prefix) -> {element name: the caption's phrase for it}
PHRASES = {
    "axis-field": {"nominal": "at nominal current (line)",
                   "current-band": "over the current tolerance (band)",
                   "resonance": "dashed: each ECR feed's resonance field",
                   "resonance-band": "shaded: over its frequency tolerance",
                   "landmark": "landmarks", "window": "windows", "launcher": "launchers"},
    "window-reflection": {"nominal": "nominal stack (line)", "worst-band": "(band)",
                          "tolerance": "shaded: the feed's f ± tolerance",
                          "frequency": "vertical line: the feed's frequency",
                          "limit": "dashed: the |Γ| limit", "worst": "dot: the worst point"},
    "launch-path": {"target": "ashed: the target resonance",
                    "cutoff": "otted: the first cutoff"},
    "cma-diagram": {"launcher": "from the launcher (dot)"},
    "field-map": {"resonance": "ines: resonance surfaces", "landmark": "otted: landmarks",
                  "window": "windows (squares)", "launcher": "launchers (triangles"},
    "fringe-field": {"magnet": "grey: windings and magnets", "line": "Coloured lines",
                     "area": "Dashed: the declared controlled area",
                     "chamber": "solid box: chamber"},
    "rays-map": {"layer": "solid red: the layer", "layer-point": "red dots:",
                 "cutoff": "dashed orange:"},
    "rays-section": {"layer": "solid red: the layer", "wall": "grey circle"},
    "rays-deposition": {"target": "shaded: the launch's intended region"},
}
#: figures checked by their own tests (test_power_budget, test_report_dispersion)
ELSEWHERE = ("power-budget", "dispersion")
_figures: dict = {}


def _figs(path):
    if path not in _figures:
        result = run(load_spec(path), load_policy(None))
        _figures[path] = (result, all_figures(result))
    return _figures[path]


def _kind(fig_id: str) -> str:
    return next(k for k in (*PHRASES, *ELSEWHERE) if fig_id.startswith(k))


def _ids(svg: str) -> set[str]:
    return {m.group(1) for m in re.finditer(r'id="[^"]*?-el-([a-z][a-z-]*?)-\d+"', svg)}


def _dotted(caption: str) -> str:
    m = re.search(r"dotted: ([^.;]*)", caption)
    return m.group(1) if m else ""


@pytest.mark.parametrize("path", SPECS, ids=lambda p: p.stem)
def test_each_caption_names_exactly_what_its_figure_draws(path):
    _, figs = _figs(path)
    assert figs
    for fig in figs:
        kind = _kind(fig["id"])
        if kind in ELSEWHERE:
            continue
        drawn = _ids(fig["svg"])
        assert drawn == set(fig["drawn"]), fig["id"]
        caption = fig["caption"]
        if kind == "axis-field":  # the three kinds of dotted line share one clause
            for name in ("landmark", "window", "launcher"):
                assert (PHRASES[kind][name] in _dotted(caption)) == (name in drawn), \
                    (fig["id"], name, caption)
        for name, phrase in PHRASES[kind].items():
            if kind == "axis-field" and name in ("landmark", "window", "launcher"):
                continue
            assert (phrase in caption) == (name in drawn), (fig["id"], name, caption)


@pytest.mark.parametrize("path", SPECS, ids=lambda p: p.stem)
def test_the_marks_drawn_follow_the_declared_spec(path):
    result, figs = _figs(path)
    declared = tomllib.loads(path.read_text("utf-8"))
    ch = result.model.chamber
    by_id = {f["id"]: f for f in figs}
    axis = by_id.get("axis-field")
    if axis is not None:
        inside = [lm for lm in declared.get("chamber", {}).get("landmarks", [])]
        lms = [lm for lm in result.model.chamber.landmarks if ch.z_start <= lm.z <= ch.z_end]
        assert len(inside) >= len(lms)
        assert ("landmark" in axis["drawn"]) == bool(lms)
        assert ("window" in axis["drawn"]) == any(
            ch.z_start <= w.z <= ch.z_end for w in result.model.windows)
    window = by_id.get("window-reflection")
    assert (window is not None) == bool(declared.get("window"))
    if window is not None:
        ran = any(u.id == "window.reflection" for u in result.rules)
        assert ("limit" in window["drawn"]) == ran


@pytest.mark.parametrize("value, text", [
    (0.0, "0"), (1.0, "1"), (10.0, "10"), (100.0, "10²"), (-1000.0, "−10³"), (1e-3, "10⁻³"),
    (0.5, "0.5"), (-2.0, "−2"), (float("nan"), "")])
def test_log_tick_labels_are_plain_text(value, text):
    # powers of ten written with Unicode superscripts (U+00B2, U+00B3, U+207B…), no mathtext
    from rfcheck.report.figures import power_label

    assert power_label(value) == text


#: the colour-blind-safe set of M. Okabe and K. Ito, "Color Universal Design" (2008), as
#: recommended by B. Wong, Nature Methods 8, 441 (2011): every coloured line of a figure
OKABE_ITO = {"#000000", "#e69f00", "#56b4e9", "#009e73", "#f0e442", "#0072b2", "#d55e00",
             "#cc79a7"}


@pytest.mark.parametrize("path", SPECS, ids=lambda p: p.stem)
def test_every_coloured_line_is_from_the_colour_blind_safe_set(path):
    from rfcheck.report.glance import glance

    result, figs = _figs(path)
    g = glance(result)["figure"]
    for fig in [*figs, *([g] if g else [])]:
        for c in re.findall(r"stroke: ?(#[0-9a-fA-F]{6})", fig["svg"]):
            c = c.lower()
            grey = c[1:3] == c[3:5] == c[5:7]
            assert grey or c in OKABE_ITO, (fig["id"], c)
