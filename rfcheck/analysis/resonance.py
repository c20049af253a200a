"""Where the electron-cyclotron resonance of each feed lies on the axis (no verdicts): the
harmonic each absorption mechanism relies on, and the resonance crossings of the on-axis
field at every current scale and frequency of the envelope, cached per run."""

from __future__ import annotations

#: harmonic number of the electron-cyclotron resonance each absorption mechanism relies on
ECR_HARMONIC = {"ecr": 1, "ecr-harmonic-2": 2}
