"""Published rule-based sentiment models from PyPI, wrapped as pairflip Python models.

- VADER (Hutto & Gilbert 2014, ICWSM; PyPI ``vaderSentiment`` 3.3.2): the compound score is in
  [-1, 1]; labels use the thresholds of the package README: compound >= 0.05 positive,
  <= -0.05 negative, otherwise neutral.
- AFINN (Nielsen 2011, "A new ANEW"; PyPI ``afinn``): a sum of word valences from -5 to +5
  with no handling of negation; the label is the sign of the sum.
"""

from __future__ import annotations

from functools import lru_cache


@lru_cache(maxsize=1)
def _vader():
    from vaderSentiment.vaderSentiment import SentimentIntensityAnalyzer

    return SentimentIntensityAnalyzer()


@lru_cache(maxsize=1)
def _afinn():
    from afinn import Afinn

    return Afinn()


def vader_compound(text: str) -> float:
    return _vader().polarity_scores(text)["compound"]


def vader(texts: list[str]) -> list[dict]:
    out = []
    for t in texts:
        c = vader_compound(t)
        out.append({"label": "positive" if c >= 0.05 else "negative" if c <= -0.05 else "neutral", "score": c})
    return out


def afinn(texts: list[str]) -> list[str]:
    out = []
    for t in texts:
        s = _afinn().score(t)
        out.append("positive" if s > 0 else "negative" if s < 0 else "neutral")
    return out
