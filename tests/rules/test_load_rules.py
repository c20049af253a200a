"""load.plasma-reflection and load.reflected-power against closed forms.

References used beside the checks:
* uniform lossy slab between vacuum half-spaces: Airy/Fabry–Perot formula
  r = r12 (1 − e^(2i k0 n d)) / (1 − r12² e^(2i k0 n d)), r12 = (1 − n)/(1 + n)
  (Born & Wolf, Principles of Optics, 7th ed., §1.6.4), with the collisional O-mode index
  n² = P = 1 − X/(1 + iν/ω) − X_i (Stix, Waves in Plasmas, 1992, ch. 1);
* Budden cutoff–resonance pair (Budden, The Propagation of Radio Waves, 1985, ch. 19):
  T = e^(−πη), R = (1 − T)² from the cutoff side, R = 0 from the resonance side, with
  πη = π k0 X L_B for the R wave in a linear field at uniform X;
* linear density ramp beyond cutoff: total reflection, |R| = 1 without collisions (Budden
  1985 ch. 15–16, the Airy-function solution);
* two reflectors in cascade: the input reflection of a lossless reciprocal two-port with
  |S11| = a ending in a load |Γ_L| = b, Γ_in = S11 + S12 S21 Γ_L/(1 − S22 Γ_L) (Pozar,
  Microwave Engineering, 4th ed., §4.3), has its worst magnitude over the line phase
  (a + b)/(1 + ab) ≤ a + b.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from launch_models import (F0, context, demo_model, evaluate, k0, linear_field, model, one,
                           step_reflection, uniform_field)

from rfcheck.analysis.launch_path_data import path_characteristics
from rfcheck.analysis.window import window_analysis
from rfcheck.findings import Status
from rfcheck.model import DensityProfile, NeutralGas, Span
from rfcheck.physics.collisions import (electron_ion_collision_frequency,
                                        electron_neutral_collision_frequency)
from rfcheck.physics.constants import AMU, E_CHARGE, EPS0, M_E, TWO_PI
from rfcheck.physics.frequencies import ecr_field

N_C = 1.240443e-2 * F0**2  # NRL Plasma Formulary (2019) p. 28, m^-3
M_AR = 39.948 * AMU  # IUPAC standard atomic weight of Ar


def fabry_perot_reflectance(n: complex, d: float, f: float) -> float:
    """|r|² of a slab of index n, thickness d, in vacuum (Born & Wolf §1.6.4)."""
    r12 = (1 - n) / (1 + n)
    ph = np.exp(2j * k0(f) * n * d)
    return abs(r12 * (1 - ph) / (1 - r12**2 * ph)) ** 2


@pytest.mark.parametrize("x, d", [
    pytest.param(0.5, 0.1, id="X=0.5 d=100mm; Born&Wolf Airy formula"),
    pytest.param(0.9, 0.037, id="X=0.9 d=37mm; Born&Wolf Airy formula"),
])
def test_uniform_slab_reflection_is_fabry_perot(x, d):
    # O mode across a uniform field, slab of plasma between 100 mm and 100 mm + d (a table
    # profile with linear 0.1 µm edges: an equivalent slab of thickness d + edge to first
    # order), vacuum on both sides; argon at 1 Pa, T_e = 5 eV
    a, b = 0.1, 0.1 + d
    edge = 1e-7
    prof = DensityProfile(kind="table", z=(0.0, a - edge, a, b, b + edge, 0.3),
                          shape=(0.0, 0.0, 1.0, 1.0, 0.0, 0.0))
    gas = NeutralGas("Ar", Span(1.0, 1.0), 300.0)
    m = model(uniform_field(0.05), length=0.3, density=(x * N_C, x * N_C), mode="O",
              angle=math.pi / 2, t_e=(5.0, 5.0), profile=prof, neutral=gas)
    f = one(context(m), "load.plasma-reflection")
    n_e = x * N_C
    nu = (electron_neutral_collision_frequency("Ar", 1.0, 5.0, 300.0)
          + electron_ion_collision_frequency(n_e, 5.0))
    x_true = n_e / (EPS0 * M_E * (TWO_PI * F0) ** 2 / E_CHARGE**2)  # n_c by its definition
    n2 = 1 - x_true / (1 + 1j * nu / (TWO_PI * F0)) - x_true * M_E / (M_AR - M_E)  # P, Ar+
    expected = fabry_perot_reflectance(np.sqrt(n2), d + edge, F0)
    assert f.measured.value == pytest.approx(expected, rel=1e-6)
    assert f.status is (Status.PASS if expected <= 0.1 else Status.FAIL)


X_BUDDEN = 0.02
L_B = 0.1


def budden_model(high_field_side: bool):
    launch = dict(launch_z=0.2, direction=-1) if high_field_side else {}
    return model(linear_field(float(ecr_field(F0)), 0.1, L_B, 0.2), length=0.2,
                 density=(X_BUDDEN * N_C, X_BUDDEN * N_C), **launch)


def test_r_wave_reflection_from_the_cutoff_side_is_budden():
    # T = exp(−π k0 X L_B) = 0.724; R = (1 − T)² from the cutoff side (Budden 1985 ch. 19).
    # The flat profile starts with a step at the launcher (n² = 1 − X at Y = 0), whose
    # reflection r_s adds at most 2 r_s (1 − T) + r_s² to R.
    t = math.exp(-math.pi * k0(F0) * X_BUDDEN * L_B)
    r_s = step_reflection(1 - X_BUDDEN)
    ctx = context(budden_model(high_field_side=False))
    f = one(ctx, "load.plasma-reflection")
    assert abs(f.measured.value - (1 - t) ** 2) <= 2 * r_s * (1 - t) + r_s**2
    assert f.status is Status.PASS  # 7.6 % < 10 %
    corner = path_characteristics(ctx)["main"]["corners"][0]
    assert corner["plasma_transmitted"]["value"] == pytest.approx(t, rel=2 * r_s)
    assert abs(corner["energy_balance_residual"]["value"]) < 1e-6  # R + T + A = 1


def test_r_wave_reflection_from_the_resonance_side_is_zero():
    # Budden (1985 ch. 19): R = 0 from the resonance side; only the launcher step
    # (n² = 1 + X at Y = 2) reflects, |r_s|² = 2.5e-5
    r_s = step_reflection(1 + X_BUDDEN)
    f = one(context(budden_model(high_field_side=True)), "load.plasma-reflection")
    assert f.measured.value <= (r_s + 1e-3) ** 2
    assert f.status is Status.PASS


def test_linear_ramp_beyond_cutoff_reflects_totally():
    # O mode into a ramp rising to 2 n_c over 50 mm: total reflection at the cutoff
    # (Budden 1985 ch. 15–16); the only loss is the tiny electron–ion damping (ν/ω ~ 1e-5)
    prof = DensityProfile(kind="ramp", edge_length=0.05)
    m = model(uniform_field(0.05), length=0.3, density=(2 * N_C, 2 * N_C), mode="O",
              angle=math.pi / 2, profile=prof)
    ctx = context(m)
    f = one(ctx, "load.plasma-reflection")
    assert f.measured.value > 0.999 and f.status is Status.FAIL
    corner = path_characteristics(ctx)["main"]["corners"][0]
    assert corner["plasma_transmitted"]["value"] < 1e-9  # tunnels through 200 mm above n_c


# ----------------------------------------------------------------------------- reflected power

def test_demo_reflected_power_bound_arithmetic():
    base = demo_model()
    ctx = context(base)
    f = one(ctx, "load.reflected-power")
    g_w = window_analysis(ctx, base.windows[0]).worst_gamma[0]
    g_p = math.sqrt(one(ctx, "load.plasma-reflection").measured.value)
    power = base.feeds[0].power
    assert f.measured.value == pytest.approx(power * (g_w + g_p) ** 2, rel=1e-12)
    assert f.limit.value == base.feeds[0].max_reflected_power
    assert f.status is Status.PASS
    # the bound holds against the exact cascade of a lossless two-port |S11| = g_w and a load
    # |Γ_L| = g_p over every line phase (Pozar §4.3): worst (a + b)/(1 + ab) ≤ a + b
    s11, s21 = g_w, 1j * math.sqrt(1 - g_w**2)
    gl = g_p * np.exp(-2j * np.linspace(0, np.pi, 2001))
    g_in = np.abs(s11 + s21 * s21 * gl / (1 - s11 * gl))
    assert g_in.max() == pytest.approx((g_w + g_p) / (1 + g_w * g_p), rel=1e-6)
    assert g_in.max() <= math.sqrt(f.measured.value / power) + 1e-12


def test_reflected_power_fails_against_a_small_rating():
    base = demo_model()
    feed = dataclasses.replace(base.feeds[0], max_reflected_power=5.0)
    f = one(context(dataclasses.replace(base, feeds=(feed,))), "load.reflected-power")
    assert f.status is Status.FAIL and f.margin.value < 0


def test_reflected_power_not_applicable_without_rating_or_near_field():
    base = demo_model()
    for change in ({"max_reflected_power": None}, {"absorption": "inductive"}):
        feed = dataclasses.replace(base.feeds[0], **change)
        ctx = context(dataclasses.replace(base, feeds=(feed,)))
        (f,) = evaluate(ctx, "load.reflected-power")
        assert f.status is Status.NOT_APPLICABLE
    feed = dataclasses.replace(base.feeds[0], absorption="helicon")
    (f,) = evaluate(context(dataclasses.replace(base, feeds=(feed,))), "load.plasma-reflection")
    assert f.status is Status.NOT_APPLICABLE


def test_path_characteristics_are_json_ready():
    import json

    ctx = context(demo_model())
    chars = path_characteristics(ctx)
    text = json.dumps(chars, allow_nan=False)  # raises on NaN or infinity
    entry = chars["main"]
    assert len(entry["z"]["value"]) <= 200
    assert len(entry["corners"]) == 8  # density 2 × current scale 2 × frequency 2
    for c in entry["corners"]:
        assert len(c["n2_real"]["value"]) == len(entry["z"]["value"])
        assert c["verdict"] == "direct"
    assert "NaN" not in text and "Infinity" not in text


def test_path_figures_from_the_run_characteristics():
    # figures plot what the Run holds; SVG output is reproducible with a fixed hash salt
    # (LIBRARY-NOTES, matplotlib)
    from types import SimpleNamespace

    from rfcheck.report.figure_path import cma_figure, launch_path_figure

    run = SimpleNamespace(characteristics={"paths": path_characteristics(context(demo_model()))})
    for make, fig_id in ((launch_path_figure, "launch-path"), (cma_figure, "cma-diagram")):
        fig = make(run)
        assert fig["id"] == fig_id and fig["svg"].startswith("<svg")
        assert make(run)["svg"] == fig["svg"]
    assert "L = 0 (L cutoff, X = 1 + Y)" in cma_figure(run)["svg"]
    assert launch_path_figure(SimpleNamespace(characteristics={"paths": {}})) is None
