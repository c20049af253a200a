"""The parts of a feed's launched power and one consistent account of each over the rules.

References beside the checks:
* a linear launch along B is half R and half L at any field; a circular polariser sends
  one of them (Stix, Waves in Plasmas, 1992, ch. 1);
* the L wave has no electron-cyclotron resonance and is cut off at X = 1 + Y (Stix 1992
  ch. 1–2); the R wave from the high-field side reaches the ECR at any density (ch. 2);
* a metal wall at normal incidence reflects everything; a lossless passive system behind
  it returns all the power (energy conservation);
* reflected power P |Γ|², |Γ| = (VSWR − 1)/(VSWR + 1) (Pozar, Microwave Engineering, 4th
  ed., §2.3).
"""

from __future__ import annotations

import dataclasses
import math

import pytest
from launch_models import (F0, context, demo_model, evaluate, linear_field, model, one,
                           uniform_field)

from rfcheck.analysis.parts import mode_content
from rfcheck.findings import Status
from rfcheck.model import DensityProfile, Launch, ShortRating, Span
from rfcheck.physics.frequencies import ecr_field

N_C = 1.240443e-2 * F0**2  # NRL Plasma Formulary (2019) p. 28, m^-3


def with_launch(base, **launch):
    feed = base.feeds[0]
    return dataclasses.replace(base, feeds=(dataclasses.replace(
        feed, launch=dataclasses.replace(feed.launch, **launch)),))


def by_subject(findings):
    return {f.subject: f for f in findings}


def test_linear_bench_reactor_returns_the_l_half():
    # the bundled reactor with its polariser removed: the TE10-like linear launch is half L,
    # which crosses the plasma without a resonance, meets the metal end wall and comes back
    circ = demo_model()
    lin = with_launch(circ, polarisation="linear")
    content = mode_content(context(lin), lin.feeds[0])
    assert [(p.mode, p.low, p.high) for p in content.parts] == [("R", 0.5, 0.5), ("L", 0.5, 0.5)]
    r_c = one(context(circ), "load.plasma-reflection").measured.value
    f_l = one(context(lin), "load.plasma-reflection")
    (l_part,) = [p for p in f_l.details["parts"] if p["part"] == "L"]
    assert l_part["returned"] > 0.999  # ν/ω ~ 5e-3: the double pass absorbs < 0.1 %
    # the reflected power rises by the L part's share: Σ f_i R_i (parts are orthogonal)
    assert f_l.measured.value == pytest.approx(0.5 * r_c + 0.5 * l_part["returned"], rel=1e-9)
    assert f_l.status is Status.FAIL and "L part (50 %)" in f_l.message
    p_c = one(context(circ), "load.reflected-power").measured.value
    p_l = one(context(lin), "load.reflected-power").measured.value
    assert p_l > 10 * p_c and p_l <= lin.feeds[0].power


def test_far_end_decides_what_the_l_half_does():
    lin = with_launch(demo_model(), polarisation="linear")
    for wall, low, high in (("metal", 0.999, 1.0), ("dump", 0.0, 1e-3), ("open", 0.0, 1e-3)):
        m = dataclasses.replace(lin, chamber=dataclasses.replace(lin.chamber, end_wall=wall))
        f = one(context(m), "load.plasma-reflection")
        (l_part,) = [p for p in f.details["parts"] if p["part"] == "L"]
        assert low <= l_part["returned"] <= high, wall
        assert l_part["far_end"] == wall and l_part["far_end_declared"]
    undeclared = dataclasses.replace(lin, chamber=dataclasses.replace(lin.chamber, end_wall=None))
    f = one(context(undeclared), "load.plasma-reflection")
    assert "not declared: taken as a reflecting metal wall" in f.message


def _claims(findings):
    """{part subject: set of claims} — "cut off" or "reaches" — from the findings on parts."""
    out: dict[str, set] = {}
    for f in findings:
        if ", " not in f.subject or not f.subject.endswith("part"):
            continue
        claim = None
        if f.rule == "cutoff.o-mode" and f.status is Status.FAIL:
            claim = "cut off"
        elif f.rule == "access.reaches-resonance":
            claim = {Status.FAIL: "cut off", Status.PASS: "reaches",
                     Status.WARN: "reaches"}.get(f.status)
        elif f.rule == "access.overdense-route":
            claim = {Status.FAIL: "cut off", Status.PASS: "reaches"}.get(f.status)
        if claim:
            out.setdefault(f.subject, set()).add(claim)
    return out


RULES = ("cutoff.o-mode", "access.reaches-resonance", "access.overdense-route")


@pytest.mark.parametrize("peak", [0.3, 0.8, 1.5, 3.0])
@pytest.mark.parametrize("side", ["high-field", "low-field"])
@pytest.mark.parametrize("polarisation", ["linear", "circular-right", "as-mode"])
def test_no_part_is_both_cut_off_and_reaching_its_resonance(peak, side, polarisation):
    base = demo_model()
    m = dataclasses.replace(base, plasma=dataclasses.replace(
        base.plasma, density=Span(0.5 * peak * N_C, peak * N_C)))
    if side == "low-field":
        m = with_launch(m, z=0.3, direction=-1)
    m = with_launch(m, polarisation=polarisation)
    ctx = context(m)
    findings = [f for rid in RULES for f in evaluate(ctx, rid)]
    for subject, claims in _claims(findings).items():
        assert claims != {"cut off", "reaches"}, (subject, [
            (f.rule, f.status, f.message) for f in findings if f.subject == subject])
    # every part is named in every rule's findings
    parts = {p.mode for p in mode_content(ctx, m.feeds[0]).parts}
    for rid in RULES:
        assert {f.subject.split(", ")[1][0] for f in evaluate(ctx, rid)} == parts


def ox_model(angle_deg: float):
    """O launch at an angle into a ramp to 2 n_c in a uniform field Y = 0.5 (Mjølhus route)."""
    prof = DensityProfile(kind="ramp", edge_length=0.05)
    return model(uniform_field(0.5 * float(ecr_field(F0))), length=0.3,
                 density=(2 * N_C, 2 * N_C), mode="O", angle=math.radians(angle_deg),
                 profile=prof)


@pytest.mark.parametrize("angle, route", [
    pytest.param(70.0, Status.PASS, id="70 deg: O-X route available (Mjolhus T=0.72)"),
    pytest.param(85.0, Status.FAIL, id="85 deg: no route (Mjolhus T=0.23)"),
])
def test_overdense_o_part_is_judged_by_the_route_rule_alone(angle, route):
    ctx = context(ox_model(angle))
    got = {rid: one(ctx, rid) for rid in RULES}
    assert got["access.overdense-route"].status is route
    if route is Status.PASS:  # the cutoff and the blocked direct path defer to it by name
        for rid in ("cutoff.o-mode", "access.reaches-resonance"):
            assert got[rid].status is Status.NOT_APPLICABLE
            assert "access.overdense-route" in got[rid].message
    else:
        assert got["cutoff.o-mode"].status is Status.FAIL
        assert got["access.reaches-resonance"].status is Status.FAIL


def test_undeclared_e_direction_takes_the_worse_split():
    # O launch across B, linear, E direction not declared: the O and X parts each range over
    # 0–100 % (Stix 1992 ch. 1: E ∥ B is all O, E ⊥ B all X); the returned power is the worse
    m = ox_model(90.0)
    m = with_launch(m, polarisation=None)
    ctx = context(m)
    content = mode_content(ctx, m.feeds[0])
    got = {p.mode: (p.low, p.high) for p in content.parts}
    assert set(got) == {"O", "X"}
    for low, high in got.values():
        assert low == pytest.approx(0.0, abs=1e-12) and high == pytest.approx(1.0, abs=1e-12)
    f = one(ctx, "load.plasma-reflection")
    worst = max(p["returned"] for p in f.details["parts"])
    assert f.measured.value == pytest.approx(worst, rel=1e-12)
    declared = with_launch(m, polarisation="linear", e_angle_to_field=0.0)
    assert [p.mode for p in mode_content(context(declared), declared.feeds[0]).parts] == ["O"]
    spec = one(ctx, "spec.assumptions")
    assert spec.status is Status.WARN and "launch.polarisation" in spec.message


# ----------------------------------------------------------------------------- ignition

def ignition(feed_changes):
    base = demo_model()
    feed = dataclasses.replace(base.feeds[0], **feed_changes)
    return one(context(dataclasses.replace(base, feeds=(feed,))), "load.ignition-reflection")


def test_ignition_undeclared_cavity_reflects_everything_continuously():
    f = ignition({"cold_cavity_gamma": None, "ignition_time": None, "short_rating": None})
    assert f.measured.value == pytest.approx(1.5e3)  # P |Γ|² with |Γ| = 1
    assert f.status is Status.FAIL and "not declared" in f.message
    assert f.limit.value == pytest.approx(300.0)


@pytest.mark.parametrize("t_ign, rating, status", [
    pytest.param(3.0, 1.5e3, Status.PASS, id="3 s under a 10 s rating of 1.5 kW"),
    pytest.param(20.0, 300.0, Status.FAIL, id="20 s: beyond the 10 s rating, the continuous one"),
])
def test_ignition_time_selects_the_rating(t_ign, rating, status):
    f = ignition({"cold_cavity_gamma": None, "ignition_time": t_ign,
                  "short_rating": ShortRating(1.5e3, 10.0)})
    assert f.limit.value == pytest.approx(rating)
    assert f.status is status


def test_ignition_with_a_measured_cold_cavity_vswr(write_spec, demo_text):
    from rfcheck.spec import load_spec

    text = demo_text.replace('ignition_time = "3 s"', 'ignition_time = "3 s"\ncold_cavity = { vswr = 3 }')
    m = load_spec(write_spec(text)).model
    g = (3 - 1) / (3 + 1)  # Pozar §2.3
    assert m.feeds[0].cold_cavity_gamma == pytest.approx(g)
    f = one(context(m), "load.ignition-reflection")
    assert f.measured.value == pytest.approx(1.5e3 * g * g)


# ----------------------------------------------------------------------------- spec.* rules

def test_spec_checks_flag_odd_but_legal_inputs():
    base = demo_model()
    feed = dataclasses.replace(base.feeds[0], max_reflected_power=5e3)
    m = dataclasses.replace(base, feeds=(feed,), windows=(),
                            plasma=dataclasses.replace(base.plasma, density=Span(3e16, 3e16)))
    ctx = context(m)
    assert one(ctx, "spec.generator-rating").status is Status.WARN
    assert one(ctx, "spec.feed-window").status is Status.WARN
    dens = by_subject(evaluate(ctx, "spec.density-envelope"))
    assert dens["plasma density"].status is Status.WARN
    ctx0 = context(base)
    assert one(ctx0, "spec.generator-rating").status is Status.PASS
    assert one(ctx0, "spec.feed-window").status is Status.PASS


def test_profile_table_short_of_the_chamber_is_flagged():
    m = model(linear_field(float(ecr_field(F0)), 0.1, 0.1, 0.2), length=0.2,
              density=(1e16, 2e16),
              profile=DensityProfile(kind="table", z=(0.05, 0.2), shape=(1.0, 1.0)))
    dens = by_subject(evaluate(context(m), "spec.density-envelope"))
    assert dens["plasma profile"].status is Status.WARN
    assert "starts at z = 50 mm" in dens["plasma profile"].message


@pytest.mark.parametrize("old, new, key", [
    pytest.param('z = "0 mm"\nlayers', 'z = "100 mm"\nlayers', "window[vacuum-window].z",
                 id="window beyond the launcher in the chamber"),
    pytest.param('angle_to_field = "0 deg"', 'angle_to_field = "120 deg"',
                 "feed[main].launch.angle_to_field", id="angle outside 0-90 deg"),
    pytest.param('polarisation = "circular-right"',
                 'polarisation = "circular-right", e_angle_to_field = "10 deg"',
                 "feed[main].launch.e_angle_to_field", id="E direction of a circular launch"),
    pytest.param('ignition_time = "3 s"', 'ignition_time = "3 s"\ncold_cavity = { gamma = "0.5", vswr = 3 }',
                 "feed[main].cold_cavity", id="cold cavity both gamma and vswr"),
    pytest.param('pressure = { min = "0.1 Pa", max = "1 Pa" }',
                 'pressure = { min = "2 Pa", max = "1 Pa" }', "plasma.neutral.pressure",
                 id="pressure min above max"),
    pytest.param('ignition_time = "3 s"', 'ignition_time = "3 GHz"', "feed[main].ignition_time",
                 id="ignition time not a duration"),
])
def test_bad_new_keys_name_key_and_line(write_spec, demo_text, old, new, key):
    from rfcheck.spec import InputError, load_spec

    assert old in demo_text
    with pytest.raises(InputError) as err:
        load_spec(write_spec(demo_text.replace(old, new, 1)))
    probs = [p for p in err.value.problems if p.path == key]
    assert probs, [str(p) for p in err.value.problems]
    assert probs[0].line is not None


def test_launch_polarisation_keys_reach_the_model(write_spec, demo_text):
    from rfcheck.spec import load_spec

    m = load_spec(write_spec(demo_text)).model
    la = m.feeds[0].launch
    assert la.polarisation == "circular-right" and la.e_angle_to_field is None
    assert m.chamber.end_wall == "metal" and m.plasma.neutral.pressure == Span(0.1, 1.0)
    assert m.feeds[0].short_rating == ShortRating(1.5e3, 10.0)
    assert m.feeds[0].ignition_time == pytest.approx(3.0)
    assert isinstance(la, Launch)
