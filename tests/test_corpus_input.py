"""`pairflip build` on awkward corpora: bad ones fail with exit 2 and a message that says what and
where, leave no output or temp file; odd but valid ones (BOM, CRLF, emoji, very long texts) work.

Every case runs the CLI in-process (``pairflip.cli.main``) or as a subprocess of the installed
``pairflip`` script.
"""

from __future__ import annotations

import codecs
import json
import re
import subprocess
import sys
from pathlib import Path

import pytest

from pairflip import cli
from pairflip.files import read_corpus, read_suite

PAIRFLIP = str(Path(sys.executable).with_name("pairflip"))

# Invented outdoor-gear shop reviews (demo scenario).
REVIEWS = [
    "The tent is roomy.",
    "The stove works well and I like it.",
    "These boots are very comfortable.",
    "The lantern was bright but the strap broke.",
]


@pytest.fixture(autouse=True)
def _one_pipeline(nlp, monkeypatch):
    """The in-process CLI gets the session's pipeline (load_nlp() and load_nlp(None) are cached apart)."""
    import pairflip.perturb.nlp as nlp_mod

    real = nlp_mod.load_nlp
    monkeypatch.setattr(nlp_mod, "load_nlp", lambda name=None: nlp if name is None else real(name))


def run(args: list[str], capsys) -> tuple[int, str, str]:
    """Run the CLI in-process; return (exit code, stdout, stderr)."""
    try:
        cli.main([str(a) for a in args])
        code = 0
    except SystemExit as e:
        code = e.code if isinstance(e.code, int) else (0 if e.code is None else 2)
    out, err = capsys.readouterr()
    return code, out, err


def leftovers(out: Path) -> list[str]:
    """The output file, and any temp file the atomic writer would have made beside it."""
    return sorted(p.name for p in out.parent.iterdir() if p.name == out.name or p.name.startswith(f".{out.name}."))


def assert_clean_failure(code: int, err: str, out: Path, *needles: str) -> str:
    assert code == 2, err
    assert "Traceback" not in err
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1, f"expected one line, got: {err!r}"
    for n in needles:
        assert n in err, f"{n!r} not in {err!r}"
    assert leftovers(out) == []
    return lines[0]


def write(path: Path, data: str | bytes) -> Path:
    if isinstance(data, str):
        path.write_text(data, encoding="utf-8", newline="")
    else:
        path.write_bytes(data)
    return path


# --------------------------------------------------------------------------- bad corpora, exit 2


def test_missing_corpus(tmp_path, capsys):
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", tmp_path / "nope.txt", "-o", out], capsys)
    assert_clean_failure(code, err, out, "nope.txt", "no such file")


def test_folder_as_corpus(tmp_path, capsys):
    (tmp_path / "texts.txt").mkdir()
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", tmp_path / "texts.txt", "-o", out], capsys)
    assert_clean_failure(code, err, out, "texts.txt", "is a folder")


def test_unknown_corpus_suffix(tmp_path, capsys):
    corpus = write(tmp_path / "reviews.docx", "The tent is roomy.\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, "reviews.docx", "'.docx'", ".txt", ".csv", ".jsonl")


@pytest.mark.parametrize("content", ["", "\n\n   \n\t\n", "\r\n\r\n"], ids=["empty", "blank-lines", "blank-crlf"])
def test_empty_or_blank_corpus(tmp_path, capsys, content):
    corpus = write(tmp_path / "reviews.txt", content)
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, "reviews.txt", "no text")


def test_csv_with_header_only_is_empty(tmp_path, capsys):
    corpus = write(tmp_path / "reviews.csv", "text,label\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, "reviews.csv", "no text")


def test_not_utf8_names_line_and_byte_offset_then_latin1_works(tmp_path, capsys):
    # Line 1 is plain ASCII (18 bytes + LF = 19 bytes); line 2 is "Caf\xe9 ..." in Latin-1, so the
    # byte 0xE9 sits at offset 19 + 3 = 22. Python's own decoder agrees (the reference):
    raw = b"The tent is roomy.\n" + "Caf\u00e9 stove is great.\n".encode("latin-1")
    with pytest.raises(UnicodeDecodeError) as ref:
        raw.decode("utf-8")
    assert ref.value.start == 22
    corpus = write(tmp_path / "reviews.txt", raw)
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    line = assert_clean_failure(code, err, out, "reviews.txt:2", "byte offset 22", "0xe9", "--encoding")
    assert "utf-8" in line.lower()

    code, _, err = run(["build", corpus, "-o", out, "--encoding", "latin-1"], capsys)
    assert code == 0, err
    assert out.exists()
    assert [t.text for t in read_corpus(corpus, encoding="latin-1")] == ["The tent is roomy.", "Caf\u00e9 stove is great."]


def test_invalid_byte_deep_in_a_large_file_gets_the_exact_offset(tmp_path, capsys):
    # Over the 1 MiB read chunk, with a 3-byte character split across the chunk boundary first.
    line = "The tent is roomy and the stove \u2014 well, it works.\n".encode("utf-8")
    raw = bytearray()
    while len(raw) < (1 << 20) + 5000:
        raw += line
    raw += b"Bad byte here: \xff.\n"
    with pytest.raises(UnicodeDecodeError) as ref:  # the reference offset, from Python's decoder
        bytes(raw).decode("utf-8")
    corpus = write(tmp_path / "big.txt", bytes(raw))
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    n_line = bytes(raw).count(b"\n")  # the bad byte is on the last line
    assert_clean_failure(code, err, out, f"big.txt:{n_line}", f"byte offset {ref.value.start}", "0xff")


def test_utf16_file_suggests_utf16(tmp_path, capsys):
    corpus = write(tmp_path / "reviews.txt", "The tent is roomy.\n".encode("utf-16"))
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, "reviews.txt:1", "byte offset 0", "--encoding utf-16")
    code, _, err = run(["build", corpus, "-o", out, "--encoding", "utf-16"], capsys)
    assert code == 0, err


def test_unknown_encoding(tmp_path, capsys):
    corpus = write(tmp_path / "reviews.txt", "The tent is roomy.\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out, "--encoding", "klingon-8"], capsys)
    assert_clean_failure(code, err, out, "--encoding", "'klingon-8'", "unknown encoding")


def test_csv_without_the_named_column_lists_the_columns(tmp_path, capsys):
    corpus = write(tmp_path / "reviews.csv", "id,review,stars\n1,The tent is roomy.,5\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, "reviews.csv:1", "'text'", "'id', 'review', 'stars'", "--text-column")
    code, _, err = run(["build", corpus, "-o", out, "--text-column", "review", "--label-column", "grade"], capsys)
    assert_clean_failure(code, err, out, "reviews.csv:1", "'grade'", "'id', 'review', 'stars'", "--label-column")
    code, _, err = run(["build", corpus, "-o", out, "--text-column", "review", "--label-column", "stars"], capsys)
    assert code == 0, err


def test_semicolon_file_named_csv_gets_a_hint(tmp_path, capsys):
    corpus = write(tmp_path / "reviews.csv", "text;label\nThe tent is roomy.;5\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, "reviews.csv:1", "'text;label'", "comma-separated")


def test_csv_quote_inside_a_field_names_the_line(tmp_path, capsys):
    # RFC 4180 section 2, rule 7: a double quote inside a quoted field must be doubled ("").
    corpus = write(tmp_path / "reviews.csv", 'text\n"The tent is roomy."\n"The "best" stove"\n')
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, "reviews.csv:3", "malformed CSV")


def test_csv_unclosed_quote_names_the_line_where_the_row_starts(tmp_path, capsys):
    corpus = write(tmp_path / "reviews.csv", 'text,label\nThe tent is roomy.,pos\n"The stove never,neg\nlights.,neg\n')
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, "reviews.csv:3", "never closed")


def test_csv_short_row(tmp_path, capsys):
    corpus = write(tmp_path / "reviews.tsv", "id\ttext\n1\tThe tent is roomy.\n2\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, "reviews.tsv:3", "1 field", "'text'")


def test_malformed_json_line(tmp_path, capsys):
    corpus = write(tmp_path / "reviews.jsonl", '{"text": "The tent is roomy."}\n{"text": "The stove"\n{"text": "ok"}\n')
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, "reviews.jsonl:2", "malformed JSON", "column")


@pytest.mark.parametrize(
    "line, needles",
    [
        ('["The tent is roomy."]', ["expected a JSON object", "an array"]),
        ('"The tent is roomy."', ["expected a JSON object", "a string"]),
        ('{"review": "The tent is roomy.", "stars": 5}', ["no field 'text'", "'review', 'stars'", "--text-field"]),
        ('{"text": null}', ["field 'text' is null", "expected a string"]),
        ('{"text": 42}', ["field 'text' is a number", "expected a string"]),
    ],
    ids=["array", "string", "no-field", "null", "number"],
)
def test_jsonl_line_not_an_object_or_without_the_field(tmp_path, capsys, line, needles):
    corpus = write(tmp_path / "reviews.jsonl", '{"text": "The stove works well."}\n' + line + "\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, "reviews.jsonl:2", *needles)


def test_jsonl_missing_label_field(tmp_path, capsys):
    corpus = write(tmp_path / "reviews.jsonl", '{"text": "The tent is roomy.", "stars": 5}\n{"text": "The stove works."}\n')
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out, "--label-field", "stars"], capsys)
    assert_clean_failure(code, err, out, "reviews.jsonl:2", "'stars'", "--label-field")


def test_suite_file_given_as_corpus(tmp_path, capsys):
    corpus = write(tmp_path / "old.jsonl", json.dumps({"kind": "pairflip-suite", "version": 1}) + "\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, "old.jsonl", "suite file", "not a corpus")


@pytest.mark.parametrize(
    "name, opt, instead",
    [("r.txt", "--text-column", None), ("r.jsonl", "--text-column", "--text-field"), ("r.csv", "--text-field", "--text-column"),
     ("r.txt", "--label-field", None)],
)
def test_an_option_for_another_corpus_type_is_an_error(tmp_path, capsys, name, opt, instead):
    content = '{"text": "The tent is roomy."}\n' if name.endswith(".jsonl") else "text\nThe tent is roomy.\n"
    corpus = write(tmp_path / name, content)
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out, opt, "text"], capsys)
    assert_clean_failure(code, err, out, opt, name, *( [instead] if instead else []))


def test_an_error_late_in_the_corpus_is_found_before_any_output(tmp_path, capsys):
    lines = [json.dumps({"text": f"The tent number {i} is roomy."}) for i in range(3000)]
    lines[2500] = '{"text": "The stove", }'
    corpus = write(tmp_path / "reviews.jsonl", "\n".join(lines) + "\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, "reviews.jsonl:2501", "malformed JSON")


# --------------------------------------------------------------------------- odd but valid corpora


def _sources(out: Path) -> list[str]:
    return [p.source for p in read_suite(out).pairs]


def test_utf8_bom_is_dropped(tmp_path, capsys):
    # EF BB BF is the UTF-8 encoding of U+FEFF (Unicode Standard, ch. 23.8, "Byte Order Mark";
    # from memory). codecs.BOM_UTF8 is the stdlib's copy of it.
    assert codecs.BOM_UTF8 == b"\xef\xbb\xbf"
    for name, body in (("r.txt", "\n".join(REVIEWS)), ("r.csv", "text\n" + "\n".join(REVIEWS)),
                       ("r.jsonl", "\n".join(json.dumps({"text": t}) for t in REVIEWS))):
        corpus = write(tmp_path / name, codecs.BOM_UTF8 + (body + "\n").encode("utf-8"))
        texts = [t.text for t in read_corpus(corpus)]
        assert texts == REVIEWS, name
        out = tmp_path / f"suite-{name}.jsonl"
        code, _, err = run(["build", corpus, "-o", out], capsys)
        assert code == 0, err
        assert all("\ufeff" not in s for s in _sources(out))


@pytest.mark.parametrize("ending", ["\r\n", "\r"], ids=["crlf", "cr"])
def test_crlf_and_cr_line_ends(tmp_path, capsys, ending):
    for name, body in (("r.txt", ending.join(REVIEWS)), ("r.csv", ending.join(["text"] + [f'"{t}"' for t in REVIEWS])),
                       ("r.jsonl", ending.join(json.dumps({"text": t}) for t in REVIEWS))):
        corpus = write(tmp_path / name, body + ending)
        texts = [t.text for t in read_corpus(corpus)]
        assert texts == REVIEWS, name
        out = tmp_path / f"suite-{name}.jsonl"
        code, _, err = run(["build", corpus, "-o", out], capsys)
        assert code == 0, err
        assert all("\r" not in s for s in _sources(out))
        assert "\r" not in out.read_text(encoding="utf-8").replace("\\r", "")


def test_csv_quoted_field_with_a_newline_keeps_its_line_number(tmp_path):
    corpus = write(tmp_path / "r.csv", 'text\r\n"The tent is roomy.\r\nReally."\r\nThe stove works.\r\n')
    got = [(t.text, t.where) for t in read_corpus(corpus)]
    assert got == [("The tent is roomy.\r\nReally.", f"{corpus}:2"), ("The stove works.", f"{corpus}:4")]


def test_duplicate_lines_are_made_once(tmp_path, capsys):
    corpus = write(tmp_path / "r.txt", "\n".join(REVIEWS + REVIEWS + ["  The tent is roomy.  "]) + "\n")
    assert [t.text for t in read_corpus(corpus)] == REVIEWS
    out = tmp_path / "suite.jsonl"
    stats = cli.build_to_file(
        corpus, out, families=None, force=False, text_column=None, label_column=None, text_field=None,
        label_field=None, encoding="utf-8", seed=0, workers=1, spacy_model=None, lexicon=[], max_per_rule=1,
        recheck=False,
    )
    assert stats.sources == len(REVIEWS)
    pairs = read_suite(out).pairs
    assert len({p.id for p in pairs}) == len(pairs)
    assert len({(p.rule, p.source) for p in pairs}) == len(pairs)  # max_per_rule=1: one per rule and source


SUMMARY = re.compile(r"(\d+) source texts, (\d+) gave pairs, (\d+) gave a pair with an expectation; (\d+) pairs")


def _summary(err: str) -> tuple[int, int, int]:
    m = SUMMARY.search(" ".join(err.split()))
    assert m, f"no build summary in {err!r}"
    return int(m.group(1)), int(m.group(2)), int(m.group(4))


def test_emoji_urls_html_and_other_languages_do_not_crash(tmp_path, capsys):
    texts = [
        "The tent is great \U0001F44D\U0001F3D5\ufe0f!!",
        "\U0001F525\U0001F525\U0001F525",
        "See https://example.invalid/tents?id=12&ref=a_b for the tent, it is roomy.",
        "<p>The <b>stove</b> is <i>not</i> bad</p><br/>",
        "<script>alert('x')</script>",
        "Das Zelt ist sehr gut und der Kocher funktioniert.",
        "La tienda es muy buena.",
        "\u3053\u306e\u30c6\u30f3\u30c8\u306f\u3068\u3066\u3082\u826f\u3044\u3067\u3059\u3002",
        "\u0647\u0630\u0647 \u0627\u0644\u062e\u064a\u0645\u0629 \u0631\u0627\u0626\u0639\u0629.",
        "\u0417\u0430\u043c\u0435\u0447\u0430\u0442\u0435\u043b\u044c\u043d\u0430\u044f \u043f\u0430\u043b\u0430\u0442\u043a\u0430!",
        "e\u0301e\u0301 cafe\u0301 \u202ereversed\u202c text",
        "TENT!!!!! GREAT!!!!! ;-) :( <3",
    ]
    corpus = write(tmp_path / "odd.txt", "\n".join(texts) + "\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert code == 0, err
    assert "Traceback" not in err
    sources, with_pairs, n_pairs = _summary(err)
    assert sources == len(texts)
    assert n_pairs == len(read_suite(out).pairs)
    assert with_pairs <= sources
    for p in read_suite(out).pairs:
        assert p.source in texts and p.variant != p.source


def test_only_foreign_text_says_no_pairs(tmp_path, capsys):
    texts = ["Das Zelt ist sehr gut.", "\u3053\u306e\u30c6\u30f3\u30c8\u306f\u826f\u3044\u3002", "\u0647\u0630\u0647 \u0627\u0644\u062e\u064a\u0645\u0629 \u0631\u0627\u0626\u0639\u0629."]
    corpus = write(tmp_path / "de.txt", "\n".join(texts) + "\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert code == 0, err
    sources, with_pairs, n_pairs = _summary(err)
    assert sources == 3
    if n_pairs == 0:
        assert "no pairs were made" in err
    elif int(SUMMARY.search(" ".join(err.split())).group(3)) == 0:
        assert "no pair with an expectation was made" in err


def test_text_over_the_pipeline_max_length_is_skipped_with_a_warning(tmp_path, capsys, nlp, monkeypatch):
    # load_nlp() is cached, so the CLI in this process uses this very pipeline object.
    monkeypatch.setattr(nlp, "max_length", 300)
    long_text = " ".join(["The tent is roomy and the stove works well."] * 20)  # 899 characters
    corpus = write(tmp_path / "r.txt", "\n".join([REVIEWS[0], long_text, REVIEWS[1]]) + "\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert code == 0, err
    flat = " ".join(err.split())
    assert "warning:" in flat and f"{corpus}:2" in flat and f"{len(long_text)} characters" in flat
    sources, _, _ = _summary(err)
    assert sources == 3  # counted, and the build went on past it
    assert long_text not in _sources(out)


def test_real_text_over_one_million_characters_is_skipped(tmp_path):
    # spaCy's default Language.max_length is 1,000,000 characters (spacy/language.py); a real
    # longer line goes through the installed script and is skipped before parsing (cheap).
    long_text = ("The tent is roomy. " * 52_632).strip()
    assert len(long_text) == 1_000_007
    corpus = write(tmp_path / "r.txt", "\n".join([REVIEWS[0], long_text, REVIEWS[1]]) + "\n")
    out = tmp_path / "suite.jsonl"
    proc = subprocess.run([PAIRFLIP, "build", str(corpus), "-o", str(out)], capture_output=True, text=True, timeout=300)
    assert proc.returncode == 0, proc.stderr
    flat = " ".join(proc.stderr.split())
    assert "Traceback" not in flat
    assert "warning:" in flat and f"{corpus}:2" in flat and "1000007 characters" in flat
    assert out.exists()


def test_hundred_thousand_character_texts(tmp_path, capsys):
    words = "the tent kept us dry and the stove was quick to light but the zipper broke after two trips".split()
    body = []
    i = 0
    while sum(len(w) + 1 for w in body) < 100_000:
        body.append(words[i % len(words)] + ("." if i % 17 == 16 else ""))
        i += 1
    long_text = " ".join(body)[:100_000]
    assert len(long_text) == 100_000
    no_space = "a" * 100_000  # one 100,000-character "word"
    corpus = write(tmp_path / "r.txt", "\n".join([long_text, no_space, REVIEWS[0]]) + "\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert code == 0, err
    sources, _, _ = _summary(err)
    assert sources == 3


# --------------------------------------------------------------------------- issue 12: corpus faults
# Each of these built a suite (exit 0) or raised a bare exception before the fix (code of 04cd824).


def test_csv_row_with_more_fields_than_the_header(tmp_path, capsys):
    # An unquoted comma in the text: before, the tail of the text became the gold label.
    corpus = write(tmp_path / "r.csv", "text,label\nThe tent is roomy,positive\nThe stove is loud, but cheap,negative\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out, "--label-column", "label"], capsys)
    assert_clean_failure(code, err, out, f"{corpus}:3", "3 fields", "header has 2", "quoted")


def test_csv_duplicated_column_name(tmp_path, capsys):
    corpus = write(tmp_path / "r.csv", "text,label,text\nThe tent is roomy,positive,x\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, f"{corpus}:1", "'text' appears 2 times", "columns 1, 3")


def test_folder_given_as_corpus(tmp_path, capsys):
    folder = tmp_path / "reviews"
    folder.mkdir()
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", folder, "-o", out], capsys)
    line = assert_clean_failure(code, err, out, str(folder), "is a folder")
    assert "unknown corpus type" not in line


@pytest.mark.parametrize("codec", ["utf-16-le", "utf-16-be"])
def test_utf16_without_a_byte_order_mark(tmp_path, capsys, codec):
    # ASCII text in UTF-16 without a BOM is valid UTF-8 (every other byte NUL): it was read as text
    # full of NUL characters.
    corpus = write(tmp_path / "r.txt", "The tent is roomy.\nThe stove is loud.\n".encode(codec))
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, f"{corpus}:1", "NUL byte", "--encoding utf-16-le")
    code, _, err = run(["build", corpus, "-o", out, "--encoding", codec], capsys)
    assert code == 0, err


@pytest.mark.parametrize("label, kind", [('{"stars": 5}', "an object"), ("true", "a boolean"), ("[1]", "an array")])
def test_jsonl_label_that_is_not_a_string_or_number(tmp_path, capsys, label, kind):
    corpus = write(tmp_path / "r.jsonl", '{"text": "The tent is roomy.", "label": "positive"}\n'
                                         f'{{"text": "The stove is loud.", "label": {label}}}\n')
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out, "--label-field", "label"], capsys)
    assert_clean_failure(code, err, out, f"{corpus}:2", "'label'", kind, "a string or a number")


def test_jsonl_lone_surrogate(tmp_path, capsys):
    # A JSON \ud83d escape without its low half decodes to a lone surrogate, which UTF-8 cannot
    # encode (RFC 8259 section 8.2 allows such strings but calls them unpredictable to receivers).
    corpus = write(tmp_path / "r.jsonl", '{"text": "The tent is roomy."}\n{"text": "Great stove \\ud83d!"}\n')
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert_clean_failure(code, err, out, f"{corpus}:2", "'text'", "lone surrogate")


# --------------------------------------------------------------------------- issue 12: long texts
# The README says the rules skip long texts; a 200,000-character line still made pairs (reorder).
# The limit is negation's MAX_WORDS (30 alphabetic words), now applied by the build to every
# source: the whole text with --unit text, each sentence with --unit sentence (the default).

# 28 words, one sentence, invented (demo scenario)
_LONG_BASE = ("We pitched the roomy green tent beside a quiet lake, cooked fresh trout on the small stove, "
              "watched bright stars for hours and then slept warmly until sunrise")


def _line_of_reviews(n_chars: int) -> str:
    """A line of ``n_chars`` characters made of whole demo review sentences."""
    from pairflip.demo.models import load_sentences

    sents = load_sentences()
    out, size, i = [], 0, 0
    while size < n_chars:
        out.append(sents[i % len(sents)])
        size += len(sents[i % len(sents)]) + 1
        i += 1
    return " ".join(out)[:n_chars]


def test_200000_character_line_gives_no_pair_of_it_as_a_whole(tmp_path, capsys):
    long_line = _line_of_reviews(200_000)
    corpus = write(tmp_path / "r.txt", "\n".join([REVIEWS[0], long_line, REVIEWS[2]]) + "\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out], capsys)
    assert code == 0, err
    pairs = read_suite(out).pairs
    # Sentence units (the default): the line's own sentences are sources, never the line itself,
    # and no source is over the limit (words counted as whitespace-separated words here).
    assert pairs and all(len(p.source.split()) <= 30 for p in pairs)
    assert {p.source for p in pairs} & {REVIEWS[0], REVIEWS[2]}
    assert any(p.extra.get("text_id") for p in pairs)  # sentences cut from the long line


def test_long_text_is_skipped_unparsed_and_counted_with_unit_text(tmp_path, capsys, nlp, monkeypatch):
    long_line = _line_of_reviews(200_000)
    parsed: list[str] = []
    real_pipe = nlp.pipe

    def pipe(texts, **kw):  # record what reaches the parser (spaCy calls pipe again inside)
        def seen(items):
            for text, ctx in items:
                parsed.append(text)
                yield text, ctx
        return real_pipe(seen(texts) if kw.get("as_tuples") else texts, **kw)

    monkeypatch.setattr(nlp, "pipe", pipe)
    corpus = write(tmp_path / "r.txt", "\n".join([REVIEWS[0], long_line, REVIEWS[2]]) + "\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out, "--unit", "text"], capsys)
    assert code == 0, err
    flat = " ".join(err.split())
    sources, with_pairs, _ = _summary(flat)
    assert sources == 3 and with_pairs == 2
    assert "skipped 1 source (more than 30 words)" in flat
    assert long_line not in _sources(out)
    assert parsed == [REVIEWS[0], REVIEWS[2]]  # counted by the tokenizer, never parsed


@pytest.mark.parametrize("unit, reason", [("text", "more than 30 words"),
                                          ("sentence", "a sentence of more than 30 words")])
def test_thirty_words_pass_thirty_one_are_skipped(tmp_path, capsys, unit, reason):
    t30 = _LONG_BASE + " each morning."
    t31 = _LONG_BASE + " each cold morning."
    assert (len(t30.split()), len(t31.split())) == (30, 31)
    corpus = write(tmp_path / "r.txt", f"{t30}\n{t31}\n")
    out = tmp_path / "suite.jsonl"
    code, _, err = run(["build", corpus, "-o", out, "--unit", unit, "--families", "reorder/shuffle"], capsys)
    assert code == 0, err
    flat = " ".join(err.split())
    assert f"skipped 1 source ({reason})" in flat
    assert set(_sources(out)) == {t30}
