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
    ("The lamp is clear as day.", "double-negation/prefix", None),  # a simile: "*not unclear as day" (round 15)
    ("The seams are excellent -- as is the zip.", "double-negation/antonym", None),  # the echo would say "*aren't bad -- as is" (round 16v)
    ("The seams are excellent.", "double-negation/antonym", "The seams aren't bad."),  # the same clause alone
    ("It's fine as it is.", "double-negation/antonym", "It's not bad as it is."),  # "as it is" echoes nothing
    ("Really, really good.", "double-negation/antonym", None),  # the repeated amplifier left "*, Not bad." (round 17)
    ("Really good.", "double-negation/antonym", "Not bad."),
    ("The coffee is good though.", "double-negation/antonym", "The coffee isn't bad though."),  # a final "though"
    ("The team have been amazing throughout.", "double-negation/antonym", None),  # "*haven't been bad throughout" (round 17)
    ("Set up was easy and we enjoyed it for just over a week.", "double-negation/antonym", None),  # implied failure (round 17v)
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
    ("The price is reasonable.", "double-negation/prefix", "The price is not unreasonable."),  # "prices aren't overpriced" is no English
    ("The jacket is warm.", NO, NO),  # no entry: "the chicken was warm" is a complaint, "wasn't cold" would praise it
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
    # ---- extreme words take the plain opposite of the other pole: "not awful" only denies the worst
    ("The stove is excellent.", "double-negation/antonym", "The stove isn't bad."),
    ("The soup was awful.", "double-negation/antonym", "The soup wasn't good."),
    ("The guide was terrible.", "double-negation/antonym", "The guide wasn't good."),
    ("The lodge was filthy.", "double-negation/antonym", "The lodge wasn't clean."),
    ("The cabin was spotless.", "double-negation/antonym", "The cabin wasn't dirty."),
    ("The kayak is perfect for beginners.", "double-negation/antonym", "The kayak isn't bad for beginners."),
    ("The view was gorgeous.", "double-negation/antonym", "The view wasn't bad."),  # "*the stew wasn't ugly"
    # ---- degree words: amplifiers on the edited word are dropped ("not very bad" would grant "bad")
    ("The tent is very comfortable.", "double-negation/prefix", "The tent is not uncomfortable."),
    ("The stew was really tasty.", "double-negation/antonym", "The stew wasn't bland."),
    ("The staff were extremely rude.", "double-negation/antonym", "The staff weren't polite."),
    ("The map is pretty good.", "double-negation/antonym", "The map isn't bad."),  # "pretty good" ~ "not bad": not stronger
    ("The tent was so easy.", "double-negation/antonym", "The tent wasn't difficult."),
    ("The porter was really kind about it.", "double-negation/prefix", "The porter was not unkind about it."),  # "really" parsed onto "was"
    ("I really love this lodge.", "double-negation/verb", "I don't hate this lodge."),
    ("The app is a bit slow.", NO, NO),  # softener: "isn't fast" could be stronger than "a bit slow"
    ("The app is slightly confusing.", NO, NO),  # softener, as above
    ("The canoe is so light that it floats away.", NO, NO),  # "so ... that": a result clause, not a degree
    # ---- a list of adjectives as a whole, "or" under the negation (not A or B = neither)
    ("The staff were friendly and helpful.", "double-negation/prefix", "The staff were not unfriendly or unhelpful."),
    ("The guide was really helpful and patient.", "double-negation/antonym", "The guide was not unhelpful or impatient."),
    ("The tent is sturdy and heavy.", NO, NO),  # mixed polarity in one list
    ("The instructions were unclear and incomplete.", NO, NO),  # "incomplete" has no entry: half a list edited
    # ---- prefixed negative words to their plain base
    ("The staff were unhelpful.", "double-negation/antonym", "The staff weren't helpful."),
    ("The booking page is inconvenient.", "double-negation/antonym", "The booking page isn't convenient."),
    # ---- more common review adjectives, both directions
    ("The shuttle was late.", "double-negation/antonym", "The shuttle wasn't on time."),
    ("The guide was punctual.", "double-negation/antonym", "The guide wasn't late."),
    # no entry for "cheap": the opinion lexicon reads it as a complaint (poor quality), and "not
    # expensive" as praise, so the pair would reverse for a lexicon reader
    ("The lantern is cheap.", NO, NO),
    ("The rooms are pricey.", "double-negation/antonym", "The rooms aren't affordable."),
    ("The hike was painless.", "double-negation/antonym", "The hike wasn't painful."),
    ("The checkout was painful.", "double-negation/antonym", "The checkout wasn't painless."),
    ("The bread was soggy.", "double-negation/antonym", "The bread wasn't crisp."),
    ("The fries were crisp.", NO, NO),  # no entry: "crisp" photos are not "soggy", crisp fries not "blurry"
    ("The receptionist was hostile.", "double-negation/antonym", "The receptionist wasn't friendly."),
    ("The booking form is straightforward.", "double-negation/antonym", "The booking form isn't complicated."),
    ("The trip was stressful.", "double-negation/antonym", "The trip wasn't relaxing."),
    # ---- linking verbs of appearance; no verbs of a kept or reached state
    ("The stew looks fresh.", "double-negation/antonym", "The stew doesn't look stale."),
    ("Looks great.", "double-negation/antonym", "Doesn't look bad."),  # review style without a subject
    ("The tent stayed dry.", NO, NO),  # "didn't stay wet" says it was wet before
    ("The water remained clean.", NO, NO),  # "didn't remain dirty": the same
    ("The kayak became unstable.", NO, NO),  # "didn't become stable" says nothing of how it is
    # ---- passives of opinion participles
    ("I was disappointed with the box.", "double-negation/antonym", "I wasn't impressed with the box."),
    ("We were delighted with the cabin.", "double-negation/antonym", "We weren't disappointed with the cabin."),
    ("I was impressed by the guide.", "double-negation/prefix", "I was not unimpressed by the guide."),
    ("I was disappointed in the guide.", NO, NO),  # "*impressed in the guide"
    ("I got annoyed with the app.", NO, NO),  # a change of state (see "became")
    # ---- verbs
    ("Loved it.", "double-negation/verb", "Didn't hate it."),  # review style without a subject
    ("I dislike the new menu.", "double-negation/verb", "I don't like the new menu."),
    ("The guide impressed us.", "double-negation/verb", "The guide didn't disappoint us."),
    ("The weather report disappointed me.", "double-negation/verb", "The weather report didn't impress me."),
    # ---- the rest of the text
    ("The kit is good when the poles arent bent.", NO, NO),  # a negation without apostrophe already in the text
    # a clause the lexicon cannot judge stays as it is (known limit: "small" here is a complaint
    # the lexicon does not see; clauses of opposite opinion are mostly joined by "but", skipped below)
    ("The soup was tasty and the portions were huge.", "double-negation/antonym", "The soup wasn't bland and the portions were huge."),
    ("The soup was tasty, but the portions were small.", NO, NO),  # contrast
    # ---- "too" before a negative adjective is a degree word: dropped; elsewhere it means "also"
    ("Coffee is too expensive.", "double-negation/antonym", "Coffee isn't affordable."),
    ("The guide was too kind.", NO, NO),  # "too kind" is a polite hedge, not a degree of praise
    ("The pack is too heavy to carry.", NO, NO),  # "*isn't light to carry"
    ("The tent is good too.", NO, NO),  # additive "too": points at another clause
    # ---- a noun complement with one opinion adjective, the article chosen again
    ("This is an excellent lodge.", "double-negation/antonym", "This isn't a bad lodge."),
    ("It was a lovely stay.", "double-negation/antonym", "It wasn't an unpleasant stay."),
    ("It is the best place.", NO, NO),  # superlative
    ("It's a great little place.", NO, NO),  # two words before the noun: keep it to "a ADJ NOUN"
    ("It's a great place that I love.", NO, NO),
    ("It was a rough week and the guide cheered us up.", NO, NO),  # the noun phrase sets the scene; the other clause carries the opinion  # a relative clause with its own opinion
    # ---- negative participles whose opposite is no participle take no complement
    ("The printer was broken.", "double-negation/antonym", "The printer wasn't working."),
    ("The seal was broken by the courier.", NO, NO),  # "*wasn't working by the courier"
    # ---- verbless sentences
    ("So easy.", "double-negation/antonym", "Not difficult."),
    ("Awful.", "double-negation/antonym", "Not good."),
    ("Extremely slow app.", "double-negation/antonym", "Not a fast app."),
    ("Great soup.", "double-negation/antonym", "Not a bad soup."),
    ("A great service.", "double-negation/antonym", "Not a bad service."),
    ("Quick and easy.", "double-negation/antonym", "Not slow or difficult."),
    ("Really disappointing for the price.", "double-negation/antonym", "Not satisfying for the price."),
    ("Simple as that.", NO, NO),  # an idiom: "*Not complicated as that."
    ("Good for beginners.", "double-negation/antonym", "Not bad for beginners."),
    ("Friendly staff.", NO, NO),  # "*Not an unfriendly staff"
    ("Great recipes.", NO, NO),  # a bare plural: "Not bad recipes." is no natural English
    ("The best tent.", NO, NO),  # superlative
    ("Excellent tent!", NO, NO),  # an exclamation (the negation family's fragment guard)
    # ---- more common review adjectives (common usage: see the TSV header)
    ("The fees are ridiculous.", "double-negation/antonym", "The fees aren't reasonable."),
    ("The menu is repetitive.", "double-negation/antonym", "The menu isn't varied."),
    ("The signal is patchy.", "double-negation/antonym", "The signal isn't reliable."),
    ("Parking is impossible.", "double-negation/antonym", "Parking isn't easy."),
    ("Parking is impossible to find.", NO, NO),  # an infinitive on the adjective: skipped, as "easy to set up"
    # ---- a semicolon joins clauses as a comma does
    ("The coffee is great; the desks are clean.", "double-negation/antonym", "The coffee is great; the desks aren't dirty."),
    ("The coffee is great; the desks are dirty.", NO, NO),  # mixed polarity
    # ---- skipped
    ("The jacket is warm and light.", NO, NO),  # a list is edited as a whole: "warm" has no entry
    ("It's a comfortable tent.", "double-negation/prefix", "It's not an uncomfortable tent."),  # a/an chosen again
    ("The stove was reliable, but it is noisy.", NO, NO),  # mixed polarity
    ("The tent isn't comfortable.", NO, NO),  # already negated
    ("Is the tent comfortable?", NO, NO),  # question
    ("Comfortable tent.", "double-negation/prefix", "Not an uncomfortable tent."),  # fragment, as the negation family makes it
    ("If it is clean, I will keep it.", NO, NO),  # conditional
    ("I'd like a bigger one.", NO, NO),  # a wish
    ("I have always liked this brand.", NO, NO),  # scope adverb
    ("I love it so much.", NO, NO),
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
    # blind review, round 20 (Wrenhollow)
    ("A reasonable vet for the price.", "double-negation/prefix", "Not an unreasonable vet for the price."),  # the article follows the new word
    ("The new north branch is really nice, bright and spacious with a separate cat area.", NO, NO),  # the feature would join the faults
    ("The room is clean and quiet.", "double-negation/antonym", "The room isn't dirty or noisy."),  # control: no with-phrase
    ("Free parking would be nice.", NO, NO),  # a suggestion, no opinion held
    ("Outstanding care.", NO, NO),  # "*Not a bad care": a mass noun takes no article
    ("Any day next week is fine.", NO, NO),  # a free-choice subject: a scheduling reply, no opinion (round 21w)
    ("The music is loud.", "double-negation/antonym", "The music isn't quiet."),  # loud/quiet: WordNet indirect antonyms
    ("The staff are organised.", "double-negation/prefix", "The staff are not disorganised."),
    ("Appalling.", "double-negation/antonym", "Not good."),  # a one-word verdict the tagger took for a name
    ("The chicken katsu is incredible.", "double-negation/antonym", "The chicken katsu isn't bad."),  # an extreme word: the other pole's plain word
    ("Disgraceful.", "double-negation/antonym", "Not good."),
    ("construction quality is a difficult item.", NO, NO),  # hard to judge, no verdict (round 26v)
    ("nice paperweight.", "double-negation/antonym", "not an unpleasant paperweight."),  # judged right (round 19v); negation skips the sarcasm
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


def test_amplifier_on_an_untouched_word_stays(nlp, lex):
    # only the amplifier of the edited word goes; the other clause keeps its "very"
    got = run(nlp, lex, "The poles are sturdy and the bag is very light.")
    assert got == [
        ("double-negation/antonym", "The poles are sturdy and the bag isn't heavy."),
        ("double-negation/antonym", "The poles aren't flimsy and the bag is very light."),
    ]


def test_determinism_and_no_identity(nlp, lex):
    texts = [c[0] for c in CASES]
    a = list(iter_pairs(texts, families=["double-negation"], seed=1, nlp=nlp, lexicon=lex))
    b = list(iter_pairs(texts, families=["double-negation"], seed=1, nlp=nlp, lexicon=lex))
    assert [(p.id, p.variant) for p in a] == [(p.id, p.variant) for p in b]
    assert len(a) == sum(1 for c in CASES if c[2])
    for p in a:
        assert p.variant != p.source and p.should == "weaken"
