"""Multilayer windows against scikit-rf cascades and closed-form slab results."""

from __future__ import annotations

import math

import numpy as np
import pytest

skrf = pytest.importorskip("skrf")
from skrf.media import Freespace, RectangularWaveguide  # noqa: E402
from skrf.network import cascade_list  # noqa: E402

from rfcheck.physics import multilayer as ml  # noqa: E402
from rfcheck.physics import waveguide as wg  # noqa: E402
from rfcheck.physics.constants import C  # noqa: E402

TOL_SKRF = 1e-9  # |Γ| agreement required against scikit-rf (issue 5)


# --------------------------------------------------------------------------------------
# scikit-rf reference: cascade of line sections, travelling-wave S, lengths in metres
# --------------------------------------------------------------------------------------
def _skrf_stack(f, layers, medium_for_layer, z0_ref):
    nets = [medium_for_layer(layer).line(float(layer.thickness), unit="m", s_def="traveling")
            for layer in layers]
    net = cascade_list(nets) if len(nets) > 1 else nets[0]
    net.renormalize(z0_ref, s_def="traveling")
    return net.s[:, 0, 0], net.s[:, 1, 0]


def _skrf_guide(f, layers, a, b):
    freq = skrf.Frequency.from_f(f, unit="Hz")
    empty = RectangularWaveguide(freq, a=a, b=b, rho=0)
    return _skrf_stack(f, layers, lambda L: RectangularWaveguide(
        freq, a=a, b=b, ep_r=L.eps_r * (1 - 1j * L.tan_delta), rho=0), empty.z0_characteristic)


def _skrf_free_space(f, layers):
    freq = skrf.Frequency.from_f(f, unit="Hz")
    vacuum = Freespace(freq)
    return _skrf_stack(f, layers, lambda L: Freespace(freq, ep_r=L.eps_r, ep_loss_tan=L.tan_delta),
                       vacuum.z0_characteristic)


def _random_stack(rng, lam_ref):
    n = int(rng.integers(1, 5))
    layers = []
    for _ in range(n):
        eps = float(rng.uniform(1.5, 12.0))
        tand = 0.0 if rng.random() < 0.25 else float(10 ** rng.uniform(-5, -1.5))
        d = float(rng.uniform(0.02, 1.2)) * lam_ref / math.sqrt(eps)
        layers.append(ml.Layer(eps, tand, d))
    return layers


@pytest.mark.parametrize("name, seed", [("WR-340", 340), ("WR-62", 62)])
def test_random_windows_in_guide_match_scikit_rf(name, seed):
    # scikit-rf RectangularWaveguide sections (rho=0, s_def="traveling", unit="m"), cascaded
    line = wg.line_from_name(name)
    a, b = line.dimension("a"), line.dimension("b")
    f = np.linspace(*line.catalogue_band, 201)
    rng = np.random.default_rng(seed)
    worst = 0.0
    for _ in range(25):
        layers = _random_stack(rng, C / f.mean())
        s11, s21 = _skrf_guide(f, layers, a, b)
        r = ml.window_response(f, layers, ml.te10_embedding(a))
        worst = max(worst, float(np.max(np.abs(np.abs(r.gamma) - np.abs(s11)))))
        np.testing.assert_allclose(r.gamma, s11, rtol=0, atol=TOL_SKRF)
        np.testing.assert_allclose(r.transmission, s21, rtol=0, atol=TOL_SKRF)
    assert worst <= TOL_SKRF


def test_random_windows_in_free_space_match_scikit_rf():
    # scikit-rf Freespace sections with ep_loss_tan (same ε(1 − j tanδ) convention)
    f = np.linspace(2e9, 40e9, 201)
    rng = np.random.default_rng(2024)
    worst = 0.0
    for _ in range(25):
        layers = _random_stack(rng, C / 10e9)
        s11, s21 = _skrf_free_space(f, layers)
        r = ml.window_response(f, layers)
        worst = max(worst, float(np.max(np.abs(np.abs(r.gamma) - np.abs(s11)))))
        np.testing.assert_allclose(r.gamma, s11, rtol=0, atol=TOL_SKRF)
        np.testing.assert_allclose(r.transmission, s21, rtol=0, atol=TOL_SKRF)
    assert worst <= TOL_SKRF


@pytest.mark.parametrize("pol", ["TE", "TM"])
@pytest.mark.parametrize("angle_deg", [15.0, 40.0, 65.0])
def test_oblique_incidence_matches_guide_mode_in_scikit_rf(pol, angle_deg):
    # A plane wave at angle θ and a guide mode with cutoff wavenumber k_c = k0 sinθ obey the
    # same transmission-line model per layer (γ = √(k_c² − k0²ε), Z_TE = jωμ/γ,
    # Z_TM = γ/(jωε); Pozar §3.3 plane-wave picture of TE10). scikit-rf reference per
    # frequency: TE10 with a = π/k_c, TM11 in a square guide with a = b = √2 π/k_c.
    rng = np.random.default_rng(int(angle_deg))
    theta = math.radians(angle_deg)
    for f0 in (3e9, 28e9):
        kc = 2 * math.pi * f0 / C * math.sin(theta)
        if pol == "TE":
            geom = dict(a=math.pi / kc, b=0.5 * math.pi / kc, mode_type="te", m=1, n=0)
        else:
            side = math.sqrt(2) * math.pi / kc
            geom = dict(a=side, b=side, mode_type="tm", m=1, n=1, model="marcuvitz")
        layers = _random_stack(rng, C / f0)
        freq = skrf.Frequency.from_f([f0], unit="Hz")
        empty = RectangularWaveguide(freq, rho=0, **geom)
        assert empty.f_cutoff == pytest.approx(f0 * math.sin(theta), rel=1e-12)
        s11, s21 = _skrf_stack([f0], layers, lambda L: RectangularWaveguide(
            freq, ep_r=L.eps_r * (1 - 1j * L.tan_delta), rho=0, **geom), empty.z0_characteristic)
        r = ml.window_response(f0, layers, ml.plane_wave_embedding(theta, pol))
        assert abs(r.gamma - s11[0]) <= TOL_SKRF
        assert abs(r.transmission - s21[0]) <= TOL_SKRF


@pytest.mark.parametrize("cutoff", [0.0, 1.7357e9], ids=["free space", "TE10 of WR-340"])
def test_random_stack_against_mpmath_40_digits(cutoff):
    # the same characteristic-matrix product evaluated in 40-digit arithmetic (mpmath)
    mp = pytest.importorskip("mpmath")
    mp.mp.dps = 40
    rng = np.random.default_rng(7)
    f = np.array([2.2e9, 2.9e9, 3.3e9, 9.7e9])
    emb = ml.Embedding(cutoff=cutoff)
    for _ in range(5):
        layers = _random_stack(rng, C / 3e9)
        ours = ml.window_response(f, layers, emb).gamma
        for fi, g in zip(f, ours):
            k0 = 2 * mp.pi * mp.mpf(fi) / mp.mpf(C)
            kc = 2 * mp.pi * mp.mpf(cutoff) / mp.mpf(C)
            z_emb = k0 / mp.sqrt(k0 ** 2 - kc ** 2)
            m = mp.eye(2)
            for layer in layers:
                eps = mp.mpf(layer.eps_r) * (1 - 1j * mp.mpf(layer.tan_delta))
                gam = mp.sqrt(kc ** 2 - k0 ** 2 * eps)
                z = 1j * k0 / gam
                gd = gam * mp.mpf(layer.thickness)
                m = m * mp.matrix([[mp.cosh(gd), z * mp.sinh(gd)], [mp.sinh(gd) / z, mp.cosh(gd)]])
            a, b, c, d = m[0, 0], m[0, 1], m[1, 0], m[1, 1]
            ref = (a * z_emb + b - c * z_emb ** 2 - d * z_emb) / (a * z_emb + b + c * z_emb ** 2 + d * z_emb)
            assert abs(g - complex(ref)) < 1e-12


# --------------------------------------------------------------------------------------
# closed forms
# --------------------------------------------------------------------------------------
@pytest.mark.parametrize("eps, tand", [(9.8, 0.0), (3.8, 1e-3), (5.67, 2e-2)])
def test_single_slab_matches_airy_fabry_perot(eps, tand):
    # Airy formula (Born & Wolf §7.6.1): Γ = r(1 − e^{−2jδ})/(1 − r² e^{−2jδ}),
    # t = (1 − r²) e^{−jδ}/(1 − r² e^{−2jδ}), r = (1 − n)/(1 + n), δ = k0 n d, n = √ε
    f = np.linspace(1e9, 30e9, 301)
    d = 7.3e-3
    n = np.sqrt(eps * (1 - 1j * tand))
    r = (1 - n) / (1 + n)
    one_way = np.exp(-1j * (2 * np.pi * f / C) * n * d)
    ph = one_way * one_way
    gamma = r * (1 - ph) / (1 - r * r * ph)
    t = (1 - r * r) * one_way / (1 - r * r * ph)
    out = ml.window_response(f, [ml.Layer(eps, tand, d)])
    np.testing.assert_allclose(out.gamma, gamma, rtol=0, atol=1e-12)
    np.testing.assert_allclose(out.transmission, t, rtol=0, atol=1e-12)


@pytest.mark.parametrize("odd", [1, 3, 5])
def test_odd_quarter_wave_alumina_gives_vswr_equal_eps(odd):
    # reference-values §4: odd quarter-wave slab, |Γ| = (ε−1)/(ε+1), VSWR = ε_r; |Γ|² = 0.664 (9.8)
    eps, f = 9.8, 2.45e9
    d = odd * C / f / (4 * math.sqrt(eps))
    g = abs(ml.window_response(f, [ml.Layer(eps, 0.0, d)]).gamma)
    assert (1 + g) / (1 - g) == pytest.approx(eps, rel=1e-10)
    assert g * g == pytest.approx(0.664, abs=5e-4)


def test_half_wave_alumina_disc_at_2_45_ghz_is_reflection_free():
    # reference-values §4: λ/2 in alumina (ε 9.8) at 2.45 GHz = 19.54 mm, reflection-free
    eps, f = 9.8, 2.45e9
    d = C / f / (2 * math.sqrt(eps))
    assert d * 1e3 == pytest.approx(19.54, abs=5e-3)
    assert abs(ml.window_response(f, [ml.Layer(eps, 0.0, d)]).gamma) < 1e-12
    # the tabulated (rounded) thickness is still within |Γ| < 1e-3
    assert abs(ml.window_response(f, [ml.Layer(eps, 0.0, 19.54e-3)]).gamma) < 1e-3


def test_half_guide_wavelength_alumina_disc_in_wr340_is_reflection_free():
    # filled-guide closed form (Pozar §3.3): λ_g = λ0/√(ε − (f_c/f)²); d = λ_g/2 ⇒ Γ = 0
    line = wg.line_from_name("WR-340")
    eps, f = 9.8, 2.45e9
    lam_g = C / f / math.sqrt(eps - (line.cutoff / f) ** 2)
    out = ml.window_response(f, [ml.Layer(eps, 0.0, lam_g / 2)], ml.line_embedding(line))
    assert abs(out.gamma) < 1e-12
    assert out.transmittance == pytest.approx(1.0, abs=1e-12)
    # the free-space half-wave thickness is NOT matched in the guide
    d_free = C / f / (2 * math.sqrt(eps))
    assert abs(ml.window_response(f, [ml.Layer(eps, 0.0, d_free)], ml.line_embedding(line)).gamma) > 0.1


@pytest.mark.parametrize("f, half_waves, expected", [
    pytest.param(170e9, 3, 2.64e-4, id="diamond 170 GHz 1.111 mm: 2.64e-4 (reference-values §4, MRS rule)"),
    pytest.param(140e9, 4, 3.52e-4, id="diamond 140 GHz 1.8 mm: 3.52e-4 (reference-values §4, MRS rule)"),
])
def test_resonant_diamond_window_absorption_rule_of_thumb(f, half_waves, expected):
    # A ≈ π(1 + ε') tanδ d f / c for a resonant low-loss disc (MRS Proceedings rule of thumb,
    # reference-values §4); ε' = 5.67, tanδ = 2e-5
    eps, tand = 5.67, 2e-5
    d = half_waves * C / f / (2 * math.sqrt(eps))
    out = ml.window_response(f, [ml.Layer(eps, tand, d)])
    rule = math.pi * (1 + eps) * tand * d * f / C
    assert out.absorptance == pytest.approx(rule, rel=1e-3)
    assert out.absorptance == pytest.approx(expected, rel=6e-3)
    assert abs(out.gamma) < 1e-3  # loss detunes the match only slightly


def test_brewster_angle_slab_is_reflection_free_for_tm_only():
    # tan θ_B = √ε (Born & Wolf §1.5.3): a lossless slab reflects no TM (p) wave at θ_B
    eps = 3.8
    theta_b = math.atan(math.sqrt(eps))
    f = np.linspace(5e9, 50e9, 101)
    layers = [ml.Layer(eps, 0.0, 3e-3)]
    tm = ml.window_response(f, layers, ml.plane_wave_embedding(theta_b, "TM"))
    te = ml.window_response(f, layers, ml.plane_wave_embedding(theta_b, "TE"))
    assert np.max(np.abs(tm.gamma)) < 1e-12
    assert np.max(np.abs(te.gamma)) > 0.3


def test_energy_balance_and_reciprocity():
    # lossless: R + T = 1; lossy: 0 < A < 1; reversed stack: same S21 (reciprocity)
    f = np.linspace(2.2e9, 3.3e9, 51)
    emb = ml.te10_embedding(86.36e-3)
    lossless = [ml.Layer(9.8, 0, 5e-3), ml.Layer(2.1, 0, 11e-3), ml.Layer(3.8, 0, 2e-3)]
    out = ml.window_response(f, lossless, emb)
    np.testing.assert_allclose(out.reflectance + out.transmittance, 1.0, atol=1e-12)
    lossy = [layer._replace(tan_delta=3e-3) for layer in lossless]
    fwd = ml.window_response(f, lossy, emb)
    rev = ml.window_response(f, lossy[::-1], emb)
    np.testing.assert_allclose(fwd.transmission, rev.transmission, rtol=1e-12)
    assert np.all(fwd.absorptance > 0) and np.all(fwd.absorptance < 1)


def test_shapes_broadcast_and_nan_below_cutoff():
    emb = ml.te10_embedding(86.36e-3)  # WR-340, f_c = 1.7357 GHz
    f = np.array([1.0e9, 2.45e9, 3.0e9])
    thick = np.array([[1e-3], [2e-3]])
    out = ml.window_response(f, [ml.Layer(9.8, 1e-4, thick)], emb)
    assert out.gamma.shape == (2, 3)
    assert np.all(np.isnan(out.gamma[:, 0])) and np.all(np.isfinite(out.gamma[:, 1:]))
    assert ml.window_response(2.45e9, [], emb).gamma == pytest.approx(0.0)
    with pytest.raises(ValueError):
        ml.window_response(f, [], ml.Embedding(cutoff=1e9, angle=0.1))
    with pytest.raises(ValueError):
        ml.window_response(f, [], ml.Embedding(polarisation="X"))


def test_line_embedding_of_wr340_is_te10():
    line = wg.line_from_name("WR-340")
    assert ml.line_embedding(line).cutoff == pytest.approx(ml.te10_embedding(86.36e-3).cutoff, rel=1e-14)
    assert ml.line_embedding(wg.free_space()) == ml.Embedding()


# --------------------------------------------------------------------------------------
# band and thickness tolerance
# --------------------------------------------------------------------------------------
def test_reflection_band_of_half_wave_slab_matches_closed_form():
    # lossless slab in vacuum: |Γ|² = F sin²δ / (1 + F sin²δ), F = (n² − 1)²/(4n²),
    # δ = π f/f0 for a half-wave disc at f0 (Born & Wolf §7.6.1 Airy form)
    eps, f0, limit = 9.8, 2.45e9, 0.2
    n = math.sqrt(eps)
    d = C / f0 / (2 * n)
    big_f = (n * n - 1) ** 2 / (4 * n * n)
    s = math.sqrt(limit ** 2 / ((1 - limit ** 2) * big_f))
    half_width = math.asin(s) / math.pi * f0
    band = ml.reflection_band([ml.Layer(eps, 0.0, d)], f0, limit, span=0.3)
    assert band.low == pytest.approx(f0 - half_width, rel=1e-9)
    assert band.high == pytest.approx(f0 + half_width, rel=1e-9)
    assert not band.low_open and not band.high_open


def test_reflection_band_open_and_empty_cases():
    # no window: |Γ| = 0 everywhere -> band open on both sides; quarter-wave disc -> empty
    band = ml.reflection_band([], 2.45e9, 0.1, span=0.2)
    assert band.low_open and band.high_open
    assert band.low == pytest.approx(0.8 * 2.45e9) and band.high == pytest.approx(1.2 * 2.45e9)
    d = C / 2.45e9 / (4 * math.sqrt(9.8))
    empty = ml.reflection_band([ml.Layer(9.8, 0.0, d)], 2.45e9, 0.1)
    assert math.isnan(empty.low) and math.isnan(empty.high)


def test_reflection_band_in_guide_stops_at_cutoff():
    # WR-340, empty stack: |Γ| = 0 above cutoff; below cutoff counts as out of band
    band = ml.reflection_band([], 2.45e9, 0.1, ml.te10_embedding(86.36e-3), span=0.5)
    assert band.low == pytest.approx(wg.line_from_name("WR-340").cutoff, rel=1e-8)
    assert band.high_open


def test_worst_reflection_over_thickness_single_slab():
    # half-wave alumina disc ± 0.1 mm: |Γ| grows monotonically away from the matched
    # thickness, so the worst case is a corner; compare with direct evaluation (Airy slab)
    eps, f0 = 9.8, 2.45e9
    d = C / f0 / (2 * math.sqrt(eps))
    tol = 0.1e-3
    f = np.linspace(2.4e9, 2.5e9, 11)
    res = ml.worst_reflection_over_thickness(f, [ml.Layer(eps, 0.0, d)], tol)
    direct = np.maximum(*(np.abs(ml.window_response(f, [ml.Layer(eps, 0.0, d + s * tol)]).gamma)
                          for s in (-1, 1)))
    np.testing.assert_allclose(res.gamma_mag, direct, rtol=1e-12)
    assert res.worst == pytest.approx(direct.max(), rel=1e-12)
    assert res.thickness[0] == pytest.approx(d + tol) or res.thickness[0] == pytest.approx(d - tol)
    # a dense sweep of the thickness never exceeds the reported worst case
    dense = np.linspace(d - tol, d + tol, 201)[:, None]
    sweep = np.abs(ml.window_response(f[None, :], [ml.Layer(eps, 0.0, dense)]).gamma)
    assert sweep.max() <= res.worst * (1 + 1e-12)


def test_worst_reflection_over_thickness_two_layers_per_layer_tolerance():
    f = np.array([2.45e9])
    layers = [ml.Layer(9.8, 1e-4, 4e-3), ml.Layer(3.8, 1e-4, 6e-3)]
    res = ml.worst_reflection_over_thickness(f, layers, [0.2e-3, 0.1e-3], ml.te10_embedding(86.36e-3))
    grid = [(d1, d2) for d1 in (3.8e-3, 4e-3, 4.2e-3) for d2 in (5.9e-3, 6e-3, 6.1e-3)]
    direct = max(abs(ml.window_response(f, [layers[0]._replace(thickness=d1), layers[1]._replace(
        thickness=d2)], ml.te10_embedding(86.36e-3)).gamma[0]) for d1, d2 in grid)
    assert res.worst == pytest.approx(direct, rel=1e-12)
    assert res.frequency == 2.45e9


# --------------------------------------------------------------------------------------
# materials library
# --------------------------------------------------------------------------------------
def test_materials_library_has_sources_and_cautions():
    table = ml.window_materials()
    for key in ["alumina-99.5", "sapphire-ordinary", "sapphire-extraordinary", "fused-silica",
                "boron-nitride", "pyrolytic-boron-nitride", "aluminium-nitride", "beryllia",
                "cvd-diamond", "ptfe"]:
        row = table[key]
        assert row["source"] and row["confidence"] in {"H", "M", "L"}
        assert row["eps_r"] >= 1.0 and 0.0 <= row["tan_delta"] < 0.1 and row["frequency_hz"] > 0
        assert row["eps_r_range"][0] <= row["eps_r"] <= row["eps_r_range"][1]
        assert row["tan_delta_range"][0] <= row["tan_delta"] <= row["tan_delta_range"][1]
        if "thermal_conductivity" in row:
            assert row["thermal_conductivity_source"]
    assert any("toxic" in c for c in table["beryllia"]["cautions"])
    assert any("runaway" in c for c in table["alumina-99.5"]["cautions"])
    # reference-values §4 single-surface reflectance ((n−1)/(n+1))² = 0.1669 for diamond 5.67
    n = math.sqrt(table["cvd-diamond"]["eps_r"])
    assert ((n - 1) / (n + 1)) ** 2 == pytest.approx(0.1669, abs=1e-4)
    layer = ml.material_layer("fused-silica", 10e-3)
    assert layer == ml.Layer(3.8, 1e-4, 10e-3)
    with pytest.raises(ValueError, match="alumina-99.5"):
        ml.material_layer("unobtainium", 1e-3)
