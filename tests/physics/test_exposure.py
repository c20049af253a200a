"""Exposure reference levels, leak laws and the multi-frequency sum (rfcheck.physics.exposure).

Reference levels come from reference-values.md §6 (ICNIRP 2020 Table 5 whole-body levels:
confidence M, from memory; Table 6 local levels: H, checked against a handbook reproduction;
IEEE C95.1-2019 and 47 CFR 1.1310: from memory). Leak laws are closed forms.
"""

import math

import pytest

from rfcheck.levels import shipped_tables
from rfcheck.physics.constants import C, ETA0
from rfcheck.physics.exposure import (distance_for_level, exposure_ratio, far_field_distance,
                                      leak_power_density, leaked_power, point_leak_power_density,
                                      reference_level)


@pytest.mark.parametrize("table, f, expected, rtol", [
    # ICNIRP 2020 Table 5, whole body, 30 min (reference-values.md §6.1; from memory, M)
    pytest.param("icnirp-2020-occupational", 2.45e9, 50.0, 1e-9, id="ICNIRP WB occ 2.45 GHz 50 W/m2 (from memory)"),
    pytest.param("icnirp-2020-public", 2.45e9, 10.0, 1e-9, id="ICNIRP WB public 2.45 GHz 10 W/m2 (from memory)"),
    pytest.param("icnirp-2020-occupational", 28e9, 50.0, 1e-9, id="ICNIRP WB occ 28 GHz 50 W/m2 (from memory)"),
    pytest.param("icnirp-2020-public", 28e9, 10.0, 1e-9, id="ICNIRP WB public 28 GHz 10 W/m2 (from memory)"),
    pytest.param("icnirp-2020-occupational", 915e6, 22.88, 2e-3, id="ICNIRP WB occ 915 MHz f/40 (from memory)"),
    pytest.param("icnirp-2020-public", 915e6, 4.575, 2e-3, id="ICNIRP WB public 915 MHz f/200 (from memory)"),
    # ICNIRP 2020 Table 6, local, 6 min (reference-values.md §6.1; H)
    pytest.param("icnirp-2020-local-occupational", 2.45e9, 200.0, 1e-9, id="ICNIRP local occ 2.45 GHz 200 W/m2"),
    pytest.param("icnirp-2020-local-public", 2.45e9, 40.0, 1e-9, id="ICNIRP local public 2.45 GHz 40 W/m2"),
    pytest.param("icnirp-2020-local-occupational", 28e9, 152.5, 5e-4, id="ICNIRP local occ 28 GHz 275/f_G^0.177 = 152.5"),
    pytest.param("icnirp-2020-local-public", 28e9, 30.49, 5e-4, id="ICNIRP local public 28 GHz 55/f_G^0.177 = 30.49"),
    pytest.param("icnirp-2020-local-occupational", 14.5e9, 171.3, 5e-4, id="ICNIRP local occ 14.5 GHz 171.3"),
    pytest.param("icnirp-2020-local-occupational", 915e6, 102.1, 5e-4, id="ICNIRP local occ 915 MHz 0.29 f^0.86 = 102.1"),
    # IEEE C95.1-2019 ERLs (reference-values.md §6.2; from memory, M/L)
    pytest.param("ieee-c95.1-2019-restricted", 2.45e9, 81.67, 5e-4, id="IEEE restricted 2.45 GHz f/30 (from memory)"),
    pytest.param("ieee-c95.1-2019-unrestricted", 2.45e9, 10.0, 1e-9, id="IEEE unrestricted 2.45 GHz 10 W/m2 (from memory)"),
    pytest.param("ieee-c95.1-2019-restricted", 28e9, 100.0, 1e-9, id="IEEE restricted 28 GHz 100 W/m2 (from memory)"),
    # 47 CFR 1.1310: 1.5-100 GHz 5 mW/cm2 occupational, 1 mW/cm2 general (from memory, M)
    pytest.param("fcc-occupational", 2.45e9, 50.0, 1e-9, id="FCC occ 5 mW/cm2 (from memory)"),
    pytest.param("fcc-general", 2.45e9, 10.0, 1e-9, id="FCC general 1 mW/cm2 (from memory)"),
])
def test_power_density_levels(table, f, expected, rtol):
    assert reference_level(table, f).power_density == pytest.approx(expected, rel=rtol)


@pytest.mark.parametrize("table, e, h", [
    # 13.56 MHz, reference-values.md §6.1 "Evaluated" row (computed from the table laws)
    pytest.param("icnirp-2020-occupational", 106.4, 0.3614, id="ICNIRP WB occ 13.56 MHz (from memory)"),
    pytest.param("icnirp-2020-public", 48.37, 0.1622, id="ICNIRP WB public 13.56 MHz (from memory)"),
    pytest.param("icnirp-2020-local-occupational", 242.5, 0.7965, id="ICNIRP local occ 13.56 MHz"),
    pytest.param("icnirp-2020-local-public", 108.2, 0.3614, id="ICNIRP local public 13.56 MHz"),
    # IEEE C95.1-2019 at 13.56 MHz: restricted E 135.8 V/m, H 1.202 A/m (§6.2, from memory)
    pytest.param("ieee-c95.1-2019-restricted", 135.8, 1.202, id="IEEE restricted 13.56 MHz (from memory)"),
])
def test_13_56_mhz_levels_are_e_and_h(table, e, h):
    lv = reference_level(table, 13.56e6)
    assert lv.e_field == pytest.approx(e, rel=2e-3)
    assert lv.h_field == pytest.approx(h, rel=2e-3)
    # no S level below 30 MHz: the stricter far-field equivalent E²/η0 or η0 H² is used
    assert lv.power_density == pytest.approx(min(e**2 / ETA0, ETA0 * h**2), rel=4e-3)
    assert lv.basis == ("E" if e**2 / ETA0 < ETA0 * h**2 else "H")


def test_every_shipped_table_names_standard_edition_population_averaging_and_confidence():
    tables = shipped_tables()
    assert {"icnirp-2020-occupational", "icnirp-2020-public", "icnirp-2020-local-occupational",
            "icnirp-2020-local-public", "ieee-c95.1-2019-restricted",
            "ieee-c95.1-2019-unrestricted"} <= set(tables)
    for t in tables.values():
        assert t.standard and t.edition and t.population and t.averaging_time
        assert t.confidence[:1] in "HML"
        assert t.scope in ("whole-body", "local")
    assert tables["icnirp-2020-local-occupational"].averaging_time == "6 min"
    assert tables["icnirp-2020-occupational"].averaging_time == "30 min"


def test_outside_table_is_nan():
    assert math.isnan(reference_level("fcc-general", 500e9).power_density)


def test_inverse_square_and_distance_to_level_are_inverse():
    # inverse-square law of a point source (closed form): S(d) = S_m (d_m/d)²
    assert leak_power_density(10.0, 0.05, 0.5) == pytest.approx(0.1)
    assert leak_power_density(10.0, 0.05, 0.1) == pytest.approx(2.5)
    # d = d_m sqrt(S_m/S_L): the estimate at that distance is the level
    d = distance_for_level(10.0, 0.05, 0.1)
    assert d == pytest.approx(0.5)
    assert leak_power_density(10.0, 0.05, distance_for_level(7.0, 0.05, 0.3)) == pytest.approx(
        0.3 * 10.0 / 7.0)


def test_small_leak_power_density_and_leaked_power():
    # S = D P/(4π d²): 1 W isotropic (D = 1) at 1 m is 1/(4π) W/m²
    assert point_leak_power_density(1.0, 1.0, 1.0) == pytest.approx(1 / (4 * math.pi))
    # the default small-leak directivity 3 (short dipole 1.5 × image 2; Balanis ch. 4)
    assert point_leak_power_density(1.0, 2.0) == pytest.approx(3 / (16 * math.pi))
    assert leaked_power(1500.0, 50.0) == pytest.approx(1500.0 * 1e-5)
    # a passive path never passes more than the forward power
    assert leaked_power(1500.0, -3.0) == pytest.approx(1500.0)


def test_far_field_distance_is_the_larger_of_2d2_over_lambda_and_lambda():
    lam = C / 2.45e9
    assert far_field_distance(0.15, 2.45e9) == pytest.approx(2 * 0.15**2 / lam)
    assert far_field_distance(0.005, 2.45e9) == pytest.approx(lam)


def test_multi_frequency_sum_adds_ratios():
    # simultaneous exposure: Σ S_i/S_RL(f_i) (ICNIRP 2020 summation); 13.56 MHz at the
    # E-equivalent level and 2.45 GHz at 50 W/m², each at half its level, sum to 1
    s_rf = reference_level("icnirp-2020-occupational", 13.56e6).power_density
    levels = [s_rf, 50.0]
    assert exposure_ratio([0.5 * s_rf, 25.0], levels) == pytest.approx(1.0)
    assert exposure_ratio([0.1 * s_rf, 10.0], levels) == pytest.approx(0.3)
