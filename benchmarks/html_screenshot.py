"""Open the HTML report in headless Chromium, take a screenshot and check it is not blank.

    python benchmarks/html_screenshot.py [OUT_DIR]            # writes report.html and report.png
    PAIRFLIP_BROWSER_TESTS=1 pytest benchmarks/html_screenshot.py   # the same, as a test

The results are invented here (an outdoor-gear shop's review sentences, three demo model names),
summarised with pairflip.report.summarize and exported with pairflip.report.export.to_html.
Chromium runs with networking features off and a fresh profile; nothing is fetched.
"""

from __future__ import annotations

import os
import random
import shutil
import subprocess
import sys
import tempfile
import zlib
from pathlib import Path

try:
    import pytest
except ImportError:  # run as a plain script without the test extras
    pytest = None  # type: ignore[assignment]

from pairflip.records import Results, Verdict

CHROMIUM_FLAGS = [
    "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
    "--disable-component-update", "--disable-sync", "--no-first-run",
]

RULES = [
    ("negation", "negation/do-support", "flip", "The tent kept us dry through the storm.",
     "The tent did not keep us dry through the storm."),
    ("negation", "negation/copula", "flip", "The sleeping bag is warm enough for late autumn.",
     "The sleeping bag is not warm enough for late autumn."),
    ("double-negation", "double-negation/litotes", "hold", "The headlamp is not bad at all.",
     "The headlamp is not bad at all, honestly."),
    ("intensifier", "intensifier/amplify", "strengthen", "The boots are comfortable on long trails.",
     "The boots are very comfortable on long trails."),
    ("reorder", "reorder/coordination", "hold", "The poles are light and the grips are soft.",
     "The grips are soft and the poles are light."),
    ("reorder", "reorder/shuffle", "none", "The rain cover fits the pack snugly.",
     "Snugly the rain cover fits the pack."),
]


def invented_results(name: str, seed: int, p_violation: float, n: int = 40) -> Results:
    rng = random.Random(seed)
    vs = []
    for fam, rule, should, src, var in RULES:
        for i in range(n):
            s = rng.uniform(0.2, 0.95) * (1 if rng.random() < 0.6 else -1)
            bad = rng.random() < p_violation and should != "none"
            t = (s if bad else -s) if should == "flip" else (-s if bad else s)
            vs.append(Verdict(
                id=f"{name}-{rule}-{i}", source_pred="positive" if s > 0 else "negative",
                variant_pred="positive" if t > 0 else "negative", verdict="violation" if bad else "ok",
                source_score=s, variant_score=t, family=fam, rule=rule, should=should,
                source=src, variant=var, source_id=f"{fam}-{i}"))
    header = {"kind": "pairflip-results", "version": 1, "created": "2025-03-04T10:20:30+00:00",
              "suite": {"sha256": "5e1f" * 16, "path": "gear-suite.jsonl", "generator": {"seed": 0}},
              "model": {"name": name, "spec": f"{name}.joblib"},
              "labels": {"order": ["negative", "positive"], "polarity": {"negative": -1, "positive": 1},
                         "source": "recognised"},
              "texts_predicted": 2 * len(RULES)}
    return Results(header=header, verdicts=vs)


def write_report(out_dir: Path) -> Path:
    from pairflip.report import export, summarize
    from pairflip.report.gate import check, parse_limit

    summaries = [summarize(invented_results(n, i, 0.1 + 0.12 * i)) for i, n in enumerate(("unigram", "bigram", "deep-bow"))]
    limits = [parse_limit("negation.violation <= 0.2")]
    page = export.to_html(summaries, gate=[check(s, limits) for s in summaries])
    path = out_dir / "report.html"
    path.write_text(page, encoding="utf-8")
    return path


def find_chromium() -> str | None:
    for name in ("chromium", "chromium-browser", "google-chrome"):
        found = shutil.which(name)
        if found:
            return found
    return None


def screenshot(html_path: Path, png_path: Path, browser: str) -> None:
    with tempfile.TemporaryDirectory(prefix="pairflip-chromium-") as profile:
        cmd = [browser, *CHROMIUM_FLAGS, f"--user-data-dir={profile}", f"--screenshot={png_path}",
               "--window-size=1200,900", html_path.resolve().as_uri()]
        subprocess.run(cmd, check=True, timeout=120, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)


def png_pixels(path: Path) -> tuple[int, int, set[bytes]]:
    """(width, height, the distinct pixel values of a sample of rows) of an 8-bit RGB/RGBA PNG,
    decoded with zlib (the PNG format: a signature, chunks, filtered scanlines)."""
    data = path.read_bytes()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        raise ValueError(f"{path}: not a PNG file")
    pos, idat, width = 8, b"", 0
    height = depth = ctype = 0
    while pos < len(data):
        length = int.from_bytes(data[pos:pos + 4], "big")
        kind = data[pos + 4:pos + 8]
        body = data[pos + 8:pos + 8 + length]
        if kind == b"IHDR":
            width, height = int.from_bytes(body[:4], "big"), int.from_bytes(body[4:8], "big")
            depth, ctype = body[8], body[9]
        elif kind == b"IDAT":
            idat += body
        pos += 12 + length
    if depth != 8 or ctype not in (2, 6):
        raise ValueError(f"{path}: expected 8-bit RGB(A), got depth {depth}, colour type {ctype}")
    bpp = 3 if ctype == 2 else 4
    raw = zlib.decompress(idat)
    stride = width * bpp
    prev = bytearray(stride)
    colours: set[bytes] = set()
    for y in range(height):
        f = raw[y * (stride + 1)]
        line = bytearray(raw[y * (stride + 1) + 1:(y + 1) * (stride + 1)])
        for x in range(stride):  # undo the scanline filter (PNG spec, section 9)
            a = line[x - bpp] if x >= bpp else 0
            b = prev[x]
            c = prev[x - bpp] if x >= bpp else 0
            if f == 1:
                line[x] = (line[x] + a) & 255
            elif f == 2:
                line[x] = (line[x] + b) & 255
            elif f == 3:
                line[x] = (line[x] + (a + b) // 2) & 255
            elif f == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                line[x] = (line[x] + (a if pa <= pb and pa <= pc else b if pb <= pc else c)) & 255
        prev = line
        if y % 8 == 0:
            colours.update(bytes(line[i:i + 3]) for i in range(0, stride, bpp))
    return width, height, colours


def run(out_dir: Path) -> Path:
    browser = find_chromium()
    if browser is None:
        raise RuntimeError("no chromium on PATH (apt-get install chromium)")
    html_path = write_report(out_dir)
    png = out_dir / "report.png"
    screenshot(html_path, png, browser)
    if not png.exists() or png.stat().st_size == 0:
        raise RuntimeError(f"{png}: chromium wrote no screenshot")
    w, h, colours = png_pixels(png)
    if (w, h) != (1200, 900):
        raise RuntimeError(f"{png}: expected 1200x900, got {w}x{h}")
    if len(colours) < 8:
        raise RuntimeError(f"{png}: looks blank ({len(colours)} distinct colours in the sampled rows)")
    print(f"{png}: {w}x{h}, {len(colours)} distinct colours in sampled rows; html {html_path.stat().st_size} bytes")
    return png


if pytest is not None:

    @pytest.mark.skipif(os.environ.get("PAIRFLIP_BROWSER_TESTS") != "1",
                        reason="set PAIRFLIP_BROWSER_TESTS=1 to run the browser check")
    def test_html_screenshot_is_not_blank(tmp_path: Path) -> None:
        if find_chromium() is None:
            pytest.skip("chromium is not installed")
        png = run(tmp_path)
        assert png.exists()


if __name__ == "__main__":
    out = Path(sys.argv[1]) if len(sys.argv) > 1 else Path(tempfile.mkdtemp(prefix="pairflip-html-"))
    out.mkdir(parents=True, exist_ok=True)
    run(out)
