"""Save screenshots of Counterdraft's window on the demo agreements to ``docs/``.

    python scripts/screenshots.py [--out docs]

Runs on Qt's offscreen platform (no display needed), at 1440x900, with throw-away settings:
the overview, a selected deviation, the defined-terms view, the variants chart and the
negotiation patterns.
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from PySide6.QtCore import QEventLoop, QSettings, QTimer  # noqa: E402
from PySide6.QtWidgets import QApplication  # noqa: E402

#: Window size of the screenshots (a common laptop resolution).
SIZE = (1440, 900)
#: Longest wait for the demo review, in milliseconds (it takes a few seconds).
WAIT_MS = 120_000
#: The deviation shown selected: the first listed one whose reasons mention this word, so
#: the picture shows a change a lawyer recognises at once (a payment or notice period).
SHOWCASE_WORD = "days"


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


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", default=str(ROOT / "docs"))
    args = parser.parse_args(argv)
    out = Path(args.out)
    out.mkdir(parents=True, exist_ok=True)

    from desktop.app import demo_inputs
    from desktop.window import MainWindow

    app = QApplication.instance() or QApplication([])
    app.setStyle("Fusion")
    with tempfile.TemporaryDirectory() as tmp:
        settings = QSettings(str(Path(tmp) / "settings.ini"), QSettings.Format.IniFormat)
        w = MainWindow(settings=settings)
        w.ask_before_closing = False
        w.resize(*SIZE)
        w.show()
        draft, precedent, library = demo_inputs()
        w.open_comparison(draft, precedent, library=library)
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
        ids = w.deviations.visible_ids()
        showcase = next((d.id for d in sorted(w.ws.review.deviations, key=lambda d: d.rank)
                         if d.id in ids and SHOWCASE_WORD in " ".join(d.reasons).lower()), ids[0])
        w.select_deviation(showcase)
        shot("screenshot-deviation.png")
        w.left_tabs.setCurrentWidget(w.terms)
        if w.terms.model.rowCount():
            w.terms.select_row(0)
        shot("screenshot-terms.png")
        w.left_tabs.setCurrentWidget(w.deviations)
        w.inspector.setCurrentWidget(w.variants)
        shot("screenshot-variants.png")
        w.left_tabs.setCurrentWidget(w.patterns)
        w.compute_patterns()
        _wait((w.operationFinished, w.operationFailed), WAIT_MS)
        if w.ws.patterns is not None and w.patterns.tree.topLevelItemCount():
            first = w.patterns.tree.topLevelItem(0)
            if first.childCount():
                w.patterns.tree.setCurrentItem(first.child(0))
            shot("screenshot-patterns.png")
        w.close()
        w.wait_for_background()
    for p in shots:
        print(p.relative_to(ROOT) if p.is_relative_to(ROOT) else p)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
