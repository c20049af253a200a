"""Characteristic frequencies, cutoff/resonance densities and fields.

Check values: NRL Plasma Formulary (2019) pp. 28-29 (3 significant figures: rel 5e-3);
reference-values.md sections 1.1-1.4 and 2.4 (CODATA evaluations, "H"); PlasmaPy 2025.8.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from rfcheck.physics import frequencies as fr
from rfcheck.physics.coldplasma import stix
from rfcheck.physics.constants import E_CHARGE, EPS0, M_E, M_P
from rfcheck.physics.species import as_species, parse_species

NRL = 5e-3  # NRL Formulary coefficients carry 3 significant figures
CM3 = 1e6  # m^-3 per cm^-3
GAUSS = 1e-4  # T per gauss


# --------------------------------------------------------------------------- NRL Formulary


def test_nrl_formulary_coefficients():
    n_cc, b_gauss, t_mu = 1e12, 1e3, parse_species("Ar+").mass_ratio_to_proton
    n, b = n_cc * CM3, b_gauss * GAUSS
    # f_pe = 8.98e3 n^1/2 Hz; f_ce = 2.80e6 B Hz; f_ci = 1.52e3 Z mu^-1 B Hz;
    # f_pi = 2.10e2 Z mu^-1/2 n_i^1/2 Hz
    assert fr.electron_plasma_frequency(n) == pytest.approx(8.98e3 * n_cc**0.5, rel=NRL)
    assert fr.electron_cyclotron_frequency(b) == pytest.approx(2.80e6 * b_gauss, rel=NRL)
    assert fr.ion_cyclotron_frequency(b, "Ar+") == pytest.approx(1.52e3 / t_mu * b_gauss, rel=NRL)
    assert fr.ion_plasma_frequency(n, "Ar+") == pytest.approx(2.10e2 * t_mu**-0.5 * n_cc**0.5, rel=NRL)
    # Z scaling: f_ci ~ Z, f_pi ~ Z at fixed n_i (Ar8+ vs Ar+; masses differ by 7 m_e)
    ratio = parse_species("Ar+").mass / parse_species("Ar8+").mass
    f_ar1 = fr.ion_cyclotron_frequency(b, "Ar+")
    assert fr.ion_cyclotron_frequency(b, "Ar8+") == pytest.approx(8 * ratio * f_ar1)


@pytest.mark.parametrize(
    "func, args, expected",
    [
        pytest.param(fr.electron_cyclotron_frequency, (1.0,), 27.99249e9,
                     id="f_ce = 27.99249 GHz/T (CODATA, ref 1.1)"),
        pytest.param(fr.electron_plasma_frequency, (1.0,), 8.978663,
                     id="f_pe = 8.978663 sqrt(n) Hz (CODATA, ref 1.1)"),
        pytest.param(fr.ion_cyclotron_frequency, (1.0, "H+"), 15.24519e6,
                     id="f_ci(p) = 15.24519 MHz/T (CODATA, ref 1.1)"),
        pytest.param(fr.ion_plasma_frequency, (1.0, "H+"), 0.2095353,
                     id="f_pi(p) = 0.2095353 sqrt(n) Hz (CODATA, ref 1.1)"),
        pytest.param(fr.critical_density, (1.0,), 1.240443e-2, id="n_c = 1.240443e-2 f^2, f in Hz (ref 1.2)"),
    ],
)
def test_codata_coefficients(func, args, expected):
    assert func(*args) == pytest.approx(expected, rel=5e-7)  # 7 figures quoted


def test_critical_density_unit_trap():
    """n_c[cm^-3] = 1.24e4 f^2 holds with f in MHz, not Hz (ref 1.2 correction)."""
    f_mhz = 2450.0
    n_c_cm3 = fr.critical_density(f_mhz * 1e6) / CM3
    assert n_c_cm3 == pytest.approx(1.240443e4 * f_mhz**2, rel=1e-6)
    assert n_c_cm3 != pytest.approx(1.240443e4 * (f_mhz * 1e6) ** 2, rel=0.5)


# --------------------------------------------------------------------------- worked tables

# ref 1.3: f, B_ECR (T), B at 2nd harmonic (T), n_c (m^-3) -- CODATA evaluations (H)
ECR_TABLE = [
    (13.56e6, 4.84416e-4, 2.42208e-4, 2.28085e12),
    (915e6, 0.0326873, 0.0163437, 1.03853e16),
    (2.45e9, 0.0875235, 0.0437617, 7.44576e16),
    (14.5e9, 0.517996, 0.258998, 2.60803e18),
    (18e9, 0.643030, 0.321515, 4.01903e18),
    (28e9, 1.00027, 0.500134, 9.72507e18),
    (140e9, 5.00134, 2.50067, 2.43127e20),
    (170e9, 6.07306, 3.03653, 3.58488e20),
]


@pytest.mark.parametrize("f, b1, b2, n_c", [pytest.param(*r, id=f"ref 1.3 {r[0]:.4g} Hz") for r in ECR_TABLE])
def test_ecr_field_and_critical_density_table(f, b1, b2, n_c):
    assert fr.ecr_field(f) == pytest.approx(b1, rel=1e-5)
    assert fr.ecr_field(f, harmonic=2) == pytest.approx(b2, rel=1e-5)
    assert fr.critical_density(f) == pytest.approx(n_c, rel=1e-5)


@pytest.mark.parametrize(
    "f, energy, expected",
    [
        pytest.param(2.45e9, 10e3, 89.24e-3, id="2.45 GHz, 10 keV -> 89.24 mT (ref 1.3)"),
        pytest.param(28e9, 10e3, 1.0198, id="28 GHz, 10 keV -> 1.0198 T (ref 1.3)"),
        pytest.param(2.45e9, 510998.95, 2 * 0.0875235, id="E_k = m_e c^2 doubles B (ref 1.3)"),
    ],
)
def test_relativistic_ecr_shift(f, energy, expected):
    assert fr.ecr_field(f, kinetic_energy_ev=energy) == pytest.approx(expected, rel=1e-4)


# ref 1.4: n, B, f_pe, f_ce, f_UH, f_LH(H+) -- CODATA evaluations (H)
PLASMA_CASES = [
    pytest.param(1e17, 0.0875, 2.83930e9, 2.44934e9, 3.74979e9, 4.32850e7, id="2.45 GHz source (ref 1.4)"),
    pytest.param(2e17, 0.52, 4.01538e9, 1.45561e10, 1.50998e10, 9.06328e7, id="ECRIS 14.5 GHz (ref 1.4)"),
    pytest.param(3e17, 0.6431, 4.91782e9, 1.80020e10, 1.86616e10, 1.11086e8, id="ECRIS 18 GHz (ref 1.4)"),
    pytest.param(5e17, 1.0, 6.34887e9, 2.79925e10, 2.87034e10, 1.45219e8, id="ECRIS 28 GHz (ref 1.4)"),
    pytest.param(1e19, 0.05, 2.83930e10, 1.39962e9, 2.84275e10, 3.26235e7, id="helicon (ref 1.4)"),
    pytest.param(1e20, 5.3, 8.97866e10, 1.48360e11, 1.73414e11, 1.79361e9, id="tokamak (ref 1.4)"),
]


@pytest.mark.parametrize("n, b, f_pe, f_ce, f_uh, f_lh", PLASMA_CASES)
def test_worked_plasma_parameter_cases(n, b, f_pe, f_ce, f_uh, f_lh):
    assert fr.electron_plasma_frequency(n) == pytest.approx(f_pe, rel=1e-5)
    assert fr.electron_cyclotron_frequency(b) == pytest.approx(f_ce, rel=1e-5)
    assert fr.upper_hybrid_frequency(n, b) == pytest.approx(f_uh, rel=1e-5)
    # ref 1.4 tabulates 1/w_LH^2 = 1/(W_ci^2 + w_pi^2) + 1/(W_ci w_ce), which drops terms of
    # order m_e/m_p = 5.45e-4 (CODATA); the exact root of S = 0 returned here lies above it
    # by 0 to 5.3e-4 (measured 3.0e-4, 5.2e-4, 5.2e-4, 5.3e-4, 1e-6, 4.5e-4 for these rows)
    ratio = fr.lower_hybrid_frequency(n, b, "H+") / f_lh
    assert 1 - 1e-5 <= ratio <= 1 + M_E / M_P


def _stix_s_terms(f, n, b, ion):
    """The three terms of S = 1 - w_pe^2/(w^2 - w_ce^2) - w_pi^2/(w^2 - W_ci^2) (Stix 1992, ch. 1),
    written out here from the definition (electrons and one ion species, n_i = n_e/Z)."""
    sp = as_species(ion)
    z = abs(sp.charge_number)
    w = 2 * np.pi * f
    w_ce, w_ci = E_CHARGE * b / M_E, z * E_CHARGE * b / sp.mass
    w_pe2, w_pi2 = n * E_CHARGE**2 / (EPS0 * M_E), (n / z) * (z * E_CHARGE) ** 2 / (EPS0 * sp.mass)
    return 1.0, -w_pe2 / (w**2 - w_ce**2), -w_pi2 / (w**2 - w_ci**2)


@pytest.mark.parametrize("ion", ["H+", "D+", "He+", "Ar+", "Ar8+"])
@pytest.mark.parametrize("n, b", [(1e14, 0.1), (1e17, 0.0875), (1e19, 0.05), (1e20, 5.3), (1e21, 1.0)])
def test_lower_hybrid_is_a_root_of_stix_s(ion, n, b):
    """S(f_LH) = 0 to rounding, from the written-out S and from coldplasma.stix."""
    f_lh = fr.lower_hybrid_frequency(n, b, ion)
    terms = _stix_s_terms(f_lh, n, b, ion)
    assert abs(sum(terms)) <= 1e-11 * sum(abs(t) for t in terms)
    s = stix(f_lh, b, n, ions=ion).S
    assert abs(s) <= 1e-9 * sum(abs(t) for t in terms)
    # the lower of the two roots: between the ion cyclotron and the upper-hybrid frequency
    assert fr.ion_cyclotron_frequency(b, ion) < f_lh < fr.upper_hybrid_frequency(n, b)


def test_lower_hybrid_limits():
    # n_e -> 0: the lower root of S = 0 is the ion cyclotron frequency (Stix 1992, ch. 1)
    assert fr.lower_hybrid_frequency(1e-3, 1.0, "D+") == pytest.approx(
        fr.ion_cyclotron_frequency(1.0, "D+"), rel=1e-12)
    # dense plasma, w_pe >> w_ce: sqrt(W_ci w_ce) to O(w_ce^2/w_pe^2 + m_e/m_i) (Stix 1992, ch. 2)
    n, b = 1e22, 0.1
    dense = np.sqrt(fr.ion_cyclotron_frequency(b, "H+") * fr.electron_cyclotron_frequency(b))
    assert fr.lower_hybrid_frequency(n, b, "H+") == pytest.approx(dense, rel=2e-3)


def test_ion_frequencies_of_the_2_45_ghz_case():
    assert fr.ion_cyclotron_frequency(0.0875, "H+") == pytest.approx(1.33395e6, rel=1e-5)  # ref 1.4
    assert fr.ion_plasma_frequency(1e17, "H+") == pytest.approx(6.62609e7, rel=1e-5)  # ref 1.4
    assert fr.lower_hybrid_frequency(1e17, 0.0, "H+") == 0.0


@pytest.mark.parametrize(
    "n, b, f_r, f_l, f_uh",
    [
        pytest.param(3e16, 0.1, 3.49186e9, 6.92609e8, 3.20223e9, id="n=3e16, B=0.1 T (ref 2.4)"),
        pytest.param(3e16, 0.06, 2.60718e9, 9.27628e8, 2.28897e9, id="n=3e16, B=0.06 T (ref 2.4)"),
    ],
)
def test_cutoff_frequencies(n, b, f_r, f_l, f_uh):
    assert fr.r_cutoff_frequency(n, b) == pytest.approx(f_r, rel=1e-5)
    assert fr.l_cutoff_frequency(n, b) == pytest.approx(f_l, rel=1e-5)
    assert fr.upper_hybrid_frequency(n, b) == pytest.approx(f_uh, rel=1e-5)


def test_cutoff_and_resonance_densities_at_2_45_ghz():
    # ref 2.4, B = 0.06 T: R cutoff 2.34146e16, UHR 3.94661e16, L cutoff 1.25500e17 m^-3
    assert fr.r_cutoff_density(2.45e9, 0.06) == pytest.approx(2.34146e16, rel=1e-5)
    assert fr.upper_hybrid_density(2.45e9, 0.06) == pytest.approx(3.94661e16, rel=1e-5)
    assert fr.l_cutoff_density(2.45e9, 0.06) == pytest.approx(1.25500e17, rel=1e-5)
    # 140 GHz X2 cutoff at half the critical density (second harmonic, Y = 1/2): 1.216e20 (ref 1.3, M)
    assert fr.r_cutoff_density(140e9, fr.ecr_field(140e9, 2)) == pytest.approx(1.216e20, rel=1e-3)


def test_nonexistent_layers_are_nan():
    b_high = 1.5 * fr.ecr_field(2.45e9)  # Y > 1: no R cutoff, no upper-hybrid layer
    assert np.isnan(fr.r_cutoff_density(2.45e9, b_high))
    assert np.isnan(fr.upper_hybrid_density(2.45e9, b_high))
    out = fr.r_cutoff_density(2.45e9, np.array([0.05, 0.2]))
    assert np.isfinite(out[0]) and np.isnan(out[1])


def test_ion_cyclotron_field():
    # W_ci = Z e B / m_i: inverse of ion_cyclotron_frequency (definition, common practice)
    for ion in ("H+", "D+", "Ar8+"):
        b = fr.ion_cyclotron_field(13.56e6, ion)
        assert fr.ion_cyclotron_frequency(b, ion) == pytest.approx(13.56e6, rel=1e-14)
        assert fr.ion_cyclotron_field(13.56e6, ion, harmonic=2) == pytest.approx(b / 2, rel=1e-15)
    assert fr.ion_cyclotron_field(1.52e7, "H+") == pytest.approx(1.0, rel=NRL)  # NRL 1.52e3 Hz/G
    with pytest.raises(ValueError, match="neutral"):
        fr.ion_cyclotron_field(1e6, "Ar")


# --------------------------------------------------------------------------- PlasmaPy


@pytest.fixture(scope="module")
def plasmapy_frequencies():
    return pytest.importorskip("plasmapy.formulary.frequencies")


def test_frequencies_match_plasmapy_at_random_points(plasmapy_frequencies):
    u = pytest.importorskip("astropy.units")
    from plasmapy.particles import CustomParticle

    pf = plasmapy_frequencies
    rng = np.random.default_rng(20240601)
    n = 10 ** rng.uniform(12, 21, 10_000)
    b = rng.uniform(0.0, 10.0, 10_000)
    to_hz = 1 / (2 * np.pi)
    assert fr.electron_plasma_frequency(n) == pytest.approx(
        pf.plasma_frequency(n * u.m**-3, "e-").value * to_hz, rel=1e-13
    )
    ref_ce = pf.gyrofrequency(b * u.T, "e-").value * to_hz
    assert fr.electron_cyclotron_frequency(b) == pytest.approx(ref_ce, rel=1e-13)
    assert fr.upper_hybrid_frequency(n, b) == pytest.approx(
        pf.upper_hybrid_frequency(b * u.T, n * u.m**-3).value * to_hz, rel=1e-13
    )
    for name in ("H+", "D+", "Ar+", "O3+"):
        sp = parse_species(name)
        ion = CustomParticle(mass=sp.mass * u.kg, charge=sp.charge * u.C)  # same mass both sides
        ref_ci = pf.gyrofrequency(b * u.T, ion).value * to_hz
        ref_pi = pf.plasma_frequency(n * u.m**-3, ion).value * to_hz
        assert fr.ion_cyclotron_frequency(b, sp) == pytest.approx(ref_ci, rel=1e-13)
        assert fr.ion_plasma_frequency(n, sp) == pytest.approx(ref_pi, rel=1e-13)


def test_lower_hybrid_dense_limit_matches_plasmapy(plasmapy_frequencies):
    """PlasmaPy's lower_hybrid_frequency is the approximate form without W_ci^2 beside w_pi^2:
    it agrees with the exact root of S = 0 to (W_ci/w_pi)^2 plus the O(m_e/m_p) terms the
    approximate form drops (m_e/m_p = 5.45e-4, CODATA)."""
    u = pytest.importorskip("astropy.units")
    rng = np.random.default_rng(7)
    n = 10 ** rng.uniform(16, 21, 500)
    b = rng.uniform(0.01, 5.0, 500)
    ours = fr.lower_hybrid_frequency(n, b, "H+")
    ref = plasmapy_frequencies.lower_hybrid_frequency(b * u.T, n * u.m**-3, "p+").value / (2 * np.pi)
    bound = (fr.ion_cyclotron_frequency(b, "H+") / fr.ion_plasma_frequency(n, "H+")) ** 2
    assert np.all(np.abs(ours / ref - 1) <= bound + M_E / M_P)


# --------------------------------------------------------------------------- identities, properties


def test_cutoff_frequency_identities():
    rng = np.random.default_rng(3)
    n, b = 10 ** rng.uniform(12, 21, 200), rng.uniform(0, 10, 200)
    f_r, f_l = fr.r_cutoff_frequency(n, b), fr.l_cutoff_frequency(n, b)
    assert f_r * f_l == pytest.approx(fr.electron_plasma_frequency(n) ** 2, rel=1e-14)  # R L = w_pe^2
    assert f_r - f_l == pytest.approx(fr.electron_cyclotron_frequency(b), rel=1e-9)  # f_R - f_L = f_ce
    f = 10 ** rng.uniform(8, 11, 200)
    y = fr.electron_cyclotron_frequency(b) / f
    ok = y < 1
    # at the R-cutoff density, the R-cutoff frequency equals f (electron only)
    assert fr.r_cutoff_frequency(fr.r_cutoff_density(f[ok], b[ok]), b[ok]) == pytest.approx(f[ok], rel=1e-10)
    assert fr.l_cutoff_frequency(fr.l_cutoff_density(f, b), b) == pytest.approx(f, rel=1e-10)
    n_uh = fr.upper_hybrid_density(f[ok], b[ok])
    assert fr.upper_hybrid_frequency(n_uh, b[ok]) == pytest.approx(f[ok], rel=1e-10)


@settings(max_examples=50, deadline=None, derandomize=True, database=None)
@given(n=st.floats(1e12, 1e21), scale=st.floats(0.01, 100.0))
def test_plasma_frequency_scales_as_sqrt_density(n, scale):
    expected = np.sqrt(scale) * fr.electron_plasma_frequency(n)
    assert fr.electron_plasma_frequency(n * scale) == pytest.approx(expected, rel=1e-13)


@settings(max_examples=50, deadline=None, derandomize=True, database=None)
@given(f=st.floats(1e7, 2e11), y=st.floats(0.0, 0.99), scale=st.floats(0.1, 10.0))
def test_cutoff_densities_scale_as_frequency_squared(f, y, scale):
    """At fixed Y (B scaled with f) every cutoff/resonance density scales as f^2."""
    b = y * fr.ecr_field(f)
    for func in (fr.r_cutoff_density, fr.l_cutoff_density, fr.upper_hybrid_density):
        assert func(scale * f, scale * b) == pytest.approx(scale**2 * func(f, b), rel=1e-12)
    assert fr.critical_density(scale * f) == pytest.approx(scale**2 * fr.critical_density(f), rel=1e-13)
