"""negation: insert or remove a negation on the predicate that carries the opinion (should flip).

A text is cut into *clauses* (a finite predicate with its subject, auxiliaries and its own
dependents, not counting nested finite clauses) and *fragments* (a sentence with no finite verb).
A clause carries an opinion when its own tokens hold an opinion-lexicon word. Every clause that
carries an opinion is toggled — negated when positive, its negation removed when negative — in one
candidate, so a sentence is never left half flipped; when one of them cannot be toggled safely
(questions, imperatives, conditionals, fragments, negative-polarity words, inversions) the text
yields nothing. The candidate's rule is the construction used on the first toggled clause; the
meta lists every clause's rule.

Rules:

* ``negation/copula``     — *be* (copula, progressive, passive): is -> isn't / is not, 's -> 's not
* ``negation/modal``      — have/has/had as auxiliaries and the modals: will -> won't, can -> cannot
* ``negation/do-support`` — a lexical verb gets *do*: loves -> doesn't love, broke -> didn't break
* ``negation/removal``    — isn't -> is, didn't like -> liked, can't -> can, never -> (dropped)
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Iterator

from pairflip.perturb import grammar as g
from pairflip.perturb.base import Candidate, Context, TokenEdit, lemma, match_case

if TYPE_CHECKING:  # pragma: no cover
    from spacy.tokens import Doc, Token

    from pairflip.perturb.lexicon import Lexicon

FAMILY = "negation"
RULES = {
    "negation/copula": "flip",
    "negation/modal": "flip",
    "negation/do-support": "flip",
    "negation/removal": "flip",
}

# Default when the text shows no contraction style of its own (reviews are informal).
DEFAULT_STYLE = g.CONTRACTED

_SUBJ_DEPS = {"nsubj", "nsubjpass", "expl", "csubj", "csubjpass"}
_AUX_DEPS = {"aux", "auxpass"}
_FINITE_TAGS = {"VBZ", "VBP", "VBD", "MD"}
_POS_TO_LEX = {"ADJ": "ADJ", "ADV": "ADV", "VERB": "VERB", "NOUN": "NOUN", "PROPN": "NOUN"}

# Negators we can remove (one per clause) and the ones we leave alone (the clause is skipped).
REMOVABLE_NEG = {"not", "n't", "never"}
OTHER_NEG = {"no", "nothing", "none", "nobody", "nowhere", "neither", "nor", "without", "hardly",
             "barely", "scarcely", "rarely", "seldom", "nor", "cannot", "ain't"}
# Negative-polarity items: removing the negation would need "any" -> "some" etc.; skip.
NPI = {"any", "anything", "anyone", "anybody", "anywhere", "anymore", "ever", "yet", "either",
       "enough", "at all", "single"}
# Minimisers after "a": "didn't leak a drop" -> "leaked a drop" needs rewording; skip.
_MINIMISERS = {"drop", "bit", "thing", "wink", "dime", "penny", "word"}
# Causal links: a negation inside "because ..." under a clause with no opinion word of its own
# ("the cover blew away because it doesn't fasten") would contradict the unedited main clause.
_CAUSAL = {"because", "since", "as", "so", "cause", "'cause"}
# Positive-polarity items: inserting a negation would need "some" -> "any" etc.; skip.
PPI = {"some", "something", "someone", "somebody", "somewhere", "already", "somewhat", "pretty",
       "fairly", "rather", "kinda", "slightly", "bit", "even", "both", "quite",
       # extreme amplifiers: "is absolutely not stunning" / "isn't absolutely stunning" both misread
       "absolutely", "truly", "utterly"}
# Quantifiers and frequency words: a negation would bind them ("doesn't always work" is not
# the opposite of "always works"); skip.
SCOPE_WORDS = {"always", "usually", "often", "sometimes", "all", "every", "everything", "everyone",
               "everybody", "many", "most", "each"}
# After "not" these read as a different construction ("not exactly great"): no removal.
_NOT_FOLLOWERS = {"only", "just", "even", "exactly", "necessarily", "quite", "that", "much", "all",
                  "entirely", "really", "sure"}
# Adverbs that the negation precedes ("I don't really like it", "it doesn't always work").
AFTER_NEG_ADVS = {"really", "always", "exactly", "particularly", "fully", "completely",
                  "entirely", "necessarily", "totally", "much", "especially", "actually"}
# Sentence adverbs that stay before the negation ("it is definitely not", "I definitely don't").
PRE_NEG_ADVS = {"definitely", "certainly", "probably", "surely", "absolutely", "honestly",
                "seriously", "clearly", "obviously", "simply", "literally", "still",
                "also", "just"}
_TIME_NOUNS = {"day", "night", "weekend", "week", "month", "year", "morning", "evening", "afternoon",
               "winter", "summer", "season", "trip", "way", "long"}
_COND_MARKS = {"if", "unless", "whenever", "whether"}
# Raising/aspect verbs whose infinitive complement is part of their own predicate.
_RAISING = {"seem", "appear", "tend", "continue", "keep", "happen", "prove", "turn", "start", "begin"}


@dataclass
class Clause:
    head: "Token"                      # the predicate (lexical verb, or the copula)
    subj: "Token | None"               # own or inherited (conjoined predicates)
    auxes: list["Token"]               # auxiliaries of the head, left to right
    own: list["Token"]                 # tokens of the clause proper
    opinion: list["Token"] = field(default_factory=list)
    negs: list["Token"] = field(default_factory=list)
    other_negs: list["Token"] = field(default_factory=list)
    nonfinite_opinion: bool = False    # an opinion word in a non-finite adverbial (unsure)

    @property
    def negated(self) -> bool:
        return bool(self.negs or self.other_negs)


@dataclass
class Analysis:
    clauses: list[Clause]              # the clauses that carry an opinion
    unsure: str | None                 # why the text must not be touched, or None
    others: list[Clause] = field(default_factory=list)  # finite clauses without an opinion word


def opinion_of(tok: "Token", lexicon: "Lexicon"):
    """The opinion-lexicon entry of a token (by lemma and part of speech), or ``None``."""
    pos = _POS_TO_LEX.get(tok.pos_)
    if pos is None or not tok.is_alpha:
        return None
    if g.norm(tok.text) == "well" and tok.i > 0 and g.norm(tok.doc[tok.i - 1].text) == "as":
        return None  # "as well"
    if g.norm(tok.text) == "like" and pos != "VERB":
        return None
    hit = lexicon.lookup(lemma(tok).lower(), pos) or lexicon.lookup(g.norm(tok.text), pos)
    if hit is None and pos == "VERB" and tok.tag_ == "VBN" and (
        tok.dep_ == "acomp" or any(c.dep_ == "auxpass" for c in tok.children)
    ):  # "I was impressed / disappointed" (passive), not "I have worn"
        hit = lexicon.lookup(g.norm(tok.text), "ADJ")
    return hit


# Verbs that take a finite complement clause ("I think it's great"). A "ccomp" under any other
# verb without a complementiser is most often a tagger slip ("makes the best camp pancakes" with
# *pancakes* read as a verb); such a "clause" is folded into its parent.
_CLAUSE_TAKERS = {"think", "say", "feel", "know", "guess", "believe", "hope", "find", "mean",
                  "suppose", "notice", "realize", "realise", "wish", "tell", "expect", "bet",
                  "admit", "agree", "swear", "doubt", "claim", "promise", "see", "hear", "be"}


def _is_finite_head(tok: "Token") -> bool:
    if tok.pos_ not in ("VERB", "AUX") or tok.dep_ in _AUX_DEPS:
        return False
    if tok.dep_ == "pcomp" and not any(c.tag_ in ("WRB", "WP", "WDT") or c.dep_ == "mark" for c in tok.children):
        return False  # "perfect for quick coffee stops": a noun read as a verb after a preposition
    if tok.dep_ == "ccomp" and not any(c.dep_ == "mark" for c in tok.children) \
            and lemma(tok.head).lower() not in _CLAUSE_TAKERS:
        return False
    if any(c.dep_ in _AUX_DEPS and c.tag_ in _FINITE_TAGS for c in tok.children):
        return True
    if tok.tag_ in ("VBZ", "VBP", "VBD"):
        return True
    # a base-form verb with its own subject and no auxiliary: a tagger slip for VBP ("I love")
    return tok.tag_ == "VB" and any(c.dep_ in _SUBJ_DEPS for c in tok.children) and tok.dep_ != "xcomp"


def _subject(head: "Token") -> "Token | None":
    tok = head
    for _ in range(10):
        for c in tok.children:
            if c.dep_ in _SUBJ_DEPS:
                return c
        if tok.dep_ == "conj" and tok.head.i != tok.i:
            tok = tok.head
            continue
        return None
    return None


def _own_tokens(head: "Token", heads: set[int]) -> tuple[list["Token"], list["Token"]]:
    """The head's clause tokens, and those inside non-finite adverbials (advcl) below it."""
    own: list[Token] = [head]
    adverbial: list[Token] = []
    stack = [(c, False) for c in head.children]
    while stack:
        tok, in_adv = stack.pop()
        if tok.i in heads:
            continue  # a nested finite clause: its own unit
        if tok.dep_ == "advcl" and tok.pos_ in ("VERB", "AUX"):
            in_adv = True
        (adverbial if in_adv else own).append(tok)
        stack.extend((c, in_adv) for c in tok.children)
    own.sort(key=lambda t: t.i)
    return own, adverbial


def analyse(doc: "Doc", lexicon: "Lexicon") -> Analysis:
    """Cut ``doc`` into clauses; say whether any opinion sits where no rule can reach it."""
    heads = {t.i for t in doc if _is_finite_head(t)}
    clauses: list[Clause] = []
    unsure: str | None = None
    has_opinion = False
    for t in doc:
        if g.norm(t.text) in _COND_MARKS and t.dep_ in ("mark", "advmod", "prep", "cc", "ROOT"):
            unsure = unsure or "conditional"
        if g.norm(t.text) == "not" and t.i + 1 < len(doc) and g.norm(doc[t.i + 1].text) == "only":
            unsure = unsure or "not only"
    for sent in doc.sents:
        is_question = any("?" in t.text for t in sent)
        covered: set[int] = set()
        for t in sent:
            if t.i not in heads:
                continue
            auxes = sorted((c for c in t.children if c.dep_ in _AUX_DEPS), key=lambda c: c.i)
            own, adverbial = _own_tokens(t, heads)
            covered.update(x.i for x in own)
            covered.update(x.i for x in adverbial)
            cl = Clause(head=t, subj=_subject(t), auxes=auxes, own=own)
            # verbs folded in from non-finite complements and conjoined participles share our aux
            for x in own:
                if opinion_of(x, lexicon) is not None:
                    cl.opinion.append(x)
                n = g.norm(x.text)
                if x.dep_ == "neg" and n in REMOVABLE_NEG and x.head in [t, *auxes]:
                    cl.negs.append(x)
                elif x.dep_ == "neg" or n in OTHER_NEG:
                    cl.other_negs.append(x)
            cl.nonfinite_opinion = any(opinion_of(x, lexicon) is not None for x in adverbial)
            if cl.opinion or cl.nonfinite_opinion:
                has_opinion = True
                if is_question:
                    unsure = unsure or "question"
            clauses.append(cl)
        # tokens of the sentence that no finite clause covers: a fragment ("Great tent!", "Love it")
        rest = [t for t in sent if t.i not in covered]
        if any(opinion_of(t, lexicon) is not None for t in rest):
            has_opinion = True
            unsure = unsure or ("question" if is_question else "fragment without a finite verb")
    if not has_opinion:
        unsure = unsure or "no opinion"
    return Analysis(
        clauses=[c for c in clauses if c.opinion or c.nonfinite_opinion],
        unsure=unsure,
        others=[c for c in clauses if not (c.opinion or c.nonfinite_opinion)],
    )


def trailing_plain_conjunct(an: Analysis) -> Clause | None:
    """A predicate without an opinion word conjoined after an opinion predicate with the same
    subject ("is clumsy and takes up too much space"): it most often carries an opinion the
    lexicon lacks, so a negation of the first alone would leave the text half flipped."""
    opinion_heads = {c.head.i for c in an.clauses}
    for c in an.others:
        h = c.head
        if h.dep_ == "conj" and not any(x.dep_ in _SUBJ_DEPS for x in h.children) and h.head.i in opinion_heads:
            return c
    return None


_PREDICATE_DEPS = {"acomp", "attr", "advmod", "oprd", "conj", "xcomp", "npadvmod", "prt", "ccomp", "dobj"}


def predicate_opinion(cl: Clause) -> list["Token"]:
    """The clause's opinion words on the predicate itself (the verb, its complement, its manner
    adverbs and their coordinations), leaving out modifiers inside noun and prepositional phrases
    ("carries heavy loads comfortably" -> *comfortably*). Falls back to all opinion words."""
    keep = {cl.head.i}
    own = {t.i for t in cl.own}
    stack = [cl.head]
    while stack:
        tok = stack.pop()
        for c in tok.children:
            if c.i in own and c.dep_ in _PREDICATE_DEPS and c.i not in keep:
                if c.dep_ == "dobj":  # the object counts, its modifiers do not
                    keep.add(c.i)
                    continue
                keep.add(c.i)
                stack.append(c)
    hits = [t for t in cl.opinion if t.i in keep]
    return hits or cl.opinion


# ---------------------------------------------------------------- insertion


def _first_alpha_after(tok: "Token") -> "Token | None":
    doc = tok.doc
    return doc[tok.i + 1] if tok.i + 1 < len(doc) else None


def aux_negation(tok: "Token", style: str) -> list[TokenEdit] | None:
    """Edits that negate a finite auxiliary or copula token in ``style``."""
    doc = tok.doc
    t = g.norm(tok.text)
    nxt = _first_alpha_after(tok)
    if nxt is not None and nxt.dep_ == "advmod" and g.norm(nxt.text) in PRE_NEG_ADVS and nxt.head.i != nxt.i:
        # "it is definitely worth it" -> "it is definitely not worth it" (natural in both styles)
        return [TokenEdit(nxt.i + 1, nxt.i + 1, "not")]
    if t in g.CLITICS:
        lem = g.clitic_lemma(tok)
        if lem == "be":  # it's -> it's not, I'm -> I'm not, they're -> they're not
            return [TokenEdit(tok.i, tok.i + 1, tok.text + " not")]
        full = g.aux_word(tok)
        neg = g.negative_aux(full, g.CONTRACTED if style == g.CONTRACTED else g.FULL)
        if neg is None or tok.i == 0 or doc[tok.i - 1].whitespace_:
            return None
        prev = doc[tok.i - 1]  # I've -> I haven't, it'll -> it won't, I'd -> I wouldn't
        return [TokenEdit(prev.i, tok.i + 1, f"{prev.text} {neg}")]
    word = g.aux_word(tok)
    neg = g.negative_aux(word, style)
    if neg is None:
        return None
    return [TokenEdit(tok.i, tok.i + 1, match_case(neg, tok.text))]


def insertion(cl: Clause, style: str, new_base: str | None = None) -> tuple[str, list[TokenEdit]] | str:
    """Negate a clause: (rule, edits), or the reason it cannot be done.

    ``new_base`` replaces the lexical verb (double negation: like -> don't dislike).
    """
    head, subj = cl.head, cl.subj
    doc = head.doc
    if subj is None:
        return "no subject (imperative or fragment)"
    if cl.negated:
        return "already negated"
    for x in cl.own:
        n = g.norm(x.text)
        if n == "little" and x.i > 0 and g.norm(doc[x.i - 1].text) == "a":
            return "hedge 'a little'"
        if n == "all" and x.i + 1 < len(doc) and g.norm(doc[x.i + 1].text) in _TIME_NOUNS | {"the"}:
            continue  # "all night", "all the way"
        if n in ("ever", "yet", "anymore"):
            return f"negative-polarity word {x.text!r} already licensed (superlative)"
        if n == "most" and x.dep_ == "advmod":
            continue  # the superlative "the most painful", not the quantifier "most bottles"
        if n in PPI or n in SCOPE_WORDS or (n == "too" and x.head.pos_ in ("VERB", "AUX")) or (n == "well" and x.i > 0 and g.norm(doc[x.i - 1].text) == "as"):
            return f"positive-polarity word {x.text!r}"
    finite = cl.auxes[0] if cl.auxes else head
    if finite.i < subj.i:
        return "inverted word order"
    if subj.pos_ not in ("PRON", "NOUN", "PROPN", "NUM", "DET", "X") or g.norm(subj.text) in ("a", "an", "the"):
        return f"doubtful subject {subj.text!r} (tagger slip)"
    if subj.dep_ == "nsubjpass" and not cl.auxes:
        return "passive subject without an auxiliary (tagger slip)"
    for x in cl.own:
        if x.pos_ == "VERB" and x.dep_ == "conj" and x.head.pos_ not in ("VERB", "AUX"):
            return f"verb {x.text!r} coordinated with a non-verb: the negation would not reach it"
    if cl.auxes:
        if finite.tag_ not in _FINITE_TAGS and g.norm(finite.text) not in g.CLITICS:
            return "non-finite auxiliary"
        kind = g.aux_kind(finite)
        if kind is None:
            return "unknown auxiliary"
        if kind == "modal" and len(cl.auxes) > 1 and g.aux_kind(cl.auxes[1]) == "have" and g.aux_word(finite) in ("would", "could", "should", "might", "may", "must"):
            return "counterfactual perfect"
        edits = aux_negation(finite, style)
        if edits is None:
            return "cannot negate the auxiliary"
        if new_base is not None:
            if head.tag_ not in ("VB", "VBN", "VBG"):
                return "unexpected verb form"
            edits.append(TokenEdit(head.i, head.i + 1, match_case(g.inflect(new_base, head.tag_), head.text)))
        rule = {"be": "negation/copula", "do": "negation/do-support"}.get(kind, "negation/modal")
        return rule, edits
    if g.aux_kind(head) == "be" and g.base_form(head) == "be":
        if new_base is not None:
            return "copula has no verb to replace"
        edits = aux_negation(head, style)
        return ("negation/copula", edits) if edits else "cannot negate the copula"
    # do-support on a lexical verb
    tag = head.tag_
    s3 = g.third_singular_subject(subj)
    if tag == "VBZ" and s3 is False or tag == "VBP" and s3 is True:
        return "agreement in the source looks wrong"
    do = g.do_form(tag, style, s3)
    if do is None:
        return f"no do-support for tag {tag}"
    base = new_base or g.base_form(head)
    if base == "be":
        return "copula"
    if base == "do" and not any(c.dep_ in ("dobj", "ccomp", "xcomp", "prep") for c in head.children):
        return "elliptical 'do'"
    if not g.is_known_verb(head.text):
        return f"{head.text!r} is not a known verb form (tagger slip)"
    # the negation goes before "really/always" but after "definitely/also"
    run: list[Token] = []
    j = head.i - 1
    while j > subj.i and doc[j].pos_ == "ADV" and doc[j].head.i == head.i:
        run.insert(0, doc[j])
        j -= 1
    if run and g.norm(run[0].text) in AFTER_NEG_ADVS:
        edits = [TokenEdit(run[0].i, run[0].i, do), TokenEdit(head.i, head.i + 1, match_case(base, head.text))]
    else:
        edits = [TokenEdit(head.i, head.i + 1, match_case(f"{do} {base}", head.text))]
    return "negation/do-support", edits


# ---------------------------------------------------------------- removal


def removal(cl: Clause) -> list[TokenEdit] | str:
    """Remove the clause's one negation: edits, or the reason it cannot be done."""
    head, subj = cl.head, cl.subj
    doc = head.doc
    if subj is None:
        return "no subject (imperative or fragment)"
    if cl.other_negs:
        return f"negator {cl.other_negs[0].text!r} is not removable"
    if len(cl.negs) != 1:
        return "more than one negation"
    neg = cl.negs[0]
    if neg.i < subj.i:
        return "negation before the subject"
    for x in cl.own:
        n = g.norm(x.text)
        if n in NPI or (n == "all" and x.i > 0 and g.norm(doc[x.i - 1].text) == "at"):
            return f"negative-polarity word {x.text!r}"
        if n in _MINIMISERS and x.i > 0 and g.norm(doc[x.i - 1].text) == "a":
            return f"minimiser 'a {x.text}'"
    nxt = doc[neg.i + 1] if neg.i + 1 < len(doc) else None
    if nxt is not None and g.norm(nxt.text) in _NOT_FOLLOWERS:
        return f"'{neg.text} {nxt.text}' is an idiom"
    n = g.norm(neg.text)
    if n == "never":
        return [TokenEdit(neg.i, neg.i + 1, "")]
    prev = doc[neg.i - 1] if neg.i > 0 else None
    if prev is None:
        return "negation at the start"
    if prev.i in {a.i for a in cl.auxes} or (prev.i == head.i and g.aux_kind(head) == "be"):
        kind = g.aux_kind(prev)
        if kind == "do" and prev.i != head.i:
            tag = g.do_tag(prev) if g.norm(prev.text) != "ca" else None
            if tag is None or head.tag_ != "VB":
                return "unexpected form after do"
            base = g.base_form(head)
            if base == "be":
                return "do + be"
            form = g.inflect(base, tag)
            if tag == "VBP" and g.third_singular_subject(subj) is True:
                return "agreement in the source looks wrong"
            return [TokenEdit(prev.i, neg.i + 1, ""), TokenEdit(head.i, head.i + 1, match_case(form, head.text))]
        if n == "n't":
            if g.norm(prev.text) == "ai":
                return "ain't"
            return [TokenEdit(prev.i, neg.i + 1, g.positive_aux(prev))]
        if not prev.whitespace_:  # "cannot" -> "can"
            return [TokenEdit(prev.i, neg.i + 1, prev.text)]
        return [TokenEdit(neg.i, neg.i + 1, "")]
    if prev.pos_ == "ADV" and n == "not":  # "it is definitely not worth it"
        return [TokenEdit(neg.i, neg.i + 1, "")]
    return "negation is not on the auxiliary"


# ---------------------------------------------------------------- the family


def doubtful(an: Analysis) -> str | None:
    """Why the text as a whole is not to be touched, or None."""
    if an.unsure or not an.clauses:
        return an.unsure or "no opinion clause"
    if trailing_plain_conjunct(an) is not None:
        return "a predicate without an opinion word follows an opinion predicate"
    if any(t.dep_ == "dep" for cl in an.clauses for t in cl.own):
        return "the parser could not attach a word"
    for cl in an.others:  # "... and the dog did too": an echo of the clause we would edit
        if g.base_form(cl.head) == "do" and not any(c.dep_ in ("dobj", "ccomp", "xcomp") for c in cl.head.children):
            return "an elliptical 'do' echoes another clause"
    return None


def _wh_fronted(cl: Clause) -> bool:
    """A clause opened by a wh-word that is not its subject ("how warm this bag is")."""
    subj = cl.subj
    return subj is not None and any(
        t.tag_ in ("WRB", "WP", "WDT") and t.i < subj.i and t.i != subj.i for t in cl.own
    )


def _embedded(cl: Clause) -> bool:
    """A clause that is part of its governor's content and so goes with the governor's polarity:
    a complement ("disappointed that it broke"), a wh-complement ("impressed with how warm it
    is") or a restrictive relative clause ("wobbly on any ground that isn't flat"; one set off by
    a comma is an assertion of its own)."""
    h = cl.head
    if h.dep_ in ("ccomp", "pcomp") or _wh_fronted(cl):
        return True
    if h.dep_ == "relcl":
        first = min(t.i for t in h.subtree)
        return not (first > 0 and h.doc[first - 1].text == ",")
    return False


def _governor(tok: "Token", by_head: dict[int, Clause]) -> Clause | None:
    """The opinion clause whose predicate (or its complement) governs ``tok``'s clause."""
    h = tok.head
    for _ in range(6):
        if h.i in by_head:
            return by_head[h.i]
        if h.head.i == h.i:
            return None
        h = h.head
    return None


def clause_style(doc: "Doc", default: str = DEFAULT_STYLE) -> str:
    return g.text_style(doc) or default


def candidates(doc: "Doc", ctx: Context) -> Iterator[Candidate]:
    """One candidate per text: every opinion clause toggled, or nothing."""
    res = plan(doc, ctx)
    if isinstance(res, Candidate):
        yield res


def plan(doc: "Doc", ctx: Context) -> "Candidate | str":
    """The one candidate for ``doc`` (every opinion clause toggled), or why there is none."""
    an = analyse(doc, ctx.lexicon)
    why = doubtful(an)
    if why is not None:
        return why
    by_head = {cl.head.i: cl for cl in an.clauses}
    # the complement of an opinion ("disappointed that it broke") goes with its governor
    clauses = [cl for cl in an.clauses if not (_embedded(cl) and _governor(cl.head, by_head) is not None)]
    if any(_wh_fronted(cl) for cl in clauses):
        return "wh-fronted clause"  # "how warm it is" under a clause with no opinion of its own
    style = clause_style(doc)
    edits: list[TokenEdit] = []
    rules: list[str] = []
    inserted = removed = 0
    for cl in clauses:
        if cl.nonfinite_opinion:
            return "opinion in a non-finite adverbial"
        if len({opinion_of(t, ctx.lexicon).polarity for t in predicate_opinion(cl)}) > 1:
            return "mixed polarity in one predicate"  # "heavy but durable": a negation would not reverse the clause
        own_ids = {t.i for t in cl.own}
        for t in cl.own:
            if t.dep_ == "conj" and t.pos_ == "VERB" and t.head.i == cl.head.i and not any(
                opinion_of(x, ctx.lexicon) is not None for x in t.subtree
            ):
                return "plain verb conjunct"  # "won't stay tight and keep loosening": the plain conjunct would clash
        if cl.head.dep_ == "advcl" and _governor(cl.head, by_head) is None:
            return "adverbial clause under a plain main clause"  # "I'll wear them until they fall apart": the main clause sets the frame
        if cl.head.dep_ in ("advcl", "conj") and any(
            g.norm(c.text) in _CAUSAL and c.dep_ in ("mark", "cc", "advmod") for c in cl.head.children
        ) and any(o.head.i == cl.head.head.i for o in an.others):
            return "causal clause under a plain main clause"  # a causal clause under a main clause the lexicon cannot judge
        for t in cl.own:
            if t.dep_ == "cc" and g.norm(t.text) in ("but", "yet") and any(
                c.dep_ == "conj" and c.i in own_ids for c in t.head.children
            ):
                return "contrast inside one predicate"  # "stiff at first but comfortable later": contrast inside one predicate
        if cl.negated:
            res = removal(cl)
            if isinstance(res, str):
                return "removal: " + res
            rules.append("negation/removal")
            edits.extend(res)
            removed += 1
        else:
            res2 = insertion(cl, style)
            if isinstance(res2, str):
                return "insertion: " + res2
            rules.append(res2[0])
            edits.extend(res2[1])
            inserted += 1
    if not edits:
        return "no edit"
    spans = sorted((e.start, e.end) for e in edits)
    for (s1, t1), (s2, t2) in zip(spans, spans[1:]):
        if s2 < t1 or (s1 == s2 and (s1 == t1 or s2 == t2)):
            return "two clauses share a token"  # two clauses share a token (a shared auxiliary): unsure
    return Candidate(
        rule=rules[0],
        should=RULES[rules[0]],
        edits=tuple(edits),
        meta={"clauses": len(rules), "rules": rules, "inserted": inserted, "removed": removed,
              "style": style, "predicates": [cl.head.text for cl in clauses]},
    )
