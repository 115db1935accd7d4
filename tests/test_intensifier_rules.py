"""Table-driven tests of the intensifier rules: source -> the exact set of valid variants per rule.

Grammar facts the tables rely on (handbook facts of English grammar, quoted from memory):
* Extreme ("non-gradable" or "limit") adjectives such as perfect, excellent, useless, amazing do
  not take the scaling amplifier *very* or the downtoner *slightly*; they take maximizers such as
  *absolutely*, *utterly*, *totally* (Quirk et al. 1985, A Comprehensive Grammar of the English
  Language, 7.3 and 8.104 on gradability and maximizers; Biber et al. 1999, Longman Grammar of
  Spoken and Written English, 7.7 on degree adverbs) — from memory.
* The indefinite article is *an* before a vowel sound and *a* before a consonant sound, decided by
  the word that directly follows it ("an excellent tent", "a very easy setup") — handbook fact.
* Downtoners like *a bit* / *slightly* favour undesirable qualities ("a bit noisy"); *a bit* is a
  noun phrase and cannot stand before an attributive adjective (*"a bit noisy stove") — from
  memory (Quirk et al. 1985, ch. 8 on downtoners).
"""

from __future__ import annotations

import random

import pytest

from pairflip.perturb import intensifier
from pairflip.perturb.base import Context, apply_edits, validate
from pairflip.perturb.lexicon import load_lexicon
from pairflip.perturb.nlp import load_nlp

AMP, SOFT, REM = "intensifier/amplify", "intensifier/soften", "intensifier/remove"
NAMP, NREM = "intensifier/negated-amplify", "intensifier/negated-remove"


@pytest.fixture(scope="module")
def nlp():
    return load_nlp()


@pytest.fixture(scope="module")
def lex():
    return load_lexicon()


def variants(nlp, lex, text: str, seed: int = 0) -> dict[str, set[str]]:
    """rule -> the set of variants that survive validation (as the build keeps them)."""
    doc = nlp(text)
    out: dict[str, set[str]] = {}
    ctx = Context(lexicon=lex, rng=random.Random(seed), seed=seed)
    for cand in intensifier.candidates(doc, ctx):
        variant, _ = apply_edits(doc, cand.edits)
        if validate(doc, cand, variant) is None:
            out.setdefault(cand.rule, set()).add(variant)
    return out


# (source, rule, exact set of variants); an empty set means "no variant".
CASES = [
    # insertion on gradable adjectives, predicative and attributive
    ("The tent is roomy.", AMP, {"The tent is very roomy."}),
    ("The tent is roomy.", SOFT, {"The tent is fairly roomy."}),
    ("The tent is roomy.", REM, set()),
    ("The zippers feel flimsy.", AMP, {"The zippers feel very flimsy."}),
    ("The zippers feel flimsy.", SOFT, {"The zippers feel a bit flimsy."}),  # unfavourable, predicative
    ("An ugly color.", SOFT, {"A slightly ugly color."}),  # unfavourable, attributive: never "a bit"
    ("The boots are stiff.", SOFT, {"The boots are a bit stiff."}),
    ("lens cap is a really annoying.", SOFT, set()),  # a noun missing after "a": "*an a bit annoying" (blind review, round 15)
    ("lens cap is a really annoying.", REM, set()),
    # blind review, round 16
    ("The price was great for the first year, then it went up by a third.", AMP, set()),  # a turn: the end weighs more
    ("The only thing I'd change is the bright lights on the stove.", AMP, set()),  # the one complaint of a positive text
    ("The lights on the stove are bright.", AMP, {"The lights on the stove are very bright."}),
    # round-2 blind review: no second degree word, no formulas, attributive softeners after a/an only
    ("The clerk was so bloody lazy.", AMP, set()),
    ("Happy 4th of July to the whole crew.", AMP, set()),
    ("Happy 4th of July to the whole crew.", SOFT, set()),
    ("The fun part was the campfire.", SOFT, set()),
    ("It was a comfortable trip.", SOFT, {"It was a fairly comfortable trip."}),
    ("The comfortable part was the seat.", SOFT, set()),
    # round-4 blind review: a word already graded, "the very X" (= that exact X), focus particles
    ("He's mega tired after the hike.", AMP, set()),
    ("I bought the comfortable boots.", AMP, {"I bought the really comfortable boots."}),
    ("It was a comfortable trip.", AMP, {"It was a very comfortable trip."}),
    ("I especially love the side pockets.", REM, set()),
    # round-5 blind review: wishes, sizes, contrasts in time or by comparison
    ("Have a good trip!", AMP, set()),
    ("They sent a great number of spare pegs.", AMP, set()),
    ("It was comfortable until the strap broke.", SOFT, set()),
    ("Light stoves vs heavy stoves.", AMP, set()),
    ("The strap is especially comfortable.", REM, set()),
    ("The strap is really comfortable.", REM, {"The strap is comfortable."}),
    # manner adverbs
    ("It lights reliably.", AMP, {"It lights very reliably."}),
    ("It lights reliably.", SOFT, {"It lights fairly reliably."}),
    ("The new fly flaps loudly.", SOFT, {"The new fly flaps somewhat loudly."}),
    ("The pack fits well.", AMP, {"The pack fits very well."}),
    # swaps between softener and amplifier
    ("The stove is slightly noisy.", AMP, {"The stove is very noisy."}),
    ("The stove is slightly noisy.", SOFT, set()),  # no stacking: "slightly" is already there
    ("The stove is a bit noisy.", AMP, {"The stove is very noisy."}),
    ("The chair is very comfortable.", SOFT, {"The chair is fairly comfortable."}),
    ("The chair is very comfortable.", AMP, set()),  # no "very very"
    # removal
    ("The chair is very comfortable.", REM, {"The chair is comfortable."}),
    ("I really love it.", REM, {"I love it."}),
    ("I really love it.", AMP, set()),
    ("I would highly recommend this stove.", REM, {"I would recommend this stove."}),
    ("The pan is incredibly easy to clean.", REM, {"The pan is easy to clean."}),
    ("The pan is incredibly easy to clean.", SOFT, {"The pan is fairly easy to clean."}),
    ("Very comfortable chair.", REM, {"Comfortable chair."}),  # capital moves to the new first word
    ("Absolutely brilliant little stove.", REM, set()),  # stacked adjectives: not a plain "ADJ NOUN"
    # extreme adjectives: only absolutely/utterly, never softened
    ("An excellent tent.", AMP, {"An absolutely excellent tent."}),
    ("An excellent tent.", SOFT, set()),
    ("The stakes are useless.", AMP, {"The stakes are utterly useless."}),
    ("The stakes are useless.", SOFT, set()),
    ("The lantern was truly amazing.", REM, {"The lantern was amazing."}),
    ("The lantern was truly amazing.", SOFT, set()),
    ("The stove is great.", AMP, {"The stove is absolutely great."}),
    ("Perfect.", AMP, {"Absolutely perfect."}),
    ("The zipper is broken.", AMP, set()),  # not gradable: "very broken" is odd
    # articles
    ("An easy setup.", AMP, {"A very easy setup."}),
    ("An easy setup.", SOFT, {"A fairly easy setup."}),
    ("A very easy setup.", REM, {"An easy setup."}),
    ("A roomy tent with an easy setup.", AMP, {"A very roomy tent with an easy setup."}),  # the detail in the PP is left alone
    ("An awful stove.", AMP, {"An utterly awful stove."}),
    ("A really ugly color.", REM, {"An ugly color."}),
    # negated scope, questions, hypotheticals, contrasts: skipped
    ("The chair is not very comfortable.", REM, set()),
    ("The chair is not very comfortable.", SOFT, set()),
    ("The tent is not roomy.", AMP, set()),
    ("The stove never works reliably.", AMP, set()),
    ("Is the tent comfortable?", AMP, set()),
    ("I wish it were roomy.", AMP, set()),
    ("The tent is roomy but heavy.", AMP, set()),
    ("The stove is somewhat noisy, but it's very fast.", REM, set()),
    # comparatives, superlatives, other degree words, exclamatives
    ("This jacket is lighter than my old one.", AMP, {"This jacket is much lighter than my old one."}),  # "much", never "*very lighter"
    ("The best stove I have owned.", AMP, set()),
    ("The jacket is too warm for summer.", AMP, {"The jacket is far too warm for summer."}),  # the excess is graded, never "warm" alone
    ("The jacket is warm enough.", AMP, set()),
    ("The jacket is as warm as my old one.", AMP, set()),
    ("The jacket is very, very warm.", REM, set()),
    ("What a great lantern!", AMP, set()),
    ("It works perfectly.", AMP, set()),  # "perfectly" is itself a degree word
    ("The tent stays surprisingly cool.", AMP, set()),  # already modified by an adverb
    # hendiadys, repeated stems, curly apostrophes, several sentences
    ("Nice and light!", AMP, set()),  # "nice and light" = pleasantly light
    ("Superb.", AMP, {"Absolutely superb."}),  # a one-word verdict the tagger took for a name
    # comparatives of opinion words take "much" (handbook grammar, from memory: not "very" with a comparative)
    ("The meat is much better now.", REM, {"The meat is better now."}),
    ("The app is faster now.", AMP, {"The app is much faster now."}),
    ("Far better than the big agents in town.", REM, {"Better than the big agents in town."}),
    ("Much worse since the update.", REM, {"Worse since the update."}),
    ("It used to be much better.", REM, set()),  # "used to": a complaint about now
    ("Better than the supermarket ready meals by miles.", AMP, set()),  # the degree is given already (round 23)
    ("some models are better than others.", AMP, set()),  # a ranking, no opinion of the product (round 23)
    ("Prices are much cheaper.", REM, set()),  # "cheap" is a complaint in the lexicon, "cheaper" praise
    ("The staff are lovely and the app is much slower.", REM, set()),  # mixed: no direction
    ("Hi, just wanted to say the courier today was lovely.", AMP,  # "wanted to say": the writer's verdict, no wish
     {"Hi, just wanted to say the courier today was very lovely."}),
    ("I want the room to be clean.", AMP, set()),  # a wish
    ("Impressive.", SOFT, {"Fairly impressive."}),
    ("construction quality is a difficult item.", AMP, set()),  # hard to judge, no verdict (round 26v)
    ("it was too new to have learned much about the features.", AMP, set()),  # the writer's inexperience, no excess (round 26v)
    ("The tent is too heavy to carry.", AMP, {"The tent is far too heavy to carry."}),  # control: an excess
    ("GREAT!!!!!", AMP, set()),  # capitals are emphasis of their own
    # "worth" takes "well" (handbook usage, from memory: "well worth", not "*very worth")
    ("The bike storage alone is worth it.", AMP, {"The bike storage alone is well worth it."}),
    ("Well worth it.", REM, {"Worth it."}),
    ("It was worth the wait.", AMP, {"It was well worth the wait."}),
    ("The car is worth £500.", AMP, set()),  # a value, no verdict
    ("Is it worth it?", AMP, set()),  # a question
    ("The staff are lovely and the rooms are too small.", AMP, set()),  # an excess complains: mixed, no direction
    ("yes, the features which are too numerous to mention are unmatched for any camera in this price range.", AMP,
     {"yes, the features which are too numerous to mention are absolutely unmatched for any camera in this price range."}),  # no excess (round 14)
    ("The flat is lovely and the building is well maintained.", AMP,  # "and" joins the clauses: no hendiadys
     {"The flat is very lovely and the building is well maintained."}),
    ("The price was fair.", SOFT, {"The price was somewhat fair."}),  # not "fairly fair"
    ("I’m very happy with it.", REM, {"I’m happy with it."}),
    ("I love this tent. The poles are light.", AMP, {"I love this tent. The poles are very light.",
                                                     "I really love this tent. The poles are light."}),
    # stance verbs take an amplifier before them; "highly" is the one "recommend" takes
    # (a collocation of English usage, common practice, from memory)
    ("I like the new zip.", AMP, {"I really like the new zip."}),
    ("We loved the lodge.", AMP, {"We really loved the lodge."}),
    ("I have enjoyed every trip with it.", AMP, {"I have really enjoyed every trip with it."}),
    ("I recommend this stove.", AMP, {"I highly recommend this stove."}),
    ("I hate the new buckle.", AMP, {"I really hate the new buckle."}),
    ("I like to camp in spring.", AMP, set()),  # a preference for an activity, not the graded opinion
    ("I'd like a refund.", AMP, set()),  # a wish
    ("I like that it folds flat.", AMP, set()),  # the opinion is in the clause after the verb
    ("I also like the colour.", AMP, set()),  # another adverb already on the verb
    ("Love this tent.", AMP, set()),  # no subject: an imperative-like fragment, left alone
    # manner adverbs of a service's verbs
    ("Support answered quickly.", AMP, {"Support answered very quickly."}),
    ("The staff treated us kindly.", AMP, {"The staff treated us very kindly."}),
    # only opinion words about the product: weather and ground are left alone
    ("The tips skate on wet granite.", AMP, set()),
    ("The tent is green.", AMP, set()),
    ("The pack fits my back perfectly after a couple of quick adjustments.", AMP, set()),
    ("A pair of sturdy boots.", AMP, set()),  # inside a PP: only plain "a/the ADJ NOUN" objects
    # precision: only words that carry the text's opinion, never names, idioms or facts
    ("We turned poor last year.", SOFT, set()),  # "turn": a change of state, a fact
    ("The answer was clear as day.", SOFT, set()),  # simile
    ("Good luck with the trip!", SOFT, set()),  # well-wish
    ("(good going, crew).", AMP, set()),  # a formula of praise: "*very good going" (blind review, round 16v)
    ("2) buy a good pair of boots unless you already own one.", AMP, set()),  # advice after a list marker (round 16v)
    ("I bought a good pair of boots.", AMP, {"I bought a very good pair of boots."}),  # a report, not advice
    # blind review, rounds 17 (Fellgate) and 17v
    ("Avoid. Damp and mould in every bedroom.", AMP, set()),  # "damp" coordinated with a bare noun is a noun
    ("Set up was easy and we enjoyed it for just over a week.", AMP, set()),  # the short span implies a failure
    ("The tent was great and lasted only a month.", AMP, set()),
    ("It was easy, only took ten minutes.", AMP, {"It was very easy, only took ten minutes."}),  # quick is praise
    ("A little pricey though.", AMP, {"Very pricey though."}),  # a final "though" points to an earlier sentence
    ("The tent is roomy, though the poles are flimsy.", AMP, set()),  # "though" inside: a contrast
    # an excess: "too" + adjective is a complaint; "far" grades it
    ("The sauce was too sweet for my taste.", AMP, {"The sauce was far too sweet for my taste."}),
    ("Too many bruised ones.", AMP, {"Far too many bruised ones."}),
    ("Portions are way too small for the price.", REM, {"Portions are too small for the price."}),
    ("The rules are much too strict.", REM, {"The rules are too strict."}),
    ("The rules are much too strict.", AMP, set()),
    ("It was a bit too loud.", AMP, set()),  # already graded down
    ("You're too kind.", AMP, set()),  # politeness, no excess
    ("Is it too big?", AMP, set()),
    ("The staff are lovely and the room is too small.", AMP, set()),  # praise elsewhere: direction unclear
    ("The tent is not too heavy.", AMP, set()),  # negated
    ("Happy birthday to the crew!", AMP, set()),
    ("The cabin was nice and relaxed.", SOFT, set()),  # "nice and X"
    ("We saw Grateful Dead live.", SOFT, set()),  # a name
    ("I bought a new stove with an expensive lid.", AMP, set()),  # a detail in a PP
    ("The day is slowly warming up.", SOFT, set()),  # a manner, not a verdict
    ("The kids were sexy sexy.", AMP, set()),  # repetition
    ("The guide uncomfortable.", AMP, set()),  # noun + adjective: no plain fragment
    ("I bought a sturdy tent.", AMP, {"I bought a very sturdy tent."}),  # plain object
    ("You're welcome!", SOFT, set()),  # formula
    ("I am glad he is home.", SOFT, set()),  # the adjective frames a clause
    ("It was great to see you last night.", AMP, set()),  # a social remark, not a verdict
    ("The kit is good to go.", SOFT, set()),  # idiom
    ("The stove is sleek looking.", SOFT, set()),  # compound "sleek looking"
    ("The lid is superior to the old one.", AMP, set()),  # a comparison
    ("A PERFECT stove.", AMP, set()),  # capitals: emphatic already
    ("There is a good chance it rains.", SOFT, set()),  # likelihood, not an opinion
    ("Be kind to each other.", AMP, set()),  # imperative
    ("To be honest, it can wait.", SOFT, set()),  # idiom
    ("This party had better be good.", SOFT, set()),  # a warning
    ("Happy to test it for you.", SOFT, set()),  # willingness
    ("It installs properly.", AMP, set()),  # "properly" is not gradable: "very properly" is odd
    ("The stove seems reliable.", SOFT, {"The stove seems fairly reliable."}),  # linking verb
    # a frequency or time adverb between the linking verb and the adjective grades nothing
    # (Quirk et al. 1985, 8.62ff on time and frequency adjuncts, from memory)
    ("The guide is always cheerful.", AMP, {"The guide is always very cheerful."}),
    ("The guide is always cheerful.", SOFT, {"The guide is always fairly cheerful."}),
    ("The zip is still stiff.", AMP, {"The zip is still very stiff."}),
    ("The signal is also patchy.", SOFT, {"The signal is also a bit patchy."}),
    ("The soup is always a bit bland.", AMP, {"The soup is always very bland."}),
    ("The tent is slowly warm.", AMP, set()),  # a manner adverb in between: no plain predicate
    ("The tent is surprisingly roomy.", AMP, set()),  # another adverb already grades it
    ("The zip is still better.", AMP, set()),  # comparative
    # later items of a plain list of adjectives, predicative or as a fragment
    ("The guide was early and really cheerful.", REM, {"The guide was early and cheerful."}),
    ("The guide was early and really cheerful.", SOFT, {"The guide was early and fairly cheerful."}),
    ("Noisy, dirty and overpriced.", AMP, {"Very noisy, dirty and overpriced.", "Noisy, very dirty and overpriced.",
                                            "Noisy, dirty and very overpriced."}),
    ("The tent was roomy and I slept well.", SOFT, {"The tent was fairly roomy and I slept well."}),  # no list: a clause
    # a passive participle used as an adjective ("was impressed"): graded like one
    ("I was really impressed by the guide.", REM, {"I was impressed by the guide."}),
    ("I was impressed by the guide.", AMP, {"I was very impressed by the guide."}),
    ("The zip was broken by the wind.", AMP, set()),  # not gradable
    # "so" with no result clause is an emphatic degree word: removal weakens (Quirk et al. 1985,
    # 7.87 on "so", from memory); with a "that" clause or a clause after it, removal breaks the sentence
    ("The new strap is so comfortable.", REM, {"The new strap is comfortable."}),
    ("So easy.", REM, {"Easy."}),
    ("The signal is so bad that I use my phone.", REM, set()),
    ("The signal is not so bad.", REM, set()),  # negated: "not so bad" is praise
    ("The tent is so roomy.", AMP, set()),  # no "so very"
    # "pretty" is a moderator, below "very" (Quirk et al. 1985, 8.111; Biber et al. 1999, 7.7; from memory)
    ("Pretty happy.", AMP, {"Very happy."}),
    ("The boots are pretty stiff.", AMP, {"The boots are very stiff."}),
    ("The boots are pretty stiff.", REM, set()),  # "The boots are stiff." may be no weaker
    # an adjective before a compound noun grades the whole compound ("awful customer service")
    ("Absolutely awful customer service.", REM, {"Awful customer service."}),
    ("Good quality boots.", AMP, {"Very good quality boots."}),
    ("It is a sturdy tent bag.", AMP, {"It is a very sturdy tent bag."}),
    ("They did a good job.", AMP, set()),  # "good job": a formula noun, still left alone
    ("A rugged co-op tent.", AMP, set()),  # a hyphenated word: not a plain compound
    # later items of a verbless list of noun phrases
    ("Friendly staff, fair prices.", AMP, {"Very friendly staff, fair prices.", "Friendly staff, very fair prices."}),
    ("Friendly staff and the prices are fair.", AMP, {"Friendly staff and the prices are very fair."}),  # a verb: no fragment list
    # a favourable word under a negated linking verb: "not very X" is the milder complaint
    ("The staff weren't helpful.", NAMP, {"The staff weren't very helpful."}),
    ("The staff weren't helpful.", AMP, set()),  # never "strengthen" under a negation
    ("I'm not happy with the tent.", NAMP, {"I'm not very happy with the tent."}),
    ("The rooms are never clean.", NAMP, {"The rooms are never very clean."}),
    ("The staff weren't very helpful.", NREM, {"The staff weren't helpful."}),
    ("The map was not that clear.", NREM, {"The map was not clear."}),
    ("I was not overly impressed.", NREM, {"I was not impressed."}),
    ("The staff weren't very helpful.", REM, set()),  # removal under a negation strengthens: not this rule
    ("It's not helpful at all.", NAMP, set()),  # emphatic: "*not very helpful at all"
    ("The stove isn't bad.", NAMP, set()),  # unfavourable: "isn't very bad" is no clear step from "isn't bad"
    ("The stove isn't very bad.", NREM, set()),
    ("The tent isn't great.", NAMP, set()),  # extreme: "*not very great"
    ("That's not acceptable.", NAMP, set()),  # pass or fail, no degree: "*not very acceptable"
    ("It wasn't always reliable.", NAMP, set()),  # another word between the negator and the adjective
    ("It isn't good enough.", NAMP, set()),
    ("Isn't it good?", NAMP, set()),  # a question
    ("I don't think it's helpful.", NAMP, set()),  # the negator sits on another verb
    ("Not helpful.", NAMP, {"Not very helpful."}),  # a negated fragment
    ("Not very helpful.", NREM, {"Not helpful."}),
    ("Not helpful at all.", NAMP, set()),
    ("The food has been consistently fresh.", AMP, {"The food has been consistently very fresh."}),  # a frequency frame
]


@pytest.mark.parametrize("source,rule,expected", CASES, ids=[f"{r.split('/')[1]}:{s}" for s, r, _ in CASES])
def test_case(nlp, lex, source, rule, expected):
    assert variants(nlp, lex, source).get(rule, set()) == expected


def test_meta_records_the_operation(nlp, lex):
    doc = nlp("The stove is slightly noisy.")
    ctx = Context(lexicon=lex, rng=random.Random(0))
    (cand,) = [c for c in intensifier.candidates(doc, ctx) if c.rule == AMP]
    assert cand.should == "strengthen"
    assert cand.meta["op"] == "swap" and cand.meta["removed"] == "slightly" and cand.meta["word"] == "very"


def test_rules_expectations():
    assert intensifier.RULES == {AMP: "strengthen", SOFT: "weaken", REM: "weaken", NAMP: "weaken", NREM: "strengthen"}


@pytest.mark.parametrize(
    "word,article",
    [("easy", "an"), ("very", "a"), ("absolutely", "an"), ("utterly", "an"), ("useful", "a"),
     ("honest", "an"), ("hour", "an"), ("one", "a"), ("roomy", "a"), ("ugly", "an")],
)
def test_indefinite_article(word, article):
    # handbook fact: the article follows the sound of the next word, not its spelling
    assert intensifier.indefinite_article(word) == article


def test_inserted_words_are_in_the_lexicon(lex):
    kinds = lex.intensifiers
    assert kinds[intensifier.AMPLIFIER] == "amplifier"
    assert kinds[intensifier.AMPLIFIER_AFTER_DEFINITE] == "amplifier"
    assert {kinds[w] for w in intensifier.EXTREME_AMPLIFIER.values()} == {"extreme-amplifier"}
    for w in (intensifier.SOFTENER_FAVOURABLE, intensifier.SOFTENER_PREDICATIVE,
              intensifier.SOFTENER_ATTRIBUTIVE, intensifier.SOFTENER_ADVERB):
        assert kinds[w] == "softener"


def test_intensifier_kinds_agree_with_vader_boosters(lex):
    # External check: VADER's booster dictionary (vaderSentiment 3.3.2, BOOSTER_DICT in
    # vaderSentiment/vaderSentiment.py; Hutto & Gilbert 2014) marks amplifiers with a positive
    # increment and downtoners with a negative one. Our kinds must agree wherever both list a word.
    from vaderSentiment.vaderSentiment import BOOSTER_DICT

    shared = [w for w in lex.intensifiers if w in BOOSTER_DICT]
    assert len(shared) >= 15
    for w in shared:
        sign = 1 if lex.intensifiers[w] in ("amplifier", "extreme-amplifier") else -1
        assert BOOSTER_DICT[w] * sign > 0, w


def test_vader_agrees_with_the_expectations(nlp, lex):
    # External check: VADER's rule-based scores (vaderSentiment 3.3.2, SentimentIntensityAnalyzer)
    # move the way our expectation says: |compound| up for strengthen, down for weaken. Only pairs
    # whose inserted and removed degree words VADER knows are judged ("fairly" is not a VADER
    # booster, so VADER cannot see it).
    from vaderSentiment.vaderSentiment import BOOSTER_DICT, SentimentIntensityAnalyzer

    sia = SentimentIntensityAnalyzer()
    sources = ["The tent is comfortable.", "The stove is noisy.", "The chair is very comfortable.",
               "The staff were slightly rude.", "The boots are ugly.", "The lantern is really nice.",
               "The stove is somewhat slow.", "The strap is extremely uncomfortable.", "I really love it."]
    checked = 0
    for src in sources:
        doc = nlp(src)
        s = abs(sia.polarity_scores(src)["compound"])
        if s == 0:  # VADER does not know the opinion word ("slow")
            continue
        for cand in intensifier.candidates(doc, Context(lexicon=lex, rng=random.Random(0))):
            words = [cand.meta.get("word"), cand.meta.get("removed")]
            if any(w is not None and w not in BOOSTER_DICT for w in words):
                continue
            v, _ = apply_edits(doc, cand.edits)
            assert validate(doc, cand, v) is None
            d = abs(sia.polarity_scores(v)["compound"])
            if cand.should == "strengthen":
                assert d > s, (src, v)
            else:
                assert d < s, (src, v)
            checked += 1
    assert checked >= 8


def test_deterministic_for_a_seed(nlp, lex):
    doc = nlp("The tent is roomy and the poles are sturdy.")
    runs = []
    for _ in range(2):
        ctx = Context(lexicon=lex, rng=random.Random(7), seed=7)
        runs.append([(c.rule, c.edits) for c in intensifier.candidates(doc, ctx)])
    assert runs[0] == runs[1] and runs[0]
