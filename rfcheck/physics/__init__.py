"""Pure-numpy SI physics: no specs, no rules, no units library.

Frequencies in Hz, fields in T, densities in m^-3, angles in rad, electron temperatures in
eV. The dispersion core's public names are importable from here; the other modules
(waveguide, multilayer, rfpower, fullwave, access, absorption, overdense, exposure) are
imported by name (``from rfcheck.physics.waveguide import line_from_name``) to keep this
package's import light.

Odd input
---------
Every public function (each module's ``__all__``) treats non-finite and out-of-domain input
deliberately and never prints a NumPy warning (``physics/domain.guard_public`` runs each
under ``numpy.errstate(all="ignore")``):

* array (element-wise) functions return the IEEE result where an input is NaN, ±inf, zero,
  negative or huge: NaN where the formula has no value (a NaN input, the square root of a
  negative density, a cutoff that does not exist), ±inf where it diverges (a zero field or
  distance in a denominator), the limit where it has one; finite input in the domain gives
  finite results, and the function's docstring names any NaN it returns on purpose;
* scalar set-up functions (guides, embeddings, layers, grids, paths) raise ValueError (or
  TypeError for a wrong type) with a message, including where a Python float operation
  would divide by zero or overflow;
* integer parameters that set the amount of work (harmonics, mode indices and counts, grid
  points, budgets) are bounded and checked (``domain.check_index``): ValueError beyond.

Callers at the spec boundary have refused non-finite values already; rules decide what a NaN
result means for a finding (``rfcheck.findings.Quantity`` reports it as undefined).
"""

from rfcheck.physics.cma import CMA_REGIONS, CmaRegion, cma_region
from rfcheck.physics.coldplasma import (
    DispersionRoots,
    StixElements,
    n2_branch,
    n2_l_wave,
    n2_o_mode,
    n2_r_wave,
    n2_x_mode,
    refractive_index_squared,
    stix,
)
from rfcheck.physics.collisions import (
    coulomb_logarithm,
    electron_ion_collision_frequency,
    electron_neutral_collision_frequency,
)
from rfcheck.physics.frequencies import (
    critical_density,
    ecr_field,
    electron_cyclotron_frequency,
    electron_plasma_frequency,
    ion_cyclotron_field,
    ion_cyclotron_frequency,
    ion_plasma_frequency,
    l_cutoff_density,
    l_cutoff_frequency,
    lower_hybrid_frequency,
    r_cutoff_density,
    r_cutoff_frequency,
    upper_hybrid_density,
    upper_hybrid_frequency,
)
from rfcheck.physics.species import Species, parse_species
from rfcheck.physics.waves import (
    bohm_gross_frequency,
    electrostatic_ion_cyclotron_frequency,
    em_wave_frequency,
    group_velocity,
    ion_acoustic_speed,
    phase_velocity,
    thermal_speed,
    upper_hybrid_oscillation_frequency,
)

__all__ = [
    "CMA_REGIONS", "CmaRegion", "DispersionRoots", "Species", "StixElements",
    "bohm_gross_frequency", "cma_region", "coulomb_logarithm", "critical_density", "ecr_field",
    "electron_cyclotron_frequency", "electron_ion_collision_frequency",
    "electron_neutral_collision_frequency", "electron_plasma_frequency",
    "electrostatic_ion_cyclotron_frequency", "em_wave_frequency", "group_velocity",
    "ion_acoustic_speed", "ion_cyclotron_field", "ion_cyclotron_frequency",
    "ion_plasma_frequency", "l_cutoff_density", "l_cutoff_frequency", "lower_hybrid_frequency",
    "n2_branch", "n2_l_wave", "n2_o_mode", "n2_r_wave", "n2_x_mode", "parse_species",
    "phase_velocity", "r_cutoff_density", "r_cutoff_frequency", "refractive_index_squared",
    "stix", "thermal_speed", "upper_hybrid_density", "upper_hybrid_frequency",
    "upper_hybrid_oscillation_frequency",
]  # fmt: skip
