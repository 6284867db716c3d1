"""desktop.variants: the QPainter chart of wording variants."""

from __future__ import annotations

from PySide6.QtCore import QPoint, Qt
from PySide6.QtGui import QImage

from desktop.variants import ClosestText, VariantBar, VariantChart, VariantsView

BARS = (
    VariantBar("Variant 4", 1, "not less than thirty (30) days", None, True),
    VariantBar("Variant 1", 9, "not less than ninety (90) days", "preferred"),
    VariantBar("Variant 2", 2, "not less than sixty (60) days", "fallback"),
)


def _ink_columns(img: QImage, y: int, colour: str) -> int:
    """How many pixels of row *y* have exactly *colour* (to measure a painted bar)."""
    return sum(1 for x in range(img.width()) if img.pixelColor(x, y).name() == colour)


def test_bar_lengths_are_proportional_to_the_counts(qtbot):
    from desktop.palette import BAR

    chart = VariantChart()
    qtbot.addWidget(chart)
    chart.resize(700, 200)
    chart.set_variants(BARS, total=12, title="Wordings")
    img = chart.grab().toImage()
    lengths = []
    for i, b in enumerate(BARS):
        y = int(chart.row_rect(i).center().y())
        colour = BAR.draft_variant if b.is_draft else BAR.other_variant
        lengths.append(_ink_columns(img, y, colour))
    # lengths scale with count / total (allowing one pixel of rounding per bar)
    unit = lengths[1] / 9
    for n, b in zip(lengths, BARS):
        assert abs(n - b.count * unit) <= 2
    assert chart.current == 0  # the draft's variant is the current one


def test_clicking_a_bar_shows_its_wording_and_closest_texts_stay_listed(qtbot):
    view = VariantsView()
    qtbot.addWidget(view)
    view.resize(900, 300)
    view.show()
    view.set_content(heading="h", bars=BARS, total=12, title="t",
                     closest=(ClosestText("ardent.docx", "20.1", 0.9, "thirty (30) days"),))
    assert "Variant 4 \u2014 the draft's wording" in view.wording.toPlainText()
    r = view.chart.row_rect(1).toRect()
    qtbot.mouseClick(view.chart, Qt.MouseButton.LeftButton, pos=QPoint(r.left() + 5, r.center().y()))
    text = view.wording.toPlainText()
    assert text.startswith("Variant 1") and "ninety (90)" in text
    assert "ardent.docx \u00b7 20.1 \u00b7 similarity 0.90" in text


def test_without_a_marked_variant_the_heading_says_so(qtbot):
    view = VariantsView()
    qtbot.addWidget(view)
    view.set_content(heading="Clause.", bars=BARS[1:], total=12, title="t", closest=(), marker="precedent")
    assert "No variant holds the precedent's wording" in view.heading.text()
    assert view.chart.current == -1
