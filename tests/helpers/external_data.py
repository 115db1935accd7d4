"""Human-rated open data shipped inside a registry package, fetched with pip on request.

The vaderSentiment 3.3.2 source distribution on PyPI (Hutto & Gilbert 2014, "VADER: A
Parsimonious Rule-based Model for Sentiment Analysis of Social Media Text", ICWSM) carries, in
``additional_resources/hutto_ICWSM_2014.tar.gz``, snippets rated by humans on a -4..+4 scale;
pairflip reads the product-review snippets and the tweets. Each GroundTruth file is
``id <TAB> mean rating <TAB> text`` with CRLF ends.

Fetched only when ``PAIRFLIP_EXTERNAL_DATA`` is set: ``pip download`` from the package registry into
a cache folder (``PAIRFLIP_DATA_CACHE``, default ``~/.cache/pairflip-external``).
"""

from __future__ import annotations

import os
import subprocess
import sys
import tarfile
from pathlib import Path

SDIST = "vaderSentiment==3.3.2"
FILES = {
    "product": "amazonReviewSnippets_GroundTruth.txt",
    "tweets": "tweets_GroundTruth.txt",
}


def enabled() -> bool:
    return bool(os.environ.get("PAIRFLIP_EXTERNAL_DATA"))


def cache_dir() -> Path:
    return Path(os.environ.get("PAIRFLIP_DATA_CACHE", Path.home() / ".cache" / "pairflip-external"))


def fetch() -> Path:
    """Download and unpack the sdist once; return the folder holding the GroundTruth files."""
    root = cache_dir()
    out = root / "hutto_ICWSM_2014"
    if all((out / f).exists() for f in FILES.values()):
        return out
    root.mkdir(parents=True, exist_ok=True)
    subprocess.run(
        [sys.executable, "-m", "pip", "download", "--quiet", "--no-deps", "--no-binary", ":all:", SDIST, "-d", str(root)],
        check=True,
    )
    sdist = next(root.glob("vaderSentiment-3.3.2.tar.gz"))
    with tarfile.open(sdist) as tf:
        inner = tf.extractfile("vaderSentiment-3.3.2/additional_resources/hutto_ICWSM_2014.tar.gz")
        assert inner is not None
        with tarfile.open(fileobj=inner) as tf2:
            for name in FILES.values():
                member = tf2.getmember(f"hutto_ICWSM_2014/{name}")
                data = tf2.extractfile(member)
                assert data is not None
                out.mkdir(parents=True, exist_ok=True)
                (out / name).write_bytes(data.read())
    return out


def load(kind: str) -> list[tuple[float, str]]:
    """``[(mean human rating, text), ...]`` for ``product`` or ``tweets``."""
    path = fetch() / FILES[kind]
    rows = []
    for line in path.read_text(encoding="utf-8", errors="replace").splitlines():
        parts = line.rstrip("\r").split("\t")
        if len(parts) >= 3 and parts[2].strip():
            rows.append((float(parts[1]), parts[2].strip()))
    return rows
