"""Numbers are always substance: the figures guard (core.review.figures), the last rule of
the review.

Texts: excerpts of licences from the PyPI package ``licensedcode-data`` (``gpl-2.0``,
``psf-3.7.2``, ``apache-1.0``, ``apache-1.1``, ``apache-2.0``, ``hippocratic-2.1``), each
with one change planted where two real versions do not already differ so; invented names
and figures where an agreement's own words are needed (all invented).
"""

from __future__ import annotations

from core.review import TermOverride, run_review
from core.review.figures import figure_reasons, figures_in

from .helpers import by_category, doc, excerpt, substantive


def test_figures_of_a_text_leave_out_labels_and_references():
    # psf-3.7.2: 'Copyright © 2001-2019 Python Software Foundation' and 'Python 3.7.2'
    psf = excerpt("psf-3.7.2", "1. This LICENSE AGREEMENT", "Python Software Foundation; All Rights")
    assert figures_in(psf) == ("3.7.2", "3.7.2", "2001-2019")  # "1." is the clause's label
    # gpl-2.0, section 3: "(or a work based on it, under Section 2) ... Sections 1 and 2
    # above": references to the licence's own sections, which the review follows to the
    # section they name.
    gpl = excerpt("gpl-2.0", "You may copy and distribute the Program", "do one of the following:")
    assert figures_in(gpl) == ()
    assert figures_in("pay \u00a31,000 within 30 days") == ("1000", "30")
    # a defined term's name is no reference: its figures count
    assert figures_in("Schedule 1 Services", references=True) == ("1",)


def test_figure_reasons_name_old_and_new_values():
    # the reference alignment of the two lists is the standard library's difflib
    assert figure_reasons(("2001", "2006"), ("2001", "2019")) == (
        "figure changed from 2006 to 2019",)
    assert figure_reasons(("1.1",), ()) == ("figure removed: 1.1",)
    assert figure_reasons((), ("2016/679",)) == ("figure added: 2016/679",)
    assert figure_reasons(("3",), ("3",)) == ()


def test_version_number_removed_from_a_title_is_substantive():
    # gpl-2.0's title lines: "GNU GENERAL PUBLIC LICENSE / Version 2, June 1991"
    title = excerpt("gpl-2.0", "GNU GENERAL PUBLIC LICENSE", "June 1991")
    body = "\n\n1. Copying\n\nYou may copy the Program.\n"
    review = run_review(doc("GNU GENERAL PUBLIC LICENSE" + body),
                        doc(title.replace(" Version", "\nVersion") + body))
    (v,) = substantive(review)
    assert v.precedent_text == "Version 2, June 1991"
    assert {"figure removed: 2", "figure removed: 1991"} <= set(v.reasons)


def test_a_heading_added_with_a_version_number_is_substantive():
    """A heading only added is formatting (the rule file's [headings]) -- unless it carries
    a figure.  psf-3.7.2's clause 4, with a heading line planted in the draft."""
    text = excerpt("psf-3.7.2", "4. PSF is making Python 3.7.2 available", '"AS IS" basis.')
    start = "1. Scope\n\nThis Agreement covers Python.\n\n"
    precedent = doc(f"{start}{text}\n")
    draft = doc(f"{start}{text.replace('4. PSF', '4. Release 3.7.2' + chr(10) * 2 + 'PSF')}\n")
    headings = [v for v in review_devs(draft, precedent) if v.part == "heading"]
    assert [(v.category, v.reasons[0]) for v in headings] == [
        ("substantive", "figure added: 3.7.2")]
    plain = doc(f"{start}{text.replace('4. PSF', '4. Release' + chr(10) * 2 + 'PSF')}\n")
    assert [v.category for v in review_devs(plain, precedent) if v.part == "heading"] == [
        "formatting"]


def review_devs(draft, precedent):
    return run_review(draft, precedent).deviations


def test_a_blank_filled_in_with_a_figure_is_substantive():
    """apache-2.0's appendix: "Copyright [yyyy] [name of copyright owner]", filled in by the
    draft.  The year is a figure: substantive, and the reasons say that it fills a blank."""
    line = excerpt("apache-2.0", "Copyright [yyyy]", "copyright owner]")
    review = run_review(doc("1. Notice\n\nCopyright 2026 Ardence Tools Ltd\n"),
                        doc(f"1. Notice\n\n{line}\n"))
    (v,) = review.deviations
    assert v.category == "substantive"
    assert v.reasons[0] == "figure added: 2026"
    assert v.reasons[1].startswith("blank of the precedent filled in: [yyyy] [name of copyright owner]")
    # a name alone fills the blank without a figure: completion
    review = run_review(doc("1. Notice\n\nCopyright [yyyy] Ardence Tools Ltd\n"),
                        doc(f"1. Notice\n\n{line}\n"))
    assert [v.category for v in review.deviations] == ["completion"]


def test_a_renamed_term_whose_name_changes_a_figure_is_substantive():
    """The term map reads "Schedule 2 Services" as the precedent's "Schedule 1 Services" (here
    on the reviewer's word); the guard still reports the figure (invented agreement)."""
    precedent = doc('1. Definitions\n\n1.1 "Schedule 1 Services" means the services in the '
                    'order form.\n\n2. Supply\n\n2.1 The Supplier shall provide the Schedule 1 '
                    'Services.\n')
    draft = doc('1. Definitions\n\n1.1 "Schedule 2 Services" means the services in the '
                'order form.\n\n2. Supply\n\n2.1 The Supplier shall provide the Schedule 2 '
                'Services.\n')
    review = run_review(draft, precedent, overrides=[
        TermOverride(draft="Schedule 2 Services", precedent="Schedule 1 Services")])
    assert [(m.draft, m.precedent) for m in review.term_map] == [
        ("Schedule 2 Services", "Schedule 1 Services")]
    (v,) = [v for v in review.deviations if v.part == "provision"]
    assert v.category == "substantive"
    assert v.reasons[0] == "figure changed from 1 to 2"
    assert by_category(review, "term") == []


def test_a_regulation_cited_in_a_sentence_is_substantive_with_its_number():
    # hippocratic-2.1's arbitration clause; the draft also cites a regulation (invented
    # number)
    sentence = excerpt("hippocratic-2.1", "shall be settled by arbitration", "Arbitration (the")
    precedent = doc(f"1. Disputes\n\nAny dispute {sentence} \u201cRules\u201d).\n")
    cited = sentence.replace("Arbitration (the", "Arbitration and Regulation 2031/117 (the")
    (v,) = substantive(run_review(doc(f"1. Disputes\n\nAny dispute {cited} \u201cRules\u201d).\n"),
                                  precedent))
    assert "2031/117" in v.draft_text
    figures = [r for r in v.reasons if r.startswith("figure")]
    assert figures and all(any(n in r for r in figures) for n in ("2031", "117"))


def test_renumbered_reference_is_no_figure_change_but_a_new_target_is():
    """gpl-2.0, section 3: "under the terms of Sections 1 and 2 above".  A reference that
    follows its renumbered section stays numbering; a section added to the list is
    substantive (the figures guard leaves references to the classifier, which follows them
    to the provision they name)."""
    sentence = excerpt("gpl-2.0", "You may copy and distribute the Program", "do one of the following:")
    body = ("1. Copying\n\nYou may copy the Program.\n\n2. Modifying\n\nYou may modify the "
            "Program.\n\n{extra}{n}. Object code\n\n{s}\n\n{m}. Termination\n\nYou may not copy "
            "the Program except as provided.\n")
    precedent = doc(body.format(extra="", n=3, m=4, s=sentence))
    added = sentence.replace("Sections 1 and 2", "Sections 1, 2 and 4")
    review = run_review(doc(body.format(extra="", n=3, m=4, s=added)), precedent)
    assert any("4" in v.draft_text for v in substantive(review))
    # a new section 3 pushes Object code to 4 and Termination to 5; the draft's reference to
    # Section 2 still names Modifying: no deviation but the added section
    renumbered = body.format(extra="3. Patents\n\nNo patent licence is granted.\n\n", n=4, m=5,
                             s=sentence)
    review = run_review(doc(renumbered), precedent)
    assert [v.change for v in substantive(review)] == ["add-provision"]


def test_merged_provisions_keep_the_figures_of_the_second():
    """apache-1.0's clauses 5 and 6 become clause 5 of apache-1.1 (clause 6, the
    acknowledgment, is dropped): the change that runs on from clause 5 into clause 6 is
    reported on both, so the dropped clause's words (and figures) are not lost."""
    five = excerpt("apache-1.0", "5. Products derived from this software", "the Apache Group.")
    six = excerpt("apache-1.0", "6. Redistributions of any form whatsoever", "(http://www.apache.org/).\"")
    new_five = excerpt("apache-1.1", "5. Products derived from this software", "Apache Software Foundation.")
    tail = "THIS SOFTWARE IS PROVIDED WITHOUT WARRANTY OF ANY KIND."
    review = run_review(doc(f"{new_five}\n{tail}\n"), doc(f"{five}\n\n{six}\n{tail}\n"))
    removed = " ".join(v.precedent_text for v in substantive(review))
    assert "Redistributions of any form whatsoever" in removed


def test_labels_glued_to_their_headings_are_numbering_not_figures():
    """Clause labels glued to their headings ("2.Scope", as documents converted from other
    formats often have them: common practice, no source; invented clauses).  The reader
    takes them as labels (core.structure), so a new clause 2 renumbers Scope and Price: the
    labels are numbering, and the new clause's reasons name no label as a figure."""
    precedent = doc("1.Definitions\n\nThe Goods means the goods.\n\n2.Scope\n\nThe Supplier "
                    "shall supply the Goods.\n\n3.Price\n\nThe price is 100 euros.\n")
    draft = doc("1.Definitions\n\nThe Goods means the goods.\n\n2.Delivery\n\nThe Supplier "
                "shall deliver the Goods.\n\n3.Scope\n\nThe Supplier shall supply the Goods."
                "\n\n4.Price\n\nThe price is 100 euros.\n")
    review = run_review(draft, precedent)
    assert [(v.precedent_text, v.draft_text, v.reasons) for v in by_category(review, "numbering")
            ] == [("2", "3", ("renumbered from 2 to 3",)), ("3", "4", ("renumbered from 3 to 4",))]
    (added,) = substantive(review)
    assert "deliver the Goods" in added.draft_text and "delivery" in added.reasons[0]
    assert not any(r.startswith("figure") for r in added.reasons)


def test_a_period_filling_a_blank_outranks_a_date_filling_one():
    """Both are substantive (numbers are always substance); a period or amount written into
    a blank ("[\u25cf] days", common practice in templates, no source) is the deal's own
    term and scores as a figure added, a date or address scores number_filled_in (the rule
    file): the precedent asked for a value there.  Invented clause."""
    form = ("1. Payment\n\nThe Customer shall pay each invoice within [\u25cf] days of the "
            "date of the invoice dated [insert date].\n")
    filled = form.replace("[\u25cf] days", "45 days").replace("[insert date]", "1 May 2026")
    review = run_review(doc(filled), doc(form))
    period = next(v for v in review.deviations if "45" in v.draft_text)
    date = next(v for v in review.deviations if "2026" in v.draft_text)
    assert period.category == date.category == "substantive"
    assert period.reasons[0] == "figure added: 45"
    assert period.severity > date.severity > 0


# --------------------------------------------------------------------------------------
# A span's figures without scanning the whole text (a long provision has many changes)
# --------------------------------------------------------------------------------------

from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

_PIECES = ["within", "1,000", "days", "of", "Section 4.2", "(b)", "2016/679", "2.Scope",
           "version 3.7.2", "2001-2019", "(2)", "clauses 3 and 4", "10:30", "-", ";", "12"]


def _slow_figures_in(text: str, span: tuple[int, int], references: bool) -> tuple[str, ...]:
    """Reference: the definition, scanning the whole text with FIGURE_RE and every skipped
    span by a linear search (as the guard did before figures were looked up per span)."""
    from core.review.figures import FIGURE_RE, _normal
    from core.review.noise import label_spans
    from core.review.tokens import find_cross_references

    a, b = span
    skip = [] if references else label_spans(text) + [(s, e) for s, e, *_ in find_cross_references(text)]
    out = []
    for m in FIGURE_RE.finditer(text):
        if m.end() <= a or m.start() >= b or (a == b and not m.start() < a < m.end()):
            continue
        if any(s <= m.start() < e for s, e in skip):
            continue
        out.append(_normal(m.group()))
    return tuple(out)


@settings(max_examples=400, deadline=None)
@given(st.lists(st.sampled_from(_PIECES), min_size=1, max_size=30), st.data(), st.booleans())
def test_figures_of_a_span_equal_a_scan_of_the_whole_text(parts, data, references) -> None:
    text = " ".join(parts)
    a = data.draw(st.integers(0, len(text)))
    b = data.draw(st.integers(a, len(text)))
    assert figures_in(text, (a, b), references=references) == _slow_figures_in(text, (a, b), references)
