"""The magnet's field as a run shares it: the field model (unit fields per source), the on-axis
profiles for every envelope current scale, the nominal profile and the trap geometry.

Computed once per run and cached in the run's ``_cache`` (keys "field", "axis_profiles",
"nominal_profile", "trap"), so a run costs one field evaluation, not one per rule; in a sweep
also kept across runs whose magnet, chamber and current scales are equal to the last bit
(:func:`rfcheck.analysis.state.memo`; a field model with a multipole is not shared).
"""

from __future__ import annotations

import numpy as np

from .state import RunState, memo


def magnet_parts(run: RunState) -> tuple:
    """The model parts the field analyses read (the key of their entries in a sweep)."""
    return (run.model.magnet, run.model.chamber, run.envelope.current_scale)


def field_model(run: RunState):
    """The magnet's field model (:class:`rfcheck.magnet.sources.FieldModel`) for the chamber."""
    if "field" not in run._cache:
        from rfcheck.magnet.sources import FieldModel

        def build():
            return FieldModel.for_chamber(run.model.magnet, run.model.chamber)

        # a field model with a multipole memoises points across calls (its values then
        # come from batches that depend on the calls before): shared only without one
        shared = getattr(run, "shared", None)
        if shared is not None and not any(
                type(s).__name__ == "Multipole" for s in run.model.magnet.sources):
            run._cache["field"] = shared.get("field", magnet_parts(run), build, heavy=True)
        else:
            run._cache["field"] = build()
    return run._cache["field"]


def axis_profiles(run: RunState):
    """On-axis profiles (rfcheck.magnet.geometry.AxisProfile) for every envelope current scale."""
    from rfcheck.magnet.geometry import axis_profiles as _profiles

    return memo(run, "axis_profiles", magnet_parts(run), lambda: _profiles(
        field_model(run), run.model.chamber, run.envelope.current_scale), heavy=True)


def nominal_profile(run: RunState):
    """The on-axis profile at current scale 1."""
    from rfcheck.magnet.geometry import axis_profile

    return memo(run, "nominal_profile", magnet_parts(run), lambda: axis_profile(
        field_model(run), run.model.chamber, 1.0), heavy=True)


def axis_z(run: RunState) -> np.ndarray:
    """Axial sample points over the chamber (m), those of the on-axis profiles."""
    return axis_profiles(run)[0].z


def axis_field(run: RunState, scale: np.ndarray | float | None = None) -> np.ndarray:
    """|B|(z) on the axis at `axis_z`, shape (n_scale, n_z), T.

    With `scale` None, the envelope's current scales (from the cached profiles); a scale of
    exactly 1 uses the cached nominal profile; other scales are evaluated on demand.
    """
    if scale is None:
        return np.stack([p.b for p in axis_profiles(run)])
    scales = np.atleast_1d(np.asarray(scale, dtype=float))
    if scales.size == 1 and scales[0] == 1.0:
        return nominal_profile(run).b[None, :]
    b = field_model(run).axis_field(axis_z(run), scale=scales)
    return np.abs(np.atleast_2d(b))


def trap_geometries(run: RunState):
    """Trap geometry (B_min, maxima, wall field, last closed |B|) per envelope current scale."""
    from rfcheck.magnet.geometry import trap_geometries as _geometries

    return memo(run, "trap", magnet_parts(run), lambda: _geometries(
        field_model(run), run.model.chamber, run.envelope.current_scale), heavy=True)
