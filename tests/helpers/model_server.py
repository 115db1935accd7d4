"""A small HTTP model server on 127.0.0.1 (an ephemeral port), run in a thread by a test.

POST ``{"texts": [...]}`` -> ``{"labels": [...], "probabilities": [...], "classes": [...]}`` from
:mod:`keyword_rules`. ``faults(batch_key)`` gives, for each batch, the faults to inject into its
first attempts in order (``"503"``, ``"stall"``: sleep past the client's timeout, then answer;
``"trickle"``: send the answer one byte every ``trickle_seconds``, so every single read is quick
but the whole answer is slow); every later attempt is answered normally, so the number of
failures is bounded. A stall ends early when the server is shut down.
"""

from __future__ import annotations

import hashlib
import json
import threading
import time
from collections import Counter
from http.server import BaseHTTPRequestHandler, ThreadingHTTPServer
from typing import Callable

from helpers.keyword_rules import answer


def batch_key(texts: list[str]) -> str:
    return hashlib.sha256(json.dumps(texts).encode("utf-8")).hexdigest()


def every_third_fault_plan(key: str) -> list[str]:
    """About a third of batches answer at once, a third fail once (503), a third fail twice
    (a stall past the timeout, then a 503), decided by the batch's content."""
    n = int(key[:8], 16) % 3
    return [[], ["503"], ["stall", "503"]][n]


class ModelServer:
    def __init__(
        self,
        *,
        faults: Callable[[str], list[str]] | None = None,
        stall_seconds: float = 1.5,
        trickle_seconds: float = 0.5,
        status: int | None = None,
        body: bytes | None = None,
        with_probabilities: bool = True,
        path: str = "/predict",
    ) -> None:
        self.faults = faults or (lambda key: [])
        self.stall_seconds = stall_seconds
        self.trickle_seconds = trickle_seconds
        self.trickles_finished = 0  # trickled answers that reached their last byte
        self.stalling = 0  # requests being stalled right now
        self._stopping = threading.Event()
        self.status = status  # answer every request with this status and body (4xx/5xx tests)
        self.body = body
        self.with_probabilities = with_probabilities
        self.path = path
        self.texts_answered: list[str] = []  # texts of successful answers
        self.requests = 0
        self.injected: Counter[str] = Counter()
        self._attempts: Counter[str] = Counter()
        self._lock = threading.Lock()
        self._httpd: ThreadingHTTPServer | None = None

    @property
    def url(self) -> str:
        assert self._httpd is not None
        host, port = self._httpd.server_address[:2]
        return f"http://{host}:{port}{self.path}"

    def _handle(self, handler: BaseHTTPRequestHandler) -> None:
        n = int(handler.headers.get("Content-Length") or 0)
        payload = json.loads(handler.rfile.read(n).decode("utf-8"))
        texts = payload["texts"]
        key = batch_key(texts)
        with self._lock:
            self.requests += 1
            attempt = self._attempts[key]
            self._attempts[key] += 1
        if self.status is not None:
            self._send(handler, self.status, self.body or b"")
            return
        plan = self.faults(key)
        fault = plan[attempt] if attempt < len(plan) else None
        if fault:
            with self._lock:
                self.injected[fault] += 1
        if fault == "503":
            self._send(handler, 503, b'{"error": "busy"}')
            return
        if fault == "stall":
            with self._lock:
                self.stalling += 1
            self._stopping.wait(self.stall_seconds)  # the client has given up by now
            with self._lock:
                self.stalling -= 1
        if fault == "trickle":
            self._trickle(handler, json.dumps(answer(texts, self.with_probabilities)).encode("utf-8"))
            return
        if self.body is not None:
            self._send(handler, 200, self.body)
            return
        out = answer(texts, self.with_probabilities)
        if fault is None:  # recorded before the answer leaves, so a client never sees it first
            with self._lock:
                self.texts_answered.extend(texts)
        self._send(handler, 200, json.dumps(out).encode("utf-8"))

    def _trickle(self, handler: BaseHTTPRequestHandler, body: bytes) -> None:
        """A status line and headers at once, then the body one byte at a time."""
        try:
            handler.send_response(200)
            handler.send_header("Content-Type", "application/json")
            handler.send_header("Content-Length", str(len(body)))
            handler.end_headers()
            handler.wfile.flush()
            for i in range(len(body)):
                if self._stopping.wait(self.trickle_seconds):
                    return
                if i == len(body) - 1:  # counted before the last byte leaves, so a client never sees it first
                    with self._lock:
                        self.trickles_finished += 1
                handler.wfile.write(body[i : i + 1])
                handler.wfile.flush()
        except (BrokenPipeError, ConnectionResetError):
            return  # the client gave up

    @staticmethod
    def _send(handler: BaseHTTPRequestHandler, status: int, body: bytes) -> None:
        try:
            handler.send_response(status)
            handler.send_header("Content-Type", "application/json")
            handler.send_header("Content-Length", str(len(body)))
            handler.end_headers()
            handler.wfile.write(body)
        except (BrokenPipeError, ConnectionResetError):
            pass  # the client timed out and left

    def __enter__(self) -> "ModelServer":
        server = self

        class Handler(BaseHTTPRequestHandler):
            def do_POST(self) -> None:  # noqa: N802 - http.server's naming
                if self.path != server.path:
                    server._send(self, 404, b"no model here")
                    return
                server._handle(self)

            def log_message(self, *args: object) -> None:  # keep test output quiet
                pass

        class QuietServer(ThreadingHTTPServer):
            daemon_threads = True

            def handle_error(self, request, client_address) -> None:  # noqa: ANN001
                pass

        self._httpd = QuietServer(("127.0.0.1", 0), Handler)
        self._thread = threading.Thread(target=self._httpd.serve_forever, kwargs={"poll_interval": 0.05}, daemon=True)
        self._thread.start()
        return self

    def __exit__(self, *exc: object) -> None:
        assert self._httpd is not None
        self._stopping.set()
        self._httpd.shutdown()
        self._httpd.server_close()
        self._thread.join(timeout=5)
