"""Where the work runs (``--engine``): ``local`` (this process, the default) or ``ray``.

The Ray engine is an optional extra (``pip install "pairflip[ray]"``). Without ``--address`` it
starts a local Ray instance sized to this machine and stops it at the end; with ``--address`` it
joins that cluster (``auto``: the one Ray finds, e.g. through ``RAY_ADDRESS``). A Ray connection
the caller already made (``ray.init()`` in a notebook, a test fixture) is used as it is and left
running. The stage code lives beside its stage: :mod:`pairflip.perturb.ray_build` and
:mod:`pairflip.probes.ray_score`.
"""

from __future__ import annotations

import logging
import os
import signal
from contextlib import contextmanager
from typing import Any, Iterator

from pairflip.records import PairflipError

ENGINES = ("local", "ray")
DEFAULT_ENGINE = "local"
INSTALL_HINT = 'pip install "pairflip[ray]"'


def check_engine(engine: str, *, address: str | None = None, replicas: int | None = None,
                 shards: int | None = None) -> str:
    """The engine name, checked with the options that only it takes (before any work)."""
    if engine not in ENGINES:
        raise PairflipError(f"--engine {engine!r}: expected 'local' (this process) or 'ray' (a Ray instance or cluster)")
    for name, value in (("replicas", replicas), ("shards", shards)):
        if value is None:
            continue
        if isinstance(value, bool) or not isinstance(value, int) or value < 1:
            raise PairflipError(f"--{name} {value!r}: expected a whole number of at least 1")
    if engine == "local":
        given = [f"--{n}" for n, v in (("address", address), ("replicas", replicas), ("shards", shards)) if v is not None]
        if given:
            raise PairflipError(f"{', '.join(given)}: only used with --engine ray; add --engine ray or leave them out")
    if address is not None and not address.strip():
        raise PairflipError("--address '': expected a Ray cluster address such as 10.0.0.5:6379 (the head node) or auto")
    return engine


def import_ray() -> Any:
    """The ``ray`` module, or a PairflipError saying how to install it."""
    try:
        import ray
    except ImportError:
        raise PairflipError(f"--engine ray: Ray is not installed; install it with {INSTALL_HINT}") from None
    return ray


@contextmanager
def ray_session(address: str | None = None) -> Iterator[Any]:
    """Yield the ``ray`` module, connected: to ``address``, or to a new local instance (stopped
    at the end), or to the connection the caller already had (left as it is)."""
    ray = import_ray()
    if ray.is_initialized():
        yield ray
        return
    # No usage report leaves the machine (Ray's own switch; it would try the network).
    os.environ.setdefault("RAY_USAGE_STATS_ENABLED", "0")
    # ray.init installs its own SIGTERM handler (sys.exit); the command line's handlers, which
    # turn SIGINT/SIGTERM into a clean stop, are put back.
    if address is not None:
        _probe(address)
    handlers = {s: signal.getsignal(s) for s in (signal.SIGINT, signal.SIGTERM)}
    try:
        if address is None:
            ray.init(address="local", num_cpus=os.cpu_count() or 1, include_dashboard=False, log_to_driver=False,
                     logging_level=logging.ERROR)
        else:
            ray.init(address=address, log_to_driver=False, logging_level=logging.ERROR)
    except SystemExit as err:
        # a SIGTERM while ray.init runs reaches Ray's handler: hand it to the one that was in force
        # (the command line's, which stops cleanly with exit 143), as if it had come a moment later
        before = handlers.get(signal.SIGTERM)
        if err.code == signal.SIGTERM and callable(before):
            _restore(handlers)
            before(signal.SIGTERM, None)
        raise
    except Exception as err:  # ConnectionError, ValueError, RuntimeError: each says why in its text
        first = (str(err).strip().splitlines() or [type(err).__name__])[0]
        where = f"--address {address}: cannot join the Ray cluster" if address else "--engine ray: cannot start a local Ray instance"
        raise PairflipError(f"{where} ({first[:300]})") from None
    finally:
        _restore(handlers)
    try:
        yield ray
    finally:
        try:
            ray.shutdown()
        finally:
            _restore(handlers)


def _probe(address: str) -> None:
    """A HOST:PORT address that nothing answers fails at once: Ray itself retries for minutes."""
    import socket

    host, sep, port = address.strip().rpartition(":")
    if not sep or not port.isdigit() or "://" in address:
        return  # "auto" or another form: Ray's own lookup says what is wrong
    try:
        socket.create_connection((host.strip("[]"), int(port)), timeout=PROBE_SECONDS).close()
    except OSError as err:
        reason = err.strerror or type(err).__name__
        raise PairflipError(f"--address {address}: no Ray head node answers there ({reason}); "
                            f"expected the HOST:PORT that `ray start --head` printed") from None


PROBE_SECONDS = 5.0


def _restore(handlers: dict[int, Any]) -> None:
    try:
        for s, h in handlers.items():
            signal.signal(s, h if h is not None else signal.SIG_DFL)
    except ValueError:  # not the main thread: nothing was installed here either
        pass


def cluster_cpus(ray: Any) -> int:
    """CPUs of the connected Ray instance or cluster (at least 1)."""
    try:
        return max(1, int(ray.cluster_resources().get("CPU", 1)))
    except Exception:  # an old or unreachable GCS: one worker still works
        return 1


def remote_error(err: BaseException) -> str:
    """One line for an error that came back from Ray (a worker died, a task failed)."""
    cause = getattr(err, "cause", None)
    if isinstance(cause, BaseException) and not isinstance(cause, type(err)):
        err = cause
    text = " ".join(str(err).split())
    return f"{type(err).__name__}: {text[:300]}" if text else type(err).__name__
