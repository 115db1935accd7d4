"""``path/model.skops``: a fitted scikit-learn Pipeline saved with skops, loaded with its
trusted-type checks (``skops.io.get_untrusted_types``, then ``skops.io.load(trusted=...)``)."""

from __future__ import annotations

import hashlib
import json
import pickle
import warnings

import pytest
from sklearn.exceptions import ConvergenceWarning
from sklearn.feature_extraction.text import CountVectorizer
from sklearn.linear_model import LogisticRegression
from sklearn.neural_network import MLPClassifier
from sklearn.pipeline import Pipeline

from pairflip.probes import load_model
from pairflip.records import PairflipError
from helpers.cli import run_cli
from helpers.suites import write_test_suite

sio = pytest.importorskip("skops.io", reason='needs the skops extra: pip install -e ".[test]"')

# Invented outdoor-gear review lines (demo data of a fictional shop).
TRAIN = [
    ("The tent stayed dry all night", "positive"),
    ("Warm sleeping bag, slept like a log", "positive"),
    ("Sturdy poles and a great zip", "positive"),
    ("The headlamp is bright and light", "positive"),
    ("The jacket leaks at the seams", "negative"),
    ("Flimsy pegs, two broke on day one", "negative"),
    ("The stove is heavy and the flame is weak", "negative"),
    ("Cold and soggy after the first shower", "negative"),
]
PROBE = ["The tent is dry and warm", "The pegs broke", "A sturdy stove", "The jacket is soggy"]
# The type skops does not trust by default in a fitted MLPClassifier (its optimiser's state);
# it is what skops.io.get_untrusted_types reports for such a file (checked in the test below).
ADAM = "sklearn.neural_network._stochastic_optimizers.AdamOptimizer"


def _fit(clf) -> Pipeline:
    return Pipeline([("counts", CountVectorizer()), ("clf", clf)]).fit([t for t, _ in TRAIN], [y for _, y in TRAIN])


@pytest.fixture(scope="module")
def logreg() -> Pipeline:
    return _fit(LogisticRegression())


@pytest.fixture(scope="module")
def mlp() -> Pipeline:
    with warnings.catch_warnings():  # eight texts: whether adam converged does not matter here
        warnings.simplefilter("ignore", ConvergenceWarning)
        return _fit(MLPClassifier(hidden_layer_sizes=(4,), max_iter=50, random_state=0))


@pytest.fixture
def logreg_file(tmp_path, logreg):
    path = tmp_path / "gear.skops"
    sio.dump(logreg, path)
    return path


@pytest.fixture
def mlp_file(tmp_path, mlp):
    path = tmp_path / "deep.skops"
    sio.dump(mlp, path)
    return path


def test_predictions_match_the_pipeline(logreg_file, logreg):
    m = load_model(str(logreg_file))
    preds = m.predict(PROBE)
    assert [p.label for p in preds] == list(logreg.predict(PROBE))
    for p, row in zip(preds, logreg.predict_proba(PROBE)):
        assert p.probabilities == {c: float(x) for c, x in zip(logreg.classes_, row)}
    d = m.describe()
    assert d["kind"] == "skops" and d["name"] == "gear" and d["spec"] == str(logreg_file)


def test_fingerprint_is_sha256_of_the_file(logreg_file, tmp_path):
    m = load_model(str(logreg_file))
    assert m.fingerprint() == hashlib.sha256(logreg_file.read_bytes()).hexdigest()
    other = tmp_path / "retrained.skops"
    sio.dump(_fit(LogisticRegression(C=4.0)), other)
    assert load_model(str(other)).fingerprint() != m.fingerprint()


def test_untrusted_types_are_listed_and_nothing_is_loaded(mlp_file, monkeypatch):
    assert sio.get_untrusted_types(file=mlp_file) == [ADAM]  # what skops itself reports
    calls = []
    monkeypatch.setattr(sio, "load", lambda *a, **k: calls.append(a) or pytest.fail("loaded an untrusted file"))
    with pytest.raises(PairflipError) as e:
        load_model(str(mlp_file))
    msg = str(e.value)
    assert "\n" not in msg and str(mlp_file) in msg
    assert "does not trust by default: " + ADAM in msg and f"--trust {ADAM}" in msg
    assert calls == []


def test_trust_accepts_the_listed_type(mlp_file, mlp):
    m = load_model(str(mlp_file), trust=[ADAM])
    assert [p.label for p in m.predict(PROBE)] == list(mlp.predict(PROBE))
    assert m.kind == "skops"


def test_trusting_another_type_is_not_enough(mlp_file):
    with pytest.raises(PairflipError, match=r"deep\.skops: the file holds 1 type skops does not trust"):
        load_model(str(mlp_file), trust=["sklearn.linear_model._logistic.LogisticRegression"])


def test_trust_with_a_joblib_file_is_refused(tmp_path, logreg):
    import joblib

    path = tmp_path / "gear.joblib"
    joblib.dump(logreg, path)
    with pytest.raises(PairflipError, match=r"--trust builtins.dict: only a \.skops model file has types to trust"):
        load_model(str(path), trust=["builtins.dict"])


@pytest.mark.parametrize("content", [b"", b"a tent review, not a zip file\n", pickle.dumps({"weights": [1, 2]})])
def test_corrupt_file(tmp_path, content):
    p = tmp_path / "broken.skops"
    p.write_bytes(content)
    with pytest.raises(PairflipError) as e:
        load_model(str(p))
    msg = str(e.value)
    assert str(p) in msg and "cannot load the model file" in msg and "skops.io.dump" in msg and "\n" not in msg


def test_missing_file_and_folder(tmp_path):
    with pytest.raises(PairflipError, match=r"nowhere\.skops: no such file"):
        load_model(str(tmp_path / "nowhere.skops"))
    (tmp_path / "dir.skops").mkdir()
    with pytest.raises(PairflipError, match=r"dir\.skops: is a folder, expected a model file saved with skops\.io\.dump"):
        load_model(str(tmp_path / "dir.skops"))


def test_not_a_model(tmp_path):
    p = tmp_path / "weights.skops"
    sio.dump({"weights": [0.1, 0.2]}, p)
    with pytest.raises(PairflipError, match=r"weights\.skops: the file holds a builtins\.dict, which has no predict method"):
        load_model(str(p))


def test_unfitted_pipeline(tmp_path):
    p = tmp_path / "unfitted.skops"
    sio.dump(Pipeline([("counts", CountVectorizer()), ("clf", LogisticRegression())]), p)
    with pytest.raises(PairflipError, match=r"saved before it was fitted; call fit\(\) before skops\.io\.dump"):
        load_model(str(p))


def test_without_skops_the_error_names_the_extra(logreg_file, monkeypatch):
    import sys

    monkeypatch.setitem(sys.modules, "skops.io", None)  # an import of skops.io now fails
    monkeypatch.setitem(sys.modules, "skops", None)
    with pytest.raises(PairflipError, match=r'gear\.skops: loading a \.skops file needs skops; pip install "pairflip\[skops\]"'):
        load_model(str(logreg_file))


def test_cli_score_lists_untrusted_types_then_trust_scores(tmp_path, mlp_file, mlp):
    suite = write_test_suite(tmp_path / "suite.jsonl")
    out = tmp_path / "results.jsonl"
    bad = run_cli(["score", str(suite), "--model", str(mlp_file), "-o", str(out)])
    assert bad.code == 2 and not out.exists()
    lines = bad.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("pairflip: error: --model ") and ADAM in lines[0]
    ok = run_cli(["score", str(suite), "--model", str(mlp_file), "-o", str(out), "--trust", ADAM])
    assert ok.code == 0, ok.stderr
    rows = [json.loads(line) for line in out.read_text(encoding="utf-8").splitlines()]
    assert rows[0]["model"]["kind"] == "skops" and rows[0]["model"]["name"] == "deep"
    texts = [r["source"] for r in rows[1:]]
    assert [r["source_pred"] for r in rows[1:]] == list(mlp.predict(texts))


def test_the_report_names_the_file_and_the_format(logreg_file):
    from pairflip.probes.scoring import score
    from pairflip.report import summarize
    from pairflip.report.terminal import header_facts
    from helpers.suites import make_pairs

    facts = dict(header_facts(summarize(score(make_pairs()[:3], str(logreg_file)))))
    assert facts["model"] == f"gear ({logreg_file})" and facts["format"].startswith("skops file")


def test_demo_saves_skops_files_that_load_to_the_same_model(tmp_path, logreg, mlp):
    import io

    from rich.console import Console

    from pairflip.demo.run import demo_files, save_skops

    assert {"unigram.skops", "bigram.skops", "deep-bow.skops"} <= set(demo_files())  # checked before any work
    log = io.StringIO()
    save_skops({"gear": logreg, "deep": mlp}, tmp_path, Console(file=log, width=400))
    assert f"deep.skops needs --trust {ADAM}" in log.getvalue() and "gear.skops needs" not in log.getvalue()
    assert [p.label for p in load_model(str(tmp_path / "gear.skops")).predict(PROBE)] == list(logreg.predict(PROBE))
    loaded = load_model(str(tmp_path / "deep.skops"), trust=[ADAM])
    assert [p.label for p in loaded.predict(PROBE)] == list(mlp.predict(PROBE))


def test_cli_audit_takes_trust_too(tmp_path, mlp_file, mlp):
    corpus = tmp_path / "reviews.txt"
    corpus.write_text("The tent is dry and warm.\nThe stove is heavy.\n", encoding="utf-8")
    base = ["audit", str(corpus), "--model", str(mlp_file), "--families", "negation"]
    bad = run_cli(base + ["--out-dir", str(tmp_path / "a")])
    assert bad.code == 2 and f"--trust {ADAM}" in bad.stderr and not (tmp_path / "a" / "results.jsonl").exists()
    ok = run_cli(base + ["--out-dir", str(tmp_path / "b"), "--trust", ADAM])
    assert ok.code == 0, ok.stderr
    rows = [json.loads(line) for line in (tmp_path / "b" / "results.jsonl").read_text(encoding="utf-8").splitlines()]
    assert len(rows) > 1 and rows[0]["model"]["kind"] == "skops"
    assert [r["source_pred"] for r in rows[1:]] == list(mlp.predict([r["source"] for r in rows[1:]]))
