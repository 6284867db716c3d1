"""The command line and the window are clients of :mod:`core.session`: neither assembles the
engine itself.  Each client module's imports (read with :mod:`ast`, the language's own parser)
may not reach the engine's pipeline steps -- reading a document, the learned layout, opening
or building a precedent set's index, running a review, counting frequencies, loading or saving
a review file, writing an output.  Imports under ``if TYPE_CHECKING:`` (types only, never run)
are allowed.  The check runs on the sources, so it also reads a function's local imports.
"""

from __future__ import annotations

import ast
from collections.abc import Iterator
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]

#: The clients: the command line and every module of the window.
CLIENTS = (ROOT / "core" / "cli.py", *sorted((ROOT / "desktop").rglob("*.py")))

#: Pipeline steps, by module: None forbids the whole module, else the names listed.  Names
#: starting with "write_" are forbidden from every ``core.export`` module (the writers).
FORBIDDEN: dict[str, frozenset[str] | None] = {
    "core.review": frozenset({"run_review"}),
    "core.readers": frozenset({"read_document", "read_blocks", "learns_layout"}),
    "core.reader": None,
    "core.layout.store": None,
    "core.library.frequency": None,
    "core.library.index": frozenset({"open_library", "build_library", "Library"}),
    "core.library.commands": frozenset({"open_library_for_cli", "review_options"}),
    "core.library.patterns": frozenset({"negotiation_patterns"}),
    "core.library.slots": frozenset({"slot_variants"}),
    "core.decisions": frozenset({"load_review_file", "new_review_file", "save_review_file",
                                 "save_review_file_merged", "update_review_file", "decide",
                                 "remap_decisions"}),
}
EXPORT_PACKAGE = "core.export"
#: The export modules that hold writers: importing one as a module object reaches them.
EXPORT_WRITER_MODULES = frozenset({EXPORT_PACKAGE, "core.export.counter_draft", "core.export.redline",
                                   "core.export.issues"})


def _forbidden(module: str, name: str | None) -> bool:
    """Is importing *name* from *module* (or the *module* object itself, when *name* is
    None) a step of the pipeline?"""
    if module == EXPORT_PACKAGE or module.startswith(EXPORT_PACKAGE + "."):
        return module in EXPORT_WRITER_MODULES if name is None else name.startswith("write_")
    if module not in FORBIDDEN:
        return False
    names = FORBIDDEN[module]
    return names is None or name is None or name in names


def _package(path: Path) -> str:
    return ".".join(path.relative_to(ROOT).with_suffix("").parts[:-1])


def _is_type_checking(node: ast.If) -> bool:
    test = node.test
    return (isinstance(test, ast.Name) and test.id == "TYPE_CHECKING") or (
        isinstance(test, ast.Attribute) and test.attr == "TYPE_CHECKING")


def _run_time_imports(tree: ast.AST) -> Iterator[ast.Import | ast.ImportFrom]:
    """Every import statement that can run (those under ``if TYPE_CHECKING:`` cannot)."""
    for node in ast.iter_child_nodes(tree):
        if isinstance(node, ast.If) and _is_type_checking(node):
            for child in node.orelse:
                yield from _run_time_imports(ast.Module(body=[child], type_ignores=[]))
            continue
        if isinstance(node, (ast.Import, ast.ImportFrom)):
            yield node
        yield from _run_time_imports(node)


def _absolute(node: ast.ImportFrom, package: str) -> str:
    if not node.level:
        return node.module or ""
    base = package.split(".")[: len(package.split(".")) - node.level + 1]
    return ".".join([*base, *([node.module] if node.module else [])])


def violations(source: str, *, package: str) -> list[str]:
    """The pipeline steps *source* (a module of *package*) imports, as "line: module.name"."""
    found = []
    for node in _run_time_imports(ast.parse(source)):
        if isinstance(node, ast.Import):
            found += [f"{node.lineno}: {a.name}" for a in node.names if _forbidden(a.name, None)]
            continue
        module = _absolute(node, package)
        # "from core import export" imports a module object: all its names come with it
        found += [f"{node.lineno}: {module}.{a.name}" for a in node.names
                  if _forbidden(module, a.name) or _forbidden(f"{module}.{a.name}", None)]
    return found


@pytest.mark.parametrize("path", CLIENTS, ids=lambda p: str(p.relative_to(ROOT)))
def test_a_client_reaches_the_engine_only_through_the_session(path: Path) -> None:
    assert violations(path.read_text(encoding="utf-8"), package=_package(path)) == []


def test_the_check_sees_every_way_of_importing_a_step() -> None:
    """The check itself: each form of import of a pipeline step is caught; a type-only one,
    the session's and a constant are not."""
    source = (
        "from typing import TYPE_CHECKING\n"
        "import core.layout.store\n"                         # 2: a whole forbidden module
        "from core.review import run_review, CATEGORIES\n"   # 3: one name of two
        "from core import export as ex\n"                    # 4: a module object with writers
        "def f():\n"
        "    from ..export.redline import write_redline\n"   # 6: a local, relative import
        "    import core.decisions as cd\n"                  # 7: a module object with steps
        "if TYPE_CHECKING:\n"
        "    from core.library.index import Library\n"       # types only: allowed
        "from core.session import review, open_library\n"    # the door: allowed
        "from core.decisions import ACCEPT_ONLY\n"           # a constant: allowed
    )
    found = violations(source, package="core.sub")
    assert found == ["2: core.layout.store", "3: core.review.run_review", "4: core.export",
                     "6: core.export.redline.write_redline", "7: core.decisions"]
