"""``package.module:name`` models and Python objects passed to pairflip.score."""

from __future__ import annotations

import pytest

import pairflip
from helpers import keyword_rules, toy_models
from helpers.suites import make_pairs, texts_of
from pairflip.probes import PythonModel, as_model, load_model
from pairflip.records import PairflipError, Prediction

TEXTS = ["The tent is great.", "The jacket leaks.", "The tent is not great."]


def test_callable_returning_labels():
    m = load_model("helpers.toy_models:keyword_labels")
    assert m.spec == "helpers.toy_models:keyword_labels"
    assert [p.label for p in m.predict(TEXTS)] == ["positive", "negative", "negative"]
    assert all(p.probabilities is None and p.score is None for p in m.predict(TEXTS))


def test_callable_returning_dicts_with_probabilities():
    preds = load_model("helpers.toy_models:keyword_dicts").predict(TEXTS)
    for t, p in zip(TEXTS, preds):
        assert p.probabilities == dict(zip(keyword_rules.CLASSES, keyword_rules.probabilities(t)))


def test_callable_returning_scores():
    preds = load_model("helpers.toy_models:keyword_scores").predict(TEXTS)
    assert [p.score for p in preds] == [0.5, -0.5, -0.5]


def test_class_is_instantiated_and_uses_predict_and_predict_proba():
    m = load_model("helpers.toy_models:KeywordClassifier")
    assert isinstance(m.obj, toy_models.KeywordClassifier)
    assert m.classes == ["negative", "positive"]
    preds = m.predict(TEXTS)
    assert [p.label for p in preds] == [keyword_rules.label(t) for t in TEXTS]
    assert preds[0].probabilities["positive"] == pytest.approx(keyword_rules.probabilities(TEXTS[0])[1])


def test_score_with_each_output_kind_agrees_on_labels():
    pairs = make_pairs()
    verdict_sets = []
    for name in ("keyword_labels", "keyword_dicts", "KeywordClassifier"):
        res = pairflip.score(pairs, f"helpers.toy_models:{name}")
        verdict_sets.append([(v.source_pred, v.variant_pred, v.verdict) for v in res.verdicts])
    labels_only, dicts, classifier = verdict_sets
    assert [v[:2] for v in labels_only] == [v[:2] for v in dicts] == [v[:2] for v in classifier]
    assert dicts == classifier
    # Labels only: a strengthen/weaken pair with one label on both sides cannot be judged (n/a);
    # every other verdict is the one the scored models get.
    assert all(a == b or (a[2] == "n/a" and p.should in ("strengthen", "weaken"))
               for a, b, p in zip(labels_only, dicts, pairs))
    assert all(s for s in verdict_sets[0])


def test_plain_callable_and_object_in_python():
    res = pairflip.score(make_pairs(), lambda ts: [keyword_rules.label(t) for t in ts])
    assert len(res.verdicts) == len(make_pairs())
    assert isinstance(as_model(toy_models.KeywordClassifier()), PythonModel)


def test_predictions_may_be_prediction_records():
    m = PythonModel(lambda ts: [Prediction(label="pos", score=0.2) for _ in ts], spec="inline")
    assert m.predict(["a"]) == [Prediction(label="pos", score=0.2)]


def test_star_ratings_model():
    res = pairflip.score(make_pairs(), "helpers.toy_models:star_ratings")
    assert res.header["labels"]["order"] == ["1", "2", "3", "4", "5"]
    by_id = {p.id: p for p in make_pairs()}
    for v in res.verdicts:
        stars = max(1, min(5, 3 + keyword_rules.raw_score(by_id[v.id].source)))
        assert v.source_pred == str(stars)


def test_fingerprint_changes_with_state_and_is_stable():
    a = toy_models.KeywordClassifier()
    assert PythonModel(a, spec="x").fingerprint() == PythonModel(a, spec="x").fingerprint()
    assert PythonModel(a, spec="x").fingerprint() != PythonModel(a, spec="y").fingerprint()
    b = toy_models.KeywordClassifier()
    b.threshold = 0.9  # different pickled state
    assert PythonModel(a, spec="x").fingerprint() != PythonModel(b, spec="x").fingerprint()



_FIT_AND_PRINT = """
from sklearn.feature_extraction.text import CountVectorizer
from sklearn.linear_model import LogisticRegression
from sklearn.pipeline import make_pipeline
from pairflip.probes import PythonModel
texts = ["the tent is dry", "the tent leaks", "the stove is great", "the stove is not great"] * 3
pipe = make_pipeline(CountVectorizer(stop_words=["the", "is", "a", "of", "and"]), LogisticRegression())
pipe.fit(texts, ["positive", "negative", "positive", "negative"] * 3)
pipe.predict(["the tent"])
print(PythonModel(pipe, spec="gear:pipe").fingerprint())
"""


def test_fingerprint_is_the_same_in_another_process():
    """A cache made by one run must be found by the next: the same fitted text pipeline gets the
    same fingerprint in processes with different string-hash salts (sets pickle in hash order)
    and different memory layouts (the vectorizer keeps id() of its stop-word list)."""
    import os
    import subprocess
    import sys

    out = []
    for seed in ("1", "2", "3"):
        env = {**os.environ, "PYTHONHASHSEED": seed}
        run = subprocess.run([sys.executable, "-c", _FIT_AND_PRINT], env=env, capture_output=True, text=True, timeout=120)
        assert run.returncode == 0, run.stderr
        out.append(run.stdout.strip())
    assert len(out[0]) == 64 and out[0] == out[1] == out[2]

@pytest.mark.parametrize(
    "spec, what",
    [
        ("helpers.no_such_module:predict", "cannot import module 'helpers.no_such_module'"),
        ("helpers.toy_models:no_such_name", "module 'helpers.toy_models' has no attribute 'no_such_name'"),
        ("helpers.broken_import:predict", "importing module 'helpers.broken_import' raised RuntimeError: the model weights"),
        ("helpers.toy_models:not_a_model", "not_a_model is a int, expected a callable"),
        ("helpers.toy_models:NeedsArguments", "NeedsArguments is a class and making one without arguments raised TypeError"),
        ("helpers.toy_models:", "expected package.module:name"),
        ("not a spec:x y", "expected package.module:name"),
    ],
)
def test_import_errors_name_the_spec(spec, what):
    with pytest.raises(PairflipError) as e:
        load_model(spec)
    msg = str(e.value)
    assert spec in msg and what in msg


def test_not_a_spec():
    with pytest.raises(PairflipError, match="not a model SPEC"):
        load_model("model-without-form")
    with pytest.raises(PairflipError, match="expected a model"):
        as_model(42)


def test_distinct_texts_are_sent_once():
    toy_models.received.clear()
    pairs = make_pairs()
    pairflip.score(pairs, "helpers.toy_models:keyword_labels", batch_size=5)
    assert sorted(toy_models.received) == sorted(texts_of(pairs))
    assert len(toy_models.received) < 2 * len(pairs)  # shared sources are predicted once

