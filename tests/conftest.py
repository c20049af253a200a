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
