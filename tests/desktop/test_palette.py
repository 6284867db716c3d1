"""desktop.palette: readable marks, marks that stay apart for colour-blind readers and in a
greyscale print, and a non-colour cue on every mark.

Outside references (formulas typed from the published sources, from memory; constants
quoted with their source):

* WCAG 2.1 (W3C Recommendation, 2018), definitions "relative luminance" and "contrast
  ratio", success criterion 1.4.3 (contrast minimum 4.5:1 for body text) and 1.4.11
  (non-text contrast 3:1).
* IEC 61966-2-1 (sRGB): the transfer function and the sRGB -> CIE XYZ matrix (D65).
* CIE 15 (colorimetry): CIELAB and the colour difference Delta E*ab (1976); L* is the
  lightness a greyscale print keeps.
* Machado, Oliveira & Fernandes, "A Physiologically-based Model for Simulation of Color
  Vision Deficiency", IEEE TVCG 15(6), 2009: the severity-1.0 matrices for protanopia,
  deuteranopia and tritanopia, applied to linear RGB.
"""

from __future__ import annotations

import numpy as np
import pytest

from desktop.palette import CAUTION_BAND, CHECKS, DELETED, INK, INSERTED, MUTED_INK, ROW, TALLY, TERM

#: WCAG 2.1 SC 1.4.3: minimum contrast for normal-size text.
WCAG_AA_TEXT = 4.5
#: WCAG 2.1 SC 1.4.11: minimum contrast for graphical objects (the tally squares).
WCAG_NON_TEXT = 3.0
#: Our bar for "clearly different colours" in CIELAB Delta E*ab (1976).  A just-noticeable
#: difference is about 2.3 (Sharma, Digital Color Imaging Handbook, 2003; from memory); we ask
#: for more than six times that, so two marks are told apart at a glance, not by scrutiny.
DISTINCT_DELTA_E = 15.0
#: Our bar for two washes a greyscale print must keep apart: ten CIE L* units, over four
#: times the lightness step of the JND above (our own choice).
GREY_DELTA_L = 10.0

#: Machado et al. 2009, Table 1, severity 1.0 (rows: R', G', B' from linear R, G, B).
MACHADO_2009 = {
    "protanopia": ((0.152286, 1.052583, -0.204868), (0.114503, 0.786281, 0.099216),
                   (-0.003882, -0.048116, 1.051998)),
    "deuteranopia": ((0.367322, 0.860646, -0.227968), (0.280085, 0.672501, 0.047413),
                     (-0.011820, 0.042940, 0.968881)),
    "tritanopia": ((1.255528, -0.076749, -0.178779), (-0.078411, 0.930809, 0.147602),
                   (0.004733, 0.691367, 0.303900)),
    "typical": ((1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)),
}
#: IEC 61966-2-1: linear sRGB -> CIE XYZ (D65), and the D65 white point.
SRGB_TO_XYZ = np.array(((0.4124, 0.3576, 0.1805), (0.2126, 0.7152, 0.0722), (0.0193, 0.1192, 0.9505)))
D65 = np.array((0.95047, 1.0, 1.08883))


def linear(hexcolour: str) -> np.ndarray:
    """IEC 61966-2-1 decoding of an sRGB hex colour to linear RGB in 0..1."""
    c = np.array([int(hexcolour.lstrip("#")[i:i + 2], 16) / 255 for i in (0, 2, 4)])
    return np.where(c <= 0.04045, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)


def luminance(hexcolour: str) -> float:
    """WCAG 2.1 relative luminance."""
    return float(np.dot((0.2126, 0.7152, 0.0722), linear(hexcolour)))


def contrast(a: str, b: str) -> float:
    """WCAG 2.1 contrast ratio (L1 + 0.05) / (L2 + 0.05), L1 the lighter."""
    hi, lo = sorted((luminance(a), luminance(b)), reverse=True)
    return (hi + 0.05) / (lo + 0.05)


def lab(rgb: np.ndarray) -> np.ndarray:
    """CIE 15 CIELAB of a linear RGB triple (D65)."""
    t = SRGB_TO_XYZ @ rgb / D65
    d = 6 / 29
    f = np.where(t > d ** 3, np.cbrt(t), t / (3 * d * d) + 4 / 29)
    return np.array((116 * f[1] - 16, 500 * (f[0] - f[1]), 200 * (f[1] - f[2])))


def seen_by(hexcolour: str, vision: str) -> np.ndarray:
    """Machado et al. 2009: the linear RGB a dichromat sees, clipped to the gamut."""
    return np.clip(np.array(MACHADO_2009[vision]) @ linear(hexcolour), 0.0, 1.0)


def delta_e(a: str, b: str, vision: str) -> float:
    return float(np.linalg.norm(lab(seen_by(a, vision)) - lab(seen_by(b, vision))))


def grey_lightness(hexcolour: str) -> float:
    """CIE L*: the grey a greyscale print makes of the colour."""
    return float(lab(linear(hexcolour))[0])


# -- the formulas against their published fixed points ------------------------------------


def test_formulas_match_published_values():
    # WCAG 2.1: black on white is 21:1, a colour on itself 1:1; #767676 on white is the
    # familiar 4.54:1, the lightest grey that passes 1.4.3 (a widely quoted example).
    assert contrast("#000000", "#ffffff") == pytest.approx(21.0)
    assert contrast("#777777", "#777777") == pytest.approx(1.0)
    assert contrast("#767676", "#ffffff") == pytest.approx(4.54, abs=0.01)
    # CIE 15: white is L* 100, black 0, and sRGB mid grey (#777777) about L* 50.
    assert grey_lightness("#ffffff") == pytest.approx(100.0, abs=0.01)
    assert grey_lightness("#000000") == pytest.approx(0.0, abs=0.01)
    assert grey_lightness("#777777") == pytest.approx(50.0, abs=1.0)
    # Machado 2009: each matrix's rows sum to 1, so white and greys are seen unchanged.
    for vision in MACHADO_2009:
        assert seen_by("#ffffff", vision) == pytest.approx((1.0, 1.0, 1.0), abs=1e-3)


# -- legibility -----------------------------------------------------------------------------


@pytest.mark.parametrize("style", [INSERTED, DELETED, TERM], ids=["inserted", "deleted", "term"])
def test_marked_text_meets_wcag_aa_on_both_backgrounds(style):
    assert contrast(style.ink, style.background) >= WCAG_AA_TEXT
    assert contrast(style.ink, style.strong_background) >= WCAG_AA_TEXT


def test_ordinary_and_secondary_text_meet_wcag_aa():
    assert contrast(INK, "#ffffff") >= WCAG_AA_TEXT
    assert contrast(MUTED_INK, "#ffffff") >= WCAG_AA_TEXT
    assert contrast(MUTED_INK, ROW.gutter) >= WCAG_AA_TEXT
    assert contrast(*CAUTION_BAND) >= WCAG_AA_TEXT
    # the gutter's status glyphs are drawn in the stripe colours
    assert contrast(ROW.added_stripe, ROW.gutter) >= WCAG_AA_TEXT
    assert contrast(ROW.removed_stripe, ROW.gutter) >= WCAG_AA_TEXT


@pytest.mark.parametrize("colour", [TALLY.filled, TALLY.draft, TALLY.precedent, TALLY.outline])
def test_tally_squares_meet_the_non_text_contrast_on_white(colour):
    assert contrast(colour, TALLY.empty) >= WCAG_NON_TEXT
    assert contrast(colour, "#eef1f6") >= WCAG_NON_TEXT  # the chart's current-row fill


# -- colour-vision deficiencies --------------------------------------------------------------


@pytest.mark.parametrize("vision", sorted(MACHADO_2009))
@pytest.mark.parametrize(
    "pair, threshold",
    [
        ((INSERTED.background, DELETED.background), DISTINCT_DELTA_E),
        ((INSERTED.strong_background, DELETED.strong_background), DISTINCT_DELTA_E),
        ((INSERTED.background, DELETED.strong_background), DISTINCT_DELTA_E),
        ((INSERTED.strong_background, DELETED.background), DISTINCT_DELTA_E),
        ((INSERTED.ink, DELETED.ink), DISTINCT_DELTA_E),
        ((ROW.added_stripe, ROW.removed_stripe), DISTINCT_DELTA_E),
        ((TALLY.draft, TALLY.precedent), DISTINCT_DELTA_E),
        ((TALLY.draft, TALLY.filled), DISTINCT_DELTA_E),
        ((TALLY.precedent, TALLY.filled), DISTINCT_DELTA_E),
        # Term marks also differ by their dotted underline, so half the gap is enough.
        ((TERM.background, DELETED.background), DISTINCT_DELTA_E / 2),
        ((TERM.background, INSERTED.background), DISTINCT_DELTA_E / 2),
        ((TERM.strong_background, DELETED.strong_background), DISTINCT_DELTA_E / 2),
        ((TERM.strong_background, INSERTED.strong_background), DISTINCT_DELTA_E / 2),
    ],
    ids=["washes", "selected-washes", "wash-vs-selected", "selected-vs-wash", "inks", "stripes",
         "tally-draft-precedent", "tally-draft-other", "tally-precedent-other", "term-vs-deleted",
         "term-vs-inserted", "selected-term-vs-deleted", "selected-term-vs-inserted"],
)
def test_insertions_and_deletions_stay_apart_for_dichromats(pair, threshold, vision):
    a, b = pair
    assert delta_e(a, b, vision) >= threshold


def test_the_check_would_reject_a_red_green_pair():
    # Control: pale green against pale red, the pair we avoid, collapses for a deuteranope
    # under the same simulation, so the test above is not vacuous.
    assert delta_e("#d4f0d4", "#f8d4d4", "typical") >= DISTINCT_DELTA_E
    assert delta_e("#d4f0d4", "#f8d4d4", "deuteranopia") < DISTINCT_DELTA_E / 2


# -- greyscale print and the non-colour cues --------------------------------------------------


@pytest.mark.parametrize("pair", [(INSERTED.background, DELETED.background),
                                  (INSERTED.strong_background, DELETED.strong_background)],
                         ids=["washes", "selected-washes"])
def test_a_greyscale_print_keeps_the_two_washes_apart(pair):
    a, b = pair
    assert abs(grey_lightness(a) - grey_lightness(b)) >= GREY_DELTA_L


def test_the_check_would_reject_washes_of_one_lightness():
    # Control: the old blue and orange washes had the same lightness (both about L* 91-92):
    # in greyscale only the underline and the strike told them apart.
    assert abs(grey_lightness("#d9e8f8") - grey_lightness("#fde3cb")) < GREY_DELTA_L


def test_each_mark_has_its_own_non_colour_cue(qtbot):
    """The side-by-side view's runs (desktop.sidebyside): inserted words underlined with a
    solid line, deleted words struck through, renamed terms underlined with dots."""
    from PySide6.QtGui import QFont, QTextCharFormat, QTextCursor

    from core.model import Provision
    from desktop import marks as mk
    from desktop.sidebyside import cell_document

    text = "alpha beta gamma"
    prov = Provision("p1", "clause", "1", None, 1, None, text)
    cues = {}
    for kind, (a, b) in ((mk.INSERTED, (0, 5)), (mk.DELETED, (6, 10)), (mk.TERM, (11, 16))):
        doc = cell_document(prov, text_marks=[mk.Mark(a, b, kind)], caption_note="",
                            number_changed=False, side="draft", font=QFont(), width=400)
        cur = QTextCursor(doc)
        cur.setPosition(doc.find(text[a:b]).selectionStart() + 1)
        fmt: QTextCharFormat = cur.charFormat()
        cues[kind] = (fmt.underlineStyle(), fmt.fontStrikeOut())
    U = QTextCharFormat.UnderlineStyle
    assert cues[mk.INSERTED] == (U.SingleUnderline, False)
    assert cues[mk.DELETED] == (U.NoUnderline, True)
    assert cues[mk.TERM] == (U.DotLine, False)


def test_the_html_issues_list_washes_changed_words_as_the_window_does():
    """The printable issues list (core.export.issues) marks the precedent's changed words
    with the window's deletion wash and the draft's with its insertion wash, in ink that
    meets WCAG AA on both."""
    from core.export import issues

    palette = issues._PALETTE
    assert (palette["was"], palette["now"]) == (DELETED.background, INSERTED.background)
    for wash in ("was", "now", "head", "group"):
        assert contrast(palette["ink"], palette[wash]) >= WCAG_AA_TEXT


def test_the_checks_headings_meet_wcag_aaa():
    # WCAG 2.1 SC 1.4.6 (contrast, enhanced): 7:1 for text.
    assert contrast(CHECKS.heading_ink, CHECKS.heading_ground) >= 7.0
