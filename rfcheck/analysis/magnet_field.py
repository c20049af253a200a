"""The magnet's field as a run shares it: the field model (unit fields per source), the on-axis
profiles for every envelope current scale, the nominal profile and the trap geometry.

Computed once per run and cached in the run's ``_cache`` (keys "field", "axis_profiles",
"nominal_profile", "trap"), so a run costs one field evaluation, not one per rule.
"""

from __future__ import annotations

import numpy as np

from .state import RunState


def field_model(run: RunState):
    """The magnet's field model (:class:`rfcheck.magnet.sources.FieldModel`) for the chamber."""
    if "field" not in run._cache:
        from rfcheck.magnet.sources import FieldModel

        run._cache["field"] = FieldModel.for_chamber(run.model.magnet, run.model.chamber)
    return run._cache["field"]


def axis_profiles(run: RunState):
    """On-axis profiles (rfcheck.magnet.geometry.AxisProfile) for every envelope current scale."""
    if "axis_profiles" not in run._cache:
        from rfcheck.magnet.geometry import axis_profiles as _profiles

        run._cache["axis_profiles"] = _profiles(field_model(run), run.model.chamber,
                                                run.envelope.current_scale)
    return run._cache["axis_profiles"]


def nominal_profile(run: RunState):
    """The on-axis profile at current scale 1."""
    if "nominal_profile" not in run._cache:
        from rfcheck.magnet.geometry import axis_profile

        run._cache["nominal_profile"] = axis_profile(field_model(run), run.model.chamber, 1.0)
    return run._cache["nominal_profile"]


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
    if "trap" not in run._cache:
        from rfcheck.magnet.geometry import trap_geometries as _geometries

        run._cache["trap"] = _geometries(field_model(run), run.model.chamber,
                                         run.envelope.current_scale)
    return run._cache["trap"]
