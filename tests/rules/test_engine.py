"""The rule engine itself: worst point of the envelope, signed margins, a rule that raises."""

import dataclasses

import numpy as np
import pytest

from conftest import DEMO
from rfcheck.analysis.envelope import Envelope
from rfcheck.findings import Quantity, Severity, Status, compare
from rfcheck.rules import registry
from rfcheck.rules.policy import load_policy
from rfcheck.run import run
from rfcheck.spec import load_spec


def test_envelope_spans_tolerances_and_finds_the_worst_point():
    model = load_spec(DEMO).model
    env = Envelope.of(model)
    feed = model.feeds[0]
    grid = env.grid(feed)
    # ends of every axis are the declared limits (density min/max, 1 ± tol, f ± tol)
    assert env.density[0] == pytest.approx(model.plasma.density.min)
    assert env.density[-1] == pytest.approx(model.plasma.density.max)
    assert env.current_scale[[0, -1]] == pytest.approx([0.98, 1.02])
    f = grid.frequency.ravel()
    assert f[[0, -1]] == pytest.approx([2.425e9, 2.475e9])
    # n/f² is largest at the highest density and the lowest frequency
    value, where = grid.worst(grid.density / grid.frequency**2, "max")
    assert value == pytest.approx(5e16 / 2.425e9**2)
    assert where["density"].value == pytest.approx(5e16)
    assert where["frequency"].value == pytest.approx(2.425e9)
    assert "current_scale" not in where  # the value does not depend on it


def test_nan_counts_as_worst():
    model = load_spec(DEMO).model
    grid = Envelope.of(model).grid(model.feeds[0])
    values = np.ones(grid.shape)
    values[3, 1, 2] = np.nan
    value, where = grid.worst(values, "min")
    assert np.isnan(value)


@pytest.mark.parametrize("measured, limit, sense, status, margin", [
    (0.7, 1.0, "max", Status.PASS, 0.3),
    (1.2, 1.0, "max", Status.FAIL, -0.2),
    (3.0, 2.0, "min", Status.PASS, 1.0),
    (1.5, 2.0, "min", Status.FAIL, -0.5),
])
def test_compare_margin_is_signed(measured, limit, sense, status, margin):
    f = compare(rule="x.y", severity=Severity.ERROR, subject="feed a", requirement="r",
                measured=measured, limit=limit, unit="1", sense=sense)
    assert f.status is status
    assert f.margin.value == pytest.approx(margin)


def test_warning_severity_turns_violation_into_warn():
    f = compare(rule="x.y", severity=Severity.WARNING, subject="s", requirement="r",
                measured=2.0, limit=1.0, unit="1", sense="max")
    assert f.status is Status.WARN


def test_non_finite_quantities_become_null_with_reason():
    assert Quantity(float("nan"), "1").to_json() == {"value": None, "unit": "1",
                                                    "reason": "not finite"}
    assert Quantity(float("inf"), "m").to_json()["value"] is None


def test_a_rule_that_raises_becomes_an_error_finding(monkeypatch):
    rule = registry.get_rule("cutoff.o-mode")

    def broken(ctx, **options):
        raise ZeroDivisionError("boom")
        yield  # pragma: no cover

    monkeypatch.setitem(registry.REGISTRY, rule.id, dataclasses.replace(rule, func=broken))
    result = run(load_spec(DEMO), load_policy(None))
    errors = [f for f in result.findings if f.status is Status.ERROR]
    assert len(errors) == 1 and "ZeroDivisionError: boom" in errors[0].message
    assert result.verdict == "fail"  # a rule that could not be evaluated blocks sign-off
    assert len({f.rule for f in result.findings}) > 1  # the run went on


def test_every_rule_is_documented_and_every_option_has_a_sourced_default():
    policy = load_policy(None)
    for rule in registry.all_rules():
        for heading in ("What it checks", "Why it matters"):
            assert heading in rule.doc, (rule.id, heading)
        assert "References" in rule.doc, rule.id
        for name in rule.options:
            assert policy.options[rule.id][name].source.strip(), (rule.id, name)


def test_worst_breaks_rounding_ties_at_the_first_grid_point():
    """A value that is the same at every current scale up to rounding (a multipole's own
    field) names the first scale, whichever scale's last bit happens to be largest; a real
    difference above the tie tolerance still wins. (Property of the envelope search, no
    outside reference needed beyond IEEE rounding: 1e-15 relative is below any digit shown.)"""
    from rfcheck.analysis.envelope import TIE_RTOL, Grid

    g = Grid(np.array([1e17, 1e18]).reshape(2, 1, 1), np.array([0.99, 1.0, 1.01]).reshape(1, 3, 1),
             np.array([2.45e9]).reshape(1, 1, 1))
    noisy = np.array([1.0, 1.0 + 2e-16, 1.0 + 4e-16]).reshape(1, 3, 1)
    value, where = g.worst(noisy, "max")
    assert where["current_scale"].value == 0.99 and value == 1.0
    value, where = g.worst(2.0 - noisy, "min")
    assert where["current_scale"].value == 0.99
    real = np.array([1.0, 1.0, 1.0 + 100 * TIE_RTOL]).reshape(1, 3, 1)
    assert g.worst(real, "max")[1]["current_scale"].value == 1.01
    with_nan = np.array([1.0, np.nan, 2.0]).reshape(1, 3, 1)
    assert g.worst(with_nan, "max")[1]["current_scale"].value == 1.0  # undefined is worst
