"""Published rule-based sentiment models on pairflip's negation pairs.

Two lexicon models from PyPI, wrapped as pairflip models with labels negative/neutral/positive:

- VADER (Hutto & Gilbert 2014, package ``vaderSentiment``): its rules flip and dampen the
  valence of a word after a negator ("not", "n't", "never", ...). Labels from the compound score
  with the thresholds of its README: >= 0.05 positive, <= -0.05 negative, else neutral.
- AFINN (Nielsen 2011, package ``afinn``): the sum of the word scores of its lexicon, with no
  negation handling at all: "not great" scores as "great". Sign of the sum -> label.

On negation pairs (should: flip) a model that ignores negation keeps its label, so AFINN must
show far more violations than VADER. That checks pairflip's pairs, expectations and statistics
together against two independent published models. The texts are plain review sentences written
for this test (invented outdoor-gear reviews), chosen so that their opinion words are in both
lexicons (otherwise both models call them neutral and the pair is n/a).
"""

from __future__ import annotations

import pytest

import pairflip
from pairflip.report.compare import compare

import afinn as afinn_mod  # noqa: E402  (a test dependency: a missing package fails, never skips)
import vaderSentiment.vaderSentiment as vader_mod  # noqa: E402

TEXTS = [
    # copula with a predicative adjective
    "The sleeping bag is comfortable.",
    "The headlamp is excellent.",
    "The customer service was helpful.",
    "These gloves are warm.",
    "The new rain cover is beautiful.",
    "The instructions were terrible.",
    "The buckles are ugly.",
    "The seams were weak.",
    "The tent pegs are useless.",
    "The stitching on the pack is poor.",
    "The hiking poles are strong.",
    "The water filter is easy to clean.",
    "The kettle is dirty after one trip.",
    # lexical verbs (do-support)
    "I love this camping stove.",
    "We enjoyed the hammock on our trip.",
    "My son likes the folding chair.",
    "I recommend these trail shoes.",
    "The lantern works great.",
    "I hate the zipper on this jacket.",
    "The kids disliked the freeze-dried meals.",
    # modals
    "I would recommend this backpack to a friend.",
    "This cooler will keep your drinks cold and the handles feel strong.",
    "You can enjoy a good night of sleep on this mat.",
    "The fuel canister could be dangerous in a hot car.",
    # already negated: the rule may remove the negation
    "The straps are not comfortable.",
    "I do not like the new buckle.",
    "The compass was not helpful.",
    "The canopy is not beautiful.",
    "Sadly, the pump is not good.",
    "The trekking pole was not strong enough.",
]


def _vader():
    analyzer = vader_mod.SentimentIntensityAnalyzer()

    def vader(texts: list[str]) -> list[str]:
        out = []
        for t in texts:
            c = analyzer.polarity_scores(t)["compound"]
            # thresholds from the vaderSentiment README ("typical threshold values")
            out.append("positive" if c >= 0.05 else ("negative" if c <= -0.05 else "neutral"))
        return out

    return vader


def _afinn():
    scorer = afinn_mod.Afinn()

    def afinn(texts: list[str]) -> list[str]:
        out = []
        for t in texts:
            s = scorer.score(t)
            out.append("positive" if s > 0 else ("negative" if s < 0 else "neutral"))
        return out

    return afinn


@pytest.fixture(scope="module")
def negation_suite(nlp):
    suite = pairflip.build_suite(TEXTS, families=["negation"], seed=0, nlp=nlp)
    return suite


@pytest.fixture(scope="module")
def scored(negation_suite):
    return pairflip.score(negation_suite, _vader()), pairflip.score(negation_suite, _afinn())


def test_suite_has_enough_negation_pairs(negation_suite):
    # Not a skip: with no pairs the comparison below would mean nothing, so that is a failure.
    assert len(negation_suite) >= 20, f"only {len(negation_suite)} negation pairs from {len(TEXTS)} texts"
    assert {p.family for p in negation_suite} == {"negation"}


def test_vader_violates_far_less_than_afinn(scored):
    vres, ares = scored
    v = pairflip.summarize(vres).families["negation"]
    a = pairflip.summarize(ares).families["negation"]
    assert v.applicable >= 15 and a.applicable >= 15
    # AFINN sums word scores and ignores "not", so almost every applicable pair keeps its label.
    assert a.violation_rate >= 0.8
    # VADER negates the valence after a negator (Hutto & Gilbert 2014, section on heuristics).
    assert v.violation_rate <= 0.5 * a.violation_rate
    # and the intervals do not overlap: the difference is not an accident of a small suite
    assert v.ci95[1] < a.ci95[0]


def test_paired_comparison_is_significant(scored):
    vres, ares = scored
    # same suite, two models: exact McNemar on the discordant pairs (McNemar 1947)
    comp = compare(ares, vres)  # old = AFINN, new = VADER
    fc = comp.families["negation"]
    assert fc.direction == "better"
    assert fc.only_old > 5 * max(1, fc.only_new)
    assert fc.p_value is not None and fc.p_value < 0.001


def test_afinn_ignores_negation_outright(negation_suite):
    # A direct check of the premise, pair by pair: AFINN's score of a variant made by inserting
    # "not"/"n't" equals the source's (the negator carries no score in AFINN's lexicon).
    scorer = afinn_mod.Afinn()
    inserted = [p for p in negation_suite if p.rule != "negation/removal"]
    assert inserted
    same = sum(scorer.score(p.source) == scorer.score(p.variant) for p in inserted)
    assert same >= 0.9 * len(inserted)
