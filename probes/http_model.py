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

- a 5xx status, a refused or dropped connection, or no complete answer within ``--timeout``
  seconds is retried up to ``--retries`` times, waiting 0.25 s, 0.5 s, 1 s, ... (doubling, at
  most 8 s; a numeric ``Retry-After`` header is honoured up to the same cap). When the retries
  run out the run fails with the last status or error, the URL and the batch.
  ``--timeout`` is a deadline for each attempt as a whole (connecting, sending the batch,
  receiving the whole answer), not for each read: a server that trickles its answer byte by
  byte is cut off at the deadline. A batch therefore takes at most (retries + 1) x timeout
  plus the waits between attempts.
- a 4xx status is the request's fault and is not retried: the error shows the status and the
  first 200 characters of the response body.
- a 200 answer that is not the JSON above fails at once.

Batches run in threads (``--concurrency``). When the run ends early (an error in another batch,
Ctrl-C, SIGTERM), :meth:`HttpModel.abort` cuts the connections of the batches in flight, so
pairflip exits at once instead of when their deadlines pass. The model is fingerprinted by its
URL alone, so pass ``--cache-key`` (a model version), use a fresh ``--cache`` file or a versioned
URL when the model behind the URL changes. Proxies from the environment are used, except for
loopback addresses.
"""

from __future__ import annotations

import heapq
import http.client
import itertools
import json
import socket
import threading
import time
import urllib.error
import urllib.parse
import urllib.request
from typing import Any, Sequence

from pairflip.probes.adapters import Model
from pairflip.probes.batching import ModelError, build_predictions, check_run_options
from pairflip.records import PairflipError, Prediction

LOOPBACK = {"127.0.0.1", "localhost", "::1"}
BODY_SHOWN = 200


class _Attempt:
    """One try at a batch: its deadline and the sockets it opened, so the watchdog (at the
    deadline) or abort() can cut them off while a thread is blocked reading."""

    __slots__ = ("deadline", "cut", "_socks", "_lock")

    def __init__(self, deadline: float) -> None:
        self.deadline = deadline
        self.cut: str | None = None  # None, "deadline" or "abort"
        self._socks: list[socket.socket] = []
        self._lock = threading.Lock()

    def track(self, sock: socket.socket) -> None:
        with self._lock:
            if self.cut is None:
                self._socks.append(sock)
                return
        _shut(sock)
        raise TimeoutError("the attempt was cut off")

    def cut_off(self, why: str) -> None:
        with self._lock:
            if self.cut is not None:
                return
            self.cut, socks, self._socks = why, self._socks, []
        for sock in socks:
            _shut(sock)

    def done(self) -> None:
        with self._lock:
            self.cut = self.cut or "done"
            self._socks = []


def _shut(sock: socket.socket) -> None:
    """Wake a thread blocked on ``sock`` (shutdown does, close alone does not) and close it."""
    try:
        sock.shutdown(socket.SHUT_RDWR)
    except OSError:
        pass
    try:
        sock.close()
    except OSError:  # pragma: no cover
        pass


class _Watchdog:
    """One thread per model that cuts off each attempt at its deadline (cheaper than a timer
    thread per request)."""

    def __init__(self) -> None:
        self._cond = threading.Condition()
        self._heap: list[tuple[float, int, _Attempt]] = []
        self._order = itertools.count()
        self._thread: threading.Thread | None = None

    def watch(self, attempt: _Attempt) -> None:
        with self._cond:
            heapq.heappush(self._heap, (attempt.deadline, next(self._order), attempt))
            if self._thread is None:
                self._thread = threading.Thread(target=self._run, daemon=True, name="pairflip-http-deadlines")
                self._thread.start()
            self._cond.notify()

    def _run(self) -> None:
        while True:
            with self._cond:
                now = time.monotonic()
                due = []
                while self._heap and self._heap[0][0] <= now:
                    due.append(heapq.heappop(self._heap)[2])
                if not due:
                    self._cond.wait(self._heap[0][0] - now if self._heap else None)
                    continue
            for attempt in due:
                attempt.cut_off("deadline")


_current = threading.local()  # the attempt the calling thread is making


def _track_socket(conn: http.client.HTTPConnection) -> None:
    attempt = getattr(_current, "attempt", None)
    if attempt is not None and conn.sock is not None:
        attempt.track(conn.sock)


class _HTTPConnection(http.client.HTTPConnection):
    def connect(self) -> None:
        super().connect()
        _track_socket(self)


class _HTTPSConnection(http.client.HTTPSConnection):
    def connect(self) -> None:
        super().connect()
        _track_socket(self)  # the TLS socket, once the handshake is done


class _HTTPHandler(urllib.request.HTTPHandler):
    def http_open(self, req: urllib.request.Request) -> http.client.HTTPResponse:
        return self.do_open(_HTTPConnection, req)


class _HTTPSHandler(urllib.request.HTTPSHandler):
    def https_open(self, req: urllib.request.Request) -> http.client.HTTPResponse:
        kw: dict[str, Any] = {"context": self._context}
        if hasattr(self, "_check_hostname"):  # Python < 3.12
            kw["check_hostname"] = self._check_hostname
        return self.do_open(_HTTPSConnection, req, **kw)


class HttpModel(Model):
    """POST each batch as JSON; retry 5xx, connection errors and time-outs with backoff."""

    kind = "http"
    parallel = True
    key_covers = "the URL only (not the model behind it)"

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
        check_run_options(timeout=timeout, retries=retries)
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
        self._watchdog = _Watchdog()
        self._live: set[_Attempt] = set()
        self._live_lock = threading.Lock()
        handlers: list[Any] = [_HTTPHandler(), _HTTPSHandler()]
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
        """One attempt, cut off at its deadline: (status or None, body, reason, Retry-After).
        Raises ModelError on 4xx, and when abort() cut it off."""
        attempt = _Attempt(time.monotonic() + self.timeout)
        with self._live_lock:
            if self._closed.is_set():
                raise ModelError(f"stopped before sending the batch to {self.url}: the run is ending")
            self._live.add(attempt)
        self._watchdog.watch(attempt)
        _current.attempt = attempt
        try:
            result = self._attempt(body)
        finally:
            _current.attempt = None
            with self._live_lock:
                self._live.discard(attempt)
            cut = attempt.cut
            attempt.done()
        if cut == "abort":
            raise ModelError(f"stopped waiting for {self.url}: the run is ending")
        if cut == "deadline":  # even a 200: a body without a length may have been cut short
            return None, b"", f"no answer within --timeout {self.timeout:g} s", None
        return result

    def _attempt(self, body: bytes) -> tuple[int | None, bytes, str, str | None]:
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

    def abort(self) -> None:
        """The run is ending early: cut off every request in flight and stop retrying."""
        with self._live_lock:
            self._closed.set()
            live = list(self._live)
        for attempt in live:
            attempt.cut_off("abort")

    def close(self) -> None:
        """Stop retrying: batches still in flight give up at their next backoff wait."""
        self._closed.set()
