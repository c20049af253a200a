"""Write the approved results of the bundled examples (tests/approved/*.json).

Each file holds, per finding of `rfcheck check EXAMPLE` under the default policy (and the
example's own site policy where one is shipped), the rule, subject, status, message and
measured value. tests/test_approved.py compares every run with them: statuses and messages
equal, measured values to 1e-6. Run this only after a change that is meant to move results
(a physics correction, a new rule), and say in the commit which numbers moved and why; a
speed change must leave every file as it is.

    python tools/approve.py [--check]
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
OUT = ROOT / "tests" / "approved"

#: (example spec, site policy or None) pairs that are approved
CASES = (
    ("bench-ecr-reactor.toml", None),
    ("bench-ecr-reactor-rev-d.toml", None),  # the change-control example: revision D of the bench
    ("min-b-ion-source.toml", None),
    ("min-b-ion-source.toml", "min-b-site-policy.toml"),
    ("icp-etch-source.toml", None),
    ("pm-ecr-thruster.toml", None),
    ("ech-launcher-140ghz.toml", None),
    ("dual-frequency-min-b.toml", None),
    ("helicon-source.toml", None),
    ("oblique-beam-reactor.toml", None),
    ("oblique-beam-reactor.toml", "min-b-site-policy.toml"),  # the same source's site policy
)


def case_name(spec: str, policy: str | None) -> str:
    return Path(spec).stem + ("" if policy is None else "--" + Path(policy).stem) + ".json"


def results(spec: str, policy: str | None) -> dict:
    from rfcheck.rules.policy import load_policy
    from rfcheck.run import run
    from rfcheck.spec import load_spec

    ex = ROOT / "examples"
    r = run(load_spec(ex / spec), load_policy(ex / policy if policy else None))
    return {"spec": spec, "policy": policy, "verdict": r.verdict, "findings": [
        {"rule": f.rule, "subject": f.subject, "status": f.status.value,
         "measured": f.measured.value if f.measured else None, "message": f.message}
        for f in r.findings]}


def _close(old: dict, new: dict) -> bool:
    """The test's own comparison (tests/test_approved.py): verdict, rules, subjects, statuses
    and messages equal; measured values within 1e-6 relative (floating-point noise across
    NumPy and BLAS builds reaches the last digits only)."""
    if old.get("verdict") != new.get("verdict") or len(old["findings"]) != len(new["findings"]):
        return False
    for a, b in zip(old["findings"], new["findings"]):
        if any(a[k] != b[k] for k in ("rule", "subject", "status", "message")):
            return False
        x, y = a["measured"], b["measured"]
        if (x is None) != (y is None):
            return False
        if x is not None and abs(x - y) > 1e-6 * max(abs(x), abs(y)) + 1e-300:
            return False
    return True


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--check", action="store_true", help="compare instead of writing")
    args = ap.parse_args()
    OUT.mkdir(parents=True, exist_ok=True)
    bad = 0
    for spec, policy in CASES:
        path = OUT / case_name(spec, policy)
        got = results(spec, policy)
        text = json.dumps(got, indent=1, ensure_ascii=False, allow_nan=False) + "\n"
        if args.check:
            same = path.exists() and path.read_text(encoding="utf-8") == text
            close = same or (path.exists() and _close(json.loads(path.read_text("utf-8")), got))
            print(f"{path.name}: " + ("unchanged" if same else
                                      "unchanged within 1e-6 (last digits only)" if close else
                                      "CHANGED"))
            bad += not close
        else:
            path.write_text(text, encoding="utf-8")
            print(f"wrote {path.relative_to(ROOT)}")
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
