"""pairflip.testing: gate() from Python, and the pytest plugin's pairflip_gate fixture."""

from __future__ import annotations

import subprocess
import sys
import textwrap

import pytest

from pairflip.files import write_suite
from pairflip.records import Pair, PairflipError, Suite
from pairflip.testing import gate

pytest_plugins = ["pytester"]

PAIRS = [
    ("The tent is roomy.", "The tent is not roomy.", "positive"),
    ("The lantern is bright.", "The lantern is not bright.", "positive"),
    ("The zipper is flimsy.", "The zipper is not flimsy.", "negative"),
    ("The stove is noisy.", "The stove is not noisy.", "negative"),
]


def _suite() -> Suite:
    pairs = [Pair(s, v, "negation", "negation/copula", "flip", label=lab) for s, v, lab in PAIRS]
    pairs.append(Pair("The pack is light and the straps are soft.", "The straps are soft and the pack is light.",
                      "reorder", "reorder/coordination", "hold"))
    return Suite(header={"generator": {"name": "hand-made"}}, pairs=pairs)


def negation_aware(texts):
    """Knows its four words and reads "not" before them: keeps every expectation."""
    out = []
    for t in texts:
        low = t.lower()
        pos = any(w in low for w in ("roomy", "bright", "light", "soft"))
        if " not " in low:
            pos = not pos
        out.append("positive" if pos else "negative")
    return out


def keyword_only(texts):
    """Ignores "not": breaks every negation pair."""
    return ["positive" if any(w in t.lower() for w in ("roomy", "bright", "light", "soft")) else "negative"
            for t in texts]


def test_gate_passes_and_returns_the_outcome():
    out = gate(negation_aware, _suite(), ["negation.violation <= 0", "reorder.violation <= 0"])
    assert out.passed and len(out.limits) == 2


def test_gate_failure_is_an_assertion_with_the_table():
    with pytest.raises(AssertionError) as ei:
        gate(keyword_only, _suite(), "negation.violation <= 0.25")
    msg = str(ei.value)
    assert msg.startswith("pairflip gate failed")
    assert "negation.violation <= 0.25" in msg and "FAIL, 75.0 pts over" in msg
    assert "gate FAILED: 1 of 1 limits crossed" in msg
    assert "\x1b[" not in msg


def test_gate_takes_a_suite_file_and_a_baseline(tmp_path):
    import pairflip
    from pairflip.files import write_results

    path = tmp_path / "suite.jsonl"
    write_suite(_suite(), path)
    assert gate(negation_aware, path, ["negation.violation <= 0"]).passed
    old = pairflip.score(_suite(), negation_aware)
    write_results(old, tmp_path / "old.jsonl")
    out = gate(negation_aware, str(path), [], baseline=tmp_path / "old.jsonl")
    assert out.passed and out.regressions is not None


def test_gate_bad_input():
    with pytest.raises(PairflipError, match="suite must be a Suite"):
        gate(negation_aware, 42, ["negation.violation <= 0"])
    with pytest.raises(PairflipError, match="empty"):
        gate(negation_aware, [], ["negation.violation <= 0"])
    with pytest.raises(PairflipError, match="no family 'intensifier'"):
        gate(negation_aware, _suite(), ["intensifier.violation <= 0"])


def test_plugin_module_imports_cheaply():
    # The plugin loads in every pytest run of the environment: no spaCy, no rich, no report code.
    code = ("import sys, pairflip.testing; "
            "print(sorted(m for m in ('spacy', 'rich', 'sklearn', 'pairflip.report', 'pairflip.perturb') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


def test_plugin_is_registered_as_an_entry_point():
    from importlib.metadata import entry_points

    eps = [ep for ep in entry_points(group="pytest11") if ep.name == "pairflip"]
    assert eps and eps[0].value == "pairflip.testing"


USER_TESTS = textwrap.dedent(
    '''
    from pairflip.records import Pair, Suite

    def keyword_only(texts):
        return ["positive" if "roomy" in t else "negative" for t in texts]

    SUITE = Suite(header={}, pairs=[
        Pair("The tent is roomy.", "The tent is not roomy.", "negation", "negation/copula", "flip"),
        Pair("The tent is cramped.", "The tent is not cramped.", "negation", "negation/copula", "flip"),
    ])

    def test_loose_gate(pairflip_gate):
        pairflip_gate(keyword_only, SUITE, ["negation.violation <= 100%"])

    def test_strict_gate(pairflip_gate):
        pairflip_gate(keyword_only, SUITE, ["negation.violation <= 0.10"])

    def test_limits_from_pyproject(pairflip_gate):
        pairflip_gate(keyword_only, SUITE)
    '''
)


def test_fixture_in_a_user_test_file(pytester):
    pytester.makepyprojecttoml('[tool.pairflip.gate]\nlimits = ["negation.flip >= 0.5"]\n')
    pytester.makepyfile(test_user=USER_TESTS)
    result = pytester.runpytest("-p", "no:cacheprovider")
    result.assert_outcomes(passed=1, failed=2)
    out = result.stdout.str()
    assert "test_strict_gate" in out and "test_limits_from_pyproject" in out
    # the failing test's message is the gate table
    result.stdout.fnmatch_lines(["*AssertionError: pairflip gate failed*"])
    result.stdout.fnmatch_lines(["*negation.violation <= 0.10*FAIL, 90.0 pts over*"])
    result.stdout.fnmatch_lines(["*negation.flip >= 0.5*FAIL, 50.0 pts under*"])


def test_fixture_without_limits_or_pyproject_says_so(pytester):
    pytester.makepyfile(test_user=USER_TESTS)
    result = pytester.runpytest("-p", "no:cacheprovider", "-k", "pyproject")
    result.assert_outcomes(failed=1)
    result.stdout.fnmatch_lines(["*no limits given and no [[]tool.pairflip.gate[]] table*"])


def test_gate_builds_with_the_unit_given(nlp):
    # A list of texts is built as `pairflip build` would: by sentence (the default) or whole texts.
    texts = ["The tent is roomy and warm. The stove lights quickly on cold mornings. These boots are comfortable.",
             "The lantern is bright. The strap feels flimsy."]
    limit = "reorder/shuffle.flip <= 100%"
    by_text = gate(negation_aware, texts, limit, unit="text", families="reorder/shuffle")
    by_sentence = gate(negation_aware, texts, limit, families="reorder/shuffle")
    assert by_text.limits[0].count == 2  # one shuffled variant per source
    assert by_sentence.limits[0].count == 5
    with pytest.raises(PairflipError, match="--unit"):
        gate(negation_aware, texts, limit, unit="paragraph")
