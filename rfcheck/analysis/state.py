"""What an analysis reads of a run: the model, the envelope and the run's shared cache.

:class:`rfcheck.rules.context.Context` is one such object; any object with these three
attributes serves (a sweep may hand the analyses its own).
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
