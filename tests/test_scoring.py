"""Scoring a suite: distinct texts once, in batches; the results header; the label mapping;
and, as an outside check, verdicts on published rule-based models (VADER, AFINN)."""

from __future__ import annotations

import pytest

import pairflip
from helpers import keyword_rules, reference_models
from helpers.suites import make_pairs, texts_of
from pairflip.probes import PythonModel, predict_all
from pairflip.probes.scoring import distinct_texts, polarity_score
from pairflip.labels import LabelMap
from pairflip.records import Pair, PairflipError, Prediction, Suite, suite_sha256


class Recorder:
    def __init__(self, labels=None):
        self.batches: list[list[str]] = []
        self.labels = labels

    def __call__(self, texts):
        self.batches.append(list(texts))
        return [self.labels or keyword_rules.label(t) for t in texts]


def test_distinct_texts_first_seen_order():
    pairs = make_pairs()
    texts = distinct_texts(pairs)
    assert texts[:3] == ["The tent is great.", "The tent is not great.", "The tent is really great."]
    assert len(texts) == len(set(texts)) == len({p.source for p in pairs} | {p.variant for p in pairs})


def test_batches_of_batch_size_each_text_once():
    pairs = make_pairs(30)
    rec = Recorder()
    progress = []
    res = pairflip.score(pairs, rec, batch_size=8, on_batch=lambda d, t: progress.append((d, t)))
    n = len(texts_of(pairs))
    assert [len(b) for b in rec.batches] == [8] * (n // 8) + ([n % 8] if n % 8 else [])
    assert sorted(sum(rec.batches, [])) == sorted(texts_of(pairs))
    assert progress[0] == (0, n) and progress[-1] == (n, n) and len(progress) == len(rec.batches) + 1
    assert len(res.verdicts) == len(pairs) and res.header["texts_predicted"] == n


def test_predict_all_with_repeated_texts():
    rec = Recorder()
    preds = predict_all(PythonModel(rec, spec="rec"), ["a tent", "a tent", "a stove"], batch_size=10)
    assert rec.batches == [["a tent", "a stove"]] and set(preds) == {"a tent", "a stove"}


def test_results_header(tmp_path):
    pairs = make_pairs()
    suite = Suite(header={"generator": {"name": "hand-made"}, "path": "suite.jsonl"}, pairs=pairs)
    m = PythonModel(Recorder(), spec="gear:rules", name="rules")
    res = pairflip.score(suite, m, margin=0.1, suite_path="s/suite.jsonl")
    h = res.header
    assert h["kind"] == "pairflip-results" and h["version"] == 1
    assert h["suite"] == {"sha256": suite_sha256(pairs), "path": "s/suite.jsonl", "generator": {"name": "hand-made"}}
    assert h["model"] == m.describe() and h["model"]["name"] == "rules"
    assert h["labels"] == {"order": ["negative", "positive"], "polarity": {"negative": -1, "positive": 1},
                           "source": "recognised"}
    assert h["margin"] == 0.1


def test_verdict_records_copy_the_pair():
    pairs = make_pairs()
    res = pairflip.score(pairs, Recorder())
    for p, v in zip(pairs, res.verdicts):
        assert (v.id, v.family, v.rule, v.should, v.source, v.variant) == (p.id, p.family, p.rule, p.should, p.source, p.variant)
        assert v.source_pred == keyword_rules.label(p.source) and v.variant_pred == keyword_rules.label(p.variant)


def test_mapping_comes_from_classes_when_the_model_only_says_one_label():
    class AlwaysPositive:
        classes_ = ["negative", "neutral", "positive"]

        def predict(self, texts):
            return ["positive"] * len(texts)

    res = pairflip.score(make_pairs(), AlwaysPositive())
    assert res.header["labels"]["order"] == ["negative", "neutral", "positive"]
    flips = [v for v in res.verdicts if v.should == "flip"]
    assert flips and all(v.verdict == "violation" for v in flips)


def test_given_labels_override():
    res = pairflip.score(make_pairs(), Recorder(), labels="negative,positive")
    assert res.header["labels"]["source"] == "given"
    res = pairflip.score(make_pairs(), Recorder(), labels=["positive", "negative"])  # reversed on purpose
    assert res.header["labels"]["polarity"] == {"positive": -1, "negative": 1}


def test_own_score_wins_over_probabilities():
    lm = LabelMap.recognise(["negative", "positive"])
    p = Prediction("positive", score=0.25, probabilities={"negative": 0.1, "positive": 0.9})
    assert polarity_score(p, lm) == 0.25
    assert polarity_score(Prediction("positive", probabilities={"negative": 0.1, "positive": 0.9}), lm) == pytest.approx(0.8)
    assert polarity_score(Prediction("positive"), lm) is None


def test_bad_suites():
    with pytest.raises(PairflipError, match="holds no pairs"):
        pairflip.score([], Recorder())
    bad = Pair(source="The tent is great.", variant="The tent is not great.", family="negation",
               rule="negation/copula", should="invert")
    with pytest.raises(PairflipError, match=f"pair {bad.id} \\(negation/copula\\): should 'invert'"):
        pairflip.score([bad], Recorder())


# ---------------------------------------------------------------- outside checks


def _pair(src, var, should, family="negation", rule="negation/copula"):
    return Pair(source=src, variant=var, family=family, rule=rule, should=should)


def test_vader_scores_pass_through_and_verdicts_follow_its_rules():
    # VADER (Hutto & Gilbert 2014; vaderSentiment 3.3.2 on PyPI) flips and dampens the valence of
    # a word after "not" (N_SCALAR = -0.74) and raises it after a booster such as "really"
    # (B_INCR = 0.293) and lowers it after a dampener such as "somewhat" (B_DECR = -0.293).
    pairs = [
        _pair("The tent is great.", "The tent is not great.", "flip"),
        _pair("The tent is great.", "The tent is really great.", "strengthen", "intensifier", "intensifier/amplify"),
        _pair("The tent is great.", "The tent is somewhat great.", "weaken", "intensifier", "intensifier/soften"),
        _pair("The jacket leaks.", "The jacket does not leak.", "flip"),
    ]
    res = pairflip.score(pairs, "helpers.reference_models:vader")
    for p, v in zip(pairs, res.verdicts):
        assert v.source_score == reference_models.vader_compound(p.source)
        assert v.variant_score == reference_models.vader_compound(p.variant)
    assert res.header["labels"]["order"] == ["negative", "neutral", "positive"]
    flip, strong, weak, neutral_src = res.verdicts
    assert flip.variant_score < 0 < flip.source_score and flip.verdict == "ok"
    assert strong.variant_score > strong.source_score and strong.verdict == "ok"
    assert weak.variant_score < weak.source_score and weak.verdict == "ok"
    # "leaks" is not in VADER's lexicon: a neutral source, so its flip pair is not applicable
    assert neutral_src.source_pred == "neutral" and neutral_src.verdict == "n/a"


def test_afinn_is_blind_to_negation():
    # AFINN (Nielsen 2011; afinn on PyPI) sums word valences and ignores "not", so a negated
    # opinion keeps its polarity: the flip expectation must be reported as violated. (AFINN-165
    # rates "great" +3 and "reliable" +2, and has no entry for "not"; measured with afinn 0.1.)
    pairs = [_pair("The tent is great.", "The tent is not great.", "flip"),
             _pair("The stove is reliable.", "The stove is not reliable.", "flip")]
    res = pairflip.score(pairs, "helpers.reference_models:afinn")
    assert [(v.source_pred, v.variant_pred, v.verdict) for v in res.verdicts] == [
        ("positive", "positive", "violation"), ("positive", "positive", "violation")]


# --------------------------------------------------------------------------- what a newcomer misread


def _graded_pairs() -> list[Pair]:
    # two amplified and one softened pair of invented gear sentences
    return [Pair(source="The tent is roomy.", variant="The tent is very roomy.", family="intensifier",
                 rule="intensifier/amplify", should="strengthen"),
            Pair(source="The stove is loud.", variant="The stove is very loud.", family="intensifier",
                 rule="intensifier/amplify", should="strengthen"),
            Pair(source="The lamp is very bright.", variant="The lamp is bright.", family="intensifier",
                 rule="intensifier/remove", should="weaken")]


def test_a_labels_only_model_cannot_pass_strengthen_or_weaken_silently(tmp_path, capsys, monkeypatch):
    """The same label on both sides says nothing about strength: n/a, counted and said, not ok."""
    from pairflip import cli
    from pairflip.files import write_suite
    from pairflip.report import summarize

    res = pairflip.score(_graded_pairs(), lambda texts: ["positive"] * len(texts))
    assert [v.verdict for v in res.verdicts] == ["n/a", "n/a", "n/a"]
    s = summarize(res)
    assert s.families["intensifier"].applicable == 0 and s.labels_only_unjudged == 3
    # ... and the CLI says it in score's closing line and in the report header
    suite = tmp_path / "suite.jsonl"
    write_suite(Suite(header={}, pairs=_graded_pairs()), suite)
    (tmp_path / "fe_labels_only.py").write_text("def predict(texts):\n    return ['positive'] * len(texts)\n", encoding="utf-8")
    monkeypatch.syspath_prepend(str(tmp_path))
    out = tmp_path / "r.jsonl"
    with pytest.raises(SystemExit) as ex:
        cli.main(["score", str(suite), "--model", "fe_labels_only:predict", "-o", str(out)])
    assert ex.value.code in (0, None)
    err = " ".join(capsys.readouterr().err.split())
    assert "model gives labels only: 3 strengthen/weaken pairs could not be judged" in err
    with pytest.raises(SystemExit):
        cli.main(["show", str(out)])
    shown = " ".join(capsys.readouterr().out.split())
    assert "model gives labels only: 3 strengthen/weaken pairs could not be judged" in shown


def test_default_margin_absorbs_score_noise_and_is_shown():
    """A probability wobble of 0.02 is not a weakening: the default margin is 0.05."""
    from pairflip.probes.scoring import DEFAULT_MARGIN
    from pairflip.report import summarize
    from pairflip.report.terminal import header_facts

    def probs(p_pos):
        return {"label": "positive" if p_pos >= 0.5 else "negative",
                "probabilities": {"positive": p_pos, "negative": round(1 - p_pos, 10)}}

    def model(texts):  # "very" moves p(positive) from 0.80 down to 0.79: noise, not a weakening
        return [probs(0.79 if "very" in t else 0.80) for t in texts]

    res = pairflip.score(_graded_pairs()[:1], model)
    assert DEFAULT_MARGIN == 0.05 and res.header["margin"] == 0.05
    assert res.verdicts[0].verdict == "ok"
    strict = pairflip.score(_graded_pairs()[:1], model, margin=0.0)
    assert strict.verdicts[0].verdict == "violation"  # with margin 0 the 0.02 fall of |score| counts
    facts = dict(header_facts(summarize(res)))
    assert "margin 0.05" in facts["interval"]
