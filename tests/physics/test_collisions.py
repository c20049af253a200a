"""Collision frequencies. Check values: NRL Plasma Formulary (2019) and reference-values.md
sections 1.4 and 8.2 (computed with the NRL forms, "H"/"M" as marked); CODATA (scipy)."""

from __future__ import annotations

import tomllib
from importlib import resources

import numpy as np
import pytest
from scipy import constants as codata

from rfcheck.physics import collisions as co

NRL = 5e-3

# ref 1.4 worked cases: n (m^-3), T_e (eV), lnL, nu_e (s^-1) -- NRL forms (H)
CASES = [
    pytest.param(1e17, 5.0, 12.750, 3.31853e5, id="2.45 GHz source (ref 1.4)"),
    pytest.param(2e17, 1000.0, 17.897, 3.29384e2, id="ECRIS 14.5 GHz (ref 1.4)"),
    pytest.param(3e17, 500.0, 17.001, 1.32750e3, id="ECRIS 18 GHz (ref 1.4)"),
    pytest.param(5e17, 1000.0, 17.439, 8.02380e2, id="ECRIS 28 GHz (ref 1.4)"),
    pytest.param(1e17, 3.0, 11.984, 6.71123e5, id="13.56 MHz ICP (ref 1.4)"),
    pytest.param(1e19, 4.0, 10.113, 3.67847e7, id="helicon (ref 1.4)"),
    pytest.param(1e20, 1e4, 17.092, 4.97384e3, id="tokamak (ref 1.4)"),
]


@pytest.mark.parametrize("n, t, ln_l, nu", CASES)
def test_coulomb_logarithm_and_electron_ion_rate(n, t, ln_l, nu):
    assert co.coulomb_logarithm(n, t) == pytest.approx(ln_l, abs=1e-3)
    assert co.electron_ion_collision_frequency(n, t) == pytest.approx(nu, rel=NRL)  # NRL 2.91e-6, 3 figures


def test_electron_ion_coefficient_is_the_nrl_one():
    """nu_e = 2.91e-6 n[cm^-3] lnL T^-3/2 (NRL) <=> tau_e = 3.44e5 T^3/2 / (n lnL) s (Braginskii)."""
    nu = co.electron_ion_collision_frequency(1e6, 1.0, coulomb_log=1.0)  # n = 1 cm^-3
    assert nu == pytest.approx(2.91e-6, rel=NRL)
    assert 1 / nu == pytest.approx(3.44e5, rel=NRL)
    # charge scaling at fixed n_e (n_i Z^2 = Z n_e) and the explicit log
    assert co.electron_ion_collision_frequency(1e18, 20.0, z=3, coulomb_log=10.0) == pytest.approx(
        3 * co.electron_ion_collision_frequency(1e18, 20.0, coulomb_log=10.0), rel=1e-15
    )


def test_coulomb_logarithm_regimes_join_at_ten_z_squared():
    """NRL: at T_e = 10 Z^2 eV the two fits differ by (1/2) ln 10 - 1 = 0.151 (a step of the fit)."""
    below, above = co.coulomb_logarithm(1e17, [9.999, 10.0])
    assert below - above == pytest.approx(-(1 - 0.5 * np.log(10)), abs=1e-3)


def test_electron_neutral_worked_example():
    """ref 8.2 (computed, M): sigma = 1e-19 m^2, p = 1 Pa, 300 K, T_e = 3 eV -> 2.80e7 s^-1."""
    assert co.neutral_density(1.0, 300.0) == pytest.approx(2.414e20, rel=1e-3)
    assert co.mean_electron_speed(3.0) == pytest.approx(1.159e6, rel=1e-3)
    nu = co.electron_neutral_collision_frequency("Ar", 1.0, 3.0, 300.0, cross_section=1e-19)
    assert nu == pytest.approx(2.80e7, rel=2e-3)


def test_neutral_density_is_loschmidt_at_stp():
    loschmidt = codata.physical_constants["Loschmidt constant (273.15 K, 101.325 kPa)"][0]
    assert co.neutral_density(101325.0, 273.15) == pytest.approx(loschmidt, rel=1e-9)


def test_gas_table_has_sources_and_sane_values():
    data = tomllib.loads(resources.files("rfcheck").joinpath("data/gases.toml").read_text())["gases"]
    assert set(co.known_gases()) == set(data) and {"Ar", "He", "N2"} <= set(data)
    for gas, entry in data.items():
        energy, sigma = np.array(entry["energy_ev"]), np.array(entry["cross_section_m2"])
        assert entry["source"] and entry["confidence"] in {"H", "M", "L"}, gas
        assert "from memory" in entry["source"] or entry["confidence"] == "H", gas
        assert energy.shape == sigma.shape and np.all(np.diff(energy) > 0), gas
        # momentum-transfer cross sections of these gases lie between 1e-21 and 1e-18 m^2 (common practice)
        assert np.all((sigma > 1e-21) & (sigma < 1e-18)), gas
        assert co.momentum_transfer_cross_section(gas, energy) == pytest.approx(sigma, rel=1e-12)


def test_cross_section_interpolation_and_errors():
    e = np.array([0.01, 3.0, 1e3])
    sigma = co.momentum_transfer_cross_section("Ar", e)
    table = tomllib.loads(resources.files("rfcheck").joinpath("data/gases.toml").read_text())["gases"]["Ar"]
    assert sigma[0] == table["cross_section_m2"][0] and sigma[-1] == table["cross_section_m2"][-1]  # held
    lo, hi = sorted(table["cross_section_m2"][2:4])
    assert lo <= sigma[1] <= hi  # between the 2 eV and 5 eV entries
    nu = co.electron_neutral_collision_frequency("Ar", 1.0, 3.0)
    assert nu == pytest.approx(co.neutral_density(1.0) * sigma[1] * co.mean_electron_speed(3.0), rel=1e-14)
    with pytest.raises(ValueError, match="no cross-section data for gas 'Unobtainium'"):
        co.electron_neutral_collision_frequency("Unobtainium", 1.0, 3.0)
