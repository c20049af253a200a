"""access.reaches-resonance and access.overdense-route against closed forms.

References used beside the checks:
* magnetic-beach rule: the R wave reaches the ECR from the high-field side at any density
  (whistler), and meets the R cutoff X = 1 − Y first from the low-field side (Stix, Waves in
  Plasmas, 1992, ch. 2; reference-values §2.3);
* Budden tunnelling: in a linear field B = B_ECR (1 − u/L_B) with uniform X the R wave sees
  n² = 1 − X L_B/u, and the cutoff–resonance pair passes T = exp(−π k0 X L_B) exactly
  (Budden, The Propagation of Radio Waves, 1985, ch. 19; standard integral
  ∫ √((β − u)/u) du = πβ/2);
* Mjølhus O–X efficiency T = exp{−π k0 L_n √(Y/2) [2(1 + Y)(N∥ − N∥,opt)²]} with
  N∥,opt = √(Y/(1 + Y)); T = 1 at the optimum (E. Mjølhus, J. Plasma Phys. 31 (1984) 7);
* surface-wave density n_c (1 + ε_d), 4.8 n_c for fused quartz (Moisan & Zakrzewski,
  J. Phys. D 24 (1991) 1025, from memory);
* n_c = 1.240443e-2 f² m^-3 (NRL Plasma Formulary 2019, p. 28).
"""

from __future__ import annotations

import dataclasses
import math

import pytest
from launch_models import (F0, context, demo_model, evaluate, k0, linear_field, model, one,
                           uniform_field)

from rfcheck.findings import Status
from rfcheck.model import DensityProfile, Launch, Span, Window, WindowLayer
from rfcheck.physics.frequencies import ecr_field

N_C = 1.240443e-2 * F0**2  # NRL Formulary form, m^-3
L_B = 0.1  # m


def linear_model(x: float, *, high_field_side: bool, **kw):
    """Chamber 0..0.2 m, ECR at 0.1 m, B rising with z; flat density X = n/n_c."""
    launch = dict(launch_z=0.2, direction=-1) if high_field_side else dict(launch_z=0.0)
    return model(linear_field(float(ecr_field(F0)), 0.1, L_B, 0.2), length=0.2,
                 density=(x * N_C, x * N_C), **launch, **kw)


# ----------------------------------------------------------------------------- demo source

def test_demo_r_wave_from_high_field_side_reaches_ecr_directly():
    # bundled example: R wave launched at z = 0 inside the upstream coil (|B| ≈ 129 mT >
    # B_ECR = 87.5 mT) towards the low field: magnetic beach (Stix 1992 ch. 2)
    ctx = context(demo_model())
    f = one(ctx, "access.reaches-resonance")
    assert f.status is Status.PASS
    assert f.measured.value == 1.0
    assert "directly" in f.message and "at every envelope corner" in f.message
    # the peak density 5e16 m^-3 stays below n_c(2.425 GHz) = 7.29e16 m^-3 (NRL form)
    route = one(ctx, "access.overdense-route")
    assert route.status is Status.NOT_APPLICABLE and "7.295e16" in route.message


def test_demo_reversed_launch_is_blocked_by_the_r_cutoff():
    # the same feed launched from the far, low-field end (|B| ≈ 35 mT, Y ≈ 0.4) meets the R
    # cutoff X = 1 − Y before the ECR (Stix 1992 ch. 2)
    base = demo_model()
    feed = dataclasses.replace(base.feeds[0], launch=Launch(0.3, -1, "R", 0.0, "circular-right"))
    ctx = context(dataclasses.replace(base, feeds=(feed,)))
    f = one(ctx, "access.reaches-resonance")
    assert f.status is Status.FAIL
    assert "R cutoff" in f.message and "blocked" in f.message
    assert f.measured.value < 1e-6  # thick layer at 5e16 m^-3: exp(−2∫κ) ≪ 0.1
    assert f.worst_case["density"].value == pytest.approx(5e16)


def test_demo_overdense_whistler_route():
    # above n_c the R wave from the high-field side still reaches the ECR: the whistler
    # route (Stix 1992 ch. 2); tunnelling factor 1
    base = demo_model()
    plasma = dataclasses.replace(base.plasma, density=Span(5e16, 2e17))
    ctx = context(dataclasses.replace(base, plasma=plasma))
    f = one(ctx, "access.overdense-route")
    assert f.status is Status.PASS and "whistler" in f.message
    assert f.measured.value == 1.0


# ----------------------------------------------------------------------------- closed forms

@pytest.mark.parametrize("x, status", [
    pytest.param(0.02, Status.WARN, id="X=0.02: T=0.724 tunnels (Budden 1985 ch.19)"),
    pytest.param(0.3, Status.FAIL, id="X=0.3: T=7.9e-3 blocked (Budden 1985 ch.19)"),
])
def test_low_field_side_tunnelling_factor_is_budden(x, status):
    f = one(context(linear_model(x, high_field_side=False)), "access.reaches-resonance")
    expected = math.exp(-math.pi * k0(F0) * x * L_B)
    assert f.measured.value == pytest.approx(expected, rel=2e-3)
    assert f.status is status
    assert "R cutoff" in f.message
    # R cutoff X = 1 − Y at u = X L_B before the ECR at z = 0.1 m
    assert f"z = {(0.1 - x * L_B) * 1e3:.4g} mm" in f.message


def test_high_field_side_reaches_directly():
    f = one(context(linear_model(0.3, high_field_side=True)), "access.reaches-resonance")
    assert f.status is Status.PASS and f.measured.value == 1.0
    assert "z = 100 mm" in f.message  # the ECR of the linear field


def ox_model(angle: float, *, peak: float = 2.0, windows: tuple = ()):
    """Uniform field Y = 0.5; density ramp from the launcher wall over 50 mm to peak·n_c: the
    O cutoff at 25 mm/peak·2 with L_n = n_c/|dn/dz| = 50 mm / peak."""
    y = 0.5
    prof = DensityProfile(kind="ramp", edge_length=0.05)
    return model(uniform_field(y * float(ecr_field(F0))), length=0.3,
                 density=(peak * N_C, peak * N_C), mode="O", angle=angle, profile=prof,
                 windows=windows), y, 0.05 / peak


def mjolhus(y: float, l_n: float, n_par: float) -> float:
    n_opt = math.sqrt(y / (1 + y))
    return math.exp(-math.pi * k0(F0) * l_n * math.sqrt(y / 2) * 2 * (1 + y) * (n_par - n_opt) ** 2)


def test_ox_route_at_the_optimum_angle_is_one():
    # Mjølhus (1984): T = 1 at N∥ = cos θ = √(Y/(1 + Y))
    angle = math.acos(math.sqrt(0.5 / 1.5))
    m, _, _ = ox_model(angle)
    f = one(context(m), "access.overdense-route")
    assert f.status is Status.PASS and "O–X" in f.message
    assert f.measured.value == pytest.approx(1.0, abs=1e-9)


@pytest.mark.parametrize("deg, status", [
    pytest.param(70.0, Status.PASS, id="70 deg: Mjolhus T=0.72"),
    pytest.param(85.0, Status.FAIL, id="85 deg: Mjolhus T=0.23"),
])
def test_ox_route_detuned_matches_mjolhus(deg, status):
    m, y, l_n = ox_model(math.radians(deg))
    f = one(context(m), "access.overdense-route")
    assert f.measured.value == pytest.approx(mjolhus(y, l_n, math.cos(math.radians(deg))),
                                             rel=1e-6)
    assert f.status is status
    # the direct path is cut off: with the route available access.reaches-resonance defers
    # to this rule by name; without it, it fails (one account per part)
    acc = one(context(m), "access.reaches-resonance")
    if status is Status.PASS:
        assert acc.status is Status.NOT_APPLICABLE and "access.overdense-route" in acc.message
    else:
        assert acc.status is Status.FAIL


def test_surface_wave_route_on_a_fused_silica_window():
    # n_sw = n_c (1 + ε_d) = 4.8 n_c for ε_d = 3.8 (Moisan & Zakrzewski 1991, from memory;
    # materials.toml fused-silica): 6 n_c supports the surface wave, 4 n_c does not
    window = (Window("w", "main", 0.0, (WindowLayer("fused-silica", 0.01),)),)
    m, _, _ = ox_model(math.radians(85.0), peak=6.0, windows=window)
    f = one(context(m), "access.overdense-route")
    assert f.status is Status.PASS and "surface wave" in f.message
    assert f.measured.value == pytest.approx(6.0 / 4.8, rel=1e-6)  # N_C to 7 digits
    m4, _, _ = ox_model(math.radians(89.0), peak=4.0, windows=window)
    assert one(context(m4), "access.overdense-route").status is Status.FAIL


@pytest.mark.parametrize("absorption", ["inductive", "helicon", "lh"])
def test_not_applicable_for_near_field_and_lower_hybrid(absorption):
    ctx = context(linear_model(0.1, high_field_side=True, absorption=absorption))
    for rule_id in ("access.reaches-resonance", "access.overdense-route"):
        (f,) = evaluate(ctx, rule_id)
        assert f.status is Status.NOT_APPLICABLE


def test_launcher_pointing_out_of_the_chamber_fails():
    m = linear_model(0.1, high_field_side=False)
    feed = dataclasses.replace(m.feeds[0], launch=Launch(0.0, -1, "R", 0.0))
    f = one(context(dataclasses.replace(m, feeds=(feed,))), "access.reaches-resonance")
    assert f.status is Status.FAIL and "points out of the chamber" in f.message
