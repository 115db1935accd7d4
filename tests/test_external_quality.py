"""Perturbation quality on real text nobody on the project wrote.

Data: the human-rated product-review and tweet snippets in the vaderSentiment 3.3.2 source
distribution on PyPI (Hutto & Gilbert 2014, ICWSM; ratings are means of human judgements on
-4..+4). These tests download the sdist
with pip, so they run only when ``PAIRFLIP_EXTERNAL_DATA`` is set (``.ci/run`` sets it).

The broken-form checks below are written independently of the rules' own validator: they read the
variant text only (plus a fresh parse of it), so a bug shared by a rule and its validator still shows.
"""

from __future__ import annotations

import re
from collections import Counter

import pytest

from helpers import external_data

pytestmark = [
    pytest.mark.external,
    pytest.mark.skipif(not external_data.enabled(), reason="set PAIRFLIP_EXTERNAL_DATA=1 to fetch the vaderSentiment sdist"),
]

CLEAR = 1.0  # |mean human rating| >= 1 on the -4..+4 scale: a clear opinion


@pytest.fixture(scope="module")
def snippets():
    rows = external_data.load("product") + external_data.load("tweets")
    return rows


@pytest.fixture(scope="module")
def suite(snippets, nlp):
    import pairflip

    texts = [t for _, t in snippets]
    return pairflip.build_suite(texts, seed=0, nlp=nlp)


# --- independent broken-form checks -----------------------------------------------------------

# Handbook facts of English grammar (from memory; any standard grammar, e.g. Quirk et al. 1985):
# do-support takes the bare infinitive ("doesn't work", never "doesn't works"/"didn't went");
# modals take the bare infinitive and never stack ("will can"); "a" precedes consonant sounds and
# "an" vowel sounds; a negator is not repeated ("not not", "isn't not").
_MODALS = r"(?:will|would|can|could|shall|should|may|might|must)"
_PATTERNS = {
    "doubled negator": re.compile(r"\b(?:not|never)\s+(?:not|never)\b|n't\s+not\b|\bnot\s+\w+n't\b", re.I),
    "stacked modals": re.compile(rf"\b{_MODALS}(?:n't| not)?\s+{_MODALS}\b", re.I),
    "repeated word": re.compile(r"\b(\w+)\s+\1\b", re.I),
    "space before punctuation": re.compile(r"\w\s+[,.;:!?](?:\s|$)"),
    "double comma": re.compile(r",\s*,"),
    "double space": re.compile(r"\S  +\S"),
}
_DO_VERB = re.compile(r"\b(?:do|does|did)(?:n't|\s+not)\s+(?:really\s+|actually\s+|even\s+|always\s+)?([a-z]+)\b", re.I)


def _broken(source: str, variant: str, nlp) -> list[str]:
    why = []
    for name, pat in _PATTERNS.items():
        if pat.search(variant) and not pat.search(source):
            why.append(name)
    from lemminflect import getAllLemmas

    for m in _DO_VERB.finditer(variant):
        if m.group(0) in source:
            continue
        w = m.group(1).lower()
        lemmas = getAllLemmas(w, upos="VERB")  # {} when w is not a known verb form
        if lemmas and w not in {l for ls in lemmas.values() for l in ls}:
            why.append(f"do-support + {w!r}")
    if variant[:1].islower() and source[:1].isupper():
        why.append("lost the capital")
    return why


@pytest.mark.xfail(
    strict=True,
    reason="known gap, reported as expected-to-fail (not as a pass): negation reaches about 7 % of the "
    "clear-opinion snippets as whole sources (13.1 % of the product ones, 2026-12-04), not 80 %; most "
    "misses carry no lexicon opinion word",
)
def test_negation_applies_to_most_clearly_opinionated_sentences(snippets, suite):
    clear = {t for r, t in snippets if abs(r) >= CLEAR}
    negated = {p.source for p in suite if p.family == "negation"}
    rate = len(clear & negated) / len(clear)
    print(f"negation applies to {len(clear & negated)} of {len(clear)} clear-opinion snippets: {rate:.1%}")
    assert rate >= 0.80


def test_negation_reaches_the_level_measured_on_2026_12_04(snippets, suite):
    """A floor, not the goal: measured 2026-12-03 on this data, negation made a pair for 373 of
    the 5,114 clear-opinion snippets as a whole source (7.3 %) and for a sentence of 809 of them
    (15.8 %); a change that loses reach fails here. After the skips that blind review rounds 10-12
    led to (afternoon of the same day): 362 of 5,122 (7.1 %); late evening, after rounds 17-19:
    369 of 5,122 (7.2 %); 2026-12-04, after rounds 20-21w: 376 of 5,122 (7.3 %), and 314 of the
    2,455 clear-opinion product snippets (12.8 %); after rounds 22-26v: 383 (7.5 %) and 321 (13.1 %)."""
    clear = [t for r, t in snippets if abs(r) >= CLEAR]
    negated = {p.source for p in suite if p.family == "negation"}
    whole = sum(1 for t in clear if t in negated)
    print(f"negation: {whole} of {len(clear)} clear-opinion snippets as a whole source ({whole / len(clear):.1%})")
    assert whole / len(clear) >= 0.073


def test_broken_form_checks_flag_under_one_percent(suite, nlp):
    variants = [p for p in suite if p.rule != "reorder/shuffle"]  # shuffle is ungrammatical on purpose
    flagged = []
    reasons: Counter = Counter()
    for p in variants:
        why = _broken(p.source, p.variant, nlp)
        if why:
            flagged.append((p.rule, p.source, p.variant, why))
            reasons.update(why)
    rate = len(flagged) / len(variants)
    print(f"{len(flagged)} of {len(variants)} variants flagged ({rate:.2%}): {dict(reasons)}")
    for f in flagged[:20]:
        print("  ", f)
    assert len(variants) > 1000
    assert rate < 0.01


def test_every_family_makes_pairs_on_real_text(suite):
    by_family = Counter(p.family for p in suite)
    print(dict(by_family), Counter(p.rule for p in suite))
    for fam in ("negation", "double-negation", "intensifier", "reorder"):
        assert by_family[fam] >= 50, fam


def test_no_variant_equals_its_source(suite):
    assert all(p.variant != p.source for p in suite)
