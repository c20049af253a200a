"""Particle species: one parser from names such as ``"e-"``, ``"Ar8+"`` to charge and mass.

Grammar (whitespace around the name is ignored)::

    "e-"                       the electron
    "p+", "p"                  the proton (same as "H+")
    <Element>[<q>]<sign>       an ion of element <Element> with charge number q (default 1),
                               sign "+" (positive ion) or "-" (negative ion)
    <Element>                  the neutral atom (charge number 0)

``<Element>`` is a chemical symbol from ``rfcheck/data/species.toml`` ("H", "D", "T", "He",
"N", "O", "Ar", "Xe", ...). Molecular ions (N2+ as a molecule) are not part of this grammar:
"N2+" means doubly charged nitrogen.

Masses (every value in ``species.toml`` carries its source):

* e-, H+ (= p+), D+, T+ and He2+ (= alpha) are CODATA particle masses (scipy.constants);
* every other ion of element El with charge number q has the mass of the most abundant
  isotope's neutral atom minus q electron masses (atomic masses: NIST / AME).
"""

from __future__ import annotations

import functools
import re
import tomllib
from collections.abc import Iterable, Mapping
from importlib import resources
from typing import Any, NamedTuple

from scipy import constants as _codata

from rfcheck.physics.constants import AMU, E_CHARGE, M_E, M_P
from rfcheck.physics.domain import guard_public

__all__ = [
    "Species",
    "parse_species",
    "as_species",
    "ion_mixture",
    "ELECTRON",
]


class Species(NamedTuple):
    """A charged (or neutral) particle species.

    Attributes
    ----------
    name : str
        Canonical name, e.g. ``"e-"``, ``"H+"``, ``"Ar8+"``.
    charge_number : int
        Signed charge in units of the elementary charge (-1 for the electron).
    mass : float
        Particle mass in kg.
    """

    name: str
    charge_number: int
    mass: float

    @property
    def charge(self) -> float:
        """Signed charge in coulomb."""
        return self.charge_number * E_CHARGE

    @property
    def mass_ratio_to_proton(self) -> float:
        """Mass in units of the proton mass (the NRL Formulary's mu)."""
        return self.mass / M_P


_NAME_RE = re.compile(r"^(?P<element>[A-Z][a-z]?)(?:(?P<charge>[0-9]*)(?P<sign>[+-]))?$")
_EXPECTED = (
    'expected "e-", "p+", or an element symbol with optional charge number and sign, '
    'e.g. "H+", "D+", "He2+", "N+", "O3+", "Ar8+", "Xe+", "O-" (neutral atom: "Ar")'
)


@functools.cache
def _table() -> dict[str, Any]:
    text = resources.files("rfcheck").joinpath("data/species.toml").read_text(encoding="utf-8")
    return tomllib.loads(text)


def _codata_mass(key: str) -> float:
    return float(_codata.physical_constants[key][0])


@functools.cache
def _particles() -> tuple[dict[str, Species], dict[tuple[str, int], Species]]:
    """Named CODATA particles: by alias, and by (element, charge number)."""
    by_alias: dict[str, Species] = {}
    by_element: dict[tuple[str, int], Species] = {}
    for entry in _table()["particles"].values():
        sp = Species(entry["name"], int(entry["charge_number"]), _codata_mass(entry["codata"]))
        for alias in (entry["name"], *entry.get("aliases", ())):
            by_alias[alias] = sp
        if "element" in entry:
            by_element[(entry["element"], sp.charge_number)] = sp
    return by_alias, by_element


def _canonical(element: str, charge_number: int) -> str:
    if charge_number == 0:
        return element
    sign = "+" if charge_number > 0 else "-"
    q = abs(charge_number)
    return f"{element}{q if q != 1 else ''}{sign}"


@functools.lru_cache(maxsize=512)
def parse_species(name: str) -> Species:
    """Parse a species name into a :class:`Species` (name, charge number, mass in kg).

    Parameters
    ----------
    name : str
        ``"e-"``, ``"p+"``, ``"H+"``, ``"D+"``, ``"He2+"``, ``"N+"``, ``"O3+"``, ``"Ar+"``,
        ``"Xe+"``, ``"Ar8+"``, ``"O-"``, ``"Ar"`` (neutral atom), ...

    Returns
    -------
    Species

    Raises
    ------
    ValueError
        If the name does not follow the grammar, names an unknown element, or asks for a
        positive charge state above the element's atomic number.

    Notes
    -----
    H+, D+, T+ and He2+ are the CODATA proton, deuteron, triton and alpha-particle masses.
    Any other ion: m = m_atom(most abundant isotope) - q m_e, atomic masses from NIST/AME
    (see ``rfcheck/data/species.toml``); the electrons' binding energy is neglected.
    """
    if not isinstance(name, str):
        raise ValueError(f"species must be a string, got {name!r}; {_EXPECTED}")
    text = name.strip()
    by_alias, by_element = _particles()
    if text in by_alias:
        return by_alias[text]
    match = _NAME_RE.match(text)
    if match is None:
        raise ValueError(f"cannot read species {name!r}: {_EXPECTED}")
    element = match["element"]
    elements = _table()["elements"]
    if element not in elements:
        known = ", ".join(sorted(elements))
        raise ValueError(f"unknown element {element!r} in species {name!r}; known: {known}")
    if match["sign"] is None:
        q = 0
    else:
        digits = match["charge"]
        if digits and (digits.startswith("0") or int(digits) == 0):
            raise ValueError(f"cannot read species {name!r}: charge number must be >= 1; {_EXPECTED}")
        q = int(digits) if digits else 1
        if match["sign"] == "-":
            q = -q
    data = elements[element]
    if q > data["atomic_number"]:
        raise ValueError(
            f"species {name!r}: charge state {q}+ exceeds the atomic number "
            f"{data['atomic_number']} of {element}"
        )
    if (element, q) in by_element:
        return by_element[(element, q)]
    mass = data["atomic_mass"] * AMU - q * M_E
    return Species(_canonical(element, q), q, float(mass))


def as_species(value: str | Species) -> Species:
    """Return ``value`` as a :class:`Species` (parsing a string, passing a Species through)."""
    if isinstance(value, Species):
        return value
    return parse_species(value)


ELECTRON = parse_species("e-")


def _mixture_entry(item: Any) -> tuple[Species, float | None]:
    if isinstance(item, (str, Species)):
        return as_species(item), None
    if hasattr(item, "species") and hasattr(item, "fraction"):
        return as_species(item.species), float(item.fraction)
    if isinstance(item, tuple) and len(item) == 2:
        return as_species(item[0]), float(item[1])
    raise ValueError(
        f"cannot read ion entry {item!r}: expected a species name, a (species, fraction) pair "
        "or an object with .species and .fraction"
    )


def ion_mixture(ions: Any) -> tuple[tuple[Species, float], ...]:
    """Normalise an ion description to ``((Species, fraction), ...)``.

    Parameters
    ----------
    ions : str, Species, or iterable
        ``()``/``None`` (no ions), one species (``"Ar+"``; fraction 1), a mapping
        {species: fraction}, or an iterable whose items are species names,
        ``(species, fraction)`` pairs, or objects with ``.species`` and ``.fraction``
        attributes (e.g. :class:`rfcheck.model.IonShare`).

    Returns
    -------
    tuple of (Species, float)
        Fractions are shares of the *positive charge density*: ion species s has density
        n_s = fraction_s n_e / Z_s (quasi-neutrality). They are normalised to sum to 1.

    Raises
    ------
    ValueError
        For an unreadable entry, an electron or non-positive ion in the list, a negative
        fraction, several species without fractions, or fractions that do not sum to 1
        (within 1e-6).
    """
    if ions is None:
        return ()
    if isinstance(ions, Mapping):
        ions = tuple(ions.items())
    if isinstance(ions, (str, Species)) or hasattr(ions, "species"):
        ions = (ions,)
    if not isinstance(ions, Iterable):
        raise ValueError(f"cannot read ions {ions!r}: expected a species or a list of species")
    try:
        key = tuple(ions)
        hash(key)
    except TypeError:
        return _ion_mixture(tuple(_freeze(i) for i in ions))
    return _ion_mixture(key)


def _freeze(item: Any) -> Any:
    """A hashable stand-in for one entry (lists and mutable share objects become pairs)."""
    if isinstance(item, list):
        return tuple(item)
    if hasattr(item, "species") and hasattr(item, "fraction"):
        return (item.species, item.fraction)
    return item


@functools.lru_cache(maxsize=256)
def _ion_mixture(items: tuple) -> tuple[tuple[Species, float], ...]:
    entries = [_mixture_entry(i) for i in items]
    if not entries:
        return ()
    for sp, frac in entries:
        if sp.charge_number <= 0:
            raise ValueError(f"ion species must be positive ions, got {sp.name!r}")
        if frac is not None and not frac >= 0.0:
            raise ValueError(f"ion fraction of {sp.name} must be >= 0, got {frac}")
    if any(frac is None for _, frac in entries):
        if len(entries) > 1:
            names = ", ".join(sp.name for sp, _ in entries)
            raise ValueError(f"several ion species ({names}) need a fraction each")
        return ((entries[0][0], 1.0),)
    total = sum(frac for _, frac in entries)
    if abs(total - 1.0) > 1e-6:
        raise ValueError(f"ion fractions must sum to 1 (share of the positive charge), got {total}")
    return tuple((sp, frac / total) for sp, frac in entries)


guard_public(globals())  # odd input: no NumPy warnings (physics/domain.py)
