"""Measured field files: units from the header, the error discipline, coverage, round trip."""

import numpy as np
import pytest

from rfcheck.magnet.sources import FieldModel
from rfcheck.measured import (MeasuredDataError, check_coverage, read_axis_table,
                              read_field_map)
from rfcheck.model import Chamber, Coil, FieldMap, Magnet


def write(tmp_path, text, name="data.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def test_axis_table_units_from_header(tmp_path):
    # 1 G = 1e-4 T and 1 mm = 1e-3 m (SI brochure, 9th ed.; gauss as used for magnets)
    path = write(tmp_path, "# hall probe scan\nz [mm], B [G]\n0, 875\n10, 900\n20, 950\n"
                           "30, 1000\n")
    z, b = read_axis_table(path)
    np.testing.assert_allclose(z, [0.0, 0.01, 0.02, 0.03])
    np.testing.assert_allclose(b, [0.0875, 0.09, 0.095, 0.1])


def test_axis_table_parentheses_column_order_and_descending(tmp_path):
    path = write(tmp_path, "B (mT); z (cm)\n100; 3\n95; 2\n90; 1\n87.5; 0\n")
    z, b = read_axis_table(path)
    np.testing.assert_allclose(z, [0.0, 0.01, 0.02, 0.03])
    np.testing.assert_allclose(b, [0.0875, 0.09, 0.095, 0.1])


@pytest.mark.parametrize("text, line, words", [
    pytest.param("z, B [G]\n0, 1\n1, 2\n2, 3\n3, 4\n", 1, "no unit", id="missing unit"),
    pytest.param("# scan\n\nz [mm], B [gaus]\n0, 1\n1, 2\n2, 3\n3, 4\n", 3, "unknown unit",
                 id="unknown unit"),
    pytest.param("z [mm], B [s]\n0, 1\n1, 2\n2, 3\n3, 4\n", 1, "not a magnetic",
                 id="wrong dimension"),
    pytest.param("z [mm], B [G]\n0, 1\n1, 2\n2, x3\n3, 4\n", 4,
                 "column 'B' does not hold a number",
                 id="non-numeric cell"),
    pytest.param("z [mm], B [G]\n0, 1\n1, nan\n2, 3\n3, 4\n", 3, "finite", id="NaN"),
    pytest.param("z [mm], B [G]\n0, 1\n1, 2, 5\n2, 3\n3, 4\n", 3, "3 cells", id="ragged row"),
    pytest.param("z [mm], B [G]\n0, 1\n1, 2\n1, 3\n3, 4\n", 4, "repeats", id="duplicate z"),
    pytest.param("z [mm], B [G]\n0, 1\n2, 2\n1, 3\n3, 4\n", 4, "monotonic",
                 id="non-monotonic z"),
    pytest.param("z [mm], B [G]\n0, 1\n1, 2\n2, 3\n", None, "at least 4", id="too few points"),
    pytest.param("z [mm], H [A/m]\n0, 1\n1, 2\n2, 3\n3, 4\n", 1, "header column 2 names no known column",
                 id="unknown column"),
    pytest.param("# nothing\n", None, "no header", id="empty file"),
])
def test_axis_table_errors_name_the_line(tmp_path, text, line, words):
    path = write(tmp_path, text)
    with pytest.raises(MeasuredDataError) as info:
        read_axis_table(path)
    err = info.value
    assert err.line == line
    assert err.path == str(path)
    assert words in str(err)
    assert (f":{line}:" in str(err)) == (line is not None)


def map_text(r_mm, z_mm, skip=None, extra=None):
    rows = ["r [mm], z [mm], Br [T], Bz [T]"]
    for r in r_mm:
        for z in z_mm:
            if skip == (r, z):
                continue
            rows.append(f"{r}, {z}, {0.001 * r}, {0.1 + 0.001 * z}")
    if extra:
        rows.append(extra)
    return "\n".join(rows) + "\n"


def test_field_map_reads_long_format_in_any_order(tmp_path):
    text = map_text([0, 5, 10, 15], [0, 10, 20, 30, 40])
    lines = text.splitlines()
    shuffled = [lines[0]] + lines[1:][::-1]
    path = write(tmp_path, "\n".join(shuffled) + "\n")
    r, z, br, bz = read_field_map(path)
    np.testing.assert_allclose(r, [0, 0.005, 0.01, 0.015])
    np.testing.assert_allclose(z, [0, 0.01, 0.02, 0.03, 0.04])
    assert br.shape == bz.shape == (4, 5)
    np.testing.assert_allclose(br[2, 3], 0.01)
    np.testing.assert_allclose(bz[2, 3], 0.13)


@pytest.mark.parametrize("text, line, words", [
    pytest.param(map_text([0, 5, 10, 15], [0, 10, 20, 30], skip=(5, 20)), None,
                 "not a regular grid", id="missing node"),
    pytest.param(map_text([0, 5, 10, 15], [0, 10, 20, 30], extra="5, 10, 0, 0"), 18,
                 "appears again", id="duplicate node"),
    pytest.param(map_text([0, 5, 10], [0, 10, 20, 30]), None, "at least 4",
                 id="too few radii"),
    pytest.param(map_text([-5, 0, 5, 10], [0, 10, 20, 30]), 2, "negative", id="negative r"),
    pytest.param("r [mm], z [mm], Br [T]\n0, 0, 0\n", 1, "lacks the column",
                 id="missing column"),
])
def test_field_map_errors(tmp_path, text, line, words):
    with pytest.raises(MeasuredDataError) as info:
        read_field_map(write(tmp_path, text))
    assert info.value.line == line
    assert words in str(info.value)


def test_coverage_of_table_and_map():
    chamber = Chamber(0.035, 0.0, 0.3)
    z = np.linspace(-0.01, 0.31, 33)
    assert check_coverage(z, chamber).covers
    short = check_coverage(np.linspace(0.01, 0.3, 30), chamber)
    assert not short.covers and "z = 0.01..0.3" in short.problems[0]
    assert check_coverage(z, chamber, r=np.linspace(0.0, 0.04, 9)).covers
    narrow = check_coverage(z, chamber, r=np.linspace(0.0, 0.03, 7))
    assert not narrow.covers and "radius" in narrow.problems[0]
    off_axis = check_coverage(z, chamber, r=np.linspace(0.02, 0.04, 5))
    assert not off_axis.covers and "from the axis" in off_axis.problems[0]
    # unit rounding: 300 mm read from a file equals the chamber's 0.3 m within tolerance
    assert check_coverage(np.array([0.0, 0.1, 0.2, 300 * 1e-3]), chamber).covers


def test_measured_map_round_trip(tmp_path):
    # write the field of a thick coil as a measured map in mm and gauss, read it back and
    # interpolate: the coil's own field (closed-form sheets) is the reference
    coil = Coil("c", 0.11, 0.16, 0.15, 0.06, 400, 120.0)
    true = FieldModel(Magnet((coil,)))
    r_mm = np.arange(0, 42, 2.0)
    z_mm = np.arange(-10, 312, 4.0)
    rr, zz = np.meshgrid(r_mm * 1e-3, z_mm * 1e-3, indexing="ij")
    b = true.field(np.stack([rr, 0 * rr, zz], -1))
    rows = ["r [mm],z [mm],Br [G],Bz [G]"]
    for i, r in enumerate(r_mm):
        for j, z in enumerate(z_mm):
            rows.append(f"{r:g},{z:g},{b[i, j, 0] * 1e4:.10g},{b[i, j, 2] * 1e4:.10g}")
    path = write(tmp_path, "\n".join(rows) + "\n", "map.csv")
    r, z, br, bz = read_field_map(path)
    chamber = Chamber(0.04, 0.0, 0.3)
    assert check_coverage(z, chamber, r=r).covers
    fmap = FieldMap("map", str(path), tuple(r), tuple(z), tuple(map(tuple, br)),
                    tuple(map(tuple, bz)))
    model = FieldModel(Magnet((fmap,)))
    rng = np.random.default_rng(11)
    rad = 0.04 * np.sqrt(rng.uniform(0, 1, 300))
    phi = rng.uniform(0, 2 * np.pi, 300)
    pts = np.column_stack([rad * np.cos(phi), rad * np.sin(phi), rng.uniform(0, 0.3, 300)])
    ref = true.field(pts)
    # cubic interpolation on a 2 mm x 4 mm grid of a field varying over ~50 mm
    assert np.abs(model.field(pts) - ref).max() < 2e-4 * np.abs(ref).max()
