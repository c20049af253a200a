"""Cautions chosen from the spec (rfcheck.report.cautions): X-rays where hot electrons are
plausible, beryllia only where used, cryogens only with superconducting coils, the static
field with its lines, and always the RF, high-voltage and scope statements."""

import dataclasses

import pytest

from conftest import EXAMPLES
from rfcheck.model import Coil, WindowLayer
from rfcheck.report.cautions import select_cautions
from rfcheck.rules.policy import load_policy
from rfcheck.run import run
from rfcheck.spec import load_spec

ALWAYS = {"rf-exposure", "high-voltage", "scope"}


def _ids(items):
    return {c["id"] for c in items}


def test_bench_reactor_leaves_out_x_rays_cryogens_and_beryllia(base_model):
    shown, omitted = select_cautions(base_model)
    assert ALWAYS <= _ids(shown)
    assert {"x-rays", "cryogens", "toxic-windows"} == _ids(omitted)
    reasons = {c["id"]: c["reason"] for c in omitted}
    assert "trap 'none'" in reasons["x-rays"]
    # 400 turns × 66 A over 50 mm × 60 mm = 8.8 A/mm²: a resistive winding
    assert "30 A/mm²" in reasons["cryogens"]


def test_min_b_source_shows_x_rays_cryogens_and_its_static_lines():
    result = run(load_spec(EXAMPLES / "min-b-ion-source.toml"), load_policy(None))
    shown, omitted = select_cautions(result.model, result.findings)
    ids = _ids(shown)
    assert {"x-rays", "cryogens", "static-field"} <= ids and "toxic-windows" in _ids(omitted)
    static = next(c for c in shown if c["id"] == "static-field")
    implant = next(f for f in result.findings if f.subject == "magnet, implant-warning line")
    assert f"{implant.details['radius']:.3g} m radially" in static["note"]
    assert "0.5 mT" in static["note"] and "3 mT" in static["note"]


def test_beryllia_window_shows_the_toxic_caution(base_model):
    w = base_model.windows[0]
    bad = dataclasses.replace(w, layers=(WindowLayer("beryllia", 0.005),))
    shown, _ = select_cautions(dataclasses.replace(base_model, windows=(bad,)))
    toxic = next(c for c in shown if c["id"] == "toxic-windows")
    assert "beryllia in window vacuum-window" in toxic["note"]


@pytest.mark.parametrize("current, cryogenic", [
    pytest.param(66.0, False, id="8.8 A/mm2: resistive (common practice, 5-20 A/mm2)"),
    pytest.param(800.0, True, id="107 A/mm2: superconducting"),
])
def test_cryogens_inferred_from_winding_current_density(base_model, current, cryogenic):
    coil = dataclasses.replace(base_model.magnet.sources[0], current=current)
    assert isinstance(coil, Coil)
    magnet = dataclasses.replace(base_model.magnet, sources=(coil,))
    shown, _ = select_cautions(dataclasses.replace(base_model, magnet=magnet))
    assert ("cryogens" in _ids(shown)) is cryogenic


def test_declared_cryogenic_magnet_wins(base_model):
    exp = dataclasses.replace(base_model.exposure, cryogenic_magnet=True)
    shown, _ = select_cautions(dataclasses.replace(base_model, exposure=exp))
    assert "cryogens" in _ids(shown)


def test_no_caution_calls_anything_safe():
    shown, omitted = select_cautions(None)
    text = " ".join(c["text"] for c in shown).lower().replace("safety", "")
    assert " safe " not in f" {text} " and "safe distance" not in text
