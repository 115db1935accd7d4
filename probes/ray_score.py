"""``pairflip score --engine ray``: the model's batches predicted by Ray actors, the results the
same as a one-process run.

Each of ``replicas`` actors loads the model once with :func:`~pairflip.probes.adapters.load_model`
(joblib/skops files, ``module:name``, ``onnx:DIR``; HTTP and ``cmd:`` models are driven from the
actors with the same ``--timeout`` and ``--retries``). In this process the actors stand behind
one :class:`RayModel`, a :class:`~pairflip.probes.adapters.Model` like any other: the scorer
collects the distinct texts, looks them up in the ``--cache``, cuts the rest into the same
batches as a one-process run and sends one batch to each actor at a time
(:func:`~pairflip.probes.batching.run_batches` with one thread per actor). So this process stays
the only writer of the cache and of the results: every finished batch is committed as it
arrives, and an interrupted run resumes as a one-process run does.

Errors keep their one-process wording. An actor catches what the model raises and sends back
its type and text; :class:`RayModel` raises it again as a
:class:`~pairflip.probes.batching.ModelError`, which the batch runner prefixes with the model
SPEC and the batch, as it does locally. An actor that dies is named the same way.
"""

from __future__ import annotations

import os
import queue
import threading
from contextlib import ExitStack
from typing import Any, Sequence

from pairflip.probes.adapters import Model
from pairflip.probes.batching import ModelError, check_outputs, exit_from_model
from pairflip.records import Interrupted, PairflipError

WAIT_SECONDS = 0.5  # waits on Ray wake up this often (abort, Ctrl-C)
END_SECONDS = 10.0  # at most this long for the actors' finish/doubtful/close answers


def _failure(err: BaseException) -> tuple[Any, ...]:
    """What an actor sends back for an error, so that the driver can raise it with its wording."""
    if isinstance(err, ModelError):
        return ("model-error", str(err), list(err.retract))
    if isinstance(err, PairflipError):
        return ("pairflip-error", str(err), [])
    if isinstance(err, (SystemExit, KeyboardInterrupt)):
        # In an actor nothing but the model's own code raises these (Ctrl-C reaches the driver).
        what = exit_from_model(err) if isinstance(err, SystemExit) else (
            "the model raised KeyboardInterrupt (pairflip received no Ctrl-C or SIGTERM: the model's own code raised it)")
        return ("model-error", what, [])
    return ("model-error", f"the model raised {type(err).__name__}: {err}", [])


class ScoreWorker:
    """A Ray actor's state: one loaded model."""

    def __init__(self, spec: str, timeout: float, retries: int, trust: Sequence[str]) -> None:
        from pairflip.probes.adapters import load_model

        self.error: tuple[Any, ...] | None = None
        self.model: Any = None
        try:
            self.model = load_model(spec, timeout=timeout, retries=retries, trust=list(trust))
        except BaseException as err:  # noqa: B902 - sent back to the driver, which raises it
            self.error = _failure(err) if isinstance(err, PairflipError) else (
                "pairflip-error", f"model {spec}: loading it raised {type(err).__name__}: {err}", [])

    def info(self) -> dict[str, Any]:
        if self.error is not None:
            return {"error": self.error}
        m = self.model
        try:
            return {"describe": m.describe(), "fingerprint": m.fingerprint(), "spec": m.spec, "name": m.name,
                    "kind": m.kind, "classes": list(m.classes) if m.classes else None,
                    "key_covers": getattr(m, "key_covers", None), "node": os.uname().nodename}
        except BaseException as err:  # noqa: B902
            return {"error": _failure(err)}

    def predict(self, texts: list[str]) -> tuple[Any, ...]:
        """``("ok", outputs)`` (checked as the batch runner checks them) or a failure."""
        try:
            return ("ok", check_outputs(texts, self.model.predict(list(texts))))
        except BaseException as err:  # noqa: B902
            return _failure(err)

    def finish(self) -> tuple[Any, ...] | None:
        finish = getattr(self.model, "finish", None)
        if finish is None:
            return None
        try:
            finish()
        except BaseException as err:  # noqa: B902
            return _failure(err)
        return None

    def abort(self) -> None:
        abort = getattr(self.model, "abort", None)
        if abort is not None:
            abort()

    def doubtful(self) -> list[str]:
        doubtful = getattr(self.model, "doubtful", None)
        return list(doubtful()) if doubtful is not None else []

    def close(self) -> None:
        if self.model is not None:
            self.model.close()


def _raise(failure: tuple[Any, ...]) -> None:
    kind, text, retract = failure
    if kind == "pairflip-error":
        raise PairflipError(text)
    raise ModelError(text, retract=retract)


class RayModel(Model):
    """``replicas`` Ray actors, each holding the model SPEC, as one Model for the scorer.

    ``describe()``, ``fingerprint()`` and ``classes`` are the actors' own (so the results header
    and the cache key are those of a one-process run); every actor must report the same, or the
    nodes hold different models. ``parallel``: the batch runner sends one batch per actor at a
    time (``concurrency = replicas``)."""

    parallel = True

    def __init__(self, spec: str, *, replicas: int | None = None, address: str | None = None, timeout: float = 30.0,
                 retries: int = 3, trust: Sequence[str] = ()) -> None:
        from pairflip.engines import check_engine, cluster_cpus, ray_session

        check_engine("ray", address=address, replicas=replicas)
        self._stack = ExitStack()
        self._actors: list[Any] = []
        self._aborted = threading.Event()
        try:
            ray = self._ray = self._stack.enter_context(ray_session(address))
            cpus = cluster_cpus(ray)
            n = replicas if replicas is not None else cpus
            if n > cpus:
                raise PairflipError(f"--replicas {n}: the Ray instance has {cpus} CPUs, and each model actor takes one; "
                                    f"use at most --replicas {cpus}")
            # max_concurrency 2: abort() and doubtful() reach an actor while its batch runs
            Actor = ray.remote(num_cpus=1, max_restarts=0, max_concurrency=2)(ScoreWorker)
            self._actors = [Actor.remote(spec, timeout, retries, list(trust)) for _ in range(n)]
            infos = self._get([a.info.remote() for a in self._actors], "starting")
            self._adopt(spec, infos)
        except BaseException:
            self.close()
            raise
        self.replicas = n
        self._idle: queue.Queue[Any] = queue.Queue()
        for a in self._actors:
            self._idle.put(a)

    def _adopt(self, spec: str, infos: list[dict[str, Any]]) -> None:
        for info in infos:
            if "error" in info:
                _raise(info["error"])
        first = infos[0]
        for info in infos[1:]:
            if info["describe"] != first["describe"]:
                raise PairflipError(
                    f"model {spec}: the actors on {first['node']} and {info['node']} hold different models "
                    f"(fingerprints {first['fingerprint'][:12]} and {info['fingerprint'][:12]}); install the same model "
                    f"on every node"
                )
        self.spec, self.name, self.kind = first["spec"], first["name"], first["kind"]
        self.classes = first["classes"]
        self._describe, self._fp = first["describe"], first["fingerprint"]
        if first["key_covers"]:
            self.key_covers = first["key_covers"]

    def fingerprint(self) -> str:
        return self._fp

    def describe(self) -> dict[str, Any]:
        return dict(self._describe)

    def _get(self, refs: list[Any], doing: str) -> list[Any]:
        """``ray.get`` in short waits (a Ctrl-C is handled at once); a dead actor is named."""
        from pairflip.engines import remote_error

        ray = self._ray
        pending = list(refs)
        try:
            while pending:
                _, pending = ray.wait(pending, num_returns=len(pending), timeout=WAIT_SECONDS)
            return ray.get(refs)
        except (KeyboardInterrupt, Interrupted):
            raise
        except Exception as err:
            raise PairflipError(f"--engine ray: a model actor failed while {doing} ({remote_error(err)})") from None

    def predict(self, texts: list[str]) -> Any:
        """One batch on the next idle actor (called from one batch-runner thread per actor)."""
        from pairflip.engines import remote_error

        ray = self._ray
        actor = self._idle.get()
        try:
            ref = actor.predict.remote(list(texts))
            while True:
                if self._aborted.is_set():
                    raise ModelError("the run was stopped before this batch finished")
                ready, _ = ray.wait([ref], timeout=WAIT_SECONDS)
                if ready:
                    break
            try:
                answer = ray.get(ref)
            except Exception as err:
                raise ModelError(f"the Ray actor holding the model stopped ({remote_error(err)})") from None
        finally:
            self._idle.put(actor)
        if answer[0] == "ok":
            return answer[1]
        _raise(answer)

    def _each(self, method: str) -> list[Any]:
        """``method`` on every actor, answers in actor order (None for an actor that failed)."""
        ray = self._ray
        refs = [getattr(a, method).remote() for a in self._actors]
        ready, _ = ray.wait(refs, num_returns=len(refs), timeout=END_SECONDS)
        out = []
        for r in refs:
            try:
                out.append(ray.get(r) if r in ready else None)
            except Exception:
                out.append(None)
        return out

    def finish(self) -> None:
        """Every actor's model checks the end of its answers; the first failure is raised, with
        every actor's untrustworthy texts to retract."""
        failures = [f for f in self._each("finish") if f is not None]
        if failures:
            retract = [t for f in failures for t in f[2]]
            kind, text, _ = failures[0]
            raise (PairflipError(text) if kind == "pairflip-error" else ModelError(text, retract=retract))

    def abort(self) -> None:
        self._aborted.set()
        self._each("abort")

    def doubtful(self) -> list[str]:
        return [t for texts in self._each("doubtful") if texts for t in texts]

    def close(self) -> None:
        self._aborted.set()
        try:
            if self._actors:
                self._each("close")
                for a in self._actors:
                    try:
                        self._ray.kill(a)
                    except Exception:
                        pass
                self._actors = []
        finally:
            self._stack.close()


def ray_model(spec: str, **options: Any) -> RayModel:
    """The model SPEC on Ray actors (see :class:`RayModel` for the options)."""
    return RayModel(spec, **options)

