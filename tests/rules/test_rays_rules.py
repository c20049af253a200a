"""The rays.* rules and their ray study: the on-axis ray against the 1-D access result of the
bench reactor, straight rays in a near-vacuum against the chamber's geometry, and the
not-applicable findings of on-axis launches."""

import math
import re
from dataclasses import replace

import numpy as np
import pytest

from rfcheck.analysis.launch_path import Corner, collision_frequency, launch_path, profile_shape
from rfcheck.analysis.rays import LAYER_BAND, compute_ray_study, ray_study
from rfcheck.physics.access import mode_n2
from rfcheck.physics.constants import C
from rfcheck.physics.frequencies import ecr_field
from rfcheck.rules.policy import load_policy
from rfcheck.run import run
from rfcheck.spec import load_spec

from pathlib import Path

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"
DEMO = EXAMPLES / "bench-ecr-reactor.toml"

RAYS = ("rays.reaches-resonance", "rays.first-pass-absorption", "rays.wall-load",
        "rays.deposition-region")


@pytest.fixture(scope="module")
def bench_run():
    return run(load_spec(DEMO), load_policy(None))


def test_on_axis_ray_reproduces_the_one_dimensional_access_of_the_bench_reactor(bench_run):
    # the 1-D access solution (rfcheck.physics.access on the axis profile; Stix 1992 ch. 13:
    # the R wave from the high-field side reaches the ECR directly) and the on-axis ray of
    # the same launch, field model and density, at every corner the study evaluates, at the
    # nominal frequency: both reach the layer, at the same z. The ray ends at the edge of
    # its band |B| = B_ECR (1 + 1e-3), which lies L_B · 1e-3 before the layer (L_B the
    # on-axis scale length |B|/|dB/dz| there).
    ctx = bench_run.context
    feed = bench_run.model.feeds[0]
    assert not feed.launch.traced
    study = compute_ray_study(ctx, feed)  # the on-axis launch as one ray
    path = launch_path(ctx, feed)
    scales = list(path.scales)
    densities = list(path.densities)
    for c in study.corners:
        j, i = scales.index(c.scale), densities.index(c.density)
        corner = Corner(c.density, c.scale, feed.frequency, 2.0, (i, j, 99))
        acc = path.access(corner)
        assert acc.verdict == "direct"
        z_1d = path.z_at(float(acc.resonance_z[0]))
        (ray,) = c.rays
        assert ray.stop == "cyclotron_layer"
        b = ctx.axis_field(c.scale)[0]
        slope = np.gradient(b, ctx.axis_z)
        k = int(np.argmin(abs(ctx.axis_z - z_1d)))
        shift = LAYER_BAND * b[k] / abs(slope[k])
        assert ray.end[2] == pytest.approx(z_1d - shift, abs=2e-4)
        np.testing.assert_allclose(ray.path[:, :2], 0.0, atol=1e-9)
        # no tunnelling on the 1-D path; the ray's power at the layer is the collisional
        # damping exp(−∫ 2 k0 Im n dz) of the same R wave along the axis (weak damping along
        # the ray, Stix 1992 ch. 4), with the study's collision frequency
        assert acc.tunnelling_factor == pytest.approx(1.0)
        model = bench_run.model
        nu = float(collision_frequency(model.plasma, c.density,
                                       float(np.min(ctx.envelope.electron_temperature)),
                                       model.plasma.neutral.pressure.min))
        z = np.linspace(ray.path[0, 2], ray.end[2], 4001)
        n_e = c.density * profile_shape(model.plasma.profile, model.chamber, z)
        b_z = np.interp(z, ctx.axis_z, b)
        n2 = mode_n2(feed.frequency, b_z, n_e, "R", None, model.plasma.ions, nu)
        alpha = 2 * (2 * math.pi * feed.frequency / C) * np.abs(np.sqrt(n2.astype(complex)).imag)
        expected = math.exp(-float(np.trapezoid(alpha, z)))
        assert c.reach == pytest.approx(expected, rel=2e-3)
        assert c.reach < 0.999  # the damping is visible: the check can fail


def test_on_axis_launches_get_not_applicable_findings_naming_the_axis_results(bench_run):
    found = [f for f in bench_run.findings if f.rule in RAYS]
    assert sorted(f.rule for f in found) == sorted(RAYS)
    for f in found:
        assert f.status.value == "not-applicable"
        assert "1-D axis results" in f.message


def _vacuum_tilted(text: str, launch: str) -> str:
    # near-vacuum (X ~ 1e-7) in a uniform 0.2 T field (above B_ECR = 87.5 mT everywhere: no
    # layer), so every ray is straight (n² = 1 − X/(1 − Y) ≈ 1)
    text = re.sub(r"coils = \[\n(.*\n)*?\]\n", 'uniform = { b = "0.2 T" }\n', text, count=1)
    text = text.replace('density = { min = "2e16 m^-3", max = "5e16 m^-3" }',
                        'density = { min = "1e10 m^-3", max = "2e10 m^-3" }')
    return re.sub(r"^launch = .*$", launch, text, count=1, flags=re.M)


def test_straight_rays_in_a_near_vacuum_strike_the_side_wall_where_geometry_says(
        write_spec, demo_text):
    # a ray from x0 = 20 mm tilted 20° away from the axis in the x–z plane meets the side
    # wall r = R = 75 mm at z = (R − x0) / tan 20° (straight line; Snell's law with n = 1)
    launch = ('launch = { z = "0 mm", direction = "+z", mode = "R", angle_to_field = "0 deg", '
              'polarisation = "circular-right", x = "20 mm", tilt = "20 deg" }')
    r = run(load_spec(write_spec(_vacuum_tilted(demo_text, launch))), load_policy(None))
    study = ray_study(r.context, r.model.feeds[0])
    z_hit = (0.075 - 0.020) / math.tan(math.radians(20.0))
    for c in study.corners:
        (ray,) = c.rays
        assert c.ends == ["side wall"]
        assert ray.end[2] == pytest.approx(z_hit, rel=1e-6)
        assert math.hypot(ray.end[0], ray.end[1]) == pytest.approx(0.075, rel=1e-9)
        assert c.shares["side wall"] == pytest.approx(1.0, abs=1e-9)
    by_rule = {f.rule: f for f in r.findings if f.rule in RAYS}
    assert by_rule["rays.reaches-resonance"].status.value == "fail"
    assert by_rule["rays.reaches-resonance"].measured.value == pytest.approx(0.0, abs=1e-12)
    assert by_rule["rays.wall-load"].status.value == "pass"
    assert "side wall 100 %" in by_rule["rays.wall-load"].message
    assert by_rule["rays.deposition-region"].status.value == "not-applicable"


def test_a_tilt_towards_a_wall_beyond_the_far_end_ends_on_the_far_end(write_spec, demo_text):
    # tilt 5° from the axis: the side wall would be met at z = 55 mm / tan 5° = 629 mm,
    # beyond the far end wall at z = 300 mm, where the ray ends at x = x0 + 300 mm · tan 5°
    launch = ('launch = { z = "0 mm", direction = "+z", mode = "R", angle_to_field = "0 deg", '
              'polarisation = "circular-right", x = "20 mm", tilt = "5 deg" }')
    r = run(load_spec(write_spec(_vacuum_tilted(demo_text, launch))), load_policy(None))
    for c in ray_study(r.context, r.model.feeds[0]).corners:
        (ray,) = c.rays
        assert c.ends == ["far end"]
        assert ray.end[0] == pytest.approx(0.020 + 0.300 * math.tan(math.radians(5.0)),
                                           rel=1e-6)


def test_the_oblique_beam_example_is_judged_by_its_rays():
    r = run(load_spec(EXAMPLES / "oblique-beam-reactor.toml"), load_policy(None))
    feed = r.model.feeds[0]
    study = ray_study(r.context, feed)
    assert len(study.corners) == 4 and len(study.corners[0].rays) == 49
    # the beam's power shares: the sampled disc (2 w) holds 1 − e^−8 (TEM00, Siegman ch. 17)
    assert study.corners[0].weights.sum() == pytest.approx(1 - math.exp(-8), rel=1e-12)
    b_res = float(ecr_field(feed.frequency))
    for c in study.corners:
        for ray, end in zip(c.rays, c.ends):
            if end == "layer":  # a layer end lies on the band edge B_res (1 + 1e-3)
                b_end = np.linalg.norm(study.grid(ray.end[None, :])[0, :3] * c.scale
                                       + study.grid(ray.end[None, :])[0, 3:])
                assert b_end == pytest.approx(b_res * (1 + LAYER_BAND), rel=1e-6)
        total = sum(c.shares.values())
        assert total == pytest.approx(1.0, abs=1e-9)  # every part of the power is placed
    found = {f.rule: f for f in r.findings if f.rule in RAYS}
    assert all(f.status.value != "not-applicable" for f in found.values())
    assert "49 rays" in found["rays.reaches-resonance"].message


def test_the_oblique_example_runs_under_warnings_as_errors_and_draws_its_rays():
    # the same filter as tests/physics/test_edges.py applies to the other examples; the three
    # ray figures exist for the traced feed only, and their captions name what is drawn
    import warnings

    from rfcheck.findings import Status
    from rfcheck.report.figure_rays import ray_figures

    with warnings.catch_warnings():
        warnings.simplefilter("error")
        r = run(load_spec(EXAMPLES / "oblique-beam-reactor.toml"), load_policy(None))
        figs = ray_figures(r)
    assert not [f.message for f in r.findings if f.status is Status.ERROR]
    assert [f["id"] for f in figs] == ["rays-map-klystron", "rays-section-klystron",
                                       "rays-deposition-klystron"]
    assert "the 49 rays of the R branch" in figs[0]["caption"]
    assert "518 mT" in figs[0]["caption"]  # B_ECR at 14.5 GHz: 2π f m_e / e = 0.5179 T
    assert "one colour per envelope corner" in figs[1]["caption"]
    assert "one line per envelope corner" in figs[2]["caption"]
    assert figs[0]["svg"].startswith("<svg")


def test_on_axis_examples_draw_no_ray_figures(bench_run):
    from rfcheck.report.figure_rays import ray_figures

    assert ray_figures(bench_run) == []


def test_a_traced_launch_through_a_measured_field_map_is_evaluated(write_spec, demo_text):
    # a measured (B_r, B_z) map covering just the chamber (r 0–75 mm, z 0–300 mm) of a
    # uniform 0.2 T field: the study samples it without leaving the map, and the straight
    # ray of the near-vacuum case meets the side wall at z = (R − x0)/tan 20° as above
    csv = "r [mm], z [mm], Br [T], Bz [T]\n" + "".join(
        f"{r}, {z}, 0, 0.2\n" for r in (0, 25, 50, 75) for z in (0, 100, 200, 300))
    path = write_spec(csv, "map.csv")
    launch = ('launch = { z = "0 mm", direction = "+z", mode = "R", angle_to_field = "0 deg", '
              'polarisation = "circular-right", x = "20 mm", tilt = "20 deg" }')
    text = _vacuum_tilted(demo_text, launch).replace(
        'uniform = { b = "0.2 T" }', f'field_map = {{ file = "{path.name}" }}')
    r = run(load_spec(write_spec(text)), load_policy(None))
    found = {f.rule: f for f in r.findings if f.rule in RAYS}
    assert found["rays.wall-load"].status.value == "pass", found["rays.wall-load"].message
    (ray,) = ray_study(r.context, r.model.feeds[0]).corners[0].rays
    assert ray.end[2] == pytest.approx((0.075 - 0.020) / math.tan(math.radians(20.0)), rel=1e-6)
