"""summarize(): the show --json schema, n/a and none handling, intervals, breakdowns, examples."""

from __future__ import annotations

import json

import pytest

import pairflip
from pairflip.records import Pair, PairflipError, Results, Suite, Verdict
from pairflip.report.summary import severity, summarize


def V(i, family="negation", rule="negation/copula", should="flip", sp="positive", vp="negative",
      verdict="ok", src=None, label=None, ss=None, vs=None):
    return Verdict(id=f"p{i}", source_pred=sp, variant_pred=vp, verdict=verdict, source_score=ss,
                   variant_score=vs, family=family, rule=rule, should=should, source=src or f"source {i}",
                   variant=f"variant {i}", source_id=src or f"s{i}", label=label)


def R(verdicts, **header):
    h = {"suite": {"sha256": "x" * 64}, "model": {"name": "toy"},
         "labels": {"order": ["negative", "neutral", "positive"]}}
    h.update(header)
    return Results(header=h, verdicts=list(verdicts))


def test_schema_matches_design():
    res = R([V(1), V(2, vp="positive", verdict="violation"), V(3, family="reorder", rule="reorder/shuffle",
             should="none", vp="positive")])
    d = summarize(res).to_dict()
    json.dumps(d)  # serialisable
    assert d["version"] == 1
    for fam in ("negation", "reorder"):
        f = d["families"][fam]
        for key in ("should", "pairs", "applicable", "flips", "flip_rate", "violations", "violation_rate", "ci95", "rules"):
            assert key in f
        for rule in f["rules"].values():
            for key in ("should", "pairs", "applicable", "flips", "flip_rate", "violations", "violation_rate", "ci95"):
                assert key in rule
    neg = d["families"]["negation"]
    assert (neg["pairs"], neg["applicable"], neg["flips"], neg["violations"]) == (2, 2, 1, 1)
    assert neg["flip_rate"] == 0.5 and neg["violation_rate"] == 0.5
    assert d["model"] == {"name": "toy"}


def test_na_counted_and_excluded_from_violation_rate():
    vs = [V(1, sp="neutral", vp="neutral", verdict="n/a"), V(2, sp="neutral", vp="positive", verdict="n/a"),
          V(3, vp="positive", verdict="violation"), V(4)]
    g = summarize(R(vs)).families["negation"]
    assert g.pairs == 4 and g.not_applicable == 2 and g.applicable == 2
    assert g.violations == 1 and g.violation_rate == 0.5
    assert g.flips == 2 and g.flip_rate == 0.5  # flips count every scored pair, n/a included
    assert g.to_dict()["not_applicable"] == 2


def test_mixed_should_and_none_rules_excluded():
    vs = [V(1, family="reorder", rule="reorder/coordination", should="hold", vp="negative", verdict="violation"),
          V(2, family="reorder", rule="reorder/coordination", should="hold", vp="positive"),
          V(3, family="reorder", rule="reorder/shuffle", should="none", vp="negative"),
          V(4, family="reorder", rule="reorder/shuffle", should="none", vp="negative")]
    g = summarize(R(vs)).families["reorder"]
    # the family's own numbers leave the diagnostic rule out; it keeps its own row
    assert g.should == "hold"
    assert g.rules["reorder/coordination"].should == "hold"
    assert g.rules["reorder/shuffle"].should == "none"
    assert g.pairs == 2 and g.applicable == 2 and g.violations == 1
    assert g.flips == 1
    shuffle = g.rules["reorder/shuffle"]
    assert shuffle.applicable == 0 and shuffle.violations == 0 and shuffle.flip_rate == 1.0
    assert shuffle.ci95 == (0.0, 1.0)  # nothing known about a violation rate that does not exist


def test_intervals_are_wilson_by_default():
    # Reference: statsmodels.stats.proportion.proportion_confint(method="wilson").
    from statsmodels.stats.proportion import proportion_confint

    vs = [V(i, vp="positive", verdict="violation") for i in range(7)] + [V(i) for i in range(7, 30)]
    g = summarize(R(vs)).families["negation"]
    assert g.ci95 == pytest.approx(proportion_confint(7, 30, method="wilson"), abs=1e-12)
    assert g.flip_ci95 == pytest.approx(proportion_confint(23, 30, method="wilson"), abs=1e-12)


def test_cluster_source_uses_the_bootstrap_and_is_seeded():
    # 10 sources with 3 pairs each; within a source all pairs agree (fully clustered).
    vs = []
    for s in range(10):
        for j in range(3):
            bad = s < 4
            vs.append(V(s * 3 + j, rule=f"negation/r{j}", src=f"src{s}", vp="positive" if bad else "negative",
                        verdict="violation" if bad else "ok"))
    res = R(vs)
    a = summarize(res, cluster="source", seed=3)
    b = summarize(res, cluster="source", seed=3)
    w = summarize(res)
    assert a.interval == "cluster-bootstrap" and w.interval == "wilson"
    ga, gw = a.families["negation"], w.families["negation"]
    assert ga.ci95 == b.families["negation"].ci95
    assert ga.violation_rate == gw.violation_rate == 0.4
    assert (ga.ci95[1] - ga.ci95[0]) > (gw.ci95[1] - gw.ci95[0])  # 10 sources, not 30 independent pairs
    with pytest.raises(PairflipError, match="--cluster"):
        summarize(res, cluster="sentence")


def test_accuracy_and_by_label_use_gold_labels():
    vs = [V(1, src="a", label="positive", sp="positive"),
          V(2, src="a", label="positive", sp="positive", rule="negation/modal"),  # same source: counted once
          V(3, src="b", label="negative", sp="positive", vp="positive", verdict="violation"),
          V(4, src="c", label="Negative", sp="negative", vp="positive"),
          V(5, src="d", label="positive", sp="negative", vp="negative", verdict="violation")]
    s = summarize(R(vs))
    assert s.accuracy["sources"] == 4 and s.accuracy["correct"] == 2 and s.accuracy["rate"] == 0.5
    g = s.families["negation"]
    # gold labels spelled as on the model's scale ("Negative" -> "negative"), most negative first
    assert list(g.by_label) == ["negative", "positive"]
    assert g.by_label["positive"].pairs == 3 and g.by_label["positive"].violations == 1
    assert g.by_label["negative"].pairs == 2 and g.by_label["negative"].violations == 1
    # by predicted source label, ordered from most negative to most positive
    assert list(g.by_prediction) == ["negative", "positive"]
    assert g.by_prediction["positive"].pairs == 3 and g.by_prediction["positive"].violations == 1
    assert g.by_prediction["negative"].violations == 1
    d = s.to_dict()["families"]["negation"]
    assert "by_label" in d and "by_prediction" in d


def test_no_gold_labels_no_accuracy_no_by_label():
    s = summarize(R([V(1), V(2)]))
    assert s.accuracy is None
    assert s.families["negation"].by_label == {}
    assert "by_label" not in s.to_dict()["families"]["negation"]


def test_worst_examples_are_the_most_confident_violations():
    vs = [V(1, vp="positive", verdict="violation", ss=0.5, vs=0.2),
          V(2, vp="positive", verdict="violation", ss=0.6, vs=0.95),
          V(3, vp="positive", verdict="violation", ss=0.9, vs=0.5),
          V(4, ss=0.9, vs=-0.9)]
    g = summarize(R(vs), examples=2).families["negation"]
    assert [e.id for e in g.examples] == ["p2", "p3"]
    assert g.examples[0].severity == pytest.approx(0.95)
    assert severity(vs[3]) == 0.0  # a kept expectation is no example


def test_severity_by_expectation():
    hold = V(1, should="hold", vp="negative", verdict="violation", ss=0.6, vs=-0.4)
    assert severity(hold) == pytest.approx(1.0)
    strengthen = V(2, should="strengthen", vp="positive", verdict="violation", ss=0.8, vs=0.5)
    assert severity(strengthen) == pytest.approx(0.3)
    weaken = V(3, should="weaken", vp="negative", verdict="violation", ss=0.5, vs=-0.7)
    assert severity(weaken) == pytest.approx(1.2)
    assert severity(V(4, verdict="violation")) == 0.0  # label-only model


def test_summarize_after_real_scoring():
    # Pairs made by hand (no parser), scored by a keyword model that ignores "not".
    pairs = [
        Pair("The tent is roomy.", "The tent is not roomy.", "negation", "negation/copula", "flip"),
        Pair("The stove is noisy.", "The stove is not noisy.", "negation", "negation/copula", "flip"),
        Pair("The map is fine.", "The map is fine.", "negation", "negation/copula", "flip"),
        Pair("The pegs bend and the poles are sturdy.", "The poles are sturdy and the pegs bend.",
             "reorder", "reorder/coordination", "hold"),
    ]

    def model(texts):
        return ["positive" if ("roomy" in t or "sturdy" in t) else ("negative" if "noisy" in t else "neutral")
                for t in texts]

    res = pairflip.score(Suite(header={}, pairs=pairs), model)
    s = pairflip.summarize(res)
    neg = s.families["negation"]
    assert (neg.pairs, neg.not_applicable, neg.applicable, neg.violations) == (3, 1, 2, 2)
    assert s.families["reorder"].violations == 0


def test_cluster_interval_counts_sources_with_an_applicable_pair():
    # Issue 12: with no violations the cluster interval was (0.0, 0.0). It is now the Wilson interval
    # at the effective sample size: 6 sources with applicable pairs (4 pairs each, none violated);
    # 3 more sources whose pairs are all n/a (neutral) do not count towards the violation interval,
    # but do count towards the flip interval. Reference: statsmodels' proportion_confint (Wilson).
    from statsmodels.stats.proportion import proportion_confint

    vs = [V(s * 4 + j, src=f"src{s}") for s in range(6) for j in range(4)]
    vs += [V(100 + s * 2 + j, src=f"flat{s}", sp="neutral", vp="neutral", verdict="n/a")
           for s in range(3) for j in range(2)]
    g = summarize(R(vs), cluster="source").families["negation"]
    assert (g.applicable, g.violations) == (24, 0)
    assert g.ci95 == pytest.approx(proportion_confint(0, 6, method="wilson"), abs=1e-12)
    assert g.ci95[1] > 0.3
    # flips: 24 of 30 pairs over all 9 sources; the interval contains Wilson at 9 sources
    w_lo, w_hi = proportion_confint(24 / 30 * 9, 9, method="wilson")
    assert g.flip_ci95[0] <= w_lo + 1e-12 and g.flip_ci95[1] >= w_hi - 1e-12
