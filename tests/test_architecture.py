"""docs/ARCHITECTURE.md's import table is the code's: every import between our packages
(inside functions too) is one the table allows.  The table is the project's own rule (common
practice, no source: lower layers never import higher ones)."""

from __future__ import annotations

import ast
import re
from functools import cache
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
DOC = ROOT / "docs" / "ARCHITECTURE.md"

#: Modules grouped into the table's units where a unit is not one package.
_UNIT_OF_MODULE = {
    "core": "base", "core.errors": "base", "core.fileio": "base", "core.lazyre": "base", "core.console": "base",
    "core.parallel": "base", "core.kept": "base",
    "core.structure": "core.text", "core.terms": "core.text", "core.labels": "core.text", "core.xrefs": "core.text",
    "core.outline": "core.text", "core.text_reader": "core.text", "core.docinfo": "core.text",
    "core.doccache": "core.readers", "core.reader": "core.readers",
}


def _unit(module: str) -> str | None:
    parts = module.split(".")
    if parts[0] == "desktop":
        return "desktop"
    if parts[0] != "core":
        return None
    top = ROOT.joinpath(*parts[:2])
    if len(parts) > 1 and not (top.is_dir() or top.with_suffix(".py").exists()):
        parts = parts[:1]  # "from core import CAUTION": a name of the package, not a module
    name = ".".join(parts[:2])
    return _UNIT_OF_MODULE.get(name, name)


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(ROOT).with_suffix("").parts)
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def _imports(path: Path) -> set[str]:
    """Every module *path* imports, relative imports resolved, at any depth of the code."""
    package = _module_name(path).split(".")
    if path.name != "__init__.py":
        package = package[:-1]
    found: set[str] = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            found.update(a.name for a in node.names)
        elif isinstance(node, ast.ImportFrom):
            base = package[:len(package) - node.level + 1] if node.level else []
            module = ".".join([*base, *([node.module] if node.module else [])])
            found.add(module)
            found.update(f"{module}.{a.name}" for a in node.names)  # "from . import x" names modules
    return found


@cache
def _edges() -> dict[tuple[str, str], str]:
    """(importing unit, imported unit) -> one place that does it."""
    edges: dict[tuple[str, str], str] = {}
    for path in sorted([*ROOT.joinpath("core").rglob("*.py"), *ROOT.joinpath("desktop").rglob("*.py")]):
        src = _unit(_module_name(path))
        for module in _imports(path):
            dst = _unit(module)
            if src and dst and dst != src:
                edges.setdefault((src, dst), str(path.relative_to(ROOT)))
    return edges


def _table() -> dict[str, set[str]]:
    """The table of DOC: unit -> the units it may import."""
    rows: dict[str, str] = {}
    text = DOC.read_text(encoding="utf-8")
    section = text[text.index("## Packages"):]
    section = section[:section.index("\n## ", 1)]
    for line in section.splitlines():
        cells = [c.strip() for c in line.strip().strip("|").split("|")]
        if len(cells) == 3 and cells[0] not in ("package", "---"):
            rows[_name(cells[0].strip("`"))] = cells[2]
    table: dict[str, set[str]] = {}
    for unit, allowed in rows.items():
        if allowed.startswith("every `core` package"):
            names = {u for u in rows if u != "desktop"}
            names -= {_name(n) for n in re.findall(r"but `([a-z]+)`", allowed)}
        else:
            names = {_name(n) for n in re.findall(r"`([a-z]+)`", allowed)} | ({"base"} if "base" in allowed else set())
        table[unit] = names - {unit}
    return table


def _name(short: str) -> str:
    return short if short in ("base", "desktop") else f"core.{short}"


def test_every_import_between_packages_is_one_the_architecture_page_allows() -> None:
    table = _table()
    wrong = [f"{src} imports {dst} ({where})" for (src, dst), where in sorted(_edges().items())
             if dst not in table.get(src, set())]
    assert wrong == []


def test_the_table_names_every_package_of_the_code() -> None:
    units = {u for u, _ in _edges()} | {u for _, u in _edges()}
    assert units - set(_table()) == set()


def test_the_core_never_imports_the_desktop() -> None:
    assert not [src for src, dst in _edges() if dst == "desktop" and src != "desktop"]
