"""double-negation: negate the opposite of an opinion word (should weaken).

"The floor is clean" -> "The floor isn't dirty" (antonym), "The tent is comfortable" -> "The tent
is not uncomfortable" (prefix), "I like it" -> "I don't dislike it" (verb). Litotes of this kind
keeps the polarity but weakens it, so a model's label must not reverse.

What the rules edit:

- an opinion adjective that stands as the complement of *be* or of a linking verb of perception
  or appearance (look, feel, seem, sound, appear, smell, taste): "The tent feels sturdy" ->
  "The tent doesn't feel flimsy". *stay*, *remain*, *get*, *become* are left out: they speak of a
  state kept or reached, and negating the opposite changes what is presupposed ("stayed dry" ->
  "didn't stay wet" says it was wet before);
- an opinion participle in a passive with *be* ("I was disappointed with the box" -> "I wasn't
  impressed with the box"), with no preposition or *with*/*by* after it;
- a list of such adjectives joined by one "and", as a whole, with "or" under the negation ("The
  staff were friendly and helpful" -> "The staff were not unfriendly or unhelpful"), when every
  one of them has an opposite;
- an opinion verb with an object ("I like it" -> "I don't dislike it"), in its own clause or in a
  review-style clause without a subject ("Loved it." -> "Didn't hate it.").

Degree words: an amplifier right on the edited word (very, really, so, super, extremely, pretty,
quite, ...) is dropped, never kept: "very good" -> "not bad" (weaker, the same direction), where
"not very bad" would grant that it is bad. Softeners ("a bit", "slightly", "fairly") are not
dropped: "a bit slow" -> "not fast" could be stronger; such clauses are skipped. Extreme words take
the plain opposite of the other pole ("excellent" -> "not bad", "awful" -> "not good"); the
opposite is never an extreme word itself ("not awful" only denies the worst and can read as a
complaint).

A text qualifies only when every opinion word in it has one polarity, the text holds no negation
yet (else the new negation could meet an old one), and no clause of the text without an opinion
word has an adjective or noun complement (it may carry an opinion the lexicon does not know, of the
other polarity, which a weakened clause could let through). The shared precision guards of the
negation family (``text_guard``, ``clause_doubt``, ``insertion``) apply to every edited clause;
attributive adjectives are left alone (a/an would change).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Iterator

from pairflip.perturb import grammar as g
from pairflip.perturb.base import NEGATORS, Candidate, Context, TokenEdit, match_case, tokens
from pairflip.perturb.negation import (analyse, clause_doubt, dropped_subject, insertion, opinion_of, or_for_and,
                                       predicate_opinion, text_guard)

if TYPE_CHECKING:  # pragma: no cover
    from spacy.tokens import Doc, Token

    from pairflip.perturb.negation import Clause

FAMILY = "double-negation"
RULES = {
    "double-negation/antonym": "weaken",
    "double-negation/prefix": "weaken",
    "double-negation/verb": "weaken",
}

# Verbs that link a subject to an adjective ("it feels sturdy"); see the module docstring for
# the linking verbs left out.
LINKING = {"be", "look", "feel", "seem", "sound", "appear", "smell", "taste"}
# Amplifiers dropped from the edited word ("very good" -> "not bad").
AMPLIFIERS = frozenset({"very", "really", "so", "super", "extremely", "incredibly", "truly", "absolutely",
                        "totally", "utterly", "completely", "pretty", "quite", "genuinely", "exceptionally"})
# Prepositions after a passive opinion participle that its opposite takes too ("impressed with").
_PARTICIPLE_PREPS = frozenset({"with", "by"})
# "not uncomfortable" reads best written out; the other rules contract like the negation family.
# "also", "too", "enough": the clause points at another one ("liked it enough to buy another").
_ADDITIVE = frozenset({"also", "too", "enough"})
_DEFAULT_STYLE = {"double-negation/prefix": g.FULL}
_MODIFIER_DEPS = ("advmod", "conj", "cc", "npadvmod", "neg", "xcomp", "ccomp")


def candidates(doc: "Doc", ctx: Context) -> Iterator[Candidate]:
    drop = _amplifiers(doc, ctx)
    if not drop:
        yield from _candidates(doc, ctx)
        return
    if text_guard(doc, ctx.lexicon) is not None:  # emphatic capitals, "so ... that" and the like
        return
    reduced, keep = _without(doc, set(drop))
    if reduced is None:
        return
    for cand in _candidates(reduced, ctx):
        edits = [_mapped(e, keep, len(doc)) for e in cand.edits]
        edited = {i for e in edits for i in range(e.start, e.end)}
        gone = sorted(i for i, target in drop.items() if target in edited)
        edits += [TokenEdit(i, i + 1, "") for i in gone]  # amplifiers on other words stay as they are
        meta = dict(cand.meta or {})
        if gone:
            meta["dropped"] = [doc[i].text for i in gone]
        yield Candidate(cand.rule, cand.should, tuple(sorted(edits, key=lambda e: (e.start, e.end))), meta=meta)


def _amplifiers(doc: "Doc", ctx: Context) -> dict[int, int]:
    """Amplifiers (leaves of the parse) before the opinion word they strengthen, each with the
    index of that word: on the word itself ("very good", "really like") or on a linking verb
    right before its opinion complement ("was really kind", parsed onto *was*)."""
    out: dict[int, int] = {}
    for t in tokens(doc):
        if g.norm(t.text) not in AMPLIFIERS or t.dep_ != "advmod" or list(t.children):
            continue
        h = t.head
        if t.i < h.i and h.pos_ in ("ADJ", "VERB") and opinion_of(h, ctx.lexicon) is not None:
            out[t.i] = h.i
        elif g.base_form(h) in LINKING:
            comp = [c for c in h.children if c.dep_ in ("acomp", "attr") and c.i == t.i + 1
                    and opinion_of(c, ctx.lexicon) is not None]
            if comp:
                out[t.i] = comp[0].i
    return out


def _without(doc: "Doc", drop: set[int]) -> "tuple[Doc | None, list[int]]":
    """A copy of ``doc`` without the tokens ``drop`` (leaves of the parse), annotations kept, and
    the source index of each token of the copy."""
    from spacy.tokens import Doc as SpacyDoc

    keep = [t.i for t in doc if t.i not in drop]
    new_of = {i: j for j, i in enumerate(keep)}
    if any(t.head.i in drop for t in doc if t.i not in drop):
        return None, keep
    words, spaces, tags, pos, deps, heads, lemmas, morphs = [], [], [], [], [], [], [], []
    for i in keep:
        t = doc[i]
        words.append(t.text)
        spaces.append(bool(t.whitespace_))
        tags.append(t.tag_)
        pos.append(t.pos_)
        deps.append(t.dep_)
        heads.append(new_of[t.head.i])
        lemmas.append(t.lemma_)
        morphs.append(str(t.morph))
    reduced = SpacyDoc(doc.vocab, words=words, spaces=spaces, tags=tags, pos=pos, deps=deps, heads=heads,
                       lemmas=lemmas, morphs=morphs)
    return reduced, keep


def _informal_nt(tok: "Token") -> bool:
    """The "nt" of an apostrophe-less negation ("isnt", "dont"; spaCy splits "is" + "nt")."""
    return g.norm(tok.text) == "nt" and tok.i > 0 and not tok.doc[tok.i - 1].whitespace_


def _mapped(e: TokenEdit, keep: list[int], n: int) -> TokenEdit:
    start = keep[e.start] if e.start < len(keep) else n
    end = start if e.end == e.start else keep[e.end - 1] + 1
    return TokenEdit(start, end, e.text)


def _opposite(tok: "Token", lex, pos: str) -> tuple[str, str] | None:
    """The opposite of an opinion word, or None when there is none or it is an extreme word."""
    word = g.norm(tok.text) if pos == "ADJ" else g.base_form(tok)
    opp = lex.opposite(word, pos)
    if opp is None:
        return None
    entry = lex.lookup(opp[0], pos)
    if entry is not None and entry.grade == "extreme":
        return None  # "excellent" -> "not awful" is faint praise, not a weaker "excellent"
    return opp


def _plain_adjective(adj: "Token", cl: "Clause") -> bool:
    return adj.pos_ == "ADJ" and adj.tag_ == "JJ" and not any(c.dep_ in ("advmod", "npadvmod", "neg", "xcomp", "ccomp") for c in adj.children)


def _candidates(doc: "Doc", ctx: Context) -> Iterator[Candidate]:
    lex = ctx.lexicon
    if any(g.norm(t.text) in NEGATORS or _informal_nt(t) for t in tokens(doc)):
        return  # also "isnt", "dont": the new negation would meet the old one
    if text_guard(doc, lex) is not None:  # cheap whole-text checks before the clause analysis
        return
    an = analyse(doc, lex)
    if an.unsure or not an.clauses or any(t.dep_ == "dep" for cl in an.clauses for t in cl.own):
        return
    polarities = {opinion_of(t, lex).polarity for cl in an.clauses for t in cl.opinion}
    if len(polarities) != 1 or any(cl.nonfinite_opinion for cl in an.clauses):
        return
    if any(g.norm(t.text) in _ADDITIVE for t in tokens(doc)):
        return
    for o in an.others:
        if g.aux_kind(o.head) == "be" and any(c.dep_ in ("acomp", "attr") and c.pos_ in ("ADJ", "NOUN") for c in o.head.children):
            return  # "... and the portions were small": an opinion the lexicon cannot see
    text_style = g.text_style(doc)
    for cl in an.clauses:
        head = cl.head
        if cl.subj is None and not dropped_subject(cl):
            continue  # imperatives ("Stay safe!"), fragments
        if g.base_form(head) in LINKING:
            yield from _adjectives(cl, lex, text_style)
        elif head.tag_ == "VBN" and any(c.dep_ == "auxpass" for c in head.children):
            yield from _participle(cl, lex, text_style)
        else:
            yield from _verb(cl, lex, text_style)


def _adjectives(cl: "Clause", lex, text_style: str | None) -> Iterator[Candidate]:
    """'is clean' -> 'isn't dirty'; 'is friendly and helpful' -> 'is not unfriendly or unhelpful'."""
    head = cl.head
    firsts = [c for c in head.children if c.dep_ in ("acomp", "attr", "oprd") and opinion_of(c, lex) is not None]
    if len(firsts) != 1:
        return
    first = firsts[0]
    chain = [first] + [t for t in first.subtree if t.dep_ == "conj" and t.head.i in {first.i} | {x.i for x in first.conjuncts}]
    coordinated = len(chain) > 1
    if clause_doubt(cl, lex, coordination=coordinated) is not None:
        return  # relative clauses, hedges, time frames, measures, ...
    if not all(_plain_adjective(a, cl) for a in chain):
        return  # "easy to set up", "a bit slow"; also "pleased to say" -> "*not annoyed to say" (blind review, round 4)
    if [t.i for t in predicate_opinion(cl)] != [a.i for a in chain] or any(
        t.pos_ == "ADJ" and t.head.i == head.i and t.i != first.i for t in cl.own
    ):
        return  # "tough, comfortable and roomy" read as two complements; an opinion elsewhere on the predicate
    if any(c.dep_ == "cc" for c in first.children) and not coordinated:
        return
    opps = [_opposite(a, lex, "ADJ") for a in chain]
    if any(o is None for o in opps):
        return
    or_edit = None
    if coordinated:
        or_edit = or_for_and(cl, lex)
        if or_edit is None:
            return  # "warm, dry and light" with commas, "both ... and", mixed polarity
    kinds = {o[1] for o in opps}
    rule = "double-negation/prefix" if kinds == {"prefix"} else "double-negation/antonym"
    style = text_style or _DEFAULT_STYLE.get(rule, g.CONTRACTED)
    if coordinated and "prefix" in kinds:
        style = text_style or g.FULL
    res = insertion(cl, style)
    if isinstance(res, str):
        return
    edits = [*res[1], *(TokenEdit(a.i, a.i + 1, match_case(o[0], a.text)) for a, o in zip(chain, opps))]
    if or_edit is not None:
        edits.append(or_edit)
    yield Candidate(rule, RULES[rule], tuple(edits),
                    meta={"word": " ".join(a.text for a in chain), "opposite": " ".join(o[0] for o in opps),
                          "kind": "+".join(sorted(kinds)), "style": style})


def _participle(cl: "Clause", lex, text_style: str | None) -> Iterator[Candidate]:
    """'I was disappointed with the box' -> 'I wasn't impressed with the box'."""
    head = cl.head
    if [t.i for t in cl.opinion] != [head.i] or clause_doubt(cl, lex) is not None:
        return
    if any(c.dep_ not in ("nsubjpass", "auxpass", "punct", "prep", "agent") for c in head.children):
        return  # "was let down", "was pleased to see": the opposite would not fit
    if any(c.dep_ in ("prep", "agent") and g.norm(c.text) not in _PARTICIPLE_PREPS for c in head.children):
        return  # "disappointed in" -> "*impressed in"
    if any(g.base_form(a) != "be" for a in cl.auxes if a.dep_ == "auxpass"):
        return  # "got annoyed": a change of state (see the docstring)
    opp = _opposite(head, lex, "ADJ")
    if opp is None:
        return
    word, kind = opp
    rule = f"double-negation/{kind}"
    style = text_style or _DEFAULT_STYLE.get(rule, g.CONTRACTED)
    res = insertion(cl, style)
    if isinstance(res, str):
        return
    edits = [*res[1], TokenEdit(head.i, head.i + 1, match_case(word, head.text))]
    yield Candidate(rule, RULES[rule], tuple(edits), meta={"word": head.text, "opposite": word, "kind": kind, "style": style})


def _verb(cl: "Clause", lex, text_style: str | None) -> Iterator[Candidate]:
    """'I like it' -> 'I don't dislike it'."""
    head = cl.head
    if head.pos_ != "VERB" or not any(t.i == head.i for t in cl.opinion) or clause_doubt(cl, lex) is not None:
        return
    opp = _opposite(head, lex, "VERB")
    if opp is None:
        return
    if any(g.aux_word(a) in ("would", "should", "could", "might", "may", "must") for a in cl.auxes):
        return  # "I'd like ..." is a wish, not an opinion
    if any(c.dep_ in ("xcomp", "ccomp", "advmod", "prt", "npadvmod") for c in head.children):
        return  # "like to camp", "always liked", "love it so much": keep it simple
    if not any(c.dep_ == "dobj" for c in head.children) or any(g.norm(t.text) == "far" for t in head.subtree):
        return  # "Roof beer approved." (an adjective-like participle), "like it by far" (round 5)
    style = text_style or g.CONTRACTED
    res = insertion(cl, style, new_base=opp[0])
    if isinstance(res, str):
        return
    yield Candidate("double-negation/verb", "weaken", tuple(res[1]),
                    meta={"word": head.text, "opposite": opp[0], "kind": opp[1], "style": style})
