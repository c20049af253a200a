"""Fuzz in the test suite: mutated specs, policies and measured tables, bounded for CI.

Property (DEVELOPERS.md "Hostile input"): every outcome is a run (exit 0 or 1, strict JSON
without NaN or Infinity) or a refusal (exit 2 with an error line naming the file); never exit
3, a traceback, a warning or an escape sequence on the terminal, file content echoed, or a run
past its time budget. hypothesis draws the mutations (derandomized: the same cases on every
run, so CI is reproducible); tools/fuzz.py runs the same generator for 10,000+ cases.
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

hypothesis = pytest.importorskip("hypothesis")
from hypothesis import HealthCheck, given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "tools"))

import fuzz_inputs as fz  # noqa: E402

BUDGET = 30.0
FUZZ = settings(max_examples=25, derandomize=True, deadline=None, database=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])

values = st.one_of(
    st.builds(lambda n, u: f"{n} {u}", st.sampled_from(fz.NUMBERS), st.sampled_from(fz.UNITS)),
    st.sampled_from(fz.TEXTS),
    st.sampled_from(fz.SPECIAL_VALUES),
    st.text(max_size=12),
    st.integers(),
    st.floats(allow_nan=True, allow_infinity=True),
)


def mutations(kinds):
    return st.lists(st.tuples(st.sampled_from(kinds), st.integers(0, 10**6), values),
                    min_size=1, max_size=3)


def check(outcome: fz.Outcome) -> None:
    assert outcome.problems == [], (outcome.problems, outcome.stderr[:2000])
    assert outcome.code in (0, 1, 2), outcome.code


@FUZZ
@given(seed=st.sampled_from(fz.QUICK_SPEC_SEEDS), muts=mutations(fz.KINDS))
def test_mutated_specs_keep_the_contract(tmp_path_factory, seed, muts):
    text = fz.mutate_text((fz.EXAMPLES / seed).read_text(encoding="utf-8"), muts)
    check(fz.run_case(fz.Case(text), tmp_path_factory.mktemp("spec"), BUDGET))


@FUZZ
@given(muts=mutations(fz.KINDS))
def test_mutated_policies_keep_the_contract(tmp_path_factory, muts):
    spec = (fz.EXAMPLES / "bench-ecr-reactor.toml").read_text(encoding="utf-8")
    policy = fz.mutate_text((fz.EXAMPLES / fz.POLICY_SEED).read_text(encoding="utf-8"), muts)
    check(fz.run_case(fz.Case(spec, policy=policy), tmp_path_factory.mktemp("policy"), BUDGET))


@FUZZ
@given(muts=mutations(fz.CSV_KINDS))
def test_mutated_measured_tables_keep_the_contract(tmp_path_factory, muts):
    case = fz.Case(fz.measured_spec(), files={"axis.csv": fz.mutate_csv(fz.axis_table(), muts)})
    check(fz.run_case(case, tmp_path_factory.mktemp("csv"), BUDGET))


def test_special_paths_keep_the_contract(tmp_path):
    for case in fz.special_cases(tmp_path / "special"):
        outcome = fz.run_case(case, tmp_path / "run", BUDGET)
        check(outcome)
        assert outcome.code == 2, (case.label, outcome.stderr[:500])
