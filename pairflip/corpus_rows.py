"""Whole rows of a labelled corpus, and new rows written in the corpus's own format (augment).

``pairflip augment`` writes its rows as the corpus is written: a ``.csv``/``.tsv`` file with the
input's columns plus ``source_id`` and ``rule`` (every other column copied from the source's
row, the text and label columns holding the new text and label), or a ``.jsonl`` file whose
objects are the source's object with the new text and label and the two added fields. The
output is always UTF-8. Every input error is found by a first pass through
:func:`pairflip.files.read_corpus` (file, line, field), before anything is parsed.
"""

from __future__ import annotations

import csv
import io
import json
import sys
from collections import Counter, OrderedDict
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Iterator, TextIO

from pairflip.files import _normal_encoding, json_object, read_corpus
from pairflip.labels import LabelMap, count_corpus_labels
from pairflip.records import PairflipError, SourceText, text_digest

ADDED = ("source_id", "rule")  # the columns (fields) augment adds to every row


@dataclass
class LabelledCorpus:
    """A corpus file checked once: its labels, their scale, and how to read it again."""

    path: Path
    suffix: str
    text_key: str  # column or field holding the text
    label_key: str  # column or field holding the label
    scale: LabelMap
    counts: dict[str, int]  # label (as the scale spells it) -> texts
    columns: list[str]  # csv/tsv header (empty for jsonl)
    encoding: str
    digests: set[bytes]  # every text of the corpus

    def sources(self) -> Iterator[SourceText]:
        return read_corpus(self.path, **self._read_kw(), encoding=self.encoding)

    def _read_kw(self) -> dict[str, Any]:
        if self.suffix == ".jsonl":
            return {"text_field": self.text_key, "label_field": self.label_key}
        return {"text_column": self.text_key, "label_column": self.label_key}

    def raw_rows(self) -> Iterator[tuple[bytes, Any]]:
        """``(digest of the text, the row)`` for each text as read_corpus yields it (first
        occurrence of a text only); a row is a list of fields (csv/tsv) or a dict (jsonl)."""
        enc = _normal_encoding(self.encoding)
        seen: set[bytes] = set()
        with io.open(self.path, "r", encoding=enc, newline="") as fh:
            if self.suffix == ".jsonl":
                rows: Iterator[tuple[str, Any]] = ((str(o.get(self.text_key, "")), o) for o in
                                                   (json.loads(line) for line in fh if line.strip()))
            else:
                csv.field_size_limit(min(sys.maxsize, 2**31 - 1))
                reader = csv.reader(fh, delimiter="\t" if self.suffix == ".tsv" else ",", strict=True)
                next(reader)
                ti = self.columns.index(self.text_key)
                rows = ((r[ti] if len(r) > ti else "", r) for r in reader)
            for text, row in rows:
                text = text.strip()
                if not text:
                    continue
                key = text_digest(text)
                if key in seen:
                    continue
                seen.add(key)
                yield key, row


def open_labelled(
    path: Path, *, text_column: str | None, label_column: str | None, text_field: str | None,
    label_field: str | None, labels: str | None, encoding: str,
) -> LabelledCorpus:
    """Read the corpus once: every input error now (exit 2), the label scale fixed."""
    suffix = path.suffix.lower()
    if suffix == ".txt":
        raise PairflipError(
            f"{path}: a .txt corpus (one text per line) holds no labels, and augment writes labelled rows; "
            f"expected a .csv/.tsv with --label-column or a .jsonl with --label-field"
        )
    if label_column is None and label_field is None:
        if suffix == ".jsonl":
            raise PairflipError(f"{path}: no labels given; name the field holding each text's label with --label-field")
        raise PairflipError(f"{path}: no labels given; name the column holding each text's label with --label-column")
    name = f"column {label_column!r}" if label_column is not None else f"field {label_field!r}"
    opt = "--label-column" if label_column is not None else "--label-field"
    given = LabelMap.from_labels(labels) if labels is not None else None
    digests: set[bytes] = set()
    items = read_corpus(path, text_column=text_column, label_column=label_column, text_field=text_field,
                        label_field=label_field, encoding=encoding)
    given, raw = count_corpus_labels(items, path=path, given=given, name=name, opt=opt,
                                     each=lambda item: digests.add(text_digest(item.text)))
    counts = Counter({given.canonical(k): v for k, v in raw.items()})
    columns: list[str] = []
    if suffix in (".csv", ".tsv"):
        with io.open(path, "r", encoding=_normal_encoding(encoding), newline="") as fh:
            columns = [h.strip() for h in next(csv.reader(fh, delimiter="\t" if suffix == ".tsv" else ","))]
        clash = [c for c in ADDED if c in columns]
        if clash:
            raise PairflipError(
                f"{path}:1: the corpus already has a column {clash[0]!r}, which augment adds to every row "
                f"(with {', '.join(repr(c) for c in ADDED)}); rename that column first"
            )
    text_key = (text_field or "text") if suffix == ".jsonl" else (text_column or "text")
    label_key = label_field if suffix == ".jsonl" else label_column  # type: ignore[assignment]
    return LabelledCorpus(path, suffix, text_key, str(label_key), given, dict(counts), columns, encoding, digests)


class RowLookup:
    """The raw row of each source, for pairs that come in corpus order, holding only the rows
    between the last source asked for and the next (memory does not grow with the corpus)."""

    def __init__(self, corpus: LabelledCorpus) -> None:
        self._rows = corpus.raw_rows()
        self._buffer: "OrderedDict[bytes, Any]" = OrderedDict()

    def row(self, text: str) -> Any:
        key = text_digest(text.strip())
        while key not in self._buffer:
            try:
                k, r = next(self._rows)
            except StopIteration:
                raise PairflipError(f"internal: source text not found in the corpus rows: {text[:60]!r}") from None
            self._buffer[k] = r
        while next(iter(self._buffer)) != key:  # sources come in order: earlier rows are done
            self._buffer.popitem(last=False)
        return self._buffer[key]


def output_suffix_check(corpus: LabelledCorpus, output: Path) -> None:
    """The output is written in the corpus's own format, so it takes the corpus's suffix."""
    if output.suffix.lower() != corpus.suffix:
        raise PairflipError(
            f"-o {output}: augment writes the corpus's own format ({corpus.suffix}, as {corpus.path.name}); "
            f"name the output with {corpus.suffix}"
        )


def _json_label(new: str, old: Any) -> Any:
    """A label written as the corpus wrote it: a number stays a number."""
    if isinstance(old, (int, float)) and not isinstance(old, bool):
        try:
            return int(new)
        except ValueError:
            try:
                return float(new)
            except ValueError:
                return new
    return new


def write_rows(corpus: LabelledCorpus, rows: Iterator[Any], fh: TextIO) -> int:
    """Write augmented rows (:class:`pairflip.perturb.augment.AugmentedRow`) to ``fh`` in the
    corpus's format; returns how many were written."""
    lookup = RowLookup(corpus)
    n = 0
    if corpus.suffix == ".jsonl":
        for r in rows:
            src = lookup.row(r.source)
            obj = dict(src)
            obj[corpus.text_key] = r.text
            obj[corpus.label_key] = _json_label(r.label, src.get(corpus.label_key))
            obj["source_id"] = r.source_id
            obj["rule"] = r.rule
            fh.write(json.dumps(obj, ensure_ascii=False) + "\n")
            n += 1
        return n
    writer = csv.writer(fh, delimiter="\t" if corpus.suffix == ".tsv" else ",", lineterminator="\n")
    writer.writerow(corpus.columns + list(ADDED))
    ti, li = corpus.columns.index(corpus.text_key), corpus.columns.index(corpus.label_key)
    width = len(corpus.columns)
    for r in rows:
        src = list(lookup.row(r.source))
        src += [""] * (width - len(src))
        src[ti] = r.text
        src[li] = r.label
        writer.writerow(src[:width] + [r.source_id, r.rule])
        n += 1
    return n


def training_sources(path: Path, encoding: str = "utf-8") -> Any:
    """What a training file holds, for ``--trained-on``: the ids of its ``source_id`` column
    (field), and every text in it (every field of every row: no column needs naming, and a
    label or a number never equals a source text). ``.txt``: one text per line."""
    from pairflip.files import CORPUS_SUFFIXES, _open_text
    from pairflip.perturb.augment import SourceSet

    suffix = path.suffix.lower()
    if not path.exists():
        raise PairflipError(f"--trained-on {path}: no such file; expected the training data (.csv, .tsv, .jsonl or .txt)")
    if suffix not in CORPUS_SUFFIXES:
        raise PairflipError(f"--trained-on {path}: unknown file type {suffix or '(no suffix)'!r}; expected one of {', '.join(CORPUS_SUFFIXES)}")
    out = SourceSet()
    with _open_text(path, encoding) as fh:
        if suffix == ".txt":
            for line in fh:
                out.add_text(line)
        elif suffix == ".jsonl":
            for lineno, line in enumerate(fh, 1):
                if not line.strip():
                    continue
                obj = json_object(line, f"--trained-on {path}:{lineno}")
                out.add_id(obj.get("source_id"))
                for v in obj.values():
                    out.add_text(v)
        else:
            csv.field_size_limit(min(sys.maxsize, 2**31 - 1))
            reader = csv.reader(fh, delimiter="\t" if suffix == ".tsv" else ",")
            try:
                header = [h.strip() for h in next(reader)]
                si = header.index("source_id") if "source_id" in header else None
                for row in reader:
                    if si is not None and len(row) > si:
                        out.add_id(row[si].strip())
                    for v in row:
                        out.add_text(v)
            except StopIteration:
                pass
            except csv.Error as err:
                raise PairflipError(f"--trained-on {path}:{reader.line_num}: cannot read the row ({err})") from None
    return out
