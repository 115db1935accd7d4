"""``--cache FILE``: a SQLite file of finished predictions, so reruns and resumed runs never
predict a text twice.

Rows are keyed by the model's fingerprint (see :meth:`pairflip.probes.adapters.Model.fingerprint`)
and the SHA-256 of the text; the text itself is not stored. Each batch is committed as soon as
it is predicted, so an interrupted or failed run keeps every finished batch. One file can hold
predictions of several models.
"""

from __future__ import annotations

import hashlib
import json
import sqlite3
import threading
from pathlib import Path
from typing import Iterable, Sequence

from pairflip.records import PairflipError, Prediction

CACHE_KIND = "pairflip-cache"
CACHE_VERSION = 1
_CHUNK = 500  # SQLite's default limit on host parameters is 999 (32766 since 3.32)

_SCHEMA = """
CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE IF NOT EXISTS predictions (
    fingerprint TEXT NOT NULL,
    text_sha256 TEXT NOT NULL,
    label TEXT NOT NULL,
    score REAL,
    probabilities TEXT,
    PRIMARY KEY (fingerprint, text_sha256)
) WITHOUT ROWID;
"""


def text_key(text: str) -> str:
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


class PredictionCache:
    """``get_many(fingerprint, texts) -> {text: Prediction}`` and
    ``put_many(fingerprint, [(text, Prediction)])``; use as a context manager or call close()."""

    def __init__(self, path: str | Path) -> None:
        self.path = Path(path)
        if self.path.is_dir():
            raise PairflipError(f"--cache {self.path}: is a folder, expected a cache file (it is created if missing)")
        parent = self.path.parent if str(self.path.parent) else Path(".")
        if not parent.exists():
            raise PairflipError(f"--cache {self.path}: folder {parent} does not exist")
        self._lock = threading.Lock()
        try:
            self._db = sqlite3.connect(str(self.path), check_same_thread=False, timeout=30)
        except sqlite3.Error as err:
            raise PairflipError(f"--cache {self.path}: cannot open ({err})") from None
        try:
            self._setup()
        except PairflipError:
            self._db.close()
            raise
        except sqlite3.OperationalError as err:  # locked, read-only, disk full
            self._db.close()
            raise PairflipError(f"--cache {self.path}: cannot use the file ({err})") from None
        except sqlite3.DatabaseError as err:  # "file is not a database", "database disk image is malformed"
            self._db.close()
            raise PairflipError(
                f"--cache {self.path}: not a SQLite database ({err}); --cache expects a pairflip prediction "
                f"cache or a new file name"
            ) from None

    def _setup(self) -> None:
        db = self._db
        tables = {r[0] for r in db.execute("SELECT name FROM sqlite_master WHERE type = 'table'")}
        if tables and "meta" not in tables:
            raise PairflipError(
                f"--cache {self.path}: a SQLite database, but not a pairflip prediction cache "
                f"(it holds the tables {', '.join(sorted(tables))}); choose another file"
            )
        if "meta" in tables:
            meta = dict(db.execute("SELECT key, value FROM meta"))
            if meta.get("kind") != CACHE_KIND:
                raise PairflipError(f"--cache {self.path}: a SQLite database, but not a pairflip prediction cache")
            if meta.get("version") != str(CACHE_VERSION):
                raise PairflipError(
                    f"--cache {self.path}: cache version {meta.get('version')!r} is not supported "
                    f"(this pairflip reads version {CACHE_VERSION}); use a new cache file"
                )
        try:
            db.execute("PRAGMA journal_mode=WAL")
        except sqlite3.OperationalError:  # some file systems cannot do WAL; the default journal works
            pass
        with db:
            db.executescript(_SCHEMA)
            db.execute("INSERT OR IGNORE INTO meta VALUES ('kind', ?)", (CACHE_KIND,))
            db.execute("INSERT OR IGNORE INTO meta VALUES ('version', ?)", (str(CACHE_VERSION),))

    def get_many(self, fingerprint: str, texts: Sequence[str]) -> dict[str, Prediction]:
        """The cached predictions of those ``texts`` this model has already made."""
        by_key: dict[str, list[str]] = {}
        for t in texts:
            by_key.setdefault(text_key(t), []).append(t)
        keys = list(by_key)
        out: dict[str, Prediction] = {}
        with self._lock:
            for i in range(0, len(keys), _CHUNK):
                chunk = keys[i : i + _CHUNK]
                rows = self._db.execute(
                    f"SELECT text_sha256, label, score, probabilities FROM predictions "
                    f"WHERE fingerprint = ? AND text_sha256 IN ({','.join('?' * len(chunk))})",
                    [fingerprint, *chunk],
                ).fetchall()
                for key, label, score, probs in rows:
                    pred = Prediction(label=label, score=score, probabilities=None if probs is None else json.loads(probs))
                    for t in by_key[key]:
                        out[t] = pred
        return out

    def put_many(self, fingerprint: str, items: Iterable[tuple[str, Prediction]]) -> int:
        """Store predictions and commit at once; returns how many rows were written."""
        rows = [
            (
                fingerprint,
                text_key(t),
                p.label,
                p.score,
                None if p.probabilities is None else json.dumps(p.probabilities, ensure_ascii=False),
            )
            for t, p in items
        ]
        with self._lock, self._db:
            self._db.executemany("INSERT OR REPLACE INTO predictions VALUES (?, ?, ?, ?, ?)", rows)
        return len(rows)

    def delete_many(self, fingerprint: str, texts: Iterable[str]) -> int:
        """Remove this model's predictions of ``texts`` (ones found wrong after they were stored)
        and commit at once; returns how many rows were removed."""
        keys = sorted({text_key(t) for t in texts})
        removed = 0
        with self._lock, self._db:
            for i in range(0, len(keys), _CHUNK):
                chunk = keys[i : i + _CHUNK]
                cur = self._db.execute(
                    f"DELETE FROM predictions WHERE fingerprint = ? AND text_sha256 IN ({','.join('?' * len(chunk))})",
                    [fingerprint, *chunk],
                )
                removed += cur.rowcount
        return removed

    def count(self, fingerprint: str | None = None) -> int:
        with self._lock:
            if fingerprint is None:
                return self._db.execute("SELECT COUNT(*) FROM predictions").fetchone()[0]
            return self._db.execute("SELECT COUNT(*) FROM predictions WHERE fingerprint = ?", (fingerprint,)).fetchone()[0]

    def close(self) -> None:
        with self._lock:
            self._db.close()

    def __enter__(self) -> "PredictionCache":
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()
