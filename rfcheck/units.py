"""The one place where strings become quantities.

One pint registry, created on first use. A spec value is a string ``"<number> <unit>"``
checked against the dimension the key expects and converted to an SI float. Units the
trade uses but pint reads differently are defined here explicitly:

* gauss is the SI-equivalent 1 G = 1e-4 T (pint's own gauss is Gaussian-CGS and refuses T);
* angular frequencies (rad/s, rpm, anything with a radian) are rejected where a frequency
  in Hz is expected, instead of being silently read as Hz (pint treats the radian as 1);
* ``%`` and ``ppm`` are ratios; ``dB`` is accepted only where a ratio in dB is meaningful.
"""

from __future__ import annotations

import difflib
import functools
import math
import re
from dataclasses import dataclass

__all__ = ["Dimension", "UnitError", "parse_quantity", "scale_to_si", "DIMENSIONS", "format_si"]


class UnitError(ValueError):
    """A value could not be read as a quantity of the expected dimension."""


@dataclass(frozen=True)
class Dimension:
    """An expected dimension: a name for messages, the SI unit, and example units."""

    name: str
    si: str
    examples: tuple[str, ...]


DIMENSIONS: dict[str, Dimension] = {
    "length": Dimension("length", "m", ("mm", "cm", "m", "in")),
    "frequency": Dimension("frequency", "Hz", ("Hz", "kHz", "MHz", "GHz")),
    "magnetic_field": Dimension("magnetic flux density", "T", ("T", "mT", "G", "kG")),
    "density": Dimension("number density", "m^-3", ("m^-3", "cm^-3")),
    "energy": Dimension("energy or temperature in eV", "eV", ("eV", "keV")),
    "temperature": Dimension("temperature", "K", ("K", "degC")),
    "pressure": Dimension("pressure", "Pa", ("Pa", "mbar", "Torr")),
    "power": Dimension("power", "W", ("W", "kW", "MW", "mW")),
    "power_density": Dimension("power density", "W/m^2", ("W/m^2", "mW/cm^2")),
    "current": Dimension("current", "A", ("A", "kA")),
    "angle": Dimension("angle", "rad", ("deg", "rad")),
    "ratio": Dimension("ratio", "1", ("%", "ppm", "1")),
    "electric_field": Dimension("electric field", "V/m", ("V/m", "kV/cm", "MV/m")),
    "thermal_conductivity": Dimension("thermal conductivity", "W/(m K)", ("W/(m*K)",)),
    "time": Dimension("duration", "s", ("s", "ms", "min", "h")),
}

# pint dimensionality strings for each expected dimension
_PINT_DIMS = {
    "length": "[length]",
    "frequency": "1/[time]",
    "magnetic_field": "[mass] / [current] / [time] ** 2",
    "density": "1/[length]**3",
    "energy": "[mass] * [length] ** 2 / [time] ** 2",
    "temperature": "[temperature]",
    "pressure": "[mass] / [length] / [time] ** 2",
    "power": "[mass] * [length] ** 2 / [time] ** 3",
    "power_density": "[mass] / [time] ** 3",
    "current": "[current]",
    "angle": "",
    "ratio": "",
    "electric_field": "[mass] * [length] / [current] / [time] ** 3",
    "thermal_conductivity": "[mass] * [length] / [temperature] / [time] ** 3",
    "time": "[time]",
}

# the SI unit each dimension converts to (energy goes to eV: temperatures of plasma)
_TARGET = {
    "length": "m",
    "frequency": "Hz",
    "magnetic_field": "T",
    "density": "m**-3",
    "energy": "eV",
    "temperature": "K",
    "pressure": "Pa",
    "power": "W",
    "power_density": "W/m**2",
    "current": "A",
    "angle": "rad",
    "ratio": "",
    "electric_field": "V/m",
    "thermal_conductivity": "W/m/K",
    "time": "s",
}

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
_ANGULAR = re.compile(r"\b(rad|radian|radians|rpm|revolution|turn)\b")

# unit spellings offered when a unit is unknown
_SUGGESTIONS = (
    "Hz kHz MHz GHz THz mm cm m um in T mT G kG m^-3 cm^-3 eV keV K degC Pa mbar Torr "
    "W kW MW mW A kA deg rad % ppm V/m kV/cm MV/m W/m^2 mW/cm^2 dB s ms min h"
).split()


@functools.lru_cache(maxsize=1)
def registry():
    """The one pint registry (created on first use: it costs a few hundred ms)."""
    import pint

    # pint caches its parsed default definitions on disk (":auto:", the user's cache folder):
    # building the registry then takes ~0.04 s instead of ~0.45 s. Where that folder cannot be
    # used, the registry is built without it (same units, same results).
    try:
        ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True, cache_folder=":auto:")
    except (OSError, ValueError, EOFError, ImportError):
        ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True, cache_folder=None)
    # SI-equivalent gauss, as engineers use it for magnet fields (1 G = 1e-4 T).
    ureg.define("field_gauss = 1e-4 * tesla = G")
    ureg.define("field_kilogauss = 1e-1 * tesla = kG")
    ureg.define("ppm_ratio = 1e-6 = ppm")
    ureg.define("@alias torr = Torr")
    return ureg


def _normalise_unit(text: str) -> str:
    text = text.strip()
    text = text.replace("^", "**").replace("·", "*").replace("µ", "u").replace("μ", "u")
    text = re.sub(r"\b[Gg]auss\b", "G", text)
    text = re.sub(r"\bkgauss\b", "kG", text)
    if text in ("", "1"):
        return ""
    return text


def _suggest(unit: str) -> str:
    close = difflib.get_close_matches(unit, _SUGGESTIONS, n=1, cutoff=0.5)
    if not close:
        close = [s for s in _SUGGESTIONS if s.lower() == unit.lower()]
    return f" (did you mean '{close[0]}'?)" if close else ""


@functools.lru_cache(maxsize=4096)
def scale_to_si(unit: str, dimension: str) -> float:
    """Factor that turns a magnitude in `unit` into SI for `dimension` (offset units refused).

    Used for CSV column headers such as ``z [mm]`` or ``B [G]``.
    """
    value = parse_quantity(f"1 {unit}", dimension)
    zero = parse_quantity(f"0 {unit}", dimension)
    if zero != 0.0:
        raise UnitError(f"unit '{unit}' has an offset; use an absolute unit for {dimension}")
    return value


@functools.lru_cache(maxsize=4096)
def parse_quantity(text: str, dimension: str) -> float:
    """Read ``"<number> <unit>"`` as a quantity of `dimension` and return its SI magnitude.

    Raises :class:`UnitError` with a message that says what was found and what was expected.
    Whatever pint raises on a unit text it cannot make sense of (its tokenizer, logarithmic
    units combined with others, overflow in a conversion) becomes a UnitError too.
    """
    try:
        return _parse_quantity(text, dimension)
    except (UnitError, KeyError):
        raise
    except Exception:  # noqa: BLE001 - any failure inside pint on odd unit text is bad input
        dim = DIMENSIONS[dimension]
        raise UnitError(f"cannot read '{text}' as a {dim.name}; expected a number and a unit "
                        f"such as '{_example(dimension)}'") from None


def _parse_quantity(text: str, dimension: str) -> float:
    if dimension not in _PINT_DIMS:
        raise KeyError(f"unknown dimension {dimension!r}")
    dim = DIMENSIONS[dimension]
    expected = f"a {dim.name} such as '{_example(dimension)}'"
    if not isinstance(text, str):
        raise UnitError(f"expected {expected} (a string with a unit), found {text!r}")
    m = _NUMBER.match(text)
    if not m:
        raise UnitError(f"expected {expected}, found '{text}' (no leading number)")
    number = float(m.group(1))
    if not math.isfinite(number):
        raise UnitError(f"expected a finite number, found '{text}'")
    unit_text = _normalise_unit(m.group(2))

    if dimension == "frequency" and _ANGULAR.search(unit_text):
        raise UnitError(
            f"'{text}' is an angular frequency; give the frequency in Hz (f = ω/2π), e.g. '2.45 GHz'"
        )
    if unit_text == "dB":
        if dimension != "ratio":
            raise UnitError(f"dB is not a {dim.name}; expected {expected}")
        return 10.0 ** (number / 10.0)
    if unit_text == "" and dimension not in ("ratio", "angle"):
        raise UnitError(f"'{text}' has no unit; expected {expected}")

    import pint

    ureg = registry()
    try:
        q = ureg.Quantity(number, unit_text) if unit_text else ureg.Quantity(number)
    except (pint.errors.UndefinedUnitError, pint.errors.DefinitionSyntaxError, AttributeError,
            TypeError, ValueError, SyntaxError) as exc:
        bad = getattr(exc, "unit_names", None) or unit_text
        if isinstance(bad, (list, tuple)):
            bad = bad[0] if bad else unit_text
        raise UnitError(f"unknown unit '{bad}' in '{text}'{_suggest(str(bad))}; expected {expected}") from None

    if dimension == "ratio" and unit_text == "":
        return number
    if dimension == "angle":
        if unit_text == "":
            raise UnitError(f"'{text}' has no unit; expected an angle such as '10 deg'")
        if not q.dimensionless:
            raise UnitError(f"'{text}' is not an angle; expected {expected}")
        return float(q.to("rad").magnitude)
    if not q.check(_PINT_DIMS[dimension]):
        if dimension == "energy" and q.check("[temperature]"):
            return float(q.to("K").magnitude) / _ev_in_k()
        raise UnitError(
            f"'{text}' is a {_describe(q)}, not a {dim.name}; expected {expected}"
        )
    if dimension == "frequency" and "rad" in str(q.units):
        raise UnitError(f"'{text}' is an angular frequency; give the frequency in Hz")
    target = _TARGET[dimension]
    return float(q.to(target).magnitude) if target else float(q.to("").magnitude)


def _ev_in_k() -> float:
    from rfcheck.physics.constants import EV_IN_K

    return EV_IN_K


def _example(dimension: str) -> str:
    return {
        "length": "20 mm",
        "frequency": "2.45 GHz",
        "magnetic_field": "875 G",
        "density": "1e11 cm^-3",
        "energy": "5 eV",
        "temperature": "300 K",
        "pressure": "0.2 Pa",
        "power": "1.5 kW",
        "power_density": "1 mW/cm^2",
        "current": "120 A",
        "angle": "10 deg",
        "ratio": "2 %",
        "electric_field": "3 MV/m",
        "thermal_conductivity": "30 W/(m*K)",
        "time": "5 s",
    }[dimension]


def _describe(q) -> str:
    for name, dims in _PINT_DIMS.items():
        if dims and q.check(dims):
            return DIMENSIONS[name].name
    return f"quantity in {q.units:~}"


_PRETTY_UNITS = {"m^-3": "m⁻³", "W/m^2": "W/m²", "1": "", "": ""}


def format_si(value: float | None, unit: str) -> str:
    """Compact engineering text for a value in SI, used by the text and PDF views."""
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return "—"
    value = float(value)
    prefixed = ("Hz", "T", "W", "m", "V/m", "A")
    if unit in prefixed and value != 0:
        exp3 = int(math.floor(math.log10(abs(value)) / 3.0) * 3)
        exp3 = max(-9, min(12, exp3))
        if unit == "m":
            exp3 = max(-3, min(0, exp3))
        sym = {12: "T", 9: "G", 6: "M", 3: "k", 0: "", -3: "m", -6: "µ", -9: "n"}[exp3]
        return f"{value / 10**exp3:.4g} {sym}{unit}"
    pretty = _PRETTY_UNITS.get(unit, unit)
    if unit == "m^-3" and value != 0:
        exp = int(math.floor(math.log10(abs(value))))
        return f"{value / 10**exp:.4g}e{exp} {pretty}"
    return f"{value:.4g} {pretty}".rstrip()


def format_fraction(x: float) -> str:
    """A power fraction in words: a percentage with 3 significant digits, or, below 0.1 %,
    the number itself (e.g. "2.3e-05"), so that tiny fractions are not rounded to 0 %."""
    if x is None or not math.isfinite(x):
        return "—"
    return f"{x:.2g}" if abs(x) < 1e-3 else f"{100 * x:.3g} %"
