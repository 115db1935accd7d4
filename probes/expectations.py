"""Expectations -> verdicts, judged against the model's own output on the source.

The rules, from DESIGN.md's table ("polarity" is -1, 0 or +1 from the label mapping; "score" is
the polarity score in [-1, 1], used only when both sides have one):

==========  ==============================================================================
should      violation when
==========  ==============================================================================
flip        the variant's polarity equals the source's; ``n/a`` when the source is neutral
hold        the label changed
strengthen  the polarity reversed or moved toward neutral; with scores, also when |score|
            fell by more than ``margin``; labels only and the same label on both sides: ``n/a``
            (a label cannot show a change of strength)
weaken      the polarity reversed; with scores, also when |score| rose by more than ``margin``;
            labels only and the same label on both sides: ``n/a``
rise        with scores on both sides: the variant's score is not above the source's by more
            than ``margin``; labels only: the variant's label polarity is below the source's
            (``n/a`` when both label polarities are equal: labels cannot show a small rise)
fall        the mirror of rise: not below by more than ``margin``; labels only: polarity above
            the source's (``n/a`` when equal)
none        never (diagnostic rules: only their flip rate is reported)
==========  ==============================================================================

On an ordinal scale with several labels per side (1-5 stars) "moved toward neutral" is judged on
the rank: 5 -> 4 stars is a move toward the neutral 3 (pass ``source_strength`` and
``variant_strength``, the distance of each label from the middle of the scale).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from pairflip.records import SHOULDS, PairflipError

if TYPE_CHECKING:
    from pairflip.records import Verdict

# A change of exactly ``margin`` is tolerated; this absorbs float rounding (0.8 - 0.7 > 0.1).
_EPS = 1e-9


def judge(
    should: str,
    source_polarity: int,
    variant_polarity: int,
    source_label: str,
    variant_label: str,
    source_score: float | None = None,
    variant_score: float | None = None,
    margin: float = 0.0,
    *,
    source_strength: float | None = None,
    variant_strength: float | None = None,
) -> str:
    """Return ``"ok"``, ``"violation"`` or ``"n/a"`` for one pair (see the module table)."""
    if should == "none":
        return "ok"
    if should == "flip":
        if source_polarity == 0:
            return "n/a"
        return "violation" if variant_polarity == source_polarity else "ok"
    if should == "hold":
        return "violation" if variant_label != source_label else "ok"
    if should not in SHOULDS:
        raise PairflipError(f"unknown expectation {should!r}; expected one of {', '.join(SHOULDS)}")
    reversed_ = source_polarity != 0 and variant_polarity == -source_polarity
    scored = source_score is not None and variant_score is not None
    if should in ("rise", "fall"):
        sign = 1 if should == "rise" else -1
        if scored:
            moved = sign * (variant_score - source_score)  # type: ignore[operator]
            return "ok" if moved > margin + _EPS else "violation"
        if variant_polarity == source_polarity:
            return "n/a"
        return "ok" if sign * (variant_polarity - source_polarity) > 0 else "violation"
    if should == "strengthen":
        if reversed_ or (source_polarity != 0 and variant_polarity == 0):
            return "violation"
        if (
            source_polarity != 0
            and variant_polarity == source_polarity
            and source_strength is not None
            and variant_strength is not None
            and variant_strength < source_strength
        ):
            return "violation"  # 5 -> 4 stars: same side, closer to neutral
        if scored:
            return "violation" if abs(source_score) - abs(variant_score) > margin + _EPS else "ok"  # type: ignore[arg-type]
        return "n/a" if variant_label == source_label else "ok"  # one label: no strength to compare
    # weaken
    if reversed_:
        return "violation"
    if scored:
        return "violation" if abs(variant_score) - abs(source_score) > margin + _EPS else "ok"  # type: ignore[arg-type]
    return "n/a" if variant_label == source_label else "ok"


OUTCOMES = ("ok", "violation", "n/a")
_OK, _VIOLATION, _NA = 0, 1, 2
SHOULD_CODES = {s: i for i, s in enumerate(SHOULDS)}


def judge_many(
    should: "np.ndarray",
    source_polarity: "np.ndarray",
    variant_polarity: "np.ndarray",
    source_code: "np.ndarray",
    variant_code: "np.ndarray",
    source_score: "np.ndarray",
    variant_score: "np.ndarray",
    margin: float,
    source_strength: "np.ndarray",
    variant_strength: "np.ndarray",
) -> "np.ndarray":
    """:func:`judge` for many pairs at once, on numpy arrays: ``should`` as codes
    (:data:`SHOULD_CODES`), labels as codes on the scale (equal codes, equal labels), scores with
    NaN for "none". Returns outcome codes indexing :data:`OUTCOMES`. The rules are the module
    table's, operation for operation; tests/test_outputs.py checks it against :func:`judge`."""
    import numpy as np

    sp = source_polarity.astype(np.int8, copy=False)
    vp = variant_polarity.astype(np.int8, copy=False)
    polar = sp != 0
    reversed_ = polar & (vp == -sp)
    scored = ~(np.isnan(source_score) | np.isnan(variant_score))
    limit = margin + _EPS
    with np.errstate(invalid="ignore"):  # NaN scores compare False and are masked by ``scored``
        fell = scored & (np.abs(source_score) - np.abs(variant_score) > limit)
        rose = scored & (np.abs(variant_score) - np.abs(source_score) > limit)
    code = {s: should == c for s, c in SHOULD_CODES.items()}
    flip_v = code["flip"] & polar & (vp == sp)
    hold_v = code["hold"] & (variant_code != source_code)
    strengthen_v = code["strengthen"] & (
        reversed_ | (polar & (vp == 0)) | (polar & (vp == sp) & (variant_strength < source_strength)) | fell
    )
    weaken_v = code["weaken"] & (reversed_ | rose)
    # labels only and the same label on both sides: a label cannot show a change of strength
    graded_na = (code["strengthen"] | code["weaken"]) & ~scored & (variant_code == source_code) & ~(strengthen_v | weaken_v)
    directed = code["rise"] | code["fall"]
    sign = np.where(code["rise"], 1, -1).astype(np.int8)
    with np.errstate(invalid="ignore"):
        moved_enough = sign * (variant_score - source_score) > limit
    label_moved = sign * (vp.astype(np.int16) - sp) > 0
    directed_v = directed & np.where(scored, ~moved_enough, ~label_moved & (vp != sp))
    out = np.full(should.shape, _OK, dtype=np.int8)
    out[flip_v | hold_v | strengthen_v | weaken_v | directed_v] = _VIOLATION
    out[code["flip"] & ~polar] = _NA
    out[directed & ~scored & (vp == sp)] = _NA
    out[graded_na] = _NA
    return out


def rejudge(verdict: "Verdict", labels: dict | None, margin: float) -> str:
    """The outcome of a scored pair under its (possibly changed) ``should``, from the predictions
    a results file keeps and its header's label mapping; used when a vetted decision changes an
    expectation after scoring."""
    from pairflip.labels import LabelMap

    if not labels:
        raise PairflipError("the results header has no label mapping, so a changed expectation cannot be judged")
    lm = LabelMap.from_dict(labels)
    s, v = verdict.source_pred, verdict.variant_pred
    return judge(
        verdict.should, lm.polarity_of(s), lm.polarity_of(v), lm.canonical(s), lm.canonical(v),
        verdict.source_score, verdict.variant_score, margin,
        source_strength=lm.strength(s), variant_strength=lm.strength(v),
    )
