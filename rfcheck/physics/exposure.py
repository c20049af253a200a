"""RF exposure: reference levels from named tables and the inverse-square leak estimate.

Reference levels are plane-wave-equivalent power densities S (W/m²). Where a table gives
only E and H (below 30 MHz in ICNIRP 2020), the equivalent is the lower of E²/η0 and η0 H²
(the far-field relation; near a source the E and H limits must be checked separately with a
survey instrument, which a design review cannot replace).

References: ICNIRP, Health Phys. 118(5):483–524 (2020); 47 CFR §1.1310.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from rfcheck import data
from rfcheck.physics.constants import ETA0


@dataclass(frozen=True)
class ReferenceLevel:
    table: str
    title: str
    standard: str
    population: str
    averaging_time: str
    frequency: float  # Hz
    power_density: float  # W/m^2, plane-wave equivalent; NaN outside the table's range
    basis: str  # "S", "E", "H" or "E/H": which law set the level


def reference_level(table: str, f: float) -> ReferenceLevel:
    """The plane-wave-equivalent reference level of `table` at frequency `f` (Hz)."""
    tables = data.load("exposure.toml")
    if table not in tables:
        raise ValueError(f"unknown reference-level table '{table}'; known: {', '.join(sorted(tables))}")
    t = tables[table]
    f_mhz = f / 1e6
    found: dict[str, float] = {}
    for seg in t["segments"]:
        if seg["f_min"] < f <= seg["f_max"]:
            found[seg["quantity"]] = seg["coefficient"] * f_mhz ** seg["exponent"]
    if "S" in found:
        s, basis = found["S"], "S"
    elif found:
        candidates = {}
        if "E" in found:
            candidates["E"] = found["E"] ** 2 / ETA0
        if "H" in found:
            candidates["H"] = ETA0 * found["H"] ** 2
        basis = min(candidates, key=candidates.get)
        s = candidates[basis]
    else:
        s, basis = math.nan, ""
    return ReferenceLevel(table, t["title"], t["standard"], t["population"], t["averaging_time"],
                          f, s, basis)


def leak_power_density(s_measured: float, d_measured: float, d: float) -> float:
    """Inverse-square estimate S(d) = S_m (d_m / d)² from a leak S_m at distance d_m (W/m², m).

    A point-source far-field law; near large apertures it is an estimate only.
    """
    return s_measured * (d_measured / d) ** 2


def distance_for_level(s_measured: float, d_measured: float, s_limit: float) -> float:
    """Distance (m) beyond which the inverse-square leak estimate falls to `s_limit`."""
    return d_measured * math.sqrt(s_measured / s_limit)
