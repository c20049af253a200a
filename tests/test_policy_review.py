"""What a policy cannot do: empty the review, waive everything, set options outside their
ranges or carry unbounded text; the NOT EVALUATED verdict and unused waivers."""

from __future__ import annotations

import datetime as dt
import json
import math

import pytest

from conftest import DEMO, EXAMPLES
from rfcheck.findings import Finding, Severity, Status
from rfcheck.rules.policy import MAX_WAIVERS, load_policy
from rfcheck.rules.registry import Option, Range, all_rules, rule
from rfcheck.run import Run, RuleUse, run
from rfcheck.spec import InputError, load_spec

MIN_B = EXAMPLES / "min-b-ion-source.toml"  # fails under the default policy (two load findings)


@pytest.fixture
def policy_file(tmp_path):
    def write(body: str, name: str = "site.toml"):
        p = tmp_path / name
        p.write_text(body, encoding="utf-8")
        return p

    return write


@pytest.fixture(scope="module")
def min_b():
    return load_spec(MIN_B)


@pytest.fixture(scope="module")
def bench():
    return load_spec(DEMO)


def _problem(exc: InputError, path: str):
    hits = [p for p in exc.problems if p.path.startswith(path)]
    assert hits, [str(p) for p in exc.problems]
    return hits[0]


# ---------------------------------------------------------------- the review cannot be emptied


def test_default_run_of_the_failing_example_fails(min_b):
    result = run(min_b, load_policy(None))
    assert result.verdict == "fail" and result.exit_fails
    assert result.verdict_reasons[0] == "2 findings fail"


@pytest.mark.parametrize("select", [
    pytest.param('exclude = ["*"]', id="exclude-everything"),
    pytest.param('include = []', id="include-nothing"),
    pytest.param('include = ["cutoff."]\nexclude = ["cutoff."]', id="include-then-exclude"),
])
def test_a_policy_selecting_no_rule_is_not_evaluated(min_b, policy_file, select):
    result = run(min_b, load_policy(policy_file(f"[select]\n{select}\n")))
    assert result.rules == () and result.findings == ()
    assert result.verdict == "not-evaluated" and result.exit_fails
    assert result.verdict_label == "NOT EVALUATED"
    doc = result.to_json()
    assert doc["verdict"] == "not-evaluated"
    assert any("selects no rule" in r for r in doc["verdict_reasons"])
    assert "selects no rule" in result.verdict_reason


def test_include_absent_keeps_the_default_selection(policy_file):
    policy = load_policy(policy_file('name = "site"\n'))
    assert all(policy.selected(r.id) for r in all_rules())
    assert not any(load_policy(policy_file('[select]\ninclude = []\n')).selected(r.id)
                   for r in all_rules())


def test_all_findings_not_applicable_is_not_evaluated(bench, policy_file):
    # the bench reactor is a mirror, not a minimum-B trap: min-b-ratios does not apply
    result = run(bench, load_policy(policy_file('[select]\ninclude = ["magnet.min-b-ratios"]\n')))
    assert result.findings and all(f.status is Status.NOT_APPLICABLE for f in result.findings)
    assert result.verdict == "not-evaluated"
    assert any("not applicable" in r for r in result.verdict_reasons)


def test_only_warning_level_rules_cannot_pass(bench, policy_file):
    result = run(bench, load_policy(policy_file('[select]\ninclude = ["spec."]\n')))
    assert {r.severity for r in result.rules} == {"warning"}
    assert result.verdict == "not-evaluated"
    assert any("error severity" in r for r in result.verdict_reasons)


def test_waiving_every_finding_of_a_family_is_not_evaluated(min_b, policy_file):
    p = policy_file('[select]\ninclude = ["load.plasma-reflection"]\n'
                    '[[waiver]]\nrule = "load.plasma-reflection"\n'
                    'reason = "measured at commissioning"\nreference = "CP-1"\n')
    result = run(min_b, load_policy(p))
    assert [f.status for f in result.findings if f.status is not Status.NOT_APPLICABLE] == \
        [Status.WAIVED]
    assert result.verdict == "not-evaluated" and result.exit_fails
    assert any("load family is waived" in r for r in result.verdict_reasons)


def test_the_site_policy_of_the_example_still_warns():
    # two waivers with subjects leave the load family's ignition finding evaluated
    result = run(load_spec(MIN_B), load_policy(EXAMPLES / "min-b-site-policy.toml"))
    assert result.verdict == "warn" and not result.exit_fails
    assert result.unused_waivers == ()


def _synthetic(statuses: list[tuple[str, Status, str]], total: int = 3) -> Run:
    """A Run holding only findings (rule, status, severity), for the verdict's logic."""
    rules = {}
    findings = []
    for rid, status, sev in statuses:
        rules[rid] = RuleUse(rid, "", sev, "", "", {})
        findings.append(Finding(rid, f"subject {len(findings)}", status, Severity(sev), "req"))
    return Run("s", "", "s.toml", "0", "", {}, "p", "0", (), tuple(findings), {},
               tuple(rules.values()), rules_total=total)


E, W = "error", "warning"


@pytest.mark.parametrize("statuses, verdict", [
    pytest.param([("a.x", Status.PASS, E)], "pass", id="one-pass"),
    pytest.param([("a.x", Status.PASS, E), ("a.y", Status.WARN, W)], "warn", id="warn"),
    pytest.param([("a.x", Status.FAIL, E), ("a.y", Status.NOT_APPLICABLE, E)], "fail", id="fail"),
    pytest.param([("a.x", Status.ERROR, E)], "fail", id="error-fails"),
    pytest.param([("a.x", Status.NOT_APPLICABLE, E)], "not-evaluated", id="all-na"),
    pytest.param([("a.x", Status.WAIVED, E)], "not-evaluated", id="all-waived"),
    pytest.param([("a.x", Status.WAIVED, E), ("b.x", Status.PASS, E)], "not-evaluated",
                 id="one-family-all-waived"),
    pytest.param([("a.x", Status.WAIVED, E), ("a.y", Status.PASS, E)], "pass",
                 id="family-partly-waived"),
    pytest.param([("a.x", Status.WAIVED, E), ("b.x", Status.FAIL, E)], "fail",
                 id="fail-beats-not-evaluated"),
    pytest.param([("s.x", Status.PASS, W)], "not-evaluated", id="only-warning-rules"),
    pytest.param([], "not-evaluated", id="no-finding"),
])
def test_verdict_logic(statuses, verdict):
    result = _synthetic(statuses)
    assert result.verdict == verdict
    assert result.exit_fails == (verdict in ("fail", "not-evaluated"))
    if verdict in ("not-evaluated",):
        assert result.coverage_problems()
    if verdict == "pass":
        assert result.coverage_problems() == ()


# ---------------------------------------------------------------- waivers


@pytest.mark.parametrize("pattern", ["*", "*.*", "[cl]*"])
def test_a_waiver_spanning_families_is_refused(policy_file, pattern):
    p = policy_file(f'\n[[waiver]]\nrule = "{pattern}"\nreason = "all"\nreference = "R"\n')
    with pytest.raises(InputError) as info:
        load_policy(p)
    prob = _problem(info.value, "waiver[0].rule")
    assert prob.line == 3 and "families" in prob.message


def test_a_family_waiver_is_allowed_and_named(policy_file):
    policy = load_policy(policy_file('[[waiver]]\nrule = "load.*"\nreason = "bench"\n'
                                     'reference = "R"\n'))
    assert policy.waiver_for("load.reflected-power", "feed x")[0] is not None
    assert policy.waiver_for("cutoff.o-mode", "feed x") == (None, None)


def test_unused_waivers_are_reported(min_b, policy_file):
    p = policy_file(
        '[[waiver]]\nrule = "load.plasma-reflection"\nsubject = "feed klystron, running"\n'
        'reason = "in use"\nreference = "W1"\n'
        '[[waiver]]\nrule = "load.plasma-reflection"\nsubject = "feed nowhere"\n'
        'reason = "typo in the subject"\nreference = "W2"\n'
        '[[waiver]]\nrule = "load.ignition-reflection"\nreason = "passes anyway"\n'
        'reference = "W3"\n'
        '[[waiver]]\nrule = "load.reflected-power"\nreason = "long gone"\nreference = "W4"\n'
        'expires = 2001-01-01\n')
    result = run(min_b, load_policy(p))
    unused = {u["waiver"]["reference"]: u for u in result.unused_waivers}
    assert set(unused) == {"W2", "W3", "W4"}
    assert "subject" in unused["W2"]["why"] and unused["W2"]["line"] == 6
    assert "need no waiver" in unused["W3"]["why"]
    assert "expired" in unused["W4"]["why"]
    assert unused["W2"]["file"] == "site.toml"
    doc = json.loads(json.dumps(result.to_json(), allow_nan=False))
    assert {u["waiver"]["reference"] for u in doc["unused_waivers"]} == {"W2", "W3", "W4"}
    assert any("3 waivers" in r for r in result.verdict_reasons)


def test_a_waiver_for_an_unselected_rule_is_unused(bench, policy_file):
    p = policy_file('[select]\ninclude = ["cutoff."]\n'
                    '[[waiver]]\nrule = "window.reflection"\nreason = "x"\nreference = "W9"\n')
    (u,) = run(bench, load_policy(p)).unused_waivers
    assert u["waiver"]["reference"] == "W9" and "not selected" in u["why"]


@pytest.mark.parametrize("expires, now, applies", [
    pytest.param("2027-06-30", dt.datetime(2027, 6, 30, 23, 59), True, id="date-inclusive"),
    pytest.param("2027-06-30", dt.datetime(2027, 7, 1, 0, 0), False, id="date-next-day"),
    pytest.param("2027-06-30T12:00:00Z", dt.datetime(2027, 6, 30, 11, 59, 59,
                                                    tzinfo=dt.timezone.utc), True,
                 id="offset-before-instant"),
    pytest.param("2027-06-30T12:00:00Z", dt.datetime(2027, 6, 30, 12, 0, 0,
                                                    tzinfo=dt.timezone.utc), False,
                 id="offset-at-instant"),
    pytest.param("2027-06-30T12:00:00+02:00", dt.datetime(2027, 6, 30, 10, 30,
                                                         tzinfo=dt.timezone.utc), False,
                 id="offset-other-zone"),
    pytest.param("2027-06-30T12:00:00", dt.datetime(2027, 6, 30, 11, 0), True,
                 id="local-before"),
    pytest.param("2027-06-30T12:00:00", dt.datetime(2027, 6, 30, 12, 0), False,
                 id="local-at"),
])
def test_waiver_expiry_dates_and_date_times(policy_file, expires, now, applies):
    # TOML literals (no quotes): a date, an offset date-time or a local date-time
    policy = load_policy(policy_file('[[waiver]]\nrule = "cutoff.o-mode"\nreason = "r"\n'
                                     f'reference = "R"\nexpires = {expires}\n'))
    (w,) = policy.waivers
    live, expired = policy.waiver_for("cutoff.o-mode", "feed main", now=now)
    assert (live is w) == applies and (expired is w) == (not applies)
    assert w.expires.startswith("2027-06-30")


def test_a_local_time_is_not_an_expiry(policy_file):
    with pytest.raises(InputError) as info:
        load_policy(policy_file('[[waiver]]\nrule = "cutoff.o-mode"\nreason = "r"\n'
                                'reference = "R"\nexpires = 12:00:00\n'))
    prob = _problem(info.value, "waiver[0].expires")
    assert prob.line == 5 and "date-time" in prob.message


# ---------------------------------------------------------------- option ranges


def test_every_option_states_its_range_and_the_defaults_lie_inside():
    policy = load_policy(None)
    for r in all_rules():
        for name, opt in r.options.items():
            assert isinstance(opt.valid, Range) and opt.valid.why.strip(), (r.id, name)
            assert opt.valid.contains(policy.options[r.id][name].value), (r.id, name)
            assert not opt.valid.contains(math.nan) and not opt.valid.contains(math.inf)


def test_an_option_without_a_range_cannot_be_registered():
    with pytest.raises(ValueError, match="valid range"):
        rule("test.no-range", severity=Severity.ERROR, summary="x",
             options={"x": Option("ratio", "x")})


@pytest.mark.parametrize("rid, name, value, range_text", [
    pytest.param("line.breakdown", "safety_factor", "-1", "from 1 to 10", id="negative-factor"),
    pytest.param("load.reflected-power", "max_fraction", "1e12 %", "at most 100 %",
                 id="huge-fraction"),
    pytest.param("window.reflection", "max_gamma", "1", "less than 1", id="gamma-one"),
    pytest.param("cutoff.o-mode", "max_fraction", "0 %", "more than 0 %", id="zero-open"),
    pytest.param("exposure.aperture-attenuation", "min_margin", "-3 dB", "from 0 dB to 100 dB",
                 id="negative-db"),
    pytest.param("exposure.static-field-line", "implant_level", "5 mT", "at most 0.5 mT",
                 id="implant-line-above-action-level"),
    pytest.param("resonance.ecr-clearance", "min_distance", "1e308 km", "from 0 mm",
                 id="overflows-to-inf"),
])
def test_option_out_of_range_names_key_line_and_range(policy_file, rid, name, value, range_text):
    p = policy_file(f'# site\n[options."{rid}".{name}]\nvalue = "{value}"\nsource = "site"\n')
    with pytest.raises(InputError) as info:
        load_policy(p)
    prob = _problem(info.value, f"options.{rid}.{name}.value")
    assert prob.line == 3, str(prob)
    assert range_text in prob.message and "valid range" in prob.message


@pytest.mark.parametrize("value", ["nan", "inf", "-inf %", "1e400"])
def test_non_finite_option_values_are_refused(policy_file, value):
    p = policy_file(f'[options."line.breakdown".safety_factor]\nvalue = "{value}"\n'
                    'source = "site"\n')
    with pytest.raises(InputError) as info:
        load_policy(p)
    assert _problem(info.value, "options.line.breakdown.safety_factor.value").line == 2


def test_crossed_thresholds_are_refused(policy_file):
    p = policy_file('[options."cutoff.o-mode".warn_fraction]\nvalue = "95 %"\nsource = "s"\n'
                    '[options."cutoff.o-mode".max_fraction]\nvalue = "90 %"\nsource = "s"\n')
    with pytest.raises(InputError) as info:
        load_policy(p)
    prob = _problem(info.value, "options.cutoff.o-mode")
    assert prob.line == 1 and "warn_fraction" in prob.message and "≤" in prob.message
    # one side set against the other's default
    p = policy_file('\n[options."magnet.min-b-ratios".bmin_low]\nvalue = "0.9"\nsource = "s"\n')
    with pytest.raises(InputError) as info:
        load_policy(p)
    assert _problem(info.value, "options.magnet.min-b-ratios.bmin_low").line == 2


# ---------------------------------------------------------------- the policy's own structure


def test_a_long_waiver_reason_is_refused(policy_file):
    p = policy_file('[[waiver]]\nrule = "cutoff.o-mode"\nreference = "R"\n'
                    f'reason = "{"x" * 10_000}"\n')
    with pytest.raises(InputError) as info:
        load_policy(p)
    prob = _problem(info.value, "waiver[0].reason")
    assert prob.line == 4 and "10000 characters" in prob.message


@pytest.mark.parametrize("key, value", [
    ("reference", "ECN\\u202e-9"),  # a bidi override
    ("subject", "feed\\u0007main"),  # a bell
    ("approved_by", "A. Reviewer\\u200b"),  # a zero-width space
])
def test_control_characters_in_waiver_text_are_refused(policy_file, key, value):
    body = {"rule": "cutoff.o-mode", "reason": "r", "reference": "R"}
    body[key] = value
    text = "[[waiver]]\n" + "".join(f'{k} = "{v}"\n' for k, v in body.items())
    with pytest.raises(InputError) as info:
        load_policy(policy_file(text))
    prob = _problem(info.value, f"waiver[0].{key}")
    assert prob.line == 1 + list(body).index(key) + 1 and "character" in prob.message


def test_the_number_of_waivers_is_bounded(policy_file):
    one = '[[waiver]]\nrule = "cutoff.o-mode"\nreason = "r"\nreference = "R"\n'
    assert len(load_policy(policy_file(one * MAX_WAIVERS)).waivers) == MAX_WAIVERS
    with pytest.raises(InputError) as info:
        load_policy(policy_file(one * (MAX_WAIVERS + 1)))
    assert f"at most {MAX_WAIVERS}" in _problem(info.value, "waiver").message


def test_selection_lists_are_bounded_and_checked(policy_file):
    with pytest.raises(InputError) as info:
        load_policy(policy_file("[select]\ninclude = [" + '"cutoff.", ' * 101 + "]\n"))
    assert "at most 100" in _problem(info.value, "select.include").message
    with pytest.raises(InputError) as info:
        load_policy(policy_file('[select]\nexclude = ["cutoff.\\u001b[31m"]\n'))
    assert _problem(info.value, "select.exclude").line == 2


def test_nested_tables_where_text_is_expected_are_refused(policy_file):
    p = policy_file('[[waiver]]\nrule = "cutoff.o-mode"\nreference = "R"\n'
                    'reason = { a = { b = { c = [1, [2, [3]]] } } }\n'
                    'name2 = 1\n')
    with pytest.raises(InputError) as info:
        load_policy(p)
    assert _problem(info.value, "waiver[0].reason").line == 4
    assert _problem(info.value, "waiver[0].name2").line == 5
