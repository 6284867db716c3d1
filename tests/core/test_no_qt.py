"""The engine must stay free of Qt (DEVELOPERS.md: layout)."""

import subprocess
import sys


def test_importing_the_whole_engine_loads_no_qt():
    code = (
        "import pkgutil, importlib, sys, core\n"
        "for m in pkgutil.walk_packages(core.__path__, 'core.'):\n"
        "    importlib.import_module(m.name)\n"
        "bad = sorted(n for n in sys.modules if n.startswith(('PySide6', 'shiboken6')))\n"
        "print(','.join(bad))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == ""
