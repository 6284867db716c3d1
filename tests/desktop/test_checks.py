"""The window's drafting checks list (desktop.checks) on the demo pair: one entry per check
of the engine, grouped by kind, and choosing one brings its provision into view."""

from __future__ import annotations

from pathlib import Path

from core.review.checks import CHECK_TITLES

DEMO = Path(__file__).resolve().parents[2] / "demo_agreements"


def test_checks_tab_lists_the_engines_checks_and_shows_their_provision(make_window, qtbot):
    w = make_window()
    w.open_comparison(str(DEMO / "draft.docx"), str(DEMO / "precedent.docx"))
    assert w.wait_for_background(60000)
    qtbot.waitUntil(lambda: w.ws.review is not None, timeout=60000)
    checks = w.ws.review.checks
    assert w.left_tabs.tabText(w.left_tabs.indexOf(w.checks)) == f"Drafting checks ({len(checks)})"
    entries = w.checks.entries()
    assert len(entries) == len(checks) >= 1
    group = w.checks.tree.topLevelItem(0)
    assert group.text(0).startswith(CHECK_TITLES[checks[0].kind])
    assert checks[0].message in entries[0].text(0)
    uses = [entries[0].child(i) for i in range(entries[0].childCount())]
    assert len(uses) == len(checks[0].provisions)  # a changed definition lists who uses the term
    with qtbot.waitSignal(w.checks.provisionRequested) as got:
        w.checks.tree.setCurrentItem(entries[0])
    assert got.args == ["draft", checks[0].provision]
    assert w.side.focus_row() == w.side.model.row_for(draft=checks[0].provision, precedent=None)
