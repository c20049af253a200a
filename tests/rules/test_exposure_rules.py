"""exposure.leak-level, exposure.aperture-attenuation and exposure.static-field-line.

Numbers are checked against closed forms written out here: the small-leak law
S = D P 10^(−A/10)/(4π d²) with D = 3 (short dipole with its image, Balanis, Antenna Theory,
3rd ed., ch. 4), the TE10 tube attenuation 8.686 (π/w) √(1 − (f/f_c)²) t dB (Pozar §3.3) less
10 log10 n for n cells (common practice), the inverse-square law, the ICNIRP 2020 levels of
reference-values.md §6.1 (whole body, from memory: 50 W/m² above 2 GHz) and the summation
Σ S_i/S_RL(f_i) over simultaneous frequencies.
"""

from __future__ import annotations

import dataclasses
import math

import pytest

from rfcheck.findings import Status
from rfcheck.levels import shipped_table
from rfcheck.model import (ControlledArea, Exposure, Leak, LeakPath, SurveyReading, UniformField)
from rfcheck.physics.constants import C
from rfcheck.physics.exposure import reference_level
from rfcheck.rules.context import Context
from rfcheck.analysis.envelope import Envelope
from rfcheck.rules.registry import get_rule

ICNIRP = shipped_table("icnirp-2020-occupational")
DB = 20 * math.log10(math.e)


def _run(model, rule_id, policy):
    ctx = Context(model, Envelope.of(model))
    rule = get_rule(rule_id)
    return list(rule.func(ctx.for_rule(rule.id, rule.severity), **policy.option_values(rule)))


def _with(base, *, paths=None, readings=None, power=None, d=0.5, area=None, feeds=None,
          table=ICNIRP):
    leak = Leak("derived", paths=tuple(paths)) if paths is not None else Leak("survey", tuple(readings))
    fs = feeds or tuple(dataclasses.replace(f, power=power) if power else f for f in base.feeds)
    return dataclasses.replace(base, feeds=fs, exposure=Exposure(table, leak, d, area))


SEAM = LeakPath("flanges", "seam", 0.11, attenuation_db=50.0)
# a pumping-port panel of 300 square 6 mm cells, 10 mm deep
VENT = LeakPath("vent", "aperture", 0.15, shape="rectangular", width=0.006, height=0.006,
                depth=0.010, count=300)


def _vent_attenuation(f, depth=0.010):
    fc = C / (2 * 0.006)
    return DB * (math.pi / 0.006) * math.sqrt(1 - (f / fc) ** 2) * depth - 10 * math.log10(300)


def _expected_ratio(power, d=0.5, seam_db=50.0, f=2.475e9):
    s = 3 * power * (10 ** (-seam_db / 10) + 10 ** (-_vent_attenuation(f) / 10)) / (4 * math.pi * d**2)
    return s / 50.0


def test_derived_leak_moves_with_the_power(base_model, policy):
    # the bench reactor: 2.45 GHz ± 25 MHz; the vent leaks most at the top frequency 2.475 GHz
    lo = _run(_with(base_model, paths=[SEAM, VENT], power=1.5e3), "exposure.leak-level", policy)[0]
    hi = _run(_with(base_model, paths=[SEAM, VENT], power=15e3), "exposure.leak-level", policy)[0]
    assert lo.measured.value == pytest.approx(_expected_ratio(1.5e3), rel=1e-9)
    assert hi.measured.value == pytest.approx(10 * lo.measured.value, rel=1e-12)
    assert lo.status is Status.PASS and hi.status is Status.FAIL
    assert "derived" in lo.message and "ICNIRP (2020)" in lo.message and "edition 2020" in lo.message


def test_derived_leak_moves_with_the_shielding(base_model, policy):
    weak = dataclasses.replace(SEAM, attenuation_db=40.0)
    a = _run(_with(base_model, paths=[SEAM]), "exposure.leak-level", policy)[0]
    b = _run(_with(base_model, paths=[weak]), "exposure.leak-level", policy)[0]
    assert b.measured.value == pytest.approx(10 * a.measured.value, rel=1e-12)
    # 1.5 kW through 50 dB, D = 3, at 0.5 m, against 50 W/m²
    assert a.measured.value == pytest.approx(3 * 1.5e3 * 1e-5 / (4 * math.pi * 0.25) / 50, rel=1e-12)


def test_distance_to_level_is_stated_only_in_the_far_field(base_model, policy):
    # a strong leak: the estimate falls to the level at d_occ √R, beyond the far field
    leaky = dataclasses.replace(SEAM, attenuation_db=10.0, size=0.05)
    f = _run(_with(base_model, paths=[leaky], d=1.0), "exposure.leak-level", policy)[0]
    ratio = 3 * 1.5e3 * 0.1 / (4 * math.pi) / 50
    assert f.measured.value == pytest.approx(ratio, rel=1e-12)
    assert f.worst_case["distance_to_level"].value == pytest.approx(math.sqrt(ratio), rel=1e-12)
    # a weak one falls to the level inside the near field: no distance is stated
    g = _run(_with(base_model, paths=[SEAM]), "exposure.leak-level", policy)[0]
    assert "distance_to_level" not in g.worst_case and "near field" in g.message


def test_occupied_distance_in_the_near_field_is_a_warning_naming_the_reason(base_model, policy):
    long_seam = dataclasses.replace(SEAM, size=0.5)  # 2D²/λ = 4.1 m at 2.45 GHz
    f = _run(_with(base_model, paths=[long_seam]), "exposure.leak-level", policy)[0]
    assert f.status is Status.WARN
    assert "does not hold" in f.message and "near field of path flanges" in f.message
    assert "Survey" in f.message


def test_two_feeds_add_their_exposure_ratios(base_model, policy):
    main = base_model.feeds[0]
    rf = dataclasses.replace(main, id="rf", frequency=13.56e6, frequency_tolerance=0.0,
                             power=600.0, line="free-space")
    model = _with(base_model, paths=[SEAM], feeds=(main, rf), d=0.5)
    f = _run(model, "exposure.leak-level", policy)[0]
    s = lambda p: 3 * p * 1e-5 / (4 * math.pi * 0.25)  # noqa: E731
    lv_rf = reference_level(ICNIRP, 13.56e6).power_density  # E-equivalent, 106.4²/η0
    expected = s(1.5e3) / 50.0 + s(600.0) / lv_rf
    assert f.measured.value == pytest.approx(expected, rel=1e-9)
    assert f.details["feeds"]["rf"]["ratio"] == pytest.approx(s(600.0) / lv_rf, rel=1e-9)
    # at 13.56 MHz λ = 22 m: 0.5 m is deep in the near field, so the estimate is a warning
    assert f.status is Status.WARN and "does not hold" in f.message


def test_survey_reading_scales_with_forward_power_and_goes_outward_only(base_model, policy):
    reading = SurveyReading(10.0, 0.05, forward_power=1.5e3)
    a = _run(_with(base_model, readings=[reading], power=15e3), "exposure.leak-level", policy)[0]
    # 10 W/m² at 5 cm at 1.5 kW → ×10 power, ×(0.05/0.5)² distance, against 50 W/m²
    assert a.measured.value == pytest.approx(10.0 * 10 * 0.01 / 50, rel=1e-12)
    unscaled = dataclasses.replace(reading, forward_power=None)
    b = _run(_with(base_model, readings=[unscaled], power=15e3), "exposure.leak-level", policy)[0]
    assert b.measured.value == pytest.approx(10.0 * 0.01 / 50, rel=1e-12)
    assert "forward power is not declared" in b.message
    inward = _run(_with(base_model, readings=[reading], d=0.02), "exposure.leak-level", policy)[0]
    assert inward.status is Status.WARN and "carried outward only" in inward.message


def test_feed_outside_the_table_fails(base_model, policy):
    fcc = shipped_table("fcc-general")  # covers up to 100 GHz (47 CFR 1.1310, from memory)
    feed = dataclasses.replace(base_model.feeds[0], frequency=140e9, frequency_tolerance=0.0)
    f = _run(_with(base_model, paths=[SEAM], feeds=(feed,), table=fcc), "exposure.leak-level",
             policy)[0]
    assert f.status is Status.FAIL and "outside the frequency range" in f.message


def test_aperture_attenuation_against_the_need(base_model, policy):
    (f,) = _run(_with(base_model, paths=[SEAM, VENT]), "exposure.aperture-attenuation", policy)
    assert f.subject == "aperture vent, feed main"
    assert f.measured.value == pytest.approx(_vent_attenuation(2.475e9), rel=1e-9)
    need = 10 * math.log10(3 * 1.5e3 / (4 * math.pi * 0.25 * 50))
    assert f.limit.value == pytest.approx(need, rel=1e-9)
    assert f.status is Status.PASS
    # 15 kW needs 10 dB more: the same vent falls short
    (g,) = _run(_with(base_model, paths=[VENT], power=15e3), "exposure.aperture-attenuation", policy)
    assert g.limit.value == pytest.approx(need + 10, rel=1e-9)
    assert g.status is Status.FAIL


def test_aperture_that_propagates_fails(base_model, policy):
    wide = dataclasses.replace(VENT, width=0.1, height=0.05, count=1, size=0.12)  # f_c 1.5 GHz
    (f,) = _run(_with(base_model, paths=[wide]), "exposure.aperture-attenuation", policy)
    assert f.status is Status.FAIL and "propagate" in f.message
    assert f.limit.value == pytest.approx(C / 0.2)


def test_static_field_lines_against_the_controlled_area(base_model, policy):
    roomy = ControlledArea(-3.0, 3.0, 3.0)
    tight = ControlledArea(-0.5, 0.8, 0.5)
    ok = _run(_with(base_model, paths=[SEAM], area=roomy), "exposure.static-field-line", policy)
    assert [f.status for f in ok] == [Status.PASS, Status.PASS]
    implant, projectile = ok
    assert implant.details["level"] == pytest.approx(0.5e-3)
    assert projectile.details["level"] == pytest.approx(3e-3)
    # the projectile line (higher |B|) lies inside the implant line in every direction
    assert projectile.details["radius"] < implant.details["radius"]
    assert implant.details["z_low"] < projectile.details["z_low"] < projectile.details["z_high"] \
        < implant.details["z_high"]
    bad = _run(_with(base_model, paths=[SEAM], area=tight), "exposure.static-field-line", policy)
    assert bad[0].status is Status.FAIL and "outside the boundary" in bad[0].message
    none = _run(dataclasses.replace(base_model, exposure=None), "exposure.static-field-line", policy)
    assert none[0].status is Status.FAIL and "worst case" in none[0].message


def test_uniform_field_has_no_static_line(base_model, policy):
    magnet = dataclasses.replace(base_model.magnet, sources=(UniformField("u", 0.09),))
    (f,) = _run(dataclasses.replace(base_model, magnet=magnet), "exposure.static-field-line", policy)
    assert f.status is Status.NOT_APPLICABLE
