"""Table-driven tests of the reorder rules, plus the word-multiset property and determinism.

Grammar facts the tables rely on (handbook facts of English grammar, from memory):
* Coordinated conjuncts of the same category can change places without changing truth
  conditions when "and"/"or" join them symmetrically; "and" between events in the past often
  reads as "and then" (asymmetric coordination), and "but" signals contrast with the weight on
  the second conjunct (Quirk et al. 1985, A Comprehensive Grammar of the English Language, 13.22
  and 13.33 on symmetric/asymmetric coordination) — from memory.
* Adjunct adverbials of time, place and condition may take initial or final position; an
  initial one is commonly set off by a comma (Quirk et al. 1985, 8.15; Biber et al. 1999, 10.2.7 on
  adverbial position) — from memory. Negation and focus words ("only", "even") interact with
  the position of an adverbial, so such sentences are left alone.
* Verb agreement with "or"-coordinated subjects follows the nearer conjunct (proximity), so
  swapping "or" noun phrases may break agreement (Quirk et al. 1985, 10.41) — from memory.
"""

from __future__ import annotations

import random
from collections import Counter
from pathlib import Path

import pytest

from pairflip.perturb import reorder
from pairflip.perturb.base import Context, apply_edits, validate, words
from pairflip.perturb.lexicon import load_lexicon
from pairflip.perturb.nlp import load_nlp

COORD, ADVL, CLAUSE, SHUF = "reorder/coordination", "reorder/adverbial", "reorder/clauses", "reorder/shuffle"


@pytest.fixture(scope="module")
def nlp():
    return load_nlp()


@pytest.fixture(scope="module")
def lex():
    return load_lexicon()


def valid(nlp, lex, text: str, seed: int = 0) -> dict[str, set[str]]:
    doc = nlp(text)
    out: dict[str, set[str]] = {}
    ctx = Context(lexicon=lex, rng=random.Random(seed), seed=seed)
    for cand in reorder.candidates(doc, ctx):
        variant, _ = apply_edits(doc, cand.edits)
        if validate(doc, cand, variant) is None:
            out.setdefault(cand.rule, set()).add(variant)
    return out


# (source, rule, exact set of variants); an empty set means "no variant".
CASES = [
    # coordination: adjectives, with and without the Oxford comma
    ("The tent is light, warm and cheap.", COORD, {"The tent is warm, cheap and light."}),
    # precision: hashtags, glued compounds, conjuncts with their own modifiers, negated scopes
    ("We had corned beef on rye and matzoh ball soup.", COORD, set()),
    ("I leave the lantern on all night.", ADVL, set()),  # "on" goes with "leave" (blind review, round 10)
    ("We keep the fly off most days.", ADVL, {"Most days, we keep the fly off."}),  # the particle stays with "keep"
    ("We will take this tent on our next trip.", ADVL, {"On our next trip, we will take this tent."}),  # a real preposition
    ("The bell you fitted fell off on the first ride.", ADVL, {"On the first ride, the bell you fitted fell off."}),  # an occasion of use
    ("They answered on the second call.", ADVL, {"On the second call, they answered."}),
    ("It has s-video and composite outputs.", COORD, set()),
    ("#map apps and mobile users love maps.", COORD, set()),
    ("No cables and no batteries needed.", COORD, {"No batteries and no cables needed."}),  # each has its own "no"
    ("No hot water and towels.", COORD, set()),  # one "no" over both: "towels and no hot water" says another thing
    ("The tent is warm in the rain and light.", COORD, set()),  # the PP would re-attach
    ("The lid is not tight and secure.", COORD, set()),  # negated scope
    ("The bag felt warm and very soft.", COORD, {"The bag felt very soft and warm."}),
    ("The stove freezes every time it gets cold.", ADVL, {"Every time it gets cold, the stove freezes."}),  # like "whenever"
    ("Every time I visit, the staff are lovely.", ADVL, {"The staff are lovely every time I visit."}),
    ("Every time I open the app, it crashes.", ADVL, set()),  # at the end, "it" could not be the app
    ("I have had this stove for about five months.", ADVL, set()),  # a duration of the perfect
    ("The lid pops open every ten minutes or so.", ADVL, set()),  # frequency with "or so"
    ("I told @sam about it yesterday.", ADVL, set()),  # a tweet with a mention
    ("We had the same or similar problems.", COORD, set()),  # identity words
    ("It either works properly or just stops.", COORD, set()),  # correlative "either ... or"
    ("Pros: size - small and light.", COORD, set()),  # a loose list item
    ("Battery on: 6 hours, off: 8 hours.", ADVL, set()),  # list with colons
    ("The zipper broke within a few minutes after I opened the box.", ADVL,
     {"After I opened the box, the zipper broke within a few minutes."}),  # the clause moves, the PP with a clause inside stays
    ("The tent is light, warm, and cheap.", COORD, {"The tent is warm, cheap, and light."}),
    ("The tent was cold and damp.", COORD, {"The tent was damp and cold."}),
    ("The pack is very comfortable, really durable and quite cheap.", COORD,
     {"The pack is really durable, quite cheap and very comfortable."}),
    # the article follows the new first conjunct
    ("An easy and quick setup.", COORD, {"A quick and easy setup."}),
    ("A light and warm bag.", COORD, {"A warm and light bag."}),
    # adverbs, noun phrases, verb phrases
    ("The filter works quickly and quietly.", COORD, {"The filter works quietly and quickly."}),
    ("The poles and the stakes are sturdy.", COORD, {"The stakes and the poles are sturdy."}),  # each has its own article
    ("It is light and packs small.", COORD, set()),  # verb phrases are never rotated
    ("The stove heats quickly and shuts off cleanly.", COORD, set()),  # verb phrases of events
    ("The bread looks great and tastes amazing.", COORD, {"The bread tastes amazing and looks great."}),  # linking verbs
    ("The app looks nice and works well.", COORD, {"The app works well and looks nice."}),
    ("The soup smells lovely and tastes even better.", COORD, set()),  # "even better" is measured against the first
    ("The bread looked great and tasted amazing.", COORD, set()),  # past tense: kept as told
    ("The cabin feels cosy and looks great at night.", COORD, set()),  # "at night" may cover both
    # capitalisation at the sentence start; proper nouns keep theirs
    ("Fast shipping and friendly service.", COORD, {"Friendly service and fast shipping."}),  # each has its own adjective
    ("Warm and light, the bag packs small.", COORD, {"Light and warm, the bag packs small."}),
    ("Mara and Tobin love the tent.", COORD, set()),  # names
    # questions keep their form
    ("Is it light and warm?", COORD, {"Is it warm and light?"}),
    # not reordered
    ("The tent is cheap but sturdy.", COORD, set()),  # contrast: the order carries the weight
    ("My wife and I love this tent.", COORD, set()),  # "I and my wife" is not a neutral order
    ("I pitched it and slept in it.", COORD, set()),  # past-tense events: "and" means "and then"
    ("The tent is nice and warm.", COORD, set()),  # "nice and warm" = very warm
    ("Tobin and the dog love the tent.", COORD, set()),  # one conjunct has a determiner, one not
    ("The poles and stakes are sturdy.", COORD, set()),  # "the" is shared: "stakes and the poles" changes it
    ("Two or three people fit inside.", COORD, set()),  # numbers: "three or two" is odd
    ("The stakes bent and then the poles snapped.", COORD, set()),
    # adverbial: end -> front, with a comma
    ("The stove boils water quickly in the morning.", ADVL, {"In the morning, the stove boils water quickly."}),
    ("I bought the poles in March.", ADVL, {"In March, I bought the poles."}),  # "I" keeps its capital
    ("The zipper broke after two weeks.", ADVL, {"After two weeks, the zipper broke."}),
    ("The stove is great, honestly.", ADVL, {"Honestly, the stove is great."}),  # the comma goes too
    ("The zipper broke, unfortunately.", ADVL, {"Unfortunately, the zipper broke."}),
    # adverbial: front -> end, comma removed, when the clause does not end in a noun
    ("In the morning, the stove boils water quickly.", ADVL, {"The stove boils water quickly in the morning."}),
    ("After two weeks, the zipper broke.", ADVL, {"The zipper broke after two weeks."}),
    ("In March, Tobin bought the poles.", ADVL, set()),  # after "the poles" the phrase may attach to the noun
    ("On the first night, we ate the fish.", ADVL, set()),  # same: "the fish on the first night"
    ("Yesterday the zipper broke.", ADVL, {"The zipper broke yesterday."}),
    ("For the price, this stove is excellent.", ADVL, {"This stove is excellent for the price."}),
    # a sentence adverb keeps its comma at the end
    ("Unfortunately, the zipper broke.", ADVL, {"The zipper broke, unfortunately."}),
    ("Honestly, I can't fault the crew.", ADVL, {"I can't fault the crew, honestly."}),  # outside the negation
    ("I can't fault the crew, honestly.", ADVL, {"Honestly, I can't fault the crew."}),
    ("Overall, the stay was great.", ADVL, {"The stay was great, overall."}),
    ("The stay was great overall.", ADVL, {"Overall, the stay was great."}),  # "overall" needs no comma
    # the example, both ways, and more kinds of adverbial
    ("The boat left after two hours.", ADVL, {"After two hours, the boat left."}),
    ("After two hours, the boat left.", ADVL, {"The boat left after two hours."}),
    ("The bakery restocks the shelves every morning.", ADVL, {"Every morning, the bakery restocks the shelves."}),
    ("Every morning, the bakery restocks the shelves.", ADVL, {"The bakery restocks the shelves every morning."}),
    ("The ferry was late on the first night.", ADVL, {"On the first night, the ferry was late."}),
    ("Since the refit, the pool has been spotless.", ADVL, {"The pool has been spotless since the refit."}),
    ("The pool has been spotless since the refit.", ADVL, {"Since the refit, the pool has been spotless."}),
    ("The cabin is perfect for two people.", ADVL, {"For two people, the cabin is perfect."}),  # hangs from the adjective
    ("The cabin is great for the price.", ADVL, {"For the price, the cabin is great."}),
    ("The cabin is a great choice for families.", ADVL, {"For families, the cabin is a great choice."}),
    ("It is good value for money.", ADVL, set()),  # "value for money" is one phrase
    ("The app freezes sometimes.", ADVL, {"Sometimes, the app freezes."}),
    ("Sometimes the app freezes.", ADVL, {"The app freezes sometimes."}),
    ("Last night the music was too loud.", ADVL, {"The music was too loud last night."}),  # "too loud" is a degree, not focus
    ("The ferry was late because of the fog.", ADVL, {"Because of the fog, the ferry was late."}),
    ("Thanks to the crew, the trip was great.", ADVL, {"The trip was great thanks to the crew."}),
    ("The app has not crashed since the update.", ADVL, {"Since the update, the app has not crashed."}),  # outside the negation
    ("The app keeps crashing since the last update.", ADVL, {"Since the last update, the app keeps crashing."}),
    ("The app works now.", ADVL, {"Now, the app works."}),
    ("Now the app works.", ADVL, set()),  # an opening "Now" may be a discourse marker
    ("The box arrived on time.", ADVL, set()),  # punctuality, not a time frame
    ("The app doesn't load sometimes.", ADVL, set()),  # "not ... sometimes" changes scope at the front
    ("We waited for an hour.", ADVL, set()),  # a duration
    ("I bought it for my son.", ADVL, set()),  # a beneficiary
    ("The delivery took two days.", ADVL, set()),  # a measure of the verb
    # verbless sentences: a sentence adverb at either end, "for the price" to the front
    ("Honestly, great value.", ADVL, {"Great value, honestly."}),
    ("Great value for the price, honestly.", ADVL, {"Honestly, great value for the price."}),
    ("Sadly, not worth the fare.", ADVL, {"Not worth the fare, sadly."}),
    ("Great food for the price.", ADVL, {"For the price, great food."}),
    ("Good value for money.", ADVL, set()),  # one phrase
    # devices and "from the start"
    ("The app works fine on my phone.", ADVL, {"On my phone, the app works fine."}),
    ("On my phone, the app works fine.", ADVL, {"The app works fine on my phone."}),
    ("The service has been great from the start.", ADVL, {"From the start, the service has been great."}),
    ("I spent an hour on the phone.", ADVL, set()),  # "spend ... on": an argument
    ("I work at the cafe.", ADVL, set()),  # the place is the verb's argument
    ("Recently, we joined a harbour tour -- a trip past the seal colony.", ADVL, set()),  # would land after the aside
    ("Every time the card reader fails the till locks up.", ADVL, set()),  # an opening "every time" heads a clause
    ("Each time I asked a different question.", ADVL, {"I asked a different question each time."}),
    ("If you sail often, you can buy a better jacket elsewhere - a small quibble.", ADVL, set()),  # a spaced dash
    ("Overall, I think that the tour needs a longer lunch stop.", ADVL, set()),  # "overall" would qualify the inner clause
    ("Overall, I found the tour good value.", ADVL, {"I found the tour good value, overall."}),
    ("Next time we will book the early boat.", ADVL, {"We will book the early boat next time."}),
    ("We have had the bread box for two months now.", ADVL, set()),  # "for two months now" is one span
    ("Because of the size of the cabin, guests can store bikes in it.", ADVL, set()),  # "it" would come before "the cabin"
    ("Because of the fog, the ferry was late.", ADVL, {"The ferry was late because of the fog."}),
    # parses that only look like clauses, and capitals that should not travel
    ("Keeps freezing my screen every time I book a tour.", ADVL, set()),  # no subject: "Keeps" taken for one
    ("Kind skippers and the ferry is often late when it storms.", ADVL, set()),  # a fragment, then a clause
    ("Website freezes every time I pick a seat.", ADVL, set()),  # "Website" tagged as a name: its capital is unclear
    ("We have booked on three different laptops.", ADVL, set()),  # in front, "we have booked" is left bare
    ("We can pause the bread order when we travel without paying.", ADVL, set()),  # "without paying" is the main clause's
    ("The bakery billed me twice, 3 and 3 on the same morning.", ADVL, set()),  # a phrase after an appended list
    ("Ours is ancient and the booking page takes ages to open.", CLAUSE, set()),  # "ours" would read as "our booking page"
    ("Tried jam and fresh cream.", COORD, set()),  # a verb taken for an adjective
    # adverbial clauses of time, condition and reason
    ("The room was ready when we arrived.", ADVL, {"When we arrived, the room was ready."}),
    ("When we arrived, the room was ready.", ADVL, {"The room was ready when we arrived."}),
    ("If you like seafood, the harbour cafe is great.", ADVL, {"The harbour cafe is great if you like seafood."}),
    ("We keep coming back because the staff are lovely.", ADVL, {"Because the staff are lovely, we keep coming back."}),
    ("It crashes whenever I open the map.", ADVL, set()),  # in front, "it" could mean the map
    ("When the skipper arrived, she apologised.", ADVL, set()),  # at the end, "she" could not be the skipper
    # adverbial: skipped
    ("The tent didn't leak in the rain.", ADVL, set()),  # negation scope
    ("It only leaks in heavy rain.", ADVL, set()),  # focus word
    ("It even works in the snow.", ADVL, set()),
    ("The headlamp charges in about two hours.", ADVL, set()),  # time to completion
    ("The camp chair folds flat in seconds.", ADVL, set()),
    ("We drove four hours to the campground.", ADVL, set()),  # directional argument
    ("The tent is in the garage.", ADVL, set()),  # the predicate itself
    ("The boots will last for years.", ADVL, set()),  # duration complement of "last"
    ("I shivered in it from midnight until dawn.", ADVL, set()),  # "from ... until" is one span
    ("Does it work in the rain?", ADVL, set()),
    ("The boots were stiff at first but comfortable after a week.", ADVL, set()),
    # clauses
    ("The tent is roomy and the poles are sturdy.", CLAUSE, {"The poles are sturdy and the tent is roomy."}),
    ("The pack is comfortable, and the pockets are well placed.", CLAUSE,
     {"The pockets are well placed, and the pack is comfortable."}),
    ("I love the color and Mara loves the size.", CLAUSE, {"Mara loves the size and I love the color."}),
    ("The chair is sturdy and my dog loves it.", CLAUSE, set()),  # "it" refers back
    ("It is light and the poles are sturdy.", CLAUSE, set()),
    ("The stakes bent and then the poles snapped.", CLAUSE, set()),  # sequence
    ("The zipper broke and the seam ripped.", CLAUSE, set()),  # past events: order is time order
    ("The tent is light but the poles are flimsy.", CLAUSE, set()),
    ("The pockets are deep and the zips are sturdy, which I like.", CLAUSE, set()),  # "which" refers back
    ("The shipping was fast and the price was fair.", CLAUSE, {"The price was fair and the shipping was fast."}),
    # two evaluations, one of them an event in the present
    ("The guides are friendly and the boats are clean.", CLAUSE, {"The boats are clean and the guides are friendly."}),
    ("The crew greet you by name and the coffee is excellent.", CLAUSE,
     {"The coffee is excellent and the crew greet you by name."}),
    ("The wifi drops constantly and the chairs are uncomfortable.", CLAUSE,
     {"The chairs are uncomfortable and the wifi drops constantly."}),
    ("The staff have been great and the rooms are spotless.", CLAUSE, {"The rooms are spotless and the staff have been great."}),
    ("This cafe is lovely and the staff are friendly.", CLAUSE, {"The staff are friendly and this cafe is lovely."}),  # "this" points outside
    ("Honestly, the staff are lovely and the pool is spotless.", CLAUSE,
     {"Honestly, the pool is spotless and the staff are lovely."}),  # the adverb covers both and stays
    ("Since the refit, the gym is great and the showers are hot.", CLAUSE,
     {"Since the refit, the showers are hot and the gym is great."}),
    ("I ordered the soup and it arrived cold.", CLAUSE, set()),  # a story: order, then arrival
    ("The mechanic fixed the chain and the bike rode well.", CLAUSE, set()),  # past events: cause and effect
    ("The wifi drops and I lose my work.", CLAUSE, set()),  # two events: the second follows from the first
    ("The app crashes and I am stuck.", CLAUSE, set()),  # the writer's state follows from the event
    ("The cabin has a balcony and the balcony is huge.", CLAUSE, set()),  # the second mention refers back
    # "and" hung on the last word of the first clause by the parser ("roomy" tagged as a noun)
    ("The desks are roomy and the Wi-Fi is fast.", CLAUSE, {"The Wi-Fi is fast and the desks are roomy."}),
    # three or more clauses in a comma list closed by "and": rotated by one, Oxford comma kept
    ("The tent is roomy, the poles are light and the pegs are sturdy.", CLAUSE,
     {"The poles are light, the pegs are sturdy and the tent is roomy."}),
    ("The tent is roomy, the poles are light, and the pegs are sturdy.", CLAUSE,
     {"The poles are light, the pegs are sturdy, and the tent is roomy."}),
    ("The tent was roomy, the poles were light and the pegs were sturdy.", CLAUSE,
     {"The poles were light, the pegs were sturdy and the tent was roomy."}),  # past states
    ("The zip broke, the seam ripped and the pole snapped.", CLAUSE, set()),  # past events: told in order
    ("Light, comfy and the pegs are sturdy.", CLAUSE, set()),  # verbless items and a clause
    ("The tent is roomy, it packs small and the pegs are sturdy.", CLAUSE, set()),  # "it" refers back
    ("The tent is roomy, the poles are light but the pegs are flimsy.", CLAUSE, set()),  # contrast
    ("The stove is slow, I burn my fingers and the pot wobbles.", CLAUSE, set()),  # an event with "I": a consequence
    ("The stove is slow, I burn my fingers and the pot wobbles.", COORD, set()),
    # blind review, round 15: a past time frame moved across a present perfect
    ("Once it was pitched it has been mostly dry.", ADVL, set()),
    ("I've attached a photo of the tear after the trip.", ADVL, set()),
    # blind review, round 15 (vader snippets): parses the move cannot trust
    ("if you have the patience choose the one that you think is best suited to you.", ADVL, set()),  # the object of "have" read as the main subject
    ("If you have kids, this tent is great.", ADVL, {"This tent is great if you have kids."}),
    ("and it holds sooooo much food and spare fuel.", COORD, set()),  # emphatic spelling: the parse is unsure
    ("just get some new pegs and your set.", COORD, set()),  # "your" for "you're": not a noun phrase
    # blind review, round 16
    ("the zip sticks every time it rains lol.", ADVL, set()),  # a laughter tag would land mid-sentence
    ("Since the repair the stove has been much better.", ADVL, {"The stove has been much better since the repair."}),  # a comma splice: "the pot wobbles" is a clause, not a noun phrase
    ("The tent has a porch, the porch is dry and the pegs are sturdy.", CLAUSE, set()),  # the second "porch" refers back
    ("I think the tent is roomy, the poles are light and the pegs are sturdy.", CLAUSE, set()),  # "I think" covers one item only
    # blind review, rounds 17 (Fellgate) and 17v
    ("Some staff are brilliant and some clearly don't care.", CLAUSE, set()),  # "some" stands for "some staff"
    ("The staff are brilliant and the rooms are clean.", CLAUSE, {"The rooms are clean and the staff are brilliant."}),
    ("Each time I get told someone will call.", ADVL, set()),  # what was told is the "main" clause
    ("Each time I open the app it crashes.", ADVL, set()),  # parsed "the app (that) it crashes"
    ("Each time, the tent stayed dry.", ADVL, {"The tent stayed dry each time."}),
    ("the day finally arrived when i was sure i'd leave.", ADVL, set()),  # a relative clause of "the day"
    ("The tent leaked when it rained.", ADVL, {"When it rained, the tent leaked."}),
    ("one stopped working in february and the other in march.", ADVL, set()),  # "in march" is the gapped clause's
    ("it beats the old one in terms of less haze and astonishingly real colors.", COORD, set()),  # "less" scopes over one item
    ("It has bright and clear colors.", COORD, {"It has clear and bright colors."}),
    # a participle of quality ("well managed") in a list of adjectives
    ("Quiet, tidy and well managed.", COORD, {"Tidy, well managed and quiet."}),
    ("The shop is clean, friendly and well organised.", COORD, {"The shop is friendly, well organised and clean."}),
    ("The tent was delivered and pitched.", COORD, set()),  # events, not qualities
    ("After all the players have big drives, better sorting is needed.", ADVL, set()),  # "after all" means "since" (round 19v)
    ("After we pitched it, the tent stayed dry.", ADVL, {"The tent stayed dry after we pitched it."}),
    ("It had one tent sold as a two-man and the other three-man.", COORD, set()),  # "the other": a gapped clause (round 18v)
    # noun phrases with their own adjectives or articles; three items ending in a complement
    ("Friendly guides, calm water and a lovely lunch.", COORD, {"Calm water, a lovely lunch and friendly guides."}),
    ("We loved the friendly guides and the calm water.", COORD, {"We loved the calm water and the friendly guides."}),
    ("Great food and a lovely view.", COORD, {"A lovely view and great food."}),  # the article is the view's own
    ("Great coffee and cake.", COORD, set()),  # "great" may cover both
    ("Warm bread and the cakes are always fresh.", COORD, set()),  # a fragment and a clause, not one subject
    ("The pool is warm in the mornings and the bar staff actually know your name.", COORD, set()),  # a clause's subject
    ("The cabins are too small for a suitcase and a pram.", COORD, {"The cabins are too small for a pram and a suitcase."}),
    ("Fair prices, quick service.", COORD, {"Quick service, fair prices."}),  # a verbless list
    ("Friendly crew, calm sea, great lunch.", COORD, {"Calm sea, great lunch, friendly crew."}),
    ("Our host, a retired sailor.", COORD, set()),  # an apposition, not a list
    # verbless comma lists with no coordinator, cut at the commas (spaCy links them as appos or conj)
    ("Fresh bread, friendly staff, easy parking.", COORD, {"Friendly staff, easy parking, fresh bread."}),
    ("Quick, easy, delicious.", COORD, {"Easy, delicious, quick."}),  # opinion adjectives
    ("No pegs, no poles, no refund.", COORD, set()),  # negated items: left alone
    ("Missing pegs, broken pole, late courier.", COORD, set()),  # a participle read as a verb
    ("The fish and chips were great.", COORD, set()),  # bare nouns: often a fixed pair
    ("There is a sauna and a small pool.", COORD, set()),  # "there is" agrees with the first item
    ("No hot water and no towels.", COORD, {"No towels and no hot water."}),
    ("The tour was fun, informative and great for kids.", COORD, {"The tour was informative, fun and great for kids."}),
    ("The soup was hot, tasty and ready in minutes.", COORD, {"The soup was tasty, hot and ready in minutes."}),
    ("The guide was patient with the kids and clear about the rules.", COORD,
     {"The guide was clear about the rules and patient with the kids."}),  # each has its own complement
    ("The app is quick and easy to use.", COORD, set()),  # "to use" goes with both: it must stay last
    ("The croissants are fresh and great for breakfast.", COORD, set()),  # two items: the complement may be shared
    ("Fresh bread and lovely cakes from the bakery.", COORD, set()),  # "from the bakery" may cover both
    # adverbials and coordinated clauses: the phrase would cover only one conjunct at the other end
    ("At night, the headlamp is bright and the strap is comfortable.", ADVL, set()),
    # a misparse guarded against: "cold" is the object of "in", not a conjunct of "easy"
    ("The stove is reliable in the cold and easy to light.", COORD, set()),
    ("The tent is dark, stuffy and hard to move around in.", COORD, set()),  # the infinitive goes with "hard"
    ("The boots keep my feet warm and dry all day.", COORD, set()),  # "all day" is the verb's
    # several sentences: only the one with the coordination changes
    ("I love this tent. The poles are light and strong.", COORD, {"I love this tent. The poles are strong and light."}),
    # fragments
    ("Great.", SHUF, set()),
    ("Great value.", COORD, set()),
]


@pytest.mark.parametrize("source,rule,expected", CASES, ids=[f"{r.split('/')[1]}:{s}" for s, r, _ in CASES])
def test_case(nlp, lex, source, rule, expected):
    assert valid(nlp, lex, source).get(rule, set()) == expected


def test_rules_expectations():
    assert reorder.RULES == {COORD: "hold", ADVL: "hold", CLAUSE: "hold", SHUF: "none"}


def _norm(ws):
    return Counter("a" if w == "an" else w for w in ws)


PROPERTY_TEXTS = [
    "The tent is light, warm and cheap.",
    "In the morning, the stove boils water quickly.",
    "The tent is roomy and the poles are sturdy.",
    "An easy and quick setup. The stove is great, honestly.",
    "Mara and Tobin bought the poles in March.",
    "I love it.",
    "The filter works quickly and quietly, and the bag is light.",
]


def _property_corpus() -> list[str]:
    demo = Path(__file__).resolve().parents[1] / "demo_data" / "sentences.txt"
    extra = demo.read_text(encoding="utf-8").splitlines()[:150] if demo.exists() else []
    return PROPERTY_TEXTS + [t for t in extra if t.strip()]


def test_every_variant_keeps_the_words_and_differs(nlp, lex):
    n = 0
    rules = Counter()
    for doc in nlp.pipe(_property_corpus()):
        ctx = Context(lexicon=lex, rng=random.Random(doc.text), seed=0)
        for cand in reorder.candidates(doc, ctx):
            variant, _ = apply_edits(doc, cand.edits)
            reason = validate(doc, cand, variant)
            if reason is not None:
                continue
            # the multiset check is computed here independently of validate's
            assert _norm(words(variant)) == _norm(words(doc.text)), (doc.text, variant)
            assert variant != doc.text
            assert variant[:1].isupper() == doc.text[:1].isupper()
            n += 1
            rules[cand.rule] += 1
    assert n >= 20 and set(rules) == {COORD, ADVL, CLAUSE, SHUF}


def test_shuffle_is_seeded_and_diagnostic(nlp, lex):
    doc = nlp("The sturdy tent kept us dry during a long storm in the mountains.")

    def shuffle(seed):
        ctx = Context(lexicon=lex, rng=random.Random(seed), seed=seed)
        (cand,) = [c for c in reorder.candidates(doc, ctx) if c.rule == SHUF]
        return cand

    a, b = shuffle(3), shuffle(3)
    assert a.edits == b.edits
    assert a.meta == {"diagnostic": True} and a.should == "none"
    variant, _ = apply_edits(doc, a.edits)
    assert validate(doc, a, variant) is None
    assert variant.endswith(".") and variant != doc.text
    # function words stay in place
    src, var = doc.text.split(), variant.split()
    for k, w in enumerate(src):
        if w.lower() in ("the", "us", "during", "a", "in"):
            assert var[k].lower() == w.lower()
    # different seeds give different orders for most seeds
    orders = {apply_edits(doc, shuffle(s).edits)[0] for s in range(8)}
    assert len(orders) >= 4


def test_build_keeps_reorder_variants_deterministic(nlp, lex):
    from pairflip.perturb.build import iter_pairs

    texts = ["The tent is light, warm and cheap.", "The stove boils water quickly in the morning."]
    runs = [
        [(p.rule, p.variant) for p in iter_pairs(texts, families=["reorder"], seed=5, nlp=nlp, lexicon=lex)]
        for _ in range(2)
    ]
    assert runs[0] == runs[1]
    assert {r for r, _ in runs[0]} >= {COORD, ADVL, SHUF}


def test_shuffle_is_not_held_to_grammar_checks(nlp):
    """A shuffle may put "didn't" before a past form; it keeps its words, so it stays."""
    from pairflip.perturb.base import Candidate, TokenEdit

    doc = nlp("I didn't go and it broke.")
    shuffled = "It didn't broke and I go."
    cand = Candidate("reorder/shuffle", "none", (TokenEdit(0, len(doc), shuffled),))
    assert validate(doc, cand, shuffled) is None
    same_words_other_rule = Candidate("reorder/clauses", "hold", cand.edits)
    assert validate(doc, same_words_other_rule, shuffled) == "agreement: do-support needs the base form"


def test_now_and_then_is_not_split_across_a_sentence_break():
    """spaCy ends a sentence inside "now and then" here; moving "now" would break the phrase
    ("now, app crashes and then but ...", blind review, round 16)."""
    import pairflip

    suite = pairflip.build_suite(["pretty good overall. app crashes now and then but a restart fixes it"],
                                 families=["reorder"], seed=0, unit="sentence")
    assert not [p.variant for p in suite if p.rule == ADVL]
