"""Property-based tests of every rule of every family (hypothesis).

Fed arbitrary Unicode (control characters, emoji, right-to-left text, combining marks) and random
real-looking English review sentences, the build driver must never hit a rule error, and every pair
it yields must hold these invariants:

- the variant differs from its source, and the source is the input text;
- family, rule and expectation are the ones the family module declares;
- reorder rules keep the multiset of words (pairflip.perturb.base.words);
- the stored edits are character spans on the source: applied from the last to the first, they
  turn the source into the variant.
"""

from __future__ import annotations

from collections import Counter

import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from pairflip.perturb.base import TokenEdit, apply_edits, words
from pairflip.perturb.build import BuildStats, iter_pairs, known_rules
from pairflip.perturb.lexicon import load_lexicon
from pairflip.records import Edit

# database=None: no .hypothesis/ folder in the tree; a failure prints its example (and a blob to replay it).
SETTINGS = dict(deadline=None, database=None, print_blob=True,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])


@pytest.fixture(scope="module")
def lexicon():
    return load_lexicon()


def replay(source: str, edits: list[Edit]) -> str:
    """Apply character edits to ``source`` from the last to the first."""
    out = source
    for e in sorted(edits, key=lambda e: (e.start, e.end), reverse=True):
        out = out[: e.start] + e.text + out[e.end :]
    return out


def check_build(texts: list[str], nlp, lexicon, families=None) -> list:
    stats = BuildStats()
    pairs = list(iter_pairs(texts, families=families, seed=0, nlp=nlp, lexicon=lexicon, stats=stats))
    errors = {rule: dict(c) for rule, c in stats.dropped.items() if any("rule error" in r for r in c)}
    assert not errors, f"rule errors on {texts!r}: {errors}"
    known = known_rules()
    inputs = {t.strip() for t in texts}
    for p in pairs:
        assert p.family in known, p
        assert p.rule in known[p.family], p
        assert p.should in known[p.family][p.rule].split("/"), p  # "rise/fall": set per pair
        # a sentence unit: the source is one sentence of an input text
        assert p.source in inputs or (p.extra.get("sentence") is not None and any(p.source in t for t in inputs)), p
        assert p.variant != p.source, p
        assert p.variant.strip(), p
        if p.family == "reorder":
            assert Counter(words(p.variant)) == Counter(words(p.source)), (p.rule, p.source, p.variant)
        got = replay(p.source, p.edits)
        assert got == p.variant, (
            f"{p.rule}: edits {[e.to_dict() for e in p.edits]} on {p.source!r} give {got!r}, "
            f"but the variant is {p.variant!r}"
        )
    return pairs


# --------------------------------------------------------------------------- strategies

# Invented outdoor-gear shop reviews, composed from word lists.
SUBJECTS = ["the tent", "this stove", "the sleeping bag", "my lantern", "the backpack", "these boots", "it",
            "the water filter", "our hammock", "the jacket", "the poles", "they", "the zipper", "the cooler"]
PLURAL = {"these boots", "the poles", "they"}
BE = {"present": ("is", "are"), "past": ("was", "were")}
ADJS = ["roomy", "sturdy", "comfortable", "reliable", "flimsy", "heavy", "bright", "warm", "noisy", "cheap",
        "useful", "awkward", "great", "terrible", "perfect", "awful", "happy", "clean", "dirty", "safe", "easy"]
DEGREE = ["", "very ", "quite ", "really ", "slightly ", "extremely ", "pretty ", "a bit ", "absolutely "]
NEG = ["", "not ", "never "]
VERBS_3SG = ["works", "leaks", "holds up", "breaks", "fits", "feels solid", "smells", "keeps me warm"]
VERBS_PL = ["work", "leak", "hold up", "break", "fit", "feel solid", "smell", "keep me warm"]
VERBS_PAST = ["worked", "leaked", "held up", "broke", "fitted", "felt solid", "smelled", "kept me warm"]
MODALS = ["will", "can", "should", "would", "might"]
ADVERBIALS = ["", " after a week of rain", " on the trail", " for the price", " in cold weather", " honestly",
              " at night", " every time"]
OPENERS = ["", "Honestly, ", "Overall ", "After two trips, ", "I think ", "Sadly, ", "Luckily "]
CLOSERS = [".", "!", "...", " :)", "", "?", "!!"]
JOIN = [" and ", " but ", ", and ", ", but ", " because ", " so ", "; "]


@st.composite
def clause(draw) -> str:
    subj = draw(st.sampled_from(SUBJECTS))
    plural = subj in PLURAL
    kind = draw(st.sampled_from(["be", "verb", "past", "modal", "contraction", "like"]))
    adj = draw(st.sampled_from(DEGREE)) + draw(st.sampled_from(ADJS))
    adv = draw(st.sampled_from(ADVERBIALS))
    if kind == "be":
        tense = draw(st.sampled_from(["present", "past"]))
        be = BE[tense][plural]
        return f"{subj} {be} {draw(st.sampled_from(NEG))}{adj}{adv}"
    if kind == "verb":
        verb = draw(st.sampled_from(VERBS_PL if plural else VERBS_3SG))
        return f"{subj} {verb} {draw(st.sampled_from(['', 'well ', 'badly ', 'really well ']))}{adv}".rstrip()
    if kind == "past":
        return f"{subj} {draw(st.sampled_from(VERBS_PAST))}{adv}"
    if kind == "modal":
        return f"{subj} {draw(st.sampled_from(MODALS))} {draw(st.sampled_from(['', 'not ']))}be {adj}{adv}"
    if kind == "contraction":
        aux = draw(st.sampled_from(["isn't", "wasn't", "doesn't look", "won't be", "can't be"] if not plural
                                   else ["aren't", "weren't", "don't look", "won't be", "can't be"]))
        return f"{subj} {aux} {adj}{adv}"
    verb = draw(st.sampled_from(["like", "love", "hate", "don't like", "really enjoy", "would recommend"]))
    return f"I {verb} {subj if subj not in ('it', 'they') else 'it'}{adv}"


@st.composite
def review(draw) -> str:
    parts = [draw(clause())]
    for _ in range(draw(st.integers(0, 2))):
        parts.append(draw(st.sampled_from(JOIN)) + draw(clause()))
    text = draw(st.sampled_from(OPENERS)) + "".join(parts) + draw(st.sampled_from(CLOSERS))
    style = draw(st.sampled_from(["sentence", "sentence", "sentence", "lower", "upper"]))
    if style == "sentence":
        text = text[:1].upper() + text[1:]
    elif style == "upper":
        text = text.upper()
    return text


@st.composite
def reviews(draw) -> str:
    """One to three review sentences in one text."""
    return " ".join(draw(st.lists(review(), min_size=1, max_size=3)))


# Unicode with the awkward parts made likely: controls, emoji, RTL, combining marks, odd spaces.
AWKWARD = st.sampled_from(
    ["\x00", "\x07", "\x1b", "\t", "\r", "\x0b", "\x0c", "\x85", "\u2028", "\u2029", "\u200b", "\u200d", "\ufeff",
     "\u202e", "\u202c", "\u0301", "\u0308", "\u20dd", "\U0001F44D", "\U0001F3D5\ufe0f", "\U0001F468\u200d\U0001F469",
     "\u05e9\u05dc\u05d5\u05dd", "\u0645\u0631\u062d\u0628\u0627", "\u00a0", "\u3000", "n't", "'s", " not ", "  ",
     " very ", " and ", ", but ", ".", "!", "?", "\u2019"]
)
UNICODE_TEXT = st.lists(st.one_of(st.text(max_size=12), AWKWARD, st.sampled_from(ADJS + SUBJECTS)), max_size=12).map("".join)


# --------------------------------------------------------------------------- the properties


@settings(max_examples=1000, **SETTINGS)
@given(texts=st.lists(UNICODE_TEXT, min_size=1, max_size=3))
@example(texts=["\u00c0 000"])  # found by this test: a shuffle that moves the capital word after a number
@example(texts=["\u202e and sturdy\x8adc\u00df%\x94these boots\r not \u0301awful"])  # found: coordination
def test_arbitrary_unicode_never_breaks_a_rule(nlp, lexicon, texts):
    check_build(texts, nlp, lexicon)


@settings(max_examples=300, **SETTINGS)
@given(text=st.text(min_size=1, max_size=200))
def test_plain_hypothesis_text_never_breaks_a_rule(nlp, lexicon, text):
    check_build([text], nlp, lexicon)


@settings(max_examples=1000, **SETTINGS)
@given(texts=st.lists(reviews(), min_size=1, max_size=3))
@example(texts=["The tent works badly  after a week of rain"])  # found by this test (a double space)
def test_review_sentences_keep_the_invariants(nlp, lexicon, texts):
    check_build(texts, nlp, lexicon)


@settings(max_examples=100, **SETTINGS)
@given(texts=st.lists(reviews(), min_size=1, max_size=4))
def test_same_seed_same_pairs(nlp, lexicon, texts):
    a = [p.to_dict() for p in iter_pairs(texts, seed=3, nlp=nlp, lexicon=lexicon)]
    b = [p.to_dict() for p in iter_pairs(texts, seed=3, nlp=nlp, lexicon=lexicon)]
    assert a == b


@st.composite
def doc_and_edits(draw, nlp):
    text = draw(st.one_of(reviews(), UNICODE_TEXT.filter(lambda t: t.strip())))
    doc = nlp.make_doc(text)  # apply_edits needs tokens and their offsets only
    n = len(doc)
    if n == 0:
        return doc, ()
    # Non-overlapping token spans: cut points over 0..n, take some gaps as edits.
    cuts = sorted(draw(st.sets(st.integers(0, n), min_size=1, max_size=min(n + 1, 6))))
    edits = []
    for a, b in zip(cuts, cuts[1:] + [cuts[-1]]):
        if draw(st.booleans()):
            new = draw(st.sampled_from(["", "not", "very", "really", "never", ",", ".", "is not", "do not like",
                                        "Not", "it", "and", "n't", "\U0001F44D"]))
            if a == b and new == "":
                continue
            edits.append(TokenEdit(a, b if b > a else a, new))
    # insertions must not sit inside a replaced span
    spans = [(e.start, e.end) for e in edits if e.end > e.start]
    edits = [e for e in edits if e.end > e.start or not any(s < e.start < t for s, t in spans)]
    return doc, tuple(edits)


def test_apply_edits_spans_replay_to_the_variant(nlp):
    """The shared edit applier on its own: the char edits it returns must rebuild the variant."""

    @settings(max_examples=1200, **SETTINGS)
    @given(data=st.data())
    def run(data):
        doc, edits = data.draw(doc_and_edits(nlp))
        if not edits:
            return
        try:
            variant, char_edits = apply_edits(doc, edits)
        except ValueError:
            return  # overlapping edits are refused, which is allowed
        got = replay(doc.text, char_edits)
        assert got == variant, (
            f"apply_edits on {doc.text!r} with {edits}: char edits {[e.to_dict() for e in char_edits]} "
            f"replay to {got!r}, but the variant is {variant!r}"
        )

    run()


# --------------------------------------------------------------------------- scoring under model faults

# Faults a model can inject at one of its batches. cmd: models count batches per process
# (FAULTY_MODEL in tests/test_adapters_command.py); the Python model counts its calls.
CMD_FAULTS = ["none", "error", "crash", "short", "hang", "extra-before", "extra-after", "extra-late"]
PY_FAULTS = ["none", "raise", "exit", "plain-interrupt", "signal", "short"]

PY_MODEL = """
import signal
import sys

from helpers.keyword_rules import CLASSES, label, probabilities

PLAN = {"fault": "none", "at": 0, "calls": 0}


def rate(texts):
    n = PLAN["calls"]
    PLAN["calls"] += 1
    out = [{"label": label(t), "probabilities": dict(zip(CLASSES, probabilities(t)))} for t in texts]
    if n != PLAN["at"]:
        return out
    fault = PLAN["fault"]
    if fault == "raise":
        raise RuntimeError("the stove model ran out of fuel")
    if fault == "exit":
        sys.exit(0)
    if fault == "plain-interrupt":
        raise KeyboardInterrupt
    if fault == "signal":  # a real Ctrl-C arriving in the middle of a batch
        signal.raise_signal(signal.SIGINT)
    if fault == "short":
        return out[:-1]
    return out
"""


@pytest.fixture(scope="module")
def fault_bench(tmp_path_factory):
    """A folder with the fault-injecting models, suites of several sizes, and the results of a
    healthy run of each model kind on each suite (computed once, on first use)."""
    import importlib
    import sys
    import uuid

    from test_adapters_command import faulty_model

    folder = tmp_path_factory.mktemp("faults")
    name = f"faulty_py_{uuid.uuid4().hex[:8]}"
    (folder / f"{name}.py").write_text(PY_MODEL, encoding="utf-8")
    sys.path.insert(0, str(folder))
    py_module = importlib.import_module(name)
    bench = {"folder": folder, "py": py_module, "py_spec": f"{name}:rate", "cmd_spec": faulty_model, "suites": {},
             "healthy": {}, "runs": 0}
    yield bench
    sys.path.remove(str(folder))


def _body(path) -> list[dict]:
    import json

    return [json.loads(x) for x in path.read_text(encoding="utf-8").splitlines()[1:]]


def _suite(bench, n_extra: int):
    from helpers.suites import write_test_suite

    if n_extra not in bench["suites"]:
        bench["suites"][n_extra] = write_test_suite(bench["folder"] / f"suite-{n_extra}.jsonl", n_extra)
    return bench["suites"][n_extra]


def _score_run(bench, kind: str, n_extra: int, fault: str, at: int, echo: bool, batch_size: int, concurrency: int):
    from helpers.cli import run_cli

    bench["runs"] += 1
    k = bench["runs"]
    out, cache = bench["folder"] / f"results-{k}.jsonl", bench["folder"] / f"cache-{k}.db"
    if kind == "py":
        bench["py"].PLAN.update(fault=fault, at=at, calls=0)
        spec = bench["py_spec"]
    else:
        spec = bench["cmd_spec"](bench["folder"], fault, at, echo)
    run = run_cli(["score", str(_suite(bench, n_extra)), "--model", spec, "-o", str(out), "--cache", str(cache),
                   "--batch-size", str(batch_size), "--concurrency", str(concurrency), "--timeout", "1.5"])
    return run, out, cache


def _healthy(bench, kind: str, n_extra: int) -> list[dict]:
    key = (kind, n_extra)
    if key not in bench["healthy"]:
        run, out, _ = _score_run(bench, kind, n_extra, "none", 0, False, 64, 1)
        assert run.code == 0, run.stderr
        bench["healthy"][key] = _body(out)
    return bench["healthy"][key]


@st.composite
def fault_case(draw):
    kind = draw(st.sampled_from(["cmd", "cmd", "py"]))
    return dict(
        kind=kind,
        fault=draw(st.sampled_from(CMD_FAULTS if kind == "cmd" else PY_FAULTS)),
        at=draw(st.integers(0, 5)),
        echo=draw(st.booleans()),
        n_extra=draw(st.sampled_from([0, 4, 12])),
        batch_size=draw(st.integers(2, 7)),
        concurrency=draw(st.integers(1, 3)),
    )


def test_a_faulty_model_never_leaves_wrong_results_or_wrong_cache(fault_bench):
    """For any suite and any fault injected at a random batch (an exception or error answer, a
    crash, an extra line, a short answer, a hang past --timeout, sys.exit, KeyboardInterrupt, a
    real SIGINT), `pairflip score --cache` either completes with exactly the results of a healthy
    run, or exits non-zero leaving no output file and a cache that holds only correct predictions
    (each one equal to the healthy run's)."""
    from helpers.suites import make_pairs, texts_of
    from test_adapters_command import assert_cache_holds_only_keyword_predictions

    def case(kind, fault, at=1, echo=False, n_extra=4, batch_size=3, concurrency=1):
        return dict(kind=kind, fault=fault, at=at, echo=echo, n_extra=n_extra, batch_size=batch_size,
                    concurrency=concurrency)

    # every kind of fault at least once, whatever is drawn
    @settings(max_examples=36, **SETTINGS)
    @given(case=fault_case())
    @example(case=case("cmd", "hang", concurrency=2))
    @example(case=case("py", "signal"))
    @example(case=case("cmd", "extra-late", at=2, concurrency=2))
    @example(case=case("cmd", "extra-before", at=0, echo=True, concurrency=3))
    @example(case=case("cmd", "crash", at=3))
    def run(case):
        healthy = _healthy(fault_bench, case["kind"], case["n_extra"])
        res, out, cache = _score_run(fault_bench, **case)
        if res.code == 0:
            assert _body(out) == healthy, case
        else:
            assert res.code in (2, 130), (case, res.code, res.stderr)
            assert res.stderr.startswith("pairflip: error: model" if res.code == 2 else "pairflip: interrupted"), res.stderr
            assert not out.exists(), case
            assert not [p for p in out.parent.iterdir() if p.name.startswith(f".{out.name}")], case
        assert case["fault"] != "none" or res.code == 0, (case, res.stderr)
        # the cache holds only right predictions: the keyword rules' label and probabilities,
        # which is what the healthy run predicted (its results equal the keyword verdicts)
        cached = assert_cache_holds_only_keyword_predictions(cache, texts_of(make_pairs(case["n_extra"])))
        if res.code == 0:
            assert cached == len(texts_of(make_pairs(case["n_extra"])))

    run()
