"""Source specification (TOML) → validated, frozen SI model.

Every dimensional value is a string with a unit, read by :mod:`rfcheck.units`. Unknown keys
are errors. All problems are collected and reported at once, each with its entity path
(``feed[main].frequency``), its file line, what was found and what was expected.
The validation models here are also the source of ``rfcheck schema``.
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass
from pathlib import Path
from typing import Annotated, Any, Literal

from pydantic import BaseModel, BeforeValidator, ConfigDict, Field, ValidationError, WithJsonSchema

from rfcheck import model as m
from rfcheck.limits import COUNTS, MAX_QUANTITY_TEXT, TEXT, range_for
from rfcheck.text import shorten, text_problem
from rfcheck.tomlines import LineIndex
from rfcheck.units import DIMENSIONS, UnitError, parse_quantity

SCHEMA_VERSION = 1


# --------------------------------------------------------------------------- errors


@dataclass(frozen=True)
class Problem:
    """One thing wrong with an input file."""

    file: str
    path: str
    line: int | None
    message: str

    def __str__(self) -> str:
        where = f"{self.file}:{self.line}" if self.line else self.file
        return f"{where}: {self.path}: {self.message}" if self.path else f"{where}: {self.message}"


class InputError(Exception):
    """Bad input: one or more problems, all reported together (exit code 2)."""

    def __init__(self, problems: list[Problem]):
        self.problems = problems
        super().__init__("\n".join(str(p) for p in problems))


# --------------------------------------------------------------------------- quantity fields


def _quantity(dimension: str, *, positive: bool = False, non_negative: bool = False,
              key: str | None = None):
    dim = DIMENSIONS[dimension]
    rng = range_for(dimension, key)

    def check(value: Any) -> float:
        if isinstance(value, bool) or not isinstance(value, str):
            raise ValueError(
                f"expected a {dim.name} as a string with a unit, e.g. \"{_EXAMPLES[dimension]}\", "
                f"found {shorten(repr(value), 80)}"
            )
        if len(value) > MAX_QUANTITY_TEXT:
            raise ValueError(f"expected a {dim.name} as a number and a unit, e.g. "
                             f"\"{_EXAMPLES[dimension]}\"; found {len(value)} characters")
        try:
            x = parse_quantity(value, dimension)
        except UnitError as exc:
            raise ValueError(str(exc)) from None
        except (ArithmeticError, ValueError):
            x = math.inf
        if not math.isfinite(x):
            raise ValueError(f"'{value}' is not a finite {dim.name} once converted to SI "
                             f"({dim.si}); expected {rng.shown}")
        if positive and not x > 0:
            raise ValueError(f"expected a positive {dim.name}, found '{value}'")
        if non_negative and x < 0:
            raise ValueError(f"expected a {dim.name} ≥ 0, found '{value}'")
        if abs(x) > rng.high or (positive and x < rng.low):
            side = "above" if abs(x) > rng.high else "below"
            raise ValueError(f"'{value}' is {side} the range rfcheck accepts for {'an' if dim.name[:1] in 'aeiou' else 'a'} {dim.name}, "
                             f"{rng.shown} ({rng.reason}); a value outside it is usually a "
                             "unit slip")
        return x

    schema = {
        "type": "string",
        "description": f"{dim.name} with a unit, e.g. \"{_EXAMPLES[dimension]}\" "
        f"(accepted units include {', '.join(dim.examples)})",
        "pattern": r"^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*\S*.*$",
    }
    return Annotated[float, BeforeValidator(check), WithJsonSchema(schema)]


_EXAMPLES = {
    "length": "20 mm", "frequency": "2.45 GHz", "magnetic_field": "875 G",
    "density": "1e11 cm^-3", "energy": "5 eV", "temperature": "300 K", "pressure": "0.2 Pa",
    "power": "1.5 kW", "power_density": "1 mW/cm^2", "current": "120 A", "angle": "10 deg",
    "ratio": "2 %", "electric_field": "3 MV/m", "thermal_conductivity": "30 W/(m*K)",
    "time": "5 s",
}

Length = _quantity("length")
PosLength = _quantity("length", positive=True)
NonNegLength = _quantity("length", non_negative=True)
Frequency = _quantity("frequency", positive=True)
FrequencyTol = _quantity("frequency", non_negative=True)
Field_ = _quantity("magnetic_field")
Remanence = _quantity("magnetic_field", key="remanence")
Density = _quantity("density", positive=True)
Energy = _quantity("energy", positive=True)
Temperature = _quantity("temperature", positive=True)
Pressure = _quantity("pressure", positive=True)
Power = _quantity("power", non_negative=True)
PowerDensity = _quantity("power_density", non_negative=True)
Current = _quantity("current")
Angle = _quantity("angle")
Ratio = _quantity("ratio", non_negative=True)
CurrentTolerance = _quantity("ratio", non_negative=True, key="current_tolerance")
Conductivity = _quantity("thermal_conductivity", positive=True)
Duration = _quantity("time", positive=True)


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True, allow_inf_nan=False)


def _text(key: str):
    """Free text under `key`: its length limit and the characters refused (rfcheck.text)."""
    limit, newlines = TEXT[key]

    def check(value: Any) -> Any:
        if isinstance(value, str):
            why = text_problem(value, limit, allow_newlines=newlines)
            if why:
                raise ValueError(why)
        return value

    return BeforeValidator(check)


def _count(key: str):
    return Field(max_length=COUNTS[key][0])


Id = Annotated[str, _text("id"), Field(min_length=1, pattern=r"^[A-Za-z0-9][A-Za-z0-9_.\-]*$",
                                       description="identifier: letters, digits, '-', '_', '.'")]


def _text_type(key: str):
    return Annotated[str, _text(key)]


NameText = _text_type("name")
RevisionText = _text_type("revision")
DescriptionText = _text_type("description")
LabText = _text_type("lab")
SpeciesText = _text_type("species")
FileText = _text_type("file")
LineText = _text_type("line")
SourceText = _text_type("source")
MaterialRef = _text_type("material")
FeedRef = _text_type("feed")
TableText = _text_type("table")
TableFileText = _text_type("table_file")
PersonText = _text_type("prepared_by")
NotesText = _text_type("notes")


# --------------------------------------------------------------------------- sections


class SourceSpec(_Strict):
    name: NameText = Field(min_length=1, description="name shown on the report cover")
    revision: RevisionText = ""
    description: DescriptionText = ""
    lab: LabText = ""


class DensitySpan(_Strict):
    min: Density
    max: Density


class EnergySpan(_Strict):
    min: Energy
    max: Energy


class IonSpec(_Strict):
    species: SpeciesText = Field(min_length=1, description='ion species, e.g. "Ar+", "H+", "O3+"')
    fraction: float = Field(gt=0, le=1, description="share of the positive charge (sum to 1)")


class PressureSpan(_Strict):
    min: Pressure
    max: Pressure


class NeutralSpec(_Strict):
    species: SpeciesText = Field(min_length=1)
    pressure: Pressure | PressureSpan = Field(
        description='operating pressure, "0.3 Pa", or its range { min = "0.1 Pa", max = "1 Pa" }')
    temperature: Temperature = 300.0


class ProfileSpec(_Strict):
    kind: Literal["flat", "parabolic", "ramp", "table"]
    exponent: float = Field(1.0, gt=0, le=100)
    edge_length: NonNegLength = 0.0
    points: list[tuple[Length, Annotated[float, Field(ge=0, le=1e6)]]] = Field(
        default_factory=list, max_length=COUNTS["points"][0], description='for kind="table": [["0 mm", 0.1], ["50 mm", 1.0], ...]')


class PlasmaSpec(_Strict):
    density: DensitySpan
    electron_temperature: EnergySpan
    ions: list[IonSpec] = Field(min_length=1, max_length=COUNTS["ions"][0])
    neutral: NeutralSpec | None = None
    profile: Literal["flat", "parabolic", "ramp"] | ProfileSpec = "flat"


class ZSpan(_Strict):
    start: Length
    end: Length


class LandmarkSpec(_Strict):
    id: Id
    z: Length


_WALL_DOC = ('what the chamber end does to a wave: "metal" (wall or electrode, reflects), '
             '"substrate" (substrate on its holder, reflects), "dump" (matched load or beam dump, '
             'absorbs), "open" (the plasma continues out); not declared: metal (conservative)')


class EndWallsSpec(_Strict):
    start: Literal["metal", "substrate", "dump", "open"] | None = Field(None, description=_WALL_DOC)
    end: Literal["metal", "substrate", "dump", "open"] | None = Field(None, description=_WALL_DOC)


class ChamberSpec(_Strict):
    radius: PosLength
    z: ZSpan
    landmarks: list[LandmarkSpec] = Field(default_factory=list, max_length=COUNTS["landmarks"][0])
    end_walls: EndWallsSpec = Field(default_factory=EndWallsSpec)


class CoilSpec(_Strict):
    id: Id
    inner_radius: PosLength
    outer_radius: PosLength
    z: Length
    length: PosLength
    turns: int = Field(gt=0, le=1_000_000)
    current: Current


class RingSpec(_Strict):
    id: Id
    inner_radius: NonNegLength
    outer_radius: PosLength
    z: Length
    length: PosLength
    remanence: Remanence


class MultipoleSpec(_Strict):
    id: Id
    inner_radius: PosLength
    outer_radius: PosLength
    z: Length
    length: PosLength
    remanence: Remanence
    poles: int = Field(6, ge=2, le=64, multiple_of=2)
    segments: int = Field(24, ge=2, le=1440)
    orientation: Angle = 0.0


class UniformSpec(_Strict):
    id: Id = "uniform"
    b: Field_


class MeasuredSpec(_Strict):
    id: Id = "measured"
    file: FileText = Field(min_length=1, description="CSV file, relative to the spec file")
    scales_with_current: bool = True


class NozzleSpec(_Strict):
    exit: Length = Field(description="z of the plane on the axis where the expansion is judged "
                                     "(the thruster's exit plane or further downstream)")
    min_ratio: float = Field(gt=1.0, le=1e4, description="the declared lowest B_throat / B_exit "
                                                         "(the nozzle's expansion ratio)")


class MagnetSpec(_Strict):
    current_tolerance: CurrentTolerance = 0.0
    trap: Literal["none", "mirror", "minimum-b"] = "none"
    coils: list[CoilSpec] = Field(default_factory=list, max_length=COUNTS["coils"][0])
    rings: list[RingSpec] = Field(default_factory=list, max_length=COUNTS["rings"][0])
    multipoles: list[MultipoleSpec] = Field(default_factory=list, max_length=COUNTS["multipoles"][0])
    uniform: UniformSpec | None = None
    axis_table: MeasuredSpec | None = None
    field_map: MeasuredSpec | None = None
    nozzle: NozzleSpec | None = Field(
        None, description='a magnetic nozzle: { exit = "24 mm", min_ratio = 5 }')


class LaunchBeamSpec(_Strict):
    """A Gaussian (TEM00) beam sent by the launcher: its 1/e² intensity radius at the waist and
    where the waist lies along the launch direction from the launcher (negative: behind it)."""

    waist: PosLength = Field(description="1/e² intensity radius at the waist, e.g. \"8 mm\"")
    waist_distance: Length = Field(0.0, description="distance of the waist ahead of the "
                                                    "launcher along the launch direction")


LaunchTilt = _quantity("angle", non_negative=True, key="launch_tilt")


_APERTURE_EXAMPLES = {"width": "86.36 mm", "height": "43.18 mm", "radius": "45 mm"}


class LaunchApertureSpec(_Strict):
    """The mouth of an open waveguide or a horn the launcher radiates from: rectangular
    (TE10 over width × height, E along the height) or circular (TE11 over the radius), with a
    uniform phase across it (a horn's flare phase error is not modelled)."""

    shape: Literal["rectangular", "circular"] = Field(
        description='"rectangular" (TE10: width and height) or "circular" (TE11: radius)')
    width: PosLength | None = Field(None, description="rectangular: the side across which the "
                                                      "TE10 field varies (the H side), e.g. "
                                                      "\"86.36 mm\"")
    height: PosLength | None = Field(None, description="rectangular: the side along E")
    radius: PosLength | None = Field(None, description="circular: the radius of the mouth")


class LaunchTargetSpec(_Strict):
    """Where the launch is meant to deposit its power: a slice of the chamber (start, end)
    or a landmark with a half width, optionally within a radius of the axis."""

    landmark: Id | None = Field(None, description="a chamber landmark id (with half_width)")
    half_width: PosLength | None = Field(None, description="half the axial width of the "
                                                           "region round the landmark")
    start: Length | None = Field(None, description="axial start of the region (with end)")
    end: Length | None = Field(None, description="axial end of the region (with start)")
    radius: PosLength | None = Field(None, description="largest distance from the axis "
                                                       "(not declared: the chamber radius)")


class LaunchSpec(_Strict):
    z: Length
    direction: Literal["+z", "-z"] = "+z"
    mode: Literal["R", "L", "O", "X"] = Field(description="the wave the design heats with")
    angle_to_field: Angle = Field(0.0, description="angle between k and B at the launcher, 0-90 deg")
    polarisation: Literal["linear", "circular-right", "circular-left", "as-mode"] | None = Field(
        None, description='what the launcher sends: "linear" (every guide\'s dominant mode, a '
                          'horn), "circular-right"/"circular-left" (after a polariser; named '
                          'relative to B: right = the R wave), "as-mode" (all power in `mode`, '
                          'an assumption); not declared: linear with the E direction unknown')
    e_angle_to_field: Angle | None = Field(
        None, description="linear polarisation: angle of E from the projection of B on the "
                          "wavefront (0 deg across B: the O mode); not declared: the worst case")
    x: Length | None = Field(None, description="launcher position off the axis, x (not "
                                               "declared: on the axis)")
    y: Length | None = Field(None, description="launcher position off the axis, y (not "
                                               "declared: on the axis)")
    tilt: LaunchTilt | None = Field(
        None, description="angle of the launched wave vector from the launch direction (±z), "
                          "0 to below 90 deg (not declared: along the axis)")
    tilt_azimuth: Angle | None = Field(
        None, description="plane of the tilt: angle from +x towards +y, 0–360 deg (not "
                          "declared: 0, the tilt towards +x)")
    beam: LaunchBeamSpec | None = Field(
        None, description='a Gaussian beam: { waist = "8 mm", waist_distance = "40 mm" } '
                          '(not declared: a single ray along the launch direction)')
    aperture: LaunchApertureSpec | None = Field(
        None, description='a waveguide mouth or horn with its radiation pattern: { shape = '
                          '"rectangular", width = "86.36 mm", height = "43.18 mm" } or { shape '
                          '= "circular", radius = "45 mm" } (not with beam)')
    target: LaunchTargetSpec | None = Field(
        None, description='the intended deposition region: { start = "120 mm", end = '
                          '"180 mm" } or { landmark = "resonance-zone", half_width = "10 mm" }')


class ColdCavitySpec(_Strict):
    """Reflection of the empty (unlit) cavity seen by the generator: |Γ| or VSWR, not both."""

    gamma: Ratio | None = Field(None, description='|Γ| of the cold cavity, e.g. "0.9"')
    vswr: float | None = Field(None, ge=1, le=1e6, description="VSWR of the cold cavity, e.g. 19")


class ShortRatingSpec(_Strict):
    power: Power
    duration: Duration


class InductiveCoilSpec(_Strict):
    """The RF coil of an inductive feed: a cylindrical coil round the discharge tube."""

    turns: float = Field(gt=0, le=1_000_000, description="number of turns")
    radius: PosLength = Field(description="mean radius of the winding")
    length: PosLength = Field(description="axial length of the winding")
    conductor_diameter: PosLength = Field(description="outer diameter of the wire or tube")
    resistance: float | None = Field(
        None, gt=0, le=1e6, description="measured series resistance of the coil at the drive "
                                        "frequency, ohm; not declared: estimated from the "
                                        "conductor (skin effect only, a lower estimate)")
    matching: MatchingNetworkSpec | None = Field(
        None, description="the matching network between the line and the coil, with the "
                          "ranges its elements can be set to")
    max_voltage_kv: float | None = Field(
        None, gt=0, le=1000, description="peak RF voltage across the coil terminals that its "
                                         "insulation and clearances are rated for, kV peak")


class MatchingElementSpec(_Strict):
    """One element of a matching network, listed from the generator towards the coil."""

    kind: Literal["capacitor", "inductor"]
    connection: Literal["series", "shunt"] = Field(
        description="in series with the line, or in shunt across it")
    capacitance_pf: tuple[float, float] | None = Field(
        None, description="[low, high] range a capacitor can be set to, pF (a fixed capacitor: "
                          "its tolerance band)")
    inductance_uh: tuple[float, float] | None = Field(
        None, description="[low, high] range an inductor can be set to, µH (a fixed inductor: "
                          "its tolerance band)")


class MatchingNetworkSpec(_Strict):
    """The matching network between the generator's line and the coil."""

    topology: Literal["L", "pi", "T"]
    impedance: float = Field(50.0, gt=0, le=1e4, description="the generator's and line's "
                                                             "impedance, ohm (50 by default)")
    elements: list[MatchingElementSpec] = Field(
        min_length=2, max_length=COUNTS["elements"][0],
        description='generator side first: L { kind = "capacitor", connection = "shunt", '
                    'capacitance_pf = [50, 1000] } then the series element; pi: shunt, series, '
                    'shunt; T: series, shunt, series')


class HeliconAntennaSpec(_Strict):
    """The antenna of a helicon feed, round the discharge tube."""

    type: Literal["nagoya-iii", "half-helical", "saddle"] = Field(
        description="a half-wavelength m = 1 antenna: Nagoya type III, half-turn helical or "
                    "double saddle")
    length: PosLength = Field(description="axial length of the antenna (between its end rings)")
    radius: PosLength = Field(description="radius of the antenna's straps (above the tube)")


class TransmissionSpec(_Strict):
    length: PosLength = Field(description="length of the line run from the generator (or its "
                                          "matching optics unit) to the launcher")
    mitre_bends: int = Field(0, ge=0, le=1000, description="number of 90° mitre bends")
    loss_db_per_m: float | None = Field(
        None, ge=0, le=10, description="loss of the straight line, dB per metre; not declared: "
                                       "the he11 default of rfcheck/data/lines.toml")
    bend_loss_db: float | None = Field(
        None, ge=0, le=3, description="loss of one mitre bend, dB; not declared: the he11 default")


def _temperature_difference(value: Any) -> Any:
    """A temperature *difference* must be in K (or mK): an offset scale would add 273.15."""
    if isinstance(value, str) and any(u in value.lower() for u in ("degc", "°c", "celsius",
                                                                   "degf", "°f", "fahrenheit")):
        raise ValueError(f"expected a temperature difference in K, e.g. \"50 K\"; found "
                         f"{shorten(repr(value), 80)} (an offset scale such as °C adds 273.15)")
    return value


TemperatureRise = Annotated[_quantity("temperature", positive=True, key="max_temperature_rise"),
                            BeforeValidator(_temperature_difference)]


class FeedSpec(_Strict):
    id: Id
    frequency: Frequency
    frequency_tolerance: FrequencyTol = 0.0
    power: Power
    duty_cycle: Ratio = 1.0
    max_reflected_power: Power | None = None
    max_reflected_power_short: ShortRatingSpec | None = Field(
        None, description='a time-limited rating: { power = "1.5 kW", duration = "10 s" }')
    line: LineText = Field(min_length=1, description='"WR-340", another EIA size, or "free-space"')
    launch: LaunchSpec
    absorption: Literal["ecr", "ecr-harmonic-2", "uhr", "icr", "lh", "helicon", "inductive"]
    cold_cavity: ColdCavitySpec | None = Field(
        None, description="reflection of the unlit cavity; not declared: |Γ| = 1 (the worst case)")
    ignition_time: Duration | None = Field(
        None, description="how long the generator may run into the unlit cavity before an "
                          "interlock stops it; not declared: continuously")
    coil: InductiveCoilSpec | None = Field(
        None, description='the coil of an inductive feed: { turns = 3, radius = "110 mm", '
                          'length = "80 mm", conductor_diameter = "6.35 mm" }')
    transmission: TransmissionSpec | None = Field(
        None, description='the line run: { length = "30 m", mitre_bends = 6 } with optional '
                          'loss_db_per_m and bend_loss_db (defaults for he11 lines)')
    circulator: Id | None = Field(
        None, description="id of the circulator (and its load) this feed's line passes; feeds "
                          "giving the same id share it")
    antenna: HeliconAntennaSpec | None = Field(
        None, description='the antenna of a helicon feed: { type = "nagoya-iii", '
                          'length = "150 mm", radius = "60 mm" }')


class MaterialSpec(_Strict):
    id: Id
    permittivity: float = Field(ge=1, le=1e4)
    loss_tangent: float = Field(ge=0, le=10)
    frequency: Frequency | None = Field(
        None, description="frequency at which the permittivity and loss tangent are quoted")
    permittivity_range: tuple[float, float] | None = Field(
        None, description="[low, high] spread of the permittivity between lots, grades or "
                          "suppliers; low ≤ permittivity ≤ high, low ≥ 1")
    loss_tangent_range: tuple[float, float] | None = Field(
        None, description="[low, high] spread of the loss tangent at `frequency`; "
                          "low ≤ loss_tangent ≤ high, low ≥ 0")
    source: SourceText = Field(min_length=1, description="where the values come from")
    thermal_conductivity: Conductivity | None = None


class LayerSpec(_Strict):
    material: MaterialRef = Field(min_length=1)
    thickness: PosLength
    thickness_tolerance: NonNegLength = 0.0


class WindowSpec(_Strict):
    id: Id
    feed: FeedRef
    z: Length
    layers: list[LayerSpec] = Field(min_length=1, max_length=COUNTS["layers"][0])
    max_absorbed_power: Power | None = None
    diameter: PosLength | None = None
    max_temperature_rise: TemperatureRise | None = Field(
        None, description="edge-cooled disc: largest allowed rise of its centre over its cooled "
                          'rim, e.g. "50 K"')


class SurveyReadingSpec(_Strict):
    feed: FeedRef | None = Field(None, description="the feed read; not declared: a broadband "
                                               "reading of all feeds together")
    power_density: PowerDensity = Field(description='reading, e.g. "1 mW/cm^2"')
    at: PosLength = Field(description="distance of the probe from the leaking spot")
    forward_power: Power | None = Field(
        None, description="forward average power during the survey (scales the reading with "
                          "the operating power); not declared: taken as the operating power")
    size: PosLength | None = Field(
        None, description="largest dimension of the leaking spot (sets its far-field "
                          "distance); not declared: a small leak")


class LeakPathSpec(_Strict):
    id: Id
    kind: Literal["seam", "aperture"] = Field(
        description='"seam" (flange, choke, door or lid joint with a declared attenuation) or '
                    '"aperture" (tubes below cutoff: vent honeycomb, viewport tube, perforated '
                    'plate)')
    feeds: list[FeedRef] = Field(default_factory=list, max_length=COUNTS["feeds"][0],
                             description="feeds whose power reaches it; empty: all feeds")
    attenuation: Ratio | None = Field(
        None, description='seam: leakage below the forward power, e.g. "60 dB"')
    shape: Literal["circular", "rectangular"] | None = Field(None, description="aperture cells")
    diameter: PosLength | None = None
    width: PosLength | None = None
    height: PosLength | None = None
    depth: PosLength | None = Field(None, description="aperture: length of each tube (plate "
                                                      "thickness)")
    count: int = Field(1, ge=1, le=100_000_000, description="aperture: number of identical cells")
    size: PosLength | None = Field(
        None, description="largest dimension of the leaking area (seam length, panel "
                          "diagonal); sets the far-field distance")


class LeakSpec(_Strict):
    model: Literal["survey", "derived"] | None = Field(
        None, description='"survey" (readings) or "derived" (forward power and leak paths); '
                          "not declared: from the keys given")
    power_density: PowerDensity | None = Field(None, description="one survey reading")
    at: PosLength | None = None
    feed: FeedRef | None = None
    forward_power: Power | None = None
    size: PosLength | None = None
    readings: list[SurveyReadingSpec] = Field(default_factory=list, max_length=COUNTS["readings"][0])
    paths: list[LeakPathSpec] = Field(default_factory=list, max_length=COUNTS["paths"][0])


class ControlledAreaSpec(_Strict):
    z: ZSpan = Field(description="axial extent of the controlled area, in the spec's z")
    radius: PosLength = Field(description="radius of the controlled area about the source axis")


class ExposureSpec(_Strict):
    table: TableText | None = Field(None, description="reference-level table id (shipped, or in "
                                                "table_file)")
    table_file: TableFileText | None = Field(
        None, description="site table file next to the spec, in the form of the shipped "
                          "tables; replaces them")
    leak: LeakSpec | None = None
    occupied_distance: PosLength
    controlled_area: ControlledAreaSpec | None = Field(
        None, description="boundary the static-field lines must stay inside; not declared: "
                          "the outer surface of the magnet (the worst case)")
    cryogenic_magnet: bool | None = Field(
        None, description="superconducting coils with cryogens; not declared: inferred from "
                          "the winding current density")


class ReviewSpec(_Strict):
    prepared_by: PersonText = ""
    checked_by: PersonText = ""
    approved_by: PersonText = ""
    notes: NotesText = ""


class SpecFile(_Strict):
    """An rfcheck source specification."""

    schema_: Literal[1] = Field(alias="schema", description="specification format version")
    source: SourceSpec
    plasma: PlasmaSpec
    chamber: ChamberSpec
    magnet: MagnetSpec
    feed: list[FeedSpec] = Field(min_length=1, max_length=COUNTS["feed"][0])
    window: list[WindowSpec] = Field(default_factory=list, max_length=COUNTS["window"][0])
    material: list[MaterialSpec] = Field(default_factory=list, max_length=COUNTS["material"][0])
    exposure: ExposureSpec | None = None
    review: ReviewSpec = Field(default_factory=ReviewSpec)


def json_schema() -> dict:
    """The JSON Schema of a spec file (for editors), generated from the validation models."""
    schema = SpecFile.model_json_schema(by_alias=True)
    schema["$schema"] = "https://json-schema.org/draft/2020-12/schema"
    schema["title"] = "rfcheck source specification"
    return schema


# --------------------------------------------------------------------------- loading


def _entity_path(loc: tuple, raw: dict) -> str:
    """('feed', 0, 'frequency') → 'feed[main].frequency' using ids where the element has one."""
    out = ""
    node: Any = raw
    for part in loc:
        if isinstance(part, int):
            ident = None
            if isinstance(node, list) and 0 <= part < len(node) and isinstance(node[part], dict):
                ident = node[part].get("id")
            out += f"[{ident}]" if isinstance(ident, str) and ident else f"[{part}]"
            node = node[part] if isinstance(node, list) and 0 <= part < len(node) else None
        else:
            out += ("." if out else "") + str(part)
            node = node.get(part) if isinstance(node, dict) else None
    return out


def _message(err: dict) -> str:
    kind = err.get("type", "")
    found = err.get("input")
    shown = shorten(repr(found), 80)
    if kind == "extra_forbidden":
        return "unknown key (not part of the specification format; check the spelling)"
    if kind == "missing":
        return "required key is missing"
    if kind == "too_long" and isinstance(found, list):
        key = next((p for p in reversed(err.get("loc", ())) if isinstance(p, str)), "")
        limit = (err.get("ctx") or {}).get("max_length")
        why = COUNTS.get(key, (None, ""))[1]
        return (f"{len(found)} entries; at most {limit} are accepted"
                + (f" ({why}; the bound keeps the work of a check finite)" if why else ""))
    if kind == "finite_number":
        return f"found {shown}; expected a finite number"
    msg = err.get("msg", "invalid value")
    if msg.startswith("Value error, "):
        return msg[len("Value error, "):]
    if kind in ("literal_error", "enum"):
        return f"found {shown}; {msg[0].lower() + msg[1:]}"
    return f"found {shown}: {msg[0].lower() + msg[1:]}" if found is not None else msg


def _model_names() -> set[str]:
    """Names of the validation models (pydantic puts them in error paths as union tags)."""
    out, todo = set(), [_Strict]
    while todo:
        cls = todo.pop()
        for sub in cls.__subclasses__():
            out.add(sub.__name__)
            todo.append(sub)
    return out


def _is_union_tag(part: Any, models: set[str]) -> bool:
    return isinstance(part, str) and (part in models or "[" in part
                                      or part in ("float", "int", "str", "bool"))


def _read_toml(path: Path, what: str) -> tuple[dict, str]:
    """Parse the TOML input file `path` (a spec, a policy, a site table) with the guards of
    :mod:`rfcheck.inputfiles`: regular file, size limit, UTF-8, bounded nesting."""
    from rfcheck.inputfiles import MAX_NESTING, InputFileError, max_nesting, read_input

    try:
        text = read_input(path, what).text
    except FileNotFoundError:
        raise InputError([Problem(str(path), "", None, f"{what} file not found")]) from None
    except InputFileError as exc:
        raise InputError([Problem(str(path), "", None, exc.message)]) from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        line = getattr(exc, "lineno", None)
        msg = str(exc)
        if line is None:
            import re

            found = re.search(r"line (\d+)", msg)
            line = int(found.group(1)) if found else None
        raise InputError([Problem(str(path), "", line, f"not valid TOML: {msg}")]) from None
    except RecursionError:
        raise InputError([Problem(str(path), "", None,
                                  f"arrays or tables nested too deeply to read; a {what} needs "
                                  f"at most {MAX_NESTING} levels")]) from None
    depth, where = max_nesting(data)
    if depth > MAX_NESTING:
        line = LineIndex(text).line_of(where)
        raise InputError([Problem(str(path), _entity_path(where[:MAX_NESTING], data), line,
                                  f"arrays or tables nested more than {MAX_NESTING} levels deep; "
                                  f"a {what} needs at most {MAX_NESTING}")])
    return data, text


@dataclass(frozen=True)
class LoadedSpec:
    """The model plus what provenance needs: the file's bytes and its normalised form."""

    model: m.SourceModel
    path: Path
    text: str
    normalised: dict


def load_spec(path: str | Path) -> LoadedSpec:
    """Read, validate and convert a spec file. Raises :class:`InputError` listing every problem."""
    path = Path(path)
    raw, text = _read_toml(path, "specification")
    return spec_from_data(raw, text, path)


def spec_from_data(raw: dict, text: str, path: Path) -> LoadedSpec:
    """Validate and convert the parsed TOML `raw` of the spec file `path` whose text is `text`
    (line numbers of problems come from `text`). `rfcheck sweep` calls it with a copy of the
    file's data in which the swept values were replaced; a check of a file holding the same
    values gives the same model. Raises :class:`InputError` listing every problem."""
    path = Path(path)
    lines = LineIndex(text)
    problems: list[Problem] = []
    models = _model_names()
    try:
        spec = SpecFile.model_validate(raw)
    except ValidationError as exc:
        for err in exc.errors():
            # drop pydantic's union-branch tags from the path (e.g. 'ProfileSpec', 'literal[...]');
            # a key the user wrote is never one of them (unknown keys are reported as written)
            loc = tuple(err["loc"])
            keep_last = err.get("type") == "extra_forbidden"
            loc = tuple(p for p in (loc[:-1] if keep_last else loc)
                        if not _is_union_tag(p, models)) + (loc[-1:] if keep_last else ())
            line = lines.line_of(loc)
            message = _message(err)
            if line is None and err.get("type") == "missing" and len(loc) == 1:
                line = 1
                message = (f"required table [{loc[0]}] is missing from the file"
                           if loc[0] not in ("schema", "feed") else
                           "required key 'schema' is missing (add schema = 1 at the top)"
                           if loc[0] == "schema" else
                           "required [[feed]] table is missing from the file")
            problems.append(Problem(str(path), _entity_path(loc, raw), line, message))
        raise InputError(_dedupe(problems)) from None
    checker = _CrossCheck(spec, raw, lines, path)
    model = checker.build()
    if checker.problems:
        raise InputError(checker.problems)
    return LoadedSpec(model=model, path=path, text=text,
                      normalised=spec.model_dump(mode="json", by_alias=True))


def _dedupe(problems: list[Problem]) -> list[Problem]:
    seen, out = set(), []
    for p in problems:
        key = (p.path, p.message)
        if key not in seen:
            seen.add(key)
            out.append(p)
    return out


class _CrossCheck:
    """Checks that span several keys, then the conversion to the frozen model."""

    def __init__(self, spec: SpecFile, raw: dict, lines: LineIndex, path: Path):
        self.spec, self.raw, self.lines, self.path = spec, raw, lines, path
        self.problems: list[Problem] = []

    def fail(self, loc: tuple, message: str) -> None:
        self.problems.append(Problem(str(self.path), _entity_path(loc, self.raw),
                                     self.lines.line_of(loc), message))

    def unique(self, items, loc: tuple, what: str) -> None:
        seen: set[str] = set()
        for i, item in enumerate(items):
            if item.id in seen:
                self.fail(loc + (i, "id"), f"duplicate {what} id '{item.id}'")
            seen.add(item.id)

    def build(self) -> m.SourceModel:
        s = self.spec
        p = s.plasma
        if p.density.min > p.density.max:
            self.fail(("plasma", "density"), "min is greater than max")
        if p.electron_temperature.min > p.electron_temperature.max:
            self.fail(("plasma", "electron_temperature"), "min is greater than max")
        total = sum(ion.fraction for ion in p.ions)
        if not math.isclose(total, 1.0, abs_tol=1e-6):
            self.fail(("plasma", "ions"), f"ion fractions sum to {total:g}; expected 1")
        for i, ion in enumerate(p.ions):
            self._species(ion.species, ("plasma", "ions", i, "species"))
        if p.neutral is not None and isinstance(p.neutral.pressure, PressureSpan):
            if p.neutral.pressure.min > p.neutral.pressure.max:
                self.fail(("plasma", "neutral", "pressure"), "min is greater than max")
        c = s.chamber
        if c.z.start >= c.z.end:
            self.fail(("chamber", "z"), "start must be below end")
        for i, lm in enumerate(c.landmarks):
            if not c.z.start <= lm.z <= c.z.end:
                self.fail(("chamber", "landmarks", i, "z"),
                          f"landmark at {lm.z * 1e3:g} mm lies outside the chamber "
                          f"({c.z.start * 1e3:g}..{c.z.end * 1e3:g} mm)")
        self.unique(c.landmarks, ("chamber", "landmarks"), "landmark")
        mg = s.magnet
        for kind in ("coils", "rings", "multipoles"):
            items = getattr(mg, kind)
            self.unique(items, ("magnet", kind), kind[:-1])
            for i, item in enumerate(items):
                if item.outer_radius <= item.inner_radius:
                    self.fail(("magnet", kind, i, "outer_radius"),
                              "outer_radius must exceed inner_radius")
        if mg.multipoles:
            for i, mp in enumerate(mg.multipoles):
                if mp.segments % mp.poles:
                    self.fail(("magnet", "multipoles", i, "segments"),
                              f"segments ({mp.segments}) must be a multiple of poles ({mp.poles})")
        sources = self._magnet_sources()
        if not sources and not self.problems:
            self.fail(("magnet",), "no field source: give coils, rings, multipoles, uniform, "
                                   "axis_table or field_map")
        self.unique(s.feed, ("feed",), "feed")
        feed_ids = {f.id for f in s.feed}
        for i, f in enumerate(s.feed):
            if f.frequency_tolerance >= f.frequency:
                self.fail(("feed", i, "frequency_tolerance"), "tolerance must be below the frequency")
            if f.duty_cycle > 1:
                self.fail(("feed", i, "duty_cycle"), "duty cycle above 100 %")
            self._line(f.line, ("feed", i, "line"))
            if f.coil is not None:
                if f.absorption != "inductive":
                    self.fail(("feed", i, "coil"), "a coil is declared only for an inductive feed "
                                                   "(absorption = \"inductive\")")
                elif not f.coil.radius > s.chamber.radius:
                    self.fail(("feed", i, "coil", "radius"),
                              "the coil's radius must exceed the chamber radius (the coil is "
                              "wound round the discharge tube)")
                elif f.coil.matching is not None:
                    self._matching(f.coil.matching, ("feed", i, "coil", "matching"))
            if f.antenna is not None:
                if f.absorption != "helicon":
                    self.fail(("feed", i, "antenna"), "an antenna is declared only for a helicon "
                                                      "feed (absorption = \"helicon\")")
                elif not f.antenna.radius > s.chamber.radius:
                    self.fail(("feed", i, "antenna", "radius"),
                              "the antenna's radius must exceed the chamber radius (the antenna "
                              "sits round the discharge tube)")
            self._launch(f, i)
            cc = f.cold_cavity
            if cc is not None:
                if (cc.gamma is None) == (cc.vswr is None):
                    self.fail(("feed", i, "cold_cavity"),
                              "give either gamma (|Γ|, e.g. \"0.9\") or vswr (e.g. 19), not both "
                              "and not neither")
                elif cc.gamma is not None and cc.gamma > 1:
                    self.fail(("feed", i, "cold_cavity", "gamma"),
                              f"|Γ| = {cc.gamma:g} above 1: a passive cavity reflects at most "
                              "all the power")
        self.unique(s.material, ("material",), "material")
        for i, mt in enumerate(s.material):
            self._material_ranges(mt, ("material", i))
        known = self._material_ids() | {mt.id for mt in s.material}
        self.unique(s.window, ("window",), "window")
        for i, w in enumerate(s.window):
            if w.feed not in feed_ids:
                self.fail(("window", i, "feed"),
                          f"no feed '{w.feed}'; feeds are: {', '.join(sorted(feed_ids))}")
            else:
                self._window_place(w, next(f for f in s.feed if f.id == w.feed), i)
            for j, layer in enumerate(w.layers):
                if layer.material not in known:
                    self.fail(("window", i, "layers", j, "material"),
                              f"unknown material '{layer.material}'; define it in a [[material]] "
                              f"table or use one of: {', '.join(sorted(self._material_ids()))}")
                if layer.thickness_tolerance >= layer.thickness:
                    self.fail(("window", i, "layers", j, "thickness_tolerance"),
                              "tolerance must be below the thickness")
        exposure = self._exposure(feed_ids) if s.exposure is not None else None
        if self.problems:
            return None  # type: ignore[return-value]
        return self._model(sources, exposure)

    def _matching(self, mn: MatchingNetworkSpec, loc: tuple) -> None:
        """Element ranges present, positive and ordered; connections those of the topology."""
        from rfcheck.physics.matching import TOPOLOGIES

        conns = tuple(e.connection for e in mn.elements)
        if conns not in TOPOLOGIES[mn.topology]:
            shown = " or ".join(", ".join(t) for t in TOPOLOGIES[mn.topology])
            self.fail(loc + ("elements",), f"a {mn.topology} network has elements connected "
                                           f"{shown} (generator side first); found "
                                           f"{', '.join(conns)}")
        for j, e in enumerate(mn.elements):
            key, other = (("capacitance_pf", "inductance_uh") if e.kind == "capacitor"
                          else ("inductance_uh", "capacitance_pf"))
            where = loc + ("elements", j)
            if getattr(e, other) is not None:
                self.fail(where + (other,), f"a {e.kind} takes {key}, not {other}")
            rng = getattr(e, key)
            if rng is None:
                self.fail(where + (key,), f"expected the {e.kind}'s range [low, high] as {key}")
                continue
            lo, hi = rng
            top = 1e6 if key == "capacitance_pf" else 1e4
            if not 0 < lo < hi <= top:
                self.fail(where + (key,), f"expected 0 < low < high ≤ {top:g} "
                                          f"({'pF' if key == 'capacitance_pf' else 'µH'}), "
                                          f"found [{lo:g}, {hi:g}]")

    def _launch(self, f: FeedSpec, i: int) -> None:
        la = f.launch
        loc = ("feed", i, "launch")
        if not 0.0 <= la.angle_to_field <= math.pi / 2 + 1e-12:
            self.fail(loc + ("angle_to_field",),
                      f"{math.degrees(la.angle_to_field):.4g} deg is outside 0–90 deg; give the "
                      "angle between k and B folded into 0–90 deg (R and L are named relative "
                      "to B, so the direction of B does not matter)")
        if la.e_angle_to_field is not None:
            if la.polarisation not in (None, "linear"):
                self.fail(loc + ("e_angle_to_field",),
                          f"only a linear polarisation has an E direction; this launch is "
                          f"'{la.polarisation}'")
            elif not 0.0 <= la.e_angle_to_field <= math.pi / 2 + 1e-12:
                self.fail(loc + ("e_angle_to_field",),
                          f"{math.degrees(la.e_angle_to_field):.4g} deg is outside 0–90 deg "
                          "(the angle between E and the projection of B on the wavefront)")
        self._launch_rays(f, la, loc)

    def _launch_rays(self, f: FeedSpec, la: LaunchSpec, loc: tuple) -> None:
        """The off-axis, oblique and beam keys of a launch: inside the chamber's radius."""
        from rfcheck.physics.constants import C as C_LIGHT

        radius = self.spec.chamber.radius
        off = math.hypot(la.x or 0.0, la.y or 0.0)
        if off >= radius:
            key = "x" if la.x is not None and abs(la.x) >= abs(la.y or 0.0) else "y"
            self.fail(loc + (key,),
                      f"the launcher lies {off * 1e3:.4g} mm off the axis, at or beyond the "
                      f"chamber radius ({radius * 1e3:.4g} mm); expected less than the radius")
        if la.tilt_azimuth is not None and la.tilt is None:
            self.fail(loc + ("tilt_azimuth",), "tilt_azimuth names the plane of a tilt; give "
                                               "tilt too (e.g. tilt = \"10 deg\")")
        t = la.target
        if t is not None:
            landmarks = {lm.id for lm in self.spec.chamber.landmarks}
            if (t.landmark is None) == (t.start is None and t.end is None):
                self.fail(loc + ("target",), "give either a landmark (with half_width) or "
                                             "start and end, not both and not neither")
            elif t.landmark is not None:
                if t.landmark not in landmarks:
                    self.fail(loc + ("target", "landmark"),
                              f"no chamber landmark '{t.landmark}'; expected one of "
                              f"{', '.join(sorted(landmarks)) or '(none declared)'}")
                if t.half_width is None:
                    self.fail(loc + ("target", "half_width"),
                              "a landmark target needs half_width (e.g. \"10 mm\")")
            elif t.start is None or t.end is None:
                self.fail(loc + ("target", "end" if t.end is None else "start"),
                          "a target slice needs both start and end")
            elif not t.end > t.start:
                self.fail(loc + ("target", "end"), "end must lie beyond start")
        if la.beam is not None and la.beam.waist < C_LIGHT / (math.pi * f.frequency):
            self.fail(loc + ("beam", "waist"),
                      f"a waist of {la.beam.waist * 1e3:.4g} mm is below λ/π = "
                      f"{C_LIGHT / (math.pi * f.frequency) * 1e3:.4g} mm at "
                      f"{f.frequency / 1e9:.4g} GHz: such a beam diverges by more than "
                      "1 rad (λ/(π w0)) and is no paraxial beam; expected at least λ/π")
        elif la.beam is not None and off + la.beam.waist >= radius:
            self.fail(loc + ("beam", "waist"),
                      f"the beam (waist {la.beam.waist * 1e3:.4g} mm, {off * 1e3:.4g} mm off "
                      f"the axis) does not fit inside the chamber radius "
                      f"({radius * 1e3:.4g} mm); expected off-axis distance + waist below it")
        if la.aperture is not None:
            self._launch_aperture(f, la, loc + ("aperture",), off, radius)

    def _launch_aperture(self, f: FeedSpec, la: LaunchSpec, loc: tuple, off: float,
                         radius: float) -> None:
        """An aperture launch: not with a beam, the sizes its shape needs (and no others), a
        guide above cutoff at the feed's frequency, and the mouth inside the chamber."""
        from rfcheck.physics.constants import C as C_LIGHT

        ap = la.aperture
        if la.beam is not None:
            self.fail(loc, "a launch radiates either a Gaussian beam or from an aperture; give "
                           "beam or aperture, not both")
        needs = ("width", "height") if ap.shape == "rectangular" else ("radius",)
        bad = False
        for key in ("width", "height", "radius"):
            given = getattr(ap, key) is not None
            if key in needs and not given:
                self.fail(loc + (key,), f"a {ap.shape} aperture needs {key} (e.g. "
                                        f"{key} = \"{_APERTURE_EXAMPLES[key]}\")")
                bad = True
            elif key not in needs and given:
                self.fail(loc + (key,), f"a {ap.shape} aperture takes "
                                        f"{' and '.join(needs)}, not {key}")
                bad = True
        if bad:
            return
        lam = C_LIGHT / f.frequency
        if ap.shape == "rectangular":
            reach = 0.5 * math.hypot(ap.width, ap.height)
            if ap.width <= 0.5 * lam:
                self.fail(loc + ("width",),
                          f"a width of {ap.width * 1e3:.4g} mm is at or below λ/2 = "
                          f"{0.5 * lam * 1e3:.4g} mm at {f.frequency / 1e9:.4g} GHz: the TE10 "
                          "guide is cut off; expected a width above λ/2")
            what, key = "half its diagonal", "width"
        else:
            reach = ap.radius
            from rfcheck.physics.waveguide import circular_te_cutoff

            f_c = float(circular_te_cutoff(ap.radius, 1, 1))
            if f.frequency <= f_c:
                self.fail(loc + ("radius",),
                          f"a radius of {ap.radius * 1e3:.4g} mm puts the TE11 cutoff at "
                          f"{f_c / 1e9:.4g} GHz, at or above the feed's "
                          f"{f.frequency / 1e9:.4g} GHz: the guide is cut off; expected a "
                          f"radius above {ap.radius * f_c / f.frequency * 1e3:.4g} mm")
            what, key = "its radius", "radius"
        from rfcheck.physics.aperture_pattern import MAX_WAVELENGTHS

        across = max(ap.width, ap.height) if ap.shape == "rectangular" else 2 * ap.radius
        if across > MAX_WAVELENGTHS * lam:
            self.fail(loc + (key,),
                      f"the aperture is {across / lam:.4g} wavelengths across at "
                      f"{f.frequency / 1e9:.4g} GHz; expected at most {MAX_WAVELENGTHS} "
                      f"({MAX_WAVELENGTHS * lam * 1e3:.5g} mm): a mouth that large radiates a "
                      "beam (give it as beam = { waist = ... })")
        if off + reach >= radius:
            self.fail(loc + (key,),
                      f"the aperture ({what} {reach * 1e3:.4g} mm, {off * 1e3:.4g} mm off the "
                      f"axis) does not fit inside the chamber radius ({radius * 1e3:.4g} mm); "
                      f"expected off-axis distance + {what} below it")

    def _window_place(self, w: WindowSpec, f: FeedSpec, i: int) -> None:
        """A window sits in its feed's line: at or behind the launcher, never in the plasma
        beyond it (where the feed's wave travels through the chamber)."""
        c = self.spec.chamber
        direction = 1 if f.launch.direction == "+z" else -1
        ahead = direction * (w.z - f.launch.z)
        inside = c.z.start < w.z < c.z.end
        tol = 1e-9 * max(c.z.end - c.z.start, 1e-3)
        if ahead > tol and inside:
            self.fail(("window", i, "z"),
                      f"window at z = {w.z * 1e3:.4g} mm lies inside the chamber "
                      f"{ahead * 1e3:.4g} mm beyond the launcher of feed '{f.id}' (z = "
                      f"{f.launch.z * 1e3:.4g} mm, launching {f.launch.direction}), where its "
                      "wave travels through the plasma; a window belongs in the feed's line, at "
                      "or behind the launcher")

    # ---- catalogue look-ups (lazy: physics data tables)

    def _species(self, name: str, loc: tuple) -> None:
        try:
            from rfcheck.physics.species import parse_species
        except ImportError:  # dispersion core not installed in this build
            return
        try:
            parse_species(name)
        except ValueError as exc:
            self.fail(loc, str(exc))

    def _line(self, name: str, loc: tuple) -> None:
        from rfcheck.physics.waveguide import line_from_name

        try:
            line_from_name(name)
        except ValueError as exc:
            self.fail(loc, str(exc))

    def _material_ids(self) -> set[str]:
        from rfcheck import data

        try:
            return set(data.load("materials.toml").get("material", {}))
        except FileNotFoundError:
            return set()

    def _material_ranges(self, mt: MaterialSpec, loc: tuple) -> None:
        for key, nominal, name, floor in (("permittivity_range", mt.permittivity, "permittivity", 1.0),
                                          ("loss_tangent_range", mt.loss_tangent, "loss_tangent", 0.0)):
            rng = getattr(mt, key)
            if rng is None:
                continue
            lo, hi = rng
            if not (math.isfinite(lo) and math.isfinite(hi)):
                self.fail(loc + (key,), f"expected finite numbers [low, high], found [{lo:g}, {hi:g}]")
            elif lo < floor:
                self.fail(loc + (key,), f"low end {lo:g} is below {floor:g} "
                          f"({'ε_r ≥ 1' if floor else 'tan δ ≥ 0'})")
            elif not lo <= nominal <= hi:
                self.fail(loc + (key,), f"[{lo:g}, {hi:g}] must contain the {name} {nominal:g} "
                          "(low ≤ nominal ≤ high)")

    def _exposure(self, feed_ids: set[str]) -> m.Exposure | None:
        from rfcheck.spec_exposure import exposure_model

        return exposure_model(self, self.spec.exposure, feed_ids)

    # ---- conversion

    def _magnet_sources(self) -> list:
        mg = self.spec.magnet
        out: list = []
        out += [m.Coil(c.id, c.inner_radius, c.outer_radius, c.z, c.length, c.turns, c.current)
                for c in mg.coils]
        out += [m.RingMagnet(r.id, r.inner_radius, r.outer_radius, r.z, r.length, r.remanence)
                for r in mg.rings]
        out += [m.Multipole(p.id, p.inner_radius, p.outer_radius, p.z, p.length, p.remanence,
                            p.poles, p.segments, p.orientation) for p in mg.multipoles]
        if mg.uniform is not None:
            out.append(m.UniformField(mg.uniform.id, mg.uniform.b))
        for key in ("axis_table", "field_map"):
            meas = getattr(mg, key)
            if meas is None:
                continue
            got = self._measured(key, meas)
            if got is not None:
                out.append(got)
        return out

    def _measured(self, key: str, meas: MeasuredSpec):
        import hashlib

        from rfcheck.measured import (MeasuredDataError, check_coverage, read_axis_table,
                                      read_field_map, read_text)

        file = (self.path.parent / meas.file).resolve()
        c = self.spec.chamber
        chamber = m.Chamber(c.radius, c.z.start, c.z.end)
        try:
            text, data = read_text(file)
            sha = hashlib.sha256(data).hexdigest()
            if key == "axis_table":
                z, b = read_axis_table(file, text)
                coverage = check_coverage(z, chamber)
                source = m.AxisTable(meas.id, str(file), tuple(map(float, z)),
                                     tuple(map(float, b)), meas.scales_with_current, sha)
            else:
                r, z, br, bz = read_field_map(file, text)
                coverage = check_coverage(z, chamber, r)
                source = m.FieldMap(meas.id, str(file), tuple(map(float, r)), tuple(map(float, z)),
                                    tuple(tuple(map(float, row)) for row in br),
                                    tuple(tuple(map(float, row)) for row in bz),
                                    meas.scales_with_current, sha)
        except MeasuredDataError as exc:
            self.fail(("magnet", key, "file"), str(exc))
            return None
        except FileNotFoundError:
            self.fail(("magnet", key, "file"), f"file not found: {file}")
            return None
        if not coverage.covers:
            self.fail(("magnet", key, "file"),
                      f"{file.name} does not cover the chamber: {'; '.join(coverage.problems)}")
            return None
        return source

    def _model(self, sources: list, exposure: m.Exposure | None) -> m.SourceModel:
        s = self.spec
        p = s.plasma
        if isinstance(p.profile, str):
            profile = m.DensityProfile(kind=p.profile)
        else:
            pts = sorted(p.profile.points)
            profile = m.DensityProfile(kind=p.profile.kind, exponent=p.profile.exponent,
                                       edge_length=p.profile.edge_length,
                                       z=tuple(z for z, _ in pts), shape=tuple(v for _, v in pts))
        plasma = m.Plasma(
            density=m.Span(p.density.min, p.density.max),
            electron_temperature=m.Span(p.electron_temperature.min, p.electron_temperature.max),
            ions=tuple(m.IonShare(i.species, i.fraction) for i in p.ions),
            neutral=(m.NeutralGas(p.neutral.species, _pressure_span(p.neutral.pressure),
                                  p.neutral.temperature) if p.neutral else None),
            profile=profile,
        )
        chamber = m.Chamber(s.chamber.radius, s.chamber.z.start, s.chamber.z.end,
                            tuple(m.Landmark(lm.id, lm.z) for lm in s.chamber.landmarks),
                            s.chamber.end_walls.start, s.chamber.end_walls.end)
        nozzle = s.magnet.nozzle
        magnet = m.Magnet(tuple(sources), s.magnet.current_tolerance, s.magnet.trap,
                          m.Nozzle(nozzle.exit, nozzle.min_ratio) if nozzle else None)
        feeds = tuple(
            m.Feed(f.id, f.frequency, f.frequency_tolerance, f.power, f.duty_cycle,
                   f.max_reflected_power, f.line,
                   m.Launch(f.launch.z, 1 if f.launch.direction == "+z" else -1, f.launch.mode,
                            min(f.launch.angle_to_field, math.pi / 2), f.launch.polarisation,
                            f.launch.e_angle_to_field, f.launch.x or 0.0, f.launch.y or 0.0,
                            f.launch.tilt or 0.0, f.launch.tilt_azimuth or 0.0,
                            (m.LaunchBeam(f.launch.beam.waist, f.launch.beam.waist_distance)
                             if f.launch.beam else None),
                            _launch_target(f.launch.target, s.chamber),
                            _aperture_model(f.launch.aperture)),
                   f.absorption, _cold_gamma(f.cold_cavity), f.ignition_time,
                   (m.ShortRating(f.max_reflected_power_short.power,
                                  f.max_reflected_power_short.duration)
                    if f.max_reflected_power_short else None),
                   _coil(f.coil), transmission=_transmission(f.transmission),
                   circulator=f.circulator, antenna=_antenna(f.antenna))
            for f in s.feed)
        windows = tuple(
            m.Window(w.id, w.feed, w.z,
                     tuple(m.WindowLayer(la.material, la.thickness, la.thickness_tolerance)
                           for la in w.layers),
                     w.max_absorbed_power, w.diameter,
                     max_temperature_rise=w.max_temperature_rise)
            for w in s.window)
        materials = tuple(m.Material(mt.id, mt.permittivity, mt.loss_tangent, mt.frequency,
                                     mt.source, "user", (), mt.thermal_conductivity,
                                     mt.permittivity_range, mt.loss_tangent_range)
                          for mt in s.material)
        return m.SourceModel(
            source=m.SourceInfo(s.source.name, s.source.revision, s.source.description,
                                s.source.lab),
            plasma=plasma, chamber=chamber, magnet=magnet, feeds=feeds, windows=windows,
            materials=materials, exposure=exposure,
            review=m.Review(s.review.prepared_by, s.review.checked_by, s.review.approved_by,
                            s.review.notes),
        )


def _aperture_model(ap: LaunchApertureSpec | None):
    if ap is None:
        return None
    return m.LaunchAperture(ap.shape, ap.width or 0.0, ap.height or 0.0, ap.radius or 0.0)


def _launch_target(t: LaunchTargetSpec | None, chamber):
    """The model's LaunchTarget of a declared target (a landmark resolved to its slice)."""
    from rfcheck import model as m

    if t is None:
        return None
    if t.landmark is not None:
        z = next(lm.z for lm in chamber.landmarks if lm.id == t.landmark)
        return m.LaunchTarget(z - t.half_width, z + t.half_width, t.radius,
                              f"landmark {t.landmark} ± {t.half_width * 1e3:.4g} mm")
    return m.LaunchTarget(t.start, t.end, t.radius,
                          f"z = {t.start * 1e3:.4g}–{t.end * 1e3:.4g} mm")


def _pressure_span(p) -> m.Span:
    return m.Span(p, p) if isinstance(p, float) else m.Span(p.min, p.max)


def _coil(c: InductiveCoilSpec | None):
    """The model's InductiveCoil of a declared coil (None if not declared)."""
    from rfcheck import model as m

    if c is None:
        return None
    matching = None
    if c.matching is not None:
        matching = m.MatchingNetwork(c.matching.topology, float(c.matching.impedance), tuple(
            m.MatchingElement(e.kind, e.connection,
                              *(v * (1e-12 if e.kind == "capacitor" else 1e-6)
                                for v in (e.capacitance_pf if e.kind == "capacitor"
                                          else e.inductance_uh)))
            for e in c.matching.elements))
    return m.InductiveCoil(float(c.turns), c.radius, c.length, c.conductor_diameter,
                           None if c.resistance is None else float(c.resistance), matching,
                           None if c.max_voltage_kv is None else float(c.max_voltage_kv) * 1e3)


def _antenna(a: HeliconAntennaSpec | None):
    """The model's HeliconAntenna of a declared antenna (None if not declared)."""
    from rfcheck import model as m

    return None if a is None else m.HeliconAntenna(a.type, a.length, a.radius)


def _transmission(t: TransmissionSpec | None):
    """The model's LineRun of a declared line run (None if not declared)."""
    from rfcheck import model as m

    if t is None:
        return None
    return m.LineRun(t.length, int(t.mitre_bends), t.loss_db_per_m, t.bend_loss_db)


def _cold_gamma(cc: ColdCavitySpec | None) -> float | None:
    """|Γ| of a declared cold cavity (from |Γ| or from the VSWR), None if not declared."""
    if cc is None:
        return None
    if cc.gamma is not None:
        return float(cc.gamma)
    return float((cc.vswr - 1.0) / (cc.vswr + 1.0))
