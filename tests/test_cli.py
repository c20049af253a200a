"""The command line end to end on the bundled example: exit codes, JSON contract, bad input."""

import json
import math

import pytest

from rfcheck.cli import main

from conftest import DEMO


def run_cli(args, capsys):
    code = main([str(a) for a in args])
    out = capsys.readouterr()
    return code, out.out, out.err


@pytest.fixture(scope="module")
def demo_json():
    import contextlib
    import io

    buf = io.StringIO()
    with contextlib.redirect_stdout(buf), contextlib.redirect_stderr(io.StringIO()):
        code = main(["check", str(DEMO), "--json", "-"])
    return code, json.loads(buf.getvalue())


def _walk_numbers(node):
    if isinstance(node, dict):
        for v in node.values():
            yield from _walk_numbers(v)
    elif isinstance(node, list):
        for v in node:
            yield from _walk_numbers(v)
    elif isinstance(node, float):
        yield node


def test_json_contract(demo_json):
    code, doc = demo_json
    assert code in (0, 1)
    assert doc["schema"] == "rfcheck-run/1"
    assert doc["tool"]["name"] == "rfcheck"
    assert len(doc["spec"]["sha256"]) == 64 and len(doc["policy"]["sha256"]) == 64
    assert doc["verdict"] in ("pass", "warn", "fail")
    assert code == (1 if doc["verdict"] == "fail" else 0)
    rules = {f["rule"] for f in doc["findings"]}
    assert {"cutoff.o-mode", "resonance.ecr-in-chamber", "line.waveguide-band"} <= rules
    for f in doc["findings"]:
        assert set(f) >= {"rule", "subject", "status", "severity", "measured", "limit", "margin",
                          "worst_case", "message"}
        for key in ("measured", "limit", "margin"):
            if f[key] is not None:
                assert set(f[key]) >= {"value", "unit"}
    feed = doc["characteristics"]["feeds"]["main"]
    # n_c(2.45 GHz) = 7.44576e16 m^-3 and B_ECR = 87.5235 mT: CODATA, NRL Plasma Formulary form
    # (reference-values.md §1.3)
    assert feed["critical_density"]["value"] == pytest.approx(7.44576e16, rel=1e-5)
    assert feed["ecr_field"]["value"] == pytest.approx(0.0875235, rel=1e-5)
    assert feed["critical_density"]["unit"] == "m^-3" and feed["ecr_field"]["unit"] == "T"
    assert isinstance(feed["ecr_positions"]["value"], list)
    assert "axis_field_min" in doc["characteristics"]["magnet"]
    assert all(math.isfinite(x) for x in _walk_numbers(doc))


def test_strict_turns_warnings_into_failure(capsys):
    code, out, _ = run_cli(["check", DEMO, "--json", "-"], capsys)
    verdict = json.loads(out)["verdict"]
    strict, _, _ = run_cli(["check", DEMO, "--json", "-", "--strict"], capsys)
    assert strict == (1 if verdict in ("warn", "fail") else 0)


def test_text_table_lists_rules(capsys):
    code, out, _ = run_cli(["check", DEMO], capsys)
    assert "cutoff.o-mode" in out and "verdict:" in out


@pytest.mark.parametrize("old, new, key", [
    pytest.param('"2.45 GHz"', '"2.45 Ghz"', "feed[main].frequency", id="unit-typo"),
    pytest.param('radius = "75 mm"', 'radius = "75 mT"', "chamber.radius", id="wrong-dimension"),
    pytest.param('"2.45 GHz"', '"1.5394e10 rad/s"', "feed[main].frequency", id="rad-s"),
    pytest.param('absorption = "ecr"\n', "", "feed[main].absorption", id="missing-key"),
    pytest.param('trap = "none"', 'trap = "none"\nshape = 1', "magnet.shape", id="unknown-key"),
    pytest.param('max = "5e16 m^-3"', 'max = "-5e16 m^-3"', "plasma.density.max", id="negative"),
    pytest.param('min = "2e16 m^-3"', 'min = "5e17 m^-3"', "plasma.density", id="min-gt-max"),
    pytest.param("[chamber]", "[chamber", "not valid TOML", id="broken-toml"),
])
def test_bad_input_exits_2_without_traceback(tmp_path, capsys, demo_text, old, new, key):
    spec = tmp_path / "bad.toml"
    spec.write_text(demo_text.replace(old, new, 1), encoding="utf-8")
    old_pdf = tmp_path / "old.pdf"
    old_pdf.write_bytes(b"previous report")
    code, out, err = run_cli(["check", spec, "--json", tmp_path / "r.json", "--pdf", old_pdf], capsys)
    assert code == 2
    assert key in err
    assert "bad.toml:" in err  # file and line named
    assert "Traceback" not in err + out
    assert not (tmp_path / "r.json").exists()
    assert old_pdf.read_bytes() == b"previous report"  # nothing that was there is lost


def test_missing_file_exits_2(tmp_path, capsys):
    code, _, err = run_cli(["check", tmp_path / "nothing.toml"], capsys)
    assert code == 2 and "not found" in err and "Traceback" not in err


def test_usage_error_exits_2(capsys):
    code, _, err = run_cli(["check"], capsys)
    assert code == 2


def test_rules_and_explain(capsys):
    code, out, _ = run_cli(["rules"], capsys)
    assert code == 0 and "resonance.ecr-in-chamber" in out
    code, out, _ = run_cli(["explain", "cutoff.o-mode"], capsys)
    assert code == 0 and "Why it matters" in out and "source:" in out
    code, _, err = run_cli(["explain", "cutoff.o-mod"], capsys)
    assert code == 2 and "cutoff.o-mode" in err


def test_init_writes_a_spec_that_loads_and_never_overwrites(tmp_path, capsys):
    from rfcheck.spec import load_spec

    target = tmp_path / "new.toml"
    code, _, _ = run_cli(["init", target], capsys)
    assert code == 0
    load_spec(target)
    code, _, err = run_cli(["init", target], capsys)
    assert code == 2 and "exists" in err


def test_schema_prints_json(capsys):
    code, out, _ = run_cli(["schema"], capsys)
    assert code == 0 and json.loads(out)["title"] == "rfcheck source specification"


def test_output_to_a_folder_or_missing_folder_exits_2(tmp_path, capsys):
    code, _, err = run_cli(["check", DEMO, "--json", tmp_path], capsys)
    assert code == 2 and "is a folder" in err
    code, _, err = run_cli(["check", DEMO, "--pdf", tmp_path / "no" / "r.pdf"], capsys)
    assert code == 2 and "does not exist" in err and "Traceback" not in err
