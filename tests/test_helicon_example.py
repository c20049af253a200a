"""The 13.56 MHz helicon example (examples/helicon-source.toml): its key numbers, checked by
hand against closed forms before its results were approved (tests/approved/helicon-source.json,
compared in full by tests/test_approved.py).

Closed forms: the on-axis field of a thick solenoid (inner radius a, outer b, length l,
N turns, current I; e.g. Montgomery, Solenoid Magnet Design, or any magnet handbook)
    B(z) = μ0 N I / (2 l (b − a)) [F(z − z1) − F(z − z2)], F(x) = x ln((b + √(b² + x²))/(a + √(a² + x²)));
the bounded helicon n/B = k k_z / (e μ0 ω), k² = (3.8317/a)² + k_z², k_z = π/L for a
half-wavelength antenna (Lieberman & Lichtenberg, Principles of Plasma Discharges, 2nd ed.,
ch. 13; reference-values.md §7) with the electron-mass term m_e k²/(μ0 e²); the
Trivelpiece–Gould merge field 2 m_e ω k/(e k_z); the lower-hybrid frequency's dense limit
√(f_ci f_ce) (Stix, Waves in Plasmas, ch. 2)."""

from __future__ import annotations

import json
import math
import sys
from pathlib import Path

import pytest

from rfcheck.physics.constants import E_CHARGE, M_E, MU0, TWO_PI

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "tools"))
import approve  # noqa: E402

SPEC = "helicon-source.toml"


@pytest.fixture(scope="module")
def run():
    from rfcheck.rules.policy import load_policy
    from rfcheck.run import run as run_
    from rfcheck.spec import load_spec

    return run_(load_spec(ROOT / "examples" / SPEC), load_policy(None))


def _one(run, rule, subject=None):
    (f,) = [f for f in run.findings if f.rule == rule and (subject is None or f.subject == subject)]
    return f


def _solenoid(z, zc, a=0.12, b=0.17, l=0.08, n=500, i=12.0):
    def big_f(x):
        return x * math.log((b + math.hypot(b, x)) / (a + math.hypot(a, x)))
    return MU0 * n * i / (2 * l * (b - a)) * (big_f(z - zc + l / 2) - big_f(z - zc - l / 2))


def _axis(z):
    return _solenoid(z, 0.075) + _solenoid(z, 0.225)


def test_the_example_is_approved_and_its_rules_evaluated(run):
    assert (SPEC, None) in approve.CASES
    approved = json.loads((approve.OUT / approve.case_name(SPEC, None)).read_text("utf-8"))
    assert approved["verdict"] == run.verdict == "warn"
    # the one warning: the exposure estimate's near-field caveat at a 22 m wavelength
    assert [f.rule for f in run.findings if f.status.value == "warn"] == ["exposure.leak-level"]
    assert _one(run, "helicon.antenna-coupling").status.value == "pass"
    assert _one(run, "helicon.lower-hybrid").status.value == "pass"


def test_field_under_the_antenna_by_hand(run):
    f = _one(run, "helicon.antenna-coupling")
    # antenna 75-225 mm (centre 150 mm, 150 mm long) between coils centred at 75 and 225 mm:
    # B = 34.18 mT at its ends and 36.41 mT at its centre, ± 5 % current tolerance
    assert _axis(0.075) * 1e3 == pytest.approx(34.18, abs=0.01)
    assert _axis(0.15) * 1e3 == pytest.approx(36.41, abs=0.01)
    b_lo, b_hi = f.details["field_range_t"]
    assert b_lo == pytest.approx(0.95 * _axis(0.075), rel=1e-4)
    assert b_hi == pytest.approx(1.05 * _axis(0.15), rel=1e-4)


def test_density_field_relation_by_hand(run):
    f = _one(run, "helicon.antenna-coupling")
    # a = 50 mm: k_⊥ = 76.63 m^-1; L = 150 mm: k_z = π/L = 20.94 m^-1, k = 79.45 m^-1;
    # n/B = k k_z/(e μ0 ω) = 9.70e19 m^-3/T at 13.56 MHz; electron-mass term
    # m_e k²/(μ0 e²) = 1.78e17 m^-3
    kz = math.pi / 0.15
    k = math.hypot(3.8317 / 0.05, kz)
    assert k == pytest.approx(79.45, abs=0.01)
    n_per_b = k * kz / (E_CHARGE * MU0 * TWO_PI * 13.56e6)
    assert n_per_b == pytest.approx(9.70e19, rel=1e-3)
    inertia = M_E * k**2 / (MU0 * E_CHARGE**2)
    assert inertia == pytest.approx(1.78e17, rel=5e-3)
    b_lo, b_hi = f.details["field_range_t"]
    # 32.47 mT → 2.97e18 m^-3, 38.23 mT → 3.53e18 m^-3: the envelope 2e18-4e18 sits round it
    for b, n, want in zip((b_lo, b_hi), f.details["density_at_k0"], (2.97e18, 3.53e18)):
        assert n == pytest.approx(n_per_b * b - inertia, rel=1e-4)
        assert n == pytest.approx(want, rel=3e-3)
    # worst point: the lowest density at the highest field needs the smallest k_z:
    # 12.53 m^-1 = 0.598 k_0, offset 40.2 % against the ±50 % half-power band
    assert f.worst_case["density"].value == pytest.approx(2e18)
    assert f.worst_case["field"].value == pytest.approx(b_hi)
    assert f.details["kz_per_m"] == pytest.approx(12.53, abs=0.01)
    assert f.measured.value == pytest.approx(0.402, abs=1e-3)
    # Trivelpiece–Gould merge field 2 m_e ω k/(e k_z) = 3.67 mT, a tenth of the field here
    assert f.details["branch_merge_field_t"] == pytest.approx(3.675e-3, rel=1e-3)
    assert f.details["branch"] == "helicon"
    # downstream, at the open end (z = 500 mm), the axis field falls to 0.95 × 3.584 mT =
    # 3.405 mT, below B_TG: the message names the Trivelpiece–Gould branch there
    assert _axis(0.5) * 1e3 == pytest.approx(3.584, abs=1e-3)
    assert f"falls to {0.95 * _axis(0.5) * 1e3:.4g} mT at z = 500 mm" in f.message
    assert "is a Trivelpiece–Gould wave" in f.message


def test_lower_hybrid_by_hand(run):
    f = _one(run, "helicon.lower-hybrid")
    # highest axis field 38.23 mT (the antenna centre at +5 %): f_ce = 1070 MHz,
    # f_ci(Ar+) = 14.69 kHz, √(f_ci f_ce) = 3.965 MHz; the exact root at 4e18 m^-3 is
    # 3.958 MHz; 13.553 MHz / 3.958 MHz = 3.42 against 2
    b = f.worst_case["field"].value
    f_ce = E_CHARGE * b / (TWO_PI * M_E)
    f_ci = E_CHARGE * b / (TWO_PI * 39.948 * 1.66053906660e-27)
    assert f_ce / 1e6 == pytest.approx(1070, abs=1)
    assert f_ci / 1e3 == pytest.approx(14.69, abs=0.01)
    lh = f.details["lower_hybrid_frequency"]
    assert lh == pytest.approx(math.sqrt(f_ci * f_ce), rel=3e-3)
    assert lh / 1e6 == pytest.approx(3.958, abs=0.001)
    assert f.measured.value == pytest.approx(13.553e6 / lh, rel=1e-9)
