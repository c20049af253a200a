"""Policy files: thresholds with sources, selection by id prefix, waivers; errors with lines."""

import pytest

from rfcheck.rules.policy import load_policy
from rfcheck.spec import InputError


def test_default_policy_has_a_source_for_every_option():
    policy = load_policy(None)
    assert policy.options, "default policy defines no options"
    for rule_id, options in policy.options.items():
        for name, value in options.items():
            assert value.source.strip(), f"{rule_id}.{name} has no source"


def test_user_policy_overrides_selects_and_waives(tmp_path):
    p = tmp_path / "site.toml"
    p.write_text(
        'name = "site policy"\n'
        '[select]\ninclude = ["cutoff.", "line."]\n'
        '[options."cutoff.o-mode".warn_fraction]\nvalue = "70 %"\nsource = "site rule SR-4"\n'
        '[[waiver]]\nrule = "line.waveguide-band"\nsubject = "feed main"\n'
        'reason = "bench test only"\nreference = "ECN-17"\n', encoding="utf-8")
    policy = load_policy(p)
    assert policy.options["cutoff.o-mode"]["warn_fraction"].value == pytest.approx(0.70)
    assert policy.options["cutoff.o-mode"]["warn_fraction"].source == "site rule SR-4"
    # the untouched default survives the overlay
    assert policy.options["cutoff.o-mode"]["max_fraction"].value == pytest.approx(1.0)
    assert policy.selected("cutoff.o-mode") and policy.selected("line.waveguide-band")
    assert not policy.selected("resonance.ecr-in-chamber")
    assert policy.waiver_for("line.waveguide-band", "feed main")[0] is not None
    assert policy.waiver_for("line.waveguide-band", "feed other") == (None, None)
    assert policy.sha256 != load_policy(None).sha256


@pytest.mark.parametrize("body, path, line, fragment", [
    pytest.param('[options."cutoff.o-mode".max_fraction]\nvalue = "80 Ghz"\nsource = "x"\n',
                 "options.cutoff.o-mode.max_fraction.value", 2, "unit", id="bad-unit"),
    pytest.param('[options."cutoff.nope".max_fraction]\nvalue = "80 %"\nsource = "x"\n',
                 "options.cutoff.nope", 1, "unknown rule", id="unknown-rule"),
    pytest.param('[options."cutoff.o-mode".max_fraction]\nvalue = "80 %"\n',
                 "options.cutoff.o-mode.max_fraction", 1, "source", id="no-source"),
    pytest.param('\n[[waiver]]\nrule = "cutoff.o-mode"\nreason = ""\nreference = "R1"\n',
                 "waiver[0].reason", 4, "non-empty", id="empty-waiver-reason"),
    pytest.param('colour = 3\n', "colour", 1, "unknown key", id="unknown-key"),
])
def test_bad_policy_names_key_and_line(tmp_path, body, path, line, fragment):
    p = tmp_path / "bad.toml"
    p.write_text(body, encoding="utf-8")
    with pytest.raises(InputError) as info:
        load_policy(p)
    probs = info.value.problems
    hit = [x for x in probs if x.path.startswith(path)]
    assert hit, [str(x) for x in probs]
    assert fragment in hit[0].message
    assert hit[0].line == line


def test_waiver_applies_through_its_expiry_date_only(tmp_path):
    import datetime as dt

    p = tmp_path / "site.toml"
    p.write_text('[[waiver]]\nrule = "cutoff.o-mode"\nreason = "overdense by design"\n'
                 'reference = "DN-12"\nexpires = 2027-06-30\n', encoding="utf-8")
    policy = load_policy(p)
    live, _ = policy.waiver_for("cutoff.o-mode", "feed main", today=dt.date(2027, 6, 30))
    assert live is not None and live.reference == "DN-12"
    gone, expired = policy.waiver_for("cutoff.o-mode", "feed main", today=dt.date(2027, 7, 1))
    assert gone is None and expired.reference == "DN-12"


def test_waived_finding_stays_visible(tmp_path):
    from conftest import DEMO
    from rfcheck.findings import Status
    from rfcheck.run import run
    from rfcheck.spec import load_spec

    p = tmp_path / "site.toml"
    p.write_text('[options."window.reflection".max_gamma]\nvalue = "0.05"\nsource = "test"\n'
                 '[[waiver]]\nrule = "window.reflection"\nsubject = "window vacuum-window"\n'
                 'reason = "tuned on site"\nreference = "ECN-9"\n', encoding="utf-8")
    result = run(load_spec(DEMO), load_policy(p))
    (f,) = [x for x in result.findings if x.rule == "window.reflection"]
    assert f.status is Status.WAIVED and f.waiver["reference"] == "ECN-9"
    assert f.measured.value > 0.05  # the measured value is kept beside the waiver
