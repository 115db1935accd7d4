"""Table-driven tests of the double-negation family (should weaken): source -> exact variant.

Expected variants are hand-written: negation by the rules of English grammar (as in the negation
family) plus the opposite of the opinion word from lexicons/antonyms.tsv.
"""

from __future__ import annotations

import random

import pytest

from pairflip.perturb import double_negation
from pairflip.perturb.base import Context, apply_edits, validate
from pairflip.perturb.build import iter_pairs
from pairflip.perturb.lexicon import load_lexicon
from pairflip.perturb.nlp import load_nlp


@pytest.fixture(scope="module")
def nlp():
    return load_nlp()


@pytest.fixture(scope="module")
def lex():
    return load_lexicon()


def run(nlp, lex, text: str):
    doc = nlp(text)
    out = []
    for cand in double_negation.candidates(doc, Context(lexicon=lex, rng=random.Random(0))):
        variant, _ = apply_edits(doc, cand.edits)
        if validate(doc, cand, variant) is None:
            out.append((cand.rule, variant))
    return sorted(out)


NO = None

CASES = [
    # ---- antonym (both directions), copula and linking verbs, tenses, persons, styles
    ("The floor is clean.", "double-negation/antonym", "The floor isn't dirty."),
    ("I'm pleased to say it works.", "double-negation/antonym", None),  # "*not annoyed to say" (blind review, round 4)
    ("I like it by far.", "double-negation/verb", None),  # "*don't dislike it by far" (round 5)
    ("Tent approved.", "double-negation/verb", None),  # no object: an adjective-like participle (round 5)
    ("The floor was dirty.", "double-negation/antonym", "The floor wasn't clean."),
    ("The stove is quiet.", "double-negation/antonym", "The stove isn't noisy."),
    ("The stove is noisy.", "double-negation/antonym", "The stove isn't quiet."),
    ("The poles are sturdy.", "double-negation/antonym", "The poles aren't flimsy."),
    ("The poles were flimsy.", "double-negation/antonym", "The poles weren't sturdy."),
    ("The tent feels sturdy.", "double-negation/antonym", "The tent doesn't feel flimsy."),
    ("The zippers felt flimsy.", "double-negation/antonym", "The zippers didn't feel sturdy."),
    ("It's clean.", "double-negation/antonym", "It's not dirty."),
    ("The staff were polite.", "double-negation/antonym", "The staff weren't rude."),
    ("The pack will be light.", "double-negation/antonym", "The pack won't be heavy."),
    ("The kettle has been quick.", "double-negation/antonym", "The kettle hasn't been slow."),
    ("The setup is easy and I do not mind the weight.", NO, NO),  # a negation already in the text
    ("The price is reasonable.", "double-negation/antonym", "The price isn't overpriced."),
    ("The jacket is warm.", "double-negation/antonym", "The jacket isn't cold."),
    # ---- prefix: full "not" unless the text contracts
    ("The tent is comfortable.", "double-negation/prefix", "The tent is not uncomfortable."),
    ("The seller was honest.", "double-negation/prefix", "The seller was not dishonest."),
    ("I am satisfied with the service.", "double-negation/prefix", "I am not dissatisfied with the service."),
    ("I'm happy with the chair.", "double-negation/prefix", "I'm not unhappy with the chair."),
    ("They're friendly.", "double-negation/prefix", "They're not unfriendly."),
    ("The lantern has been reliable.", "double-negation/prefix", "The lantern has not been unreliable."),
    ("The boots were comfortable from day one.", "double-negation/prefix", "The boots were not uncomfortable from day one."),
    ("The instructions are clear.", "double-negation/prefix", "The instructions are not unclear."),
    ("The app seems stable.", "double-negation/prefix", "The app does not seem unstable."),
    # ---- verb: like -> don't dislike, love <-> hate, agreement and tense
    ("I like it.", "double-negation/verb", "I don't dislike it."),
    ("I liked the color.", "double-negation/verb", "I didn't dislike the color."),
    ("She likes the red one.", "double-negation/verb", "She doesn't dislike the red one."),
    ("I love this lantern.", "double-negation/verb", "I don't hate this lantern."),
    ("She loves her new boots.", "double-negation/verb", "She doesn't hate her new boots."),
    ("My kids hated the pads.", "double-negation/verb", "My kids didn't love the pads."),
    ("I hate the zipper.", "double-negation/verb", "I don't love the zipper."),
    ("We enjoyed the trip.", "double-negation/verb", "We didn't dislike the trip."),
    ("I trust this filter.", "double-negation/verb", "I don't distrust this filter."),
    ("I have liked this brand for years.", "double-negation/verb", "I haven't disliked this brand for years."),
    # ---- skipped
    ("The tent is very comfortable.", NO, NO),  # degree word on the adjective
    ("The jacket is warm and light.", NO, NO),  # coordination
    ("It's a comfortable tent.", NO, NO),  # attributive: a/an would change
    ("The stove was reliable, but it is noisy.", NO, NO),  # mixed polarity
    ("The tent isn't comfortable.", NO, NO),  # already negated
    ("Is the tent comfortable?", NO, NO),  # question
    ("Comfortable tent.", NO, NO),  # fragment
    ("If it is clean, I will keep it.", NO, NO),  # conditional
    ("I'd like a bigger one.", NO, NO),  # a wish
    ("I have always liked this brand.", NO, NO),  # scope adverb
    ("I love it so much.", NO, NO),
    ("The stove is excellent.", NO, NO),  # extreme: "not awful" is faint praise
    ("The tent is cheaper than mine.", NO, NO),  # comparative
    ("It was easy to set up and easy to take down.", NO, NO),
    # the negation family's precision guards hold here too
    ("The stove is quiet, but the lid rattles.", NO, NO),  # contrast
    ("The stove is quiet :)", NO, NO),  # emoticon
    ("Me like.", NO, NO),  # object-case subject: "Me don't dislike"
    ("I liked this one enough to buy another.", NO, NO),  # "enough": points at another clause
    ("The lid looks clean also.", NO, NO),  # additive "also"
    ("Stay safe!", NO, NO),  # imperative
    ("@sam Stay safe!", NO, NO),  # imperative with a mention the parser takes for its subject
]


@pytest.mark.parametrize("source,rule,expected", CASES, ids=[c[0][:40] for c in CASES])
def test_double_negation_case(nlp, lex, source, rule, expected):
    got = run(nlp, lex, source)
    if expected is None:
        assert got == [], got
    else:
        assert got == [(rule, expected)], got
        assert double_negation.RULES[rule] == "weaken"


def test_table_covers_every_rule():
    assert len(CASES) >= 40
    assert {r for _, r, v in CASES if v} == set(double_negation.RULES)


def test_several_candidates_one_per_opinion(nlp, lex):
    got = run(nlp, lex, "The lantern is sturdy and the light is steady.")
    assert got == [
        ("double-negation/antonym", "The lantern is sturdy and the light isn't wobbly."),
        ("double-negation/antonym", "The lantern isn't flimsy and the light is steady."),
    ]


def test_determinism_and_no_identity(nlp, lex):
    texts = [c[0] for c in CASES]
    a = list(iter_pairs(texts, families=["double-negation"], seed=1, nlp=nlp, lexicon=lex))
    b = list(iter_pairs(texts, families=["double-negation"], seed=1, nlp=nlp, lexicon=lex))
    assert [(p.id, p.variant) for p in a] == [(p.id, p.variant) for p in b]
    assert len(a) == sum(1 for c in CASES if c[2])
    for p in a:
        assert p.variant != p.source and p.should == "weaken"
