"""The bundled examples against their approved results (tests/approved/, written by
tools/approve.py after their key numbers were checked: see the examples' tests and the commit
that approved them). Statuses and messages must be equal, measured values within 1e-6
relative: a speed change may not move any of them; a physics change that does is approved
again with the reason in its commit."""

from __future__ import annotations

import json
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "tools"))
import approve  # noqa: E402


@pytest.mark.parametrize("spec, policy", approve.CASES,
                         ids=[approve.case_name(s, p) for s, p in approve.CASES])
def test_example_matches_its_approved_results(spec, policy):
    approved = json.loads((approve.OUT / approve.case_name(spec, policy)).read_text("utf-8"))
    got = approve.results(spec, policy)
    assert got["verdict"] == approved["verdict"]
    assert [(f["rule"], f["subject"]) for f in got["findings"]] == \
        [(f["rule"], f["subject"]) for f in approved["findings"]]
    for g, a in zip(got["findings"], approved["findings"]):
        where = f"{a['rule']} / {a['subject']}"
        assert g["status"] == a["status"], where
        assert g["message"] == a["message"], where
        if a["measured"] is None:
            assert g["measured"] is None, where
        else:
            assert g["measured"] == pytest.approx(a["measured"], rel=1e-6, abs=1e-300), where
