"""Shared fixtures: the bundled example spec and a way to write variants of it."""

from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "examples"
DEMO = EXAMPLES / "bench-ecr-reactor.toml"


@pytest.fixture
def demo_text() -> str:
    return DEMO.read_text(encoding="utf-8")


@pytest.fixture
def write_spec(tmp_path):
    """Write a spec text into tmp_path and return its path."""

    def write(text: str, name: str = "spec.toml") -> Path:
        p = tmp_path / name
        p.write_text(text, encoding="utf-8")
        return p

    return write


@pytest.fixture(scope="session")
def base_model():
    """The bundled example's frozen model (tests vary it with dataclasses.replace)."""
    from rfcheck.spec import load_spec

    return load_spec(DEMO).model


@pytest.fixture(scope="session")
def policy():
    """The default policy."""
    from rfcheck.rules.policy import load_policy

    return load_policy(None)


# ---------------------------------------------------------------- shared closed forms, helpers
def thick_solenoid_bz(z, coils, r1, r2, turns, scale=1.0):
    """B_z on the axis of thick solenoids of uniform current density (inner radius r1, outer
    r2, `turns` each; coils = [(centre z, length, current per turn)], all in SI):
    B = μ0 j / 2 [u ln((r2 + √(r2² + u²)) / (r1 + √(r1² + u²)))] between the coil's ends
    (D. B. Montgomery, Solenoid Magnet Design, Wiley 1969, ch. 1)."""
    import numpy as np

    mu0 = 1.25663706212e-6  # CODATA 2018

    def term(u):
        return u * np.log((r2 + np.hypot(r2, u)) / (r1 + np.hypot(r1, u)))

    out = 0.0
    for zc, length, amps in coils:
        j = turns * amps * scale / ((r2 - r1) * length)
        out = out + mu0 * j / 2 * (term(z - (zc - length / 2)) - term(z - (zc + length / 2)))
    return out


def run_without_warnings(spec):
    """The run of a spec under the default policy with every warning an error (odd input
    never prints a NumPy or library warning: DEVELOPERS.md, "Physics on odd input")."""
    import warnings

    from rfcheck.rules.policy import load_policy
    from rfcheck.run import run
    from rfcheck.spec import load_spec

    with warnings.catch_warnings():
        warnings.simplefilter("error")
        return run(load_spec(spec), load_policy(None))


def one_finding(run, rule, subject=None):
    """The single finding of `rule` (and `subject`, where given) in a run."""
    (f,) = [f for f in run.findings if f.rule == rule and (subject is None or f.subject == subject)]
    return f
