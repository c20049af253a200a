"""Species parser and ion mixtures, checked against CODATA (scipy.constants) and PlasmaPy."""

from __future__ import annotations

import tomllib
from importlib import resources

import pytest
from scipy import constants as codata

from rfcheck.model import IonShare
from rfcheck.physics.species import ELECTRON, Species, as_species, ion_mixture, parse_species


def _codata(key: str) -> float:
    return codata.physical_constants[key][0]


@pytest.mark.parametrize(
    "name, charge, codata_key",
    [
        pytest.param("e-", -1, "electron mass", id="e- CODATA electron mass"),
        pytest.param("p+", 1, "proton mass", id="p+ CODATA proton mass"),
        pytest.param("H+", 1, "proton mass", id="H+ is the proton (CODATA)"),
        pytest.param("D+", 1, "deuteron mass", id="D+ CODATA deuteron mass"),
        pytest.param("T+", 1, "triton mass", id="T+ CODATA triton mass"),
        pytest.param("He2+", 2, "alpha particle mass", id="He2+ CODATA alpha mass"),
    ],
)
def test_particles_use_codata_masses(name, charge, codata_key):
    sp = parse_species(name)
    assert sp.charge_number == charge
    assert sp.mass == pytest.approx(_codata(codata_key), rel=1e-15)


# PlasmaPy builds an ion mass as (NIST isotope atomic mass) - Z m_e, the same rule as rfcheck,
# so the two agree to rounding; it derives D+, T+, alpha from atomic masses too, which differs
# from the CODATA particle masses by the electron binding energy and data vintage (~2e-8).
@pytest.mark.parametrize(
    "ours, plasmapy_name, rel",
    [
        pytest.param("Ar+", "Ar-40 1+", 1e-14, id="Ar+ = Ar-40 1+ (PlasmaPy/NIST)"),
        pytest.param("Ar8+", "Ar-40 8+", 1e-14, id="Ar8+ (PlasmaPy/NIST)"),
        pytest.param("Xe+", "Xe-132 1+", 1e-14, id="Xe+ = Xe-132 1+ (PlasmaPy/NIST)"),
        pytest.param("N+", "N-14 1+", 1e-14, id="N+ (PlasmaPy/NIST)"),
        pytest.param("O3+", "O-16 3+", 1e-14, id="O3+ (PlasmaPy/NIST)"),
        pytest.param("He+", "He-4 1+", 1e-14, id="He+ (PlasmaPy/NIST)"),
        pytest.param("Kr+", "Kr-84 1+", 1e-14, id="Kr+ (PlasmaPy/NIST)"),
        pytest.param("O-", "O-16 1-", 1e-14, id="O- negative ion (PlasmaPy/NIST)"),
        pytest.param("U30+", "U-238 30+", 1e-14, id="U30+ (PlasmaPy/NIST)"),
        pytest.param("D+", "D 1+", 5e-8, id="D+ vs PlasmaPy atomic-mass deuteron"),
        pytest.param("He2+", "He-4 2+", 5e-8, id="He2+ vs PlasmaPy atomic-mass alpha"),
    ],
)
def test_ion_masses_match_plasmapy(ours, plasmapy_name, rel):
    particles = pytest.importorskip("plasmapy.particles")
    ref = particles.Particle(plasmapy_name)
    sp = parse_species(ours)
    assert sp.charge_number == ref.charge_number
    assert sp.mass == pytest.approx(ref.mass.si.value, rel=rel)


def test_every_element_mass_matches_plasmapy_isotope():
    """Each atomic mass in species.toml (written from memory) equals the NIST value in PlasmaPy."""
    particles = pytest.importorskip("plasmapy.particles")
    table = tomllib.loads(resources.files("rfcheck").joinpath("data/species.toml").read_text())
    amu = codata.physical_constants["atomic mass constant"][0]
    for symbol, entry in table["elements"].items():
        assert entry["source"], symbol
        isotope = {"D": "D", "T": "T"}.get(symbol, f"{symbol}-{entry['isotope']}")
        ref = particles.Particle(isotope)
        assert ref.atomic_number == entry["atomic_number"], symbol
        assert entry["atomic_mass"] == pytest.approx(ref.mass.si.value / amu, rel=1e-12), symbol


def test_canonical_names_and_aliases():
    assert parse_species("p+") == parse_species("H+")
    assert parse_species(" Ar+ ").name == "Ar+"
    assert parse_species("Ar1+") == parse_species("Ar+")
    assert parse_species("O3+").name == "O3+"
    assert parse_species("Ar").charge_number == 0
    assert ELECTRON.charge == pytest.approx(-codata.e)
    assert parse_species("H+").mass_ratio_to_proton == 1.0
    assert as_species(ELECTRON) is ELECTRON


@pytest.mark.parametrize("bad", ["Ar++", "ar+", "Ar 8+", "Ar0+", "e+", "", "Qq+", "H2+", "He3+", "Ar+8"])
def test_bad_species_names_raise_clear_errors(bad):
    with pytest.raises(ValueError) as info:
        parse_species(bad)
    message = str(info.value)
    assert repr(bad) in message
    assert any(word in message for word in ("expected", "known", "atomic number"))


def test_ion_mixture_accepts_strings_pairs_and_ion_shares():
    ar, o = parse_species("Ar+"), parse_species("O+")
    assert ion_mixture(()) == ()
    assert ion_mixture(None) == ()
    assert ion_mixture("Ar+") == ((ar, 1.0),)
    assert ion_mixture(["Ar+"]) == ((ar, 1.0),)
    assert ion_mixture([("Ar+", 0.25), ("O+", 0.75)]) == ((ar, 0.25), (o, 0.75))
    assert ion_mixture([IonShare("Ar+", 0.5), IonShare("O+", 0.5)]) == ((ar, 0.5), (o, 0.5))
    assert ion_mixture(IonShare("O+", 1.0)) == ((o, 1.0),)
    assert ion_mixture([[Species("X+", 1, 1e-26), 1.0]])[0][0].name == "X+"
    assert ion_mixture({"Ar+": 0.25, "O+": 0.75}) == ((ar, 0.25), (o, 0.75))

    class MutableShare:  # unhashable, like a non-frozen dataclass
        __hash__ = None

        def __init__(self, species, fraction):
            self.species, self.fraction = species, fraction

    assert ion_mixture([MutableShare("Ar+", 0.5), MutableShare("O+", 0.5)]) == ((ar, 0.5), (o, 0.5))


@pytest.mark.parametrize(
    "ions, words",
    [
        pytest.param(["Ar+", "O+"], "need a fraction", id="fractions missing"),
        pytest.param([("Ar+", 0.5), ("O+", 0.2)], "sum to 1", id="fractions do not sum to 1"),
        pytest.param([("Ar+", -0.5), ("O+", 1.5)], ">= 0", id="negative fraction"),
        pytest.param(["e-"], "positive ions", id="electron is not an ion"),
        pytest.param([3.0], "cannot read ion entry", id="not a species"),
    ],
)
def test_ion_mixture_errors(ions, words):
    with pytest.raises(ValueError, match=words):
        ion_mixture(ions)
