"""No SQL outside the storage package: every statement lives in core/library/store/.

Reference: the source itself, read with Python's own ``ast`` module (string constants,
attribute calls and imports), so a docstring's prose cannot hide or fake a hit.
"""

from __future__ import annotations

import ast
import re
from pathlib import Path

CORE = Path(__file__).resolve().parents[3] / "core"
STORE = CORE / "library" / "store"

#: SQL as this project writes it (upper-case keywords; ISO/IEC 9075's statement forms).
SQL_RE = re.compile(r"\b(SELECT\b.+\bFROM|INSERT\s+INTO|UPDATE\s+\w+\s+SET|DELETE\s+FROM|CREATE\s+(?:TABLE|INDEX)"
                    r"|DROP\s+TABLE|ALTER\s+TABLE|PRAGMA\s+\w+)\b", re.DOTALL)
DRIVER_CALLS = {"execute", "executemany", "executescript"}
DRIVERS = {"sqlite3", "psycopg", "psycopg2"}


def _offences(path: Path) -> list[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    out = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Constant) and isinstance(node.value, str) and SQL_RE.search(node.value):
            out.append(f"line {node.lineno}: SQL text {node.value[:60]!r}")
        elif isinstance(node, ast.Call) and isinstance(node.func, ast.Attribute) and node.func.attr in DRIVER_CALLS:
            out.append(f"line {node.lineno}: .{node.func.attr}(...)")
        elif isinstance(node, ast.Import | ast.ImportFrom):
            names = [a.name for a in node.names] if isinstance(node, ast.Import) else [node.module or ""]
            out.extend(f"line {node.lineno}: imports {n}" for n in names if n.split(".")[0] in DRIVERS)
    return out


def test_no_sql_outside_the_storage_package():
    found = {}
    for path in sorted(CORE.rglob("*.py")):
        if STORE in path.parents:
            continue
        hits = _offences(path)
        if hits:
            found[str(path.relative_to(CORE.parent))] = hits
    assert found == {}


def test_the_check_sees_sql_where_it_is():
    """The same check finds the statements of the storage package (it is not blind)."""
    hits = {p.name: _offences(p) for p in STORE.glob("*.py")}
    assert any("SQL text" in h for h in hits["sql.py"]) and any(".execute(" in h for h in hits["sqlite.py"])
    assert any("imports psycopg" in h for h in hits.get("postgres.py", ["imports psycopg"]))
