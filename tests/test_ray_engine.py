"""``--engine ray``: build and score on Ray actors give the same files as one process.

One local Ray instance serves the whole module (starting one takes seconds): the in-process
runs use it as it is, the subprocess runs join it with ``--address``. Its workers get tests/ on
their path, so ``helpers.*`` model SPECs load in the actors as they do here.

What is checked against what:
- a suite built on Ray against the one-process build of the same corpus and seed, byte for byte
  after the header's creation time (the demo sentences, and about 3,000 sentences with repeated
  texts and sentences spread over many shards, so that de-duplication crosses shard borders);
- results scored on Ray against one-process results of the same suite and model, and the cache
  key made in an actor against the one made here (a one-process rerun finds every prediction);
- failures in an actor (an exception, sys.exit, the actor's process dying) against the one-line
  message and exit code 2 of a one-process run;
- a Ray score interrupted with SIGINT (exit 130, as POSIX shells report a fatal signal: 128 + 2,
  GNU Bash Reference Manual 3.7.5), then resumed from its cache, against a one-process run.
"""

from __future__ import annotations

import json
import os
import random
import re
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import pytest

ray = pytest.importorskip("ray", reason='needs the ray extra: pip install -e ".[test]"')

from helpers.cli import PYTHON, TESTS, run_cli  # noqa: E402

ROOT = TESTS.parent
DEMO = ROOT / "demo_data" / "sentences.txt"
LARDER = ROOT / "benchmarks" / "coverage"

pytestmark = pytest.mark.slow


@pytest.fixture(scope="module")
def cluster():
    """A local Ray instance of this machine's CPUs for the module; its address."""
    import logging

    if ray.is_initialized():
        pytest.fail("Ray was already initialised by another test module")
    saved = os.environ.get("PYTHONPATH")
    # The raylet and so every worker (of this driver and of the subprocess drivers) inherits it.
    os.environ["PYTHONPATH"] = str(TESTS) + (os.pathsep + saved if saved else "")
    os.environ.setdefault("RAY_USAGE_STATS_ENABLED", "0")
    try:
        ray.init(address="local", num_cpus=os.cpu_count() or 2, include_dashboard=False, log_to_driver=False,
                 logging_level=logging.ERROR)
    finally:
        if saved is None:
            os.environ.pop("PYTHONPATH", None)
        else:
            os.environ["PYTHONPATH"] = saved
    try:
        yield ray.get_runtime_context().gcs_address
    finally:
        ray.shutdown()


def _body(path: Path) -> list[str]:
    return path.read_text(encoding="utf-8").splitlines()[1:]


def _header(path: Path) -> dict:
    h = json.loads(path.read_text(encoding="utf-8").splitlines()[0])
    h.pop("created")
    return h


def _same_file(a: Path, b: Path) -> None:
    """Byte-identical apart from the header's creation time."""
    assert _header(a) == _header(b)
    body_a, body_b = _body(a), _body(b)
    assert len(body_a) == len(body_b)
    assert body_a == body_b


# --------------------------------------------------------------------------- build


def test_demo_suite_is_the_one_process_suite(cluster, tmp_path):
    one, many = tmp_path / "one.jsonl", tmp_path / "ray.jsonl"
    r1 = run_cli(["build", str(DEMO), "-o", str(one)])
    r2 = run_cli(["build", str(DEMO), "-o", str(many), "--engine", "ray", "--replicas", "2", "--shards", "5"])
    assert r1.code == 0, r1.stderr
    assert r2.code == 0, r2.stderr
    assert len(_body(one)) > 500  # the demo gives several hundred pairs
    _same_file(one, many)
    assert r1.stderr.splitlines()[-1].replace("one.jsonl", "X") == r2.stderr.splitlines()[-1].replace("ray.jsonl", "X")


def _invented_sentences(n: int, seed: int = 11) -> list[str]:
    """Review sentences of an invented outdoor-gear shop, made from word lists."""
    rng = random.Random(seed)
    subjects = ["The tent", "This stove", "The sleeping bag", "My lantern", "The daypack", "These boots",
                "The water filter", "Our hammock", "The rain shell", "The camp chair", "This cooler", "The headlamp"]
    adjs = ["roomy", "sturdy", "comfortable", "reliable", "flimsy", "heavy", "bright", "warm", "noisy", "cheap",
            "useful", "awkward", "great", "terrible", "quiet", "leaky"]
    degree = ["", "very ", "quite ", "really ", "slightly "]
    tails = ["", " after a week of rain", " on the trail", " for the price", " in cold weather"]
    verbs = ["works well", "broke quickly", "keeps us dry", "lights fast", "leaks a lot", "holds up"]
    out: dict[str, None] = {}
    while len(out) < n:
        s = rng.choice(subjects)
        form = rng.randrange(3)
        if form == 0:
            t = f"{s} is {rng.choice(degree)}{rng.choice(adjs)}{rng.choice(tails)}."
        elif form == 1:
            t = f"{s} {rng.choice(verbs)}{rng.choice(tails)}, and it is {rng.choice(degree)}{rng.choice(adjs)}."
        else:
            t = f"I think {s.lower()} is {rng.choice(adjs)} but {rng.choice(degree)}{rng.choice(adjs)}."
        out[t] = None
    return list(out)


@pytest.fixture(scope="module")
def mixed_corpus(tmp_path_factory) -> Path:
    """About 3,000 distinct sentences as JSONL: the invented Larder & Lane texts (several
    sentences each) and the same sentences one per line, the demo sentences, invented gear
    sentences and some texts twice, shuffled so that repeats land in other shards."""
    texts = [json.loads(line)["text"] for line in (LARDER / "larder_texts.jsonl").read_text(encoding="utf-8").splitlines()]
    sentences = [json.loads(line)["sentence"]
                 for line in (LARDER / "larder_sentences.jsonl").read_text(encoding="utf-8").splitlines()]
    demo = DEMO.read_text(encoding="utf-8").splitlines()
    rows = texts + sentences + demo + _invented_sentences(1_600) + texts[:60] + demo[:40]
    random.Random(5).shuffle(rows)
    p = tmp_path_factory.mktemp("corpus") / "mixed.jsonl"
    p.write_text("".join(json.dumps({"text": t}) + "\n" for t in rows), encoding="utf-8")
    return p


def test_large_corpus_suite_counts_and_progress_match(cluster, mixed_corpus, nlp):
    from pairflip.files import read_corpus
    from pairflip.perturb.build import BuildStats, iter_pairs
    from pairflip.perturb.ray_build import iter_pairs_ray

    n_rows = sum(1 for _ in read_corpus(mixed_corpus))
    local_stats, ray_stats = BuildStats(), BuildStats()
    local = [p.to_dict() for p in iter_pairs(read_corpus(mixed_corpus), nlp=nlp, stats=local_stats)]
    progress: list[int] = []
    on_ray = [p.to_dict() for p in iter_pairs_ray(read_corpus(mixed_corpus), nlp=nlp, stats=ray_stats, replicas=2,
                                                   shards=23, total=n_rows, on_source=progress.append)]
    assert local_stats.sentences > 2_900  # a few thousand distinct sentences...
    assert local_stats.sentences < n_rows  # ...fewer than the rows: repeats were dropped
    assert on_ray == local
    assert ray_stats.to_dict() == local_stats.to_dict()
    assert ray_stats.warnings == local_stats.warnings
    assert progress == sorted(progress) and progress[-1] == n_rows and len(progress) >= 20


def test_large_corpus_file_and_text_units(cluster, mixed_corpus, tmp_path):
    """The command line with --unit text and one family: the same file."""
    one, many = tmp_path / "one.jsonl", tmp_path / "ray.jsonl"
    args = ["--unit", "text", "--families", "negation,intensifier/soften", "--seed", "3", "--max-per-rule", "2"]
    r1 = run_cli(["build", str(mixed_corpus), "-o", str(one), *args])
    r2 = run_cli(["build", str(mixed_corpus), "-o", str(many), *args, "--engine", "ray"])
    assert r1.code == 0 and r2.code == 0, r1.stderr + r2.stderr
    assert len(_body(one)) > 1_000
    _same_file(one, many)


def test_build_starts_and_stops_its_own_local_instance(tmp_path):
    """Without --address (and no Ray connection in the process) a local instance is started
    for the run; the suite is the same. A real process: this one is connected already."""
    corpus = tmp_path / "few.txt"
    corpus.write_text("\n".join(DEMO.read_text(encoding="utf-8").splitlines()[:40]) + "\n", encoding="utf-8")
    one, many = tmp_path / "one.jsonl", tmp_path / "ray.jsonl"
    env = dict(os.environ, PAIRFLIP_NO_PROGRESS="1")
    env.pop("RAY_ADDRESS", None)
    cmd = [PYTHON, "-c", "from pairflip.cli import main; main()", "build", str(corpus)]
    p1 = subprocess.run([*cmd, "-o", str(one)], capture_output=True, text=True, env=env, timeout=300)
    p2 = subprocess.run([*cmd, "-o", str(many), "--engine", "ray", "--replicas", "1"], capture_output=True, text=True,
                        env=env, timeout=300)
    assert p1.returncode == 0, p1.stderr
    assert p2.returncode == 0, p2.stderr
    _same_file(one, many)
    assert "error" not in p2.stderr.lower() and "warning" not in p2.stderr.lower(), p2.stderr


# --------------------------------------------------------------------------- score


@pytest.fixture(scope="module")
def demo_suite_file(tmp_path_factory) -> Path:
    p = tmp_path_factory.mktemp("suite") / "suite.jsonl"
    r = run_cli(["build", str(DEMO), "-o", str(p)])
    assert r.code == 0, r.stderr
    return p


def test_results_and_cache_are_the_one_process_ones(cluster, demo_suite_file, tmp_path):
    spec = "pairflip.demo.models:unigram_scored"  # probabilities, so graded expectations are judged too
    one, many, again = tmp_path / "one.jsonl", tmp_path / "ray.jsonl", tmp_path / "again.jsonl"
    cache = tmp_path / "cache.sqlite"
    r1 = run_cli(["score", str(demo_suite_file), "-m", spec, "-o", str(one), "--batch-size", "50"])
    r2 = run_cli(["score", str(demo_suite_file), "-m", spec, "-o", str(many), "--batch-size", "50", "--engine", "ray",
                  "--replicas", "2", "--cache", str(cache)])
    assert r1.code == 0 and r2.code == 0, r1.stderr + r2.stderr
    h1, h2 = _header(one), _header(many)
    h2.pop("cache")  # says what the cache key covers; the first run had no cache
    assert h1 == h2
    assert _body(one) == _body(many)
    n = h1["texts_predicted"]
    said = " ".join(r2.stderr.split())  # the message wraps at the terminal width
    assert "0 from the cache" in said and f"{n} sent to the model" in said
    # the key an actor made is the key this process makes: a one-process rerun predicts nothing
    r3 = run_cli(["score", str(demo_suite_file), "-m", spec, "-o", str(again), "--cache", str(cache)])
    assert r3.code == 0, r3.stderr
    assert f"{n} from the cache, 0 sent to the model" in " ".join(r3.stderr.split())
    assert _body(again) == _body(one)


def _local_and_ray(suite: Path, spec: str, tmp_path: Path, *extra: str):
    local = run_cli(["score", str(suite), "-m", spec, "-o", str(tmp_path / "l.jsonl"), *extra])
    on_ray = run_cli(["score", str(suite), "-m", spec, "-o", str(tmp_path / "r.jsonl"), *extra,
                      "--engine", "ray", "--replicas", "1"])
    return local, on_ray


@pytest.mark.parametrize("spec, words", [
    ("helpers.toy_models:raises", "the model raised RuntimeError: the stove model ran out of fuel"),
    ("helpers.ray_models:exits", "the model called sys.exit(4)"),
])
def test_a_model_failing_in_an_actor_says_what_it_says_locally(cluster, demo_suite_file, tmp_path, spec, words):
    local, on_ray = _local_and_ray(demo_suite_file, spec, tmp_path, "--batch-size", "40")
    assert local.code == 2 and on_ray.code == 2
    line = on_ray.stderr.strip()
    assert line == local.stderr.strip()
    assert line.startswith(f"pairflip: error: model {spec}: batch ") and words in line
    assert len(line.splitlines()) == 1
    assert not (tmp_path / "r.jsonl").exists()


def test_an_actor_that_dies_is_named_with_the_batch(cluster, demo_suite_file, tmp_path):
    r = run_cli(["score", str(demo_suite_file), "-m", "helpers.ray_models:dies", "-o", str(tmp_path / "r.jsonl"),
                 "--batch-size", "40", "--engine", "ray", "--replicas", "1"])
    assert r.code == 2
    line = " ".join(r.stderr.split())
    assert line.startswith("pairflip: error: model helpers.ray_models:dies: batch ")
    assert "the Ray actor holding the model stopped" in line
    assert not (tmp_path / "r.jsonl").exists()


def _cached_rows(cache: Path) -> int:
    try:
        with sqlite3.connect(str(cache), timeout=1) as db:
            return db.execute("SELECT COUNT(*) FROM predictions").fetchone()[0]
    except sqlite3.Error:
        return 0


def test_interrupted_ray_score_resumes_from_the_cache(cluster, demo_suite_file, tmp_path):
    cache, out = tmp_path / "cache.sqlite", tmp_path / "results.jsonl"
    spec = "helpers.ray_models:slow_labels"
    env = dict(os.environ, PAIRFLIP_NO_PROGRESS="1", PYTHONPATH=str(TESTS))
    proc = subprocess.Popen(
        [PYTHON, "-c", "from pairflip.cli import main; main()", "score", str(demo_suite_file), "-m", spec, "-o", str(out),
         "--batch-size", "16", "--cache", str(cache), "--engine", "ray", "--address", cluster, "--replicas", "2"],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env,
    )
    deadline = time.monotonic() + 240
    while _cached_rows(cache) < 160:  # ten batches in the cache
        if proc.poll() is not None:
            pytest.fail(f"score ended (rc={proc.returncode}) before it could be interrupted: {proc.communicate()[1]}")
        if time.monotonic() > deadline:
            proc.kill()
            pytest.fail("the Ray score never filled its cache")
        time.sleep(0.05)
    proc.send_signal(signal.SIGINT)
    _, err = proc.communicate(timeout=120)
    assert proc.returncode == 130, err
    assert "interrupted (SIGINT)" in err
    assert not out.exists()
    kept = _cached_rows(cache)
    assert kept >= 160

    r = run_cli(["score", str(demo_suite_file), "-m", spec, "-o", str(out), "--batch-size", "16", "--cache", str(cache),
                 "--engine", "ray", "--replicas", "2"])
    assert r.code == 0, r.stderr
    total = _header(out)["texts_predicted"]
    assert kept < total
    assert f"{kept} from the cache, {total - kept} sent to the model" in " ".join(r.stderr.split())
    # the same verdicts as one process with the same labelling function and no cache
    ref = tmp_path / "ref.jsonl"
    r2 = run_cli(["score", str(demo_suite_file), "-m", "helpers.toy_models:keyword_labels", "-o", str(ref)])
    assert r2.code == 0, r2.stderr
    assert _body(out) == _body(ref)


# --------------------------------------------------------------------------- options


def test_without_ray_installed_the_message_says_how_to_install(tmp_path, monkeypatch, demo_suite_file):
    monkeypatch.setitem(sys.modules, "ray", None)  # `import ray` now raises ImportError
    b = run_cli(["build", str(DEMO), "-o", str(tmp_path / "s.jsonl"), "--engine", "ray"])
    s = run_cli(["score", str(demo_suite_file), "-m", "helpers.toy_models:keyword_labels", "-o",
                 str(tmp_path / "r.jsonl"), "--engine", "ray"])
    for r in (b, s):
        assert r.code == 2
        assert r.stderr.strip() == 'pairflip: error: --engine ray: Ray is not installed; install it with pip install "pairflip[ray]"'
    assert not (tmp_path / "s.jsonl").exists() and not (tmp_path / "r.jsonl").exists()


@pytest.mark.parametrize("args, words", [
    (["--replicas", "2"], "--replicas: only used with --engine ray"),
    (["--engine", "spark"], "--engine 'spark': expected 'local'"),
    (["--engine", "ray", "--replicas", "0"], "--replicas 0: expected a whole number of at least 1"),
    (["--engine", "ray", "--shards", "-1"], "--shards -1: expected a whole number of at least 1"),
    (["--engine", "ray", "--workers", "2"], "--workers 2: with --engine ray"),
])
def test_build_engine_options_are_checked_first(tmp_path, args, words):
    r = run_cli(["build", str(DEMO), "-o", str(tmp_path / "s.jsonl"), *args])
    assert r.code == 2 and words in r.stderr, r.stderr
    assert not (tmp_path / "s.jsonl").exists()


def test_score_engine_options_are_checked(cluster, demo_suite_file, tmp_path):
    base = ["score", str(demo_suite_file), "-m", "helpers.toy_models:keyword_labels", "-o", str(tmp_path / "r.jsonl")]
    r = run_cli([*base, "--engine", "ray", "--concurrency", "2"])
    assert r.code == 2 and "--concurrency 2: with --engine ray" in r.stderr
    cpus = int(ray.cluster_resources()["CPU"])
    r = run_cli([*base, "--engine", "ray", "--replicas", str(cpus + 1)])
    assert r.code == 2 and f"the Ray instance has {cpus} CPUs" in r.stderr
    r = run_cli([*base, "--address", "127.0.0.1:1"])
    assert r.code == 2 and "--address: only used with --engine ray" in r.stderr
    assert not (tmp_path / "r.jsonl").exists()


class _FakeRef:
    def __init__(self, value):
        self.value = value


class _FakeRay:
    """Enough of the ray module for the actor checks: refs that are ready at once."""

    @staticmethod
    def wait(refs, num_returns=1, timeout=None):
        return list(refs), []

    @staticmethod
    def get(refs):
        return [r.value for r in refs]


class _FakeActor:
    def __init__(self, info):
        self.ready = type("M", (), {"remote": staticmethod(lambda: _FakeRef(info))})


def test_build_actors_that_would_build_differently_are_refused(nlp):
    from pairflip import __version__
    from pairflip.perturb.build import GENERATOR_VERSION
    from pairflip.perturb.nlp import model_name
    from pairflip.perturb.ray_build import _check_actors, rules_code
    from pairflip.records import PairflipError

    good = {"spacy_model": model_name(nlp), "pairflip": __version__, "rules_version": GENERATOR_VERSION,
            "rules_code": rules_code(), "node": "node-b", "pid": 1}
    _check_actors(_FakeRay, [_FakeActor(good)], model_name(nlp))  # the same: accepted
    cases = [
        (dict(good, spacy_model="en_core_web_md-3.8.0"), "loaded spaCy en_core_web_md-3.8.0"),
        (dict(good, rules_code="0" * 64), "with rule code 000000000000"),
        (dict(good, pairflip="0.0.1"), "runs pairflip 0.0.1"),
        ({"error": "--spacy-model 'xx': cannot load it"}, "a build actor: --spacy-model 'xx'"),
    ]
    for info, words in cases:
        with pytest.raises(PairflipError, match=re.escape(words)):
            _check_actors(_FakeRay, [_FakeActor(good), _FakeActor(info)], model_name(nlp))


def test_model_actors_holding_different_models_are_refused():
    from pairflip.probes.ray_score import RayModel
    from pairflip.records import PairflipError

    def info(fp, node):
        return {"describe": {"name": "m.joblib", "spec": "m.joblib", "kind": "file", "fingerprint": fp}, "fingerprint": fp,
                "spec": "m.joblib", "name": "m.joblib", "kind": "file", "classes": ["neg", "pos"], "key_covers": None,
                "node": node}

    m = RayModel.__new__(RayModel)  # the checks alone, no actors
    m._adopt("m.joblib", [info("a" * 64, "n1"), info("a" * 64, "n2")])
    assert m.fingerprint() == "a" * 64 and m.classes == ["neg", "pos"] and m.describe()["spec"] == "m.joblib"
    with pytest.raises(PairflipError, match="the actors on n1 and n2 hold different models"):
        m._adopt("m.joblib", [info("a" * 64, "n1"), info("b" * 64, "n2")])


def test_an_address_nothing_answers_fails_at_once():
    import socket

    from pairflip.engines import _probe
    from pairflip.records import PairflipError

    s = socket.socket()
    s.bind(("127.0.0.1", 0))
    port = s.getsockname()[1]
    s.close()  # nothing listens there now
    t0 = time.monotonic()
    with pytest.raises(PairflipError, match=rf"--address 127.0.0.1:{port}: no Ray head node answers there"):
        _probe(f"127.0.0.1:{port}")
    assert time.monotonic() - t0 < 10  # Ray's own attempt takes minutes
    _probe("auto")  # left to Ray's own lookup
