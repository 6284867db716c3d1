"""Counterdraft's desktop window: a thin PySide6 client of :mod:`core`.

Nothing in this package decides anything about an agreement: every deviation, term mapping,
frequency and output comes from ``core``.  The package only shows them, runs the long engine
calls off the GUI thread (:mod:`desktop.tasks`) and records the reviewer's clicks.

Run it with ``python -m desktop DRAFT PRECEDENT [--library DIR]`` or ``python -m desktop --demo``.
"""

__all__: list[str] = []
