"""rfcheck sweep: grid and Monte Carlo studies agree with individual checks, move the ECR
crossing as the closed-form field predicts, give the same results serially, in local
processes and on a Dask cluster, and refuse bad arguments with exit code 2."""

from __future__ import annotations

import copy
import json
import math
import tomllib
from pathlib import Path

import numpy as np
import pytest
import tomli_w
from conftest import thick_solenoid_bz
from scipy.optimize import brentq

from rfcheck import sweep as S
from rfcheck.cli import main
from rfcheck.rules.policy import load_policy
from rfcheck.run import run
from rfcheck.spec import InputError, load_spec

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
BENCH = EXAMPLES / "bench-ecr-reactor.toml"
ICP = EXAMPLES / "icp-etch-source.toml"
_RANK = {s: i for i, s in enumerate(S.STATUSES)}


def _check_of(raw: dict, tmp_path: Path, name: str):
    """An individual check of a spec file holding `raw` (written with tomli_w)."""
    path = tmp_path / name
    path.write_text(tomli_w.dumps(raw))
    return run(load_spec(path), load_policy())


def _per_rule(findings) -> dict:
    """Worst status and least-margin finding per rule, aggregated independently of the sweep:
    the least margin relative to |limit| where a limit is given, else the least margin."""
    out: dict = {}
    for f in findings:
        e = out.setdefault(f.rule, {"status": "not-applicable", "margin": None, "rel": None})
        if _RANK[f.status.value] > _RANK[e["status"]]:
            e["status"] = f.status.value
        if f.status.value in ("pass", "warn", "fail", "waived") and f.margin is not None \
                and math.isfinite(f.margin.value):
            lim = f.limit.value if f.limit is not None else math.nan
            rel = f.margin.value / abs(lim) if math.isfinite(lim) and lim != 0 else None
            if e["rel"] is not None:
                if rel is not None and rel < e["rel"]:
                    e["margin"], e["rel"] = f.margin.value, rel
            elif rel is not None or e["margin"] is None or f.margin.value < e["margin"]:
                e["margin"], e["rel"] = f.margin.value, rel
    return out


def test_grid_points_agree_with_individual_checks(tmp_path):
    """Each sampled point of a coil-current x frequency map has the statuses, margins (to
    1e-9 relative) and verdict of `check` on a spec file written with those values."""
    loaded, policy = load_spec(BENCH), load_policy()
    study = S.grid_study(loaded, policy, ["magnet.coils[upstream].current=60 A:72 A:3",
                                          "feed[main].frequency=2.43 GHz:2.47 GHz:2"])
    S.evaluate(study)
    doc = json.loads(study.json_bytes())
    assert doc["shape"] == [3, 2] and len(doc["points"]) == 6
    raw = tomllib.loads(BENCH.read_text())
    for i in (0, 3, 5):
        point = doc["points"][i]
        data = copy.deepcopy(raw)
        current, freq = (point["values"][k] for k in ("magnet.coils[upstream].current",
                                                      "feed[main].frequency"))
        data["magnet"]["coils"][0]["current"] = f"{current!r} A"
        data["feed"][0]["frequency"] = f"{freq!r} GHz"
        single = _check_of(data, tmp_path, f"point{i}.toml")
        assert point["verdict"] == single.verdict
        expected = _per_rule(single.findings)
        assert set(point["rules"]) == set(expected)
        for rule, e in expected.items():
            got = point["rules"][rule]
            assert got["status"] == e["status"], rule
            if e["margin"] is None:
                assert got["margin"] is None, rule
            else:
                assert got["margin"] == pytest.approx(e["margin"], rel=1e-9, abs=1e-300), rule


def test_current_sweep_moves_the_ecr_crossing_as_the_thick_solenoid_predicts(tmp_path):
    """One thick solenoid (inner 110 mm, outer 160 mm, 60 mm long at z = 10 mm, 400 turns),
    no tolerances: resonance.ecr-clearance measures the distance from the launcher (z = 0) to
    the crossing, so its margin + 10 mm is the crossing z. Closed form: B_z on the axis of a
    thick solenoid of uniform current density (D. B. Montgomery, Solenoid Magnet Design,
    1969, ch. 1) equal to B_ECR = 2 pi f m_e / e at 2.45 GHz (NRL Plasma Formulary: 875 G)."""
    raw = tomllib.loads((EXAMPLES / "starter.toml").read_text())
    raw["magnet"]["current_tolerance"] = "0 %"
    raw["feed"][0]["frequency_tolerance"] = "0 MHz"
    spec = tmp_path / "one-coil.toml"
    spec.write_text(tomli_w.dumps(raw))
    study = S.grid_study(load_spec(spec), load_policy(), ["magnet.coils[c1].current=60 A:80 A:5"])
    S.evaluate(study)
    j = study.rule_ids.index("resonance.ecr-clearance")
    assert study.units[j] == "m"
    b_ecr = 2 * math.pi * 2.45e9 * 9.1093837015e-31 / 1.602176634e-19  # CODATA 2018
    zs = []
    for k, amps in enumerate(study.grid_values[0]):
        z_closed = brentq(lambda z: thick_solenoid_bz(z, [(0.010, 0.060, amps)], 0.110, 0.160,
                                                      400) - b_ecr, 0.011, 0.2, xtol=1e-12)
        z_swept = study.margin[k, j] + 0.010  # default min_distance 10 mm
        assert z_swept == pytest.approx(z_closed, abs=5e-5), amps
        zs.append(z_swept)
    assert np.all(np.diff(zs) > 0.002)  # more current: the crossing moves away from the coil


def _small_icp_study():
    loaded, policy = load_spec(ICP), load_policy()
    raw = tomllib.loads(ICP.read_text())
    f_key = f"feed[{raw['feed'][0]['id']}].frequency"
    return S.grid_study(loaded, policy, [f"{f_key}=13.0 MHz:14.0 MHz:6",
                                         "plasma.density.max=3e17 m^-3:1e18 m^-3:4"])


def _results(study) -> dict:
    doc = json.loads(study.json_bytes())
    doc.pop("evaluated_at")
    return doc


def test_serial_local_processes_and_dask_give_identical_results(monkeypatch):
    """24 points in chunks of 5: serially, in two local processes, and on a Dask
    LocalCluster of two worker processes started here."""
    distributed = pytest.importorskip("distributed")
    monkeypatch.setattr(S, "CHUNK_POINTS", 5)
    serial = _small_icp_study()
    S.evaluate(serial)
    local = copy.copy(serial)
    S.evaluate(local, jobs=2)
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  dashboard_address=None) as cluster:
        dask = copy.copy(serial)
        S.evaluate(dask, scheduler=cluster.scheduler_address)
    a, b, c = _results(serial), _results(local), _results(dask)
    assert a["counts"] == b["counts"] == c["counts"]
    assert sum(a["counts"].values()) == 24
    assert a == b == c


def test_monte_carlo_with_a_seed_is_reproducible():
    loaded, policy = load_spec(BENCH), load_policy()
    one = S.evaluate(S.monte_carlo_study(loaded, policy, 6, seed=7))
    two = S.evaluate(S.monte_carlo_study(loaded, policy, 6, seed=7))
    other = S.monte_carlo_study(loaded, policy, 6, seed=8)
    a, b = _results(one), _results(two)
    assert a == b
    keys = [p["key"] for p in a["axes"]]
    # the bench reactor declares a current tolerance, a frequency tolerance and a window
    # layer's thickness tolerance
    assert keys == ["magnet.current_scale", "feed[main].frequency",
                    "window[vacuum-window].layers[0].thickness"]
    assert not np.array_equal(one.values, other.values)
    for k, p in enumerate(one.params):  # every sample inside its declared bound
        lo, hi = p.tolerance
        assert np.all((one.values[:, k] >= lo) & (one.values[:, k] <= hi))
    mc = a["monte_carlo"]
    overall = mc["pass_probability"]["overall"]
    passes = sum(1 for p in a["points"] if p["verdict"] in ("pass", "warn"))
    assert overall["passes"] == passes and overall["n"] == 6
    assert overall["low"] <= overall["p"] <= overall["high"]


def test_wilson_interval_matches_published_values():
    """R. G. Newcombe, Statistics in Medicine 17 (1998) 857, Table I (values from memory):
    81/263 -> 0.2553 to 0.3662; 0/10 -> 0 to 0.2775 (score interval, no continuity
    correction)."""
    w = S.wilson(81, 263)
    assert (w["low"], w["high"]) == (pytest.approx(0.2553, abs=1e-4),
                                     pytest.approx(0.3662, abs=1e-4))
    w = S.wilson(0, 10)
    assert (w["low"], w["high"]) == (0.0, pytest.approx(0.2775, abs=1e-4))


def test_monte_carlo_samples_set_the_sampled_tolerance_to_zero():
    """A sample is one built source: its sampled tolerances are gone, so the envelope of the
    sample is the operating envelope alone."""
    loaded = load_spec(BENCH)
    raw = tomllib.loads(BENCH.read_text())
    params, notes = S.tolerance_params(loaded, raw)
    data = copy.deepcopy(raw)
    for p, v in zip(params, (1.01, 2.44, 34.9)):
        p.apply(data, v)
    assert data["magnet"]["current_tolerance"] == "0 %"
    assert data["magnet"]["coils"][0]["current"] == f"{66.0 * 1.01!r} A"
    assert data["feed"][0]["frequency"] == "2.44 GHz"
    assert data["feed"][0]["frequency_tolerance"] == "0 Hz"
    assert data["window"][0]["layers"][0] == {"material": "fused-silica",
                                              "thickness": "34.9 mm",
                                              "thickness_tolerance": "0 mm"}
    assert any("operating envelope" in n for n in notes)


@pytest.mark.parametrize("args, says", [
    (["--vary", "magnet.coils[nowhere].current=50 A:80 A:3"], "no element [nowhere]"),
    (["--vary", "magnet.coil[upstream].current=50 A:80 A:3"], "no key 'coil'"),
    (["--vary", "feed[main].line=1:2:3"], "not a number with a unit"),
    (["--vary", "magnet.coils[upstream].current=50 mm:80 mm:3"], "not in units of a current"),
    (["--vary", "magnet.coils[upstream].current=50:80:3"], "has no unit"),
    (["--vary", "magnet.coils[upstream].current=50 A:80 A:x"], "not a whole number"),
    (["--vary", "magnet.coils[upstream].current=50 A:80 A:600",
      "--vary", "feed[main].frequency=2.4 GHz:2.5 GHz:600"], "at most 250,000"),
    (["--vary", "window[vacuum-window].layers[0].thickness=-1 mm:30 mm:3"], "grid corner"),
    (["--vary", "magnet.coils[upstream].turns=100:200:7"], "whole number"),
    (["--vary", "magnet.coils[upstream].current=50 A:80 A:3", "--monte-carlo", "5"],
     "not both"),
    ([], "at least one --vary"),
])
def test_bad_sweep_arguments_exit_2_before_any_work(args, says, tmp_path, capsys):
    out = tmp_path / "study.json"
    out.write_text("earlier")
    code = main(["sweep", str(BENCH), *args, "--json", str(out)])
    err = capsys.readouterr().err
    assert code == 2, err
    assert says in err
    assert "Traceback" not in err
    assert out.read_text() == "earlier"  # nothing that was there before is lost


def test_unknown_key_message_names_the_key(capsys):
    assert main(["sweep", str(BENCH), "--vary", "plasma.densty.max=1e16 m^-3:2e16 m^-3:2"]) == 2
    err = capsys.readouterr().err
    assert "plasma.densty.max" in err and "no key 'densty' under plasma" in err


def test_sweep_cli_writes_json_and_summary_without_progress_when_not_a_tty(tmp_path, capsys):
    out = tmp_path / "study.json"
    code = main(["sweep", str(ICP), "--vary", "plasma.density.max=3e17 m^-3:1e18 m^-3:2",
                 "--json", str(out)])
    captured = capsys.readouterr()
    assert code == 0, captured.err
    assert "\r" not in captured.err  # no progress line off a terminal
    doc = json.loads(out.read_text())
    assert doc["schema"] == S.SCHEMA_ID and doc["kind"] == "grid"
    assert [p["index"] for p in doc["points"]] == [[0], [1]]
    assert "2 points" in captured.out and "design aid" in captured.out and "local RF-safety" in captured.out
    assert doc["nominal"]["verdict"] in S.VERDICTS


# ---------------------------------------------------------------------- hostile arguments

from hypothesis import HealthCheck, given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

_KEYS = st.sampled_from([
    "plasma.density.max", "plasma.density", "feed[0].frequency", "feed[coil].power",
    "feed[9].frequency", "feed[].frequency", "feed[[x]].frequency", "chamber.radius",
    "chamber.landmarks", "source.name", "magnet.coils[0].current", "..", "", "a" * 300,
    "plasma.electron_temperature.max", "feed[coil].frequency_tolerance", "schema",
    "plasma.density.max.extra", "plasma.ions[0].fraction",
])
_ENDS = st.one_of(st.sampled_from(["1e17 m^-3", "5e17 cm^-3", "13 MHz", "-1 m^-3", "nan m^-3",
                                   "inf MHz", "1e400 m^-3", "2 eV", "7", "", " ", "1e17",
                                   "0x10 MHz", "1_000 MHz", "1e17 m^-3 m^-3", "☃ MHz"]),
                  st.text(max_size=12))
_COUNTS = st.sampled_from(["1", "2", "0", "-3", "3.5", "1e3", "x", "", "99999999999"])


@settings(max_examples=40, derandomize=True, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(key=_KEYS, a=_ENDS, b=_ENDS, n=_COUNTS, sep=st.sampled_from([":", "::", "="]))
def test_hostile_vary_arguments_run_or_exit_2(key, a, b, n, sep, capsys):
    """Whatever the --vary text: a study that ran (exit 0) or a refusal naming the problem
    (exit 2); never an internal error or a traceback."""
    text = f"{key}={a}{sep}{b}{sep}{n}" if sep != "=" else f"{key}{a}{b}{n}"
    code = main(["sweep", str(ICP), "--vary", text, "--quiet"])
    err = capsys.readouterr().err
    assert code in (0, 2), err
    assert "Traceback" not in err and "internal error" not in err
    if code == 2:
        assert err.startswith("error: ")


class _NoSharing:
    """A cache that never keeps anything: every analysis computed afresh for each point."""

    def get(self, name, parts, compute, *, heavy=False):
        return compute()


def test_sharing_analyses_across_points_changes_no_bit(monkeypatch):
    """The bench reactor (window analyses, coil field model, profiles shared across points):
    the same statuses, margins and binding rules to the last bit with and without sharing,
    and the shared cache was used."""
    from rfcheck.rules.context import SharedCache

    loaded, policy = load_spec(BENCH), load_policy()
    study = S.grid_study(loaded, policy, ["magnet.coils[upstream].current=60 A:72 A:2",
                                          "feed[main].frequency=2.43 GHz:2.47 GHz:2"])
    base = study.base()
    shared = SharedCache()
    monkeypatch.setattr(S, "_SHARED", shared)
    with_sharing = S.evaluate_chunk(base, study.params, 0, study.values)
    assert shared.hits > 0
    monkeypatch.setattr(S, "_SHARED", _NoSharing())
    without = S.evaluate_chunk(base, study.params, 0, study.values)
    for name in ("verdict", "status", "binding"):
        assert np.array_equal(getattr(with_sharing, name), getattr(without, name)), name
    for name in ("margin", "relative"):
        assert np.array_equal(getattr(with_sharing, name), getattr(without, name),
                              equal_nan=True), name
