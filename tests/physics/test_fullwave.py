"""1-D full-wave slab reflection against closed-form and independent references."""

import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.special import airy

from rfcheck.physics.constants import C, TWO_PI
from rfcheck.physics.fullwave import (evanescent_layers, slab_reflection,
                                      wkb_tunnelling_factor, x_mode_slab_reflection)

F_UNIT = C / TWO_PI  # frequency giving k0 = 1 m^-1: lengths below are in units of 1/k0


def fabry_perot(n_slab, d, kx_out=1.0, kx_in=None, y_out=None, y_in=None):
    """Single layer between two equal media: r, t of the tangential field (Born & Wolf,
    Principles of Optics, 7th ed., §1.6.4 / §7.6.1; Airy formulae)."""
    kx_in = n_slab if kx_in is None else kx_in
    y_out = kx_out if y_out is None else y_out
    y_in = kx_in if y_in is None else y_in
    r12 = (y_out - y_in) / (y_out + y_in)
    ph = np.exp(2j * kx_in * d)
    r = r12 * (1 - ph) / (1 - r12**2 * ph)
    t = (1 - r12**2) * np.exp(1j * kx_in * d) / (1 - r12**2 * ph)
    return r, t


@pytest.mark.parametrize("n_slab, d", [
    pytest.param(1.7 + 0.05j, 3.3, id="dielectric-lossy; Born&Wolf Airy formula"),
    pytest.param(0.6 + 0.02j, 10.0, id="underdense-plasma-like; Born&Wolf"),
    pytest.param(0.05 + 1.3j, 0.7, id="overdense (evanescent) slab; Born&Wolf"),
])
def test_uniform_slab_matches_fabry_perot(n_slab, d):
    z = np.linspace(0.0, d, 7)
    res = slab_reflection(z, np.full(z.shape, n_slab**2), F_UNIT, n2_right=1.0)
    r, t = fabry_perot(n_slab, d)
    assert abs(res.r - r) < 1e-12
    assert abs(res.t - t) < 1e-12
    # absorbed fraction from the field integral vs the closed-form 1 - |r|^2 - |t|^2
    assert res.absorbed == pytest.approx(1 - abs(r) ** 2 - abs(t) ** 2, abs=1e-8)
    assert abs(res.balance_residual) < 1e-8


def test_oblique_s_and_p_polarised_slab_match_fabry_perot():
    # s (TE): scalar equation with n^2 - n_t^2; p (TM): X-mode system with D = 0, S = eps
    # (Born & Wolf §1.6: admittances kx (TE) and eps/kx (TM) of the tangential E field).
    eps, d, nt = 2.3 + 0.1j, 2.7, 0.6
    kx0, kx1 = np.sqrt(1 - nt**2), np.sqrt(eps - nt**2)
    z = np.array([0.0, d])
    s_pol = slab_reflection(z, np.full(2, eps), F_UNIT, n2_right=1.0, n_tangential=nt)
    r_s, t_s = fabry_perot(None, d, kx_out=kx0, kx_in=kx1)
    assert abs(s_pol.r - r_s) < 1e-12 and abs(s_pol.t - t_s) < 1e-12
    p_pol = x_mode_slab_reflection(z, (np.full(2, eps), np.zeros(2)), F_UNIT,
                                   n_tangential=nt, right=(1.0, 0.0))
    r_p, _ = fabry_perot(None, d, kx_out=kx0, kx_in=kx1, y_out=1 / kx0, y_in=eps / kx1)
    assert abs(p_pol.r - r_p) < 1e-12
    assert abs(p_pol.balance_residual) < 1e-8


@pytest.mark.parametrize("k0l", [40.0, 160.0])
def test_linear_ramp_total_reflection_airy_and_wkb_phase(k0l):
    # n^2 = 1 - z/L beyond vacuum: exact solution Ai(alpha (z - L)), alpha = (k0^2/L)^(1/3)
    # (Budden 1985, ch. 15-16; Stix 1992, ch. 13); |r| = 1 without collisions.
    length = k0l
    alpha = (1.0 / length) ** (1 / 3)
    z = np.linspace(0.0, length + 14.0 / alpha, 400)
    res = slab_reflection(z, 1.0 - z / length + 0j, F_UNIT)
    ai, aip, _, _ = airy(-alpha * length)
    g = alpha * aip / ai
    r_exact = (1j - g) / (1j + g)
    assert abs(abs(res.r) - 1.0) < 1e-10
    assert res.transmitted == 0.0
    assert abs(res.r - r_exact) < 1e-6
    # phase-integral (WKB) result with the Stokes -pi/2: r = -i exp(2i k0 ∫n dz),
    # ∫n dz = 2L/3; the asymptotic error falls like 1/(k0 L) (Budden 1985, §15.x)
    wkb = np.exp(1j * (4.0 * length / 3.0 - np.pi / 2))
    assert abs(np.angle(res.r / wkb)) < 0.1 / k0l


@pytest.mark.parametrize("eta", [0.1, 0.5, 1.0, 2.0])
def test_budden_tunnelling(eta):
    # n^2 = 1 + beta/z: cutoff at z = -beta, resonance at z = 0 (absorbing side: z -> z - i0).
    # Budden (The Propagation of Radio Waves, 1985, ch. 19), Stix (1992, ch. 13):
    # T = e^(-pi eta), R = (1 - e^(-pi eta))^2 from the cutoff side, R = 0 from the resonance
    # side, A = e^(-pi eta)(1 - e^(-pi eta)). Here pi eta = 2∫κ dz = pi k0 beta.
    beta, delta = eta, 1e-7
    T = np.exp(-np.pi * eta)
    z = np.linspace(-beta - 400.0, 400.0, 2001)
    cut_side = lambda zz: 1 + beta / (zz - 1j * delta)  # noqa: E731
    res = slab_reflection(z, cut_side, F_UNIT, n2_left=cut_side(z[0]).real)
    assert res.transmitted == pytest.approx(T, rel=1e-5)
    assert res.reflected == pytest.approx((1 - T) ** 2, abs=2e-6)
    assert res.absorbed == pytest.approx(T * (1 - T), abs=2e-6)
    assert abs(res.balance_residual) < 1e-8
    res_side = lambda zz: 1 - beta / (zz + 1j * delta)  # noqa: E731 (mirror image)
    z2 = np.linspace(-400.0, beta + 400.0, 2001)
    res2 = slab_reflection(z2, res_side, F_UNIT, n2_left=res_side(z2[0]).real)
    assert res2.transmitted == pytest.approx(T, rel=1e-5)
    assert res2.reflected < 1e-5
    # the WKB factor of the same profile equals the Budden transmission (closed-form
    # integral ∫ sqrt((beta - u)/u) du = pi beta / 2 over the evanescent layer)
    zz = -beta * np.logspace(0.0, -14.0, 4001)  # geometric towards the resonance
    assert wkb_tunnelling_factor(zz, 1 + beta / zz, F_UNIT) == pytest.approx(T, rel=1e-4)


def _smooth_profile(zz):
    return 1 - 1.3 * np.exp(-(((zz - 10) / 4) ** 2)) + 0.05j * np.exp(-(((zz - 11) / 3) ** 2))


def test_fourth_order_convergence_under_grid_refinement():
    # Magnus-4 (Iserles & Nørsett 1999): global error O(h^4) -> ratio 16 per halving
    ref = slab_reflection(np.linspace(0, 20, 8001), _smooth_profile, F_UNIT, rtol=None,
                          max_phase_step=np.inf)
    errs = []
    for n in (41, 81, 161):
        r = slab_reflection(np.linspace(0, 20, n), _smooth_profile, F_UNIT, rtol=None,
                            max_phase_step=np.inf)
        errs.append(abs(r.r - ref.r) + abs(r.t - ref.t))
    orders = np.log2(np.array(errs[:-1]) / np.array(errs[1:]))
    assert np.all((orders > 3.8) & (orders < 4.2))
    # the default adaptive grid converges as its phase step is refined
    adaptive = [slab_reflection(np.linspace(0, 20, 3), _smooth_profile, F_UNIT,
                                max_phase_step=s, rtol=None) for s in (0.4, 0.1, 0.025)]
    e = [abs(a.r - ref.r) for a in adaptive]
    assert e[0] > e[1] > e[2] and e[2] < 1e-8


def test_energy_balance_random_collisional_profiles():
    # Poynting's theorem: R + T + A = 1 with A from k0 ∫ Im(n^2)|E|^2 dz (Budden 1985, §7)
    rng = np.random.default_rng(1234)
    for _ in range(5):
        z = np.sort(rng.uniform(0.0, 30.0, 60))
        n2 = rng.uniform(-1.0, 3.0, 60) + 1j * rng.uniform(0.0, 0.3, 60)
        res = slab_reflection(z, n2, F_UNIT)
        assert abs(res.balance_residual) < 1e-7  # measured <= 6e-8 at the default step
        assert 0 <= res.reflected <= 1 and 0 <= res.transmitted <= 1 and res.absorbed >= 0


def test_x_mode_perpendicular_equals_scalar_rl_over_s():
    # at n_t = 0 the X-mode system reduces to E'' + k0^2 (RL/S) E = 0 (Stix 1992, ch. 1)
    def sd(zz):
        return (1 - 0.05 * zz) + 0.01j, np.full(np.shape(zz), 0.3 + 0j)
    z = np.linspace(0.0, 18.0, 41)
    a = x_mode_slab_reflection(z, sd, F_UNIT)
    b = slab_reflection(z, lambda zz: (sd(zz)[0] ** 2 - sd(zz)[1] ** 2) / sd(zz)[0], F_UNIT)
    assert abs(a.r - b.r) < 1e-12 and abs(a.t - b.t) < 1e-12


def test_x_mode_uniform_medium_decay_matches_cold_dispersion():
    # in a uniform magnetised lossy medium the field varies as exp(i k0 N_x z) with
    # N_x^2 = RL/S - n_t^2 (Stix 1992, eq. 1-42 at theta = 90 deg with k_t = k0 n_t)
    s, d, nt = 0.8 + 0.02j, 0.4 + 0.01j, 0.3
    z = np.linspace(0.0, 40.0, 5)
    res = x_mode_slab_reflection(z, (np.full(5, s), np.full(5, d)), F_UNIT, n_tangential=nt)
    nx = np.sqrt((s * s - d * d) / s - nt**2)
    inside = (res.z > 5) & (res.z < 35)
    ratio = res.field[inside][1:] / res.field[inside][:-1]
    assert np.allclose(ratio, np.exp(1j * nx * np.diff(res.z[inside])), rtol=1e-9)


def test_x_mode_oblique_against_solve_ivp():
    # independent reference: scipy's DOP853 on the same (E_t, H_b) system, rtol 1e-12
    nt = 0.35

    def sd(zz):
        s = 1 - 0.6 * zz / 15 + 0.02j
        return s, 0.5 * zz / 15 + 0j

    def rhs(zz, psi):
        s, d = sd(zz)
        m = np.array([[1j * nt * d / s, 1 - nt**2 / s], [(s * s - d * d) / s, -1j * nt * d / s]])
        return 1j * (m @ psi)

    s_end, d_end = sd(15.0)
    m11, m12, m21 = 1j * nt * d_end / s_end, 1 - nt**2 / s_end, (s_end**2 - d_end**2) / s_end
    n_end = np.sqrt(m11 * m11 + m12 * m21)
    n_end = n_end if n_end.imag >= 0 else -n_end
    sol = solve_ivp(rhs, (15.0, 0.0), [1.0 + 0j, (n_end - m11) / m12], method="DOP853",
                    rtol=1e-12, atol=1e-14)
    e0, h0 = sol.y[:, -1]
    nx0 = np.sqrt(1 - nt**2)
    hp, hm = 1 / nx0, -1 / nx0
    r_ref = (hp * e0 - h0) / (h0 - hm * e0)
    res = x_mode_slab_reflection(np.linspace(0.0, 15.0, 301), sd, F_UNIT, n_tangential=nt)
    assert abs(res.r - r_ref) < 1e-8
    assert abs(res.balance_residual) < 1e-8


# --------------------------------------------------------------------------- WKB resolution
def _exponent_or_refusal(z, n2):
    """2∫κ dz from wkb_tunnelling_factor, or None where it refuses the grid."""
    try:
        return -np.log(wkb_tunnelling_factor(z, n2, F_UNIT))
    except ValueError as err:
        assert "grid too coarse for the evanescent layer" in str(err)
        return None


@pytest.mark.parametrize("beta", [0.3, 1.0, 3.0])
def test_coarse_grid_is_right_or_refused_budden(beta):
    # Budden layer n^2 = 1 + beta/z, cutoff z = -beta, resonance z = 0: exponent pi k0 beta
    # (Budden 1985 ch. 19; closed form ∫ sqrt((beta - u)/u) du = pi beta / 2). Samples run
    # geometrically from 1.5 beta to 1e-14 beta before the resonance. Every grid, however
    # coarse, gives the exponent to EXPONENT_RTOL * max(1, exponent) or refuses; measured:
    # refused up to 128 samples, then errors 0.33 of the thinned-grid change (h^2 convergence)
    from rfcheck.physics.fullwave import EXPONENT_RTOL

    exact = np.pi * beta
    outcomes = []
    for count in (4, 6, 8, 12, 16, 24, 32, 64, 128, 256, 512, 2048):
        zz = -beta * np.logspace(np.log10(1.5), -14.0, count)
        got = _exponent_or_refusal(zz, 1 + beta / zz)
        outcomes.append(got is not None)
        if got is not None:
            assert abs(got - exact) <= EXPONENT_RTOL * max(1.0, exact), count
    assert not outcomes[0] and outcomes[-1]  # the coarsest refused, the finest accepted


def test_coarse_grid_is_right_or_refused():
    # parabolic barrier n^2 = -a (1 - (z/w)^2), two cutoffs: exponent k0 sqrt(a) pi w
    # (standard integral); uniform grids of 5 ... 641 samples at two offsets. A linear layer
    # n^2 = -z is exact on any grid (2∫_0^4 sqrt(z) dz = 32/3) and never refused.
    from rfcheck.physics.fullwave import EXPONENT_RTOL

    a, w = 2.0, 3.0
    exact = np.sqrt(a) * np.pi * w
    accepted = 0
    for count in (5, 7, 9, 13, 17, 25, 41, 81, 161, 641):
        for shift in (0.0, 0.37):
            z = np.linspace(-2 * w, 2 * w, count) + shift * 4 * w / (count - 1)
            got = _exponent_or_refusal(z, -a * (1 - (z / w) ** 2))
            if got is not None:
                accepted += 1
                assert abs(got - exact) <= EXPONENT_RTOL * exact, (count, shift)
    assert 0 < accepted < 20
    for count in (3, 4, 5, 8):
        z = np.linspace(-1.0, 4.0, count)
        assert _exponent_or_refusal(z, -z) == pytest.approx(32.0 / 3.0, rel=1e-14)
    # the bent three-sample line: the layer z = 0..5 rests on one sample; dropping it moves
    # the edge to z = 2 and the exponent from 20/3 to 4: refused (declared exact, 20/3)
    zb, nb = np.array([-1.0, 0.0, 5.0]), np.array([1.0, 0.0, -1.0])
    with pytest.raises(ValueError, match=r"z = 0\.\.5 m \(1 samples with Re n² < 0\)"):
        evanescent_layers(zb, nb, F_UNIT)
    lay = evanescent_layers(zb, nb, F_UNIT, exponent_rtol=None)
    assert lay.kappa_integral == pytest.approx([10.0 / 3.0], rel=1e-14)
    assert lay.exponent_change == pytest.approx([20.0 / 3.0 - 4.0], rel=1e-12)


def test_thin_layer_below_the_resolution_demand_passes():
    # a layer carried by one sample (n^2 = -p there, +p at the neighbours 0.1 away: edges at
    # +-0.05) whose exponent is under EXPONENT_RTOL is accepted, since resolving it cannot move
    # the factor by more than 1 %: triangle closed form 2∫κ = 2 * 2 * (2/3) w sqrt(p) = 8.4e-3
    z = np.linspace(-1.0, 1.0, 21)
    p = 4e-3
    n2 = np.where(np.isclose(z, 0.0), -p, p)
    lay = evanescent_layers(z, n2, F_UNIT)
    assert lay.start == pytest.approx([-0.05]) and lay.width == pytest.approx([0.1])
    assert 2 * lay.kappa_integral[0] == pytest.approx(4 * (2 / 3) * 0.05 * np.sqrt(p), rel=1e-12)
    assert wkb_tunnelling_factor(z, n2, F_UNIT) == pytest.approx(
        np.exp(-4 * (2 / 3) * 0.05 * np.sqrt(p)), rel=1e-12)


def test_evanescent_layers_and_wkb_closed_forms():
    # parabolic barrier n^2 = -a (1 - (z/w)^2): ∫κ dz = k0 sqrt(a) pi w / 2 (standard integral)
    a, w = 2.0, 3.0
    z = np.linspace(-6.0, 6.0, 24001)
    n2 = -a * (1 - (z / w) ** 2)
    layers = evanescent_layers(z, n2, F_UNIT)
    assert layers.start == pytest.approx([-w]) and layers.end == pytest.approx([w])
    assert layers.width == pytest.approx([2 * w])
    assert layers.kappa_integral == pytest.approx([np.sqrt(a) * np.pi * w / 2], rel=1e-6)
    assert wkb_tunnelling_factor(z, n2, F_UNIT) == pytest.approx(
        np.exp(-np.sqrt(a) * np.pi * w), rel=1e-5)
    # linear n^2 is integrated exactly: ∫_0^L sqrt(z/L) dz = 2L/3, on any grid of one straight
    # line (here n^2 = -z/5 on three samples; the earlier z = -1, 0, 5 bent the line at the
    # layer's edge, which the resolution check refuses: see test_coarse_grid_is_right_or_refused)
    zl = np.array([-5.0, 0.0, 5.0])
    lay = evanescent_layers(zl, np.array([1.0, 0.0, -1.0]), F_UNIT)
    assert lay.kappa_integral == pytest.approx([10.0 / 3.0], rel=1e-14)
    assert bool(lay.open_ends[0])


# --------------------------------------------------------------------------- far side, mirror
from rfcheck.physics.constants import EPS0, ETA0  # noqa: E402
from rfcheck.physics.fullwave import mirror_return  # noqa: E402


@pytest.mark.parametrize("profile", [
    pytest.param(lambda z: 1.0 + 2.0 * z / 5.0 + 0.1j * (z / 5.0) ** 2, id="graded lossy ramp"),
    pytest.param(lambda z: np.where(z < 2.0, 2.3 + 0.02j, 0.4 + 0.3j), id="two layers"),
])
def test_far_side_reflection_equals_the_reversed_solve(profile):
    # r_right, t_right from the forward transfer matrix equal an independent solve of the
    # reversed profile (same grid), and reciprocity gives t_right = t between equal media
    # (Budden 1985 ch. 7: the Wronskian of two solutions is constant)
    z = np.linspace(0.0, 5.0, 801)
    n2 = profile(z)
    fwd = slab_reflection(z, n2, F_UNIT, n2_right=1.0, rtol=None)
    rev = slab_reflection(z, n2[::-1], F_UNIT, n2_right=1.0, rtol=None)
    assert abs(fwd.r_right - rev.r) < 1e-10
    assert abs(fwd.t_right - rev.t) < 1e-10
    assert abs(fwd.t_right - fwd.t) < 1e-10


def test_far_side_is_nan_for_an_evanescent_exit_medium():
    z = np.linspace(0.0, 1.0, 11)
    res = slab_reflection(z, np.full(z.shape, 0.5 + 0.0j), F_UNIT, n2_right=-1.0)
    assert np.isnan(res.r_right) and res.transmitted == 0.0
    with pytest.raises(ValueError):
        mirror_return(res)


def test_salisbury_screen_behind_a_mirror():
    # a resistive sheet of η0 ohms per square in front of a metal plate: no reflection when
    # a quarter wave in front of it, total reflection at half a wave (Salisbury screen;
    # R. L. Fante & M. T. McCormack, IEEE Trans. Antennas Propag. 36 (1988) 1443). A thin
    # slab of conductivity σ and thickness d with σ d = 1/η0 is that sheet: r = −1/3,
    # t = 2/3 between vacuum half-spaces.
    d = 1e-6
    sigma = 1.0 / (ETA0 * d)
    w = TWO_PI * F_UNIT
    z = np.linspace(0.0, d, 20)
    res = slab_reflection(z, np.full(z.shape, 1.0 + 1j * sigma / (w * EPS0)), F_UNIT,
                          n2_right=1.0, rtol=None, max_phase_step=0.01)
    assert res.r == pytest.approx(-1.0 / 3.0, abs=1e-4)
    assert res.t == pytest.approx(2.0 / 3.0, abs=1e-4)
    m = mirror_return(res)
    assert m.best == pytest.approx(0.0, abs=1e-6)
    assert m.worst == pytest.approx(1.0, abs=1e-6)
    # brute force over the sheet-to-plate distance: Γ_in = s11 + s21 s12 u/(1 − s22 u),
    # u = −e^(2i k0 L) (Pozar, Microwave Engineering, 4th ed., §4.3)
    u = -np.exp(2j * np.linspace(0.0, np.pi, 4001))
    g = np.abs(res.r + res.t * res.t_right * u / (1 - res.r_right * u)) ** 2
    assert g.max() == pytest.approx(m.worst, abs=1e-6)
    assert g.min() == pytest.approx(m.best, abs=1e-6)


def test_lossless_slab_behind_a_mirror_returns_everything():
    # a passive lossless system terminated by a perfect mirror returns all the power at every
    # phase (energy conservation): the returned amplitude is the unit circle
    z = np.linspace(0.0, 3.0, 61)
    res = slab_reflection(z, np.full(z.shape, 2.5 + 0.0j), F_UNIT, n2_right=1.0, rtol=None)
    m = mirror_return(res)
    assert m.worst == pytest.approx(1.0, abs=1e-9)
    assert m.best == pytest.approx(1.0, abs=1e-9)
    assert mirror_return(res, 0.0).worst == pytest.approx(res.reflected, rel=1e-12)
