"""Reading corpora, and reading and writing suite and results files.

Both files are JSON Lines in UTF-8: a header object on the first line, one record per line after
it. Writers go to a temporary file beside the target and rename it into place at the end, so an
interrupted run never leaves a half-written file. Readers are lazy where they can be and report
problems as ``FILE:LINE: what was wrong; what was expected`` (:class:`~pairflip.records.PairflipError`).
"""

from __future__ import annotations

import codecs
import csv
import errno
import datetime as _dt
import hashlib
import io
import json
import math
import os
import sys
import tempfile
from contextlib import contextmanager
from pathlib import Path
from typing import Any, Iterable, Iterator, TextIO

from pairflip.records import SHOULDS, VERDICTS, Pair, PairflipError, Results, SourceText, Suite, Verdict

SUITE_KIND = "pairflip-suite"
RESULTS_KIND = "pairflip-results"
FORMAT_VERSION = 1

CORPUS_SUFFIXES = (".txt", ".csv", ".tsv", ".jsonl")

# What each file kind is and which command makes it, for messages about the wrong file.
_KIND_NAMES = {
    SUITE_KIND: ("suite", "pairflip build"),
    RESULTS_KIND: ("results", "pairflip score"),
}


def now_iso() -> str:
    return _dt.datetime.now(_dt.timezone.utc).replace(microsecond=0).isoformat()


def _json_type(value: Any) -> str:
    """The JSON name of a decoded value's type (for messages: 'an array', not 'list')."""
    if value is None:
        return "null"
    if isinstance(value, bool):
        return "a boolean"
    if isinstance(value, (int, float)):
        return "a number"
    if isinstance(value, str):
        return "a string"
    if isinstance(value, list):
        return "an array"
    if isinstance(value, dict):
        return "an object"
    return type(value).__name__


def _json_problem(err: json.JSONDecodeError) -> str:
    """``Expecting ',' delimiter at column 12`` (the decoder's message, without its own position)."""
    msg = err.msg[:-3] if err.msg.endswith(" at") else err.msg
    return f"{msg} at column {err.colno}"


def json_object(line: str, where: str, expected: str = "one JSON object per line") -> dict:
    """One line of a JSON Lines file as a dict, or exit 2 naming ``where`` (``path:line``)."""
    try:
        obj = json.loads(line)
    except json.JSONDecodeError as err:
        raise PairflipError(f"{where}: malformed JSON ({_json_problem(err)}); expected {expected}") from None
    if not isinstance(obj, dict):
        raise PairflipError(f"{where}: expected a JSON object, got {_json_type(obj)}")
    return obj


def _short(value: Any, limit: int = 60) -> str:
    text = repr(value)
    return text if len(text) <= limit else text[: limit - 3] + "..."


# --------------------------------------------------------------------------- atomic writing


@contextmanager
def atomic_writer(path: str | os.PathLike[str], *, force: bool = True) -> Iterator[TextIO]:
    """Open a temp file beside ``path`` for writing; rename it over ``path`` only on success.

    On any exception (Ctrl-C included) the temp file is removed and ``path`` is left as it was.
    The finished file gets the usual permissions (0666 less the umask), not the temp file's 0600.
    """
    target = Path(path)
    if not force and target.exists() and not target.is_dir():
        raise PairflipError(f"{target}: already exists; pass --force to overwrite it")
    fd, tmp = _temp_beside(target, "", ".tmp")
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as fh:
            try:
                yield fh
                fh.flush()
                os.fsync(fh.fileno())
            except OSError as err:
                if err.errno not in _WRITE_ERRNOS:  # from the caller's own work, not from writing
                    raise
                raise PairflipError(f"{target}: writing failed ({_os_reason(err)}); the file was not changed") from None
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        try:
            os.replace(tmp, target)
        except OSError as err:
            raise PairflipError(f"{target}: cannot put the finished file in place ({_os_reason(err)})") from None
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise


_WRITE_ERRNOS = {errno.ENOSPC, errno.EDQUOT, errno.EIO, errno.EROFS, errno.EFBIG}


def _temp_beside(target: Path, label: str, suffix: str) -> tuple[int, str]:
    """A new temp file in ``target``'s folder, or a PairflipError that names the target (after
    ``label``, the option that gave it) and says why: a folder, no such folder, or no new file."""
    name = f"{label} {target}" if label else str(target)
    if target.is_dir():
        raise PairflipError(f"{name}: is a folder; expected the path of the file to write")
    directory = target.parent if str(target.parent) else Path(".")
    if not directory.is_dir():
        raise PairflipError(f"{name}: folder {directory} does not exist")
    try:
        return tempfile.mkstemp(prefix=f".{target.name}.", suffix=suffix, dir=directory)
    except OSError as err:
        raise PairflipError(f"{name}: cannot write in folder {directory} ({_os_reason(err)})") from None


def _os_reason(err: OSError) -> str:
    """``no space left on device`` from an OSError, without its repr noise."""
    reason = err.strerror or str(err) or type(err).__name__
    return reason[:1].lower() + reason[1:]


def check_writable(target: str | os.PathLike[str], option: str) -> None:
    """Fail now, before any work, when ``target`` could not be written later.

    Creates and removes a temporary file in the target's folder: permission bits alone say
    nothing for root, and a read-only file system or a missing folder shows up the same way.
    """
    fd, tmp = _temp_beside(Path(target), option, ".probe")
    os.close(fd)
    os.unlink(tmp)


def _dump(obj: dict[str, Any]) -> str:
    return json.dumps(obj, ensure_ascii=False, sort_keys=False)


# --------------------------------------------------------------------------- corpora


def _normal_encoding(encoding: str) -> str:
    """The codec to read with: plain UTF-8 also accepts (and drops) a byte-order mark."""
    try:
        name = codecs.lookup(encoding).name
    except LookupError:
        raise PairflipError(
            f"--encoding {encoding!r}: unknown encoding; expected a Python codec name such as utf-8, latin-1, cp1252"
        ) from None
    return "utf-8-sig" if name == "utf-8" else name


def _count_newlines(path: Path, upto: int) -> int:
    n = 0
    with open(path, "rb") as fh:
        while upto > 0:
            chunk = fh.read(min(1 << 20, upto))
            if not chunk:
                break
            n += chunk.count(b"\n")
            upto -= len(chunk)
    return n


def _check_decodes(path: Path, encoding: str, shown: str) -> None:
    """Decode the whole file in chunks (never all of it in memory); on failure name the line and
    the byte offset of the first byte that does not decode."""
    decoder = codecs.getincrementaldecoder(encoding)(errors="strict")
    # UTF-16/32 text is full of NUL bytes; in any byte-per-character or UTF-8 text a NUL means
    # the file was written in a wide encoding (most often UTF-16 without its byte-order mark).
    wide_ok = "16" in encoding or "32" in encoding
    offset = 0  # bytes read from the file before the current chunk
    with open(path, "rb") as fh:
        head = fh.read(4)
        fh.seek(0)
        if head.startswith((codecs.BOM_UTF16_LE, codecs.BOM_UTF16_BE)):
            wide_ok = True  # the decoder stops on the byte-order mark with its own hint
        while True:
            chunk = fh.read(1 << 20)
            final = not chunk
            pending = len(decoder.getstate()[0])  # bytes of a split character kept from the last chunk
            nul = chunk.find(b"\x00") if wide_ok is False else -1
            if nul >= 0:
                at = offset + nul
                line = _count_newlines(path, at) + 1
                raise PairflipError(
                    f"{path}:{line}: NUL byte at byte offset {at}, which no {shown} text holds: the file looks "
                    f"like UTF-16 without a byte-order mark; pass --encoding utf-16-le (or utf-16-be)"
                ) from None
            try:
                decoder.decode(chunk, final=final)
            except UnicodeDecodeError as err:
                data = bytes(err.object)  # the pending bytes followed by this chunk
                bad_at = offset - pending + err.start
                line = _count_newlines(path, bad_at) + 1
                what = f"byte 0x{data[err.start]:02x}"
                if err.reason == "unexpected end of data":
                    what = f"an incomplete character, {what},"
                hint = "pass --encoding (for example --encoding latin-1) if the file uses another encoding"
                if head.startswith((codecs.BOM_UTF16_LE, codecs.BOM_UTF16_BE)) and "16" not in encoding:
                    hint = "the file starts with a UTF-16 byte-order mark: pass --encoding utf-16"
                raise PairflipError(
                    f"{path}:{line}: not valid {shown} ({what} at byte offset {bad_at}); {hint}"
                ) from None
            if final:
                return
            offset += len(chunk)


def _open_text(path: Path, encoding: str) -> TextIO:
    """Open a corpus for reading, after checking that the whole file decodes."""
    if not path.exists():
        raise PairflipError(f"{path}: no such file")
    if path.is_dir():
        raise PairflipError(f"{path}: is a folder, expected a corpus file ({', '.join(CORPUS_SUFFIXES)})")
    enc = _normal_encoding(encoding)
    try:
        _check_decodes(path, enc, encoding)
        return io.open(path, "r", encoding=enc, newline="")
    except PermissionError:
        raise PairflipError(f"{path}: cannot read the file (permission denied)") from None


def _digest(text: str) -> bytes:
    # 16 bytes per distinct text instead of the text itself: the duplicate check stays small.
    return hashlib.blake2b(text.encode("utf-8", "surrogatepass"), digest_size=16).digest()


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
    Any line ending (LF, CRLF, CR) is accepted and a UTF-8 byte-order mark is dropped. Duplicate
    texts are yielded once. Raises :class:`PairflipError` on bad input, and when the corpus holds
    no text at all.
    """
    p = Path(path)
    suffix = p.suffix.lower()
    if not p.exists():
        raise PairflipError(f"{p}: no such file")
    if p.is_dir():
        raise PairflipError(f"{p}: is a folder, expected a corpus file ({', '.join(CORPUS_SUFFIXES)})")
    if suffix not in CORPUS_SUFFIXES:
        raise PairflipError(
            f"{p}: unknown corpus type {suffix or '(no suffix)'!r}; expected one of {', '.join(CORPUS_SUFFIXES)}"
        )
    _check_options(p, suffix, text_column, label_column, text_field, label_field)
    fh = _open_text(p, encoding)
    seen: set[bytes] = set()
    n = 0
    with fh:
        if suffix == ".txt":
            rows = _read_txt(p, fh)
        elif suffix in (".csv", ".tsv"):
            rows = _read_csv(p, fh, "\t" if suffix == ".tsv" else ",", text_column or "text", label_column)
        else:
            rows = _read_jsonl(p, fh, text_field or "text", label_field)
        for item in rows:
            key = _digest(item.text)
            if key in seen:
                continue
            seen.add(key)
            n += 1
            yield item
    if n == 0:
        raise PairflipError(
            f"{p}: the corpus holds no text (the file is empty or every line is blank); "
            f"expected at least one non-blank text"
        )


def _check_options(
    p: Path, suffix: str, text_column: str | None, label_column: str | None, text_field: str | None, label_field: str | None
) -> None:
    """Options that do not apply to this corpus type are an error, not silently ignored."""
    kind = {".txt": "a .txt corpus (one text per line)", ".jsonl": "a .jsonl corpus", ".csv": "a .csv corpus", ".tsv": "a .tsv corpus"}[suffix]
    if suffix != ".jsonl":
        for opt, val, instead in (("--text-field", text_field, "--text-column"), ("--label-field", label_field, "--label-column")):
            if val is not None:
                tip = f"; use {instead} for .csv/.tsv" if suffix != ".txt" else ""
                raise PairflipError(f"{opt} applies to .jsonl corpora, and {p} is {kind}{tip}")
    if suffix not in (".csv", ".tsv"):
        for opt, val, instead in (("--text-column", text_column, "--text-field"), ("--label-column", label_column, "--label-field")):
            if val is not None:
                tip = f"; use {instead} for .jsonl" if suffix == ".jsonl" else ""
                raise PairflipError(f"{opt} applies to .csv/.tsv corpora, and {p} is {kind}{tip}")


def _read_txt(p: Path, fh: TextIO) -> Iterator[SourceText]:
    for lineno, line in enumerate(fh, 1):
        text = line.strip()
        if text:
            yield SourceText(text=text, where=f"{p}:{lineno}")


def _columns(header: list[str]) -> str:
    return ", ".join(repr(h) for h in header) if header else "(none)"


def _read_csv(p: Path, fh: TextIO, delimiter: str, text_column: str, label_column: str | None) -> Iterator[SourceText]:
    csv.field_size_limit(min(sys.maxsize, 2**31 - 1))
    reader = csv.reader(fh, delimiter=delimiter, strict=True)
    try:
        header = next(reader)
    except StopIteration:
        return
    except csv.Error as err:
        raise PairflipError(f"{p}:1: cannot read the header row ({err}); expected column names") from None
    header = [h.strip() for h in header]
    sep = "tab" if delimiter == "\t" else "comma"
    dup = next((h for i, h in enumerate(header) if h in header[:i]), None)
    if dup is not None:
        where = [i + 1 for i, h in enumerate(header) if h == dup]
        raise PairflipError(
            f"{p}:1: column name {dup!r} appears {len(where)} times in the header (columns "
            f"{', '.join(map(str, where))}); expected every column name once"
        )
    for name, opt in ((text_column, "--text-column"), (label_column, "--label-column")):
        if name is not None and name not in header:
            more = ""
            if len(header) == 1 and ("\t" in header[0] or "," in header[0] or ";" in header[0]):
                more = f" (the header row has a single column: is the file really {sep}-separated?)"
            raise PairflipError(
                f"{p}:1: no column {name!r}; the columns are {_columns(header)}{more}; choose one with {opt}"
            )
    ti = header.index(text_column)
    li = header.index(label_column) if label_column is not None else None
    while True:
        start = reader.line_num + 1  # the physical line this row starts on
        try:
            row = next(reader)
        except StopIteration:
            return
        except csv.Error as err:
            where = f"{p}:{start}"
            span = f" (the row starts on line {start}, the reader stopped on line {reader.line_num})" if reader.line_num > start else ""
            if "end of data" in str(err):
                span += f"; a quote opened in the row on line {start} is never closed"
            raise PairflipError(
                f"{where}: malformed CSV row: {err}{span}; expected {sep}-separated fields, "
                f"a field with quotes inside written as \"like \"\"this\"\"\""
            ) from None
        if not row or all(not c.strip() for c in row):
            continue
        if len(row) > len(header):
            raise PairflipError(
                f"{p}:{start}: the row has {len(row)} fields but the header has {len(header)}; "
                f"a field holding the separator ({sep}) must be quoted, \"like, this\""
            )
        if len(row) <= ti:
            raise PairflipError(
                f"{p}:{start}: the row has {len(row)} field{'s' if len(row) != 1 else ''}, "
                f"so no {text_column!r} field (column {ti + 1} of {len(header)} in the header)"
            )
        text = row[ti].strip()
        if not text:
            continue
        label = None
        if li is not None:
            if len(row) <= li or not row[li].strip():
                raise PairflipError(f"{p}:{start}: empty {label_column!r} field; expected a label for every text")
            label = row[li].strip()
        yield SourceText(text=text, label=label, where=f"{p}:{start}")


def _read_jsonl(p: Path, fh: TextIO, text_field: str, label_field: str | None) -> Iterator[SourceText]:
    for lineno, line in enumerate(fh, 1):
        if not line.strip():
            continue
        obj = json_object(line, f"{p}:{lineno}")
        if lineno == 1 and obj.get("kind") in _KIND_NAMES:
            name, maker = _KIND_NAMES[obj["kind"]]
            raise PairflipError(
                f"{p}: this is a pairflip {name} file (made by `{maker}`), not a corpus; "
                f"expected texts (.txt, .csv/.tsv, or .jsonl objects with a {text_field!r} field)"
            )
        if text_field not in obj:
            raise PairflipError(
                f"{p}:{lineno}: no field {text_field!r}; the fields are {_columns(list(obj))}; "
                f"choose one with --text-field"
            )
        text = obj[text_field]
        if not isinstance(text, str):
            raise PairflipError(
                f"{p}:{lineno}: field {text_field!r} is {_json_type(text)}, expected a string"
            )
        label = None
        if label_field is not None:
            if obj.get(label_field) is None:
                raise PairflipError(
                    f"{p}:{lineno}: no field {label_field!r} (or it is null); the fields are {_columns(list(obj))}; "
                    f"choose one with --label-field"
                )
            raw = obj[label_field]
            if isinstance(raw, bool) or not isinstance(raw, (str, int, float)):
                raise PairflipError(
                    f"{p}:{lineno}: field {label_field!r} is {_json_type(raw)} {_short(raw)}; "
                    f"expected a label: a string or a number"
                )
            label = str(raw)
        text = text.strip()
        for name, value in ((text_field, text), (label_field, label)):
            if value is not None and not _encodes(value):
                raise PairflipError(
                    f"{p}:{lineno}: field {name!r} holds a lone surrogate escape (\\ud800-\\udfff without "
                    f"its pair), which is not a character; expected valid Unicode text"
                )
        if text:
            yield SourceText(text=text, label=label, where=f"{p}:{lineno}")


def _encodes(text: str) -> bool:
    try:
        text.encode("utf-8")
    except UnicodeEncodeError:
        return False
    return True


# --------------------------------------------------------------------------- suite and results files


def _header_error(path: Path, kind: str, header: Any) -> PairflipError:
    name, maker = _KIND_NAMES[kind]
    got = header.get("kind") if isinstance(header, dict) else None
    if got in _KIND_NAMES:
        got_name, got_maker = _KIND_NAMES[got]
        return PairflipError(
            f"{path}: this is a {got_name} file (made by `{got_maker}`), but a {name} file is expected here "
            f"(made by `{maker}`)"
        )
    if isinstance(header, dict) and "kind" in header:
        return PairflipError(
            f"{path}:1: header kind {_short(got)} is not a pairflip file kind; expected a {name} file "
            f"(made by `{maker}`, its first line has \"kind\": {kind!r})"
        )
    looks = "a record without a header" if isinstance(header, dict) else _json_type(header)
    return PairflipError(
        f"{path}:1: line 1 is {looks}, not a {name} header; expected a {name} file made by `{maker}` "
        f"(its first line has \"kind\": {kind!r})"
    )


def _read_jsonl_records(path: Path, kind: str) -> tuple[dict[str, Any], Iterator[tuple[int, dict[str, Any]]]]:
    name, maker = _KIND_NAMES[kind]
    if not path.exists():
        raise PairflipError(f"{path}: no such file; expected a {name} file made by `{maker}`")
    if path.is_dir():
        raise PairflipError(f"{path}: is a folder; expected a {name} file made by `{maker}`")
    try:
        fh = io.open(path, "r", encoding="utf-8-sig")
    except PermissionError:
        raise PairflipError(f"{path}: cannot read the file (permission denied)") from None
    try:
        first = fh.readline()
    except UnicodeDecodeError as err:
        fh.close()
        raise PairflipError(
            f"{path}:1: not valid UTF-8 (byte 0x{err.object[err.start]:02x}); expected a {name} file made by `{maker}`"
        ) from None
    if not first.strip():
        fh.close()
        raise PairflipError(f"{path}: empty file; expected a {name} file made by `{maker}`, with a header on line 1")
    try:
        header = json.loads(first)
    except json.JSONDecodeError as err:
        fh.close()
        cut = "" if first.endswith("\n") else " (the file ends inside it: truncated?)"
        raise PairflipError(
            f"{path}:1: line 1 is not JSON ({_json_problem(err)}){cut}; "
            f"expected a {name} file made by `{maker}`"
        ) from None
    if not isinstance(header, dict) or header.get("kind") != kind:
        fh.close()
        raise _header_error(path, kind, header)
    version = header.get("version")
    if version != FORMAT_VERSION:
        fh.close()
        newer = isinstance(version, int) and not isinstance(version, bool) and version > FORMAT_VERSION
        tip = "; it was written by a newer pairflip: upgrade pairflip to read it" if newer else ""
        raise PairflipError(
            f"{path}:1: field 'version' is {_short(version)}: {name} file version {_short(version)} is not supported; "
            f"this pairflip reads version {FORMAT_VERSION}{tip}"
        )

    def records() -> Iterator[tuple[int, dict[str, Any]]]:
        with fh:
            lineno = 1
            while True:
                try:
                    line = fh.readline()
                except UnicodeDecodeError as err:
                    raise PairflipError(
                        f"{path}:{lineno + 1}: not valid UTF-8 (byte 0x{err.object[err.start]:02x})"
                    ) from None
                if not line:
                    return
                lineno += 1
                if not line.strip():
                    continue
                try:
                    obj = json.loads(line)
                except json.JSONDecodeError as err:
                    if not line.endswith("\n") and not fh.read(1):
                        raise PairflipError(
                            f"{path}:{lineno}: the last line is cut short ({_json_problem(err)}): "
                            f"the file is truncated; make it again with `{maker}`"
                        ) from None
                    raise PairflipError(
                        f"{path}:{lineno}: malformed JSON ({_json_problem(err)}); "
                        f"expected one JSON object per line"
                    ) from None
                if not isinstance(obj, dict):
                    raise PairflipError(f"{path}:{lineno}: expected a JSON object, got {_json_type(obj)}")
                yield lineno, obj

    return header, records()


def _need(path: Path, lineno: int, obj: dict[str, Any], key: str, what: str, ok: Any) -> None:
    if key not in obj:
        raise PairflipError(f"{path}:{lineno}: missing field {key!r}; expected {what}")
    if not ok(obj[key]):
        raise PairflipError(f"{path}:{lineno}: field {key!r} is {_short(obj[key])}; expected {what}")


def _is_str(x: Any) -> bool:
    return isinstance(x, str)


def _is_int(x: Any) -> bool:
    return isinstance(x, int) and not isinstance(x, bool)


def _check_pair(path: Path, lineno: int, obj: dict[str, Any]) -> None:
    for key in ("id", "source", "variant", "family", "rule"):
        _need(path, lineno, obj, key, "a string", _is_str)
    _need(path, lineno, obj, "should", f"one of {', '.join(SHOULDS)}", lambda x: x in SHOULDS)
    edits = obj.get("edits", [])
    if not isinstance(edits, list):
        raise PairflipError(f"{path}:{lineno}: field 'edits' is {_json_type(edits)}; expected an array of edits")
    n = len(obj["source"])
    for i, e in enumerate(edits):
        where = f"{path}:{lineno}: edits[{i}]"
        if not isinstance(e, dict):
            raise PairflipError(f"{where} is {_json_type(e)}; expected an object with start, end, text")
        for key, ok, what in (("start", _is_int, "an integer"), ("end", _is_int, "an integer"), ("text", _is_str, "a string")):
            if key not in e:
                raise PairflipError(f"{where}: missing field {key!r}; expected {what}")
            if not ok(e[key]):
                raise PairflipError(f"{where}: field {key!r} is {_short(e[key])}; expected {what}")
        if not 0 <= e["start"] <= e["end"] <= n:
            raise PairflipError(
                f"{where}: span {e['start']}..{e['end']} is outside the source ({n} characters); "
                f"expected 0 <= start <= end <= {n}"
            )


def _check_verdict(path: Path, lineno: int, obj: dict[str, Any]) -> None:
    _need(path, lineno, obj, "id", "a string", _is_str)
    for key in ("source_pred", "variant_pred"):
        _need(path, lineno, obj, key, "a label", lambda x: x is not None and not isinstance(x, (dict, list)))
    _need(path, lineno, obj, "verdict", f"one of {', '.join(VERDICTS)}", lambda x: x in VERDICTS)
    for key in ("source_score", "variant_score"):
        if obj.get(key) is not None:
            _need(path, lineno, obj, key, "a polarity score: a finite number from -1 to 1", _is_polarity_score)


def _is_polarity_score(x: Any) -> bool:
    # A polarity score is an expected polarity (sum of p(label) x polarity): always in [-1, 1].
    # The tolerance covers the rounding of a probability row that sums to 1 + a few ulps.
    return isinstance(x, (int, float)) and not isinstance(x, bool) and math.isfinite(x) and -1 - 1e-9 <= x <= 1 + 1e-9


def _check_unique(path: Path, lineno: int, pair_id: str, seen: dict[str, int], what: str) -> None:
    """Each pair id once per file: a repeated id (or a duplicated line) would be counted twice."""
    first = seen.setdefault(pair_id, lineno)
    if first != lineno:
        raise PairflipError(
            f"{path}:{lineno}: {what} id {pair_id!r} already appears on line {first}; expected each pair id once "
            f"(a duplicated line, or two files joined by hand?)"
        )


def iter_suite(path: str | os.PathLike[str]) -> tuple[dict[str, Any], Iterator[Pair]]:
    """Open a suite file: its header now, and a lazy iterator over its pairs."""
    p = Path(path)
    header, recs = _read_jsonl_records(p, SUITE_KIND)

    def pairs() -> Iterator[Pair]:
        # Pairs of one source are written one after another, and every pair repeats its family,
        # rule and expectation: share those strings instead of holding a copy per pair (less
        # memory, and scoring's lookups by text then find the same object).
        prev: Pair | None = None
        seen: dict[str, int] = {}
        for lineno, obj in recs:
            _check_pair(p, lineno, obj)
            _check_unique(p, lineno, obj["id"], seen, "pair")
            try:
                pair = Pair.from_dict(obj)
                pair.family, pair.rule, pair.should = sys.intern(pair.family), sys.intern(pair.rule), sys.intern(pair.should)
            except (KeyError, TypeError, ValueError) as err:
                raise PairflipError(f"{p}:{lineno}: bad pair record ({type(err).__name__}: {err})") from None
            if prev is not None and pair.source == prev.source:
                pair.source = prev.source
                if pair.source_id == prev.source_id:
                    pair.source_id = prev.source_id
            prev = pair
            yield pair

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
    seen: dict[str, int] = {}
    for lineno, obj in recs:
        _check_verdict(p, lineno, obj)
        _check_unique(p, lineno, obj["id"], seen, "result")
        try:
            verdicts.append(Verdict.from_dict(obj))
        except (KeyError, TypeError, ValueError) as err:
            raise PairflipError(f"{p}:{lineno}: bad result record ({type(err).__name__}: {err})") from None
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
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()
