"""``--model http://host:port/path``: a model behind a JSON endpoint (standard library urllib).

Each batch is one request::

    POST /path   Content-Type: application/json
    {"texts": ["The tent kept us dry.", "The zip broke on day two."]}

answered with status 200 and::

    {"labels": ["positive", "negative"]}
    {"labels": [...], "probabilities": [[0.1, 0.9], [0.8, 0.2]], "classes": ["negative", "positive"]}

(one label per text; optionally one probability row per text over ``classes``; without
``labels`` each label is the most probable class).

Failures:

- a 5xx status, a refused or dropped connection, or no answer within ``--timeout`` seconds (per
  socket operation) is retried up to ``--retries`` times, waiting 0.25 s, 0.5 s, 1 s, ... (doubling,
  at most 8 s; a numeric ``Retry-After`` header is honoured up to the same cap). When the retries
  run out the run fails with the last status or error, the URL and the batch.
- a 4xx status is the request's fault and is not retried: the error shows the status and the
  first 200 characters of the response body.
- a 200 answer that is not the JSON above fails at once.

Batches run in threads (``--concurrency``); the model is fingerprinted by its URL alone, so use
a fresh ``--cache`` file (or a versioned URL) when the model behind the URL changes. Proxies from
the environment are used, except for loopback addresses.
"""

from __future__ import annotations

import http.client
import json
import socket
import threading
import urllib.error
import urllib.parse
import urllib.request
from typing import Any, Sequence

from pairflip.probes.adapters import Model
from pairflip.probes.batching import ModelError, build_predictions
from pairflip.records import PairflipError, Prediction

LOOPBACK = {"127.0.0.1", "localhost", "::1"}
BODY_SHOWN = 200


class HttpModel(Model):
    """POST each batch as JSON; retry 5xx, connection errors and time-outs with backoff."""

    kind = "http"
    parallel = True

    def __init__(
        self,
        url: str,
        *,
        timeout: float = 30.0,
        retries: int = 3,
        backoff: float = 0.25,
        max_backoff: float = 8.0,
        headers: dict[str, str] | None = None,
    ) -> None:
        parts = urllib.parse.urlsplit(url)
        if parts.scheme not in ("http", "https") or not parts.hostname:
            raise PairflipError(f"--model {url}: not an http(s) URL with a host; expected http://host:port/path")
        try:
            parts.port
        except ValueError:
            raise PairflipError(f"--model {url}: the port is not a number between 0 and 65535") from None
        if not timeout > 0:
            raise PairflipError(f"--timeout must be a number of seconds > 0, got {timeout}")
        if not isinstance(retries, int) or retries < 0:
            raise PairflipError(f"--retries must be a whole number >= 0, got {retries!r}")
        self.spec = self.name = self.url = url
        self.timeout = float(timeout)
        self.retries = retries
        self.backoff = float(backoff)
        self.max_backoff = float(max_backoff)
        from pairflip import __version__

        self.headers = {
            "Content-Type": "application/json; charset=utf-8",
            "Accept": "application/json",
            "User-Agent": f"pairflip/{__version__}",
            **(headers or {}),
        }
        self._closed = threading.Event()
        handlers: list[Any] = []
        if parts.hostname in LOOPBACK:
            handlers.append(urllib.request.ProxyHandler({}))
        self._opener = urllib.request.build_opener(*handlers)

    def delay(self, attempt: int, retry_after: str | None = None) -> float:
        """Seconds to wait before retry number ``attempt`` (0-based): exponential, capped."""
        d = min(self.backoff * (2**attempt), self.max_backoff)
        if retry_after:
            try:
                d = max(d, min(float(retry_after), self.max_backoff))
            except ValueError:  # an HTTP date: keep the exponential delay
                pass
        return d

    def _post(self, body: bytes) -> tuple[int | None, bytes, str, str | None]:
        """One attempt: (status or None, body, reason, Retry-After). Raises ModelError on 4xx."""
        req = urllib.request.Request(self.url, data=body, headers=self.headers, method="POST")
        try:
            with self._opener.open(req, timeout=self.timeout) as resp:
                return resp.status, resp.read(), f"HTTP {resp.status}", None
        except urllib.error.HTTPError as err:
            try:
                text = err.read()
            except (OSError, http.client.HTTPException):
                text = b""
            finally:
                err.close()
            if 500 <= err.code < 600:
                return err.code, text, f"HTTP {err.code} {err.reason}", err.headers.get("Retry-After") if err.headers else None
            shown = text.decode("utf-8", "replace")[:BODY_SHOWN]
            raise ModelError(
                f"HTTP {err.code} {err.reason} from {self.url} (not retried); the response body begins: {shown!r}"
            ) from None
        except urllib.error.URLError as err:
            reason = err.reason
            if isinstance(reason, (TimeoutError, socket.timeout)):
                return None, b"", f"no answer within --timeout {self.timeout:g} s", None
            return None, b"", f"cannot connect ({reason})", None
        except (TimeoutError, socket.timeout):
            return None, b"", f"no answer within --timeout {self.timeout:g} s", None
        except (ConnectionError, http.client.HTTPException, OSError) as err:
            return None, b"", f"connection failed ({type(err).__name__}: {err})", None

    def predict(self, texts: list[str]) -> Sequence[Prediction]:
        body = json.dumps({"texts": list(texts)}, ensure_ascii=False).encode("utf-8")
        attempts = self.retries + 1
        for attempt in range(attempts):
            status, data, reason, retry_after = self._post(body)
            if status is not None and 200 <= status < 300:
                return self._parse(data, len(texts))
            if attempt + 1 < attempts:
                if self._closed.wait(self.delay(attempt, retry_after)):
                    raise ModelError(f"stopped retrying {self.url}: the run is ending ({reason})")
        raise ModelError(
            f"{reason} from {self.url}, after {attempts} attempt{'s' if attempts > 1 else ''} "
            f"({self.retries} retries with backoff; raise --retries or --timeout if the server is only slow)"
        )

    def _parse(self, data: bytes, n: int) -> Sequence[Prediction]:
        try:
            obj = json.loads(data.decode("utf-8"))
        except (UnicodeDecodeError, json.JSONDecodeError):
            shown = data.decode("utf-8", "replace")[:BODY_SHOWN]
            raise ModelError(
                f"the answer from {self.url} is not JSON (it begins {shown!r}); "
                f'expected {{"labels": [...]}}'
            ) from None
        if not isinstance(obj, dict):
            raise ModelError(f"the answer from {self.url} is a JSON {type(obj).__name__}, expected an object with 'labels'")
        if obj.get("error") is not None:
            raise ModelError(f"the server at {self.url} reported an error: {str(obj['error'])[:300]}")
        return build_predictions(n, labels=obj.get("labels"), probabilities=obj.get("probabilities"), classes=obj.get("classes"))

    def close(self) -> None:
        """Stop retrying: batches still in flight give up at their next backoff wait."""
        self._closed.set()
