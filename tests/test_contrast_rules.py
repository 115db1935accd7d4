"""Table-driven tests of the contrast rules: exact variants with their expectation, skips with
their reason, and the family's registration.

Grammar facts the tables rely on (handbook facts of English grammar, from memory):
* "but" and "yet" join contrasting clauses and the second conjunct carries the point being made;
  "although", "though" and "even though" introduce a concessive subordinate clause, whose content
  is conceded while the main clause carries the assertion, wherever the subordinate clause stands
  (Quirk et al. 1985, A Comprehensive Grammar of the English Language, 13.33 on "but" and 15.39 on
  concession; Biber et al. 1999, 10.2 on adverbial clauses) — from memory. "While" and "whereas"
  mark contrast between clauses; fronted, they leave the assertion to the main clause (Quirk et
  al. 15.43, from memory); after the main clause they set the two side by side with no weight on
  either, as both blind judges of round 7 read them, so those are skipped. "However" links two independent clauses, after a semicolon or opening the next
  sentence (Quirk et al. 8.137, from memory).
* A pronoun may precede its antecedent (backward anaphora, cataphora) when it stands in a fronted
  subordinate clause ("Although it's pricey, the pool is lovely"), but a subject pronoun of a main
  clause cannot refer forward to a noun in what follows ("It's pricey, although the pool is
  lovely" is about something else): Langacker's precede-and-command condition and binding
  principle C (Chomsky 1981, Lectures on Government and Binding) — from memory.
* "a" before a consonant sound, "an" before a vowel sound — any standard grammar.
The sentences are invented reviews of our own outdoor-gear shop.
"""

from __future__ import annotations

import random
from collections import Counter

import pytest

from pairflip.perturb import FAMILY_MODULES, contrast
from pairflip.perturb.base import Context, apply_edits, validate, words
from pairflip.perturb.lexicon import load_lexicon

SWAP, CONN = "contrast/swap", "contrast/connective"


@pytest.fixture(scope="module")
def lex():
    return load_lexicon()


def made(nlp, lex, text: str) -> dict[str, tuple[str, str, dict]]:
    """rule -> (variant, should, meta) for the valid variants of ``text``."""
    doc = nlp(text)
    out: dict[str, tuple[str, str, dict]] = {}
    for cand in contrast.candidates(doc, Context(lexicon=lex, rng=random.Random(0))):
        variant, _ = apply_edits(doc, cand.edits)
        assert cand.rule not in out, f"two {cand.rule} variants of {text!r}"
        if validate(doc, cand, variant) is None:
            out[cand.rule] = (variant, cand.should, cand.meta)
    return out


# (source, rule, exact variant, should)
MADE = [
    # but / yet between clauses: the clauses change places; the comma and "but" stay
    ("The app is slow, but support is great.", SWAP, "Support is great, but the app is slow.", "fall"),
    ("The app is slow, but support is great.", CONN, "The app is slow, although support is great.", "fall"),
    ("The mat is comfortable, but the pump is terrible!", SWAP, "The pump is terrible, but the mat is comfortable!", "rise"),
    ("I love the stove, but the lid is flimsy.", SWAP, "The lid is flimsy, but I love the stove.", "rise"),  # "I" keeps its capital
    ("the lamp is bright but the strap is itchy.", SWAP, "the strap is itchy but the lamp is bright.", "rise"),  # lower case stays
    ("the lamp is bright but the strap is itchy.", CONN, "the lamp is bright, although the strap is itchy.", "rise"),  # a comma comes in
    ("The pack is comfortable, but the hip belt is too thin.", SWAP,
     "The hip belt is too thin, but the pack is comfortable.", "rise"),  # "too" + adjective is a fault
    ("The tent isn't light, but it doesn't leak.", SWAP, "The tent doesn't leak, but it isn't light.", "fall"),  # negated parts
    ("THE TENT IS AWFUL, BUT THE FLY IS GREAT.", CONN, "THE TENT IS AWFUL, ALTHOUGH THE FLY IS GREAT.", "fall"),
    ("The stove is noisy, yet it boils water fast.", SWAP, "The stove boils water fast, yet it is noisy.", "fall"),
    ("The stove is noisy, yet it boils water fast.", CONN, "The stove is noisy, although it boils water fast.", "fall"),
    # pronouns: a subject pronoun that would precede its noun trades places with it
    ("The tent is light but it feels fragile.", SWAP, "The tent feels fragile but it is light.", "rise"),
    ("The tent looks nice but it leaks.", SWAP, "The tent leaks but it looks nice.", "rise"),
    ("The tent is heavy, but it doesn't leak.", SWAP, "The tent doesn't leak, but it is heavy.", "fall"),
    ("The boots are great, but they're uncomfortable.", SWAP, "The boots are uncomfortable, but they're great.", "rise"),
    ("The pool looks lovely, although it's pricey.", SWAP, "The pool's pricey, although it looks lovely.", "fall"),
    # predicates of one subject; attributive adjectives with the article fixed
    ("The pan is heavy but durable.", SWAP, "The pan is durable but heavy.", "fall"),
    ("The boots are quite stiff but extremely supportive.", SWAP,
     "The boots are extremely supportive but quite stiff.", "fall"),
    ("The lantern is cheap but works well.", SWAP, "The lantern works well but is cheap.", "fall"),
    ("Cheap but sturdy.", SWAP, "Sturdy but cheap.", "fall"),
    ("It's a cheap but sturdy chair.", SWAP, "It's a sturdy but cheap chair.", "fall"),
    ("It is an awkward but useful tool.", SWAP, "It is a useful but awkward tool.", "fall"),
    # although / though / even though, fronted and postposed
    ("Although it's pricey, the pool is lovely.", SWAP, "Although the pool is lovely, it's pricey.", "fall"),
    ("Although it's pricey, the pool is lovely.", CONN, "The pool is pricey, although it's lovely.", "fall"),  # resolved
    ("The pool is lovely, although it's pricey.", SWAP, "The pool is pricey, although it's lovely.", "fall"),
    ("The pool is lovely, although it's pricey.", CONN, "The pool is lovely, but it's pricey.", "fall"),
    ("Though the boots are stiff, they are very comfortable.", SWAP,
     "Though they are very comfortable, the boots are stiff.", "fall"),
    ("Though the boots are stiff, they are very comfortable.", CONN,
     "The boots are stiff, though they are very comfortable.", "fall"),
    ("The lamp is bright, though the strap is itchy.", SWAP, "The strap is itchy, though the lamp is bright.", "fall"),
    ("The lamp is bright, though the strap is itchy.", CONN, "The lamp is bright, but the strap is itchy.", "fall"),
    ("Even though the tent is heavy, it is very roomy.", SWAP, "Even though it is very roomy, the tent is heavy.", "fall"),
    ("Even though the tent is heavy, it is very roomy.", CONN, "The tent is heavy, even though it is very roomy.", "fall"),
    # while / whereas: swapped, never exchanged for "but"
    ("While the stove is noisy, it is very reliable.", SWAP, "While it is very reliable, the stove is noisy.", "fall"),
    ("Whereas the headlamp is bright, the strap is itchy.", SWAP, "Whereas the strap is itchy, the headlamp is bright.", "rise"),
    # however, after a semicolon
    ("The tent is light; however, the poles are flimsy.", SWAP, "The poles are flimsy; however, the tent is light.", "rise"),
    ("The boots are stiff; however, they are very comfortable.", SWAP,
     "The boots are very comfortable; however, they are stiff.", "fall"),
]

# (source, rule or None for both, words the reason from contrast.explain must contain)
SKIPPED = [
    ("The tent is light, but the fly is roomy.", None, "same polarity"),
    ("The tent is green, but the fly is blue.", None, "without one clear polarity"),  # no lexicon opinion
    ("The stove is tall, but it boils water fast.", None, "without one clear polarity"),  # "tall" is not listed
    ("Is the tent light but flimsy?", None, "question"),
    ("The tent is great when it is dry, but it leaks in the rain.", None, "condition"),
    ("The tent would be great, but it leaks.", None, "hedging modal"),
    ("I expected the boots to be comfortable, but they are stiff.", None, "unasserted"),
    ("The shop says the tent is waterproof, but it leaks.", None, "unasserted"),  # reported speech
    ("The boots were stiff at first but comfortable after a week.", None, "at first"),
    ("The stove is reliable but it is also heavy.", None, "'also'"),
    ("The tent arrived quickly, but the zipper broke.", None, "two past events"),
    ("The tent is light but flimsy, although it is cheap.", None, "more than one contrast word"),
    ("The tent is light but the poles are flimsy #fail", None, "social-media token"),
    ("The tent leaks, though.", None, "marks no clause"),  # "though" as an adverb
    ("The tent has not leaked yet.", None, "no coordinator"),
    ("I've been charged a late fee even though I paid on time.", None, "without one clear polarity"),  # the writer's own punctuality (round 17)
    ("The tent is nothing but trouble.", None, "no coordinator"),
    ("Sadly, the tent is light but the poles are flimsy.", None, "not two"),  # a lead outside the clauses
    # pronouns that cannot be resolved: the swap is skipped, the connective (no words move) is made
    ("The zipper broke, but I love it.", SWAP, "is no subject"),
    ("The tent has a great fly, but it leaks.", SWAP, "more than one noun"),
    ("The stove is light, but this is flimsy.", SWAP, "'this' would precede"),
    ("The tent is roomy, but its poles are flimsy.", SWAP, "'its' would precede"),
    ("The boots look great, but they're uncomfortable.", SWAP, "contraction"),
    ("It was miserable, but the tent was great.", SWAP, "would read as the other part's noun"),
    # no converse connective
    ("The pan is heavy but durable.", CONN, "no converse"),
    ("While the stove is noisy, it is very reliable.", CONN, "no converse for 'while'"),
    ("The jacket is warm, whereas the gloves are flimsy.", SWAP, "balances the two clauses"),  # blind review, round 7
    ("The desks are comfy, while the Wi-Fi drops every afternoon.", SWAP, "balances the two clauses"),
    ("The stove used to be reliable but the new burner is weak.", SWAP, "a past state 'used to'"),  # round 8
    ("I was worried about the weight, but the pack carries well.", SWAP, "the writer's past worry 'worried'"),  # round 8
    ("The tent is light; however, the poles are flimsy.", CONN, "no converse for 'however'"),
]


@pytest.mark.parametrize("source, rule, variant, should", MADE)
def test_made(nlp, lex, source, rule, variant, should):
    got = made(nlp, lex, source)
    assert rule in got, f"no {rule} variant of {source!r}; explain: {contrast.explain(nlp(source), lex)}"
    assert got[rule][:2] == (variant, should)


@pytest.mark.parametrize("source, rule, reason", SKIPPED)
def test_skipped(nlp, lex, source, rule, reason):
    got = made(nlp, lex, source)
    rules = [SWAP, CONN] if rule is None else [rule]
    for r in rules:
        assert r not in got, (r, got.get(r))
    why = contrast.explain(nlp(source), lex)
    assert any(reason in line for line in why), why


def test_the_table_covers_each_connective_and_both_rules():
    sources = " ".join(s.lower() for s, *_ in MADE)
    for conn in ("but", "yet", "although", "though", "even though", "while", "whereas", "however,"):
        assert f" {conn} " in f" {sources} " or sources.startswith(conn), conn
    assert {r for _, r, _, _ in MADE} == set(contrast.RULES)
    assert len(MADE) + len(SKIPPED) >= 30


def test_should_follows_the_weighted_part(nlp, lex):
    """The expectation and meta agree: "favours" is the polarity of the part that carries the
    variant's weight, which is the part opposite to the source's weighted part."""
    for source, rule, _variant, should in MADE:
        _, got_should, meta = made(nlp, lex, source)[rule]
        assert meta["favours"] == ("positive" if should == "rise" else "negative"), (source, meta)
        assert contrast.part_polarity(nlp(meta["weighted"]), 0, len(nlp(meta["weighted"])), lex) == (
            1 if got_should == "rise" else -1), (source, meta)


def test_a_swap_keeps_the_words(nlp, lex):
    """A swap moves words ("a"/"an" count as one); only "'s" may stay on a resolved noun ("The pool's")."""
    def bag(text):
        return Counter("a" if w == "an" else w for w in words(text))

    for source, rule, variant, _ in MADE:
        if rule == SWAP and "pool's" not in variant:
            assert bag(variant) == bag(source), (source, variant)


def test_the_lexicon_decides_the_polarity(nlp, tmp_path):
    """The same sentence is skipped without a lexicon entry and swapped with one (--lexicon)."""
    text = "The stove is tall, but it boils water fast."
    assert SWAP not in made(nlp, load_lexicon(), text)
    extra = tmp_path / "extra.tsv"
    extra.write_text("tall\tADJ\t-1\tgradable\n", encoding="utf-8")
    got = made(nlp, load_lexicon([extra]), text)
    assert got[SWAP][:2] == ("The stove boils water fast, but it is tall.", "fall")


def test_however_opening_the_next_sentence_with_unit_text(nlp, lex):
    from pairflip.perturb.build import iter_pairs

    text = "The tent is light. However, the poles are flimsy."
    pairs = list(iter_pairs([text], families=["contrast"], nlp=nlp, lexicon=lex, unit="text"))
    assert [(p.rule, p.variant, p.should) for p in pairs] == [
        (SWAP, "The poles are flimsy. However, the tent is light.", "rise")]
    # sentence by sentence, "However, ..." alone has nothing to swap with
    assert not list(iter_pairs([text], families=["contrast"], nlp=nlp, lexicon=lex, unit="sentence"))


def test_family_is_registered():
    from pairflip.perturb.build import resolve_rules
    from pairflip.records import FAMILIES, SHOULDS

    assert FAMILY_MODULES["contrast"] is contrast and "contrast" in FAMILIES
    assert resolve_rules("contrast") == {"contrast": {SWAP, CONN}}
    assert {"rise", "fall"} <= set(SHOULDS)


def test_build_gives_directional_pairs_deterministically(nlp, lex):
    from pairflip.perturb.build import iter_pairs

    texts = ["The app is slow, but support is great.", "Although it's pricey, the pool is lovely."]
    runs = [[(p.id, p.rule, p.should, p.variant) for p in iter_pairs(texts, families=["contrast"], seed=s,
                                                                      nlp=nlp, lexicon=lex)] for s in (0, 7)]
    assert runs[0] == runs[1] and len(runs[0]) == 4
    assert {p[2] for p in runs[0]} == {"fall"} and {p[1] for p in runs[0]} == {SWAP, CONN}


def test_stored_edits_replay_to_the_variant(nlp, lex):
    """The suite's character edits, applied from the last to the first, turn each source into its
    variant (what ``pairflip vet`` and the word diff rely on)."""
    from pairflip.perturb.build import iter_pairs

    pairs = list(iter_pairs(sorted({s for s, *_ in MADE}), families=["contrast"], nlp=nlp, lexicon=lex))
    assert len(pairs) >= len(MADE)
    for p in pairs:
        out = p.source
        for e in sorted(p.edits, key=lambda e: (e.start, e.end), reverse=True):
            out = out[: e.start] + e.text + out[e.end :]
        assert out == p.variant, (p.rule, p.source, p.variant, out)
        assert p.should in ("rise", "fall") and p.family == "contrast"
