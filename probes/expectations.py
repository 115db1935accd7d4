"""Expectations -> verdicts, judged against the model's own output on the source."""

from __future__ import annotations


def judge(
    should: str,
    source_polarity: int,
    variant_polarity: int,
    source_label: str,
    variant_label: str,
    source_score: float | None = None,
    variant_score: float | None = None,
    margin: float = 0.0,
) -> str:
    """Return ``"ok"``, ``"violation"`` or ``"n/a"`` for one pair.

    flip        violation when the variant's polarity equals the source's; n/a for a neutral source
    hold        violation when the label changed
    strengthen  violation when the polarity reversed or moved toward neutral; with scores, when
                |score| fell by more than ``margin``
    weaken      violation when the polarity reversed; with scores, when |score| rose by more
                than ``margin``
    none        never (diagnostic rules)
    """
    if should == "none":
        return "ok"
    if should == "flip":
        if source_polarity == 0:
            return "n/a"
        return "violation" if variant_polarity == source_polarity else "ok"
    if should == "hold":
        return "violation" if variant_label != source_label else "ok"
    reversed_ = source_polarity != 0 and variant_polarity == -source_polarity
    if should == "strengthen":
        if reversed_ or (source_polarity != 0 and variant_polarity == 0):
            return "violation"
        if source_score is not None and variant_score is not None:
            if abs(variant_score) < abs(source_score) - margin:
                return "violation"
        return "ok"
    if should == "weaken":
        if reversed_:
            return "violation"
        if source_score is not None and variant_score is not None:
            if abs(variant_score) > abs(source_score) + margin:
                return "violation"
        return "ok"
    raise ValueError(f"unknown expectation {should!r}; expected one of flip, hold, strengthen, weaken, none")
