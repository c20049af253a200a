"""The facet kernel (rfcheck/magnet/facets.facet_field) against magpylib's cuboid magnet
(reference library: magpylib.magnet.Cuboid, closed form of Yang et al. / Camacho & Sosa) and
against the corner-by-corner sum of the rectangle-charge antiderivatives it is built from."""

from __future__ import annotations

import numpy as np
import pytest

magpylib = pytest.importorskip("magpylib")

from rfcheck.magnet.facets import facet_field  # noqa: E402
from rfcheck.physics.constants import TWO_PI  # noqa: E402

A, B, H, BR = 0.02, 0.03, 0.05, 1.2  # cuboid 20 x 30 x 50 mm, polarisation 1.2 T along x


def _cuboid_faces():
    """The two charged faces of a cuboid magnetised along x: sigma = +Br on x = +A/2 and
    -Br on x = -A/2, each traversed anticlockwise about the magnet's centre so that its
    outward normal lies to the right of its tangent (the convention of polygon_faces)."""
    starts = np.array([[A / 2, -B / 2], [-A / 2, B / 2]])
    tangents = np.array([[0.0, 1.0], [0.0, -1.0]])
    normals = np.array([[1.0, 0.0], [-1.0, 0.0]])
    lengths = np.array([B, B])
    sigma = np.array([BR, -BR])  # polarisation . outward normal
    return starts, tangents, normals, lengths, sigma


def _points():
    rng = np.random.default_rng(3)
    p = rng.uniform(-0.08, 0.08, size=(400, 3))
    outside = (np.abs(p[:, 0]) > A / 2 + 1e-3) | (np.abs(p[:, 1]) > B / 2 + 1e-3) | \
              (np.abs(p[:, 2]) > H / 2 + 1e-3)
    special = np.array([
        [A / 2 + 0.01, 0.0, 0.0],        # on the axis of a face, between both pairs of edges
        [A / 2 + 0.01, B / 2, 0.0],      # in the plane of an edge
        [0.0, 0.0, H / 2 + 0.01],        # above the magnet, in the plane of neither face
        [A / 2 + 0.01, 0.0, H / 2],      # level with the top edge
        [-A / 2 - 0.02, -B / 2 - 0.01, -H / 2 - 0.01],
    ])
    return np.vstack([p[outside], special])


def test_cuboid_field_equals_magpylib():
    p = _points()
    ours = facet_field(p, _cuboid_faces(), -H / 2, H / 2)
    ref = magpylib.magnet.Cuboid(polarization=(BR, 0, 0), dimension=(A, B, H)).getB(p)
    scale = np.linalg.norm(ref, axis=1).max()
    assert np.max(np.abs(ours - ref)) < 1e-10 * scale


def _corner_sum(points, faces, z1, z2):
    """The antiderivatives summed corner by corner (four logarithms of each kind and four
    arctangents per face), as written in E. P. Furlani, Permanent Magnet and
    Electromechanical Devices (2001), for the cuboid (chapter from memory)."""
    starts, tangents, normals, lengths, sigma = faces
    d = points[:, None, :2] - starts[None]
    u = (d * tangents).sum(-1)
    v = (d * normals).sum(-1)
    it = np.zeros(u.shape)
    iz = np.zeros(u.shape)
    inn = np.zeros(u.shape)
    for ia, a in enumerate((u, u - lengths)):
        for ib, b in enumerate((points[:, None, 2] - z1, points[:, None, 2] - z2)):
            sign = 1.0 if ia == ib else -1.0
            r = np.sqrt(a * a + v * v + b * b)
            it -= sign * np.log(b + r)
            iz -= sign * np.log(a + r)
            with np.errstate(divide="ignore", invalid="ignore"):
                inn += sign * np.where(v != 0, np.arctan(a * b / (v * r)), 0.0)
    out = np.stack([(it * sigma) @ tangents[:, 0] + (inn * sigma) @ normals[:, 0],
                    (it * sigma) @ tangents[:, 1] + (inn * sigma) @ normals[:, 1],
                    iz @ sigma], axis=-1)
    return out / (2.0 * TWO_PI)


def test_paired_form_equals_corner_sum_off_the_far_side():
    """Where no offset is negative enough for cancellation (points on the +x, +y, +z side
    of every corner), the plain corner sum is accurate and the paired kernel must equal it."""
    rng = np.random.default_rng(5)
    p = np.column_stack([rng.uniform(A / 2 + 0.005, 0.1, 200), rng.uniform(B / 2 + 0.005, 0.1, 200),
                         rng.uniform(H / 2 + 0.005, 0.1, 200)])
    faces = _cuboid_faces()
    ours = facet_field(p, faces, -H / 2, H / 2)
    ref = _corner_sum(p, faces, -H / 2, H / 2)
    assert np.max(np.abs(ours - ref)) < 1e-9 * np.abs(ref).max()


@pytest.mark.parametrize("block", [1, 7, 128, 1000])
def test_block_size_does_not_change_the_field(block):
    p = _points()
    faces = _cuboid_faces()
    # equal up to the summation order of the matrix products over faces
    assert np.allclose(facet_field(p, faces, -H / 2, H / 2, block=block),
                       facet_field(p, faces, -H / 2, H / 2), rtol=0, atol=1e-15)
