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
    ("min-b-ion-source.toml", None),
    ("min-b-ion-source.toml", "min-b-site-policy.toml"),
    ("icp-etch-source.toml", None),
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
            print(f"{path.name}: {'unchanged' if same else 'CHANGED'}")
            bad += not same
        else:
            path.write_text(text, encoding="utf-8")
            print(f"wrote {path.relative_to(ROOT)}")
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
