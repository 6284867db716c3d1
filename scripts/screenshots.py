"""Save screenshots of Counterdraft's window on the demo agreements to ``docs/``.

    python scripts/screenshots.py [--out docs]

Runs on Qt's offscreen platform (no display needed), at the window's first-run size
(:data:`desktop.window.DEFAULT_SIZE`, which fits a 1366x768 screen), with throw-away
settings: the overview, the defined-terms view, a selected deviation, the wordings of that
deviation's provision in the precedent set and the usual changes.

The pictures show exactly what ``make demo`` opens: the bundled demo, acting for its
supplier, with the two illustrative stances ``counterdraft demo`` records in the precedent
set (:data:`core.cli.DEMO_STANCES`), nothing else added.  The script works on a temporary copy of
``demo_agreements/`` (without any ``.counterdraft`` index found there), so the index it
builds is thrown away afterwards and the repository is left untouched.
"""

from __future__ import annotations

import argparse
import os
import shutil
import sys
import tempfile
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from PySide6.QtCore import QEventLoop, QSettings, Qt, QTimer  # noqa: E402
from PySide6.QtWidgets import QApplication  # noqa: E402

#: Longest wait for the demo review, in milliseconds (it takes a few seconds).
WAIT_MS = 120_000
#: The deviation shown selected: the first listed one whose reasons mention this word, so
#: the picture shows a change a lawyer recognises at once (a payment or notice period).
SHOWCASE_WORD = "days"
#: The negotiation pattern shown selected: the first move of this clause type whose
#: description mentions this word (the clause type of the selected deviation).
SHOWCASE_PATTERN = ("termination", "period")


def _wait(signals, ms: int) -> None:
    """Run the event loop until one of *signals* fires or *ms* pass."""
    loop = QEventLoop()
    for signal in signals:
        signal.connect(loop.quit)
    QTimer.singleShot(ms, loop.quit)
    loop.exec()


def _settle(app: QApplication) -> None:
    for _ in range(5):
        app.processEvents()


def copy_demo(dest: Path) -> tuple[str, str, str]:
    """Copy ``demo_agreements/`` into *dest* (leaving out any ``.counterdraft`` index) and
    return the copy's (draft, precedent, precedent-set folder)."""
    from desktop.app import DEMO_DIR, demo_inputs

    shutil.copytree(DEMO_DIR, dest, ignore=shutil.ignore_patterns(".counterdraft"))
    return tuple(str(dest / Path(p).relative_to(DEMO_DIR)) for p in demo_inputs())  # type: ignore[return-value]


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", default=str(ROOT / "docs"))
    args = parser.parse_args(argv)
    out = Path(args.out)
    out.mkdir(parents=True, exist_ok=True)

    from desktop.window import DEFAULT_SIZE, MainWindow

    app = QApplication.instance() or QApplication([])
    app.setStyle("Fusion")
    with tempfile.TemporaryDirectory() as tmp:
        draft, precedent, library = copy_demo(Path(tmp) / "demo_agreements")
        settings = QSettings(str(Path(tmp) / "settings.ini"), QSettings.Format.IniFormat)
        w = MainWindow(settings=settings)
        w.ask_before_closing = False
        w.resize(*DEFAULT_SIZE)
        w.show()
        from core.cli import DEMO_ACTING_FOR, apply_demo_stances

        apply_demo_stances(library)  # as `make demo` records them before opening the window
        w.open_comparison(draft, precedent, library=library, acting_for=DEMO_ACTING_FOR)
        _wait((w.reviewShown, w.operationFailed, w.operationCancelled), WAIT_MS)
        if w.ws.review is None:
            print(f"the demo review did not finish: {w.last_message or 'timeout'}", file=sys.stderr)
            return 1
        _settle(app)
        shots = []

        def shot(name: str) -> None:
            _settle(app)
            path = out / name
            w.grab().save(str(path))
            shots.append(path)

        shot("screenshot-overview.png")
        # The defined terms beside the top deviation, whose provision shows renamed terms
        # (dotted underline) in the side-by-side view.
        w.left_tabs.setCurrentWidget(w.terms)
        if w.terms.proxy.rowCount():
            # The first row as the table shows it (sorted), not the model's first row.
            w.terms.table.setCurrentIndex(w.terms.proxy.index(0, 0))
        shot("screenshot-terms.png")
        # The drafting checks of the draft (the demo's: a definition whose meaning changed).
        w.left_tabs.setCurrentWidget(w.checks)
        shot("screenshot-checks.png")
        w.left_tabs.setCurrentWidget(w.deviations)
        ids = w.deviations.visible_ids()
        showcase = next((d.id for d in sorted(w.ws.review.deviations, key=lambda d: d.rank)
                         if d.id in ids and SHOWCASE_WORD in " ".join(d.reasons).lower()), ids[0])
        w.select_deviation(showcase)
        shot("screenshot-deviation.png")
        w.inspector.setCurrentWidget(w.variants)
        shot("screenshot-variants.png")
        w.left_tabs.setCurrentWidget(w.patterns)
        w.compute_patterns()
        _wait((w.operationFinished, w.operationFailed), WAIT_MS)
        tree = w.patterns.tree
        if w.ws.patterns is not None and tree.topLevelItemCount():
            moves = [tree.topLevelItem(i).child(j) for i in range(tree.topLevelItemCount())
                     for j in range(tree.topLevelItem(i).childCount())]
            clause_type, word = SHOWCASE_PATTERN
            showcase_move = next((m for m in moves if m.parent().data(0, Qt.ItemDataRole.UserRole) == clause_type
                                  and word in m.text(0).lower()), moves[0] if moves else None)
            if showcase_move is not None:
                tree.setCurrentItem(showcase_move)
                tree.scrollToItem(showcase_move)
            shot("screenshot-patterns.png")
        w.close()
        w.wait_for_background()
    for p in shots:
        print(p.relative_to(ROOT) if p.is_relative_to(ROOT) else p)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
