"""The 13.56 MHz inductive etch example (examples/icp-etch-source.toml): its key numbers,
checked by hand against closed forms before its results were approved
(tests/approved/icp-etch-source.json, compared in full by tests/test_approved.py).

Sources: Lieberman & Lichtenberg, Principles of Plasma Discharges, 2nd ed. (2005) §12.1-12.2;
reference-values.md §7 (c/ω_pe = 16.8 mm at 1e17 m^-3) and §8.2; Pozar, Microwave
Engineering 4th ed. §2.2, §2.7 (coaxial field and loss)."""

from __future__ import annotations

import json
import math
import re
import sys
from pathlib import Path

import pytest

from rfcheck.physics.constants import C, E_CHARGE, EPS0, K_B, M_E, MU0, TWO_PI

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "tools"))
import approve  # noqa: E402

SPEC = "icp-etch-source.toml"


@pytest.fixture(scope="module")
def run():
    from rfcheck.rules.policy import load_policy
    from rfcheck.run import run as run_
    from rfcheck.spec import load_spec

    return run_(load_spec(ROOT / "examples" / SPEC), load_policy(None))


def _one(run, rule, subject=None):
    (f,) = [f for f in run.findings if f.rule == rule and (subject is None or f.subject == subject)]
    return f


def test_the_example_is_approved_and_mostly_evaluated(run):
    assert (SPEC, None) in approve.CASES
    approved = json.loads((approve.OUT / approve.case_name(SPEC, None)).read_text("utf-8"))
    assert approved["verdict"] == run.verdict == "warn"  # the exposure survey warnings only
    evaluated = [f for f in run.findings if f.status.value != "not-applicable"]
    # every rule written for this kind of source gives a verdict; the not-applicable ones are
    # the ECR, magnet and waveguide-window rules of a source without magnet or line window
    assert {f.rule for f in evaluated} >= {"inductive.skin-depth", "inductive.coupling-efficiency",
                                           "line.breakdown", "line.waveguide-band",
                                           "load.ignition-reflection", "exposure.leak-level"}
    assert [f.rule for f in run.findings if f.status.value == "warn"] == [
        "exposure.aperture-attenuation", "exposure.leak-level"]  # near field at 22 m wavelength


def test_skin_depth_by_hand(run):
    f = _one(run, "inductive.skin-depth")
    # worst point: the lowest density 1e17 m^-3 at the highest pressure (4 Pa) and T_e 4 eV
    assert f.worst_case["density"].value == pytest.approx(1e17)
    assert f.worst_case["pressure"].value == pytest.approx(4.0)
    nu_w = f.details["nu_over_omega"]
    # ν = n_g K_m: n_g = 4 Pa / (k_B 300 K) = 9.657e20 m^-3; K_m(Ar, 4 eV) ≈ 1e-13 m^3/s
    # (L&L fig. 3.16, read from memory: order of magnitude only)
    omega = TWO_PI * f.worst_case["frequency"].value
    k_m = nu_w * omega / (4.0 / (K_B * 300.0))
    assert 0.6e-13 < k_m < 2e-13
    # the general cold form by hand: ε = 1 − ω_pe²/(ω(ω + iν)), δ = 1 / Im((ω/c)√ε)
    wpe2 = 1e17 * E_CHARGE**2 / (EPS0 * M_E)
    eps = 1 - wpe2 / (omega * (omega + 1j * nu_w * omega))
    delta = 1 / ((omega / C) * (eps**0.5).imag)
    assert f.measured.value == pytest.approx(delta, rel=1e-9)
    # ν/ω = 1.38: between the limits, c/ω_pe = 16.8 mm (reference-values §7) and
    # √(2/(ωμ0σ_dc)) = 27.9 mm; near the §8.2 case (ν = 1e8 s^-1: 23.0 mm)
    assert "intermediate" in f.message and nu_w == pytest.approx(1.38, abs=0.01)
    sigma = 1e17 * E_CHARGE**2 / (M_E * nu_w * omega)
    assert 16.8e-3 < f.measured.value < math.sqrt(2 / (omega * MU0 * sigma)) < 28e-3
    assert f.measured.value == pytest.approx(24.6e-3, abs=0.05e-3)
    assert f.limit.value == pytest.approx(0.045)  # half of the 90 mm radius


def test_coil_load_between_its_closed_form_limits(run):
    f = _one(run, "inductive.coupling-efficiency")
    # bare coil X = ω μ0 π b² N² / l = 2π 13.56e6 · 5.374 µH = 457.9 ohm; a flux-excluding
    # column leaves ω μ0 π N² (b² − R²)/l = 151.4 ohm (b = 110 mm, R = 90 mm, l = 80 mm, N = 3)
    w = TWO_PI * 13.56e6
    x_bare = w * MU0 * math.pi * 0.11**2 * 9 / 0.08
    x_dense = w * MU0 * math.pi * 9 * (0.11**2 - 0.09**2) / 0.08
    assert x_bare == pytest.approx(457.9, abs=0.1) and x_dense == pytest.approx(151.4, abs=0.1)
    x_lo, x_hi = f.details["reactance_ohm"]
    assert x_dense < x_lo < x_hi < x_bare
    # coil resistance: 3 turns of 2π · 0.11 m = 2.0735 m of 6.35 mm copper tube,
    # R_s = √(π f μ0/σ) = 9.607e-4 ohm, R = ℓ R_s/(π d) = 0.0999 ohm
    assert "coil 0.0999 Ω" in f.message
    r_lo = f.details["resistance_ohm"][0]
    # least efficiency where the plasma's resistance is least: (R − R_coil)/R
    assert f.measured.value == pytest.approx((r_lo - 0.09986) / r_lo, rel=2e-3)
    # peak current at 2 kW: I = √(2P/R) at the least R (P = ½ I² R)
    assert f.details["coil_current_peak"] == pytest.approx(math.sqrt(2 * 2000 / r_lo), rel=1e-9)
    assert "insulation and clearance to local codes" in f.message


def test_coax_feed_field_by_hand(run):
    f = _one(run, "line.breakdown", "feed coil, running")
    # EIA 7/8: a = 4.2165 mm, ln(b/a) = 0.83343, Z0 = 49.97 ohm; E = √(2 Z0 P)/(a ln(b/a))
    # = √(2 · 49.97 · 2000) / (4.2165e-3 · 0.83343) = 447.1 / 3.5142e-3 = 127.2 kV/m
    assert f.measured.value == pytest.approx(127.2e3, rel=1e-3)
    # ignition: unlit coil declared as a full reflection, twice the field
    assert _one(run, "line.breakdown", "feed coil, ignition").measured.value == \
        pytest.approx(2 * f.measured.value, rel=1e-12)
    heat = float(re.search(r"conductor heat ([0-9.]+) W/m", f.message).group(1))
    # 2 α P with α = R_s (1/a + 1/b)/(2 η0 ln(b/a)) at 13.553 MHz: R_s = 9.605e-4 ohm,
    # (237.16 + 103.06)/m → α = 5.203e-4 Np/m, 2 α · 2 kW = 2.081 W/m
    assert heat == pytest.approx(2.081, abs=0.005)
