"""Collisional damping along a ray (rfcheck.physics.rays, both tracers) against closed forms.

The weak-damping power law used by the tracers (module docstring of rfcheck.physics.rays,
"Power"; Stix 1992 ch. 4, Bornatici et al., Nucl. Fusion 23 (1983) 1153, from memory): with the
ray's own real N on H = N·N − n²(θ) = 0 and n²_ν the same branch with ω → ω + iν, the complex
correction iN_i to N that keeps H = 0 satisfies N_i·∂H/∂N = Im n²_ν, and the power along the
ray falls as exp(−2 k0 ∫ N_i·dr) with dr = ∂H/∂N dτ, so

    d ln P/dτ = −2 k0 Im n²_ν,

which is Im N ≈ Im n²/(2 Re N) along the ray (ds/dτ = |∂H/∂N| = 2|N| for an isotropic n²)
written in the Hamiltonian parameter: finite where N → 0 at a turning point, linear in ν.
Unmagnetised (or O across B): n²_ν = 1 − X/(1 + iε), ε = ν/ω, Im n²_ν = X ε/(1 + ε²)
(Stix 1992 ch. 1; Swanson 2003 ch. 2).
"""

from __future__ import annotations

import cmath
import math

import numpy as np
import pytest

from rfcheck.physics.constants import C
from rfcheck.physics.frequencies import critical_density, ecr_field
from rfcheck.physics.rays import trace_ray, trace_rays

F = 14.5e9
OMEGA = 2 * math.pi * F
K0 = OMEGA / C
NC = float(critical_density(F))
L_N = 0.040  # linear layer X = z / L_N, cutoff X = 1 at 40 mm


def no_field(p):
    return np.zeros((len(p), 3))


def field_along_z(p):
    """1 mT along z: Y = 0.002 at 14.5 GHz (f_ce = 28.0 GHz/T × B; NRL Formulary)."""
    return np.tile([0.0, 0.0, 1e-3], (len(p), 1))


def field_along_y(p):
    """0.1 T along y: Y = 0.19, across every ray launched in the x–z plane."""
    return np.tile([0.0, 0.1, 0.0], (len(p), 1))


def linear_layer(p):
    return NC * np.clip(p[:, 2] / L_N, 0.0, None)


def _trace(tracer, direction, mode, b_field, density, nu, **kw):
    """One ray from the origin by the single-ray tracer (DOP853, rtol 1e-9) or as a bundle of
    one (per-ray Dormand–Prince 5(4), rtol 1e-8)."""
    if tracer == "trace_ray":
        return trace_ray(F, [0.0, 0.0, 0.0], direction, mode, b_field, density,
                         collision_frequency=nu, rtol=1e-9, **kw)
    (ray,) = trace_rays(F, [[0.0, 0.0, 0.0]], [direction], mode, b_field, density,
                        collision_frequency=nu, rtol=1e-8, **kw)
    return ray


TRACERS = ("trace_ray", "trace_rays")


def y_of(b_field) -> float:
    """Y = f_ce/f of a uniform field callable (f_ce = e B/(2π m_e); NRL Formulary)."""
    return float(np.linalg.norm(b_field(np.zeros((1, 3)))) / ecr_field(F))


def _turned_at(ray, z_turn: float) -> None:
    """The highest sampled point of the path lies at the turning point z_turn or within the
    last steps below it (the output points are the integrator's steps, up to 20 mm apart)."""
    top = float(ray.path[:, 2].max())
    assert z_turn * 0.97 <= top <= z_turn * (1.0 + 1e-4)


@pytest.mark.parametrize("tracer", TRACERS)
@pytest.mark.parametrize("mode, b_field", [("O", no_field), ("R", field_along_z)],
                         ids=["O unmagnetised", "R along 1 mT"])
def test_normal_incidence_loss_at_a_linear_cutoff_is_the_closed_form_and_linear_in_nu(
        tracer, mode, b_field):
    """Linear layer X = z/L at normal incidence, there and back (Ginzburg 1970, the linear
    layer with collisions; from memory, derived here).

    O unmagnetised: H = N_z² − 1 + z/L, so dN_z/dτ = −1/L, N_z = 1 − τ/L and
    dz/dτ = 2 N_z: z = 2τ − τ²/L, turning at τ = L (z = L) and back at z = 0 at τ = 2L.
    ln P = −2 k0 ∫ Im n²_ν dτ = −2 k0 ε/(1 + ε²) (1/L) ∫₀^{2L} (2τ − τ²/L) dτ
         = −(8/3) k0 L ε/(1 + ε²).
    The same in arc length: 2 × ∫₀^L Im n²/(2√(1 − z/L)) dz = (4/3) L ε.
    R along B: n² = R = 1 − X/(1 + iε − Y); the ray's layer is L(1 − Y) and
    Im R = X ε/((1 − Y)² + ε²), so ∫ Im R dτ = (4/3) L (1 − Y)² ε/((1 − Y)² + ε²): the same
    (8/3) k0 L ε to O(ε²), for any Y < 1 (no ions here).

    The old form, 2 k0 Im √n²_ν |N̂·∂H/∂N|, counted ~√(Im n²) where Re n² → 0 (or turns
    slightly negative after a step past the turning point): losses up to 6× too large that
    did not scale with ν; here two ν, 31× apart, must give losses 31× apart.
    """
    losses = []
    for nu in (1e5, 3.1e6):
        eps = nu / OMEGA
        ray = _trace(tracer, [0.0, 0.0, 1.0], mode, b_field, linear_layer, nu, max_length=1.0)
        assert ray.stop == "returned"
        # turned at the cutoff z = L (1 − Y), Y = B/B_ecr (0 unmagnetised), sampled from below
        _turned_at(ray, L_N * (1.0 - y_of(b_field)))
        closed = 8.0 / 3.0 * K0 * L_N * eps / (1.0 + eps ** 2)
        loss = -math.log(ray.power[-1])
        # the closed form is exact to O(ε²) ≈ 1e-9; the tolerance is the integration's
        # (measured 6e-6 to 1e-5); the old form was 1.4 % (single ray) to 6× (bundle) high
        assert loss == pytest.approx(closed, rel=5e-5)
        losses.append(loss)
    # linear in ν: the path does not depend on ν, the rate is linear in it
    assert losses[1] / losses[0] == pytest.approx(31.0, rel=1e-6)


@pytest.mark.parametrize("tracer", TRACERS)
@pytest.mark.parametrize("degrees", [20.0, 45.0])
@pytest.mark.parametrize("b_field", [no_field, field_along_y], ids=["no field", "O across B"])
def test_oblique_loss_in_the_linear_layer_is_the_integral_over_its_path(tracer, degrees,
                                                                       b_field):
    """A ray launched at θ from the gradient of X = z/L (Ginzburg 1970; derived here):
    N_x = sin θ is conserved, N_z = cos θ − τ/L, dz/dτ = 2 N_z, so z = 2τ cos θ − τ²/L; it
    turns at z = L cos²θ (τ = L cos θ) and is back at z = 0 at τ = 2L cos θ. Then
    ln P = −2 k0 ε/(1 + ε²) (1/L) ∫₀^{2L cos θ} (2τ cos θ − τ²/L) dτ
         = −(8/3) k0 L cos³θ ε/(1 + ε²);
    in arc length, Im N ≈ Im n²/(2|N|) along ds = 2|N| dτ gives the same. The O wave across B
    (B along y, N in the x–z plane: θ_B = 90° all along) has n² = P = 1 − X/(1 + iε),
    independent of B (Stix 1992 ch. 1): the same closed form in a magnetised plasma.
    """
    theta = math.radians(degrees)
    nu = 1e6
    eps = nu / OMEGA
    ray = _trace(tracer, [math.sin(theta), 0.0, math.cos(theta)], "O", b_field, linear_layer,
                 nu, max_length=1.0, inside=lambda p: p[:, 2] + 1e-9)
    assert ray.stop == "wall"  # back at the plane z = 0
    _turned_at(ray, L_N * math.cos(theta) ** 2)
    closed = 8.0 / 3.0 * K0 * L_N * math.cos(theta) ** 3 * eps / (1.0 + eps ** 2)
    # tolerance: the integration's (measured 7e-6 to 1.9e-5)
    assert -math.log(ray.power[-1]) == pytest.approx(closed, rel=5e-5)


def _exact_uniform(x: float, eps: float, s: float) -> float:
    """ln P after a straight path s in a uniform plasma: −2 k0 Im √n²_ν s (exact complex root,
    n²_ν = 1 − X/(1 + iε); Swanson 2003 ch. 2)."""
    return -2.0 * K0 * cmath.sqrt(1.0 - x / (1.0 + 1j * eps)).imag * s


@pytest.mark.parametrize("tracer", TRACERS)
def test_uniform_plasma_loss_agrees_with_the_exact_root_to_second_order_in_nu(tracer):
    """No gradient: the ray is straight with the real |N| = √(1 − X), and the weak form gives
    ln P = −2 k0 s Im n²_ν/(2√(1 − X)). Against the exact −2 k0 s Im √n²_ν (Swanson 2003
    ch. 2) the ratio is, with a = Re n²_ν = 1 − X/(1 + ε²), b = Im n²_ν and
    Im √(a + ib) = b/(2√a) (1 − b²/(8a²) + …),
        weak/exact = 1 + c ε² + O(ε⁴),  c = X/(2(1 − X)) + X²/(8(1 − X)²)
    (derived here; 0.625 at X = 0.5): the weak-damping form is exact to first order in ν/ω
    and its error is second order."""
    x, length = 0.5, 0.1
    c2 = x / (2 * (1 - x)) + x ** 2 / (8 * (1 - x) ** 2)
    errors = []
    for eps in (0.01, 0.03):
        ray = _trace(tracer, [0.0, 0.0, 1.0], "O", no_field, lambda p: np.full(len(p), x * NC),
                     eps * OMEGA, max_length=length)
        assert ray.stop == "max_length"
        s = ray.s[-1]
        assert s == pytest.approx(length, rel=1e-9)
        weak = -2.0 * K0 * s * (x * eps / (1 + eps ** 2)) / (2.0 * math.sqrt(1.0 - x))
        got = math.log(ray.power[-1])
        assert got == pytest.approx(weak, rel=1e-7)
        error = got / _exact_uniform(x, eps, s) - 1.0
        assert 0.0 < error <= 1.05 * c2 * eps ** 2
        errors.append(error)
        assert ray.power[-1] < 0.9  # the damping is visible: the check can fail
    # second order: 9× the error at 3× the collision frequency
    assert errors[1] / errors[0] == pytest.approx(9.0, rel=1e-2)
