"""Word-level diff of a source text and its variant, for the report's examples.

The diff is data (a list of :class:`Chunk`); each renderer draws it its own way. The plain-text
form marks removed words as ``[-word-]`` and inserted words as ``[+word+]`` so a diff reads
without colour too.
"""

from __future__ import annotations

from typing import Callable

import re
from dataclasses import dataclass
from difflib import SequenceMatcher

SAME, DEL, INS = "same", "del", "ins"
DEL_OPEN, DEL_CLOSE = "[-", "-]"
INS_OPEN, INS_CLOSE = "[+", "+]"

# A word (letters/digits, with inner apostrophes or hyphens: "doesn't", "well-made"), or one
# punctuation mark; each token keeps the whitespace that follows it.
_TOKEN = re.compile(r"(\w+(?:['\u2019\-]\w+)*|[^\w\s])(\s*)")


@dataclass(frozen=True)
class Chunk:
    """A run of words that are the same in both texts, only in the source, or only in the variant.

    ``text`` has no outer whitespace; ``space_after`` says whether the text had whitespace after
    the run.
    """

    kind: str  # "same" | "del" | "ins"
    text: str
    space_after: bool


def _tokens(text: str) -> list[tuple[str, str]]:
    lead = len(text) - len(text.lstrip())
    return [(m.group(1), m.group(2)) for m in _TOKEN.finditer(text, lead)]


def _chunk(kind: str, toks: list[tuple[str, str]]) -> Chunk:
    joined = "".join(w + s for w, s in toks)
    return Chunk(kind, joined.rstrip(), joined != joined.rstrip())


def word_diff(source: str, variant: str) -> list[Chunk]:
    """The chunks that turn ``source`` into ``variant``, word by word (case-sensitive).

    A replaced run gives a ``del`` chunk followed by an ``ins`` chunk. Joining the ``same`` and
    ``del`` chunks gives the source back (up to whitespace runs), ``same`` and ``ins`` the variant.
    """
    a, b = _tokens(source), _tokens(variant)
    sm = SequenceMatcher(None, [w for w, _ in a], [w for w, _ in b], autojunk=False)
    out: list[Chunk] = []
    for op, i1, i2, j1, j2 in sm.get_opcodes():
        if op == "equal":
            c = _chunk(SAME, a[i1:i2])
            # A space after a shared run if either text has one there ("it" + inserted "a lot").
            out.append(Chunk(SAME, c.text, c.space_after or bool(b[j2 - 1][1])))
            continue
        if i2 > i1:
            out.append(_chunk(DEL, a[i1:i2]))
        if j2 > j1:
            out.append(_chunk(INS, b[j1:j2]))
    return out


def join_chunks(chunks: list[Chunk], pieces: list[str]) -> str:
    """Join already-drawn ``pieces`` (one per chunk) with the spacing the chunks ask for."""
    out = []
    for i, (c, p) in enumerate(zip(chunks, pieces)):
        out.append(p)
        if i + 1 < len(chunks):
            nxt = chunks[i + 1]
            if c.space_after or (c.kind != SAME and nxt.kind != SAME):
                out.append(" ")
    return "".join(out)


def render(chunks: list[Chunk], *, same: Callable[[str], str], removed: Callable[[str], str],
           inserted: Callable[[str], str]) -> str:
    """The diff with each chunk formatted by its kind (every renderer's markup goes through here)."""
    fmt = {DEL: removed, INS: inserted}
    return join_chunks(chunks, [fmt.get(c.kind, same)(c.text) for c in chunks])


def plain(chunks: list[Chunk]) -> str:
    """``The tent [-kept-] [+did not keep+] us dry.``: the diff with text markers only."""
    return render(chunks, same=str, removed=lambda t: f"{DEL_OPEN}{t}{DEL_CLOSE}",
                  inserted=lambda t: f"{INS_OPEN}{t}{INS_CLOSE}")