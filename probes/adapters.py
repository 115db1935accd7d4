"""Model adapters: anything that labels a list of texts becomes a :class:`Model`.

SPEC forms: ``path/model.joblib`` (a fitted scikit-learn-like object), ``package.module:name``
(a callable ``list[str] -> labels`` or an object with ``predict``), ``http://host:port/path``,
``cmd:COMMAND``. Python objects can be passed directly to :func:`as_model`.
"""

from __future__ import annotations

import hashlib
import importlib
import math
from typing import Any, Sequence

from pairflip.records import PairflipError, Prediction


class Model:
    """The protocol every adapter follows."""

    spec: str = "model"
    name: str = "model"
    classes: list[str] | None = None

    def predict(self, texts: list[str]) -> list[Prediction]:  # pragma: no cover - interface
        raise NotImplementedError

    def fingerprint(self) -> str:
        return hashlib.sha256(self.spec.encode()).hexdigest()[:16]

    def describe(self) -> dict[str, Any]:
        return {"name": self.name, "spec": self.spec, "fingerprint": self.fingerprint()}


def _label(x: Any) -> str:
    from pairflip.labels import _norm

    if x is None or (isinstance(x, float) and math.isnan(x)):
        raise PairflipError("output is None/NaN, expected a label")
    return _norm(x)


class PythonModel(Model):
    """A callable ``list[str] -> labels`` or an object with ``predict`` (and maybe ``predict_proba``)."""

    def __init__(self, obj: Any, spec: str | None = None, name: str | None = None) -> None:
        self.obj = obj
        self.spec = spec or _describe_obj(obj)
        self.name = name or self.spec
        classes = getattr(obj, "classes_", None)
        self.classes = [_label(c) for c in classes] if classes is not None else None
        self._fp: str | None = None

    def predict(self, texts: list[str]) -> list[Prediction]:
        obj = self.obj
        if hasattr(obj, "predict_proba") and self.classes:
            proba = obj.predict_proba(texts)
            out = []
            for row in proba:
                probs = {c: float(p) for c, p in zip(self.classes, row)}
                best = max(probs, key=probs.__getitem__)
                out.append(Prediction(label=best, probabilities=probs))
            return out
        if hasattr(obj, "predict"):
            raw = obj.predict(texts)
        elif callable(obj):
            raw = obj(texts)
        else:
            raise PairflipError(f"model {self.spec}: not callable and has no predict method")
        return [_to_prediction(x, self.spec, i) for i, x in enumerate(list(raw))]

    def fingerprint(self) -> str:
        if self._fp is None:
            h = hashlib.sha256(self.spec.encode())
            try:
                import pickle

                h.update(pickle.dumps(self.obj))
            except Exception:
                h.update(repr(self.obj).encode())
            self._fp = h.hexdigest()[:16]
        return self._fp


def _to_prediction(x: Any, spec: str, i: int) -> Prediction:
    if isinstance(x, Prediction):
        return x
    if isinstance(x, dict):
        if "probabilities" in x:
            probs = {_label(k): float(v) for k, v in x["probabilities"].items()}
            lab = _label(x.get("label", max(probs, key=probs.__getitem__)))
            return Prediction(label=lab, probabilities=probs)
        if "label" in x:
            return Prediction(label=_label(x["label"]), score=x.get("score"))
    try:
        return Prediction(label=_label(x))
    except PairflipError as err:
        raise PairflipError(f"model {spec}: output {i}: {err}") from None


def _describe_obj(obj: Any) -> str:
    mod = getattr(obj, "__module__", None) or type(obj).__module__
    name = getattr(obj, "__qualname__", None) or type(obj).__qualname__
    return f"{mod}:{name}"


def load_model(spec: str, **options: Any) -> Model:
    """Turn a SPEC string into a model (see the module docstring for the forms)."""
    if spec.startswith(("http://", "https://")):
        from pairflip.probes.http_model import HttpModel

        return HttpModel(spec, **options)
    if spec.startswith("cmd:"):
        from pairflip.probes.command_model import CommandModel

        return CommandModel(spec, **options)
    if spec.endswith((".joblib", ".pkl", ".pickle")):
        from pairflip.probes.file_model import load_file_model

        return load_file_model(spec)
    if ":" in spec:
        mod_name, _, attr = spec.partition(":")
        try:
            mod = importlib.import_module(mod_name)
        except ImportError as err:
            raise PairflipError(f"--model {spec}: cannot import module {mod_name!r} ({err})") from None
        obj = mod
        for part in attr.split("."):
            if not hasattr(obj, part):
                raise PairflipError(f"--model {spec}: module {mod_name!r} has no attribute {attr!r}")
            obj = getattr(obj, part)
        if isinstance(obj, type):
            obj = obj()
        return PythonModel(obj, spec=spec)
    raise PairflipError(
        f"--model {spec!r}: not a model SPEC; expected path/model.joblib, package.module:name, "
        f"http://host:port/path or cmd:COMMAND"
    )


def as_model(model: Any, **options: Any) -> Model:
    if isinstance(model, Model):
        return model
    if isinstance(model, str):
        return load_model(model, **options)
    if callable(model) or hasattr(model, "predict"):
        return PythonModel(model)
    raise PairflipError(f"expected a model (callable, object with predict, or SPEC), got {type(model).__name__}")
