"""Ray bundles with per-ray steps, the spline field grid and beams started away from their
waist, each against a closed form named beside it."""

import math

import numpy as np
import pytest

from rfcheck.physics.constants import C, MU0
from rfcheck.physics.frequencies import critical_density, ecr_field
from rfcheck.physics.rays import GridField, _beam_rays, trace_rays

F = 2.45e9
NC = float(critical_density(F))
B_ECR = float(ecr_field(F))


def no_field(p):
    return np.zeros((len(p), 3))


def test_a_stiff_ray_does_not_spoil_the_linear_layer_rays_of_its_bundle():
    # Ginzburg (1970), the ray in a linear layer X = x/L (unmagnetised): launched at θ from
    # the gradient it turns at x = L cos²θ and comes back to x = 0 displaced by
    # 2 L sin 2θ. Beside them, in the same bundle, a ray runs into a cyclotron layer of a
    # separate region (x < −5 mm, field rising to B_ECR), where its steps shrink; with per-ray
    # steps the layer rays keep their accuracy (and the stiff one ends at its band).
    length = 0.1

    def field(p):
        out = np.zeros((len(p), 3))
        out[:, 2] = np.where(p[:, 0] < -0.005, B_ECR * (1.5 + p[:, 0] / 0.3), 0.0)
        return out

    def dens(p):
        return np.where(p[:, 0] < -0.005, 0.01 * NC, NC * np.clip(p[:, 0] / length, 0.0, None))

    angles = np.radians([10.0, 30.0, 50.0])
    starts = np.zeros((4, 3))
    starts[3] = [-0.01, 0.0, 0.0]
    dirs = np.stack([np.cos(angles), 0 * angles, np.sin(angles)], axis=1)
    dirs = np.vstack([dirs, [[0.0, 0.0, 1.0]]])
    # the stiff ray: from x = −0.01 m, |B| = B_ECR (1.5 − 0.033) falling towards x → −0.15 m
    dirs[3] = [-1.0, 0.0, 0.05]
    rays = trace_rays(F, starts, dirs, "R", field, dens, max_length=1.0, max_step=length / 100,
                      inside=lambda p: np.where(p[:, 0] < -0.005, 1.0, p[:, 0] + 1e-9),
                      cyclotron_field=B_ECR)
    for theta, ray in zip(angles, rays[:3]):
        assert ray.stop == "wall"
        assert ray.end[2] == pytest.approx(2 * length * math.sin(2 * theta), rel=1e-5)
        assert ray.path[:, 0].max() == pytest.approx(length * math.cos(theta) ** 2, rel=1e-4)
    assert rays[3].stop == "cyclotron_layer"
    # band edge |B| = B_ECR (1 + 1e-3): x = 0.3 (1.001 − 1.5) = −0.1497 m
    assert rays[3].end[0] == pytest.approx(0.3 * (1.001 - 1.5), abs=1e-5)


def _dipole(m_z: float, where):
    """Field of a point dipole m ẑ at `where`: B = μ0/(4π) (3 r̂ (m·r̂) − m)/r³ (Jackson,
    Classical Electrodynamics, 3rd ed., eq. 5.56)."""
    def b(p):
        r = p - np.asarray(where)
        d = np.linalg.norm(r, axis=1)[:, None]
        u = r / d
        m = np.array([0.0, 0.0, m_z])
        return MU0 / (4 * math.pi) * (3 * u * (u @ m)[:, None] - m) / d**3
    return b


def test_the_spline_grid_reproduces_a_dipole_field_between_its_nodes():
    # a dipole 0.3 m below the box (closed form, Jackson eq. 5.56): smooth on the scale of
    # the box, so cubic splines on 5 mm cells reproduce it to ~(h/L)^4 ≈ 1e-5 relative
    b = _dipole(100.0, [0.0, 0.0, -0.3])
    grid = GridField(b, [-0.05, -0.05, 0.0], [0.05, 0.05, 0.2], 0.005)
    pts = np.random.default_rng(3).uniform([-0.05, -0.05, 0.0], [0.05, 0.05, 0.2], (500, 3))
    exact = b(pts)
    err = np.linalg.norm(grid(pts) - exact, axis=1) / np.linalg.norm(exact, axis=1)
    assert err.max() < 1e-4
    assert err.max() > 0  # an interpolant, not the function itself


def test_the_spline_grid_refuses_a_grid_beyond_its_bound_and_a_bad_box():
    with pytest.raises(ValueError, match="max_points"):
        GridField(no_field, [0, 0, 0], [1, 1, 1], 1e-3)
    with pytest.raises(ValueError, match="high > low"):
        GridField(no_field, [0, 0, 0], [0, 1, 1], 0.1)


def test_a_beam_far_from_its_waist_spreads_at_the_far_field_divergence():
    # TEM00 beam (Siegman, Lasers, ch. 17): far from the waist (|z| ≫ z_R) the rays normal
    # to the phase front leave at ρ/R(z) → (ρ/w(z)) λ/(π w0), i.e. the ray at the beam's
    # 1/e² radius at the far-field half-angle θ = λ/(π w0), and the samples lie on w(z)
    w0 = 0.02
    lam = C / F
    z_r = math.pi * w0**2 / lam
    distance = 100 * z_r
    pts, dirs, shares = _beam_rays(F, [0, 0, 0], [0, 0, 1], w0, waist_distance=-distance,
                                   rings=3, per_ring=8)
    rho = np.hypot(pts[:, 0], pts[:, 1])
    w_z = w0 * math.sqrt(1 + (distance / z_r) ** 2)
    angle = np.arctan2(np.hypot(dirs[:, 0], dirs[:, 1]), dirs[:, 2])
    outer = rho > 0
    np.testing.assert_allclose(angle[outer], np.arctan(rho[outer] / w_z * lam / (math.pi * w0)),
                               rtol=2e-4)
    assert shares.sum() == pytest.approx(1 - math.exp(-8), rel=1e-12)
    # before a waist ahead, the rays converge (point towards the axis)
    pts, dirs, _ = _beam_rays(F, [0, 0, 0], [0, 0, 1], w0, waist_distance=+distance)
    assert np.all(np.einsum("ij,ij->i", pts[1:, :2], dirs[1:, :2]) < 0)


def test_groups_of_different_media_in_one_bundle_trace_as_each_group_alone():
    # Ginzburg (1970), the ray in a linear layer X = x/L: turning point x = L cos²θ. Two
    # layers of different gradient (L = 0.1 m and 0.05 m, a density scale per group) and a
    # collisional one traced as one grouped bundle: each ray equals the ray of its own
    # medium traced alone (its own steps) and turns where the closed form says.
    lengths = np.array([0.1, 0.05, 0.1])
    nus = [0.0, 0.0, 2e7]
    theta = math.radians(30.0)
    d = [math.cos(theta), 0.0, math.sin(theta)]
    inside = lambda p: p[:, 0] + 1e-9  # noqa: E731

    def dens_group(p, g):
        return NC * np.clip(p[:, 0] / lengths[g], 0.0, None)

    def field_group(p, g):
        return np.zeros((len(p), 3))

    together = trace_rays(F, np.zeros((3, 3)), [d] * 3, "O", field_group, dens_group,
                          max_length=1.0, max_step=0.001, inside=inside,
                          collision_frequency=nus, groups=np.array([0, 1, 2]))
    for i, ray in enumerate(together):
        alone = trace_rays(F, np.zeros((1, 3)), [d], "O", no_field,
                           lambda p, i=i: NC * np.clip(p[:, 0] / lengths[i], 0.0, None),
                           max_length=1.0, max_step=0.001, inside=inside,
                           collision_frequency=nus[i])[0]
        assert ray.stop == alone.stop == "wall"
        np.testing.assert_allclose(ray.path, alone.path, rtol=1e-12, atol=1e-15)
        np.testing.assert_allclose(ray.power, alone.power, rtol=1e-12)
        assert ray.path[:, 0].max() == pytest.approx(lengths[i] * math.cos(theta) ** 2,
                                                     rel=1e-4)
    assert together[0].power[-1] == 1.0 and together[2].power[-1] < 1.0
    with pytest.raises(ValueError, match="groups"):
        trace_rays(F, np.zeros((2, 3)), [d] * 2, "O", field_group, dens_group, max_length=1.0,
                   groups=np.array([0.0, 1.0]))


def test_a_combined_grid_interpolates_the_combined_field():
    # two dipoles (Jackson eq. 5.56) sampled as 6 components; the grid of 2 A + B built on
    # the spline coefficients equals 2 A + B of the interpolated components (the B-spline
    # prefilter is linear) and stays within the grid's accuracy of the closed form
    a, b = _dipole(100.0, [0.0, 0.0, -0.3]), _dipole(-40.0, [0.0, 0.0, 0.5])
    grid = GridField(lambda p: np.hstack([a(p), b(p)]), [-0.05, -0.05, 0.0],
                     [0.05, 0.05, 0.2], 0.005)
    both = grid.combined(np.hstack([2.0 * np.eye(3), np.eye(3)]))
    pts = np.random.default_rng(5).uniform([-0.05, -0.05, 0.0], [0.05, 0.05, 0.2], (300, 3))
    v = grid(pts)
    np.testing.assert_allclose(both(pts), 2.0 * v[:, :3] + v[:, 3:], rtol=1e-12, atol=1e-18)
    exact = 2.0 * a(pts) + b(pts)
    # the two fields partly cancel: the error is measured against the sum of their sizes
    size = 2.0 * np.linalg.norm(a(pts), axis=1) + np.linalg.norm(b(pts), axis=1)
    err = np.linalg.norm(both(pts) - exact, axis=1) / size
    assert err.max() < 1e-4 and both.components == 3
    with pytest.raises(ValueError, match="weights"):
        grid.combined(np.eye(3))
