"""Every public physics function on odd input: NaN, ±inf, 0, negative and huge values.

Each function of ``rfcheck.physics.__all__`` and of every physics module's ``__all__`` is
called with valid arguments (the table BASE below), then with one numeric argument (or one
element of an array argument, or one field of a window layer) replaced by an odd value,
under ``warnings.simplefilter("error")``. Accepted outcomes (the physics package docstring,
"Odd input"): a ValueError or TypeError with a message, or a result (the IEEE values, NaN or
±inf included, which that docstring documents for odd input). A NumPy RuntimeWarning, any
other exception or a call that runs for more than a few seconds fails the test. On valid
input every result is finite unless the function's docstring names its NaN or inf. The
bundled examples are run under the same filter.
"""

from __future__ import annotations

import importlib
import inspect
import math
import pkgutil
import re
import signal
import warnings
from collections.abc import Callable

import numpy as np
import pytest

import rfcheck.physics as physics
from rfcheck.physics.fullwave import slab_reflection
from rfcheck.physics.matching import Element
from rfcheck.physics.multilayer import Embedding, Layer, embedding_ports, layer_matrix
from rfcheck.physics.polarisation import characteristic_polarisations
from rfcheck.physics.waveguide import rectangular_guide
from rfcheck.physics.window_spread import LayerSpread, StackPoint

ODD = {"nan": math.nan, "+inf": math.inf, "-inf": -math.inf, "zero": 0.0, "negative": -1.0,
       "huge": 1e300}

MODULES = [physics] + [importlib.import_module(f"rfcheck.physics.{m.name}")
                       for m in pkgutil.iter_modules(physics.__path__)
                       if m.name != "domain"]  # the guard itself, not physics


def public_functions() -> dict[str, Callable]:
    """'module.name' -> function, for every function in a physics __all__ (first module that
    defines it)."""
    out: dict[str, Callable] = {}
    seen: set[int] = set()
    for mod in MODULES:
        for name in getattr(mod, "__all__", ()):
            obj = getattr(mod, name)
            if inspect.isfunction(obj) or (callable(obj) and hasattr(obj, "cache_info")):
                if id(obj) in seen:
                    continue
                seen.add(id(obj))
                out[f"{obj.__module__.rsplit('.', 1)[-1]}.{name}"] = obj
    return out


FUNCTIONS = public_functions()

# ---- valid arguments for every function (2.45 GHz, an ECR-like plasma)
F, B, N, TE = 2.45e9, 0.0875, 1e17, 10.0
Z = np.linspace(0.0, 0.1, 41)
B_PATH = np.linspace(0.12, 0.06, 41)  # high-field launch through the ECR (0.0875 T)
N_PATH = np.linspace(1e15, 5e16, 41)
GLASS = Layer(3.8, 1e-4, 0.01)
SPREAD = LayerSpread((0.0099, 0.01, 0.0101), (3.7, 3.8, 3.9), (1e-4, 1e-4, 2e-4))
EMB = Embedding()
MATCH_L = [Element("capacitor", "shunt", 1e-11, 5e-9),
           Element("capacitor", "series", 5e-12, 1e-9)]


def _slab():
    return slab_reflection(Z, 1.0 - np.linspace(0.0, 0.5, 41) + 0.01j, F, n2_right=1.0)


def _ports():
    return embedding_ports(np.array([F]), EMB)


BASE: dict[str, dict] = {
    "frequencies.electron_plasma_frequency": dict(n_e=N),
    "frequencies.ion_plasma_frequency": dict(n_i=N, ion="Ar+"),
    "frequencies.electron_cyclotron_frequency": dict(b=B),
    "frequencies.ion_cyclotron_frequency": dict(b=B, ion="Ar+"),
    "frequencies.upper_hybrid_frequency": dict(n_e=N, b=B),
    "frequencies.lower_hybrid_frequency": dict(n_e=N, b=B, ion="Ar+"),
    "frequencies.r_cutoff_frequency": dict(n_e=N, b=B),
    "frequencies.l_cutoff_frequency": dict(n_e=N, b=B),
    "frequencies.critical_density": dict(f=F),
    "frequencies.ecr_field": dict(f=F, harmonic=1, kinetic_energy_ev=0.0),
    "frequencies.r_cutoff_density": dict(f=F, b=0.05),
    "frequencies.l_cutoff_density": dict(f=F, b=B),
    "frequencies.upper_hybrid_density": dict(f=F, b=0.05),
    "frequencies.ion_cyclotron_field": dict(f=13.56e6, ion="Ar+", harmonic=1),
    "cma.cma_region": dict(x=0.5, y=0.5),
    "rays.trace_ray": dict(frequency=F, start=(0.0, 0.0, 0.0), direction=(0.0, 0.0, 1.0),
                           mode="O", b_field=lambda p: np.zeros((len(p), 3)),
                           density=lambda p: np.full(len(p), 1e16), max_length=0.05),
    "rays.trace_rays": dict(frequency=F, starts=((0.0, 0.0, 0.0), (0.01, 0.0, 0.0)),
                            directions=((0.0, 0.0, 1.0),), mode="O",
                            b_field=lambda p: np.zeros((len(p), 3)),
                            density=lambda p: np.full(len(p), 1e16), max_length=0.05),
    "rays.beam_samples": dict(waist_position=(0.0, 0.0, 0.0), direction=(0.0, 0.0, 1.0),
                              waist=0.01, rings=1, per_ring=4),
    "rays.trace_beam": dict(frequency=F, waist_position=(0.0, 0.0, 0.0),
                            direction=(0.0, 0.0, 1.0), waist=0.01, mode="O",
                            b_field=lambda p: np.zeros((len(p), 3)),
                            density=lambda p: np.full(len(p), 1e16), rings=1, per_ring=3,
                            max_length=0.05),
    "coldplasma.stix": dict(f=F, b=B, n_e=N, ions=(("Ar+", 1.0),), collision_frequency=1e6),
    "coldplasma.refractive_index_squared": dict(f=F, b=B, n_e=N, theta=0.5),
    "coldplasma.n2_branch": dict(f=F, b=B, n_e=N, theta=0.5, mode="R"),
    "coldplasma.n2_o_mode": dict(f=F, b=B, n_e=N),
    "coldplasma.n2_x_mode": dict(f=F, b=B, n_e=N),
    "coldplasma.n2_r_wave": dict(f=F, b=B, n_e=N),
    "coldplasma.n2_l_wave": dict(f=F, b=B, n_e=N),
    "collisions.coulomb_logarithm": dict(n_e=N, t_e=TE, z=1),
    "collisions.electron_ion_collision_frequency": dict(n_e=N, t_e=TE, z=1),
    "collisions.neutral_density": dict(pressure=0.2, temperature=300.0),
    "collisions.mean_electron_speed": dict(t_e=TE),
    "collisions.momentum_transfer_cross_section": dict(gas="Ar", energy_ev=TE),
    "collisions.maxwellian_rate_coefficient": dict(cross_section=lambda e: 1e-19 + 0 * e,
                                                   t_e=TE),
    "collisions.momentum_transfer_rate_coefficient": dict(gas="Ar", t_e=TE),
    "collisions.electron_neutral_collision_frequency": dict(gas="Ar", pressure=0.2, t_e=TE,
                                                            gas_temperature=300.0),
    "collisions.known_gases": dict(),
    "species.parse_species": dict(name="Ar+"),
    "species.as_species": dict(value="Ar+"),
    "species.ion_mixture": dict(ions=(("Ar+", 1.0),)),
    "waves.thermal_speed": dict(t_ev=TE),
    "waves.em_wave_frequency": dict(k=100.0, n_e=N),
    "waves.phase_velocity": dict(f=F, n_e=N),
    "waves.group_velocity": dict(f=F, n_e=N),
    "waves.bohm_gross_frequency": dict(k=1e3, n_e=N, t_e=TE, gamma=3.0),
    "waves.ion_acoustic_speed": dict(t_e=TE, ion="Ar+", t_i=0.1, gamma_e=1.0, gamma_i=3.0),
    "waves.electrostatic_ion_cyclotron_frequency": dict(k=100.0, b=B, t_e=TE, ion="Ar+",
                                                        t_i=0.1),
    "waves.upper_hybrid_oscillation_frequency": dict(k=1e3, n_e=N, b=B, t_e=TE, gamma=3.0),
    "absorption.collisional_attenuation": dict(f=F, n_e=N, collision_frequency=1e7),
    "absorption.collisional_attenuation_weak": dict(f=F, n_e=N, collision_frequency=1e7),
    "absorption.attenuation_from_index": dict(f=F, n2=0.5 + 0.01j),
    "absorption.collisional_regime": dict(f=F, collision_frequency=1e7),
    "absorption.optical_depth_o1": dict(f=F, n_e=N, t_e_ev=TE, l_b=0.05),
    "absorption.optical_depth_o2": dict(f=F, n_e=N / 4, t_e_ev=TE, l_b=0.05),
    "absorption.optical_depth_x2": dict(f=F, n_e=N / 4, t_e_ev=TE, l_b=0.05),
    "absorption.optical_depth_xm": dict(harmonic=3, f=F, n_e=N / 8, t_e_ev=TE, l_b=0.05),
    "access.launch_path_access": dict(z=Z, b=B_PATH, n_e=N_PATH, f=F, mode="R"),
    "access.path_landmarks": dict(z=Z, b=B_PATH, n_e=N_PATH, f=F),
    "access.mode_n2": dict(f=F, b=B_PATH, n_e=N_PATH, mode="R"),
    "aperture_pattern.te10_h_plane": dict(x=np.array([0.0, 1.0, np.pi / 2, 4.0])),
    "aperture_pattern.te11_h_plane": dict(z=np.array([0.0, 1.0, 1.8411837813, 6.0])),
    "aperture_pattern.aperture_power_pattern": dict(
        frequency=F, theta=np.array([0.0, 0.3, 1.2]), phi=np.array([0.0, 0.7, 1.5]),
        shape="rectangular", width=0.09, height=0.045),
    "aperture_pattern.aperture_main_lobe": dict(
        frequency=F, theta=np.array([0.0, 0.3, 1.2]), phi=np.array([0.0, 0.7, 1.5]),
        shape="circular", radius=0.05),
    "aperture_pattern.aperture_radiated_power": dict(frequency=F, shape="circular", radius=0.05),
    "aperture_pattern.aperture_rays": dict(frequency=F, centre=(0.0, 0.0, 0.0),
                                           direction=(0.0, 0.0, 1.0), shape="rectangular",
                                           width=0.09, height=0.045, rings=2, per_ring=8),
    "apertures.tube_cutoff": dict(shape="circular", diameter=0.01),
    "apertures.tube_attenuation_db": dict(shape="circular", depth=0.05, f=F, diameter=0.01),
    "apertures.array_attenuation_db": dict(single_db=60.0, count=10),
    "exposure.reference_level": dict(table="icnirp-2020-occupational", f=F),
    "exposure.leak_power_density": dict(s_measured=1.0, d_measured=0.05, d=0.5),
    "exposure.distance_for_level": dict(s_measured=1.0, d_measured=0.05, s_limit=0.1),
    "exposure.point_leak_power_density": dict(power=1e-3, d=0.5, directivity=3.0),
    "exposure.leaked_power": dict(forward_power=1e3, attenuation_db=60.0),
    "exposure.far_field_distance": dict(size=0.05, f=F),
    "exposure.exposure_ratio": dict(power_densities=np.array([1.0, 2.0]),
                                    levels=np.array([10.0, 50.0])),
    "fullwave.slab_reflection": dict(z=Z, n2=1.0 - np.linspace(0.0, 0.5, 41) + 0.01j,
                                     frequency=F),
    "fullwave.x_mode_slab_reflection": dict(
        z=Z, stix_s_d=(1.0 - np.linspace(0.0, 0.3, 41) + 0.01j, 0.1 + 0 * Z), frequency=F),
    "fullwave.evanescent_layers": dict(z=Z, n2=1.0 - np.linspace(0.0, 2.0, 41), frequency=F),
    "fullwave.wkb_tunnelling_factor": dict(
        z=np.linspace(0.0, 0.1, 801),
        n2=0.5 - np.exp(-((np.linspace(0.0, 0.1, 801) - 0.05) / 0.01) ** 2), frequency=F),
    "fullwave.mirror_return": dict(response=_slab(), mirror=1.0, n_left=1.0, n_right=1.0),
    "multilayer.complex_permittivity": dict(eps_r=3.8, tan_delta=1e-4),
    "multilayer.loss_tangent_scale": dict(quoted_frequency=1e10, frequency=F),
    "multilayer.te10_embedding": dict(a=0.08636),
    "multilayer.guide_embedding": dict(cutoff=1.74e9),
    "multilayer.plane_wave_embedding": dict(angle=0.2, eps_incident=1.0, eps_exit=1.0),
    "multilayer.line_embedding": dict(line=rectangular_guide(0.08636, 0.04318)),
    "multilayer.window_response": dict(f=np.array([F]), layers=[GLASS]),
    "multilayer.embedding_ports": dict(f=np.array([F]), embedding=EMB),
    "multilayer.layer_matrix": dict(ports=_ports(), layer=GLASS),
    "multilayer.scattering": dict(ports=_ports(), a=1.0, b=0.0, c=0.0, d=1.0),
    "multilayer.reflection_band": dict(layers=[GLASS], f_centre=F, limit=0.2, points=201),
    "multilayer.worst_reflection_over_thickness": dict(f=np.array([F]), layers=[GLASS],
                                                       tolerance=1e-4),
    "multilayer.window_materials": dict(),
    "multilayer.material_layer": dict(name="fused-silica", thickness=0.01),
    "overdense.ox_conversion_efficiency": dict(f=F, l_n=0.02, b=B, n_parallel=0.5,
                                               n_perp=0.0),
    "overdense.ox_optimal_n_parallel": dict(f=F, b=B),
    "overdense.ox_optimal_angle": dict(f=F, b=B),
    "overdense.ox_conversion_window": dict(f=F, l_n=0.02, b=B),
    "overdense.n_components_from_angles": dict(polar=0.5, azimuth=0.3),
    "overdense.cutoff_scale_length": dict(z=Z, n_e=np.linspace(1e16, 2e17, 41), f=F),
    "overdense.surface_wave_density": dict(f=F, eps_d=3.8),
    "polarisation.characteristic_polarisations": dict(f=F, b=B / 2, theta=0.5,
                                                      pair=("R", "L")),
    "polarisation.launched_jones": dict(kind="linear", e_angle=0.3),
    "polarisation.mode_fractions": dict(
        waves=characteristic_polarisations(F, B / 2, 0.5, ("R", "L")),
        jones=np.array([1.0, 0.0], complex)),
    "rfpower.vswr": dict(gamma_mag=0.2),
    "rfpower.return_loss_db": dict(gamma_mag=0.2),
    "rfpower.te10_field_amplitude": dict(power=1e3, a=0.08636, b=0.04318, f=F),
    "rfpower.te10_peak_field": dict(power=1e3, a=0.08636, b=0.04318, f=F, gamma_mag=0.2),
    "rfpower.te10_max_power": dict(a=0.08636, b=0.04318, f=F),
    "rfpower.te11_field_amplitude": dict(power=1e3, diameter=0.09, f=F),
    "rfpower.te11_peak_field": dict(power=1e3, diameter=0.09, f=F, gamma_mag=0.2),
    "rfpower.te11_max_power": dict(diameter=0.09, f=F),
    "rfpower.max_net_power": dict(p_max=1e6, gamma_mag=0.2),
    "rfpower.max_forward_power": dict(p_max=1e6, gamma_mag=0.2),
    "rfpower.air_collision_frequency": dict(pressure=101325.0),
    "rfpower.breakdown_field": dict(pressure=101325.0, gas_factor=1.0, f=F),
    "rfpower.below_cutoff_attenuation_db": dict(diameter=0.01, length=0.05, f=F),
    "rfpower.reflected_power": dict(forward_power=1e3, gamma_mag=0.2),
    "rfpower.transmitted_power": dict(forward_power=1e3, transmittance=0.9),
    "rfpower.absorbed_power": dict(forward_power=1e3, absorptance=0.01),
    "rfpower.average_power": dict(peak_power=1e3, duty_cycle=0.5),
    "rfpower.disc_temperature_rise": dict(absorbed=10.0, conductivity=1.4, thickness=0.01),
    "waveguide.rectangular_cutoff": dict(a=0.08636, b=0.04318, m=1, n=0),
    "waveguide.rectangular_mode_cutoffs": dict(a=0.08636, b=0.04318),
    "waveguide.circular_te_cutoff": dict(radius=0.045, m=1, n=1),
    "waveguide.circular_tm_cutoff": dict(radius=0.045, m=0, n=1),
    "waveguide.circular_mode_cutoffs": dict(radius=0.045),
    "waveguide.coaxial_te11_cutoff": dict(inner_diameter=0.007, outer_diameter=0.016),
    "inductive.collisionless_skin_depth": dict(n_e=1e17),
    "inductive.collisional_skin_depth": dict(n_e=1e17, f=13.56e6, nu=1e9),
    "inductive.dc_conductivity": dict(n_e=1e17, nu=1e9),
    "inductive.plasma_skin_depth": dict(n_e=1e17, f=13.56e6, nu=3e7),
    "inductive.skin_depth_regime": dict(f=13.56e6, nu=3e7),
    "inductive.solenoid_inductance": dict(turns=3, radius=0.1, length=0.1),
    "inductive.coil_ac_resistance": dict(conductor_length=2.0, conductor_diameter=6e-3,
                                         f=13.56e6),
    "inductive.transformer_load": dict(n_e=np.array([1e16, 1e17]), f=13.56e6, nu=3e7, turns=3,
                                       coil_radius=0.1, coil_length=0.1, plasma_radius=0.08,
                                       coil_resistance=0.1),
    "inductive.coil_drive": dict(power=1e3, impedance=np.array([10 + 200j])),
    "inductive.eh_transition_density": dict(n_e=np.geomspace(1e13, 1e20, 200), f=13.56e6,
                                            nu=3e7, turns=3, coil_radius=0.11,
                                            coil_length=0.08, plasma_radius=0.09),
    "helicon.radial_wavenumber": dict(radius=0.05),
    "helicon.antenna_wavenumber": dict(antenna_type="nagoya-iii", length=0.15),
    "helicon.antenna_band": dict(antenna_type="saddle", length=0.15),
    "helicon.helicon_density": dict(b=0.035, f=13.56e6, k_z=20.9, radius=0.05),
    "helicon.helicon_wavenumber": dict(n_e=3e18, b=0.035, f=13.56e6, radius=0.05),
    "helicon.branch_merge_field": dict(f=13.56e6, k_z=20.9, radius=0.05),
    "helicon.on_helicon_branch": dict(b=0.035, f=13.56e6, k_z=20.9, radius=0.05),
    "matching.l_section_q": dict(r_high=50.0, r_low=2.0),
    "matching.element_reactance": dict(kind="capacitor", value=1e-10, f=13.56e6),
    "matching.input_impedance": dict(elements=MATCH_L, values=np.array([7e-10, 4e-11]),
                                     z_load=1.2 + 300j, f=13.56e6),
    "matching.match_network": dict(elements=MATCH_L, z_load=np.array([1.2 + 300j]), f=13.56e6),
    "coaxial.coaxial_field_amplitude": dict(power=1e3, inner_diameter=0.007, outer_diameter=0.016),
    "coaxial.coaxial_peak_field": dict(power=1e3, inner_diameter=0.007, outer_diameter=0.016,
                                       gamma_mag=0.3),
    "coaxial.coaxial_max_power": dict(inner_diameter=0.007, outer_diameter=0.016,
                                      e_breakdown=3e6),
    "coaxial.coaxial_conductor_attenuation": dict(f=13.56e6, inner_diameter=0.007,
                                                  outer_diameter=0.016),
    "coaxial.coaxial_wall_heating": dict(average_power=1e3, f=13.56e6, inner_diameter=0.007,
                                         outer_diameter=0.016, gamma_mag=0.3),
    "waveguide.coaxial_characteristic_impedance": dict(inner_diameter=0.007,
                                                       outer_diameter=0.016),
    "waveguide.guide_wavelength": dict(f=F, cutoff=1.74e9),
    "waveguide.corrugated_guide": dict(diameter=0.0635),
    "quasioptical.he11_field_amplitude": dict(power=5e5, diameter=0.0635),
    "quasioptical.he11_peak_field": dict(power=5e5, diameter=0.0635, gamma_mag=0.1),
    "quasioptical.he11_max_power": dict(diameter=0.0635, e_max=3e6),
    "quasioptical.mitre_bend_loss": dict(f=1.4e11, diameter=0.0635),
    "quasioptical.db_to_fraction": dict(loss_db=0.3),
    "quasioptical.line_run_loss": dict(f=1.4e11, diameter=0.0635, length=30.0, bends=6),
    "quasioptical.he11_defaults": dict(),
    "waveguide.te_wave_impedance": dict(f=F, cutoff=1.74e9),
    "waveguide.tm_wave_impedance": dict(f=F, cutoff=1.74e9),
    "waveguide.rectangular_guide": dict(a=0.08636, b=0.04318),
    "waveguide.circular_guide": dict(diameter=0.09),
    "waveguide.coaxial_line": dict(inner_diameter=0.007, outer_diameter=0.016),
    "waveguide.free_space": dict(),
    "waveguide.line_from_name": dict(name="WR-340"),
    "waveguide.line_names": dict(),
    "window_spread.spread_response": dict(f=np.array([F]),
                                          values=np.array([[[0.01, 3.8, 1e-4]]])),
    "window_spread.worst_over_spread": dict(f=np.array([F]), spreads=[SPREAD]),
    "window_spread.band_over_spread": dict(f_centre=F, limit=0.2, spreads=[SPREAD],
                                           points=201),
}


def test_every_public_function_has_base_arguments():
    assert set(FUNCTIONS) == set(BASE), (set(FUNCTIONS) ^ set(BASE))


def _numbers(obj, depth=0):
    """Every number in a result (arrays, tuples, named tuples, dicts, dataclasses)."""
    if depth > 6:
        return
    if isinstance(obj, (bool, str, bytes)) or obj is None or callable(obj):
        return
    if isinstance(obj, (int, float, complex, np.number)):
        yield complex(obj)
    elif isinstance(obj, np.ndarray):
        if obj.dtype.kind in "fciu":
            yield from (complex(x) for x in obj.ravel()[:10_000])
        elif obj.dtype == object:
            for x in obj.ravel()[:1000]:
                yield from _numbers(x, depth + 1)
    elif isinstance(obj, dict):
        for v in obj.values():
            yield from _numbers(v, depth + 1)
    elif isinstance(obj, (list, tuple)):
        for v in obj:
            yield from _numbers(v, depth + 1)
    elif hasattr(obj, "__dataclass_fields__"):
        for k in obj.__dataclass_fields__:
            yield from _numbers(getattr(obj, k), depth + 1)


_NON_FINITE_WORDS = re.compile(r"\bNaN\b|\bnan\b|\binf\b|∞|\binfinite\b|\binfinity\b")


def _documents_non_finite(func) -> bool:
    """Whether the function (or the result type it returns) documents NaN or inf results."""
    docs = [inspect.getdoc(func) or ""]
    ret = inspect.signature(func).return_annotation
    if isinstance(ret, str):
        ret = getattr(inspect.getmodule(func), ret, None)
    if inspect.isclass(ret):
        docs.append(inspect.getdoc(ret) or "")
    return any(_NON_FINITE_WORDS.search(d) for d in docs)


def _variants(args: dict):
    """(label, arguments) with one numeric input made odd."""
    for key, val in args.items():
        for label, odd in ODD.items():
            if isinstance(val, bool) or isinstance(val, str):
                continue
            if isinstance(val, (int, float)):
                if isinstance(val, int) and label in ("nan", "+inf", "-inf"):
                    yield f"{key}={label}", {**args, key: odd}
                    yield f"{key}={label}(int)", {**args, key: odd}
                else:
                    yield f"{key}={label}", {**args, key: odd}
            elif isinstance(val, complex):
                yield f"{key}={label}", {**args, key: complex(odd, 0.0)}
            elif isinstance(val, np.ndarray) and val.dtype.kind in "fc" and val.size:
                arr = val.copy()
                arr.flat[arr.size // 2] = odd
                yield f"{key}[mid]={label}", {**args, key: arr}
            elif isinstance(val, Layer):
                for field in Layer._fields:
                    yield (f"{key}.{field}={label}",
                           {**args, key: val._replace(**{field: odd})})
            elif isinstance(val, list) and val and isinstance(val[0], (Layer, LayerSpread)):
                item = val[0]
                for field in item._fields:
                    fv = getattr(item, field)
                    new = odd if not isinstance(fv, tuple) else (odd, odd, odd) if \
                        label != "negative" else tuple(-x for x in fv)
                    yield (f"{key}[0].{field}={label}",
                           {**args, key: [item._replace(**{field: new})]})
            elif isinstance(val, tuple) and val and all(isinstance(x, np.ndarray) for x in val):
                for i, part in enumerate(val):
                    arr = np.array(part, dtype=complex)
                    arr.flat[arr.size // 2] = odd
                    yield (f"{key}[{i}][mid]={label}",
                           {**args, key: tuple(arr if j == i else p for j, p in enumerate(val))})


CASES = [pytest.param(name, label, kwargs, id=f"{name}:{label}")
         for name in sorted(BASE) if name in FUNCTIONS
         for label, kwargs in _variants(BASE[name])]


class _TooSlow(Exception):
    pass


def _alarm(*_):
    raise _TooSlow


def _call(func, kwargs, seconds: float = 10.0):
    """Call under warnings-as-errors, with NumPy set to warn, stopped after `seconds`."""
    old = signal.signal(signal.SIGALRM, _alarm)
    signal.setitimer(signal.ITIMER_REAL, seconds)
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            with np.errstate(all="warn"):  # make sure NumPy would warn where it could
                return func(**kwargs)
    except _TooSlow:
        pytest.fail(f"{func.__name__} ran for more than {seconds} s: an unbounded iteration")
    finally:
        signal.setitimer(signal.ITIMER_REAL, 0)
        signal.signal(signal.SIGALRM, old)


@pytest.mark.parametrize("name", sorted(BASE))
def test_valid_arguments_give_finite_results(name):
    out = _call(FUNCTIONS[name], BASE[name])
    nums = list(_numbers(out))
    bad = [x for x in nums if not (math.isfinite(x.real) and math.isfinite(x.imag))]
    assert not bad or _documents_non_finite(FUNCTIONS[name]), (name, bad[:3])


def test_the_odd_input_convention_is_documented_and_applied():
    doc = physics.__doc__
    assert "Odd input" in doc and "NaN" in doc and "ValueError" in doc
    unguarded = [n for n, f in FUNCTIONS.items()
                 if not hasattr(f, "cache_info") and not getattr(f, "__odd_input_guarded__", False)]
    assert not unguarded


@pytest.mark.parametrize("name, label, kwargs", CASES)
def test_odd_input_gives_a_documented_outcome(name, label, kwargs):
    func = FUNCTIONS[name]
    try:
        out = _call(func, kwargs)
    except (ValueError, TypeError) as exc:
        assert str(exc), f"{name}: a ValueError without a message"
        return
    # a result: its numbers are IEEE values (the convention), and it is a result, not junk
    nums = list(_numbers(out))
    assert all(isinstance(x, complex) for x in nums)
    assert out is not None or name.endswith(("known_gases", "line_names"))


@pytest.mark.parametrize("harmonic", [21, 1e300, math.inf, 2.5])
def test_optical_depth_harmonic_is_bounded(harmonic):
    from rfcheck.physics.absorption import optical_depth_xm

    with pytest.raises(ValueError, match="harmonic"):
        optical_depth_xm(harmonic, F, 1e16, TE, 0.05)


@pytest.mark.parametrize("m, n", [(0, 0), (51, 1), (1, 10**9), (math.nan, 1)])
def test_circular_mode_indices_are_bounded(m, n):
    from rfcheck.physics.waveguide import circular_te_cutoff, circular_tm_cutoff

    for func in (circular_te_cutoff, circular_tm_cutoff):
        with pytest.raises(ValueError):
            func(0.045, m, n)


def test_zero_division_in_scalar_set_up_is_a_value_error():
    from rfcheck.physics.multilayer import te10_embedding

    with pytest.raises(ValueError, match="te10_embedding"):
        te10_embedding(0.0)


@pytest.mark.parametrize("example, policy", [
    ("bench-ecr-reactor.toml", None), ("min-b-ion-source.toml", None),
    ("min-b-ion-source.toml", "min-b-site-policy.toml"), ("starter.toml", None)])
def test_examples_run_under_warnings_as_errors(example, policy):
    from conftest import EXAMPLES
    from rfcheck.findings import Status
    from rfcheck.rules.policy import load_policy
    from rfcheck.run import run
    from rfcheck.spec import load_spec

    with warnings.catch_warnings():
        warnings.simplefilter("error")
        result = run(load_spec(EXAMPLES / example),
                     load_policy(EXAMPLES / policy if policy else None))
    errors = [f.message for f in result.findings if f.status is Status.ERROR]
    assert not errors and result.findings
