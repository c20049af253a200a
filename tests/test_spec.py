"""Spec loading: every kind of bad input names the key path, the file line and what was expected."""

import json

import pytest

from rfcheck.spec import InputError, json_schema, load_spec


def test_example_loads_in_si(write_spec, demo_text):
    model = load_spec(write_spec(demo_text)).model
    feed = model.feeds[0]
    assert feed.frequency == 2.45e9
    assert feed.frequency_tolerance == 25e6
    assert model.chamber.radius == pytest.approx(0.075)
    assert model.plasma.density.max == pytest.approx(5e16)
    assert model.magnet.current_tolerance == pytest.approx(0.02)


def _line_of(text: str, needle: str) -> int:
    for i, line in enumerate(text.splitlines(), start=1):
        if needle in line:
            return i
    raise AssertionError(needle)


# (replace this, with that) -> expected entity path, a fragment of the message, the line holding
CASES = [
    pytest.param('"2.45 GHz"', '"2.45 Ghz"', "feed[main].frequency", "did you mean 'GHz'",
                 'frequency = "2.45 Ghz"', id="unit-typo"),
    pytest.param('radius = "75 mm"', 'radius = "75 mT"', "chamber.radius", "not a length",
                 'radius = "75 mT"', id="wrong-dimension"),
    pytest.param('"2.45 GHz"', '"1.5394e10 rad/s"', "feed[main].frequency", "angular frequency",
                 'rad/s', id="rad-per-second"),
    pytest.param('absorption = "ecr"\n', '', "feed[main].absorption", "required key is missing",
                 "[[feed]]", id="missing-key"),
    pytest.param('duty_cycle = "100 %"', 'duty_cycle = "100 %"\ncolour = "red"',
                 "feed[main].colour", "unknown key", 'colour = "red"', id="unknown-key"),
    pytest.param('min = "2e16 m^-3"', 'min = "-5e15 m^-3"', "plasma.density.min",
                 "positive", "-5e15", id="negative-density"),
    pytest.param('min = "2e16 m^-3", max = "5e16 m^-3"', 'min = "5e17 m^-3", max = "5e16 m^-3"',
                 "plasma.density", "min is greater than max", "5e17", id="min-above-max"),
    pytest.param('feed = "main"', 'feed = "mian"', "window[vacuum-window].feed", "no feed 'mian'",
                 'feed = "mian"', id="dangling-feed-reference"),
    pytest.param('{ id = "substrate", z = "260 mm" }', '{ id = "substrate", z = "460 mm" }',
                 "chamber.landmarks[substrate].z", "outside the chamber", "460 mm",
                 id="landmark-outside"),
    pytest.param('fraction = 1.0', 'fraction = 0.7', "plasma.ions", "sum to 0.7", "fraction = 0.7",
                 id="fractions-sum"),
    pytest.param('turns = 300', 'turns = -3', "magnet.coils[downstream].turns", "greater than 0",
                 "turns = -3", id="negative-turns"),
    pytest.param('mode = "R"', 'mode = "Q"', "feed[main].launch.mode", "'R', 'L', 'O' or 'X'",
                 'mode = "Q"', id="bad-choice"),
    pytest.param('"300 W"', '300', "feed[main].max_reflected_power", "string with a unit",
                 "max_reflected_power = 300", id="number-without-unit"),
]


@pytest.mark.parametrize("old, new, path, fragment, line_needle", CASES)
def test_bad_input_names_key_and_line(write_spec, demo_text, old, new, path, fragment, line_needle):
    assert old in demo_text
    text = demo_text.replace(old, new, 1)
    with pytest.raises(InputError) as info:
        load_spec(write_spec(text))
    problems = info.value.problems
    hit = [p for p in problems if p.path == path]
    assert hit, [str(p) for p in problems]
    assert fragment in hit[0].message
    assert hit[0].line == _line_of(text, line_needle)


def test_all_problems_reported_at_once(write_spec, demo_text):
    text = demo_text.replace('"2.45 GHz"', '"2.45 Ghz"').replace('radius = "75 mm"', 'radius = "7"')
    with pytest.raises(InputError) as info:
        load_spec(write_spec(text))
    assert {p.path for p in info.value.problems} >= {"feed[main].frequency", "chamber.radius"}


def test_broken_toml_names_line(write_spec, demo_text):
    text = demo_text.replace("[chamber]", "[chamber", 1)
    with pytest.raises(InputError) as info:
        load_spec(write_spec(text))
    assert info.value.problems[0].line == _line_of(text, "[chamber")
    assert "not valid TOML" in info.value.problems[0].message


def test_missing_file(tmp_path):
    with pytest.raises(InputError, match="not found"):
        load_spec(tmp_path / "nope.toml")


def test_schema_is_json_and_lists_sections():
    schema = json_schema()
    json.dumps(schema)
    assert {"source", "plasma", "chamber", "magnet", "feed"} <= set(schema["properties"])
    assert "schema" in schema["required"]


def _with_axis_table(demo_text: str) -> str:
    start = demo_text.index("coils = [")
    end = demo_text.index("]\n", demo_text.index('{ id = "downstream"')) + 2
    return demo_text[:start] + 'axis_table = { file = "axis.csv" }\n' + demo_text[end:]


@pytest.mark.parametrize("csv, fragment, csv_line", [
    pytest.param("z [mm], B [G]\n0, 1200\n100, 900\n200, abc\n300, 500\n", "expected a number", 4,
                 id="non-numeric-cell"),
    pytest.param("z, B\n0, 1200\n100, 900\n200, 700\n300, 500\n", "no unit", 1, id="no-unit-header"),
    pytest.param("z [mm], B [G]\n0, 1200\n50, 1000\n100, 900\n200, 700\n",
                 "does not cover the chamber", None, id="short-table"),
    pytest.param("z [mm], B [G]\n0, 1200\n300, 900\n", "expected at least 4", None,
                 id="too-few-rows"),
])
def test_measured_table_errors_name_spec_key_and_csv_line(tmp_path, demo_text, csv, fragment,
                                                          csv_line):
    (tmp_path / "axis.csv").write_text(csv, encoding="utf-8")
    spec = tmp_path / "spec.toml"
    text = _with_axis_table(demo_text)
    spec.write_text(text, encoding="utf-8")
    with pytest.raises(InputError) as info:
        load_spec(spec)
    (p,) = info.value.problems
    assert p.path == "magnet.axis_table.file"
    assert p.line == _line_of(text, "axis_table =")
    assert fragment in p.message
    if csv_line:
        assert f"axis.csv:{csv_line}" in p.message


def test_measured_table_round_trip(tmp_path, demo_text):
    # a table in gauss: 1 G = 1e-4 T (SI-equivalent gauss, common practice)
    (tmp_path / "axis.csv").write_text("z [mm], B [G]\n0, 1200\n100, 900\n200, 700\n300, 500\n",
                                       encoding="utf-8")
    spec = tmp_path / "spec.toml"
    spec.write_text(_with_axis_table(demo_text), encoding="utf-8")
    (source,) = load_spec(spec).model.magnet.sources
    assert source.z == pytest.approx((0.0, 0.1, 0.2, 0.3))
    assert source.b == pytest.approx((0.12, 0.09, 0.07, 0.05))


# ----------------------------------------------------------------------------- material spreads

MATERIAL = '''
[[material]]
id = "lot-7-ceramic"
permittivity = 9.8
loss_tangent = 2e-4
frequency = "3 GHz"
permittivity_range = [9.6, 10.0]
loss_tangent_range = [1e-4, 4e-4]
source = "invented demo lot: measured by the supplier"
'''


def test_material_ranges_load_into_the_model(write_spec, demo_text):
    mt = load_spec(write_spec(demo_text + MATERIAL)).model.materials[0]
    assert mt.permittivity_range == (9.6, 10.0) and mt.loss_tangent_range == (1e-4, 4e-4)
    assert mt.frequency == 3e9
    bare = MATERIAL.replace("permittivity_range = [9.6, 10.0]\n", "").replace(
        "loss_tangent_range = [1e-4, 4e-4]\n", "")
    mt = load_spec(write_spec(demo_text + bare, "bare.toml")).model.materials[0]
    assert mt.permittivity_range is None and mt.loss_tangent_range is None


@pytest.mark.parametrize("old, new, key, fragment", [
    pytest.param("[9.6, 10.0]", "[9.9, 10.0]", "permittivity_range", "must contain the permittivity 9.8",
                 id="nominal-below-range"),
    pytest.param("[9.6, 10.0]", "[0.5, 10.0]", "permittivity_range", "below 1", id="eps-below-one"),
    pytest.param("[1e-4, 4e-4]", "[-1e-4, 4e-4]", "loss_tangent_range", "below 0",
                 id="negative-loss-tangent"),
    pytest.param("[1e-4, 4e-4]", "[4e-4, 1e-4]", "loss_tangent_range", "must contain",
                 id="low-above-high"),
    pytest.param("[9.6, 10.0]", "[9.6, 9.8, 10.0]", "permittivity_range", "",
                 id="three-numbers"),
])
def test_bad_material_range_names_key_and_line(write_spec, demo_text, old, new, key, fragment):
    text = demo_text + MATERIAL.replace(old, new)
    with pytest.raises(InputError) as info:
        load_spec(write_spec(text))
    hit = [p for p in info.value.problems if p.path.startswith(f"material[lot-7-ceramic].{key}")]
    assert hit, [str(p) for p in info.value.problems]
    assert fragment in hit[0].message
    assert hit[0].line == _line_of(text, f"{key} = ")
