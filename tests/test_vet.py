"""pairflip vet: the decisions file, the session, --plain through stdin, the Textual app through its
own test pilot, a kill -9 in the middle, and decisions carried over to a rebuilt suite."""

from __future__ import annotations

import asyncio
import io
import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from pairflip import cli
from pairflip.decisions import DecisionLog, apply_decisions, read_decisions
from pairflip.files import write_suite
from pairflip.records import Edit, Pair, PairflipError, Suite
from pairflip.vetting import VetSession, load_items, select

PAIRFLIP = str(Path(sys.executable).with_name("pairflip"))


def _pairs() -> list[Pair]:
    out = []
    for noun in ("tent", "stove", "lantern", "kettle", "sleeping bag", "rucksack"):
        src = f"The {noun} is sturdy."
        at = len(f"The {noun} is ")
        out.append(Pair(source=src, variant=f"The {noun} is not sturdy.", family="negation", rule="negation/copula",
                        should="flip", edits=[Edit(at, at, "not ")]))
        out.append(Pair(source=src, variant=f"The {noun} is very sturdy.", family="intensifier",
                        rule="intensifier/amplify", should="strengthen", edits=[Edit(at, at, "very ")]))
    return out


@pytest.fixture()
def suite_file(tmp_path) -> Path:
    p = tmp_path / "suite.jsonl"
    write_suite(Suite(header={"generator": {"name": "pairflip"}}, pairs=_pairs()), p)
    return p


def run(args: list, capsys, stdin: str | None = None, monkeypatch=None) -> tuple[int, str, str]:
    if stdin is not None:
        monkeypatch.setattr(sys, "stdin", io.StringIO(stdin))
    try:
        cli.main([str(a) for a in args])
        code = 0
    except SystemExit as e:
        code = e.code if isinstance(e.code, int) else 2
    out, err = capsys.readouterr()
    return code, out, err


def _records(path: Path) -> list[dict]:
    return [json.loads(x) for x in path.read_text(encoding="utf-8").splitlines()]


# --------------------------------------------------------------------------- decisions file


def test_decisions_file_last_word_wins_and_undo_restores_the_one_before(tmp_path):
    log = DecisionLog(tmp_path / "d.jsonl")
    log.add("p1", "accept")
    log.add("p1", "reject", reason="ungrammatical")
    log.add("p2", "change", should="hold", was="flip")
    log.undo("p1")
    log.add("p3", "accept")
    log.undo("p3")
    log.close()
    got = read_decisions(tmp_path / "d.jsonl")
    assert {k: v.decision for k, v in got.items()} == {"p1": "accept", "p2": "change"}
    assert got["p2"].should == "hold"
    recs = _records(tmp_path / "d.jsonl")
    assert recs[0]["kind"] == "pairflip-decisions" and recs[0]["version"] == 1
    assert [r["decision"] for r in recs[1:]] == ["accept", "reject", "change", "undo", "accept", "undo"]
    assert all("time" in r for r in recs[1:])


@pytest.mark.parametrize("line, needle", [
    ('{"id": "p1", "decision": "maybe"}', "field 'decision' is 'maybe'"),
    ('{"id": "p1", "decision": "reject"}', "field 'reason' is None"),
    ('{"id": "p1", "decision": "change", "should": "sideways"}', "field 'should' is 'sideways'"),
    ('{"decision": "accept"}', "field 'id'"),
])
def test_bad_decision_records_name_file_and_line(tmp_path, line, needle):
    p = tmp_path / "d.jsonl"
    p.write_text('{"kind": "pairflip-decisions", "version": 1}\n{"id": "p0", "decision": "accept"}\n' + line + "\n",
                 encoding="utf-8")
    with pytest.raises(PairflipError, match=f"d.jsonl:3: {needle}".replace("(", r"\(").replace(")", r"\)")):
        read_decisions(p)


def test_a_record_cut_short_by_a_kill_is_dropped_and_the_log_goes_on_after_it(tmp_path):
    p = tmp_path / "d.jsonl"
    p.write_text('{"kind": "pairflip-decisions", "version": 1}\n{"id": "p0", "decision": "accept"}\n{"id": "p1", "dec',
                 encoding="utf-8")
    assert set(read_decisions(p)) == {"p0"}
    log = DecisionLog(p)
    log.add("p2", "accept")
    log.close()
    assert set(read_decisions(p)) == {"p0", "p2"}


def test_apply_leaves_out_rejected_and_applies_changed(suite_file):
    pairs = _pairs()
    decisions = {}
    p = suite_file.parent / "d.jsonl"
    log = DecisionLog(p)
    log.add(pairs[0].id, "reject", reason="no-opinion")
    log.add(pairs[1].id, "change", should="hold", was="strengthen")
    log.add(pairs[2].id, "accept")
    log.close()
    decisions = read_decisions(p)
    kept, counts = apply_decisions(pairs, decisions)
    assert [x.id for x in kept] == [x.id for x in pairs[1:]]
    assert kept[0].should == "hold" and kept[0].extra["vetted"] == "change"
    assert kept[1].extra["vetted"] == "accept" and "vetted" not in kept[2].extra
    assert counts.sentence() == "vetted 3 of 12 pairs: 1 rejected and left out, 1 expectation changed"


# --------------------------------------------------------------------------- selection


def test_sample_is_seeded_and_spread_over_the_rules(suite_file):
    _, items = load_items(suite_file)
    a = select(items, {}, only="all", sample=4, seed=3)
    b = select(items, {}, only="all", sample=4, seed=3)
    assert [i.id for i in a] == [i.id for i in b]
    assert sorted(i.rule for i in a) == ["intensifier/amplify"] * 2 + ["negation/copula"] * 2
    assert select(items, {}, only="all", sample=4, seed=4) != a or len(items) <= 4


def test_only_violations_needs_results(suite_file, capsys, tmp_path):
    code, _, err = run(["vet", suite_file, "--decisions", tmp_path / "d.jsonl", "--only", "violations", "--plain"], capsys)
    assert code == 2 and "needs a results file" in err


# --------------------------------------------------------------------------- --plain through stdin


def test_plain_answers_from_stdin_are_written_at_once(suite_file, tmp_path, capsys, monkeypatch):
    d = tmp_path / "d.jsonl"
    answers = "a\nr g wrong verb form\ne h\nzzz\ns\nu\nr x\nq\n"
    code, out, err = run(["vet", suite_file, "--decisions", d, "--plain"], capsys, answers, monkeypatch)
    assert code == 0, err
    recs = _records(d)[1:]
    ids = [p.id for p in _pairs()]
    assert [(r["id"], r["decision"], r.get("reason"), r.get("should")) for r in recs] == [
        (ids[0], "accept", None, None),
        (ids[1], "reject", "ungrammatical", None),
        (ids[2], "change", None, "hold"),
        (ids[3], "reject", "expectation-wrong", None),  # "s" then "u" came back to pair 4
    ]
    assert recs[1]["note"] == "wrong verb form"
    assert "unknown answer 'zzz'" in out
    assert "should not keep the opinion (reversed, or gone)" in out  # the expectation in words
    assert "The tent is [+not+] sturdy." in out  # the word diff, no JSON
    # A second session shows only the pairs still unvetted.
    code, out, err = run(["vet", suite_file, "--decisions", d, "--plain"], capsys, "q\n", monkeypatch)
    assert code == 0 and "[1 of 8" in out


def test_list_prints_pairs_readably_and_asks_nothing(suite_file, tmp_path, capsys):
    d = tmp_path / "d.jsonl"
    code, out, _ = run(["vet", suite_file, "--decisions", d, "--list", "3", "--only", "all"], capsys)
    assert code == 0
    assert out.count("source:") == 3 and "{" not in out
    assert not d.exists()


def test_without_a_terminal_the_app_asks_for_plain(suite_file, tmp_path, capsys, monkeypatch):
    code, _, err = run(["vet", suite_file, "--decisions", tmp_path / "d.jsonl"], capsys, "", monkeypatch)
    assert code == 2 and "--plain" in err


def test_kill_9_in_the_middle_keeps_every_answer_before_it(suite_file, tmp_path):
    d = tmp_path / "d.jsonl"
    proc = subprocess.Popen([PAIRFLIP, "vet", str(suite_file), "--decisions", str(d), "--plain"],
                            stdin=subprocess.PIPE, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    assert proc.stdin is not None and proc.stdout is not None
    for answer in ("a", "r n", "a"):
        proc.stdin.write(answer + "\n")
        proc.stdin.flush()
    deadline = time.monotonic() + 60
    while time.monotonic() < deadline:  # wait until the third answer is on disk
        if d.exists() and len(d.read_text(encoding="utf-8").splitlines()) == 4:
            break
        time.sleep(0.05)
    os.kill(proc.pid, signal.SIGKILL)
    proc.wait(timeout=30)
    got = read_decisions(d)
    ids = [p.id for p in _pairs()]
    assert {k: v.decision for k, v in got.items()} == {ids[0]: "accept", ids[1]: "reject", ids[2]: "accept"}


def test_decisions_carry_over_to_a_rebuilt_suite(nlp, tmp_path, capsys, monkeypatch):
    corpus = tmp_path / "r.txt"
    corpus.write_text("The tent is roomy.\nThe stove is reliable.\n", encoding="utf-8")
    code, _, err = run(["build", corpus, "-o", tmp_path / "a.jsonl"], capsys)
    assert code == 0, err
    d = tmp_path / "d.jsonl"
    code, _, err = run(["vet", tmp_path / "a.jsonl", "--decisions", d, "--plain"], capsys, "a\nr g\n", monkeypatch)
    assert code == 0, err
    code, _, err = run(["build", corpus, "-o", tmp_path / "b.jsonl"], capsys)  # rebuilt: a new 'created'
    assert code == 0, err
    _, items = load_items(tmp_path / "b.jsonl")
    rest = select(items, read_decisions(d), only="unvetted")
    assert len(rest) == len(items) - 2


# --------------------------------------------------------------------------- the Textual app


def test_app_keys_through_the_textual_pilot(suite_file, tmp_path):
    from pairflip.report.vet_app import VetApp

    d = tmp_path / "d.jsonl"
    _, items = load_items(suite_file)
    log = DecisionLog(d)
    session = VetSession(select(items, {}, only="all"), log)
    app = VetApp(session, str(suite_file))

    async def drive() -> None:
        async with app.run_test(size=(80, 24)) as pilot:
            await pilot.press("a")             # accept pair 1
            await pilot.press("r", "x")        # reject pair 2: expectation wrong
            await pilot.press("e", "h")        # pair 3 should hold
            await pilot.press("r", "escape")   # a half-given answer cancelled
            await pilot.press("s", "u")        # skip pair 4, step back to it
            await pilot.press("r", "g")        # reject pair 4: ungrammatical
            await pilot.press("u")             # undo that
            await pilot.press("plus")          # not an answer key: nothing happens
            await pilot.pause()
            assert "4 of 12" in str(app.query_one("#progress").render())
            await pilot.press("q")

    asyncio.run(drive())
    log.close()
    recs = _records(d)[1:]
    ids = [i.id for i in items]
    assert [(r["id"], r["decision"]) for r in recs] == [
        (ids[0], "accept"), (ids[1], "reject"), (ids[2], "change"), (ids[3], "reject"), (ids[3], "undo")]
    assert recs[1]["reason"] == "expectation-wrong" and recs[2]["should"] == "hold"
    assert set(read_decisions(d)) == set(ids[:3])


# --------------------------------------------------------------------------- --vetted in later steps


@pytest.fixture()
def scored(suite_file, tmp_path, monkeypatch, capsys) -> Path:
    # A model that ignores "not": every negation pair keeps its label (a violation); "very" raises
    # its positive score, so every amplified pair is ok (strengthen).
    (tmp_path / "fe_vet_model.py").write_text(
        "def predict(texts):\n"
        "    out = []\n"
        "    for t in texts:\n"
        "        p = 0.9 if 'very' in t else 0.7\n"
        "        out.append({'label': 'positive', 'probabilities': {'positive': p, 'negative': 1 - p}})\n"
        "    return out\n", encoding="utf-8")
    monkeypatch.syspath_prepend(str(tmp_path))
    out = tmp_path / "results.jsonl"
    code, _, err = run(["score", suite_file, "--model", "fe_vet_model:predict", "-o", out], capsys)
    assert code == 0, err
    return out


def _decide(path: Path, *answers: tuple) -> Path:
    log = DecisionLog(path)
    for pid, decision, extra in answers:
        log.add(pid, decision, **extra)
    log.close()
    return path


def test_rejected_violations_disappear_from_show_and_gate(scored, tmp_path, capsys):
    ids = [p.id for p in _pairs()]
    neg = [i for k, i in enumerate(ids) if k % 2 == 0]  # the six negation pairs, all violated
    d = _decide(tmp_path / "d.jsonl", *[(i, "reject", {"reason": "ungrammatical"}) for i in neg[:4]],
                (neg[4], "accept", {}), (ids[1], "accept", {}))
    code, _, err = run(["gate", scored, "--limit", "negation.violation <= 0.5"], capsys)
    assert code == 1, err  # 6 of 6 violated
    code, out, err = run(["show", scored, "--vetted", d, "--json", tmp_path / "s.json"], capsys)
    assert code == 0, err
    summary = json.loads((tmp_path / "s.json").read_text(encoding="utf-8"))
    neg_row = summary["families"]["negation"]
    assert (neg_row["pairs"], neg_row["violations"], neg_row["rejected"], neg_row["vetted"]) == (2, 2, 4, 1)
    assert neg_row["confirmed"]["violations"] == 1 and neg_row["validity"] == pytest.approx(1 / 5)
    assert summary["vetted"]["rejected"] == 4 and summary["vetted"]["total"] == 12
    assert "6 of 12 pairs: 4 rejected and left out, 0 expectations changed" in out
    # With 4 of the 6 rejected, the 2 left still violate: the plain gate still fails ...
    code, _, err = run(["gate", scored, "--vetted", d, "--limit", "negation.violation <= 0.5"], capsys)
    assert code == 1
    # ... and so does the confirmed one (1 of 1 accepted pairs violated); with the last two
    # rejected as well, no violation is left.
    d2 = _decide(tmp_path / "d.jsonl", (neg[4], "reject", {"reason": "no-opinion"}), (neg[5], "reject", {"reason": "other"}))
    code, _, err = run(["show", scored, "--vetted", d2, "--json", tmp_path / "s2.json"], capsys)
    assert code == 0, err
    assert "negation" not in json.loads((tmp_path / "s2.json").read_text(encoding="utf-8"))["families"]


def test_changed_expectation_is_judged_again(scored, tmp_path, capsys):
    ids = [p.id for p in _pairs()]
    # negation pair 0 violated "flip"; as "hold" (the model kept its label) it is ok
    d = _decide(tmp_path / "d.jsonl", (ids[0], "change", {"should": "hold", "was": "flip"}))
    code, out, err = run(["show", scored, "--vetted", d, "--json", tmp_path / "s.json"], capsys)
    assert code == 0, err
    fams = json.loads((tmp_path / "s.json").read_text(encoding="utf-8"))["families"]
    assert fams["negation"]["violations"] == 5
    assert fams["negation"]["rules"]["negation/copula"]["should"] == "mixed"


def test_gate_on_confirmed_needs_vetted_and_judges_only_accepted(scored, tmp_path, capsys):
    ids = [p.id for p in _pairs()]
    code, _, err = run(["gate", scored, "--on", "confirmed", "--limit", "negation.violation <= 0.5"], capsys)
    assert code == 2 and "--vetted" in err
    d = _decide(tmp_path / "d.jsonl", (ids[1], "accept", {}), (ids[3], "accept", {}))  # two intensifier pairs, ok
    code, out, err = run(["gate", scored, "--vetted", d, "--on", "confirmed", "--limit", "intensifier.violation <= 0.1"], capsys)
    assert code == 0, out + err
    code, out, err = run(["gate", scored, "--vetted", d, "--on", "confirmed", "--limit", "negation.violation <= 0.1"], capsys)
    assert code == 1, out  # no negation pair was accepted: nothing confirmed is not a pass
    from pairflip.files import read_results
    from pairflip.report import summarize
    from pairflip.report.gate import check, parse_limit
    from pairflip.report.vetted import vet_results

    (outcome,) = check(summarize(vet_results(read_results(scored), d)), [parse_limit("negation.violation <= 0.1")], on="confirmed")
    assert not outcome.passed and "nothing confirmed" in outcome.note


def test_score_vetted_never_sends_rejected_pairs(suite_file, tmp_path, capsys, monkeypatch):
    seen = tmp_path / "seen.txt"
    (tmp_path / "fe_seen_model.py").write_text(
        f"def predict(texts):\n    open({str(seen)!r}, 'a').write('\\n'.join(texts) + '\\n')\n    return ['positive'] * len(texts)\n",
        encoding="utf-8")
    monkeypatch.syspath_prepend(str(tmp_path))
    pairs = _pairs()
    d = _decide(tmp_path / "d.jsonl", (pairs[0].id, "reject", {"reason": "ungrammatical"}))
    out = tmp_path / "r.jsonl"
    code, _, err = run(["score", suite_file, "--model", "fe_seen_model:predict", "-o", out, "--vetted", d], capsys)
    assert code == 0, err
    assert pairs[0].variant not in seen.read_text(encoding="utf-8").splitlines()
    head = json.loads(out.read_text(encoding="utf-8").splitlines()[0])
    assert head["vetted"]["rejected"] == 1 and head["vetted"]["total"] == 12
    code, out_text, err = run(["show", out], capsys)
    assert "1 rejected and left out" in out_text
