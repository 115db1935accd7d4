"""``cmd:COMMAND`` models: a real subprocess speaking JSON Lines (tests/helpers/line_model.py)."""

from __future__ import annotations

import pytest

import pairflip
from helpers import keyword_rules
from helpers.cli import PYTHON, line_model
from helpers.suites import make_pairs, texts_of
from pairflip.probes import load_model
from pairflip.probes.batching import run_batches
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
