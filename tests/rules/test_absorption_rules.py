"""absorption.single-pass and absorption.collisional-regime against worked values.

References used beside the checks:
* single-pass optical depths, reference-values.md §8.1 (tenuous-plasma forms computed from
  Bornatici et al., Nucl. Fusion 23 (1983) 1153): worked cases
  O1 170 GHz, n = 1e19, T_e = 100 eV, L_B = 6.2 m → absorbed 0.170 (τ = 0.1868);
  O2 140 GHz, n = 5e19, T_e = 3 keV, L_B = 5.5 m → τ = 0.7187, absorbed 0.513;
  X2 2.45 GHz, n = 1e16, T_e = 10 eV, L_B = 0.1 m (small ECR device) → τ = 8.48e-5;
  practical form τ_O1 = 1.8554e-22 n T_e L_B / B_res · √(1 − X);
* Budden (The Propagation of Radio Waves, 1985, ch. 19): from the resonance side the cold
  resonance absorbs A = 1 − e^(−πη) (R = 0), πη = π k0 X L_B for the R wave in a linear
  field at uniform X;
* electron–ion collision frequency 3.32e5 s^-1 at 1e17 m^-3, 5 eV (NRL Plasma Formulary 2019,
  ν_e = 2.91e-6 n[cm^-3] lnΛ T_e^-3/2; reference-values §8.2);
* electron–neutral ν_en = n_g K_m(T_e), n_g = p/(k_B T), K_m = ⟨σ_m v⟩ the Maxwellian rate
  coefficient (Lieberman & Lichtenberg 2005, ch. 3) of the argon momentum-transfer table in
  rfcheck/data/gases.toml (Phelps set), checked in tests/physics/test_collisions.py.
"""

from __future__ import annotations

import dataclasses
import math

import pytest
from launch_models import (F0, context, demo_model, evaluate, k0, linear_field, model, one)

from rfcheck.findings import Status
from rfcheck.model import Launch, NeutralGas, Span
from rfcheck.physics.collisions import momentum_transfer_rate_coefficient
from rfcheck.physics.constants import K_B, TWO_PI
from rfcheck.physics.frequencies import ecr_field


def nc(f: float) -> float:
    return 1.240443e-2 * f**2  # NRL Plasma Formulary (2019) p. 28, m^-3


def resonance_model(f, harmonic, mode, n, t_e, l_b, *, length=None, t_max=None):
    """Linear field with the resonance of `harmonic` at mid-chamber and scale length l_b,
    flat density n; launched from the low-field end, perpendicular for O/X."""
    length = length or min(2.0, 2 * l_b)
    b_res = float(ecr_field(f, harmonic=harmonic))
    angle = math.pi / 2 if mode in ("O", "X") else 0.0
    return model(linear_field(b_res, length / 2, l_b, length), length=length, density=(n, n),
                 mode=mode, angle=angle, t_e=(t_e, t_max or t_e), f=f,
                 absorption="ecr" if harmonic == 1 else "ecr-harmonic-2")


@pytest.mark.parametrize("f, h, mode, n, t_e, l_b, tau, status", [
    # the table's τ column reads 0.190 (without √(1 − X)); its absorbed fraction 0.170 and
    # the practical form give τ = 0.1868 (see tests/physics/test_absorption.py)
    pytest.param(170e9, 1, "O", 1e19, 100.0, 6.2, 0.1868, Status.WARN,
                 id="O1 170 GHz edge-like; reference-values §8.1"),
    pytest.param(140e9, 2, "O", 5e19, 3e3, 5.5, 0.7187, Status.PASS,
                 id="O2 140 GHz; reference-values §8.1"),
    pytest.param(2.45e9, 2, "X", 1e16, 10.0, 0.1, 8.48e-5, Status.WARN,
                 id="X2 2.45 GHz small device; reference-values §8.1"),
])
def test_single_pass_worked_cases(f, h, mode, n, t_e, l_b, tau, status):
    fnd = one(context(resonance_model(f, h, mode, n, t_e, l_b)), "absorption.single-pass")
    assert fnd.measured.value == pytest.approx(-math.expm1(-tau), rel=2e-3)
    assert fnd.status is status
    assert f"τ = {tau:.3g}" in fnd.message
    if status is Status.WARN:  # the message states the reliance on multi-pass absorption
        assert "multi-pass" in fnd.message and "normal in a small device" in fnd.message


def test_single_pass_o1_practical_form_and_lowest_temperature():
    # τ_O1 = 1.8554e-22 n T_e L_B / B_res √(1 − X) (reference-values §8.1), evaluated at the
    # lowest T_e of the span (τ ∝ T_e)
    n, l_b = 3e16, 0.1
    m = resonance_model(F0, 1, "O", n, 4.0, l_b, t_max=20.0)
    fnd = one(context(m), "absorption.single-pass")
    x = n / nc(F0)
    tau = 1.8554e-22 * n * 4.0 * l_b / float(ecr_field(F0)) * math.sqrt(1 - x)
    assert fnd.measured.value == pytest.approx(-math.expm1(-tau), rel=1e-4)
    assert fnd.worst_case["electron_temperature"].value == 4.0
    assert fnd.status is Status.WARN


def test_single_pass_r_wave_fundamental_is_budden_absorption():
    # R wave from the high-field side of a linear field, uniform X: A = 1 − e^(−π k0 X L_B)
    # (Budden 1985 ch. 19); the launcher step reflects |r_s|² ≈ (X/4)² only
    x, l_b = 0.1, 0.1
    b_res = float(ecr_field(F0))
    m = model(linear_field(b_res, 0.1, l_b, 0.2), length=0.2, density=(x * nc(F0),) * 2,
              launch_z=0.2, direction=-1)
    fnd = one(context(m), "absorption.single-pass")
    expected = 1 - math.exp(-math.pi * k0(F0) * x * l_b)
    assert fnd.measured.value == pytest.approx(expected, abs=2 * (x / 4))
    assert fnd.status is Status.PASS and "full-wave" in fnd.message


def test_demo_single_pass_and_an_l_wave():
    base = demo_model()
    ctx = context(base)
    f = one(ctx, "absorption.single-pass")
    assert f.status is Status.PASS and f.measured.value > 0.9  # magnetic beach absorbs
    feed = dataclasses.replace(base.feeds[0], launch=Launch(0.0, 1, "L", 0.0, "as-mode"))
    f_l = one(context(dataclasses.replace(base, feeds=(feed,))), "absorption.single-pass")
    # the L wave has no electron-cyclotron resonance (Stix 1992 ch. 1: L = 1 − X/(1 + Y)):
    # only its collisional damping, ν/ω ~ 5e-3 over ~0.3 m, absorbs
    assert f_l.status is Status.WARN and f_l.measured.value < 2e-2
    assert "no electron-cyclotron resonance" in f_l.message
    # a linear launch along B is half R, half L at any field (Stix 1992 ch. 1: the R and L
    # waves are the circular eigenpolarisations along B; a linear wave is their equal sum)
    lin = dataclasses.replace(base.feeds[0], launch=Launch(0.0, 1, "R", 0.0, "linear"))
    f_lin = one(context(dataclasses.replace(base, feeds=(lin,))), "absorption.single-pass")
    assert f_lin.measured.value == pytest.approx(0.5 * f.measured.value
                                                 + 0.5 * f_l.measured.value, rel=1e-9)
    assert [p["fraction"] for p in f_lin.details["parts"]] == pytest.approx([0.5, 0.5])


def test_collisional_regime_electron_ion_only():
    # no neutral gas: ν = ν_ei = 3.32e5 s^-1 at 1e17 m^-3, 5 eV (NRL; reference-values §8.2)
    m = resonance_model(F0, 1, "R", 1e17, 5.0, 0.1)
    fnd = one(context(m), "absorption.collisional-regime")
    assert fnd.measured.value == pytest.approx(3.32e5 / (TWO_PI * F0), rel=5e-3)
    assert fnd.status is Status.PASS and "electron–ion collisions only" in fnd.message


@pytest.mark.parametrize("pressure, status", [
    pytest.param(1.0, Status.PASS, id="Ar 1 Pa: nu/omega ~ 1e-3"),
    pytest.param(200.0, Status.WARN, id="Ar 200 Pa: nu/omega > 0.1"),
])
def test_collisional_regime_with_neutral_argon(pressure, status):
    t_e = 3.0
    m = resonance_model(F0, 1, "R", 1e16, t_e, 0.1)
    m = dataclasses.replace(m, plasma=dataclasses.replace(
        m.plasma, neutral=NeutralGas("Ar", Span(pressure, pressure), 300.0)))
    fnd = one(context(m), "absorption.collisional-regime")
    n_g = pressure / (K_B * 300.0)  # ideal gas (Lieberman & Lichtenberg ch. 3)
    # ν_en = n_g ⟨σ_m v⟩ over a Maxwellian (was n_g σ_m(T_e) v̄, 1.9x lower at 3 eV in argon)
    nu_en = n_g * float(momentum_transfer_rate_coefficient("Ar", t_e))
    nu_ei = 2.91e-6 * 1e10 * (23 - math.log(1e10**0.5 * t_e**-1.5)) * t_e**-1.5  # NRL
    assert fnd.measured.value == pytest.approx((nu_en + nu_ei) / (TWO_PI * F0), rel=2e-3)
    assert fnd.status is status


@pytest.mark.parametrize("absorption", ["inductive", "icr", "lh"])
def test_absorption_rules_not_applicable(absorption):
    m = resonance_model(F0, 1, "R", 1e16, 5.0, 0.1)
    feed = dataclasses.replace(m.feeds[0], absorption=absorption)
    ctx = context(dataclasses.replace(m, feeds=(feed,)))
    for rule_id in ("absorption.single-pass", "absorption.collisional-regime"):
        (f,) = evaluate(ctx, rule_id)
        assert f.status is Status.NOT_APPLICABLE
