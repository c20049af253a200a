"""Waveguide modes and the line catalogue, against scikit-rf, EIA/IEC tables and closed forms."""

from __future__ import annotations

import math
import subprocess
import sys

import numpy as np
import pytest

skrf = pytest.importorskip("skrf")
from skrf.media import CircularWaveguide, RectangularWaveguide  # noqa: E402
from scipy.optimize import brentq  # noqa: E402
from scipy.special import jvp, yvp  # noqa: E402

from rfcheck.physics import waveguide as wg  # noqa: E402
from rfcheck.physics.constants import C  # noqa: E402

RECT_NAMES = [n for n in wg.line_names() if n.startswith("WR-")]


def _freq(f):
    return skrf.Frequency.from_f(np.atleast_1d(f), unit="Hz")


def test_catalogue_holds_the_eia_series():
    # EIA RS-261-B / IEC 60153-2 series from WR-2300 down to WR-28 (reference-values §3)
    for name in ["WR-2300", "WR-975", "WR-650", "WR-430", "WR-340", "WR-284", "WR-187",
                 "WR-137", "WR-90", "WR-62", "WR-42", "WR-28"]:
        assert name in RECT_NAMES
    assert RECT_NAMES[0] == "WR-2300" and RECT_NAMES[-1] == "WR-28"


@pytest.mark.parametrize("name", RECT_NAMES)
def test_wr_number_is_broad_wall_in_hundredths_of_an_inch(name):
    # naming rule of the EIA series (common practice; reference-values §3): WR-90 = 0.900 in;
    # the number is rounded (WR-187 = 1.872 in, WR-62 = 0.622 in), hence 0.5 %
    line = wg.line_from_name(name)
    assert line.dimension("a") == pytest.approx(int(name[3:]) / 100 * 25.4e-3, rel=5e-3)
    assert line.source and line.confidence in {"H", "M"}


@pytest.mark.parametrize("name", RECT_NAMES)
def test_te10_quantities_match_scikit_rf(name):
    # scikit-rf RectangularWaveguide with perfect walls (rho=0) as the reference
    line = wg.line_from_name(name)
    a, b = line.dimension("a"), line.dimension("b")
    lo, hi = line.catalogue_band
    f = np.linspace(lo, hi, 41)
    ref = RectangularWaveguide(_freq(f), a=a, b=b, rho=0)
    assert line.cutoff == pytest.approx(ref.f_cutoff, rel=1e-12)
    np.testing.assert_allclose(line.guide_wavelength(f), ref.lambda_guide, rtol=1e-10)
    np.testing.assert_allclose(line.wave_impedance(f), ref.z0_characteristic.real, rtol=1e-10)
    te20 = RectangularWaveguide(_freq(f), a=a, b=b, m=2, n=0, rho=0).f_cutoff
    te01 = RectangularWaveguide(_freq(f), a=a, b=b, m=0, n=1, rho=0).f_cutoff
    assert line.next_cutoff == pytest.approx(min(te20, te01), rel=1e-12)


# reference-values §3 table (EIA RS-261-B dimensions, c exact): TE10, TE20, TE01 in GHz
TABLE_3 = [
    ("WR-2300", "R3", 0.2566, 0.5132, 0.5132, 0.32, 0.49),
    ("WR-975", "R9", 0.6053, 1.2105, 1.2105, 0.75, 1.12),
    ("WR-650", "R14", 0.9079, 1.8158, 1.8158, 1.12, 1.70),
    ("WR-430", "R22", 1.3724, 2.7448, 2.7448, 1.70, 2.60),
    ("WR-340", "R26", 1.7357, 3.4714, 3.4714, 2.20, 3.30),
    ("WR-284", "R32", 2.0780, 4.1559, 4.4040, 2.60, 3.95),
    ("WR-187", "R48", 3.1525, 6.3049, 6.7677, 3.95, 5.85),
    ("WR-137", "R70", 4.3013, 8.6027, 9.4878, 5.85, 8.20),
    ("WR-90", "R100", 6.5571, 13.1143, 14.7536, 8.20, 12.40),
    ("WR-62", "R140", 9.4878, 18.9756, 18.9756, 12.40, 18.00),
    ("WR-42", "R220", 14.0510, 28.1020, 34.7143, 18.00, 26.50),
    ("WR-28", "R320", 21.0765, 42.1530, 42.1530, 26.50, 40.00),
]


@pytest.mark.parametrize("name, iec, te10, te20, te01, f_lo, f_hi", TABLE_3,
                         ids=[f"{r[0]} reference-values §3 (EIA RS-261-B, IEC 60153-2)" for r in TABLE_3])
def test_cutoffs_and_bands_match_eia_table(name, iec, te10, te20, te01, f_lo, f_hi):
    line = wg.line_from_name(name)
    a, b = line.dimension("a"), line.dimension("b")
    assert line.iec == iec
    # table values have 4-5 significant figures
    assert line.cutoff / 1e9 == pytest.approx(te10, abs=6e-5)
    assert float(wg.rectangular_cutoff(a, b, 2, 0)) / 1e9 == pytest.approx(te20, abs=6e-5)
    assert float(wg.rectangular_cutoff(a, b, 0, 1)) / 1e9 == pytest.approx(te01, abs=6e-5)
    assert line.catalogue_band == pytest.approx((f_lo * 1e9, f_hi * 1e9))
    assert line.next_cutoff / 1e9 == pytest.approx(min(te20, te01), abs=6e-5)


@pytest.mark.parametrize("name, iec, te10, te20, te01, f_lo, f_hi", TABLE_3,
                         ids=[f"{r[0]} band {r[5]}-{r[6]} GHz (EIA RS-261-B, IEC 60153-2)" for r in TABLE_3])
def test_recommended_band_is_the_published_band(name, iec, te10, te20, te01, f_lo, f_hi):
    """The recommended band of a standard guide is its EIA RS-261-B band (reference-values §3,
    H), not 1.25-1.9 f_c: WR-62 starts at 12.4 GHz = 1.307 f_c (1.25 f_c would be 11.86 GHz)."""
    line = wg.line_from_name(name)
    assert line.recommended_band == pytest.approx((f_lo * 1e9, f_hi * 1e9), rel=1e-12)
    assert line.band_basis == "EIA RS-261-B band"
    assert line.cutoff < line.recommended_band[0] < line.recommended_band[1] < line.next_cutoff


def test_wr62_band_is_not_a_multiple_of_the_cutoff():
    # EIA RS-261-B: WR-62 12.40-18.00 GHz; 1.25 f_c = 11.86 GHz would admit 12 GHz (reference-values §3)
    line = wg.line_from_name("WR-62")
    assert 1.25 * line.cutoff == pytest.approx(11.86e9, rel=1e-3)
    assert line.recommended_band[0] == 12.4e9


@pytest.mark.parametrize("name", RECT_NAMES)
def test_every_catalogue_band_is_its_tabulated_band_inside_single_mode(name):
    """Every rectangular entry of lines.toml (including the sizes beyond reference-values §3,
    confidence M) uses its tabulated band, which lies inside TE10-next-mode; its edges fall in
    the spread of the EIA table, 1.2-1.4 f_c and 1.8-1.95 f_c (reference-values §3)."""
    line = wg.line_from_name(name)
    lo, hi = line.recommended_band
    assert (lo, hi) == line.catalogue_band
    assert line.cutoff < lo < hi < line.next_cutoff
    assert 1.2 < lo / line.cutoff < 1.4 and 1.8 < hi / line.cutoff < 1.95


def test_rule_of_thumb_band_for_a_guide_without_a_table():
    # a user-defined 80 x 30 mm guide: 1.25 f_c ... min(1.9 f_c, 0.95 f_next) (common practice)
    line = wg.rectangular_guide(0.08, 0.03)
    lo, hi = line.recommended_band
    assert lo == pytest.approx(1.25 * line.cutoff, rel=1e-12)
    assert hi == pytest.approx(min(1.9 * line.cutoff, 0.95 * line.next_cutoff), rel=1e-12)
    assert line.band_basis == "1.25-1.9 f_c rule of thumb"
    with pytest.raises(ValueError, match="not inside its single-mode band"):
        wg.rectangular_guide(0.08, 0.03, catalogue_band=(1.5e9, 4.0e9))  # f_c = 1.87 GHz


@pytest.mark.parametrize("name, f, ratio, lam_g_mm, z_te", [
    pytest.param("WR-340", 2.45e9, 1.412, 173.38, 533.8, id="WR-340 @ 2.45 GHz, reference-values §3"),
    pytest.param("WR-284", 2.45e9, 1.179, 230.98, None, id="WR-284 @ 2.45 GHz, reference-values §3"),
    pytest.param("WR-430", 2.45e9, 1.785, None, None, id="WR-430 @ 2.45 GHz, reference-values §3"),
    pytest.param("WR-62", 14.5e9, 1.528, 27.34, None, id="WR-62 @ 14.5 GHz, reference-values §3"),
    pytest.param("WR-28", 28e9, 1.328, 16.26, None, id="WR-28 @ 28 GHz, reference-values §3"),
])
def test_worked_anchors(name, f, ratio, lam_g_mm, z_te):
    line = wg.line_from_name(name)
    assert line.normalised_frequency(f) == pytest.approx(ratio, abs=6e-4)
    if lam_g_mm is not None:
        assert line.guide_wavelength(f) * 1e3 == pytest.approx(lam_g_mm, abs=6e-3)
    if z_te is not None:
        assert line.wave_impedance(f) == pytest.approx(z_te, abs=0.06)


def test_wr284_at_2_45_ghz_is_below_its_recommended_band():
    # reference-values §3: 2.45 GHz in WR-284 is 1.179 f_c, below its EIA band (2.60-3.95 GHz)
    line = wg.line_from_name("WR-284")
    assert 2.45e9 < line.recommended_band[0] == 2.60e9
    assert line.cutoff < 2.45e9 < line.next_cutoff


def test_nan_below_cutoff_and_broadcasting():
    line = wg.line_from_name("WR-340")
    f = np.array([[1.0e9, 2.45e9], [1.7357e9, 3.0e9]])
    lam = line.guide_wavelength(f)
    z = line.wave_impedance(f)
    assert lam.shape == z.shape == f.shape
    assert np.isnan(lam[0, 0]) and np.isnan(z[0, 0]) and np.isnan(z[1, 0])
    assert np.all(np.isfinite(lam[:, 1]))
    # closed form λ_g = λ0/√(1 − (f_c/f)²) (Pozar §3.3)
    lam0 = C / 3.0e9
    assert lam[1, 1] == pytest.approx(lam0 / math.sqrt(1 - (line.cutoff / 3.0e9) ** 2), rel=1e-14)


@pytest.mark.parametrize("text, expected", [
    ("WR-340", "WR-340"), ("WR340", "WR-340"), ("wr 340", "WR-340"), ("R26", "WR-340"),
    ("r140", "WR-62"), ("WR-28", "WR-28"), ("free-space", "free-space"), ("Free space", "free-space"),
    ("EIA-1-5/8", "EIA-1-5/8"),
])
def test_line_from_name_accepts_common_spellings(text, expected):
    assert wg.line_from_name(text).name == expected


def test_unknown_line_lists_valid_choices():
    with pytest.raises(ValueError, match="WR-340") as err:
        wg.line_from_name("WR-341")
    assert "free-space" in str(err.value) and "circular" in str(err.value)
    with pytest.raises(ValueError):
        wg.line_from_name("circular:50 in")


@pytest.mark.parametrize("diameter_mm", [20.0, 50.0, 89.0])
def test_circular_guide_matches_scikit_rf(diameter_mm):
    # scikit-rf CircularWaveguide (rho=0): TE11 and TM01 cutoffs, λ_g and Z_TE of TE11
    line = wg.line_from_name(f"circular:{diameter_mm:g} mm")
    r = diameter_mm * 1e-3 / 2
    f = np.linspace(1.05, 1.3, 11) * line.cutoff
    te11 = CircularWaveguide(_freq(f), r=r, mode_type="te", m=1, n=1, rho=0)
    tm01 = CircularWaveguide(_freq(f), r=r, mode_type="tm", m=0, n=1, rho=0)
    assert line.kind == "circular" and line.dominant_mode == "TE11"
    assert line.cutoff == pytest.approx(te11.f_cutoff, rel=1e-12)
    assert line.next_cutoff == pytest.approx(tm01.f_cutoff, rel=1e-12)
    np.testing.assert_allclose(line.guide_wavelength(f), te11.lambda_guide, rtol=1e-10)
    np.testing.assert_allclose(line.wave_impedance(f), te11.z0_characteristic.real, rtol=1e-10)


def test_circular_mode_order_matches_bessel_zero_table():
    # Pozar tables 3.3/3.4 (from memory): p'11 = 1.841, p01 = 2.405, p'21 = 3.054,
    # p'01 = p11 = 3.832, p'31 = 4.201
    r = 0.02
    modes = wg.circular_mode_cutoffs(r, 6)
    labels = [m for m, _ in modes]
    assert labels == ["TE11", "TM01", "TE21", "TE01", "TM11", "TE31"]
    p = [fc * 2 * math.pi * r / C for _, fc in modes]
    np.testing.assert_allclose(p, [1.841, 2.405, 3.054, 3.832, 3.832, 4.201], atol=6e-4)


def test_rectangular_mode_order_wr284():
    # WR-284 from reference-values §3: TE10 2.0780, TE20 4.1559, TE01 4.4040 GHz
    line = wg.line_from_name("WR-284")
    modes = wg.rectangular_mode_cutoffs(line.dimension("a"), line.dimension("b"), 3)
    assert [m for m, _ in modes] == ["TE10", "TE20", "TE01"]
    np.testing.assert_allclose([fc / 1e9 for _, fc in modes], [2.0780, 4.1559, 4.4040], atol=6e-5)


def _coax_te11_exact(a, b):
    """Smallest root of J1'(k a) Y1'(k b) − J1'(k b) Y1'(k a) = 0 (Marcuvitz §2.4), rad/m."""
    g = lambda k: jvp(1, k * a) * yvp(1, k * b) - jvp(1, k * b) * yvp(1, k * a)  # noqa: E731
    k_guess = 2.0 / (a + b)
    return brentq(g, 0.7 * k_guess, 1.2 * k_guess)


@pytest.mark.parametrize("ratio", [1.5, 2.3, 3.6])
def test_coax_te11_approximation_against_exact_root(ratio):
    # Pozar §3.5: k_c ≈ 2/(a+b); the exact root of the Bessel cross-product equation
    # (scipy.special) differs by a few per cent for D/d up to ~4
    d, big_d = 10e-3, 10e-3 * ratio
    exact = _coax_te11_exact(d / 2, big_d / 2) * C / (2 * math.pi)
    approx = float(wg.coaxial_te11_cutoff(d, big_d))
    assert approx == pytest.approx(exact, rel=0.04)
    assert approx <= exact  # the mean-circumference estimate errs low (conservative ceiling)


def test_coax_line_and_characteristic_impedance():
    # 50-ohm air line: D/d = exp(50·2π/η0) ≈ 2.303 (Pozar §2.2 closed form)
    line = wg.line_from_name("EIA-3-1/8")
    d, big_d = line.dimension("inner_diameter"), line.dimension("outer_diameter")
    assert float(wg.coaxial_characteristic_impedance(d, big_d)) == pytest.approx(50.0, abs=0.3)
    ref = skrf.media.Coaxial(_freq([1e8]), Dint=d, Dout=big_d, epsilon_r=1, tan_delta=0, sigma=1e30)
    assert float(wg.coaxial_characteristic_impedance(d, big_d)) == pytest.approx(
        ref.z0_characteristic.real[0], rel=1e-6)
    assert line.kind == "coaxial" and line.cutoff == 0.0 and line.dominant_mode == "TEM"
    assert line.next_cutoff == pytest.approx(2 * C / (math.pi * (d + big_d)), rel=1e-14)
    assert line.wave_impedance(1e8) == pytest.approx(376.730313, rel=1e-8)  # η0, CODATA


def test_free_space_line():
    line = wg.free_space()
    assert line.kind == "free-space" and line.cutoff == 0.0 and line.next_cutoff == math.inf
    assert line.guide_wavelength(170e9) == pytest.approx(C / 170e9, rel=1e-15)
    # reference-values §1.3: λ0 = 1.7635 mm at 170 GHz
    assert line.guide_wavelength(170e9) * 1e3 == pytest.approx(1.7635, abs=1e-4)


def test_import_is_light_and_catalogue_lazy():
    code = ("import sys, rfcheck.physics.waveguide as w; "
            "print('scipy.special' in sys.modules, w._catalogue.cache_info().currsize)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.split() == ["False", "0"]
