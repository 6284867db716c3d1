"""Save screenshots of Counterdraft's window on the demo agreements to ``docs/``.

    python scripts/screenshots.py [--out docs]

Runs on Qt's offscreen platform (no display needed), at 1440x900, with throw-away settings:
the overview, the defined-terms view, a selected deviation, the variants chart of that
deviation's provision and the negotiation patterns.

It works on a temporary copy of ``demo_agreements/`` (never on the repository's folder, and
without any ``.counterdraft`` index found there), so the index it builds and the labels it
records are thrown away afterwards.  The demo precedent set carries no reviewer positions, so
before opening the window the script labels a few wording variants in the copy's index,
through the library's public API (``Library.label_variant``, as ``counterdraft library label``
does), the way a supplier-side firm might: see :data:`ILLUSTRATIVE_POSITIONS`.  These labels
are illustrative only, invented for the pictures; they are no firm's real positions and no
advice on what a position should be.
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

#: Window size of the screenshots (a common laptop resolution).
SIZE = (1440, 900)
#: Longest wait for the demo review, in milliseconds (it takes a few seconds).
WAIT_MS = 120_000
#: The deviation shown selected: the first listed one whose reasons mention this word, so
#: the picture shows a change a lawyer recognises at once (a payment or notice period).
SHOWCASE_WORD = "days"
#: Illustrative reviewer positions recorded in the temporary copy's index (invented for the
#: screenshots, see the module docstring): (clause type, words the variant's sample wording
#: must all contain, position).  Each must match exactly one variant of the demo precedent set.
ILLUSTRATIVE_POSITIONS: tuple[tuple[str, tuple[str, ...], str], ...] = (
    ("termination", ("for convenience", "ninety (90) days"), "preferred"),
    ("termination", ("for convenience", "sixty (60) days"), "fallback"),
    ("termination", ("for convenience", "thirty (30) days"), "not acceptable"),
    ("payment", ("shall pay each invoice", "thirty (30) days"), "preferred"),
    ("payment", ("shall pay each invoice", "forty-five (45) days"), "acceptable"),
    ("payment", ("shall pay each invoice", "sixty (60) days"), "fallback"),
    ("limitation_of_liability", ("total liability", "(100%)"), "preferred"),
    ("limitation_of_liability", ("total liability", "(150%)"), "fallback"),
    ("limitation_of_liability", ("total liability", "(200%)"), "not acceptable"),
)
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


def label_illustrative_positions(folder: str) -> list[str]:
    """Build the index of the precedent set in *folder* and record
    :data:`ILLUSTRATIVE_POSITIONS` in it; returns one line per label.  Raises
    ``CounterdraftError`` when a wording is not found exactly once (the demo changed)."""
    from core.errors import CounterdraftError
    from core.library import open_library

    done = []
    with open_library(folder) as library:
        variants = library.variants()
        texts = library.texts([v.sample for v in variants if v.sample is not None])
        for bucket, words, position in ILLUSTRATIVE_POSITIONS:
            hits = [v for v in variants if v.bucket == bucket and v.sample is not None
                    and all(w in texts.get(v.sample, "") for w in words)]
            if len(hits) != 1:
                raise CounterdraftError(f"{len(hits)} {bucket} variants contain {' + '.join(words)!r}; "
                                        "expected exactly one", path=folder)
            library.label_variant(hits[0].id, position)
            done.append(f"{bucket} variant {hits[0].ordinal} ({' '.join(words)}): {position}")
    return done


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", default=str(ROOT / "docs"))
    args = parser.parse_args(argv)
    out = Path(args.out)
    out.mkdir(parents=True, exist_ok=True)

    from core.errors import CounterdraftError
    from desktop.window import MainWindow

    app = QApplication.instance() or QApplication([])
    app.setStyle("Fusion")
    with tempfile.TemporaryDirectory() as tmp:
        try:
            draft, precedent, library = copy_demo(Path(tmp) / "demo_agreements")
            labelled = label_illustrative_positions(library)
        except CounterdraftError as exc:
            print(f"could not prepare the demo copy: {exc}", file=sys.stderr)
            return 1
        print("illustrative positions:", *labelled, sep="\n  ")
        settings = QSettings(str(Path(tmp) / "settings.ini"), QSettings.Format.IniFormat)
        w = MainWindow(settings=settings)
        w.ask_before_closing = False
        w.resize(*SIZE)
        w.show()
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
        # The defined terms beside the top deviation, whose provision shows renamed terms
        # (dotted underline) in the side-by-side view.
        w.left_tabs.setCurrentWidget(w.terms)
        if w.terms.proxy.rowCount():
            # The first row as the table shows it (sorted), not the model's first row.
            w.terms.table.setCurrentIndex(w.terms.proxy.index(0, 0))
        shot("screenshot-terms.png")
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
