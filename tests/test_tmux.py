"""A real terminal: `pairflip show` inside tmux at 80 columns (skipped when tmux is absent)."""

from __future__ import annotations

import os
import random
import shlex
import shutil
import subprocess
import sys
import time
import uuid
from pathlib import Path

import pytest

from pairflip.files import write_results
from pairflip.records import Results, Verdict

TMUX = shutil.which("tmux")
pytestmark = pytest.mark.skipif(TMUX is None, reason="tmux is not installed")

RULES = [  # invented outdoor-gear review sentences
    ("negation", "negation/do-support", "flip", "The tent kept us dry through the storm.",
     "The tent did not keep us dry through the storm."),
    ("negation", "negation/copula", "flip", "The sleeping bag is warm enough for late autumn.",
     "The sleeping bag is not warm enough for late autumn."),
    ("intensifier", "intensifier/amplify", "strengthen", "The boots are comfortable on long trails.",
     "The boots are extremely comfortable on long trails."),
    ("reorder", "reorder/coordination", "hold", "The poles are light and the grips are soft.",
     "The grips are soft and the poles are light."),
]
DONE = "__pairflip_show_done__"
PROBE = "probe-" + "x" * 94  # 100 columns: shows that the capture would reveal an over-long line


def _results_file(path: Path, name: str, seed: int) -> None:
    rng = random.Random(seed)
    vs = []
    for fam, rule, should, src, var in RULES:
        for i in range(25):
            s = rng.uniform(0.2, 0.9) * (1 if rng.random() < 0.6 else -1)
            bad = rng.random() < 0.3
            t = (s if bad else -s) if should == "flip" else (-s if bad else s)
            vs.append(Verdict(id=f"{rule}-{i}", source_pred="positive" if s > 0 else "negative",
                              variant_pred="positive" if t > 0 else "negative",
                              verdict="violation" if bad else "ok", source_score=s, variant_score=t,
                              family=fam, rule=rule, should=should, source=src, variant=var,
                              source_id=f"{fam}-{i}"))
    header = {"suite": {"sha256": "ee" * 32, "path": "gear-suite.jsonl"},
              "model": {"name": name, "spec": f"{name}.joblib"},
              "labels": {"order": ["negative", "positive"], "polarity": {"negative": -1, "positive": 1}}}
    write_results(Results(header=header, verdicts=vs), path)


def _run_in_tmux(tmp_path: Path, args: list[str], env: dict[str, str]) -> tuple[str, str]:
    """Run `pairflip ARGS` in a detached 80x50 tmux pane on a private server; return the pane's
    text without and with escape sequences (the whole scroll-back)."""
    sock = f"pairflip-test-{uuid.uuid4().hex[:8]}"
    assign = " ".join(f"{k}={shlex.quote(v)}" for k, v in env.items())
    cmd = (f"cd {shlex.quote(str(tmp_path))} && echo {PROBE} && env {assign} {shlex.quote(sys.executable)} -m pairflip.cli "
           + " ".join(shlex.quote(a) for a in args) + f"; echo {DONE}; sleep 600")
    base = [TMUX, "-L", sock, "-f", "/dev/null"]
    subprocess.run(base + ["new-session", "-d", "-x", "80", "-y", "50", "-s", "show", "sh", "-c", cmd],
                   check=True, env={**os.environ, "TERM": "xterm-256color"})
    try:
        subprocess.run(base + ["set-option", "-t", "show", "history-limit", "5000"], check=False)
        deadline = time.monotonic() + 120
        text = ""
        while time.monotonic() < deadline:
            text = subprocess.run(base + ["capture-pane", "-p", "-J", "-S", "-", "-t", "show"],
                                  capture_output=True, text=True, check=True).stdout
            if DONE in text:
                break
            time.sleep(0.3)
        else:
            pytest.fail(f"pairflip show did not finish in tmux; the pane shows:\n{text}")
        # -J joins lines tmux wrapped, so a line wider than the pane comes back whole
        text = subprocess.run(base + ["capture-pane", "-p", "-J", "-S", "-", "-t", "show"],
                              capture_output=True, text=True, check=True).stdout
        assert PROBE in text.splitlines(), "the capture does not show joined long lines"
        escaped = subprocess.run(base + ["capture-pane", "-p", "-e", "-J", "-S", "-", "-t", "show"],
                                 capture_output=True, text=True, check=True).stdout
        return text, escaped
    finally:
        subprocess.run(base + ["kill-server"], check=False, capture_output=True)
        # the private server's socket file stays behind after kill-server; remove ours
        sock_file = Path(os.environ.get("TMUX_TMPDIR", "/tmp")) / f"tmux-{os.getuid()}" / sock
        sock_file.unlink(missing_ok=True)


def _env() -> dict[str, str]:
    return {"PYTHONIOENCODING": "utf-8", "LANG": "C.UTF-8", "COLUMNS": "", "TERM": "xterm-256color"}


def test_show_in_a_real_80_column_terminal(tmp_path: Path) -> None:
    _results_file(tmp_path / "results.jsonl", "unigram", 0)
    text, escaped = _run_in_tmux(tmp_path, ["show", "results.jsonl", "--examples", "1"], _env())
    lines = text.split(PROBE)[1].split(DONE)[0].splitlines()
    assert "pairflip report · unigram" in text
    for fam in ("negation", "intensifier", "reorder"):
        assert any(line.startswith(fam + " ") for line in lines), fam
    assert "worst examples · negation" in text
    assert "[+not+]" in text or "[+did not keep+]" in text
    assert max(len(line) for line in lines) <= 80
    assert "\x1b[" in escaped  # a terminal: colour is on


def test_show_side_by_side_and_no_color_in_a_real_terminal(tmp_path: Path) -> None:
    for i, m in enumerate(("unigram", "bigram", "deep-bow")):
        _results_file(tmp_path / f"{m}.jsonl", m, i)
    env = dict(_env(), NO_COLOR="1")
    text, escaped = _run_in_tmux(
        tmp_path, ["show", "unigram.jsonl", "bigram.jsonl", "deep-bow.jsonl", "--examples", "0",
                   "--limit", "negation.violation <= 0.5"], env)
    body = text.split(PROBE)[1].split(DONE)[0]
    assert "3 models side by side" in body
    for m in ("unigram", "bigram", "deep-bow"):
        assert m in body
    assert max(len(line) for line in body.splitlines()) <= 80
    assert "\x1b[" not in escaped.split(PROBE)[1].split(DONE)[0]  # NO_COLOR: no escape codes, not even bold


# --------------------------------------------------------------------------- pairflip vet


def _suite_file(path: Path) -> None:
    from pairflip.files import write_suite
    from pairflip.records import Pair, Suite

    pairs = [Pair(source=src, variant=var, family=fam, rule=rule, should=should) for fam, rule, should, src, var in RULES]
    write_suite(Suite(header={}, pairs=pairs), path)


@pytest.mark.parametrize("width, height", [(80, 24), (120, 40)])
def test_vet_app_draws_whole_lines_in_a_real_terminal(tmp_path: Path, width: int, height: int) -> None:
    _suite_file(tmp_path / "suite.jsonl")
    sock = f"pairflip-test-{uuid.uuid4().hex[:8]}"
    base = [TMUX, "-L", sock, "-f", "/dev/null"]
    cmd = (f"cd {shlex.quote(str(tmp_path))} && env {' '.join(f'{k}={shlex.quote(v)}' for k, v in _env().items())} "
           f"{shlex.quote(sys.executable)} -m pairflip.cli vet suite.jsonl --decisions d.jsonl; echo {DONE}; sleep 600")
    subprocess.run(base + ["new-session", "-d", "-x", str(width), "-y", str(height), "-s", "vet", "sh", "-c", cmd],
                   check=True, env={**os.environ, "TERM": "xterm-256color"})

    def screen() -> list[str]:
        return subprocess.run(base + ["capture-pane", "-p", "-t", "vet"], capture_output=True, text=True,
                              check=True).stdout.splitlines()

    def wait_for(needle: str) -> list[str]:
        deadline = time.monotonic() + 60
        lines: list[str] = []
        while time.monotonic() < deadline:
            lines = screen()
            if any(needle in ln for ln in lines):
                return lines
            time.sleep(0.2)
        pytest.fail(f"{needle!r} never appeared; the pane shows:\n" + "\n".join(lines))

    try:
        lines = wait_for("q quit")
        assert len(lines) <= height and max(len(ln) for ln in lines) <= width
        text = "\n".join(lines)
        assert "pairflip vet · suite.jsonl" in text
        assert "1 of 4" in text
        # every line of the app is whole: the key help, the rule line and both texts, unbroken
        assert any("a accept  r reject  e change expectation  s skip  u undo  q quit" in ln for ln in lines)
        assert any(RULES[0][3] in ln for ln in lines) and any(RULES[0][4] in ln for ln in lines)
        assert any("negation/do-support" in ln and "should not keep the opinion" in ln for ln in lines)
        subprocess.run(base + ["send-keys", "-t", "vet", "a"], check=True)
        wait_for("2 of 4")
        subprocess.run(base + ["send-keys", "-t", "vet", "r"], check=True)
        lines = wait_for("esc back")
        assert any("g ungrammatical" in ln and "o other" in ln for ln in lines)
        subprocess.run(base + ["send-keys", "-t", "vet", "g"], check=True)
        wait_for("3 of 4")
        subprocess.run(base + ["send-keys", "-t", "vet", "q"], check=True)
        wait_for(DONE)
    finally:
        subprocess.run(base + ["kill-server"], check=False, capture_output=True)
        sock_file = Path(os.environ.get("TMUX_TMPDIR", "/tmp")) / f"tmux-{os.getuid()}" / sock
        sock_file.unlink(missing_ok=True)
    recs = (tmp_path / "d.jsonl").read_text(encoding="utf-8").splitlines()
    assert [r.split('"decision": ')[1][:8] for r in recs[1:]] == ['"accept"', '"reject"']
