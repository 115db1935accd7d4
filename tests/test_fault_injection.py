"""A flaky model server: a fixed share of requests fail with 503 or stall past the timeout.

`pairflip score` with retries must finish with every pair scored and exactly the results of a
run against a healthy server. Every fault is injected into a batch's first attempts only and
stalls are bounded, and the CLI runs as a subprocess with a time limit, so the test always ends.
"""

from __future__ import annotations

import json

from helpers.cli import run_pairflip
from helpers.model_server import ModelServer, every_third_fault_plan
from helpers.suites import make_pairs, texts_of, write_test_suite

N_EXTRA = 60
BATCH = 6


def _score(tmp_path, url, name, *extra):
    out = tmp_path / f"{name}.jsonl"
    run = run_pairflip(
        ["score", str(tmp_path / "suite.jsonl"), "--model", url, "-o", str(out), "--batch-size", str(BATCH), *extra],
        timeout=180,
    )
    assert run.code == 0, run.stderr
    lines = out.read_text(encoding="utf-8").splitlines()
    return json.loads(lines[0]), [json.loads(x) for x in lines[1:]]


def test_retries_ride_out_503s_and_stalls(tmp_path):
    write_test_suite(tmp_path / "suite.jsonl", N_EXTRA)
    pairs = make_pairs(N_EXTRA)
    n_texts = len(texts_of(pairs))
    n_batches = -(-n_texts // BATCH)

    with ModelServer() as healthy:
        _, expected = _score(tmp_path, healthy.url, "healthy")
        assert healthy.requests == n_batches

    with ModelServer(faults=every_third_fault_plan, stall_seconds=1.5) as flaky:
        header, got = _score(tmp_path, flaky.url, "flaky", "--timeout", "0.5", "--retries", "3", "--concurrency", "4")
        # the faults really happened: some 503s, some stalls past the timeout, all retried
        assert flaky.injected["503"] >= 3 and flaky.injected["stall"] >= 2
        assert flaky.requests == n_batches + flaky.injected["503"] + flaky.injected["stall"]
        assert sorted(flaky.texts_answered) == sorted(texts_of(pairs))

    assert len(got) == len(pairs)
    assert {v["id"] for v in got} == {p.id for p in pairs}
    assert got == expected  # same predictions, scores and verdicts as the healthy run, same order
    assert header["texts_predicted"] == n_texts
