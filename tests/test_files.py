"""pairflip.files: atomic writes, corpus decoding, suite/results reading and writing."""

from __future__ import annotations

import codecs
import json
import os
import re
import stat
from pathlib import Path

import pytest

from pairflip.files import (
    atomic_writer,
    file_sha256,
    iter_suite,
    read_corpus,
    read_results,
    read_suite,
    write_results,
    write_suite,
)
from pairflip.records import Edit, Pair, PairflipError, Results, Suite, Verdict


def temps(folder: Path) -> list[str]:
    return [p.name for p in folder.iterdir() if p.name.startswith(".") and p.name.endswith(".tmp")]


# --------------------------------------------------------------------------- atomic writer


def test_atomic_writer_leaves_nothing_on_error(tmp_path):
    target = tmp_path / "out.jsonl"
    with pytest.raises(RuntimeError):
        with atomic_writer(target) as fh:
            fh.write("half a line")
            assert temps(tmp_path)  # the temp file is beside the target while writing
            raise RuntimeError("boom")
    assert not target.exists() and temps(tmp_path) == []


def test_atomic_writer_keeps_the_old_file_on_keyboard_interrupt(tmp_path):
    target = tmp_path / "out.jsonl"
    target.write_text("old\n", encoding="utf-8")
    with pytest.raises(KeyboardInterrupt):
        with atomic_writer(target) as fh:
            fh.write("new\n")
            raise KeyboardInterrupt
    assert target.read_text(encoding="utf-8") == "old\n" and temps(tmp_path) == []


def test_atomic_writer_replaces_on_success_with_normal_permissions(tmp_path):
    target = tmp_path / "out.jsonl"
    old = os.umask(0o022)
    try:
        with atomic_writer(target) as fh:
            fh.write("a\nb\n")
    finally:
        os.umask(old)
    assert target.read_bytes() == b"a\nb\n"  # "\n" line ends on every platform
    # mkstemp makes 0600 files; a finished output gets 0666 less the umask, like open() would.
    assert stat.S_IMODE(target.stat().st_mode) == 0o644
    assert temps(tmp_path) == []


def test_atomic_writer_refuses_without_force_and_bad_targets(tmp_path):
    target = tmp_path / "out.jsonl"
    target.write_text("x", encoding="utf-8")
    with pytest.raises(PairflipError, match="already exists; pass --force"):
        with atomic_writer(target, force=False):
            pass
    with pytest.raises(PairflipError, match="is a folder"):
        with atomic_writer(tmp_path):
            pass
    with pytest.raises(PairflipError, match="does not exist"):
        with atomic_writer(tmp_path / "no" / "out.jsonl"):
            pass
    assert target.read_text(encoding="utf-8") == "x" and temps(tmp_path) == []


# --------------------------------------------------------------------------- corpus decoding


def _decode_offset(raw: bytes, encoding: str = "utf-8") -> int:
    # The reference: Python's own decoder of the whole byte string.
    try:
        raw.decode(encoding)
    except UnicodeDecodeError as err:
        return err.start
    raise AssertionError("decodes")


@pytest.mark.parametrize(
    "raw",
    [
        b"\xff",
        b"ok\n\xc3",  # a character cut off at the end of the file
        b"ok\nthe caf\xc3\xa9 tent\nbad \xe9 here\n",
        b"x" * ((1 << 20) - 1) + "\u00e9".encode() + b"\nthen \x80\n",  # 2-byte char split over the chunk edge
        b"x" * ((1 << 20) - 2) + "\u20ac".encode() + b"\xfe\n",  # 3-byte char split, bad byte just after
        b"y\n" * (1 << 19) + b"\xc0\xaf\n",  # an overlong encoding, exactly at the 1 MiB edge
    ],
    ids=["first-byte", "cut-at-end", "line-3", "split-2", "split-3", "edge"],
)
def test_decode_error_offset_matches_pythons_decoder(tmp_path, raw):
    p = tmp_path / "c.txt"
    p.write_bytes(raw)
    offset = _decode_offset(raw)
    line = raw.count(b"\n", 0, offset) + 1
    with pytest.raises(PairflipError) as err:
        list(read_corpus(p))
    msg = str(err.value)
    assert msg.startswith(f"{p}:{line}: not valid utf-8")
    assert f"byte offset {offset}" in msg
    assert f"0x{raw[offset]:02x}" in msg


def test_cp1252_decode_error_names_the_byte(tmp_path):
    raw = b"fine\n\x81\n"  # 0x81 is undefined in cp1252
    p = tmp_path / "c.txt"
    p.write_bytes(raw)
    with pytest.raises(PairflipError, match=r"c\.txt:2: not valid cp1252 \(byte 0x81 at byte offset 5\)"):
        list(read_corpus(p, encoding="cp1252"))


def test_latin1_and_bom_forms(tmp_path):
    p = tmp_path / "c.txt"
    p.write_bytes(codecs.BOM_UTF8 + "Caf\u00e9 tent.\r\nWarm bag.\r\n".encode("utf-8"))
    assert [t.text for t in read_corpus(p)] == ["Caf\u00e9 tent.", "Warm bag."]
    assert [t.text for t in read_corpus(p, encoding="UTF8")] == ["Caf\u00e9 tent.", "Warm bag."]
    q = tmp_path / "l.txt"
    q.write_bytes("Caf\u00e9 tent.\n".encode("latin-1"))
    assert [t.text for t in read_corpus(q, encoding="latin-1")] == ["Caf\u00e9 tent."]


def test_corpus_where_and_dedup(tmp_path):
    p = tmp_path / "c.jsonl"
    p.write_text('{"text": "A"}\n\n{"text": " A "}\n{"text": "B", "y": 1}\n', encoding="utf-8")
    got = [(t.text, t.where) for t in read_corpus(p)]
    assert got == [("A", f"{p}:1"), ("B", f"{p}:4")]
    q = tmp_path / "c.csv"
    q.write_text("text,y\nA,pos\nB,neg\nA,neg\n", encoding="utf-8")
    got = [(t.text, t.label, t.where) for t in read_corpus(q, label_column="y")]
    assert got == [("A", "pos", f"{q}:2"), ("B", "neg", f"{q}:3")]


def test_csv_empty_label_is_an_error(tmp_path):
    q = tmp_path / "c.csv"
    q.write_text("text,y\nA,pos\nB,\n", encoding="utf-8")
    with pytest.raises(PairflipError, match=r"c\.csv:3: empty 'y' field"):
        list(read_corpus(q, label_column="y"))


def test_corpus_is_lazy(tmp_path):
    # The first text comes out before the reader meets the bad line at the end.
    p = tmp_path / "c.jsonl"
    p.write_text('{"text": "A"}\n{"text": "B"}\n{oops\n', encoding="utf-8")
    it = read_corpus(p)
    assert next(it).text == "A"
    with pytest.raises(PairflipError, match=r"c\.jsonl:3: malformed JSON"):
        list(it)


# --------------------------------------------------------------------------- suite and results files


def _suite() -> Suite:
    src = "The tent is roomy."
    pairs = [
        Pair(source=src, variant="The tent is not roomy.", family="negation", rule="negation/copula",
             should="flip", edits=[Edit(12, 12, "not ")], extra={"later_key": {"a": 1}}),
        Pair(source="Caf\u00e9 stove \U0001F525 works.", variant="Caf\u00e9 stove \U0001F525 works well.",
             family="intensifier", rule="intensifier/amplify", should="strengthen", edits=[Edit(18, 18, " well")]),
    ]
    return Suite(header={"generator": {"name": "pairflip"}, "future": [1]}, pairs=pairs)


def test_suite_round_trip_and_streaming(tmp_path):
    p = tmp_path / "s.jsonl"
    s = _suite()
    write_suite(s, p)
    back = read_suite(p)
    assert [x.to_dict() for x in back.pairs] == [x.to_dict() for x in s.pairs]
    assert back.header["future"] == [1] and back.header["version"] == 1 and back.header["kind"] == "pairflip-suite"
    raw = p.read_text(encoding="utf-8")
    assert "\U0001F525" in raw  # UTF-8 text, not \\u escapes
    assert all(json.loads(line) for line in raw.splitlines())  # JSON Lines: one JSON value per line
    header, pairs = iter_suite(p)
    assert header["kind"] == "pairflip-suite" and next(pairs).id == s.pairs[0].id
    assert len(file_sha256(p)) == 64



def test_reading_a_suite_shares_repeated_strings(tmp_path):
    src = "The stove lights fast."
    pairs = [Pair(source=src, variant=v, family="intensifier", rule="intensifier/amplify", should="strengthen")
             for v in ("The stove lights really fast.", "The stove lights very fast.")]
    pairs.append(Pair(source="The tent is dry.", variant="The tent is not dry.", family="negation",
                      rule="negation/copula", should="flip"))
    write_suite(Suite(header={}, pairs=pairs), tmp_path / "s.jsonl")
    a, b, c = read_suite(tmp_path / "s.jsonl").pairs
    assert a.source is b.source and a.source_id is b.source_id and a.rule is b.rule and a.should is b.should
    assert c.source == "The tent is dry." and c.source is not a.source
    assert [p.to_dict() for p in (a, b, c)] == [p.to_dict() for p in pairs]

def test_results_round_trip(tmp_path):
    p = tmp_path / "r.jsonl"
    v = Verdict(id="x1", source_pred="positive", variant_pred="negative", verdict="ok", source_score=0.5,
                variant_score=-0.25, family="negation", rule="negation/copula", should="flip", extra={"k": 2})
    write_results(Results(header={"model": {"name": "toy"}}, verdicts=[v]), p)
    back = read_results(p)
    assert back.verdicts[0].to_dict() == v.to_dict() and back.header["model"] == {"name": "toy"}


def test_results_score_must_be_a_number(tmp_path):
    p = tmp_path / "r.jsonl"
    v = Verdict(id="x1", source_pred="positive", variant_pred="negative", verdict="ok")
    write_results(Results(header={}, verdicts=[v]), p)
    lines = p.read_text(encoding="utf-8").splitlines()
    rec = json.loads(lines[1])
    rec["source_score"] = "high"
    p.write_text(lines[0] + "\n" + json.dumps(rec) + "\n", encoding="utf-8")
    with pytest.raises(PairflipError, match=r"r\.jsonl:2: field 'source_score' is 'high'; expected a polarity score"):
        read_results(p)


def test_truncation_only_claimed_for_the_last_line(tmp_path):
    p = tmp_path / "s.jsonl"
    write_suite(_suite(), p)
    data = p.read_text(encoding="utf-8")
    p.write_text(data[:-1], encoding="utf-8")  # only the final newline is gone: still complete
    assert len(read_suite(p).pairs) == 2
    p.write_text(data[:-5], encoding="utf-8")
    with pytest.raises(PairflipError, match=r"s\.jsonl:3: the last line is cut short .* truncated"):
        read_suite(p)
    p.write_text(data.split("\n")[0][:30], encoding="utf-8")  # cut inside the header
    with pytest.raises(PairflipError, match=r"s\.jsonl:1: line 1 is not JSON .*truncated"):
        read_suite(p)


# --------------------------------------------------------------------------- issue 12: reading results
# Both were accepted before the fix (code of 04cd824).


@pytest.mark.parametrize("raw, shown", [("NaN", "nan"), ("1e300", "1e+300"), ("-Infinity", "-inf"), ("1.5", "1.5")])
def test_results_score_must_be_a_finite_polarity_score(tmp_path, raw, shown):
    # A polarity score is the expected polarity sum(p(label) x polarity) over polarities in
    # {-1, 0, 1} (DESIGN.md, Expectations): it can only lie in [-1, 1].
    p = tmp_path / "r.jsonl"
    v = Verdict(id="a1", source_pred="positive", variant_pred="negative", verdict="ok", source_score=0.5,
                variant_score=-0.5, family="negation", rule="negation/copula", should="flip")
    write_results(Results(header={}, verdicts=[v]), p)
    head, rec = p.read_text(encoding="utf-8").splitlines()
    p.write_text(head + "\n" + rec.replace('"variant_score": -0.5', f'"variant_score": {raw}') + "\n", encoding="utf-8")
    with pytest.raises(PairflipError, match=rf"r\.jsonl:2: field 'variant_score' is {re.escape(shown)}; expected a polarity score"):
        read_results(p)


def test_suite_and_results_reject_a_repeated_id(tmp_path):
    pairs = [Pair(source="The tent is roomy.", variant="The tent is not roomy.", family="negation",
                  rule="negation/copula", should="flip", edits=[Edit(12, 12, "not ")])]
    p = tmp_path / "s.jsonl"
    write_suite(Suite(header={}, pairs=pairs * 2), p)
    with pytest.raises(PairflipError, match=r"s\.jsonl:3: pair id '\w+' already appears on line 2"):
        read_suite(p)
