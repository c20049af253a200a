"""Resonance geometry against closed forms and a hand-built minimum-B trap."""

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

from rfcheck.magnet import geometry as geo
from rfcheck.magnet.sources import FieldModel
from rfcheck.model import AxisTable, Chamber, Coil, Magnet, Multipole, UniformField
from rfcheck.physics.constants import E_CHARGE, M_E, MU0, TWO_PI


def b_ecr(f):
    """Fundamental ECR field B = 2 pi f m_e / e (NRL Plasma Formulary; 87.52 mT at 2.45 GHz,
    reference-values.md sec. 1.3)."""
    return TWO_PI * f * M_E / E_CHARGE


def loop_axis_field(current, radius, u):
    """Loop on its axis, mu0 I R^2 / (2 (R^2 + u^2)^(3/2)) (Jackson, 3rd ed., sec. 5.5)."""
    return MU0 * current * radius**2 / (2 * (radius**2 + u**2) ** 1.5)


def test_ecr_field_reference_value():
    # reference-values.md sec. 7: B_ECR(2.45 GHz) = 87.52 mT
    assert b_ecr(2.45e9) == pytest.approx(87.52e-3, rel=1e-4)


def test_loop_crossings_gradient_and_zone_width():
    # one loop of radius a at z = 0.15 m with B(centre) = 0.2 T: |B| = B_res at
    # u = +/- a sqrt((B0 / B_res)^(2/3) - 1), gradient dB/du = -3 u B / (a^2 + u^2)
    # (derivative of the loop formula, Jackson sec. 5.5)
    a, b0 = 0.1, 0.2
    current = 2 * a * b0 / MU0
    model = FieldModel(Magnet((Coil("loop", a, a, 0.15, 0.0, 1, current),)))
    chamber = Chamber(0.05, 0.0, 0.3)
    b_res = b_ecr(2.45e9)
    profile = geo.axis_profile(model, chamber)
    crossings = geo.resonance_crossings(profile, b_res, relative_tolerance=0.01)
    u = a * np.sqrt((b0 / b_res) ** (2 / 3) - 1)
    assert len(crossings) == 2
    for c, uu in zip(crossings, (-u, u)):
        assert c.z == pytest.approx(0.15 + uu, abs=1e-9)
        grad = -3 * uu * b_res / (a**2 + uu**2)
        assert c.gradient == pytest.approx(grad, rel=1e-6)
        assert c.half_width == pytest.approx(0.01 * b_res / abs(grad), rel=1e-6)
        assert c.width == pytest.approx(2 * c.half_width)
        # a root, not a grid node: the field there is B_res
        assert model.axis_field(c.z) == pytest.approx(b_res, rel=1e-10)


def test_two_percent_current_moves_the_resonance_as_the_gradient_predicts():
    # first-order Taylor: s B(z + dz) = B_res with B(z) = B_res gives
    # dz = -(ds / (1 + ds)) B_res / (dB/dz), about 0.02 B / |dB/dz| for +2 %
    magnet = Magnet((Coil("upstream", 0.11, 0.16, 0.04, 0.06, 400, 52.0),
                     Coil("downstream", 0.11, 0.16, 0.26, 0.06, 400, 25.0)),
                    current_tolerance=0.02)
    model = FieldModel(magnet)
    chamber = Chamber(0.075, 0.0, 0.3)
    b_res = b_ecr(2.45e9)
    nominal, raised = geo.axis_profiles(model, chamber, [1.0, 1.02])
    before = geo.resonance_crossings(nominal, b_res)
    after = geo.resonance_crossings(raised, b_res)
    assert len(before) == len(after) == 1
    for c0, c1 in zip(before, after):
        predicted = -(0.02 / 1.02) * b_res / c0.gradient
        assert abs(c1.z - c0.z) > 3e-3  # a real move, over ten profile steps
        # the neglected second-order term is ~ B'' dz^2 / (2 B'): under 2 % here
        assert c1.z - c0.z == pytest.approx(predicted, rel=0.02)


def test_mirror_ratio_of_two_loops():
    # two equal loops at z = +/- d, chamber ends at +/- d/2: |B| falls monotonically from
    # each end to the centre, so B_inj = B_ext = B(d/2) + B(3d/2) and B_min = 2 B(d)
    # (Jackson sec. 5.5 superposed)
    a, d, current = 0.08, 0.12, 30e3
    magnet = Magnet((Coil("a", a, a, -d, 0.0, 1, current), Coil("b", a, a, d, 0.0, 1, current)))
    model = FieldModel(magnet)
    chamber = Chamber(0.03, -d / 2, d / 2)
    low, inj, ext = geo.axial_extrema(geo.axis_profile(model, chamber))
    b_max = loop_axis_field(current, a, d / 2) + loop_axis_field(current, a, 3 * d / 2)
    b_min = 2 * loop_axis_field(current, a, d)
    assert low.b == pytest.approx(b_min, rel=1e-9) and low.z == pytest.approx(0.0, abs=1e-6)
    assert inj.b == pytest.approx(b_max, rel=1e-9) and inj.z == pytest.approx(-d / 2)
    assert ext.b == pytest.approx(b_max, rel=1e-9) and ext.z == pytest.approx(d / 2)
    trap = geo.trap_geometry(model, chamber, grid=geo.GeometryGrid(volume_z=31, wall_z=31))
    assert trap.mirror_ratio == pytest.approx(b_max / b_min, rel=1e-9)


# hand-built minimum-B trap: a measured on-axis table B0(z) = B_min + c1 z^2 + c3 z^3
# (first-order paraxial off axis: B_z = B0, B_r = -(r/2) B0') and a 2 m long 36-segment
# Halbach hexapole whose bore field is the 2-D formula (Halbach, Nucl. Instrum. Methods 169
# (1980) 1, from memory; checked against magpylib in test_sources).
B_MIN, C1, C3 = 0.4, 53.333, -148.15
CHAMBER = Chamber(0.035, -0.15, 0.15)
R1, R2, REM, SEGMENTS = 0.05, 0.12, 1.4, 36


def b0(z):
    return B_MIN + C1 * z**2 + C3 * z**3


def db0(z):
    return 2 * C1 * z + 3 * C3 * z**2


def hexapole_wall_field():
    n = 3
    factor = np.sin((n + 1) * np.pi / SEGMENTS) / ((n + 1) * np.pi / SEGMENTS)
    return REM * n / (n - 1) * (1 - (R1 / R2) ** 2) * (CHAMBER.radius / R1) ** 2 * factor


@pytest.fixture(scope="module")
def hand_trap():
    z = np.linspace(-0.2, 0.2, 81)
    table = AxisTable("scan", "scan.csv", tuple(z), tuple(b0(z)))
    hexapole = Multipole("hex", R1, R2, 0.0, 2.0, REM, segments=SEGMENTS)
    magnet = Magnet((table, hexapole), trap="minimum-b")
    model = FieldModel(magnet, bore_radius=CHAMBER.radius)
    return model, geo.trap_geometry(model, CHAMBER)


def test_hand_built_trap_characteristic_fields(hand_trap):
    _, trap = hand_trap
    b_h = hexapole_wall_field()
    assert trap.injection_max.b == pytest.approx(b0(-0.15), rel=1e-9)  # 2.1 T at z_start
    assert trap.extraction_max.b == pytest.approx(b0(0.15), rel=1e-9)  # 1.1 T at z_end
    assert trap.volume_min.b == pytest.approx(B_MIN, rel=1e-9)
    assert trap.volume_min.r == pytest.approx(0.0, abs=1e-6)
    assert trap.volume_min.z == pytest.approx(0.0, abs=1e-5)
    # B_rad is the hexapole's field alone at the wall (the radial field of the published
    # min-B ratios): the 2-D Halbach value; the segmentation ripple is ~(R/R1)^36 = 3e-6 here.
    # The total |B| there adds the table field: at z of B_min B0' = 0, so
    # |B|^2 = B0^2 + B_hex^2 on every azimuth
    assert trap.radial_wall.b == pytest.approx(b_h, rel=2e-5)
    assert trap.radial_wall.z == pytest.approx(trap.volume_min.z, abs=1e-12)
    assert trap.wall_total.b == pytest.approx(np.hypot(B_MIN, b_h), rel=2e-5)
    assert trap.mirror_ratio == pytest.approx(b0(0.15) / B_MIN, rel=1e-9)
    # last closed |B|: on the wall, min over azimuth of
    # |B|^2 = B0^2 + (|(R/2) B0'| - B_hex)^2 (radial table field against the hexapole)
    wall = lambda z: np.sqrt(b0(z) ** 2 + (abs(0.5 * CHAMBER.radius * db0(z)) - b_h) ** 2)
    lcs = min(minimize_scalar(wall, bounds=(lo, hi), method="bounded",
                              options={"xatol": 1e-10}).fun
              for lo, hi in ((-0.15, 0.0), (0.0, 0.15)))
    assert trap.last_closed.where == "wall"
    assert trap.last_closed.b == pytest.approx(lcs, rel=1e-4)


def test_hand_built_trap_min_b_ratios(hand_trap):
    # ratios over B_ECR(14.5 GHz) = 0.51796 T (computed, reference-values.md sec. 1.3 form)
    _, trap = hand_trap
    bres = b_ecr(14.5e9)
    ratios = geo.min_b_ratios(trap, bres)
    assert ratios.injection == pytest.approx(2.1 / bres, rel=1e-4)   # ~4.05
    assert ratios.extraction == pytest.approx(1.1 / bres, rel=1e-4)  # ~2.12
    assert ratios.minimum == pytest.approx(0.4 / bres, rel=1e-9)     # ~0.77
    # B_rad/B_ECR uses the hexapole alone (~1.61); the total |B| at the wall (~1.78) is beside it
    assert ratios.radial == pytest.approx(hexapole_wall_field() / bres, rel=2e-5)
    assert ratios.wall_total == pytest.approx(np.hypot(0.4, hexapole_wall_field()) / bres, rel=2e-5)


def test_hand_built_trap_wall_and_rz_arrays(hand_trap):
    model, trap = hand_trap
    grid = geo.GeometryGrid(wall_z=11, azimuths=24)
    wall = geo.wall_field(model, CHAMBER, grid=grid)
    # a hexapole (3 pole pairs, 24 segments) repeats |B| every 120°: 24 per turn -> 8 per period
    assert model.azimuthal_period == pytest.approx(2 * np.pi / 3)
    assert wall.b.shape == (11, 8) and wall.phi.max() < model.azimuthal_period
    assert wall.b.min() >= trap.last_closed.b - 1e-12
    rz = geo.rz_field(model, CHAMBER, n_r=5, n_z=7)
    assert rz.b.shape == (5, 7)
    np.testing.assert_allclose(rz.b[0], b0(rz.z), rtol=1e-9)


def test_azimuthal_period_is_a_symmetry_of_b(hand_trap):
    # rotating the observer by the period leaves |B| unchanged (Halbach pattern symmetry);
    # half the period does not (six-fold |B| variation of a hexapole plus a solenoid)
    model, _ = hand_trap
    rng = np.random.default_rng(7)
    r = rng.uniform(0.005, CHAMBER.radius, 50)
    phi = rng.uniform(0, 2 * np.pi, 50)
    z = rng.uniform(CHAMBER.z_start, CHAMBER.z_end, 50)

    def mag(angle):
        pts = np.stack([r * np.cos(phi + angle), r * np.sin(phi + angle), z], axis=-1)
        return model.magnitude(pts, 1.0)

    period = model.azimuthal_period
    np.testing.assert_allclose(mag(period), mag(0.0), rtol=1e-10)
    assert np.max(np.abs(mag(period / 2) - mag(0.0))) > 1e-4


def test_scales_are_vectorised_consistently():
    magnet = Magnet((Coil("a", 0.1, 0.14, -0.1, 0.05, 300, 100.0),
                     Coil("b", 0.1, 0.14, 0.1, 0.05, 300, 100.0), UniformField("u", -0.01)))
    model = FieldModel(magnet)
    chamber = Chamber(0.04, -0.1, 0.1)
    grid = geo.GeometryGrid(volume_z=21, wall_z=21, axis_points=401)
    both = geo.trap_geometries(model, chamber, [0.98, 1.02], grid)
    one = geo.trap_geometry(model, chamber, 1.02, grid)
    assert both[1].volume_min.b == pytest.approx(one.volume_min.b, rel=1e-12)
    assert both[1].last_closed.b == pytest.approx(one.last_closed.b, rel=1e-12)
    assert both[0].injection_max.b < both[1].injection_max.b
    assert model.axisymmetric
    assert geo.wall_field(model, chamber, grid=grid).b.shape == (21, 1)


def test_uncovered_chamber_is_an_error():
    z = np.linspace(0.0, 0.2, 21)
    model = FieldModel(Magnet((AxisTable("scan", "scan.csv", tuple(z), tuple(0.1 + z)),)))
    with pytest.raises(geo.FieldUndefinedError, match="do not cover"):
        geo.axis_profile(model, Chamber(0.03, 0.0, 0.3))


# --- B_rad: the multipole field at the wall against the 2-D closed forms ----------------------
#
# A Halbach array of M annular segments (segment k centred at theta_k = orientation + k 2 pi / M,
# uniformly magnetised at (N + 1) theta_k - N orientation, N = poles / 2): the Fourier series of
# its complex magnetisation m(theta) = M0 e^{i beta(theta)} holds the harmonics e^{i p theta},
# p = N + 1 + jM, with weights c_j = sin(p pi / M) / (p pi / M) = (-1)^j c_0 (N + 1) / p. In two
# dimensions each harmonic p >= 2 gives in the bore the field of an ideal 2nu-pole, nu = p - 1,
# B(r) = B_r nu / (nu - 1) (1 - (r_i / r_o)^(nu - 1)) (r / r_i)^(nu - 1), with the same phase
# (K. Halbach, Nucl. Instrum. Methods 169 (1980) 1, from memory; the superposition of 2-D line
# dipoles, B_x - i B_y = mu0 m / (2 pi (w - w0)^2), gives it term by term). Hence
# |B(r, phi)| = (r/r_i)^(N-1) |sum_j a_j (r/r_i)^(jM) e^{ijM phi'}|, phi' = phi - orientation:
# the fundamental grows as r^(N-1), the ripple repeats every 2 pi / M, all terms add at the
# joints between segments (the maximum) and alternate at the segment centres (the minimum).


def halbach_segmented(n, m, r_in, r_out, remanence, r, at="joint"):
    """|B| of the M-segment 2N-pole array at radius r in the 2-D limit (series above)."""
    total = 0.0
    for j in range(int(np.ceil((1 - n) / m)), 60):
        nu = n + j * m
        p = nu + 1
        if p < 2:
            continue
        a = remanence * np.sin(p * np.pi / m) / (p * np.pi / m) * nu / (nu - 1) \
            * (1 - (r_in / r_out) ** (nu - 1)) * (r / r_in) ** (nu - 1)
        total += abs(a) if at == "joint" else a
    return total


def _long_multipole(poles, segments, orientation=0.0, r_in=0.041, r_out=0.080):
    """A 2 m long array (the 2-D limit at its mid-plane z = 0) and a 37 mm chamber."""
    mp = Multipole("mp", r_in, r_out, 0.0, 2.0, 1.3, poles=poles, segments=segments,
                   orientation=orientation)
    chamber = Chamber(0.037, -0.05, 0.05)
    return FieldModel(Magnet((mp,)), bore_radius=chamber.radius), chamber


@pytest.mark.parametrize("poles", [4, 6, 8])
def test_multipole_field_grows_as_r_to_the_n_minus_1(poles):
    """Ideal 2N-pole: B(r) = B_r N/(N-1) (1 - (r_i/r_o)^(N-1)) (r/r_i)^(N-1) times the
    segmentation factor sin x / x, x = (N + 1) pi / M (Halbach 1980, from memory); at r <= 20 mm
    the ripple harmonics, ~(r/r_i)^24 < 4e-8, are negligible."""
    n = poles // 2
    model, _ = _long_multipole(poles, 24)
    r = np.array([0.005, 0.01, 0.02])
    phi = np.linspace(0, 2 * np.pi, 7)[:-1]
    rr, pp = np.meshgrid(r, phi, indexing="ij")
    b = np.linalg.norm(geo.multipole_field(model, np.stack([rr * np.cos(pp), rr * np.sin(pp),
                                                            0 * rr], axis=-1)), axis=-1)
    x = (n + 1) * np.pi / 24
    ideal = 1.3 * n / (n - 1) * (1 - (0.041 / 0.080) ** (n - 1)) * (r / 0.041) ** (n - 1)
    np.testing.assert_allclose(b, (ideal * np.sin(x) / x)[:, None] * np.ones_like(b), rtol=1e-4)
    # the power law itself, independent of the prefactor
    np.testing.assert_allclose(b[1:, 0] / b[0, 0], (r[1:] / r[0]) ** (n - 1), rtol=1e-5)


@pytest.mark.parametrize("segments", [12, 18, 24, 36])
def test_radial_wall_field_resolves_the_segmentation_ripple(segments):
    """B_rad = max over azimuth of the hexapole's |B| at the wall: the joint value of the series
    above; the total |B| of a multipole alone is the same field. Ripple (max - min)/(max + min)
    against the closed form: 7.2 %, 2.7 %, 1.1 %, 0.23 % for M = 12, 18, 24, 36 at
    R / r_i = 37/41 (computed from the series)."""
    model, chamber = _long_multipole(6, segments, orientation=0.3)
    (radial,), (total,) = geo.radial_wall_fields(model, chamber, [0.0])
    peak = halbach_segmented(3, segments, 0.041, 0.080, 1.3, chamber.radius, "joint")
    trough = halbach_segmented(3, segments, 0.041, 0.080, 1.3, chamber.radius, "centre")
    assert radial.b == pytest.approx(peak, rel=1e-4)  # facet engine <= 1e-4 (sources.py)
    assert total.b == pytest.approx(radial.b, rel=1e-12)
    # the maximum sits at a joint between segments, phi = orientation + (k + 1/2) 2 pi / M
    pitch = 2 * np.pi / segments
    offset = ((radial.phi - 0.3) / pitch) % 1.0
    assert offset == pytest.approx(0.5, abs=1e-3)
    # the ripple the search resolved, against the closed form
    phi = 0.3 + pitch * np.array([0.0, 0.5])
    pts = np.stack([chamber.radius * np.cos(phi), chamber.radius * np.sin(phi), 0 * phi], -1)
    lo, hi = np.linalg.norm(geo.multipole_field(model, pts), axis=-1)
    ripple = (hi - lo) / (hi + lo)
    assert ripple == pytest.approx((peak - trough) / (peak + trough), rel=2e-3)
    assert hi == pytest.approx(radial.b, rel=1e-6)  # refined to the joint


def test_radial_wall_field_against_the_exact_segment_engine():
    """The same maximum with magpylib's exact CylinderSegment engine (reference library) and
    the series (2-D closed form) for the 24-segment hexapole of the min-B example."""
    mp = Multipole("mp", 0.041, 0.080, 0.0, 2.0, 1.3, poles=6, segments=24)
    chamber = Chamber(0.037, -0.05, 0.05)
    exact = FieldModel(Magnet((mp,)), multipole_engine="segments")
    grid = geo.GeometryGrid(pitch_azimuths=4, zoom_levels=5)
    (radial,), _ = geo.radial_wall_fields(exact, chamber, [0.0], grid)
    assert radial.b == pytest.approx(halbach_segmented(3, 24, 0.041, 0.080, 1.3, 0.037), rel=1e-6)


def test_coarse_azimuths_miss_the_ripple_peak():
    """Why the search samples every segment pitch: one sample per 10 degrees (the old sweep
    density of a hexapole, 36 per turn) on a 15-degree pitch never lands on most joints; a
    sweep at those azimuths alone finds less than the closed-form peak, the refined search
    finds it."""
    model, chamber = _long_multipole(6, 24)
    phi = np.radians(np.arange(0.0, 120.0, 10.0)) + np.radians(1.0)
    pts = np.stack([chamber.radius * np.cos(phi), chamber.radius * np.sin(phi), 0 * phi], -1)
    coarse = np.linalg.norm(geo.multipole_field(model, pts), axis=-1).max()
    peak = halbach_segmented(3, 24, 0.041, 0.080, 1.3, chamber.radius)
    assert coarse < peak * (1 - 2e-3)
    (radial,), _ = geo.radial_wall_fields(model, chamber, [0.0])
    assert radial.b == pytest.approx(peak, rel=1e-4)


def test_no_multipole_means_no_radial_field():
    """An axisymmetric magnet has no multipole field: B_rad = 0, while the total |B| on the wall
    is the solenoid's (uniform field: exactly b everywhere)."""
    model = FieldModel(Magnet((UniformField("u", 0.3),)))
    chamber = Chamber(0.04, 0.0, 0.2)
    trap = geo.trap_geometry(model, chamber, grid=geo.GeometryGrid(volume_z=11, wall_z=11))
    assert trap.radial_wall.b == 0.0 and trap.radial_wall.where == "wall"
    assert trap.wall_total.b == pytest.approx(0.3, rel=1e-12)
    assert geo.min_b_ratios(trap, 0.1).radial == 0.0
