"""Launch-path accessibility on hand-built field and density profiles."""

import numpy as np
import pytest
from scipy.integrate import quad

from rfcheck.physics.access import launch_path_access, mode_n2, path_landmarks
from rfcheck.physics.constants import C, TWO_PI
from rfcheck.physics.frequencies import critical_density, ecr_field
from rfcheck.physics.fullwave import slab_reflection

L_B = 0.1  # m, field scale length of the hand-built ramp
Z = np.linspace(0.0, 0.2, 401)  # ECR at z = 0.1 for B = B_ECR (1 + (z - 0.1)/L_B)


def linear_field(f, scale=1.0):
    return scale * ecr_field(f) * (1.0 + (Z - 0.1) / L_B)


@pytest.mark.parametrize("f, x", [
    pytest.param(2.45e9, 0.3, id="2.45 GHz X=0.3"),
    pytest.param(10e9, 0.05, id="10 GHz X=0.05"),
])
def test_r_wave_high_field_vs_low_field_side(f, x):
    # R wave along B: n^2 = 1 - X/(1 - Y) (reference-values §2.1). With Y = 1 - u/L_B
    # (u = distance to the ECR) and uniform X this is n^2 = 1 - X L_B/u: from the low-field
    # side the R cutoff X = 1 - Y (u = X L_B) precedes the ECR and the evanescent layer gives
    # exp(-2∫κ) = exp(-pi k0 X L_B) (standard integral ∫ sqrt((β-u)/u) du = πβ/2); from the
    # high-field side n^2 = 1 + X L_B/u > 0 up to the ECR: the whistler reaches it directly
    # (magnetic-beach rule, Stix 1992 ch. 2; reference-values §2.3).
    b = linear_field(f)
    n = np.full(Z.shape, x * critical_density(f))
    k0 = TWO_PI * f / C
    lfs = launch_path_access(Z, b, n, f, "R")
    assert lfs.target == "ECR" and lfs.resonance_z == pytest.approx([0.1], abs=1e-12)
    assert lfs.first_cutoff == "R cutoff"
    assert lfs.first_cutoff_z == pytest.approx(0.1 - x * L_B, abs=1e-9)
    assert lfs.layers.width == pytest.approx([x * L_B], rel=1e-6)
    assert lfs.tunnelling_factor == pytest.approx(np.exp(-np.pi * k0 * x * L_B), rel=5e-4)
    assert lfs.verdict == "tunnelling"
    hfs = launch_path_access(Z, b, n, f, "R", launch_from="end")
    assert hfs.verdict == "direct" and hfs.tunnelling_factor == 1.0
    assert hfs.first_cutoff == "" and hfs.resonance_z == pytest.approx([0.1], abs=1e-12)
    # figure arrays: n^2 on the grid equals the closed form away from the ECR
    far = np.abs(Z - 0.1) > 1e-3
    y = b / ecr_field(f)
    assert np.allclose(lfs.n2[far], 1 - x / (1 - y[far]), rtol=1e-9)


def test_r_wave_low_field_side_blocked_when_dense():
    f = 2.45e9
    n = np.full(Z.shape, 0.9 * critical_density(f))
    out = launch_path_access(Z, linear_field(f), n, f, "R")
    # exp(-pi k0 0.9 L_B) = 5e-7 < 1e-3 (project default threshold)
    assert out.verdict == "blocked" and out.tunnelling_factor < 1e-6


def test_r_wave_tunnelling_factor_equals_full_wave_transmission():
    # Budden problem (Budden 1985 ch. 19): the full-wave transmission through the
    # cutoff-resonance pair equals the WKB factor; checked with the full-wave solver on the
    # same profile with a vanishing collision frequency (nu/omega = 1e-7).
    f, x = 10e9, 0.05
    b = linear_field(f)
    n = np.full(Z.shape, x * critical_density(f))
    acc = launch_path_access(Z, b, n, f, "R")
    nu = 1e-7 * TWO_PI * f

    def n2(zz):
        return mode_n2(f, ecr_field(f) * (1 + (zz - 0.1) / L_B), x * critical_density(f) + 0 * zz,
                       "R", collision_frequency=nu)

    wave = slab_reflection(Z, n2, f, n2_left=n2(Z[:1])[0].real)
    assert wave.transmitted == pytest.approx(acc.tunnelling_factor, rel=2e-3)
    assert wave.reflected == pytest.approx((1 - acc.tunnelling_factor) ** 2, rel=2e-3)


def _x_mode_n2_closed(x, y):
    # electron-only Stix elements (reference-values §2.1): n^2 = RL/S
    r, l, s = 1 - x / (1 - y), 1 - x / (1 + y), 1 - x / (1 - y * y)
    return r * l / s


def test_x_mode_low_field_side_meets_r_cutoff_before_uhr():
    # reference-values §2.3: from the low-field side the X mode meets the R cutoff
    # n_c(1 - Y) before the UHR n_c(1 - Y^2); from the high-field side it reaches the UHR.
    f, x = 2.45e9, 0.3
    b = linear_field(f)
    n = np.full(Z.shape, x * critical_density(f))
    lfs = launch_path_access(Z, b, n, f, "X")
    z_r = 0.1 - x * L_B  # Y = 1 - X
    z_uh = 0.1 - L_B * (1 - np.sqrt(1 - x))  # Y^2 = 1 - X
    assert lfs.target == "UHR" and lfs.resonance_z == pytest.approx([z_uh], abs=1e-12)
    assert lfs.first_cutoff == "R cutoff" and lfs.first_cutoff_z == pytest.approx(z_r, abs=1e-9)
    # tunnelling factor against an independent quadrature of κ = k0 sqrt(-n^2)
    k0 = TWO_PI * f / C
    kappa = lambda zz: k0 * np.sqrt(max(-_x_mode_n2_closed(x, 1 + (zz - 0.1) / L_B), 0.0))  # noqa: E731
    integral, _ = quad(kappa, z_r, z_uh, limit=200)
    assert lfs.tunnelling_factor == pytest.approx(np.exp(-2 * integral), rel=1e-3)
    hfs = launch_path_access(Z, b, n, f, "X", launch_from="end")
    assert hfs.verdict == "direct" and hfs.resonance_z == pytest.approx([z_uh], abs=1e-12)


def test_o_mode_below_and_above_critical_density():
    # O mode n^2 = P = 1 - X (reference-values §2.1): density ramp X = z/L_n.
    f, l_n = 2.45e9, 0.1
    n = critical_density(f) * Z / l_n
    below = launch_path_access(Z, linear_field(f, 1.2), n, f, "O")  # ECR where X = 0.833
    assert below.verdict == "direct" and below.target == "ECR"
    above = launch_path_access(Z, linear_field(f, 0.8), n, f, "O")  # ECR at z = 0.125, X = 1.25
    assert above.first_cutoff == "O cutoff" and above.first_cutoff_z == pytest.approx(l_n)
    # Airy-layer closed form: ∫ k0 sqrt(X - 1) dz = (2/3) k0 L_n (X_r - 1)^(3/2)
    k0 = TWO_PI * f / C
    x_r = above.resonance_z[0] / l_n
    assert x_r == pytest.approx(1.25, rel=1e-9)
    assert above.tunnelling_factor == pytest.approx(
        np.exp(-2 * (2 / 3) * k0 * l_n * (x_r - 1) ** 1.5), rel=1e-6)
    assert above.verdict == "tunnelling"


def test_landmark_densities_match_reference_table():
    # reference-values §2.4, 2.45 GHz, B = 0.06 T: R cutoff 2.34146e16, UHR 3.94661e16,
    # L cutoff 1.25500e17 m^-3 (computed, H); linear density ramp so z = n / slope
    f = 2.45e9
    slope = 2e18  # m^-3 per m
    n = slope * Z
    marks = path_landmarks(Z, np.full(Z.shape, 0.06), n, f)
    assert marks["R cutoff"] * slope == pytest.approx([2.34146e16], rel=1e-5)
    assert marks["UHR"] * slope == pytest.approx([3.94661e16], rel=1e-5)
    assert marks["L cutoff"] * slope == pytest.approx([1.25500e17], rel=1e-5)
    assert marks["ECR"].size == 0


def test_l_wave_has_no_electron_resonance():
    # L = 1 - X/(1 + Y): no electron resonance (Stix 1992 ch. 1; reference-values §2.3)
    f = 2.45e9
    out = launch_path_access(Z, linear_field(f), np.full(Z.shape, 1e16), f, "L")
    assert out.verdict == "no-resonance" and out.resonance_z.size == 0
    assert out.tunnelling_factor == 1.0


def test_x_mode_full_wave_through_uhr_matches_access_and_budden():
    # Budden (1985) ch. 19 for the X mode at the upper-hybrid resonance: from the low-field
    # side T ≈ exp(-2∫κ) over the R-cutoff–UHR layer and R ≈ (1 - T)^2; from the high-field
    # side R ≈ 0 and the rest is absorbed at the UHR. Full-wave X-mode solver with
    # nu/omega = 1e-4 against the path-access tunnelling factor.
    from rfcheck.physics.coldplasma import stix
    from rfcheck.physics.fullwave import x_mode_slab_reflection

    f, x = 2.45e9, 0.3
    n = np.full(Z.shape, x * critical_density(f))
    acc = launch_path_access(Z, linear_field(f), n, f, "X")
    nu = 1e-4 * TWO_PI * f

    def sd(zz, sign):
        b = ecr_field(f) * (1 + sign * (zz - 0.1) / L_B)
        e = stix(f, b, x * critical_density(f) + 0 * zz, collision_frequency=nu)
        return e.S, e.D

    for sign in (1, -1):  # +1: launcher on the low-field side
        left = tuple(c[0].real for c in sd(Z[:1], sign))
        wave = x_mode_slab_reflection(Z, lambda zz: sd(zz, sign), f, left=left)
        assert wave.transmitted == pytest.approx(acc.tunnelling_factor, rel=1e-2)
        assert abs(wave.balance_residual) < 1e-8
        if sign == 1:
            assert wave.reflected == pytest.approx((1 - acc.tunnelling_factor) ** 2, rel=1e-2)
        else:
            assert wave.reflected < 1e-3


# --- a resonance reached from its propagating side: no zero-width layer from rounding ---------

@pytest.mark.parametrize("f, x, ions", [
    pytest.param(2.45e9, 0.3, (), id="2.45 GHz X=0.3"),
    pytest.param(2.45e9, 0.05, (), id="2.45 GHz X=0.05"),
    pytest.param(28e9, 0.7, "H+", id="28 GHz X=0.7 protons"),
    pytest.param(2.45e9, 0.3, "Ar+", id="2.45 GHz X=0.3 argon"),
])
def test_x_mode_from_the_high_field_side_reaches_the_uhr_directly(f, x, ions):
    # Stix 1992 ch. 2 (reference-values §2.3): launched where Y > 1 and coming down the field,
    # the X mode has n^2 = RL/S = L (1 + Y)(1 - Y - X)/(1 - Y^2 - X) > 0 all the way to the
    # upper-hybrid layer (both brackets negative on that side; n^2 = 2L at the ECR), where
    # n^2 -> +inf: no cutoff, no evanescent layer. A path sample placed 0 ... 23 ulp on the
    # propagating side of the layer must not open a layer of zero width from the rounding of
    # n^2 there (before the fix, 2.45 GHz X = 0.3 "tunnelled" at 4, 6, 12, 14, 20, 22 ulp).
    z_uh = 0.1 - L_B * (1 - np.sqrt(1 - x))
    for k in range(24):
        z = Z.copy()
        z[np.argmin(np.abs(z - z_uh))] = z_uh + k * np.spacing(z_uh)
        b = ecr_field(f) * (1 + (z - 0.1) / L_B)
        out = launch_path_access(z, b, np.full(z.shape, x * critical_density(f)), f, "X",
                                 ions=ions, launch_from="end")
        assert out.target == "UHR" and out.resonance_z == pytest.approx([z_uh], abs=1e-12)
        assert out.verdict == "direct", (k, out.layers, out.first_cutoff)
        assert out.layers.start.size == 0 and out.tunnelling_factor == 1.0
        assert out.first_cutoff == ""
    # the closed form on the propagating side (its 0/0 at the ECR sample left out)
    y = b / ecr_field(f)
    side = (z > z_uh + 1e-9) & (np.abs(y - 1) > 1e-9)
    assert np.all(_x_mode_n2_closed(x, y[side]) > 0)


def test_x_mode_from_the_high_field_side_with_a_density_ramp():
    # the case that once reported "tunnelling" through a 1e-13 m layer: 2.45 GHz, density
    # ramp X = 0.05 (0.5 + z/0.2), 1201 samples, one of them 1 ulp before the UHR at 97.5 mm
    f = 2.45e9
    z = np.linspace(0.0, 0.2, 1201)
    b = ecr_field(f) * (1 + (z - 0.1) / L_B)
    n = 0.05 * critical_density(f) * (0.5 + z / 0.2)
    out = launch_path_access(z, b, n, f, "X", launch_from="end")
    assert out.verdict == "direct" and out.tunnelling_factor == 1.0 and out.layers.start.size == 0
    assert out.resonance_z == pytest.approx([0.0975], abs=1e-9)


def test_genuine_thin_layer_before_the_uhr_is_still_found():
    # low-field side at X = 1e-4: the R cutoff (Y = 1 - X, 10 um before the ECR) and the UHR
    # (Y^2 = 1 - X, 5 um before it) bound a 5 um layer, 1 % of the 500 um sample spacing;
    # tunnelling factor against scipy quad of kappa = k0 sqrt(-RL/S) (Stix 1992 ch. 1 forms)
    f, x = 2.45e9, 1e-4
    n = np.full(Z.shape, x * critical_density(f))
    out = launch_path_access(Z, linear_field(f), n, f, "X")
    z_r, z_uh = 0.1 - x * L_B, 0.1 - L_B * (1 - np.sqrt(1 - x))
    assert out.verdict == "tunnelling" and out.first_cutoff == "R cutoff"
    # edges interpolated linearly on the refined grid: to 1e-4 of the layer width
    assert out.layers.start == pytest.approx([z_r], abs=5e-10)
    assert out.layers.width == pytest.approx([z_uh - z_r], rel=2e-4)
    k0 = TWO_PI * f / C
    kappa = lambda zz: k0 * np.sqrt(max(-_x_mode_n2_closed(x, 1 + (zz - 0.1) / L_B), 0.0))  # noqa: E731
    integral, _ = quad(kappa, z_r, z_uh, limit=200)
    assert out.tunnelling_factor == pytest.approx(np.exp(-2 * integral), rel=1e-4)


def test_genuine_thin_barrier_on_one_sample_is_still_found():
    # O mode (n^2 = P = 1 - X) with the density raised to X_p = 1.2 at one sample of a
    # X_b = 0.8 background (linear between samples): a triangular barrier of half-width
    # w = h (X_p - 1)/(X_p - X_b) = h/2 and exponent 2∫κ = 2 * 2 * (2/3) k0 w sqrt(X_p - 1)
    # (exact for the piecewise-linear profile)
    f = 2.45e9
    z = np.linspace(0.0, 0.2, 41)
    h = z[1] - z[0]
    x = np.full(z.shape, 0.8)
    x[10] = 1.2
    out = launch_path_access(z, np.full(z.shape, 0.5 * ecr_field(f)), x * critical_density(f),
                             f, "O")
    k0 = TWO_PI * f / C
    assert out.verdict == "no-resonance" and out.layers.start.size == 1
    assert out.layers.width == pytest.approx([h], rel=1e-9)
    assert out.tunnelling_factor == pytest.approx(
        np.exp(-4 * (2 / 3) * k0 * (h / 2) * np.sqrt(0.2)), rel=1e-9)


def test_unresolved_layer_is_refined_to_the_closed_form():
    # R wave below the ECR through a field bump Y = 0.5, 0.95, 0.5 on three samples (X = 0.3):
    # the R-cutoff barrier (Y > 1 - X) rests on one sample, which the resolution check of
    # evanescent_layers refuses; the path access refines its cells until resolved. Closed
    # form: with u = 1 - Y linear in z (|dY/dz| = g), 2∫κ dz = 4 (k0/g) [F(X) - F(u_min)],
    # F(u) = sqrt(u (X - u)) + X asin(sqrt(u/X)) (antiderivative of sqrt((X - u)/u))
    from rfcheck.physics.fullwave import evanescent_layers

    f, x = 2.45e9, 0.3
    z = np.array([0.0, 0.05, 0.1])
    b = ecr_field(f) * np.array([0.5, 0.95, 0.5])
    n = np.full(3, x * critical_density(f))
    with pytest.raises(ValueError, match="grid too coarse"):
        evanescent_layers(z, mode_n2(f, b, n, "R"), f)
    out = launch_path_access(z, b, n, f, "R", refine=1)
    k0, g = TWO_PI * f / C, 0.45 / 0.05
    big_f = lambda u: np.sqrt(u * (x - u)) + x * np.arcsin(np.sqrt(u / x))  # noqa: E731
    exponent = 4 * (k0 / g) * (big_f(x) - big_f(0.05))
    assert out.verdict == "no-resonance" and out.layers.start.size == 1
    assert -np.log(out.tunnelling_factor) == pytest.approx(exponent, rel=1e-3)
    assert out.layers.exponent_change[0] <= 1e-2 * exponent
