"""``onnx:DIR``: a tiny ONNX text classifier built here with the onnx package's helpers, a
word-level tokenizer built with ``tokenizers``, run through onnxruntime (the reference runtime of
the ONNX spec) and checked against the same computation done with numpy.

The numpy reference follows the ONNX operator definitions (onnx.ai/onnx/operators: Gather picks
rows of the embedding, ReduceMean / ReduceSum / Div average them, MatMul + Add is the linear
layer, Softmax is exp(x - max) / sum). Its tokenizer is written here too: lowercase, then the
Whitespace pre-tokenizer's pattern ``\\w+|[^\\w\\s]+`` (tokenizers' documentation of
``pre_tokenizers.Whitespace``), unknown words to ``[UNK]``.
"""

from __future__ import annotations

import json
import re
import shutil
import sys

import numpy as np
import pytest

import pairflip
from pairflip.probes import load_model
from pairflip.records import PairflipError
from helpers.cli import run_cli
from helpers.suites import make_pairs, write_test_suite

onnx = pytest.importorskip("onnx", reason='needs the test extra: pip install -e ".[test]"')
pytest.importorskip("onnxruntime", reason='needs the onnx extra: pip install -e ".[test]"')
tokenizers = pytest.importorskip("tokenizers", reason='needs the onnx extra: pip install -e ".[test]"')
from onnx import TensorProto, helper, numpy_helper  # noqa: E402

LABELS = ["negative", "neutral", "positive"]
# Invented outdoor-gear review words (demo data of a fictional shop).
WORDS = ["the", "tent", "is", "great", "not", "stove", "reliable", "jacket", "leaks", "never", "really",
         "very", "lantern", "bright", "and", "light", "poles", "are", "flimsy", "warm", "sleeping", "bag",
         "boots", "heavy", "but", "sturdy", "pad", "comfortable", "a", "little", "."]
VOCAB = {"[PAD]": 0, "[UNK]": 1, **{w: i + 2 for i, w in enumerate(WORDS)}}
DIM = 5
RNG = np.random.default_rng(7)
EMB = RNG.normal(size=(len(VOCAB), DIM)).astype(np.float32)
W = RNG.normal(size=(DIM, len(LABELS))).astype(np.float32)
B = RNG.normal(size=(len(LABELS),)).astype(np.float32)
OPSET = 18


# --------------------------------------------------------------------------- building the model


def _graph(*, mask: bool, softmax: bool, output: str, seq: int | str = "tokens", extra_input: bool = False,
           ids_name: str = "input_ids", itype: int = TensorProto.INT64, type_ids: bool = False) -> onnx.ModelProto:
    """Embedding lookup -> mean over tokens (masked sum / count with a mask) -> linear layer,
    optionally -> Softmax."""
    inits = [numpy_helper.from_array(EMB, "emb"), numpy_helper.from_array(W, "w"), numpy_helper.from_array(B, "b"),
             numpy_helper.from_array(np.array([1], dtype=np.int64), "axis1"),
             numpy_helper.from_array(np.array([2], dtype=np.int64), "axis2")]
    inputs = [helper.make_tensor_value_info(ids_name, itype, ["batch", seq])]
    nodes = [helper.make_node("Gather", ["emb", ids_name], ["vecs"])]
    if type_ids:  # taken and not used, as in a classifier whose segment embedding is all zeros
        inputs.append(helper.make_tensor_value_info("token_type_ids", itype, ["batch", seq]))
    if mask:
        inputs.append(helper.make_tensor_value_info("attention_mask", itype, ["batch", seq]))
        nodes += [
            helper.make_node("Cast", ["attention_mask"], ["m"], to=TensorProto.FLOAT),
            helper.make_node("Unsqueeze", ["m", "axis2"], ["m3"]),
            helper.make_node("Mul", ["vecs", "m3"], ["kept"]),
            helper.make_node("ReduceSum", ["kept", "axis1"], ["total"], keepdims=0),
            helper.make_node("ReduceSum", ["m3", "axis1"], ["count"], keepdims=0),
            helper.make_node("Div", ["total", "count"], ["mean"]),
        ]
    else:
        nodes.append(helper.make_node("ReduceMean", ["vecs", "axis1"], ["mean"], keepdims=0))
    if extra_input:  # something a text classifier does not take
        inputs.append(helper.make_tensor_value_info("pixel_values", TensorProto.FLOAT, ["batch", 3]))
        nodes.append(helper.make_node("Identity", ["pixel_values"], ["unused"]))
    nodes.append(helper.make_node("MatMul", ["mean", "w"], ["lin"]))
    nodes.append(helper.make_node("Add", ["lin", "b"], ["raw" if softmax else output]))
    if softmax:
        nodes.append(helper.make_node("Softmax", ["raw"], [output], axis=1))
    outputs = [helper.make_tensor_value_info(output, TensorProto.FLOAT, ["batch", len(LABELS)])]
    if extra_input:
        outputs.append(helper.make_tensor_value_info("unused", TensorProto.FLOAT, ["batch", 3]))
    graph = helper.make_graph(nodes, "gear-review-classifier", inputs, outputs, inits)
    model = helper.make_model(graph, opset_imports=[helper.make_opsetid("", OPSET)])
    model.ir_version = 9
    onnx.checker.check_model(model)
    return model


def _tokenizer() -> "tokenizers.Tokenizer":
    from tokenizers import Tokenizer, models, normalizers, pre_tokenizers

    tok = Tokenizer(models.WordLevel(VOCAB, unk_token="[UNK]"))
    tok.normalizer = normalizers.Lowercase()
    tok.pre_tokenizer = pre_tokenizers.Whitespace()
    return tok


def make_dir(path, *, mask: bool = True, softmax: bool = False, output: str = "logits", labels=LABELS,
             config_extra: dict | None = None, **graph_kw):
    path.mkdir(parents=True, exist_ok=True)
    onnx.save(_graph(mask=mask, softmax=softmax, output=output, **graph_kw), str(path / "model.onnx"))
    _tokenizer().save(str(path / "tokenizer.json"))
    config = {"id2label": {str(i): lab for i, lab in enumerate(labels)}, **(config_extra or {})}
    (path / "config.json").write_text(json.dumps(config), encoding="utf-8")
    return path


# --------------------------------------------------------------------------- the numpy reference


def ref_ids(text: str, max_len: int | None = None) -> list[int]:
    ids = [VOCAB.get(t, VOCAB["[UNK]"]) for t in re.findall(r"\w+|[^\w\s]+", text.lower())]
    return ids[:max_len] if max_len else ids


def ref_probabilities(texts: list[str], max_len: int | None = None) -> np.ndarray:
    rows = []
    for t in texts:
        mean = EMB[ref_ids(t, max_len)].astype(np.float64).mean(axis=0)
        logits = mean @ W.astype(np.float64) + B.astype(np.float64)
        e = np.exp(logits - logits.max())
        rows.append(e / e.sum())
    return np.array(rows)


TEXTS = ["The tent is great.", "The jacket never leaks", "Boots are heavy but sturdy and a little warm .",
         "A wholly unknown word", "pad"]


# --------------------------------------------------------------------------- scoring


@pytest.mark.parametrize("mask", [True, False], ids=["mask", "no-mask"])
@pytest.mark.parametrize("softmax,output", [(False, "logits"), (True, "probabilities"), (False, "scores"), (True, "scores")],
                         ids=["logits", "probabilities", "unnamed-logits", "unnamed-probabilities"])
def test_predictions_equal_the_numpy_computation(tmp_path, mask, softmax, output):
    m = load_model(f"onnx:{make_dir(tmp_path / 'gearnet', mask=mask, softmax=softmax, output=output)}")
    preds = m.predict(TEXTS)  # one batch of texts of different lengths: padded (mask) or grouped (no mask)
    ref = ref_probabilities(TEXTS)
    got = np.array([[p.probabilities[c] for c in LABELS] for p in preds])
    np.testing.assert_allclose(got, ref, rtol=1e-5, atol=1e-6)  # float32 in the graph
    assert [p.label for p in preds] == [LABELS[i] for i in ref.argmax(axis=1)]
    for i, t in enumerate(TEXTS):  # alone in its batch: the same answer
        np.testing.assert_allclose([m.predict([t])[0].probabilities[c] for c in LABELS], ref[i], rtol=1e-5, atol=1e-6)


@pytest.mark.parametrize("kw", [{"itype": TensorProto.INT32}, {"type_ids": True}, {"ids_name": "tokens", "mask": False}],
                         ids=["int32", "token-type-ids", "one-input-named-otherwise"])
def test_other_input_layouts(tmp_path, kw):
    m = load_model(f"onnx:{make_dir(tmp_path / 'gearnet', **kw)}")
    got = np.array([[p.probabilities[c] for c in LABELS] for p in m.predict(TEXTS)])
    np.testing.assert_allclose(got, ref_probabilities(TEXTS), rtol=1e-5, atol=1e-6)


def test_an_output_named_logits_always_gets_a_softmax(tmp_path):
    # Rows that happen to look like probabilities are still logits when the output says so.
    m = load_model(f"onnx:{make_dir(tmp_path / 'gearnet', softmax=True, output='logits')}")
    probs = ref_probabilities(TEXTS)
    again = np.exp(probs - probs.max(axis=1, keepdims=True))
    again /= again.sum(axis=1, keepdims=True)
    got = np.array([[p.probabilities[c] for c in LABELS] for p in m.predict(TEXTS)])
    np.testing.assert_allclose(got, again, rtol=1e-5, atol=1e-6)


def test_score_a_suite_through_the_cli(tmp_path):
    d = make_dir(tmp_path / "gearnet")
    suite = write_test_suite(tmp_path / "suite.jsonl")
    out = tmp_path / "results.jsonl"
    run = run_cli(["score", str(suite), "--model", f"onnx:{d}", "-o", str(out), "--batch-size", "3"])
    assert run.code == 0, run.stderr
    rows = [json.loads(line) for line in out.read_text(encoding="utf-8").splitlines()]
    head = rows[0]["model"]
    assert head["kind"] == "onnx" and head["name"] == "gearnet" and head["spec"] == f"onnx:{d}"
    assert head["classes"] == LABELS and head["inputs"] == ["input_ids", "attention_mask"]
    polarity = np.array([-1.0, 0.0, 1.0])  # the recognised negative/neutral/positive scale
    for r in rows[1:]:
        p_src, p_var = ref_probabilities([r["source"], r["variant"]])
        assert r["source_pred"] == LABELS[int(p_src.argmax())] and r["variant_pred"] == LABELS[int(p_var.argmax())]
        assert r["source_score"] == pytest.approx(float(p_src @ polarity), abs=1e-5)
        assert r["variant_score"] == pytest.approx(float(p_var @ polarity), abs=1e-5)
    assert len(rows) - 1 == len(make_pairs())


def test_the_report_names_the_folder_and_the_format(tmp_path):
    from pairflip.report import summarize
    from pairflip.report.terminal import header_facts

    d = make_dir(tmp_path / "gearnet")
    res = pairflip.score(make_pairs(), f"onnx:{d}")
    facts = dict(header_facts(summarize(res)))
    assert facts["model"] == f"gearnet (onnx:{d})"
    assert "ONNX" in facts["format"] and "tokenizer.json" in facts["format"]
    from pairflip.files import write_results

    write_results(res, tmp_path / "res.jsonl")
    html = tmp_path / "report.html"
    run = run_cli(["show", str(tmp_path / "res.jsonl"), "--html", str(html)])
    assert run.code == 0, run.stderr
    page = html.read_text(encoding="utf-8")
    assert "gearnet" in page and "ONNX model with tokenizer.json" in page
    assert "gearnet" in run.stdout and "ONNX model" in " ".join(run.stdout.split())


def test_truncation_to_the_configured_length(tmp_path):
    d = make_dir(tmp_path / "short", config_extra={"max_position_embeddings": 3})
    m = load_model(f"onnx:{d}")
    assert m.max_length == 3
    text = "The tent is great and the stove is reliable"
    got = [m.predict([text])[0].probabilities[c] for c in LABELS]
    np.testing.assert_allclose(got, ref_probabilities([text], max_len=3)[0], rtol=1e-5, atol=1e-6)
    assert not np.allclose(got, ref_probabilities([text])[0], atol=1e-3)  # the cut changed the answer


def test_a_fixed_length_graph_gets_padded_and_cut_to_its_length(tmp_path):
    d = make_dir(tmp_path / "fixed", seq=4)
    m = load_model(f"onnx:{d}")
    assert m.max_length == 4
    texts = ["pad", "The tent is great and warm"]
    got = np.array([[p.probabilities[c] for c in LABELS] for p in m.predict(texts)])
    np.testing.assert_allclose(got, ref_probabilities(texts, max_len=4), rtol=1e-5, atol=1e-6)


def test_fingerprint_covers_the_three_files(tmp_path):
    d = make_dir(tmp_path / "a")
    fp = load_model(f"onnx:{d}").fingerprint()
    copy = tmp_path / "b"
    shutil.copytree(d, copy)
    assert load_model(f"onnx:{copy}").fingerprint() == fp  # the bytes, not the path
    cfg = json.loads((copy / "config.json").read_text())
    cfg["note"] = "retrained"
    (copy / "config.json").write_text(json.dumps(cfg))
    fp_cfg = load_model(f"onnx:{copy}").fingerprint()
    tok = _tokenizer()
    tok.add_tokens(["zip"])
    tok.save(str(copy / "tokenizer.json"))
    fp_tok = load_model(f"onnx:{copy}").fingerprint()
    onnx.save(_graph(mask=True, softmax=True, output="logits"), str(copy / "model.onnx"))
    fp_model = load_model(f"onnx:{copy}").fingerprint()
    assert len({fp, fp_cfg, fp_tok, fp_model}) == 4


def test_other_label_names_map_through_labels_option(tmp_path):
    d = make_dir(tmp_path / "generic", labels=["LABEL_0", "LABEL_1", "LABEL_2"])
    res = pairflip.score(make_pairs()[:3], f"onnx:{d}", labels="LABEL_0,LABEL_1,LABEL_2")
    assert res.header["labels"]["polarity"] == {"LABEL_0": -1, "LABEL_1": 0, "LABEL_2": 1}


# --------------------------------------------------------------------------- errors


def _score_error(tmp_path, spec: str) -> str:
    suite = write_test_suite(tmp_path / "suite.jsonl")
    out = tmp_path / "results.jsonl"
    run = run_cli(["score", str(suite), "--model", spec, "-o", str(out)])
    assert run.code == 2 and not out.exists(), (run.code, run.stderr)
    lines = run.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("pairflip: error: --model onnx:"), run.stderr
    return lines[0]


@pytest.mark.parametrize("missing", ["model.onnx", "tokenizer.json", "config.json"])
def test_missing_file(tmp_path, missing):
    d = make_dir(tmp_path / "gearnet")
    (d / missing).unlink()
    msg = _score_error(tmp_path, f"onnx:{d}")
    assert f"{d} has no {missing}" in msg


def test_missing_folder(tmp_path):
    assert "no such folder" in _score_error(tmp_path, f"onnx:{tmp_path / 'nowhere'}")


def test_inputs_that_are_not_a_text_classifiers(tmp_path):
    d = make_dir(tmp_path / "vision", extra_input=True)
    msg = _score_error(tmp_path, f"onnx:{d}")
    assert "model.onnx: the graph takes an input 'pixel_values'" in msg and "input_ids" in msg


def test_label_count_differs_from_output_width(tmp_path):
    d = make_dir(tmp_path / "two", labels=["negative", "positive"])
    msg = _score_error(tmp_path, f"onnx:{d}")
    assert "has 3 columns but config.json id2label names 2 labels" in msg


@pytest.mark.parametrize("config,found", [({}, "no id2label field"), ({"id2label": {"0": "negative", "2": "positive"}}, "columns [0, 2]"),
                                          ({"id2label": {"0": "good", "1": "good", "2": "bad"}}, "repeats a label")])
def test_bad_config(tmp_path, config, found):
    d = make_dir(tmp_path / "gearnet")
    (d / "config.json").write_text(json.dumps(config))
    assert found in _score_error(tmp_path, f"onnx:{d}")


def test_files_that_are_not_what_they_say(tmp_path):
    d = make_dir(tmp_path / "gearnet")
    (d / "model.onnx").write_bytes(b"a tent review, not a graph")
    assert "model.onnx: onnxruntime cannot load the model" in _score_error(tmp_path, f"onnx:{d}")
    d2 = make_dir(tmp_path / "gearnet2")
    (d2 / "tokenizer.json").write_text('{"not": "a tokenizer"}')
    assert "tokenizer.json: not a tokenizer file" in _score_error(tmp_path, f"onnx:{d2}")
    d3 = make_dir(tmp_path / "gearnet3")
    (d3 / "config.json").write_text("{id2label")
    assert "config.json: not valid JSON" in _score_error(tmp_path, f"onnx:{d3}")


def test_without_the_extra_the_error_names_it(tmp_path, monkeypatch):
    d = make_dir(tmp_path / "gearnet")
    monkeypatch.setitem(sys.modules, "onnxruntime", None)  # an import of onnxruntime now fails
    with pytest.raises(PairflipError, match=r'an ONNX model needs onnxruntime and tokenizers .*pip install "pairflip\[onnx\]"'):
        load_model(f"onnx:{d}")


def test_trust_is_refused_for_an_onnx_model(tmp_path):
    d = make_dir(tmp_path / "gearnet")
    with pytest.raises(PairflipError, match=r"--trust builtins.dict: only a \.skops model file"):
        load_model(f"onnx:{d}", trust=["builtins.dict"])
