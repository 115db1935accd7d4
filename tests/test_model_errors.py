"""Model failures through the command line: exit code 2, one line naming what and where, no
traceback, and no output file left behind."""

from __future__ import annotations

import re
import sqlite3

import joblib
import pytest

from helpers.cli import line_model, run_cli, run_pairflip
from helpers.model_server import ModelServer
from helpers.suites import write_test_suite

TOY = "helpers.toy_models"


@pytest.fixture
def suite(tmp_path):
    return write_test_suite(tmp_path / "suite.jsonl")


def _check_failed(run, out, *expected):
    assert run.code == 2, (run.code, run.stdout, run.stderr)
    err = run.stderr
    assert "Traceback" not in err + run.stdout
    assert err.startswith("pairflip: error: ")
    flat = " ".join(err.split())  # rich may wrap long lines
    for piece in expected:
        assert " ".join(piece.split()) in flat, (piece, flat)
    assert not out.exists()
    assert not [p for p in out.parent.iterdir() if p.name.endswith(".tmp")]  # no half-written file
    return flat


@pytest.mark.parametrize(
    "name, args, expected",
    [
        ("one_too_few", [], ["model helpers.toy_models:one_too_few: batch 1 of 1", "22 texts got 21 outputs"]),
        ("none_output", [], ["none_output: batch 1 of 1", "is None, expected a label"]),
        ("nan_output", [], ["nan_output: batch 1 of 1", "output 0 is nan, expected a label"]),
        ("bad_sum", [], ["bad_sum: batch 1 of 1", "sum to 1.4, expected 1"]),
        ("score_out_of_range", [], ["score_out_of_range: batch 1 of 1", "score 3.5 is not a number in [-1, 1]"]),
        ("odd_labels", [], ["cannot tell the polarity of the labels ['thumbs-down', 'thumbs-up']", "--labels"]),
        ("keyword_labels", ["--labels", "neg,pos"],
         ["model helpers.toy_models:keyword_labels:", "['negative', 'positive'] are not in the label mapping in force",
          "neg=-1, pos=+1, from --labels", "labels seen: ['negative', 'positive']"]),
        ("raises", ["--batch-size", "2"],
         ["model helpers.toy_models:raises: batch 2 of 11", "first 'The tent is really great.'",
          "the model raised RuntimeError: the stove model ran out of fuel"]),
        ("no_such_name", [], ["--model helpers.toy_models:no_such_name: module 'helpers.toy_models' has no attribute"]),
    ],
)
def test_python_model_errors(tmp_path, suite, name, args, expected):
    out = tmp_path / "results.jsonl"
    run = run_cli(["score", str(suite), "--model", f"{TOY}:{name}", "-o", str(out), *args])
    _check_failed(run, out, *expected)


def test_missing_module(tmp_path, suite):
    out = tmp_path / "results.jsonl"
    run = run_cli(["score", str(suite), "--model", "gearshop.models:rate", "-o", str(out)])
    _check_failed(run, out, "--model gearshop.models:rate: cannot import module 'gearshop.models'")


def test_failed_batch_leaves_finished_batches_in_the_cache(tmp_path, suite):
    out, cache = tmp_path / "results.jsonl", tmp_path / "cache.db"
    run = run_cli(["score", str(suite), "--model", f"{TOY}:raises", "-o", str(out), "--batch-size", "2",
                   "--cache", str(cache)])
    _check_failed(run, out, "batch 2 of 11")
    assert sqlite3.connect(cache).execute("SELECT COUNT(*) FROM predictions").fetchone()[0] == 2


def test_corrupt_joblib_file(tmp_path, suite):
    model = tmp_path / "gear.joblib"
    model.write_bytes(b"\x80\x04garbage" * 10)
    out = tmp_path / "results.jsonl"
    _check_failed(run_cli(["score", str(suite), "--model", str(model), "-o", str(out)]), out,
                  f"--model {model}: cannot load the model file")


def test_joblib_file_without_predict(tmp_path, suite):
    model = tmp_path / "vocab.joblib"
    joblib.dump(["tent", "stove"], model)
    out = tmp_path / "results.jsonl"
    _check_failed(run_cli(["score", str(suite), "--model", str(model), "-o", str(out)]), out,
                  f"--model {model}: the file holds a builtins.list, which has no predict method")


@pytest.mark.parametrize(
    "options, expected",
    [
        (["--mode", "garbage"], ["batch 1 of 3", "printed a line that is not JSON: 'loading weights... done'"]),
        (["--mode", "short"], ["batch 1 of 3", "9 labels for 10 texts"]),
        (["--mode", "crash-after", "--after", "2"],
         ["batch 3 of 3", "exited with code 3", "ran out of tent pegs (simulated crash)"]),
    ],
)
def test_command_model_errors(tmp_path, suite, options, expected):
    spec = line_model(*options)
    out = tmp_path / "results.jsonl"
    run = run_cli(["score", str(suite), "--model", spec, "-o", str(out), "--batch-size", "10"])
    flat = _check_failed(run, out, *expected)
    assert "model cmd:" in flat and "line_model.py" in flat


def test_command_timeout(tmp_path, suite):
    out = tmp_path / "results.jsonl"
    run = run_cli(["score", str(suite), "--model", line_model("--mode", "hang"), "-o", str(out), "--timeout", "0.5"])
    _check_failed(run, out, "batch 1 of 1", "no answer within --timeout 0.5 seconds")


def test_http_4xx(tmp_path, suite):
    out = tmp_path / "results.jsonl"
    with ModelServer(status=400, body=b'{"detail": "field texts is required"}') as srv:
        run = run_cli(["score", str(suite), "--model", srv.url, "-o", str(out)])
        assert srv.requests == 1
    _check_failed(run, out, f"model {srv.url}: batch 1 of 1", "HTTP 400", "not retried",
                  '{"detail": "field texts is required"}')


def test_http_5xx_after_retries(tmp_path, suite):
    out = tmp_path / "results.jsonl"
    with ModelServer(status=500, body=b"oops") as srv:
        run = run_cli(["score", str(suite), "--model", srv.url, "-o", str(out), "--retries", "1"])
        assert srv.requests == 2
    _check_failed(run, out, f"model {srv.url}: batch 1 of 1", "HTTP 500", "after 2 attempts")


@pytest.mark.parametrize(
    "args, expected",
    [
        (["--concurrency", "0"], "--concurrency must be a whole number >= 1, got 0"),
        (["--batch-size", "0"], "--batch-size must be a whole number >= 1, got 0"),
        (["--margin", "-0.5"], "--margin must be a number >= 0, got -0.5"),
        # issue 12: --timeout inf used to be blamed on the model (an OverflowError in the batch)
        (["--timeout", "inf"], "--timeout must be a finite number of seconds > 0, got inf"),
        (["--timeout", "nan"], "--timeout must be a finite number of seconds > 0, got nan"),
        (["--timeout", "0"], "--timeout must be a finite number of seconds > 0, got 0"),
        (["--timeout", "-3"], "--timeout must be a finite number of seconds > 0, got -3"),
        (["--retries", "-1"], "--retries must be a whole number >= 0, got -1"),
    ],
)
def test_bad_options(tmp_path, suite, args, expected):
    out = tmp_path / "results.jsonl"
    _check_failed(run_cli(["score", str(suite), "--model", f"{TOY}:keyword_labels", "-o", str(out), *args]), out, expected)


def test_real_process_prints_one_line_and_no_traceback(tmp_path, suite):
    out = tmp_path / "results.jsonl"
    run = run_pairflip(["score", str(suite), "--model", f"{TOY}:raises", "-o", str(out), "--batch-size", "3"])
    flat = _check_failed(run, out, "model helpers.toy_models:raises: batch 2 of 8", "RuntimeError")
    assert re.fullmatch(r"pairflip: error: [^\n]+", " ".join(run.stderr.split()))
    assert "rerun with --debug" not in flat  # a model error is an input problem, not a pairflip bug



# --------------------------------------------------------------------------- model code that exits

QUITTERS = """
import sys

from helpers.keyword_rules import CLASSES, label, probabilities


def quits_zero(texts):
    sys.exit(0)


def quits_with_text(texts):
    sys.exit("the lantern model needs a GPU")


def quits_none(texts):
    sys.exit()


def interrupts(texts):
    raise KeyboardInterrupt


class QuitsOnProba:
    classes_ = list(CLASSES)

    def predict(self, texts):
        return [label(t) for t in texts]

    def predict_proba(self, texts):
        sys.exit(1)
"""


@pytest.fixture
def quitters(tmp_path, monkeypatch):
    """A module of models that call sys.exit or raise KeyboardInterrupt, importable from the
    current folder under a name of its own (so no other test's module is reused)."""
    import uuid

    name = f"quitters_{uuid.uuid4().hex[:10]}"
    (tmp_path / f"{name}.py").write_text(QUITTERS, encoding="utf-8")
    monkeypatch.chdir(tmp_path)
    monkeypatch.syspath_prepend(str(tmp_path))
    return name


@pytest.mark.parametrize(
    "name, expected",
    [
        ("quits_zero", "the model called sys.exit(0)"),
        ("quits_none", "the model called sys.exit()"),
        ("quits_with_text", "the model called sys.exit with the message 'the lantern model needs a GPU'"),
        ("interrupts", "the model raised KeyboardInterrupt"),
        ("QuitsOnProba", "the model called sys.exit(1)"),
    ],
)
def test_model_that_exits_is_a_model_failure(tmp_path, suite, quitters, name, expected):
    """sys.exit(0) inside predict used to end `pairflip score` with exit 0, no output and no
    message, so a CI gate passed with nothing checked."""
    out = tmp_path / "results.jsonl"
    run = run_cli(["score", str(suite), "--model", f"{quitters}:{name}", "-o", str(out)])
    _check_failed(run, out, f"model {quitters}:{name}: batch 1 of 1", expected)


def test_joblib_model_that_exits(tmp_path, suite, quitters):
    import importlib

    model = tmp_path / "quitter.joblib"
    joblib.dump(importlib.import_module(quitters).QuitsOnProba(), model)
    out = tmp_path / "results.jsonl"
    _check_failed(run_cli(["score", str(suite), "--model", str(model), "-o", str(out)]), out,
                  f"model {model}: batch 1 of 1", "the model called sys.exit(1)")


def test_module_that_exits_when_imported(tmp_path, suite, monkeypatch):
    """A model module written as a script (argparse at import time) exits while it is imported."""
    import uuid

    name = f"script_like_{uuid.uuid4().hex[:10]}"
    (tmp_path / f"{name}.py").write_text("import sys\nsys.exit(2)\n\ndef rate(texts):\n    return []\n", encoding="utf-8")
    monkeypatch.chdir(tmp_path)
    monkeypatch.syspath_prepend(str(tmp_path))
    out = tmp_path / "results.jsonl"
    _check_failed(run_cli(["score", str(suite), "--model", f"{name}:rate", "-o", str(out)]), out,
                  f"--model {name}:rate: importing module {name!r} called sys.exit(2)")


def test_python_api_turns_sys_exit_into_a_model_error(quitters):
    import pairflip
    from helpers.suites import make_pairs
    from pairflip.records import PairflipError

    with pytest.raises(PairflipError, match=r"batch 1 of 1 .*the model called sys.exit\(0\)"):
        pairflip.score(make_pairs(), f"{quitters}:quits_zero")


def test_audit_with_a_gate_and_a_model_that_exits(tmp_path, quitters, nlp, monkeypatch):
    """`audit --limit ...` used to exit 0 (the gate passed) when the model called sys.exit(0)."""
    import pairflip.perturb.nlp as nlp_mod

    monkeypatch.setattr(nlp_mod, "load_nlp", lambda name=None: nlp)
    corpus = tmp_path / "reviews.txt"
    corpus.write_text("The tent is great.\nThe stove is reliable.\nThe jacket leaks.\n", encoding="utf-8")
    out_dir = tmp_path / "audit"
    run = run_cli(["audit", str(corpus), "--model", f"{quitters}:quits_zero", "--out-dir", str(out_dir),
                   "--limit", "negation.violation <= 0.5"])
    assert run.code == 2, (run.code, run.stdout, run.stderr)
    last = " ".join(run.stderr.split("pairflip: error: ")[-1].split())  # after the build summary
    assert last.startswith(f"model {quitters}:quits_zero: batch 1 of 1") and "the model called sys.exit(0)" in last
    assert "Traceback" not in run.stderr and not (out_dir / "results.jsonl").exists()
