"""What an analysis reads of a run: the model, the envelope and the run's shared cache, and
the one way an analysis caches a result in it (:func:`memo`).

:class:`rfcheck.rules.context.Context` is one such object; any object with these attributes
serves (``shared`` is optional: without it nothing is kept across runs).
"""

from __future__ import annotations

import hashlib
import pickle
from collections import OrderedDict
from typing import Protocol

from rfcheck.model import SourceModel

from .envelope import Envelope


class RunState(Protocol):
    model: SourceModel
    envelope: Envelope
    #: results cached for the run, shared by every rule, keyed by analysis
    _cache: dict
    #: a cache kept across the runs of a sweep (:class:`SharedCache`), or None
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


class SharedCache:
    """Analyses kept across the runs of a sweep (rfcheck.sweep), keyed by a name and the
    exact bytes (pickled) of the model parts the analysis reads, so a run gets a shared
    result only where its own parts are equal to the last bit. Only analyses computed from
    those parts alone, from scratch, are shared, so a result never depends on which runs came
    before (serial, local processes and Dask agree). Bounded: at most `light` entries of
    small results (window analyses), `heavy` of large ones (field models, profiles, traps)."""

    def __init__(self, light: int = 512, heavy: int = 6):
        self._entries: dict[bool, OrderedDict] = {False: OrderedDict(), True: OrderedDict()}
        self._limits = {False: light, True: heavy}
        self.hits = 0
        self.misses = 0

    def get(self, name: str, parts: tuple, compute, *, heavy: bool = False):
        key = (name, hashlib.blake2b(pickle.dumps(parts, protocol=5), digest_size=20).digest())
        entries = self._entries[heavy]
        if key in entries:
            entries.move_to_end(key)
            self.hits += 1
            return entries[key]
        self.misses += 1
        value = compute()
        entries[key] = value
        while len(entries) > self._limits[heavy]:
            entries.popitem(last=False)
        return value
