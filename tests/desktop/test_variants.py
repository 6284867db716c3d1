"""desktop.variants: the QPainter chart of one provision's wordings, as the engine groups them.

Outside reference: the pixels Qt paints (``QWidget.grab``), measured against the counts; the
engine's figures themselves are checked in tests/core/library/test_slots.py against the demo
generator's record.
"""

from __future__ import annotations

from PySide6.QtCore import QPoint, Qt
from PySide6.QtGui import QImage

from core.library.slots import ClosestText, SlotVariant, SlotVariants
from desktop.variants import ABSENT_ROW, VariantChart, VariantsView


def _bar(name: str, docs: int, *, gist: str = "", position: str | None = None, draft: bool = False,
         precedent: bool = False, text: str = "") -> SlotVariant:
    documents = tuple(f"{k:02d}-agreement.docx" for k in range(docs))
    return SlotVariant(name, docs, documents, gist, text, documents[0] if docs else None,
                       "20.1" if docs else None, position, draft, precedent, 1 if docs else None)


SLOT = SlotVariants(
    clause_type="termination", label="Termination", total=12, same_type=12, present=12,
    variants=(
        _bar("The draft's wording", 1, gist="\u2026than thirty (30) days\u2026", draft=True,
             text="not less than thirty (30) days' written notice"),
        _bar("The precedent's wording", 9, gist="\u2026than ninety (90) days\u2026", precedent=True,
             position="preferred", text="not less than ninety (90) days' written notice"),
        _bar("Other wording A", 2, gist="\u2026than sixty (60) days\u2026", position="fallback",
             text="not less than sixty (60) days' written notice"),
    ),
    closest=(ClosestText("ardent.docx", "20.1", 0.9, "thirty (30) days"),),
    draft_absent=False, precedent_absent=False, by_change=True,
)

#: A removed provision: 10 agreements have it, 2 have none (as the draft).
REMOVED = SlotVariants(
    clause_type="non_solicitation", label="Non-solicitation", total=12, same_type=10, present=10,
    variants=(_bar("The precedent's wording", 10, precedent=True, text="Neither party shall solicit"),),
    closest=(), draft_absent=True, precedent_absent=False, by_change=False,
)


def _ink_columns(img: QImage, y: int, colour: str) -> int:
    """How many pixels of row *y* have exactly *colour* (to measure a painted bar)."""
    return sum(1 for x in range(img.width()) if img.pixelColor(x, y).name() == colour)


def _bar_y(chart: VariantChart, i: int) -> int:
    r = chart.row_rect(i)
    return int(r.top() + r.height() * 3 / 4)  # the bar is on the row's second line


def test_bar_lengths_are_proportional_to_the_counts_of_all_agreements(qtbot):
    from desktop.palette import BAR, DELETED

    chart = VariantChart()
    qtbot.addWidget(chart)
    chart.resize(800, 260)
    chart.set_slot(SLOT, title="How the 12 past agreements word 3.1")
    img = chart.grab().toImage()
    lengths = []
    for i, b in enumerate(SLOT.variants):
        colour = BAR.draft_variant if b.draft else DELETED.strong_background if b.precedent else BAR.other_variant
        lengths.append(_ink_columns(img, _bar_y(chart, i), colour))
    # lengths scale with count / total (allowing two pixels of rounding per bar)
    unit = lengths[1] / 9
    assert unit > 10
    for n, b in zip(lengths, SLOT.variants):
        assert abs(n - b.count * unit) <= 2
    assert chart.current == 0  # the draft's wording is the current row
    assert chart.row_count == 3  # every agreement has the provision: no "no such provision" row


def test_clicking_a_bar_shows_its_wording_documents_position_and_closest_texts(qtbot):
    view = VariantsView()
    qtbot.addWidget(view)
    view.resize(1000, 320)
    view.show()
    view.set_content(slot=SLOT, provision="Section 3.1 Termination for Convenience")
    text = view.wording.toPlainText()
    assert text.startswith("The draft's wording \u25c0 draft") and "1 of 12 agreements" in text
    assert "thirty (30) days' written notice" in text
    r = view.chart.row_rect(1).toRect()
    qtbot.mouseClick(view.chart, Qt.MouseButton.LeftButton, pos=QPoint(r.left() + 5, r.center().y()))
    text = view.wording.toPlainText()
    assert text.startswith("The precedent's wording \u25c0 precedent")
    assert "9 of 12 agreements \u00b7 \u2605 preferred" in text and "ninety (90)" in text
    assert "In: 00-agreement.docx, 01-agreement.docx" in text
    assert "ardent.docx \u00b7 20.1 \u00b7 similarity 0.90" in text
    heading = view.heading.text()
    assert "12 of the 12 past agreements have a provision like it" in heading
    assert "how they word this change" in heading


def test_a_removed_provision_shows_the_agreements_without_it_as_the_drafts_choice(qtbot):
    view = VariantsView()
    qtbot.addWidget(view)
    view.resize(1000, 320)
    view.show()
    view.set_content(slot=REMOVED, provision="25 Non-Solicitation")
    chart = view.chart
    assert chart.row_count == 2 and chart.current == 1  # the "no such provision" row is the draft's
    assert view.wording.toPlainText().startswith(f"{ABSENT_ROW} \u25c0 draft")
    assert "2 of 12 agreements have no provision corresponding to this one" in view.wording.toPlainText()
    assert "is not in the draft" in view.heading.text() and "2 have none" in view.heading.text()
    img = chart.grab().toImage()
    from desktop.palette import BAR

    # The absent row is hatched, never painted in a variant's colour.
    y = _bar_y(chart, 1)
    assert _ink_columns(img, y, BAR.draft_variant) == 0 and _ink_columns(img, y, BAR.other_variant) == 0


def test_clear_empties_the_chart(qtbot):
    view = VariantsView()
    qtbot.addWidget(view)
    view.set_content(slot=SLOT, provision="3.1")
    view.clear("Select a deviation.")
    assert view.chart.slot is None and view.chart.row_count == 0 and view.chart.current == -1
    assert view.heading.text() == "Select a deviation." and not view.wording.toPlainText()
    view.chart.grab()  # paints the empty state without error
