"""The figures and the PDF of a sweep or tolerance study (rfcheck/report/figure_sweep.py,
rfcheck/report/sweep_report.py).

The studies are made here by :func:`make_sweep` from made-up closed-form margins (never real
results): in normalised coordinates u, v of two spec values,

* ``resonance.ecr-in-chamber`` (error severity): relative margin 1 − (u² + v²), held inside
  the unit circle;
* ``exposure.aperture-attenuation`` (error): 0.6 − 0.5 u;
* ``absorption.collisional-regime`` (warning severity): 0.2 + 0.8 v, warns below v = −0.25;
* ``rays.first-pass-absorption``: not applicable everywhere;

points with u < −1.25 are refused by the "specification" (INVALID), and the corner
u > 1.3, v > 1.1 is NOT EVALUATED. Outside references: the area of an ellipse π a b and the
closed-form margins above (where the binding rule changes), the Wilson score interval
(E. B. Wilson, J. Am. Stat. Assoc. 22, 209 (1927)), Pearson's correlation
(numpy.corrcoef), BT.709 luma (ITU-R BT.709-6, Y = 0.2126 R + 0.7152 G + 0.0722 B).
"""

from __future__ import annotations

import copy
import itertools
import math
import re

import numpy as np
import pytest

from rfcheck.report import figure_sweep as fs
from rfcheck.report.sweep_report import (SWEEP_ATTACHMENT, check_sweep, render_sweep_html,
                                         render_sweep_pdf)
from rfcheck.spec import InputError

X_KEY, X_UNIT, X0, X_SCALE = "magnet.coils[upstream].current", "A", 200.0, 40.0
Y_KEY, Y_UNIT, Y0, Y_SCALE = "feed[main].frequency", "GHz", 2.45, 0.04
#: rule id → (severity, unit, |limit|)
RULES = {
    "resonance.ecr-in-chamber": ("error", "T", 0.0875),
    "exposure.aperture-attenuation": ("error", "dB", 40.0),
    "absorption.collisional-regime": ("warning", "", 1.0),
    "rays.first-pass-absorption": ("error", "", 1.0),
}
BINDING_IDS = ("resonance.ecr-in-chamber", "exposure.aperture-attenuation",
               "absorption.collisional-regime")
Z95 = 1.959963984540054  # the 97.5 % point of the standard normal distribution


def closed_form(u: float, v: float) -> dict[str, float | None]:
    """The made-up relative margins of the fixture's rules at (u, v)."""
    return {"resonance.ecr-in-chamber": 1.0 - (u * u + v * v),
            "exposure.aperture-attenuation": 0.6 - 0.5 * u,
            "absorption.collisional-regime": 0.2 + 0.8 * v,
            "rays.first-pass-absorption": None}


def _point(index, values: dict) -> dict:
    u = (values.get(X_KEY, X0) - X0) / X_SCALE
    v = (values.get(Y_KEY, Y0) - Y0) / Y_SCALE
    point = {"index": list(index), "values": values, "verdict": "pass", "binding": None,
             "binding_margin": None, "problem": None, "rules": {}}
    if u < -1.25:
        point.update(verdict="invalid", problem=f"{X_KEY}: expected at least 150 A (the "
                                                "coil supply's range), found "
                                                f"{values[X_KEY]:.4g} A")
        return point
    if u > 1.3 and v > 1.1:
        point["verdict"] = "not-evaluated"
        return point
    statuses = []
    for rid, rm in closed_form(u, v).items():
        severity, unit, limit = RULES[rid]
        if rm is None:
            point["rules"][rid] = {"status": "not-applicable", "margin": None, "unit": unit,
                                   "relative_margin": None}
            continue
        status = "pass" if rm >= 0 else ("fail" if severity == "error" else "warn")
        statuses.append(status)
        point["rules"][rid] = {"status": status, "margin": rm * limit, "unit": unit,
                               "relative_margin": rm}
    point["verdict"] = "fail" if "fail" in statuses else "warn" if "warn" in statuses else "pass"
    scored = [(r["relative_margin"], rid) for rid, r in point["rules"].items()
              if r["relative_margin"] is not None]
    point["binding_margin"], point["binding"] = min(scored)
    return point


def wilson(k: int, n: int) -> dict:
    """Wilson score interval at 95 % (Wilson 1927)."""
    p = k / n
    denom = 1 + Z95**2 / n
    centre = (p + Z95**2 / (2 * n)) / denom
    half = Z95 * math.sqrt(p * (1 - p) / n + Z95**2 / (4 * n * n)) / denom
    return {"p": p, "low": centre - half, "high": centre + half, "passes": k, "n": n}


def _axis(key, unit, values, nominal, tolerance):
    return {"key": key, "unit": unit, "values": [float(v) for v in values], "nominal": nominal,
            "tolerance": tolerance}


def make_sweep(kind: str = "grid", n: tuple = (31, 25), *, tolerance: bool = True,
               samples: int = 300, seed: int = 7, name: str = "Bench ECR source B-3") -> dict:
    """A study dict of schema rfcheck-sweep/1 from the closed-form margins above: a grid over
    one or two axes (``n``), or ``samples`` Monte Carlo samples within the tolerances."""
    tol_x = [160.0, 240.0] if tolerance else None
    tol_y = [2.42, 2.48] if tolerance else None
    if kind == "grid":
        xs = np.linspace(X0 - 1.5 * X_SCALE, X0 + 1.5 * X_SCALE, n[0])
        axes = [_axis(X_KEY, X_UNIT, xs, X0, tol_x)]
        if len(n) > 1:
            axes.append(_axis(Y_KEY, Y_UNIT, np.linspace(Y0 - 1.5 * Y_SCALE, Y0 + 1.5 * Y_SCALE,
                                                         n[1]), Y0, tol_y))
        points = [_point(idx, {a["key"]: a["values"][i] for a, i in zip(axes, idx)})
                  for idx in itertools.product(*(range(len(a["values"])) for a in axes))]
        shape, mc = [len(a["values"]) for a in axes], None
    else:
        rng = np.random.default_rng(seed)
        xs = rng.uniform(*tol_x, samples)
        ys = rng.uniform(*tol_y, samples)
        # as rfcheck sweep writes them: a sampled parameter's values are in the points only
        axes = [dict(_axis(X_KEY, X_UNIT, [], X0, tol_x), values=None),
                dict(_axis(Y_KEY, Y_UNIT, [], Y0, tol_y), values=None)]
        points = [_point([k], {X_KEY: float(x), Y_KEY: float(y)})
                  for k, (x, y) in enumerate(zip(xs, ys))]
        shape = [samples]
        ok = [p["verdict"] in ("pass", "warn") for p in points]
        per_rule = {}
        for rid in RULES:
            st = [p["rules"][rid]["status"] for p in points if rid in p["rules"]]
            ev = [s for s in st if s not in ("not-applicable", "waived")]
            per_rule[rid] = (wilson(ev.count("pass"), len(ev)) if ev else
                             {"p": 0.0, "low": 0.0, "high": 1.0, "passes": 0, "n": 0})
        failed = np.array([p["verdict"] == "fail" for p in points], float)
        corr = [{"key": key, "coefficient": float(np.corrcoef(vals, failed)[0, 1])}
                for key, vals in ((X_KEY, xs), (Y_KEY, ys))]
        corr.sort(key=lambda c: -abs(c["coefficient"]))
        mc = {"samples": samples, "seed": seed,
              "distribution": "uniform within the declared tolerance",
              "pass_probability": {"overall": wilson(sum(ok), samples), "rules": per_rule},
              "correlation": corr}
    nominal = _point([0] * len(shape), {a["key"]: a["nominal"] for a in axes})
    counts = {v: sum(p["verdict"] == v for p in points) for v in fs.VERDICTS}
    return {
        "schema": "rfcheck-sweep/1", "kind": kind,
        "tool": {"name": "rfcheck", "version": "0.1.0", "ruleset": "2026.12"},
        "spec": {"name": name, "revision": "C", "file": "bench-ecr.toml", "sha256": "ab" * 32},
        "policy": {"name": "default", "sha256": "cd" * 32},
        "evaluated_at": "2026-12-03T12:00:00+00:00",
        "axes": axes, "shape": shape, "rules": list(RULES), "points": points,
        "notes": (["the magnet's current tolerance stays in each sample's envelope"]
                  if kind == "monte-carlo" else []),
        "nominal": {"values": nominal["values"], "verdict": nominal["verdict"],
                    "binding": nominal["binding"]},
        "counts": counts, "monte_carlo": mc,
    }


def _ids(svg: str) -> set[str]:
    """The element ids "el-…" a figure's SVG carries (without the figure's prefix)."""
    return {m.group(1) for m in re.finditer(r'id="[a-z-]+?-(el-[a-z0-9-]+)"', svg)}


#: what a caption may name → the element id that must then be in the drawing
PROMISES = {
    "tolerance box": "el-tolerance", "grey span: the tolerance": "el-tolerance",
    "nominal point": "el-nominal", "nominal value": "el-nominal",
    "zero-margin contour": "el-margin-zero", "zero margin": "el-margin-zero",
    "hatched: margin below zero": "el-margin-negative",
    "binding rule (least relative margin) changes": "el-boundary-0",
    "diamond, every rule together": "el-probability-overall",
}


def _promises_kept(fig: dict) -> None:
    caption, ids = fig["caption"], _ids(fig["svg"])
    for phrase, element in PROMISES.items():
        if phrase in caption:
            assert element in ids, (phrase, sorted(ids))
    for v, word in fs.VERDICT_WORDS.items():
        named = re.search(rf"\b{word} \(", caption) is not None
        drawn = f"el-region-{v}" in ids or f"el-samples-{v}" in ids
        assert named == drawn, (word, sorted(ids))


# --------------------------------------------------------------------------- the figures


def test_operating_window_draws_what_its_caption_names():
    sweep = make_sweep()
    fig = fs.operating_window_figure(sweep)
    assert fig is not None and fig["svg"].startswith("<svg")
    _promises_kept(fig)
    ids = _ids(fig["svg"])
    assert {f"el-region-{v}" for v in fs.VERDICTS} <= ids  # the fixture has all five
    assert {"el-nominal", "el-tolerance", "el-boundary-0"} <= ids
    # axis labels: key and unit
    assert f"{X_KEY} ({X_UNIT})" in fig["svg"] and f"{Y_KEY} ({Y_UNIT})" in fig["svg"]
    for rid in BINDING_IDS:  # the boundaries are named by rule id (in the legend)
        assert rid in fig["svg"], rid
    assert "sign-off" in fig["caption"]


def test_without_tolerances_no_box_is_promised_or_drawn():
    sweep = make_sweep(tolerance=False)
    for make in (fs.operating_window_figure, fs.margin_contour_figure):
        fig = make(sweep)
        _promises_kept(fig)
        assert "el-tolerance" not in _ids(fig["svg"]) and "tolerance" not in fig["caption"]
        assert "el-nominal" in _ids(fig["svg"])


def test_pass_region_has_the_area_of_the_closed_form_ellipse():
    # PASS or PASS WITH WARNINGS wherever u² + v² < 1 (u > -1.25 there, never refused):
    # an ellipse of half-axes 40 A and 0.04 GHz, area π a b; the cells along its edge can err
    # by at most one cell each, i.e. the perimeter times the cell diagonal
    sweep = make_sweep(n=(61, 61))
    rects = fs.region_rectangles(sweep)
    area = sum(abs((x1 - x0) * (y1 - y0)) for v in ("pass", "warn") for x0, y0, x1, y1 in rects[v])
    a, b = X_SCALE, Y_SCALE
    dx, dy = 3 * a / 60, 3 * b / 60
    perimeter = math.pi * (3 * (a + b) - math.sqrt((3 * a + b) * (a + 3 * b)))  # Ramanujan
    assert abs(area - math.pi * a * b) < 0.5 * perimeter * math.hypot(dx, dy)
    assert abs(area - math.pi * a * b) / (math.pi * a * b) < 0.03


def test_binding_boundaries_lie_on_the_closed_form_curves():
    # each segment separates two cells whose binding rules differ; the two rules' closed-form
    # margins are equal within one cell of the segment (the gradient of their difference is
    # at most |∇(m_a - m_b)| ≤ 2|u| + 2|v| + 1.3 < 7.3 per unit of u or v here)
    sweep = make_sweep(n=(41, 41))
    bounds = fs.binding_boundaries(sweep)
    assert set(itertools.chain(*bounds)) == set(BINDING_IDS)
    step = 3.0 / 40
    for (ra, rb), segs in bounds.items():
        for (x0, y0), (x1, y1) in segs:
            for x, y in ((x0, y0), (x1, y1), (0.5 * (x0 + x1), 0.5 * (y0 + y1))):
                m = closed_form((x - X0) / X_SCALE, (y - Y0) / Y_SCALE)
                assert abs(m[ra] - m[rb]) < 7.3 * step * 1.5, (ra, rb, x, y)


def test_margin_contours_bold_zero_and_hatched_negative_side():
    fig = fs.margin_contour_figure(make_sweep())
    _promises_kept(fig)
    ids = _ids(fig["svg"])
    assert {"el-margin-fill", "el-margin-zero", "el-margin-negative", "el-nominal"} <= ids
    assert "blank: points without a margin" in fig["caption"]  # the invalid and n-e points
    # the least margin of the closed form on this grid, 1 - (1.5² + 1.5²) = -3.5, lies below
    # the shading's floor of -1: the caption names both
    assert "margins below -1 in its lowest shade, down to -3.5" in fig["caption"]
    # all margins positive: no zero contour is drawn, and the caption says so
    sweep = make_sweep()
    for p in sweep["points"]:
        if p["binding_margin"] is not None:
            p["binding_margin"] = abs(p["binding_margin"]) + 0.01
    fig = fs.margin_contour_figure(sweep)
    _promises_kept(fig)
    assert "el-margin-zero" not in _ids(fig["svg"]) and "no zero contour" in fig["caption"]


def test_one_axis_band_and_the_margin_of_every_rule_that_binds():
    sweep = make_sweep(n=(41,))
    assert fs.operating_window_figure(sweep) is None and fs.margin_contour_figure(sweep) is None
    fig = fs.margin_line_figure(sweep)
    _promises_kept(fig)
    ids = _ids(fig["svg"])
    # along v = 0 the closed forms give: collisional 0.2 in the middle, the resonance's
    # 1 - u² below it for |u| > 0.894, the aperture's 0.6 - 0.5 u below both for u > 0.8 up
    # to u = 1.5 (where 1 - u² = -1.25 < -0.15: the resonance again beyond u = 1.0)
    binding = {p["binding"] for p in sweep["points"] if p["binding"]}
    expected = set()
    for u in np.linspace(-1.5, 1.5, 41):
        if u >= -1.25:
            m = closed_form(u, 0.0)
            expected.add(min((v, k) for k, v in m.items() if v is not None)[1])
    assert binding == expected and len(binding) >= 2
    assert {f"el-rule-{k}" for k in range(len(binding))} <= ids
    assert f"el-rule-{len(binding)}" not in ids  # only the rules that bind somewhere
    for rid in binding:
        assert rid in fig["svg"]
    assert {"el-nominal", "el-tolerance", "el-margin-zero", "el-region-invalid"} <= ids
    assert f"{X_KEY} ({X_UNIT})" in fig["svg"]


def test_monte_carlo_figures():
    sweep = make_sweep("monte-carlo", samples=300)
    figs = fs.sweep_figures(sweep)
    assert [f["id"] for f in figs] == ["pass-probability", "samples"]
    prob, samples = figs
    _promises_kept(prob)
    _promises_kept(samples)
    ids = _ids(prob["svg"])
    assert "el-probability-overall" in ids
    # the never-evaluated rule has no probability to draw
    evaluated = [r for r, v in sweep["monte_carlo"]["pass_probability"]["rules"].items() if v["n"]]
    assert len([i for i in ids if re.fullmatch(r"el-probability-\d+", i)]) == len(evaluated)
    assert "rays.first-pass-absorption" not in prob["svg"]
    assert "300 samples" in prob["caption"] and "seed 7" in prob["caption"]
    assert {"el-tolerance", "el-nominal"} <= _ids(samples["svg"])


def test_wilson_interval_of_the_fixture_against_a_known_row():
    # the fixture's interval is Wilson's (1927) score interval at 95 %: 81 of 263 ->
    # (0.2553, 0.3662), the worked example of R. G. Newcombe, Stat. Med. 17, 857 (1998),
    # "method 3" (quoted from memory)
    w = wilson(81, 263)
    assert w["low"] == pytest.approx(0.2553, abs=1e-4)
    assert w["high"] == pytest.approx(0.3662, abs=1e-4)


def test_verdict_fills_differ_in_grey_level_and_hatching():
    def luma(colour):
        r, g, b = (int(colour[i:i + 2], 16) / 255 for i in (1, 3, 5))
        return 0.2126 * r + 0.7152 * g + 0.0722 * b  # ITU-R BT.709

    levels = sorted(luma(s[0]) for s in fs.STYLE.values())
    assert all(b - a >= 0.1 for a, b in zip(levels, levels[1:])), levels
    assert len({s[1] for s in fs.STYLE.values()}) == len(fs.STYLE)
    assert len({s[3] for s in fs.STYLE.values()}) == len(fs.STYLE)  # scatter markers


def test_figures_are_reproducible_and_dollar_signs_stay_text():
    sweep = make_sweep(n=(9, 7))
    sweep["axes"][0]["key"] = "feed[$cost$].power"
    for p in sweep["points"]:
        p["values"] = {sweep["axes"][0]["key"] if k == X_KEY else k: v for k, v in p["values"].items()}
    a, b = fs.operating_window_figure(sweep), fs.operating_window_figure(sweep)
    assert a["svg"] == b["svg"]
    assert "feed[$cost$].power" in a["svg"]


def test_more_than_two_axes_draw_no_figure():
    sweep = make_sweep(n=(3, 3))
    sweep["axes"].append(_axis("plasma.density.max", "m^-3", [1e17, 2e17], 1e17, None))
    sweep["shape"] = [3, 3, 2]
    sweep["points"] = [dict(p, index=p["index"] + [k]) for p in sweep["points"] for k in (0, 1)]
    assert fs.sweep_figures(sweep) == []
    html = render_sweep_html(sweep)
    assert "No figure is drawn for a grid over 3 axes" in html


# --------------------------------------------------------------------------- the report


def _pages(pdf: bytes) -> list[str]:
    import pypdfium2 as pdfium

    doc = pdfium.PdfDocument(pdf)
    return [doc[i].get_textpage().get_text_range() for i in range(len(doc))]


def _flat(text: str) -> str:
    return " ".join(text.split())


_pdfs: dict = {}


def _pdf(kind: str) -> tuple[dict, bytes]:
    if kind not in _pdfs:
        sweep = make_sweep(**{"grid2": {}, "grid1": {"n": (41,)},
                              "mc": {"kind": "monte-carlo"}}[kind])
        _pdfs[kind] = (sweep, render_sweep_pdf(sweep))
    return _pdfs[kind]


@pytest.mark.parametrize("kind", ["grid2", "grid1", "mc"])
def test_pdf_pages_carry_ink_and_the_words_and_ids_unbroken(kind):
    import pypdfium2 as pdfium

    from test_report_review import unbroken_id_problems

    sweep, pdf = _pdf(kind)
    assert pdf.startswith(b"%PDF-")
    doc = pdfium.PdfDocument(pdf)
    for i in range(len(doc)):
        img = doc[i].render(scale=0.5).to_numpy()
        assert img.std() > 3, f"page {i + 1} is blank"
    pages = _pages(pdf)
    text = "\n".join(pages)
    flat = _flat(text)
    for v, word in fs.VERDICT_WORDS.items():
        assert word in flat, word
    ids = {p["binding"] for p in sweep["points"] if p["binding"]}
    assert ids and not unbroken_id_problems(sorted(ids), text)
    cover = _flat(pages[0])
    assert sweep["spec"]["name"] in cover and "Revision C" in cover
    assert sweep["spec"]["sha256"] in flat.replace(" ", "") and "rule set 2026.12" in cover
    assert X_KEY in cover
    for v in fs.VERDICTS:  # the counts on the cover, as the study states them
        assert str(sweep["counts"][v]) in cover
    assert "is not a sign-off" in cover
    assert re.search(r"\bsafe\b", flat, re.I) is None
    assert ("does not replace, review under the local RF-safety, radiation-protection and "
            "electrical codes by licensed or otherwise qualified personnel") in flat
    for title in ("RF exposure and burns", "High voltage", "X-rays from hot electrons"):
        assert title in flat  # the standing cautions (rfcheck/data/cautions.toml)
    if kind == "mc":
        overall = sweep["monte_carlo"]["pass_probability"]["overall"]
        assert f"{overall['p']:.3f}" in cover and f"{overall['low']:.3f}" in cover
        assert "Correlation of each parameter with failure" in flat
        assert "the magnet's current tolerance stays in each sample's envelope" in cover
        xs = [p["values"][X_KEY] for p in sweep["points"]]
        assert f"{min(xs):.4g} to {max(xs):.4g}" in cover  # the sampled range, from the points
        for c in sweep["monte_carlo"]["correlation"]:
            assert f"{c['coefficient']:+.3f}" in flat


def test_pdf_attaches_the_study_and_is_reproducible():
    import json

    import pypdf

    sweep, pdf = _pdf("grid1")
    reader = pypdf.PdfReader(__import__("io").BytesIO(pdf))
    (data,) = reader.attachments[SWEEP_ATTACHMENT]
    assert json.loads(data) == sweep
    assert render_sweep_pdf(copy.deepcopy(sweep)) == pdf


def test_binding_table_counts_the_points_each_rule_binds():
    sweep = make_sweep()
    html = render_sweep_html(sweep)
    table = html[html.index('<table class="findings binding">'):]
    table = table[:table.index("</table>")]
    for rid in BINDING_IDS:
        n = sum(p["binding"] == rid for p in sweep["points"])
        least = min(p["binding_margin"] for p in sweep["points"] if p["binding"] == rid)
        row = re.search(rf'{re.escape(rid)}</span></td><td class="num">(\d+)</td>.*?'
                        r'<td class="num">([-0-9.e+]+)</td><td class="msg">', table, re.S)
        assert row and int(row.group(1)) == n and float(row.group(2)) == pytest.approx(least, rel=1e-2)


HOSTILE = '<img src="http://127.0.0.1:9/x.png"><script>alert(1)</script> {{ 7*7 }} $x$ &amp;'


def test_hostile_spec_text_renders_inert(monkeypatch):
    import socket

    from rfcheck.report import render

    tried = []
    monkeypatch.setattr(socket.socket, "connect", lambda self, a, *k: tried.append(a))
    made = []
    real = render._fetcher
    monkeypatch.setattr(render, "_fetcher", lambda: made.append(real()) or made[-1])
    sweep = make_sweep(n=(7, 5), name=HOSTILE)
    sweep["spec"]["revision"] = "<b>C</b>"
    sweep["spec"]["file"] = '<link rel="stylesheet" href="file:///etc/passwd">'
    hostile_key = "feed[<script>x</script>].power"  # a key as typed after --vary
    sweep["axes"][0]["key"] = hostile_key
    for p in sweep["points"]:
        p["values"] = {hostile_key if k == X_KEY else k: v for k, v in p["values"].items()}
    html = render_sweep_html(sweep)
    assert "<script>" not in html and '<img src="http' not in html and "<b>C</b>" not in html
    assert "&lt;script&gt;" in html and "49" not in html.split("<body", 1)[1].split("<svg", 1)[0]
    text = _flat("\n".join(_pages(render_sweep_pdf(sweep))))
    # shown as the characters written (a line may break inside the address)
    assert HOSTILE.replace(" ", "") in text.replace(" ", "") and "<b>C</b>" in text
    assert hostile_key in text
    assert "root:" not in text
    fetcher, = made
    assert fetcher.refused == [] and tried == []
    assert all(u.endswith(".ttf") for u in fetcher.served)


@pytest.mark.parametrize("change, key", [
    (lambda s: s.update(schema="rfcheck-run/1"), "schema"),
    (lambda s: s.pop("axes"), "axes"),
    (lambda s: s.update(kind="line"), "kind"),
    (lambda s: s["points"][3].update(verdict="ok"), "points[3].verdict"),
    (lambda s: s["points"][0].update(index=[99, 0]), "points[0].index"),
    (lambda s: s.update(shape=[31]), "shape"),
    (lambda s: s.update(shape=7), "shape"),
    (lambda s: s["points"].pop(), "points"),
    (lambda s: s["axes"][1]["values"].__setitem__(2, float("nan")), "axes[1].values"),
    (lambda s: s.update(kind="monte-carlo", monte_carlo={"samples": 3}), "monte_carlo.seed"),
    (lambda s: s.update(kind="monte-carlo", monte_carlo={
        "samples": 3, "seed": 1, "distribution": "uniform",
        "pass_probability": {"overall": {"p": 0.5}}}), "monte_carlo.pass_probability.overall"),
    (lambda s: s.update(counts=[1, 2]), "counts"),
])
def test_a_malformed_study_is_refused_naming_the_key(change, key):
    sweep = make_sweep(n=(31, 25))
    change(sweep)
    with pytest.raises(InputError) as err:
        check_sweep(sweep)
    assert any(p.path == key and "expected" in p.message for p in err.value.problems), str(err.value)


def test_on_screen_page_fetches_nothing():
    # the same template for a browser: no file: fonts, no address anywhere
    html = render_sweep_html(make_sweep(n=(9, 7)), medium="screen")
    assert "file:" not in html and "http" not in html.replace('xmlns="http://www.w3.org/2000/svg"', "") \
        .replace('xmlns:xlink="http://www.w3.org/1999/xlink"', "")
    assert "Operating window" in html and "does not replace" in html
    with pytest.raises(ValueError, match="medium"):
        render_sweep_html(make_sweep(n=(3, 3)), medium="print")


def test_undefined_correlations_are_shown_as_such():
    # rfcheck sweep writes a null coefficient where no sample failed (Pearson's r has a zero
    # variance in its denominator then)
    sweep = make_sweep("monte-carlo", samples=50)
    for c in sweep["monte_carlo"]["correlation"]:
        c["coefficient"] = None
    html = render_sweep_html(sweep)
    table = html[html.index('<table class="findings correlation">'):]
    assert table[:table.index("</table>")].count('<td class="num">undefined</td>') == 2
    fig = fs.sample_figure(sweep)
    assert "no correlation with failure is defined" in fig["caption"]
    assert "most correlated" not in fig["caption"]


def test_a_study_written_by_rfcheck_sweep_is_read_and_drawn():
    # the dict of the real command (a 3 x 2 grid and 4 samples of the bench reactor), read
    # as it comes: every figure of its kind and the whole page, nothing refused
    from conftest import DEMO
    from rfcheck import sweep as S
    from rfcheck.rules.policy import load_policy
    from rfcheck.spec import load_spec

    loaded, policy = load_spec(DEMO), load_policy(None)
    grid = S.evaluate(S.grid_study(loaded, policy, ["magnet.coils[upstream].current=60 A:72 A:3",
                                                    "feed[main].frequency=2.44 GHz:2.46 GHz:2"]))
    mc = S.evaluate(S.monte_carlo_study(loaded, policy, 4, seed=1))
    for study, ids in ((grid, ["operating-window", "margin-contours"]),
                       (mc, ["pass-probability", "samples"])):
        data = study.to_json()
        check_sweep(data)
        assert [f["id"] for f in fs.sweep_figures(data)] == ids
        html = render_sweep_html(data)
        assert data["spec"]["sha256"] in html and "is not a sign-off" in _flat(html)
