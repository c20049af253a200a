"""The dual-frequency minimum-B example (examples/dual-frequency-min-b.toml): its key numbers,
checked by hand before its results were approved (tests/approved/dual-frequency-min-b.json,
compared in full by tests/test_approved.py).

Sources: B_ECR = 2π f m_e / e (NRL Plasma Formulary 2019: 0.5179 T at 14.5 GHz, 0.6430 T at
18 GHz); on the axis the hexapole adds nothing (a multipole of four or more poles has no field
on its axis) and each solenoid is the thick-solenoid closed form (D. B. Montgomery, Solenoid
Magnet Design, Wiley 1969, ch. 1); powers of waves at different frequencies add (their cross
term averages to zero: D. M. Pozar, Microwave Engineering, 4th ed., ch. 2); the half-wave
window thickness λ_g/2 in a dielectric-filled guide (Pozar §3.3).
"""

from __future__ import annotations

import math
import re
from pathlib import Path

import pytest
from scipy.optimize import brentq

from conftest import one_finding, run_without_warnings, thick_solenoid_bz

from rfcheck.physics.constants import C, E_CHARGE, M_E, TWO_PI

ROOT = Path(__file__).resolve().parents[1]
SPEC = ROOT / "examples" / "dual-frequency-min-b.toml"
# (centre z, length, current) of the spec's solenoids; all 85-140 mm, 1000 turns
COILS = [(-0.020, 0.060, 420.0), (0.150, 0.060, -40.0), (0.320, 0.060, 240.0)]
R1, R2, TURNS = 0.085, 0.140, 1000


def axis_bz(z, scale=1.0):
    return thick_solenoid_bz(z, COILS, R1, R2, TURNS, scale)


def b_ecr(f):
    return TWO_PI * f * M_E / E_CHARGE


@pytest.fixture(scope="module")
def run():
    # an error finding would show a rule that raised
    return run_without_warnings(SPEC)


def test_no_rule_raised_and_no_warning_was_printed(run):
    assert not [f for f in run.findings if f.status.value == "error"]


_one = one_finding


def test_resonance_fields():
    assert b_ecr(14.5e9) == pytest.approx(0.5179, abs=1e-4)
    assert b_ecr(18e9) == pytest.approx(0.6430, abs=1e-4)


def test_the_only_warnings_are_the_cross_coupling_at_ignition(run):
    assert run.verdict == "warn"
    warned = sorted((f.rule, f.subject) for f in run.findings if f.status.value in ("warn", "fail"))
    assert warned == [("ech.cross-coupling", "feed klystron, ignition"),
                      ("ech.cross-coupling", "feed twt, ignition")]


def test_cross_coupling_arithmetic(run):
    # ignition: |Γ_cold|² = 0.9² of the other generator's power (both declared 0.9)
    assert _one(run, "ech.cross-coupling", "feed klystron, ignition").measured.value == \
        pytest.approx(0.81 * 1000.0)
    assert _one(run, "ech.cross-coupling", "feed twt, ignition").measured.value == \
        pytest.approx(0.81 * 2000.0)
    # limits: 50 % of each feed's own rating (200 W, 100 W)
    assert _one(run, "ech.cross-coupling", "feed klystron, ignition").limit.value == 100.0
    assert _one(run, "ech.cross-coupling", "feed twt, ignition").limit.value == 50.0
    # running: the other feed's plasma-returned fraction (load.plasma-reflection) times its power
    ret_twt = _one(run, "load.plasma-reflection", "feed twt, running").measured.value
    assert _one(run, "ech.cross-coupling", "feed klystron, running").measured.value == \
        pytest.approx(1000.0 * ret_twt, rel=1e-9)


def test_shared_load_sums_the_two_reflections(run):
    f = _one(run, "ech.shared-circulator", "circulator shared-load")
    p_k = _one(run, "load.reflected-power", "feed klystron, running").measured.value
    p_t = _one(run, "load.reflected-power", "feed twt, running").measured.value
    assert f.measured.value == pytest.approx(p_k + p_t, rel=1e-9)  # 14.5 and 18 GHz: powers add
    assert f.limit.value == 100.0  # the smaller of 200 W and 100 W
    assert f.status.value == "pass"


def test_axial_crossings_against_the_closed_form_and_the_separation(run):
    # extraction flank: both resonances between the field minimum (~165 mm) and 300 mm
    z14 = brentq(lambda z: axis_bz(z) - b_ecr(14.5e9), 0.17, 0.30)
    z18 = brentq(lambda z: axis_bz(z) - b_ecr(18e9), 0.17, 0.30)
    for feed, z_ref in (("klystron", z14), ("twt", z18)):
        msg = _one(run, "resonance.ecr-clearance", f"feed {feed}").message
        z = float(re.search(r"at z = ([0-9.]+) mm", msg).group(1)) * 1e-3
        assert z == pytest.approx(z_ref, abs=3e-3)  # envelope: current ± 1 %, f ± tolerance
    sep = _one(run, "ech.resonance-separation", "feeds klystron and twt")
    # the least distance is across the centre: smaller than the axial gap of the closed form
    assert sep.measured.value < abs(z18 - z14)
    r1, r2 = (float(x) for x in re.search(r"between r = ([0-9.]+) mm and ([0-9.]+) mm",
                                          sep.message).groups())
    assert sep.measured.value == pytest.approx(abs(r2 - r1) * 1e-3, abs=1e-5)
    assert sep.status.value == "pass"  # 4 mm against 2 mm


def test_18_ghz_window_is_half_a_guide_wavelength():
    fc = C / (2 * 12.954e-3)  # WR-51 TE10
    lam_g = (C / 18e9) / math.sqrt(4.2 - (fc / 18e9) ** 2)
    assert lam_g / 2 == pytest.approx(4.28e-3, rel=2e-3)
