"""The Python API does the CLI's job without files; files round-trip and keep unknown keys."""

from __future__ import annotations

import json

import pairflip
from pairflip.files import read_results, read_suite, write_results, write_suite
from pairflip.records import Pair, Results, Suite, Verdict


def _toy_model(texts):
    # A deliberately naive keyword model: "not" is ignored, so negation pairs must show violations.
    good = ("roomy", "sturdy", "love", "great", "warm", "comfortable", "reliably")
    return ["positive" if any(w in t.lower() for w in good) else "negative" for t in texts]


def test_api_end_to_end_without_files(nlp):
    texts = ["The tent is roomy.", "I love this lantern.", "The boots are warm and comfortable."]
    suite = pairflip.build_suite(texts, families=["negation"], seed=0, nlp=nlp)
    assert len(suite) >= 2
    results = pairflip.score(suite, _toy_model)
    assert len(results) == len(suite)
    summary = pairflip.summarize(results)
    neg = summary.families["negation"]
    assert neg.pairs == len(suite)
    # the keyword model keeps its label under negation: every applicable pair is a violation
    assert neg.violations == neg.applicable > 0
    d = summary.to_dict()
    assert d["version"] == 1
    for key in ("should", "pairs", "applicable", "flips", "flip_rate", "violations", "violation_rate", "ci95", "rules"):
        assert key in d["families"]["negation"]


def test_suite_and_results_round_trip_keep_unknown_keys(tmp_path):
    p = Pair(source="The stove is quiet.", variant="The stove is not quiet.", family="negation",
             rule="negation/copula", should="flip", extra={"future_key": [1, 2]})
    suite = Suite(header={"generator": {"name": "test"}, "future_header": True}, pairs=[p])
    write_suite(suite, tmp_path / "s.jsonl")
    back = read_suite(tmp_path / "s.jsonl")
    assert back.pairs[0].to_dict() == p.to_dict()
    assert back.header["future_header"] is True
    assert back.sha256() == suite.sha256()

    v = Verdict(id=p.id, source_pred="positive", variant_pred="negative", verdict="ok", family="negation",
                rule="negation/copula", should="flip", source=p.source, variant=p.variant, extra={"later": 1})
    res = Results(header={"suite": {"sha256": suite.sha256()}, "model": {"name": "m"}}, verdicts=[v])
    write_results(res, tmp_path / "r.jsonl")
    lines = (tmp_path / "r.jsonl").read_text(encoding="utf-8").splitlines()
    assert json.loads(lines[0])["kind"] == "pairflip-results"
    back_r = read_results(tmp_path / "r.jsonl")
    assert back_r.verdicts[0].to_dict() == v.to_dict()


def test_pair_ids_are_stable_content_hashes():
    a = Pair(source="It works.", variant="It doesn't work.", family="negation", rule="negation/do-support", should="flip")
    b = Pair(source="It works.", variant="It doesn't work.", family="negation", rule="negation/do-support", should="flip")
    c = Pair(source="It works.", variant="It does not work.", family="negation", rule="negation/do-support", should="flip")
    assert a.id == b.id != c.id
    assert len(a.id) == 16
