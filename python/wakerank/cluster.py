"""Run campaign chunks on a Dask cluster: connection and task submission for the runner.

`DaskBackend` (the runner's backend for ``--cluster``) hands over pending chunks and the
pure, picklable chunk function `wakerank.runner.run_chunk`; each chunk runs as one Dask task
on some worker, which writes its Parquet part atomically into the shared output folder. Part
names depend only on the chunk's content, so a retried chunk rewrites the same file and the
catalog is the same whichever worker (or how many tries) produced it. Dask's own scheduler
does the work placement and the retries; nothing here schedules.

Targets: ``tcp://HOST:PORT`` (a running ``dask scheduler``) or ``local:N`` (a LocalCluster of
N worker processes on this machine, one thread each).
"""

from __future__ import annotations

import contextlib
import re
from collections.abc import Callable, Iterable, Iterator
from dataclasses import dataclass
from typing import Any

from wakerank.errors import InputError

#: How often Dask re-runs a task that raised before the chunk counts as failed.
DEFAULT_RETRIES = 2
#: Seconds to wait for at least one worker to join a remote scheduler.
WORKER_WAIT_SECONDS = 60.0
#: Tasks kept in flight per worker thread: enough to keep workers busy, bounded for memory.
IN_FLIGHT_PER_THREAD = 4

_LOCAL = re.compile(r"^local:(\d+)$")
_REMOTE = re.compile(r"^(tcp|tls|ucx|inproc)://[^\s/]+$")


@dataclass(frozen=True)
class ClusterTarget:
    """Where to run: a scheduler address, or a number of local worker processes."""

    address: str | None = None
    local_workers: int | None = None

    def describe(self) -> str:
        """Human-readable target for progress output."""
        if self.address is not None:
            return f"Dask scheduler {self.address}"
        return f"local Dask cluster of {self.local_workers} worker processes"


def parse_target(spec: str) -> ClusterTarget:
    """Parse a ``--cluster`` value: ``tcp://HOST:PORT`` or ``local:N`` (N >= 1)."""
    text = spec.strip()
    local = _LOCAL.match(text)
    if local:
        count = int(local.group(1))
        if count < 1:
            raise InputError(f"--cluster {spec!r}: local needs at least one worker (local:N, N >= 1)")
        return ClusterTarget(local_workers=count)
    if _REMOTE.match(text):
        return ClusterTarget(address=text)
    raise InputError(
        f"--cluster {spec!r}: expected a scheduler address like tcp://HOST:8786 or local:N"
    )


@dataclass(frozen=True)
class TaskOutcome:
    """What became of one submitted chunk: its result, or the error of its last try."""

    chunk: Any
    result: Any | None
    error: str | None

    @property
    def failed(self) -> bool:
        """True when every try of the chunk raised (or its workers kept dying)."""
        return self.error is not None


def _import_distributed() -> Any:
    try:
        import distributed
    except ImportError as exc:  # pragma: no cover - depends on the installation
        raise InputError(
            "--cluster needs Dask distributed: pip install 'wakerank[cluster]'"
        ) from exc
    return distributed


def worker_version() -> str:
    """The wakerank version importable on a worker (checked against the client's)."""
    import wakerank

    return wakerank.__version__


@contextlib.contextmanager
def connect(target: ClusterTarget | str) -> Iterator[Any]:
    """Open a `distributed.Client` for the target; a local cluster lives as long as the block."""
    distributed = _import_distributed()
    if isinstance(target, str):
        target = parse_target(target)
    if target.local_workers is not None:
        with distributed.LocalCluster(
            n_workers=target.local_workers,
            threads_per_worker=1,
            processes=True,
            dashboard_address=":0",  # any free port: no clash with other clusters
        ) as cluster, distributed.Client(cluster) as client:
            yield client
        return
    try:
        client = distributed.Client(target.address, timeout="20s")
    except (OSError, TimeoutError) as exc:
        raise InputError(f"cannot reach the Dask scheduler at {target.address}: {exc}") from exc
    with client:
        try:
            client.wait_for_workers(1, timeout=WORKER_WAIT_SECONDS)
        except TimeoutError as exc:
            raise InputError(
                f"no Dask worker joined the scheduler at {target.address} "
                f"within {WORKER_WAIT_SECONDS:.0f} s"
            ) from exc
        check_worker_versions(client)
        yield client


def check_worker_versions(client: Any) -> None:
    """Fail clearly when a worker runs another wakerank version than this client."""
    mine = worker_version()
    theirs = client.run(worker_version)
    wrong = sorted(f"{addr} has {v}" for addr, v in theirs.items() if v != mine)
    if wrong:
        raise InputError(
            f"Dask workers must run wakerank {mine} like this client: " + "; ".join(wrong)
        )


def _total_threads(client: Any) -> int:
    threads = client.nthreads()
    return max(1, sum(threads.values()))


def run_chunks(
    client: Any,
    chunk_function: Callable[..., Any],
    chunks: Iterable[Any],
    out_dir: str,
    *,
    retries: int = DEFAULT_RETRIES,
    chunk_key: Callable[[Any], str] = lambda chunk: str(chunk.chunk_id),
) -> Iterator[TaskOutcome]:
    """Submit ``chunk_function(chunk, out_dir)`` for every chunk and yield outcomes as they end.

    At most a few tasks per worker thread are in flight, so memory on the client and the
    scheduler stays bounded for any campaign size. A task that raises is retried ``retries``
    times by Dask; a task on a worker that dies is rescheduled by Dask (up to its
    ``allowed-failures`` setting). A chunk that fails on every try is yielded with its error
    rather than dropped, so the runner can record it in the manifest. When the consumer stops
    early, the tasks still in flight are cancelled.
    """
    distributed = _import_distributed()
    pending = iter(chunks)
    window = IN_FLIGHT_PER_THREAD * _total_threads(client)
    owner: dict[str, Any] = {}
    in_flight: dict[str, Any] = {}

    def submit_next() -> Any | None:
        chunk = next(pending, None)
        if chunk is None:
            return None
        key = f"wakerank-chunk-{chunk_key(chunk)}"
        owner[key] = chunk
        future = client.submit(chunk_function, chunk, out_dir, key=key, retries=retries, pure=False)
        in_flight[key] = future
        return future

    first = [f for f in (submit_next() for _ in range(window)) if f is not None]
    if not first:
        return
    flow = distributed.as_completed(first)
    try:
        for future in flow:
            chunk = owner.pop(future.key)
            in_flight.pop(future.key, None)
            if future.status == "finished":
                outcome = TaskOutcome(chunk=chunk, result=future.result(), error=None)
            else:
                outcome = TaskOutcome(chunk=chunk, result=None, error=_describe_failure(future))
            future.release()
            refill = submit_next()
            if refill is not None:
                flow.add(refill)
            yield outcome
    finally:
        if in_flight:
            client.cancel(list(in_flight.values()))


def _describe_failure(future: Any) -> str:
    try:
        exc = future.exception()
    except Exception as outer:  # noqa: BLE001 - a cancelled future raises here
        exc = outer
    kind = type(exc).__name__
    return f"{kind}: {exc}" if str(exc) else kind



class DaskBackend:
    """Campaign-runner backend that runs `wakerank.runner.run_chunk` as Dask tasks.

    ``DaskBackend("local:4")``, ``DaskBackend("tcp://head:8786")`` or ``DaskBackend(client)``
    for a `distributed.Client` you opened yourself (on a dask-jobqueue cluster, say; it is
    left open). A client for a target string opens when `run` starts and closes (with its
    local cluster) when `run` ends. Yields a `ChunkResult` per finished chunk and a
    `ChunkFailure` per chunk that failed on every try, like every backend of the runner.
    """

    def __init__(
        self,
        cluster: str | ClusterTarget | Any,
        *,
        retries: int = DEFAULT_RETRIES,
        analysis_function: Callable[..., Any] | None = None,
    ):
        if isinstance(cluster, str):
            cluster = parse_target(cluster)
        self._target = cluster if isinstance(cluster, ClusterTarget) else None
        self._client = None if self._target is not None else cluster
        self.retries = retries
        self.analysis_function = analysis_function

    @property
    def workers(self) -> int:
        """Worker threads, where known before connecting (local clusters, open clients)."""
        if self._client is not None:
            return _total_threads(self._client)
        if self._target is not None and self._target.local_workers is not None:
            return self._target.local_workers
        raise AttributeError("workers of a remote scheduler are known only once connected")

    def describe(self) -> str:
        """Where the chunks run, for progress output."""
        if self._target is not None:
            return self._target.describe()
        return f"Dask scheduler {getattr(self._client, 'scheduler', None) or 'of the given client'}"

    def run(self, chunks: Any, out_dir: str) -> Iterator[Any]:
        """Run every chunk on the cluster; yield one outcome per chunk as it ends."""
        if self._client is not None:
            yield from self._run_with(self._client, chunks, out_dir)
            return
        with connect(self._target) as client:  # type: ignore[arg-type]
            yield from self._run_with(client, chunks, out_dir)

    def _run_with(self, client: Any, chunks: Any, out_dir: str) -> Iterator[Any]:
        import functools

        from wakerank.runner import ChunkFailure, run_chunk

        task: Callable[..., Any] = run_chunk
        if self.analysis_function is not None:
            task = functools.partial(run_chunk, analysis_function=self.analysis_function)
        for outcome in run_chunks(client, task, chunks, str(out_dir), retries=self.retries):
            if outcome.failed:
                yield ChunkFailure(outcome.chunk.chunk_id, outcome.error or "failed")
            else:
                yield outcome.result
