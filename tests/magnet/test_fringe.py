"""Fringe-field lines (rfcheck.magnet.fringe) against the closed-form field of a current loop.

Loop on its axis: B = μ0 I R²/(2 (R² + z²)^{3/2}) (Jackson, Classical Electrodynamics, 3rd ed.
1999, §5.5), so |B| = B_L at z = √((μ0 I R²/(2 B_L))^{2/3} − R²). In its plane (z = 0) off
axis, B_z from complete elliptic integrals (Smythe 1968, as in test_sources.py), solved for
B_z = B_L with brentq.
"""

import numpy as np
import pytest
from scipy.optimize import brentq
from scipy.special import ellipe, ellipk

from rfcheck.magnet.fringe import fringe_extent, line_crossing
from rfcheck.magnet.sources import FieldModel
from rfcheck.model import Chamber, Coil, Magnet, UniformField
from rfcheck.physics.constants import MU0

R, NI, LEVEL = 0.1, 5000.0, 0.5e-3  # a 100 mm loop of 5 kA-turns; the 0.5 mT line


def loop_in_plane_bz(r):
    m = 4 * R * r / (R + r) ** 2
    return MU0 * NI / (2 * np.pi * (R + r)) * (ellipk(m) + (R**2 - r**2) / (R - r) ** 2 * ellipe(m))


def _loop():
    magnet = Magnet((Coil("loop", R, R, 0.0, 0.0, 1, NI),))
    chamber = Chamber(0.02, -0.01, 0.01)
    return FieldModel(magnet), magnet, chamber


def test_single_loop_axial_and_radial_lines_match_closed_form():
    model, magnet, chamber = _loop()
    (ext,) = fringe_extent(model, magnet, chamber, [LEVEL], [1.0])
    z_expected = np.sqrt((MU0 * NI * R**2 / (2 * LEVEL)) ** (2 / 3) - R**2)  # Jackson §5.5
    assert ext.axial_high.status == "found"
    assert ext.z_high == pytest.approx(z_expected, rel=1e-3)
    assert ext.z_low == pytest.approx(-z_expected, rel=1e-3)
    r_expected = brentq(lambda r: abs(loop_in_plane_bz(r)) - LEVEL, 1.05 * R, 5.0)
    assert ext.radial.status == "found"
    assert ext.radial_z == pytest.approx(0.0, abs=1e-12)
    assert ext.radial.distance == pytest.approx(r_expected, rel=2e-3)
    assert ext.points <= 1000  # a few hundred field evaluations (start-up budget)


def test_worst_current_scale_moves_the_line_outward():
    model, magnet, chamber = _loop()
    (nominal,) = fringe_extent(model, magnet, chamber, [LEVEL], [1.0])
    (worst,) = fringe_extent(model, magnet, chamber, [LEVEL], [0.9, 1.0, 1.1])
    # far from the loop B ∝ I/z³, so the line moves by about 1.1^(1/3)
    assert worst.axial_high.distance / nominal.axial_high.distance == pytest.approx(
        1.1 ** (1 / 3), rel=1e-2)


def test_log_log_interpolation_is_exact_for_a_power_law():
    d = np.geomspace(0.2, 30.0, 96)
    b = 0.5e-3 * (0.5 / d) ** 3  # dipole far field ∝ r⁻³, 0.5 mT at 0.5 m
    c = line_crossing(d, b, 0.5e-3)
    assert c.status == "found" and c.distance == pytest.approx(0.5, rel=1e-9)


def test_statuses_inside_beyond_range_and_beyond_data():
    d = np.geomspace(0.2, 30.0, 50)
    assert line_crossing(d, np.full(50, 1e-5), 5e-4).status == "inside"
    assert line_crossing(d, np.full(50, 1e-2), 5e-4).status == "beyond-range"
    b = np.where(d < 1.0, 1e-2, np.nan)
    got = line_crossing(d, b, 5e-4)
    assert got.status == "beyond-data" and got.distance < 1.0


def test_uniform_field_has_no_fringe():
    magnet = Magnet((UniformField("u", 0.1),))
    assert fringe_extent(FieldModel(magnet), magnet, Chamber(0.02, 0.0, 0.1), [LEVEL], [1.0]) is None
