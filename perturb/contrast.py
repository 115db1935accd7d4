"""contrast: move the weight of a contrast between two opinions (should rise or fall).

In "X but Y" a reader weighs the part after *but* more ("nice pool but cold showers" warns,
"cold showers but a nice pool" praises); in "Although X, Y" and "Y, although X" the main clause Y
carries the weight. A rule here takes two parts of opposite polarity (by the opinion lexicon) and
moves the weight from one to the other, so the pair's expectation is directional: ``rise`` when
the part that carries the variant's weight is positive, ``fall`` when it is negative. ``meta``
records the connective, the construction, the part that now carries the weight and which polarity
it ``favours``.

Rules:

``contrast/swap`` (rise or fall)
    The two parts change places; the connective, the commas and the final punctuation stay where
    they are, and the case of a word that moves to or from the start is fixed:

    * clauses joined by *but* / *yet*: "The app is slow, but support is great." ->
      "Support is great, but the app is slow.";
    * predicates sharing a subject: "The pan is heavy but durable." -> "The pan is durable but
      heavy.", "The lamp is cheap but works well." -> "The lamp works well but is cheap.";
      attributive adjectives with the article fixed: "a cheap but sturdy chair" -> "a sturdy but
      cheap chair";
    * a subordinate clause of *although*, *though* or *even though*, before or after the main
      clause, and of *while* or *whereas* before it only (after it they balance the clauses): "Although it's pricey, the pool is lovely." -> "Although the pool is
      lovely, it's pricey.", "The pool is lovely, although it's pricey." -> "The pool is pricey,
      although it's lovely.";
    * *however* after a semicolon, or opening the next sentence (with ``--unit text``):
      "The tent is light; however, the poles are flimsy." -> "The poles are flimsy; however, the
      tent is light."

``contrast/connective`` (rise or fall)
    The words stay; a concessive connective is exchanged for its converse, which moves the weight
    to the other clause: "X, but Y" -> "X, although Y"; "Y, although X" -> "Y, but X";
    "Although X, Y" -> "X, although Y". ("X but Y" -> "Although X, Y" keeps the weight on Y and
    is not made.) Only between two full clauses, and only for *but*, *yet*, *although*, *though*
    and *even though*: *while* and *whereas* contrast without conceding, and *however* has no
    natural converse.

Pronouns. A third-person pronoun that would come before the noun it refers to is resolved: when
the pronoun is the subject of its clause and the noun the subject of the other ("The tent is light
but it feels fragile." -> "The tent feels fragile but it is light."), the two subjects (with their
verb contractions) change places; in any other position the sentence is skipped. A fronted
subordinate clause may keep a subject pronoun for the main clause's subject ("Although it's
pricey, the pool is lovely" refers forward, as English allows). A pronoun that came before an
agreeing noun outside such a clause most likely points outside the sentence ("It was miserable,
but the tent was great"); after a swap it would read as that noun, so the swap is skipped.
Demonstrative pronouns ("this", "that"), possessives ("its") and *he*/*she* never move before a
noun they could refer to. The connective rule moves no words, so only "Although X, Y" -> "X,
although Y" has to resolve a pronoun (a main clause's subject pronoun cannot refer forward).

Skipped (precision first; a skipped sentence costs little, a wrong direction misleads): parts
without a lexicon opinion or of the same polarity; opinion words or negations outside the two
parts; parts with two negations, negated predicate conjuncts; questions, conditions and time
frames (if, unless, when), hedging modals (would, could, should, might, may, must), expectations
("I expected", "I hoped") and reported speech ("you will be told it works"), whose opinion is not
the writer's; sequence and time words whose order is part of what is said (then, at first, still,
anymore, after, ...); additive words that point back (also, too, either); two past events in a
row ("The tent arrived quickly, but the zipper broke"); more than one contrast word; social-media
tokens, quotes, brackets, colons and dashes; a weather or dummy *it* ("it rained"); a capitalised
first word tagged as a name, whose case elsewhere is unknown. :func:`explain` gives the reason.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Iterator, Union

from pairflip.perturb.base import (NEGATORS, Candidate, Context, TokenEdit, is_question, lemma, match_case, sent_of, tokens,
                                   words)
from pairflip.perturb.intensifier import indefinite_article, match_article
from pairflip.perturb.negation import is_noise, opinion_of
from pairflip.perturb.reorder import STATIVE_VERBS, _keeps_capital, _last_word

if TYPE_CHECKING:  # pragma: no cover
    from spacy.tokens import Doc, Span, Token

    from pairflip.perturb.lexicon import Lexicon

FAMILY = "contrast"
# Each pair's expectation is "rise" or "fall", chosen by the polarity of the part that carries
# the variant's weight; the table lists the two a rule may give.
DIRECTIONAL = "rise/fall"
RULES = {
    "contrast/swap": DIRECTIONAL,
    "contrast/connective": DIRECTIONAL,
}

COORDINATORS = frozenset({"but", "yet"})
SUBORDINATORS = frozenset({"although", "though", "while", "whereas"})
CONCESSIVE = frozenset({"although", "though", "even though", "even although"})  # these have a converse ("but")
CONTRAST_WORDS = COORDINATORS | SUBORDINATORS | {"however", "whilst", "nevertheless", "nonetheless", "except",
                                                 "otherwise", "instead", "despite", "albeit"}

# Words whose order is part of what is said: a sequence in time, a change of state, a reply.
SEQUENCE_WORDS = frozenset(
    "then later first initially originally now anymore eventually finally after afterwards afterward before soon "
    "again still already until till since once recently lately suddenly immediately gradually".split()
)
# Feelings the writer had before trying the thing ("I was nervous about leaving my home office"):
# a past worry, not a verdict on it, so weighing it does not make the text more negative.
WORRY_WORDS = frozenset({"nervous", "worried", "sceptical", "skeptical", "hesitant", "apprehensive", "unsure",
                         "afraid", "wary", "doubtful", "anxious"})
# Additive and anaphoric adverbs: they point back to the other part ("it is also warm").
ADDITIVE_WORDS = frozenset({"also", "either", "likewise", "similarly", "anyway", "anyways", "so", "therefore", "thus"})
# Modals and verbs whose complement is not the writer's asserted opinion ("it would be great", "I
# expected it to be warm", "you will be told the codes work"); common practice of opinion mining
# (from memory).
HEDGE_MODALS = frozenset({"would", "could", "should", "might", "may", "must", "'d"})
UNASSERTED_VERBS = frozenset({"expect", "hope", "wish", "suppose", "assume", "imagine", "want", "think", "guess",
                              "tell", "say", "claim", "promise", "advertise"})
# Conditions and time frames ("great when it is dry"): the opinion holds only sometimes.
CONDITIONALS = frozenset({"if", "unless", "whether", "when", "whenever"})
EXTRA_NEGATORS = frozenset({"without", "hardly", "barely", "scarcely"})

# Pronouns that refer back (third person) by number; demonstratives; persons.
SINGULAR_PRONOUNS = frozenset({"it", "its", "itself"})
PLURAL_PRONOUNS = frozenset({"they", "them", "their", "theirs", "themselves"})
PERSONAL_PRONOUNS = frozenset({"he", "him", "his", "himself", "she", "her", "hers", "herself"})
DEMONSTRATIVES = frozenset({"this", "that", "these", "those"})
# Nouns for people (they are "he", "she" or "they", never "it"); a short list for review text.
PERSON_NOUNS = frozenset(
    "wife husband son daughter friend friends kid kids child children guy guys girl boy man woman men women "
    "person people partner dad mom mother father brother sister family staff owner owners guide guides".split()
)
# Singular nouns for groups, which reviews often call "they" ("the shop ... they").
COLLECTIVE_NOUNS = frozenset("shop store company seller team staff service support crew family brand".split())
# Predicates of a weather or dummy "it" ("it rained", "it was cold", "it's late"): common practice.
WEATHER_WORDS = frozenset(
    "rain snow pour drizzle hail storm freeze blow cold hot warm windy rainy snowy freezing chilly humid dark wet "
    "sunny foggy stormy icy late early".split()
)

_SENTENCES_KEY = "pairflip.contrast.sentences"
SUBJ_DEPS = frozenset({"nsubj", "nsubjpass", "expl"})
FINITE_TAGS = frozenset({"VBZ", "VBP", "VBD", "MD"})
# A verb contraction on a pronoun and the full verb it stands for, by the verb's lemma.
CLITICS = {"'s": {"be": "is", "have": "has"}, "'re": {"be": "are"}, "'ve": {"have": "have"}, "'m": {"be": "am"}}


@dataclass(frozen=True)
class Part:
    """One side of a contrast: the words of tokens ``start:end`` (no edge punctuation)."""

    start: int
    end: int
    head: int  # the token that heads the part (the only one whose syntactic head lies outside)
    polarity: int = 0


@dataclass(frozen=True)
class Contrast:
    """Two parts and the connective between them, as found in the source.

    ``kind`` is one of ``clauses`` (X but Y), ``predicates`` (S V1 but V2, S is A1 but A2),
    ``attributive`` (a A1 but A2 N), ``fronted`` (Although X, Y), ``postposed`` (Y, although X),
    ``however`` (X; however, Y / X. However, Y.). ``conn`` is the connective's token range.
    ``weighted`` says which part carries the weight in the source: 0 (first) or 1 (second).
    """

    kind: str
    connective: str
    conn: tuple[int, int]
    first: Part
    second: Part
    weighted: int


Found = Union[Contrast, str]  # a contrast, or why there is none to use


def candidates(doc: "Doc", ctx: Context) -> Iterator[Candidate]:
    """Every contrast variant the parse supports: one swap and one connective change at most per
    contrast."""
    for found in _contrasts(doc, ctx.lexicon):
        if isinstance(found, str):
            continue
        for made in (_swap(doc, found), _connective(doc, found)):
            if isinstance(made, Candidate):
                yield made


def explain(doc: "Doc", lexicon: "Lexicon") -> list[str]:
    """Why each contrast of ``doc`` gave no swap or no connective change, or what it gave: one
    line per sentence with a contrast word (``"swap: <reason>"``, ``"connective: made"``, ...).
    For tests and for reading the rules' decisions; the build does not call it."""
    out: list[str] = []
    for found in _contrasts(doc, lexicon, quiet=False):
        if isinstance(found, str):
            out.append(found)
            continue
        for name, made in (("swap", _swap(doc, found)), ("connective", _connective(doc, found))):
            out.append(f"{name}: {'made' if isinstance(made, Candidate) else made}")
    return out


# --- finding contrasts ------------------------------------------------------------------------


def _contrasts(doc: "Doc", lex: "Lexicon", quiet: bool = True) -> Iterator[Found]:
    """The contrasts of ``doc``; with ``quiet=False`` also the reason for each sentence with a
    contrast word that gave none."""
    spans = _sentences(doc)
    taken = -1  # a sentence already used as the second of "X. However, Y."
    for k, sent in enumerate(spans):
        conns = [t for t in sent if t.lower_ in CONTRAST_WORDS]
        found: Found | None = None
        if k == taken:
            continue
        if len(conns) > 1:
            found = "more than one contrast word"
        elif conns or k + 1 < len(spans):
            doubt = _sentence_doubt(sent)
            if doubt is not None:
                found = doubt if conns else None
            elif conns:
                found = _in_sentence(sent, conns[0], lex)
            else:
                found = _however_sentences(sent, spans[k + 1], lex)
                taken = k + 1 if found is not None else -1
        if found is not None and (not quiet or not isinstance(found, str)):
            yield found


def _sentences(doc: "Doc") -> list["Span"]:
    """The sentences as the build cuts sources (a parser boundary without final punctuation is
    no cut), computed once per doc."""
    cached = doc.user_data.get(_SENTENCES_KEY)
    if cached is None:
        from pairflip.perturb.build import sentence_spans

        spans = sentence_spans(doc)
        owner = {i: k for k, sp in enumerate(spans) for i in range(sp.start, sp.end)}
        cached = doc.user_data[_SENTENCES_KEY] = (spans, owner)
    return cached[0]


def _sentence_of(tok: "Token") -> "Span":
    spans = _sentences(tok.doc)
    k = tok.doc.user_data[_SENTENCES_KEY][1].get(tok.i)
    return spans[k] if k is not None else sent_of(tok)


_MARKS = frozenset({'"', "“", "”", "(", ")", "[", "]", ":", "-", "--", "–", "—"})


def _sentence_doubt(sent: "Span") -> str | None:
    """Why no contrast in ``sent`` may be moved, or ``None``."""
    if is_question(sent):
        return "question"
    toks = tokens(sent.doc)
    for t in sent:
        low = t.lower_
        if is_noise(t) or t.text in ("#", "@") and not t.whitespace_:
            return "social-media token"  # also "#" split from its tag ("# fail")
        if t.text in _MARKS and not (t.text == "-" and not t.whitespace_ and not toks[t.i - 1].whitespace_):
            return "quote, bracket, colon or dash"  # a glued hyphen ("well-made") is fine
        if low in CONDITIONALS:
            return "condition or time frame"
        if low in SEQUENCE_WORDS or low in ADDITIVE_WORDS and not _degree(t) or low == "too" and not _degree(t):
            return f"sequence or additive word {low!r}"
        if low == "used" and t.i + 1 < len(sent.doc) and toks[t.i + 1].lower_ == "to":
            return "a past state 'used to'"  # "used to be great" says it got worse (blind review, round 8)
        if low in WORRY_WORDS and any(c.lower_ in ("i", "we") and c.dep_ == "nsubj" for c in t.head.children) \
                and t.head.tag_ == "VBD":
            return f"the writer's past worry {low!r}"  # "I was nervous about leaving ...": no complaint (round 8)
        if low == "at" and t.i + 1 < len(sent.doc) and toks[t.i + 1].lower_ in ("first", "last", "least"):
            return f"sequence or additive word 'at {toks[t.i + 1].lower_}'"
        if low in HEDGE_MODALS and t.tag_ == "MD":
            return f"hedging modal {low!r}"
        if t.pos_ in ("VERB", "AUX") and lemma(t).lower() in UNASSERTED_VERBS:
            return f"unasserted opinion {low!r}"
        if low == "not" and t.i + 1 < len(sent.doc) and toks[t.i + 1].lower_ == "only":
            return "not only"
    return None


def _degree(tok: "Token") -> bool:
    """"so" or "too" as a degree word before an adjective or adverb ("so comfy", "too heavy")."""
    return tok.dep_ == "advmod" and tok.head.pos_ in ("ADJ", "ADV") and tok.i < tok.head.i


def _in_sentence(sent: "Span", conn: "Token", lex: "Lexicon") -> Found:
    doc = sent.doc
    toks = tokens(doc)
    last = _last_word(sent)
    low = conn.lower_
    c = conn.i
    comma_before = c > sent.start and toks[c - 1].text == ","
    if low in COORDINATORS:
        if not comma_before and conn.dep_ != "cc":
            return f"{low!r} is no coordinator here"  # "yet" as an adverb ("not yet")
        end1 = c - 1 if comma_before else c
        first, second = _part(doc, sent.start, end1), _part(doc, c + 1, last + 1)
        if first and second and _clause(doc, first) and _clause(doc, second):
            return _polarised(doc, Contrast("clauses", low, (c, c + 1), first, second, 1), lex)
        if conn.dep_ == "cc":
            return _predicates(sent, conn, lex)
        return "not two clauses or predicates"
    if low in SUBORDINATORS:
        if conn.dep_ != "mark" or conn.head.pos_ not in ("VERB", "AUX"):
            return f"{low!r} marks no clause"  # "though" as an adverb ("It leaks, though."), "a while"
        c0 = c - 1 if c > sent.start and toks[c - 1].lower_ == "even" and low in CONCESSIVE else c
        name = "even " + low if c0 < c else low
        if c0 == sent.start:  # Although X, Y
            comma = conn.head.right_edge.i + 1
            if comma >= last or toks[comma].text != ",":
                return "no comma after the fronted clause"
            first, second = _part(doc, c + 1, comma), _part(doc, comma + 1, last + 1)
            kind, weighted = "fronted", 1
        else:  # Y, although X
            if low in ("while", "whereas"):
                # "The desks are comfy, while the Wi-Fi drops": after the main clause, while/whereas
                # set two facts side by side with no weight on either (blind review, round 7)
                return f"'{low}' after the main clause balances the two clauses"
            if toks[c0 - 1].is_punct and toks[c0 - 1].text != ",":
                return "punctuation before the connective"
            end1 = c0 - 1 if toks[c0 - 1].text == "," else c0
            first, second = _part(doc, sent.start, end1), _part(doc, c + 1, last + 1)
            kind, weighted = "postposed", 0
        if not (first and second and _clause(doc, first) and _clause(doc, second)):
            return "not two clauses"
        if (first if kind == "fronted" else second).head != conn.head.i:
            return "the connective marks another clause"
        return _polarised(doc, Contrast(kind, name, (c0, c + 1), first, second, weighted), lex)
    if low == "however":
        if not (c > sent.start and toks[c - 1].text == ";" and c + 1 < last and toks[c + 1].text == ","):
            return "'however' not between two clauses ('X; however, Y')"
        first, second = _part(doc, sent.start, c - 1), _part(doc, c + 2, last + 1)
        if first and second and _clause(doc, first) and _clause(doc, second):
            return _polarised(doc, Contrast("however", "however", (c, c + 1), first, second, 1), lex)
        return "not two clauses"
    return f"{low!r} is not handled"


def _however_sentences(sent: "Span", nxt: "Span", lex: "Lexicon") -> Contrast | None:
    """"X. However, Y." across two sentences of one text (``--unit text``)."""
    doc = sent.doc
    toks = tokens(doc)
    if nxt.end - nxt.start < 3 or toks[nxt.start].lower_ != "however" or toks[nxt.start + 1].text != ",":
        return None
    if _sentence_doubt(nxt) is not None or any(t.lower_ in CONTRAST_WORDS for t in nxt if t.i != nxt.start):
        return None
    end1, last2 = _last_word(sent), _last_word(nxt)
    if end1 < 0 or last2 < 0 or end1 + 1 >= sent.end or toks[end1 + 1].text != ".":
        return None
    first, second = _part(doc, sent.start, end1 + 1), _part(doc, nxt.start + 2, last2 + 1)
    if not (first and second and _clause(doc, first) and _clause(doc, second)):
        return None
    found = _polarised(doc, Contrast("however", "however", (nxt.start, nxt.start + 1), first, second, 1), lex)
    return found if isinstance(found, Contrast) else None


def _part(doc: "Doc", start: int, end: int) -> Part | None:
    """The words ``start:end`` as one constituent: exactly one token with its head outside, no
    punctuation inside but glued apostrophes and hyphens, and the commas of a list ("light, roomy
    and warm"; not "Sadly, it leaks")."""
    if end <= start:
        return None
    toks = tokens(doc)
    heads = [i for i in range(start, end) if not start <= toks[i].head.i < end or toks[i].head.i == i]
    if len(heads) != 1:
        return None
    for i in range(start, end):
        t = toks[i]
        if t.is_space or t.is_punct and t.text not in ("'", "-", ","):
            return None
        if t.text == "," and (i in (start, end - 1) or toks[i + 1].dep_ not in ("conj", "cc")):
            return None
    return Part(start, end, heads[0])


def _finite(tok: "Token") -> bool:
    if tok.tag_ in FINITE_TAGS:
        return True
    return any(c.dep_ in ("aux", "auxpass") and c.tag_ in FINITE_TAGS for c in tok.children)


def _clause(doc: "Doc", part: Part) -> bool:
    """A full clause: a finite verb heading the part, with its own subject inside the part."""
    head = tokens(doc)[part.head]
    if head.pos_ not in ("VERB", "AUX") or not _finite(head):
        return False
    return any(c.dep_ in SUBJ_DEPS and part.start <= c.i < part.end for c in head.children)


def _subject(doc: "Doc", part: Part) -> "Token | None":
    head = tokens(doc)[part.head]
    subj = [c for c in head.children if c.dep_ in ("nsubj", "nsubjpass") and part.start <= c.i < part.end]
    return subj[0] if len(subj) == 1 else None


# --- polarity --------------------------------------------------------------------------------


def part_polarity(doc: "Doc", start: int, end: int, lex: "Lexicon") -> int:
    """The polarity of the words ``start:end`` by the lexicon: +1, -1, or 0 when they hold no
    opinion word, opinion words of both polarities, or more than one negation.

    One negation in the part reverses it ("isn't comfortable" -1, "doesn't leak" +1); "too" before
    an adjective makes it negative ("too thin"), as excess is a fault (common practice, from memory).
    """
    toks = tokens(doc)
    signs: set[int] = set()
    negations = 0
    for i in range(start, end):
        t = toks[i]
        if t.lower_ in NEGATORS or t.dep_ == "neg" or t.lower_ in EXTRA_NEGATORS:
            negations += 1
            continue
        if t.pos_ in ("ADJ", "ADV") and any(c.lower_ == "too" and c.i < t.i for c in t.children):
            signs.add(-1)
            continue
        hit = opinion_of(t, lex)
        if hit is not None:
            signs.add(hit.polarity)
    if len(signs) != 1 or negations > 1:
        return 0
    sign = signs.pop()
    return -sign if negations else sign


def _polarised(doc: "Doc", found: Contrast, lex: "Lexicon") -> Found:
    """``found`` with each part's polarity, when the two are opposite and no opinion lies outside."""
    p1 = part_polarity(doc, found.first.start, found.first.end, lex)
    p2 = part_polarity(doc, found.second.start, found.second.end, lex)
    if p1 == 0 or p2 == 0:
        return "a part without one clear polarity"
    if p1 == p2:
        return "same polarity"
    inside = set(range(found.first.start, found.first.end)) | set(range(found.second.start, found.second.end))
    for sent in {id(s): s for s in (_sent(doc, found.first), _sent(doc, found.second))}.values():
        for t in sent:
            if t.i not in inside and (opinion_of(t, lex) is not None or t.lower_ in NEGATORS or t.dep_ == "neg"):
                return "an opinion or negation outside the parts"
    if found.kind in ("clauses", "however") and _past_events(doc, found):
        return "two past events (a sequence)"
    first = Part(found.first.start, found.first.end, found.first.head, p1)
    second = Part(found.second.start, found.second.end, found.second.head, p2)
    return Contrast(found.kind, found.connective, found.conn, first, second, found.weighted)


def _sent(doc: "Doc", part: Part) -> "Span":
    return _sentence_of(tokens(doc)[part.start])


def _past_events(doc: "Doc", found: Contrast) -> bool:
    """Both clauses tell a past event ("The tent arrived quickly, but the zipper broke"): their
    order is a sequence in time."""
    def event(part: Part) -> bool:
        head = tokens(doc)[part.head]
        past = head.tag_ == "VBD" or any(c.dep_ in ("aux", "auxpass") and c.tag_ == "VBD" for c in head.children)
        return past and lemma(head).lower() not in STATIVE_VERBS
    return event(found.first) and event(found.second)


# --- predicates -----------------------------------------------------------------------------


def _predicates(sent: "Span", cc: "Token", lex: "Lexicon") -> Found:
    """Two predicates or adjectives of one subject joined by "but"/"yet"."""
    doc = sent.doc
    toks = tokens(doc)
    first_head = cc.head
    conj = [c for c in first_head.children if c.dep_ == "conj" and c.i > cc.i]
    if len(conj) != 1 or any(c.dep_ == "cc" and c.i != cc.i for c in first_head.children):
        return "not two clauses or predicates"
    second_head = conj[0]
    if any(c.dep_ == "conj" for c in second_head.children):
        return "more than two conjuncts"
    end1 = cc.i - 1 if toks[cc.i - 1].text == "," else cc.i
    if first_head.pos_ == "ADJ" and second_head.pos_ == "ADJ":
        return _adjectives(sent, cc, first_head, second_head, end1, lex)
    if first_head.pos_ in ("VERB", "AUX") and second_head.pos_ in ("VERB", "AUX"):
        return _verb_phrases(sent, cc, first_head, second_head, end1, lex)
    return "not two clauses or predicates"


def _plain_adjective(head: "Token", skip: set[int]) -> tuple[int, int] | None:
    """An adjective with only degree adverbs before it ("quite stiff"): its token range."""
    idx = [head.i]
    for c in head.children:
        if c.i in skip or c.dep_ in ("cc", "conj", "punct"):
            continue
        if c.dep_ == "advmod" and c.i < head.i and not list(c.children) and c.lower_ not in NEGATORS:
            idx.append(c.i)
        else:
            return None
    idx.sort()
    return (idx[0], idx[-1] + 1) if idx == list(range(idx[0], idx[-1] + 1)) else None


def _adjectives(sent, cc, a1, a2, end1: int, lex: "Lexicon") -> Found:
    doc = sent.doc
    r1, r2 = _plain_adjective(a1, {t.i for t in a2.subtree} | {cc.i}), _plain_adjective(a2, set())
    if r1 is None or r2 is None or r1[1] != end1 or r2[0] != cc.i + 1:
        return "an adjective with more than degree words"
    kind = "attributive" if a1.dep_ == "amod" else "predicates"
    if kind == "attributive" and r2[1] != a1.head.i:
        return "the noun does not follow the adjectives"
    if kind == "predicates" and (a1.dep_ not in ("acomp", "ROOT") or r2[1] != _last_word(sent) + 1):
        return "the adjectives are not the predicate"
    first, second = Part(r1[0], r1[1], a1.i), Part(r2[0], r2[1], a2.i)
    return _polarised(doc, Contrast(kind, cc.lower_, (cc.i, cc.i + 1), first, second, 1), lex)


def _verb_phrases(sent, cc, v1, v2, end1: int, lex: "Lexicon") -> Found:
    """"The lamp is cheap but works well": the subject is shared, each verb keeps its own
    auxiliaries. Present tense or states only (past events in a row tell a sequence)."""
    doc = sent.doc
    toks = tokens(doc)
    subj = [c for c in v1.children if c.dep_ in SUBJ_DEPS]
    if len(subj) != 1 or subj[0].left_edge.i != sent.start or any(c.dep_ in SUBJ_DEPS for c in v2.children):
        return "not two predicates of one subject"
    start1 = subj[0].right_edge.i + 1
    first, second = _part(doc, start1, end1), _part(doc, cc.i + 1, _last_word(sent) + 1)
    if first is None or second is None or second.head != v2.i:
        return "not two predicates of one subject"
    # the first predicate is the verb with its own words: everything between subject and "but"
    own = {t.i for t in v1.subtree} - {t.i for t in subj[0].subtree} - {t.i for t in v2.subtree} - {cc.i}
    if {i for i in own if not toks[i].is_punct} != set(range(start1, end1)):
        return "not two predicates of one subject"
    lead = toks[start1]
    if not (lead.i == v1.i or lead.dep_ in ("aux", "auxpass", "neg") and lead.head.i == v1.i):
        return "an adverb before the first predicate"  # "It quickly boils water but leaks": it may cover both
    if not _finite(v2):
        return "a shared auxiliary"  # "has worked but broken"
    for v in (v1, v2):
        present = v.tag_ in ("VBZ", "VBP") or any(c.dep_ == "aux" and c.tag_ in ("VBZ", "VBP") for c in v.children)
        if not present and lemma(v).lower() not in STATIVE_VERBS | {"be"}:
            return "a past event (a sequence)"
    for part in (first, second):
        if any(toks[i].lower_ in NEGATORS or toks[i].dep_ == "neg" for i in range(part.start, part.end)):
            return "a negated predicate"  # "doesn't leak but is heavy": the negation's scope could change
    return _polarised(doc, Contrast("predicates", cc.lower_, (cc.i, cc.i + 1), first, second, 1), lex)


# --- pronouns ---------------------------------------------------------------------------------


def _third_person(tok: "Token") -> str | None:
    """"sg", "pl", "person" or "demonstrative" for a pronoun that refers back; else None."""
    low = tok.lower_
    if low in SINGULAR_PRONOUNS:
        return "sg"
    if low in PLURAL_PRONOUNS:
        return "pl"
    if low in PERSONAL_PRONOUNS:
        return "person"
    if low in DEMONSTRATIVES and (tok.pos_ == "PRON" or tok.dep_ in SUBJ_DEPS | {"dobj", "pobj", "attr"}):
        return "demonstrative"
    return None


def _agrees(kind: str, noun: "Token") -> bool:
    """Could a pronoun of ``kind`` refer to ``noun``?"""
    if noun.pos_ not in ("NOUN", "PROPN") or noun.dep_ == "compound":
        return False
    low = noun.lower_
    plural = noun.tag_ in ("NNS", "NNPS")
    if kind == "sg":
        return not plural and low not in PERSON_NOUNS
    if kind == "pl":
        return plural or low in COLLECTIVE_NOUNS
    return True  # a person pronoun or a demonstrative: any noun may be meant


def _pronouns(doc: "Doc", part: Part) -> list[tuple["Token", str]]:
    return [(t, k) for t in tokens(doc)[part.start : part.end] if (k := _third_person(t)) is not None]


def _antecedents(doc: "Doc", kind: str, part: Part) -> list["Token"]:
    return [t for t in tokens(doc)[part.start : part.end] if _agrees(kind, t)]


@dataclass(frozen=True)
class Exchange:
    """Resolve a pronoun by exchanging two subjects: token ranges and their new texts."""

    pronoun: tuple[int, int]
    pronoun_text: str  # the noun phrase (with its verb, when a contraction was expanded)
    noun: tuple[int, int]
    noun_text: str  # the pronoun (with its contraction)


def _resolve(doc: "Doc", mover: Part, stayer: Part, licensed: bool) -> "Exchange | None | str":
    """How to keep the pronouns of ``mover`` (which will now come before ``stayer``) right.

    ``None`` when nothing refers across, an :class:`Exchange` when a subject pronoun must trade
    places with the other part's subject, a reason (str) when the sentence cannot be made safe.
    ``licensed``: the mover becomes a fronted subordinate clause, where a subject pronoun may
    refer forward to the main clause's subject."""
    needs = [(p, k) for p, k in _pronouns(doc, mover) if _antecedents(doc, k, stayer)]
    if not needs:
        return None
    if len(needs) > 1:
        return "more than one pronoun would precede its antecedent"
    pron, kind = needs[0]
    if kind not in ("sg", "pl") or pron.lower_ not in ("it", "they"):
        return f"{pron.lower_!r} would precede its antecedent"
    head = tokens(doc)[mover.head]
    if pron.dep_ not in ("nsubj", "nsubjpass") or pron.head.i != head.i:
        return f"{pron.lower_!r} would precede its antecedent and is no subject"
    if _dummy_it(pron, head):
        return "a weather or dummy 'it'"
    ante = _antecedents(doc, kind, stayer)
    noun = _subject(doc, stayer)
    if len(ante) != 1 or noun is None or ante[0].i != noun.i:
        return f"{pron.lower_!r} may refer to more than one noun, or not to the subject"
    np = _simple_np(doc, noun)
    if np is None:
        return "the antecedent is no plain noun phrase"
    if licensed:
        return None
    return _exchange(doc, pron, np, kind)


def _dummy_it(pron: "Token", head: "Token") -> bool:
    """"It rained", "it was cold", "it's easy to see why": an "it" that may point at no noun."""
    if pron.lower_ != "it":
        return False
    if lemma(head).lower() in WEATHER_WORDS:
        return True
    for c in head.children:
        if c.dep_ in ("acomp", "attr") and c.lower_ in WEATHER_WORDS:
            return True
        if c.dep_ in ("ccomp", "xcomp", "csubj", "expl"):
            return True
    return False


def _simple_np(doc: "Doc", noun: "Token") -> tuple[int, int] | None:
    """The noun phrase of ``noun`` when it is plain: determiners, adjectives, compounds, numbers
    and a possessive determiner, with no clause, phrase or pronoun of its own."""
    span = sorted(t.i for t in noun.subtree)
    if span != list(range(span[0], span[-1] + 1)):
        return None
    for i in span:
        t = tokens(doc)[i]
        if i == noun.i:
            continue
        if t.dep_ not in ("det", "poss", "amod", "compound", "nummod", "advmod") or t.is_punct:
            return None
        if t.lower_ in SINGULAR_PRONOUNS | PLURAL_PRONOUNS | PERSONAL_PRONOUNS or t.lower_ in ("'s", "’s"):
            return None
    return span[0], span[-1] + 1


def _exchange(doc: "Doc", pron: "Token", np: tuple[int, int], kind: str) -> "Exchange | str":
    """The edits that trade a subject pronoun for the other clause's subject noun phrase. A verb
    contraction on the pronoun ("it's") trades with the full verb after the noun ("the pool is"),
    so the words stay the same; when the noun has no such verb, "'s" stays on the noun ("the
    pool's"), and other contractions are skipped."""
    toks = tokens(doc)
    np_text = _np_text(doc, np)
    after = toks[pron.i + 1] if pron.i + 1 < len(doc) else None
    clitic = after.lower_.replace("’", "'") if after is not None and not pron.whitespace_ else None
    if after is None or clitic not in CLITICS:
        return Exchange((pron.i, pron.i + 1), np_text, np, pron.lower_)
    full = CLITICS[clitic].get(lemma(after).lower())
    if full is None:
        return f"the contraction {pron.text + after.text!r} cannot move"
    verb = toks[np[1]] if np[1] < len(doc) else None
    if verb is not None and verb.lower_ == full and verb.pos_ == "AUX":
        return Exchange((pron.i, pron.i + 2), f"{np_text} {full}", (np[0], np[1] + 1), pron.lower_ + after.text)
    if clitic == "'s" and kind == "sg" and not np_text.lower().endswith(("s", "x", "z", "sh", "ch")):
        return Exchange((pron.i, pron.i + 1), np_text, np, pron.lower_)
    return f"the contraction {pron.text + after.text!r} cannot move"


def _np_text(doc: "Doc", np: tuple[int, int]) -> str:
    text = doc[np[0] : np[1]].text
    if not _keeps_capital(tokens(doc)[np[0]]):
        text = text[:1].lower() + text[1:]
    return text


def _back_refs(doc: "Doc", mover_back: Part, ahead: Part) -> bool:
    """A pronoun of ``mover_back`` that came before an agreeing noun of ``ahead`` and will now
    come after it (safe only when it referred forward from a fronted subordinate clause)."""
    return any(_antecedents(doc, k, ahead) for _, k in _pronouns(doc, mover_back))


# --- building the variants --------------------------------------------------------------------


def _render(doc: "Doc", part: Part, subs: dict[int, tuple[int, str]], *, initial: bool, capital: bool) -> str:
    """The text of ``part`` for a new position, with token ranges replaced (``subs``: start ->
    (end, text)): capitalised at the start of a sentence that has a capital, lower-cased when it
    leaves the start (unless a proper noun, "I" or an acronym)."""
    toks = tokens(doc)
    out: list[str] = []
    i = part.start
    while i < part.end:
        j, text = subs.get(i, (i + 1, toks[i].text))
        out.append(text)
        if j < part.end:
            out.append(toks[j - 1].whitespace_)
        i = j
    text = "".join(out)
    if initial:
        return text[:1].upper() + text[1:] if capital else text
    lead = toks[part.start]
    if part.start not in subs and _at_start(lead) and not _keeps_capital(lead):
        return text[:1].lower() + text[1:]
    return text


def _at_start(tok: "Token") -> bool:
    return tok.i == _sentence_of(tok).start


def _capital(doc: "Doc", part: Part) -> bool:
    """Does the sentence of ``part`` start with a capital? (All-lower-case text stays so.)"""
    sent = _sent(doc, part)
    first = next((t for t in sent if t.is_alpha), tokens(doc)[sent.start])
    return first.text[:1].isupper()


def _subs(ex: Exchange | None) -> dict[int, tuple[int, str]]:
    if ex is None:
        return {}
    return {ex.pronoun[0]: (ex.pronoun[1], ex.pronoun_text), ex.noun[0]: (ex.noun[1], ex.noun_text)}


def _meta(found: Contrast, weighted: Part, doc: "Doc", ex: Exchange | None, to: str | None = None) -> dict:
    meta = {
        "connective": found.connective,
        "construction": found.kind,
        "weighted": doc[weighted.start : weighted.end].text,
        "favours": "positive" if weighted.polarity > 0 else "negative",
    }
    if to is not None:
        meta["to"] = to
    if ex is not None:
        meta["resolved"] = f"{doc[ex.pronoun[0] : ex.pronoun[1]].text} -> {ex.pronoun_text}"
    return meta


def _should(weighted: Part) -> str:
    return "rise" if weighted.polarity > 0 else "fall"


def _ambiguous_capital(tok: "Token") -> bool:
    """A capitalised first word tagged as a name ("Routine is great, ..."): at the start of a
    sentence the tagger cannot tell a name from a word, so the case to give it elsewhere is unknown."""
    return _at_start(tok) and tok.pos_ == "PROPN" and not (tok.text == "I" or tok.text.isupper() and len(tok.text) > 1)


def _swap(doc: "Doc", found: Contrast) -> Candidate | str:
    first, second = found.first, found.second
    # second moves in front of first; first moves behind second
    if found.kind in ("predicates", "attributive"):
        if _back_refs(doc, second, first) or _back_refs(doc, first, second):
            return "a pronoun in a predicate refers across"
        ex = None
    else:
        # in "Although <second>, <first>" a subject pronoun may refer forward
        resolved = _resolve(doc, second, first, licensed=found.kind == "fronted")
        if isinstance(resolved, str):
            return resolved
        ex = resolved
        if found.kind != "fronted" and _back_refs(doc, first, second):
            return "a pronoun would read as the other part's noun"  # "It was cold, but the bag kept me warm"
    if _ambiguous_capital(tokens(doc)[first.start]):
        return "a capital at the start may be a name's"
    subs = _subs(ex)
    new_first = _render(doc, second, subs, initial=_at_start(tokens(doc)[first.start]), capital=_capital(doc, first))
    new_second = _render(doc, first, subs, initial=_at_start(tokens(doc)[second.start]), capital=_capital(doc, second))
    edits = [TokenEdit(first.start, first.end, new_first), TokenEdit(second.start, second.end, new_second)]
    if found.kind == "attributive":
        edits.extend(_article(doc, first, second))
    if ex is None and sorted(words(new_first + " " + new_second)) != sorted(
            words(doc[first.start : first.end].text + " " + doc[second.start : second.end].text)):
        return "the swap changed the words"  # a guard against a wrong case fix
    weighted = first if found.weighted == 1 else second  # the other part takes the weight
    return Candidate("contrast/swap", _should(weighted), tuple(edits), _meta(found, weighted, doc, ex))


def _article(doc: "Doc", first: Part, second: Part) -> list[TokenEdit]:
    """Keep "a"/"an" in agreement with the new first adjective ("an easy but slow" -> "a slow but easy")."""
    if first.start == 0:
        return []
    art = tokens(doc)[first.start - 1]
    if art.lower_ not in ("a", "an") or art.tag_ != "DT":
        return []
    new = match_article(indefinite_article(tokens(doc)[second.start].text), art.text)
    return [] if new == art.text else [TokenEdit(art.i, art.i + 1, new)]


def _connective(doc: "Doc", found: Contrast) -> Candidate | str:
    """Exchange a concessive connective for its converse between two full clauses."""
    toks = tokens(doc)
    c0, c1 = found.conn
    style = toks[c1 - 1].text  # "BUT" -> "ALTHOUGH"
    ex: Exchange | None = None
    if found.kind == "clauses":
        # X[,] but Y -> X, although Y: the weight moves to X
        new = match_case("although", style)
        edits = [TokenEdit(c0, c1, new if toks[c0 - 1].text == "," else ", " + new)]
        weighted, to = found.first, "although"
    elif found.kind == "postposed" and found.connective in CONCESSIVE:
        # Y, although X -> Y, but X: the weight moves to X
        edits = [TokenEdit(c0, c1, match_case("but", style))]
        weighted, to = found.second, "but"
    elif found.kind == "fronted" and found.connective in CONCESSIVE:
        # Although X, Y -> X, although Y: the weight moves to X; a pronoun of X that referred
        # forward now stands in the main clause, before its noun, and is resolved
        resolved = _resolve(doc, found.first, found.second, licensed=False)
        if isinstance(resolved, str):
            return resolved
        ex = resolved
        comma = found.first.end
        conn = found.connective.upper() if style.isupper() and len(style) > 1 else found.connective
        edits = [TokenEdit(c0, c1, ""), TokenEdit(comma, comma + 1, ", " + conn)]
        edits += [TokenEdit(start, end, text) for start, (end, text) in _subs(ex).items()]
        # (apply_edits gives the new first word its capital)
        weighted, to = found.first, found.connective
    else:
        return f"no converse for {found.connective!r} ({found.kind})"
    return Candidate("contrast/connective", _should(weighted), tuple(edits), _meta(found, weighted, doc, ex, to))
