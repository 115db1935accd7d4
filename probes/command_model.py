"""``--model cmd:COMMAND``: a model in any language, as a process speaking JSON Lines.

pairflip starts COMMAND once and keeps it running for the whole run (``--concurrency N`` may
start up to N copies, one per batch in flight). COMMAND is split into words the way a POSIX
shell would (``shlex.split``) but no shell runs it: wrap pipes or variables in ``sh -c '...'``.

Protocol, one JSON object per line, UTF-8, each line ending in ``\\n``:

- pairflip writes one request per batch to the process's stdin::

      {"texts": ["The tent kept us dry.", "The zip broke on day two."]}

- the process answers each request with exactly one line on stdout, in the same order::

      {"labels": ["positive", "negative"]}
      {"labels": ["positive", "negative"], "probabilities": [[0.1, 0.9], [0.8, 0.2]], "classes": ["negative", "positive"]}

  ``labels`` holds one label per text; ``probabilities`` (optional) one row per text, each row
  one probability per entry of ``classes``, summing to 1. Without ``labels`` each label is the
  most probable class. ``{"error": "message"}`` reports a failure on that batch.
- the process must flush stdout after each answer and print nothing else on stdout (logging
  goes to stderr; pairflip shows the end of stderr when the process fails). Blank lines are
  ignored. pairflip sets ``PYTHONUNBUFFERED=1`` so Python scripts flush by themselves.
- at the end pairflip closes stdin; the process should then exit.

A process that does not answer within ``--timeout`` seconds is stopped; one that exits, prints
a line that is not JSON, or gives the wrong number of outputs fails the run with a message naming
the command and the batch. Failures are not retried (a crashing or hanging model is a bug to
fix), but every batch finished before is kept in ``--cache``.

A minimal Python model (``cmd:python my_model.py``)::

    import json, sys
    for line in sys.stdin:
        texts = json.loads(line)["texts"]
        labels = ["negative" if " not " in f" {t.lower()} " else "positive" for t in texts]
        print(json.dumps({"labels": labels}), flush=True)

The fingerprint (prediction cache key) is the command plus the bytes of its first two words
when they are files (the program, and the script an interpreter runs), so editing the script
invalidates its cached predictions. Other files the command names (a model file given as an
option) are not hashed: change the command, or use a new ``--cache``, when they change.
"""

from __future__ import annotations

import collections
import hashlib
import json
import os
import queue
import shlex
import subprocess
import threading
import time
import weakref
from collections.abc import Sequence

from pairflip.probes.adapters import Model
from pairflip.probes.batching import ModelError, build_predictions
from pairflip.records import PairflipError, Prediction

_EOF = None
STDERR_TAIL_LINES = 20
MAX_HASHED_FILE = 64 << 20


def _kill(proc: subprocess.Popen[bytes]) -> None:
    if proc.poll() is None:
        try:
            proc.kill()
        except OSError:  # pragma: no cover - already gone
            pass
    try:
        proc.wait(timeout=5)
    except subprocess.TimeoutExpired:  # pragma: no cover
        pass


class _Worker:
    """One running copy of the command, with threads draining its stdout and stderr."""

    def __init__(self, argv: list[str], spec: str) -> None:
        env = dict(os.environ, PYTHONUNBUFFERED="1", PYTHONIOENCODING="utf-8")
        try:
            self.proc = subprocess.Popen(
                argv, stdin=subprocess.PIPE, stdout=subprocess.PIPE, stderr=subprocess.PIPE, env=env,
                # its own session: a Ctrl-C in the terminal reaches pairflip, which then closes
                # the model cleanly, instead of killing the model in the middle of a batch
                start_new_session=(os.name == "posix"),
            )
        except FileNotFoundError:
            raise PairflipError(f"--model {spec}: cannot start {argv[0]!r}: no such program") from None
        except PermissionError:
            raise PairflipError(f"--model {spec}: cannot start {argv[0]!r}: permission denied (not executable?)") from None
        except OSError as err:
            raise PairflipError(f"--model {spec}: cannot start {argv[0]!r}: {err}") from None
        self.lines: queue.Queue[bytes | None] = queue.Queue()
        self.stderr: collections.deque[str] = collections.deque(maxlen=STDERR_TAIL_LINES)
        self._finalizer = weakref.finalize(self, _kill, self.proc)
        threading.Thread(target=self._read_stdout, daemon=True, name="pairflip-cmd-out").start()
        self._err_thread = threading.Thread(target=self._read_stderr, daemon=True, name="pairflip-cmd-err")
        self._err_thread.start()

    def _read_stdout(self) -> None:
        assert self.proc.stdout is not None
        try:
            for line in iter(self.proc.stdout.readline, b""):
                self.lines.put(line)
        except (OSError, ValueError):  # the pipe was closed by stop()
            pass
        self.lines.put(_EOF)

    def _read_stderr(self) -> None:
        assert self.proc.stderr is not None
        try:
            for line in iter(self.proc.stderr.readline, b""):
                self.stderr.append(line.decode("utf-8", "replace").rstrip("\n"))
        except (OSError, ValueError):  # the pipe was closed by stop()
            pass

    def stderr_tail(self) -> str:
        self._err_thread.join(timeout=1.0)
        tail = " | ".join(x for x in self.stderr if x.strip())
        return tail[-600:] if tail else ""

    def exited(self, during: str) -> ModelError:
        try:
            code = self.proc.wait(timeout=5)
        except subprocess.TimeoutExpired:
            _kill(self.proc)
            code = self.proc.returncode
        tail = self.stderr_tail()
        what = f"exited with code {code}" if code is not None and code >= 0 else f"was killed by signal {-(code or 0)}"
        return ModelError(
            f"the process {what} {during}" + (f"; its stderr ended with: {tail}" if tail else " (its stderr was empty)")
        )

    def request(self, payload: bytes, timeout: float) -> bytes:
        assert self.proc.stdin is not None
        try:
            self.proc.stdin.write(payload)
            self.proc.stdin.flush()
        except (BrokenPipeError, ConnectionResetError, ValueError):
            raise self.exited("before reading the batch") from None
        deadline = time.monotonic() + timeout
        while True:
            left = deadline - time.monotonic()
            try:
                line = self.lines.get(timeout=max(left, 0.0)) if left > 0 else self.lines.get_nowait()
            except queue.Empty:
                self.stop()
                raise ModelError(
                    f"no answer within --timeout {timeout:g} seconds; the process was stopped "
                    f"(does it flush stdout after each line?)"
                ) from None
            if line is _EOF:
                raise self.exited("before answering")
            if line.strip():
                return line

    def close(self, grace: float = 2.0) -> None:
        if self.proc.poll() is None:
            try:
                assert self.proc.stdin is not None
                self.proc.stdin.close()
            except OSError:
                pass
            try:
                self.proc.wait(timeout=grace)
            except subprocess.TimeoutExpired:
                pass
        self.stop()

    def stop(self) -> None:
        _kill(self.proc)
        for f in (self.proc.stdin, self.proc.stdout, self.proc.stderr):
            try:
                if f is not None:
                    f.close()
            except OSError:  # pragma: no cover
                pass
        self._finalizer.detach()


class CommandModel(Model):
    """A model process (or several, one per concurrent batch) speaking JSON Lines; see the module docs."""

    kind = "command"
    parallel = True

    def __init__(self, spec: str, *, timeout: float = 30.0) -> None:
        command = spec[4:] if spec.startswith("cmd:") else spec
        try:
            argv = shlex.split(command)
        except ValueError as err:
            raise PairflipError(f"--model {spec}: cannot split the command into words ({err})") from None
        if not argv:
            raise PairflipError(f"--model {spec!r}: no command after 'cmd:'; expected for example cmd:python my_model.py")
        if not timeout > 0:
            raise PairflipError(f"--timeout must be a number of seconds > 0, got {timeout}")
        self.spec = spec if spec.startswith("cmd:") else f"cmd:{spec}"
        self.name = self.spec
        self.argv = argv
        self.timeout = float(timeout)
        self._idle: list[_Worker] = []
        self._all: list[_Worker] = []
        self._lock = threading.Lock()
        self._fp: str | None = None
        self.started = 0  # processes started so far (several with --concurrency, or after a failure)

    def _take(self) -> _Worker:
        with self._lock:
            while self._idle:
                w = self._idle.pop()
                if w.proc.poll() is None:
                    return w
                w.stop()
            self.started += 1
        w = _Worker(self.argv, self.spec)
        with self._lock:
            self._all.append(w)
        return w

    def _give_back(self, w: _Worker) -> None:
        with self._lock:
            self._idle.append(w)

    def predict(self, texts: list[str]) -> Sequence[Prediction]:
        payload = (json.dumps({"texts": list(texts)}, ensure_ascii=True) + "\n").encode("ascii")
        w = self._take()
        ok = False
        try:
            line = w.request(payload, self.timeout)
            try:
                obj = json.loads(line.decode("utf-8"))
            except (UnicodeDecodeError, json.JSONDecodeError):
                shown = line.decode("utf-8", "replace").strip()
                raise ModelError(
                    f"the process printed a line that is not JSON: {shown[:200]!r}; expected one JSON object "
                    f'per batch such as {{"labels": [...]}} (print logging to stderr)'
                ) from None
            if not isinstance(obj, dict):
                raise ModelError(f"the process printed {type(obj).__name__} {str(obj)[:100]}, expected a JSON object with 'labels'")
            if obj.get("error") is not None:
                ok = True  # the process is fine and in step; the batch failed
                raise ModelError(f"the process reported an error: {str(obj['error'])[:300]}")
            preds = build_predictions(
                len(texts), labels=obj.get("labels"), probabilities=obj.get("probabilities"), classes=obj.get("classes"),
            )
            ok = True
            return preds
        finally:
            if ok:
                self._give_back(w)
            else:
                w.stop()  # out of step with the protocol or dead: never reuse it

    def fingerprint(self) -> str:
        if self._fp is None:
            h = hashlib.sha256(self.spec.encode("utf-8"))
            for word in self.argv[:2]:  # the program and (for an interpreter) its script
                try:
                    if os.path.isfile(word) and os.path.getsize(word) <= MAX_HASHED_FILE:
                        with open(word, "rb") as fh:
                            h.update(hashlib.sha256(fh.read()).digest())
                except OSError:
                    pass
            self._fp = h.hexdigest()
        return self._fp

    def close(self) -> None:
        with self._lock:
            workers, self._all, self._idle = self._all, [], []
        for w in workers:
            w.close()
