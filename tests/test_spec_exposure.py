"""The [exposure] section of a spec and site reference-level tables: every problem names its
key path and file line (exit code 2), a site file must be a regular file next to the spec,
and its content is never echoed in messages."""

import os

import pytest

from conftest import DEMO
from rfcheck.cli import main
from rfcheck.spec import InputError, load_spec

SITE = '''["site-2026"]
title = "Site levels 2026"
standard = "Invented site rule 7, after ICNIRP 2020 Table 5"
edition = "2026"
population = "occupational"
scope = "whole-body"
averaging_time = "30 min"
confidence = "H (the site's own table)"
segments = [
  { f_min = 1e8, f_max = 3e11, quantity = "S", coefficient = 20.0, exponent = 0.0 },
]
'''


def _exposure(demo_text: str, block: str) -> str:
    start = demo_text.index("[exposure]")
    end = demo_text.index("[review]")
    return demo_text[:start] + block + "\n" + demo_text[end:]


def _line_of(text: str, needle: str) -> int:
    return next(i for i, line in enumerate(text.splitlines(), 1) if needle in line)


def _problems(tmp_path, text):
    spec = tmp_path / "spec.toml"
    spec.write_text(text, encoding="utf-8")
    with pytest.raises(InputError) as info:
        load_spec(spec)
    return info.value.problems


def test_bundled_example_uses_the_derived_leak_and_a_controlled_area():
    exp = load_spec(DEMO).model.exposure
    assert exp.leak.model == "derived"
    assert {p.kind for p in exp.leak.paths} == {"seam", "aperture"}
    assert exp.controlled_area.radius == pytest.approx(1.1)
    assert exp.table.id == "icnirp-2020-occupational" and exp.table.origin == "shipped"


def test_legacy_survey_form_still_reads(tmp_path):
    text = _exposure(DEMO.read_text(), '[exposure]\ntable = "icnirp-2020-public"\n'
                     'leak = { power_density = "1 mW/cm^2", at = "5 cm" }\noccupied_distance = "0.5 m"\n')
    (tmp_path / "spec.toml").write_text(text)
    exp = load_spec(tmp_path / "spec.toml").model.exposure
    assert exp.leak.model == "survey"
    (r,) = exp.leak.readings
    assert r.power_density == pytest.approx(10.0) and r.distance == pytest.approx(0.05)


def test_site_table_replaces_the_shipped_ones(tmp_path):
    (tmp_path / "site-levels.toml").write_text(SITE)
    text = _exposure(DEMO.read_text(), '[exposure]\ntable_file = "site-levels.toml"\n'
                     'occupied_distance = "0.5 m"\n')
    (tmp_path / "spec.toml").write_text(text)
    t = load_spec(tmp_path / "spec.toml").model.exposure.table
    assert t.id == "site-2026" and t.origin == "site-levels.toml" and len(t.sha256) == 64


@pytest.mark.parametrize("segment, key, fragment", [
    pytest.param('{ f_min = 1e8, f_max = 1e7, quantity = "S", coefficient = 20.0, exponent = 0.0 }',
                 "site-2026.segments[0].f_max", "above f_min", id="f_max-below-f_min"),
    pytest.param('{ f_min = 1e8, f_max = 3e11, quantity = "Q", coefficient = 20.0, exponent = 0.0 }',
                 "site-2026.segments[0].quantity", "expected quantity", id="bad-quantity"),
    pytest.param('{ f_min = 1e8, f_max = 3e11, quantity = "S", coefficient = "SECRET-TOKEN", exponent = 0.0 }',
                 "site-2026.segments[0].coefficient", "finite number", id="text-for-a-number"),
    pytest.param('{ f_min = 1e8, f_max = 3e11, quantity = "S", coefficient = 20.0, exponent = 0.0, colour = "SECRET-TOKEN" }',
                 "site-2026.segments[0].colour", "unknown key", id="unknown-key"),
])
def test_site_table_errors_name_key_and_line_and_never_echo(tmp_path, demo_text, segment, key,
                                                            fragment):
    site = SITE.replace(SITE.splitlines()[-2], "  " + segment + ",")
    (tmp_path / "site-levels.toml").write_text(site)
    text = _exposure(demo_text, '[exposure]\ntable_file = "site-levels.toml"\noccupied_distance = "0.5 m"\n')
    problems = _problems(tmp_path, text)
    hit = [p for p in problems if p.path == key]
    assert hit, [str(p) for p in problems]
    assert fragment in hit[0].message
    assert hit[0].file.endswith("site-levels.toml")
    assert hit[0].line == _line_of(site, segment[:30])
    assert any(p.path == "exposure.table_file" for p in problems)
    assert not any("SECRET-TOKEN" in str(p) for p in problems)


@pytest.mark.parametrize("name, fragment", [
    pytest.param("../site-levels.toml", "bare name", id="parent-folder"),
    pytest.param("sub/site-levels.toml", "bare name", id="sub-folder"),
    pytest.param("missing.toml", "not found", id="missing"),
    pytest.param("folder", "not a regular file", id="a-folder"),
    pytest.param("link.toml", "symbolic link", id="symlink"),
])
def test_site_file_must_be_a_regular_file_next_to_the_spec(tmp_path, demo_text, name, fragment):
    (tmp_path / "folder").mkdir()
    (tmp_path.parent / "site-levels.toml").write_text(SITE)
    os.symlink(tmp_path.parent / "site-levels.toml", tmp_path / "link.toml")
    block = f'[exposure]\ntable_file = "{name}"\noccupied_distance = "0.5 m"\n'
    text = _exposure(demo_text, block)
    (p,) = _problems(tmp_path, text)
    assert p.path == "exposure.table_file" and fragment in p.message
    assert p.line == _line_of(text, "table_file")


@pytest.mark.parametrize("block, key, fragment", [
    pytest.param('table = "icnirp-2021"', "exposure.table", "unknown reference-level table",
                 id="unknown-table"),
    pytest.param('leak = { model = "derived", paths = [ { id = "f", kind = "seam", size = "1 m" } ] }',
                 "exposure.leak.paths[f]", "needs its attenuation", id="seam-without-attenuation"),
    pytest.param('leak = { paths = [ { id = "f", kind = "seam", attenuation = "-20 dB", size = "1 m" } ] }',
                 "exposure.leak.paths[f].attenuation", "above 0 dB", id="negative-attenuation"),
    pytest.param('leak = { paths = [ { id = "v", kind = "aperture", shape = "circular", depth = "5 mm" } ] }',
                 "exposure.leak.paths[v].diameter", "needs diameter", id="aperture-without-diameter"),
    pytest.param('leak = { paths = [ { id = "v", kind = "aperture", shape = "circular", diameter = "5 mm", depth = "5 mm", count = 50 } ] }',
                 "exposure.leak.paths[v]", "give size", id="panel-without-size"),
    pytest.param('leak = { paths = [ { id = "f", kind = "seam", attenuation = "50 dB", size = "1 m", feeds = ["mian"] } ] }',
                 "exposure.leak.paths[f].feeds", "no feed 'mian'", id="dangling-feed"),
    pytest.param('leak = { power_density = "1 mW/cm^2" }', "exposure.leak", "needs both",
                 id="survey-without-distance"),
    pytest.param('controlled_area = { z = { start = "2 m", end = "-1 m" }, radius = "1 m" }',
                 "exposure.controlled_area.z", "start must be below end", id="area-upside-down"),
])
def test_exposure_errors_name_key_and_line(tmp_path, demo_text, block, key, fragment):
    head = 'table = "icnirp-2020-occupational"\n' if not block.startswith("table") else ""
    text = _exposure(demo_text, f"[exposure]\n{head}{block}\noccupied_distance = \"0.5 m\"\n")
    problems = _problems(tmp_path, text)
    hit = [p for p in problems if p.path == key]
    assert hit, [str(p) for p in problems]
    assert fragment in hit[0].message
    assert hit[0].line == _line_of(text, block.split("=")[0].strip())


def test_bad_site_table_exits_2(tmp_path, demo_text, capsys):
    (tmp_path / "site-levels.toml").write_text(SITE.replace("[\"site-2026\"]", "[\"site-2026\""))
    spec = tmp_path / "spec.toml"
    spec.write_text(_exposure(demo_text, '[exposure]\ntable_file = "site-levels.toml"\n'
                              'occupied_distance = "0.5 m"\n'))
    assert main(["check", str(spec)]) == 2
    err = capsys.readouterr().err
    assert "site-levels.toml:1" in err and "not valid TOML" in err
