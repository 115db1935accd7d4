"""``--model path/model.joblib`` or ``path/model.skops``: a fitted scikit-learn-like object saved
with joblib or with skops (``skops.io.dump``).

The object needs ``predict``; with ``predict_proba`` and ``classes_`` pairflip also gets
probabilities and hence polarity scores. A scikit-learn ``Pipeline`` that vectorises text and
then classifies is the typical case.

Security: ``joblib.load`` unpickles the file, and unpickling runs code stored in it. pairflip
loads only the one file the user names on the command line, never a file it finds on its own;
name only model files you trust.

A ``.skops`` file is the safe alternative: it is not unpickled, and skops builds only the types
it trusts by default. pairflip asks skops for the other types the file holds
(``skops.io.get_untrusted_types``) and stops with them listed unless each one is named with
``--trust TYPE``; only then is the file loaded, with exactly those types trusted. skops is the
optional extra ``pairflip[skops]``.

The model's fingerprint (its prediction cache key) is the SHA-256 of the file's bytes, so a
retrained model saved over the same path never reuses stale cached predictions. When loading
the file imports modules of the user's own code (a custom transformer class, a tokenizer
function; see :func:`pairflip.probes.adapters.code_closure`), their source is part of the key
too, so editing them does not serve stale predictions either.
"""

from __future__ import annotations

import hashlib
import sys
from pathlib import Path
from typing import Any, Sequence

from pairflip.probes.adapters import PythonModel, code_closure, describe_modules, hash_module_files
from pairflip.probes.batching import exit_from_model
from pairflip.records import PairflipError


def _sha256(path: Path) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()


SKOPS_SUFFIX = ".skops"
SKOPS_EXTRA = 'pip install "pairflip[skops]"'


def load_file_model(path: str | Path, *, trust: Sequence[str] = ()) -> PythonModel:
    """Load one model file (joblib/pickle, or ``.skops`` with the types in ``trust`` accepted);
    every failure is a PairflipError naming the path."""
    p = Path(path)
    skops = p.suffix.lower() == SKOPS_SUFFIX
    saver = "skops.io.dump" if skops else "joblib.dump"
    if not p.exists():
        raise PairflipError(f"--model {p}: no such file")
    if p.is_dir():
        raise PairflipError(f"--model {p}: is a folder, expected a model file saved with {saver}")
    try:
        digest = _sha256(p)
    except OSError as err:
        raise PairflipError(f"--model {p}: cannot read the file ({err.strerror or err})") from None
    before = set(sys.modules)
    try:
        obj = _load_skops(p, trust) if skops else _load_joblib(p)
    except MemoryError:
        raise
    except PairflipError:
        raise
    except Exception as err:  # UnpicklingError, EOFError, KeyError, ValueError, ModuleNotFoundError, BadZipFile, ...
        raise PairflipError(
            f"--model {p}: cannot load the model file ({type(err).__name__}: {str(err)[:200]}); "
            f"expected a fitted scikit-learn-like model saved with {saver}"
        ) from None
    except (SystemExit, KeyboardInterrupt) as err:
        what = exit_from_model(err)
        if what is None:
            raise
        raise PairflipError(f"--model {p}: loading the model file {what.removeprefix('the model ')}") from None
    code = code_closure(n for n in sys.modules if n not in before)
    if not hasattr(obj, "predict") or not callable(getattr(obj, "predict")):
        raise PairflipError(
            f"--model {p}: the file holds a {type(obj).__module__}.{type(obj).__qualname__}, which has no "
            f"predict method; expected a fitted scikit-learn-like model (predict, optionally predict_proba and classes_)"
        )
    _check_fitted(p, obj, saver)
    covers = "the bytes of the model file"
    if code:  # the file's objects come (also) from the user's own modules
        digest = hashlib.sha256(f"{digest}\x1f{hash_module_files(code)}".encode()).hexdigest()
        covers += f" and {describe_modules(code)} that loading it imported"
    model = PythonModel(obj, spec=str(p), name=p.stem, fingerprint=digest, key_covers=covers)
    model.kind = "skops" if skops else "joblib"
    return model


def _load_joblib(p: Path) -> Any:
    import joblib

    return joblib.load(p)  # runs code stored in the pickle: only the file the user named


def _load_skops(p: Path, trust: Sequence[str]) -> Any:
    """``skops.io.load`` trusting only skops' defaults and the types the user named with
    ``--trust``; a type the file holds that is neither stops the load, named in the message."""
    try:
        import skops.io as sio
    except ImportError:
        raise PairflipError(f"--model {p}: loading a .skops file needs skops; {SKOPS_EXTRA}") from None
    untrusted = sio.get_untrusted_types(file=p)
    missing = [t for t in untrusted if t not in set(trust)]
    if missing:
        flags = " ".join(f"--trust {t}" for t in missing)
        raise PairflipError(
            f"--model {p}: the file holds {len(missing)} type{'s' if len(missing) != 1 else ''} skops does not "
            f"trust by default: {', '.join(missing)}; if you trust the file's maker, pass {flags}"
        )
    return sio.load(p, trusted=list(untrusted))


def _check_fitted(p: Path, obj: object, saver: str = "joblib.dump") -> None:
    """A scikit-learn estimator saved before ``fit`` fails here, not in the first batch."""
    try:
        from sklearn.base import BaseEstimator
        from sklearn.exceptions import NotFittedError
        from sklearn.utils.validation import check_is_fitted
    except ImportError:  # pragma: no cover - scikit-learn is a dependency
        return
    if isinstance(obj, BaseEstimator):
        try:
            check_is_fitted(obj)
        except NotFittedError:
            raise PairflipError(
                f"--model {p}: the {type(obj).__qualname__} in the file was saved before it was fitted; "
                f"call fit() before {saver}"
            ) from None
        except TypeError:  # not an estimator check_is_fitted understands
            pass
