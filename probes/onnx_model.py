"""``--model onnx:DIR``: a text classifier exported to ONNX, with its tokenizer.

DIR holds three files:

- ``model.onnx``: run with onnxruntime on the CPU. Its inputs are ``input_ids`` (or a single
  integer input of rank 2 under any name), optionally ``attention_mask`` and ``token_type_ids``;
  any other input is refused. Its output (the one named ``logits``, ``probabilities`` or
  ``probs``, else the first) is a (texts, labels) matrix.
- ``tokenizer.json``: the format of the ``tokenizers`` package, used as it is (its normaliser,
  pre-tokeniser, special tokens).
- ``config.json``: ``id2label``, the label names in output order (``{"0": "negative", ...}``, as
  transformer exports carry it). Names that are not a recognised scale (``LABEL_0``...) are mapped
  to polarity with ``--labels`` as for any model.

Length: a graph with a fixed sequence length gets every text padded and truncated to it;
otherwise texts are truncated to the tokenizer's own truncation length, else ``config.json``'s
``model_max_length``, else its ``max_position_embeddings``, else not at all. With an
``attention_mask`` input, a batch is padded to its longest text (the pad token of the tokenizer,
else ``pad_token_id`` of ``config.json``, else ``[PAD]``/``<pad>`` in the vocabulary, else id 0)
and the mask marks the padding. A graph with no mask cannot tell padding from text, so its texts
are run in groups of equal token length and no padding reaches it: a text's output never depends
on what it was batched with.

Logits or probabilities: an output named ``...logit...`` is always put through a softmax, one
named ``...prob...`` never; for any other name, a batch whose rows are all non-negative and sum to
1 (within the tolerance every adapter's probabilities are checked with) is taken as
probabilities, and any other batch as logits.

The fingerprint (the prediction cache key) is the SHA-256 of the three files' bytes. onnxruntime
and tokenizers are the optional extra ``pairflip[onnx]``.
"""

from __future__ import annotations

import hashlib
import json
from pathlib import Path
from typing import Any, Sequence

import numpy as np

from pairflip.labels import PROBABILITY_TOLERANCE
from pairflip.probes.adapters import Model
from pairflip.probes.batching import ModelError, build_predictions
from pairflip.records import PairflipError, Prediction

ONNX_EXTRA = 'pip install "pairflip[onnx]"'
MODEL_FILE, TOKENIZER_FILE, CONFIG_FILE = "model.onnx", "tokenizer.json", "config.json"
IDS, MASK, TYPES = "input_ids", "attention_mask", "token_type_ids"
PAD_TOKENS = ("[PAD]", "<pad>", "<|pad|>")
INT_TYPES = {"tensor(int64)": np.int64, "tensor(int32)": np.int32}


def load_onnx_model(spec: str) -> "OnnxModel":
    """``onnx:DIR`` -> an OnnxModel; every problem is a one-line PairflipError naming the file."""
    directory = spec.removeprefix("onnx:").strip()
    if not directory:
        raise PairflipError(f"--model {spec}: no folder; expected onnx:DIR with {MODEL_FILE}, {TOKENIZER_FILE} and {CONFIG_FILE}")
    return OnnxModel(directory, spec=spec)


class OnnxModel(Model):
    """An ONNX text classifier with its tokenizer and label names (see the module docstring)."""

    kind = "onnx"
    key_covers = f"the bytes of {MODEL_FILE}, {TOKENIZER_FILE} and {CONFIG_FILE}"

    def __init__(self, directory: str | Path, *, spec: str | None = None) -> None:
        d = Path(directory)
        self.spec = spec or f"onnx:{d}"
        self.name = d.resolve().name or str(d)
        self.dir = d
        self._check_files()
        ort, tokenizers = _import_extra(self.spec)
        config = _read_json(d / CONFIG_FILE, self.where(CONFIG_FILE))
        self.classes = read_labels(config, self.where(CONFIG_FILE))
        self.session = _open_session(ort, d / MODEL_FILE, self.where(MODEL_FILE))
        self.feeds = graph_inputs(self.session.get_inputs(), self.where(MODEL_FILE))
        self.output = pick_output(self.session.get_outputs(), self.where(MODEL_FILE))
        self._check_width()
        self.fixed_length = _fixed_length(self.feeds[IDS][1])
        self.tokenizer = _read_tokenizer(tokenizers, d / TOKENIZER_FILE, self.where(TOKENIZER_FILE))
        self.max_length = self.fixed_length or max_length(self.tokenizer, config)
        self._set_up_tokenizer(config)
        self._fp = _hash_files([d / MODEL_FILE, d / TOKENIZER_FILE, d / CONFIG_FILE])

    def where(self, file: str) -> str:
        return f"--model {self.spec}: {self.dir / file}"

    def _check_files(self) -> None:
        if not self.dir.exists():
            raise PairflipError(f"--model {self.spec}: no such folder {self.dir}")
        if not self.dir.is_dir():
            raise PairflipError(f"--model {self.spec}: {self.dir} is a file; expected a folder with {MODEL_FILE}, {TOKENIZER_FILE} and {CONFIG_FILE}")
        missing = [f for f in (MODEL_FILE, TOKENIZER_FILE, CONFIG_FILE) if not (self.dir / f).is_file()]
        if missing:
            raise PairflipError(f"--model {self.spec}: {self.dir} has no {', '.join(missing)}; expected "
                                f"{MODEL_FILE}, {TOKENIZER_FILE} and {CONFIG_FILE} in it")

    def _check_width(self) -> None:
        shape = self.output.shape
        if len(shape) != 2:
            raise PairflipError(f"{self.where(MODEL_FILE)}: output {self.output.name!r} has shape {_shape(shape)}; "
                                f"expected (texts, labels), one row of label scores per text")
        width = shape[1]
        if isinstance(width, int) and width != len(self.classes):
            raise PairflipError(f"{self.where(MODEL_FILE)}: output {self.output.name!r} has {width} columns but "
                                f"{CONFIG_FILE} id2label names {len(self.classes)} labels {self.classes}; expected one label per column")

    def _set_up_tokenizer(self, config: dict[str, Any]) -> None:
        tok = self.tokenizer
        if self.max_length:
            tr = tok.truncation or {}
            tok.enable_truncation(max_length=self.max_length, stride=tr.get("stride", 0),
                                  strategy=tr.get("strategy", "longest_first"), direction=tr.get("direction", "right"))
        if MASK in self.feeds or self.fixed_length:
            pad = tok.padding or {}
            pad_id, pad_token = pad_of(tok, config)
            tok.enable_padding(pad_id=pad.get("pad_id", pad_id), pad_token=pad.get("pad_token", pad_token),
                               pad_type_id=pad.get("pad_type_id", 0), direction=pad.get("direction", "right"),
                               length=self.fixed_length)
        else:
            tok.no_padding()

    def predict(self, texts: list[str]) -> Sequence[Prediction]:
        n = len(texts)
        if n == 0:
            return build_predictions(0, probabilities=np.zeros((0, len(self.classes))), classes=self.classes)
        encodings = self.tokenizer.encode_batch(list(texts))
        scores = np.empty((n, len(self.classes)), dtype=np.float64)
        for rows in self._groups(encodings):
            scores[rows] = self._run([encodings[i] for i in rows])
        return build_predictions(n, probabilities=self.as_probabilities(scores), classes=self.classes)

    def _groups(self, encodings: list[Any]) -> list[list[int]]:
        """Rows run together: the whole batch when it is padded, else one group per token length."""
        if MASK in self.feeds or self.fixed_length:
            return [list(range(len(encodings)))]
        groups: dict[int, list[int]] = {}
        for i, e in enumerate(encodings):
            groups.setdefault(len(e.ids), []).append(i)
        return list(groups.values())

    def _run(self, encodings: list[Any]) -> np.ndarray:
        columns = {IDS: "ids", MASK: "attention_mask", TYPES: "type_ids"}
        feeds = {}
        for role, (name, _, dtype) in self.feeds.items():
            feeds[name] = np.array([getattr(e, columns[role]) for e in encodings], dtype=dtype)
        (out,) = self.session.run([self.output.name], feeds)
        out = np.asarray(out)
        want = (len(encodings), len(self.classes))
        if out.shape != want:
            raise ModelError(f"output {self.output.name!r} of {MODEL_FILE} has shape {out.shape} for {want[0]} texts; "
                             f"expected {want}, one column per label of {CONFIG_FILE} id2label")
        if out.dtype.kind not in "fiu":
            raise ModelError(f"output {self.output.name!r} of {MODEL_FILE} holds {out.dtype}, expected numbers")
        return out.astype(np.float64)

    def as_probabilities(self, scores: np.ndarray) -> np.ndarray:
        """Softmax of logits; probabilities as they are (see the module docstring for which is which)."""
        if not np.isfinite(scores).all():
            raise ModelError(f"output {self.output.name!r} of {MODEL_FILE} holds NaN or an infinity")
        name = self.output.name.lower()
        if "logit" in name:
            return softmax(scores)
        if "prob" in name or looks_like_probabilities(scores):
            return scores
        return softmax(scores)

    def fingerprint(self) -> str:
        return self._fp

    def describe(self) -> dict[str, Any]:
        out = super().describe()
        out["max_length"] = self.max_length
        out["inputs"] = [name for name, _, _ in self.feeds.values()]
        out["output"] = self.output.name
        return out


def softmax(x: np.ndarray) -> np.ndarray:
    e = np.exp(x - x.max(axis=1, keepdims=True))
    return e / e.sum(axis=1, keepdims=True)


def looks_like_probabilities(x: np.ndarray) -> bool:
    """Every row non-negative and summing to 1."""
    return bool(x.size == 0 or (x.min() >= 0.0 and np.abs(x.sum(axis=1) - 1.0).max() <= PROBABILITY_TOLERANCE))


def _import_extra(spec: str) -> tuple[Any, Any]:
    try:
        import onnxruntime
        import tokenizers
    except ImportError as err:
        raise PairflipError(f"--model {spec}: an ONNX model needs onnxruntime and tokenizers "
                            f"({err.name or 'one'} is not installed); {ONNX_EXTRA}") from None
    return onnxruntime, tokenizers


def _read_json(path: Path, where: str) -> dict[str, Any]:
    try:
        obj = json.loads(path.read_text(encoding="utf-8"))
    except OSError as err:
        raise PairflipError(f"{where}: cannot read the file ({err.strerror or err})") from None
    except (UnicodeDecodeError, json.JSONDecodeError) as err:
        raise PairflipError(f"{where}: not valid JSON ({err})") from None
    if not isinstance(obj, dict):
        raise PairflipError(f"{where}: holds a {type(obj).__name__}, expected a JSON object with id2label")
    return obj


def read_labels(config: dict[str, Any], where: str) -> list[str]:
    """``id2label`` of config.json as a list in output order: keys 0..n-1, names distinct."""
    raw = config.get("id2label")
    if raw is None:
        raise PairflipError(f"{where}: no id2label field; expected the label names in output order, "
                            f'e.g. {{"id2label": {{"0": "negative", "1": "positive"}}}}')
    if isinstance(raw, list):
        raw = {str(i): v for i, v in enumerate(raw)}
    if not isinstance(raw, dict) or not raw:
        raise PairflipError(f"{where}: id2label is {raw!r}; expected an object mapping output columns 0, 1, ... to label names")
    try:
        ids = sorted(int(k) for k in raw)
    except ValueError:
        raise PairflipError(f"{where}: id2label keys {sorted(raw)} are not column numbers; expected 0, 1, ...") from None
    if ids != list(range(len(ids))):
        raise PairflipError(f"{where}: id2label has columns {ids}; expected every column from 0 to {len(ids) - 1} once")
    labels = [raw[k] for k in sorted(raw, key=int)]
    if not all(isinstance(x, str) and x.strip() for x in labels):
        raise PairflipError(f"{where}: id2label names {labels}; expected a non-empty text for every column")
    if len(set(labels)) != len(labels):
        raise PairflipError(f"{where}: id2label repeats a label in {labels}; expected one name per column")
    return [x.strip() for x in labels]


def _open_session(ort: Any, path: Path, where: str) -> Any:
    options = ort.SessionOptions()
    options.log_severity_level = 3  # errors only: the message below says what went wrong
    try:
        return ort.InferenceSession(str(path), sess_options=options, providers=["CPUExecutionProvider"])
    except Exception as err:  # InvalidProtobuf, InvalidGraph, Fail, NoSuchFile, ...
        first = str(err).strip().splitlines()[0][:200] if str(err).strip() else ""
        raise PairflipError(f"{where}: onnxruntime cannot load the model ({type(err).__name__}: {first})") from None


def _read_tokenizer(tokenizers: Any, path: Path, where: str) -> Any:
    try:
        return tokenizers.Tokenizer.from_file(str(path))
    except Exception as err:
        first = str(err).strip().splitlines()[0][:200] if str(err).strip() else ""
        raise PairflipError(f"{where}: not a tokenizer file of the tokenizers package ({first})") from None


def graph_inputs(inputs: Sequence[Any], where: str) -> dict[str, tuple[str, list[Any], Any]]:
    """The graph's inputs by role (input_ids, attention_mask, token_type_ids): name, shape and
    numpy type; a graph that takes anything else is not a text classifier pairflip can feed."""
    found: dict[str, tuple[str, list[Any], Any]] = {}
    named = {i.name: i for i in inputs}
    if IDS not in named and len(inputs) == 1:
        named = {IDS: inputs[0]}  # one input under another name: the token ids
    for role, i in named.items():
        if role not in (IDS, MASK, TYPES):
            raise PairflipError(f"{where}: the graph takes an input {i.name!r}; expected only {IDS}, {MASK} and "
                                f"{TYPES} (the inputs of a text classifier)")
        shape = list(i.shape or [])
        if i.type not in INT_TYPES or len(shape) != 2:
            raise PairflipError(f"{where}: input {i.name!r} is a {i.type} of shape {_shape(shape)}; expected an "
                                f"int64 or int32 matrix (texts, tokens)")
        found[role] = (i.name, shape, INT_TYPES[i.type])
    if IDS not in found:
        raise PairflipError(f"{where}: the graph's inputs {sorted(i.name for i in inputs)} have no {IDS}; "
                            f"expected {IDS} and optionally {MASK} and {TYPES}")
    return found


def pick_output(outputs: Sequence[Any], where: str) -> Any:
    if not outputs:
        raise PairflipError(f"{where}: the graph has no output")
    for want in ("logits", "probabilities", "probs"):
        for o in outputs:
            if o.name.lower() == want:
                return o
    return outputs[0]


def _fixed_length(shape: list[Any]) -> int | None:
    """The sequence length of a graph built for one length; None when it takes any."""
    n = shape[1] if len(shape) == 2 else None
    return n if isinstance(n, int) and n > 0 else None


def max_length(tokenizer: Any, config: dict[str, Any]) -> int | None:
    """How many tokens a text may have: the tokenizer's own truncation, else config.json's
    model_max_length, else its max_position_embeddings, else no limit."""
    tr = tokenizer.truncation
    candidates = [tr.get("max_length") if tr else None, config.get("model_max_length"), config.get("max_position_embeddings")]
    for n in candidates:
        if isinstance(n, int) and not isinstance(n, bool) and n > 0:
            return n
    return None


def pad_of(tokenizer: Any, config: dict[str, Any]) -> tuple[int, str]:
    """The pad token: config.json's pad_token_id, else a usual pad token in the vocabulary, else id 0."""
    pid = config.get("pad_token_id")
    if isinstance(pid, int) and not isinstance(pid, bool) and tokenizer.id_to_token(pid) is not None:
        return pid, tokenizer.id_to_token(pid)
    for token in PAD_TOKENS:
        tid = tokenizer.token_to_id(token)
        if tid is not None:
            return tid, token
    return 0, tokenizer.id_to_token(0) or "[PAD]"


def _hash_files(paths: Sequence[Path]) -> str:
    h = hashlib.sha256()
    for p in paths:
        h.update(p.name.encode("utf-8") + b"\0")
        try:
            with open(p, "rb") as fh:
                for chunk in iter(lambda: fh.read(1 << 20), b""):
                    h.update(chunk)
        except OSError as err:
            raise PairflipError(f"--model {p}: cannot read the file ({err.strerror or err})") from None
        h.update(b"\0")
    return h.hexdigest()


def _shape(shape: Sequence[Any]) -> str:
    return "(" + ", ".join(str(x) if x is not None else "?" for x in shape) + ")"
