"""Importing this module registers every rule family with the registry."""

from rfcheck.rules import cutoff, exposure, line, resonance  # noqa: F401
from rfcheck.rules import window  # noqa: F401  (window.*)
from rfcheck.rules import magnet  # noqa: F401  (magnet.*)
from rfcheck.rules import absorption, access, load  # noqa: F401  (access.*, load.*, absorption.*)
from rfcheck.rules import spec_checks  # noqa: F401  (spec.*)
from rfcheck.rules import inductive  # noqa: F401  (inductive.*)
from rfcheck.rules import ech  # noqa: F401  (ech.*)
