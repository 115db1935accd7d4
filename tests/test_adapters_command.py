"""``cmd:COMMAND`` models: a real subprocess speaking JSON Lines (tests/helpers/line_model.py)."""

from __future__ import annotations

import json
import sqlite3
import subprocess
import sys

import pytest

import pairflip
from helpers import keyword_rules
from helpers.cli import HELPERS, PYTHON, line_model, run_cli
from helpers.suites import make_pairs, texts_of
from pairflip.probes import load_model
from pairflip.probes.batching import run_batches
from pairflip.probes.cache import text_key
from pairflip.records import PairflipError

TEXTS = ["The tent is great.", "The jacket leaks.", "Une tente très légère — ☂"]


def test_labels_and_probabilities_from_a_process():
    with load_model(line_model()) as m:
        preds = m.predict(TEXTS)
        again = m.predict(TEXTS[:1])
        assert m.started == 1  # one process kept alive for both batches
    assert [p.label for p in preds] == [keyword_rules.label(t) for t in TEXTS]
    assert preds[0].probabilities == dict(zip(keyword_rules.CLASSES, keyword_rules.probabilities(TEXTS[0])))
    assert again[0] == preds[0]


def test_labels_only_process():
    with load_model(line_model("--mode", "labels")) as m:
        assert [p.probabilities for p in m.predict(TEXTS)] == [None, None, None]


def test_process_receives_each_text_once(tmp_path):
    log = tmp_path / "received.txt"
    pairs = make_pairs(20)
    with load_model(line_model("--log", str(log))) as m:
        res = pairflip.score(pairs, m, batch_size=7)
    received = log.read_text(encoding="utf-8").splitlines()
    assert sorted(received) == sorted(texts_of(pairs))
    assert len(res.verdicts) == len(pairs)


def test_concurrency_starts_several_processes(tmp_path):
    log = tmp_path / "received.txt"
    pairs = make_pairs(40)
    with load_model(line_model("--log", str(log))) as m:
        par = pairflip.score(pairs, m, batch_size=6, concurrency=3)
        assert 2 <= m.started <= 3
    with load_model(line_model()) as m:
        seq = pairflip.score(pairs, m, batch_size=6)
    assert [v.to_dict() for v in par.verdicts] == [v.to_dict() for v in seq.verdicts]
    assert sorted(log.read_text(encoding="utf-8").splitlines()) == sorted(texts_of(pairs))


def _fail(spec: str, texts: list[str], **kw) -> str:
    with load_model(spec, **kw) as m:
        batches = [texts[:2], texts[2:]]
        with pytest.raises(PairflipError) as e:
            for _ in run_batches(m, batches):
                pass
    return str(e.value)


def test_garbage_output():
    spec = line_model("--mode", "garbage")
    msg = _fail(spec, TEXTS)
    assert msg.startswith(f"model {spec}: batch 1 of 2")
    assert "not JSON: 'loading weights... done'" in msg


def test_wrong_number_of_outputs():
    msg = _fail(line_model("--mode", "short"), TEXTS)
    assert "batch 1 of 2 (2 texts" in msg and "1 labels for 2 texts" in msg


def test_exit_with_stderr_tail():
    spec = line_model("--mode", "crash-after", "--after", "1")
    msg = _fail(spec, TEXTS)
    assert spec in msg and "batch 2 of 2" in msg
    assert "exited with code 3" in msg and "ran out of tent pegs" in msg


def test_error_reply():
    msg = _fail(line_model("--mode", "error"), TEXTS)
    assert "reported an error: the lantern model is not warmed up" in msg


def test_timeout_stops_the_process():
    m = load_model(line_model("--mode", "hang", "--hang-seconds", "30"), timeout=1.0)
    with pytest.raises(PairflipError) as e:
        m.predict(TEXTS)
    assert "no answer within --timeout 1 seconds" in str(e.value)
    assert m._all[0].proc.poll() is not None  # stopped at the timeout, not waited out
    m.close()
    msg = _fail(line_model("--mode", "hang", "--hang-seconds", "30"), TEXTS, timeout=0.5)
    assert "batch 1 of 2" in msg


def test_no_such_program():
    with pytest.raises(PairflipError, match="cannot start 'no-such-model-program-xyz': no such program"):
        load_model("cmd:no-such-model-program-xyz --fast").predict(["a"])


@pytest.mark.parametrize("spec, what", [("cmd:", "no command after 'cmd:'"), ("cmd:python 'unclosed", "cannot split")])
def test_bad_command(spec, what):
    with pytest.raises(PairflipError, match=what):
        load_model(spec)


def test_close_ends_the_processes():
    m = load_model(line_model())
    m.predict(["The stove is reliable."])
    procs = [w.proc for w in m._all]
    m.close()
    assert procs and all(p.poll() is not None for p in procs)


def test_fingerprint_follows_the_script(tmp_path):
    script = tmp_path / "model.py"
    script.write_text("import sys, json\nfor l in sys.stdin: print(json.dumps({'labels': ['pos'] * len(json.loads(l)['texts'])}), flush=True)\n")
    spec = f"cmd:{PYTHON} {script}"
    before = load_model(spec).fingerprint()
    assert load_model(spec).fingerprint() == before
    script.write_text(script.read_text() + "# retrained\n")
    assert load_model(spec).fingerprint() != before



# --------------------------------------------------------------------------- one answer per request

# A cmd: model that answers with the keyword rules and injects one fault into its batch number
# AT (0-based, counted per process). With "echo" it copies each request's id into its answer.
# Also used by tests/test_properties.py.
FAULTY_MODEL = r"""
import json, sys, time
sys.path.insert(0, HELPERS)
from keyword_rules import answer

fault, at, echo = sys.argv[1], int(sys.argv[2]), sys.argv[3] == "echo"


def flipped(out):
    labels = ["positive" if x == "negative" else "negative" for x in out["labels"]]
    return {**out, "labels": labels, "probabilities": [row[::-1] for row in out["probabilities"]]}


def say(obj):
    print(json.dumps(obj), flush=True)


n = 0
for line in sys.stdin:
    if not line.strip():
        continue
    req = json.loads(line)
    out = answer(req["texts"])
    if echo:
        out["id"] = req.get("id")
    hit, n = n == at, n + 1
    if not hit or fault == "none":
        say(out)
    elif fault == "error":
        say({"error": "the lantern model overheated", **({"id": req.get("id")} if echo else {})})
    elif fault == "crash":
        print("faulty model: out of tent pegs", file=sys.stderr, flush=True)
        sys.exit(3)
    elif fault == "short":
        say({**out, "labels": out["labels"][:-1], "probabilities": out["probabilities"][:-1]})
    elif fault == "hang":
        time.sleep(60)
    elif fault == "extra-before":  # a stray answer first, then the real one
        say(flipped(out))
        say(out)
    elif fault == "extra-after":
        say(out)
        say(flipped(out))
    elif fault == "extra-late":  # the stray line comes after pairflip may have sent the next request
        say(out)
        time.sleep(0.2)
        say(flipped(out))
"""


def faulty_model(folder, fault: str, at: int, echo: bool) -> str:
    """The ``cmd:`` SPEC of FAULTY_MODEL, written into ``folder``."""
    import shlex

    script = folder / "faulty_model.py"
    if not script.exists():
        script.write_text(FAULTY_MODEL.replace("HELPERS", repr(str(HELPERS)), 1), encoding="utf-8")
    return "cmd:" + " ".join(shlex.quote(x) for x in [PYTHON, str(script), fault, str(at), "echo" if echo else "plain"])


def cached_rows(cache) -> dict[str, tuple[str, list[float]]]:
    """text_sha256 -> (label, probabilities in class order) of every cached prediction."""
    rows = sqlite3.connect(cache).execute("SELECT text_sha256, label, probabilities FROM predictions").fetchall()
    out = {}
    for key, label, probs in rows:
        p = json.loads(probs) if probs else {}
        out[key] = (label, [p.get(c) for c in keyword_rules.CLASSES])
    return out


def assert_cache_holds_only_keyword_predictions(cache, texts) -> int:
    by_key = {text_key(t): t for t in texts}
    rows = cached_rows(cache)
    for key, (label, probs) in rows.items():
        t = by_key[key]
        assert (label, probs) == (keyword_rules.label(t), keyword_rules.probabilities(t)), t
    return len(rows)


N_EXTRA = 10  # 42 distinct texts: 9 batches of 5 (the last one of 2)


@pytest.mark.parametrize("echo", [True, False], ids=["echoes-id", "no-id"])
@pytest.mark.parametrize("fault", ["extra-after", "extra-before", "extra-late"])
@pytest.mark.parametrize("at", [1, 8], ids=["batch-2", "last-batch"])
def test_an_extra_line_fails_the_run_and_nothing_wrong_is_cached(tmp_path, fault, echo, at):
    """Two lines for one request used to shift every later answer onto the wrong batch (exit 0,
    wrong predictions cached). Now it is a protocol error, exit 2, and the cache keeps only
    predictions that are right."""
    from helpers.suites import write_test_suite

    suite = write_test_suite(tmp_path / "suite.jsonl", N_EXTRA)
    texts = texts_of(make_pairs(N_EXTRA))
    assert len(texts) == 42
    out, cache = tmp_path / "results.jsonl", tmp_path / "c.db"
    spec = faulty_model(tmp_path, fault, at, echo)
    run = run_cli(["score", str(suite), "--model", spec, "-o", str(out), "--cache", str(cache), "--batch-size", "5"])
    assert run.code == 2, (run.code, run.stderr)
    flat = " ".join(run.stderr.split())
    assert flat.startswith(f"pairflip: error: model {spec}")
    assert "one line per request" in flat, flat
    assert not out.exists()
    assert assert_cache_holds_only_keyword_predictions(cache, texts) < len(texts)


def test_answers_that_echo_the_id_are_matched_to_their_requests(tmp_path):
    pairs = make_pairs(N_EXTRA)
    with load_model(faulty_model(tmp_path, "none", 0, True)) as m:
        echoed = pairflip.score(pairs, m, batch_size=5, concurrency=2)
    with load_model(line_model()) as m:
        plain = pairflip.score(pairs, m, batch_size=5)
    assert [v.to_dict() for v in echoed.verdicts] == [v.to_dict() for v in plain.verdicts]


def test_an_answer_with_another_requests_id_is_refused(tmp_path):
    script = tmp_path / "stale_id.py"
    script.write_text(
        "import json, sys\n"
        "for line in sys.stdin:\n"
        "    req = json.loads(line)\n"
        "    print(json.dumps({'id': 'batch-0', 'labels': ['positive'] * len(req['texts'])}), flush=True)\n",
        encoding="utf-8",
    )
    msg = _fail(f"cmd:{PYTHON} {script}", TEXTS)
    assert "batch 1 of 2" in msg and "'batch-0'" in msg and "one line per request" in msg


def test_timeout_also_bounds_sending_the_batch(tmp_path):
    """A process that never reads its stdin: a 200 kB batch fills the pipe, and the write used to
    block for ever, whatever --timeout said. Run in a subprocess so that a hang fails the test
    instead of stopping the test run. (A Linux pipe holds 65,536 bytes by default, and a write
    to a full pipe blocks until the reader takes some: pipe(7), "Pipe capacity", Linux
    man-pages; 200 kB is three times that.)"""
    code = (
        "from pairflip.probes import load_model\n"
        "from pairflip.records import PairflipError\n"
        "m = load_model(\"cmd:" + PYTHON + " -c 'import time; time.sleep(60)'\", timeout=1.0)\n"
        "try:\n"
        "    m.predict(['a tent that keeps the rain out ' * 40] * 200)\n"
        "except PairflipError as err:\n"
        "    print(err)\n"
        "m.close()\n"
    )
    try:
        run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=30)
    except subprocess.TimeoutExpired:
        pytest.fail("sending a batch to a process that does not read was not bounded by --timeout 1")
    assert run.returncode == 0, run.stderr
    assert "no answer within --timeout 1 seconds" in run.stdout
