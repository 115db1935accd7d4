"""reorder: move words without changing what is said (should hold; shuffle is a diagnostic).

Rules:

``reorder/coordination`` (hold)
    Rotate the conjuncts of an "and"/"or" coordination of adjectives, manner adverbs, noun
    phrases or present-tense linking verbs: "light, warm and cheap" -> "warm, cheap and light",
    "friendly staff and clean rooms" -> "clean rooms and friendly staff", "looks great and tastes
    amazing" -> "tastes amazing and looks great" (look, taste, smell, sound, feel, seem, work,
    each with its own complement and no auxiliary, negation or phrase that might be shared). A
    verbless comma list of noun phrases, each with its own opinion adjective and no article, also
    rotates ("Fair prices, quick service." -> "Quick service, fair prices."). A conjunct is one word after its degree adverbs
    ("very light"), a noun after its own article, possessive, adjectives or compounds ("the calm
    water"), or an adjective with its own complement ("patient with the kids", "happy to help").
    When only the last conjunct has a complement it may belong to all of them ("quick and easy to
    use"), so it keeps its place and the plain ones before it rotate ("fun, informative and great
    for kids" -> "informative, fun and great for kids"); with one plain conjunct before it, or a
    complement on an earlier conjunct only, nothing moves. Noun phrases: only "and"; each must
    have its own article or adjective (bare pairs are often fixed: "fish and chips"; "great coffee
    and cake" may share "great"), an article on the first must be on all ("the poles and stakes"
    shares it), no names, numbers, relative clauses or "there is" (the verb agrees with the first
    item). Not rotated: verb and prepositional phrases (their modifiers re-attach: "corned beef on
    rye and soup"), conjuncts glued to a hyphen, slash, hashtag or link ("s-video"), a negation
    over the whole coordination ("not tight and secure", "no cables and batteries"; "no X and no
    Y" moves), focus words and, for verbs, comparatives ("tastes even better" is measured
    against the first), identity words ("same or similar"), correlatives ("either ... or"), loose list
    items with colons or dashes, fixed binomials ("pros and cons", "nice and warm"), and
    conjuncts that refer back with a pronoun ("the tent and its poles"). Commas and the
    coordinator stay where they are, so an Oxford comma is kept when the text has one.
    "but"/"yet" coordinations are never reordered: the second conjunct carries the weight of a
    contrast ("cheap but sturdy" praises, "sturdy but cheap" warns).
``reorder/adverbial`` (hold)
    Move an adverbial of the main clause across it. End -> front, with a comma ("The boat left
    after two hours." -> "After two hours, the boat left."); front -> end, the comma dropped, when
    the clause does not end in a noun the phrase could attach to ("On the first night, we ate the
    fish" stays). Kinds: prepositional phrases of time, place, condition, reason and frame ("on
    the first night", "since the refit", "because of the fog", "thanks to the crew", "in my
    experience", "for the price", "on my phone", "from the start"; after a predicate adjective or evaluative noun also "for two
    people", "for families", "for breakfast"), time noun phrases ("every week", "last night"),
    time and frequency adverbs ("yesterday", "lately", "sometimes"; "now" only to the front),
    sentence adverbs ("honestly", "unfortunately", "overall"; they keep a comma at the end), and
    adverbial clauses of time, condition and reason ("when we arrived", "if you like seafood",
    "because the staff are lovely", "every time I visit"). In a verbless sentence, a sentence
    adverb set off by a comma moves between the ends ("Honestly, great value." <-> "Great value,
    honestly.") and "for the price" moves to the front ("For the price, great food."). A phrase ending the clause may hang from the verb, from a
    predicate adjective ("is perfect for two people") or from the verb after "keep"/"start"
    ("keeps crashing since the update"). Only clean phrases: no coordination, approximation
    ("about two weeks", "or so"), clause inside a phrase, number in a time noun phrase ("two
    days"), "on time"; no "for" durations or beneficiaries ("waited for an hour", "bought it for
    my son"), no "value for money", not under verbs of duration, not a place with verbs of
    placement or motion ("stayed at the harbour"), not the predicate itself ("is in the garage").
    Skipped: questions, imperatives, parses that only look like a clause ("Keeps freezing ...",
    a verbless phrase and a clause taken for one subject), a name-tagged opening word whose
    capital would travel, sentences with contrast words, mentions, hashtags, links or other
    punctuation inside the clause (commas, colons, spaced dashes), coordinated verbs (the phrase
    would cover one conjunct only), a sentence adverb that would end up after a "that" clause; sentences with focus
    words (only, even, just, also, too), and with negation unless the phrase is outside its
    scope (sentence adverbs, "since ...", "in my experience", "for the price"); a clause that
    would put a pronoun of the main clause before a noun it may refer to ("It crashes whenever I
    open the map", "When the skipper arrived, she apologised").
``reorder/clauses`` (hold)
    Swap two independent clauses joined by "and" when neither tells a story or a cause: both
    are states (linking or stative verbs such as be, seem, feel, have, love, in any tense, also
    with a modal or the perfect; present adjectival passives), or one is a state and the other
    an event in the present (simple, perfect, progressive or after a modal) whose subjects are
    not "I", "we" or "you" ("the wifi drops and I'm stuck" is a cause). Skipped: a pronoun that
    may refer across ("the chair is sturdy and my dog loves it"; demonstrative articles such as
    "this cafe" point outside and are allowed), a noun mentioned in both clauses ("has a balcony
    and the balcony is huge"), sequence or addition words (then, later, so, also, too), commas
    inside a clause. A sentence adverbial or adverbial clause before the first subject ("Honestly,
    ...", "Since the refit, ...") covers both clauses and stays in front.
    Three or more clauses in a comma list closed by "and" ("The staff are helpful, the space is
    quiet and the showers are immaculate.") rotate by one under the same conditions; each item
    must open with its own subject and have a finite verb, and none may carry "I think"-like
    reporting or a contrast word.
``reorder/shuffle`` (none, diagnostic)
    A seeded random permutation of the content words (nouns, verbs, adjectives, adverbs,
    numbers) of each sentence; function words, negators and punctuation keep their places.
    Ungrammatical on purpose: it measures how much a model relies on word order.

Every variant keeps the source's words (``a``/``an`` count as one); the case of a word that
moves to or from the start of a sentence is fixed; proper nouns and "I" keep their capital.
"""

from __future__ import annotations

import re
from typing import TYPE_CHECKING, Iterator

from pairflip.perturb.base import NEGATORS, PUNCT_CLOSE, Candidate, Context, TokenEdit, is_question, lemma, sent_of, sents, tokens
from pairflip.perturb.intensifier import _is_adjective, indefinite_article, match_article

if TYPE_CHECKING:  # pragma: no cover
    from spacy.tokens import Doc, Span, Token

FAMILY = "reorder"
RULES = {
    "reorder/coordination": "hold",
    "reorder/adverbial": "hold",
    "reorder/clauses": "hold",
    "reorder/shuffle": "none",
}

COORDINATORS = {"np": {"and"}, "vp": {"and"}}  # kinds not listed accept DEFAULT_COORDINATORS
DEFAULT_COORDINATORS = {"and", "or"}
# Pronouns and determiners that point back to something said before (anaphora).
ANAPHORS = frozenset(
    "it its itself they them their theirs themselves this that these those he him his she her hers one ones "
    "which who whom whose mine yours ours".split()
)
# Quantifiers that stand for a noun said before them ("some [staff]", "others", "the rest").
_ELLIPTIC_SUBJECTS = frozenset("some others other many most few several both all rest each either another".split())
# Fixed binomials whose order is idiomatic (common practice; a short list for review text).
BINOMIALS = frozenset(
    tuple(p.split("+"))
    for p in (
        "salt+pepper pros+cons black+white up+down back+forth on+off in+out odds+ends bits+pieces "
        "nuts+bolts rock+roll bread+butter sooner+later more+less by+large now+then here+there "
        "trial+error wear+tear rain+shine give+take safe+sound loud+clear over+over again+again "
        "tried+true tried+tested plain+simple short+sweet first+foremost each+every hit+miss "
        "touch+go hook+loop cut+dried lock+key pick+choose heads+tails ups+downs ins+outs "
        "far+wide high+low hot+cold thick+thin"
    ).split()
)
HENDIADYS = frozenset({"nice", "good", "lovely", "fine"})  # "nice and warm" = very warm
SEQUENCE_WORDS = frozenset(
    "then later afterwards afterward after soon finally eventually next again so therefore thus also too "
    "either meanwhile now".split()
)
FOCUS_WORDS = frozenset({"only", "even", "just", "also", "too", "hardly", "barely", "scarcely", "either", "merely"})
# Linking and stative verbs: clauses headed by them describe states, whose order is free.
STATIVE_VERBS = frozenset(
    "be seem look feel sound smell taste stay remain appear have weigh cost fit contain include lack "
    "need hold work keep love like hate prefer".split()
)

# --- adverbials ---
TIME_NOUNS = frozenset(
    "morning mornings evening evenings afternoon afternoons night nights day days week weeks month months "
    "year years weekend weekends season seasons winter winters summer summers spring autumn fall "
    "minute minutes hour hours second seconds time times trip trips hike hikes outing outings vacation "
    "holiday holidays use uses wash washes dawn dusk sunrise sunset midnight noon breakfast lunch dinner "
    "brunch lunchtime lunchtimes weekday weekdays weeknight weeknights visit visits stay stays occasion "
    "occasions arrival "
    # occasions of service text: "fell off on the first ride", "answered on the second call"
    "ride rides journey journeys commute commutes call calls attempt attempts try appointment appointments "
    "session sessions shift shifts "
    "monday tuesday wednesday thursday friday saturday sunday january february march april may june july "
    "august september october november december start beginning end while".split()
)
CONDITION_NOUNS = frozenset(
    "rain snow wind winds storm storms cold heat weather conditions sun frost fog humidity downpour dark "
    "darkness drizzle sleet hail mud altitude".split()
)
PLACE_NOUNS = frozenset(
    "trail trails campsite campground backcountry mountains summit woods forest desert "
    "cafe café restaurant bar pub lobby reception office pool beach harbour harbor town city centre center "
    "station airport park garden terrace hotel gym shop store market venue".split()
)
PRICE_NOUNS = frozenset({"price", "prices", "money", "cost"})
PEOPLE_NOUNS = frozenset(
    "people person couple couples family families kid kids child children group groups beginner beginners "
    "guest guests visitor visitors adult adults student students".split()
)
# Devices and pages a service is used on ("works fine on my phone", "clearer in the app").
DEVICE_NOUNS = frozenset("phone phones tablet tablets laptop laptops app website site desktop computer".split())
MEAL_NOUNS = frozenset({"breakfast", "brunch", "lunch", "dinner", "supper"})
# Prepositions whose phrase is a free adjunct of the main verb when its noun is of the right kind
# (None: any noun).
ADJUNCT_PREPS = {
    "in": TIME_NOUNS | CONDITION_NOUNS | PLACE_NOUNS | DEVICE_NOUNS | {"experience", "opinion", "view"},
    "on": TIME_NOUNS | PLACE_NOUNS | DEVICE_NOUNS,
    "at": TIME_NOUNS | PLACE_NOUNS | {"altitude"},
    "for": PRICE_NOUNS,
    "from": frozenset({"start", "beginning", "outset"}),  # "from the start"  # "for the price"; not durations ("for an hour") or beneficiaries ("for my son")
    "after": None,  # any noun: "after two weeks", "after the first wash"
    "before": None,
    "during": None,
    "since": None,
    "until": None,
    "throughout": None,
    "within": TIME_NOUNS,
    "over": TIME_NOUNS,
    "by": TIME_NOUNS,  # "by the end of the week"
}
# The same, hanging from a predicate adjective that ends the clause ("is perfect for two
# people", "much better since the refit"); prepositions that an adjective selects ("close to",
# "happy with", "good at") are not listed.
ADJECTIVE_FRAME_PREPS = {
    "for": PRICE_NOUNS | PEOPLE_NOUNS | MEAL_NOUNS,
    "in": TIME_NOUNS | CONDITION_NOUNS | {"experience", "opinion", "view"},
    "on": TIME_NOUNS,
    "at": TIME_NOUNS,
    "after": None,
    "before": None,
    "during": None,
    "since": None,
    "throughout": None,
    "from": frozenset({"start", "beginning", "outset"}),
}
TIME_PREPS = frozenset({"after", "before", "during", "since", "until", "till", "throughout", "within", "over"})
TIME_UNITS = frozenset(
    "second seconds minute minutes hour hours day days week weeks month months year years afternoon "
    "morning evening night weekend".split()
)
DURATION_VERBS = frozenset({"last", "take", "run", "wait", "cost", "weigh", "hold"})
TIME_DETS = frozenset({"every", "each", "last", "this", "next", "that", "all", "one", "most", "some", "these"})
TIME_ADVERBS = frozenset(
    "yesterday today tonight recently lately nowadays eventually later afterwards afterward overnight".split()
)
FREQUENCY_ADVERBS = frozenset({"sometimes", "occasionally"})
# May move from the end to the front, not back: a "Now," that opens a sentence may be a discourse
# marker ("Now, about the price ...").
FRONTABLE_ONLY = frozenset({"now"})
STANCE_ADVERBS = frozenset(
    "honestly frankly personally overall luckily fortunately unfortunately thankfully sadly surprisingly "
    "admittedly ultimately basically generally apparently hopefully truthfully".split()
)
# Adverbial clauses of time, condition and reason that may stand before or after the main clause.
CLAUSE_MARKERS = frozenset({"when", "whenever", "if", "because", "once", "after", "before", "since", "until", "unless"})
ARGUMENT_VERBS = frozenset(  # verbs whose place phrase is an argument ("left it in the car")
    "put leave keep store place hang set stand sit lie live go come get arrive drive walk take bring "
    "carry fit pack move send ship return stay remain work wait sleep eat spend".split()
)
CONTRAST = frozenset({"but", "yet", "although", "though", "while", "whereas", "however"})
CATENATIVES = frozenset({"keep", "start", "begin", "stop", "continue"})  # "keeps crashing"
DEMONSTRATIVES = frozenset({"this", "that", "these", "those"})
# Coordinations that may be rotated: adjectives, manner adverbs and noun phrases with their own
# article or adjective; verb and prepositional phrases are not (their modifiers re-attach to the
# wrong conjunct: "corned beef on rye and soup").
SAFE_KINDS = frozenset({"adj", "adv", "np", "vp"})
# Verb phrases rotate only when every verb is a linking verb of perception or "work" in the
# simple present, each with its own complement ("looks great and tastes amazing"): they describe
# properties, not a sequence of events.
LINKING_VERBS = frozenset({"look", "taste", "smell", "sound", "feel", "seem", "work"})
NOT_SCALAR = frozenset({"same", "similar", "other", "different", "next", "last", "first", "only", "own", "such"})
CONTENT_POS = frozenset({"NOUN", "PROPN", "VERB", "ADJ", "ADV", "NUM"})


def candidates(doc: "Doc", ctx: Context) -> Iterator[Candidate]:
    """Every reorder variant the parse supports; shuffle last (it consumes ``ctx.rng``)."""
    for sent in sents(doc):
        yield from _coordination(sent, ctx)
        yield from _verbless_list(sent, ctx)
        yield from _adverbial(sent, ctx)
        yield from _clauses(sent, ctx)
        yield from _clause_list(sent, ctx)
    shuffled = _shuffle(doc, ctx)
    if shuffled is not None:
        yield shuffled


# --- case helpers ----------------------------------------------------------------------------


def _keeps_capital(tok: "Token") -> bool:
    t = tok.text
    return tok.pos_ == "PROPN" or t == "I" or t.startswith("I'") or (t.isupper() and len(t) > 1)


def _span_text(doc: "Doc", a: int, b: int, *, initial: bool, was_initial: bool) -> str:
    """Text of ``doc[a:b]`` for a new position: capitalised at a sentence start, lower-cased
    when it leaves one (unless it starts with a proper noun, "I" or an acronym)."""
    text = doc[a:b].text
    if initial:
        # only where the sentence had a capital: all-lower-case text stays lower case
        sent = sent_of(tokens(doc)[a])
        first = next((t for t in sent if t.is_alpha), tokens(doc)[sent.start])
        return text[:1].upper() + text[1:] if first.text[:1].isupper() else text
    if was_initial and not _keeps_capital(tokens(doc)[a]):
        return text[:1].lower() + text[1:]
    return text


def _last_word(sent: "Span") -> int:
    """Index of the last non-punctuation token of the sentence (or -1)."""
    for tok in reversed(sent):
        if not tok.is_punct and not tok.is_space:
            return tok.i
    return -1


def _is_question(sent: "Span") -> bool:
    return is_question(sent)


# --- coordination ----------------------------------------------------------------------------


# Manner adverbs that make a past participle an adjective of quality ("well located", "badly made").
_QUALITY_ADVERBS = frozenset("well badly poorly nicely beautifully properly".split())


def _kind(tok: "Token", lex) -> str | None:
    if tok.pos_ == "ADJ" or _is_adjective(tok, lex):
        return "adj"
    if tok.tag_ == "VBN" and [c.lower_ for c in tok.children if c.dep_ not in ("cc", "conj", "punct")] in (
            [w] for w in _QUALITY_ADVERBS) and tok.i > 0 and tok.doc[tok.i - 1].lower_ in _QUALITY_ADVERBS:
        return "adj"  # "quiet, tidy and well managed": a participle of quality in a list of adjectives
    if tok.pos_ == "ADV":
        return "adv"
    if tok.pos_ in ("NOUN", "PROPN"):
        return "np"
    if tok.pos_ in ("VERB", "AUX"):
        return "vp"
    if tok.pos_ == "ADP":
        return "pp"
    return None


def _conjuncts(head: "Token") -> list["Token"]:
    out = [head]
    for c in head.children:
        if c.dep_ == "conj":
            out.extend(_conjuncts(c))
    return sorted(out, key=lambda t: t.i)


def _conjunct_span(tok: "Token", kind: str, others: set[int]) -> tuple[int, int] | None:
    """Token range of one conjunct: its subtree without the other conjuncts, coordinators and
    edge punctuation (for an adjective, without the noun's article)."""
    skip: set[int] = set()
    for c in tok.children:
        if c.i in others or c.dep_ in ("cc", "preconj", "conj"):
            skip.update(t.i for t in c.subtree)
        elif kind in ("adj", "adv") and c.dep_ in ("det", "poss", "nummod"):
            skip.update(t.i for t in c.subtree)  # "A light and warm bag": the article is the noun's
    idx = sorted(t.i for t in tok.subtree if t.i not in skip)
    if kind == "vp":
        idx = [i for i in idx if i >= tok.i]  # the subject is shared
    while idx and (tok.doc[idx[0]].is_punct):
        idx.pop(0)
    while idx and (tok.doc[idx[-1]].is_punct):
        idx.pop()
    if not idx or idx != list(range(idx[0], idx[-1] + 1)):
        return None
    if any(tok.doc[i].is_punct and tok.doc[i].text not in ("-", "'") for i in idx):
        return None  # "warm, windproof and packable" parsed with "warm, windproof" as one conjunct
    return idx[0], idx[-1] + 1


def _degree(t: "Token", head: "Token") -> bool:
    """A bare degree adverb of ``head`` before it ("very", "really")."""
    return t.dep_ == "advmod" and t.head.i == head.i and t.i < head.i and not list(t.children)


def _conjunct_shape(doc: "Doc", a: int, b: int, head: "Token", kind: str) -> str | None:
    """"plain" (the word after its own premodifiers: "very light", "the friendly staff"),
    "complement" (an adjective with its own prepositional or infinitive complement: "close to the
    beach", "happy to help"; a noun with a prepositional modifier: "a view of the bay"), or None
    when the conjunct is anything else."""
    for i in range(a, b):
        t = tokens(doc)[i]
        if t.text[:1] in "#@" or t.like_url or any(ch in t.text for ch in "-/_#@"):
            return None  # glued hyphen, slash, hashtag or link ("s-video", "#map", "a/b")
    if a > 0 and not tokens(doc)[a - 1].whitespace_ and tokens(doc)[a - 1].text in ("-", "/", "#", "@", "&", "+"):
        return None
    if b < len(doc) and not tokens(doc)[b - 1].whitespace_ and tokens(doc)[b].text in ("-", "/", "&", "+"):
        return None
    for c in head.children:  # premodifiers
        if not (a <= c.i < head.i):
            continue
        if kind in ("adj", "adv"):
            if not _degree(c, head):
                return None
        elif c.dep_ not in ("det", "poss", "amod", "compound") or c.pos_ == "VERB" or any(
            t.pos_ == "NUM" or t.like_num or t.dep_ not in ("det", "poss", "amod", "compound", "advmod", "case")
            for t in c.subtree
        ):
            return None  # "the really friendly staff", "great customer service"; not "two pools"
    post = [c for c in head.children if c.i > head.i and a <= c.i < b]
    if not post:
        return "plain"
    if kind == "adv":
        return None
    if kind == "vp":
        ok = all(c.dep_ in ("acomp", "advmod", "oprd") and not any(
            t.dep_ in ("prep", "cc", "conj", "advcl", "relcl", "mark") or t.is_punct for t in c.subtree) for c in post)
        return "plain" if ok else None  # "looks great", "works well"; no phrase that might be shared
    if kind == "adj" and all(c.lower_ == "enough" and not list(c.children) for c in post):
        return "plain"  # "big enough"
    for c in post:
        if c.dep_ == "advmod" and c.lower_ == "enough":
            continue
        if c.dep_ not in (("prep", "xcomp") if kind == "adj" else ("prep",)):
            return None  # relative clauses and the like: "the pool that opened last year"
        if c.dep_ == "prep" and c.lower_ in TIME_PREPS:
            return None  # "helpful during our stay": an adjunct of the clause, which may cover every conjunct
        sub = list(c.subtree)
        if any(t.dep_ in ("cc", "conj", "relcl", "acl", "advcl", "mark", "ccomp") or t.lower_ in NEGATORS
               or t.dep_ == "neg" for t in sub):
            return None
        if c.dep_ == "prep" and any(t.pos_ in ("VERB", "AUX") for t in sub):
            return None  # "keen on booking again": a clause inside
    return "complement"


def _rotation(shapes: list[str]) -> list[int] | None:
    """The new order of the conjuncts, or None. Rotate by one (A, B, C -> B, C, A) when every
    conjunct is plain or every one has its own complement. A complement on the last conjunct
    alone may belong to all of them ("quick and easy to use"), so it keeps its place and the
    plain ones before it rotate ("clean, quiet and close to the beach" -> "quiet, clean and close
    to the beach"); with only one plain conjunct before it, the pair is skipped. A complement on
    an earlier conjunct only would land last, where it may be read as shared: skipped."""
    n = len(shapes)
    if len(set(shapes)) == 1:
        return list(range(1, n)) + [0]
    if shapes[-1] == "complement" and all(s == "plain" for s in shapes[:-1]) and n >= 3:
        return list(range(1, n - 1)) + [0, n - 1]
    return None


def _coordination(sent: "Span", ctx: Context) -> Iterator[Candidate]:
    doc = sent.doc
    lex = ctx.lexicon
    # heads with a "conj" child, found in one pass over the tokens (not a scan of every token's children)
    conj_heads = sorted({t.head.i for t in sent if t.dep_ == "conj" and t.head.i != t.i})
    loose = any(t.text in (":", "-", "--", "(", ")") or t.lower_ in ("either", "neither", "both", "whether") for t in sent)
    if any(_ELONGATED.search(t.lower_) for t in sent if t.is_alpha):
        return  # "holds sooooo much music and audio files": emphatic spelling, the parse is unsure (blind review, round 15)
    for hi in conj_heads:
        head = tokens(doc)[hi]
        if head.dep_ == "conj" or not (sent.start <= hi < sent.end):
            continue
        conj = _conjuncts(head)
        if not 2 <= len(conj) <= 5:
            continue
        kinds = {_kind(t, lex) for t in conj}
        if len(kinds) != 1 or None in kinds:
            continue
        kind = kinds.pop()
        if kind not in SAFE_KINDS:
            continue  # verb and prepositional conjuncts carry modifiers that re-attach
        if kind == "np" and any(t.pos_ != "NOUN" for t in conj):
            continue  # names ("Mara and Tobin") and adjectives the tagger took for nouns
        if kind == "vp" and not _linking_vps(conj):
            continue  # "pitched it and slept in it", "heats quickly and shuts off": events in sequence
        if kind in ("adj", "adv") and head.dep_ in ("pobj", "dobj", "nsubj", "nsubjpass", "compound"):
            continue  # "reliable in the cold and easy to light": "cold" is not coordinated with "easy"
        if kind == "np" and head.dep_ == "compound":
            continue  # "the fish and chip shop"
        if any(c.lower_ in ("other", "another") for t in conj for c in t.subtree):
            continue  # "one cd classified as classic rock and the other psychedelic rock": a gapped clause (round 18v)
        ccs = [c for t in conj for c in t.children if c.dep_ == "cc"]
        if len(ccs) != 1 or ccs[0].lower_ not in COORDINATORS.get(kind, DEFAULT_COORDINATORS):
            continue
        if any(c.dep_ == "preconj" for t in conj for c in t.children):
            continue
        ids = {t.i for t in conj}
        spans = [_conjunct_span(t, kind, ids - {t.i}) for t in conj]
        if any(s is None for s in spans):
            continue
        # only commas and the coordinator between the conjuncts
        if not all(spans[k][1] <= spans[k + 1][0] for k in range(len(spans) - 1)):
            continue
        between = [tokens(doc)[i] for k in range(len(spans) - 1) for i in range(spans[k][1], spans[k + 1][0])]
        if any(not (t.text == "," or t.i == ccs[0].i) for t in between) or ccs[0].i not in {t.i for t in between}:
            continue
        if ccs[0].i > spans[-1][0] or ccs[0].i < spans[-2][1]:
            continue  # the coordinator must come right before the last conjunct
        before = tokens(doc)[spans[0][0] - 1] if spans[0][0] > sent.start else None
        if kind == "adj" and before is not None and before.dep_ in ("amod", "advmod") and before.head.i not in ids \
                and before.pos_ in ("ADJ", "ADV"):
            continue  # "less haze and astonishingly real colors": "less" scopes over the first item only (round 17v)
        after = spans[-1][1]
        if kind in ("adj", "adv") and after < sent.end and tokens(doc)[after].lower_ == "to" and tokens(doc)[after].head.i not in ids:
            continue  # "dark, stuffy and hard to move around in" misparsed: the infinitive goes with the last one
        shapes = [_conjunct_shape(doc, a, b, t, kind) for (a, b), t in zip(spans, conj)]
        if None in shapes:
            continue
        order = _rotation(shapes)  # type: ignore[arg-type]
        if order is None:
            continue
        if loose:
            continue  # loose list items ("pros: size - small and ..."), correlatives ("either ... or")
        if any(t.lower_ in NOT_SCALAR for t in conj):
            continue  # "the same or similar problems": identity words, not qualities
        if kind == "adv" and any(not (t.lower_.endswith("ly") or lex.lookup(t.lower_, "ADV")) or t.lower_ in FOCUS_WORDS for t in conj):
            continue  # "configured properly or just isn't": only manner adverbs
        if _negation_shared(head, conj):
            continue
        if any(t.lower_ in FOCUS_WORDS or (kind == "vp" and t.tag_ in ("JJR", "RBR")) for a, b in spans for t in doc[a:b]):
            continue  # "smells lovely and tastes even better": the second is measured against the first
        toks = [doc[a:b] for a, b in spans]
        texts = [s.text.lower() for s in toks]
        if len(set(texts)) != len(texts):
            continue
        if not _coordination_ok(kind, conj, toks, texts, lex):
            continue
        edits = []
        for pos, src in enumerate(order):
            if pos == src:
                continue
            a, b = spans[pos]
            sa, sb = spans[src]
            initial = a == sent.start
            text = _span_text(doc, sa, sb, initial=initial, was_initial=sa == sent.start)
            edits.append(TokenEdit(a, b, text))
        # keep "a"/"an" in agreement with the new first word ("an easy and quick" -> "a quick and easy")
        a0 = spans[0][0]
        if kind == "adj" and a0 > sent.start and tokens(doc)[a0 - 1].lower_ in ("a", "an") and tokens(doc)[a0 - 1].tag_ == "DT":
            art = tokens(doc)[a0 - 1]
            new_art = match_article(indefinite_article(doc[spans[order[0]][0]].text), art.text)
            if new_art != art.text:
                edits.insert(0, TokenEdit(art.i, art.i + 1, new_art))
        yield Candidate(
            "reorder/coordination", RULES["reorder/coordination"], tuple(edits),
            {"kind": kind, "conjuncts": len(spans), "coordinator": ccs[0].lower_,
             "fixed_last": order[-1] == len(order) - 1},
        )


def _verbless_list(sent: "Span", ctx: Context) -> Iterator[Candidate]:
    """A verbless sentence that is only a comma list, with no coordinator, of noun phrases each
    with its own opinion adjective and no article ("Fair prices, quick service." -> "Quick
    service, fair prices."), or of opinion adjectives ("Quick, easy, delicious." -> "Easy,
    delicious, quick."). The items are cut at the commas, since spaCy links them as appositions
    or conjuncts by turns; each must be one phrase of the parse. An article ("Our host, a retired
    sailor") or an item without an opinion adjective may be a real apposition and is left alone."""
    doc = sent.doc
    root = sent.root
    if root.pos_ not in ("NOUN", "ADJ") or _is_question(sent):
        return
    last = _last_word(sent)
    body = list(doc[sent.start : last + 1])
    if any(t.pos_ in ("VERB", "AUX") or t.dep_ in ("cc", "preconj") for t in body):
        return
    puncts = [t for t in body if _loose_punct(t)]
    if not puncts or any(t.text != "," for t in puncts):
        return
    cuts = [t.i for t in puncts]
    spans = list(zip([sent.start] + [i + 1 for i in cuts], cuts + [last + 1]))
    if not 2 <= len(spans) <= 5 or any(b <= a for a, b in spans):
        return
    kinds = set()
    for a, b in spans:
        top = [t for t in doc[a:b] if not (a <= t.head.i < b) or t.head.i == t.i]
        if len(top) != 1:
            return
        t = top[0]
        if t.pos_ == "NOUN":
            if any(c.dep_ in ("det", "poss") for c in t.children):
                return
            if not any(c.dep_ == "amod" and ctx.lexicon.lookup(c.lower_, "ADJ") is not None for c in t.children):
                return
        elif t.pos_ != "ADJ" or ctx.lexicon.lookup(t.lower_, "ADJ") is None:
            return
        kind = "np" if t.pos_ == "NOUN" else "adj"
        if _conjunct_shape(doc, a, b, t, kind) != "plain":
            return
        kinds.add(kind)
    if len(kinds) != 1:
        return
    if any(t.lower_ in NEGATORS or t.like_num or t.lower_ in SEQUENCE_WORDS for t in body):
        return
    texts = [doc[a:b].text.lower() for a, b in spans]
    if len(set(texts)) != len(texts):
        return
    edits = _rotate_spans(sent, spans)
    yield Candidate(
        "reorder/coordination", RULES["reorder/coordination"], tuple(edits),
        {"kind": kinds.pop() + "-list", "conjuncts": len(spans), "coordinator": ","},
    )


def _rotate_spans(sent: "Span", spans: list[tuple[int, int]]) -> list[TokenEdit]:
    """Edits that rotate the token spans by one (A, B, C -> B, C, A), fixing the capital of the
    span that moves to or from the sentence start; the text between the spans stays."""
    doc = sent.doc
    order = list(range(1, len(spans))) + [0]
    edits = []
    for pos, src in enumerate(order):
        a, b = spans[pos]
        sa, sb = spans[src]
        edits.append(TokenEdit(a, b, _span_text(doc, sa, sb, initial=a == sent.start, was_initial=sa == sent.start)))
    return edits


def _linking_vps(conj: list["Token"]) -> bool:
    """Every verb a present-tense linking verb with no auxiliary, negation or subject of its own,
    and nothing between the first verb and its subject ("It quickly ...")."""
    for k, v in enumerate(conj):
        if lemma(v) not in LINKING_VERBS or v.tag_ not in ("VBZ", "VBP"):
            return False
        if any(c.dep_ in ("aux", "auxpass", "neg", "expl") or (k > 0 and c.dep_ in ("nsubj", "nsubjpass")) for c in v.children):
            return False
        if not any(c.dep_ in ("acomp", "advmod", "oprd") and c.i > v.i for c in v.children):
            return False
    first = conj[0]
    subj = [c for c in first.children if c.dep_ in ("nsubj", "nsubjpass")]
    return len(subj) == 1 and subj[0].right_edge.i == first.i - 1


def _has_negator(tok: "Token") -> bool:
    return tok.lower_ in NEGATORS or any(c.lower_ in NEGATORS or c.dep_ == "neg" for c in tok.children)


def _negation_shared(head: "Token", conj: list["Token"]) -> bool:
    """A negation whose scope the order would change: on the word that governs the coordination
    ("is not tight and secure"), or on the first conjunct only ("no cables and batteries").
    Every conjunct with its own ("no cables and no batteries") is free to move."""
    if _has_negator(head.head) and head.head.i != head.i:
        return True
    negated = [_has_negator(t) for t in conj]
    return negated[0] and not all(negated)


def _coordination_ok(kind: str, conj: list["Token"], toks: list["Span"], texts: list[str], lex) -> bool:
    if kind == "np":
        heads = tuple(lemma(t).lower() for t in conj)
        if len(heads) == 2 and (heads in BINOMIALS or (conj[0].lower_, conj[1].lower_) in BINOMIALS):
            return False
        det = [any(c.dep_ in ("det", "poss") for c in t.children) for t in conj]
        mod = [any(c.dep_ == "amod" for c in t.children) for t in conj]
        if det[0] and not all(det):
            return False  # "the poles and stakes": a shared determiner must not become one conjunct's own
        if not all(d or m for d, m in zip(det, mod)):
            return False  # "great coffee and cake": the adjective may cover both; bare pairs are often fixed ("fish and chips")
        if any(lex.lookup(t.lower_, "ADJ") is not None and lex.lookup(t.lower_, "NOUN") is None for t in conj):
            return False  # an adjective the tagger took for a noun ("a light and warm bag")
        if any(t.lower_ in _YOURE_WORDS and any(c.lower_ == "your" for c in t.children) for t in conj):
            return False  # "get some headphones and your set": "your" for "you're" (blind review, round 15)
        verb = conj[0].head
        if conj[0].dep_ in ("attr", "nsubj") and any(c.dep_ == "expl" for c in verb.children):
            return False  # "there is a pool and two saunas": the verb agrees with the first conjunct
        if conj[0].dep_ in ("nsubj", "nsubjpass") and len(set(det)) != 1:
            return False  # "Warm bread and the cakes are fresh": a fragment, then a clause, parsed as one subject
        root = conj[0].sent.root
        if conj[0].i > root.i and any(c.dep_ == "ccomp" and c.i < root.i and any(t.text == "," for t in root.doc[c.i:root.i]) for c in root.children):
            return False  # "The stove is slow, I burn my fingers and the pot wobbles": a comma splice, the last "conjunct" a clause
        after = toks[-1].end
        nxt = toks[-1].doc[after] if after < len(toks[-1].doc) else None
        above = {t.i for t in conj[0].ancestors}
        if nxt is not None and not nxt.is_punct and nxt.i not in above and not (
            nxt.head.i in above and nxt.dep_ in ("aux", "auxpass", "neg", "advmod", "cc")
        ):
            return False  # "warm in the mornings and the bar staff know you": the last "conjunct" is a clause's subject
    elif len(toks) == 2 and (texts[0], texts[1]) in BINOMIALS:
        return False
    if texts[0] in HENDIADYS and kind == "adj":
        return False
    for k, span in enumerate(toks):
        for t in span:
            if t.pos_ == "NUM" or t.like_num:
                return False
            if k > 0 and t.lower_ in ANAPHORS:
                return False  # "the tent and its poles"
            if t.lower_ in SEQUENCE_WORDS:
                return False
    return True


# --- adverbials ------------------------------------------------------------------------------


def _third_person(toks) -> bool:
    return any(t.lower_ in ANAPHORS and (t.pos_ == "PRON" or t.dep_ in ("poss", "nsubj", "dobj", "pobj", "nsubjpass")) for t in toks)


def _adjunct(tok: "Token", root: "Token", host: "Token") -> bool:
    """Is ``tok`` (a dependent of the main verb, or of the predicate adjective ``host``) a free
    time, frequency, place, condition, reason or frame adjunct?"""
    if any(t.lower_ in ANAPHORS or t.pos_ == "PRON" and t.lower_ not in ("my", "our", "your") for t in tok.subtree):
        return False
    on_adjective = host.i != root.i
    if tok.dep_ == "prep":
        word = tok.lower_
        if word in ("because", "due") and tok.left_edge.i == tok.i:
            # "because of the fog", "due to the fog": the object hangs from the preposition or from "of" / "to"
            return _reason_object(tok, "of" if word == "because" else "to")
        allowed = (ADJECTIVE_FRAME_PREPS if on_adjective else ADJUNCT_PREPS).get(word, ())
        if allowed == () or tok.left_edge.i != tok.i:
            return False  # "held up well after three years": "well after" is not one phrase
        if word in ("until", "till", "to", "through") and any(
            c.dep_ == "prep" and c.lower_ == "from" for c in root.children
        ):
            return False  # "from midnight until dawn" is one span of time
        if lemma(root) in DURATION_VERBS and word in ("for", "in", "over", "within"):
            return False  # "will last for years": the duration is the verb's complement
        objs = [c for c in tok.children if c.dep_ == "pobj"]
        if len(objs) != 1 or objs[0].pos_ not in ("NOUN", "PROPN") or len(list(tok.children)) != 1:
            return False
        noun = objs[0]
        if word == "in" and (
            any(c.like_num for c in noun.subtree)
            or noun.lower_ in TIME_UNITS and not any(c.lower_ in ("the", "this", "that") for c in noun.children)
        ):
            return False  # "charges in two hours", "folds flat in seconds": time to completion, not a frame
        if allowed is not None and noun.lower_ not in allowed:
            return False
        if word in ("on", "in") and noun.lower_ == "time" and not list(noun.children):
            return False  # "arrived on time", "in time": punctuality, not a time frame
        if word in ("on", "off") and lemma(root) in ARGUMENT_VERBS and any(
                c.dep_ == "dobj" and c.i < tok.i for c in root.children) and any(
                c.lower_ in ("all", "most", "every", "each") for c in noun.subtree):
            return False  # "leave the filter on all the time": "on" goes with the verb (blind review, round 10)
        if noun.lower_ in DEVICE_NOUNS and not any(c.dep_ in ("acomp", "advmod", "attr", "dobj") for c in root.children):
            return False  # "we have booked on three laptops": at the front, the verb is left bare
        if noun.lower_ in PLACE_NOUNS and lemma(root) in ARGUMENT_VERBS or \
                noun.lower_ in DEVICE_NOUNS and lemma(root) in ARGUMENT_VERBS - {"work"}:
            return False  # "we stayed at the harbour": the place is the verb's argument
        return True
    if on_adjective:
        return False
    if tok.dep_ == "npadvmod" and tok.lower_ == "thanks" and tok.left_edge.i == tok.i:
        return _reason_object(tok, "to")  # "thanks to the crew"
    if tok.dep_ == "npadvmod" and tok.lower_ in TIME_ADVERBS and not list(tok.children):
        return True  # "yesterday", tagged as a noun
    if tok.dep_ == "npadvmod" and tok.pos_ == "NOUN" and tok.lower_ in TIME_NOUNS:
        if lemma(root) in DURATION_VERBS:
            return False  # "it took all day"
        kids = list(tok.children)
        return len(kids) == 1 and kids[0].lower_ in TIME_DETS and kids[0].dep_ in ("det", "amod")  # "every week", "last night"
    if tok.dep_ == "advmod" and tok.pos_ == "ADV" and not list(tok.children):
        return tok.lower_ in TIME_ADVERBS | FREQUENCY_ADVERBS | STANCE_ADVERBS | FRONTABLE_ONLY
    return False


def _reason_object(tok: "Token", link_word: str) -> bool:
    """``tok`` + ``link_word`` + one noun phrase and nothing else ("because of the fog")."""
    kids = list(tok.children)
    links = [c for c in kids if c.dep_ in ("pcomp", "prep") and c.lower_ == link_word and c.i == tok.i + 1]
    if len(links) != 1:
        return False
    rest = [c for c in kids if c.i != links[0].i] + list(links[0].children)
    return len(rest) == 1 and rest[0].dep_ == "pobj" and rest[0].pos_ == "NOUN"


def _every_time(tok: "Token") -> bool:
    """"every time" / "each time" with a clause of its own, a clause of time like "whenever"."""
    kids = list(tok.children)
    return (
        tok.dep_ == "npadvmod" and tok.lower_ == "time" and len(kids) == 2
        and kids[0].dep_ == "det" and kids[0].lower_ in ("every", "each") and kids[0].i == tok.i - 1
        and kids[1].dep_ == "relcl" and kids[1].pos_ in ("VERB", "AUX")
    )


def _loose_punct(t: "Token") -> bool:
    """Punctuation other than an apostrophe or a hyphen inside a word ("well-lit"); a spaced dash
    counts ("... elsewhere - a minor quibble")."""
    if not t.is_punct:
        return False
    if t.text == "'":
        return False
    if t.text == "-" and not t.whitespace_ and t.i > 0 and not t.doc[t.i - 1].whitespace_:
        return False
    return True


def _reason(tok: "Token") -> bool:
    return tok.lower_ in ("because", "due", "thanks") and tok.left_edge.i == tok.i


# Verbs of saying whose complement clause the parser may take for the main clause.
_SAY_VERBS = frozenset("tell say promise assure inform hear write reply answer".split())


def _clause_adjunct(tok: "Token", root: "Token") -> bool:
    """An adverbial clause of time, condition or reason that may stand at either end ("when we
    arrived", "if you like seafood", "because the staff are lovely")."""
    sub = list(tok.subtree)
    if _every_time(tok):
        verb = next(c for c in tok.children if c.dep_ == "relcl")  # "every time I open the app"
    else:
        if tok.dep_ != "advcl" or tok.pos_ not in ("VERB", "AUX"):
            return False
        first = sub[0]
        if first.lower_ not in CLAUSE_MARKERS or first.head.i != tok.i or first.dep_ not in ("mark", "advmod"):
            return False
        if first.lower_ == "after" and len(sub) > 1 and sub[1].lower_ == "all":
            return False  # "after all those players have ...": "after all" means "since" (round 19v)
        verb = tok
    if not any(c.dep_ in ("nsubj", "nsubjpass", "expl") for c in verb.children):
        return False  # "after waiting an hour": the subject is the main clause's
    if lemma(verb).lower() in _SAY_VERBS and not any(c.dep_ in ("ccomp", "dobj", "xcomp", "dative") for c in verb.children):
        return False  # "Each time I get told someone will call": what was told is the "main" clause (round 17)
    if len(sub) > 14:
        return False
    if any(t.dep_ == "pcomp" and t.pos_ == "VERB" for t in sub):
        return False  # "when we travel without paying": the gerund may belong to the main clause
    return not any(t.is_punct and t.text not in ("'", "-") or t.dep_ in ("cc", "conj") or t.text[:1] in "@#" for t in sub)


def _adverbial(sent: "Span", ctx: Context) -> Iterator[Candidate]:
    doc = sent.doc
    root = sent.root
    if not _is_question(sent) and root.pos_ in ("NOUN", "ADJ"):
        yield from _fragment_stance(sent, root)
        yield from _fragment_price(sent, root)
    if _is_question(sent) or root.pos_ not in ("VERB", "AUX"):
        return
    if any(t.lower_ in CONTRAST and t.pos_ != "NOUN" for t in sent):
        return  # attachment: "stiff at first but comfortable after a week"
    if any(t.text[:1] in "@#" or t.like_url or t.text in (":", ";") for t in sent):
        return  # tweets with mentions, hashtags or links; lists with colons
    if any(t.lower_ in ("lol", "lmao", "haha", "rofl", "omg") for t in sent):
        return  # "wifi drops every time the microwave is on lol": the tag would land mid-sentence (round 16)
    if any(t.lower_ in ("now", "here", "again", "on", "up", "back") and t.i + 2 < len(doc) and tokens(doc)[t.i + 1].lower_ == "and"
           and tokens(doc)[t.i + 2].lower_ in ("then", "there", "again", "off", "down", "forth") for t in sent):
        return  # "now and then", "on and off": a fixed pair, not two adverbials (round 16)
    # negation and focus words: the move would change their scope ("didn't leak in the rain",
    # "only leaks in heavy rain"); a sentence adverb set off by a comma is outside any scope
    negated = any(t.lower_ in NEGATORS or t.dep_ == "neg" for t in sent)
    focused = any(t.lower_ in FOCUS_WORDS and not _degree_too(t) for t in sent)
    scoped = "focus" if focused else "negation" if negated else ""
    subj = [c for c in root.children if c.dep_ in ("nsubj", "nsubjpass", "expl")]
    if len(subj) != 1 or _not_a_clause(root, subj[0]):
        return  # imperatives and fragments
    if any(c.dep_ == "conj" and c.pos_ in ("VERB", "AUX") for c in root.children):
        return  # "At night, A and B": at the other end the phrase would cover only one conjunct
    subj = subj[0]
    if _present_perfect(root) and any(
            (c.dep_ == "prep" and c.lower_ in ("after", "before")) or (c.dep_ == "advcl" and any(
                m.dep_ in ("mark", "advmod") and m.lower_ in ("once", "after", "before", "when") for m in c.children))
            for c in root.children):
        return  # "Once it was running it has been stable", "I've attached a photo ... after the install" (blind review, round 15)
    last = _last_word(sent)
    if last < 0:
        return
    yield from _to_front(sent, root, subj, last, scoped)
    yield from _to_end(sent, root, subj, last, scoped)


_ELONGATED = re.compile(r"([a-z])\1\1")
# Words after a "your" that is most likely "you're" ("your set", "your welcome"); common practice.
_YOURE_WORDS = frozenset("set done good welcome right fine ready sorted wrong sure".split())
# Verbs that want an object: a fronted "if you have" with none lost it to the parse.
_TRANSITIVE = frozenset("have get take make need want give find buy use bring".split())


def _present_perfect(root: "Token") -> bool:
    """"has been", "I've attached": a present perfect links the event to now, so a past time
    frame ("after the install", "once it was running") moved across it reads badly or attaches
    to something else."""
    return root.tag_ == "VBN" and any(c.dep_ == "aux" and c.lower_ in ("has", "have", "'ve", "'s") and c.tag_ in ("VBZ", "VBP")
                                      for c in root.children)


def _fragment_stance(sent: "Span", root: "Token") -> Iterator[Candidate]:
    """A sentence adverb set off by a comma at either end of a verbless sentence ("Honestly,
    great value." <-> "Great value, honestly.")."""
    doc = sent.doc
    last = _last_word(sent)
    if last - sent.start < 3 or not (last + 1 < sent.end or sent.end == len(doc)):
        return
    if any(t.lower_ in CONTRAST or t.text in (":", ";") or t.text[:1] in "@#" for t in sent):
        return
    first, end = tokens(doc)[sent.start], tokens(doc)[last]
    def stance(t: "Token") -> bool:
        return t.lower_ in STANCE_ADVERBS and t.head.i == root.i and not list(t.children)
    body_ok = lambda a, b: not any(t.is_punct and t.text not in ("'", "-") for t in doc[a:b])
    if stance(first) and tokens(doc)[sent.start + 1].text == "," and body_ok(sent.start + 2, last + 1):
        nxt = sent.start + 2
        edits = [TokenEdit(sent.start, nxt, ""), TokenEdit(last, last + 1, end.text + ", " + first.text.lower())]
        cap = _span_text(doc, nxt, nxt + 1, initial=True, was_initial=False)
        if cap != tokens(doc)[nxt].text:
            edits.insert(1, TokenEdit(nxt, nxt + 1, cap))
        yield Candidate("reorder/adverbial", RULES["reorder/adverbial"], tuple(edits),
                        {"direction": "to-end", "kind": "stance", "phrase": first.text})
    elif stance(end) and tokens(doc)[last - 1].text == "," and body_ok(sent.start, last - 1):
        moved = _span_text(doc, last, last + 1, initial=True, was_initial=False)
        edits = [TokenEdit(sent.start, sent.start, moved + ",")]
        low = _span_text(doc, sent.start, sent.start + 1, initial=False, was_initial=True)
        if low != first.text:
            edits.append(TokenEdit(sent.start, sent.start + 1, low))
        edits.append(TokenEdit(last - 1, last + 1, ""))
        yield Candidate("reorder/adverbial", RULES["reorder/adverbial"], tuple(edits),
                        {"direction": "to-front", "kind": "stance", "phrase": end.text})


def _fragment_price(sent: "Span", root: "Token") -> Iterator[Candidate]:
    """"for the price" / "for the money" ending a verbless noun phrase with an adjective
    moves to the front ("Great food for the price." -> "For the price, great food.")."""
    doc = sent.doc
    last = _last_word(sent)
    if root.pos_ != "NOUN" or sent.start != root.left_edge.i or not (last + 1 < sent.end or sent.end == len(doc)):
        return
    if not any(c.dep_ == "amod" and c.i < root.i and c.pos_ == "ADJ" for c in root.children):
        return  # "great food", "small portions": a judgement the price frames
    tail = [c for c in root.children if c.i > root.i and not c.is_punct]
    if len(tail) != 1 or tail[0].dep_ != "prep" or tail[0].lower_ != "for" or tail[0].right_edge.i != last:
        return
    objs = [c for c in tail[0].children if c.dep_ == "pobj"]
    if len(list(tail[0].children)) != 1 or len(objs) != 1 or objs[0].lower_ not in PRICE_NOUNS:
        return
    if [(c.dep_, c.lower_) for c in objs[0].children] != [("det", "the")]:
        return  # "value for money" is one phrase
    if any(t.is_punct and t.text not in ("'", "-") or t.lower_ in NEGATORS for t in doc[sent.start : last + 1]):
        return
    a = tail[0].i
    moved = _span_text(doc, a, last + 1, initial=True, was_initial=False)
    edits = [TokenEdit(sent.start, sent.start, moved + ",")]
    low = _span_text(doc, sent.start, sent.start + 1, initial=False, was_initial=True)
    if low != tokens(doc)[sent.start].text:
        edits.append(TokenEdit(sent.start, sent.start + 1, low))
    edits.append(TokenEdit(a, last + 1, ""))
    yield Candidate("reorder/adverbial", RULES["reorder/adverbial"], tuple(edits),
                    {"direction": "to-front", "kind": "phrase", "phrase": doc[a : last + 1].text})


def _not_a_clause(root: "Token", subj: "Token") -> bool:
    """A parse that only looks like a clause: a bare participle as the main verb ("Keeps freezing
    my screen ...", "freezing" with "Keeps" as its subject), or a subject that is a verbless phrase
    followed by a clause ("Kind skippers and the ferry is often late": the first item
    has no article, a later one has)."""
    if root.tag_ == "VBG" and not any(c.dep_ in ("aux", "auxpass") for c in root.children):
        return True
    conj = _conjuncts(subj) if subj.pos_ == "NOUN" else [subj]
    if len(conj) > 1:
        det = [any(c.dep_ in ("det", "poss") for c in t.children) for t in conj]
        return not det[0] and any(det)
    return False


def _name_like_start(sent: "Span") -> bool:
    """The sentence opens with a capitalised word tagged as a name: it may be a common noun
    ("Website freezes ...", "Booking is easy ..."), whose capital should not travel."""
    first = tokens(sent.doc)[sent.start]
    return first.pos_ == "PROPN" and first.text[:1].isupper() and not first.text.isupper()


def _degree_too(tok: "Token") -> bool:
    """"too" before an adjective or adverb ("too loud") is a degree word, not the additive "too"."""
    return tok.lower_ == "too" and tok.head.pos_ in ("ADJ", "ADV") and tok.head.i == tok.i + 1


def _final_phrase(root: "Token", last: int) -> tuple["Token", "Token"] | None:
    """The phrase that ends the clause, with its host: the main verb's last dependent, or the
    last dependent of a predicate adjective that ends the clause ("is great for the price")."""
    right = [c for c in root.children if c.i > root.i and not c.is_punct]
    if not right or right[-1].right_edge.i != last:
        return None
    adv = right[-1]
    if adv.dep_ == "acomp" and adv.pos_ == "ADJ":
        tail = [c for c in adv.children if c.i > adv.i and not c.is_punct]
        if tail and tail[-1].dep_ == "prep" and tail[-1].right_edge.i == last:
            return tail[-1], adv
        return None
    if adv.dep_ == "xcomp" and adv.pos_ == "VERB" and lemma(root) in CATENATIVES:
        # "keeps crashing since the update": the phrase frames the whole verb chain
        tail = [c for c in adv.children if c.i > adv.i and not c.is_punct]
        if tail and tail[-1].dep_ in ("prep", "npadvmod", "advmod") and tail[-1].right_edge.i == last:
            return tail[-1], adv
        return None
    if adv.dep_ == "attr" and adv.pos_ == "NOUN" and any(c.dep_ == "amod" and c.pos_ == "ADJ" for c in adv.children):
        # "is a great choice for families": a "for" frame of an evaluative noun, not "value for money"
        tail = [c for c in adv.children if c.i > adv.i and not c.is_punct]
        if tail and tail[-1].dep_ == "prep" and tail[-1].lower_ == "for" and tail[-1].right_edge.i == last:
            objs = [c for c in tail[-1].children if c.dep_ == "pobj"]
            if len(objs) == 1 and (objs[0].lower_ in PEOPLE_NOUNS or objs[0].lower_ in PRICE_NOUNS and any(
                c.dep_ in ("det", "poss") for c in objs[0].children
            )):
                return tail[-1], adv
        return None
    return adv, root


def _outside_negation(adv: "Token") -> bool:
    """Phrases a negation of the clause does not take in its scope, so they may move past it:
    "since ..." ("hasn't crashed since the update"), a frame of judgement ("in my experience",
    "for the price")."""
    if adv.dep_ != "prep":
        return False
    objs = [c for c in adv.children if c.dep_ == "pobj"]
    if adv.lower_ == "since":
        return True
    return len(objs) == 1 and (
        adv.lower_ == "in" and objs[0].lower_ in ("experience", "opinion", "view")
        or adv.lower_ == "for" and objs[0].lower_ in PRICE_NOUNS
    )


def _to_front(sent: "Span", root: "Token", subj: "Token", last: int, scoped: str) -> Iterator[Candidate]:
    doc = sent.doc
    found = _final_phrase(root, last)
    if found is None or subj.left_edge.i != sent.start:
        return
    adv, host = found
    if _name_like_start(sent):
        return
    a = adv.left_edge.i
    prev = tokens(doc)[a - 1]
    has_comma = prev.text == ","
    if any(_loose_punct(t) and t.i != a - 1 and t.i <= last for t in sent):
        return  # "billed me twice, 3 and 3 on the same morning": an appended list, another comma's phrase
    sub = list(adv.subtree)
    if any(t.dep_ == "conj" and t.head.dep_ == "pobj" and t.right_edge.i == a - 1 for t in sent):
        return  # "one stopped in february and the other in march": the phrase belongs to a gapped clause (round 17v)
    if adv.dep_ == "advcl" or _every_time(adv):
        if scoped or not _clause_adjunct(adv, root):
            return
        if _third_person(t for t in doc[sent.start : a]) and any(t.pos_ in ("NOUN", "PROPN") for t in sub):
            return  # "it broke when the kids used the tent": in front, "it" would mean the tent
        if sub[0].lower_ == "when" and any(lemma(t).lower() in TIME_NOUNS for t in subj.subtree):
            return  # "the day finally arrived when i was sure": a relative clause of "the day" (round 17v)
        kind = "clause"
    else:
        stance = adv.dep_ == "advmod" and adv.lower_ in STANCE_ADVERBS
        if scoped and not (stance and has_comma) and not (scoped == "negation" and _outside_negation(adv)):
            return
        verb = host if host.pos_ == "VERB" else root  # the catenative's complement: "keeps crashing"
        if adv.dep_ not in ("prep", "advmod", "npadvmod") or not _adjunct(adv, verb, verb if verb is host else host):
            return
        if stance and not has_comma and adv.lower_ != "overall":
            return  # "works honestly": a manner reading
        if adv.lower_ in FRONTABLE_ONLY and any(t.lower_ == "for" or lemma(t) == "have" and t.dep_ == "aux" for t in sent):
            return  # "have had it for three months now": "for ... now" is one span of time
        if adv.dep_ == "prep" and adv.lower_ == "for" and host.i == root.i and not any(t.lower_ in PRICE_NOUNS for t in sub):
            return  # "waited for an hour", "bought it for my son": durations and beneficiaries
        if any(t.dep_ in ("cc", "conj") or t.lower_ in ("about", "around", "roughly", "almost", "nearly") for t in sub):
            return  # "every 10 minutes or so", "after about two weeks"
        if adv.dep_ == "npadvmod" and any(t.like_num for t in sub):
            return  # "two days": a duration or a measure
        if any(t.pos_ in ("VERB", "AUX") or t.dep_ in ("relcl", "acl", "advcl", "mark") for t in sub):
            return  # "every time it freezes": a clause inside
        if lemma(root) == "be" and not any(c.dep_ in ("acomp", "attr") for c in root.children):
            return  # "the tent is in the garage": the phrase is the predicate
        if adv.dep_ == "advmod" and adv.lower_ in TIME_ADVERBS and lemma(root) == "be" and host.i == root.i and \
                len([c for c in root.children if c.i > root.i and not c.is_punct]) == 1:
            return
        kind = "stance" if stance else "phrase"
    cut = a - 1 if has_comma else a
    moved = _span_text(doc, a, last + 1, initial=True, was_initial=False)
    first = tokens(doc)[sent.start]
    edits = [TokenEdit(sent.start, sent.start, moved + ",")]
    low = _span_text(doc, sent.start, sent.start + 1, initial=False, was_initial=True)
    if low != first.text:
        edits.append(TokenEdit(sent.start, sent.start + 1, low))
    edits.append(TokenEdit(cut, last + 1, ""))
    yield Candidate(
        "reorder/adverbial", RULES["reorder/adverbial"], tuple(edits),
        {"direction": "to-front", "kind": kind, "phrase": doc[a : last + 1].text},
    )


def _to_end(sent: "Span", root: "Token", subj: "Token", last: int, scoped: str) -> Iterator[Candidate]:
    doc = sent.doc
    left = [c for c in root.children if c.i < root.i and not c.is_punct]
    if not left or left[0].left_edge.i != sent.start:
        return
    adv = left[0]
    b = adv.right_edge.i + 1
    has_comma = b < len(doc) and tokens(doc)[b].text == ","
    nxt = b + 1 if has_comma else b
    if subj.left_edge.i != nxt or nxt >= last:
        return
    if any(_loose_punct(t) and t.i != b and t.i <= last for t in sent):
        return  # "Recently, I went to a fair -- an event with ...": the phrase would land after an aside
    if not (last + 1 < sent.end or sent.end == len(doc)):
        return  # no closing punctuation to put the phrase before, and more text follows
    end_tok = tokens(doc)[last]
    sub = list(adv.subtree)
    stance = adv.dep_ == "advmod" and adv.lower_ in STANCE_ADVERBS
    if adv.dep_ == "advcl" or _every_time(adv):
        if scoped or not _clause_adjunct(adv, root):
            return
        if all(c.dep_ in ("mark", "nsubj", "aux", "advmod", "neg") for c in adv.children) and lemma(adv).lower() in _TRANSITIVE \
                and not (b < len(doc) and tokens(doc)[b].is_punct):
            return  # "if you have the appetite choose ...": the object was read as the main clause's subject (round 15)
        if _third_person(t for t in doc[nxt : last + 1]) and any(t.pos_ in ("NOUN", "PROPN") for t in sub):
            return  # "when the manager arrived, she apologised": at the end, "she" could not be the manager
        if end_tok.lower_ in TIME_NOUNS:
            return  # "... the day when we arrived": the clause would read as a relative clause
        kind = "clause"
    else:
        if scoped and not stance and not (scoped == "negation" and _outside_negation(adv)):
            return
        if adv.dep_ not in ("prep", "advmod", "npadvmod") or not _adjunct(adv, root, root) or adv.lower_ in FRONTABLE_ONLY:
            return
        if adv.dep_ == "prep" and end_tok.pos_ in ("NOUN", "PROPN", "NUM"):
            return  # at the end the phrase may attach to the last noun ("... the fish on the first night")
        if adv.dep_ == "prep" and adv.lower_ == "for" and not any(t.lower_ in PRICE_NOUNS for t in sub):
            return  # "for an hour", "for my son": durations and beneficiaries
        if any(t.dep_ in ("cc", "conj") or t.lower_ in ("about", "around", "roughly", "almost", "nearly") for t in sub):
            return
        if adv.dep_ == "npadvmod" and any(t.like_num for t in sub):
            return
        if adv.dep_ == "npadvmod" and adv.lower_ == "time" and any(c.dep_ in ("ccomp", "parataxis", "advcl") for c in root.children):
            return  # "every time the file is corrupt the system freezes": the opening "every time" heads a clause
        if adv.dep_ == "npadvmod" and adv.lower_ == "time" and not has_comma and any(c.lower_ in ("every", "each") for c in adv.children) \
                and any(t.i > root.i and t.pos_ in ("VERB", "AUX") and any(c.dep_ == "nsubj" for c in t.children) for t in sent):
            return  # "Each time I open the app it crashes" read as "open ... the app (that) it crashes": a clause follows
        if any(t.pos_ in ("VERB", "AUX") or t.dep_ in ("relcl", "acl", "advcl", "mark") for t in sub):
            return
        if lemma(root) == "be" and not any(c.dep_ in ("acomp", "attr") for c in root.children):
            return
        if _reason(adv) and _third_person(t for t in doc[nxt : last + 1]) and any(t.pos_ in ("NOUN", "PROPN") for t in sub):
            return  # "because of the size of the drive, owners load it": at the end, "it" comes before its noun
        kind = "stance" if stance else "phrase"
    if stance and any(c.dep_ == "ccomp" for c in root.children):
        return  # "Overall, I think that ...": at the end the adverb would seem to qualify the embedded clause
    moved = _span_text(doc, sent.start, b, initial=False, was_initial=True)
    edits = [TokenEdit(sent.start, nxt, "")]
    cap = _span_text(doc, nxt, nxt + 1, initial=True, was_initial=False)
    if cap != tokens(doc)[nxt].text:
        edits.append(TokenEdit(nxt, nxt + 1, cap))
    if stance:
        edits.append(TokenEdit(last, last + 1, end_tok.text + ", " + moved))  # "..., honestly."
    else:
        edits.append(TokenEdit(last, last + 1, end_tok.text + " " + moved))
    yield Candidate(
        "reorder/adverbial", RULES["reorder/adverbial"], tuple(edits),
        {"direction": "to-end", "kind": kind, "phrase": doc[sent.start : b].text},
    )


# --- clauses ---------------------------------------------------------------------------------


def _clauses(sent: "Span", ctx: Context) -> Iterator[Candidate]:
    doc = sent.doc
    root = sent.root
    if _is_question(sent) or root.pos_ not in ("VERB", "AUX"):
        return
    conjs = [c for c in root.children if c.dep_ == "conj"]
    ccs = [c for c in root.children if c.dep_ == "cc"]
    if len(conjs) == 1 and not ccs:
        ccs = _stray_cc(root, conjs[0])
    if len(conjs) != 1 or len(ccs) != 1 or ccs[0].lower_ != "and":
        return
    second, cc = conjs[0], ccs[0]
    if any(c.dep_ == "conj" for c in second.children):
        return
    subj1 = [c for c in root.children if c.dep_ in ("nsubj", "nsubjpass", "expl")]
    subj2 = [c for c in second.children if c.dep_ in ("nsubj", "nsubjpass", "expl")]
    if len(subj1) != 1 or len(subj2) != 1 or _not_a_clause(root, subj1[0]) or _not_a_clause(second, subj2[0]):
        return
    last = _last_word(sent)
    start = subj1[0].left_edge.i
    if start == sent.start and _name_like_start(sent):
        return
    if second.left_edge.i != cc.i + 1 or _right_word(second) != last:
        return
    if start != sent.start and not _shared_prefix(sent, root, start):
        return
    end1 = cc.i - 1 if tokens(doc)[cc.i - 1].text == "," else cc.i
    if end1 <= start or cc.i <= root.i:
        return
    # clause 1 must be exactly the tokens before the coordinator (no dependents of the root after it)
    if any(t.i > cc.i and t.i <= last and not any(t.i == s.i for s in second.subtree) for t in root.subtree):
        return
    kinds = [_clause_kind(root), _clause_kind(second)]
    if "past-event" in kinds or kinds.count("event") > 1:
        return  # "I ordered it and it arrived", "the app crashes and I lose my work": the order is the story
    if "event" in kinds and any(s.lower_ in ("i", "we", "you") for s in (subj1[0], subj2[0])):
        return  # "the wifi drops and I'm stuck": the writer's state follows from the event
    words = [t for t in doc[start : last + 1] if t.i != cc.i]
    if any(t.is_punct and t.text not in ("-", "'") and t.i != end1 for t in words):
        return  # a comma inside a clause ("..., which I like") would not travel well
    if any(t.lower_ in ANAPHORS and not (t.dep_ == "det" and t.lower_ in DEMONSTRATIVES) or t.lower_ in SEQUENCE_WORDS for t in words):
        return  # "the chair is sturdy and my dog loves it"; a demonstrative article ("this cafe") points outside
    if subj2[0].pos_ in ("PRON", "DET", "NUM", "ADJ") and subj2[0].lower_ in _ELLIPTIC_SUBJECTS:
        return  # "Some staff are brilliant and some clearly don't care": "some" means "some staff" (round 17)
    nouns1 = {lemma(t).lower() for t in doc[start : end1] if t.pos_ == "NOUN"}
    nouns2 = {lemma(t).lower() for t in doc[cc.i + 1 : last + 1] if t.pos_ == "NOUN"}
    if nouns1 & nouns2:
        return  # "the room has a balcony and the balcony is huge": the second mention refers back
    initial = start == sent.start
    c1 = _span_text(doc, cc.i + 1, last + 1, initial=initial, was_initial=False)
    c2 = _span_text(doc, start, end1, initial=False, was_initial=initial)
    edits = (TokenEdit(start, end1, c1), TokenEdit(cc.i + 1, last + 1, c2))
    yield Candidate("reorder/clauses", RULES["reorder/clauses"], edits, {"coordinator": "and", "kinds": kinds})


def _stray_cc(root: "Token", second: "Token") -> list["Token"]:
    """The "and" right before the second clause when the parser hung it on the last word of the
    first clause instead of its verb ("The desks are roomy and the Wi-Fi is fast": "and" under
    "roomy")."""
    j = second.left_edge.i - 1
    if j <= root.i:
        return []
    t = tokens(root.doc)[j]
    if t.dep_ == "cc" and t.head.i < j and not any(c.dep_ == "conj" for c in t.head.children) and any(
        a.i == root.i for a in t.head.ancestors
    ):
        return [t]
    return []


def _clause_list(sent: "Span", ctx: Context) -> Iterator[Candidate]:
    """Three or more independent clauses in a comma list closed by "and" ("The staff are
    helpful, the space is quiet and the showers are immaculate."): rotated by one, as the
    two-clause swap, under the same conditions (states, or present events whose subjects are not
    "I", "we" or "you"; no pronoun, sequence word or noun shared across clauses). Each comma
    item must be one clause that opens with its own subject and has a finite verb; the parser's
    links between the clauses (root, ccomp, conj) are not trusted beyond that."""
    doc = sent.doc
    if _is_question(sent) or _name_like_start(sent):
        return
    last = _last_word(sent)
    if last < 0:
        return
    body = list(doc[sent.start : last + 1])
    if any(t.lower_ in CONTRAST or t.text[:1] in "@#" or t.like_url for t in body):
        return
    ccs = [t for t in body if t.dep_ in ("cc", "preconj") or t.lower_ in ("and", "or", "nor", "but")]
    if len(ccs) != 1 or ccs[0].lower_ != "and":
        return
    cc = ccs[0]
    puncts = [t for t in body if _loose_punct(t)]
    if any(t.text != "," or t.i > cc.i for t in puncts):
        return
    seps = [t.i for t in puncts]
    oxford = bool(seps) and seps[-1] == cc.i - 1
    cuts = seps[:-1] if oxford else seps
    if not cuts:
        return
    starts = [sent.start] + [i + 1 for i in cuts] + [cc.i + 1]
    ends = list(cuts) + [cc.i - 1 if oxford else cc.i, last + 1]
    spans = list(zip(starts, ends))
    if len(spans) < 3 or any(b <= a for a, b in spans):
        return
    heads: list["Token"] = []
    subjects: list["Token"] = []
    kinds: list[str] = []
    for a, b in spans:
        seg = list(doc[a:b])
        top = [t for t in seg if not (a <= t.head.i < b) or t.head.i == t.i]
        if len(top) != 1:
            return
        h = top[0]
        be = [c for c in h.children if lemma(c) == "be" and c.dep_ in ("auxpass", "cop", "aux")]
        if h.pos_ in ("VERB", "AUX"):
            kind = _clause_kind(h)
        elif h.pos_ == "ADJ" and len(be) == 1 and be[0].i < h.i:
            kind = "state"  # "the showers are immaculate" parsed with "are" as a passive auxiliary
        else:
            return
        subj = [c for c in h.children if c.dep_ in ("nsubj", "nsubjpass", "expl")]
        if len(subj) != 1 or subj[0].left_edge.i != a or _not_a_clause(h, subj[0]):
            return
        if not any(t.tag_ in ("VBZ", "VBP", "VBD", "MD") for t in seg):
            return  # a verbless item ("Light, comfortable and the gears are smooth")
        if any(c.dep_ in ("mark", "ccomp") and a <= c.i < b for c in h.children):
            return  # "I think the app is slow, ...": a reporting verb would change what it covers
        heads.append(h)
        subjects.append(subj[0])
        kinds.append(kind)
    ids = {h.i for h in heads}
    if any(h.head.i not in ids or h.dep_ not in ("ROOT", "ccomp", "conj", "parataxis") for h in heads):
        return
    if "past-event" in kinds:
        return  # "The app crashed, the door wouldn't open, and ...": a story, told in order
    if "event" in kinds and any(s.lower_ in ("i", "we", "you") for s in subjects):
        return
    words = [t for t in body if t.i != cc.i and t.i not in seps]
    if any(t.lower_ in ANAPHORS and not (t.dep_ == "det" and t.lower_ in DEMONSTRATIVES) or t.lower_ in SEQUENCE_WORDS
           for t in words):
        return
    nouns = [{lemma(t).lower() for t in doc[a:b] if t.pos_ == "NOUN"} for a, b in spans]
    if any(nouns[i] & nouns[j] for i in range(len(nouns)) for j in range(i + 1, len(nouns))):
        return
    edits = _rotate_spans(sent, spans)
    yield Candidate("reorder/clauses", RULES["reorder/clauses"], tuple(edits),
                    {"coordinator": "and", "kinds": kinds, "clauses": len(spans)})


def _shared_prefix(sent: "Span", root: "Token", start: int) -> bool:
    """Everything before the first subject is a sentence adverbial or adverbial clause of the
    main verb ending in a comma ("Honestly, A and B", "Since the refit, A and B"): it covers
    both clauses in either order, so it stays where it is."""
    doc = sent.doc
    if tokens(doc)[start - 1].text != ",":
        return False
    left = [c for c in root.children if c.i < start]
    if not left or any(c.dep_ not in ("advmod", "npadvmod", "prep", "advcl", "punct") for c in left):
        return False
    covered = {t.i for c in left for t in c.subtree}
    return all(i in covered for i in range(sent.start, start))


def _right_word(tok: "Token") -> int:
    return max(t.i for t in tok.subtree if not t.is_punct)


def _clause_kind(head: "Token") -> str:
    """"state": a linking or stative verb ("is roomy", "has a pool", "felt safe"), in any tense,
    with no auxiliary but do-support, "have" of the perfect ("has been great") or a modal ("will
    be fine"); or an adjectival passive ("the pockets are well placed"). "event": any other verb
    in the present tense, simple or perfect ("the wifi drops", "the crew have improved").
    "past-event": the rest ("the zipper broke", "we were waiting")."""
    auxes = [c for c in head.children if c.dep_ in ("aux", "auxpass")]
    if head.tag_ == "VBN" and len(auxes) == 1 and auxes[0].dep_ == "auxpass" and auxes[0].tag_ in ("VBZ", "VBP"):
        return "state"
    stative = lemma(head) in STATIVE_VERBS and head.tag_ != "VBG"
    if stative and all(lemma(c) in ("do", "have") or c.tag_ == "MD" for c in auxes):
        if any(lemma(c) == "have" for c in auxes) and not all(c.tag_ in ("VBZ", "VBP") for c in auxes if lemma(c) == "have"):
            return "past-event"  # "had been": a past before the past
        return "state"
    if not auxes:
        return "event" if head.tag_ in ("VBZ", "VBP") else "past-event"
    if len(auxes) == 1:
        aux = auxes[0]
        if aux.tag_ == "MD" and head.tag_ == "VB":
            return "event"  # "you can book online": what may happen, not a story
        if aux.tag_ in ("VBZ", "VBP") and (
            (lemma(aux) == "do" and head.tag_ == "VB") or (lemma(aux) == "have" and head.tag_ == "VBN")
            or (lemma(aux) == "be" and head.tag_ == "VBG")
        ):
            return "event"  # "doesn't load", "have improved", "are improving"
    return "past-event"


# --- shuffle ---------------------------------------------------------------------------------


def _glued(tok: "Token") -> bool:
    """Part of a larger written word ("tent's", "fold-out"): moving it would split the word."""
    doc = tok.doc
    if not tok.whitespace_ and tok.i + 1 < len(doc) and tokens(doc)[tok.i + 1].text[:1] not in PUNCT_CLOSE:
        return True
    return tok.i > 0 and not tokens(doc)[tok.i - 1].whitespace_ and tokens(doc)[tok.i - 1].text not in ("(", "[", '"', "“")


def _shuffle(doc: "Doc", ctx: Context) -> Candidate | None:
    edits: list[TokenEdit] = []
    for sent in sents(doc):
        slots = [
            t for t in sent
            if t.pos_ in CONTENT_POS and not t.is_punct and t.lower_ not in NEGATORS and t.dep_ != "neg"
            and t.text.isalnum() and not _glued(t)
        ]
        if len({t.lower_ for t in slots}) < 2:
            continue
        order = list(range(len(slots)))
        for _attempt in range(20):
            ctx.rng.shuffle(order)
            new = [slots[j] for j in order]
            if [t.lower_ for t in new] == [t.lower_ for t in slots]:
                continue
            # no word next to a copy of itself ("very very")
            seq = {t.i: n.lower_ for t, n in zip(slots, new)}
            flat = [seq.get(t.i, t.lower_) for t in sent if not t.is_punct]
            if any(a == b for a, b in zip(flat, flat[1:])):
                continue
            break
        else:
            continue
        for slot, src in zip(slots, new):
            if slot.i == src.i:
                continue
            text = src.text
            if slot.i == sent.start and slot.text[:1].isupper():
                text = text[:1].upper() + text[1:]
            elif src.i == sent.start and not _keeps_capital(src):
                text = text[:1].lower() + text[1:]
            if text != slot.text:
                edits.append(TokenEdit(slot.i, slot.i + 1, text))
    if not edits:
        return None
    return Candidate("reorder/shuffle", RULES["reorder/shuffle"], tuple(edits), {"diagnostic": True})
