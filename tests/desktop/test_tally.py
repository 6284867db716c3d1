"""desktop.tally: the tally strip, against exact arithmetic (fractions.Fraction) and
hypothesis-generated counts; and where the window shows it."""

from __future__ import annotations

from fractions import Fraction

from hypothesis import given
from hypothesis import strategies as st

from desktop.tally import GROUP, TENTHS, UNIT_MAX, tally, tally_glyphs, tally_words

from .fixtures import make_review


@given(total=st.integers(1, 400), data=st.data())
def test_the_strip_shows_the_share_to_half_a_square_and_never_misreads_none_or_all(total, data):
    matching = data.draw(st.integers(0, total))
    t = tally(matching, total)
    assert t is not None
    if total <= UNIT_MAX:  # one square per agreement: exact
        assert (t.cells, t.filled, t.exact) == (total, matching, True)
    else:  # tenths: within half a square by rounding, one when kept off none and all
        assert t.cells == TENTHS and not t.exact
        assert abs(Fraction(t.filled, TENTHS) - Fraction(matching, total)) <= Fraction(1, TENTHS)
        if 0 < matching < total:
            assert 0 < t.filled < TENTHS
    assert (t.filled == 0) == (matching == 0) and (t.filled == t.cells) == (matching == total)
    # groups of five, in order, covering the strip
    groups = t.groups()
    assert sum(groups) == t.cells and all(g == GROUP for g in groups[:-1]) and 0 < groups[-1] <= GROUP
    glyphs = tally_glyphs(t)
    assert [len(g) for g in glyphs.split(" ")] == groups
    assert glyphs.count("\u25a0") == t.filled and glyphs.count("\u25a1") == t.cells - t.filled


def test_words_say_the_count_and_the_scale():
    assert tally(0, 0) is None
    assert tally_words(tally(1, 12)) == "1 past agreement out of 12 has this wording"
    assert tally_words(tally(2, 12)) == "2 past agreements out of 12 have this wording"
    assert tally_words(tally(0, 12)) == "none of the 12 past agreements has this wording"
    assert tally_words(tally(12, 12)) == "all 12 past agreements have this wording"
    assert tally_words(tally(0, 1)) == "the one past agreement does not have this wording"
    assert tally_words(tally(40, 200)).endswith("(each square about 20 agreements)")


def test_the_detail_panel_shows_the_strip_the_figure_and_the_sentence(qtbot):
    from desktop.decision import deviation_html

    review = make_review(with_frequency=True)
    d = review.deviations[0]  # fixtures: matching 1 of 12
    html = deviation_html(review, d)
    assert "Past use" in html and tally_glyphs(tally(1, 12)) in html and "1/12" in html
    assert "1 past agreement out of 12 has the draft's wording" in html
    assert "12 have a provision of this type" in html
    # the words first, then their past use, then why it matters
    assert html.index("Precedent<") < html.index("Past use") < html.index("Why it matters")
