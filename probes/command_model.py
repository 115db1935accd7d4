"""``--model cmd:COMMAND``: a model in any language, as a process speaking JSON Lines.

pairflip starts COMMAND once and keeps it running for the whole run (``--concurrency N`` may
start up to N copies, one per batch in flight). COMMAND is split into words the way a POSIX
shell would (``shlex.split``) but no shell runs it: wrap pipes or variables in ``sh -c '...'``.

Protocol, one JSON object per line, UTF-8, each line ending in ``\\n``:

- pairflip writes one request per batch to the process's stdin, with an ``id`` (a whole
  number, new for every request)::

      {"id": 1, "texts": ["The tent kept us dry.", "The zip broke on day two."]}

- the process answers each request with exactly one line on stdout, in the same order::

      {"labels": ["positive", "negative"]}
      {"id": 1, "labels": ["positive", "negative"], "probabilities": [[0.1, 0.9], [0.8, 0.2]], "classes": ["negative", "positive"]}

  ``labels`` holds one label per text; ``probabilities`` (optional) one row per text, each row
  one probability per entry of ``classes``, summing to 1. Without ``labels`` each label is the
  most probable class. ``{"error": "message"}`` reports a failure on that batch. ``id`` is
  optional in the answer; when it is there it must be the request's, so every answer is
  checked against its request.
- the process must flush stdout after each answer and print nothing else on stdout (logging
  goes to stderr; pairflip shows the end of stderr when the process fails). Blank lines are
  ignored. pairflip sets ``PYTHONUNBUFFERED=1`` so Python scripts flush by themselves.
- at the end pairflip closes stdin; the process should then exit.

One answer per request is checked: before each request pairflip makes sure nothing else is
waiting on the process's stdout, and at the end of the run it reads stdout until the process
exits (after a failed run, it looks at what each process left unread). A line nobody asked for,
or an answer with another request's ``id``, fails the run (exit 2): the process is out of step,
and the predictions that can no longer be trusted are removed from ``--cache`` again: the batch
it answered last, the batch the stray line's ``id`` names, and every batch whose answer carried
no ``id``, from every copy of the command, since without ids nothing shows where a shift began
(the same holds when an answer without ``id`` fails the checks: it may be another request's).
Echo ``id`` to have every answer checked on its own and keep the rest of the cache.

``--timeout`` is a deadline for the whole batch: sending the request and reading the answer.
A process that does not take its batch and answer within it is stopped; one that exits, prints
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
import itertools
import json
import os
import queue
import select
import shlex
import signal
import subprocess
import threading
import time
import weakref
from collections.abc import Sequence
from typing import Any

from pairflip.probes.adapters import Model
from pairflip.probes.batching import ModelError, build_predictions, check_run_options
from pairflip.records import PairflipError, Prediction

STDERR_TAIL_LINES = 20
CLOSE_GRACE = 2.0  # seconds the processes get to exit after their stdin is closed
MAX_HASHED_FILE = 64 << 20


def _kill(proc: subprocess.Popen[bytes]) -> None:
    if proc.poll() is None:
        try:
            if os.name == "posix":  # its own session (see _Worker): end the processes it started too
                os.killpg(proc.pid, signal.SIGKILL)
            else:  # pragma: no cover
                proc.kill()
        except OSError:  # pragma: no cover - already gone
            pass
    try:
        proc.wait(timeout=5)
    except subprocess.TimeoutExpired:  # pragma: no cover
        pass


def _shown(line: bytes, n: int = 120) -> str:
    return repr(line.decode("utf-8", "replace").strip()[:n])


ONE_LINE = "a cmd: model prints exactly one line per request on stdout (logging goes to stderr)"


class _Stdout:
    """What the process printed on stdout and pairflip has not taken yet: complete non-blank
    lines, and the bytes of a line still being written. Fed by the reader thread."""

    def __init__(self) -> None:
        self._cond = threading.Condition()
        self._lines: collections.deque[bytes] = collections.deque()
        self._partial = bytearray()
        self.ended = False

    def feed(self, chunk: bytes) -> None:
        with self._cond:
            self._partial += chunk
            if b"\n" not in chunk:
                return
            *complete, rest = self._partial.split(b"\n")
            self._partial = bytearray(rest)
            lines = [bytes(x) + b"\n" for x in complete if x.strip()]  # blank lines are ignored
            if lines:
                self._lines.extend(lines)
                self._cond.notify_all()

    def end(self) -> None:
        with self._cond:
            if self._partial.strip():  # a last line without its newline
                self._lines.append(bytes(self._partial))
            self._partial = bytearray()
            self.ended = True
            self._cond.notify_all()

    def take(self, deadline: float) -> bytes | None:
        """The next line, or None when stdout ended first; TimeoutError at the deadline."""
        with self._cond:
            while not self._lines:
                if self.ended:
                    return None
                left = deadline - time.monotonic()
                if left <= 0:
                    raise TimeoutError
                self._cond.wait(left)
            return self._lines.popleft()

    def unasked(self) -> bytes | None:
        """The first thing printed and not taken yet (a line, or the start of one), else None."""
        with self._cond:
            if self._lines:
                return self._lines[0]
            return bytes(self._partial) if self._partial.strip() else None

    def waiting(self) -> list[bytes]:
        """Everything printed and not taken yet."""
        with self._cond:
            return list(self._lines) + ([bytes(self._partial)] if self._partial.strip() else [])

    def wait_end(self, deadline: float) -> None:
        with self._cond:
            while not self.ended:
                left = deadline - time.monotonic()
                if left <= 0:
                    return
                self._cond.wait(left)


class _Sending(threading.Event):
    """One request handed to the writer thread; set when written (``ok``) or failed."""

    ok = False


class _Untrusted:
    """The texts whose predictions turned out untrustworthy in this run, over all processes of
    one model, and whether any process was caught out of step (then answers without an id are
    not trusted from any copy of the program)."""

    def __init__(self) -> None:
        self._lock = threading.Lock()
        self.texts: list[str] = []
        self.caught_out = False

    def add(self, texts: list[str], *, caught_out: bool) -> None:
        with self._lock:
            self.texts += texts
            self.caught_out = self.caught_out or caught_out


class _Worker:
    """One running copy of the command, with threads writing its stdin and draining its stdout
    and stderr, and the batches it answered in this run (to know which to retract)."""

    def __init__(self, argv: list[str], spec: str, untrusted: _Untrusted) -> None:
        self.untrusted = untrusted
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
        self.out = _Stdout()
        self.stderr: collections.deque[str] = collections.deque(maxlen=STDERR_TAIL_LINES)
        # (request id, texts, whether the answer echoed the id) of every batch accepted
        self.accepted: list[tuple[int, list[str], bool]] = []
        self.pending: int | None = None  # the id of the request sent and not answered yet
        self._outbox: queue.SimpleQueue[tuple[bytes, _Sending] | None] = queue.SimpleQueue()
        self._finalizer = weakref.finalize(self, _kill, self.proc)
        self._out_thread = threading.Thread(target=self._read_stdout, daemon=True, name="pairflip-cmd-out")
        self._out_thread.start()
        assert self.proc.stdin is not None
        self._stdin_fd: int | None = None
        if os.name == "posix":  # requests are written without blocking, up to the deadline
            self._stdin_fd = self.proc.stdin.fileno()
            os.set_blocking(self._stdin_fd, False)
        else:  # pragma: no cover - elsewhere a thread writes them
            threading.Thread(target=self._write_stdin, daemon=True, name="pairflip-cmd-in").start()
        self._err_thread = threading.Thread(target=self._read_stderr, daemon=True, name="pairflip-cmd-err")
        self._err_thread.start()

    def _read_stdout(self) -> None:
        assert self.proc.stdout is not None
        read = self.proc.stdout.read1
        try:
            while chunk := read(1 << 16):
                self.out.feed(chunk)
        except (OSError, ValueError):  # the pipe was closed by stop()
            pass
        finally:
            self.out.end()

    def _send(self, payload: bytes, deadline: float) -> bool | None:
        """Write one request before ``deadline``: True when written, False when the process is
        gone, None at the deadline. A write into a full pipe would wait until the process reads,
        so a process that stops reading must not block pairflip past the batch's deadline."""
        if self._stdin_fd is None:  # pragma: no cover - not POSIX
            sending = _Sending()
            self._outbox.put((payload, sending))
            if not sending.wait(max(deadline - time.monotonic(), 0.0)):
                return None
            return sending.ok
        view = memoryview(payload)
        try:
            while view:
                try:
                    view = view[os.write(self._stdin_fd, view):]
                    continue
                except BlockingIOError:  # the pipe is full: wait until the process reads
                    pass
                left = deadline - time.monotonic()
                if left <= 0:
                    return None
                select.select([], [self._stdin_fd], [], left)
        except (OSError, ValueError):  # it exited (broken pipe), or stop() closed the pipe
            return False
        return True

    def _write_stdin(self) -> None:  # pragma: no cover - not POSIX
        """Writes requests (where pipes cannot be written without blocking), so a process that
        stops reading cannot block pairflip past the batch's deadline."""
        stdin = self.proc.stdin
        assert stdin is not None
        while (item := self._outbox.get()) is not None:
            payload, sending = item
            try:
                stdin.write(payload)
                stdin.flush()
                sending.ok = True
            except (OSError, ValueError):  # it exited, or stop() closed the pipe
                pass
            sending.set()

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

    def suspects(self, bad_id: Any = None) -> list[str]:
        """The texts of accepted batches that can no longer be trusted once this process is
        found out of step: the last one, the one ``bad_id`` names, and every one whose answer
        did not echo its id (nothing shows where the shift began)."""
        last = self.accepted[-1][0] if self.accepted else None
        out = [t for rid, texts, matched in self.accepted if not matched or rid == last or rid == bad_id for t in texts]
        self.accepted.clear()
        self.untrusted.add(out, caught_out=True)
        return out

    def unmatched(self) -> list[str]:
        """Give up the batches whose answers carried no id (another copy of the program was
        caught out of step, so these may be shifted too)."""
        out = [t for _, texts, matched in self.accepted if not matched for t in texts]
        self.accepted = [a for a in self.accepted if a[2]]
        self.untrusted.add(out, caught_out=False)
        return out

    def unasked_error(self, after: str) -> ModelError | None:
        stray = self.out.unasked()
        if stray is None:
            return None
        return ModelError(f"the process printed a line it was not asked for {after}: {_shown(stray)}; {ONE_LINE}",
                          retract=self.suspects())

    def out_of_step(self) -> bool:
        """After a failed run: does what the process printed and pairflip never took show it
        was out of step? Any line, when no request was waiting for an answer; else a second
        line, or one that carries another request's id."""
        lines = self.out.waiting()
        if not lines:
            return False
        if self.pending is None or len(lines) > 1:
            return True
        try:
            got = json.loads(lines[0].decode("utf-8")).get("id", self.pending)
        except (UnicodeDecodeError, ValueError, AttributeError):
            return True
        return got != self.pending

    def request(self, payload: bytes, rid: int, deadline: float, timeout: float) -> bytes:
        """Send request ``rid`` and return the line that answers it, all before ``deadline``."""
        if self.accepted:
            last = self.accepted[-1][1]
            err = self.unasked_error(f"after its answer to the batch that began {(last[0] if last else '')[:50]!r}")
            if err is not None:
                raise err
        if self.out.ended:
            raise self.exited("before reading the batch")
        self.pending = rid
        sent = self._send(payload, deadline)
        if sent is None:
            self.stop()
            raise ModelError(
                f"no answer within --timeout {timeout:g} seconds (it had not even read the whole batch); "
                f"the process was stopped"
            )
        if not sent:
            raise self.exited("before reading the batch")
        try:
            line = self.out.take(deadline)
        except TimeoutError:
            self.stop()
            raise ModelError(
                f"no answer within --timeout {timeout:g} seconds; the process was stopped "
                f"(does it flush stdout after each line?)"
            ) from None
        if line is None:
            raise self.exited("before answering")
        self.pending = None
        return line

    def close_stdin(self) -> None:
        self._outbox.put(None)  # the writer thread ends; then nothing else writes to stdin
        if self.proc.poll() is None:
            try:
                assert self.proc.stdin is not None
                self.proc.stdin.close()
            except OSError:
                pass

    def kill(self) -> None:
        """End the process (and what it started); its output is still read to the end."""
        _kill(self.proc)

    def stop(self) -> None:
        _kill(self.proc)
        self._out_thread.join(timeout=1.0)  # what it printed before it died is read, not cut off
        self._outbox.put(None)
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
    key_covers = "the command and the bytes of its program and script (not other files it reads)"

    def __init__(self, spec: str, *, timeout: float = 30.0) -> None:
        command = spec[4:] if spec.startswith("cmd:") else spec
        try:
            argv = shlex.split(command)
        except ValueError as err:
            raise PairflipError(f"--model {spec}: cannot split the command into words ({err})") from None
        if not argv:
            raise PairflipError(f"--model {spec!r}: no command after 'cmd:'; expected for example cmd:python my_model.py")
        check_run_options(timeout=timeout)
        self.spec = spec if spec.startswith("cmd:") else f"cmd:{spec}"
        self.name = self.spec
        self.argv = argv
        self.timeout = float(timeout)
        self._idle: list[_Worker] = []
        self._all: list[_Worker] = []
        self._lock = threading.Lock()
        self._fp: str | None = None
        self._ids = itertools.count(1)
        self._untrusted = _Untrusted()
        self._busy = 0  # predict() calls in progress
        self._idle_cond = threading.Condition(self._lock)
        self.started = 0  # processes started so far (several with --concurrency, or after a failure)

    def _take(self) -> _Worker:
        with self._lock:
            while self._idle:
                w = self._idle.pop()
                if w.proc.poll() is None:
                    return w
                if w.out.unasked() is None:  # exited after its last answer: nothing left to check
                    w.stop()
                    continue
                return w  # it printed more before it exited: request() says so
            self.started += 1
        w = _Worker(self.argv, self.spec, self._untrusted)
        with self._lock:
            self._all.append(w)
        return w

    def _give_back(self, w: _Worker) -> None:
        with self._lock:
            self._idle.append(w)

    @staticmethod
    def _retire(w: _Worker) -> None:
        w.stop()  # out of step with the protocol or dead: never reuse it

    def predict(self, texts: list[str]) -> Sequence[Prediction]:
        texts = list(texts)
        rid = next(self._ids)
        payload = (json.dumps({"id": rid, "texts": texts}, ensure_ascii=True) + "\n").encode("ascii")
        with self._lock:
            self._busy += 1
        try:
            return self._predict(texts, rid, payload)
        finally:
            with self._lock:
                self._busy -= 1
                self._idle_cond.notify_all()

    def _predict(self, texts: list[str], rid: int, payload: bytes) -> Sequence[Prediction]:
        w = self._take()
        ok = False
        try:
            line = w.request(payload, rid, time.monotonic() + self.timeout, self.timeout)
            matched, obj = self._check_answer(w, line, rid)
            if obj.get("error") is not None:
                ok = True  # the process is fine and in step; the batch failed
                raise ModelError(f"the process reported an error: {str(obj['error'])[:300]}")
            try:
                preds = build_predictions(
                    len(texts), labels=obj.get("labels"), probabilities=obj.get("probabilities"), classes=obj.get("classes"),
                )
            except ModelError as err:  # without an id, a wrong answer may be another request's
                raise ModelError(str(err), retract=() if matched else w.suspects()) from None
            w.accepted.append((rid, texts, matched))
            ok = True
            return preds
        finally:
            if ok:
                self._give_back(w)
            else:
                self._retire(w)

    @staticmethod
    def _check_answer(w: _Worker, line: bytes, rid: int) -> tuple[bool, dict[str, Any]]:
        """The answer as a JSON object, and whether it echoed the request's id (an id that is not
        the request's is refused)."""
        try:
            obj = json.loads(line.decode("utf-8"))
        except (UnicodeDecodeError, json.JSONDecodeError):
            raise ModelError(
                f"the process printed a line that is not JSON: {_shown(line, 200)}; expected one JSON object "
                f'per batch such as {{"labels": [...]}} (print logging to stderr)',
                retract=w.suspects(),
            ) from None
        if not isinstance(obj, dict):
            raise ModelError(f"the process printed {type(obj).__name__} {str(obj)[:100]}, expected a JSON object with 'labels'",
                             retract=w.suspects())
        if "id" not in obj:
            return False, obj
        got = obj["id"]
        if type(got) is not int or got != rid:
            raise ModelError(
                f"the answer carries the id {got!r}, but the request had the id {rid}: the process's answers are out "
                f"of step with its requests ({ONE_LINE}, in order)",
                retract=w.suspects(bad_id=got),
            )
        return True, obj

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

    def finish(self) -> None:
        """The run's last batch is in: close every process's stdin, read what each still prints
        until it exits (at most CLOSE_GRACE seconds in all), and raise a ModelError when one
        printed a line nobody asked for after its last answer."""
        with self._lock:
            workers, self._all, self._idle = self._all, [], []
        errors = [e for e in self._end(workers, check=True) if e is not None]
        if errors:
            for w in workers:
                w.unmatched()
            raise ModelError(str(errors[0]), retract=list(self._untrusted.texts))

    def abort(self) -> None:
        """End every process at once (the run is ending on an error or an interrupt): the
        batches in flight fail at once instead of waiting for their answers."""
        with self._lock:
            workers = list(self._all)
        for w in workers:
            w.kill()

    def doubtful(self) -> list[str]:
        """After a failed or interrupted run: end the processes, let the batches still in flight
        fail, and return every text whose prediction in this run can no longer be trusted: the
        batches of processes found out of step (by their own checks, or now by the output they
        left unread, see :meth:`_Worker.out_of_step`), and, once any copy was caught out of step,
        every batch whose answer carried no id."""
        with self._lock:
            workers = list(self._all)
        for w in workers:
            w.kill()
        deadline = time.monotonic() + 3.0
        with self._idle_cond:
            while self._busy and (left := deadline - time.monotonic()) > 0:
                self._idle_cond.wait(left)
        for w in workers:
            w.out.wait_end(deadline)
            if w.out_of_step():
                w.suspects()
        if self._untrusted.caught_out:
            for w in workers:
                w.unmatched()
        return list(self._untrusted.texts)

    def close(self) -> None:
        with self._lock:
            workers, self._all, self._idle = self._all, [], []
        self._end(workers, check=False)

    @staticmethod
    def _end(workers: list[_Worker], *, check: bool) -> list[ModelError | None]:
        for w in workers:
            w.close_stdin()
        deadline = time.monotonic() + CLOSE_GRACE
        errors = []
        for w in workers:
            w.out.wait_end(deadline)
            if check:
                errors.append(w.unasked_error("after its last answer"))
            w.stop()
        return errors
