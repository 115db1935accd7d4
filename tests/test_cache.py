"""The SQLite prediction cache: round trips, reruns with zero model calls, resumed runs."""

from __future__ import annotations

import json
import sqlite3

import pytest

import pairflip
from helpers import keyword_rules
from helpers.cli import line_model, run_cli
from helpers.suites import make_pairs, texts_of, write_test_suite
from pairflip.probes import PredictionCache, PythonModel
from pairflip.probes.cache import text_key
from pairflip.records import PairflipError, Prediction


class CountingModel:
    """Labels with the keyword rules, remembers every text it receives, and can be told to fail
    (KeyboardInterrupt or an exception) on a given call."""

    classes_ = ["negative", "positive"]

    def __init__(self, fail_on_call: int | None = None, exc: BaseException | None = None) -> None:
        self.received: list[str] = []
        self.calls = 0
        self.fail_on_call = fail_on_call
        self.exc = exc

    def __getstate__(self):
        # The model's "weights" are the keyword rules; the counters and the failure plan are
        # test plumbing, so they stay out of the pickled state that the fingerprint hashes.
        return {}

    def _record(self, texts):
        # pairflip calls exactly one of predict / predict_proba per batch (predict_proba when
        # the model has classes_), so counting in both counts each batch once
        self.calls += 1
        if self.calls == self.fail_on_call:
            raise self.exc
        self.received.extend(texts)

    def predict(self, texts):
        self._record(texts)
        return [keyword_rules.label(t) for t in texts]

    def predict_proba(self, texts):
        self._record(texts)
        return [keyword_rules.probabilities(t) for t in texts]


def test_round_trip(tmp_path):
    path = tmp_path / "c.sqlite"
    preds = [
        ("The tent is great.", Prediction("positive", probabilities={"negative": 0.1, "positive": 0.9})),
        ("The jacket leaks.", Prediction("negative", score=-0.4375)),
        ("Une tente légère ☂", Prediction("3")),
    ]
    with PredictionCache(path) as c:
        assert c.put_many("fp-a", preds) == 3
    with PredictionCache(path) as c:  # a new connection: the rows were committed
        got = c.get_many("fp-a", [t for t, _ in preds] + ["never seen"])
        assert got == dict(preds)
        assert c.get_many("fp-b", [t for t, _ in preds]) == {}  # another model's key
        assert c.count() == 3
    # only hashes of the texts are stored, never the texts
    rows = sqlite3.connect(path).execute("SELECT text_sha256 FROM predictions").fetchall()
    assert sorted(r[0] for r in rows) == sorted(text_key(t) for t, _ in preds)
    assert b"tent is great" not in path.read_bytes()


def test_many_texts_in_chunks(tmp_path):
    texts = [f"Trail note {i}" for i in range(1234)]
    with PredictionCache(tmp_path / "c.db") as c:
        c.put_many("fp", [(t, Prediction("positive")) for t in texts])
        assert len(c.get_many("fp", texts)) == 1234


def test_not_a_sqlite_file(tmp_path):
    p = tmp_path / "notes.db"
    p.write_text("These are my hiking notes, not a database.\n" * 50)
    with pytest.raises(PairflipError) as e:
        PredictionCache(p)
    assert str(p) in str(e.value) and "not a SQLite database" in str(e.value)


def test_someone_elses_sqlite_database(tmp_path):
    p = tmp_path / "inventory.db"
    with sqlite3.connect(p) as db:
        db.execute("CREATE TABLE stock (item TEXT, count INTEGER)")
    with pytest.raises(PairflipError, match="not a pairflip prediction cache .*stock"):
        PredictionCache(p)


def test_missing_folder(tmp_path):
    with pytest.raises(PairflipError, match="does not exist"):
        PredictionCache(tmp_path / "nope" / "c.db")


def test_rerun_makes_zero_model_calls(tmp_path):
    pairs = make_pairs(25)
    first = CountingModel()
    with PredictionCache(tmp_path / "c.db") as c:
        r1 = pairflip.score(pairs, PythonModel(first, spec="counting"), cache=c, batch_size=8)
    assert sorted(first.received) == sorted(texts_of(pairs))
    second = CountingModel()
    with PredictionCache(tmp_path / "c.db") as c:
        r2 = pairflip.score(pairs, PythonModel(second, spec="counting"), cache=c, batch_size=8)
    assert second.calls == 0 and second.received == []
    assert [v.to_dict() for v in r1.verdicts] == [v.to_dict() for v in r2.verdicts]


def test_interrupted_run_resumes_with_what_was_left(tmp_path):
    pairs = make_pairs(25)
    texts = texts_of(pairs)
    interrupted = CountingModel(fail_on_call=3, exc=KeyboardInterrupt())
    with PredictionCache(tmp_path / "c.db") as c:
        with pytest.raises(KeyboardInterrupt):
            pairflip.score(pairs, PythonModel(interrupted, spec="counting"), cache=c, batch_size=8)
    assert len(interrupted.received) == 16  # two batches finished before the interrupt
    resumed = CountingModel()
    with PredictionCache(tmp_path / "c.db") as c:
        res = pairflip.score(pairs, PythonModel(resumed, spec="counting"), cache=c, batch_size=8)
    assert sorted(resumed.received) == sorted(set(texts) - set(interrupted.received))
    assert not set(resumed.received) & set(interrupted.received)
    fresh = pairflip.score(pairs, PythonModel(CountingModel(), spec="counting"), batch_size=8)
    assert [v.to_dict() for v in res.verdicts] == [v.to_dict() for v in fresh.verdicts]


def test_failed_batch_keeps_finished_batches(tmp_path):
    pairs = make_pairs(25)
    failing = CountingModel(fail_on_call=4, exc=RuntimeError("the stove model ran out of fuel"))
    with PredictionCache(tmp_path / "c.db") as c:
        with pytest.raises(PairflipError, match="counting: batch 4 of .* raised RuntimeError: the stove model ran out of fuel"):
            pairflip.score(pairs, PythonModel(failing, spec="counting"), cache=c, batch_size=8)
        assert c.count(PythonModel(failing, spec="counting").fingerprint()) == 24


def test_cli_rerun_with_cache_sends_nothing_to_the_process(tmp_path):
    suite = write_test_suite(tmp_path / "suite.jsonl", 10)
    log = tmp_path / "received.txt"
    spec = line_model("--log", str(log))
    args = ["score", str(suite), "--model", spec, "--cache", str(tmp_path / "c.db"), "--batch-size", "5"]
    r1 = run_cli(args + ["-o", str(tmp_path / "r1.jsonl")])
    assert r1.code == 0, r1.stderr
    n_first = len(log.read_text(encoding="utf-8").splitlines())
    r2 = run_cli(args + ["-o", str(tmp_path / "r2.jsonl")])
    assert r2.code == 0, r2.stderr
    assert n_first == len(texts_of(make_pairs(10)))
    assert len(log.read_text(encoding="utf-8").splitlines()) == n_first  # nothing new was sent
    assert f"({n_first} distinct texts: 0 from the cache, {n_first} sent to the model)" in r1.stderr
    assert f"({n_first} distinct texts: {n_first} from the cache, 0 sent to the model)" in r2.stderr

    def body(p):
        return [json.loads(x) for x in p.read_text(encoding="utf-8").splitlines()[1:]]

    assert body(tmp_path / "r1.jsonl") == body(tmp_path / "r2.jsonl")


def test_cli_interrupt_then_resume(tmp_path, monkeypatch):
    import signal

    from helpers import toy_models

    suite = write_test_suite(tmp_path / "suite.jsonl", 10)
    out = tmp_path / "results.jsonl"
    args = ["score", str(suite), "--model", "helpers.toy_models:interruptible", "-o", str(out),
            "--cache", str(tmp_path / "c.db"), "--batch-size", "4"]
    calls = []

    def ctrl_c_at_third_call(texts):
        # a real SIGINT, as a Ctrl-C in the terminal sends: the command line's own handler turns
        # it into an interrupt (a `raise KeyboardInterrupt` in model code is a model failure)
        calls.append(len(texts))
        if len(calls) == 3:
            signal.raise_signal(signal.SIGINT)
        toy_models.received.extend(texts)
        return [keyword_rules.label(t) for t in texts]

    monkeypatch.setattr(toy_models, "interruptible", ctrl_c_at_third_call)
    toy_models.received.clear()
    r1 = run_cli(args)
    assert r1.code == 130 and "interrupted" in r1.stderr and not out.exists()  # 128 + SIGINT, as shells do
    first = list(toy_models.received)
    assert len(first) == 8  # two batches of 4 finished before Ctrl-C
    calls.append("no more interrupts")
    toy_models.received.clear()
    r2 = run_cli(args)
    assert r2.code == 0, r2.stderr
    assert sorted(toy_models.received) == sorted(set(texts_of(make_pairs(10))) - set(first))


def test_sigint_to_a_real_run_keeps_finished_batches(tmp_path):
    import signal
    import subprocess
    import time

    from helpers.cli import PYTHON, TESTS

    suite = write_test_suite(tmp_path / "suite.jsonl", 12)
    log = tmp_path / "received.txt"
    cache = tmp_path / "c.db"
    out = tmp_path / "results.jsonl"
    spec = line_model("--log", str(log), "--delay", "0.2")
    args = [PYTHON, "-c", "from pairflip.cli import main; main()", "score", str(suite), "--model", spec,
            "-o", str(out), "--cache", str(cache), "--batch-size", "5"]
    proc = subprocess.Popen(args, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, cwd=TESTS)
    try:
        deadline = time.monotonic() + 60
        while time.monotonic() < deadline:  # wait until the model has been sent its second batch
            if log.exists() and len(log.read_text(encoding="utf-8").splitlines()) >= 10:
                break
            time.sleep(0.05)
        proc.send_signal(signal.SIGINT)
        _, err = proc.communicate(timeout=60)
    finally:
        if proc.poll() is None:
            proc.kill()
    assert proc.returncode == 130, err
    assert "interrupted" in err and "Traceback" not in err and not out.exists()
    sent_before = log.read_text(encoding="utf-8").splitlines()
    with PredictionCache(cache) as c:
        cached = c.count()
    assert 5 <= cached < len(texts_of(make_pairs(12)))
    # resume: only what was not cached is sent
    log.unlink()
    r = run_cli(args[3:])
    assert r.code == 0, r.stderr
    resent = log.read_text(encoding="utf-8").splitlines()
    assert len(resent) == len(texts_of(make_pairs(12))) - cached
    assert set(resent) | set(sent_before) == set(texts_of(make_pairs(12)))



# --------------------------------------------------------------------------- what the cache key covers


def _write_model_package(folder, layout: str) -> tuple[str, "Path"]:
    """A `module:name` model whose opinion words live in another file it imports: in the same
    package (``package``), or in a plain module beside it (``module``). Returns the SPEC and the
    words file."""
    if layout == "package":
        pkg = folder / "campstore"
        pkg.mkdir()
        (pkg / "__init__.py").write_text("", encoding="utf-8")
        words = pkg / "words.py"
        (pkg / "rating.py").write_text(
            "from campstore.words import NEGATIVE\n\n"
            "def rate(texts):\n"
            "    return ['negative' if any(w in t.lower() for w in NEGATIVE) else 'positive' for t in texts]\n",
            encoding="utf-8",
        )
        spec = "campstore.rating:rate"
    else:
        words = folder / "trail_words.py"
        (folder / "trail_rating.py").write_text(
            "import trail_words\n\n"
            "def rate(texts):\n"
            "    return ['negative' if any(w in t.lower() for w in trail_words.NEGATIVE) else 'positive' for t in texts]\n",
            encoding="utf-8",
        )
        spec = "trail_rating:rate"
    words.write_text("NEGATIVE = ['not', 'never', 'leaks']\n", encoding="utf-8")
    return spec, words


@pytest.mark.parametrize("layout", ["package", "module"])
def test_editing_a_module_the_model_imports_changes_the_cache_key(tmp_path, layout):
    """The cache key of a `module:name` model used to cover the named module only: edit a module
    it imports and the rerun served the old predictions from the cache."""
    import json as _json

    from helpers.cli import run_pairflip

    work = tmp_path / "work"
    work.mkdir()
    spec, words = _write_model_package(work, layout)
    suite = write_test_suite(tmp_path / "suite.jsonl")
    cache = tmp_path / "c.db"
    n = len(texts_of(make_pairs()))

    def run(name):
        out = tmp_path / f"{name}.jsonl"
        r = run_pairflip(["score", str(suite), "--model", spec, "-o", str(out), "--cache", str(cache)], cwd=work)
        assert r.code == 0, r.stderr
        return r, {v["id"]: v["source_pred"] for v in map(_json.loads, out.read_text(encoding="utf-8").splitlines()[1:])}

    r1, first = run("r1")
    assert f"{n} distinct texts: 0 from the cache, {n} sent to the model" in " ".join(r1.stderr.split())
    assert words.stem in r1.stderr  # the closing line names what the cache key covers
    r_same, same = run("r_same")
    assert f"{n} from the cache, 0 sent to the model" in " ".join(r_same.stderr.split()) and same == first
    words.write_text("NEGATIVE = ['great']\n", encoding="utf-8")  # the model changed its mind
    r2, second = run("r2")
    assert f"{n} distinct texts: 0 from the cache, {n} sent to the model" in " ".join(r2.stderr.split())
    by_id = {p.id: p for p in make_pairs()}
    for pid, pred in second.items():
        assert pred == ("negative" if "great" in by_id[pid].source.lower() else "positive"), by_id[pid].source


def test_cache_key_option_ties_the_cache_to_a_model_version(tmp_path):
    suite = write_test_suite(tmp_path / "suite.jsonl", 5)
    log = tmp_path / "received.txt"
    n = len(texts_of(make_pairs(5)))
    base = ["score", str(suite), "--model", line_model("--log", str(log)), "--cache", str(tmp_path / "c.db")]

    def run(name, *extra):
        r = run_cli(base + ["-o", str(tmp_path / f"{name}.jsonl"), *extra])
        assert r.code == 0, r.stderr
        return " ".join(r.stderr.split())

    first = run("a", "--cache-key", "lantern-v1")
    assert f"0 from the cache, {n} sent to the model" in first and "--cache-key 'lantern-v1'" in first
    assert f"{n} from the cache, 0 sent to the model" in run("b", "--cache-key", "lantern-v1")
    assert f"0 from the cache, {n} sent to the model" in run("c", "--cache-key", "lantern-v2")
    without = run("d")  # the key without --cache-key is another key again
    assert f"0 from the cache, {n} sent to the model" in without and "add --cache-key" in without
    assert len(log.read_text(encoding="utf-8").splitlines()) == 3 * n


@pytest.mark.parametrize("args, what", [(["--cache-key", "", "--cache", "c.db"], "empty"),
                                        (["--cache-key", "   ", "--cache", "c.db"], "empty"),
                                        (["--cache-key", "v2"], "given without --cache")])
def test_cache_key_option_is_checked(tmp_path, args, what):
    suite = write_test_suite(tmp_path / "suite.jsonl")
    args = [str(tmp_path / a) if a == "c.db" else a for a in args]
    r = run_cli(["score", str(suite), "--model", "helpers.toy_models:keyword_labels", "-o", str(tmp_path / "r.jsonl"), *args])
    assert r.code == 2 and r.stderr.startswith("pairflip: error: --cache-key") and what in r.stderr, r.stderr
    assert not (tmp_path / "r.jsonl").exists()
