"""Field engine against closed-form magnet fields and against magpylib's own objects."""

import numpy as np
import pytest
from scipy.special import ellipe, ellipk

from rfcheck.magnet.sources import FieldModel, magpylib_collection
from rfcheck.model import (AxisTable, Coil, FieldMap, Magnet, Multipole, RingMagnet,
                           UniformField)
from rfcheck.physics.constants import MU0


def loop_axis_field(current, radius, z):
    """Current loop on its axis: B = mu0 I R^2 / (2 (R^2 + z^2)^(3/2))
    (J. D. Jackson, Classical Electrodynamics, 3rd ed. 1999, sec. 5.5)."""
    return MU0 * current * radius**2 / (2 * (radius**2 + z**2) ** 1.5)


def loop_off_axis_bz(current, radius, r, z):
    """Current loop off axis, B_z with complete elliptic integrals (parameter m = k^2):
    B_z = mu0 I / (2 pi sqrt((R+r)^2+z^2)) [K(m) + (R^2-r^2-z^2)/((R-r)^2+z^2) E(m)]
    (W. R. Smythe, Static and Dynamic Electricity, 3rd ed. 1968; section from memory)."""
    m = 4 * radius * r / ((radius + r) ** 2 + z**2)
    return MU0 * current / (2 * np.pi * np.sqrt((radius + r) ** 2 + z**2)) * (
        ellipk(m) + (radius**2 - r**2 - z**2) / ((radius - r) ** 2 + z**2) * ellipe(m))


def thick_solenoid_axis_field(ni, a1, a2, length, z):
    """Thick solenoid of uniform current density J = NI/((a2-a1) L) on its axis:
    B = mu0 J / 2 [u ln((a2+sqrt(a2^2+u^2))/(a1+sqrt(a1^2+u^2)))]_{u=z-L/2}^{u=z+L/2}
    (D. B. Montgomery, Solenoid Magnet Design, Wiley 1969; chapter from memory)."""
    j = ni / ((a2 - a1) * length)

    def term(u):
        return u * np.log((a2 + np.sqrt(a2**2 + u**2)) / (a1 + np.sqrt(a1**2 + u**2)))

    return MU0 * j / 2 * (term(z + length / 2) - term(z - length / 2))


def cylinder_magnet_axis_field(remanence, radius, length, z):
    """Axially magnetised cylinder on its axis (equivalent surface current M):
    B = (B_r/2) [(z+L/2)/sqrt((z+L/2)^2+R^2) - (z-L/2)/sqrt((z-L/2)^2+R^2)]
    (E. P. Furlani, Permanent Magnet and Electromechanical Devices, 2001; chapter from
    memory)."""
    zp, zm = z + length / 2, z - length / 2
    return remanence / 2 * (zp / np.hypot(zp, radius) - zm / np.hypot(zm, radius))


def axis_points(z):
    return np.stack([np.zeros_like(z), np.zeros_like(z), z], axis=-1)


Z = np.linspace(-0.4, 0.4, 161)


def test_loop_on_axis_matches_closed_form():
    # a coil of zero length and zero thickness is one loop; source: Jackson sec. 5.5
    model = FieldModel(Magnet((Coil("loop", 0.1, 0.1, 0.05, 0.0, 1, 250.0),)))
    expected = loop_axis_field(250.0, 0.1, Z - 0.05)
    got = model.axis_field(Z)
    np.testing.assert_allclose(got, expected, rtol=1e-12)
    b = model.field(axis_points(Z))
    assert np.abs(b[:, :2]).max() < 1e-15


def test_loop_off_axis_matches_elliptic_integrals():
    # source: Smythe 1968 (complete elliptic integrals from scipy)
    model = FieldModel(Magnet((Coil("loop", 0.1, 0.1, 0.0, 0.0, 1, 250.0),)))
    r = np.array([0.01, 0.03, 0.06, 0.09, 0.15])
    z = np.array([0.0, 0.02, -0.05, 0.1, 0.03])
    b = model.field(np.stack([r, np.zeros_like(r), z], axis=-1))
    np.testing.assert_allclose(b[:, 2], loop_off_axis_bz(250.0, 0.1, r, z), rtol=1e-10)


@pytest.mark.parametrize("a1, a2, length, z0", [
    pytest.param(0.11, 0.16, 0.06, 0.04, id="flat coil; Montgomery 1969"),
    pytest.param(0.05, 0.20, 0.30, 0.0, id="long thick coil; Montgomery 1969"),
    pytest.param(0.10, 0.101, 0.02, -0.1, id="thin winding; Montgomery 1969"),
])
def test_thick_solenoid_on_axis_matches_closed_form(a1, a2, length, z0):
    coil = Coil("c", a1, a2, z0, length, 400, 120.0)
    model = FieldModel(Magnet((coil,)))
    expected = thick_solenoid_axis_field(400 * 120.0, a1, a2, length, Z - z0)
    got = model.axis_field(Z)  # on the axis the model uses the closed form itself
    assert np.max(np.abs(got - expected)) / np.max(np.abs(expected)) < 1e-12
    # the 8 Gauss-Legendre current sheets used off the axis, a nanometre from it: 1e-9 for a
    # winding three times thicker than its bore radius
    near = np.stack([np.full(Z.shape, 1e-9), np.zeros_like(Z), Z], axis=-1)
    sheets = model.field(near)[:, 2]
    assert np.max(np.abs(sheets - expected)) / np.max(np.abs(expected)) < 1e-8


def test_long_solenoid_interior_is_mu0_j_thickness():
    # Ampere's law for an infinitely long thick solenoid: B = mu0 J (a2 - a1) in the bore
    # (D. J. Griffiths, Introduction to Electrodynamics, 4th ed., ch. 5); length 200 m
    # makes the end correction ~ a^2 / (2 (L/2)^2) < 1e-6 at the centre.
    coil = Coil("long", 0.10, 0.12, 0.0, 200.0, 20000, 10.0)
    model = FieldModel(Magnet((coil,)))
    expected = MU0 * 20000 * 10.0 / 200.0
    points = np.array([[0.0, 0.0, 0.0], [0.05, 0.0, 0.1], [0.0, -0.09, -0.2]])
    b = model.field(points)
    np.testing.assert_allclose(b[:, 2], expected, rtol=1e-5)
    assert np.abs(b[:, :2]).max() < 1e-6 * expected


def test_coil_off_axis_agrees_with_a_dense_loop_grid():
    # independent discretisation: 24 x 24 magpylib Circle loops over the winding (midpoint
    # rule); the sheet model must agree to the loop grid's own accuracy (~1e-4)
    import magpylib as magpy

    a1, a2, length, ni = 0.11, 0.16, 0.06, 400 * 120.0
    n = 24
    radii = a1 + (np.arange(n) + 0.5) * (a2 - a1) / n
    zs = -length / 2 + (np.arange(n) + 0.5) * length / n
    loops = [magpy.current.Circle(current=ni / n**2, diameter=2 * rr, position=(0, 0, zz))
             for rr in radii for zz in zs]
    points = np.array([[0.03, 0.02, 0.0], [0.07, 0.0, 0.05], [0.0, 0.09, -0.08],
                       [0.1, 0.0, 0.0]])
    ref = magpy.getB(loops, points, sumup=True)
    got = FieldModel(Magnet((Coil("c", a1, a2, 0.0, length, 400, 120.0),))).field(points)
    assert np.max(np.linalg.norm(got - ref, axis=1)) / np.max(np.linalg.norm(ref, axis=1)) < 2e-4


@pytest.mark.parametrize("inner", [
    pytest.param(0.0, id="solid cylinder; Furlani 2001"),
    pytest.param(0.02, id="ring = difference of two cylinders; Furlani 2001"),
])
def test_axially_magnetised_ring_on_axis(inner):
    ring = RingMagnet("ring", inner, 0.06, 0.1, 0.03, 1.1)
    model = FieldModel(Magnet((ring,)))
    expected = cylinder_magnet_axis_field(1.1, 0.06, 0.03, Z - 0.1)
    if inner > 0:
        expected -= cylinder_magnet_axis_field(1.1, inner, 0.03, Z - 0.1)
    np.testing.assert_allclose(model.axis_field(Z), expected, rtol=1e-11, atol=1e-15)


HEX = Multipole("hex", 0.05, 0.10, 0.0, 2.0, 1.2, poles=6, segments=36)


def test_long_hexapole_matches_halbach_formula():
    # segmented Halbach 2N-pole of M annular segments, 2-D: |B|(r) = B_r N/(N-1)
    # (1 - (r1/r2)^(N-1)) (r/r1)^(N-1) sin((N+1) pi/M)/((N+1) pi/M)
    # (K. Halbach, Nucl. Instrum. Methods 169 (1980) 1; formula from memory). Length 2 m
    # >> radius, mid-plane.
    model = FieldModel(Magnet((HEX,)), bore_radius=0.035)
    n, m = 3, 36
    factor = np.sin((n + 1) * np.pi / m) / ((n + 1) * np.pi / m)
    for r in (0.005, 0.02, 0.035):
        phi = np.linspace(0, 2 * np.pi, 25)
        b = model.magnitude(np.stack([r * np.cos(phi), r * np.sin(phi), 0 * phi], axis=-1))
        expected = 1.2 * n / (n - 1) * (1 - (0.05 / 0.10) ** (n - 1)) * (r / 0.05) ** 2 * factor
        np.testing.assert_allclose(b, expected, rtol=1e-5)


def test_hexapole_is_quadratic_near_axis_and_sixfold():
    # 2N-pole field grows as r^(N-1) (r^2 for a hexapole) and changes sign under a
    # rotation by pi/N (standard multipole expansion; common practice)
    mp = Multipole("hex", 0.04, 0.09, 0.15, 0.3, 1.3, orientation=0.2)
    model = FieldModel(Magnet((mp,)))
    phi = np.linspace(0, 2 * np.pi, 13)
    ring = lambda r, z: np.stack([r * np.cos(phi), r * np.sin(phi), np.full_like(phi, z)], -1)
    b1 = model.magnitude(ring(0.002, 0.15))
    b2 = model.magnitude(ring(0.004, 0.15))
    np.testing.assert_allclose(b2 / b1, 4.0, rtol=2e-3)
    rng = np.random.default_rng(7)
    points = np.column_stack([rng.uniform(-0.03, 0.03, 50), rng.uniform(-0.03, 0.03, 50),
                              rng.uniform(0.0, 0.3, 50)])
    rot = np.array([[np.cos(np.pi / 3), -np.sin(np.pi / 3), 0],
                    [np.sin(np.pi / 3), np.cos(np.pi / 3), 0], [0, 0, 1]])
    b = model.field(points)
    b_rot = model.field(points @ rot.T)
    np.testing.assert_allclose(b_rot, -(b @ rot.T), atol=1e-12 * np.abs(b).max())
    # B_r at fixed radius follows sin(3 (phi - phi0)): six sign changes per turn
    phi = np.linspace(0, 2 * np.pi, 721)[:-1]
    pts = np.stack([0.02 * np.cos(phi), 0.02 * np.sin(phi), np.full_like(phi, 0.15)], -1)
    bf = model.field(pts)
    br = bf[:, 0] * np.cos(phi) + bf[:, 1] * np.sin(phi)
    assert np.count_nonzero(np.diff(np.sign(br)) != 0) + (np.sign(br[0]) != np.sign(br[-1])) == 6


def test_facet_multipole_agrees_with_magpylib_cylinder_segments():
    # reference library: magpylib CylinderSegment (exact annular sectors)
    mp = Multipole("hex", 0.04, 0.09, 0.15, 0.3, 1.3, segments=24, orientation=0.1)
    fast = FieldModel(Magnet((mp,)), bore_radius=0.035)
    exact = FieldModel(Magnet((mp,)), multipole_engine="segments")
    rng = np.random.default_rng(3)
    r = 0.035 * np.sqrt(rng.uniform(0, 1, 40))
    phi = rng.uniform(0, 2 * np.pi, 40)
    points = np.column_stack([r * np.cos(phi), r * np.sin(phi), rng.uniform(-0.05, 0.35, 40)])
    a, b = fast.field(points), exact.field(points)
    assert np.max(np.linalg.norm(a - b, axis=1)) / np.max(np.linalg.norm(b, axis=1)) < 1e-4


def test_model_matches_its_magpylib_objects():
    magnet = Magnet((Coil("c", 0.11, 0.16, 0.04, 0.06, 400, 120.0),
                     RingMagnet("r", 0.02, 0.06, 0.3, 0.03, 1.1)))
    points = np.array([[0.01, 0.02, 0.0], [0.05, -0.01, 0.2], [0.0, 0.0, 0.5]])
    ref = magpylib_collection(magnet).getB(points)
    np.testing.assert_allclose(FieldModel(magnet).field(points), ref, rtol=1e-12, atol=1e-16)


def test_scaling_applies_to_coils_uniform_and_flagged_tables_only():
    coil = Coil("c", 0.11, 0.16, 0.04, 0.06, 400, 120.0)
    ring = RingMagnet("r", 0.02, 0.06, 0.3, 0.03, 1.1)
    z = tuple(np.linspace(-0.5, 0.5, 11))
    fixed_table = AxisTable("t", "t.csv", z, tuple(0.01 + 0.0 * np.array(z)),
                            scales_with_current=False)
    magnet = Magnet((coil, ring, UniformField("u", 0.02), fixed_table))
    model = FieldModel(magnet)
    points = np.array([[0.01, 0.0, 0.0], [0.0, 0.02, 0.1]])
    parts = model.source_fields(points)
    scales = np.array([0.98, 1.0, 1.02])
    b = model.field(points, scales)
    assert b.shape == (3, 2, 3)
    for s, bs in zip(scales, b):
        expected = s * (parts["c"] + parts["u"]) + parts["r"] + parts["t"]
        np.testing.assert_allclose(bs, expected, rtol=1e-14, atol=1e-16)
    # a linear field doubles with a doubled current (linearity of the Biot-Savart law)
    doubled = FieldModel(Magnet((Coil("c", 0.11, 0.16, 0.04, 0.06, 400, 240.0),)))
    np.testing.assert_allclose(doubled.field(points), 2 * parts["c"], rtol=1e-13)


def test_unit_fields_are_computed_once_per_points_array(monkeypatch):
    model = FieldModel(Magnet((Coil("c", 0.11, 0.16, 0.04, 0.06, 400, 120.0),)))
    calls = []
    source = model.sources[0]
    original = source.field
    monkeypatch.setattr(source, "field", lambda p: calls.append(len(p)) or original(p))
    points = np.random.default_rng(0).uniform(-0.05, 0.05, (100, 3))
    model.field(points)
    model.field(points.copy(), np.linspace(0.98, 1.02, 41))
    model.magnitude(points, 1.01)
    assert calls == [100]
    model.field(points + 1e-3)
    assert calls == [100, 100]


def test_measured_table_off_axis_is_paraxial():
    # first-order paraxial expansion from div B = 0: B_r = -(r/2) dB0/dz
    # (common practice; e.g. M. Reiser, Theory and Design of Charged Particle Beams; from
    # memory)
    coil = Coil("c", 0.11, 0.16, 0.1, 0.06, 400, 120.0)
    z = np.linspace(-0.2, 0.4, 241)
    true = FieldModel(Magnet((coil,)))
    table = AxisTable("t", "t.csv", tuple(z), tuple(true.axis_field(z)))
    model = FieldModel(Magnet((table,)))
    zz = np.linspace(0.0, 0.2, 21)
    pts = np.stack([np.full_like(zz, 0.002), np.zeros_like(zz), zz], -1)
    got, ref = model.field(pts), true.field(pts)
    scale = np.abs(ref[:, 2]).max()
    assert np.abs(got[:, 0] - ref[:, 0]).max() < 1e-5 * scale
    # B_z is kept at first order: the difference is the next term, -(r^2/4) d2B0/dz2
    h = 1e-4
    second = (true.axis_field(zz + h) - 2 * true.axis_field(zz) + true.axis_field(zz - h)) / h**2
    np.testing.assert_allclose(got[:, 2] - ref[:, 2], 0.002**2 / 4 * second,
                               atol=0.05 * np.abs(0.002**2 / 4 * second).max())
    outside = model.field(np.array([[0.0, 0.0, 0.5]]))
    assert np.isnan(outside).all()


def test_points_shape_is_kept():
    model = FieldModel(Magnet((UniformField("u", 0.1),)))
    b = model.field(np.zeros((4, 5, 3)), np.array([1.0, 2.0]))
    assert b.shape == (2, 4, 5, 3)
    np.testing.assert_allclose(b[1, ..., 2], 0.2)
    with pytest.raises(ValueError):
        model.field(np.zeros((4, 2)))


def test_field_map_is_interpolated_including_the_axis():
    coil = Coil("c", 0.11, 0.16, 0.1, 0.06, 400, 120.0)
    true = FieldModel(Magnet((coil,)))
    r = np.linspace(0.0, 0.05, 26)
    z = np.linspace(0.0, 0.3, 61)
    rr, zz = np.meshgrid(r, z, indexing="ij")
    b = true.field(np.stack([rr, 0 * rr, zz], -1))
    fmap = FieldMap("m", "m.csv", tuple(r), tuple(z), tuple(map(tuple, b[..., 0])),
                    tuple(map(tuple, b[..., 2])))
    model = FieldModel(Magnet((fmap,)))
    rng = np.random.default_rng(5)
    pts = np.column_stack([rng.uniform(-0.035, 0.035, 200), rng.uniform(-0.035, 0.035, 200),
                           rng.uniform(0.0, 0.3, 200)])
    ref = true.field(pts)
    assert np.abs(model.field(pts) - ref).max() < 1e-4 * np.abs(ref).max()


def test_magnitude_over_scales_equals_norm_of_vectors():
    # |B| from the quadratic form in s must equal the norm of the scaled vectors
    magnet = Magnet((Coil("c", 0.11, 0.16, 0.04, 0.06, 400, 120.0),
                     RingMagnet("r", 0.0, 0.06, 0.3, 0.03, -1.1)))
    model = FieldModel(magnet)
    points = np.random.default_rng(2).uniform(-0.05, 0.35, (60, 3))
    scales = np.linspace(0.5, 1.5, 7)
    np.testing.assert_allclose(model.magnitude(points, scales),
                               np.linalg.norm(model.field(points, scales), axis=-1),
                               rtol=1e-12, atol=1e-8 * np.abs(model.field(points)).max())


@pytest.mark.parametrize("poles, segments", [(4, 8), (6, 24), (6, 12), (8, 32)])
def test_multipole_field_vanishes_on_the_axis(poles, segments):
    # a segmented 2n-pole array with n >= 2 has no field on its axis: a turn by one pole pitch
    # maps the array onto itself with the magnetisation reversed (symmetry; the ideal multipole
    # field grows as r^(n-1)). magpylib's exact CylinderSegment segments confirm it, and the
    # field model (which skips axis points for such arrays) agrees just off the axis.
    mp = Multipole("m", 0.04, 0.08, 0.15, 0.3, 1.3, poles, segments, 0.3)
    p = np.zeros((5, 3))
    p[:, 2] = np.linspace(-0.1, 0.4, 5)
    exact = FieldModel(Magnet((mp,)), multipole_engine="segments").field(p)
    assert np.abs(exact).max() < 1e-12
    assert np.abs(FieldModel(Magnet((mp,))).field(p)).max() == 0.0
    near = p + np.array([1e-6, 0.0, 0.0])
    assert np.abs(FieldModel(Magnet((mp,))).field(near)).max() < 1e-4  # ∝ r^(n−1): tens of T/m × 1 µm at most
