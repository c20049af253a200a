"""What an analysis reads of a run: the model, the envelope and the run's shared cache, and
the one way an analysis caches a result in it (:func:`memo`).

:class:`rfcheck.rules.context.Context` is one such object; any object with these attributes
serves (``shared`` is optional: without it nothing is kept across runs).
"""

from __future__ import annotations

from typing import Protocol

from rfcheck.model import SourceModel

from .envelope import Envelope


class RunState(Protocol):
    model: SourceModel
    envelope: Envelope
    #: results cached for the run, shared by every rule, keyed by analysis
    _cache: dict
    #: a cache kept across the runs of a sweep (rfcheck.rules.context.SharedCache), or None
    shared: object | None


def memo(run: RunState, name, parts: tuple, compute, *, heavy: bool = False):
    """compute() once per run under `name`; in a sweep (``run.shared`` set) also once per
    distinct `parts` (every model part the result depends on), through the shared cache's
    ``get(name, parts, compute, heavy=...)``."""
    if name not in run._cache:
        shared = getattr(run, "shared", None)
        run._cache[name] = (compute() if shared is None else
                            shared.get(name, parts, compute, heavy=heavy))
    return run._cache[name]
