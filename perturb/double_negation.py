"""double-negation: negate the opposite of an opinion word (should weaken).

"The floor is clean" -> "The floor isn't dirty" (antonym), "The tent is comfortable" -> "The tent
is not uncomfortable" (prefix), "I like it" -> "I don't dislike it" (verb). Litotes of this kind
keeps the polarity but weakens it, so a model's label must not reverse.

A text qualifies only when every opinion word in it has the polarity of the word we edit and the
text holds no negation yet (else weakening one clause could reverse the whole text, or the new
negation could meet an old one). The edited word must stand bare — no degree word, no
coordination — as the complement of *be* or a linking verb (adjectives) or as the predicate
(verbs); attributive adjectives are left alone (a/an would change).
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Iterator

from pairflip.perturb import grammar as g
from pairflip.perturb.base import NEGATORS, Candidate, Context, TokenEdit, match_case, tokens
from pairflip.perturb.negation import analyse, clause_doubt, insertion, opinion_of, predicate_opinion, text_guard

if TYPE_CHECKING:  # pragma: no cover
    from spacy.tokens import Doc

FAMILY = "double-negation"
RULES = {
    "double-negation/antonym": "weaken",
    "double-negation/prefix": "weaken",
    "double-negation/verb": "weaken",
}

# Verbs that link a subject to an adjective ("it feels sturdy").
LINKING = {"be", "look", "feel", "seem", "sound", "appear", "stay", "remain", "smell", "taste"}
# "not uncomfortable" reads best written out; the other rules contract like the negation family.
# "also", "too", "enough": the clause points at another one ("liked it enough to buy another").
_ADDITIVE = frozenset({"also", "too", "enough"})
_DEFAULT_STYLE = {"double-negation/prefix": g.FULL}


def candidates(doc: "Doc", ctx: Context) -> Iterator[Candidate]:
    lex = ctx.lexicon
    if any(g.norm(t.text) in NEGATORS for t in tokens(doc)):
        return
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
    text_style = g.text_style(doc)
    for cl in an.clauses:
        head = cl.head
        if cl.subj is None or clause_doubt(cl, lex) is not None:
            continue  # imperatives ("Stay safe!"), relative clauses, hedges, coordinations
        # adjectives: "is clean" -> "isn't dirty"
        if g.base_form(head) in LINKING:
            for adj in cl.opinion:
                if adj.dep_ not in ("acomp", "attr", "oprd") or adj.head.i != head.i or adj.pos_ != "ADJ" or adj.tag_ != "JJ":
                    continue
                if any(c.dep_ in ("advmod", "conj", "cc", "npadvmod", "neg", "xcomp", "ccomp") for c in adj.children):
                    continue  # also "pleased to say" -> "*not annoyed to say" (blind review, round 4)
                if any(t.dep_ == "conj" and t.pos_ == "ADJ" for t in cl.own):
                    continue  # "easy to set up and easy to take down"
                if [t.i for t in predicate_opinion(cl)] != [adj.i] or any(
                    t.pos_ == "ADJ" and t.head.i == head.i and t.i != adj.i for t in cl.own
                ):
                    continue  # "tough, comfortable and roomy": more than one opinion on the predicate
                if opinion_of(adj, lex).grade == "extreme":
                    continue  # "excellent" -> "not awful" is faint praise, not a weaker "excellent"
                opp = lex.opposite(g.norm(adj.text), "ADJ")
                if opp is None:
                    continue
                word, kind = opp
                rule = f"double-negation/{kind}"
                style = text_style or _DEFAULT_STYLE.get(rule, g.CONTRACTED)
                res = insertion(cl, style)
                if isinstance(res, str):
                    continue
                edits = [*res[1], TokenEdit(adj.i, adj.i + 1, match_case(word, adj.text))]
                yield Candidate(rule, RULES[rule], tuple(edits),
                                meta={"word": adj.text, "opposite": word, "kind": kind, "style": style})
            continue
        # verbs: "I like it" -> "I don't dislike it"
        if head.pos_ != "VERB" or not any(t.i == head.i for t in cl.opinion):
            continue
        opp = lex.opposite(g.base_form(head), "VERB")
        if opp is None:
            continue
        if any(g.aux_word(a) in ("would", "should", "could", "might", "may", "must") for a in cl.auxes):
            continue  # "I'd like ..." is a wish, not an opinion
        if any(c.dep_ in ("xcomp", "ccomp", "advmod", "prt", "npadvmod") for c in head.children):
            continue  # "like to camp", "always liked", "love it so much": keep it simple
        if not any(c.dep_ == "dobj" for c in head.children) or any(g.norm(t.text) == "far" for t in head.subtree):
            continue  # "Roof beer approved." (an adjective-like participle), "like it by far" (round 5)
        style = text_style or g.CONTRACTED
        res = insertion(cl, style, new_base=opp[0])
        if isinstance(res, str):
            continue
        yield Candidate("double-negation/verb", "weaken", tuple(res[1]),
                        meta={"word": head.text, "opposite": opp[0], "kind": opp[1], "style": style})
