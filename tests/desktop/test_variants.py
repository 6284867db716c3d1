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
             position="house wording", text="not less than ninety (90) days' written notice"),
        _bar("Other wording A", 2, gist="\u2026than sixty (60) days\u2026", position="last concession",
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


def _squares(img: QImage, chart: VariantChart, i: int, colour: str) -> int:
    """How many tally squares of row *i* have their top edge painted in *colour*: runs of
    that colour along the strip's top line, left to right (a filled square's top edge is its
    fill colour, an empty or hatched square's its outline colour)."""
    from desktop.variants import SQUARE_PX

    r = chart.row_rect(i)
    middle = r.top() + r.height() / 2 + r.height() / 4  # the strip is on the row's second line
    y = int(middle - SQUARE_PX / 2)
    runs, inside = 0, False
    for x in range(int(r.left()), int(r.right())):
        here = img.pixelColor(x, y).name() == colour
        if here and not inside:
            runs += 1
        inside = here
    return runs


def test_each_row_fills_one_square_per_agreement_with_that_wording(qtbot):
    """The tally strip (desktop.tally): one square per agreement of the set, filled for each
    agreement with the wording; measured on the pixels Qt paints."""
    from desktop.palette import TALLY

    chart = VariantChart()
    qtbot.addWidget(chart)
    chart.resize(800, 260)
    chart.set_slot(SLOT, title="How the 12 past agreements word 3.1")
    img = chart.grab().toImage()
    for i, b in enumerate(SLOT.variants):
        colour = TALLY.draft if b.draft else TALLY.precedent if b.precedent else TALLY.filled
        assert _squares(img, chart, i, colour) == b.count
        assert _squares(img, chart, i, TALLY.outline) == SLOT.total - b.count
    assert chart.current == 0  # the draft's wording is the current row
    assert chart.row_count == 3  # every agreement has the provision: no "no such provision" row


def _shown(qtbot, slot, provision: str) -> VariantsView:
    """A variants view on screen, showing *slot* for *provision*."""
    view = VariantsView()
    qtbot.addWidget(view)
    view.resize(1000, 320)
    view.show()
    view.set_content(slot=slot, provision=provision)
    return view


def test_clicking_a_row_shows_its_wording_documents_position_and_closest_texts(qtbot):
    view = _shown(qtbot, SLOT, "Section 3.1 Termination for Convenience")
    text = view.wording.toPlainText()
    assert text.startswith("The draft's wording \u25c0 draft")
    assert "\u25a0\u25a1\u25a1\u25a1\u25a1 \u25a1\u25a1\u25a1\u25a1\u25a1 \u25a1\u25a1" in text
    assert "1 past agreement out of 12 words it this way" in text
    assert "thirty (30) days' written notice" in text
    r = view.chart.row_rect(1).toRect()
    qtbot.mouseClick(view.chart, Qt.MouseButton.LeftButton, pos=QPoint(r.left() + 5, r.center().y()))
    text = view.wording.toPlainText()
    assert text.startswith("The precedent's wording \u25c0 precedent")
    assert "9 past agreements out of 12 word it this way \u00b7 \u2302 house wording" in text
    assert "ninety (90)" in text
    assert "In: 00-agreement.docx, 01-agreement.docx" in text
    assert "ardent.docx \u00b7 20.1 \u00b7 similarity 0.90" in text
    heading = view.heading.text()
    assert "12 of the 12 past agreements have a provision like it" in heading
    assert "One row per way they word this change" in heading


def test_a_removed_provision_shows_the_agreements_without_it_as_the_drafts_choice(qtbot):
    view = _shown(qtbot, REMOVED, "25 Non-Solicitation")
    chart = view.chart
    assert chart.row_count == 2 and chart.current == 1  # the "no such provision" row is the draft's
    assert view.wording.toPlainText().startswith(f"{ABSENT_ROW} \u25c0 draft")
    assert ("2 past agreements out of 12 have no provision corresponding to this one"
            in view.wording.toPlainText())
    assert "is not in the draft" in view.heading.text() and "2 have none" in view.heading.text()
    img = chart.grab().toImage()
    from desktop.palette import TALLY

    # The absent row's two agreements are hatched squares, never a variant's colour.
    assert _squares(img, chart, 1, TALLY.draft) == 0 and _squares(img, chart, 1, TALLY.filled) == 0
    assert _squares(img, chart, 1, TALLY.outline) == REMOVED.total  # all squares outlined
    y = int(chart.row_rect(1).top() + chart.row_rect(1).height() * 3 / 4)
    assert sum(img.pixelColor(x, y).name() == TALLY.hatch_ground for x in range(img.width())) > 0


def test_clear_empties_the_chart(qtbot):
    view = VariantsView()
    qtbot.addWidget(view)
    view.set_content(slot=SLOT, provision="3.1")
    view.clear("Select a deviation.")
    assert view.chart.slot is None and view.chart.row_count == 0 and view.chart.current == -1
    assert view.heading.text() == "Select a deviation." and not view.wording.toPlainText()
    view.chart.grab()  # paints the empty state without error
