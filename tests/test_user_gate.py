"""A user's own test file: gate the demo's unigram model through the pairflip_gate fixture.

This is how a team would gate its classifier in CI: a suite built from their own unlabelled
sentences (here the demo's invented outdoor-gear sentences) and limits they agreed on.
"""

from __future__ import annotations

import textwrap

import pytest

import pairflip
from pairflip.demo.models import load_sentences
from pairflip.files import write_suite

pytest_plugins = ["pytester"]

MODEL = "pairflip.demo.models:unigram_scored"

# The thresholds the unigram bag-of-words model (with its class probabilities, so every
# strengthen/weaken pair is judged) really passes, with room to spare. Measured on the demo suite
# (all families over load_sentences(), seed 0) when this test was last updated: negation
# violations 71.0 % (88/124; Wilson 95 % interval 62.4-78.2 %), intensifier 13.2 % (23/174;
# interval 9.0-19.1 %), double-negation 81.0 % (17/21; interval 60.0-92.3 %).
# A unigram model cannot read "not" as scoping over the next word, so it breaks most negation
# pairs: the limit only guards against it getting worse still. The intensifier limit is judged
# on the interval's upper bound (--on upper), so it passes only while the data show the rate is
# below 25 %.
LIMITS = [
    "negation.violation <= 0.85",
    "double-negation.violation <= 0.95",
]
STRICT = ["intensifier.violation <= 25%"]


@pytest.fixture(scope="module")
def suite(nlp):
    # A user would write: pairflip.build_suite(my_sentences, seed=0)
    return pairflip.build_suite(load_sentences(), seed=0, nlp=nlp)


def test_unigram_passes_the_team_limits(pairflip_gate, suite):
    outcome = pairflip_gate(MODEL, suite, LIMITS)
    assert outcome.passed


def test_unigram_passes_the_intensifier_limit_on_the_upper_bound(pairflip_gate, suite):
    outcome = pairflip_gate(MODEL, suite, STRICT, on="upper")
    assert outcome.limits[0].value == outcome.limits[0].ci95[1] < 0.25


def test_a_strict_negation_limit_fails(pairflip_gate, suite):
    # The same model does not pass a limit meant for a negation-aware model.
    with pytest.raises(AssertionError, match=r"negation\.violation <= 0\.10"):
        pairflip_gate(MODEL, suite, ["negation.violation <= 0.10"])


def test_failing_gate_fails_a_user_test_with_the_table(pytester, suite):
    # The user's repository: a suite file and a test file; pytest runs it with the plugin.
    write_suite(suite, pytester.path / "suite.jsonl")
    pytester.makepyfile(
        test_model_gate=textwrap.dedent(
            f'''
            def test_release_gate(pairflip_gate):
                pairflip_gate("{MODEL}", "suite.jsonl", ["negation.violation <= 0.10", "intensifier.violation <= 0.25"])

            def test_loose_gate(pairflip_gate):
                pairflip_gate("{MODEL}", "suite.jsonl", {LIMITS!r})
            '''
        )
    )
    result = pytester.runpytest("-p", "no:cacheprovider")
    result.assert_outcomes(passed=1, failed=1)
    result.stdout.fnmatch_lines([
        "*test_release_gate*",
        "*AssertionError: pairflip gate failed*",
        "*negation.violation <= 0.10*FAIL*pts over*",
        "*intensifier.violation <= 0.25*pass*",
        "*gate FAILED: 1 of 2 limits crossed*",
    ])
