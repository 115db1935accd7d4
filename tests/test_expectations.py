"""Verdicts, row by row of DESIGN.md's expectation table, label-only and with scores."""

from __future__ import annotations

import pytest

from pairflip.labels import LabelMap
from pairflip.probes.expectations import judge
from pairflip.records import PairflipError

P, N, Z = 1, -1, 0  # polarity of positive, negative, neutral labels
LAB = {P: "positive", N: "negative", Z: "neutral"}


def _j(should, sp, vp, ss=None, vs=None, margin=0.0, sl=None, vl=None):
    return judge(should, sp, vp, sl or LAB[sp], vl or LAB[vp], ss, vs, margin)


# ---------------------------------------------------------------- label only

LABEL_ONLY = [
    # flip: violation when the variant's polarity equals the source's; n/a for neutral sources
    ("flip", P, N, "ok"),
    ("flip", N, P, "ok"),
    ("flip", P, Z, "ok"),
    ("flip", N, Z, "ok"),
    ("flip", P, P, "violation"),
    ("flip", N, N, "violation"),
    ("flip", Z, P, "n/a"),
    ("flip", Z, Z, "n/a"),
    ("flip", Z, N, "n/a"),
    # hold: violation when the label changed
    ("hold", P, P, "ok"),
    ("hold", Z, Z, "ok"),
    ("hold", P, N, "violation"),
    ("hold", P, Z, "violation"),
    ("hold", Z, N, "violation"),
    # strengthen: polarity reversed or moved toward neutral
    # (labels only and the same label: a label cannot show a change of strength)
    ("strengthen", P, P, "n/a"),
    ("strengthen", N, N, "n/a"),
    ("strengthen", P, N, "violation"),
    ("strengthen", N, P, "violation"),
    ("strengthen", P, Z, "violation"),
    ("strengthen", N, Z, "violation"),
    ("strengthen", Z, P, "ok"),
    ("strengthen", Z, Z, "n/a"),
    # weaken: polarity reversed (same label, labels only: n/a)
    ("weaken", P, P, "n/a"),
    ("weaken", P, Z, "ok"),
    ("weaken", N, Z, "ok"),
    ("weaken", P, N, "violation"),
    ("weaken", N, P, "violation"),
    ("weaken", Z, P, "ok"),
    # rise / fall, labels only: the polarity order negative < neutral < positive; equal: n/a
    ("rise", N, Z, "ok"),
    ("rise", Z, P, "ok"),
    ("rise", N, P, "ok"),
    ("rise", P, Z, "violation"),
    ("rise", Z, N, "violation"),
    ("rise", P, P, "n/a"),
    ("rise", N, N, "n/a"),
    ("fall", P, N, "ok"),
    ("fall", Z, N, "ok"),
    ("fall", N, Z, "violation"),
    ("fall", Z, Z, "n/a"),
    # none: never
    ("none", P, N, "ok"),
    ("none", P, P, "ok"),
    ("none", Z, N, "ok"),
]


@pytest.mark.parametrize("should, sp, vp, expected", LABEL_ONLY)
def test_label_only(should, sp, vp, expected):
    assert _j(should, sp, vp) == expected


def test_hold_compares_labels_not_polarity():
    # 5 -> 4 stars keeps the polarity but changes the label: a hold violation
    assert judge("hold", 1, 1, "5", "4") == "violation"
    assert judge("hold", 1, 1, "5", "5") == "ok"


# ---------------------------------------------------------------- with scores (and --margin)

WITH_SCORES = [
    # strengthen: with scores, also a violation when |score| fell by more than the margin
    ("strengthen", P, P, 0.6, 0.8, 0.0, "ok"),
    ("strengthen", P, P, 0.8, 0.6, 0.0, "violation"),
    ("strengthen", P, P, 0.8, 0.6, 0.25, "ok"),
    ("strengthen", P, P, 0.8, 0.7, 0.1, "ok"),  # fell by exactly the margin: tolerated
    ("strengthen", P, P, 0.8, 0.69, 0.1, "violation"),
    ("strengthen", N, N, -0.8, -0.6, 0.0, "violation"),
    ("strengthen", N, N, -0.6, -0.9, 0.0, "ok"),
    ("strengthen", P, N, 0.6, -0.9, 0.5, "violation"),  # the label rule still applies
    ("strengthen", P, Z, 0.6, 0.1, 1.0, "violation"),
    ("strengthen", Z, Z, 0.3, 0.1, 0.0, "violation"),
    ("strengthen", P, P, 0.8, 0.8, 0.0, "ok"),
    # weaken: with scores, also a violation when |score| rose by more than the margin
    ("weaken", P, P, 0.8, 0.5, 0.0, "ok"),
    ("weaken", P, P, 0.5, 0.8, 0.0, "violation"),
    ("weaken", P, P, 0.5, 0.8, 0.3, "ok"),
    ("weaken", P, P, 0.5, 0.81, 0.3, "violation"),
    ("weaken", N, N, -0.5, -0.9, 0.1, "violation"),
    ("weaken", N, N, -0.9, -0.5, 0.0, "ok"),
    ("weaken", P, N, 0.9, -0.1, 0.5, "violation"),  # reversal is a violation whatever the scores
    # rise / fall with scores: the score must move that way by more than the margin
    ("rise", N, P, -0.4, 0.3, 0.05, "ok"),
    ("rise", P, P, 0.2, 0.6, 0.1, "ok"),  # same label, the score rose: judged on the score
    ("rise", P, P, 0.2, 0.25, 0.1, "violation"),  # rose by less than the margin
    ("rise", P, P, 0.2, 0.3, 0.1, "violation"),  # rose by exactly the margin: not more than it
    ("rise", P, P, 0.6, 0.2, 0.0, "violation"),
    ("fall", P, P, 0.6, 0.2, 0.1, "ok"),
    ("fall", N, N, -0.2, -0.1, 0.0, "violation"),
    # flip, hold, none ignore scores and margin
    ("flip", P, P, 0.9, 0.1, 0.0, "violation"),
    ("flip", P, N, 0.9, -0.9, 5.0, "ok"),
    ("flip", Z, N, 0.0, -0.9, 0.0, "n/a"),
    ("hold", P, P, 0.9, 0.1, 0.0, "ok"),
    ("hold", P, N, 0.1, -0.1, 1.0, "violation"),
    ("none", P, N, 0.9, -0.9, 0.0, "ok"),
]


@pytest.mark.parametrize("should, sp, vp, ss, vs, margin, expected", WITH_SCORES)
def test_with_scores(should, sp, vp, ss, vs, margin, expected):
    assert _j(should, sp, vp, ss, vs, margin) == expected


def test_one_side_without_score_falls_back_to_labels():
    # the same label on both sides and no score on one: nothing shows the strength
    assert _j("strengthen", P, P, 0.9, None) == "n/a"
    assert _j("weaken", P, P, None, 0.9) == "n/a"
    assert _j("strengthen", P, Z, 0.9, None) == "violation"


def test_strengthen_on_star_scale_uses_rank():
    stars = LabelMap.recognise([1, 2, 3, 4, 5])

    def j(src, var):
        return judge("strengthen", stars.polarity_of(src), stars.polarity_of(var), src, var,
                     source_strength=stars.strength(src), variant_strength=stars.strength(var))

    assert j("4", "5") == "ok"
    assert j("5", "5") == "n/a"  # one label: no strength to compare
    assert j("5", "4") == "violation"  # moved toward the neutral 3
    assert j("2", "1") == "ok"
    assert j("1", "2") == "violation"
    assert j("4", "3") == "violation"


def test_unknown_expectation():
    with pytest.raises(PairflipError, match="unknown expectation 'invert'"):
        judge("invert", 1, -1, "positive", "negative")
