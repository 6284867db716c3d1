"""desktop.tasks: long work off the GUI thread, with progress, failure and cancel."""

from __future__ import annotations

import threading
import time

import pytest
from PySide6.QtCore import QThread, QThreadPool

from core.errors import CounterdraftError
from desktop import tasks


@pytest.fixture
def pool():
    p = QThreadPool()
    yield p
    p.waitForDone(10000)


def test_work_runs_on_another_thread_and_reports_progress_and_result(qtbot, pool):
    seen_threads = []
    progress = []
    results = []

    def work(report, cancelled):
        seen_threads.append(QThread.currentThread())
        for i in range(3):
            report(i + 1, 3, f"step {i + 1}")
        return "done"

    main = QThread.currentThread()
    t = tasks.start(work, name="t", on_finished=results.append, on_failed=pytest.fail,
                    on_progress=progress.append, pool=pool)
    qtbot.waitUntil(lambda: results == ["done"], timeout=5000)
    assert seen_threads and seen_threads[0] is not main
    assert [p.done for p in progress] == [1, 2, 3]
    assert progress[-1] == tasks.Progress(3, 3, "step 3")
    assert t.done and not t.cancelled


def test_an_engine_error_arrives_as_failed_with_its_one_line(qtbot, pool):
    failures = []

    def work(report, cancelled):
        raise CounterdraftError("not a .docx file", path="x.doc")

    tasks.start(work, name="t", on_finished=pytest.fail, on_failed=failures.append, pool=pool)
    qtbot.waitUntil(lambda: len(failures) == 1, timeout=5000)
    assert isinstance(failures[0], CounterdraftError)
    assert str(failures[0]) == "x.doc: not a .docx file"


def test_cancel_stops_the_work_at_its_next_check(qtbot, pool):
    started = threading.Event()
    failures = []
    steps = []

    def work(report, cancelled):
        started.set()
        for i in range(500):
            tasks.check_cancelled(cancelled)
            steps.append(i)
            time.sleep(0.01)
        return "finished anyway"

    t = tasks.start(work, name="t", on_finished=pytest.fail, on_failed=failures.append, pool=pool)
    assert started.wait(5)
    t.cancel()
    qtbot.waitUntil(lambda: len(failures) == 1, timeout=5000)
    assert isinstance(failures[0], tasks.Cancelled)
    assert len(steps) < 500


def test_a_result_that_arrives_after_cancel_is_reported_as_cancelled(qtbot, pool):
    gate = threading.Event()
    failures = []

    def work(report, cancelled):
        gate.wait(5)  # ignores the flag, like an engine stage that cannot be interrupted
        return "stale"

    t = tasks.start(work, name="t", on_finished=pytest.fail, on_failed=failures.append, pool=pool)
    t.cancel()
    gate.set()
    qtbot.waitUntil(lambda: len(failures) == 1, timeout=5000)
    assert isinstance(failures[0], tasks.Cancelled)
