"""The 140 GHz heating-launcher example (examples/ech-launcher-140ghz.toml): its key numbers,
checked by hand against closed forms before its results were approved
(tests/approved/ech-launcher-140ghz.json, compared in full by tests/test_approved.py).

Closed forms and sources:
* electron-cyclotron field B_ce = 2π f m_e / e and critical density n_c = ε0 m_e ω²/e²
  (NRL Plasma Formulary 2019; 5.00 T and 2.431e20 m^-3 at 140 GHz);
* on-axis field of a thick solenoid of current density J between radii R1 < R2 and faces
  z1 < z2 (D. B. Montgomery, Solenoid Magnet Design, Wiley 1969, ch. 1):
  B_z = μ0 J/2 [u ln((R2 + √(R2² + u²))/(R1 + √(R1² + u²)))]_{u = z − z2}^{u = z − z1};
* O1 optical depth, practical form τ = 1.8554e-22 n T_e L_B / B √(1 − X) (reference values
  §8.1, the tenuous-plasma limit of Bornatici et al., Nucl. Fusion 23 (1983) 1153);
* HE11 axis field E0 = √(2 η0 P/(π a² J1(2.405)²)) (Lommel integral of J0²);
* edge-cooled disc ΔT = P/(4π k t) (Incropera et al., Fundamentals of Heat and Mass
  Transfer, 6th ed., §3.5.2);
* the decibel: lost fraction 1 − 10^(−dB/10).
"""

from __future__ import annotations

import math
import re
from pathlib import Path

import pytest
from scipy.optimize import brentq

from conftest import one_finding, run_without_warnings, thick_solenoid_bz

from rfcheck.physics.constants import E_CHARGE, EPS0, ETA0, M_E, TWO_PI

ROOT = Path(__file__).resolve().parents[1]
SPEC = ROOT / "examples" / "ech-launcher-140ghz.toml"

F = 140e9
COILS = [(0.350, 0.300), (0.850, 0.300)]  # centre, length (m): the spec
R1, R2, TURNS, AMPS = 0.200, 0.300, 6000, 380.0


def solenoid_bz(z, scale=1.0):
    return thick_solenoid_bz(z, [(zc, length, AMPS) for zc, length in COILS], R1, R2, TURNS,
                             scale)


@pytest.fixture(scope="module")
def run():
    # an error finding would show a rule that raised
    return run_without_warnings(SPEC)


def test_no_rule_raised_and_no_warning_was_printed(run):
    assert not [f for f in run.findings if f.status.value == "error"]


_one = one_finding


def test_resonance_field_and_cutoff_density_at_140_ghz():
    b_ce = TWO_PI * F * M_E / E_CHARGE
    n_c = EPS0 * M_E * (TWO_PI * F) ** 2 / E_CHARGE ** 2
    assert b_ce == pytest.approx(5.0013, abs=1e-4)  # NRL: f_ce = 27.99 GHz/T -> 5.00 T
    assert n_c == pytest.approx(2.4313e20, rel=1e-4)  # NRL: 1.24e-8 f² cm^-3


def test_cutoff_density_finding(run):
    f = _one(run, "ech.cutoff-density")
    n_c_low = EPS0 * M_E * (TWO_PI * (F - 50e6)) ** 2 / E_CHARGE ** 2
    assert f.status.value == "pass"
    assert f.limit.value == pytest.approx(0.9 * n_c_low, rel=1e-9)
    assert f.measured.value == pytest.approx(8e19)


def test_resonance_position_against_the_thick_solenoid_closed_form(run):
    b_ce = TWO_PI * F * M_E / E_CHARGE
    z_nom = brentq(lambda z: solenoid_bz(z) - b_ce, 0.0, 0.35)
    assert 0.26 < z_nom < 0.29
    f = _one(run, "resonance.ecr-clearance")
    z = float(re.search(r"z = ([0-9.]+) mm clears", f.message).group(1)) * 1e-3
    # the finding names a crossing of the envelope (current ± 0.5 %, f ± 50 MHz)
    z_band = [brentq(lambda z, s=s, ff=ff: solenoid_bz(z, s) - TWO_PI * ff * M_E / E_CHARGE,
                     0.0, 0.35) for s in (0.995, 1.005) for ff in (F - 50e6, F + 50e6)]
    assert min(z_band) - 2e-4 <= z <= max(z_band) + 2e-4


def test_o1_optical_depth_against_the_practical_form(run):
    f = _one(run, "ech.optical-depth")
    m = re.search(r"z = ([0-9.]+) mm, B = [0-9.]+ T, L_B = ([0-9.]+) mm, X = ([0-9.e-]+), "
                  r"T_e = ([0-9.]+) eV", f.message)
    z, l_b, x, t_e = (float(m.group(i)) for i in range(1, 5))
    z, l_b = z * 1e-3, l_b * 1e-3
    # L_B = B/|dB/dz| of the closed-form field at the crossing (4-digit message: 2e-3)
    h = 1e-5
    grad = (solenoid_bz(z + h, 0.995) - solenoid_bz(z - h, 0.995)) / (2 * h)
    grad_hi = (solenoid_bz(z + h, 1.005) - solenoid_bz(z - h, 1.005)) / (2 * h)
    b_ce = TWO_PI * F * M_E / E_CHARGE
    assert min(b_ce / grad, b_ce / grad_hi) * 0.99 < l_b < max(b_ce / grad, b_ce / grad_hi) * 1.01
    n_c = EPS0 * M_E * (TWO_PI * F) ** 2 / E_CHARGE ** 2
    tau = 1.8554e-22 * (x * n_c) * t_e * l_b / b_ce * math.sqrt(1 - x)
    assert f.measured.value == pytest.approx(tau, rel=2e-2)  # X is printed to 3 digits
    assert f.status.value == "warn"  # low T_e: τ ≈ 0.02 at 200 eV
    assert "Bornatici et al. 1983" in f.message and "T_e ≤ 20 keV" in f.message
    assert "Doppler" in f.message  # N∥ = cos 70° = 0.342 > √(200 eV / 511 keV) = 0.0198


def test_stray_radiation_is_what_one_pass_leaves(run):
    tau = _one(run, "ech.optical-depth").measured.value
    f = _one(run, "ech.stray-radiation")
    assert f.measured.value == pytest.approx(500e3 * 0.10 * math.exp(-tau), rel=1e-9)
    assert "local RF-safety codes" in f.message and "safe " not in f.message


def test_he11_breakdown_field(run):
    a = 0.0635 / 2
    e0 = math.sqrt(2 * ETA0 * 500e3 / (math.pi * a * a * 0.5191474973 ** 2))
    assert e0 == pytest.approx(6.644e5, rel=1e-3)
    f = _one(run, "line.breakdown", "feed gyrotron, ignition")
    assert f.measured.value == pytest.approx(1.1 * e0, rel=1e-6)  # |Γ_cold| = 0.1 declared


def test_line_loss_in_decibels(run):
    f = _one(run, "line.transmission-loss")
    db = 30 * 0.002 + 6 * 0.03
    assert f.measured.value == pytest.approx(1 - 10 ** (-db / 10), rel=1e-9)


def test_diamond_window_edge_cooled_rise(run):
    f = _one(run, "window.disc-temperature")
    p_abs = _one(run, "window.absorbed-power").measured.value
    t = float(re.search(r"t = ([0-9.]+) mm", f.message).group(1)) * 1e-3
    assert f.measured.value == pytest.approx(p_abs / (4 * math.pi * 1800.0 * t), rel=1e-3)
    # the disc is four half-waves at 140 GHz: 4 λ0 / (2 √5.67) = 1.799 mm
    assert 4 * (2.99792458e8 / F) / (2 * math.sqrt(5.67)) == pytest.approx(1.80e-3, rel=1e-3)
