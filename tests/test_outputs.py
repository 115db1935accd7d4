"""The column-wise scoring path against the one-object-per-text path it replaces.

Scoring keeps model outputs as arrays (probes/outputs.py) and judges pairs on arrays
(expectations.judge_many). Each array function has a scalar twin that is the reference: the
tests here draw many inputs and require the same answer, and for scores the same bits.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

import pairflip
from pairflip.labels import LabelMap
from pairflip.probes import PythonModel
from pairflip.probes.batching import ModelError, build_predictions, outputs_from_items, prediction_from_item
from pairflip.probes.expectations import OUTCOMES, SHOULD_CODES, judge, judge_many
from pairflip.probes.outputs import Outputs, TextTable, expected_polarity
from pairflip.probes.scoring import polarity_score
from pairflip.records import SHOULDS, Pair, PairflipError, Prediction

SCALES = [("negative", "positive"), ("negative", "neutral", "positive"), ("1", "2", "3", "4", "5")]


# --------------------------------------------------------------------------- judging on arrays

side = st.tuples(st.integers(0, 4), st.one_of(st.none(), st.floats(-1, 1)))


@settings(max_examples=150, deadline=None)
@given(
    scale=st.sampled_from(SCALES),
    rows=st.lists(st.tuples(st.sampled_from(SHOULDS), side, side), min_size=1, max_size=60),
    margin=st.sampled_from([0.0, 0.05, 0.1, 0.3]),
)
@example(scale=SCALES[2], rows=[("strengthen", (4, None), (3, None)),  # 5 -> 4 stars: closer to neutral
                                 ("weaken", (3, 0.2), (4, 0.9)), ("flip", (2, None), (4, None)),
                                 ("hold", (0, 0.1), (1, 0.1)), ("none", (0, None), (4, None))], margin=0.1)
@example(scale=SCALES[0], rows=[("rise", (0, None), (0, None)), ("rise", (0, None), (1, None)),  # equal labels: n/a
                                 ("fall", (1, 0.2), (1, 0.1)), ("fall", (1, 0.2), (1, 0.25)),
                                 ("rise", (0, -0.5), (1, None)), ("rise", (0, 0.1), (0, 0.2))], margin=0.05)
def test_judge_many_agrees_with_judge(scale, rows, margin):
    lm = LabelMap(order=scale)
    k = len(scale)
    should, sc, vc, ss, vs = [], [], [], [], []
    want = []
    for sh, (a, a_score), (b, b_score) in rows:
        a, b = a % k, b % k
        sl, vl = scale[a], scale[b]
        want.append(judge(sh, lm.polarity_of(sl), lm.polarity_of(vl), sl, vl, a_score, b_score, margin,
                          source_strength=lm.strength(sl), variant_strength=lm.strength(vl)))
        should.append(SHOULD_CODES[sh]); sc.append(a); vc.append(b)
        ss.append(np.nan if a_score is None else a_score); vs.append(np.nan if b_score is None else b_score)
    pol = np.array([lm.polarity[x] for x in scale])
    strength = np.array([lm.strength(x) for x in scale])
    sc, vc = np.array(sc), np.array(vc)
    got = judge_many(np.array(should, dtype=np.int8), pol[sc], pol[vc], sc, vc, np.array(ss), np.array(vs),
                     margin, strength[sc], strength[vc])
    assert [OUTCOMES[c] for c in got] == want


def test_judge_many_margin_is_inclusive_like_judge():
    # 0.8 - 0.7 is 0.10000000000000009 in binary floating point; both paths tolerate it.
    args = dict(margin=0.1, source_strength=np.array([0.5]), variant_strength=np.array([0.5]))
    got = judge_many(np.array([SHOULD_CODES["strengthen"]], dtype=np.int8), np.array([1]), np.array([1]),
                     np.array([1]), np.array([1]), np.array([0.8]), np.array([0.7]), **args)
    assert OUTCOMES[got[0]] == judge("strengthen", 1, 1, "positive", "positive", 0.8, 0.7, 0.1) == "ok"


# --------------------------------------------------------------------------- polarity scores on arrays

@settings(max_examples=60, deadline=None)
@given(
    scale=st.sampled_from(SCALES),
    raw=st.lists(st.lists(st.floats(0, 1), min_size=5, max_size=5), min_size=1, max_size=40),
)
def test_expected_polarity_is_bit_identical_to_the_scalar_path(scale, raw):
    k = len(scale)
    m = np.array([r[:k] for r in raw], dtype=float) + 1e-3
    m = m / m.sum(axis=1, keepdims=True)
    lm = LabelMap(order=scale)
    got = expected_polarity(m, [lm.polarity_of(c) for c in scale]).tolist()
    want = [polarity_score(Prediction(scale[0], probabilities=dict(zip(scale, row))), lm) for row in m.tolist()]
    assert got == want  # equal floats, not approximately equal


# --------------------------------------------------------------------------- blocks as sequences

def test_outputs_block_is_a_sequence_of_predictions():
    block = build_predictions(2, probabilities=np.array([[0.8, 0.2], [0.3, 0.7]]), classes=["neg", "pos"])
    assert isinstance(block, Outputs) and block.probabilities is not None
    want = [Prediction("neg", None, {"neg": 0.8, "pos": 0.2}), Prediction("pos", None, {"neg": 0.3, "pos": 0.7})]
    assert block == want and list(block) == want and block[-1] == want[1] and block[:1] == want[:1]
    assert block.labels == ["neg", "pos"] and block.labels_seen() == {"neg", "pos"}
    with pytest.raises(IndexError):
        block[2]


def test_the_matrix_is_copied_so_a_model_may_reuse_its_buffer():
    buf = np.array([[0.8, 0.2]])
    block = build_predictions(1, probabilities=buf, classes=["neg", "pos"])
    buf[:] = [[0.1, 0.9]]
    assert block[0].probabilities == {"neg": 0.8, "pos": 0.2}


items = st.one_of(
    st.sampled_from(["pos", "neg", " pos ", "", "neutral"]),
    st.fixed_dictionaries({"label": st.sampled_from(["pos", "neg", "pos "])},
                          optional={"score": st.one_of(st.none(), st.floats(-1.5, 1.5), st.integers(-1, 1))}),
    st.fixed_dictionaries({"probabilities": st.just({"neg": 0.25, "pos": 0.75})}),
    st.integers(0, 1),
)


@settings(max_examples=80, deadline=None)
@given(raw=st.lists(items, min_size=1, max_size=12))
def test_outputs_from_items_agrees_with_one_item_at_a_time(raw):
    try:
        want = [prediction_from_item(x, i) for i, x in enumerate(raw)]
        from pairflip.probes.batching import check_outputs

        want = list(check_outputs(raw, want))
    except ModelError as err:
        with pytest.raises(ModelError) as got:
            outputs_from_items(raw)
        assert str(got.value) == str(err)
        return
    assert list(outputs_from_items(raw)) == want


# --------------------------------------------------------------------------- the whole table

def test_table_of_mixed_blocks_resolves_like_the_scalar_path():
    texts = [f"text {i}" for i in range(9)]
    lm = LabelMap(order=("negative", "neutral", "positive"))
    table = TextTable(texts)
    cls = ["negative", "neutral", "positive"]
    m1, m2 = np.array([[0.7, 0.2, 0.1], [0.1, 0.1, 0.8]]), np.array([[0.2, 0.5, 0.3]])
    table.add(np.array([4, 0]), Outputs(probabilities=m1, classes=cls, best=m1.argmax(axis=1)))
    table.add(np.array([8]), Outputs(probabilities=m2, classes=cls, best=m2.argmax(axis=1)))  # joined with the first
    table.add(np.array([1, 2]), Outputs(labels=["Positive", "negative"], scores=[0.5, None]))
    table.add(np.array([3, 5, 6, 7]), Outputs.of([
        Prediction("neutral"), Prediction("positive", score=0.25, probabilities={"negative": 0.1, "positive": 0.9}),
        Prediction("negative", probabilities={"positive": 0.4, "negative": 0.6}), Prediction("negative", score=-1.0),
    ]))
    r = table.resolve(lm)
    preds = table.as_dict()
    assert set(preds) == set(texts)
    for i, t in enumerate(texts):
        p = preds[t]
        want_label = lm.canonical(p.label)
        assert r.order[r.code[i]] == want_label and r.polarity[i] == lm.polarity_of(want_label)
        assert r.strength[i] == lm.strength(want_label)
        sc = polarity_score(p, lm)
        assert (np.isnan(r.score[i]) and sc is None) or r.score[i] == sc
    assert r.labels_at(np.array([1, 3])) == ["positive", "neutral"]
    assert r.scores_at(np.array([2, 3, 7])) == [None, None, -1.0]


def test_a_label_off_the_scale_is_named():
    table = TextTable(["a"])
    table.add(np.array([0]), Outputs(labels=["meh"]))
    with pytest.raises(PairflipError, match="'meh'"):
        table.resolve(LabelMap(order=("negative", "positive")))


def test_scoring_paths_agree_end_to_end():
    """The same suite scored by a probability model, through the array path, and by the same
    model's outputs handed over one Prediction at a time (the per-object path): equal verdicts."""
    from sklearn.feature_extraction.text import CountVectorizer
    from sklearn.linear_model import LogisticRegression
    from sklearn.pipeline import make_pipeline

    from helpers.suites import make_pairs

    pairs = make_pairs(40)
    train = [p.source for p in pairs[::2]] + [p.variant for p in pairs[::3]]
    labels = ["positive" if i % 3 else "negative" for i in range(len(train))]
    pipe = make_pipeline(CountVectorizer(), LogisticRegression()).fit(train, labels)
    classes = [str(c) for c in pipe.classes_]

    def per_object(texts):
        return [Prediction(classes[int(np.argmax(row))], None, dict(zip(classes, row.tolist())))
                for row in pipe.predict_proba(texts)]

    class AsPredictions(PythonModel):
        def predict(self, texts):
            return per_object(texts)

    a = pairflip.score(pairs, PythonModel(pipe, spec="pipe"), margin=0.05, batch_size=7)
    b = pairflip.score(pairs, AsPredictions(per_object, spec="pipe"), margin=0.05, batch_size=5)
    assert [v.to_dict() for v in a.verdicts] == [v.to_dict() for v in b.verdicts]
    assert {v.verdict for v in a.verdicts} >= {"ok"}


def test_unknown_expectation_is_named():
    p = Pair("The tent is dry.", "The tent is not dry.", "negation", "negation/copula", "flip")
    p.should = "reverse"
    with pytest.raises(PairflipError, match="'reverse'"):
        pairflip.score([p], lambda texts: ["positive"] * len(texts))


def test_given_labels_are_kept_unless_they_are_the_most_probable_classes():
    m = np.array([[0.5, 0.5], [0.2, 0.8]])
    usual = build_predictions(2, labels=["neg", "pos"], probabilities=m, classes=["neg", "pos"])
    assert usual._labels is None and usual.labels == ["neg", "pos"]  # from the matrix
    tie_other_way = build_predictions(2, labels=["pos", "pos"], probabilities=m, classes=["neg", "pos"])
    assert tie_other_way.labels == ["pos", "pos"] and tie_other_way[0].label == "pos"  # the model's own word wins
