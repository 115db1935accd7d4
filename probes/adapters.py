"""Model adapters: anything that labels a list of texts becomes a :class:`Model`.

SPEC forms (see :func:`load_model`):

- ``path/model.joblib`` (also ``.pkl``, ``.pickle``): a fitted scikit-learn-like object with
  ``predict`` and, optionally, ``predict_proba`` and ``classes_`` (:mod:`.file_model`).
  Loading it unpickles it, which runs code stored in the file: only name files you trust.
- ``path/model.skops``: the same kind of object saved with ``skops.io.dump``; loaded without
  unpickling, trusting skops' default types and those named with ``--trust TYPE`` (``trust=``).
- ``onnx:DIR``: ``DIR/model.onnx`` run with onnxruntime on CPU, ``DIR/tokenizer.json`` and the
  labels of ``DIR/config.json`` (:mod:`.onnx_model`).
- ``package.module:name``: ``name`` is a callable ``list[str] -> outputs``, an object with
  ``predict`` (and maybe ``predict_proba`` / ``classes_``), or a class, instantiated without
  arguments. An output is a label, or a dict with ``label``, ``probabilities`` (label -> p) and/or
  ``score`` (a polarity score in [-1, 1]). The current folder is importable, as with ``python -m``.
- ``http://host:port/path``: a JSON endpoint (:mod:`.http_model`).
- ``cmd:COMMAND``: a process speaking JSON Lines on stdin/stdout (:mod:`.command_model`).

Python objects can be passed directly to :func:`as_model` (``pairflip.score(suite, model)``).

Every model has a ``fingerprint()``: the prediction cache key. It changes when the model does
(file bytes for a joblib file, the source of the model's code and its pickled state for a Python
object, the command and its program and script for ``cmd:``); an HTTP model is fingerprinted by
its URL only. ``key_covers`` says the same in words (``pairflip score`` prints it), and
``--cache-key TEXT`` ties the key to anything else, such as a model version.

A Python object's code is the source of its own module and of every module of the model's own
code that is loaded (:func:`code_closure`): the modules of the same top-level package, every
module the import loaded that lives outside the standard library and site-packages, and the
modules such code refers to; so editing a helper module the model imports changes the key.
The pickle is written so that it is the same in every process (sets sorted, memory addresses
left out), so a rerun finds the cache the last run wrote.
"""

from __future__ import annotations

import functools
import hashlib
import importlib
import io
import os
import pickle
import site
import sys
import sysconfig
import types
from typing import Any, Iterable, Sequence

from pairflip.probes.batching import (
    ModelError, build_predictions, check_run_options, exit_from_model, outputs_from_items, paused_gc,
)
from pairflip.records import PairflipError, Prediction

SPEC_FORMS = "path/model.joblib, path/model.skops, onnx:DIR, package.module:name, http://host:port/path or cmd:COMMAND"
FILE_SUFFIXES = (".joblib", ".pkl", ".pickle", ".skops")


class Model:
    """The protocol every adapter follows: ``predict(texts) -> [Prediction]``, one per text."""

    spec: str = "model"
    name: str = "model"
    kind: str = "model"
    classes: list[str] | None = None
    parallel: bool = False  # may several batches run at once (threads)?
    key_covers: str = "the model SPEC only"  # what fingerprint() is made of, in words

    def predict(self, texts: list[str]) -> Sequence[Prediction]:  # pragma: no cover - interface
        raise NotImplementedError

    # Optional, looked up with getattr by the batch runner and the scorer (cmd: and HTTP models):
    #   finish(): the last batch is in; raise ModelError if the answers turn out to be wrong
    #   abort(): the run is ending on an error or an interrupt; stop the batches in flight now
    #   doubtful(): after a failed run, the texts whose predictions can no longer be trusted

    def fingerprint(self) -> str:
        return hashlib.sha256(self.spec.encode("utf-8")).hexdigest()

    def describe(self) -> dict[str, Any]:
        out: dict[str, Any] = {"name": self.name, "spec": self.spec, "kind": self.kind, "fingerprint": self.fingerprint()}
        if self.classes:
            out["classes"] = list(self.classes)
        return out

    def close(self) -> None:
        """Release processes or connections; a no-op for in-process models."""

    def __enter__(self) -> "Model":
        return self

    def __exit__(self, *exc: Any) -> None:
        self.close()


class PythonModel(Model):
    """An in-process model: a callable ``list[str] -> outputs`` or an object with ``predict``.

    With ``predict_proba`` and ``classes_`` the model is called once per batch, through
    ``predict_proba``, and each label is the most probable class — which is what ``predict``
    returns for scikit-learn's probabilistic classifiers (logistic regression, naive Bayes,
    MLP, trees), so the model's cost is paid once, not twice. A model whose ``predict`` disagrees
    with its most probable class (an SVM with ``probability=True``) can be given with
    ``labels_from="predict"``: then both are called, labels from ``predict``.
    """

    kind = "python"

    def __init__(self, obj: Any, spec: str | None = None, name: str | None = None, *, fingerprint: str | None = None,
                 labels_from: str = "proba", code_modules: Iterable[str] = (), key_covers: str | None = None) -> None:
        if labels_from not in ("proba", "predict"):
            raise PairflipError(f"labels_from={labels_from!r}: expected 'proba' or 'predict'")
        self.labels_from = labels_from
        if not (callable(obj) or hasattr(obj, "predict")):
            raise PairflipError(
                f"model {spec or _describe_obj(obj)}: a {type(obj).__name__} is neither callable nor has a predict method"
            )
        self.obj = obj
        self.spec = spec or _describe_obj(obj)
        self.name = name or self.spec
        raw_classes = getattr(obj, "classes_", None)
        self.classes = None
        if raw_classes is not None and hasattr(obj, "predict"):
            try:
                from pairflip.probes.batching import as_label

                self.classes = [as_label(c, i) for i, c in enumerate(list(raw_classes))]
            except (ModelError, TypeError) as err:
                raise PairflipError(f"model {self.spec}: classes_ {raw_classes!r} are not labels ({err})") from None
        self._fp = fingerprint
        self._code_modules = list(code_modules)  # loaded by the import that made the object
        self._covers = key_covers

    def predict(self, texts: list[str]) -> Sequence[Prediction]:
        obj = self.obj
        if self.labels_from == "proba" and self.classes and hasattr(obj, "predict_proba"):
            proba = obj.predict_proba(texts)
            shape = getattr(proba, "shape", None)
            if shape is not None and len(shape) != 2:
                raise ModelError(f"predict_proba returned an array of shape {shape}, expected (texts, classes)")
            return build_predictions(len(texts), labels=None, probabilities=proba, classes=self.classes)
        if hasattr(obj, "predict"):
            labels = obj.predict(texts)
            if _is_sequence(labels) and len(labels) == len(texts) and labels_are_items(labels):
                proba = None
                if self.classes and hasattr(obj, "predict_proba"):
                    proba = obj.predict_proba(texts)
                    shape = getattr(proba, "shape", None)
                    if shape is not None and len(shape) != 2:
                        raise ModelError(f"predict_proba returned an array of shape {shape}, expected (texts, classes)")
                return build_predictions(len(texts), labels=list(labels), probabilities=proba, classes=self.classes)
            raw = labels
        else:
            raw = obj(texts)
        if not _is_sequence(raw):
            raise ModelError(f"the model returned {type(raw).__name__}, expected a list with one output per text")
        raw = list(raw)
        if len(raw) != len(texts):
            raise ModelError(f"{len(texts)} texts got {len(raw)} outputs; expected one output per text")
        with paused_gc():
            return outputs_from_items(raw)

    def fingerprint(self) -> str:
        if self._fp is None:
            self._fp, self._covers = _object_fingerprint(self.obj, self.spec, self._code_modules)
        return self._fp

    @property
    def key_covers(self) -> str:  # type: ignore[override]
        if self._covers is None:
            self.fingerprint()
        return self._covers or "the model SPEC"


def labels_are_items(xs: Any) -> bool:
    """``predict`` gave plain labels (not dicts with probabilities)."""
    try:
        first = xs[0] if len(xs) else None
    except (TypeError, IndexError, KeyError):
        return False
    return not isinstance(first, (dict, Prediction))


def _is_sequence(x: Any) -> bool:
    return hasattr(x, "__len__") and hasattr(x, "__getitem__") and not isinstance(x, (str, bytes, dict))


def _object_fingerprint(obj: Any, spec: str, code_modules: Iterable[str] = ()) -> tuple[str, str]:
    """Spec + the source of the object's code (:func:`code_closure`) + the object's pickled state,
    when it has one; and what that covers, in words."""
    h = hashlib.sha256(spec.encode("utf-8"))
    own = getattr(obj, "__module__", None) or type(obj).__module__
    modules = code_closure([own, *code_modules], own=own)
    h.update(hash_module_files(modules).encode())
    try:
        buf = io.BytesIO()
        _StablePickler(buf, protocol=4).dump(obj)
        h.update(buf.getvalue())
        state = "the object's pickled state"
    except Exception:  # lambdas, closures: the source files and spec have to do
        h.update(type(obj).__qualname__.encode())
        state = "the object's type name (it cannot be pickled)"
    return h.hexdigest(), f"{describe_modules(modules)} and {state}" if modules else f"the model SPEC and {state}"


@functools.lru_cache(maxsize=1)
def _library_roots() -> tuple[str, ...]:
    """Folders of installed code: the standard library and site-packages (none of it is the
    model's own code, and hashing it would only slow every run down)."""
    roots = set()
    paths = sysconfig.get_paths()
    for key in ("stdlib", "platstdlib", "purelib", "platlib"):
        if paths.get(key):
            roots.add(os.path.realpath(paths[key]))
    try:
        roots.update(os.path.realpath(p) for p in site.getsitepackages())
        roots.add(os.path.realpath(site.getusersitepackages()))
    except AttributeError:  # pragma: no cover - a virtualenv's old site.py
        pass
    return tuple(sorted(roots))


def _own_file(mod: Any) -> str | None:
    """The file of a module of the user's own code, else None (built-in, frozen, the standard
    library, site-packages, pairflip itself)."""
    name = getattr(mod, "__name__", "")
    if not isinstance(name, str) or name.partition(".")[0] == "pairflip":
        return None
    path = getattr(mod, "__file__", None)
    if not isinstance(path, str) or "site-packages" in path or not os.path.isfile(path):
        return None
    real = os.path.realpath(path)
    parts = real.split(os.sep)
    if "site-packages" in parts or "dist-packages" in parts:
        return None
    if any(real == r or real.startswith(r + os.sep) for r in _library_roots()):
        return None
    return real


def code_closure(seeds: Iterable[str], *, own: str | None = None) -> list[str]:
    """The names of the loaded modules that make up a model's own code, sorted: the ``seeds``
    (the object's module, the modules its import loaded), every loaded module of the same
    top-level package as ``own``, and, transitively, the modules their names refer to
    (imported modules, and the modules of imported functions and classes). Only the user's own
    files count (see :func:`_own_file`); ``own`` itself always counts when it has a file."""
    todo = [s for s in seeds if isinstance(s, str)]
    if own:
        top = own.partition(".")[0]
        todo += [n for n in list(sys.modules) if n == top or n.startswith(top + ".")]
    found: set[str] = set()
    seen: set[str] = set()
    while todo:
        name = todo.pop()
        if name in seen:
            continue
        seen.add(name)
        mod = sys.modules.get(name)
        if mod is None or (_own_file(mod) is None and not (name == own and getattr(mod, "__file__", None))):
            continue
        found.add(name)
        for value in list(vars(mod).values()):
            if isinstance(value, types.ModuleType):
                todo.append(value.__name__)
                continue
            try:
                ref = getattr(value, "__module__", None)
            except Exception:  # an object whose attribute lookup fails: nothing to follow
                continue
            if isinstance(ref, str) and ref not in seen:
                todo.append(ref)
    return sorted(found)


def hash_module_files(modules: Iterable[str]) -> str:
    """SHA-256 over each module's name and the bytes of its file, in the order given."""
    h = hashlib.sha256()
    for name in modules:
        h.update(name.encode("utf-8") + b"\0")
        path = getattr(sys.modules.get(name), "__file__", None)
        try:
            if path and os.path.getsize(path) <= 64 << 20:
                with open(path, "rb") as fh:
                    h.update(hashlib.sha256(fh.read()).digest())
        except OSError:
            pass
    return h.hexdigest()


def describe_modules(modules: Sequence[str], shown: int = 4) -> str:
    names = ", ".join(modules[:shown]) + (f" and {len(modules) - shown} more" if len(modules) > shown else "")
    return f"the source of {len(modules)} module{'s' if len(modules) != 1 else ''} ({names})"


# State that differs from process to process for the same fitted model: scikit-learn's text
# vectorizers keep ``id()`` of their stop-word list (a memory address) to notice a change.
_VOLATILE_STATE = frozenset({"_stop_words_id"})


class _StablePickler(pickle.Pickler):
    """Pickles the same bytes for the same model in every process, so a prediction cache made by
    one run is found by the next: sets are written sorted (their order follows string hashing,
    which is salted per process) and the volatile state above is left out. Both are swapped in
    through ``persistent_id``, which the C pickler asks about every object (``reducer_override``
    is never asked about sets); the bytes are only hashed, never unpickled."""

    def persistent_id(self, obj: Any) -> Any:
        t = type(obj)
        if t is str or t is int or t is float:  # most objects in a model; nothing to swap
            return None
        if t is set or t is frozenset:
            try:
                items = sorted(obj)
            except TypeError:
                items = sorted(obj, key=repr)
            return (t.__name__, items)
        state = getattr(obj, "__dict__", None)
        if type(state) is dict and not _VOLATILE_STATE.isdisjoint(state) and not isinstance(obj, type):
            return (f"{t.__module__}.{t.__qualname__}", {k: v for k, v in state.items() if k not in _VOLATILE_STATE})
        return None


def _describe_obj(obj: Any) -> str:
    mod = getattr(obj, "__module__", None) or type(obj).__module__
    name = getattr(obj, "__qualname__", None) or type(obj).__qualname__
    return f"{mod}:{name}"


def import_model(spec: str) -> PythonModel:
    """``package.module:name`` -> a PythonModel; every import problem names the SPEC."""
    mod_name, _, attr = spec.partition(":")
    if not mod_name or not attr or not all(p.isidentifier() for p in mod_name.split(".") + attr.split(".")):
        raise PairflipError(f"--model {spec}: expected package.module:name ({SPEC_FORMS})")
    cwd = os.getcwd()
    if cwd not in sys.path and "" not in sys.path:
        sys.path.append(cwd)
    before = set(sys.modules)
    try:
        mod = importlib.import_module(mod_name)
    except ModuleNotFoundError as err:
        raise PairflipError(f"--model {spec}: cannot import module {mod_name!r} ({err})") from None
    except Exception as err:
        raise PairflipError(f"--model {spec}: importing module {mod_name!r} raised {type(err).__name__}: {err}") from None
    except (SystemExit, KeyboardInterrupt) as err:
        what = exit_from_model(err)
        if what is None:
            raise
        raise PairflipError(f"--model {spec}: importing module {mod_name!r} {_what_code_did(what)}") from None
    loaded = [n for n in sys.modules if n not in before]
    obj: Any = mod
    for part in attr.split("."):
        if not hasattr(obj, part):
            raise PairflipError(f"--model {spec}: module {mod_name!r} has no attribute {attr!r}")
        obj = getattr(obj, part)
    if isinstance(obj, type):
        try:
            obj = obj()
        except Exception as err:
            raise PairflipError(
                f"--model {spec}: {attr} is a class and making one without arguments raised {type(err).__name__}: {err}"
            ) from None
        except (SystemExit, KeyboardInterrupt) as err:
            what = exit_from_model(err)
            if what is None:
                raise
            raise PairflipError(f"--model {spec}: making a {attr} without arguments {_what_code_did(what)}") from None
    if not (callable(obj) or hasattr(obj, "predict")):
        raise PairflipError(
            f"--model {spec}: {attr} is a {type(obj).__name__}, expected a callable list[str] -> labels "
            f"or an object with a predict method"
        )
    return PythonModel(obj, spec=spec, code_modules=loaded)


def _what_code_did(what: str) -> str:
    """'the model called sys.exit(2)' -> 'called sys.exit(2)'."""
    return what.removeprefix("the model ")


def load_model(spec: str, *, timeout: float = 30.0, retries: int = 3, trust: Sequence[str] = (), **options: Any) -> Model:
    """Turn a SPEC string into a model (see the module docstring for the forms).

    ``timeout`` (a deadline in seconds for a batch as a whole: for HTTP, for each attempt) and
    ``retries`` apply to HTTP models; ``timeout`` also to ``cmd:`` models. Both are checked for
    every SPEC. ``trust`` (``--trust``) names types a ``.skops`` file may hold beyond skops'
    defaults; it is refused for any other SPEC. Other ``options`` go to the HTTP or command adapter.
    """
    if not isinstance(spec, str) or not spec.strip():
        raise PairflipError(f"--model {spec!r}: empty; expected {SPEC_FORMS}")
    check_run_options(timeout=timeout, retries=retries)
    spec = spec.strip()
    if trust and not spec.lower().endswith(".skops"):
        raise PairflipError(f"--trust {trust[0]}: only a .skops model file has types to trust; --model {spec} is not one")
    if spec.startswith("onnx:"):
        from pairflip.probes.onnx_model import load_onnx_model

        return load_onnx_model(spec)
    if spec.startswith(("http://", "https://")):
        from pairflip.probes.http_model import HttpModel

        return HttpModel(spec, timeout=timeout, retries=retries, **options)
    if spec.startswith("cmd:"):
        from pairflip.probes.command_model import CommandModel

        return CommandModel(spec, timeout=timeout, **options)
    if spec.lower().endswith(FILE_SUFFIXES):
        from pairflip.probes.file_model import load_file_model

        return load_file_model(spec, trust=trust)
    if ":" in spec and not os.path.exists(spec):
        return import_model(spec)
    raise PairflipError(f"--model {spec!r}: not a model SPEC; expected {SPEC_FORMS}")


def as_model(model: Any, **options: Any) -> Model:
    """A Model from a Model, a SPEC string, a callable or an object with ``predict``."""
    if isinstance(model, Model):
        return model
    if isinstance(model, (str, os.PathLike)):
        return load_model(os.fspath(model), **options)
    if callable(model) or hasattr(model, "predict"):
        return PythonModel(model)
    raise PairflipError(f"expected a model (callable, object with predict, or a SPEC string), got {type(model).__name__}")
