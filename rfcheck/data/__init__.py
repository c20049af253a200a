"""Packaged data tables (TOML), each value with its source."""

from __future__ import annotations

import functools
import tomllib
from importlib import resources


@functools.lru_cache(maxsize=None)
def load(name: str) -> dict:
    """Parse the packaged data file `name` (e.g. "policy.toml") once."""
    return tomllib.loads(resources.files(__name__).joinpath(name).read_text(encoding="utf-8"))
