"""rays.window-return and rays.geometric-optics against closed forms: a linear density layer
in a field far below the cyclotron field (an isotropic plasma, n² = 1 − X to O(Y)), where a
normally launched beam comes back whole from the cutoff X = 1, a tilted ray comes back
displaced by 2 L sin 2θ and 1/(kL) peaks at its turning point at 1/(k0 L sin³θ)."""

import math
import re

import numpy as np
import pytest
import scipy.constants as sc

from rfcheck.analysis.load import plasma_return
from rfcheck.analysis.rays import ray_study, resonance_band
from rfcheck.physics.collisions import electron_ion_collision_frequency
from rfcheck.rules.policy import load_policy
from rfcheck.run import run
from rfcheck.spec import load_spec

F = 14.5e9
K0 = 2 * math.pi * F / sc.c
# cutoff density n_c = ε0 m_e ω² / e² (X = 1; Stix 1992 ch. 1, NRL Formulary)
N_C = sc.epsilon_0 * sc.m_e * (2 * math.pi * F) ** 2 / sc.e ** 2
RULES = ("rays.window-return", "rays.geometric-optics")


def _layer(demo_text: str, l_n: float, launch: str, *, window: str | None = None) -> str:
    """The bench reactor at 14.5 GHz in a 1 mT uniform field (Y = 0.002, no layer anywhere),
    without neutral gas and at 1 keV (collisions negligible), with n_e rising linearly from 0
    at the launcher (z = 0) to n_peak at z = 300 mm: X = z / l_n with n_peak = n_c · 0.3 m / l_n."""
    n_peak = N_C * 0.3 / l_n
    t = re.sub(r"coils = \[\n(.*\n)*?\]\n", 'uniform = { b = "1 mT" }\n', demo_text, count=1)
    t = t.replace('density = { min = "2e16 m^-3", max = "5e16 m^-3" }',
                  f'density = {{ min = "{n_peak:.6e} m^-3", max = "{n_peak:.6e} m^-3" }}')
    t = t.replace('electron_temperature = { min = "2 eV", max = "12 eV" }',
                  'electron_temperature = { min = "1 keV", max = "1 keV" }')
    t = re.sub(r"^neutral = .*\n", "", t, count=1, flags=re.M)
    t = t.replace('profile = { kind = "parabolic", exponent = 1.0 }',
                  'profile = { kind = "table", points = [["0 mm", 0.0], ["300 mm", 1.0]] }')
    t = t.replace('frequency = "2.45 GHz"', 'frequency = "14.5 GHz"')
    t = t.replace('frequency_tolerance = "25 MHz"', 'frequency_tolerance = "0 MHz"')
    t = re.sub(r"^launch = .*$", launch, t, count=1, flags=re.M)
    if window is not None:
        t = re.sub(r"^max_absorbed_power = .*\n^diameter = .*$", window, t, count=1, flags=re.M)
    return t


def _run(write_spec, text):
    r = run(load_spec(write_spec(text)), load_policy(None))
    return r, {(f.rule, f.subject): f for f in r.findings if f.rule in RULES}


def _layer_loss(l_n: float, theta: float) -> float:
    """−ln P of a ray launched at θ into the layer of `_layer`, there and back: the weak-damping
    closed form (8/3) k0 L cos³θ ν/ω (Ginzburg 1970, linear layer with collisions; derived in
    tests/physics/test_rays_damping.py) with the electron–ion ν at the peak density and 1 keV
    (Z = 1, Ar+; NRL Formulary form, rfcheck.physics.collisions), the ν the study takes."""
    nu = float(electron_ion_collision_frequency(N_C * 0.3 / l_n, 1000.0, 1))
    return 8.0 / 3.0 * K0 * l_n * math.cos(theta) ** 3 * nu / (2 * math.pi * F)


BEAM = ('launch = { z = "0 mm", direction = "+z", mode = "R", angle_to_field = "0 deg", '
        'polarisation = "circular-right", beam = { waist = "10 mm" } }')


def _tilted(x_mm: float, tilt_deg: float) -> str:
    return ('launch = { z = "0 mm", direction = "+z", mode = "R", angle_to_field = "0 deg", '
            f'polarisation = "circular-right", x = "{x_mm} mm", tilt = "{tilt_deg} deg" }}')


def test_an_overdense_layer_returns_a_normal_beam_whole_onto_a_wider_window(write_spec,
                                                                             demo_text):
    # X reaches 1 at z = l_n = 40 mm inside the chamber: the cutoff reflects the whole beam
    # (lossless layer, Stix ch. 1); at normal incidence every ray comes back along itself
    # (N_x = 0: Snell), so the 2w disc (radius 20 mm, 1 − e^−8 of the power, TEM00) falls
    # within the 50 mm radius of the 100 mm window. Without a rating the limit is 10 % of
    # the forward power: 1.5 kW back is far above 150 W.
    text = _layer(demo_text, 0.040, BEAM, window='diameter = "100 mm"')
    r, found = _run(write_spec, text)
    study = ray_study(r.context, r.model.feeds[0])
    kept = math.exp(-_layer_loss(0.040, 0.0))
    for c in study.corners:
        # the weak-damping closed form of the collisional loss there and back, (8/3) k0 L ν/ω
        # (Ginzburg 1970, linear layer; derived in tests/physics/test_rays_damping.py), is
        # 1.0e-5 at 1 keV; the study's rays (rtol 1e-5, Ar+ ions with the same ν: O(m_e/m_i))
        # lose it within 3e-8 of the launched power
        assert c.shares["launcher"] == pytest.approx((1 - math.exp(-8)) * kept, rel=1e-7)
        assert c.shares["absorbed"] == pytest.approx((1 - math.exp(-8)) * (1 - kept), rel=1e-2)
        assert c.shares["launcher"] + c.shares["absorbed"] == pytest.approx(
            1 - math.exp(-8), rel=1e-9)
        back = np.array([e == "launcher" for e in c.ends])
        assert back.all()
        # each ray comes back where it started (normal incidence in a 1-D layer)
        starts = np.array([ray.path[0] for ray in c.rays])
        np.testing.assert_allclose(c.return_points[:, :2], starts[:, :2], atol=2e-5)
        radii = np.hypot(starts[:, 0], starts[:, 1])
        np.testing.assert_allclose(c.return_offsets, radii, atol=2e-5)
        assert np.nanmax(c.return_offsets) < 0.020  # inside the sampled 2w disc
        on, wall = c.window_split(0.050)
        assert on == pytest.approx(c.shares["launcher"], rel=1e-12)
        assert wall == pytest.approx(0.0, abs=1e-12)
        # a window narrower than the beam takes only the rays within its radius: the centre
        # and the first ring (mid radii 8.1 mm < 10 mm < 12.9 mm of the next)
        on10, wall10 = c.window_split(0.010)
        inner = radii <= 0.010
        carried = np.array([ray.power[-1] for ray in c.rays])
        assert on10 == pytest.approx(float((c.weights * carried)[inner].sum()), rel=1e-12)
        # the TEM00 share of those rays (Siegman ch. 17), less the collisional loss above
        assert on10 == pytest.approx(float(c.weights[inner].sum()) * kept, rel=1e-7)
        assert on10 + wall10 == pytest.approx(c.shares["launcher"], rel=1e-12)
    f = found[("rays.window-return", "window vacuum-window")]
    assert f.status.value == "fail"
    # the worst corner: the larger returned share (the two current scales differ by ~1e-11)
    worst = max(k.shares["launcher"] for k in study.corners)
    assert f.measured.value == pytest.approx(1500 * worst, rel=1e-12)
    assert f.measured.value == pytest.approx(1500 * (1 - math.exp(-8)) * kept, rel=1e-7)
    assert f.limit.value == pytest.approx(150.0)
    assert "no max_absorbed_power" in f.message and "50 mm" in f.message


def test_a_window_without_a_size_takes_all_the_returned_power(write_spec, demo_text):
    # the same layer, the window's diameter not declared: the worst case, all of it on the
    # window, said in the message
    text = _layer(demo_text, 0.040, _tilted(-20, 20), window="")
    _, found = _run(write_spec, text)
    f = found[("rays.window-return", "window vacuum-window")]
    assert "size is not declared" in f.message
    # the single ray at 20° keeps exp(−(8/3) k0 L cos³θ ν/ω) of its power (the same closed
    # form along the tilted path; tests/physics/test_rays_damping.py)
    kept = math.exp(-_layer_loss(0.040, math.radians(20.0)))
    assert f.measured.value == pytest.approx(1500.0 * kept, rel=1e-7)


def test_a_tilted_ray_comes_back_displaced_by_2_l_sin_2theta_onto_the_end_wall(write_spec,
                                                                              demo_text):
    # linear layer n² = 1 − z/L (Ginzburg 1970, the ray in a linear layer): N_x = sin θ is
    # conserved, the ray turns at z = L cos²θ and comes back to z = 0 displaced by
    # Δ = 2 L sin 2θ along the tilt: from x0 = −20 mm at θ = 20°, L = 40 mm, by 51.4 mm.
    # The launcher plane is the launcher's aperture plane, normal to the tilted launch
    # direction u = (sin θ, 0, cos θ) through the launcher; the ray goes on straight at
    # (sin θ, 0, −cos θ) and meets it at the distance Δ cos θ / cos 2θ = 63.1 mm from the
    # launcher (plane geometry), beyond the 30 mm radius of a 60 mm window
    l_n, theta = 0.040, math.radians(20.0)
    delta = 2 * l_n * math.sin(2 * theta)
    text = _layer(demo_text, l_n, _tilted(-20, 20), window='diameter = "60 mm"')
    r, found = _run(write_spec, text)
    corners = ray_study(r.context, r.model.feeds[0]).corners
    assert len(corners) == 2  # current scale 0.98 and 1.02 of a 1 mT field: the same rays
    for c in corners:
        assert c.ends == ["launcher"]
        (ray,) = c.rays
        # where the ray recrosses z = 0: back along its last (vacuum, straight) stretch;
        # the 1 mT field (Y = 0.002) moves the cutoff by O(Y), the ions add O(m_e/m_i)
        e, n = ray.end, ray.refractive_index[-1]
        assert e[2] < 0 and e[0] - e[2] * n[0] / n[2] == pytest.approx(-0.020 + delta, rel=5e-3)
        expected = delta * math.cos(theta) / math.cos(2 * theta)
        assert c.return_offsets[0] == pytest.approx(expected, rel=5e-3)
        u = np.array([math.sin(theta), 0.0, math.cos(theta)])
        assert np.dot(c.return_points[0] - [-0.020, 0, 0], u) == pytest.approx(0.0, abs=1e-7)
        on, wall = c.window_split(0.030)
        assert on == 0.0 and wall == pytest.approx(c.shares["launcher"], rel=1e-12)
        # a window wide enough to hold the crossing takes it (radius 70 mm > 63.1 mm)
        assert c.window_split(0.070)[0] == pytest.approx(c.shares["launcher"], rel=1e-12)
    f = found[("rays.window-return", "window vacuum-window")]
    assert f.status.value == "pass" and f.measured.value == 0.0
    assert "lands on the end wall" in f.message
    # all of it, less the collisional loss along the tilted path (closed form, _layer_loss)
    assert f.details["end_wall_share"] == pytest.approx(
        math.exp(-_layer_loss(l_n, theta)), rel=1e-7)
    # rays.wall-load is unchanged by the split: all of it back through the launcher plane
    wall = next(x for x in r.findings if x.rule == "rays.wall-load")
    assert wall.measured.value == pytest.approx(f.details["end_wall_share"], rel=1e-12)


@pytest.mark.parametrize("factor", [0.5, 2.0])
def test_the_go_parameter_peaks_at_the_turning_point_where_the_closed_form_says(
        write_spec, demo_text, factor):
    # linear layer, oblique ray at θ = 30°: 1/(kL) = |∇n²|/(k0 n³) = 1/(k0 L n³) is largest
    # at the turning point n = sin θ: G = 1/(k0 L sin³θ) (Ginzburg 1970; Bellan 2006 ch. 5
    # for the WKB parameter). G = 1 at L* = 1/(k0 sin³θ) = 26.3 mm: L = L*/2 gives G = 2
    # (geometric optics fails, the rule warns), L = 2 L* gives G = 1/2 (it holds, passes)
    theta = math.radians(30.0)
    l_star = 1 / (K0 * math.sin(theta) ** 3)
    l_n = factor * l_star
    x0 = -70 if factor > 1 else -10  # the return stays inside r = 75 mm
    r, found = _run(write_spec, _layer(demo_text, l_n, _tilted(x0, 30)))
    g = 1 / (K0 * l_n * math.sin(theta) ** 3)
    for c in ray_study(r.context, r.model.feeds[0]).corners:
        assert c.ends == ["launcher"]
        # the path's sampled maximum lies at or below the peak, and close to it
        assert c.go_max[0] == pytest.approx(g, rel=0.1)
        assert c.go_max[0] <= g * 1.01
        # the largest value sits at the turning point z = L cos²θ
        assert c.go_at[0, 2] == pytest.approx(l_n * math.cos(theta) ** 2, rel=0.02)
    f = found[("rays.geometric-optics", "feed main")]
    assert f.status.value == ("warn" if factor < 1 else "pass")
    assert f.measured.value == (1.0 if factor < 1 else 0.0)
    if factor < 1:
        # tilt 30° > 10°: no 1-D result takes over
        assert "no 1-D result covers it" in f.message and "tilt 30°" in f.message


def test_a_normal_beam_at_a_cutoff_hands_over_to_the_one_dimensional_full_wave(write_spec,
                                                                              demo_text):
    # at normal incidence 1/(kL) = 1/(k0 L n³) grows without bound at the cutoff n = 0, so
    # every ray of the beam fails geometric optics before it turns; the launch is on the
    # axis and the field uniform (|B| off the axis equals the axis value): the 1-D cold full
    # wave along the axis takes over, and an overdense lossless layer reflects it whole
    # (Stix ch. 1; the full wave's reflection of the R part, load.plasma-reflection)
    r, found = _run(write_spec, _layer(demo_text, 0.040, BEAM))
    f = found[("rays.geometric-optics", "feed main")]
    assert f.status.value == "warn"
    assert f.measured.value == pytest.approx(1 - math.exp(-8), rel=1e-9)
    ret = plasma_return(r.context, r.model.feeds[0])
    first = ret.parts["R"].first
    assert first.reflected == pytest.approx(1.0, abs=1e-3)
    assert "1-D cold full wave along the axis takes over" in f.message
    assert "above 1e3 (n → 0" in f.message  # unbounded at the cutoff: not printed as a number
    assert "reflects 100 %" in f.message


def test_the_resonance_band_is_the_thermal_doppler_width():
    # v_te / c = √(2 T_e / m_e c²): 10 eV against m_e c² = 510.999 keV (NRL Formulary) gives
    # 6.256e-3
    assert resonance_band(10.0) == pytest.approx(math.sqrt(2 * 10 / 510998.95), rel=1e-6)


def test_on_axis_launches_get_the_same_not_applicable_finding_from_every_rays_rule(
        demo_text, write_spec):
    # the bench reactor's on-axis launch: every rays.* rule, these two included, says the
    # same of the feed (no ray is traced; the 1-D axis results cover it)
    r = run(load_spec(write_spec(demo_text)), load_policy(None))
    rays = [f for f in r.findings if f.rule.startswith("rays.")]
    assert {f.rule for f in rays} >= set(RULES)
    assert all(f.status.value == "not-applicable" for f in rays)
    assert len({f.message for f in rays}) == 1 and "1-D axis results" in rays[0].message


def test_a_traced_feed_with_another_absorption_is_not_applicable_with_its_reason(
        write_spec, demo_text):
    # a tilted launch of a feed whose absorption the ray models do not cover: _skip's reason
    text = _layer(demo_text, 0.040, _tilted(-20, 20)).replace('absorption = "ecr"',
                                                              'absorption = "uhr"')
    _, found = _run(write_spec, text)
    assert sorted(k[0] for k in found) == sorted(RULES)
    assert all(f.status.value == "not-applicable" and "judged on the axis" in f.message
               for f in found.values())


def test_a_rated_window_allows_what_its_rating_leaves_after_the_forward_pass(write_spec,
                                                                          demo_text):
    # the bench window keeps its 40 W max_absorbed_power: it absorbs A of what passes it, so
    # the returned peak power may be (40 W − A P_avg) / (A δ), with A P_avg the forward pass's
    # absorbed power of window.absorbed-power (A = 1 − |Γ|² − |T|², Pozar §4.4) and δ = 1
    r, found = _run(write_spec, _layer(demo_text, 0.040, BEAM))
    fwd = next(x for x in r.findings if x.rule == "window.absorbed-power")
    p_abs = fwd.measured.value
    a = p_abs / 1500.0
    f = found[("rays.window-return", "window vacuum-window")]
    assert f.limit.value == pytest.approx((40.0 - p_abs) / a, rel=1e-9)
    assert f.status.value == ("pass" if f.measured.value <= f.limit.value else "fail")
    assert "max_absorbed_power 40 W" in f.message


def test_rays_that_never_leave_the_launcher_give_no_geometric_optics_pass(write_spec,
                                                                         demo_text):
    # a uniform plasma at X = 2 from the launcher on (n_peak = 2 n_c with n_c the X = 1
    # cutoff density, Stix ch. 1): the R wave (cutoff X = 1 − Y, Y = 0.002) is evanescent at
    # the start, no ray moves, and there is no 1/(kL) to read: not a pass
    text = _layer(demo_text, 0.15, BEAM).replace(
        'points = [["0 mm", 0.0], ["300 mm", 1.0]]', 'points = [["0 mm", 1.0], ["300 mm", 1.0]]')
    r, found = _run(write_spec, text)
    study = ray_study(r.context, r.model.feeds[0])
    assert all(ray.stop == "evanescent_start" for k in study.corners for ray in k.rays)
    go = found[("rays.geometric-optics", "feed main")]
    assert go.status.value == "not-applicable"
    assert "no ray has a point to read" in go.message
    reach = next(f for f in r.findings if f.rule == "rays.reaches-resonance")
    assert reach.status.value == "fail"
