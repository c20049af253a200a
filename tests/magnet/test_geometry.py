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
    # B_rad at z of B_min, where B0' = 0: |B|^2 = B0^2 + B_hex^2 on every azimuth
    assert trap.radial_wall.b == pytest.approx(np.hypot(B_MIN, b_h), rel=2e-5)
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
    assert ratios.radial == pytest.approx(np.hypot(0.4, hexapole_wall_field()) / bres, rel=2e-5)


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
