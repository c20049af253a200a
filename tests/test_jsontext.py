"""The results' JSON text (rfcheck/jsontext.py) against the standard library's encoder and
decoder (Python's json module, the reference): same values, ordinary JSON, no NaN."""

from __future__ import annotations

import json
import math

import pytest

from rfcheck import jsontext

CASES = [
    {},
    [],
    {"a": 1, "b": [1, 2.5, "x"], "c": {"d": None, "e": True}},
    {"findings": [{"rule": "r.%d" % i, "measured": {"value": i / 7, "unit": "1"},
                   "message": "ν/ω = 8e-05 – " + "x" * (i * 20)} for i in range(12)]},
    {"deep": {"a": {"b": {"c": {"d": [1, {"e": [2, 3]}]}}}}},
    ["é", "\u2028", "\"quoted\"", "back\\slash", 1e308, -0.0, 5e-324],
]


@pytest.mark.parametrize("obj", CASES)
def test_round_trip_equals_standard_encoder(obj):
    text = jsontext.dumps(obj)
    assert text.endswith("\n")
    assert json.loads(text) == json.loads(json.dumps(obj, indent=2)) == obj
    assert text.isascii()  # non-ASCII escaped, as json.dumps does by default


def test_outer_levels_one_item_per_line():
    obj = CASES[3]
    lines = jsontext.dumps(obj).splitlines()
    # one line per finding field at depth 2, so a line diff names the field that moved
    assert sum('"rule": ' in line for line in lines) == 12
    assert all(len(line) <= jsontext.WIDTH + 8 or '"message"' in line for line in lines)


@pytest.mark.parametrize("bad", [math.nan, math.inf, -math.inf])
def test_non_finite_refused(bad):
    with pytest.raises(ValueError):
        jsontext.dumps({"x": [bad]})
