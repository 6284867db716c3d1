"""The one way the window runs long work off the GUI thread.

A *work function* is plain Python: it gets plain inputs (bound beforehand, e.g. with
:func:`functools.partial`) and the two callbacks of :mod:`core.session` (the engine's own
progress and cancel types), never a widget::

    def work(report: Report, cancelled: IsCancelled) -> Result: ...

``report(done, total, message)`` publishes progress (``total`` None when unknown);
``cancelled()`` says whether the user pressed Cancel, and the work function stops at its next
check by raising :class:`Cancelled` (``check_cancelled`` does both).

:func:`start` wraps the work in a :class:`QRunnable` on a :class:`QThreadPool` and returns a
:class:`Task` whose ``signals`` (a small QObject living on the GUI thread) emit
``progress(Progress)``, ``finished(result)`` or ``failed(exception)`` exactly once per outcome.
Signals cross threads as queued connections, so receivers run on the GUI thread.  A task that
was cancelled always ends with ``failed(Cancelled())``, even when the work finished anyway:
its result is stale and must not be shown.
"""

from __future__ import annotations

import threading
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from PySide6.QtCore import QObject, QRunnable, QThreadPool, Signal

from core.session import Cancelled, IsCancelled, Report, check_cancelled

__all__ = [
    "Cancelled",
    "IsCancelled",
    "Progress",
    "Report",
    "Task",
    "TaskSignals",
    "check_cancelled",
    "start",
]


@dataclass(frozen=True, slots=True)
class Progress:
    """One progress report, as the ``progress`` signal carries it to the GUI thread."""

    done: int
    total: int | None
    message: str


class TaskSignals(QObject):
    """Created on the GUI thread; the worker thread emits, the GUI thread receives."""

    progress = Signal(object)  # Progress
    finished = Signal(object)  # the work function's result
    failed = Signal(object)  # the exception (Cancelled when cancelled)


class Task:
    """Handle of one running work function."""

    def __init__(self, name: str) -> None:
        self.name = name
        self.signals = TaskSignals()
        self._cancel = threading.Event()
        self._done = threading.Event()

    def cancel(self) -> None:
        """Ask the work to stop; the task then ends with ``failed(Cancelled())``."""
        self._cancel.set()

    @property
    def cancelled(self) -> bool:
        return self._cancel.is_set()

    @property
    def done(self) -> bool:
        return self._done.is_set()

    def wait(self, timeout: float | None = None) -> bool:
        """Block until the work function has returned (for shutdown and tests)."""
        return self._done.wait(timeout)


class _Runner(QRunnable):
    def __init__(self, task: Task, work: Callable[[Report, IsCancelled], Any]) -> None:
        super().__init__()
        self._task = task
        self._work = work
        self.setAutoDelete(True)

    def run(self) -> None:  # worker thread
        task = self._task
        signals = task.signals

        def report(done: int, total: int | None, message: str) -> None:
            if not task.cancelled:
                signals.progress.emit(Progress(done, total, message))

        try:
            result = self._work(report, task._cancel.is_set)
        except Cancelled as exc:
            task._done.set()
            signals.failed.emit(exc)
            return
        except Exception as exc:  # shown to the user as one line; never a crash
            task._done.set()
            signals.failed.emit(Cancelled() if task.cancelled else exc)
            return
        task._done.set()
        if task.cancelled:
            signals.failed.emit(Cancelled())
        else:
            signals.finished.emit(result)


def start(
    work: Callable[[Report, IsCancelled], Any],
    *,
    name: str,
    on_finished: Callable[[Any], None],
    on_failed: Callable[[BaseException], None],
    on_progress: Callable[[Progress], None] | None = None,
    pool: QThreadPool | None = None,
) -> Task:
    """Run *work* on *pool* (default: the global pool) and return its :class:`Task`.

    The callbacks are connected before the work starts, so no outcome can be missed; they run
    on the GUI thread.
    """
    task = Task(name)
    task.signals.finished.connect(on_finished)
    task.signals.failed.connect(on_failed)
    if on_progress is not None:
        task.signals.progress.connect(on_progress)
    (pool or QThreadPool.globalInstance()).start(_Runner(task, work))
    return task
