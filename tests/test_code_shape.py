"""The shape of the code a reader has to hold in their head (common practice, no source):
no function in core/ or desktop/ runs over :data:`MAX_FUNCTION_LINES` lines unless a comment
line starting ``# long:`` right above it says why.  Branch complexity is bounded by ruff's
mccabe rule (configured in pyproject.toml, run by ``make static``)."""

from __future__ import annotations

import ast
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
#: About one screen: the length above which a function is split into named steps.
MAX_FUNCTION_LINES = 60
LONG_MARK = "# long:"


def _long_functions() -> list[str]:
    found = []
    for path in sorted([*ROOT.joinpath("core").rglob("*.py"), *ROOT.joinpath("desktop").rglob("*.py")]):
        lines = path.read_text(encoding="utf-8").splitlines()
        for node in ast.walk(ast.parse("\n".join(lines))):
            if not isinstance(node, ast.FunctionDef | ast.AsyncFunctionDef):
                continue
            first = min([node.lineno, *(d.lineno for d in node.decorator_list)])
            length = (node.end_lineno or node.lineno) - node.lineno + 1
            marked = first >= 2 and lines[first - 2].strip().startswith(LONG_MARK)
            if length > MAX_FUNCTION_LINES and not marked:
                found.append(f"{path.relative_to(ROOT)}:{node.lineno} {node.name} ({length} lines)")
    return found


def test_no_function_runs_over_a_screen_without_saying_why() -> None:
    assert _long_functions() == []


def test_the_walk_finds_functions() -> None:
    # the walk itself: the engine's entry point is a function of this tree
    text = ROOT.joinpath("core", "review", "__init__.py").read_text(encoding="utf-8")
    assert any(isinstance(n, ast.FunctionDef) and n.name == "run_review" for n in ast.walk(ast.parse(text)))
