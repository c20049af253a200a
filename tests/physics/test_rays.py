"""Geometric-optics rays (rfcheck.physics.rays) against closed-form ray results.

References named beside each check: V.L. Ginzburg, The Propagation of Electromagnetic Waves in
Plasmas (Pergamon, 1970), the ray in a linear layer; Snell's law in a stratified medium (Stix
1992 ch. 4; Bellan 2006 ch. 5); the Appleton-Hartree / Stix roots for R along B (Stix 1992
ch. 1); collisional damping k_i from the cold dielectric with ω → ω + iν (Swanson 2003 ch. 2).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from rfcheck.physics.constants import C
from rfcheck.physics.frequencies import critical_density, ecr_field
from rfcheck.physics.rays import STOPS, trace_ray

F = 2.45e9
NC = float(critical_density(F))
B_ECR = float(ecr_field(F))


def no_field(p):
    return np.zeros((len(p), 3))


def vacuum(p):
    return np.zeros(len(p))


def test_rays_in_vacuum_are_straight_with_unit_index():
    # closed form: N = 1 and a straight line in vacuum
    d = np.array([0.3, -0.2, 0.9])
    ray = trace_ray(F, [0.01, 0.02, 0.0], d, "O", no_field, vacuum, max_length=0.4)
    assert ray.stop == "max_length"
    assert ray.s[-1] == pytest.approx(0.4)
    unit = d / np.linalg.norm(d)
    np.testing.assert_allclose(ray.end, [0.01, 0.02, 0.0] + 0.4 * unit, atol=1e-9)
    np.testing.assert_allclose(np.linalg.norm(ray.refractive_index, axis=1), 1.0, atol=1e-9)


@pytest.mark.parametrize("degrees", [10.0, 30.0, 50.0])
def test_linear_layer_turning_point_and_displacement(degrees):
    """Ginzburg (1970), the ray in a linear layer, unmagnetised: X = x/L for x > 0.

    With H = N² − (1 − x/L), N_z = sin θ0 is conserved and N_x² = cos²θ0 − x/L, so the ray
    turns where N_x = 0, at x_t = L cos²θ0. Along the ray dz/dx = N_z/N_x, so
    z(x) = 2 L sin θ0 (cos θ0 − √(cos²θ0 − x/L)): z = L sin 2θ0 at the turning point and the
    ray is back at x = 0 displaced by Δz = 2 L sin 2θ0 (a parabola).
    """
    length = 0.1
    theta = math.radians(degrees)
    ray = trace_ray(F, [0.0, 0.0, 0.0], [math.cos(theta), 0.0, math.sin(theta)], "O",
                    no_field, lambda p: NC * np.clip(p[:, 0] / length, 0.0, None),
                    max_length=1.0, rtol=1e-10, max_step=length / 400,
                    inside=lambda p: p[:, 0] + 1e-9)
    assert ray.stop == "wall"  # back at the plane x = 0
    assert ray.end[2] == pytest.approx(2 * length * math.sin(2 * theta), rel=1e-5)
    assert ray.path[:, 0].max() == pytest.approx(length * math.cos(theta) ** 2, rel=1e-4)
    # the highest point is reached half-way along z, at z = L sin 2θ0
    top = int(np.argmax(ray.path[:, 0]))
    assert ray.path[top, 2] == pytest.approx(length * math.sin(2 * theta), rel=2e-2)
    assert ray.residual < 1e-4


def test_snell_invariant_in_a_stratified_magnetised_plasma():
    # Snell: in a medium varying only along x, N_y and N_z are conserved along the ray
    # (∂H/∂y = ∂H/∂z = 0 in the ray equations; Stix 1992 ch. 4), here with an oblique B in the
    # strata so that the dispersion is anisotropic (X mode, 40 deg to the gradient)
    def field(p):
        out = np.zeros((len(p), 3))
        out[:, 2] = 0.6 * B_ECR
        out[:, 1] = 0.2 * B_ECR
        return out

    theta = math.radians(40)
    ray = trace_ray(F, [0.0, 0.0, 0.0], [math.cos(theta), 0.0, math.sin(theta)], "X", field,
                    lambda p: 0.3 * NC * np.clip(p[:, 0] / 0.1, 0.0, 1.0), max_length=0.3)
    assert ray.stop in ("max_length", "returned")
    np.testing.assert_allclose(ray.refractive_index[:, 1], ray.refractive_index[0, 1], atol=1e-9)
    np.testing.assert_allclose(ray.refractive_index[:, 2], ray.refractive_index[0, 2], atol=1e-9)
    # the ray bends: N_x changes from its vacuum value
    assert abs(ray.refractive_index[-1, 0] - ray.refractive_index[0, 0]) > 1e-3
    # D = 0 held along the ray (a stated tolerance: |N·N − n²| / max(1, N·N) below 1e-5)
    assert ray.residual < 1e-5


def test_r_wave_from_the_high_field_side_reaches_the_ecr_layer_of_a_beach():
    # magnetic beach B(z) = B_ecr (1.5 − z / 0.3 m), uniform overdense plasma X = 2: the R wave
    # along B has n² = 1 − X/(1 − Y) = 1 + 2/(Y − 1) > 0 for Y > 1 (Stix 1992 ch. 1), no
    # cutoff on the high-field side, n² → ∞ at Y = 1 (z = 0.15 m): the ray must end there
    def beach(p):
        out = np.zeros((len(p), 3))
        out[:, 2] = B_ECR * (1.5 - p[:, 2] / 0.3)
        return out

    ray = trace_ray(F, [0.0, 0.0, 0.0], [0.0, 0.0, 1.0], "R", beach,
                    lambda p: np.full(len(p), 2.0 * NC), max_length=0.5, n_max=100.0)
    assert ray.stop == "resonance"
    # |N| = 100 where 1 + 2/(Y − 1) = 1e4, i.e. Y − 1 = 2.0002e-4: z = 0.3 (0.5 − 2e-4)
    z_expected = 0.3 * (0.5 - 2.0 / (100.0**2 - 1.0))
    assert ray.end[2] == pytest.approx(z_expected, abs=1e-6)
    np.testing.assert_allclose(ray.path[:, :2], 0.0, atol=1e-12)
    # the same wave from the low-field side (X = 0.3) meets the R cutoff X = 1 − Y at Y = 0.7,
    # z = 0.3 (1.5 − 0.7) = 0.24 m, turns there and comes back through its launch plane
    low = trace_ray(F, [0.0, 0.0, 0.3], [0.0, 0.0, -1.0], "R", beach,
                    lambda p: np.full(len(p), 0.3 * NC), max_length=0.5, max_step=1e-3)
    assert low.stop == "returned"
    assert low.path[:, 2].min() == pytest.approx(0.24, abs=2e-4)


def test_collisional_damping_matches_the_cold_dielectric():
    # uniform unmagnetised plasma X = 0.5 with ν = 1e8 s^-1: P(s) = exp(−2 (ω/c) Im n s),
    # n² = 1 − X/(1 + iν/ω) (Swanson 2003 ch. 2, ω → ω + iν). The ray carries the weak-damping
    # form Im n ≈ Im n²/(2 n) with its real n = √(1 − X) (Stix 1992 ch. 4), which differs
    # from the exact root's Im n by 0.625 (ν/ω)² = 2.6e-5 relative at X = 0.5 (derived in
    # tests/physics/test_rays_damping.py)
    nu = 1e8
    ray = trace_ray(F, [0.0, 0.0, 0.0], [0.0, 0.0, 1.0], "O", no_field,
                    lambda p: np.full(len(p), 0.5 * NC), max_length=0.3, collision_frequency=nu)
    w = 2 * math.pi * F
    n2 = complex(1 - 0.5 / (1 + 1j * nu / w))
    weak = math.exp(-2 * w / C * n2.imag / (2 * math.sqrt(0.5)) * ray.s[-1])
    assert ray.power[-1] == pytest.approx(weak, rel=1e-8)
    exact = math.exp(-2 * w / C * abs(np.sqrt(n2).imag) * ray.s[-1])
    assert math.log(ray.power[-1]) == pytest.approx(math.log(exact),
                                                    rel=0.63 * (nu / w) ** 2)
    assert ray.power[-1] < 0.99  # the check can fail: the damping is visible


def test_on_axis_ray_in_the_bench_reactor_agrees_with_the_one_dimensional_resonance(base_model):
    # the 1-D review (rfcheck.magnet.geometry.resonance_crossings on the axis profile) puts
    # the first ECR crossing of the bench reactor's launch path at z_res; the on-axis R ray
    # through the same field model and density profile must end at that resonance
    from rfcheck.magnet.geometry import axis_profile, resonance_crossings
    from rfcheck.magnet.sources import FieldModel
    from rfcheck.analysis.launch_path import profile_shape

    model = base_model
    chamber = model.chamber
    field = FieldModel.for_chamber(model.magnet, chamber)
    feed = model.feeds[0]
    crossings = resonance_crossings(axis_profile(field, chamber, 1.0), float(ecr_field(feed.frequency)))
    z_res = min(c.z for c in crossings)
    n_peak = model.plasma.density.max
    ray = trace_ray(feed.frequency, [0.0, 0.0, feed.launch.z + 1e-4], [0.0, 0.0, 1.0], "R",
                    lambda p: field.field(p),
                    lambda p: n_peak * profile_shape(model.plasma.profile, chamber, p[:, 2]),
                    max_length=chamber.z_end - feed.launch.z, n_max=30.0)
    assert ray.stop == "resonance"
    assert ray.end[2] == pytest.approx(z_res, abs=2e-3)
    np.testing.assert_allclose(ray.path[:, :2], 0.0, atol=1e-6)


def test_a_wave_that_cannot_propagate_at_the_start_says_so():
    ray = trace_ray(F, [0.0, 0.0, 0.0], [1.0, 0.0, 0.0], "O", no_field,
                    lambda p: np.full(len(p), 2.0 * NC), max_length=0.1)
    assert ray.stop == "evanescent_start"
    assert ray.stop in STOPS


@pytest.mark.parametrize("kwargs, words", [
    ({"frequency": -1.0}, "frequency"),
    ({"max_length": float("inf")}, "max_length"),
    ({"direction": [0.0, 0.0, 0.0]}, "direction"),
    ({"mode": "Z"}, "mode"),
    ({"start": [float("nan"), 0.0, 0.0]}, "start"),
])
def test_odd_arguments_are_value_errors(kwargs, words):
    args = dict(frequency=F, start=[0.0, 0.0, 0.0], direction=[0.0, 0.0, 1.0], mode="O",
                b_field=no_field, density=vacuum, max_length=0.1)
    args.update(kwargs)
    with pytest.raises(ValueError, match=words):
        trace_ray(**args)


def test_the_work_of_one_ray_is_bounded():
    ray = trace_ray(F, [0.0, 0.0, 0.0], [0.0, 0.0, 1.0], "O", no_field, vacuum,
                    max_length=10.0, max_step=1e-4, max_evaluations=50)
    assert ray.stop == "step_failure"


def test_beam_samples_carry_the_gaussian_power_shares():
    # TEM00 intensity exp(−2ρ²/w²): the disc ρ ≤ 2w holds 1 − e^−8 of the power and the
    # power-weighted mean ρ² is w²/2 (Siegman, Lasers, ch. 17; closed forms)
    from rfcheck.physics.rays import beam_samples

    w = 0.01
    points, shares = beam_samples([0.0, 0.0, 0.1], [0.0, 0.0, 1.0], w, rings=4, per_ring=12)
    assert shares.sum() == pytest.approx(1.0 - math.exp(-8.0), rel=1e-12)
    np.testing.assert_allclose(points[:, 2], 0.1)  # all on the waist plane
    rho2 = (shares * (points[:, 0] ** 2 + points[:, 1] ** 2)).sum() / shares.sum()
    assert rho2 == pytest.approx(w**2 / 2, rel=0.05)


def test_a_beam_into_an_overdense_layer_is_returned_whole():
    # O wave at normal incidence on a layer rising past X = 1: every ray turns (P = 0 at
    # X = 1, Stix 1992 ch. 1) and comes back, so the returned share is the sampled share
    from rfcheck.physics.rays import trace_beam

    beam = trace_beam(F, [0.0, 0.0, 0.0], [1.0, 0.0, 0.0], 0.02, "O", no_field,
                      lambda p: NC * np.clip(p[:, 0] / 0.05, 0.0, None), rings=2, per_ring=6,
                      max_length=0.5, max_step=1e-3)
    assert beam.share("returned") == pytest.approx(beam.sampled_share, rel=1e-12)
    for ray in beam.rays:
        assert ray.path[:, 0].max() == pytest.approx(0.05, abs=1e-4)


def test_a_bundle_traced_together_matches_the_linear_layer_ray_by_ray():
    # the same closed form as above (Ginzburg 1970), three launch angles in one integration
    from rfcheck.physics.rays import trace_rays

    length = 0.1
    angles = np.radians([10.0, 30.0, 50.0])
    directions = np.stack([np.cos(angles), 0 * angles, np.sin(angles)], axis=1)
    rays = trace_rays(F, np.zeros((3, 3)), directions, "O", no_field,
                      lambda p: NC * np.clip(p[:, 0] / length, 0.0, None), max_length=1.0,
                      max_step=length / 100, inside=lambda p: p[:, 0] + 1e-9)
    for theta, ray in zip(angles, rays):
        assert ray.stop == "wall"
        assert ray.end[2] == pytest.approx(2 * length * math.sin(2 * theta), rel=1e-5)
        assert ray.path[:, 0].max() == pytest.approx(length * math.cos(theta) ** 2, rel=1e-4)
        assert ray.residual < 1e-4


def test_a_bundle_with_a_ray_that_cannot_start_and_one_that_runs_out_of_length():
    from rfcheck.physics.rays import trace_rays

    # X = 2 beyond x = 0.05 m: a ray started there is evanescent (O mode, n² = 1 − X < 0)
    dens = lambda p: np.where(p[:, 0] > 0.05, 2.0 * NC, 0.0)  # noqa: E731
    rays = trace_rays(F, [[0.0, 0.0, 0.0], [0.06, 0.0, 0.0]], [[0.0, 0.0, 1.0]], "O", no_field,
                      dens, max_length=0.2)
    assert [r.stop for r in rays] == ["max_length", "evanescent_start"]
    assert rays[0].s[-1] == pytest.approx(0.2, rel=1e-9)
    assert rays[0].end[2] == pytest.approx(0.2, rel=1e-9)


def test_oblique_rays_cross_the_cyclotron_layer_where_the_field_says():
    # an oblique R-branch ray in cold plasma has finite roots at Y = 1 (n² → 2L + P(1 + cos²θ)
    # /sin²θ as R, S → ∞; Stix 1992 ch. 1-2) but turns N towards B and slows as it nears the
    # layer, so a bundle asked for the layer must stop each ray at its band edge: here the
    # field depends on z only, B = B_ecr (1.5 − z/0.3 m), so the crossing is at z = 0.15 m;
    # a tenuous plasma (X = 0.01) keeps |N| near 1 up to the layer
    from rfcheck.physics.rays import trace_rays

    def beach(p):
        out = np.zeros((len(p), 3))
        out[:, 2] = B_ECR * (1.5 - p[:, 2] / 0.3)
        return out

    angles = np.radians([5.0, 20.0])
    directions = np.stack([np.sin(angles), 0 * angles, np.cos(angles)], axis=1)
    rays = trace_rays(F, np.zeros((2, 3)), directions, "R", beach,
                      lambda p: np.full(len(p), 0.01 * NC), max_length=0.5,
                      cyclotron_field=B_ECR, max_step=2e-3)
    # the band edge |B| = B_ecr (1 + 1e-3) lies at z = 0.3 (1.5 − 1.001) = 0.1497 m
    for ray in rays:
        assert ray.stop == "cyclotron_layer"
        assert ray.end[2] == pytest.approx(0.3 * (1.5 - 1.001), abs=2e-6)
