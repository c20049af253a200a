"""Cold-plasma dielectric and dispersion, checked against outside references.

References used below: the published worked example of PlasmaPy's
``cold_plasma_permittivity_SDP``/``_LRP`` docstrings (after Stix 1992); reference-values.md
section 2 (CODATA evaluations, "H"); PlasmaPy 2025.8 at random points; 40+-digit mpmath
evaluations from the same double inputs; the Appleton-Hartree formula (textbook closed form);
identities of the trade (S^2 - D^2 = RL, theta = 0 / pi/2 limits).
"""

from __future__ import annotations

import mpmath as mp
import numpy as np
import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

from rfcheck.physics import coldplasma as cp
from rfcheck.physics.constants import E_CHARGE, EPS0
from rfcheck.physics.frequencies import critical_density, ecr_field, upper_hybrid_density
from rfcheck.physics.species import ion_mixture, parse_species


def plasma(x, y, f=2.45e9):
    """(f, B, n_e) for given electron X and Y."""
    return f, y * ecr_field(f), x * critical_density(f)


# --------------------------------------------------------------------------- worked examples


def test_published_example_deuterium():
    """B = 2 T, e- and D+ at 1e18 m^-3, f = 3.7 GHz (PlasmaPy docstring example, Stix 1992)."""
    e = cp.stix(3.7e9, 2.0, 1e18, ions="D+")
    assert e.S == pytest.approx(1.02422, abs=1e-5)
    assert e.D == pytest.approx(0.39089, abs=1e-5)
    assert e.P == pytest.approx(-4.8903, abs=1e-4)
    assert e.R == pytest.approx(1.41512, abs=1e-5)
    assert e.L == pytest.approx(0.63333, abs=1e-5)
    # derived values, ref 2.4 (computed, H)
    roots = cp.refractive_index_squared(3.7e9, 2.0, 1e18, np.pi / 4, ions="D+")
    assert sorted([roots.o, roots.x]) == pytest.approx([0.791979, 2.862923], abs=2e-6)
    assert cp.n2_x_mode(3.7e9, 2.0, 1e18, ions="D+") == pytest.approx(0.875045, abs=2e-6)
    assert e.R * e.L == pytest.approx(0.896247, abs=2e-6)


# ref 2.4 own computed examples (electron only, H): X, Y, S, D, P, R, L, n2_X
TABLE = [
    (2.45e9, 3e16, 0.100, 2.319205, 1.507258, 0.597086, 3.826463, 0.811947, 1.339633),
    (2.45e9, 3e16, 0.060, 0.239854, -0.521103, 0.597086, -0.281249, 0.760957, -0.892288),
    (14.5e9, 1e18, 0.4, 0.050201, -0.733441, 0.616569, -0.683241, 0.783642, -10.665517),
    (28e9, 5e18, 1.2, 2.170544, 1.404276, 0.485865, 3.574819, 0.766268, 1.262020),
    (170e9, 1e20, 5.3, -0.170176, -1.021221, 0.721051, -1.191397, 0.851045, 5.958134),
    (170e9, 5e19, 2.8, 0.822874, -0.081665, 0.860525, 0.741209, 0.904538, 0.814769),
]


@pytest.mark.parametrize(
    "f, n, b, s, d, p, r, l, n2x", [pytest.param(*row, id=f"ref 2.4 {row[0]:.3g} Hz B={row[2]}") for row in TABLE]
)
def test_reference_table_electron_only(f, n, b, s, d, p, r, l, n2x):
    e = cp.stix(f, b, n)
    got = [e.S, e.D, e.P, e.R, e.L, cp.n2_x_mode(f, b, n), cp.n2_o_mode(f, b, n)]
    assert got == pytest.approx([s, d, p, r, l, n2x, p], abs=1e-5, rel=2e-6)


def test_reference_table_fixed_x_y_row():
    """X = 0.5, Y = 0.8 (ref 2.4; S = 1 - X/(1 - Y^2) etc. in closed form)."""
    e = cp.stix(*plasma(0.5, 0.8))
    closed = [1 - 0.5 / 0.36, -0.4 / 0.36, 0.5, -1.5, 1 - 0.5 / 1.8]
    assert [e.S, e.D, e.P, e.R, e.L] == pytest.approx(closed, rel=1e-12)
    assert cp.n2_x_mode(*plasma(0.5, 0.8)) == pytest.approx(2.785707, abs=1e-5)


def test_oblique_reference_row():
    """theta = 45 deg, n = 3e16, B = 0.1 T, 2.45 GHz: n^2 = 1.771853 and 0.718015 (ref 2.4)."""
    roots = cp.refractive_index_squared(2.45e9, 0.1, 3e16, np.pi / 4)
    assert sorted([roots.o, roots.x]) == pytest.approx([0.718015, 1.771853], abs=2e-6)


def test_collisional_appleton_hartree_reference():
    """X = 0.5, Y = 0.8, theta = 90 deg, Z = 0.01 (ref 2.4, exp(+iwt)): conjugated for exp(-iwt)."""
    f, b, n = plasma(0.5, 0.8)
    nu = 0.01 * 2 * np.pi * f
    roots = cp.refractive_index_squared(f, b, n, np.pi / 2, collision_frequency=nu)
    assert roots.o == pytest.approx(np.conj(0.500050 - 0.005000j), abs=2e-6)
    # the reference quotes its (+i w t) X root to 6 decimals from the AH form with U = 1 - iZ
    ah_x = _appleton_hartree(0.5, 0.8, np.pi / 2, z=0.01)[1]
    assert roots.x == pytest.approx(ah_x, rel=1e-12)


def test_unmagnetised_collisional_permittivity():
    """13.56 MHz, n = 1e17, nu = 1e8: eps = -18439 + 21643i (ref 8.2, exp(-iwt))."""
    e = cp.stix(13.56e6, 0.0, 1e17, collision_frequency=1e8)
    assert e.P == pytest.approx(-18439 + 21643j, rel=1e-4)
    assert e.S == pytest.approx(e.P, rel=1e-14) and e.D == 0


# --------------------------------------------------------------------------- PlasmaPy


MIXTURES = [
    pytest.param("H+", id="e- + H+"),
    pytest.param("D+", id="e- + D+"),
    pytest.param("Ar+", id="e- + Ar+"),
    pytest.param((("H+", 0.5), ("D+", 0.3), ("Ar+", 0.2)), id="e- + H+/D+/Ar+ mix"),
]


def _condition(f, b, n, mixture):
    """Per element, (sum of |terms| + 1)/|value| times the distance factor to a cyclotron resonance."""
    w = 2 * np.pi * f
    species = [(parse_species("e-"), 1.0)] + list(ion_mixture(mixture))
    scale = {k: np.ones_like(f) for k in "SPRL"} | {"D": np.zeros_like(f)}
    value = {k: np.ones_like(f) for k in "SPRL"} | {"D": np.zeros_like(f)}
    near = np.ones_like(f)
    for sp, frac in species:
        ns = n * frac / abs(sp.charge_number)
        x = ns * (sp.charge_number * E_CHARGE) ** 2 / (EPS0 * sp.mass) / w**2
        y = sp.charge_number * E_CHARGE * b / (sp.mass * w)
        terms = {"S": -x / (1 - y**2), "D": x * y / (1 - y**2), "P": -x, "R": -x / (1 + y), "L": -x / (1 - y)}
        for k, t in terms.items():
            scale[k] += np.abs(t)
            value[k] += t
        near = np.maximum(near, 1 / np.abs(1 - np.abs(y)))
    with np.errstate(divide="ignore", invalid="ignore"):  # D = 0 at B = 0
        return {k: scale[k] / np.abs(value[k]) * near for k in "SDPRL"}


@pytest.mark.parametrize("mixture", MIXTURES)
def test_matches_plasmapy_at_random_points(mixture):
    """2,500 random points per mixture (10,000 in all) over 10 MHz-200 GHz, 1e12-1e21 m^-3, 0-10 T."""
    u = pytest.importorskip("astropy.units")
    dielectric = pytest.importorskip("plasmapy.formulary.dielectric")
    from plasmapy.particles import CustomParticle

    rng = np.random.default_rng(12345)
    m = 2500
    f = 10 ** rng.uniform(7, np.log10(2e11), m)
    n = 10 ** rng.uniform(12, 21, m)
    b = np.where(rng.random(m) < 0.02, 0.0, rng.uniform(0, 10, m))
    species, dens = ["e-"], [n * u.m**-3]
    for sp, frac in ion_mixture(mixture):  # pin the same masses on both sides
        species.append(CustomParticle(mass=sp.mass * u.kg, charge=sp.charge * u.C))
        dens.append(n * frac / sp.charge_number * u.m**-3)
    args = (b * u.T, species, dens, 2 * np.pi * f * u.rad / u.s)
    s_ref, d_ref, p_ref = (q.value for q in dielectric.cold_plasma_permittivity_SDP(*args))
    l_ref, r_ref, _ = (q.value for q in dielectric.cold_plasma_permittivity_LRP(*args))
    ours = cp.stix(f, b, n, ions=mixture)
    cond = _condition(f, b, n, mixture)
    for key, ref in (("S", s_ref), ("D", d_ref), ("P", p_ref), ("R", r_ref), ("L", l_ref)):
        got = getattr(ours, key)
        away = cond[key] < 1e4  # away from the singular layers (both sides then good to ~1e-12)
        if key == "D":
            away &= b > 0
            assert np.all(got[b == 0] == 0) and np.all(ref[b == 0] == 0)
        assert away.mean() > 0.95, key
        rel = np.abs(got[away] / ref[away] - 1)
        assert rel.max() <= 1e-10, (key, rel.max())


# --------------------------------------------------------------------------- mpmath near singular layers


def _mp_roots(f, b, n, theta, ions=()):
    """Both labelled roots at 60 digits from the same double inputs (textbook Stix forms)."""
    with mp.workdps(60):
        w = 2 * mp.pi * mp.mpf(f)
        e, eps0 = mp.mpf(E_CHARGE), mp.mpf(EPS0)
        S = P = R = L = mp.mpf(1)
        D = mp.mpf(0)
        for sp, frac in [(parse_species("e-"), 1.0), *ion_mixture(ions)]:
            z, m = sp.charge_number, mp.mpf(sp.mass)
            x = mp.mpf(n) * mp.mpf(frac) / abs(z) * (z * e) ** 2 / (eps0 * m) / w**2
            y = z * e * mp.mpf(b) / (m * w)
            R -= x / (1 + y)
            L -= x / (1 - y)
            P -= x
            S -= x / (1 - y**2)
            D += x * y / (1 - y**2)
        th = mp.mpf(theta)
        s2, c2 = mp.sin(th) ** 2, mp.cos(th) ** 2
        A = S * s2 + P * c2
        B = R * L * s2 + P * S * (1 + c2)
        K = R * L - P * S
        F = mp.sqrt(K**2 * s2**2 + 4 * P**2 * D**2 * c2)
        F = -F if K < 0 else F
        cond_a = (abs(S) * s2 + abs(P) * c2) / abs(A)
        return (B - F) / (2 * A), (B + F) / (2 * A), float(cond_a)


def _condition_number(f, b, n):
    x = n / critical_density(f)
    y = b / ecr_field(f)
    return 1 + 1 / abs(1 - y) + 1 / abs(1 - x - y * y) + 1 / abs(1 - x)


def _singular_points(kind, count, seed):
    rng = np.random.default_rng(seed)
    out = []
    while len(out) < count:
        f = 10 ** rng.uniform(7, np.log10(2e11))
        ions = "D+" if rng.random() < 0.5 else ()
        delta = rng.uniform(-1e-8, 1e-8)
        theta = rng.uniform(0, np.pi / 2)
        if kind == "uh":
            b = rng.uniform(0.02, 0.98) * ecr_field(f)
            n = upper_hybrid_density(f, b) * (1 + delta)
            if rng.random() < 0.3:
                theta = np.pi / 2 * (1 - rng.uniform(0, 1e-6))
        elif kind == "ecr":
            b = ecr_field(f) * (1 + delta)
            n = min(10 ** rng.uniform(12, 21), critical_density(f) * 10 ** rng.uniform(-4, 3))
        else:  # resonance cone A = 0: tan^2 theta = -P/S
            b = ecr_field(f) * 10 ** rng.uniform(-2, 1)
            n = critical_density(f) * 10 ** rng.uniform(-3, 3)
            e = cp.stix(f, b, n, ions=ions)
            if not -e.P / e.S > 0:
                continue
            theta = np.arctan(np.sqrt(-e.P / e.S)) * (1 + delta)
        out.append((f, b, n, theta, ions))
    return out


@pytest.mark.parametrize("kind", ["uh", "ecr", "cone"])
def test_roots_match_mpmath_next_to_singular_layers(kind):
    """Within 1e-8 relative of the upper-hybrid layer, the ECR and the resonance cone.

    Every root must agree with the 60-digit evaluation within 1e-12 x the condition number
    c = 1 + 1/|1-Y| + 1/|1-X-Y^2| + 1/|1-X|. On the cone the diverging root (n^2 ~ 1/A) also
    carries the conditioning of A itself with respect to the inputs, (|S| sin^2 + |P| cos^2)/|A|
    (~1e8 here): its bound is multiplied by that factor. The finite root gets no such allowance.
    """
    worst = 0.0
    for f, b, n, theta, ions in _singular_points(kind, 60, seed={"uh": 1, "ecr": 2, "cone": 3}[kind]):
        o, x = cp.refractive_index_squared(f, b, n, theta, ions=ions)
        ref_o, ref_x, cond_a = _mp_roots(f, b, n, theta, ions)
        cond = _condition_number(f, b, n)
        diverging = "o" if abs(ref_o) > abs(ref_x) else "x"
        for label, got, ref in (("o", o, ref_o), ("x", x, ref_x)):
            bound = 1e-12 * cond * (cond_a if kind == "cone" and label == diverging else 1.0)
            err = float(abs(mp.mpf(float(got)) - ref) / abs(ref))
            worst = max(worst, err / bound)
            assert err <= bound, (kind, label, f, b, n, theta, err, bound)
    assert worst > 0  # the comparison did run on non-trivial numbers


def test_naive_quadratic_formula_fails_the_cone_criterion():
    """The same criterion rejects the textbook (B +- sqrt(B^2 - 4AC))/2A on the cone."""
    failures = 0
    for f, b, n, theta, ions in _singular_points("cone", 20, seed=3):
        e = cp.stix(f, b, n, ions=ions)
        s2, c2 = np.sin(theta) ** 2, np.cos(theta) ** 2
        a = e.S * s2 + e.P * c2
        bb = e.R * e.L * s2 + e.P * e.S * (1 + c2)
        disc = np.sqrt(bb * bb - 4 * a * e.P * e.R * e.L)
        naive = [(bb - disc) / (2 * a), (bb + disc) / (2 * a)]
        ref_o, ref_x, _ = _mp_roots(f, b, n, theta, ions)
        finite = ref_o if abs(ref_o) < abs(ref_x) else ref_x
        got = min(naive, key=lambda v: abs(mp.mpf(float(v)) - finite))
        err = float(abs(mp.mpf(float(got)) - finite) / abs(finite))
        failures += err > 1e-12 * _condition_number(f, b, n)
    assert failures >= 10


# --------------------------------------------------------------------------- identities, labels


def _appleton_hartree(x, y, theta, z=0.0):
    """Appleton-Hartree n^2 ("+" then "-" root), electrons, exp(-iwt) with U = 1 + iZ.

    n^2 = 1 - X (U - X) / [U (U - X) - Y_T^2/2 +- sqrt(Y_T^4/4 + Y_L^2 (U - X)^2)]
    (Ratcliffe's form, written for exp(-iwt); the "+" root is n^2 = 1 - X/U at 90 deg).
    """
    u = 1 + 1j * z
    yt2, yl2 = (y * np.sin(theta)) ** 2, (y * np.cos(theta)) ** 2
    root = np.sqrt(yt2**2 / 4 + yl2 * (u - x) ** 2 + 0j)
    plus = 1 - x * (u - x) / (u * (u - x) - yt2 / 2 + root)
    minus = 1 - x * (u - x) / (u * (u - x) - yt2 / 2 - root)
    if z == 0:
        return plus.real, minus.real
    return plus, minus


def test_labels_agree_with_appleton_hartree():
    """Electron plasma: o is the AH root with '+' (ordinary at 90 deg), x the one with '-'."""
    rng = np.random.default_rng(11)
    x, y, theta = rng.uniform(0.01, 3, 4000), rng.uniform(0.01, 3, 4000), rng.uniform(0.01, np.pi / 2, 4000)
    f, b, n = plasma(x, y)
    o, xm = cp.refractive_index_squared(f, b, n, theta)
    ah_o, ah_x = _appleton_hartree(n / critical_density(f), b / ecr_field(f), theta)
    ok = (np.abs(ah_o) < 1e3) & (np.abs(ah_x) < 1e3) & (np.abs(1 - x) > 1e-3)  # away from poles
    assert ok.mean() > 0.9
    assert o[ok] == pytest.approx(ah_o[ok], rel=1e-8, abs=1e-10)
    assert xm[ok] == pytest.approx(ah_x[ok], rel=1e-8, abs=1e-10)


def test_identities_of_the_trade():
    rng = np.random.default_rng(5)
    f, n, b = 10 ** rng.uniform(7, 11, 3000), 10 ** rng.uniform(12, 21, 3000), rng.uniform(0, 10, 3000)
    e = cp.stix(f, b, n, ions="Ar+")
    assert e.S**2 - e.D**2 == pytest.approx(e.R * e.L, rel=1e-8)
    assert (e.R + e.L) / 2 == pytest.approx(e.S, rel=1e-8, abs=1e-12 * np.abs(e.R).max())
    along = cp.refractive_index_squared(f, b, n, 0.0, ions="Ar+")
    assert sorted_pairs(along) == pytest.approx(sorted_pairs((e.R, e.L)), rel=1e-12)
    assert cp.n2_branch(f, b, n, 0.0, "R", ions="Ar+") == pytest.approx(e.R, rel=1e-12)
    assert cp.n2_branch(f, b, n, 0.0, "L", ions="Ar+") == pytest.approx(e.L, rel=1e-12)
    across = cp.refractive_index_squared(f, b, n, np.pi / 2, ions="Ar+")
    assert across.o == pytest.approx(e.P, rel=1e-12)
    assert across.x == pytest.approx(e.R * e.L / e.S, rel=1e-10)
    # the branch named "R" connects continuously to R as theta -> 0
    assert cp.n2_branch(f, b, n, 1e-7, "R", ions="Ar+") == pytest.approx(e.R, rel=1e-6, abs=1e-9)


def sorted_pairs(pair):
    a, b = np.asarray(pair[0]), np.asarray(pair[1])
    return np.concatenate([np.minimum(a, b), np.maximum(a, b)])


def _chordal(u, v):
    """Distance of u and v on the Riemann sphere: continuity through n^2 = +-inf counts as such."""
    return np.abs(u - v) / np.sqrt((1 + u * u) * (1 + v * v))


@settings(max_examples=40, deadline=None, derandomize=True, database=None)
@given(x=st.floats(0.02, 5.0), y=st.floats(0.02, 3.0), ions=st.sampled_from([(), "H+", "Ar+"]))
@example(x=0.5, y=0.75, ions=())  # resonance cone crossed by the x branch
@example(x=1.0, y=2.0, ions="H+")  # P slightly negative: a cone near theta = 0
@example(x=0.5, y=1.0, ions=())  # exactly at ECR: n^2 of the R branch ~ 1/theta^2
def test_labelled_roots_are_continuous_in_theta(x, y, ions):
    """Along a fine theta grid no label jumps to the other root (a resonance-cone pole is fine)."""
    f, b, n = plasma(x, y)
    theta = np.linspace(0.0, np.pi / 2, 3001)
    o, xm = cp.refractive_index_squared(f, b, n, theta, ions=ions)
    separated = _chordal(o, xm) > 1e-9
    check = separated[1:] & separated[:-1]
    # a label that swapped roots would land closer to the other root's previous value
    assert np.all((_chordal(o[1:], o[:-1]) < _chordal(o[1:], xm[:-1]))[check])
    assert np.all((_chordal(xm[1:], xm[:-1]) < _chordal(xm[1:], o[:-1]))[check])
    assert check.mean() > 0.5


def test_collisions_are_lossy_and_continuous():
    f, b, n = plasma(0.7, 0.6)
    lossless = cp.stix(f, b, n, ions="Ar+")
    lossy = cp.stix(f, b, n, ions="Ar+", collision_frequency=1e-9 * 2 * np.pi * f)
    assert [v.imag > 0 for v in (lossy.R, lossy.L, lossy.P, lossy.S)] == [True] * 4  # exp(-iwt)
    assert [v.real for v in lossy] == pytest.approx(list(lossless), rel=1e-12)
    per_species = cp.stix(f, b, n, ions="Ar+", collision_frequency={"e-": 1e7})
    electrons_only = cp.stix(f, b, n, collision_frequency=1e7)
    assert per_species.P == pytest.approx(electrons_only.P + lossless.P - cp.stix(f, b, n).P, rel=1e-12)
    with pytest.raises(ValueError, match="not in the plasma"):
        cp.stix(f, b, n, ions="Ar+", collision_frequency={"Xe+": 1e7})
    roots = cp.refractive_index_squared(f, b, n, 0.3, ions="Ar+", collision_frequency=1e-9 * 2 * np.pi * f)
    ref = cp.refractive_index_squared(f, b, n, 0.3, ions="Ar+")
    assert [roots.o.real, roots.x.real] == pytest.approx([ref.o, ref.x], rel=1e-6)


def test_special_points_and_shapes():
    # exactly at ECR (Y == 1 in floating point) the oblique roots stay finite (Appleton-Hartree)
    for x_, th in ((0.5, 0.7), (2.0, 0.3), (0.9, 1.2)):
        f_ecr = 2.45e9
        b_ecr = ecr_field(f_ecr)
        with np.errstate(divide="ignore"):
            assert np.isinf(cp.stix(f_ecr, b_ecr, x_ * critical_density(f_ecr)).R)  # Y == 1 exactly
        roots = cp.refractive_index_squared(f_ecr, b_ecr, x_ * critical_density(f_ecr), th)
        ah = _appleton_hartree(x_, 1.0, th)
        assert [roots.o, roots.x] == pytest.approx(list(ah), rel=1e-9)
    # theta = 0 with X = 1 exactly: A = B = C = 0, the branches are still R and L
    f, b, n = 2.45e9, 0.05, critical_density(2.45e9)
    roots = cp.refractive_index_squared(f, b, n, 0.0)
    e = cp.stix(f, b, n)
    assert np.isfinite([roots.o, roots.x]).all()
    assert sorted([roots.o, roots.x]) == pytest.approx(sorted([e.R, e.L]), rel=1e-12)
    # broadcasting: (200, 1) field/density grid x 91 angles
    fields, angles = np.linspace(0, 0.2, 200)[:, None], np.linspace(0, np.pi / 2, 91)
    grid = cp.refractive_index_squared(2.45e9, fields, 3e16, angles)
    assert grid.o.shape == (200, 91) and grid.x.shape == (200, 91)
    # large inputs are evaluated slice by slice: identical to evaluating the pieces alone
    rng = np.random.default_rng(9)
    ff, nn, bb = 10 ** rng.uniform(7, 11, 70000), 10 ** rng.uniform(12, 21, 70000), rng.uniform(0, 10, 70000)
    whole = cp.stix(ff, bb, nn, ions="D+")
    part = cp.stix(ff[-5:], bb[-5:], nn[-5:], ions="D+")
    assert all(np.array_equal(w[-5:], p) for w, p in zip(whole, part))
    whole_roots = cp.refractive_index_squared(ff, bb, nn, 0.4)
    part_roots = cp.refractive_index_squared(ff[:5], bb[:5], nn[:5], 0.4)
    assert np.array_equal(whole_roots.o[:5], part_roots.o) and np.array_equal(whole_roots.x[:5], part_roots.x)
    with pytest.raises(ValueError, match="mode"):
        cp.n2_branch(f, b, n, 0.1, "Z")


# --------------------------------------------------------------------------- CMA diagram


@pytest.mark.parametrize(
    "x, y, region, waves",
    [
        pytest.param(0.40291, 1.14255, 6, "RLOX", id="ref 2.4 row 1 (Y > 1): all propagate"),
        pytest.param(0.40291, 0.68553, 2, "LO", id="ref 2.4 row 2: R cut off, X evanescent"),
        pytest.param(0.5, 0.8, 3, "LOX", id="ref 2.4 row 3: between UHR and O cutoff"),
        pytest.param(1.2, 0.5, 4, "LX", id="above O cutoff, below L cutoff"),
        pytest.param(2.0, 0.5, 5, "", id="above L cutoff: nothing propagates"),
        pytest.param(1.5, 1.2, 7, "RLX", id="above ECR, overdense"),
        pytest.param(5.0, 1.2, 8, "R", id="whistler only"),
        pytest.param(0.1, 0.5, 1, "RLOX", id="tenuous, below ECR"),
    ],
)
def test_cma_regions(x, y, region, waves):
    got = cp.cma_region(x, y)
    assert got.region == region
    assert "".join(w for w, ok in zip("RLOX", (got.r, got.l, got.o, got.x)) if ok) == waves
    assert region in cp.CMA_REGIONS


def test_cma_propagation_matches_signs_of_stix_elements():
    rng = np.random.default_rng(21)
    f, b, n = plasma(rng.uniform(0, 4, 5000), rng.uniform(0, 3, 5000))
    e = cp.stix(f, b, n)
    got = cp.cma_region(n / critical_density(f), b / ecr_field(f))
    assert np.array_equal(got.r, e.R > 0)
    assert np.array_equal(got.l, e.L > 0)
    assert np.array_equal(got.o, e.P > 0)
    assert np.array_equal(got.x, e.R * e.L / e.S > 0)

