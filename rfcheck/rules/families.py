"""Importing this module registers every rule family with the registry."""

from rfcheck.rules import cutoff, line, resonance  # noqa: F401
