"""Reading corpora, and reading and writing suite and results files.

Both files are JSON Lines in UTF-8: a header object on the first line, one record per line after
it. Writers go to a temporary file beside the target and rename it into place at the end, so an
interrupted run never leaves a half-written file. Readers are lazy where they can be and report
problems as ``FILE:LINE: what was wrong`` (:class:`~pairflip.records.PairflipError`).
"""

from __future__ import annotations

import csv
import datetime as _dt
import io
import json
import os
import sys
import tempfile
from contextlib import contextmanager
from pathlib import Path
from typing import Any, Iterable, Iterator, TextIO

from pairflip.records import Pair, PairflipError, Results, SourceText, Suite, Verdict

SUITE_KIND = "pairflip-suite"
RESULTS_KIND = "pairflip-results"
FORMAT_VERSION = 1

CORPUS_SUFFIXES = (".txt", ".csv", ".tsv", ".jsonl")


def now_iso() -> str:
    return _dt.datetime.now(_dt.timezone.utc).replace(microsecond=0).isoformat()


# --------------------------------------------------------------------------- atomic writing


@contextmanager
def atomic_writer(path: str | os.PathLike[str], *, force: bool = True) -> Iterator[TextIO]:
    """Open a temp file beside ``path`` for writing; rename it over ``path`` only on success."""
    target = Path(path)
    if not force and target.exists():
        raise PairflipError(f"{target}: already exists; pass --force to overwrite it")
    directory = target.parent if str(target.parent) else Path(".")
    if not directory.exists():
        raise PairflipError(f"{target}: folder {directory} does not exist")
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=directory)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as fh:
            yield fh
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, target)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise


def _dump(obj: dict[str, Any]) -> str:
    return json.dumps(obj, ensure_ascii=False, sort_keys=False)


# --------------------------------------------------------------------------- corpora


def _decode_error(path: Path, raw: bytes, err: UnicodeDecodeError, encoding: str) -> PairflipError:
    line = raw.count(b"\n", 0, err.start) + 1
    return PairflipError(
        f"{path}:{line}: not valid {encoding} (byte 0x{raw[err.start]:02x} at byte offset {err.start}); "
        f"pass --encoding (for example --encoding latin-1) if the file uses another encoding"
    )


def _open_text(path: Path, encoding: str) -> TextIO:
    """Open a corpus for reading; checks the whole file decodes first, naming the byte offset."""
    if not path.exists():
        raise PairflipError(f"{path}: no such file")
    if path.is_dir():
        raise PairflipError(f"{path}: is a folder, expected a corpus file ({', '.join(CORPUS_SUFFIXES)})")
    enc = "utf-8-sig" if encoding.lower().replace("_", "-") in ("utf-8", "utf8") else encoding
    try:
        codecs_check = io.open(path, "r", encoding=enc, newline="")
    except LookupError:
        raise PairflipError(f"--encoding {encoding!r}: unknown encoding") from None
    # Decode in chunks so a huge file is not held in memory; on failure, find the byte offset.
    with codecs_check as fh:
        try:
            while fh.read(1 << 20):
                pass
        except UnicodeDecodeError as err:
            raw = path.read_bytes()
            try:
                raw.decode(enc)
            except UnicodeDecodeError as err2:
                raise _decode_error(path, raw, err2, encoding) from None
            raise _decode_error(path, raw, err, encoding) from None
    return io.open(path, "r", encoding=enc, newline="")


def read_corpus(
    path: str | os.PathLike[str],
    *,
    text_column: str | None = None,
    label_column: str | None = None,
    text_field: str | None = None,
    label_field: str | None = None,
    encoding: str = "utf-8",
) -> Iterator[SourceText]:
    """Yield the texts of a corpus lazily, one :class:`SourceText` each.

    ``.txt``: one text per line, blank lines skipped. ``.csv``/``.tsv``: a header row; the text is
    in ``text_column`` (default ``text``), an optional gold label in ``label_column``. ``.jsonl``:
    one object per line, text in ``text_field`` (default ``text``), label in ``label_field``.
    Duplicate texts are yielded once. Raises :class:`PairflipError` on bad input, and when the
    corpus holds no text at all.
    """
    p = Path(path)
    suffix = p.suffix.lower()
    if suffix not in CORPUS_SUFFIXES:
        raise PairflipError(
            f"{p}: unknown corpus type {suffix or '(no suffix)'!r}; expected one of {', '.join(CORPUS_SUFFIXES)}"
        )
    fh = _open_text(p, encoding)
    seen: set[str] = set()
    n = 0
    with fh:
        if suffix == ".txt":
            rows = _read_txt(p, fh)
        elif suffix in (".csv", ".tsv"):
            rows = _read_csv(p, fh, "\t" if suffix == ".tsv" else ",", text_column or "text", label_column)
        else:
            rows = _read_jsonl(p, fh, text_field or "text", label_field)
        for item in rows:
            if item.text in seen:
                continue
            seen.add(item.text)
            n += 1
            yield item
    if n == 0:
        raise PairflipError(f"{p}: the corpus holds no text (the file is empty or every line is blank)")


def _read_txt(p: Path, fh: TextIO) -> Iterator[SourceText]:
    for lineno, line in enumerate(fh, 1):
        text = line.strip()
        if text:
            yield SourceText(text=text, where=f"{p}:{lineno}")


def _read_csv(p: Path, fh: TextIO, delimiter: str, text_column: str, label_column: str | None) -> Iterator[SourceText]:
    csv.field_size_limit(min(sys.maxsize, 2**31 - 1))
    reader = csv.reader(fh, delimiter=delimiter, strict=True)
    try:
        header = next(reader)
    except StopIteration:
        return
    except csv.Error as err:
        raise PairflipError(f"{p}:1: cannot read the header row: {err}") from None
    header = [h.strip() for h in header]
    if text_column not in header:
        raise PairflipError(
            f"{p}: no column {text_column!r}; the columns are {', '.join(repr(h) for h in header)} "
            f"(choose one with --text-column)"
        )
    if label_column is not None and label_column not in header:
        raise PairflipError(
            f"{p}: no column {label_column!r}; the columns are {', '.join(repr(h) for h in header)} "
            f"(choose one with --label-column)"
        )
    ti = header.index(text_column)
    li = header.index(label_column) if label_column is not None else None
    while True:
        try:
            row = next(reader)
        except StopIteration:
            return
        except csv.Error as err:
            raise PairflipError(f"{p}:{reader.line_num}: malformed CSV row: {err}") from None
        if not row or all(not c.strip() for c in row):
            continue
        lineno = reader.line_num
        if len(row) <= ti:
            raise PairflipError(f"{p}:{lineno}: the row has {len(row)} fields, no {text_column!r} field")
        text = row[ti].strip()
        if not text:
            continue
        label = None
        if li is not None:
            if len(row) <= li or not row[li].strip():
                raise PairflipError(f"{p}:{lineno}: empty {label_column!r} field")
            label = row[li].strip()
        yield SourceText(text=text, label=label, where=f"{p}:{lineno}")


def _read_jsonl(p: Path, fh: TextIO, text_field: str, label_field: str | None) -> Iterator[SourceText]:
    for lineno, line in enumerate(fh, 1):
        if not line.strip():
            continue
        try:
            obj = json.loads(line)
        except json.JSONDecodeError as err:
            raise PairflipError(f"{p}:{lineno}: malformed JSON ({err.msg} at column {err.colno})") from None
        if not isinstance(obj, dict):
            raise PairflipError(f"{p}:{lineno}: expected a JSON object, got {type(obj).__name__}")
        if text_field not in obj:
            raise PairflipError(
                f"{p}:{lineno}: no field {text_field!r}; the fields are {', '.join(map(repr, obj))} "
                f"(choose one with --text-field)"
            )
        text = obj[text_field]
        if not isinstance(text, str):
            raise PairflipError(f"{p}:{lineno}: field {text_field!r} is {type(text).__name__}, expected a string")
        label = None
        if label_field is not None:
            if obj.get(label_field) is None:
                raise PairflipError(f"{p}:{lineno}: no field {label_field!r}")
            label = str(obj[label_field])
        text = text.strip()
        if text:
            yield SourceText(text=text, label=label, where=f"{p}:{lineno}")


# --------------------------------------------------------------------------- suite and results files


def _read_jsonl_records(path: Path, kind: str) -> tuple[dict[str, Any], Iterator[tuple[int, dict[str, Any]]]]:
    if not path.exists():
        raise PairflipError(f"{path}: no such file")
    fh = io.open(path, "r", encoding="utf-8")
    try:
        first = fh.readline()
    except UnicodeDecodeError as err:
        fh.close()
        raise PairflipError(f"{path}:1: not valid UTF-8 ({err.reason})") from None
    if not first.strip():
        fh.close()
        raise PairflipError(f"{path}: empty file, expected a {kind} header on line 1")
    try:
        header = json.loads(first)
    except json.JSONDecodeError as err:
        fh.close()
        raise PairflipError(f"{path}:1: malformed JSON header ({err.msg})") from None
    if not isinstance(header, dict) or header.get("kind") != kind:
        fh.close()
        got = header.get("kind") if isinstance(header, dict) else type(header).__name__
        raise PairflipError(f"{path}:1: expected a header with kind {kind!r}, got kind={got!r}")
    if header.get("version") != FORMAT_VERSION:
        fh.close()
        raise PairflipError(
            f"{path}:1: {kind} file version {header.get('version')!r} is not supported "
            f"(this pairflip reads version {FORMAT_VERSION})"
        )

    def records() -> Iterator[tuple[int, dict[str, Any]]]:
        with fh:
            lineno = 1
            while True:
                try:
                    line = fh.readline()
                except UnicodeDecodeError as err:
                    raise PairflipError(f"{path}:{lineno + 1}: not valid UTF-8 ({err.reason})") from None
                if not line:
                    return
                lineno += 1
                if not line.strip():
                    continue
                try:
                    obj = json.loads(line)
                except json.JSONDecodeError as err:
                    raise PairflipError(f"{path}:{lineno}: malformed JSON ({err.msg} at column {err.colno})") from None
                if not isinstance(obj, dict):
                    raise PairflipError(f"{path}:{lineno}: expected a JSON object")
                yield lineno, obj

    return header, records()


def iter_suite(path: str | os.PathLike[str]) -> tuple[dict[str, Any], Iterator[Pair]]:
    """Open a suite file: its header now, and a lazy iterator over its pairs."""
    p = Path(path)
    header, recs = _read_jsonl_records(p, SUITE_KIND)

    def pairs() -> Iterator[Pair]:
        for lineno, obj in recs:
            try:
                yield Pair.from_dict(obj)
            except (KeyError, TypeError, ValueError) as err:
                raise PairflipError(f"{p}:{lineno}: bad pair record (missing or malformed field {err})") from None

    return header, pairs()


def read_suite(path: str | os.PathLike[str]) -> Suite:
    header, pairs = iter_suite(path)
    suite = Suite(header=header, pairs=list(pairs))
    header.setdefault("path", str(path))
    return suite


def write_suite(suite: Suite, path: str | os.PathLike[str], *, force: bool = True) -> None:
    with atomic_writer(path, force=force) as fh:
        write_suite_stream(suite.header, suite.pairs, fh)


def write_suite_stream(header: dict[str, Any], pairs: Iterable[Pair], fh: TextIO) -> int:
    """Write a header and pairs as they come; returns how many pairs were written."""
    head = {"kind": SUITE_KIND, "version": FORMAT_VERSION}
    head.update({k: v for k, v in header.items() if k not in ("kind", "version", "path")})
    head.setdefault("created", now_iso())
    fh.write(_dump(head) + "\n")
    n = 0
    for pair in pairs:
        fh.write(_dump(pair.to_dict()) + "\n")
        n += 1
    return n


def read_results(path: str | os.PathLike[str]) -> Results:
    p = Path(path)
    header, recs = _read_jsonl_records(p, RESULTS_KIND)
    verdicts = []
    for lineno, obj in recs:
        try:
            verdicts.append(Verdict.from_dict(obj))
        except (KeyError, TypeError, ValueError) as err:
            raise PairflipError(f"{p}:{lineno}: bad result record (missing or malformed field {err})") from None
    header.setdefault("path", str(path))
    return Results(header=header, verdicts=verdicts)


def write_results(results: Results, path: str | os.PathLike[str], *, force: bool = True) -> None:
    head = {"kind": RESULTS_KIND, "version": FORMAT_VERSION}
    head.update({k: v for k, v in results.header.items() if k not in ("kind", "version", "path")})
    head.setdefault("created", now_iso())
    with atomic_writer(path, force=force) as fh:
        fh.write(_dump(head) + "\n")
        for v in results.verdicts:
            fh.write(_dump(v.to_dict()) + "\n")


def file_sha256(path: str | os.PathLike[str]) -> str:
    import hashlib

    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()
