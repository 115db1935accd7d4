"""reorder: move words without changing what is said (should hold; shuffle is a diagnostic).

Rules:

``reorder/coordination`` (hold)
    Rotate the conjuncts of an "and"/"or" coordination of single adjectives or manner adverbs
    (each optionally after its degree adverbs): "light, warm and cheap" -> "warm, cheap and
    light". Nouns, verb phrases and prepositional phrases are not rotated (their modifiers
    re-attach: "corned beef on rye and soup"), nor conjuncts glued to a hyphen, slash, hashtag or
    link ("s-video"), negated scopes ("no X and no Y"), identity words ("same or similar"),
    correlatives ("either ... or") and loose list items with colons or dashes. Commas and the coordinator stay where they are, so an Oxford
    comma is kept when the text has one. "but"/"yet" coordinations are never reordered: the
    second conjunct carries the weight of a contrast ("cheap but sturdy" praises, "sturdy but
    cheap" warns), so the order is part of what is said. Also skipped: fixed binomials
    ("pros and cons", "nice and warm"), numbers ("two or three"), personal pronouns ("my wife
    and I"), conjuncts that refer back with a pronoun ("the tent and its poles"), noun phrases
    joined by "or" (verb agreement follows the nearer one), and verb phrases that are not in the
    present tense or carry an auxiliary (past-tense "and" tells a sequence: "pitched it and slept
    in it").
``reorder/adverbial`` (hold)
    Move a time, place, condition or frame adverbial of the main verb from the end to the front
    with a comma ("... quickly in the morning." -> "In the morning, ... quickly."); never to the
    end, where it may attach to the last noun ("... a gift after less than 24 hours"). Only a clean
    prepositional phrase or adverb with no verb, coordination or approximation inside ("every
    time it freezes", "every 10 minutes or so"), no "for" durations, not under verbs of duration
    or placement, not in sentences with mentions, hashtags, links or colons. Skipped: questions; sentences with negation or focus words
    (not, never, only, even, just, also, too), whose scope the move would change; phrases that
    are arguments rather than adjuncts (directional "to the campground", the predicate of
    "is in the garage", durations to completion "in two hours"); and sentence adverbs whose move
    to the end reads oddly ("Unfortunately, ..." stays; "..., honestly." may move to the front).
``reorder/clauses`` (hold)
    Swap two independent clauses joined by "and" when both are states (linking verbs such as be,
    seem, feel, or stative verbs such as have, weigh, fit), neither refers to the other with a
    pronoun, and nothing marks a sequence or addition (then, later, so, also, too).
``reorder/shuffle`` (none, diagnostic)
    A seeded random permutation of the content words (nouns, verbs, adjectives, adverbs,
    numbers) of each sentence; function words, negators and punctuation keep their places.
    Ungrammatical on purpose: it measures how much a model relies on word order.

Every variant keeps the source's words (``a``/``an`` count as one); the case of a word that
moves to or from the start of a sentence is fixed; proper nouns and "I" keep their capital.
"""

from __future__ import annotations

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
    "which who whom whose".split()
)
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
    "monday tuesday wednesday thursday friday saturday sunday january february march april may june july "
    "august september october november december start beginning end while".split()
)
CONDITION_NOUNS = frozenset(
    "rain snow wind winds storm storms cold heat weather conditions sun frost fog humidity downpour dark "
    "darkness drizzle sleet hail mud altitude".split()
)
PLACE_NOUNS = frozenset("trail trails campsite campground backcountry mountains summit woods forest desert".split())
# Prepositions whose phrase is a free adjunct when its noun is of the right kind.
ADJUNCT_PREPS = {
    "in": TIME_NOUNS | CONDITION_NOUNS | PLACE_NOUNS | {"experience", "opinion", "view"},
    "on": TIME_NOUNS | PLACE_NOUNS,
    "at": TIME_NOUNS | PLACE_NOUNS | {"altitude"},
    "for": TIME_NOUNS | {"price", "money", "cost"},
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
TIME_UNITS = frozenset(
    "second seconds minute minutes hour hours day days week weeks month months year years afternoon "
    "morning evening night weekend".split()
)
DURATION_VERBS = frozenset({"last", "take", "run", "wait", "cost", "weigh", "hold"})
TIME_DETS = frozenset({"every", "each", "last", "this", "next", "that", "all", "one"})
TIME_ADVERBS = frozenset(
    "yesterday today tonight recently lately nowadays eventually later afterwards overnight".split()
)
STANCE_ADVERBS = frozenset(
    "honestly frankly personally overall luckily fortunately unfortunately thankfully sadly surprisingly "
    "admittedly ultimately basically generally".split()
)
ARGUMENT_VERBS = frozenset(  # verbs whose place phrase is an argument ("left it in the car")
    "put leave keep store place hang set stand sit lie live go come get arrive drive walk take bring "
    "carry fit pack move send ship return stay remain".split()
)
CONTRAST = frozenset({"but", "yet", "although", "though", "while", "whereas", "however"})
# Coordinations that may be rotated: single adjectives and adverbs ("light and warm"); nouns,
# verbs and prepositional phrases carry modifiers that re-attach to the wrong conjunct ("corned
# beef on rye and soup").
SAFE_KINDS = frozenset({"adj", "adv"})
MOVE_TO_END = False
NOT_SCALAR = frozenset({"same", "similar", "other", "different", "next", "last", "first", "only", "own", "such"})
CONTENT_POS = frozenset({"NOUN", "PROPN", "VERB", "ADJ", "ADV", "NUM"})


def candidates(doc: "Doc", ctx: Context) -> Iterator[Candidate]:
    """Every reorder variant the parse supports; shuffle last (it consumes ``ctx.rng``)."""
    for sent in sents(doc):
        yield from _coordination(sent, ctx)
        yield from _adverbial(sent, ctx)
        yield from _clauses(sent, ctx)
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


def _kind(tok: "Token", lex) -> str | None:
    if tok.pos_ == "ADJ" or _is_adjective(tok, lex):
        return "adj"
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
    edge punctuation; for a verb phrase, from the verb on (the subject is shared)."""
    skip: set[int] = set()
    for c in tok.children:
        if c.i in others or c.dep_ in ("cc", "preconj", "conj"):
            skip.update(t.i for t in c.subtree)
        elif kind in ("adj", "adv") and c.dep_ in ("det", "poss", "nummod"):
            skip.update(t.i for t in c.subtree)  # "A light and warm bag": the article is the noun's
    idx = sorted(t.i for t in tok.subtree if t.i not in skip)
    if kind == "vp":
        idx = [i for i in idx if i >= tok.i]
    while idx and (tok.doc[idx[0]].is_punct):
        idx.pop(0)
    while idx and (tok.doc[idx[-1]].is_punct):
        idx.pop()
    if not idx or idx != list(range(idx[0], idx[-1] + 1)):
        return None
    if any(tok.doc[i].is_punct and tok.doc[i].text not in ("-", "'") for i in idx):
        return None  # "warm, windproof and packable" parsed with "warm, windproof" as one conjunct
    if kind in ("adj", "adv") and any(
        c.i > tok.i and c.i in idx and c.dep_ not in ("xcomp", "advmod", "cc", "punct") for c in tok.children
    ):
        return None  # "warm and dry all day": "all day" belongs to the verb, not to "dry"
    return idx[0], idx[-1] + 1


def _coordination(sent: "Span", ctx: Context) -> Iterator[Candidate]:
    doc = sent.doc
    lex = ctx.lexicon
    # heads with a "conj" child, found in one pass over the tokens (not a scan of every token's children)
    conj_heads = sorted({t.head.i for t in sent if t.dep_ == "conj" and t.head.i != t.i})
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
            continue  # noun, verb and prepositional conjuncts carry modifiers that re-attach
        if kind in ("adj", "adv") and head.dep_ in ("pobj", "dobj", "nsubj", "nsubjpass", "compound"):
            continue  # "reliable in the cold and easy to light": "cold" is not coordinated with "easy"
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
        after = spans[-1][1]
        if kind in ("adj", "adv") and after < sent.end and tokens(doc)[after].lower_ == "to" and tokens(doc)[after].head.i not in ids:
            continue  # "dark, stuffy and hard to move around in": the infinitive goes with the last one
        if not all(_plain_conjunct(doc, a, b, t) for (a, b), t in zip(spans, conj)):
            continue
        if any(t.text in (":", "-", "--", "(", ")") or t.lower_ in ("either", "neither", "both", "whether") for t in sent):
            continue  # loose list items ("pros: size - small and ..."), correlatives ("either ... or")
        if any(t.lower_ in NOT_SCALAR for t in conj):
            continue  # "the same or similar problems": identity words, not qualities
        if kind == "adv" and any(not (t.lower_.endswith("ly") or lex.lookup(t.lower_, "ADV")) or t.lower_ in FOCUS_WORDS for t in conj):
            continue  # "configured properly or just isn't": only manner adverbs
        if any(g.lower_ in NEGATORS or any(c.lower_ in NEGATORS or c.dep_ == "neg" for c in g.children)
               for g in {head, head.head}):
            continue  # "no X and no Y needed": the negation's scope changes with the order
        toks = [doc[a:b] for a, b in spans]
        texts = [s.text.lower() for s in toks]
        if len(set(texts)) != len(texts):
            continue
        if not _coordination_ok(kind, conj, toks, texts, lex):
            continue
        order = list(range(1, len(spans))) + [0]  # rotate by one: A, B, C -> B, C, A
        edits = []
        for pos, src in enumerate(order):
            a, b = spans[pos]
            sa, sb = spans[src]
            initial = a == sent.start
            text = _span_text(doc, sa, sb, initial=initial, was_initial=sa == sent.start)
            edits.append(TokenEdit(a, b, text))
        # keep "a"/"an" in agreement with the new first word ("an easy and quick" -> "a quick and easy")
        a0 = spans[0][0]
        if a0 > sent.start and tokens(doc)[a0 - 1].lower_ in ("a", "an") and tokens(doc)[a0 - 1].tag_ == "DT":
            art = tokens(doc)[a0 - 1]
            new_art = match_article(indefinite_article(doc[spans[order[0]][0]].text), art.text)
            if new_art != art.text:
                edits.insert(0, TokenEdit(art.i, art.i + 1, new_art))
        yield Candidate(
            "reorder/coordination", RULES["reorder/coordination"], tuple(edits),
            {"kind": kind, "conjuncts": len(spans), "coordinator": ccs[0].lower_},
        )


def _plain_conjunct(doc: "Doc", a: int, b: int, head: "Token") -> bool:
    """A conjunct that is one word, or one word after its degree adverbs ("very light"), with no
    glued hyphen, slash, hashtag or link on either side ("s-video", "#map", "a/b")."""
    for i in range(a, b):
        t = tokens(doc)[i]
        if i != head.i and not (t.dep_ == "advmod" and t.head.i == head.i and i < head.i and not list(t.children)):
            return False
        if t.text[:1] in "#@" or t.like_url or any(ch in t.text for ch in "-/_#@"):
            return False
    if a > 0 and not tokens(doc)[a - 1].whitespace_ and tokens(doc)[a - 1].text in ("-", "/", "#", "@", "&", "+"):
        return False
    if b < len(doc) and not tokens(doc)[b - 1].whitespace_ and tokens(doc)[b].text in ("-", "/", "&", "+"):
        return False
    return True


def _coordination_ok(kind: str, conj: list["Token"], toks: list["Span"], texts: list[str], lex) -> bool:
    if len(toks) == 2 and (texts[0], texts[1]) in BINOMIALS:
        return False
    if kind == "np":
        # "The poles and stakes": a shared determiner must not become one conjunct's own
        determined = {any(c.dep_ in ("det", "poss") for c in t.children) for t in conj}
        if len(determined) != 1:
            return False
        # an adjective the tagger took for a noun ("a light and warm bag") is not a noun phrase
        if any(lex.lookup(t.lower_, "ADJ") is not None and lex.lookup(t.lower_, "NOUN") is None for t in conj):
            return False
    if texts[0] in HENDIADYS and kind == "adj":
        return False
    for k, span in enumerate(toks):
        for t in span:
            if t.pos_ == "NUM" or t.like_num:
                return False
            if t.pos_ == "PRON" and t.lower_ in ("i", "me", "you", "we", "us", "he", "she", "him", "her", "they", "them", "it"):
                if len(span) == 1:
                    return False  # "my wife and I", "you and me"
            if k > 0 and t.lower_ in ANAPHORS:
                return False  # "the tent and its poles"
            if t.lower_ in SEQUENCE_WORDS:
                return False
    if kind == "vp":
        if any(v.tag_ not in ("VBZ", "VBP") for v in conj):
            return False  # present tense only: past-tense "and" tells a sequence
        for v in conj[1:]:
            if any(c.dep_ in ("aux", "auxpass", "neg", "nsubj", "nsubjpass", "expl") for c in v.children):
                return False  # a later conjunct with its own subject is a clause (reorder/clauses)
        first = conj[0]
        subj_end = _subject_end(first)
        for c in first.children:
            if c.dep_ in ("aux", "auxpass", "neg"):
                return False  # "doesn't leak and packs small": the auxiliary is shared
            if subj_end < c.i < first.i:
                return False  # "It quickly boils water and packs small": "quickly" would change scope
    return True


def _subject_end(verb: "Token") -> int:
    for c in verb.children:
        if c.dep_ in ("nsubj", "nsubjpass"):
            return c.right_edge.i
    return sent_of(verb).start - 1


# --- adverbials ------------------------------------------------------------------------------


def _adjunct(tok: "Token", root: "Token") -> bool:
    """Is ``tok`` (a dependent of the main verb) a free time/place/condition/frame adjunct?"""
    if any(t.lower_ in ANAPHORS or t.pos_ == "PRON" and t.lower_ not in ("my", "our", "your") for t in tok.subtree):
        return False
    if tok.dep_ == "prep":
        allowed = ADJUNCT_PREPS.get(tok.lower_, ())
        if allowed == () or tok.left_edge.i != tok.i:
            return False  # "held up well after three years": "well after" is not one phrase
        if tok.lower_ in ("until", "till", "to", "through") and any(
            c.dep_ == "prep" and c.lower_ == "from" for c in root.children
        ):
            return False  # "from midnight until dawn" is one span of time
        if lemma(root) in DURATION_VERBS and tok.lower_ in ("for", "in", "over", "within"):
            return False  # "will last for years": the duration is the verb's complement
        objs = [c for c in tok.children if c.dep_ == "pobj"]
        if len(objs) != 1 or objs[0].pos_ not in ("NOUN", "PROPN"):
            return False
        noun = objs[0]
        if tok.lower_ == "in" and (
            any(c.like_num for c in noun.subtree)
            or noun.lower_ in TIME_UNITS and not any(c.lower_ in ("the", "this", "that") for c in noun.children)
        ):
            return False  # "charges in two hours", "folds flat in seconds": time to completion, not a frame
        if allowed is not None and noun.lower_ not in allowed:
            return False
        if noun.lower_ in PLACE_NOUNS and lemma(root) in ARGUMENT_VERBS:
            return False
        return True
    if tok.dep_ == "npadvmod" and tok.lower_ in TIME_ADVERBS and not list(tok.children):
        return True  # "yesterday", tagged as a noun
    if tok.dep_ == "npadvmod" and tok.pos_ == "NOUN" and tok.lower_ in TIME_NOUNS:
        return any(c.lower_ in TIME_DETS or c.like_num for c in tok.children)
    if tok.dep_ == "advmod" and tok.pos_ == "ADV" and not list(tok.children):
        return tok.lower_ in TIME_ADVERBS or tok.lower_ in STANCE_ADVERBS
    return False


def _adverbial(sent: "Span", ctx: Context) -> Iterator[Candidate]:
    doc = sent.doc
    root = sent.root
    if _is_question(sent) or root.pos_ not in ("VERB", "AUX"):
        return
    if any(t.lower_ in NEGATORS or t.dep_ == "neg" or t.lower_ in FOCUS_WORDS or (t.lower_ in CONTRAST and t.pos_ != "NOUN") for t in sent):
        return  # scope: "didn't leak in the rain"; attachment: "stiff at first but comfortable after a week"
    subj = [c for c in root.children if c.dep_ in ("nsubj", "nsubjpass", "expl")]
    if len(subj) != 1:
        return  # imperatives and fragments
    if any(c.dep_ == "conj" and c.pos_ in ("VERB", "AUX") for c in root.children):
        return  # "At night, A and B": at the other end the phrase would cover only one conjunct
    subj = subj[0]
    last = _last_word(sent)
    if last < 0:
        return
    punct_end = last + 1 < sent.end  # the sentence has closing punctuation after its last word
    # end -> front
    right = [c for c in root.children if c.i > root.i and not c.is_punct]
    if right:
        adv = right[-1]
        if (
            adv.right_edge.i == last
            and adv.dep_ in ("prep", "advmod", "npadvmod")
            and lemma(root) not in DURATION_VERBS | ARGUMENT_VERBS
            and not (adv.lower_ == "for" and not any(t.lower_ in ("price", "money", "cost") for t in adv.subtree))
            and not any(t.dep_ in ("cc", "conj") or t.lower_ in ("about", "around", "roughly", "every", "each")
                        or t.text[:1] in "@#" for t in adv.subtree)
            and not any(t.text[:1] in "@#" or t.like_url or t.text == ":" for t in sent)
            and not (adv.dep_ == "npadvmod" and any(t.like_num for t in adv.subtree))
            and not any(t.pos_ in ("VERB", "AUX") or t.dep_ in ("relcl", "acl", "advcl", "mark") for t in adv.subtree)
            and _adjunct(adv, root)
            and subj.left_edge.i == sent.start
            and not (lemma(root) == "be" and not any(c.dep_ in ("acomp", "attr") for c in root.children))
            and not (adv.dep_ == "advmod" and adv.lower_ in TIME_ADVERBS and len(right) == 1 and lemma(root) == "be")
        ):
            a = adv.left_edge.i
            prev = tokens(doc)[a - 1]
            has_comma = prev.text == ","
            if not (adv.lower_ in STANCE_ADVERBS and not has_comma):  # "works honestly": a manner reading
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
                    {"direction": "to-front", "phrase": doc[a : last + 1].text},
                )
    # front -> end: never (at the end the phrase may attach to the last noun: "... a gift after
    # less than 24 hours")
    left = [c for c in root.children if c.i < root.i and not c.is_punct] if MOVE_TO_END else []
    if left and left[0].left_edge.i == sent.start:
        adv = left[0]
        b = adv.right_edge.i + 1
        has_comma = b < len(doc) and tokens(doc)[b].text == ","
        nxt = b + 1 if has_comma else b
        if (
            adv.dep_ in ("prep", "npadvmod", "advmod")
            and adv.lower_ not in STANCE_ADVERBS
            and _adjunct(adv, root)
            and subj.left_edge.i == nxt
            and (punct_end or sent.end == len(doc))
        ):
            moved = _span_text(doc, sent.start, b, initial=False, was_initial=True)
            edits = [TokenEdit(sent.start, nxt, "")]
            cap = _span_text(doc, nxt, nxt + 1, initial=True, was_initial=False)
            if cap != tokens(doc)[nxt].text:
                edits.append(TokenEdit(nxt, nxt + 1, cap))
            edits.append(TokenEdit(last + 1, last + 1, moved))
            yield Candidate(
                "reorder/adverbial", RULES["reorder/adverbial"], tuple(edits),
                {"direction": "to-end", "phrase": doc[sent.start : b].text},
            )


# --- clauses ---------------------------------------------------------------------------------


def _clauses(sent: "Span", ctx: Context) -> Iterator[Candidate]:
    doc = sent.doc
    root = sent.root
    if _is_question(sent) or root.pos_ not in ("VERB", "AUX"):
        return
    conjs = [c for c in root.children if c.dep_ == "conj"]
    ccs = [c for c in root.children if c.dep_ == "cc"]
    if len(conjs) != 1 or len(ccs) != 1 or ccs[0].lower_ != "and":
        return
    second, cc = conjs[0], ccs[0]
    if any(c.dep_ == "conj" for c in second.children):
        return
    subj1 = [c for c in root.children if c.dep_ in ("nsubj", "nsubjpass", "expl")]
    subj2 = [c for c in second.children if c.dep_ in ("nsubj", "nsubjpass", "expl")]
    if len(subj1) != 1 or len(subj2) != 1:
        return
    last = _last_word(sent)
    if subj1[0].left_edge.i != sent.start or second.left_edge.i != cc.i + 1 or _right_word(second) != last:
        return
    end1 = cc.i - 1 if tokens(doc)[cc.i - 1].text == "," else cc.i
    if end1 <= sent.start or cc.i <= root.i:
        return
    # clause 1 must be exactly the tokens before the coordinator (no dependents of the root after it)
    if any(t.i > cc.i and t.i <= last and not any(t.i == s.i for s in second.subtree) for t in root.subtree):
        return
    for head in (root, second):
        if not _stative(head):
            return
    words = [t for t in doc[sent.start : last + 1] if t.i != cc.i]
    if any(t.is_punct and t.text not in ("-", "'") and t.i != end1 for t in words):
        return  # a comma inside a clause ("..., which I like") would not travel well
    if any(t.lower_ in ANAPHORS or t.lower_ in SEQUENCE_WORDS for t in words):
        return
    c1 = _span_text(doc, cc.i + 1, last + 1, initial=True, was_initial=False)
    c2 = _span_text(doc, sent.start, end1, initial=False, was_initial=True)
    edits = (TokenEdit(sent.start, end1, c1), TokenEdit(cc.i + 1, last + 1, c2))
    yield Candidate("reorder/clauses", RULES["reorder/clauses"], edits, {"coordinator": "and"})


def _right_word(tok: "Token") -> int:
    return max(t.i for t in tok.subtree if not t.is_punct)


def _stative(head: "Token") -> bool:
    """A clause head that describes a state: a linking or stative verb (any tense, no auxiliary
    but do-support), or a present-tense adjectival passive ("the pockets are well placed")."""
    auxes = [c for c in head.children if c.dep_ in ("aux", "auxpass")]
    if head.tag_ == "VBN" and len(auxes) == 1 and auxes[0].dep_ == "auxpass" and auxes[0].tag_ in ("VBZ", "VBP"):
        return True
    if lemma(head) not in STATIVE_VERBS:
        return False
    return all(c.dep_ == "aux" and lemma(c) == "do" for c in auxes)


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
