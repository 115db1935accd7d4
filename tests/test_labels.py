"""Label scales: recognition, --labels, polarity and the polarity score."""

from __future__ import annotations

import numpy as np
import pytest

from pairflip.labels import LabelMap, normalise_label
from pairflip.records import PairflipError


@pytest.mark.parametrize(
    "seen, expected",
    [
        # three-way sentiment: the middle label is neutral (common practice)
        (["negative", "neutral", "positive"], {"negative": -1, "neutral": 0, "positive": 1}),
        (["positive", "negative"], {"negative": -1, "positive": 1}),
        (["NEG", "Pos"], {"NEG": -1, "Pos": 1}),
        (["neg", "neu", "pos"], {"neg": -1, "neu": 0, "pos": 1}),
        ([0, 1], {"0": -1, "1": 1}),  # 0/1: 1 is positive
        ([np.int64(1), np.int64(0)], {"0": -1, "1": 1}),
        ([True, False], {"0": -1, "1": 1}),
        ([-1, 0, 1], {"-1": -1, "0": 0, "1": 1}),
        ([1.0, -1.0], {"-1": -1, "0": 0, "1": 1}),
        # star ratings: 3 of 5 is neutral (common practice for 1-5 review scales)
        ([1, 2, 3, 4, 5], {"1": -1, "2": -1, "3": 0, "4": 1, "5": 1}),
        (["4", "5", "2"], {"1": -1, "2": -1, "3": 0, "4": 1, "5": 1}),
        (["Positive"], {"negative": -1, "Positive": 1}),
    ],
)
def test_recognised_scales(seen, expected):
    lm = LabelMap.recognise(seen)
    assert lm.polarity == expected
    assert lm.source == "recognised"


def test_model_spelling_is_kept_and_lookup_is_case_insensitive():
    lm = LabelMap.recognise(["Negative", "POSITIVE"])
    assert lm.order == ("Negative", "POSITIVE")
    assert lm.canonical("positive") == "POSITIVE"
    assert lm.polarity_of("negative") == -1


@pytest.mark.parametrize("seen", [["1"], ["0"], [1]])
def test_ambiguous_labels_need_labels_option(seen):
    # "1" alone is positive on a 0/1 scale but negative in star ratings; "0" is negative on a
    # 0/1 scale but neutral on -1/0/1.
    with pytest.raises(PairflipError, match="--labels"):
        LabelMap.recognise(seen)


def test_unknown_labels_need_labels_option_and_are_listed():
    with pytest.raises(PairflipError) as e:
        LabelMap.recognise(["thumbs-up", "thumbs-down"])
    msg = str(e.value)
    assert "'thumbs-down', 'thumbs-up'" in msg and "--labels" in msg


def test_given_order_from_most_negative():
    lm = LabelMap.from_labels("awful, meh ,grand")
    assert lm.polarity == {"awful": -1, "meh": 0, "grand": 1}
    assert [lm.rank(x) for x in ("awful", "MEH", "grand")] == [0, 1, 2]
    four = LabelMap.from_labels(["d", "c", "b", "a"])
    assert four.polarity == {"d": -1, "c": -1, "b": 1, "a": 1}  # even: no neutral


@pytest.mark.parametrize("bad, what", [("a,,b", "item 2 is empty"), ("only", "at least two"), ("x,X", "repeats")])
def test_bad_labels_option(bad, what):
    with pytest.raises(PairflipError, match=what):
        LabelMap.from_labels(bad)


def test_check_lists_labels_seen_and_mapping():
    lm = LabelMap.from_labels("negative,positive")
    lm.check(["negative", "POSITIVE"])  # fine
    with pytest.raises(PairflipError) as e:
        lm.check(["negative", "mixed", "positive", "sarcastic"], where="model m: ")
    msg = str(e.value)
    assert msg.startswith("model m: ")
    assert "['mixed', 'sarcastic']" in msg
    assert "negative=-1, positive=+1" in msg
    assert "['mixed', 'negative', 'positive', 'sarcastic']" in msg


def test_polarity_score_is_expected_polarity():
    lm = LabelMap.recognise(["negative", "neutral", "positive"])
    # 0.2 * -1 + 0.3 * 0 + 0.5 * +1 = 0.3
    assert lm.score_from_probabilities({"negative": 0.2, "neutral": 0.3, "positive": 0.5}) == pytest.approx(0.3)
    stars = LabelMap.recognise([1, 2, 3, 4, 5])
    assert stars.score_from_probabilities({"1": 0.1, "2": 0.1, "3": 0.2, "4": 0.3, "5": 0.3}) == pytest.approx(0.4)
    assert lm.score_from_probabilities({"positive": 1.0}) == 1.0
    # rounded probabilities (three at 0.33) are renormalised: the result stays in [-1, 1]
    assert lm.score_from_probabilities({"negative": 0.0, "neutral": 0.005, "positive": 0.995}) <= 1.0


@pytest.mark.parametrize(
    "probs, what",
    [
        ({"negative": 0.7, "positive": 0.7}, "sum to 1.4"),
        ({"negative": -0.2, "positive": 1.2}, "not a finite number >= 0"),
        ({"negative": float("nan"), "positive": 1.0}, "not a finite number"),
        ({"negative": 0.5, "meh": 0.5}, "'meh'"),
    ],
)
def test_bad_probabilities(probs, what):
    lm = LabelMap.recognise(["negative", "positive"])
    with pytest.raises(PairflipError, match=what):
        lm.score_from_probabilities(probs)


@pytest.mark.parametrize("value", [1.5, -1.01, float("nan"), float("inf"), "high", None, True])
def test_scalar_score_must_be_in_range(value):
    with pytest.raises(PairflipError, match=r"not a number in \[-1, 1\]"):
        LabelMap.recognise(["neg", "pos"]).check_score(value)


def test_strength_on_ordinal_scale():
    stars = LabelMap.recognise([1, 2, 3, 4, 5])
    assert [stars.strength(s) for s in "12345"] == [2.0, 1.0, 0.0, 1.0, 2.0]


def test_round_trip_and_normalise():
    lm = LabelMap.from_labels("bad,ok,good")
    assert LabelMap.from_dict(lm.to_dict()) == lm
    assert normalise_label(np.float64(2.0)) == "2" and normalise_label(" pos ") == "pos"
