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


def test_matching_network_at_the_binding_point_by_hand(run):
    # the pi network: shunt C1 50-1500 pF, series L 0.2-3 µH, shunt C2 10-500 pF (generator
    # side first); its worst point and binding element C2, re-solved here by hand
    f = _one(run, "inductive.matching-range")
    assert f.status.value == "pass" and f.details["points_reached"] == f.details["points"] == 180
    r, x = f.details["load_ohm"]
    # the worst point is the lowest density (1e17 m^-3), where the coil's load is
    # R = 6.70 Ω, X = 234.7 Ω (transformer model; cf. coupling-efficiency's range)
    assert f.worst_case["density"].value == pytest.approx(1e17)
    assert r == pytest.approx(6.70, abs=0.01) and x == pytest.approx(234.7, abs=0.1)
    c2 = float(re.search(r"shunt capacitor 3 at ([0-9.]+) pF", f.message).group(1)) * 1e-12
    # margin to the nearer end: (500 − 138.7)/490 = 73.7 % or (138.7 − 10)/490 = 26.3 %
    assert f.measured.value == pytest.approx((c2 - 10e-12) / 490e-12, abs=2e-4)
    assert f.measured.value == pytest.approx(0.263, abs=1e-3)
    # with C2 fixed across the coil, Z' = 1/(1/Z_L + jωC2) is matched by the shunt-first L
    # section in closed form (Pozar §5.1): X'' = √(R'(Z0 − R')), L = (X'' − X')/ω,
    # C1 = X''/(ω R' Z0); both inside their ranges, and the ladder's Z_in is 50 Ω
    w = TWO_PI * f.worst_case["frequency"].value
    zp = 1 / (1 / complex(r, x) + 1j * w * c2)
    x2 = math.sqrt(zp.real * (50 - zp.real))
    ind = (x2 - zp.imag) / w
    c1 = x2 / (w * zp.real * 50.0)
    z_in = 1 / (1j * w * c1 + 1 / (zp + 1j * w * ind))
    assert z_in == pytest.approx(50.0, abs=1e-6)
    assert 0.2e-6 < ind < 3e-6 and 50e-12 < c1 < 1500e-12


def test_coil_voltage_by_hand(run):
    f = _one(run, "inductive.coil-voltage")
    # |V| = √(2P/R) |Z| at 2 kW and the least R of the envelope (6.70 Ω, X = 234.7 Ω):
    # √(4000/6.70) · 234.8 = 24.43 A · 234.8 Ω = 5.74 kV, against 0.8 · 10 kV = 8 kV
    assert f.measured.value == pytest.approx(math.sqrt(4000 / 6.7046) * abs(6.7046 + 234.745j),
                                             rel=1e-4)
    assert f.measured.value == pytest.approx(5.74e3, abs=5)
    assert f.limit.value == pytest.approx(8e3) and f.status.value == "pass"
    assert "local electrical codes" in f.message
    # the same voltage as coupling-efficiency's largest
    assert f.measured.value == pytest.approx(
        _one(run, "inductive.coupling-efficiency").details["coil_voltage_peak"], rel=1e-12)


def test_eh_transition_by_hand(run):
    f = _one(run, "inductive.h-mode")
    n_eh = f.details["eh_transition_density"]
    # the first maximum of the plasma's resistance over density, highest at 4 Pa, 4 eV:
    # 1.89e16 m^-3, inside the 1e16-1e17 m^-3 of argon ICP transitions (L&L §12.3)
    assert n_eh == pytest.approx(1.89e16, rel=5e-3)
    assert f.worst_case["pressure"].value == pytest.approx(4.0)
    assert f.measured.value == pytest.approx(1e17 / n_eh, rel=1e-12)
    assert f.status.value == "pass"  # 5.3 × n_EH against 1.5


def test_characteristics_hold_what_applies_to_an_inductive_feed():
    """The inductive feed's characteristics: the E-to-H transition density of the
    inductive.h-mode finding, and no electron-cyclotron quantities (13.56 MHz heats no
    resonance: B_ECR would be 0.48 mT, meaningless for the source)."""
    from rfcheck.rules.policy import load_policy
    from rfcheck.run import run as run_spec
    from rfcheck.spec import load_spec

    result = run_spec(load_spec(Path(__file__).resolve().parents[1] / "examples" / SPEC),
                      load_policy(None))
    (entry,) = result.characteristics["feeds"].values()
    h_mode = next(f for f in result.findings if f.rule == "inductive.h-mode")
    assert entry["eh_transition_density"]["value"] == h_mode.details["eh_transition_density"]
    assert not {"ecr_field", "resonance_field", "ecr_positions"} & set(entry)
