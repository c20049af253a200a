"""Launched polarisation and the plasma's two characteristic waves: the mode content of a feed.

A wave launched from a line or horn into a magnetised plasma splits at the plasma edge into
the two characteristic waves of the cold plasma, which then travel independently (each on
its own branch of the dispersion relation, followed adiabatically). Along B0 they are the
circularly polarised R and L waves, across B0 the linearly polarised O (E ∥ B0) and X
(E ⊥ B0) modes, and in between elliptical waves of the same two branches.

Geometry: B0 along +z, the wave vector k = (sin θ, 0, cos θ) in the x–z plane at the angle
θ to B0. The transverse (wavefront) basis is

    e1 = (cos θ, 0, −sin θ)   in the k–B0 plane, perpendicular to k,
    e2 = (0, 1, 0)            perpendicular to both, e1 × e2 = k̂,

and a polarisation is a Jones vector (E·e1, E·e2). Time dependence exp(−iωt), as in
:mod:`rfcheck.physics.coldplasma`, so the R wave along B0 has E_y = i E_x, i.e. the Jones
vector (1, i)/√2: its field turns in the sense of the electrons' gyration about B0.

The characteristic polarisations are those of the tenuous plasma edge (X → 0), where the
launched vacuum wave meets the plasma: to first order in the density the dielectric is
K = 1 + X_e κ with κ = [[κ_S, −iκ_D, 0], [iκ_D, κ_S, 0], [0, 0, κ_P]] (the Stix elements per
unit X_e, electrons and ions), and degenerate perturbation theory of the two transverse
vacuum waves gives the 2 × 2 Hermitian matrix (lossless plasma)

    T = [[κ_S cos²θ + κ_P sin²θ,  −i κ_D cos θ],
         [ i κ_D cos θ,            κ_S       ]],

whose orthonormal eigenvectors are the two polarisations and whose eigenvalues give
n² ≈ 1 + X_e λ of the two branches. For electrons alone this is the Appleton–Hartree
polarisation of magneto-ionic theory, E·e2 / E·e1 = i [Y sin²θ ± √(Y² sin⁴θ + 4 cos²θ)] /
(2 cos θ) (Budden 1985, ch. 4; Stix 1992, ch. 1): circular at θ = 0, linear at θ = π/2, and
the two are orthogonal, so a launched polarisation v splits into power fractions
|⟨u_k, v⟩|² that sum to one.

Assumptions (stated with every use): the split happens at a tenuous edge (a density step at
a wall in a flat profile couples the two waves with different transmission, which the
full-wave solution of each wave then accounts for separately); each wave keeps its branch
along the path (no mode conversion between them on the way); collisions do not change the
edge polarisation.

References
----------
K. G. Budden, *The Propagation of Radio Waves* (Cambridge 1985), ch. 4 (polarisation of
the characteristic waves) and ch. 17 (limiting polarisation at a plasma boundary).
T. H. Stix, *Waves in Plasmas* (AIP 1992), ch. 1 (the cold-plasma wave equation and its
eigenvectors, iE_x/E_y = (n² − S)/D). D. G. Swanson, *Plasma Waves*, 2nd ed. (IOP 2003),
ch. 2 (polarisation of the cold-plasma waves).
"""

from __future__ import annotations

import math
from typing import Any, NamedTuple

import numpy as np

from rfcheck.physics.coldplasma import n2_branch, stix
from rfcheck.physics.frequencies import critical_density
from rfcheck.physics.domain import guard_public

__all__ = ["WavePolarisations", "PARTNER", "characteristic_polarisations", "launched_jones",
           "mode_fractions"]

#: the other characteristic wave of each branch name (R/L pair along B0, O/X pair across)
PARTNER = {"R": "L", "L": "R", "O": "X", "X": "O"}
#: relative eigenvalue gap below which the two waves are degenerate (no magnetisation)
_DEGENERATE = 1e-9


class WavePolarisations(NamedTuple):
    """The two characteristic waves at the plasma edge.

    labels : the two branch names, e.g. ("R", "L") or ("O", "X"), in the order of `vectors`.
    vectors : (2, 2) complex, row k the unit Jones vector (E·e1, E·e2) of wave labels[k].
    n2_slope : (2,) real, (n² − 1)/X_e of each wave at the edge (first order in the density).
    degenerate : True where the field is too weak to separate the waves (B0 → 0): any
        polarisation then travels as one wave with n² = P, and `vectors` is the identity.
    """

    labels: tuple[str, str]
    vectors: np.ndarray
    n2_slope: np.ndarray
    degenerate: bool


def _per_x_elements(f: float, b: float, ions: Any) -> tuple[float, float, float]:
    """(κ_S, κ_D, κ_P): the Stix elements S − 1, D, P − 1 per unit X_e (lossless).

    The cold elements are linear in the density, so they are evaluated at X_e = 1 (the
    critical density), where S − 1 and P − 1 keep full relative accuracy.
    """
    e = stix(f, b, float(critical_density(f)), ions)
    return float(e.S) - 1.0, float(e.D), float(e.P) - 1.0


def characteristic_polarisations(f: float, b: float, theta: float, pair: tuple[str, str],
                                 ions: Any = ()) -> WavePolarisations:
    """Jones vectors of the two characteristic waves at the tenuous plasma edge.

    Parameters
    ----------
    f : float
        Wave frequency, Hz (> 0).
    b : float
        Field magnitude at the edge, T (≥ 0).
    theta : float
        Angle between k and B0, rad, in [0, π/2].
    pair : (str, str)
        The branch names to label the two waves with: ("R", "L") or ("O", "X") (the names
        of :func:`rfcheck.physics.coldplasma.n2_branch`); each eigenvector is given the
        label whose branch n² at a vanishing density matches its eigenvalue.
    ions : optional
        Ion species as in :func:`rfcheck.physics.coldplasma.stix`.

    Returns
    -------
    WavePolarisations
    """
    f, b, theta = float(f), float(b), float(theta)
    if not (f > 0 and math.isfinite(f)):
        raise ValueError(f"frequency must be positive and finite, got {f!r}")
    if not (math.isfinite(b) and b >= 0):
        raise ValueError(f"field magnitude must be finite and ≥ 0, got {b!r}")
    if not (0.0 <= theta <= math.pi / 2 + 1e-12):
        raise ValueError(f"theta must lie in [0, π/2], got {theta!r}")
    if set(pair) not in ({"R", "L"}, {"O", "X"}):
        raise ValueError(f"pair must be ('R', 'L') or ('O', 'X'), got {pair!r}")
    ks, kd, kp = _per_x_elements(f, b, ions) if b > 0 else (-1.0, 0.0, -1.0)
    c, s = math.cos(theta), math.sin(theta)
    t = np.array([[ks * c * c + kp * s * s, -1j * kd * c], [1j * kd * c, ks]], dtype=complex)
    scale = float(np.max(np.abs(t))) or 1.0
    lam, vec = np.linalg.eigh(t / scale)
    lam = lam * scale
    gap = abs(lam[1] - lam[0]) / max(abs(lam[0]), abs(lam[1]), 1e-300)
    if b == 0 or gap < _DEGENERATE:
        return WavePolarisations(tuple(pair), np.eye(2, dtype=complex), lam, True)
    # fix the phase of each Jones vector: real, non-negative e1 component (else e2)
    vectors = vec.T.copy()
    for k in range(2):
        ref = vectors[k, 0] if abs(vectors[k, 0]) > 1e-12 else vectors[k, 1]
        vectors[k] *= abs(ref) / ref
    # label by matching the first-order slope with the named branches at a vanishing density
    n_small = 1e-6 * float(critical_density(f))
    slopes = {name: (float(np.real(n2_branch(f, b, n_small, theta, name, ions))) - 1.0) / 1e-6
              for name in pair}
    a, bname = pair
    direct = abs(lam[0] - slopes[a]) + abs(lam[1] - slopes[bname])
    swapped = abs(lam[0] - slopes[bname]) + abs(lam[1] - slopes[a])
    labels = (a, bname) if direct <= swapped else (bname, a)
    return WavePolarisations(labels, vectors, lam, False)


def launched_jones(kind: str, e_angle: float = 0.0) -> np.ndarray:
    """Unit Jones vector (E·e1, E·e2) of a launched polarisation.

    kind "linear": E at angle ``e_angle`` (rad) from the projection of B0 on the wavefront
    (E ∥ B0 for e_angle = 0 across B0: the O mode); "circular-right": the R wave's sense
    about B0, (1, i)/√2; "circular-left": (1, −i)/√2. The projection of B0 on the wavefront
    is −e1 (θ in (0, π/2]); the sign of a Jones vector does not change power fractions.
    """
    if kind == "linear":
        return np.array([math.cos(e_angle), math.sin(e_angle)], dtype=complex)
    if kind == "circular-right":
        return np.array([1.0, 1j]) / math.sqrt(2.0)
    if kind == "circular-left":
        return np.array([1.0, -1j]) / math.sqrt(2.0)
    raise ValueError(f"polarisation must be 'linear', 'circular-right' or 'circular-left', "
                     f"got {kind!r}")


def mode_fractions(waves: WavePolarisations, jones: np.ndarray) -> dict[str, float]:
    """Power fractions {label: |⟨u_k, v⟩|²} of a launched Jones vector v on the two waves.

    The two waves are orthonormal (Hermitian T), so the fractions sum to 1. Degenerate
    waves (no field) carry the whole power as one wave: {labels[0]: 1, labels[1]: 0} with
    labels[0] standing for the unmagnetised wave n² = P.
    """
    v = np.asarray(jones, dtype=complex)
    v = v / np.linalg.norm(v)
    if waves.degenerate:
        return {waves.labels[0]: 1.0, waves.labels[1]: 0.0}
    out = {}
    for label, u in zip(waves.labels, waves.vectors):
        out[label] = float(abs(np.vdot(u, v)) ** 2)
    total = sum(out.values())
    return {k: v / total for k, v in out.items()}


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
