"""The frozen source model, in SI.

`rfcheck.spec` turns a TOML specification into these objects; nothing after it sees a
unit string. Lengths in m, fields in T, densities in m^-3, frequencies in Hz (never rad/s),
powers in W, temperatures of electrons in eV, gas temperatures in K, pressures in Pa,
angles in rad, fractions and tolerances as plain ratios (0.02 for 2 %).

Axis convention: the chamber is axisymmetric about z; r is the distance from the axis.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

import numpy as np

# --------------------------------------------------------------------------- plasma


@dataclass(frozen=True)
class Span:
    """A closed interval [min, max] of an envelope quantity."""

    min: float
    max: float

    @property
    def nominal(self) -> float:
        """Geometric mean for positive spans (densities span decades), else the midpoint."""
        if self.min > 0 and self.max > 0:
            return float(np.sqrt(self.min * self.max))
        return 0.5 * (self.min + self.max)


@dataclass(frozen=True)
class IonShare:
    """One ion species and its share of the positive charge density (fractions sum to 1)."""

    species: str  # e.g. "Ar+", "H+", "O3+"
    fraction: float


@dataclass(frozen=True)
class NeutralGas:
    """The neutral gas. `pressure` is the envelope of the operating pressure (Pa): a single
    value in the spec gives min = max; collisions enter every worst case at the end of the
    range that is worse for the quantity judged."""

    species: str  # e.g. "Ar"
    pressure: Span  # Pa
    temperature: float  # K


@dataclass(frozen=True)
class DensityProfile:
    """Shape of n_e along the launch path, scaled so that its peak equals the envelope density.

    kind:
      "flat"      n = n_peak everywhere inside the chamber
      "parabolic" n = n_peak (1 - (2 s / L - 1)^2)^exponent over the chamber length (peak mid-way)
      "ramp"      n rises linearly from 0 at each end wall to n_peak over `edge_length`
      "table"     n = n_peak * shape(z), shape from the table (z in m, shape normalised to max 1)
    """

    kind: Literal["flat", "parabolic", "ramp", "table"] = "flat"
    exponent: float = 1.0
    edge_length: float = 0.0
    z: tuple[float, ...] = ()
    shape: tuple[float, ...] = ()


@dataclass(frozen=True)
class Plasma:
    density: Span  # m^-3, peak electron density over the operating envelope
    electron_temperature: Span  # eV
    ions: tuple[IonShare, ...]
    neutral: NeutralGas | None = None
    profile: DensityProfile = field(default_factory=DensityProfile)


# --------------------------------------------------------------------------- chamber


@dataclass(frozen=True)
class Landmark:
    """A named axial position that a resonance must keep clear of (extraction, bias disc...)."""

    id: str
    z: float


#: what an end of the chamber does to a wave that reaches it: "metal" (a wall or an electrode:
#: reflects), "substrate" (a substrate on its holder: reflects), "dump" (a matched load or beam
#: dump: absorbs), "open" (the plasma continues out of the chamber: the wave leaves)
EndWall = Literal["metal", "substrate", "dump", "open"]
REFLECTING_WALLS = ("metal", "substrate")


@dataclass(frozen=True)
class Chamber:
    """`start_wall` / `end_wall`: the ends at z_start / z_end (None: not declared, which the
    rules take as a reflecting metal wall, the conservative choice, and say so)."""

    radius: float  # m, plasma-chamber inner radius
    z_start: float  # m
    z_end: float  # m
    landmarks: tuple[Landmark, ...] = ()
    start_wall: EndWall | None = None
    end_wall: EndWall | None = None

    @property
    def length(self) -> float:
        return self.z_end - self.z_start


# --------------------------------------------------------------------------- magnet


@dataclass(frozen=True)
class Coil:
    """A thick solenoid of rectangular winding cross-section, coaxial with z.

    `z` is the axial centre of the winding, `length` its axial extent. Current in A per turn;
    positive current gives +z field on axis (right-hand rule about +z).
    """

    id: str
    inner_radius: float
    outer_radius: float
    z: float
    length: float
    turns: int
    current: float


@dataclass(frozen=True)
class RingMagnet:
    """An axially magnetised permanent-magnet ring, coaxial with z.

    `remanence` in T, signed: positive means magnetised towards +z. `inner_radius` may be 0
    for a solid cylinder.
    """

    id: str
    inner_radius: float
    outer_radius: float
    z: float
    length: float
    remanence: float


@dataclass(frozen=True)
class Multipole:
    """A radial multipole (hexapole for poles=6) of permanent-magnet segments around the chamber.

    The array is a ring of `segments` equal angular sectors between `inner_radius` and
    `outer_radius`, centred at axial position `z` with axial `length`. The magnetisation
    direction rotates so that the array forms a `poles`-pole field (a Halbach-type arrangement
    for segments > poles). `orientation` (rad) rotates the whole pattern about z.
    """

    id: str
    inner_radius: float
    outer_radius: float
    z: float
    length: float
    remanence: float
    poles: int = 6
    segments: int = 24
    orientation: float = 0.0


@dataclass(frozen=True)
class UniformField:
    """A uniform axial field (T); models a large solenoid or a bench test."""

    id: str
    b: float


@dataclass(frozen=True)
class AxisTable:
    """A measured on-axis field table: B_z(z) at r = 0, z ascending (m, T)."""

    id: str
    path: str
    z: tuple[float, ...]
    b: tuple[float, ...]
    scales_with_current: bool = True
    sha256: str = ""  # of the bytes parsed (the fingerprint must match them)


@dataclass(frozen=True)
class FieldMap:
    """A measured 2-D axisymmetric map on a regular (r, z) grid, r and z ascending (m, T).

    Arrays are shaped (len(r), len(z)).
    """

    id: str
    path: str
    r: tuple[float, ...]
    z: tuple[float, ...]
    br: tuple[tuple[float, ...], ...]
    bz: tuple[tuple[float, ...], ...]
    scales_with_current: bool = True
    sha256: str = ""  # of the bytes parsed (the fingerprint must match them)


MagnetSource = Coil | RingMagnet | Multipole | UniformField | AxisTable | FieldMap


@dataclass(frozen=True)
class Magnet:
    """All field sources; their fields add.

    `current_tolerance` is the relative tolerance of every coil current (and of measured
    tables/maps flagged `scales_with_current`): the envelope spans scale 1 ± tolerance.
    `trap` declares the confinement type; "minimum-b" switches on the min-B ion-source rules.
    """

    sources: tuple[MagnetSource, ...]
    current_tolerance: float = 0.0
    trap: Literal["none", "mirror", "minimum-b"] = "none"
    nozzle: Nozzle | None = None


@dataclass(frozen=True)
class Nozzle:
    """A magnetic nozzle the design declares: the on-axis |B| must fall from its peak (the
    throat) to the plane `exit_z` (m, on the axis; may lie beyond the chamber) by at least
    `min_ratio` = B_throat / B_exit, without a second rise or a field reversal on the way."""

    exit_z: float
    min_ratio: float


# --------------------------------------------------------------------------- RF feeds


Polarisation = Literal["linear", "circular-right", "circular-left", "as-mode"]


@dataclass(frozen=True)
class LaunchBeam:
    """A Gaussian (TEM00) beam: 1/e² intensity radius `waist` (m) at the waist, which lies
    `waist_distance` (m) ahead of the launcher along the launch direction (negative: behind)."""

    waist: float
    waist_distance: float = 0.0


@dataclass(frozen=True)
class LaunchAperture:
    """The mouth of an open waveguide or horn: "rectangular" (TE10 over `width` × `height`, m;
    E along the height) or "circular" (TE11 over `radius`, m); uniform phase across it."""

    shape: Literal["rectangular", "circular"]
    width: float = 0.0
    height: float = 0.0
    radius: float = 0.0

    def describe(self) -> str:
        if self.shape == "rectangular":
            return f"a TE10 aperture {self.width * 1e3:.3g} × {self.height * 1e3:.3g} mm"
        return f"a TE11 aperture of radius {self.radius * 1e3:.3g} mm"


@dataclass(frozen=True)
class LaunchTarget:
    """The intended deposition region of a launch: z_start..z_end (m) within `radius` of the
    axis (None: the chamber radius); `label` says how the spec gave it."""

    z_start: float
    z_end: float
    radius: float | None = None
    label: str = ""


@dataclass(frozen=True)
class Launch:
    """Where and how a feed launches its wave.

    `mode` is the wave the design intends to heat with; `polarisation` is what the launcher
    actually sends: "linear" (E at `e_angle_to_field` from the projection of B on the
    wavefront; None: not declared), "circular-right" / "circular-left" (named relative to
    the static field: right is the R wave's sense, the electrons' gyration), "as-mode" (all
    power in `mode`: an assumption the report states), or None (not declared: linear, the
    polarisation of every guide's dominant mode and of a horn, with the E direction unknown).
    """

    z: float  # m, launcher position on the axis
    direction: int  # +1 launches towards +z, -1 towards -z
    mode: Literal["R", "L", "O", "X"]
    angle_to_field: float  # rad, angle between k and B at the launcher, 0..π/2
    polarisation: Polarisation | None = None
    e_angle_to_field: float | None = None  # rad, linear polarisation only
    x: float = 0.0  # m, launcher position off the axis
    y: float = 0.0  # m
    tilt: float = 0.0  # rad, angle of k from the launch direction (±z), 0..<π/2
    tilt_azimuth: float = 0.0  # rad, plane of the tilt, from +x towards +y
    beam: LaunchBeam | None = None  # a Gaussian beam; None: a single ray
    target: LaunchTarget | None = None  # the intended deposition region
    aperture: LaunchAperture | None = None  # a waveguide mouth or horn; None: no pattern

    @property
    def off_axis(self) -> float:
        """Distance of the launcher from the axis, m."""
        return float(np.hypot(self.x, self.y))

    @property
    def traced(self) -> bool:
        """Whether the launch is off axis, oblique, a beam or an aperture's pattern: the rays
        judge it (the 1-D axis path covers the others)."""
        return (self.off_axis > 0 or self.tilt > 0 or self.beam is not None
                or self.aperture is not None)

    @property
    def origin(self) -> np.ndarray:
        """Launcher position (x, y, z), m."""
        return np.array([self.x, self.y, self.z], dtype=float)

    @property
    def wave_direction(self) -> np.ndarray:
        """Unit vector of the launched wave vector: the launch direction (±z) tilted by `tilt`
        in the plane at `tilt_azimuth` from +x."""
        st = float(np.sin(self.tilt))
        return np.array([st * np.cos(self.tilt_azimuth), st * np.sin(self.tilt_azimuth),
                         self.direction * float(np.cos(self.tilt))])


Absorption = Literal["ecr", "ecr-harmonic-2", "uhr", "icr", "lh", "helicon", "inductive"]


@dataclass(frozen=True)
class ShortRating:
    """A reflected-power rating for a limited time: `power` (W) for at most `duration` (s)."""

    power: float
    duration: float


@dataclass(frozen=True)
class LineRun:
    """The run of a feed's line: `length` (m), `mitre_bends`, and the declared losses per
    metre and per bend (dB; None: the line type's default, rfcheck.physics.quasioptical)."""

    length: float  # m
    mitre_bends: int = 0
    loss_db_per_m: float | None = None
    bend_loss_db: float | None = None


@dataclass(frozen=True)
class MatchingElement:
    """One element of a matching network: kind "capacitor" or "inductor", connection "series"
    or "shunt", and the range it can be set to, [low, high] in F or H."""

    kind: str
    connection: str
    low: float
    high: float


@dataclass(frozen=True)
class MatchingNetwork:
    """The matching network of an inductive feed: topology "L", "pi" or "T", the generator's
    impedance (ohm) and the elements, generator side first."""

    topology: str
    impedance: float
    elements: tuple[MatchingElement, ...]


@dataclass(frozen=True)
class HeliconAntenna:
    """The antenna of a helicon feed: type ("nagoya-iii", "half-helical", "saddle"), axial
    length and strap radius (m)."""

    type: str
    length: float
    radius: float


@dataclass(frozen=True)
class InductiveCoil:
    """The RF coil of an inductive feed (a cylindrical coil wound round the discharge tube).

    `radius` is the mean radius of the winding, `length` its axial length (m);
    `conductor_diameter` the outer diameter of the wire or tube it is wound from (m);
    `resistance` a measured series resistance at the drive frequency (ohm; None: estimated
    from the conductor, skin effect only)."""

    turns: float
    radius: float  # m
    length: float  # m
    conductor_diameter: float  # m
    resistance: float | None = None  # ohm
    matching: MatchingNetwork | None = None  # the matching network, when declared
    max_voltage: float | None = None  # V peak across the terminals, insulation/clearance rating

    @property
    def conductor_length(self) -> float:
        """Length of conductor in the winding, m: N turns of 2π r (pitch and leads neglected)."""
        return 2.0 * np.pi * self.radius * self.turns


@dataclass(frozen=True)
class Feed:
    """One RF feed. Ignition state: before breakdown (and whenever the plasma goes out) the
    generator looks into the empty cavity, whose reflection `cold_cavity_gamma` (|Γ|; None:
    not declared, taken as 1) it sees for `ignition_time` (s; None: not declared, taken as
    continuous). `short_rating` is an optional time-limited reflected-power rating of the
    generator or circulator load beside the continuous `max_reflected_power`."""

    id: str
    frequency: float  # Hz
    frequency_tolerance: float  # Hz, half-width
    power: float  # W, peak forward power
    duty_cycle: float  # 0..1
    max_reflected_power: float | None  # W, what the generator/circulator tolerates
    line: str  # "WR-340", "circular:50 mm", "coax:...", "free-space"
    launch: Launch
    absorption: Absorption
    cold_cavity_gamma: float | None = None
    ignition_time: float | None = None
    short_rating: ShortRating | None = None
    coil: InductiveCoil | None = None  # inductive feeds: the coil, when declared
    transmission: LineRun | None = None  # the line run (length, bends, losses), when declared
    circulator: str | None = None  # id of the circulator the line passes (shared by id)
    antenna: HeliconAntenna | None = None  # helicon feeds: the antenna, when declared

    @property
    def average_power(self) -> float:
        return self.power * self.duty_cycle


# --------------------------------------------------------------------------- windows


@dataclass(frozen=True)
class Material:
    """A dielectric: relative permittivity and loss tangent at `frequency` (Hz).

    `permittivity_range` and `loss_tangent_range` are the declared spreads (low, high),
    each containing its nominal value; None where the spec declares none.
    """

    id: str
    permittivity: float
    loss_tangent: float
    frequency: float | None = None
    source: str = ""
    confidence: str = ""
    cautions: tuple[str, ...] = ()
    thermal_conductivity: float | None = None  # W/(m K)
    permittivity_range: tuple[float, float] | None = None
    loss_tangent_range: tuple[float, float] | None = None


@dataclass(frozen=True)
class WindowLayer:
    material: str  # material id (library or spec-defined)
    thickness: float  # m
    thickness_tolerance: float = 0.0  # m, half-width


@dataclass(frozen=True)
class Window:
    id: str
    feed: str
    z: float
    layers: tuple[WindowLayer, ...]
    max_absorbed_power: float | None = None  # W (average power)
    diameter: float | None = None  # m, clear aperture of a disc window (for thermal estimate)
    max_temperature_rise: float | None = None  # K, allowed centre-over-rim rise (edge-cooled disc)


# --------------------------------------------------------------------------- exposure, review


@dataclass(frozen=True)
class LevelSegment:
    """One law of a reference-level table: value = coefficient * (f / frequency_unit) **
    exponent on (f_min, f_max] Hz (frequency_unit in Hz: 1e6 for laws in MHz). `quantity` is
    "S" (W/m², plane-wave-equivalent power density), "E" (V/m rms) or "H" (A/m rms)."""

    f_min: float
    f_max: float
    quantity: Literal["S", "E", "H"]
    coefficient: float
    exponent: float
    frequency_unit: float = 1e6


@dataclass(frozen=True)
class ReferenceTable:
    """A table of RF-exposure reference levels (shipped, or a site file next to the spec).

    `scope` is "whole-body" or "local"; `origin` is "shipped" or the site file's name, with
    its SHA-256 in `sha256` (empty for shipped tables)."""

    id: str
    title: str
    standard: str
    edition: str
    population: str
    scope: str
    averaging_time: str
    confidence: str
    segments: tuple[LevelSegment, ...]
    origin: str = "shipped"
    sha256: str = ""


@dataclass(frozen=True)
class SurveyReading:
    """A leak reading: `power_density` (W/m²) at `distance` (m) from the leaking spot.

    `feed`: the feed it was read for (None: a broadband reading of all feeds together);
    `forward_power`: the forward average power (W) during the survey (None: not declared);
    `size`: largest dimension (m) of the leaking spot (None: not declared, taken as small)."""

    power_density: float
    distance: float
    feed: str | None = None
    forward_power: float | None = None
    size: float | None = None


@dataclass(frozen=True)
class LeakPath:
    """A declared way out for RF power.

    kind "seam": a flange, choke, door or lid joint with its leakage `attenuation_db` below
    the forward power (shielding effectiveness). kind "aperture": `count` identical tubes
    below cutoff (vent honeycomb, viewport tube or perforated plate), `shape` circular
    (`diameter`) or rectangular (`width` ≥ `height`), `depth` long. `size` is the largest
    dimension of the leaking area (m). `feeds` empty: every feed's power reaches it."""

    id: str
    kind: Literal["seam", "aperture"]
    size: float
    feeds: tuple[str, ...] = ()
    attenuation_db: float | None = None
    shape: Literal["circular", "rectangular"] | None = None
    diameter: float | None = None
    width: float | None = None
    height: float | None = None
    depth: float | None = None
    count: int = 1


@dataclass(frozen=True)
class Leak:
    """How the leak is known: "survey" (readings) or "derived" (forward power and paths)."""

    model: Literal["survey", "derived"]
    readings: tuple[SurveyReading, ...] = ()
    paths: tuple[LeakPath, ...] = ()


@dataclass(frozen=True)
class ControlledArea:
    """The controlled-area boundary as a cylinder about the source axis, in the spec's
    coordinates: z_start ≤ z ≤ z_end, r ≤ radius (m)."""

    z_start: float
    z_end: float
    radius: float


@dataclass(frozen=True)
class Exposure:
    """People near the source. `cryogenic_magnet`: None when not declared (inferred from
    the coils' winding current density where the cautions need it)."""

    table: ReferenceTable
    leak: Leak | None
    occupied_distance: float  # m from the leaking spot
    controlled_area: ControlledArea | None = None
    cryogenic_magnet: bool | None = None


@dataclass(frozen=True)
class Review:
    prepared_by: str = ""
    checked_by: str = ""
    approved_by: str = ""
    notes: str = ""


@dataclass(frozen=True)
class SourceInfo:
    name: str
    revision: str = ""
    description: str = ""
    lab: str = ""


@dataclass(frozen=True)
class SourceModel:
    """Everything a rule may look at, in SI."""

    source: SourceInfo
    plasma: Plasma
    chamber: Chamber
    magnet: Magnet
    feeds: tuple[Feed, ...]
    windows: tuple[Window, ...] = ()
    materials: tuple[Material, ...] = ()
    exposure: Exposure | None = None
    review: Review = field(default_factory=Review)

    def feed(self, feed_id: str) -> Feed:
        for f in self.feeds:
            if f.id == feed_id:
                return f
        raise KeyError(feed_id)
