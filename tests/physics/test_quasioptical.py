"""HE11 corrugated line: field and capacity against the Bessel-function integral (scipy),
the mitre-bend estimate against its closed form, dB arithmetic, the he11 line name."""

from __future__ import annotations

import math

import pytest
from scipy.integrate import quad
from scipy.special import j0, j1, jn_zeros

from rfcheck.physics.constants import C, ETA0
from rfcheck.physics.quasioptical import (HE11_J01, HE11_J1_AT_J01, db_to_fraction,
                                          he11_field_amplitude, he11_max_power,
                                          he11_peak_field, line_run_loss, mitre_bend_loss)
from rfcheck.physics.waveguide import line_from_name


def test_bessel_constants_match_scipy():
    # Abramowitz & Stegun table 9.5: j01 = 2.404825558, J1(j01) = 0.5191474973
    assert HE11_J01 == pytest.approx(jn_zeros(0, 1)[0], rel=1e-14)
    assert HE11_J1_AT_J01 == pytest.approx(j1(jn_zeros(0, 1)[0]), rel=1e-14)


@pytest.mark.parametrize("diameter", [0.0318, 0.0635, 0.0889])
def test_power_of_the_j0_profile_by_numerical_integration(diameter):
    # P = (1/2η0) ∫ E0² J0²(j01 r/a) 2π r dr, integrated by scipy.quad: the closed form
    # E0² π a² J1(j01)²/(2η0) (Lommel integral) must agree.
    a = diameter / 2
    e0 = 1.0e6
    p = quad(lambda r: (e0 * j0(HE11_J01 * r / a)) ** 2 * 2 * math.pi * r, 0, a)[0] / (2 * ETA0)
    assert float(he11_max_power(diameter, e0)) == pytest.approx(p, rel=1e-9)
    assert float(he11_field_amplitude(p, diameter)) == pytest.approx(e0, rel=1e-9)


def test_worked_case_half_megawatt_in_63_5_mm():
    # hand calculation: E0 = sqrt(2 * 376.73 * 5e5 / (pi * 0.03175^2 * 0.51915^2)) = 6.644e5 V/m
    assert float(he11_field_amplitude(5e5, 0.0635)) == pytest.approx(6.644e5, rel=1e-3)
    assert float(he11_peak_field(5e5, 0.0635, 0.2)) == pytest.approx(1.2 * 6.644e5, rel=1e-3)


def test_mitre_bend_closed_form():
    # 0.39 (λ/a)^1.5 at 140 GHz in 63.5 mm: λ = 2.1414 mm, a = 31.75 mm -> 0.39 * 0.06745^1.5
    lam = C / 140e9
    assert float(mitre_bend_loss(140e9, 0.0635)) == pytest.approx(0.39 * (lam / 0.03175) ** 1.5)
    assert float(mitre_bend_loss(140e9, 0.0635)) == pytest.approx(6.83e-3, rel=2e-3)


def test_db_arithmetic():
    # definition of the decibel: 3.0103 dB is half the power, 10 dB is 90 % lost
    assert float(db_to_fraction(10 * math.log10(2))) == pytest.approx(0.5)
    assert float(db_to_fraction(10.0)) == pytest.approx(0.9)


def test_declared_run_loss_adds_in_db():
    run = line_run_loss(140e9, 0.0635, 25.0, 4, per_metre_db=0.004, per_bend_db=0.05)
    assert run.total_db == pytest.approx(25 * 0.004 + 4 * 0.05)
    assert run.transmitted_fraction == pytest.approx(10 ** (-0.3 / 10))
    assert run.per_metre_source == "declared"


def test_he11_name():
    line = line_from_name("he11:63.5 mm")
    assert (line.kind, line.dominant_mode, line.cutoff) == ("corrugated", "HE11", 0.0)
    assert line.dimension("diameter") == pytest.approx(0.0635)
    assert math.isinf(line.next_cutoff)
    with pytest.raises(ValueError, match="he11"):
        line_from_name("he12:63.5 mm")
