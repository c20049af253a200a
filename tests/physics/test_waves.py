"""Unmagnetised EM wave and warm electrostatic waves.

Check values: NRL Plasma Formulary (2019) pp. 28-29 (3 figures: rel 5e-3); reference-values.md
section 1.4 (CODATA evaluations, "H"); PlasmaPy 2025.8 speeds; closed-form textbook limits
(Bellan 2006, ch. 4 and 6; Stix 1992, ch. 1-2; from memory) and identities of the trade
(v_phase v_group = c^2).
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import constants as codata

from rfcheck.physics import waves as wv
from rfcheck.physics.frequencies import (
    electron_plasma_frequency,
    ion_cyclotron_frequency,
    upper_hybrid_frequency,
)
from rfcheck.physics.species import parse_species

NRL = 5e-3
C = codata.c


@pytest.mark.parametrize(
    "t_ev, expected, rel",
    [
        pytest.param(1.0, 4.19e5, NRL, id="NRL v_Te = 4.19e7 T^1/2 cm/s"),
        pytest.param(5.0, 9.37769e5, 1e-5, id="5 eV: 9.37769e5 m/s (ref 1.4, CODATA)"),
        pytest.param(1000.0, 1.32621e7, 1e-5, id="1 keV: 1.32621e7 m/s (ref 1.4, CODATA)"),
    ],
)
def test_electron_thermal_speed_nrl_convention(t_ev, expected, rel):
    assert wv.thermal_speed(t_ev) == pytest.approx(expected, rel=rel)


def test_thermal_speed_matches_plasmapy_nrl_method():
    u = pytest.importorskip("astropy.units")
    speeds = pytest.importorskip("plasmapy.formulary.speeds")
    t = np.array([0.5, 3.0, 40.0, 500.0])
    kelvin = (t * u.eV).to(u.K, equivalencies=u.temperature_energy())
    ref = speeds.thermal_speed(kelvin, "e-", method="nrl").value
    assert wv.thermal_speed(t) == pytest.approx(ref, rel=1e-12)
    # ion: NRL v_Ti = 9.79e5 mu^-1/2 T^1/2 cm/s
    mu = parse_species("Ar+").mass_ratio_to_proton
    assert wv.thermal_speed(2.0, "Ar+") == pytest.approx(9.79e3 * (2.0 / mu) ** 0.5, rel=NRL)


@pytest.mark.parametrize("ion", ["H+", "D+", "He2+", "Ar+", "Xe+"])
def test_ion_acoustic_speed_nrl_and_plasmapy(ion):
    """NRL: C_s = 9.79e5 (gamma Z T_e / mu)^1/2 cm/s; PlasmaPy ion_sound_speed (k -> 0)."""
    sp = parse_species(ion)
    mu = sp.mass_ratio_to_proton
    nrl = 9.79e3 * (sp.charge_number * 10.0 / mu) ** 0.5  # m/s
    assert wv.ion_acoustic_speed(10.0, ion) == pytest.approx(nrl, rel=NRL)
    u = pytest.importorskip("astropy.units")
    speeds = pytest.importorskip("plasmapy.formulary.speeds")
    from plasmapy.particles import CustomParticle

    pinned = CustomParticle(mass=sp.mass * u.kg, charge=sp.charge * u.C)
    kelvin = u.temperature_energy()
    for t_e, t_i in ((10.0, 0.0), (3.0, 0.5)):
        ref = speeds.ion_sound_speed(
            T_e=(t_e * u.eV).to(u.K, equivalencies=kelvin),
            T_i=(t_i * u.eV).to(u.K, equivalencies=kelvin),
            ion=pinned,
            gamma_e=1,
            gamma_i=3,
        ).value
        assert wv.ion_acoustic_speed(t_e, ion, t_i) == pytest.approx(ref, rel=1e-10)


def test_em_wave_dispersion():
    n = 3e16
    f_pe = electron_plasma_frequency(n)
    assert wv.em_wave_frequency(0.0, n) == pytest.approx(f_pe, rel=1e-15)  # cutoff at k = 0
    k = np.array([1.0, 10.0, 1e3])
    f = wv.em_wave_frequency(k, n)
    assert 2 * np.pi * f / k == pytest.approx(wv.phase_velocity(f, n), rel=1e-12)  # w/k
    # group velocity = dw/dk (central difference)
    dk = 1e-6 * k
    dwdk = 2 * np.pi * (wv.em_wave_frequency(k + dk, n) - wv.em_wave_frequency(k - dk, n)) / (2 * dk)
    assert dwdk == pytest.approx(wv.group_velocity(f, n), rel=1e-6)
    assert np.isnan(wv.phase_velocity(0.5 * f_pe, n)) and np.isnan(wv.group_velocity(f_pe, n))
    assert wv.em_wave_frequency(1e6, 0.0) == pytest.approx(C * 1e6 / (2 * np.pi), rel=1e-15)  # vacuum


@settings(max_examples=60, deadline=None, derandomize=True, database=None)
@given(n=st.floats(1e12, 1e21), ratio=st.floats(1.0001, 1e4))
def test_phase_times_group_velocity_is_c_squared(n, ratio):
    """Fact of the trade: v_g < c < v_p and v_p v_g = c^2 for the unmagnetised EM wave."""
    f = ratio * electron_plasma_frequency(n)
    vp, vg = wv.phase_velocity(f, n), wv.group_velocity(f, n)
    assert vg < C < vp
    assert vp * vg == pytest.approx(C**2, rel=1e-12)


def test_bohm_gross_at_one_over_debye_length():
    """w^2 = w_pe^2 (1 + 3 k^2 lambda_D^2): at k = 1/lambda_D, f = 2 f_pe exactly."""
    n, t = 1e17, 5.0
    lambda_d = 7433.942 * (t / n) ** 0.5  # ref 1.1: 7.433942e2 (T/n)^1/2 cm with n in cm^-3 (CODATA)
    assert lambda_d == pytest.approx(5.25659e-5, rel=1e-5)  # ref 1.4 worked case
    f = wv.bohm_gross_frequency(1 / lambda_d, n, t)
    assert f == pytest.approx(2 * electron_plasma_frequency(n), rel=1e-6)
    assert wv.bohm_gross_frequency(0.0, n, t) == pytest.approx(electron_plasma_frequency(n), rel=1e-15)


def test_electrostatic_ion_cyclotron_limits():
    b, t_e = 0.05, 4.0
    f_ci = ion_cyclotron_frequency(b, "Ar+")
    assert wv.electrostatic_ion_cyclotron_frequency(0.0, b, t_e, "Ar+") == pytest.approx(f_ci, rel=1e-14)
    k = 1e4  # k v_s >> W_ci: ion acoustic limit
    v_s = wv.ion_acoustic_speed(t_e, "Ar+")
    f = wv.electrostatic_ion_cyclotron_frequency(k, b, t_e, "Ar+")
    assert f == pytest.approx(np.hypot(f_ci, k * v_s / (2 * np.pi)), rel=1e-14)
    assert f == pytest.approx(k * v_s / (2 * np.pi), rel=1e-3)


def test_upper_hybrid_oscillation():
    # cold limit is the upper-hybrid frequency; ref 1.4 2.45 GHz case: 3.74979e9 Hz
    assert wv.upper_hybrid_oscillation_frequency(0.0, 1e17, 0.0875) == pytest.approx(3.74979e9, rel=1e-5)
    assert wv.upper_hybrid_oscillation_frequency(500.0, 1e17, 0.0875) == pytest.approx(
        upper_hybrid_frequency(1e17, 0.0875), rel=1e-15
    )
    warm = wv.upper_hybrid_oscillation_frequency(1e3, 1e17, 0.0875, 5.0)
    extra = 3 * 1e6 * wv.thermal_speed(5.0) ** 2 / (2 * np.pi) ** 2
    assert warm**2 == pytest.approx(upper_hybrid_frequency(1e17, 0.0875) ** 2 + extra, rel=1e-12)
