"""rfcheck diff and check --previous: the normalised spec diff, the verdict diff and the
change-control report.

References: the on-axis field of a thick solenoid of uniform current density (Montgomery,
"Solenoid Magnet Design", Wiley 1969, ch. 1: B_z(z) = μ0 J / 2 · [F(z - z1) - F(z - z2)],
F(x) = x ln((b + √(b² + x²)) / (a + √(a² + x²))), J = N I / ((b - a) L)); the electron
cyclotron resonance B_ECR = 2π f m_e / e (CODATA constants through scipy.constants); unit
definitions of SI and CGS (1 G = 1e-4 T, BIPM SI Brochure, 9th ed., table 9); SHA-256
(FIPS 180-4, through hashlib); the reports' text read back with pypdfium2 and their
attachments with pypdf, outside libraries.
"""

from __future__ import annotations

import hashlib
import json
import math
import tomllib

import numpy as np
import pypdf
import pypdfium2
import pytest
import scipy.constants as C
import tomli_w
from scipy.optimize import brentq

from conftest import DEMO, EXAMPLES
from rfcheck.changes import VALUE_RTOL, compare, spec_changes, verdict_changes
from rfcheck.cli import main
from rfcheck.spec import load_spec

REV_D = EXAMPLES / "bench-ecr-reactor-rev-d.toml"


# --------------------------------------------------------------------------- rewriting a spec

_SCALE = {"mm": (1e-3, "m"), "GHz": (1e3, "MHz"), "m^-3": (1e-6, "cm^-3"), "kW": (1e3, "W"),
          "MHz": (1e-3, "GHz"), "Pa": (1e-2, "mbar")}


def _respell(value):
    """The same quantity in another unit ("110 mm" -> "0.11 m", "2.45 GHz" -> "2450.0 MHz")."""
    if isinstance(value, str):
        num, _, unit = value.partition(" ")
        if unit in _SCALE:
            try:
                x = float(num)
            except ValueError:
                return value
            k, other = _SCALE[unit]
            return f"{x * k!r} {other}"
        return value
    if isinstance(value, dict):
        return {k: _respell(v) for k, v in reversed(list(value.items()))}  # key order reversed
    if isinstance(value, list):
        return [_respell(v) for v in value]
    return value


def rewritten(text: str) -> str:
    """The spec with every key order reversed, units respelled, comments dropped and every
    inline table written as a full table (tomli_w writes tables in full)."""
    data = tomllib.loads(text)
    out = {"schema": data.pop("schema")}
    out.update(_respell(data))
    return tomli_w.dumps(out)


def test_rewritten_spec_diffs_empty(write_spec, demo_text):
    text = rewritten(demo_text)
    assert "0.11 m" in text and "MHz" in text and "cm^-3" in text and "#" not in text
    assert "density = {" not in text and "[plasma.density]" in text  # a full table now
    old, new = load_spec(DEMO), load_spec(write_spec(text))
    assert spec_changes(old.normalised, new.normalised) == []


def test_gauss_equals_millitesla(write_spec, demo_text):
    """875 G = 87.5 mT (1 G = 1e-4 T); inline versus full table and a comment do not count."""
    a = demo_text.replace('trap = "none"', 'trap = "none"\nuniform = { b = "875 G" }')
    b = demo_text.replace('trap = "none"', 'trap = "none"  # a trim field\n') \
        .replace("\n[[feed]]", '\n[magnet.uniform]\nb = "87.5 mT"\n\n[[feed]]', 1)
    la, lb = load_spec(write_spec(a, "a.toml")), load_spec(write_spec(b, "b.toml"))
    assert la.normalised["magnet"]["uniform"]["b"] == pytest.approx(0.0875, rel=1e-12)
    assert spec_changes(la.normalised, lb.normalised) == []
    c = load_spec(write_spec(a.replace('"875 G"', '"876 G"'), "c.toml"))
    (change,) = spec_changes(la.normalised, c.normalised, tomllib.loads(a),
                             tomllib.loads(a.replace('"875 G"', '"876 G"')))
    assert change.path == "magnet.uniform.b" and change.line() == 'magnet.uniform.b: "875 G" → "876 G"'


def test_float_noise_below_tolerance(write_spec, demo_text):
    """A change of 3e-12 relative is below VALUE_RTOL (1e-9); one of 3e-6 is a change."""
    base = load_spec(DEMO).normalised
    noise = load_spec(write_spec(demo_text.replace('"35 A"', '"35.0000000001 A"'))).normalised
    assert 1e-12 < abs(noise["magnet"]["coils"][1]["current"] / 35 - 1) < VALUE_RTOL
    assert spec_changes(base, noise) == []
    real = load_spec(write_spec(demo_text.replace('"35 A"', '"35.0001 A"'), "r.toml")).normalised
    assert [c.path for c in spec_changes(base, real)] == ["magnet.coils[downstream].current"]


def test_renamed_coil_is_removal_and_addition(write_spec, demo_text):
    renamed = demo_text.replace('id = "downstream"', 'id = "exit-coil"')
    changes = spec_changes(load_spec(DEMO).normalised, load_spec(write_spec(renamed)).normalised,
                           tomllib.loads(demo_text), tomllib.loads(renamed))
    assert [(c.path, c.kind) for c in changes] == [
        ("magnet.coils[exit-coil]", "added"), ("magnet.coils[downstream]", "removed")]


def test_verdict_diff_order_and_kinds():
    """Status moves first (worse, better), then new and gone, then margins (worse first)."""
    def f(rule, status, margin, subject="s"):
        return {"rule": rule, "subject": subject, "status": status,
                "margin": {"value": margin, "unit": "m"}, "measured": None, "limit": None,
                "worst_case": {}}

    old = [f("a.one", "pass", 1.0), f("a.two", "fail", -1.0), f("a.three", "pass", 1.0),
           f("a.four", "pass", 1.0), f("a.gone", "pass", 1.0), f("a.same", "pass", 1.0)]
    new = [f("a.one", "fail", -1.0), f("a.two", "pass", 1.0), f("a.three", "pass", 2.0),
           f("a.four", "pass", 0.5), f("a.new", "warn", 0.1),
           f("a.same", "pass", 1.0 + 1e-9)]  # below MARGIN_RTOL: no change
    got = [(c.rule, c.kind) for c in verdict_changes(old, new)]
    assert got == [("a.one", "worse"), ("a.two", "better"), ("a.new", "new"),
                   ("a.gone", "gone"), ("a.four", "margin"), ("a.three", "margin")]


# --------------------------------------------------------------------------- physics of a change


def _thick_solenoid_bz(z, coils):
    """On-axis field of thick solenoids (Montgomery 1969), coils as (a, b, centre, L, N, I)."""
    total = 0.0
    for a, b, zc, length, turns, current in coils:
        j = turns * current / ((b - a) * length)

        def F(x):
            return x * np.log((b + np.hypot(b, x)) / (a + np.hypot(a, x)))

        total += C.mu_0 * j / 2 * (F(z - (zc - length / 2)) - F(z - (zc + length / 2)))
    return total


def _ecr_position(scale: float, f: float, k: float) -> float:
    """Where B_z falls through B_ECR between the coils of the bench reactor (its spec's
    coils, currents × k × the envelope's current scale)."""
    coils = [(0.11, 0.16, 0.01, 0.06, 400, 66.0 * k * scale),
             (0.11, 0.16, 0.20, 0.06, 300, 35.0 * k * scale)]
    b_ecr = 2 * math.pi * f * C.m_e / C.e
    return brentq(lambda z: _thick_solenoid_bz(z, coils) - b_ecr, 0.01, 0.2, xtol=1e-12)


def test_plus_five_percent_current_moves_the_ecr_as_the_thick_solenoid_predicts(write_spec,
                                                                                 demo_text):
    text = demo_text.replace('"66 A"', '"69.3 A"').replace('"35 A"', '"36.75 A"')
    changes = compare(DEMO, write_spec(text))
    assert [c.path for c in changes.values] == ["magnet.coils[upstream].current",
                                                "magnet.coils[downstream].current"]
    # the envelope's worst points: current scale 1 ± 2 %, frequency 2.45 GHz ± 25 MHz
    lo = {k: _ecr_position(0.98, 2.475e9, k) for k in (1.0, 1.05)}  # nearest the window (z = 0)
    hi = {k: _ecr_position(1.02, 2.425e9, k) for k in (1.0, 1.05)}  # nearest the substrate
    # resonance.ecr-clearance measures the smaller of the clearances to the window at z = 0
    # and to the substrate landmark at z = 260 mm
    predicted = {k: min(lo[k] - 0.0, 0.260 - hi[k]) for k in (1.0, 1.05)}
    (clear,) = [c for c in changes.findings if c.rule == "resonance.ecr-clearance"]
    assert clear.kind == "margin" and clear.worsened
    assert clear.old["measured"]["value"] == pytest.approx(predicted[1.0], rel=1e-6)
    assert clear.new["measured"]["value"] == pytest.approx(predicted[1.05], rel=1e-6)
    # the worst-case point moved from the window to the substrate
    assert clear.old["worst_case"]["object_position"]["value"] == 0.0
    assert clear.new["worst_case"]["object_position"]["value"] == pytest.approx(0.26)
    assert clear.new["worst_case"]["resonance_position"]["value"] == pytest.approx(hi[1.05],
                                                                                 rel=1e-6)
    # the predicted positions stay far from every limit (10 mm clearance, resonance between the
    # coils), so no status moves: the diff lists none and exits 1 for the worsened margins only
    assert min(predicted.values()) > 0.05
    assert changes.moved == [] and not changes.verdict_moved
    assert changes.exit_code == 1 and "resonance.ecr-clearance" in {c.rule for c in changes.worsened}


def test_example_change_pair_moves_the_load_verdicts():
    changes = compare(DEMO, REV_D)
    assert [c.line() for c in changes.values] == [
        'source.revision: "C" → "D"', 'magnet.coils[downstream].current: "35 A" → "55 A"']
    moved = [(c.rule, c.subject, c.old_status, c.new_status) for c in changes.moved]
    assert moved == [("load.plasma-reflection", "feed main, running", "pass", "fail"),
                     ("load.reflected-power", "feed main, running", "pass", "fail")]
    assert changes.verdict_moved and changes.exit_code == 1


# --------------------------------------------------------------------------- the command


def test_diff_cli_exit_codes(tmp_path, capsys, demo_text, write_spec):
    same = write_spec(rewritten(demo_text), "same.toml")
    assert main(["diff", str(DEMO), str(same)]) == 0
    out = capsys.readouterr().out
    assert "What changed: nothing" in out and "Verdicts moved: none" in out
    assert main(["diff", str(DEMO), str(REV_D), "--json", "-"]) == 1
    captured = capsys.readouterr()
    data = json.loads(captured.out)
    assert data["moved_rules"] == ["load.plasma-reflection", "load.reflected-power"]
    assert "moved: load.plasma-reflection, load.reflected-power" in captured.err
    broken = write_spec(demo_text.replace('"35 A"', '"35 furlongs"'), "broken.toml")
    assert main(["diff", str(DEMO), str(broken)]) == 2
    err = capsys.readouterr().err
    assert "broken.toml:" in err and "current" in err and "nothing was written" in err
    assert main(["diff", str(DEMO), str(tmp_path / "missing.toml")]) == 2


@pytest.fixture(scope="module")
def archived(tmp_path_factory):
    """Archived PDF reports of the example change pair: revision C, and revision D checked
    with --previous C (its results JSON beside it)."""
    folder = tmp_path_factory.mktemp("archive")
    c, d, js = folder / "rev-c.pdf", folder / "rev-d.pdf", folder / "rev-d.json"
    assert main(["check", str(DEMO), "--pdf", str(c)]) == 0
    assert main(["check", str(REV_D), "--previous", str(DEMO), "--pdf", str(d),
                 "--json", str(js)]) == 1  # revision D fails
    return {"c": c, "d": d, "d_results": json.loads(js.read_text(encoding="utf-8"))}


def _comparable(summary: dict) -> dict:
    for side in ("old", "new"):
        summary[side] = {k: v for k, v in summary[side].items() if k not in ("file", "kind")}
    return summary


def test_diff_of_archived_reports_equals_diff_of_specs(archived):
    from_specs = _comparable(compare(DEMO, REV_D).summary())
    from_pdfs = _comparable(compare(archived["c"], archived["d"]).summary())
    assert from_pdfs == from_specs
    assert from_pdfs["moved_rules"] == ["load.plasma-reflection", "load.reflected-power"]


def test_check_previous_accepts_an_archived_report(archived, capsys):
    assert main(["check", str(REV_D), "--previous", str(archived["c"]), "--json", "-"]) == 1
    data = json.loads(capsys.readouterr().out)
    prev = data["previous"]
    assert prev["kind"] == "report" and prev["revision"] == "C"
    assert prev["spec_sha256"] == hashlib.sha256(DEMO.read_bytes()).hexdigest()
    assert prev["change"]["moved_rules"] == ["load.plasma-reflection", "load.reflected-power"]


# --------------------------------------------------------------------------- the change-control report
# (the change board's page, DESIGN.md §6: the previous fingerprint, what changed, which verdicts
# moved and the new verdict on page 1, then the new review, both revisions' files attached;
# text read back with pypdfium2, attachments with pypdf)


def test_check_previous_records_the_previous_fingerprint(archived):
    results = archived["d_results"]
    prev = results["previous"]
    assert prev["spec_sha256"] == hashlib.sha256(DEMO.read_bytes()).hexdigest()
    assert prev["revision"] == "C" and prev["verdict"] == "warn"
    assert prev["inputs"][0]["sha256"] == prev["spec_sha256"]
    assert prev["change"]["moved_rules"] == ["load.plasma-reflection", "load.reflected-power"]
    assert "evaluated_at" in results


def test_change_request_page_comes_first(archived):
    pdf = archived["d"]
    doc = pypdfium2.PdfDocument(str(pdf))
    first = doc[0].get_textpage().get_text_range()
    cover = doc[1].get_textpage().get_text_range()
    assert "Change request" in first
    for text in ("Bench ECR reactor B-2 rev. C", "Bench ECR reactor B-2 rev. D", "FAIL",
                 "magnet.coils[downstream].current", '"35 A"', '"55 A"',
                 "load.plasma-reflection", "load.reflected-power", "PASS → FAIL",
                 hashlib.sha256(DEMO.read_bytes()).hexdigest()[:32]):
        assert text in first, text
    assert "Verdict over the declared operating envelope" in cover  # the review follows


def test_both_specs_attached(archived):
    pdf = archived["d"]
    attached = pypdf.PdfReader(str(pdf)).attachments
    assert attached[REV_D.name][0] == REV_D.read_bytes()
    assert attached["previous-" + DEMO.name][0] == DEMO.read_bytes()


def test_change_report_verifies(archived):
    from rfcheck.verify import verify

    outcome = verify(archived["d"])
    assert outcome.matches, outcome.differences


def test_diff_html_has_the_change_page(tmp_path):
    page = tmp_path / "change.html"
    assert main(["diff", str(DEMO), str(REV_D), "--html", str(page)]) == 1
    html = page.read_text(encoding="utf-8")
    assert html.index("Change request") < html.index("Verdict over the declared operating envelope")
    assert "magnet.coils[downstream].current" in html
