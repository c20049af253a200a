"""Exposure reference levels and the leak estimate (rfcheck.physics.exposure)."""

import math

import pytest

from rfcheck.physics.constants import ETA0
from rfcheck.physics.exposure import distance_for_level, leak_power_density, reference_level


@pytest.mark.parametrize("table, f, expected", [
    # ICNIRP 2020 Table 5 whole-body levels as evaluated in reference-values.md §6.1 (M, from memory)
    pytest.param("icnirp-2020-occupational", 2.45e9, 50.0, id="ICNIRP occ 2.45 GHz 50 W/m2"),
    pytest.param("icnirp-2020-public", 2.45e9, 10.0, id="ICNIRP public 2.45 GHz 10 W/m2"),
    pytest.param("icnirp-2020-occupational", 915e6, 22.88, id="ICNIRP occ 915 MHz 22.88 W/m2"),
    pytest.param("icnirp-2020-public", 915e6, 4.575, id="ICNIRP public 915 MHz 4.575 W/m2"),
    pytest.param("icnirp-2020-occupational", 28e9, 50.0, id="ICNIRP occ 28 GHz"),
    # 47 CFR 1.1310: 1.5-100 GHz 5 mW/cm2 occupational, 1 mW/cm2 general (M, from memory)
    pytest.param("fcc-occupational", 2.45e9, 50.0, id="FCC occ 5 mW/cm2"),
    pytest.param("fcc-general", 2.45e9, 10.0, id="FCC general 1 mW/cm2"),
])
def test_power_density_levels(table, f, expected):
    assert reference_level(table, f).power_density == pytest.approx(expected, rel=2e-3)


def test_below_30_mhz_uses_the_lower_of_e_and_h_equivalents():
    # ICNIRP 2020 occupational at 13.56 MHz: E 106.4 V/m, H 0.3614 A/m (reference-values §6.1)
    lv = reference_level("icnirp-2020-occupational", 13.56e6)
    assert lv.basis == "E"
    assert lv.power_density == pytest.approx(106.4 ** 2 / ETA0, rel=2e-3)
    assert lv.power_density < ETA0 * 0.3614 ** 2


def test_outside_table_is_nan():
    assert math.isnan(reference_level("fcc-general", 500e9).power_density)


def test_inverse_square():
    # inverse-square law of a point source (closed form)
    assert leak_power_density(10.0, 0.05, 0.5) == pytest.approx(0.1)
    assert distance_for_level(10.0, 0.05, 0.1) == pytest.approx(0.5)
