"""The spec boundary's unit handling (rfcheck.units)."""

import math

import pytest

from rfcheck.units import UnitError, parse_quantity, scale_to_si


@pytest.mark.parametrize("text, dimension, expected", [
    pytest.param("2.45 GHz", "frequency", 2.45e9, id="GHz"),
    pytest.param("13.56 MHz", "frequency", 13.56e6, id="MHz"),
    # 1 G = 1e-4 T: SI-equivalent gauss (BIPM SI Brochure, 9th ed., Table 9 note; common practice)
    pytest.param("875 G", "magnetic_field", 0.0875, id="gauss"),
    pytest.param("87.5 mT", "magnetic_field", 0.0875, id="millitesla"),
    pytest.param("1e11 cm^-3", "density", 1e17, id="per-cm3"),
    pytest.param("20 mm", "length", 0.02, id="mm"),
    pytest.param("2 %", "ratio", 0.02, id="percent"),
    pytest.param("15 eV", "energy", 15.0, id="eV"),
    pytest.param("1 mW/cm^2", "power_density", 10.0, id="mW/cm2 = 10 W/m2 (common practice)"),
    pytest.param("3 dB", "ratio", 10 ** 0.3, id="dB as power ratio"),
    pytest.param("90 deg", "angle", math.pi / 2, id="degrees"),
    pytest.param("1 Torr", "pressure", 101325 / 760, id="Torr = 101325/760 Pa (definition)"),
])
def test_parse_accepts(text, dimension, expected):
    assert parse_quantity(text, dimension) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("text, dimension, fragment", [
    ("2.45 Ghz", "frequency", "did you mean 'GHz'"),
    ("1.54e10 rad/s", "frequency", "angular frequency"),
    ("100 rpm", "frequency", "angular frequency"),
    ("75 mT", "length", "not a length"),
    ("12", "length", "no unit"),
    ("abc mm", "length", "no leading number"),
    ("-20 dB", "length", "dB is not a length"),
    ("nan GHz", "frequency", "no leading number"),
])
def test_parse_rejects_with_reason(text, dimension, fragment):
    with pytest.raises(UnitError, match=fragment):
        parse_quantity(text, dimension)


def test_scale_for_column_headers():
    assert scale_to_si("mm", "length") == pytest.approx(1e-3)
    assert scale_to_si("G", "magnetic_field") == pytest.approx(1e-4)
    with pytest.raises(UnitError):
        scale_to_si("degC", "temperature")  # offset unit: no pure scale factor
