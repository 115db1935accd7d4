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
- the one opinion adjective of a noun complement after "a"/"an" ("It's a great place" -> "It's not
  a bad place"; the article is chosen again);
- an opinion participle in a passive with *be* ("I was disappointed with the box" -> "I wasn't
  impressed with the box"), with no preposition or *with*/*by* after it;
- a list of such adjectives joined by one "and", as a whole, with "or" under the negation ("The
  staff were friendly and helpful" -> "The staff were not unfriendly or unhelpful"), when every
  one of them has an opposite;
- an opinion verb with an object ("I like it" -> "I don't dislike it"), in its own clause or in a
  review-style clause without a subject ("Loved it." -> "Didn't hate it.").

Degree words: an amplifier right on the edited word (very, really, so, super, extremely, pretty,
quite, ...) is dropped, never kept: "very good" -> "not bad" (weaker, the same direction), where
"not very bad" would grant that it is bad. So is "too" right before a negative adjective ("too
expensive" -> "not cheap"); elsewhere "too" means "also" and the text is skipped. Softeners ("a
bit", "slightly", "fairly") are not dropped: "a bit slow" -> "not fast" could be stronger; such
clauses are skipped. Extreme words take the plain opposite of the other pole ("excellent" -> "not
bad", "awful" -> "not good"); the opposite is never an extreme word itself ("not awful" only
denies the worst and can read as a complaint). The rules read a copy of the parse without the
dropped amplifiers (and with commas for semicolons), so every guard judges the clause as edited.

Verbless sentences are edited as the negation family edits them, with the opposite in place of the
opinion adjective(s) ("So easy." -> "Not difficult.", "Great soup." -> "Not a bad soup."); noun
phrases only with an article, and an adjective followed by nothing but "for ...".

A text qualifies only when every opinion word in it has one polarity and the text holds no negation
yet, also none without an apostrophe ("isnt"): the new negation could meet an old one. Other
clauses without an opinion word are left as they are, also when they may carry an opinion the
lexicon does not know ("and the portions were small"): clauses of opposite opinion are most often
joined by "but", which the shared guards skip, and the weakened clause keeps its direction. A
semicolon joins clauses as a comma does. The shared precision guards of the negation family
(``text_guard``, ``clause_doubt``, ``insertion``) apply to every edited clause.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Iterator

from pairflip.perturb import grammar as g
from pairflip.perturb.base import NEGATORS, Candidate, Context, TokenEdit, limited_duration, match_case, sents, tokens
from pairflip.perturb.intensifier import lone_adjective
from pairflip.perturb.negation import (indefinite_for, analyse, elliptical_echo, clause_doubt, dropped_subject, insertion, opinion_of,
                                       or_for_and, predicate_opinion, text_guard)

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
# Nouns that take no "a" though the tagger calls them singular ("friendly staff"). Narrower than
# the negation family's UNCOUNTABLE: "not a bad service", "not a poor design" read well.
# "broadband" ... "heating": blind review, round 15 ("*Not a slow broadband").
_NO_ARTICLE = frozenset({"staff", "personnel", "produce", "veg", "fruit", "bread", "meat", "fish", "wifi",
                         "internet", "parking", "kit", "gear", "stuff", "furniture", "luggage", "information",
                         "broadband", "bandwidth", "electricity", "power", "heating", "data"})


def candidates(doc: "Doc", ctx: Context) -> Iterator[Candidate]:
    drop = _amplifiers(doc, ctx)
    if any(i + 1 < len(doc) and doc[i + 1].text == "," for i in drop):
        return  # "Really, really good.": the repeated amplifier and its comma -> "*, Not bad." (blind review, round 17)
    # A semicolon joins clauses as a comma does: one weakened clause among clauses of one polarity
    # keeps the text's direction ("The coffee is great; the desks are clean"). The clause analysis
    # reads a copy with commas (the shared guards refuse semicolons, for the negation family).
    commas = {t.i: "," for t in tokens(doc) if t.text == ";"}
    if not drop and not commas:
        yield from _candidates(doc, ctx)
        return
    plain = _without(doc, set(), commas)[0] if commas else doc
    if plain is None or text_guard(plain, ctx.lexicon) is not None:  # emphatic capitals, "so ... that"
        return
    reduced, keep = _without(doc, set(drop), commas)
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
        if g.norm(t.text) not in AMPLIFIERS | {"too"} or t.dep_ != "advmod" or list(t.children):
            continue
        h = t.head
        if g.norm(t.text) == "too":  # "too expensive" -> "not cheap"; "too kind" is a polite hedge
            entry = opinion_of(h, ctx.lexicon)
            if h.pos_ == "ADJ" and h.i == t.i + 1 and entry is not None and entry.polarity < 0:
                out[t.i] = h.i
            continue
        if t.i < h.i and h.pos_ in ("ADJ", "VERB") and opinion_of(h, ctx.lexicon) is not None:
            out[t.i] = h.i
        elif g.base_form(h) in LINKING:
            comp = [c for c in h.children if c.dep_ in ("acomp", "attr") and c.i == t.i + 1
                    and opinion_of(c, ctx.lexicon) is not None]
            if comp:
                out[t.i] = comp[0].i
    return out


def _without(doc: "Doc", drop: set[int], replace: dict[int, str] | None = None) -> "tuple[Doc | None, list[int]]":
    """A copy of ``doc`` without the tokens ``drop`` (leaves of the parse) and with the texts of
    ``replace`` (punctuation only), annotations kept, and the source index of each token of the copy."""
    from spacy.tokens import Doc as SpacyDoc

    keep = [t.i for t in doc if t.i not in drop]
    new_of = {i: j for j, i in enumerate(keep)}
    if any(t.head.i in drop for t in doc if t.i not in drop):
        return None, keep
    words, spaces, tags, pos, deps, heads, lemmas, morphs = [], [], [], [], [], [], [], []
    for i in keep:
        t = doc[i]
        words.append((replace or {}).get(i, t.text))
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
    if an.unsure or not (an.clauses or an.fragments) or any(t.dep_ == "dep" for cl in an.clauses for t in cl.own):
        return
    polarities = {opinion_of(t, lex).polarity for t in tokens(doc) if opinion_of(t, lex) is not None}
    if len(polarities) != 1 or any(cl.nonfinite_opinion for cl in an.clauses):
        return
    if any(g.norm(t.text) in _ADDITIVE for t in tokens(doc)):
        return
    if any(opinion_of(t, lex) is not None and t.pos_ == "ADJ" and any(c.dep_ == "prep" and g.norm(c.text) == "as" for c in t.children)
           for t in tokens(doc)):
        return  # a simile: "clear as day" -> "*not unclear as day" (blind review, round 15)
    if limited_duration(doc):
        return  # "was easy and we enjoyed it for just over a week": the praise is not the point
    if any(g.norm(t.text) == "throughout" for t in tokens(doc)):
        return  # "*haven't been bad throughout": bad at some point? (blind review, round 17; negation keeps it)
    if elliptical_echo(an) is not None:
        return  # "are excellent -- as is the quality" -> "*aren't bad -- as is" (blind review, round 16v)
    if not an.clauses:
        yield from _fragment(doc, an, lex)
        return
    text_style = g.text_style(doc)
    for cl in an.clauses:
        head = cl.head
        if cl.subj is None and not dropped_subject(cl):
            continue  # imperatives ("Stay safe!"), fragments
        if g.base_form(head) in LINKING:
            yield from _adjectives(cl, lex, text_style, alone=len(an.clauses) + len(an.others) == 1)
        elif head.tag_ == "VBN" and any(c.dep_ == "auxpass" for c in head.children):
            yield from _participle(cl, lex, text_style)
        else:
            yield from _verb(cl, lex, text_style)


def _adjectives(cl: "Clause", lex, text_style: str | None, alone: bool) -> Iterator[Candidate]:
    """'is clean' -> 'isn't dirty'; 'is friendly and helpful' -> 'is not unfriendly or unhelpful'."""
    head = cl.head
    firsts = [c for c in head.children if c.dep_ in ("acomp", "attr", "oprd") and opinion_of(c, lex) is not None]
    if not firsts:
        if alone:  # "It was a rough week and it cheered me up": the noun phrase may only set the scene
            yield from _attributive(cl, lex, text_style)
        return
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
    if coordinated and any(c.dep_ == "prep" and g.norm(c.text) == "with" and c.i > chain[-1].i
                           for t in (head, *chain) for c in t.children):
        return  # "*isn't unpleasant, dim or cramped with a separate cat area": the feature joins the faults (blind review, round 20)
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


def _attributive(cl: "Clause", lex, text_style: str | None) -> Iterator[Candidate]:
    """'It's a great place' -> 'It's not a bad place': the one opinion adjective of a noun
    complement, after "a"/"an" (chosen again for the opposite: "an excellent" -> "a bad")."""
    head = cl.head
    nouns = [c for c in head.children if c.dep_ == "attr" and c.pos_ == "NOUN" and c.tag_ == "NN"]
    if len(nouns) != 1 or clause_doubt(cl, lex) is not None:
        return
    noun = nouns[0]
    adjs = [c for c in noun.children if c.dep_ == "amod"]
    if len(adjs) != 1 or [t.i for t in cl.opinion] != [adjs[0].i]:
        return
    adj = adjs[0]
    det = [c for c in noun.children if c.dep_ == "det"]
    if [c.dep_ for c in noun.children if c.i < noun.i] != ["det", "amod"] or g.norm(det[0].text) not in ("a", "an") \
            or det[0].i + 1 != adj.i or adj.i + 1 != noun.i or not _plain_adjective(adj, cl):
        return  # "a really great place", "a great little place", "the best place": keep it to "a ADJ NOUN"
    if any(c.i > noun.i and c.dep_ not in ("prep", "punct") for c in noun.children):
        return  # "a great place that ...": a relative clause
    opp = _opposite(adj, lex, "ADJ")
    if opp is None:
        return
    word, kind = opp
    art = indefinite_for(word)
    if art is None:
        return
    rule = f"double-negation/{kind}"
    style = text_style or _DEFAULT_STYLE.get(rule, g.CONTRACTED)
    res = insertion(cl, style)
    if isinstance(res, str):
        return
    edits = [*res[1], TokenEdit(det[0].i, det[0].i + 1, match_case(art, det[0].text)),
             TokenEdit(adj.i, adj.i + 1, match_case(word, adj.text))]
    yield Candidate(rule, RULES[rule], tuple(edits), meta={"word": adj.text, "opposite": word, "kind": kind, "style": style})


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
    if not word.endswith("ed") and any(c.dep_ in ("prep", "agent") for c in head.children):
        return  # "was broken by the courier" -> "*wasn't working by the courier"
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


def _fragment(doc: "Doc", an, lex) -> Iterator[Candidate]:
    """A verbless sentence, toggled as the negation family toggles it, with the opposite in place
    of its opinion adjective(s): "So easy." -> "Not difficult.", "Handy app." -> "Not a useless
    app.", "Loud and dirty." -> "Not quiet or clean." Noun phrases only with an article ("not a"):
    "Not bad recipes." or "Not unfriendly staff." is no natural English."""
    if len(an.fragments) != 1 or len(list(sents(doc))) != 1:
        return
    fr = an.fragments[0]
    if fr.inserted != 1 or fr.removed != 0 or fr.dropped:
        return  # a dropped degree word: the amplifier pass above re-parses without it
    root = fr.root
    ops = [t for t in tokens(doc) if opinion_of(t, lex) is not None]
    lone = lone_adjective(root, lex)  # "Superb." tagged as a name
    if root.pos_ == "ADJ" or lone:
        targets = sorted([root, *root.conjuncts], key=lambda t: t.i)
    else:
        targets = [t for t in ops if t.dep_ == "amod" and t.head.i == root.i]
        if len(targets) != 1:
            return
    if {t.i for t in ops} - {root.i} != {t.i for t in targets} - {root.i} or \
            any((t.pos_ != "ADJ" or t.tag_ != "JJ") and not lone for t in targets):
        return
    if any(c.dep_ not in ("punct", "conj", "cc") and not (c.dep_ == "prep" and g.norm(c.text) == "for")
           for t in targets for c in t.children):
        return  # "Simple as that." is an idiom; only "for ..." ("for the price") may follow
    lead = min(fr.edits, key=lambda e: e.start)
    tok = doc[lead.start]
    prefix = lead.text[: len(lead.text) - len(tok.text)].rstrip()
    if g.norm(prefix) not in ("not", "not a", "not an"):
        return  # "not the best": superlatives
    if root.pos_ != "ADJ" and not lone and g.norm(prefix) == "not" and g.norm(tok.text) not in ("a", "an"):
        return  # a bare noun phrase: "Not bad recipes."
    if root.pos_ != "ADJ" and not lone and g.norm(root.text) in _NO_ARTICLE:
        return  # "*Not an unfriendly staff."
    opps = [_opposite(t, lex, "ADJ") for t in targets]
    if any(o is None for o in opps):
        return
    edits = [e for e in fr.edits if e is not lead]
    if any(e.start <= t.i < e.end for e in edits for t in targets):
        return  # the fragment's own edit covers an adjective ("easy, delicious" -> "easy or delicious")
    for t, (word, _kind) in zip(targets, opps):
        if t.i != tok.i:
            edits.append(TokenEdit(t.i, t.i + 1, match_case(word, t.text) if not t.text[:1].isupper() else word))
    if tok.i in {t.i for t in targets}:
        word = opps[[t.i for t in targets].index(tok.i)][0]
        if g.norm(prefix) in ("not a", "not an"):
            art = indefinite_for(word)
            if art is None:
                return
            prefix = prefix.split()[0] + " " + art
        edits.append(TokenEdit(tok.i, tok.i + 1, f"{prefix} {word}"))
    elif g.norm(tok.text) in ("a", "an") and tok.i + 1 == targets[0].i:
        art = indefinite_for(opps[0][0])  # "Not a unreasonable vet" (blind review, round 20)
        if art is None:
            return
        edits.append(TokenEdit(tok.i, tok.i + 1, lead.text[: len(lead.text) - len(tok.text)] + art))
    else:
        edits.append(lead)
    kinds = {o[1] for o in opps}
    rule = "double-negation/prefix" if kinds == {"prefix"} else "double-negation/antonym"
    yield Candidate(rule, RULES[rule], tuple(sorted(edits, key=lambda e: (e.start, e.end))),
                    meta={"word": " ".join(t.text for t in targets), "opposite": " ".join(o[0] for o in opps),
                          "kind": "+".join(sorted(kinds)), "style": g.FULL, "fragment": True})
