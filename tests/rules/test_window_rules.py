"""window.reflection, window.band, window.absorbed-power and the window characteristics/figure,
checked against closed forms for a single dielectric slab.

Closed forms used (sources beside each check):
* TE10 in air-filled rectangular guide: f_c = c/(2a), β = (2π/c)√(ε f² − f_c²) in a layer of
  permittivity ε, Z_TE = k η / β (Pozar, Microwave Engineering, 4th ed., §3.3);
* lossless slab between equal media (Fabry–Perot; Born & Wolf, Principles of Optics,
  §1.6.4): |Γ|² = F sin²δ / (1 + F sin²δ), F = 4r²/(1 − r²)², r = (Z_d − Z_0)/(Z_d + Z_0), δ = β_d d;
  reflection-free at δ = Nπ (half-wave), VSWR = (Z_0/Z_d)² at δ = π/2 (quarter-wave
  transformer, Pozar §2.5), which is ε_r for a plane wave (reference-values §4);
* resonant-window absorbed fraction A ≈ π(1 + ε') tan δ d f / c (reference-values §4, from
  the MRS-proceedings abstract on CVD diamond windows);
* edge-cooled disc ΔT = P / (4π k t) (Carslaw & Jaeger, Conduction of Heat in Solids).
"""

from __future__ import annotations

import dataclasses
import json
import math
from pathlib import Path
from types import SimpleNamespace

import pytest

from rfcheck.analysis.envelope import Envelope
from rfcheck.analysis.window import window_analysis, window_characteristics
from rfcheck.findings import Status
from rfcheck.model import Feed, Launch, Material, Window, WindowLayer
from rfcheck.physics.constants import C
from rfcheck.rules.context import Context
from rfcheck.rules.registry import get_rule
from rfcheck.spec import load_spec

DEMO = Path(__file__).resolve().parents[2] / "examples" / "bench-ecr-reactor.toml"
WR340_A = 86.36e-3  # m, EIA RS-261-B nominal inside width 3.400 in
F0 = 2.45e9
# declared ranges of zero width: no spread, so the closed forms of a fixed slab apply
LOSSLESS_ALUMINA = Material("alumina-lossless", 9.8, 0.0, source="test material",
                            permittivity_range=(9.8, 9.8), loss_tangent_range=(0.0, 0.0))


# ----------------------------------------------------------------------------- helpers

def make_feed(line="WR-340", f=F0, tol=0.0, power=1.5e3, duty=1.0, fid="main"):
    return Feed(fid, f, tol, power, duty, None, line, Launch(0.0, 1, "R", 0.0), "ecr")


def make_model(base, feed, layers=(), *, materials=(), rating=None, diameter=None):
    windows = (Window("w", feed.id, 0.0, tuple(layers), rating, diameter),) if layers else ()
    return dataclasses.replace(base, feeds=(feed,), windows=windows, materials=tuple(materials))


def evaluate(model, rule_id, policy, ctx=None, **overrides):
    rule = get_rule(rule_id)
    opts = policy.option_values(rule) | overrides
    ctx = ctx or Context(model, Envelope.of(model))
    return list(rule.func(ctx.for_rule(rule.id, rule.severity), **opts))


def beta(eps, f, cutoff):
    """Phase constant of the mode in a layer of permittivity eps (Pozar §3.3)."""
    return 2 * math.pi / C * math.sqrt(eps * f * f - cutoff * cutoff)


def slab_gamma(eps, d, f, cutoff):
    """|Γ| of a lossless slab between equal media (Born & Wolf §1.6.4), TE impedance ∝ 1/β."""
    b0, bd = beta(1.0, f, cutoff), beta(eps, f, cutoff)
    r = (b0 - bd) / (b0 + bd)  # (Z_d − Z_0)/(Z_d + Z_0) with Z ∝ 1/β
    big_f = 4 * r * r / (1 - r * r) ** 2
    s2 = math.sin(bd * d) ** 2
    return math.sqrt(big_f * s2 / (1 + big_f * s2))


FC = C / (2 * WR340_A)


# ----------------------------------------------------------------------------- window.reflection

def test_half_wave_alumina_disc_reflects_once_eps_moves_over_the_library_range(base_model, policy):
    # λ_g/2 of TE10 in alumina-filled WR-340 at 2.45 GHz for the nominal ε 9.9 (Pozar §3.3):
    # δ = π, |Γ| = 0; the library range 9.7–9.9 detunes it, worst at ε 9.7, where the
    # single-slab closed form (Born & Wolf §1.6.4) gives the reflection
    d = math.pi / beta(9.9, F0, FC)
    assert 19.5e-3 < d < 21e-3  # longer than the free-space λ/2 of 19.54 mm (reference-values §4)
    model = make_model(base_model, make_feed(), [WindowLayer("alumina-99.5", d)])
    (fd,) = evaluate(model, "window.reflection", policy)
    assert fd.status is Status.PASS
    # tan δ (≤ 3e-4) changes |Γ| by < 1e-3 of itself here
    assert fd.measured.value == pytest.approx(slab_gamma(9.7, d, F0, FC), rel=2e-3)
    assert fd.worst_case["permittivity"].value == pytest.approx(9.7)
    assert "alumina-99.5 ε_r 9.7–9.9 (library range)" in fd.message
    # the nominal stack is matched: only the loss reflects (< 2e-3)
    assert "nominal |Γ| 0.00" in fd.message


def test_worst_reflection_over_tolerances_matches_slab_closed_form(base_model, policy):
    # worst over f ± 25 MHz and d ± 0.2 mm: the corners of the Fabry–Perot closed form
    d = math.pi / beta(9.8, F0, FC)
    feed = make_feed(tol=25e6)
    model = make_model(base_model, feed, [WindowLayer("alumina-lossless", d, 0.2e-3)],
                       materials=[LOSSLESS_ALUMINA])
    (fd,) = evaluate(model, "window.reflection", policy)
    expected = max(slab_gamma(9.8, d + s * 0.2e-3, F0 + sf * 25e6, FC)
                   for s in (-1, 0, 1) for sf in (-1, 1))
    assert fd.measured.value == pytest.approx(expected, rel=1e-9)
    assert fd.status is Status.PASS and fd.margin.value == pytest.approx(0.2 - expected, rel=1e-9)
    assert set(fd.worst_case) == {"frequency", "thickness"}


@pytest.mark.parametrize("mat_id, eps, materials", [
    pytest.param("alumina-lossless", 9.8, [LOSSLESS_ALUMINA],
                 id="VSWR=eps_r 9.8 (ref-values §4)"),
    # a spec material of a library id wins over the library (library alumina-99.5 is 9.9)
    pytest.param("alumina-99.5", 9.8, [dataclasses.replace(LOSSLESS_ALUMINA, id="alumina-99.5")],
                 id="spec material overrides library"),
    pytest.param("ptfe", 2.1, [], id="PTFE library 2.1 (tan δ 2e-4)"),
])
def test_quarter_wave_slab_in_free_space_has_vswr_eps_and_fails(base_model, policy, mat_id, eps,
                                                                 materials):
    # odd quarter-wave plane-wave slab: |Γ| = (ε_r − 1)/(ε_r + 1), VSWR = ε_r (reference-values §4)
    d = C / F0 / (4 * math.sqrt(eps))
    model = make_model(base_model, make_feed("free-space"), [WindowLayer(mat_id, d)],
                       materials=materials)
    (fd,) = evaluate(model, "window.reflection", policy)
    rtol = 1e-9 if materials else 1e-3  # PTFE: tan δ 2e-4 lowers |Γ| by ~1.5e-4 (relative)
    assert fd.measured.value == pytest.approx((eps - 1) / (eps + 1), rel=rtol)
    assert fd.status is Status.FAIL
    assert f"VSWR {eps:.3g}" in fd.message


def test_quarter_wave_slab_in_wr340_has_transformer_vswr(base_model, policy):
    # quarter-wave transformer in TE10: VSWR = (Z_0/Z_d)² = (β_d/β_0)² (Pozar §2.5, §3.3)
    d = math.pi / 2 / beta(9.8, F0, FC)
    model = make_model(base_model, make_feed(), [WindowLayer("alumina-lossless", d)],
                       materials=[LOSSLESS_ALUMINA])
    (fd,) = evaluate(model, "window.reflection", policy)
    s = (beta(9.8, F0, FC) / beta(1.0, F0, FC)) ** 2
    assert fd.measured.value == pytest.approx((s - 1) / (s + 1), rel=1e-9)
    assert fd.status is Status.FAIL


def test_below_cutoff_feed_gives_undefined_reflection_and_fails(base_model, policy):
    # 1.5 GHz is below the WR-340 TE10 cutoff of 1.7357 GHz (reference-values §3)
    model = make_model(base_model, make_feed(f=1.5e9), [WindowLayer("alumina-99.5", 0.01)],
                       rating=10.0)
    (fd,) = evaluate(model, "window.reflection", policy)
    assert fd.status is Status.FAIL and fd.measured.value is None
    (fa,) = evaluate(model, "window.absorbed-power", policy)
    assert fa.status is Status.FAIL and fa.measured.value is None
    json.dumps(window_characteristics(Context(model, Envelope.of(model))), allow_nan=False)


# ----------------------------------------------------------------------------- window.band

@pytest.mark.parametrize("halves, tol, status", [
    pytest.param(1, 25e6, Status.PASS, id="half-wave, 2.45 GHz ± 25 MHz"),
    pytest.param(6, 25e6, Status.WARN, id="six half-waves: narrow band"),
])
def test_band_edges_sit_where_the_slab_closed_form_reaches_the_limit(base_model, policy, halves,
                                                                      tol, status):
    d = halves * math.pi / beta(9.8, F0, FC)
    model = make_model(base_model, make_feed(tol=tol), [WindowLayer("alumina-lossless", d)],
                       materials=[LOSSLESS_ALUMINA])
    (fd,) = evaluate(model, "window.band", policy)
    lo, hi = fd.worst_case["band_low"].value, fd.worst_case["band_high"].value
    # Born & Wolf §1.6.4 closed form evaluated at the reported edges equals the limit 0.2
    assert slab_gamma(9.8, d, lo, FC) == pytest.approx(0.2, abs=1e-6)
    assert slab_gamma(9.8, d, hi, FC) == pytest.approx(0.2, abs=1e-6)
    need_lo, need_hi = F0 - tol - 0.01 * F0, F0 + tol + 0.01 * F0
    assert fd.margin.value == pytest.approx(min(need_lo - lo, hi - need_hi), abs=1.0)
    assert fd.status is status


def test_band_without_band_and_severity_warning(base_model, policy):
    # quarter-wave: |Γ| ≈ 0.82 at the centre (above) → no band; window.band is a warning rule
    d = C / F0 / (4 * math.sqrt(9.8))
    model = make_model(base_model, make_feed("free-space"), [WindowLayer("alumina-lossless", d)],
                       materials=[LOSSLESS_ALUMINA])
    (fd,) = evaluate(model, "window.band", policy)
    assert fd.status is Status.WARN and fd.measured.value is None


# ----------------------------------------------------------------------------- absorbed power

@pytest.mark.parametrize("rating, status", [
    pytest.param(200.0, Status.PASS, id="rating 200 W"),
    pytest.param(100.0, Status.FAIL, id="rating 100 W"),
])
def test_absorbed_power_of_resonant_diamond_window(base_model, policy, rating, status):
    # CVD diamond (ε' 5.67, tan δ 2e-5), 3 half-waves at 170 GHz = 1.111 mm: A ≈ 2.64e-4
    # (reference-values §4, rule of thumb; H); P_abs = P_avg × A with P_avg = 1 MW × 50 %
    f = 170e9
    d = 3 * C / f / (2 * math.sqrt(5.67))
    assert d == pytest.approx(1.111e-3, rel=1e-3)
    feed = make_feed("free-space", f=f, power=1e6, duty=0.5)
    # the measured disc (spec material, ranges of zero width) against the rule of thumb
    disc = Material("diamond-disc", 5.67, 2e-5, 170e9, "test material", "", (), 1800.0,
                    (5.67, 5.67), (2e-5, 2e-5))
    model = make_model(base_model, feed, [WindowLayer("diamond-disc", d)], rating=rating,
                       diameter=0.1, materials=[disc])
    (fd,) = evaluate(model, "window.absorbed-power", policy)
    a_thumb = math.pi * (1 + 5.67) * 2e-5 * d * f / C
    assert fd.measured.value == pytest.approx(0.5e6 * a_thumb, rel=1e-3)
    assert fd.status is status
    assert fd.worst_case == {}  # nothing varies: no frequency tolerance, no spread
    # the library grade's ε_r range 5.67–5.70 adds loss: (1 + ε') grows, worst at the top
    lib = make_model(base_model, feed, [WindowLayer("cvd-diamond", d)], rating=rating)
    (fl,) = evaluate(lib, "window.absorbed-power", policy)
    assert fl.measured.value > fd.measured.value
    assert fl.worst_case["permittivity"].value == pytest.approx(5.70)
    assert fl.measured.value == pytest.approx(0.5e6 * a_thumb * 6.70 / 6.67, rel=3e-3)
    # edge-cooled disc: ΔT = P / (4π k t), k = 1800 W/(m K) library (Carslaw & Jaeger)
    rise = fd.measured.value / (4 * math.pi * 1800.0 * d)
    assert f"{rise:.3g} K" in fd.message and "estimate" in fd.message


def test_absorbed_power_uses_average_power_and_max_fraction(base_model, policy):
    # heating follows the average power (peak × duty): halving the duty halves P_abs
    d = math.pi / beta(9.9, F0, FC)
    out = []
    for duty in (1.0, 0.5):
        model = make_model(base_model, make_feed(power=6e3, duty=duty),
                           [WindowLayer("alumina-99.5", d)], rating=10.0)
        (fd,) = evaluate(model, "window.absorbed-power", policy, max_fraction=0.5)
        assert fd.limit.value == pytest.approx(5.0)  # 50 % of the 10 W rating
        out.append(fd.measured.value)
    assert out[1] == pytest.approx(out[0] / 2, rel=1e-12)


def test_not_applicable_cases(base_model, policy):
    layers = [WindowLayer("alumina-99.5", 0.02)]
    no_rating = make_model(base_model, make_feed(), layers)
    (fd,) = evaluate(no_rating, "window.absorbed-power", policy)
    assert fd.status is Status.NOT_APPLICABLE
    # no thermal estimate without a diameter (single-disc estimate needs an edge-cooled disc)
    rated = make_model(base_model, make_feed(), layers, rating=10.0)
    (fd,) = evaluate(rated, "window.absorbed-power", policy)
    assert "no temperature estimate (no window diameter given)" in fd.message
    no_windows = make_model(base_model, make_feed())
    for rid in ("window.reflection", "window.band", "window.absorbed-power"):
        (fd,) = evaluate(no_windows, rid, policy)
        assert fd.status is Status.NOT_APPLICABLE and fd.subject == "windows"


# ----------------------------------------------------------------------------- shared computation

def test_three_rules_share_one_window_computation(base_model, policy):
    model = make_model(base_model, make_feed(tol=25e6), [WindowLayer("alumina-99.5", 0.02, 1e-4)],
                       rating=10.0)
    ctx = Context(model, Envelope.of(model))
    first = window_analysis(ctx, model.windows[0])
    for rid in ("window.reflection", "window.band", "window.absorbed-power", "line.breakdown"):
        evaluate(model, rid, policy, ctx=ctx)
    keys = [k for k in ctx._cache if isinstance(k, tuple) and k[0] == "window-analysis"]
    assert keys == [("window-analysis", "w")]
    assert window_analysis(ctx, model.windows[0]) is first


# ----------------------------------------------------------------------------- bundled example

def test_example_window_12mm_fails_and_half_wave_passes(demo_text, write_spec, policy):
    # fused silica ε 3.8 (library) in WR-340 at 2.45 GHz ± 25 MHz, ±0.2 mm
    import re

    demo_text = demo_text.replace('line = "circular:85 mm"', 'line = "WR-340"')
    demo_text = re.sub(r'thickness = "[0-9.]+ mm"', 'thickness = "12 mm"', demo_text, count=1)
    loaded = load_spec(write_spec(demo_text))
    (fd,) = evaluate(loaded.model, "window.reflection", policy)
    assert fd.status is Status.FAIL
    # library ε_r range 3.78–3.82 enters the worst case (Born & Wolf §1.6.4 over its ends)
    worst = max(slab_gamma(e, 12e-3 + s * 0.2e-3, F0 + sf * 25e6, FC) for e in (3.78, 3.8, 3.82)
                for s in (-1, 0, 1) for sf in (-1, 0, 1))
    assert fd.measured.value == pytest.approx(worst, rel=1e-3)  # tan δ 1e-4 ignored
    d = math.pi / beta(3.8, F0, FC)  # λ_g/2 in silica-filled WR-340 (Pozar §3.3)
    text = demo_text.replace('thickness = "12 mm"', f'thickness = "{d * 1e3:.3f} mm"')
    assert text != demo_text
    model = load_spec(write_spec(text, "half.toml")).model
    for rid in ("window.reflection", "window.band", "window.absorbed-power"):
        (fd,) = evaluate(model, rid, policy)
        assert fd.status is Status.PASS, fd.message


# ----------------------------------------------------------------------------- characteristics

def test_characteristics_are_json_ready_and_name_reflection_free_thicknesses(base_model):
    d = 0.012
    model = make_model(base_model, make_feed(tol=25e6), [WindowLayer("fused-silica", d, 2e-4)],
                       rating=40.0, diameter=0.1)
    out = window_characteristics(Context(model, Envelope.of(model)))
    json.dumps(out, allow_nan=False)
    w = out["w"]
    g = w["gamma"]["value"]
    assert w["vswr"]["value"] == pytest.approx((1 + g) / (1 - g), rel=1e-12)  # Pozar §2.3
    assert w["return_loss"]["value"] == pytest.approx(-20 * math.log10(g), rel=1e-12)
    assert g == pytest.approx(slab_gamma(3.8, d, F0, FC), rel=1e-3)
    half = math.pi / beta(3.8, F0, FC)
    assert w["reflection_free_thicknesses"]["value"] == pytest.approx([half, 2 * half], rel=1e-12)
    assert w["temperature_rise_estimate"]["unit"] == "K"
    assert w["cautions"]  # the library's caution for fused silica travels with it


def test_multilayer_characteristics_use_none_with_reason(base_model):
    layers = [WindowLayer("alumina-99.5", 0.005), WindowLayer("ptfe", 0.003)]
    model = make_model(base_model, make_feed(), layers, rating=10.0, diameter=0.1)
    w = window_characteristics(Context(model, Envelope.of(model)))["w"]
    assert w["reflection_free_thicknesses"]["value"] is None
    assert w["temperature_rise_estimate"]["value"] is None and w["temperature_rise_estimate"]["reason"]


# ----------------------------------------------------------------------------- report figure

def test_window_figure_is_an_svg_and_absent_without_windows(base_model):
    from rfcheck.report.figure_window import window_figure

    model = make_model(base_model, make_feed(tol=25e6), [WindowLayer("fused-silica", 0.0337, 2e-4)])
    ctx = Context(model, Envelope.of(model))
    rules = [SimpleNamespace(id="window.reflection", options={"max_gamma": {"si": 0.2}})]
    fig = window_figure(SimpleNamespace(context=ctx, model=model, rules=rules))
    assert fig["id"] == "window-reflection" and fig["svg"].startswith("<svg")
    assert "limit |Γ| = 0.2" in fig["svg"]
    bare = make_model(base_model, make_feed())
    assert window_figure(SimpleNamespace(context=Context(bare, Envelope.of(bare)), model=bare,
                                         rules=rules)) is None


# ----------------------------------------------------------------------------- material spreads

def test_spec_material_without_ranges_gets_the_stated_default_spread(base_model, policy):
    # a half-wave lossless disc of a spec material that declares no range: the library's
    # default ±2 % on ε_r is assumed (worst case where the user has not said) and named
    bare = Material("my-ceramic", 9.8, 1e-4, 2.45e9, "test material")
    d = math.pi / beta(9.8, F0, FC)
    model = make_model(base_model, make_feed(), [WindowLayer("my-ceramic", d)],
                       materials=[bare])
    (fd,) = evaluate(model, "window.reflection", policy)
    assert "my-ceramic: no ε_r spread declared, ±2% assumed" in fd.message
    assert "my-ceramic: no tan δ range declared, up to 5× the stated value assumed" in fd.message
    assert "thickness: no tolerance given" in fd.message
    # worst at an end of 9.8 × (1 ± 0.02): the single-slab closed form there (Born & Wolf §1.6.4)
    expected = max(slab_gamma(e, d, F0, FC) for e in (9.8 * 0.98, 9.8 * 1.02))
    assert fd.measured.value == pytest.approx(expected, rel=2e-3)  # tan δ ≤ 5e-4 ignored
    assert fd.worst_case["permittivity"].value in (pytest.approx(9.604), pytest.approx(9.996))
    assert set(fd.worst_case) == {"permittivity", "loss_tangent"}


def test_worst_case_names_frequency_and_every_varied_parameter_of_each_layer(base_model, policy):
    layers = [WindowLayer("alumina-99.5", 5e-3, 0.1e-3), WindowLayer("fused-silica", 8e-3),
              WindowLayer("alumina-99.5", 5e-3, 0.1e-3)]
    model = make_model(base_model, make_feed(tol=25e6), layers, rating=50.0)
    for rid in ("window.reflection", "window.absorbed-power"):
        (fd,) = evaluate(model, rid, policy)
        assert set(fd.worst_case) == {"frequency", "thickness_1", "thickness_3"} | {
            f"{k}_{i}" for k in ("permittivity", "loss_tangent") for i in (1, 2, 3)}
        assert "layer 2 (fused-silica) 8 mm" in fd.message
        assert "alumina-99.5 ε_r 9.7–9.9 (library range)" in fd.message
        assert "layer 2 thickness: no tolerance given" in fd.message
    (fa,) = evaluate(model, "window.absorbed-power", policy)
    # absorption: every loss tangent at the top of its library range (alumina 3e-4, silica 5e-4)
    assert fa.worst_case["loss_tangent_1"].value == pytest.approx(3e-4)
    assert fa.worst_case["loss_tangent_2"].value == pytest.approx(5e-4)


@pytest.mark.parametrize("quoted, factor, phrase", [
    pytest.param(1e9, 2.475, "scaled ∝ f to 2.475 GHz (×2.48: 0.000495–0.000495)", id="quoted at 1 GHz: ×f/f_q"),
    pytest.param(10e9, 1.0, "not scaled down to 2.475 GHz", id="quoted at 10 GHz: never down"),
    pytest.param(None, 1.0, "tan δ has no quoted frequency", id="no frequency: flagged"),
])
def test_loss_tangent_quoted_elsewhere_is_scaled_up_or_flagged(base_model, policy, quoted, factor,
                                                               phrase):
    # rule (rfcheck.physics.multilayer.loss_tangent_scale): tan δ × max(1, f/f_quoted) at the
    # top of the band, 2.475 GHz. To first order the absorbed fraction is ∝ tan δ (the
    # stored-energy form in window.absorbed-power), so the power scales by the same factor.
    def absorbed(frequency):
        mat = Material("disc", 3.8, 2e-4, frequency, "test material", "", (), None,
                       (3.8, 3.8), (2e-4, 2e-4))
        d = math.pi / beta(3.8, F0, FC)
        model = make_model(base_model, make_feed(tol=25e6), [WindowLayer("disc", d)],
                           materials=[mat], rating=100.0)
        (fd,) = evaluate(model, "window.absorbed-power", policy)
        return fd

    fd = absorbed(quoted)
    reference = absorbed(2.475e9)  # quoted at the top of the band: used as stated
    assert phrase in fd.message
    # second order in the losses: 1e-3 of the power at ×2.5
    assert fd.measured.value == pytest.approx(factor * reference.measured.value, rel=2e-3)


def test_band_uses_the_material_spread(base_model, policy):
    # six half waves of alumina (narrow band, Born & Wolf §1.6.4) with ε_r 9.75–9.85: the
    # band is the intersection of the closed-form bands at the ends of the range
    d = 6 * math.pi / beta(9.8, F0, FC)
    spread = dataclasses.replace(LOSSLESS_ALUMINA, permittivity_range=(9.75, 9.85))
    fixed = make_model(base_model, make_feed(tol=25e6), [WindowLayer("alumina-lossless", d)],
                       materials=[LOSSLESS_ALUMINA])
    varied = dataclasses.replace(fixed, materials=(spread,))
    (fb,) = evaluate(fixed, "window.band", policy)
    (vb,) = evaluate(varied, "window.band", policy)
    lo, hi = vb.worst_case["band_low"].value, vb.worst_case["band_high"].value
    assert lo > fb.worst_case["band_low"].value and hi < fb.worst_case["band_high"].value
    # at each edge the binding end of the range sits exactly on the limit, the other under it
    at_lo = [slab_gamma(e, d, lo, FC) for e in (9.75, 9.85)]
    at_hi = [slab_gamma(e, d, hi, FC) for e in (9.75, 9.85)]
    assert max(at_lo) == pytest.approx(0.2, abs=1e-6) and max(at_hi) == pytest.approx(0.2, abs=1e-6)
    assert vb.worst_case["permittivity"].value in (9.75, 9.85)
    assert "alumina-lossless ε_r 9.75–9.85 (spec range)" in vb.message


def test_twenty_layer_window_analysis_is_bounded(base_model, policy):
    # 20 toleranced layers (60 varied parameters): the old analysis was exponential in the
    # layers; this one evaluates at most ANALYSIS_COMBINATIONS stacks (assert the count)
    import time

    from rfcheck.analysis.window import ANALYSIS_COMBINATIONS

    layers = [WindowLayer("fused-silica" if i % 2 else "ptfe", 1.6e-3, 0.02e-3) for i in range(20)]
    model = make_model(base_model, make_feed(tol=25e6), layers, rating=50.0)
    ctx = Context(model, Envelope.of(model))
    t0 = time.perf_counter()
    findings = [f for rid in ("window.reflection", "window.absorbed-power", "window.band")
                for f in evaluate(model, rid, policy, ctx=ctx)]
    elapsed = time.perf_counter() - t0
    a = window_analysis(ctx, model.windows[0])
    assert len(a.varied()) == 60
    assert 120 < a.evaluations <= ANALYSIS_COMBINATIONS
    assert all(f.status is not Status.ERROR for f in findings)
    print(f"20-layer window, three rules: {elapsed:.2f} s, {a.evaluations} combinations")
