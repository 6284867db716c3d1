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


@pytest.fixture
def started(monkeypatch) -> list[tuple[int, int]]:
    """The children forked during a test, as (pid, pipe end)."""
    children: list[tuple[int, int]] = []
    fork = parallel._fork

    def recorded(step):
        child = fork(step)
        children.append(child)
        return child

    monkeypatch.setattr(parallel, "_fork", recorded)
    return children


def _collected(pid: int) -> None:
    with pytest.raises(ChildProcessError):
        os.waitpid(pid, os.WNOHANG)  # already collected: no zombie left behind


def test_an_error_here_wins_and_the_child_is_collected(started) -> None:
    def bad() -> int:
        raise CounterdraftError("draft.docx: damaged")

    with pytest.raises(CounterdraftError, match="draft.docx"):
        side_by_side(lambda: 2, bad)
    (pid, _fd), = started
    _collected(pid)


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


def test_a_review_with_its_checks_and_halves_of_its_work_beside_equals_one_in_turn(monkeypatch) -> None:
    # reference: the same review computed in this process alone
    from pathlib import Path

    import core.review as review_module
    from core.reader import read_document
    from core.review import termmap

    demo = Path(__file__).resolve().parents[2] / "demo_agreements"
    draft, precedent = read_document(str(demo / "draft.docx")), read_document(str(demo / "precedent.docx"))
    monkeypatch.setattr(review_module, "PARALLEL_CHECKS_MIN_CHARS", 0)
    monkeypatch.setattr(review_module, "PARALLEL_BUILD_MIN_CHARS", 0)  # half the groups beside, too
    monkeypatch.setattr(review_module, "PARALLEL_TOKENS_MIN_CHARS", 0)  # and half the tokens
    monkeypatch.setattr(termmap, "PARALLEL_SCAN_MIN_CHARS", 0)  # and half the term map's scan
    monkeypatch.setattr(review_module, "PARALLEL_CHANGES_MIN", 0)  # and half each group's changes
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


def test_a_later_step_runs_beside_and_gives_its_value() -> None:
    later = parallel.Later(lambda: (os.getpid(), _words(1000)))
    pid, words = later.result()
    assert pid != os.getpid() and words == _words(1000)


def test_a_dropped_later_leaves_no_child_behind(started) -> None:
    parallel.Later(lambda: _words(10)).drop()
    (pid, _fd), = started
    _collected(pid)


def test_a_later_step_that_cannot_fork_runs_here_when_its_value_is_asked(monkeypatch) -> None:
    monkeypatch.setenv(parallel.PARALLEL_ENV, "0")
    calls: list[int] = []
    later = parallel.Later(lambda: calls.append(os.getpid()) or len(calls))
    assert calls == []  # not run yet: its value is not needed yet
    assert later.result() == 1 and calls == [os.getpid()]


def _blas_threads(env: dict[str, str]) -> set[int]:
    """The thread counts of the linear-algebra libraries numpy loaded after ``import core``,
    as threadpoolctl (a library from the registries, which scikit-learn uses) reads them."""
    import json
    import subprocess
    from pathlib import Path

    code = ("import core, numpy, json, threadpoolctl; "
            "print(json.dumps([i['num_threads'] for i in threadpoolctl.threadpool_info() if i['user_api'] == 'blas']))")
    root = Path(__file__).resolve().parents[2]
    out = subprocess.run([sys.executable, "-c", code], env={**env, "PYTHONPATH": str(root)}, cwd=root,
                         capture_output=True, text=True, check=True).stdout
    return set(json.loads(out))


def test_numpy_runs_one_blas_thread_unless_the_user_sets_it() -> None:
    env = {k: v for k, v in os.environ.items() if k not in parallel.BLAS_THREADS_ENV}
    assert _blas_threads(env) == {1}
    # OpenBLAS starts no more threads than there are processor cores
    assert _blas_threads({**env, "OPENBLAS_NUM_THREADS": "2"}) == {min(2, os.cpu_count() or 1)}


def test_cycles_uncollected_restores_the_collector_as_it_found_it() -> None:
    import gc

    assert gc.isenabled()
    with pytest.raises(CounterdraftError), parallel.cycles_uncollected():
        assert not gc.isenabled()
        raise CounterdraftError("draft.docx: damaged")
    assert gc.isenabled()
    gc.disable()
    try:
        with parallel.cycles_uncollected():
            pass
        assert not gc.isenabled()  # the caller's choice stands
    finally:
        gc.enable()


def test_a_review_leaves_no_reference_cycle_to_collect(monkeypatch) -> None:
    # reference: the standard library's collector, which counts what it finds unreachable
    import gc
    from pathlib import Path

    from core.reader import read_document
    from core.review import run_review

    monkeypatch.setenv(parallel.PARALLEL_ENV, "0")
    demo = Path(__file__).resolve().parents[2] / "demo_agreements"
    draft, precedent = read_document(str(demo / "draft.docx")), read_document(str(demo / "precedent.docx"))
    run_review(draft, precedent, acting_for="Customer")  # modules loaded on first use
    gc.collect()
    gc.disable()
    try:
        run_review(draft, precedent, acting_for="Customer")
        assert gc.collect() == 0
    finally:
        gc.enable()


def test_in_halves_cuts_at_half_the_work_and_runs_the_second_beside() -> None:
    items = _words(10)
    work = [5, 1, 1, 1, 1, 1, 10, 1, 1, 1]  # total 23: the first half holds at most 11.5

    def run(part):
        return (list(part), os.getpid())

    (first, mine), (second, theirs) = parallel.in_halves(items, work, run, min_work=0)
    assert first == items[:6] and second == items[6:]  # 5 + 5 * 1 = 10; with the 10 it would be 20
    assert mine == os.getpid() and theirs != mine


def test_in_halves_below_its_threshold_runs_once_here() -> None:
    assert parallel.in_halves(_words(4), [1, 1, 1, 1], lambda part: (list(part), os.getpid()),
                              min_work=5) == [(_words(4), os.getpid())]


def test_in_halves_of_one_item_runs_it_here() -> None:
    assert parallel.in_halves(["only"], [100], lambda part: (list(part), os.getpid()),
                              min_work=0) == [(["only"], os.getpid())]
