"""Radiation patterns of TE10 rectangular and TE11 circular apertures and the rays that sample
them, each against a closed form or a handbook value named beside it."""

import math

import numpy as np
import pytest
from scipy import integrate, optimize, special

from rfcheck.physics.aperture_pattern import (aperture_main_lobe, aperture_power_pattern,
                                              aperture_radiated_power)
from rfcheck.physics.constants import C
from rfcheck.physics.rays import aperture_rays, trace_rays

F = 10e9
LAM = C / F
K = 2 * math.pi / LAM
CHI = 1.8411838  # χ'11, first zero of J1' (Abramowitz & Stegun Table 9.5, from memory)

RECT = dict(width=3.1 * LAM, height=1.7 * LAM)
CIRC = dict(radius=2.3 * LAM)


def h_plane_te10(theta, a):
    # Balanis, Antenna Theory, 3rd ed., §12.5.3 (from memory): the H-plane (φ = 0) field of
    # the TE10 aperture in a ground plane, cosθ · cos X / (1 − (2X/π)²), X = (k a/2) sinθ
    x = 0.5 * K * a * np.sin(theta)
    return (np.cos(theta) * np.cos(x) / (1 - (2 * x / math.pi) ** 2)) ** 2


def e_plane_te10(theta, b):
    # Balanis §12.5.3 (from memory): the E-plane (φ = 90°) field, sin Y / Y, Y = (k b/2) sinθ
    y = 0.5 * K * b * np.sin(theta)
    return (np.sin(y) / y) ** 2


@pytest.mark.parametrize("theta", np.radians([1.0, 7.0, 15.0, 23.0, 40.0, 65.0, 85.0]))
def test_te10_principal_planes_are_balanis_closed_forms(theta):
    h = aperture_power_pattern(F, theta, 0.0, "rectangular", **RECT)
    e = aperture_power_pattern(F, theta, math.pi / 2, "rectangular", **RECT)
    assert h == pytest.approx(h_plane_te10(theta, RECT["width"]), rel=1e-9, abs=1e-15)
    assert e == pytest.approx(e_plane_te10(theta, RECT["height"]), rel=1e-9, abs=1e-15)


def test_te10_h_plane_at_its_removable_singularity():
    # X = π/2: cos X / (1 − (2X/π)²) → π/4 (l'Hôpital); sinθ = π / (k a)
    theta = math.asin(math.pi / (K * RECT["width"]))
    near = h_plane_te10(theta * (1 + 1e-5), RECT["width"])
    at = aperture_power_pattern(F, theta, 0.0, "rectangular", **RECT)
    assert at == pytest.approx((math.cos(theta) * math.pi / 4) ** 2, rel=1e-9)
    assert at == pytest.approx(near, rel=1e-4)


@pytest.mark.parametrize("theta", np.radians([2.0, 9.0, 17.0, 30.0, 55.0, 80.0]))
def test_te11_principal_planes_are_balanis_closed_forms(theta):
    # Balanis §12.6.3 (from memory), Z = k a sinθ: E-plane 2 J1(Z)/Z, H-plane
    # cosθ · 2 J1'(Z) / (1 − (Z/χ'11)²); J1 and J1' from scipy.special (Cephes)
    z = K * CIRC["radius"] * math.sin(theta)
    e_ref = (2 * special.j1(z) / z) ** 2
    h_ref = (math.cos(theta) * 2 * special.jvp(1, z) / (1 - (z / CHI) ** 2)) ** 2
    e = aperture_power_pattern(F, theta, math.pi / 2, "circular", **CIRC)
    h = aperture_power_pattern(F, theta, 0.0, "circular", **CIRC)
    assert e == pytest.approx(e_ref, rel=1e-9, abs=1e-15)
    assert h == pytest.approx(h_ref, rel=1e-6, abs=1e-15)  # χ'11 to 8 digits here


def _hpbw(plane_phi, shape, **size):
    half = optimize.brentq(
        lambda t: aperture_power_pattern(F, t, plane_phi, shape, **size) - 0.5, 1e-6, 0.3)
    return math.degrees(2 * half)


@pytest.mark.parametrize("shape, size, phi, table, per", [
    # Balanis Table 12.1 (TE10 on a ground plane, from memory): 50.6° λ/b (E), 68.8° λ/a (H);
    # the exact half-power points of sin Y/Y (Y = 1.3916) and cos X/(1 − (2X/π)²)
    # (X = 1.8663) give 50.76° and 68.06°: the table's constants are rounded to ~1 %
    pytest.param("rectangular", dict(width=20 * LAM, height=20 * LAM), math.pi / 2, 50.6, 20,
                 id="TE10-E"),
    pytest.param("rectangular", dict(width=20 * LAM, height=20 * LAM), 0.0, 68.8, 20,
                 id="TE10-H"),
    # Balanis Table 12.2 (TE11 on a ground plane, from memory): 29.2° λ/a (E), 37.0° λ/a (H)
    pytest.param("circular", dict(radius=20 * LAM), math.pi / 2, 29.2, 20, id="TE11-E"),
    pytest.param("circular", dict(radius=20 * LAM), 0.0, 37.0, 20, id="TE11-H"),
])
def test_half_power_beamwidths_of_a_large_aperture(shape, size, phi, table, per):
    assert _hpbw(phi, shape, **size) * per == pytest.approx(table, rel=0.015)


def test_half_power_beamwidth_of_the_e_plane_is_the_sinc_root():
    # sin Y / Y = 1/√2 at Y = 1.39156 (the half-power point of sin²Y/Y², e.g. Balanis
    # Table 12.1 footnote, from memory; solved here by scipy): sinθ = 2Y/(k b)
    y_half = optimize.brentq(lambda y: (math.sin(y) / y) ** 2 - 0.5, 0.5, 2.0)
    b = 6 * LAM
    expected = 2 * math.degrees(math.asin(2 * y_half / (K * b)))
    assert _hpbw(math.pi / 2, "rectangular", width=8 * LAM, height=b) == pytest.approx(
        expected, rel=1e-7)


@pytest.mark.parametrize("shape, size, directivity", [
    # Balanis Table 12.1 (from memory): D0 = (8/π²) 4π a b / λ² for the TE10 aperture
    pytest.param("rectangular", dict(width=20 * LAM, height=12 * LAM),
                 8 / math.pi ** 2 * 4 * math.pi * 20 * 12, id="TE10"),
    # Balanis Table 12.2 (from memory): D0 = 0.836 (2π a / λ)² for the TE11 aperture
    pytest.param("circular", dict(radius=15 * LAM), 0.836 * (2 * math.pi * 15) ** 2, id="TE11"),
])
def test_radiated_power_gives_the_large_aperture_directivity(shape, size, directivity):
    total = aperture_radiated_power(F, shape, **size)
    assert 4 * math.pi / total == pytest.approx(directivity, rel=0.01)


def test_radiated_power_of_a_small_aperture_against_adaptive_quadrature():
    # an open guide mouth (wide pattern): scipy's adaptive dblquad over the hemisphere
    size = dict(width=0.9 * LAM, height=0.45 * LAM)
    ref, _ = integrate.dblquad(
        lambda t, p: aperture_power_pattern(F, t, p, "rectangular", **size) * math.sin(t),
        0, 2 * math.pi, 0, math.pi / 2, epsabs=1e-10, epsrel=1e-9)
    assert aperture_radiated_power(F, "rectangular", **size) == pytest.approx(ref, rel=1e-6)


@pytest.mark.parametrize("shape, size", [("rectangular", RECT), ("circular", CIRC)])
def test_shares_sum_to_the_main_lobe_share(shape, size):
    # the main lobe's share integrated apart by scipy's adaptive dblquad (θ inner, φ outer;
    # the lobe's edge taken per φ by root finding on the mask) against the sum of the shares
    total, _ = integrate.dblquad(
        lambda t, p: aperture_power_pattern(F, t, p, shape, **size) * math.sin(t),
        0, 2 * math.pi, 0, math.pi / 2, epsabs=1e-10, epsrel=1e-8)

    def edge(p):
        if aperture_main_lobe(F, math.pi / 2 - 1e-12, p, shape, **size):
            return math.pi / 2
        return optimize.brentq(lambda t: 0.5 - float(aperture_main_lobe(F, t, p, shape, **size)),
                               0.0, math.pi / 2, xtol=1e-13)

    lobe, _ = integrate.dblquad(
        lambda t, p: aperture_power_pattern(F, t, p, shape, **size) * math.sin(t),
        0, 2 * math.pi, 0, edge, epsabs=1e-10, epsrel=1e-8)
    _, _, shares = aperture_rays(F, [0, 0, 0], [0, 0, 1], shape, **size)
    assert 0.5 < lobe / total < 1.0  # these apertures have side lobes to leave out
    assert shares.sum() == pytest.approx(lobe / total, rel=2e-3)


def test_an_open_guide_mouth_fills_the_hemisphere():
    # WR-340 (86.36 × 43.18 mm, EIA) at 2.45 GHz: the first nulls (3λ/(2a) = 2.1, λ/b = 2.8
    # in direction cosines) lie beyond the visible region, so nothing is left untraced
    _, dirs, shares = aperture_rays(2.45e9, [0, 0, 0], [0, 0, 1], "rectangular",
                                    width=0.08636, height=0.04318)
    assert shares.sum() == pytest.approx(1.0, abs=1e-6)
    assert len(shares) == 65
    assert np.degrees(np.arccos(dirs[:, 2])).max() > 75


@pytest.mark.parametrize("shape, size", [("rectangular", RECT), ("circular", CIRC)])
def test_sampling_is_mirror_symmetric_in_both_principal_planes(shape, size):
    # the pattern is even in u (across H) and in v (along E): so must the rays be
    e_dir = np.array([0.0, 1.0, 0.0])
    _, dirs, shares = aperture_rays(F, [0, 0, 0], [0, 0, 1], shape, e_direction=e_dir, **size)
    for mirror in (np.array([-1, 1, 1]), np.array([1, -1, 1])):
        for d, s in zip(dirs, shares):
            j = np.argmin(np.linalg.norm(dirs - d * mirror, axis=1))
            assert np.linalg.norm(dirs[j] - d * mirror) < 1e-9
            assert shares[j] == pytest.approx(s, rel=1e-9)
    assert np.allclose(np.sum(shares[:, None] * dirs, axis=0)[:2], 0.0, atol=1e-12)


def test_the_e_plane_follows_e_direction():
    # a square TE10 mouth radiates wider in its H-plane (the tapered cos X/(1 − (2X/π)²):
    # HPBW 68.8° λ/a against 50.6° λ/b for sin Y/Y, Balanis Table 12.1, from memory): the
    # power-weighted spread of the directions is larger across E than along it
    size = dict(width=3 * LAM, height=3 * LAM)
    for e_dir, along in (([1, 0, 0], 0), ([0, 1, 0], 1)):
        _, dirs, shares = aperture_rays(F, [0, 0, 0], [0, 0, 1], "rectangular",
                                        e_direction=e_dir, **size)
        spread = np.sum(shares[:, None] * dirs[:, :2] ** 2, axis=0)
        assert spread[1 - along] > 1.3 * spread[along]


def test_rays_in_vacuum_stay_straight_and_hit_the_far_wall_where_their_angles_say():
    # no plasma, no field: n = 1, every ray a straight line from the aperture centre; it ends
    # on the cylinder r = R or on the end z = L where the straight line meets it first
    radius, length = 0.2, 0.5
    centre = np.array([0.01, -0.02, 0.0])
    starts, dirs, shares = aperture_rays(F, centre, [0, 0, 1], "circular", **CIRC)

    def inside(p):
        return np.minimum(radius - np.hypot(p[:, 0], p[:, 1]), length - p[:, 2])

    rays = trace_rays(F, starts, dirs, "O", lambda p: np.zeros((len(p), 3)),
                      lambda p: np.zeros(len(p)), max_length=3 * length, inside=inside,
                      rtol=1e-8)
    for ray, d in zip(rays, dirs):
        assert ray.stop == "wall"
        # straight line: the wall hit where |c + t d|_r = R or c_z + t d_z = L, first
        a = d[0] ** 2 + d[1] ** 2
        bq = 2 * (centre[0] * d[0] + centre[1] * d[1])
        cq = centre[0] ** 2 + centre[1] ** 2 - radius ** 2
        t_side = (-bq + math.sqrt(bq * bq - 4 * a * cq)) / (2 * a) if a > 0 else math.inf
        t_end = (length - centre[2]) / d[2]
        hit = centre + min(t_side, t_end) * d
        assert np.linalg.norm(ray.end - hit) < 1e-6
        offsets = ray.path - centre
        cross = np.linalg.norm(np.cross(offsets, d), axis=1)
        assert cross.max() < 1e-7


@pytest.mark.parametrize("kwargs, words", [
    pytest.param(dict(shape="rectangular", width=0.4 * LAM, height=0.2 * LAM), "cut off",
                 id="TE10-below-cutoff"),
    # TE11 cutoff: k a = χ'11 (Pozar §3.4)
    pytest.param(dict(shape="circular", radius=0.9 * CHI / K), "cut off", id="TE11-below-cutoff"),
    pytest.param(dict(shape="rectangular", width=LAM), "height", id="missing-height"),
    pytest.param(dict(shape="horn", radius=LAM), "shape", id="unknown-shape"),
    pytest.param(dict(shape="circular", radius=50.5 * LAM), "100 wavelengths",
                 id="beyond-the-quadrature"),
])
def test_bad_apertures_are_refused(kwargs, words):
    shape = kwargs.pop("shape")
    with pytest.raises(ValueError, match=words):
        aperture_rays(F, [0, 0, 0], [0, 0, 1], shape, **kwargs)
