"""The power budget in the report: energy conservation and agreement with the findings.

Energy conservation (Poynting's theorem for the passive, time-harmonic system of windows and
plasma: the forward power is reflected, absorbed or transmitted, nothing else) is checked for
every feed and state of every bundled example, to 1e-9 relative. The independent part is the
plasma's single-pass solution, whose reflected |r|², transmitted |t|² and absorbed
k0 ∫ Im n² |E|² dz / flux the full-wave core computes separately: they must add up to one
within the core's stated balance caution (1e-3). The window shares must be the squares of the
worst |Γ| window.reflection reports and the absorbed fraction window.absorbed-power reports
(P_abs / P_avg); the ignition share the |Γ_cold|² of load.ignition-reflection (Pozar,
Microwave Engineering, 4th ed., §2.3: reflected power |Γ|² of the incident).
"""

from __future__ import annotations

import math

import pytest

from conftest import DEMO, EXAMPLES
from rfcheck.report.budget import IGNITION, RUNNING, budget_rows, power_budgets
from rfcheck.rules.policy import load_policy
from rfcheck.run import run
from rfcheck.spec import load_spec

CASES = {
    "bench": (DEMO, None),
    "min-b-waived": (EXAMPLES / "min-b-ion-source.toml", EXAMPLES / "min-b-site-policy.toml"),
    "icp": (EXAMPLES / "icp-etch-source.toml", None),
    "starter": (EXAMPLES / "starter.toml", None),
}
_runs: dict = {}


def _run(name):
    if name not in _runs:
        spec, pol = CASES[name]
        _runs[name] = run(load_spec(spec), load_policy(pol))
    return _runs[name]


def _finding(result, rule, subject):
    return next(f for f in result.findings if f.rule == rule and f.subject == subject)


@pytest.mark.parametrize("name", list(CASES))
def test_every_feed_has_both_states(name):
    result = _run(name)
    budgets = power_budgets(result)
    assert [(b.feed, b.state) for b in budgets] == [
        (f.id, s) for f in result.model.feeds for s in (RUNNING, IGNITION)]


@pytest.mark.parametrize("name", list(CASES))
def test_forward_is_reflected_plus_absorbed_plus_transmitted(name):
    for b in power_budgets(_run(name)):
        if b.missing:
            assert not b.rows
            continue
        ends = b.ends
        total = b.forward * (ends["reflected"] + ends["absorbed"] + ends["transmitted"])
        assert math.isclose(total, b.forward, rel_tol=1e-9), (b.feed, b.state, ends)
        assert all(0.0 <= r.fraction <= 1.0 for r in b.rows), (b.feed, b.state)
        # every row is accounted once: ends plus the pass-through rows only
        assert {r.kind for r in b.rows} <= {"reflected", "absorbed", "transmitted", "through"}


@pytest.mark.parametrize("name", ["bench", "min-b-waived", "starter"])
def test_plasma_single_pass_conserves_energy(name):
    """|r|² + |t|² + absorbed = 1 for each part's first pass, computed apart by the core."""
    result = _run(name)
    for feed in result.model.feeds:
        f = _finding(result, "load.plasma-reflection", f"feed {feed.id}, {RUNNING}")
        for p in f.details["parts"]:
            fp = p["first_pass"]
            assert abs(fp["reflected"] + fp["transmitted"] + fp["absorbed"] - 1) < 1e-3, p
            assert math.isclose(p["returned"] + p["absorbed"] + p["escaped"], 1.0,
                                rel_tol=1e-9), p


@pytest.mark.parametrize("name", ["bench", "min-b-waived", "starter"])
def test_running_shares_match_the_findings(name):
    result = _run(name)
    for b in power_budgets(result):
        if b.state != RUNNING:
            continue
        feed = result.model.feed(b.feed)
        windows = [w for w in result.model.windows if w.feed == feed.id]
        passing = 1.0
        rows = iter(b.rows)
        for w in windows:
            g = _finding(result, "window.reflection", f"window {w.id}").measured.value
            refl, absd = next(rows), next(rows)
            assert math.isclose(refl.fraction, passing * g**2, rel_tol=1e-9)
            ab = next((f for f in result.findings if f.rule == "window.absorbed-power"
                       and f.subject == f"window {w.id}" and f.measured is not None
                       and f.measured.value is not None), None)
            if ab is not None:  # only windows that declare a rating have the finding
                assert math.isclose(absd.fraction, passing * ab.measured.value
                                    / feed.average_power, rel_tol=1e-9)
            passing *= 1 - g**2 - absd.fraction / passing
        launched = next(rows)
        assert launched.kind == "through" and math.isclose(launched.fraction, passing,
                                                           rel_tol=1e-9)
        plasma = _finding(result, "load.plasma-reflection", f"feed {feed.id}, {RUNNING}")
        returned = sum(r.fraction for r in b.rows if r.what == "returned towards the launcher")
        assert math.isclose(returned, passing * plasma.measured.value, rel_tol=1e-9)


@pytest.mark.parametrize("name", list(CASES))
def test_ignition_share_is_gamma_cold_squared(name):
    result = _run(name)
    for b in power_budgets(result):
        if b.state != IGNITION:
            continue
        f = _finding(result, "load.ignition-reflection", f"feed {b.feed}, {IGNITION}")
        if f.status.value == "not-applicable":
            continue
        # P_r of the finding is P |Γ_cold|²
        assert math.isclose(b.forward * b.ends["reflected"], f.measured.value, rel_tol=1e-9)


def test_near_field_feed_has_no_running_budget_and_says_why():
    result = _run("icp")
    running = [b for b in power_budgets(result) if b.state == RUNNING]
    assert running and all(b.missing and not b.rows for b in running)
    assert "antenna" in running[0].missing


def test_table_text_in_one_unit_and_in_the_report():
    """Shares in percent only (no bare fractions beside percentages); the table is in the
    page the template renders."""
    from rfcheck.report.render import render_html

    result = _run("min-b-waived")
    rows = budget_rows(result)
    for b in rows:
        for r in b["rows"] + b["totals"]:
            assert r["share"].endswith(" %"), r
            assert r["peak"].endswith("W") and r["average"].endswith("W"), r
    html = render_html(result, medium="screen")
    assert "Power budget" in html and html.count('<table class="budget">') == sum(
        1 for b in rows if not b["missing"])


def _segments(svg: str) -> list[tuple[str, int, int, float]]:
    """(kind, bar, row, width) of every drawn budget segment, from the SVG: each bar patch is
    a group with its id holding a path of four corners (x0 y0 L x1 ...)."""
    import re

    out = []
    for m in re.finditer(r'<g id="budget-el-(\w+)-(\d+)-(\d+)">\s*<path d="M ([\d.]+) [\d.]+ \s*L '
                         r'([\d.]+) ', svg):
        out.append((m.group(1), int(m.group(2)), int(m.group(3)),
                    float(m.group(5)) - float(m.group(4))))
    return out


@pytest.mark.parametrize("name", sorted(CASES))
def test_budget_figure_draws_every_share_and_its_caption_names_only_what_is_drawn(name):
    from rfcheck.report.figure_budget import KINDS, budget_figure

    result = _run(name)
    fig = budget_figure(result)
    bars = [b for b in power_budgets(result) if b.rows]
    assert (fig is None) == (not bars)
    if fig is None:
        return
    segs = _segments(fig["svg"])
    # one segment per end row with a positive share, in every bar
    for i, b in enumerate(bars):
        ends = [r for r in b.rows if r.kind in KINDS and r.fraction > 0]
        mine = [s for s in segs if s[1] == i]
        assert len(mine) == len(ends), (b.feed, b.state)
        # widths in the SVG are proportional to the shares: the bar is the whole forward
        # power (energy conservation, as above), each segment its row's share of it
        total = sum(s[3] for s in mine)
        for s, r in zip(mine, ends):
            assert s[0] == r.kind
            assert s[3] / total == pytest.approx(r.fraction / sum(e.fraction for e in ends),
                                                 rel=1e-3, abs=1e-4)
    drawn = {s[0] for s in segs}
    for kind, (label, _, _) in KINDS.items():
        assert (label in fig["caption"]) == (kind in drawn), kind
    assert ("running" in fig["caption"]) == any(b.state == RUNNING for b in bars)
    assert ("ignition" in fig["caption"]) == any(b.state == IGNITION for b in bars)


def test_budget_figure_of_a_fully_reflecting_cold_cavity_is_one_reflected_bar():
    # the starter example leaves the cold cavity undeclared: the worst case |Γ_cold| = 1
    # reflects the whole forward power at ignition (Pozar, §2.3: |Γ|² of the incident)
    from rfcheck.report.figure_budget import budget_figure

    result = _run("starter")
    bars = [b for b in power_budgets(result) if b.rows]
    fig = budget_figure(result)
    ign = [i for i, b in enumerate(bars) if b.state == IGNITION]
    assert ign
    for i in ign:
        mine = [s for s in _segments(fig["svg"]) if s[1] == i]
        assert [s[0] for s in mine] == ["reflected"]
