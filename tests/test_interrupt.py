"""SIGINT / SIGTERM to a running `pairflip build`: no partial output, no temp file, one line, non-zero.

The exit code is 128 + the signal number (130 for SIGINT, 143 for SIGTERM): the convention of
POSIX shells (GNU Bash Reference Manual, section 3.7.5 "Exit Status": "When a command terminates
on a fatal signal whose number is N, Bash uses the value 128+N as the exit status").
"""

from __future__ import annotations

import itertools
import os
import random
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

PAIRFLIP = str(Path(sys.executable).with_name("pairflip"))

# Word lists for invented outdoor-gear shop reviews.
SUBJECTS = ["The tent", "This stove", "The sleeping bag", "My new lantern", "The backpack", "These boots",
            "The water filter", "Our hammock", "The rain jacket", "The trekking pole", "This cooler", "The headlamp"]
COPULA = ["is", "was", "seems", "looks"]
ADJS = ["roomy", "sturdy", "comfortable", "reliable", "flimsy", "heavy", "bright", "warm", "noisy", "cheap",
        "useful", "awkward", "great", "terrible", "quiet", "leaky"]
DEGREE = ["", "very ", "quite ", "really ", "slightly ", "pretty "]
TAILS = ["", " after a week of rain", " on the trail", " for the price", " in cold weather", " on our last trip"]
VERBS = ["works well", "broke quickly", "keeps us dry", "lights fast", "leaks a lot", "holds up", "feels solid"]


def _sentences(n: int, seed: int = 7) -> list[str]:
    rng = random.Random(seed)
    out: set[str] = set()
    while len(out) < n:
        s, a, b = rng.choice(SUBJECTS), rng.choice(ADJS), rng.choice(ADJS)
        form = rng.randrange(4)
        if form == 0:
            t = f"{s} {rng.choice(COPULA)} {rng.choice(DEGREE)}{a}{rng.choice(TAILS)}."
        elif form == 1:
            t = f"{s} {rng.choice(VERBS)}{rng.choice(TAILS)}, and it is {rng.choice(DEGREE)}{b}."
        elif form == 2:
            t = f"I think {s.lower()} {rng.choice(COPULA)} {a} but {rng.choice(DEGREE)}{b}."
        else:
            t = f"{s} {rng.choice(VERBS)}, so I would buy it again {rng.randrange(1000)} times."
        out.add(t)
    return sorted(out)


@pytest.fixture(scope="module")
def big_corpus(tmp_path_factory) -> Path:
    p = tmp_path_factory.mktemp("corpus") / "reviews.txt"
    lines = _sentences(20_000)
    assert len(set(lines)) == 20_000
    p.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return p


def _temps(folder: Path, name: str) -> list[str]:
    return [p.name for p in folder.iterdir() if p.name.startswith(f".{name}.")]


def _start_and_interrupt(corpus: Path, out: Path, sig: int, *extra: str) -> subprocess.CompletedProcess:
    env = dict(os.environ, PAIRFLIP_NO_PROGRESS="1")
    proc = subprocess.Popen(
        [PAIRFLIP, "build", str(corpus), "-o", str(out), *extra],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env,
    )
    # Wait until the writer has opened its temp file: the build is then in the middle of its work.
    deadline = time.monotonic() + 240
    while not _temps(out.parent, out.name):
        if proc.poll() is not None:
            o, e = proc.communicate()
            pytest.fail(f"build ended (rc={proc.returncode}) before it could be interrupted: {e}")
        if time.monotonic() > deadline:
            proc.kill()
            pytest.fail("the build never opened its output temp file")
        time.sleep(0.01)
    time.sleep(0.3)  # let it parse and write for a moment
    assert proc.poll() is None, "the build finished too early to test an interruption"
    proc.send_signal(sig)
    try:
        o, e = proc.communicate(timeout=120)
    except subprocess.TimeoutExpired:
        proc.kill()
        proc.communicate()
        pytest.fail("the build did not stop after the signal")
    return subprocess.CompletedProcess(proc.args, proc.returncode, o, e)


@pytest.mark.parametrize("sig", [signal.SIGINT, signal.SIGTERM], ids=["SIGINT", "SIGTERM"])
def test_signal_leaves_no_partial_output(tmp_path, big_corpus, sig):
    out = tmp_path / "suite.jsonl"
    done = _start_and_interrupt(big_corpus, out, sig)
    assert done.returncode == 128 + int(sig), done.stderr
    assert "Traceback" not in done.stderr
    lines = [ln for ln in done.stderr.splitlines() if ln.strip()]
    assert len(lines) == 1, done.stderr
    assert "interrupted" in lines[0] and signal.Signals(sig).name in lines[0]
    assert not out.exists()
    assert _temps(tmp_path, out.name) == []


def test_signal_keeps_the_previous_output_file(tmp_path, big_corpus):
    out = tmp_path / "suite.jsonl"
    out.write_text("the suite of last week\n", encoding="utf-8")
    done = _start_and_interrupt(big_corpus, out, signal.SIGTERM, "--force")
    assert done.returncode == 143, done.stderr
    assert out.read_text(encoding="utf-8") == "the suite of last week\n"
    assert _temps(tmp_path, out.name) == []


def test_in_process_keyboard_interrupt_mid_build(tmp_path, capsys, monkeypatch, nlp):
    """Ctrl-C raised from inside the driver (between two sources) unwinds the same way in-process."""
    import pairflip.perturb.nlp as nlp_mod
    from pairflip import cli
    from pairflip.perturb import build as build_mod

    monkeypatch.setattr(nlp_mod, "load_nlp", lambda name=None: nlp)
    real = build_mod.iter_pairs

    from pairflip.records import Interrupted

    def interrupted(texts, **kw):
        # What the CLI's SIGINT handler raises. (A bare KeyboardInterrupt raised by a statement is
        # a model fault, exit 2: tests/test_cli_errors.py.)
        for n, pair in enumerate(real(itertools.islice(texts, 50), **kw)):
            if n == 3:
                raise Interrupted
            yield pair
        raise Interrupted

    monkeypatch.setattr(build_mod, "iter_pairs", interrupted)
    corpus = tmp_path / "r.txt"
    corpus.write_text("\n".join(_sentences(60)) + "\n", encoding="utf-8")
    out = tmp_path / "suite.jsonl"
    before = (signal.getsignal(signal.SIGINT), signal.getsignal(signal.SIGTERM))
    with pytest.raises(SystemExit) as ex:
        cli.main(["build", str(corpus), "-o", str(out)])
    err = capsys.readouterr().err
    assert ex.value.code == 130 and "interrupted (SIGINT)" in err and "Traceback" not in err
    assert not out.exists() and _temps(tmp_path, out.name) == []
    # the handlers are put back afterwards
    assert (signal.getsignal(signal.SIGINT), signal.getsignal(signal.SIGTERM)) == before


# --------------------------------------------------------------------------- score, hung HTTP model


@pytest.mark.parametrize("sig", [signal.SIGINT, signal.SIGTERM], ids=["SIGINT", "SIGTERM"])
def test_signal_ends_a_concurrent_run_against_a_hung_server(tmp_path, sig):
    """With --concurrency 2 and two requests hanging on the server, a signal ends `pairflip score`
    at once rather than after --timeout 60: the batches in flight are cut off, the finished ones
    stay in the cache, and no output file is left. (The limit below bounds a hang; it is not a
    speed target: 10 s against the 60 s the hung requests would otherwise take.)"""
    from helpers.model_server import ModelServer
    from helpers.suites import write_test_suite
    from pairflip.probes.cache import PredictionCache

    suite = write_test_suite(tmp_path / "suite.jsonl", 20)
    out, cache = tmp_path / "results.jsonl", tmp_path / "c.db"
    seen: list[str] = []

    def plan(key: str) -> list[str]:  # the first four batches are answered, every later one hangs
        if key not in seen:
            seen.append(key)
        return [] if seen.index(key) < 4 else ["stall"]

    env = dict(os.environ, PAIRFLIP_NO_PROGRESS="1")
    with ModelServer(faults=plan, stall_seconds=120) as srv:
        proc = subprocess.Popen(
            [PAIRFLIP, "score", str(suite), "--model", srv.url, "-o", str(out), "--cache", str(cache),
             "--batch-size", "4", "--concurrency", "2", "--timeout", "60", "--retries", "0"],
            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env,
        )
        try:
            deadline = time.monotonic() + 60
            while srv.stalling < 2:  # both batches in flight are hanging
                assert proc.poll() is None, proc.communicate()
                assert time.monotonic() < deadline, "the run never reached the hung batches"
                time.sleep(0.02)
            proc.send_signal(sig)
            try:
                _, err = proc.communicate(timeout=10)
            except subprocess.TimeoutExpired:
                pytest.fail("`pairflip score` was still running 10 s after the signal (--timeout 60)")
        finally:
            if proc.poll() is None:
                proc.kill()
                proc.communicate()
        answered = list(srv.texts_answered)
    assert proc.returncode == 128 + int(sig), err
    assert "interrupted" in err and "Traceback" not in err
    assert not out.exists() and _temps(tmp_path, out.name) == []
    assert len(answered) == 16  # four batches of four
    with PredictionCache(cache) as c:
        assert c.count() == 16
