"""``http://host:port/path`` models against a real HTTP server on 127.0.0.1 (ephemeral port)."""

from __future__ import annotations

import socket

import pytest

import pairflip
from helpers import keyword_rules
from helpers.model_server import ModelServer
from helpers.suites import make_pairs, texts_of
from pairflip.probes import load_model
from pairflip.probes.batching import run_batches
from pairflip.probes.http_model import HttpModel
from pairflip.records import PairflipError

TEXTS = ["The tent is great.", "The jacket leaks.", "Une tente très légère — ☂"]


def _fail(model, texts=TEXTS) -> str:
    with pytest.raises(PairflipError) as e:
        for _ in run_batches(model, [texts]):
            pass
    return str(e.value)


def test_labels_and_probabilities():
    with ModelServer() as srv:
        preds = load_model(srv.url).predict(TEXTS)
    assert [p.label for p in preds] == [keyword_rules.label(t) for t in TEXTS]
    assert preds[2].probabilities == dict(zip(keyword_rules.CLASSES, keyword_rules.probabilities(TEXTS[2])))
    assert srv.texts_answered == TEXTS


def test_labels_only_server():
    with ModelServer(with_probabilities=False) as srv:
        assert all(p.probabilities is None for p in load_model(srv.url).predict(TEXTS))


def test_score_with_concurrency_sends_each_text_once():
    pairs = make_pairs(30)
    with ModelServer() as srv:
        par = pairflip.score(pairs, srv.url, batch_size=4, concurrency=4)
        assert sorted(srv.texts_answered) == sorted(texts_of(pairs))
        seq = pairflip.score(pairs, srv.url, batch_size=50)
    assert [v.to_dict() for v in par.verdicts] == [v.to_dict() for v in seq.verdicts]
    assert par.header["model"] == {"name": srv.url, "spec": srv.url, "kind": "http",
                                   "fingerprint": load_model(srv.url).fingerprint()}


def test_4xx_is_not_retried_and_shows_the_body():
    body = ("texts must be shorter than 512 tokens; " * 20).encode()
    with ModelServer(status=422, body=body) as srv:
        msg = _fail(load_model(srv.url, retries=3, backoff=0.01))
        assert srv.requests == 1
    assert "HTTP 422" in msg and srv.url in msg and "batch 1 of 1" in msg and "not retried" in msg
    shown = msg.split("the response body begins: ")[1]
    assert shown == repr(body.decode()[:200])


def test_5xx_is_retried_then_fails_with_status_url_and_batch():
    with ModelServer(status=503, body=b"overloaded") as srv:
        msg = _fail(load_model(srv.url, retries=2, backoff=0.01))
        assert srv.requests == 3  # one try + two retries
    assert msg.startswith(f"model {srv.url}: batch 1 of 1")
    assert "HTTP 503" in msg and "after 3 attempts" in msg


def test_transient_503_then_success():
    with ModelServer(faults=lambda key: ["503", "503"]) as srv:
        preds = load_model(srv.url, retries=2, backoff=0.01).predict(TEXTS)
        assert srv.requests == 3 and srv.injected["503"] == 2
    assert [p.label for p in preds] == [keyword_rules.label(t) for t in TEXTS]


def test_stall_past_the_timeout_is_retried():
    with ModelServer(faults=lambda key: ["stall"], stall_seconds=1.0) as srv:
        preds = load_model(srv.url, timeout=0.3, retries=1, backoff=0.01).predict(TEXTS)
        assert srv.requests == 2
    assert len(preds) == 3


def test_timeout_every_time():
    with ModelServer(faults=lambda key: ["stall"] * 5, stall_seconds=1.0) as srv:
        msg = _fail(load_model(srv.url, timeout=0.3, retries=1, backoff=0.01))
    assert "no answer within --timeout 0.3 s" in msg and "after 2 attempts" in msg


def test_connection_refused_is_retried():
    with socket.socket() as s:  # a port that nobody listens on once closed
        s.bind(("127.0.0.1", 0))
        port = s.getsockname()[1]
    url = f"http://127.0.0.1:{port}/predict"
    msg = _fail(load_model(url, retries=1, backoff=0.01))
    assert "cannot connect" in msg and url in msg and "after 2 attempts" in msg


@pytest.mark.parametrize(
    "body, what",
    [
        (b"<html>gateway</html>", "is not JSON (it begins '<html>gateway</html>')"),
        (b'["positive"]', "is a JSON list, expected an object"),
        (b'{"labels": ["positive"]}', "1 labels for 3 texts"),
        (b'{"labels": ["positive", null, "negative"]}', "output 1 is None, expected a label"),
        (b'{"labels": ["a", "b", "c"], "probabilities": [[0.5, 0.5], [1, 0], [0, 1]]}', "without the classes"),
        (b'{"labels": ["a", "b", "c"], "probabilities": [[1.0], [1, 0], [0, 1]], "classes": ["a", "b"]}',
         "output 0 has 1 probabilities for 2 classes"),
        (b'{"labels": ["a", "b", "c"], "probabilities": [[0.9, 0.9], [1, 0], [0, 1]], "classes": ["a", "b"]}',
         "sum to 1.8"),
        (b'{"error": "model is warming up"}', "reported an error: model is warming up"),
    ],
)
def test_bad_answers(body, what):
    with ModelServer(body=body) as srv:
        msg = _fail(load_model(srv.url, retries=3, backoff=0.01))
        assert srv.requests == 1  # a bad 200 answer is not retried
    assert what in msg and srv.url in msg and "batch 1 of 1" in msg


def test_backoff_doubles_and_is_capped():
    m = HttpModel("http://127.0.0.1:9/x", backoff=0.25, max_backoff=8)
    assert [m.delay(i) for i in range(7)] == [0.25, 0.5, 1.0, 2.0, 4.0, 8.0, 8.0]
    assert m.delay(0, retry_after="3") == 3.0 and m.delay(0, retry_after="600") == 8.0


@pytest.mark.parametrize(
    "url, kw, what",
    [
        ("http:///predict", {}, "not an http(s) URL with a host"),
        ("http://127.0.0.1:99999/p", {}, "port"),
        ("http://127.0.0.1:8000/p", {"timeout": 0}, "--timeout"),
        ("http://127.0.0.1:8000/p", {"retries": -1}, "--retries"),
    ],
)
def test_bad_options(url, kw, what):
    with pytest.raises(PairflipError, match=what.replace("(", r"\(").replace(")", r"\)")):
        load_model(url, **kw)


def test_timeout_bounds_the_whole_answer_not_each_read():
    """A server that trickles its answer one byte every 0.2 s answers every single read quickly;
    --timeout 1 must still end the attempt after about a second, before the answer is complete
    (the answer here is over 100 bytes, so it would take more than 20 s to arrive)."""
    with ModelServer(faults=lambda key: ["trickle"], trickle_seconds=0.2) as srv:
        msg = _fail(load_model(srv.url, timeout=1.0, retries=0))
        assert srv.requests == 1 and srv.trickles_finished == 0
    assert "no answer within --timeout 1 s" in msg and "after 1 attempt" in msg


def test_a_trickled_answer_within_the_timeout_is_accepted():
    with ModelServer(faults=lambda key: ["trickle"], trickle_seconds=0.001) as srv:
        preds = load_model(srv.url, timeout=20.0, retries=0).predict(TEXTS)
        assert srv.trickles_finished == 1
    assert [p.label for p in preds] == [keyword_rules.label(t) for t in TEXTS]
