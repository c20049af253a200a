"""verify and diff on a report whose run read every kind of input file: a measured axis
table in another folder (``../shared/axis.csv``), a measured field map, a site exposure table
and a user policy. Every file must be laid out where the spec names it and re-run.

References: SHA-256 (FIPS 180-4, through hashlib); attachments edited with pypdf.
"""

from __future__ import annotations

import shutil

import pytest

from conftest import DEMO, EXAMPLES
from rfcheck.changes import compare
from rfcheck.cli import main
from rfcheck.verify import verify
from test_inputs_provenance import AXIS_CSV, MAP_CSV, _measured_spec
from test_spec_exposure import SITE
from test_verify import _edit


@pytest.fixture(scope="module")
def archived(tmp_path_factory):
    root = tmp_path_factory.mktemp("inputs")
    (root / "shared").mkdir()
    (root / "spec" / "maps").mkdir(parents=True)
    (root / "shared" / "axis.csv").write_bytes(AXIS_CSV.encode())
    (root / "spec" / "maps" / "field.csv").write_bytes(MAP_CSV.encode())
    (root / "spec" / "site-levels.toml").write_bytes(SITE.encode())
    shutil.copyfile(EXAMPLES / "min-b-site-policy.toml", root / "site-policy.toml")
    text = _measured_spec(DEMO.read_text(encoding="utf-8"),
                          'axis_table = { id = "axis", file = "../shared/axis.csv" }\n'
                          'field_map = { id = "map", file = "maps/field.csv" }\n',
                          '[exposure]\ntable_file = "site-levels.toml"\n')
    spec = root / "spec" / "reactor.toml"
    spec.write_bytes(text.encode())
    pdf = root / "out.pdf"
    assert main(["check", str(spec), "--policy", str(root / "site-policy.toml"),
                 "--pdf", str(pdf)]) in (0, 1)
    return {"root": root, "spec": spec, "pdf": pdf}


def test_every_input_laid_out_and_re_run(archived):
    outcome = verify(archived["pdf"])
    assert outcome.matches, outcome.differences
    checked = "\n".join(outcome.checks)
    for role, name in (("specification", "reactor.toml"), ("policy", "site-policy.toml"),
                       ("measured axis table", "../shared/axis.csv"),
                       ("measured field map", "maps/field.csv"),
                       ("site exposure table", "site-levels.toml")):
        assert f"{role} {name} (attachment" in checked, role


def test_edited_measured_table_is_caught(archived, tmp_path):
    edited = tmp_path / "edited.pdf"
    _edit(archived["pdf"], edited, "axis-table-axis.csv", lambda b: b.replace(b"450", b"451", 1))
    text = "\n".join(verify(edited).differences)
    assert ("measured axis table ../shared/axis.csv (attachment axis-table-axis.csv): the "
            "attached file's SHA-256") in text


def test_archived_report_diffs_empty_against_its_spec(archived):
    changes = compare(archived["pdf"], archived["spec"], archived["root"] / "site-policy.toml")
    assert changes.values == [] and changes.inputs == [] and changes.policy == []
    assert changes.findings == [] and changes.exit_code == 0
