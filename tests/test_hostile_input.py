"""Hostile and extreme input: each reproducer of a refusal that was once missing.

Every case runs the real command line (rfcheck.cli.main, in-process, with a time budget) and
checks the contract of DEVELOPERS.md "Hostile input": exit 2 with the key and the file line,
no traceback, no warning, no file content echoed, nothing written; or a run (exit 0/1) with
strict JSON. The ranges come from rfcheck.limits (one table, with reasons); the expected
refusals are stated here independently of that table where they are facts of the trade
(2.45 GHz heating, a source is not 1e305 m wide).
"""

from __future__ import annotations

import os
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "tools"))

import fuzz_inputs as fz  # noqa: E402

from rfcheck import inputfiles  # noqa: E402

BENCH = (ROOT / "examples" / "bench-ecr-reactor.toml").read_text(encoding="utf-8")
POLICY = (ROOT / "examples" / "min-b-site-policy.toml").read_text(encoding="utf-8")
BUDGET = 30.0


def run(tmp_path, spec: str, policy: str | None = None, files=None) -> fz.Outcome:
    return fz.run_case(fz.Case(spec, policy=policy, files=files or {}), tmp_path / "run", BUDGET)


def refused(out: fz.Outcome) -> list[str]:
    """The error lines of a refused run, after checking the refusal keeps the contract."""
    assert out.problems == [], out.problems
    assert out.code == 2, (out.code, out.stderr[:2000])
    assert out.json_text is None
    return [ln for ln in out.stderr.splitlines() if ln.startswith("error:")]


def line_of(text: str, needle: str) -> int:
    return next(i for i, ln in enumerate(text.split("\n"), start=1) if needle in ln)


# --------------------------------------------------------------------------- numbers


@pytest.mark.parametrize("old, new, key, side", [
    ('frequency = "2.45 GHz"', 'frequency = "1e308 GHz"', "feed[main].frequency", "infinite"),
    ('frequency = "2.45 GHz"', 'frequency = "2.45 mHz"', "feed[main].frequency", "below"),
    ('radius = "75 mm"', 'radius = "1e308 mm"', "chamber.radius", "above"),
    ('radius = "75 mm"', 'radius = "1e-300 mm"', "chamber.radius", "below"),
    ('current = "66 A"', 'current = "1e308 A"', "magnet.coils[upstream].current", "above"),
    ('power = "1.5 kW"', 'power = "1e300 kW"', "feed[main].power", "above"),
    ('min = "2e16 m^-3"', 'min = "2e40 m^-3"', "plasma.density.min", "above"),
])
def test_numbers_outside_the_plausible_range_are_refused_with_key_line_and_range(
        tmp_path, old, new, key, side):
    # a ZeroDivisionError (1e308 GHz), a non-finite interpolator (1e308 A) and a run still
    # going after 120 s (radius 1e308 mm) before the ranges existed
    assert old in BENCH
    spec = BENCH.replace(old, new, 1)
    errors = refused(run(tmp_path, spec))
    hit = [e for e in errors if key in e]
    assert hit, errors
    expected = "is not a finite frequency once converted to SI" if side == "infinite" \
        else f"is {side} the range"
    assert expected in hit[0]


def test_range_message_gives_the_line_of_the_value(tmp_path):
    spec = BENCH.replace('frequency = "2.45 GHz"', 'frequency = "1e308 GHz"', 1)
    errors = refused(run(tmp_path, spec))
    line = line_of(spec, '"1e308 GHz"')
    assert any(f"spec.toml:{line}: feed[main].frequency:" in e and "100 kHz to 1 THz" in e
               for e in errors), errors


@pytest.mark.parametrize("value", ["inf", "nan", "-inf"])
def test_non_finite_plain_numbers_are_refused(tmp_path, value):
    # TOML has inf and nan literals; a plain number (no unit) must be finite as well
    spec = BENCH.replace("fraction = 1.0", f"fraction = {value}", 1)
    errors = refused(run(tmp_path, spec))
    assert any("plasma.ions[0].fraction" in e and "finite" in e for e in errors), errors


# --------------------------------------------------------------------------- nesting and size


@pytest.mark.parametrize("depth", [100, 1000, 100_000])
def test_deep_nesting_is_refused_not_a_recursion_error(tmp_path, depth):
    errors = refused(run(tmp_path, fz.deep_text(depth)))
    assert any("nested" in e for e in errors), errors


def test_deep_nesting_in_a_policy_is_refused(tmp_path):
    policy = POLICY + "\nextra = " + "[" * 5000 + "1" + "]" * 5000 + "\n"
    errors = refused(run(tmp_path, BENCH, policy=policy))
    assert any("policy.toml" in e and "nested" in e for e in errors), errors


def test_too_many_window_layers_are_refused_before_any_work(tmp_path):
    # 18 toleranced layers took 46 s and 2.8 GB before the bound; 101 would have been refused
    # only by memory
    layer = '{ material = "fused-silica", thickness = "1 mm", thickness_tolerance = "0.05 mm" }'
    assert "layers = [" in BENCH
    start = BENCH.index("layers = [")
    end = BENCH.index("]", BENCH.index("}", start)) + 1
    spec = BENCH[:start] + "layers = [" + ", ".join([layer] * 101) + "]" + BENCH[end:]
    out = run(tmp_path, spec)
    errors = refused(out)
    assert any(".layers:" in e and "101 entries; at most 100" in e for e in errors), errors
    assert out.seconds < BUDGET


def test_spec_above_the_size_limit_is_refused_unread(tmp_path):
    spec = BENCH + "# " + "x" * (inputfiles.SIZE_LIMITS["specification"][0]) + "\n"
    errors = refused(run(tmp_path, spec))
    assert any("bytes; at most" in e for e in errors), errors


def test_a_two_megabyte_wrong_value_is_not_echoed_whole(tmp_path):
    spec = BENCH.replace('name = "', 'name = ' + "[" + ", ".join(['"x"'] * 200_000) + "]\n#", 1)
    out = run(tmp_path, spec)
    refused(out)
    assert len(out.stderr) < 5_000, len(out.stderr)


# --------------------------------------------------------------------------- text


@pytest.mark.parametrize("char", ["\x01", "\x0b", "\u2028", "\ufeff", "\u202e", "\x1b[2J"])
def test_control_and_format_characters_in_free_text_are_refused(tmp_path, char):
    spec = BENCH.replace('name = "', 'name = "Bench' + char.encode("unicode_escape").decode()
                         .replace("\\x", "\\u00") + " ", 1)
    errors = refused(run(tmp_path, spec))
    assert any("source.name" in e and "control or format character" in e for e in errors), errors
    assert all("\x1b" not in e for e in errors)


def test_a_ten_thousand_character_feed_id_is_refused(tmp_path):
    spec = BENCH.replace('id = "main"', 'id = "' + "f" * 10_000 + '"', 1)
    out = run(tmp_path, spec)
    errors = refused(out)
    assert any("at most 64" in e for e in errors), errors
    assert len(out.stderr) < 20_000


# --------------------------------------------------------------------------- lines and names


def test_line_numbers_after_a_line_separator_in_a_comment(tmp_path):
    # U+2028 inside a comment is valid TOML and is not a line break for TOML or an editor
    spec = "# note\u2028still the same line\n" + BENCH.replace(
        'frequency = "2.45 GHz"', 'frequency = "2.45 Ghz"', 1)
    errors = refused(run(tmp_path, spec))
    line = line_of(spec, '"2.45 Ghz"')
    assert any(f"spec.toml:{line}: feed[main].frequency" in e for e in errors), errors


def test_missing_top_level_table_gets_a_line_and_names_the_table(tmp_path):
    start = BENCH.index("[chamber]")
    end = BENCH.index("\n[", start + 1)
    spec = BENCH[:start] + BENCH[end + 1:]
    errors = refused(run(tmp_path, spec))
    assert any("spec.toml:1: chamber: required table [chamber] is missing" in e
               for e in errors), errors


def test_unknown_key_with_a_capital_letter_is_named(tmp_path):
    spec = BENCH.replace('frequency = "2.45 GHz"', 'frequency = "2.45 GHz"\nColour = "red"', 1)
    errors = refused(run(tmp_path, spec))
    line = line_of(spec, "Colour")
    assert any(f"spec.toml:{line}: feed[main].Colour: unknown key" in e for e in errors), errors


# --------------------------------------------------------------------------- input files


SECRET = "root:x:0:0:rfcheck-test-secret"


@pytest.fixture()
def secret_file(tmp_path):
    path = tmp_path / "probe.txt"
    path.write_text(SECRET + "\nPATH=/secret/bin\nHOME=/secret\n", encoding="utf-8")
    return path


@pytest.mark.parametrize("name", ["/etc/passwd", "../../../../etc/passwd", "/proc/self/environ",
                                  "/dev/zero", "/dev/null", "/", ".", "missing.csv"])
def test_measured_file_paths_that_are_not_tables(tmp_path, name):
    out = run(tmp_path, fz.measured_spec(name))
    errors = refused(out)
    assert any("magnet.axis_table.file" in e for e in errors), errors
    assert "root:" not in out.stderr and "PATH=" not in out.stderr


def test_measured_file_content_is_never_echoed(tmp_path, secret_file):
    out = run(tmp_path, fz.measured_spec(str(secret_file)))
    errors = refused(out)
    assert any("header column 1" in e for e in errors), errors
    assert "rfcheck-test-secret" not in out.stderr and "/secret/bin" not in out.stderr


def test_a_symlink_to_a_file_is_read_as_that_file_and_not_echoed(tmp_path, secret_file):
    link = tmp_path / "link.csv"
    link.symlink_to(secret_file)
    out = run(tmp_path, fz.measured_spec(str(link)))
    refused(out)
    assert "rfcheck-test-secret" not in out.stderr


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="no FIFOs on this system")
def test_a_fifo_never_blocks(tmp_path):
    fifo = tmp_path / "fifo.csv"
    os.mkfifo(fifo)
    out = run(tmp_path, fz.measured_spec(str(fifo)))
    errors = refused(out)
    assert any("FIFO" in e for e in errors), errors
    assert out.seconds < 10


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="no FIFOs on this system")
def test_a_spec_that_is_a_fifo_or_a_folder_is_refused(tmp_path):
    from rfcheck.spec import InputError, load_spec

    fifo = tmp_path / "spec.toml"
    os.mkfifo(fifo)
    for path, words in ((fifo, "FIFO"), (tmp_path, "folder")):
        with pytest.raises(InputError) as info:
            load_spec(path)
        assert words in str(info.value)


def test_measured_file_above_its_size_limit(tmp_path, monkeypatch):
    # the limit itself is 32 MB (rfcheck.inputfiles.SIZE_LIMITS); a small one proves the path
    monkeypatch.setitem(inputfiles.SIZE_LIMITS, "measured field file", (1000, "test limit"))
    out = run(tmp_path, fz.measured_spec("axis.csv"), files={"axis.csv": fz.axis_table(200)
                                                            .encode()})
    errors = refused(out)
    assert any("bytes; at most 1000" in e for e in errors), errors


def test_measured_file_of_procfs_kind_is_bounded_without_a_size(tmp_path, monkeypatch):
    # /proc files report size 0: the reader must stop at the limit, not trust the size
    monkeypatch.setitem(inputfiles.SIZE_LIMITS, "measured field file", (10, "test limit"))
    if not Path("/proc/self/environ").exists():
        pytest.skip("no procfs")
    with pytest.raises(inputfiles.InputFileError) as info:
        inputfiles.read_input("/proc/self/environ", "measured field file")
    assert "larger than 10 bytes" in info.value.message


def test_a_valid_measured_table_still_runs(tmp_path):
    out = run(tmp_path, fz.measured_spec("axis.csv"), files={"axis.csv": fz.axis_table().encode()})
    assert out.problems == []
    assert out.code in (0, 1), out.stderr[:2000]


# --------------------------------------------------------------------------- found by tools/fuzz.py


@pytest.mark.parametrize("value", ["3.0e+9 eV dB", "-0 Pa dB", "200 A]A\u128a", "1 ((("])
def test_unit_text_pint_cannot_parse_is_an_input_error(tmp_path, value):
    # pint raised AttributeError (a logarithmic unit combined with another) and TokenError
    # (unbalanced brackets) from inside its parser: exit 3 before
    spec = BENCH.replace('attenuation = "50 dB"', f'attenuation = "{value}"', 1)
    assert spec != BENCH
    errors = refused(run(tmp_path, spec))
    assert any(".attenuation:" in e for e in errors), errors


@pytest.mark.parametrize("cell", ["-1e308", "92233720368547758081008.688"])
def test_measured_values_beyond_any_magnet_are_refused_with_row_and_column(tmp_path, cell):
    # a field of 1e304 T made the interpolated axis field NaN (exit 3), 9e18 T put NaN into
    # the characteristics of the JSON (exit 3 at serialisation)
    rows = fz.axis_table().split("\n")
    rows[5] = rows[5].split(",")[0] + ", " + cell
    out = run(tmp_path, fz.measured_spec("axis.csv"), files={"axis.csv": "\n".join(rows).encode()})
    errors = refused(out)
    assert any("axis.csv:6: column 'B' holds a value outside up to 50 T" in e for e in errors), errors
