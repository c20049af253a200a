"""The analyses layer sits below the rules: no rfcheck.analysis module imports rfcheck.rules
(DESIGN.md §9, DEVELOPERS.md "Analyses and verdicts"), and the shared field analyses serve
any object that carries a model, an envelope and a cache, not only a rule's Context."""

from __future__ import annotations

import ast
import importlib
import pkgutil
import subprocess
import sys
from pathlib import Path
from types import SimpleNamespace

import numpy as np
import pytest

import rfcheck.analysis

ANALYSIS_DIR = Path(rfcheck.analysis.__file__).parent
MODULES = sorted(m.name for m in pkgutil.iter_modules([str(ANALYSIS_DIR)]))


def _imported_names(path: Path) -> list[str]:
    """Every module an import statement of `path` names, relative ones made absolute."""
    package = "rfcheck.analysis"
    names = []
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"), str(path))):
        if isinstance(node, ast.Import):
            names += [alias.name for alias in node.names]
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.rsplit(".", node.level - 1)[0] if node.level > 1 else package
                module = f"{base}.{node.module}" if node.module else base
            else:
                module = node.module or ""
            names.append(module)
            names += [f"{module}.{alias.name}" for alias in node.names]
    return names


def test_the_layer_has_its_modules():
    # the moved analyses are all here (a rename that drops one fails this list)
    for name in ("envelope", "parts", "launch_path", "launch_path_data", "window",
                 "window_material", "magnet", "magnet_field", "exposure", "resonance"):
        assert name in MODULES


@pytest.mark.parametrize("name", MODULES)
def test_no_analysis_module_imports_the_rules(name):
    importlib.import_module(f"rfcheck.analysis.{name}")
    bad = [n for n in _imported_names(ANALYSIS_DIR / f"{name}.py")
           if n == "rfcheck.rules" or n.startswith("rfcheck.rules.")]
    assert bad == [], f"rfcheck.analysis.{name} imports {bad}"


def test_the_import_check_sees_relative_and_absolute_imports(tmp_path):
    # the checker itself: both spellings of an import of the rules are caught
    src = tmp_path / "probe.py"
    src.write_text("from ..rules import context\nimport rfcheck.rules.registry\n", encoding="utf-8")
    names = _imported_names(src)
    assert "rfcheck.rules" in names and "rfcheck.rules.registry" in names


def test_importing_every_analysis_loads_no_rule_module():
    code = ("import importlib, sys\n"
            f"for n in {MODULES!r}: importlib.import_module('rfcheck.analysis.' + n)\n"
            "print(sorted(k for k in sys.modules if k.startswith('rfcheck.rules')))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True).stdout.strip()
    assert out == "[]"


def test_field_analyses_serve_any_run_state(base_model):
    # the Context's shared physics is rfcheck.analysis.magnet_field: a plain object with model,
    # envelope and _cache gets the same numbers, and each result is computed once per cache
    from rfcheck.analysis import magnet_field
    from rfcheck.analysis.envelope import Envelope
    from rfcheck.rules.context import Context

    env = Envelope.of(base_model)
    ctx = Context(base_model, env)
    run = SimpleNamespace(model=base_model, envelope=env, _cache={})
    np.testing.assert_array_equal(magnet_field.axis_field(run), ctx.axis_field())
    np.testing.assert_array_equal(magnet_field.axis_z(run), ctx.axis_z)
    assert magnet_field.trap_geometries(run) is magnet_field.trap_geometries(run)
    assert {"field", "axis_profiles", "trap"} <= set(run._cache)
