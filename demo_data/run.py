"""``pairflip demo``: the whole job on the bundled data, nothing to prepare, nothing downloaded."""

from __future__ import annotations

import tempfile
import time
from pathlib import Path
from typing import Any

from rich.console import Console

from pairflip.records import PairflipError
from pairflip.demo.models import MODEL_NAMES, load_sentences, trained


def demo_files() -> list[str]:
    """The files ``run_demo`` writes into its folder (checked by the CLI before any work)."""
    skops = [f"{name}.skops" for name in MODEL_NAMES] if has_skops() else []
    return ([f"{name}.joblib" for name in MODEL_NAMES] + skops + ["domain.tsv", "suite.jsonl"]
            + [f"results-{name}.jsonl" for name in MODEL_NAMES])


def learn_demo_lexicon(path: Path, nlp: Any, log: Console) -> Path:
    """What a user does with labelled text (``pairflip lexicon``): learn the domain's opinion words
    from the demo's labelled reviews, write them to ``path`` and say how many."""
    from pairflip.demo.models import demo_path
    from pairflip.perturb.induce import induce_lexicon, open_labelled_corpus, write_lexicon
    from pairflip.perturb.lexicon import load_lexicon

    labelled = open_labelled_corpus(Path(str(demo_path("reviews.csv"))), label_column="label", label_field=None)
    lex = induce_lexicon(labelled.texts(), nlp=nlp, known=load_lexicon())
    try:
        write_lexicon(lex, path, corpus="demo_data/reviews.csv", label_name=labelled.label_name,
                      label_map=labelled.label_map.describe())
    except OSError as err:
        raise PairflipError(f"{path}: cannot write the demo's learned lexicon ({err.strerror or err})") from None
    new = len(lex.written)
    log.print(f"learned {len(lex.words)} opinion words from demo_data/reviews.csv ({new} not in the built-in lexicon "
              f"or of the other polarity there, written to domain.tsv; `pairflip lexicon` does this for your text)",
              markup=False, soft_wrap=True)
    return path


def has_skops() -> bool:
    """Is the optional ``pairflip[skops]`` extra installed (the demo then also saves .skops files)?"""
    import importlib.util

    return importlib.util.find_spec("skops") is not None


def save_skops(models: dict[str, Any], out: Path, log: Console) -> None:
    """Save each model with ``skops.io.dump`` too, and say which types each file asks to trust."""
    import skops.io as sio

    needs = []
    for name, m in models.items():
        path = out / f"{name}.skops"
        try:
            sio.dump(m, path)
        except OSError as err:
            raise PairflipError(f"{path}: cannot write the demo model ({err.strerror or err})") from None
        extra = sio.get_untrusted_types(file=path)
        if extra:
            needs.append(f"{path.name} needs " + " ".join(f"--trust {t}" for t in extra))
    log.print("saved the demo models as .skops files too (load without unpickling)"
              + (f"; {'; '.join(needs)}" if needs else ""), markup=False, soft_wrap=True)


def run_demo(*, out_dir: Path | None, seed: int, examples: int, console: Console, log: Console) -> list[Any]:
    import joblib

    from pairflip.files import write_results, write_suite
    from pairflip.perturb import build_suite
    from pairflip.probes import PythonModel, score
    from pairflip.report import render, summarize
    from pairflip.report.build_summary import render_build_stats

    t0 = time.perf_counter()
    tmp = None
    if out_dir is None:
        tmp = tempfile.TemporaryDirectory(prefix="pairflip-demo-")
        out = Path(tmp.name)
    else:
        out = Path(out_dir)
        out.mkdir(parents=True, exist_ok=True)
    try:
        models = {}
        for name in MODEL_NAMES:
            models[name] = trained(name, seed)
            try:
                joblib.dump(models[name], out / f"{name}.joblib")
            except OSError as err:
                raise PairflipError(f"{out / f'{name}.joblib'}: cannot write the demo model ({err.strerror or err})") from None
        log.print(f"trained {len(models)} demo models on demo_data/reviews.csv in {time.perf_counter() - t0:.1f}s", markup=False)
        if out_dir is not None and has_skops():
            save_skops(models, out, log)
        elif out_dir is not None:
            log.print('skops is not installed: the models are kept as .joblib only (pip install "pairflip[skops]" adds .skops files)', markup=False)
        t1 = time.perf_counter()
        from pairflip.perturb.nlp import load_nlp

        nlp = load_nlp()
        domain = learn_demo_lexicon(out / "domain.tsv", nlp, log)
        suite = build_suite(load_sentences(), seed=seed, nlp=nlp, lexicon_files=[str(domain)])
        suite.header["corpus"] = "demo_data/sentences.txt"
        write_suite(suite, out / "suite.jsonl")
        # A temporary folder is deleted when the demo ends: its paths are not worth printing.
        shown_suite = str(out / "suite.jsonl") if tmp is None else "demo suite (temporary; --out-dir DIR keeps it)"
        render_build_stats(suite.stats, out / "suite.jsonl" if tmp is None else None, log)
        log.print(f"built the suite in {time.perf_counter() - t1:.1f}s", markup=False)
        summaries = []
        for name, m in models.items():
            spec = str(out / f"{name}.joblib") if tmp is None else f"{name} (demo model, not kept: --out-dir DIR keeps it)"
            res = score(suite, PythonModel(m, spec=spec, name=name), suite_path=shown_suite)
            write_results(res, out / f"results-{name}.jsonl")
            summaries.append(summarize(res, examples=max(5, examples)))
        render(summaries, console=console, examples=examples)
        if any("contrast" in x.families for x in summaries):
            console.print("About contrast: each pair keeps the opinion words and changes only their order or the connective that weighs them (\"X but Y\" against "
                          "\"Y but X\" or \"X, although Y\"), and the three demo models count words without their order, so all three "
                          "are expected to fail it; a model that reads order would not.", markup=False, soft_wrap=True)
        where = f"files in {out}" if out_dir is not None else "rerun with --out-dir DIR to keep the suite, models and results"
        log.print(f"demo finished in {time.perf_counter() - t0:.1f}s; {where}", markup=False)
        return summaries
    finally:
        if tmp is not None:
            tmp.cleanup()
