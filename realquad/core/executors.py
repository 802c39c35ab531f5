"""Where independent pieces of work are computed: this process, local worker processes, or Dask.

A piece of work (a survey's chunk of fields, a batch of sieve polynomials)
is any picklable object with a ``label`` (words for messages: "the chunk d in
[2, 9]"); a function turns it into a list of results. Every executor takes
the pieces still to do and yields ``(piece, results, seconds)`` as pieces
finish, in any order; only the calling process writes to its store.
Stopping an executor (``close``, also on Ctrl-C) ends its workers at once:
the pieces they were computing are simply not saved, and rerunning the
command computes them again.

>>> with InProcessExecutor() as ex:
...     [(p.label, rows) for p, rows, _ in ex.map_unordered([_Example("two", 2)], _count_to)]
[('two', [0, 1])]
"""

from __future__ import annotations

import ctypes
import gc
import logging
import multiprocessing
import os
import signal
import socket
import sys
import threading
import time
from collections.abc import Callable, Iterable, Iterator
from dataclasses import dataclass
from typing import Any, Protocol
from urllib.parse import urlsplit

from realquad.errors import InputError


class Work(Protocol):
    """A piece of work: picklable, with words for it in messages."""

    @property
    def label(self) -> str: ...


WorkFunction = Callable[[Any], Any]
Finished = tuple[Any, Any, float]


@dataclass(frozen=True)
class _Example:
    """A piece of work for the examples: count to ``n``."""

    label: str
    n: int


def _count_to(piece: _Example) -> list[int]:
    return list(range(piece.n))


def _timed(job: tuple[WorkFunction, Work]) -> Finished:
    function, piece = job
    start = time.perf_counter()
    rows = function(piece)
    return piece, rows, time.perf_counter() - start


def _ignore_interrupts() -> None:
    """Worker initializer: Ctrl-C is handled by the parent, which ends the workers.

    On Linux the worker also asks to be killed when its parent dies, so a
    ``kill -9`` of the run leaves no orphan computing for nobody.
    """
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    if sys.platform.startswith("linux"):
        try:
            libc = ctypes.CDLL(None, use_errno=True)
            libc.prctl(1, int(signal.SIGKILL))  # PR_SET_PDEATHSIG
        except (OSError, AttributeError):  # pragma: no cover - depends on the C library
            pass
        if os.getppid() == 1:  # pragma: no cover - the parent died before prctl
            os._exit(1)


class InProcessExecutor:
    """Compute the pieces one after the other in this process."""

    description = "this process"

    def map_unordered(self, pieces: Iterable[Any], function: WorkFunction) -> Iterator[Finished]:
        for piece in pieces:
            yield _timed((function, piece))

    def close(self) -> None:
        pass

    def __enter__(self) -> InProcessExecutor:
        return self

    def __exit__(self, *exc_info: object) -> None:
        self.close()


class ProcessPoolExecutor(InProcessExecutor):
    """Compute the pieces in ``workers`` local processes."""

    def __init__(self, workers: int) -> None:
        self.workers = workers
        self.description = f"{workers} local processes"
        self._pool = multiprocessing.get_context("spawn" if os.name != "posix" else "fork").Pool(
            workers, initializer=_ignore_interrupts
        )

    def map_unordered(self, pieces: Iterable[Any], function: WorkFunction) -> Iterator[Finished]:
        yield from self._pool.imap_unordered(_timed, [(function, c) for c in pieces], chunksize=1)

    def close(self) -> None:
        self._pool.terminate()
        self._pool.join()


class DaskExecutor(InProcessExecutor):
    """Compute the pieces on the Dask distributed cluster whose scheduler is at ``address``.

    A worker lost in the middle of a piece costs only that piece: the
    scheduler gives it to another worker (after ``allowed-failures`` losses,
    3 by default, it gives up and the run stops with one line). When no worker
    is left and nothing has finished for ``stall_timeout`` seconds, the run
    stops with one line; the pieces finished so far are saved and the same
    command resumes once workers are back. The cluster library's own log
    messages are silenced while the executor lives (its lines, and the
    tracebacks it logs when a run is interrupted, are not for the user). If
    the scheduler goes away, the run stops with one line as well.
    """

    def __init__(self, address: str, timeout: float = 10.0, stall_timeout: float = 60.0) -> None:
        try:
            from distributed import Client
        except ImportError:
            raise InputError(
                "--scheduler needs the package 'distributed' (pip install 'realquad[survey]')"
            ) from None
        self.address = address
        self.description = f"Dask scheduler {address}"
        self.stall_timeout = stall_timeout
        self._futures: list[Any] = []
        self._quiet = _QuietLogs()
        try:
            _check_reachable(address, timeout)
            self._client = _connect_within(Client, address, timeout)
        except BaseException:
            self._quiet.restore()
            raise
        try:
            self._client.wait_for_workers(1, timeout=timeout)
        except Exception:
            self.close()
            raise InputError(
                f"the Dask scheduler at {address!r} has no workers (waited {timeout:g} s)"
            ) from None
        except BaseException:
            self.close()
            raise

    def map_unordered(self, pieces: Iterable[Any], function: WorkFunction) -> Iterator[Finished]:
        from distributed import wait

        jobs = [(function, c) for c in pieces]
        if not jobs:
            return
        self._futures = self._client.map(_timed, jobs, pure=False)
        piece_of = {f.key: c for f, (_, c) in zip(self._futures, jobs, strict=True)}
        pending = set(self._futures)
        last_progress = time.monotonic()
        while pending:
            try:
                done, pending = wait(pending, timeout=1.0, return_when="FIRST_COMPLETED")
            except TimeoutError:
                self._check_workers(last_progress)
                continue
            except Exception as exc:
                raise self._lost(exc) from None
            for future in done:
                yield self._result(future, piece_of[future.key], last_progress)
                last_progress = time.monotonic()

    def _result(self, future: Any, piece: Work, last_progress: float) -> Finished:
        """The finished piece, or :class:`InputError` when the cluster gave up on it.

        A piece whose result lived on a worker lost since is computed again,
        so fetching it waits in short steps, watching for a cluster left
        without workers.
        """
        while True:
            try:
                result: Finished = future.result(timeout=1.0)
                return result
            except TimeoutError:
                self._check_workers(last_progress)
            except Exception as exc:
                if type(exc).__name__ != "KilledWorker":
                    raise self._lost(exc) from None
                raise InputError(
                    f"the Dask cluster lost every worker that tried {piece.label}; the work "
                    "finished before is saved; "
                    "rerun the same command to resume"
                ) from None

    def _lost(self, exc: Exception) -> Exception:
        """One line for a run whose futures the cluster cancelled (the scheduler went away); else ``exc``."""
        if "Cancelled" not in type(exc).__name__:
            return exc
        return InputError(
            f"lost the connection to the Dask scheduler at {self.address!r}; the work "
            "finished so far is saved; rerun the same command to resume"
        )

    def _check_workers(self, last_progress: float) -> None:
        """Stop the run once no worker is left and nothing has finished for ``stall_timeout`` s."""
        if time.monotonic() - last_progress < self.stall_timeout:
            return
        try:
            workers = len(self._client.nthreads())
        except Exception:  # the scheduler itself is gone
            workers = 0
        if workers == 0:
            raise InputError(
                f"the Dask cluster at {self.address!r} has no workers left and nothing "
                f"finished for {self.stall_timeout:g} s; the work finished so far is saved; "
                "start workers and rerun the same command to resume"
            )

    def close(self) -> None:
        try:
            if self._futures:
                self._client.cancel(self._futures)
        except Exception:  # the cluster may already be gone; nothing of ours is lost
            pass
        finally:
            try:
                self._client.close(timeout=5)
            except Exception:
                pass
            # the client's abandoned fetches (of results lost with a worker) complain when
            # they are collected: collect them while the logs are still silenced
            gc.collect()
            self._quiet.restore()


class _QuietLogs:
    """Silences the loggers of the cluster library until :meth:`restore`."""

    NAMES = ("distributed", "tornado", "asyncio", "bokeh")

    def __init__(self) -> None:
        # the library gives some of its loggers levels of their own (distributed.client:
        # warning, ...), so each one is silenced, not only the top of the family
        names = [
            name
            for name in [*self.NAMES, *logging.root.manager.loggerDict]
            if name.split(".")[0] in self.NAMES
        ]
        self._levels: dict[str, int] | None = {
            name: logging.getLogger(name).level for name in names
        }
        for name in names:
            logging.getLogger(name).setLevel(logging.CRITICAL + 1)

    def restore(self) -> None:
        if self._levels is not None:
            for name, level in self._levels.items():
                logging.getLogger(name).setLevel(level)
            self._levels = None


def _connect_within(client_class: Any, address: str, timeout: float) -> Any:
    """A Dask client of ``address``, or :class:`InputError` within about ``2 × timeout`` seconds.

    The connection is made in a helper thread because a server that accepts
    TCP connections but never answers the handshake can hold it longer than
    the client's own timeout.
    """
    outcome: dict[str, Any] = {}

    def connect() -> None:
        try:
            outcome["client"] = client_class(address, timeout=timeout)
        except Exception as exc:  # whatever answers there is not a usable scheduler
            outcome["error"] = " ".join(str(exc).split()) or type(exc).__name__

    helper = threading.Thread(target=connect, name="realquad-dask-connect", daemon=True)
    helper.start()
    helper.join(2 * timeout + 1)
    if "client" in outcome:
        return outcome["client"]
    detail = outcome.get("error", f"no answer within {2 * timeout + 1:g} s")
    raise InputError(f"cannot reach the Dask scheduler at {address!r}: {detail}")


def _check_reachable(address: str, timeout: float) -> None:
    """Fail at once, with a clear message, when nothing listens at a ``tcp://host:port`` address."""
    text = address if "://" in address else "tcp://" + address
    try:
        parts = urlsplit(text)
        scheme, host, port = parts.scheme, parts.hostname, parts.port
    except ValueError:
        scheme, host, port = "", None, None
    if scheme not in ("tcp", "tls") or not host or port is None:
        raise InputError(f"--scheduler must look like tcp://HOST:PORT, got {address!r}")
    try:
        socket.create_connection((host, port), timeout=timeout).close()
    except OSError as exc:
        detail = exc.strerror or type(exc).__name__
        raise InputError(f"cannot reach the Dask scheduler at {address!r}: {detail}") from None


def make_executor(workers: int | None = None, scheduler: str | None = None) -> InProcessExecutor:
    """The executor for ``--workers N`` (default: all cores) or ``--scheduler ADDRESS``."""
    if scheduler is not None:
        if workers is not None:
            raise InputError("give --workers or --scheduler, not both")
        return DaskExecutor(scheduler)
    count = workers if workers is not None else (os.cpu_count() or 1)
    if count < 1:
        raise InputError(f"--workers must be at least 1, got {count}")
    if count == 1:
        return InProcessExecutor()
    return ProcessPoolExecutor(count)
