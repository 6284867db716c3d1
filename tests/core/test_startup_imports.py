"""What a command imports: no scipy, scikit-learn or gensim (nor numpy) on the path of
``inspect`` and a plain ``review`` of a short agreement, and nothing heavy to parse the
arguments of the precedent-set commands.

Each command runs in a fresh interpreter (``python -c``), which then lists the modules loaded
(``sys.modules``, the interpreter's own record).  Documents: the bundled demo pair.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "demo_agreements"
HEAVY = ("numpy", "scipy", "sklearn", "gensim")

_RUN = """
import contextlib, io, json, sys
from core.cli import main
with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(io.StringIO()):
    try:
        status = main(sys.argv[1:])
    except SystemExit as stop:  # --help
        status = stop.code
print(json.dumps({"status": status, "modules": sorted(sys.modules)}))
"""


def _modules(*args: str) -> set[str]:
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    out = subprocess.run([sys.executable, "-c", _RUN, *args], cwd=ROOT, env=env, capture_output=True,
                         text=True, check=True)
    got = json.loads(out.stdout.strip().splitlines()[-1])
    assert got["status"] == 0
    return set(got["modules"])


def _heavy(modules: set[str]) -> list[str]:
    return sorted(m for m in modules if m.split(".")[0] in HEAVY)


@pytest.mark.parametrize("cached", [False, True])
def test_inspect_and_review_import_nothing_heavy(tmp_path, monkeypatch, cached) -> None:
    monkeypatch.setenv("COUNTERDRAFT_CACHE_DIR", str(tmp_path / "cache"))
    draft, prec = str(DEMO / "draft.docx"), str(DEMO / "precedent.docx")
    if cached:  # a second run reads both documents from the parsed-document cache
        _modules("review", draft, "--against", prec)
    inspect = _modules("inspect", prec)
    review = _modules("review", draft, "--against", prec)
    assert _heavy(inspect) == []
    assert _heavy(review) == []
    assert "core.review" not in inspect  # inspect reads; it does not review
    if cached:
        assert "lxml.etree" not in review and "core.docx.blocks" not in review  # nothing parsed


@pytest.mark.parametrize("args", [("library", "build", "--help"), ("library", "stats", "--help"),
                                  ("export", "--help"), ("--help",)])
def test_parsing_arguments_imports_nothing_heavy(args) -> None:
    modules = _modules(*args)
    assert _heavy(modules) == []
    assert "core.library.index" not in modules and "core.review" not in modules
