"""The launch path of each part of a feed's launched power (its split into the plasma's
characteristic waves, rfcheck.analysis.parts), shared by the cutoff, access.*, load.* and
absorption.* rules, the characteristics and the report figures; built once per feed and part
and cached in the run's ``_cache``.

Geometry: the path runs on the chamber axis from the launcher (its position clipped into the
chamber: the plasma starts at the chamber wall) in the launch direction to the far end of the
chamber. Positions along it are the distance s from the launcher (m); chamber coordinates are
z = z_launch + direction · s.

Along the path:

* |B|(s) on the axis for every current scale of the envelope, interpolated from the
  run's cached on-axis field (:func:`rfcheck.analysis.magnet_field.axis_field`);
* n_e(s) = n_peak · shape(z), the density profile of the spec normalised to a peak of 1
  (flat; parabolic (1 − (2u − 1)²)^exponent, u = (z − z_start)/L; a linear ramp from 0 at
  each end wall to 1 over ``edge_length``; a table normalised to its maximum);
* the electron collision frequency ν = ν_en + ν_ei: electron–neutral from the neutral gas
  (:func:`rfcheck.physics.collisions.electron_neutral_collision_frequency`, n_g ⟨σ_m v⟩
  over a Maxwellian) and electron–ion (Braginskii, Z_eff = Σ fraction · Z).

Each path carries one wave at the launch angle: the R and L waves along B at 0°, the O and
X modes across B at 90° (the closed forms n² = R, L, P, RL/S), any other angle the named
branch of the cold dispersion relation at that angle, held fixed along the path.

The far end of the path is the chamber end the spec declares (``chamber.end_walls``): a metal
wall, electrode or substrate reflects (not declared: metal, the conservative choice), a dump
or an open end lets the wave go. The single-pass solution leaves into vacuum in front of a
wall or dump (the profile's end value continued at an open end); behind a reflecting wall the
returned power is the worst over the unknown round-trip phase
(:func:`rfcheck.physics.fullwave.mirror_return`).

Envelope: the accessibility and full-wave solutions are one-dimensional problems for one
profile, so they are evaluated at the envelope corners, not over the whole grid: density
min/max × current scale min/max × frequency min/max (8 profiles at most per feed and part).
At each corner the full-wave n² takes the electron temperature (min or max) and the neutral
pressure (min or max) that give the smallest collision frequency at the peak density: the
least collisional damping, which in general reflects the most. Rules that need no profile solution (optical depth, ν/ω) are
vectorised over the whole envelope grid instead.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import NamedTuple

import numpy as np

from rfcheck.findings import Quantity
from rfcheck.model import REFLECTING_WALLS, Chamber, DensityProfile, Feed, Plasma
from rfcheck.physics.access import PathAccess, launch_path_access, mode_n2
from rfcheck.physics.collisions import (electron_ion_collision_frequency,
                                        electron_neutral_collision_frequency, known_gases)
from rfcheck.physics.constants import TWO_PI
from rfcheck.physics.frequencies import critical_density, ecr_field
from rfcheck.physics.fullwave import SlabResponse, mirror_return, slab_reflection
from rfcheck.physics.species import ELECTRON, ion_mixture

from . import magnet_field

__all__ = ["PATH_POINTS", "NU_FLOOR", "NEAR_FIELD", "Corner", "Reach", "PlasmaLoad",
           "LaunchPath", "launch_path", "profile_shape", "collision_frequency", "launched_wave",
           "wave_label", "far_wall"]

#: relative tolerance of the full-wave profile refinement (rfcheck.physics.fullwave)
WAVE_RTOL = 1e-3
#: largest phase (or decay) per full-wave step, rad. The Magnus-4 step is an exact matrix
#: exponential, so a uniform stretch costs one step whatever its length, and the error comes
#: only from the variation of n² within a step, which WAVE_RTOL bounds: at 0.2 rad the
#: Airy ramp, the Budden tunnelling layer and Poynting's balance hold to the tolerances of
#: tests/physics/test_fullwave_path_step.py, and every example's power fractions agree with
#: 0.05 rad (the physics default) to 2e-8 absolute, for a quarter of the steps (the 140 GHz
#: launcher's 1.2 m path: 0.54 million cells -> 0.13 million, 2.9 s -> 0.4 s)
WAVE_PHASE_STEP = 0.2
#: samples along the path (the profile's corners are added to them)
PATH_POINTS = 601
#: floor of ν/ω in the full-wave n²: regularises the cold resonances where the plasma gives
#: no collisions (the result is then the collisionless limit, which does not depend on ν)
NU_FLOOR = 1e-6
#: couplings through the near field of an antenna, not by a launched plane wave
NEAR_FIELD = ("inductive", "helicon")
_ANGLE_TOL = 1e-9
#: name of the second-harmonic target layer
HARMONIC_2 = "2nd-harmonic ECR"


def launched_wave(feed: Feed, mode: str | None = None) -> tuple[str, float | None]:
    """(mode, θ) for :func:`rfcheck.physics.access.mode_n2`: θ None for R, L at 0° and
    O, X at 90° (the exact closed forms), the declared angle to B otherwise. `mode` is one
    part of the launched power (default: the feed's intended mode)."""
    mode = (mode or feed.launch.mode).upper()
    angle = float(feed.launch.angle_to_field)
    pure = 0.0 if mode in ("R", "L") else math.pi / 2
    return mode, (None if abs(angle - pure) < _ANGLE_TOL else angle)


def wave_label(feed: Feed, mode: str | None = None) -> str:
    mode, theta = launched_wave(feed, mode)
    if theta is None:
        return f"{mode} wave along B" if mode in ("R", "L") else f"{mode} mode across B"
    return f"{mode} branch at {math.degrees(theta):.3g}° to B"


def far_wall(chamber: Chamber, direction: int) -> tuple[str, bool]:
    """(the far end's kind, whether the spec declares it) for a path running in `direction`;
    an undeclared end is a reflecting metal wall (the conservative choice)."""
    declared = chamber.end_wall if direction > 0 else chamber.start_wall
    return (declared or "metal"), declared is not None


def profile_shape(profile: DensityProfile, chamber: Chamber, z) -> np.ndarray:
    """The density profile normalised to a peak of 1 at chamber positions z (0 outside)."""
    z = np.asarray(z, dtype=float)
    inside = (z >= chamber.z_start) & (z <= chamber.z_end)
    if profile.kind == "parabolic":
        u = (z - chamber.z_start) / chamber.length
        out = np.clip(1.0 - (2.0 * u - 1.0) ** 2, 0.0, None) ** profile.exponent
    elif profile.kind == "ramp" and profile.edge_length > 0:
        edge = np.minimum(z - chamber.z_start, chamber.z_end - z) / profile.edge_length
        out = np.clip(edge, 0.0, 1.0)
    elif profile.kind == "table" and len(profile.z) > 0:
        shape = np.asarray(profile.shape, dtype=float)
        top = float(shape.max()) if shape.size and shape.max() > 0 else 1.0
        out = np.interp(z, np.asarray(profile.z, dtype=float), shape / top)
    else:  # flat, or a ramp of zero length
        out = np.ones(z.shape)
    return np.where(inside, out, 0.0)


def _profile_knots(profile: DensityProfile, chamber: Chamber) -> list[float]:
    """Chamber positions where the profile has a corner (sampled exactly)."""
    if profile.kind == "ramp" and profile.edge_length > 0:
        return [chamber.z_start + profile.edge_length, chamber.z_end - profile.edge_length]
    if profile.kind == "table":
        return list(profile.z)
    return []


def collision_frequency(plasma: Plasma, n_e, t_e, pressure=None) -> np.ndarray:
    """ν = ν_en + ν_ei (s^-1) at electron densities n_e (m^-3), temperature t_e (eV) and
    neutral pressure (Pa; default the lowest of the envelope).

    ν_en from the neutral gas when the spec gives one and its cross section is tabulated
    (else 0); ν_ei with Z_eff = Σ fraction_s Z_s (zero where n_e = 0).
    """
    return _electron_ion(plasma, n_e, t_e) + _electron_neutral(plasma, t_e, pressure)


def _electron_ion(plasma: Plasma, n_e, t_e) -> np.ndarray:
    n_e = np.asarray(n_e, dtype=float)
    t_e = np.asarray(t_e, dtype=float)
    z_eff = sum(frac * sp.charge_number for sp, frac in ion_mixture(plasma.ions)) or 1.0
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(n_e > 0,
                        electron_ion_collision_frequency(np.maximum(n_e, 1.0), t_e, z_eff), 0.0)


def _electron_neutral(plasma: Plasma, t_e, pressure=None):
    """ν_en (s^-1) of the neutral gas (0 without one or without its cross section)."""
    gas = plasma.neutral
    if gas is None or gas.species not in known_gases():
        return 0.0
    p_gas = gas.pressure.min if pressure is None else np.asarray(pressure, dtype=float)
    return electron_neutral_collision_frequency(gas.species, p_gas, np.asarray(t_e, dtype=float),
                                                gas.temperature)


@dataclass(frozen=True)
class Corner:
    """One envelope corner: peak density (m^-3), current scale, frequency (Hz), the electron
    temperature (eV) and neutral pressure (Pa; NaN without a neutral gas) used for
    collisions, and the indices (density, scale, frequency)."""

    density: float
    scale: float
    frequency: float
    electron_temperature: float
    index: tuple[int, int, int]
    pressure: float = math.nan


class PlasmaLoad(NamedTuple):
    """Where one part's power goes at one corner, seen from the launcher.

    returned: fraction that comes back towards the launcher (the plasma's reflection plus,
    behind a reflecting far end, what the wall sends back through the plasma, at the worst
    round-trip phase); escaped: fraction that leaves through an absorbing or open far end;
    absorbed: the rest (absorbed in the plasma, every pass); first: the single-pass
    solution (reflected, transmitted to the far end, absorbed, residual); wall: the far end's
    kind; declared: whether the spec declares it."""

    returned: float
    escaped: float
    absorbed: float
    first: SlabResponse
    wall: str
    declared: bool


class Reach(NamedTuple):
    """Whether the launched wave reaches its target layer at one corner.

    verdict: "direct", "tunnelling" or "no-resonance"; factor: exp(−2∫κ dz) before the
    target (0 for no-resonance); target_s, cutoff_s, width: distances from the launcher (m;
    nan where none); cutoff: name of the first cutoff met ("" if none)."""

    verdict: str
    target: str
    target_s: float
    factor: float
    cutoff: str
    cutoff_s: float
    width: float


class LaunchPath:
    """The launch path of one part (mode) of a feed's power with its per-corner solutions
    (computed on demand, cached)."""

    def __init__(self, ctx, feed: Feed, mode: str | None = None):
        model, env = ctx.model, ctx.envelope
        chamber, plasma = model.chamber, model.plasma
        self.feed, self.plasma, self.chamber = feed, plasma, chamber
        self.direction = 1 if feed.launch.direction >= 0 else -1
        self.z0 = min(max(feed.launch.z, chamber.z_start), chamber.z_end)
        far = chamber.z_end if self.direction > 0 else chamber.z_start
        self.length = abs(far - self.z0)
        self.mode, self.theta = launched_wave(feed, mode)
        self.label = wave_label(feed, mode)
        self.wall, self.wall_declared = far_wall(chamber, self.direction)
        gas = plasma.neutral
        self.pressures = (np.unique([gas.pressure.min, gas.pressure.max]) if gas is not None
                          else np.array([math.nan]))
        self.densities = np.asarray(env.density, dtype=float)
        self.scales = np.asarray(env.current_scale, dtype=float)
        self.frequencies = np.asarray(env.frequencies(feed), dtype=float)
        self.temperatures = np.asarray(env.electron_temperature, dtype=float)
        self.problem = ""
        if self.length <= 1e-9 * max(chamber.length, 1e-3):
            self.problem = (f"the launcher at z = {feed.launch.z * 1e3:.4g} mm points out of the "
                            f"chamber ({chamber.z_start * 1e3:.4g}–{chamber.z_end * 1e3:.4g} mm)")
            self.s = self.z = self.shape = np.zeros(0)
            self.b = np.zeros((self.scales.size, 0))
        else:
            knots = [abs(k - self.z0) for k in _profile_knots(plasma.profile, chamber)]
            s = np.linspace(0.0, self.length, PATH_POINTS)
            s = np.unique(np.concatenate([s, [k for k in knots if 0 < k < self.length]]))
            self.s = s
            self.z = self.z0 + self.direction * s
            self.shape = profile_shape(plasma.profile, chamber, self.z)
            b_axis = magnet_field.axis_field(ctx)  # (n_scale, n_axis), |B|
            z_axis = magnet_field.axis_z(ctx)
            self.b = np.stack([np.interp(self.z, z_axis, row) for row in b_axis])
            if not np.all(np.isfinite(self.b)):
                raise ValueError("the magnet field is undefined on the launch path")
        self._access: dict = {}
        self._reach: dict = {}
        self._wave: dict = {}
        self._load: dict = {}
        self._nu_en: dict = {}

    # ---- positions

    @property
    def start_text(self) -> str:
        """Where the path starts, in words (the chamber wall when the launcher lies outside)."""
        z_l = self.feed.launch.z
        if abs(z_l - self.z0) > 1e-12:
            return (f"the chamber wall at z = {self.z0 * 1e3:.4g} mm (launcher at "
                    f"z = {z_l * 1e3:.4g} mm)")
        return f"the launcher at z = {self.z0 * 1e3:.4g} mm"

    def z_at(self, s: float) -> float:
        """Chamber position (m) of a distance s from the launcher."""
        return self.z0 + self.direction * s

    # ---- corners

    def corners(self) -> list[Corner]:
        """Density min/max × current scale min/max × frequency min/max (8 corners at most)."""
        di = sorted({0, self.densities.size - 1})
        si = sorted({0, self.scales.size - 1})
        fi = sorted({0, self.frequencies.size - 1})
        out = []
        for i in di:
            n = float(self.densities[i])
            t_grid, p_grid = np.meshgrid(self.temperatures, self.pressures, indexing="ij")
            p_arg = None if self.plasma.neutral is None else p_grid
            nus = collision_frequency(self.plasma, n, t_grid, p_arg)
            a, b = np.unravel_index(int(np.argmin(nus)), t_grid.shape)
            t_e, p_gas = float(t_grid[a, b]), float(p_grid[a, b])
            for j in si:
                for k in fi:
                    out.append(Corner(n, float(self.scales[j]), float(self.frequencies[k]),
                                      t_e, (i, j, k), p_gas))
        return out

    def worst_case(self, corner: Corner, temperature: bool = False) -> dict[str, Quantity]:
        """The corner's envelope point, naming only the axes that vary."""
        out: dict[str, Quantity] = {}
        if self.densities.size > 1:
            out["density"] = Quantity(corner.density, "m^-3")
        if self.scales.size > 1:
            out["current_scale"] = Quantity(corner.scale, "1")
        if self.frequencies.size > 1:
            out["frequency"] = Quantity(corner.frequency, "Hz")
        if temperature and self.temperatures.size > 1:
            out["electron_temperature"] = Quantity(corner.electron_temperature, "eV")
        if temperature and self.pressures.size > 1:
            out["neutral_pressure"] = Quantity(corner.pressure, "Pa")
        return out

    # ---- profiles at a corner

    def n_e(self, corner: Corner) -> np.ndarray:
        return corner.density * self.shape

    def b_of(self, corner: Corner) -> np.ndarray:
        return self.b[corner.index[1]]

    def nu(self, corner: Corner, n_e) -> np.ndarray:
        """Collision frequency with the NU_FLOOR of the full-wave n² (s^-1)."""
        floor = NU_FLOOR * TWO_PI * corner.frequency
        key = (corner.electron_temperature, corner.pressure)
        if key not in self._nu_en:  # a corner's neutral part is one number: computed once
            p_gas = None if math.isnan(corner.pressure) else corner.pressure
            self._nu_en[key] = _electron_neutral(self.plasma, corner.electron_temperature, p_gas)
        nu = _electron_ion(self.plasma, n_e, corner.electron_temperature) + self._nu_en[key]
        return np.maximum(nu, floor)

    def n2(self, corner: Corner, s=None, collisions: bool = True) -> np.ndarray:
        """n² of the launched wave at distances s (default: the path samples)."""
        b, shape = self.b_of(corner), self.shape
        if s is None:
            s, bq, ne = self.s, b, corner.density * shape
        else:
            s = np.asarray(s, dtype=float)
            bq = np.interp(s, self.s, b)
            ne = corner.density * profile_shape(self.plasma.profile, self.chamber, self.z_at(s))
        nu = {ELECTRON.name: self.nu(corner, ne)} if collisions else 0.0
        return mode_n2(corner.frequency, bq, ne, self.mode, self.theta, self.plasma.ions, nu)

    def cutoff_ratio(self, corner: Corner) -> float:
        """Largest n_e / n_cut along the path at a corner: n_cut = n_c (P = 0) for every
        mode but L, n_c (1 + Y) for the L wave (L = 0); electrons, as the landmarks."""
        if self.s.size == 0:
            return math.nan
        x = self.n_e(corner) / float(critical_density(corner.frequency))
        if self.mode == "L":
            x = x / (1.0 + self.b_of(corner) / float(ecr_field(corner.frequency)))
        return float(np.max(x))

    def above_cutoff(self, corner: Corner) -> bool:
        """Whether the density exceeds the mode's cutoff density somewhere on the path (for
        R, O and X: n_c, i.e. the plasma is overdense)."""
        return self.cutoff_ratio(corner) > 1.0

    def first_cutoff_text(self, *_args) -> str:
        """Where the first cutoff meets this part at the corner of highest cutoff ratio, in
        words (" at z = … mm (the L cutoff)"), or "" when the access solution finds none."""
        if self.s.size == 0:
            return ""
        corner = max(self.corners(), key=self.cutoff_ratio)
        acc = self.access(corner)
        if not math.isfinite(acc.first_cutoff_z) or not acc.first_cutoff:
            return ""
        name = acc.first_cutoff
        where = ("from the launcher on" if name == "launcher"
                 else f"at z = {acc.first_cutoff_z * 1e3:.4g} mm (the {name})")
        return f", evanescent {where}"

    # ---- solutions (cached per corner)

    def access(self, corner: Corner) -> PathAccess:
        """Collisionless accessibility of the mode's own target layer (physics.access)."""
        key = corner.index
        if key not in self._access:
            self._access[key] = launch_path_access(
                self.s, self.b_of(corner), self.n_e(corner), corner.frequency, self.mode,
                self.theta, ions=self.plasma.ions, blocked_below=0.0)
        return self._access[key]

    def reach(self, corner: Corner, harmonic: int = 1) -> Reach:
        """Accessibility of the target: the mode's layer (harmonic 1), or the first crossing of
        the second-harmonic field B_ECR/2 when no fundamental layer comes before it."""
        key = (corner.index, harmonic)
        if key in self._reach:
            return self._reach[key]
        acc = self.access(corner)
        out = _reach_of(acc)
        if harmonic == 2:
            b = self.b_of(corner)
            g = b - float(ecr_field(corner.frequency, harmonic=2))
            hits = np.nonzero(np.sign(g[:-1]) * np.sign(g[1:]) <= 0)[0]
            s_h = math.nan
            if hits.size:
                i = int(hits[0])
                g0, g1 = float(g[i]), float(g[i + 1])
                frac = g0 / (g0 - g1) if g0 != g1 else 0.0
                s_h = float(self.s[i] + (self.s[i + 1] - self.s[i]) * frac)
            first = float(acc.resonance_z[0]) if acc.resonance_z.size else math.inf
            if math.isnan(s_h):
                out = Reach("no-resonance", HARMONIC_2, math.nan, 0.0, "", math.nan,
                            math.nan)
            elif s_h < first:
                out = self._reach_truncated(corner, s_h)
        self._reach[key] = out
        return out

    def _reach_truncated(self, corner: Corner, s_end: float) -> Reach:
        keep = self.s < s_end
        s = np.append(self.s[keep], s_end)
        if s.size < 2 or s_end <= 0:
            return Reach("direct", HARMONIC_2, s_end, 1.0, "", math.nan, math.nan)
        b = np.interp(s, self.s, self.b_of(corner))
        n = np.interp(s, self.s, self.n_e(corner))
        acc = launch_path_access(s, b, n, corner.frequency, self.mode, self.theta,
                                 ions=self.plasma.ions, blocked_below=0.0)
        r = _reach_of(acc)
        verdict = "direct" if r.cutoff == "" else "tunnelling"
        return Reach(verdict, HARMONIC_2, s_end, r.factor if r.cutoff else 1.0, r.cutoff,
                     r.cutoff_s, r.width)

    def wave(self, corner: Corner) -> SlabResponse:
        """Single-pass 1-D full-wave reflection, transmission and absorption of the
        collisional n²(s), incident from vacuum at the launcher. The wave leaves into vacuum
        at a reflecting wall or a dump (a sheath or gap in front of it), into the profile's
        far-end value continued at an open end."""
        key = corner.index
        if key not in self._wave:
            right = None if self.wall == "open" else 1.0
            # rtol 1e-3 for the profile refinement: reflected and absorbed fractions agree with
            # rtol 1e-4 to better than 1e-5 on both examples at half the cost
            self._wave[key] = slab_reflection(self.s, lambda sq: self.n2(corner, sq),
                                              corner.frequency, rtol=WAVE_RTOL, n2_right=right,
                                              max_phase_step=WAVE_PHASE_STEP)
        return self._wave[key]

    def load(self, corner: Corner) -> PlasmaLoad:
        """Where this part's power goes at one corner, the far end included: a reflecting
        wall sends what crosses the plasma back through it, and the returned fraction is
        the worst over the unknown round-trip phase to the wall
        (:func:`rfcheck.physics.fullwave.mirror_return`); a dump or an open end lets it go."""
        key = corner.index
        if key not in self._load:
            w = self.wave(corner)
            if self.wall in REFLECTING_WALLS:
                couples = w.transmitted > 0 and np.isfinite(w.r_right)
                returned = mirror_return(w, 1.0).worst if couples else w.reflected
                escaped = 0.0
            else:
                returned, escaped = w.reflected, w.transmitted
            absorbed = max(0.0, 1.0 - returned - escaped)
            self._load[key] = PlasmaLoad(returned, escaped, absorbed, w, self.wall,
                                         self.wall_declared)
        return self._load[key]

    def wall_text(self) -> str:
        """The far end in words, with the assumption when it is not declared."""
        z = self.z_at(self.length) * 1e3
        what = {"metal": "a metal wall", "substrate": "a substrate (reflecting)",
                "dump": "a dump (absorbing)", "open": "open (the plasma continues)"}[self.wall]
        if self.wall_declared:
            return f"the far end at z = {z:.4g} mm is {what}"
        return (f"the far end at z = {z:.4g} mm is not declared: taken as a reflecting metal "
                "wall (conservative)")


def _reach_of(acc: PathAccess) -> Reach:
    layers = acc.layers
    width = float(layers.width.sum()) if layers.width.size else math.nan
    target_s = float(acc.resonance_z[0]) if acc.resonance_z.size else math.nan
    if acc.verdict == "no-resonance":
        return Reach("no-resonance", acc.target, math.nan, 0.0, acc.first_cutoff,
                     acc.first_cutoff_z, width)
    verdict = "direct" if acc.verdict == "direct" else "tunnelling"
    return Reach(verdict, acc.target, target_s, acc.tunnelling_factor, acc.first_cutoff,
                 acc.first_cutoff_z, width)


def launch_path(ctx, feed: Feed, mode: str | None = None) -> LaunchPath:
    """The launch path of one part (mode; default the feed's intended mode) of the feed's
    power (cached for the run)."""
    mode = (mode or feed.launch.mode).upper()
    key = ("launch-path", feed.id, mode)
    if key not in ctx._cache:
        ctx._cache[key] = LaunchPath(ctx, feed, mode)
    return ctx._cache[key]
