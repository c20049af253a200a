"""What rfcheck accepts from a specification: plausible ranges, counts, and text lengths.

One table each, every entry with its reason. A value outside its range is refused with exit 2
(key, line, the range and why): outside these ranges a value is almost always a unit slip
(``2.45 kHz`` for ``2.45 GHz``), and the numerical methods are neither meant nor tested there.
The ranges are wide on purpose (they bound what a real RF- or microwave-heated source can
have), they are not design limits. The counts bound the work of a run, so that no spec can
make a check run for hours or exhaust memory; they sit far above any real source.

Values are SI. ``low`` applies to quantities that must be positive; quantities that may be
zero (tolerances, powers) or negative (positions, currents) are bounded by ``high`` on their
magnitude only.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Range", "RANGES", "KEY_RANGES", "COUNTS", "TEXT", "MAX_QUANTITY_TEXT", "range_for"]


@dataclass(frozen=True)
class Range:
    low: float      # smallest accepted value of a positive quantity, SI
    high: float     # largest accepted magnitude, SI
    shown: str      # the range as written in a message
    reason: str


#: plausible range per dimension (rfcheck.units.DIMENSIONS keys)
RANGES: dict[str, Range] = {
    "length": Range(1e-6, 100.0, "1 µm to 100 m",
                    "from a thin coating on a window to a long transmission line"),
    "frequency": Range(1e5, 1e12, "100 kHz to 1 THz",
                       "RF and microwave heating runs from about 100 kHz (inductive sources) "
                       "to the sub-millimetre range (gyrotrons)"),
    "magnetic_field": Range(0.0, 50.0, "up to 50 T",
                            "the strongest continuous laboratory magnets reach about 45 T"),
    "density": Range(1e10, 1e24, "1e10 to 1e24 m^-3 (1e4 to 1e18 cm^-3)",
                     "from a faint discharge to the densest RF-heated plasmas"),
    "energy": Range(1e-2, 1e7, "0.01 eV to 10 MeV",
                    "from a cold afterglow to the hot electrons of an ECR plasma"),
    "temperature": Range(1.0, 1e5, "1 K to 100 000 K",
                         "neutral gas from cryogenic to fully dissociated"),
    "pressure": Range(1e-9, 1e6, "1e-9 Pa to 1 MPa",
                      "from ultra-high vacuum to ten atmospheres"),
    "power": Range(0.0, 1e8, "up to 100 MW",
                   "the largest RF and microwave heating systems deliver tens of MW"),
    "power_density": Range(0.0, 1e8, "up to 1e8 W/m^2 (10 kW/cm^2)",
                           "far above any leakage or survey reading near a source"),
    "current": Range(0.0, 1e6, "up to 1 MA per turn",
                     "coil currents per turn reach tens of kA in the largest magnets"),
    "angle": Range(0.0, 6.283185307179586 * (1 + 1e-12), "up to 360 deg",
                   "one full turn"),
    "ratio": Range(0.0, 1e20, "up to 1e20 (200 dB)",
                   "ratios and attenuations of a source and its shielding"),
    "electric_field": Range(0.0, 1e10, "up to 10 GV/m", "far above any breakdown field"),
    "thermal_conductivity": Range(1e-2, 1e4, "0.01 to 10 000 W/(m K)",
                                  "from thermal insulators to diamond"),
    "time": Range(1e-9, 1e9, "1 ns to 1e9 s (about 30 years)",
                  "from a short pulse to the lifetime of an installation"),
}

#: keys with a narrower range than their dimension (the name used in spec.py's field types)
KEY_RANGES: dict[str, Range] = {
    "remanence": Range(0.0, 2.0, "up to 2 T",
                       "sintered NdFeB and SmCo magnets reach about 1.5 T"),
    "current_tolerance": Range(0.0, 1.0, "up to 100 %",
                               "a tolerance beyond the current itself is not a tolerance"),
    "max_temperature_rise": Range(0.0, 2000.0, "up to 2000 K",
                                  "a rise beyond what any window material survives is a unit slip "
                                  "(diamond graphitises near 1000 K in air)"),
}

#: most entries of a list in a spec, with the reason (the key is the list's key)
COUNTS: dict[str, tuple[int, str]] = {
    "feed": (16, "a source has a handful of RF feeds"),
    "window": (64, "a few windows per feed"),
    "layers": (100, "the tolerance search of a window is bounded for this many layers"),
    "material": (200, "the materials of one source"),
    "coils": (200, "a magnet of many coils"),
    "rings": (200, "a magnet of many permanent rings"),
    "multipoles": (16, "a few multipole magnets"),
    "landmarks": (100, "landmarks to check the resonance against"),
    "ions": (20, "ion species of one plasma"),
    "points": (10_000, "points of a measured density profile"),
    "readings": (1_000, "readings of an RF leakage survey"),
    "paths": (200, "leak paths of one source"),
    "feeds": (16, "feeds reaching one leak path"),
}

#: longest free text per key, characters; `True` admits line breaks
TEXT: dict[str, tuple[int, bool]] = {
    "name": (200, False),
    "revision": (100, False),
    "description": (4000, True),
    "lab": (200, False),
    "species": (32, False),
    "file": (1000, False),
    "line": (64, False),
    "source": (1000, False),
    "material": (64, False),
    "feed": (64, False),
    "table": (64, False),
    "table_file": (255, False),
    "prepared_by": (200, False),
    "checked_by": (200, False),
    "approved_by": (200, False),
    "notes": (4000, True),
    "id": (64, False),
}

#: longest text of one quantity ("2.45 GHz"), characters
MAX_QUANTITY_TEXT = 100


def range_for(dimension: str, key: str | None = None) -> Range:
    """The plausible range of a value of `dimension` under `key` (KEY_RANGES first)."""
    return KEY_RANGES.get(key or "", RANGES[dimension])
