"""desktop.settings: recent files and remembered state in a QSettings file."""

from __future__ import annotations

from desktop.settings import RECENT_LIMIT, Recent, WindowSettings


def test_recent_entries_are_most_recent_first_without_duplicates_and_bounded(settings):
    ws = WindowSettings(settings)
    for i in range(RECENT_LIMIT + 3):
        ws.add_recent(Recent(f"/d{i}.docx", "/p.docx"))
    ws.add_recent(Recent("/d5.docx", "/p.docx"))
    items = ws.recent()
    assert len(items) == RECENT_LIMIT
    assert items[0] == Recent("/d5.docx", "/p.docx")
    assert len({r.key() for r in items}) == RECENT_LIMIT


def test_damaged_recent_list_reads_as_empty(settings):
    settings.setValue("recent/entries", "{not json")
    assert WindowSettings(settings).recent() == []
    assert WindowSettings(settings).geometry() is None
    assert WindowSettings(settings).splitter("mainSplit") is None
