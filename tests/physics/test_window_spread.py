"""Worst cases of a window over the spread of its layers (rfcheck.physics.window_spread).

References beside each check: brute force over a grid of the parameter box (the search must
reach the grid's worst value and may only exceed it, never fall short); scikit-rf cascades
of line sections for |Γ| of the perturbed stack the search returns; closed forms of a single
slab (Born & Wolf, Principles of Optics, §1.6.4: quarter-wave |Γ| = (ε_r − 1)/(ε_r + 1),
VSWR = ε_r; half-wave slab reflection-free, reflecting once ε_r moves); the loss-tangent
frequency rule of rfcheck.physics.multilayer.loss_tangent_scale.
"""

from __future__ import annotations

import itertools
import math
import time

import numpy as np
import pytest

from rfcheck.physics import multilayer as ml
from rfcheck.physics import window_spread as ws
from rfcheck.physics.constants import C

WR340 = ml.te10_embedding(86.36e-3)  # EIA RS-261-B inside width 3.400 in
F_BAND = np.linspace(2.425e9, 2.475e9, 11)


def _random_spreads(rng, n):
    """n layers of 2 ≤ ε_r ≤ 10, 0.1–0.6 of a quarter wave thick, with thickness, ε_r and
    tan δ spreads of the size seen on windows (0.5–3 %, 0.5–2 %, up to 5×)."""
    out = []
    for _ in range(n):
        eps = rng.uniform(2.0, 10.0)
        d = rng.uniform(0.1, 0.6) * 0.122 / math.sqrt(eps)
        tol = rng.uniform(0.005, 0.03) * d
        de = rng.uniform(0.005, 0.02) * eps
        td = 10 ** rng.uniform(-4.5, -3.0)
        out.append(ws.LayerSpread((d - tol, d, d + tol), (eps - de, eps, eps + de),
                                  (td, td, td * rng.uniform(1.0, 5.0))))
    return out


def _brute_force(f, spreads, levels, quantity, emb=WR340):
    """Largest |Γ| or absorbed fraction over every point of a grid of the box."""
    if quantity == "absorption":
        spreads = [s._replace(tan_delta=(s.tan_delta[2],) * 3) for s in spreads]
    axes = [[lo + (hi - lo) * (x + 1) / 2 for x in levels] for s in spreads for (lo, _n, hi) in s]
    rows = np.array(list(itertools.product(*axes))).reshape(-1, len(spreads), 3)
    g, a = ws.spread_response(f, rows, emb)
    return float((np.abs(g) if quantity == "reflection" else a).max())


def _value_at(w, emb=WR340):
    """|Γ| (or absorbed fraction) of the returned point at the returned frequency."""
    g, a = ws.spread_response([w.frequency], np.array([np.array(w.point).T]), emb)
    return float(abs(g[0, 0])), float(a[0, 0])


# ----------------------------------------------------------------------------- brute force

@pytest.mark.parametrize("layers, levels, seed", [
    pytest.param(1, np.linspace(-1, 1, 9), 1, id="1 layer, 9 levels (729 points)"),
    pytest.param(2, np.linspace(-1, 1, 5), 2, id="2 layers, 5 levels (15625 points)"),
    pytest.param(3, (-1.0, 0.0, 1.0), 3, id="3 layers, 3 levels (19683 points)"),
])
@pytest.mark.parametrize("quantity", ["reflection", "absorption"])
def test_bounded_search_reaches_the_brute_force_worst_case(layers, levels, seed, quantity):
    rng = np.random.default_rng(seed)
    for _ in range(2):
        spreads = _random_spreads(rng, layers)
        w = ws.worst_over_spread(F_BAND, spreads, WR340, quantity=quantity)
        brute = _brute_force(F_BAND, spreads, levels, quantity)
        assert w.value >= brute * (1 - 1e-12)  # never short of the grid's worst
        assert w.value <= brute * (1 + 1e-3)  # an interior maximum only slightly above it
        g, a = _value_at(w)
        assert w.value == pytest.approx(g if quantity == "reflection" else a, rel=1e-12)
        assert w.evaluations <= ws.MAX_COMBINATIONS and w.converged


def test_four_layer_search_beyond_the_exhaustive_grid_matches_brute_force():
    # 12 varied parameters: 3^12 = 531441 grid points against the bounded search (faces,
    # linearised vertices, ascent); the search evaluates under 1 % of that
    rng = np.random.default_rng(4)
    spreads = _random_spreads(rng, 4)
    f = F_BAND[-1:]  # one frequency keeps the brute force near a second
    w = ws.worst_over_spread(f, spreads, WR340)
    brute = _brute_force(f, spreads, (-1.0, 0.0, 1.0), "reflection")
    assert brute * (1 - 1e-12) <= w.value <= brute * (1 + 1e-3)
    assert w.evaluations < 0.01 * 3 ** 12
    assert "linearised" in w.method


def test_absorption_search_holds_every_loss_tangent_at_the_top_of_its_range():
    # first order in the losses A = Σ tan δ_i · (stored-energy weight ≥ 0): monotonic in each
    rng = np.random.default_rng(5)
    spreads = _random_spreads(rng, 3)
    w = ws.worst_over_spread(F_BAND, spreads, WR340, quantity="absorption")
    assert w.point.tan_delta == tuple(s.tan_delta[2] for s in spreads)
    # and the absorbed fraction of a lossy slab grows with tan δ at every thickness and ε_r
    d = np.linspace(1e-3, 40e-3, 60)[:, None]
    low = ml.window_response(F_BAND[None, :], [ml.Layer(3.8, 1e-4, d)], WR340).absorptance
    high = ml.window_response(F_BAND[None, :], [ml.Layer(3.8, 2e-4, d)], WR340).absorptance
    assert np.all(high > low)


# ----------------------------------------------------------------------------- scikit-rf

def test_worst_point_is_a_perturbed_stack_whose_reflection_matches_scikit_rf():
    skrf = pytest.importorskip("skrf")
    from skrf.media import RectangularWaveguide
    from skrf.network import cascade_list

    rng = np.random.default_rng(6)
    spreads = _random_spreads(rng, 3)
    w = ws.worst_over_spread(F_BAND, spreads, WR340)
    nominal = tuple(s.thickness[1] for s in spreads)
    assert w.point.thickness != nominal  # the worst case is not the nominal stack
    # scikit-rf RectangularWaveguide sections (rho=0, s_def="traveling", unit="m"), cascaded
    freq = skrf.Frequency.from_f([w.frequency], unit="Hz")
    a, b = 86.36e-3, 43.18e-3
    empty = RectangularWaveguide(freq, a=a, b=b, rho=0)
    nets = [RectangularWaveguide(freq, a=a, b=b, ep_r=e * (1 - 1j * t), rho=0)
            .line(d, unit="m", s_def="traveling")
            for d, e, t in zip(w.point.thickness, w.point.eps_r, w.point.tan_delta)]
    net = cascade_list(nets)
    net.renormalize(empty.z0_characteristic, s_def="traveling")
    assert abs(net.s[0, 0, 0]) == pytest.approx(w.value, abs=1e-9)


# ----------------------------------------------------------------------------- closed forms

def test_quarter_wave_slab_worst_case_is_vswr_of_the_top_permittivity():
    # lossless slab in free space, ε_r 9.6–10.0, thickness ± 1.5 % around the quarter wave of
    # 9.8: the quarter wave of ε_r = 10 (d·√(9.8/10), 1.0 % thinner) lies inside the box, so
    # the worst |Γ| is (10 − 1)/(10 + 1), VSWR = 10 (Born & Wolf §1.6.4), at an interior
    # thickness that no corner or mid-point reaches
    f0 = 2.45e9
    d = C / f0 / (4 * math.sqrt(9.8))
    spreads = [ws.LayerSpread((0.985 * d, d, 1.015 * d), (9.6, 9.8, 10.0), (0.0, 0.0, 0.0))]
    w = ws.worst_over_spread([f0], spreads)
    assert w.value == pytest.approx(9.0 / 11.0, rel=1e-6)
    assert w.point.eps_r[0] == 10.0
    assert w.point.thickness[0] == pytest.approx(d * math.sqrt(9.8 / 10.0), rel=2e-3)
    corners = _brute_force([f0], spreads, (-1.0, 0.0, 1.0), "reflection", ml.Embedding())
    assert corners < 9.0 / 11.0 * (1 - 1e-5)


def _airy(eps, d, f):
    """|Γ| of a lossless slab between equal media (Born & Wolf §1.6.4), normal incidence."""
    n = math.sqrt(eps)
    r = (1 - n) / (1 + n)
    big_f = 4 * r * r / (1 - r * r) ** 2
    s2 = math.sin(2 * math.pi * f * n * d / C) ** 2
    return math.sqrt(big_f * s2 / (1 + big_f * s2))


def test_half_wave_slab_reflects_once_the_permittivity_moves():
    # half wave of fused silica (3.8) at 2.45 GHz: |Γ| = 0 at the nominal ε_r; over the
    # range 3.78–3.82 the worst is the single-slab formula at an end, at f0 and over f ± 25 MHz
    f0 = 2.45e9
    d = C / f0 / (2 * math.sqrt(3.8))
    spreads = [ws.LayerSpread((d, d, d), (3.78, 3.8, 3.82), (0.0, 0.0, 0.0))]
    assert _airy(3.8, d, f0) < 1e-12
    w0 = ws.worst_over_spread([f0], spreads)
    assert w0.value == pytest.approx(max(_airy(3.78, d, f0), _airy(3.82, d, f0)), rel=1e-9)
    assert w0.value > 5e-3
    f = np.linspace(2.425e9, 2.475e9, 41)
    w = ws.worst_over_spread(f, spreads)
    expected = max(_airy(e, d, fi) for e in (3.78, 3.82) for fi in f)
    assert w.value == pytest.approx(expected, rel=1e-9)
    assert w.value > 1.2 * max(_airy(3.8, d, fi) for fi in f)  # more than the band alone


def test_band_of_the_spread_is_the_intersection_over_the_box():
    # one lossless slab, six half waves (narrow band), ε_r and thickness ranges: the band of
    # the spread equals the intersection of the single-slab bands over a dense grid of the box
    f0, limit = 2.45e9, 0.2
    d = 6 * C / f0 / (2 * math.sqrt(3.8))
    spreads = [ws.LayerSpread((d - 0.1e-3, d, d + 0.1e-3), (3.78, 3.8, 3.82), (0.0, 0.0, 0.0))]
    b = ws.band_over_spread(f0, limit, spreads, span=0.2, points=2001)
    lows, highs = [], []
    for e in np.linspace(3.78, 3.82, 9):
        for t in np.linspace(d - 0.1e-3, d + 0.1e-3, 9):
            r = ml.reflection_band([ml.Layer(e, 0.0, t)], f0, limit, span=0.2, points=2001)
            lows.append(r.low)
            highs.append(r.high)
    assert b.low == pytest.approx(max(lows), rel=1e-7)
    assert b.high == pytest.approx(min(highs), rel=1e-7)
    assert b.converged
    # the binding combinations sit at the ends of the box
    assert b.low_point.eps_r[0] in (3.78, 3.82) and b.high_point.eps_r[0] in (3.78, 3.82)


def test_band_without_a_band_names_the_combination_that_exceeds_the_limit():
    f0 = 2.45e9
    d = C / f0 / (2 * math.sqrt(3.8))
    spreads = [ws.LayerSpread((d, d, d), (3.0, 3.8, 4.6), (0.0, 0.0, 0.0))]
    b = ws.band_over_spread(f0, 0.05, spreads)
    assert math.isnan(b.low) and b.low_point is not None
    g, _a = ws.spread_response([f0], np.array([np.array(b.low_point).T]))
    assert abs(g[0, 0]) > 0.05


# ----------------------------------------------------------------------------- loss tangent rule

@pytest.mark.parametrize("quoted, f, factor", [
    pytest.param(1e10, 2.45e9, 1.0, id="quoted above the feed: never scaled down"),
    pytest.param(1e9, 2.45e9, 2.45, id="quoted below: scaled up in proportion to f"),
    pytest.param(1e10, 1.7e11, 17.0, id="sapphire 1e-5 at 10 GHz -> 1.7e-4 at 170 GHz (Krupka 1999)"),
    pytest.param(None, 2.45e9, 1.0, id="no quoted frequency: unscaled (the finding flags it)"),
])
def test_loss_tangent_frequency_rule(quoted, f, factor):
    assert ml.loss_tangent_scale(quoted, f) == pytest.approx(factor, rel=1e-12)


# ----------------------------------------------------------------------------- budget

def test_twenty_layer_window_is_searched_within_the_budget():
    # 20 layers × (thickness, ε_r, tan δ) = 60 varied parameters: 3^60 grid points; the
    # search is bounded by MAX_COMBINATIONS and every combination is an array row
    rng = np.random.default_rng(20)
    spreads = _random_spreads(rng, 20)
    f = np.linspace(2.425e9, 2.475e9, 41)
    t0 = time.perf_counter()
    worst = {q: ws.worst_over_spread(f, spreads, WR340, quantity=q)
             for q in ("reflection", "absorption")}
    elapsed = time.perf_counter() - t0
    for q, w in worst.items():
        assert 2 * 60 < w.evaluations <= ws.MAX_COMBINATIONS
        # no random combination of 2000 corners beats the search
        s = rng.choice([-1.0, 1.0], size=(2000, 20, 3))
        box = np.array([[list(v) for v in sp] for sp in spreads])  # (20, 3, 3)
        rows = np.where(s < 0, box[None, :, :, 0], box[None, :, :, 2])
        if q == "absorption":
            rows[:, :, 2] = box[None, :, 2, 2]
        g, a = ws.spread_response(f, rows, WR340)
        sample = float((np.abs(g) if q == "reflection" else a).max())
        assert w.value >= sample * (1 - 1e-12)
    print(f"20-layer reflection + absorption search: {elapsed * 1e3:.0f} ms, "
          f"{sum(w.evaluations for w in worst.values())} combinations")


def test_layer_cap_and_budget_bound_every_accepted_stack():
    d = 1e-3
    layer = ws.LayerSpread((0.99 * d, d, 1.01 * d), (3.7, 3.8, 3.9), (1e-4, 1e-4, 5e-4))
    with pytest.raises(ValueError, match="at most"):
        ws.worst_over_spread([2.45e9], [layer] * (ws.MAX_LAYERS + 1))
    w = ws.worst_over_spread(np.linspace(2.4e9, 2.5e9, 41), [layer] * ws.MAX_LAYERS, WR340,
                             budget=512)
    assert w.evaluations <= 2 * 3 * ws.MAX_LAYERS + 1 + 512  # faces are always evaluated
    assert not w.converged and "budget" in w.method
