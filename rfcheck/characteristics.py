"""Characteristic numbers of the source, for the JSON and the report (no verdicts here).

Each entry is computed through the public physics and magnet functions, at nominal values
(current scale 1, nominal frequency) unless its name says otherwise.
"""

from __future__ import annotations

import numpy as np

from rfcheck.findings import quantity_json as _q
from rfcheck.physics.frequencies import critical_density, ecr_field
from rfcheck.rules.context import Context


def characteristics(ctx: Context) -> dict:
    model = ctx.model
    out: dict = {"feeds": {}, "magnet": {}, "plasma": {}}
    out["plasma"] = {
        "density_min": _q(model.plasma.density.min, "m^-3"),
        "density_max": _q(model.plasma.density.max, "m^-3"),
        "electron_temperature_min": _q(model.plasma.electron_temperature.min, "eV"),
        "electron_temperature_max": _q(model.plasma.electron_temperature.max, "eV"),
    }
    z = ctx.axis_z
    try:
        b_nom = ctx.axis_field(1.0)[0]
        out["magnet"] = {
            "axis_field_min": _q(float(b_nom.min()), "T"),
            "axis_field_max": _q(float(b_nom.max()), "T"),
            "axis_field_min_position": _q(float(z[np.argmin(b_nom)]), "m"),
            "current_tolerance": _q(model.magnet.current_tolerance, "1"),
        }
    except Exception as exc:  # a broken field model is reported by the rules; keep the run
        b_nom = None
        out["magnet"] = {"error": f"{type(exc).__name__}: {exc}"}
    if b_nom is not None:
        from rfcheck.analysis.magnet import magnet_characteristics

        for key, value in magnet_characteristics(ctx).items():
            out["magnet"].setdefault(key, value)
    from rfcheck.analysis.resonance import ECR_HARMONIC

    for feed in model.feeds:
        h = ECR_HARMONIC.get(feed.absorption, 1)
        b_res = float(ecr_field(feed.frequency, harmonic=h))
        entry = {
            "frequency": _q(feed.frequency, "Hz"),
            "frequency_tolerance": _q(feed.frequency_tolerance, "Hz"),
            "ecr_field": _q(float(ecr_field(feed.frequency)), "T"),
            "resonance_field": _q(b_res, "T"),
            "resonance_harmonic": h,
            "critical_density": _q(float(critical_density(feed.frequency)), "m^-3"),
            "peak_to_critical_density": _q(model.plasma.density.max /
                                           float(critical_density(feed.frequency)), "1"),
            "average_power": _q(feed.average_power, "W"),
        }
        if feed.absorption not in ECR_HARMONIC:
            # an inductive or helicon drive has no electron-cyclotron resonance to place:
            # its characteristics keep only what applies to it
            for key in ("ecr_field", "resonance_field", "resonance_harmonic"):
                entry.pop(key)
        elif b_nom is not None:
            from rfcheck.magnet.geometry import resonance_crossings

            rel_tol = feed.frequency_tolerance / feed.frequency
            crossings = resonance_crossings(ctx.nominal_profile(), b_res, rel_tol)
            entry["ecr_positions"] = {"value": [c.z for c in crossings], "unit": "m"}
            entry["ecr_gradients"] = {"value": [c.gradient for c in crossings], "unit": "T/m"}
            entry["ecr_zone_widths"] = {"value": [c.width for c in crossings], "unit": "m"}
        if feed.absorption == "inductive" and feed.coil is not None:
            from rfcheck.analysis.inductive import eh_transition

            try:  # the E-to-H transition density (inductive.h-mode judges the envelope by it)
                n_eh, _ = eh_transition(ctx, feed)
                entry["eh_transition_density"] = _q(float(n_eh), "m^-3")
            except ValueError as exc:  # an unphysical coil: inductive.* report it
                entry["eh_transition_density"] = {"value": None, "unit": "m^-3",
                                                  "reason": str(exc)[:200]}
        out["feeds"][feed.id] = entry
    from rfcheck.analysis.window import window_characteristics

    out["windows"] = window_characteristics(ctx)
    from rfcheck.analysis.launch_path_data import path_characteristics

    out["paths"] = path_characteristics(ctx)
    from rfcheck.physics.exposure import SMALL_LEAK_DIRECTIVITY
    from rfcheck.analysis.exposure import exposure_characteristics

    directivity = ctx.option("exposure.leak-level", "leak_directivity")
    out["exposure"] = exposure_characteristics(ctx, directivity or SMALL_LEAK_DIRECTIVITY)
    from rfcheck.findings import _finite

    return _finite(out)  # lists of crossings etc. carry raw floats: no NaN may reach the JSON
