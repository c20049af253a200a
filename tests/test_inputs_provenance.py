"""Every input file of a run is fingerprinted (JSON `inputs`, the PDF cover and Appendix D) and
attached to the PDF byte for byte.

The reference for every digest is Python's hashlib SHA-256 (FIPS 180-4) of the file's bytes as
they sit on disk, read here independently of rfcheck; the attachments are read back with pypdf
and the cover text with pypdfium2.
"""

from __future__ import annotations

import hashlib
import io
import json
import shutil

import pytest

from conftest import DEMO, EXAMPLES
from rfcheck.cli import main
from rfcheck.report.context import HASH_PREFIX, _distinct
from rfcheck.rules.policy import load_policy
from rfcheck.run import InputRecord, run
from rfcheck.spec import InputError, load_spec

# a site table of reference levels (invented site rule), shared with test_spec_exposure.py
from test_spec_exposure import SITE  # noqa: E402
# an on-axis table in SI-equivalent gauss and a uniform 40 mT map: two measured files with the
# same base name in two folders (their attachments must still get distinct names)
AXIS_CSV = "z [mm], B [G]\n0, 600\n100, 450\n200, 350\n300, 250\n"
MAP_CSV = "r [mm], z [mm], Br [T], Bz [T]\n" + "".join(
    f"{r}, {z}, 0, 0.04\n" for r in (0, 25, 50, 75, 80) for z in (-5, 100, 200, 305))


def _measured_spec(demo_text: str, magnet_lines: str, exposure_block: str | None) -> str:
    """The bundled bench reactor with its coils replaced by `magnet_lines` (and its exposure
    table choice by `exposure_block`)."""
    start = demo_text.index("coils = [")
    end = demo_text.index("]\n", demo_text.index('{ id = "downstream"')) + 2
    text = demo_text[:start] + magnet_lines + demo_text[end:]
    if exposure_block is not None:
        a = text.index("[exposure]")
        b = text.index("occupied_distance", a)
        text = text[:a] + exposure_block + text[b:]
    return text


def _sha(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


@pytest.fixture(scope="module")
def case(tmp_path_factory):
    """A spec with a measured axis table, a measured field map (both named field.csv), a site
    table and a user policy, checked once through the command line into JSON and PDF."""
    root = tmp_path_factory.mktemp("inputs")
    (root / "fields").mkdir()
    (root / "maps").mkdir()
    (root / "fields" / "field.csv").write_bytes(AXIS_CSV.encode())
    (root / "maps" / "field.csv").write_bytes(MAP_CSV.encode())
    (root / "site-levels.toml").write_bytes(SITE.encode())
    shutil.copyfile(EXAMPLES / "min-b-site-policy.toml", root / "site-policy.toml")
    text = _measured_spec(DEMO.read_text(encoding="utf-8"),
                          'axis_table = { id = "axis", file = "fields/field.csv" }\n'
                          'field_map = { id = "map", file = "maps/field.csv" }\n',
                          '[exposure]\ntable_file = "site-levels.toml"\n')
    (root / "reactor.toml").write_bytes(text.encode())
    code = main(["check", str(root / "reactor.toml"), "--policy", str(root / "site-policy.toml"),
                 "--json", str(root / "out.json"), "--pdf", str(root / "out.pdf")])
    assert code in (0, 1), code
    expected = [  # role, name as given, the file on disk
        ("specification", "reactor.toml", root / "reactor.toml"),
        ("policy", "site-policy.toml", root / "site-policy.toml"),
        ("measured axis table", "fields/field.csv", root / "fields" / "field.csv"),
        ("measured field map", "maps/field.csv", root / "maps" / "field.csv"),
        ("site exposure table", "site-levels.toml", root / "site-levels.toml"),
    ]
    return {"root": root, "expected": expected,
            "json": json.loads((root / "out.json").read_text(encoding="utf-8")),
            "pdf": (root / "out.pdf").read_bytes()}


def test_json_lists_every_input_file_with_its_size_and_sha256(case):
    got = case["json"]["inputs"]
    assert [(i["role"], i["file"]) for i in got] == [(r, n) for r, n, _ in case["expected"]]
    for entry, (_, _, path) in zip(got, case["expected"]):
        data = path.read_bytes()
        assert entry["bytes"] == len(data), entry["file"]
        assert entry["sha256"] == _sha(data), entry["file"]
    # the existing keys stay, and agree with the list
    assert case["json"]["spec"]["sha256"] == got[0]["sha256"]
    assert case["json"]["spec"]["file"] == "reactor.toml"
    assert {"name", "sha256"} <= set(case["json"]["policy"])


def test_pdf_attaches_every_input_file_byte_for_byte_under_distinct_names(case):
    from pypdf import PdfReader

    reader = PdfReader(io.BytesIO(case["pdf"]))
    attached = reader.attachments  # name -> list of contents
    assert all(len(v) == 1 for v in attached.values()), {k: len(v) for k, v in attached.items()}
    by_digest = {_sha(v[0]): name for name, v in attached.items()}
    names = []
    for role, _, path in case["expected"]:
        digest = _sha(path.read_bytes())
        assert digest in by_digest, f"{role} {path.name} is not attached"
        name = by_digest[digest]
        assert attached[name][0] == path.read_bytes(), name
        names.append(name)
    assert len(set(n.casefold() for n in names)) == len(names), names
    # the two measured files share the base name field.csv and still have their own names
    assert names[2] != names[3] and names[2].endswith("field.csv") and names[3].endswith("field.csv")
    assert names[0] == "reactor.toml"  # the spec keeps its own name, as before
    assert {"rfcheck-results.json", "policy-default.toml"} <= set(attached)
    assert json.loads(attached["rfcheck-results.json"][0]) == case["json"]


def test_cover_shows_each_input_with_its_hash_prefix_and_appendix_the_full_hash(case):
    import pypdfium2 as pdfium

    doc = pdfium.PdfDocument(case["pdf"])
    pages = [" ".join(doc[i].get_textpage().get_text_range().split()) for i in range(len(doc))]
    cover = pages[0]
    for role, name, path in case["expected"]:
        digest = _sha(path.read_bytes())
        assert role in cover, role
        assert name in cover, name
        assert digest[:HASH_PREFIX] in cover, (role, digest[:HASH_PREFIX])
    # the appendix from its heading on (the heading can end a page and its table begin the next)
    start = next(i for i in reversed(range(len(pages)))
                 if "Appendix D" in pages[i] and "Input files" in pages[i])
    appendix = " ".join(pages[start:])
    for _, _, path in case["expected"]:
        assert _sha(path.read_bytes()) in appendix, path.name


def test_hash_is_of_the_exact_bytes_line_endings_and_non_ascii_included(tmp_path):
    # CRLF line ends and non-ASCII text: the digest must be of the bytes on disk, not of a
    # normalised text (reference: hashlib over the file's bytes)
    text = DEMO.read_text(encoding="utf-8").replace(
        'lab = "', 'lab = "Salle µ-onde – ').replace("\n", "\r\n")
    spec = tmp_path / "crlf.toml"
    spec.write_bytes(text.encode("utf-8"))
    result = run(load_spec(spec), load_policy(None))
    (entry,) = [i.to_json() for i in result.inputs]
    data = spec.read_bytes()
    assert b"\r\n" in data and "µ".encode() in data
    assert entry == {"role": "specification", "file": "crlf.toml", "bytes": len(data),
                     "sha256": _sha(data)}


def test_shipped_data_are_not_input_files():
    # the bundled example uses the default policy and the shipped exposure tables only
    result = run(load_spec(DEMO), load_policy(None))
    assert [(i.role, i.file) for i in result.inputs] == [("specification", DEMO.name)]


def test_record_digest_matches_the_fips_180_4_example():
    # FIPS 180-4 / NIST example "abc" (one block): SHA-256 =
    # ba7816bf 8f01cfea 414140de 5dae2223 b00361a3 96177a9c b410ff61 f20015ad
    rec = InputRecord("specification", "abc.toml", b"abc")
    assert rec.sha256 == "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
    assert rec.to_json()["bytes"] == 3


def _axis_case(tmp_path, site: bool = False):
    (tmp_path / "axis.csv").write_text(AXIS_CSV, encoding="utf-8")
    block = None
    if site:
        (tmp_path / "site-levels.toml").write_text(SITE, encoding="utf-8")
        block = '[exposure]\ntable_file = "site-levels.toml"\n'
    text = _measured_spec(DEMO.read_text(encoding="utf-8"),
                          'axis_table = { file = "axis.csv" }\n', block)
    spec = tmp_path / "spec.toml"
    spec.write_text(text, encoding="utf-8")
    return spec, text


def _line_of(text: str, needle: str) -> int:
    return next(i for i, line in enumerate(text.split("\n"), 1) if needle in line)


def test_a_measured_file_gone_after_loading_is_an_input_error_naming_key_and_line(tmp_path):
    spec, text = _axis_case(tmp_path)
    loaded = load_spec(spec)
    (tmp_path / "axis.csv").unlink()
    with pytest.raises(InputError) as info:
        run(loaded, load_policy(None))
    (p,) = info.value.problems
    assert p.path == "magnet.axis_table.file"
    assert p.line == _line_of(text, "axis_table =")
    assert "run again" in p.message


def test_a_site_table_changed_after_loading_is_refused_not_fingerprinted(tmp_path):
    spec, text = _axis_case(tmp_path, site=True)
    loaded = load_spec(spec)
    (tmp_path / "site-levels.toml").write_text(SITE.replace("20.0", "10.0"), encoding="utf-8")
    with pytest.raises(InputError) as info:
        run(loaded, load_policy(None))
    (p,) = info.value.problems
    assert p.path == "exposure.table_file"
    assert p.line == _line_of(text, "table_file =")
    assert "changed" in p.message


def test_a_measured_file_rewritten_after_loading_is_refused_not_fingerprinted(tmp_path):
    spec, text = _axis_case(tmp_path)
    loaded = load_spec(spec)
    csv = tmp_path / "axis.csv"
    csv.write_bytes(csv.read_bytes() + b"# edited after loading\n")
    with pytest.raises(InputError) as info:
        run(loaded, load_policy(None))
    (p,) = info.value.problems
    assert p.path == "magnet.axis_table.file"
    assert p.line == _line_of(text, "axis_table =")
    assert "changed" in p.message


def test_attachment_names_are_distinct_without_regard_to_case():
    taken: set[str] = set()
    got = [_distinct(n, taken) for n in ("field.csv", "Field.csv", "field.csv", "README")]
    assert got == ["field.csv", "Field-2.csv", "field-3.csv", "README"]
    assert _distinct("README", taken) == "README-2"
