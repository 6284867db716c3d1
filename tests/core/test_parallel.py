"""Two steps side by side (:mod:`core.parallel`): the same values as running them in turn,
whatever happens to the child process.  Reference: the two calls made directly, here."""

from __future__ import annotations

import os
import sys
import threading

import pytest

from core import parallel
from core.errors import CounterdraftError
from core.parallel import can_fork, side_by_side

pytestmark = pytest.mark.skipif(not sys.platform.startswith("linux"), reason="forks only on Linux")


@pytest.fixture(autouse=True)
def _no_toolkit(monkeypatch) -> None:
    """The window's tests import Qt into this test process; these tests are about the
    engine's own processes."""
    monkeypatch.setattr(parallel, "_NATIVE_THREADS", ())


def _words(n: int) -> list[str]:
    return [f"clause-{i}" for i in range(n)]


def test_values_are_those_of_the_calls_made_here() -> None:
    got = side_by_side(lambda: _words(50_000), lambda: sorted(_words(10), reverse=True))
    assert got == (_words(50_000), sorted(_words(10), reverse=True))


def test_the_step_beside_runs_in_another_process() -> None:
    child, here = side_by_side(os.getpid, os.getpid)
    assert here == os.getpid() and child != here


def test_an_error_of_the_step_beside_is_raised_here() -> None:
    def bad() -> None:
        raise CounterdraftError("precedent.docx: not a .docx file")

    with pytest.raises(CounterdraftError, match="precedent.docx: not a .docx file"):
        side_by_side(bad, lambda: 1)


def test_an_error_here_wins_and_the_child_is_collected(monkeypatch) -> None:
    def bad() -> int:
        raise CounterdraftError("draft.docx: damaged")

    started = []
    fork = parallel._fork

    def recorded(step):
        child = fork(step)
        started.append(child)
        return child

    monkeypatch.setattr(parallel, "_fork", recorded)
    with pytest.raises(CounterdraftError, match="draft.docx"):
        side_by_side(lambda: 2, bad)
    (pid, _fd), = started
    with pytest.raises(ChildProcessError):
        os.waitpid(pid, os.WNOHANG)  # already collected: no zombie left behind


def test_a_child_that_dies_leaves_the_step_to_this_process() -> None:
    calls = []

    def step() -> str:
        calls.append(os.getpid())
        if os.getpid() != parent:
            os._exit(3)  # the child dies without a word
        return "read here"

    parent = os.getpid()
    assert side_by_side(step, lambda: "mine") == ("read here", "mine")
    assert calls == [parent]  # the child's own call is not in this process's list


def test_a_result_that_cannot_be_pickled_is_computed_here() -> None:
    got, _ = side_by_side(lambda: (lambda: "a function is no picklable value"), lambda: None)
    assert got() == "a function is no picklable value"


def test_with_another_thread_running_both_steps_run_here(monkeypatch) -> None:
    stop = threading.Event()
    worker = threading.Thread(target=stop.wait)
    worker.start()
    try:
        assert not can_fork()
        assert side_by_side(os.getpid, os.getpid) == (os.getpid(), os.getpid())
    finally:
        stop.set()
        worker.join()


def test_switched_off_by_the_environment(monkeypatch) -> None:
    monkeypatch.setenv(parallel.PARALLEL_ENV, "0")
    assert side_by_side(os.getpid, os.getpid) == (os.getpid(), os.getpid())


def test_a_review_with_its_checks_and_half_its_groups_beside_equals_one_in_turn(monkeypatch) -> None:
    # reference: the same review computed in this process alone
    from pathlib import Path

    import core.review as review_module
    from core.reader import read_document

    demo = Path(__file__).resolve().parents[2] / "demo_agreements"
    draft, precedent = read_document(str(demo / "draft.docx")), read_document(str(demo / "precedent.docx"))
    monkeypatch.setattr(review_module, "PARALLEL_CHECKS_MIN_CHARS", 0)
    monkeypatch.setattr(review_module, "PARALLEL_BUILD_MIN_CHARS", 0)  # half the groups beside, too
    beside = review_module.run_review(draft, precedent)
    monkeypatch.setenv(parallel.PARALLEL_ENV, "0")
    in_turn = review_module.run_review(draft, precedent)
    assert beside.checks and beside == in_turn


def test_each_step_in_its_own_child_in_order() -> None:
    got, mine = parallel.each_beside([lambda: ("draft", os.getpid()), lambda: ("precedent", os.getpid())],
                                     lambda: os.getpid())
    assert [name for name, _pid in got] == ["draft", "precedent"]
    assert len({pid for _name, pid in got} | {mine}) == 3 and mine == os.getpid()


def test_the_first_failing_step_is_the_error_raised() -> None:
    def fails(name: str):
        def step() -> None:
            raise CounterdraftError(f"{name}: damaged")
        return step

    with pytest.raises(CounterdraftError, match="draft.docx"):
        parallel.each_beside([fails("draft.docx"), fails("precedent.docx")], lambda: None)


def test_with_a_gui_toolkit_loaded_both_steps_run_here(monkeypatch) -> None:
    monkeypatch.setattr(parallel, "_NATIVE_THREADS", ("PySide6.QtCore",))
    monkeypatch.setitem(sys.modules, "PySide6.QtCore", sys.modules.get("PySide6.QtCore", object()))
    assert not can_fork()
    assert side_by_side(os.getpid, os.getpid) == (os.getpid(), os.getpid())
