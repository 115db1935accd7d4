"""``path/model.joblib``: a real fitted scikit-learn Pipeline saved with joblib."""

from __future__ import annotations

import hashlib

import joblib
import numpy as np
import pytest
from sklearn.feature_extraction.text import CountVectorizer
from sklearn.linear_model import LogisticRegression
from sklearn.pipeline import Pipeline

import pairflip
from pairflip.probes import load_model
from pairflip.records import PairflipError

# Invented outdoor-gear review lines (demo data of a fictional shop).
TRAIN = [
    ("The tent stayed dry all night", "positive"),
    ("Warm sleeping bag, slept like a log", "positive"),
    ("Sturdy poles and a great zip", "positive"),
    ("The headlamp is bright and light", "positive"),
    ("Comfortable boots from the first mile", "positive"),
    ("The jacket leaks at the seams", "negative"),
    ("Flimsy pegs, two broke on day one", "negative"),
    ("The stove is heavy and the flame is weak", "negative"),
    ("Cold and soggy after the first shower", "negative"),
    ("The strap tore and the buckle is wobbly", "negative"),
]
PROBE = ["The tent is dry and warm", "The pegs broke", "A sturdy stove", "The jacket is soggy", "mile"]


def _pipeline(extra: int = 0) -> Pipeline:
    texts = [t for t, _ in TRAIN]
    labels = [y for _, y in TRAIN]
    return Pipeline([("counts", CountVectorizer()), ("clf", LogisticRegression(C=1.0 + extra))]).fit(texts, labels)


@pytest.fixture(scope="module")
def pipe():
    return _pipeline()


@pytest.fixture
def model_file(tmp_path, pipe):
    path = tmp_path / "gear.joblib"
    joblib.dump(pipe, path)
    return path


def test_predictions_match_the_pipeline(model_file, pipe):
    m = load_model(str(model_file))
    preds = m.predict(PROBE)
    assert [p.label for p in preds] == list(pipe.predict(PROBE))
    proba = pipe.predict_proba(PROBE)
    for p, row in zip(preds, proba):
        assert p.probabilities == {c: float(x) for c, x in zip(pipe.classes_, row)}
    assert m.classes == ["negative", "positive"]
    assert m.describe()["kind"] == "joblib" and m.describe()["name"] == "gear"


def test_score_uses_predict_proba_for_polarity(model_file, pipe):
    pairs = [pairflip.Pair(source="The tent is dry and warm", variant="The tent is not dry",
                           family="negation", rule="negation/copula", should="flip")]
    res = pairflip.score(pairs, str(model_file))
    v = res.verdicts[0]
    neg, pos = pipe.predict_proba(["The tent is dry and warm"])[0]
    assert v.source_score == pytest.approx(pos - neg)  # expected polarity: -1 * p(neg) + 1 * p(pos)
    assert v.source_pred == pipe.predict(["The tent is dry and warm"])[0]
    assert res.header["model"]["spec"] == str(model_file)


def test_fingerprint_is_sha256_of_the_file(model_file, tmp_path):
    m = load_model(str(model_file))
    assert m.fingerprint() == hashlib.sha256(model_file.read_bytes()).hexdigest()
    other = tmp_path / "retrained.joblib"
    joblib.dump(_pipeline(extra=3), other)
    assert load_model(str(other)).fingerprint() != m.fingerprint()


def test_numeric_classes(tmp_path):
    texts = [t for t, _ in TRAIN]
    y = np.array([1 if lab == "positive" else 0 for _, lab in TRAIN])
    pipe = Pipeline([("counts", CountVectorizer()), ("clf", LogisticRegression())]).fit(texts, y)
    path = tmp_path / "binary.pkl"
    joblib.dump(pipe, path)
    pairs = [pairflip.Pair(source="Warm and dry", variant="Cold and soggy", family="negation",
                           rule="negation/removal", should="flip")]
    res = pairflip.score(pairs, str(path))
    assert res.header["labels"]["polarity"] == {"0": -1, "1": 1}
    expected = tuple(str(int(x)) for x in pipe.predict(["Warm and dry", "Cold and soggy"]))
    assert (res.verdicts[0].source_pred, res.verdicts[0].variant_pred) == expected


def test_missing_file(tmp_path):
    with pytest.raises(PairflipError, match=r"nowhere\.joblib: no such file"):
        load_model(str(tmp_path / "nowhere.joblib"))


def test_folder(tmp_path):
    d = tmp_path / "dir.joblib"
    d.mkdir()
    with pytest.raises(PairflipError, match="is a folder"):
        load_model(str(d))


@pytest.mark.parametrize("content", [b"", b"not a pickle at all, just a tent review\n", bytes(range(256)) * 4])
def test_corrupt_file(tmp_path, content):
    p = tmp_path / "broken.joblib"
    p.write_bytes(content)
    with pytest.raises(PairflipError) as e:
        load_model(str(p))
    assert str(p) in str(e.value) and "cannot load the model file" in str(e.value)


def test_truncated_file(tmp_path, model_file):
    p = tmp_path / "half.joblib"
    p.write_bytes(model_file.read_bytes()[:200])
    with pytest.raises(PairflipError, match="half.joblib: cannot load"):
        load_model(str(p))


def test_not_a_model(tmp_path):
    p = tmp_path / "weights.joblib"
    joblib.dump({"weights": [0.1, 0.2]}, p)
    with pytest.raises(PairflipError) as e:
        load_model(str(p))
    msg = str(e.value)
    assert str(p) in msg and "builtins.dict" in msg and "no predict method" in msg


def test_unfitted_pipeline(tmp_path):
    p = tmp_path / "unfitted.joblib"
    joblib.dump(Pipeline([("counts", CountVectorizer()), ("clf", LogisticRegression())]), p)
    with pytest.raises(PairflipError, match="unfitted.joblib: the Pipeline in the file was saved before it was fitted"):
        load_model(str(p))
