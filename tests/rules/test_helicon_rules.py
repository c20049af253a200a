"""helicon.antenna-coupling and helicon.lower-hybrid on the helicon example's model with a
varied antenna, field and density. Reference numbers from the bounded-whistler formula
k k_z = e μ0 n ω / B with k² = (3.8317/a)² + k_z² (Lieberman & Lichtenberg, Principles of
Plasma Discharges, 2nd ed., ch. 13), the Trivelpiece–Gould merge field B = 2 m_e ω k/(e k_z)
(Chen & Arnush, Phys. Plasmas 4 (1997) 3411) and the dense-limit lower-hybrid frequency
√(f_ci f_ce) (Stix, Waves in Plasmas, ch. 2)."""

from __future__ import annotations

import dataclasses
import math
from pathlib import Path

import numpy as np
import pytest

from rfcheck.analysis.envelope import Envelope
from rfcheck.findings import Status
from rfcheck.physics.constants import E_CHARGE, M_E, MU0
from rfcheck.rules.context import Context
from rfcheck.rules.registry import get_rule

ROOT = Path(__file__).resolve().parents[2]
F = 13.56e6
W = 2 * math.pi * F


@pytest.fixture(scope="module")
def model():
    from rfcheck.spec import load_spec

    return load_spec(ROOT / "examples" / "helicon-source.toml").model


def _run(model, rule_id, policy, **overrides):
    rule = get_rule(rule_id)
    ctx = Context(model, Envelope.of(model)).for_rule(rule.id, rule.severity)
    return list(rule.func(ctx, **(policy.option_values(rule) | overrides)))


def _antenna(model, **kw):
    feed = model.feeds[0]
    return dataclasses.replace(model, feeds=(dataclasses.replace(
        feed, antenna=dataclasses.replace(feed.antenna, **kw)),))


def _density(model, lo, hi):
    return dataclasses.replace(model, plasma=dataclasses.replace(
        model.plasma, density=dataclasses.replace(model.plasma.density, min=lo, max=hi)))


def test_density_field_relation_in_the_message(model, policy):
    (f,) = _run(model, "helicon.antenna-coupling", policy)
    a, k0 = 0.05, math.pi / 0.15
    k = math.hypot(3.8317059702 / a, k0)
    b_lo, b_hi = f.details["field_range_t"]
    for b, n in zip((b_lo, b_hi), f.details["density_at_k0"]):
        whistler = k * k0 * b / (E_CHARGE * MU0 * W)  # the textbook form, electron mass out
        inertia = M_E * k**2 / (MU0 * E_CHARGE**2)
        assert n == pytest.approx(whistler - inertia, rel=1e-9)
        assert inertia / whistler < 0.07  # the correction is a few per cent at 33-38 mT
    assert f.details["branch_merge_field_t"] == pytest.approx(2 * M_E * W * k / (E_CHARGE * k0),
                                                              rel=1e-12)
    assert "Trivelpiece–Gould" in f.message


def test_worst_point_offset_by_hand(model, policy):
    (f,) = _run(model, "helicon.antenna-coupling", policy)
    n = f.worst_case["density"].value
    b = f.worst_case["field"].value
    fw = f.worst_case["frequency"].value
    kz = f.details["kz_per_m"]
    # the needed k_z satisfies n = k k_z B/(e μ0 ω) − m_e k²/(μ0 e²) at the worst point
    k = math.hypot(3.8317059702 / 0.05, kz)
    w = 2 * math.pi * fw
    assert k * kz * b / (E_CHARGE * MU0 * w) - M_E * k**2 / (MU0 * E_CHARGE**2) == \
        pytest.approx(n, rel=1e-9)
    assert f.measured.value == pytest.approx(abs(kz / (math.pi / 0.15) - 1), rel=1e-12)


def test_density_outside_the_antenna_band_fails(model, policy):
    # at 33-38 mT the band k_z 10.5-31.4 m^-1 needs about 1.6e18-4.7e18 m^-3: 1e19 is beyond
    (f,) = _run(_density(model, 8e18, 1e19), "helicon.antenna-coupling", policy)
    assert f.status is Status.FAIL and f.details["kz_per_m"] > 1.5 * math.pi / 0.15
    # a longer antenna (smaller k_0) moves the band down to lower densities
    (g,) = _run(_density(_antenna(model, length=0.6), 2e18, 4e18), "helicon.antenna-coupling",
                policy)
    assert g.status is Status.FAIL and g.details["kz_per_m"] > 1.5 * math.pi / 0.6


def test_trivelpiece_gould_branch_is_named_and_fails(model, policy):
    # scale the field down by 20 (about 1.7-1.9 mT, below B_TG ≈ 3.7 mT): the modes the
    # plasma supports there sit on the Trivelpiece–Gould branch
    coils = tuple(dataclasses.replace(c, current=c.current / 20) for c in model.magnet.sources)
    weak = dataclasses.replace(model, magnet=dataclasses.replace(model.magnet, sources=coils))
    (f,) = _run(_density(weak, 1e17, 2e17), "helicon.antenna-coupling", policy)
    assert f.status is Status.FAIL
    assert f.details["branch"] == "trivelpiece-gould" and "not a helicon" in f.message


def test_lower_hybrid_dense_limit(model, policy):
    (f,) = _run(model, "helicon.lower-hybrid", policy)
    b = f.worst_case["field"].value
    f_ce = E_CHARGE * b / M_E / (2 * math.pi)
    f_ci = E_CHARGE * b / (39.948 * 1.66053906660e-27 - M_E) / (2 * math.pi)
    lh = f.details["lower_hybrid_frequency"]
    # dense limit √(f_ci f_ce) (ω_pe² ≫ ω_ce² at 4e18 m^-3 and 38 mT: within 1 %)
    assert lh == pytest.approx(math.sqrt(f_ci * f_ce), rel=1e-2)
    assert f.measured.value == pytest.approx((F - 7e3) / lh, rel=1e-9)
    assert f.status is Status.PASS
    (g,) = _run(model, "helicon.lower-hybrid", policy, min_ratio=4.0)
    assert g.status is Status.WARN  # ratio 3.4 under 4: warning severity


def test_no_antenna_is_not_applicable(model, policy):
    feed = dataclasses.replace(model.feeds[0], antenna=None)
    (f,) = _run(dataclasses.replace(model, feeds=(feed,)), "helicon.antenna-coupling", policy)
    assert f.status is Status.NOT_APPLICABLE and "feed.antenna" in f.message


def test_spec_refuses_an_antenna_inside_the_tube(write_spec):
    from rfcheck.spec import InputError, load_spec

    text = (ROOT / "examples" / "helicon-source.toml").read_text("utf-8")
    bad = text.replace('length = "150 mm", radius = "60 mm"', 'length = "150 mm", radius = "40 mm"')
    assert bad != text
    with pytest.raises(InputError) as exc:
        load_spec(write_spec(bad))
    msg = str(exc.value)
    line = bad[:bad.index('antenna = {')].count("\n") + 1
    assert f":{line}: feed[antenna].antenna.radius" in msg and "exceed the chamber radius" in msg
