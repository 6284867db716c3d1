"""desktop.palette: readable marks, and marks that stay apart for colour-blind readers.

Outside references (formulas typed from the published sources, from memory; constants
quoted with their source):
* WCAG 2.1 (W3C Recommendation, 2018), definitions "relative luminance" and "contrast ratio",
  and success criterion 1.4.3 (contrast minimum 4.5:1 for body text).
* IEC 61966-2-1 (sRGB) transfer function and sRGB -> CIE XYZ matrix (D65), CIE 15 (CIELAB,
  ΔE*ab 1976).
* Machado, Oliveira & Fernandes, "A Physiologically-based Model for Simulation of Color
  Vision Deficiency", IEEE TVCG 15(6), 2009: the severity-1.0 matrices for protanopia,
  deuteranopia and tritanopia, applied in linear RGB.
"""

from __future__ import annotations

import pytest

from desktop.palette import CAUTION_BAND, DELETED, INK, INSERTED, MUTED_INK, ROW, TERM

#: WCAG 2.1 SC 1.4.3: minimum contrast for normal-size text.
WCAG_AA_TEXT = 4.5
#: Our bar for "clearly different colours" in CIELAB ΔE*ab (1976).  A just-noticeable
#: difference is about 2.3 (Sharma, Digital Color Imaging Handbook, 2003); we ask for more
#: than six times that, so two marks are told apart at a glance, not by scrutiny.
DISTINCT_DELTA_E = 15.0

MACHADO_2009 = {  # severity 1.0
    "protanopia": ((0.152286, 1.052583, -0.204868), (0.114503, 0.786281, 0.099216), (-0.003882, -0.048116, 1.051998)),
    "deuteranopia": ((0.367322, 0.860646, -0.227968), (0.280085, 0.672501, 0.047413), (-0.011820, 0.042940, 0.968881)),
    "tritanopia": ((1.255528, -0.076749, -0.178779), (-0.078411, 0.930809, 0.147602), (0.004733, 0.691367, 0.303900)),
    "typical": ((1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)),
}


def _linear(hexcolour: str) -> tuple[float, float, float]:
    h = hexcolour.lstrip("#")
    out = []
    for i in (0, 2, 4):
        c = int(h[i:i + 2], 16) / 255
        out.append(c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4)  # IEC 61966-2-1
    return out[0], out[1], out[2]


def _luminance(hexcolour: str) -> float:
    r, g, b = _linear(hexcolour)
    return 0.2126 * r + 0.7152 * g + 0.0722 * b  # WCAG 2.1 relative luminance


def contrast(a: str, b: str) -> float:
    hi, lo = sorted((_luminance(a), _luminance(b)), reverse=True)
    return (hi + 0.05) / (lo + 0.05)  # WCAG 2.1 contrast ratio


def _lab(rgb: tuple[float, float, float]) -> tuple[float, float, float]:
    r, g, b = rgb
    x = 0.4124 * r + 0.3576 * g + 0.1805 * b
    y = 0.2126 * r + 0.7152 * g + 0.0722 * b
    z = 0.0193 * r + 0.1192 * g + 0.9505 * b

    def f(t: float) -> float:
        d = 6 / 29
        return t ** (1 / 3) if t > d ** 3 else t / (3 * d * d) + 4 / 29

    fx, fy, fz = f(x / 0.95047), f(y / 1.0), f(z / 1.08883)  # D65 white
    return 116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz)


def seen_by(hexcolour: str, vision: str) -> tuple[float, float, float]:
    m = MACHADO_2009[vision]
    v = _linear(hexcolour)
    return tuple(min(1.0, max(0.0, sum(m[i][j] * v[j] for j in range(3)))) for i in range(3))  # type: ignore[return-value]


def delta_e(a: str, b: str, vision: str) -> float:
    la, lb = _lab(seen_by(a, vision)), _lab(seen_by(b, vision))
    return sum((p - q) ** 2 for p, q in zip(la, lb)) ** 0.5


def test_contrast_formula_matches_the_wcag_extremes():
    # WCAG 2.1: black on white is 21:1, a colour on itself 1:1.
    assert contrast("#000000", "#ffffff") == pytest.approx(21.0)
    assert contrast("#777777", "#777777") == pytest.approx(1.0)


@pytest.mark.parametrize("style", [INSERTED, DELETED, TERM], ids=["inserted", "deleted", "term"])
def test_marked_text_meets_wcag_aa_on_both_backgrounds(style):
    assert contrast(style.ink, style.background) >= WCAG_AA_TEXT
    assert contrast(style.ink, style.strong_background) >= WCAG_AA_TEXT


def test_ordinary_and_secondary_text_meet_wcag_aa():
    assert contrast(INK, "#ffffff") >= WCAG_AA_TEXT
    assert contrast(MUTED_INK, "#ffffff") >= WCAG_AA_TEXT
    assert contrast(MUTED_INK, ROW.gutter) >= WCAG_AA_TEXT
    assert contrast(*CAUTION_BAND) >= WCAG_AA_TEXT


@pytest.mark.parametrize("vision", sorted(MACHADO_2009))
@pytest.mark.parametrize(
    "pair",
    [
        (INSERTED.background, DELETED.background),
        (INSERTED.strong_background, DELETED.strong_background),
        (INSERTED.ink, DELETED.ink),
        (ROW.added_stripe, ROW.removed_stripe),
        (TERM.background, DELETED.background),
    ],
    ids=["backgrounds", "selected-backgrounds", "inks", "stripes", "term-vs-deleted"],
)
def test_insertions_and_deletions_stay_apart_for_dichromats(pair, vision):
    a, b = pair
    threshold = DISTINCT_DELTA_E if pair != (TERM.background, DELETED.background) else DISTINCT_DELTA_E / 2
    # Term marks also differ by their dotted underline, so a smaller colour gap is enough.
    assert delta_e(a, b, vision) >= threshold


def test_the_check_would_reject_a_red_green_pair():
    # Control: pale green against pale red, the usual pair we avoid, collapses for a
    # deuteranope under the same simulation, so the test above is not vacuous.
    assert delta_e("#d4f0d4", "#f8d4d4", "typical") >= DISTINCT_DELTA_E
    assert delta_e("#d4f0d4", "#f8d4d4", "deuteranopia") < DISTINCT_DELTA_E / 2
