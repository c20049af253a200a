"""inductive.matching-range, inductive.coil-voltage and inductive.h-mode on the ICP example's
model with varied matching networks and ratings. The numbers the rules report are checked
against closed forms computed here: the L section for an inductive load (Pozar, Microwave
Engineering 4th ed., §5.1: X' = √(R (Z0 − R)), C_load = X'/(ω R Z0), C_tune = 1/(ω(X − X')))
and |V| = √(2P/R)|Z| (circuit theory); and the spec boundary refuses malformed networks with
the key and the line."""

from __future__ import annotations

import dataclasses
import math
from pathlib import Path

import numpy as np
import pytest

from rfcheck.analysis.envelope import Envelope
from rfcheck.findings import Status
from rfcheck.model import MatchingElement, MatchingNetwork
from rfcheck.rules.context import Context
from rfcheck.rules.registry import get_rule

ROOT = Path(__file__).resolve().parents[2]
ICP = ROOT / "examples" / "icp-etch-source.toml"
PF = 1e-12


@pytest.fixture(scope="module")
def icp_model():
    from rfcheck.spec import load_spec

    return load_spec(ICP).model


def _with(model, **coil):
    feed = model.feeds[0]
    return dataclasses.replace(model, feeds=(dataclasses.replace(
        feed, coil=dataclasses.replace(feed.coil, **coil)),))


def _run(model, rule_id, policy, **overrides):
    rule = get_rule(rule_id)
    ctx = Context(model, Envelope.of(model)).for_rule(rule.id, rule.severity)
    return list(rule.func(ctx, **(policy.option_values(rule) | overrides)))


def _load_range(model):
    from rfcheck.analysis.inductive import coil_impedance

    ctx = Context(model, Envelope.of(model))
    return coil_impedance(ctx, model.feeds[0])[0].impedance


def test_l_network_worst_point_by_hand(icp_model, policy):
    # shunt load capacitor at the generator, series tune capacitor at the coil: reaches the
    # loads with R < 50 Ω only (X'² = R(Z0 − R) > 0); the ICP's load runs up to 63.5 Ω
    z = _load_range(icp_model)
    net = MatchingNetwork("L", 50.0, (MatchingElement("capacitor", "shunt", 10 * PF, 3000 * PF),
                                      MatchingElement("capacitor", "series", 5 * PF, 1000 * PF)))
    (f,) = _run(_with(icp_model, matching=net), "inductive.matching-range", policy)
    assert f.status is Status.FAIL and f.measured.value is None
    assert "cannot match" in f.message
    reached = int(np.count_nonzero(z.real < 50.0))
    assert f.details["points_reached"] == reached < z.size


def test_l_network_margin_on_low_resistance_loads(icp_model, policy):
    # the low-pressure end (0.5 Pa, R below 50 Ω): every margin by the closed form
    gas = icp_model.plasma.neutral
    model = dataclasses.replace(icp_model, plasma=dataclasses.replace(
        icp_model.plasma, neutral=dataclasses.replace(
            gas, pressure=dataclasses.replace(gas.pressure, max=gas.pressure.min))))
    z = _load_range(model)
    assert float(z.real.max()) < 50.0
    omega = 2 * math.pi * 13.56e6  # the frequency spread (±7 kHz) moves C by < 0.1 %
    lo1, hi1, lo2, hi2 = 10 * PF, 3000 * PF, 5 * PF, 1000 * PF
    net = MatchingNetwork("L", 50.0, (MatchingElement("capacitor", "shunt", lo1, hi1),
                                      MatchingElement("capacitor", "series", lo2, hi2)))
    (f,) = _run(_with(model, matching=net), "inductive.matching-range", policy)
    r, x = z.real, z.imag
    xp = np.sqrt(r * (50.0 - r))
    c1 = xp / (omega * r * 50.0)
    c2 = 1.0 / (omega * (x - xp))
    m = np.minimum.reduce([(c1 - lo1) / (hi1 - lo1), (hi1 - c1) / (hi1 - lo1),
                           (c2 - lo2) / (hi2 - lo2), (hi2 - c2) / (hi2 - lo2)])
    assert f.measured.value == pytest.approx(float(m.min()), rel=2e-3)
    assert f.status is (Status.PASS if m.min() >= 0.05 else Status.FAIL)


def test_pi_network_of_the_example_reaches_every_point(icp_model, policy):
    (f,) = _run(icp_model, "inductive.matching-range", policy)
    assert f.status is Status.PASS
    assert f.details["points_reached"] == f.details["points"]
    # narrowing the binding element's range below its needed value fails the rule
    net = icp_model.feeds[0].coil.matching
    i = f.details["binding_element"] - 1
    el = net.elements[i]
    tight = dataclasses.replace(el, high=el.low * 1.05)
    net2 = dataclasses.replace(net, elements=net.elements[:i] + (tight,) + net.elements[i + 1:])
    (g,) = _run(_with(icp_model, matching=net2), "inductive.matching-range", policy)
    assert g.status is Status.FAIL and g.measured.value < f.measured.value


def test_coil_voltage_against_the_rating(icp_model, policy):
    z = _load_range(icp_model)
    v = np.sqrt(2 * 2e3 / z.real) * np.abs(z)  # |V| = √(2P/R)|Z| at 2 kW
    (f,) = _run(icp_model, "inductive.coil-voltage", policy)
    assert f.measured.value == pytest.approx(float(v.max()), rel=1e-12)
    assert f.limit.value == pytest.approx(0.8 * 10e3)
    assert f.status is Status.PASS and "local electrical codes" in f.message
    (g,) = _run(_with(icp_model, max_voltage=6e3), "inductive.coil-voltage", policy)
    assert g.status is Status.FAIL  # 5.74 kV > 80 % of 6 kV
    (h,) = _run(_with(icp_model, max_voltage=None), "inductive.coil-voltage", policy)
    assert h.status is Status.NOT_APPLICABLE and "local electrical codes" in h.message


def test_h_mode_ratio(icp_model, policy):
    (f,) = _run(icp_model, "inductive.h-mode", policy)
    n_eh = f.details["eh_transition_density"]
    assert f.measured.value == pytest.approx(1e17 / n_eh, rel=1e-12)
    low = dataclasses.replace(icp_model, plasma=dataclasses.replace(
        icp_model.plasma, density=dataclasses.replace(icp_model.plasma.density, min=1e16)))
    (g,) = _run(low, "inductive.h-mode", policy)
    assert g.status is Status.WARN  # 1e16 lies below the transition (warning severity)


@pytest.mark.parametrize("rule_id", ["inductive.matching-range", "inductive.coil-voltage",
                                     "inductive.h-mode", "helicon.antenna-coupling",
                                     "helicon.lower-hybrid"])
def test_no_findings_for_a_microwave_source(base_model, policy, rule_id):
    assert _run(base_model, rule_id, policy) == []


ELEMENTS = '''
[feed.coil.matching]
topology = "{topology}"
elements = [
  {{ kind = "capacitor", connection = "shunt", capacitance_pf = [50, 1500] }},
  {{ kind = "{kind}", connection = "series", {key} = [0.2, 3.0] }},
]
'''


@pytest.mark.parametrize("topology, kind, key, expected", [
    ("pi", "inductor", "inductance_uh", "a pi network has elements connected shunt, series, shunt"),
    ("L", "inductor", "capacitance_pf", "expected the inductor's range [low, high] as inductance_uh"),
    ("L", "capacitor", "capacitance_pf", None),
])
def test_spec_refuses_malformed_networks(write_spec, topology, kind, key, expected):
    from rfcheck.spec import InputError, load_spec

    text = ICP.read_text("utf-8")
    start = text.index("[feed.coil.matching]")
    end = text.index("[exposure]")
    text = text[:start] + ELEMENTS.format(topology=topology, kind=kind, key=key) + "\n" + text[end:]
    path = write_spec(text)
    if expected is None:
        assert load_spec(path).model.feeds[0].coil.matching.topology == "L"
        return
    with pytest.raises(InputError) as exc:
        load_spec(path)
    msg = str(exc.value)
    assert expected in msg and "feed[coil].coil.matching" in msg
    line = text[:text.index("[feed.coil.matching]")].count("\n") + 1
    assert any(f":{n}:" in msg for n in range(line, line + 6))


def test_spec_refuses_an_antenna_on_an_inductive_feed(write_spec):
    from rfcheck.spec import InputError, load_spec

    text = ICP.read_text("utf-8").replace(
        'absorption = "inductive"\n',
        'absorption = "inductive"\nantenna = { type = "saddle", length = "150 mm", radius = "120 mm" }\n')
    with pytest.raises(InputError) as exc:
        load_spec(write_spec(text))
    assert "an antenna is declared only for a helicon feed" in str(exc.value)
