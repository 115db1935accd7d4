"""run_batches and the output checks shared by every adapter."""

from __future__ import annotations

import threading
import time

import numpy as np
import pytest

from pairflip.probes.adapters import Model
from pairflip.probes.batching import ModelError, build_predictions, check_outputs, prediction_from_item, run_batches
from pairflip.records import PairflipError, Prediction


class Threaded(Model):
    """A parallel model: its first three calls wait for each other (so they must overlap), it
    records how many calls overlap, and it can fail on a chosen text once the batch before it is done."""

    parallel = True
    spec = "threaded"

    def __init__(self, fail_on: str | None = None, first_wave: int = 0) -> None:
        self.active = 0
        self.most = 0
        self.calls = 0
        self.lock = threading.Lock()
        self.fail_on = fail_on
        self.barrier = threading.Barrier(first_wave) if first_wave else None
        self.before_failure_done = threading.Event()

    def predict(self, texts):
        with self.lock:
            self.active += 1
            self.calls += 1
            self.most = max(self.most, self.active)
            first = self.calls <= (self.barrier.parties if self.barrier else 0)
        try:
            if first:
                self.barrier.wait(timeout=30)  # BrokenBarrierError unless the calls overlap
            if self.fail_on in texts:
                self.before_failure_done.wait(timeout=30)
                time.sleep(0.2)
                raise ValueError(f"cannot read {self.fail_on!r}")
            if texts[0] == "camp 3-0":
                self.before_failure_done.set()
            return [Prediction("positive") for _ in texts]
        finally:
            with self.lock:
                self.active -= 1


BATCHES = [[f"camp {i}-{j}" for j in range(3)] for i in range(9)]


def test_concurrency_overlaps_calls_and_yields_every_batch():
    m = Threaded(first_wave=3)
    got = list(run_batches(m, BATCHES, concurrency=3))
    assert sorted(i for i, _, _ in got) == list(range(9))
    assert all(b == BATCHES[i] and len(p) == 3 for i, b, p in got)
    assert m.most == 3


def test_in_process_models_run_one_batch_at_a_time():
    m = Threaded()
    m.parallel = False
    got = list(run_batches(m, BATCHES, concurrency=4))
    assert [i for i, _, _ in got] == list(range(9)) and m.most == 1


def test_failure_names_model_and_batch_and_keeps_earlier_batches():
    m = Threaded(fail_on="camp 4-1")
    seen = []
    with pytest.raises(PairflipError) as e:
        for i, _, _ in run_batches(m, BATCHES, concurrency=2):
            seen.append(i)
    assert str(e.value) == "model threaded: batch 5 of 9 (3 texts, first 'camp 4-0'): the model raised ValueError: cannot read 'camp 4-1'"
    assert set(range(4)) <= set(seen) and 4 not in seen


@pytest.mark.parametrize("bad", [0, -2, 1.5, "2"])
def test_bad_concurrency(bad):
    with pytest.raises(PairflipError, match="--concurrency"):
        list(run_batches(Threaded(), BATCHES, concurrency=bad))


def test_build_predictions_columns():
    preds = build_predictions(2, labels=np.array(["neg", "pos"]), probabilities=np.array([[0.8, 0.2], [0.3, 0.7]]),
                              classes=np.array(["neg", "pos"]))
    assert preds == [Prediction("neg", probabilities={"neg": 0.8, "pos": 0.2}),
                     Prediction("pos", probabilities={"neg": 0.3, "pos": 0.7})]
    # without labels: the most probable class
    assert [p.label for p in build_predictions(2, probabilities=[[0.6, 0.4], [0.1, 0.9]], classes=[0, 1])] == ["0", "1"]


@pytest.mark.parametrize(
    "kw, what",
    [
        ({}, "neither labels nor probabilities"),
        ({"labels": "pos"}, "labels is str"),
        ({"labels": ["a"]}, "1 labels for 2 texts"),
        ({"labels": ["a", float("nan")]}, "output 1 is nan"),
        ({"labels": ["a", ["b", "c"]]}, "expected one label per text"),
        ({"labels": ["a", ""]}, "empty label"),
        ({"labels": ["a", "b"], "probabilities": [[1.0, 0.0], [0.5, "x"]], "classes": ["a", "b"]}, "expected a number"),
        ({"labels": ["a", "b"], "probabilities": [[1.0, 0.0], [0.5, float("inf")]], "classes": ["a", "b"]}, "finite"),
        ({"labels": ["a", "b"], "probabilities": [[1.0, 0.0], [1.0, 0.0]], "classes": ["a", "a"]}, "repeat"),
        ({"labels": ["a", "b"], "probabilities": [[1.0, 0.0], 0.5], "classes": ["a", "b"]}, "expected a list of 2"),
    ],
)
def test_build_predictions_refuses(kw, what):
    with pytest.raises(ModelError, match=what):
        build_predictions(2, **kw)


def test_prediction_from_item():
    assert prediction_from_item({"probabilities": {"neg": 0.25, "pos": 0.75}}, 0) == Prediction(
        "pos", probabilities={"neg": 0.25, "pos": 0.75})
    assert prediction_from_item({"label": "neg", "score": -0.5}, 0) == Prediction("neg", score=-0.5)
    assert prediction_from_item(np.int64(4), 0) == Prediction("4")
    with pytest.raises(ModelError, match="unknown keys"):
        prediction_from_item({"label": "pos", "confidence": 0.9}, 3)
    with pytest.raises(ModelError, match="without 'label' or 'probabilities'"):
        prediction_from_item({"score": 0.9}, 3)


@pytest.mark.parametrize(
    "out, what",
    [
        ("positive", "returned str"),
        ([Prediction("pos")], "2 texts got 1 outputs"),
        ([Prediction("pos"), "neg"], "output 1 is str"),
        ([Prediction("pos"), Prediction("neg", probabilities={"neg": 0.5, "pos": 0.6})], "sum to 1.1"),
        ([Prediction("pos"), Prediction("neg", probabilities={"neg": -0.5, "pos": 1.5})], "finite number >= 0"),
        ([Prediction("pos"), Prediction("neg", score=-1.5)], r"not a number in \[-1, 1\]"),
        ([Prediction("pos"), Prediction("neg", score=float("nan"))], r"not a number in \[-1, 1\]"),
    ],
)
def test_check_outputs(out, what):
    with pytest.raises(ModelError, match=what):
        check_outputs(["a", "b"], out)
