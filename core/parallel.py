"""Independent steps on several processor cores: each in a forked child process, while this
process runs one of its own.

A review's long steps come in independent groups: reading the draft and reading the
precedent (while this process loads the engine and opens the precedent set); the draft's own
drafting checks and the comparison; two halves of the texts to tokenise, of the aligned pairs
the term map scans and of the aligned provisions' word diffs (:func:`in_halves`).  Where the
operating system can fork (Linux) and this process runs no other thread (forking a
process whose other threads hold locks can leave the child stuck) nor a GUI toolkit (the
window reviews in line), each child runs one step and sends its result back pickled through
a pipe.  Anything that goes wrong in a child (it dies, its result cannot be pickled) makes
this process run the step itself, so a result never depends on the child: the same calls
give the same values either way, only sooner.  An exception a step raises in a child is
raised here.
"""

from __future__ import annotations

import gc
import os
import pickle
import sys
import threading
from collections.abc import Callable, Iterator, Sequence
from contextlib import contextmanager
from typing import Generic, TypeVar

from .kept import save_kept

__all__ = ["Later", "can_fork", "cycles_uncollected", "each_beside", "in_halves", "one_blas_thread",
           "parallel_on", "side_by_side"]

_A = TypeVar("_A")
_B = TypeVar("_B")
_T = TypeVar("_T")

#: Set to "0" to run every step in this process (debugging, profiling).
PARALLEL_ENV = "COUNTERDRAFT_PARALLEL"


#: The variables that set how many threads the linear-algebra libraries behind numpy start
#: (OpenBLAS, which numpy's wheels carry, and Intel's MKL, which some distributions use).
BLAS_THREADS_ENV = ("OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS")


def one_blas_thread() -> None:
    """Have numpy's linear-algebra library run on one thread, unless the user set its thread
    count.  This program spreads its long steps over the processor cores itself; the
    library's own threads wait for work by spinning, and beside a forked child they take the
    core the child needs (measured on a 100-page review on two cores: 0.2 s of processor
    time lost, the review 0.04 s slower).  Read by the library when it loads, so it only
    counts before numpy is first imported."""
    if "numpy" in sys.modules:
        return
    for name in BLAS_THREADS_ENV:
        os.environ.setdefault(name, "1")


@contextmanager
def cycles_uncollected() -> Iterator[None]:
    """Pause Python's collector of reference cycles for a step that makes none: its passes
    over the many short-lived objects such a step allocates cost time and free nothing
    (measured on a 100-page review: no unreachable object left at its end, 34 ms of
    collector passes in 0.5 s).  Objects are still freed as their last reference goes."""
    if not gc.isenabled():
        yield
        return
    gc.disable()
    try:
        yield
    finally:
        gc.enable()


#: Modules whose presence means threads Python does not count (a GUI toolkit's own): no fork.
_NATIVE_THREADS = ("PySide6.QtCore",)


def parallel_on() -> bool:
    """Whether steps may run beside each other at all (not switched off by PARALLEL_ENV)."""
    return os.environ.get(PARALLEL_ENV, "1") != "0"


def can_fork() -> bool:
    """Whether a step may run in a forked child: Linux, a single thread (and no GUI toolkit,
    whose own threads Python does not count), not switched off."""
    return (sys.platform.startswith("linux") and hasattr(os, "fork")
            and threading.active_count() == 1 and not any(m in sys.modules for m in _NATIVE_THREADS)
            and parallel_on())


def side_by_side(beside: Callable[[], _A], here: Callable[[], _B]) -> tuple[_A, _B]:
    """``(beside(), here())``, with *beside* run in a forked child process while *here* runs
    in this one when :func:`can_fork`; both in this process, *here* first, otherwise (so an
    exception of *here* is the one raised either way)."""
    got, mine = each_beside([beside], here)
    return got[0], mine


def each_beside(steps: Sequence[Callable[[], _A]], here: Callable[[], _B]) -> tuple[list[_A], _B]:
    """``([step() for step in steps], here())``, each step in a forked child process of its
    own while *here* runs in this one when :func:`can_fork`; all in this process, *here*
    first, otherwise.  An exception of *here* wins over the steps', and a step's over a
    later one's."""
    laters = [Later(step) for step in steps]
    try:
        mine = here()
        return [later.result() for later in laters], mine  # each read as soon as it is sent
    finally:
        for later in laters:
            later.drop()


def in_halves(items: Sequence[_T], work: Sequence[int], run: Callable[[Sequence[_T]], _A], *,
              min_work: float) -> list[_A]:
    """``[run(first), run(second)]``: *items* cut where the first holds as much of their
    *work* (one figure per item) as it can up to half the total, the second half run in a
    forked child (:class:`Later`) while this process runs the first; ``[run(items)]`` when
    the total is below *min_work*, there are fewer than two items or no child can be forked
    (the split would buy nothing)."""
    total = sum(work)
    if total < min_work or len(items) < 2 or not can_fork():
        return [run(items)]
    cut, seen = 0, 0
    while cut < len(items) and seen + work[cut] <= total / 2:
        seen += work[cut]
        cut += 1
    later = Later(lambda: run(items[cut:]))
    try:
        first = run(items[:cut])
    except BaseException:
        later.drop()
        raise
    return [first, later.result()]


class Later(Generic[_A]):
    """A step started now in a forked child process when :func:`can_fork` (else left to run
    in this process when its value is asked for), whose value :meth:`result` gives: for work
    that this process needs only after some of its own.  Every ``Later`` ends with
    :meth:`result` or :meth:`drop`, so that no child is left behind."""

    def __init__(self, step: Callable[[], _A]) -> None:
        self._step = step
        self._child = _fork(step) if can_fork() else None

    def result(self) -> _A:
        """The step's value (its exception raised here); the step run here when no child
        ran it or the child sent nothing usable."""
        return _result(self._take(), self._step)

    def drop(self) -> None:
        """Wait for the child to end and forget its value (this process is giving up)."""
        self._take()

    def _take(self) -> bytes:
        """What the child sent, once it has ended (nothing when no child ran the step)."""
        data, self._child = _collect(self._child), None
        return data


def _fork(step: Callable[[], object]) -> tuple[int, int] | None:
    """A child process running *step* (its pid and the end of the pipe it answers on), or
    None when the system refuses a process (the step then runs here)."""
    read_fd, write_fd = os.pipe()
    try:
        pid = os.fork()
    except OSError:
        os.close(read_fd)
        os.close(write_fd)
        return None
    if pid == 0:  # the child: run, send, leave without running this process's exit handlers
        os.close(read_fd)
        _child(step, write_fd)
    os.close(write_fd)
    return pid, read_fd


def _child(step: Callable[[], object], fd: int) -> None:
    status = 1
    gc.disable()  # a child runs one step and ends (see cycles_uncollected)
    try:
        try:
            outcome: tuple[bool, object] = (True, step())
        except BaseException as exc:  # sent back and raised there
            outcome = (False, exc)
        payload = pickle.dumps(outcome, protocol=pickle.HIGHEST_PROTOCOL)  # unpicklable: nothing sent
        with os.fdopen(fd, "wb") as out:
            out.write(payload)
        save_kept()
        status = 0
    finally:
        os._exit(status)


def _collect(child: tuple[int, int] | None) -> bytes:
    """What a child sent, once it has ended (nothing from a child never started)."""
    if child is None:
        return b""
    pid, fd = child
    data = _read_all(fd)
    os.waitpid(pid, 0)
    return data


def _read_all(fd: int) -> bytes:
    chunks = []
    with os.fdopen(fd, "rb") as pipe:
        while chunk := pipe.read(1 << 20):
            chunks.append(chunk)
    return b"".join(chunks)


def _result(data: bytes, step: Callable[[], _A]) -> _A:
    """The child's result, or its exception raised; the step run here when the child sent
    nothing usable."""
    try:
        with cycles_uncollected():  # a value sent back holds no cycle the step did not make
            ok, value = pickle.loads(data)
    except Exception:
        return step()
    if not ok:
        raise value
    result: _A = value
    return result
