"""The comparison redline (core.export.redline), in its two views.

Outside references, named at each check:
* LibreOffice headless (Debian's libreoffice-writer, through UNO: tests/support/lo_uno.py)
  accepts or rejects every tracked change, lists the tracked changes with the text each
  covers, reads list labels and tables, and converts each .docx to PDF;
* ECMA-376 Part 1 §17.13.5 (revisions: w:ins §17.13.5.18, w:del §17.13.5.14, w:moveFrom
  §17.13.5.22, w:moveTo §17.13.5.25 and the move range markers §17.13.5.23/.24/.27/.28),
  read directly from the XML and through our structural validator (core.docx.validate),
  run on every .docx written here; §17.4 for the tables;
* a real legal text from outside the project: the Apache License 2.0 as the PyPI package
  ``licensedcode-data`` carries it (``licensedcode/data/licenses/apache-2.0.LICENSE``,
  tests/support/legal_texts.py), written to .docx with Word auto-numbering;
* ``difflib``-style word diffs (core.review.worddiff) only as input for the piece tiling
  property test.
"""

from __future__ import annotations

import dataclasses
import io
import re
import zipfile

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from lxml import etree

from core import CAUTION
from core.decisions import Decision
from core.docx.revisions import w
from core.docx.validate import validate_docx
from core.export import (
    REDLINE_BODY_HEADINGS,
    REDLINE_END,
    plan_counter_draft,
    redline_body,
    redline_bytes,
    write_redline,
)
from tests.core.export.conftest import AUTHOR, DEMO
from tests.core.export.conftest import made_deviation as _made_deviation
from tests.core.export.conftest import no_second_diff as _no_second_diff
from tests.support.lo_session import libreoffice

# --------------------------------------------------------------------------------------
# Helpers
# --------------------------------------------------------------------------------------


def _comparison_body(view, show: str) -> list[str]:
    paras = view.paragraphs
    start = paras.index(REDLINE_BODY_HEADINGS[show]) + 1
    end = paras.index(REDLINE_END)
    return paras[start:end]


def _lines(doc) -> list[str]:
    """The paragraphs as the redline writes them: label, tab, text (our reader's labels)."""
    return [f"{b.label}\t{b.text}" if b.label else b.text for b in doc.blocks]


def _office_lines(view) -> list[str]:
    """The paragraphs of a document as LibreOffice reads it: its own list label (computed
    from numbering.xml), a tab, the text."""
    return [f"{el['label']}\t{el['text']}" if el["label"] else el["text"]
            for el in view.body if el["type"] == "paragraph"]


def _document(data: bytes) -> etree._Element:
    with zipfile.ZipFile(io.BytesIO(data)) as zf:
        return etree.fromstring(zf.read("word/document.xml"))


def _run_text(el: etree._Element) -> str:
    parts = []
    for x in el.iter(w("t"), w("delText"), w("tab"), w("br")):
        parts.append({w("tab"): "\t", w("br"): "\n"}.get(x.tag, x.text or ""))
    return "".join(parts)


def _tracked_runs(data: bytes) -> list[tuple[str, str]]:
    """(kind, text) of every tracked run in the body, in order: the w:ins, w:del, w:moveFrom
    and w:moveTo elements holding text (ECMA-376 Part 1 §17.13.5.14/.18/.22/.25); a
    revision on a paragraph mark (inside w:rPr) holds none."""
    body = _document(data).find(w("body"))
    kinds = (w("ins"), w("del"), w("moveFrom"), w("moveTo"))
    return [(etree.QName(el).localname, _run_text(el)) for el in body.iter(*kinds)
            if any(True for _ in el.iter(w("t"), w("delText")))]


def _office_changes(view) -> list[tuple[str, str]]:
    """(type, text) of each tracked change LibreOffice sees, a paragraph end dropped."""
    return [(r["type"], (r["text"] or "").rstrip("\n")) for r in view.redlines]


def _accept_reject(paras) -> tuple[list[str], list[str]]:
    """Each paragraph's text with all changes accepted and with all rejected, read from the
    runs as ECMA-376 Part 1 §17.13.5 defines the marks (ins/moveTo kept on acceptance,
    del/moveFrom kept on rejection; a paragraph whose mark is deleted or moved away goes)."""
    accepted = ["".join(r.text for r in p.runs if r.mark in ("", "ins", "moveTo"))
                for p in paras if p.mark not in ("del", "moveFrom")]
    rejected = ["".join(r.text for r in p.runs if r.mark in ("", "del", "moveFrom"))
                for p in paras if p.mark not in ("ins", "moveTo")]
    return accepted, rejected


@pytest.fixture(scope="module")
def demo_review():
    from core.reader import read_document
    from core.review import run_review

    return run_review(read_document(str(DEMO / "draft.docx")), read_document(str(DEMO / "precedent.docx")))


def _substantive(review):
    return [d for d in review.deviations if d.category == "substantive"]


# --------------------------------------------------------------------------------------
# The full view (show="all"): every difference, moves as moves
# --------------------------------------------------------------------------------------


def test_full_redline_accepts_to_the_draft_and_rejects_to_the_precedent(scenario, tmp_path):
    out = tmp_path / "redline.docx"
    write_redline(scenario.review, out, author=AUTHOR, show="all")
    assert validate_docx(out) == []  # ECMA-376 Part 1 §17.13, move ranges paired
    root = _document(out.read_bytes())
    # The moved clause (Notices) is a move (§17.13.5.22/.25), not a deletion and insertion.
    from_names = {e.get(w("name")) for e in root.iter(w("moveFromRangeStart"))}
    to_names = {e.get(w("name")) for e in root.iter(w("moveToRangeStart"))}
    assert from_names and from_names == to_names
    moved_from = "".join(t.text for m in root.iter(w("moveFrom")) for t in m.iter(w("delText")))
    assert "Notices must be in writing" in moved_from

    office = libreoffice()
    view = office.inspect(out, pdf=tmp_path / "redline.pdf")
    assert view.pdf_bytes and view.pdf_bytes > 1000
    assert CAUTION in view.paragraphs[:4]
    (table,) = [el for el in view.body if el["type"] == "table"]
    subs = sorted(_substantive(scenario.review), key=lambda d: d.rank)
    assert [row[0] for row in table["rows"][1:]] == [str(d.rank) for d in subs]
    assert [row[1] for row in table["rows"][1:]] == [str(d.severity) for d in subs]

    accepted = office.inspect(out, action="accept")
    assert accepted.redlines_after == 0
    assert _comparison_body(accepted, "all") == _lines(scenario.review.draft)
    rejected = office.inspect(out, action="reject")
    assert rejected.redlines_after == 0
    assert _comparison_body(rejected, "all") == _lines(scenario.review.precedent)


def _check_move_ranges(root: etree._Element) -> int:
    """Each move's range markers as ECMA-376 Part 1 §17.13.5.23/.24 (moveFromRangeEnd/Start)
    and §17.13.5.27/.28 (moveToRangeEnd/Start) describe them; returns the number of ranges.

    A range start carries a numeric w:id, the move's w:name, w:author and w:date; the range
    end of the same kind with the same w:id follows it; both sit in paragraph content (a
    child of w:p); every moved run (w:moveFrom/w:moveTo outside a paragraph mark's w:rPr)
    lies inside a range of its kind; each name has a moveFrom and a moveTo range."""
    order = {el: k for k, el in enumerate(root.iter())}
    names: dict[str, set[str]] = {"moveFrom": set(), "moveTo": set()}
    count = 0
    for kind in ("moveFrom", "moveTo"):
        ranges = []
        ends = {e.get(w("id")): e for e in root.iter(w(f"{kind}RangeEnd"))}
        starts = list(root.iter(w(f"{kind}RangeStart")))
        assert len(starts) == len(ends)
        for start in starts:
            rid = start.get(w("id"))
            assert rid and rid.isdigit()
            assert start.get(w("name")) and start.get(w("author"))
            assert re.fullmatch(r"\d{4}-\d\d-\d\dT\d\d:\d\d:\d\dZ", start.get(w("date")))
            end = ends[rid]
            assert order[end] > order[start]
            assert start.getparent().tag == w("p") and end.getparent().tag == w("p")
            ranges.append((order[start], order[end]))
            names[kind].add(start.get(w("name")))
            count += 1
        for el in root.iter(w(kind)):
            if el.getparent().tag != w("rPr"):
                assert any(a < order[el] < b for a, b in ranges)
    assert names["moveFrom"] == names["moveTo"]
    return count


def test_full_redline_writes_moves_inside_well_formed_range_markers(scenario, demo_review):
    for review in (scenario.review, demo_review):
        data = redline_bytes(review, author=AUTHOR, show="all")
        assert validate_docx(data) == []  # our ECMA-376 §17.13 validator agrees
        root = _document(data)
        assert _check_move_ranges(root) >= 2  # at least one move: its source and its target
        moved_pairs = {p.precedent for p in review.pairs if p.status == "moved"}
        assert len({e.get(w("name")) for e in root.iter(w("moveFromRangeStart"))}) <= len(moved_pairs)


def test_demo_full_redline_accepts_to_the_draft_and_rejects_to_the_precedent(demo_review, tmp_path):
    out = tmp_path / "redline.docx"
    write_redline(demo_review, out, author=AUTHOR, show="all")
    assert validate_docx(out) == []
    office = libreoffice()
    accepted = office.inspect(out, action="accept", pdf=tmp_path / "redline.pdf")
    assert accepted.redlines_before > 0 and accepted.redlines_after == 0
    assert accepted.pdf_bytes and accepted.pdf_bytes > 10_000
    assert _comparison_body(accepted, "all") == _lines(demo_review.draft)
    rejected = office.inspect(out, action="reject")
    assert rejected.redlines_after == 0
    assert _comparison_body(rejected, "all") == _lines(demo_review.precedent)


# --------------------------------------------------------------------------------------
# The substantive view (the default): the draft's text, substantive deviations tracked
# --------------------------------------------------------------------------------------


def test_substantive_redline_of_the_hand_made_scenario(scenario, tmp_path):
    """The scenario's planted deviations (tests/support/handmade.py): 30 -> 60 days, "or
    death" added, the Audit clause removed, a set-off clause added; the Customer -> Client
    rename and the moved Notices clause are not marked."""
    review = scenario.review
    out = tmp_path / "redline.docx"
    write_redline(review, out, author=AUTHOR)  # the default view
    data = out.read_bytes()
    assert validate_docx(data) == []
    assert not any(True for _ in _document(data).iter(w("moveFrom"), w("moveTo"), w("moveFromRangeStart")))
    office = libreoffice()
    view = office.inspect(out)
    assert CAUTION in view.paragraphs[:4]
    # LibreOffice lists exactly the planted substantive changes, nothing else.
    assert sorted(_office_changes(view)) == sorted([
        ("Delete", "thirty (30)"), ("Insert", "sixty (60)"),
        ("Insert", " or death"),
        ("Delete", "3.\tAudit\n3.1\tThe Supplier shall keep complete records for six years."),
        ("Insert", "2.3\tThe Client may set off any amount the Supplier owes it."),
    ])
    body = _comparison_body(view, "substantive")
    assert sum("Notices must be in writing" in p for p in body) == 1  # the move: once
    # the renamed-terms table: draft's name, precedent's name, uses in the draft
    tables = [el for el in view.body if el["type"] == "table"]
    assert tables[0]["rows"] == [["Draft's term", "Precedent's term", "Uses in the draft"],
                                 ["Client", "Customer", "3"]]

    accepted = office.inspect(out, action="accept")
    assert accepted.redlines_after == 0
    assert _comparison_body(accepted, "substantive") == _lines(review.draft)
    # Rejecting undoes the substantive deviations only: the draft's names and order stay,
    # the Audit clause comes back where the precedent had it (after clause 2.2).
    expected = [line.replace("sixty (60)", "thirty (30)").replace(" or death", "")
                for line in _lines(review.draft) if "set off" not in line]
    after = next(k for k, line in enumerate(expected) if line.startswith("2.2\t"))
    audit = [line for line in _lines(review.precedent) if "Audit" in line or "records" in line]
    expected[after + 1:after + 1] = audit
    rejected = office.inspect(out, action="reject")
    assert rejected.redlines_after == 0
    assert _comparison_body(rejected, "substantive") == expected


def test_demo_substantive_redline_marks_only_the_substance(demo_review, tmp_path):
    review = demo_review
    subs = _substantive(review)
    out = tmp_path / "redline.docx"
    write_redline(review, out, author=AUTHOR)
    data = out.read_bytes()
    assert validate_docx(data) == []
    office = libreoffice()
    view = office.inspect(out, pdf=tmp_path / "redline.pdf")
    assert view.pdf_bytes and view.pdf_bytes > 10_000
    changes = _office_changes(view)
    inserted = [t for kind, t in changes if kind == "Insert"]
    deleted = [t for kind, t in changes if kind == "Delete"]
    assert {kind for kind, _ in changes} <= {"Insert", "Delete"}  # no moves (LibreOffice)
    # every substantive deviation shows as a tracked change with its own words
    news, olds = [], []
    for d in subs:
        dprov = review.draft.provision(d.draft_provision) if d.draft_provision else None
        pprov = review.precedent.provision(d.precedent_provision) if d.precedent_provision else None
        if d.part == "text":
            new, old = dprov.text[slice(*d.draft_span)], pprov.text[slice(*d.precedent_span)]
        elif d.part == "heading":
            new, old = dprov.heading or "", pprov.heading or ""
        else:
            new, old = (dprov.text, "") if dprov else ("", pprov.text)
        assert not new or any(new in t for t in inserted), (d.id, new)
        assert not old or any(old in t for t in deleted), (d.id, old)
        news.append(new)
        olds.append(old)
    # and nothing else: each tracked change holds (or lies inside) a substantive deviation's
    # words, and no renamed defined term is marked
    assert all(any(x and (x in t or t in x) for x in news) for t in inserted)
    assert all(any(x and (x in t or t in x) for x in olds) for t in deleted)
    names = {m.draft for m in review.term_map} | {m.precedent for m in review.term_map}
    assert not names & {t.strip("\u201c\u201d\" ") for t in inserted + deleted}
    # a moved clause appears once, untracked, at the draft's position (those without a
    # substantive change inside, whose whole text is plain)
    body = _comparison_body(view, "substantive")
    changed = {d.draft_provision for d in subs}
    moved = [review.draft.provision(p.draft) for p in review.pairs if p.status == "moved"]
    moved = [p for p in moved if p.text and p.id not in changed]
    assert len(moved) >= 10
    for prov in moved:
        assert sum(prov.text.split("\n")[0] in p for p in body) == 1, prov.id
    accepted = office.inspect(out, action="accept")
    assert accepted.redlines_after == 0
    assert _comparison_body(accepted, "substantive") == _lines(review.draft)
    # rejecting undoes the substantive deviations: the precedent's words are back
    rejected = office.inspect(out, action="reject")
    assert rejected.redlines_after == 0
    text = "\n".join(_comparison_body(rejected, "substantive"))
    assert all(old in text for old in olds)


def test_demo_substantive_redline_has_at_most_two_tracked_runs_per_substantive_deviation(demo_review):
    """The target of the substantive view: counted over the whole body (ECMA-376 Part 1
    §17.13.5: w:ins/w:del elements holding text), at most two tracked runs per substantive
    deviation -- the full view, for comparison, marks every renamed term and number."""
    subs = _substantive(demo_review)
    runs = _tracked_runs(redline_bytes(demo_review, author=AUTHOR))
    assert {kind for kind, _ in runs} <= {"ins", "del"}
    assert 0 < len(runs) <= 2 * len(subs)
    everything = _tracked_runs(redline_bytes(demo_review, author=AUTHOR, show="all"))
    assert len(everything) > 10 * len(runs)


def test_substantive_redline_opens_with_the_renamed_terms_and_what_is_not_marked(demo_review, tmp_path):
    from tests.core.docx.test_writer import _check_full_width_table, table_geometry

    review = demo_review
    data = redline_bytes(review, author=AUTHOR)
    g = table_geometry(data)
    terms, ranked = g["tables"]  # ECMA-376 Part 1 §17.4: both span the text width
    for t in (terms, ranked):
        _check_full_width_table(t, g["text_width"])
    path = tmp_path / "redline.docx"
    path.write_bytes(data)
    view = libreoffice().inspect(path)
    paras = view.paragraphs
    assert paras.index(CAUTION) < paras.index("Not marked in the comparison") < paras.index(
        "Ranked substantive deviations") < paras.index(REDLINE_BODY_HEADINGS["substantive"])
    term_rows, rank_rows = [el["rows"] for el in view.body if el["type"] == "table"]
    assert term_rows[0] == ["Draft's term", "Precedent's term", "Uses in the draft"]
    assert sorted(term_rows[1:]) == sorted([m.draft, m.precedent, str(m.occurrences)] for m in review.term_map)
    assert rank_rows[0] == ["Rank", "Severity", "Clause", "Deviation"]
    assert len(rank_rows) - 1 == len(_substantive(review))
    # the counts of what was left unmarked, category by category
    numbering = [d for d in review.deviations if d.category == "numbering" and d.change != "move"]
    other = [d for d in review.deviations if d.category in ("formatting", "punctuation")]
    moves = [d for d in review.deviations if d.change == "move"]
    (counts,) = [p for p in paras if p.startswith("Shown as the draft has them")]
    assert f"{len(numbering)} numbering differences" in counts
    assert f"{len(other)} formatting and punctuation differences" in counts
    assert f"{len(moves)} moved provisions" in counts


# --------------------------------------------------------------------------------------
# A real text from outside the project: the Apache License 2.0 (licensedcode-data)
# --------------------------------------------------------------------------------------

#: The substantive edits planted in the draft: (words before, the license's words, words
#: after, the draft's words); "words before + after" locate each edit once in the text.
PLANTED = (
    ("royalty-free, ", "irrevocable", "\n      copyright license", "revocable"),
    ("(a) You ", "must", " give any other", "may"),
    ("This License ", "does not grant", " permission to use", "grants"),
)
#: A clause planted after section 5, so that sections 6 to 9 become 7 to 10.
PLANTED_CLAUSE = ("Audit. Each Contributor shall keep complete records of its Contributions "
                  "for three years and make them available on request.")


def _license_draft(text: str) -> str:
    """The draft made from the license text: the defined term "Licensor" renamed "Grantor"
    everywhere, a clause inserted (renumbering the rest and the cross-reference "Sections 1
    through 9"), straight quotes made curly in the definitions, one phrase put in lower
    case, and the planted substantive edits."""
    text = re.sub(r"\bLicensor\b", "Grantor", text)
    text = re.sub(r'^(\s*)"([^"\n]+)"', lambda m: f"{m.group(1)}\u201c{m.group(2)}\u201d", text, flags=re.M)
    text = text.replace("Sections 1 through 9", "Sections 1 through 10")
    text = text.replace("WITHOUT WARRANTIES OR CONDITIONS OF ANY KIND",
                        "without warranties or conditions of any kind")
    for before, old, after, new in PLANTED:
        assert text.count(before + old + after) == 1
        text = text.replace(before + old + after, before + new + after)
    anchor = "   6. Trademarks."
    assert text.count(anchor) == 1
    return text.replace(anchor, f"   6. {PLANTED_CLAUSE}\n \n{anchor}")


@pytest.fixture(scope="module")
def license_pair(tmp_path_factory):
    """(precedent path, draft path, review) of the Apache License 2.0 from licensedcode-data
    and the draft made from it, both as .docx with Word auto-numbering."""
    from core.reader import read_document, read_text
    from core.review import run_review
    from tests.core.test_license_texts import as_docx
    from tests.support.legal_texts import license_text

    folder = tmp_path_factory.mktemp("license")
    original = license_text("apache-2.0")  # licensedcode-data: apache-2.0.LICENSE
    paths = []
    for name, text in (("precedent", original), ("draft", _license_draft(original))):
        data, numbered = as_docx(read_text(text, source=f"{name}.txt"), "apache-2.0")
        assert numbered > 0  # real auto-numbering (numbering.xml), not typed labels
        path = folder / f"{name}.docx"
        path.write_bytes(data)
        paths.append(path)
    review = run_review(read_document(str(paths[1])), read_document(str(paths[0])))
    return paths[0], paths[1], review


def test_substantive_redline_of_a_license_tracks_exactly_the_planted_edits(license_pair, tmp_path):
    precedent, draft, review = license_pair
    assert [(m.draft, m.precedent) for m in review.term_map] == [("Grantor", "Licensor")]
    out = tmp_path / "redline.docx"
    write_redline(review, out, author=AUTHOR)
    assert validate_docx(out) == []
    office = libreoffice()
    view = office.inspect(out)
    planted: list[tuple[str, str]] = []
    for _before, old, _after, new in PLANTED:
        planted += [("Delete", old), ("Insert", new)]
    planted.insert(4, ("Insert", f"6.\t{PLANTED_CLAUSE}"))  # the new section 6, in draft order
    assert _office_changes(view) == planted
    # accepting gives the draft as LibreOffice itself reads draft.docx (its own labels)
    accepted = office.inspect(out, action="accept")
    assert _comparison_body(accepted, "substantive") == _office_lines(office.inspect(draft))
    # rejecting undoes the planted edits only: the renamed term and the new numbers stay
    rejected = " ".join(_comparison_body(office.inspect(out, action="reject"), "substantive"))
    assert "royalty-free, irrevocable copyright license" in rejected and "Grantor" in rejected
    assert PLANTED_CLAUSE not in rejected and "Sections 1 through 10" in rejected


def test_full_redline_of_a_license_accepts_to_the_draft_and_rejects_to_the_license(license_pair, tmp_path):
    precedent, draft, review = license_pair
    out = tmp_path / "redline.docx"
    write_redline(review, out, author=AUTHOR, show="all")
    assert validate_docx(out) == []
    office = libreoffice()
    accepted = office.inspect(out, action="accept")
    assert _comparison_body(accepted, "all") == _office_lines(office.inspect(draft))
    rejected = office.inspect(out, action="reject")
    assert _comparison_body(rejected, "all") == _office_lines(office.inspect(precedent))


# --------------------------------------------------------------------------------------
# The outputs consume the review's own results (Pair.edits, Deviation.part and spans)
# --------------------------------------------------------------------------------------


def test_demo_redline_is_built_from_the_reviews_word_diff(demo_review, monkeypatch):
    review = demo_review
    _no_second_diff(monkeypatch)
    paras = redline_body(review, show="all")
    accepted, rejected = _accept_reject(paras)
    assert accepted == _lines(review.draft)
    assert rejected == _lines(review.precedent)
    # the planted 30 -> 60 days shows as the review's own hunks, words only, and each use
    # of a renamed defined term as a hunk of its own
    (pay,) = [p for p in paras if any(r.mark == "ins" and r.text == "sixty" for r in p.runs)]
    deleted = [r.text for r in pay.runs if r.mark == "del"]
    inserted = [r.text for r in pay.runs if r.mark == "ins"]
    assert {"thirty", "30", "Customer", "Supplier"} <= set(deleted)
    assert {"sixty", "60", "Client", "Vendor"} <= set(inserted)
    # the substantive view marks the deviation's span instead, and no renamed term
    paras = redline_body(review)
    assert _accept_reject(paras)[0] == _lines(review.draft)
    (pay,) = [p for p in paras if any(r.mark == "ins" and "sixty" in r.text for r in p.runs)]
    assert [(r.mark, r.text) for r in pay.runs if r.mark] == [("del", "thirty (30)"), ("ins", "sixty (60)")]


def test_redline_of_the_engines_review_on_the_hand_made_pair(scenario, monkeypatch):
    from core.reader import read_document
    from core.review import run_review

    review = run_review(read_document(str(scenario.draft_path)), read_document(str(scenario.precedent_path)))
    _no_second_diff(monkeypatch)
    accepted, rejected = _accept_reject(redline_body(review, show="all"))
    assert accepted == _lines(review.draft) and rejected == _lines(review.precedent)
    paras = redline_body(review)
    assert _accept_reject(paras)[0] == _lines(review.draft)
    assert not any(r.mark in ("moveFrom", "moveTo") for p in paras for r in p.runs)


def test_substantive_heading_and_joined_spans(scenario):
    """A substantive heading deviation marks the heading, precedent's then draft's; two
    deviations whose spans touch are marked as one change; overlapping marks never
    duplicate the draft's words (accepting still gives the draft)."""
    review = scenario.review
    notices_d = next(p for p in review.draft.provisions if p.heading == "Notices")
    notices_p = next(p for p in review.precedent.provisions if p.heading == "Notices")
    pay_d = next(p for p in review.draft.provisions if "shall pay" in p.text)
    pay_p = next(p for p in review.precedent.provisions if "shall pay" in p.text)
    heading = _made_deviation("v8", "replace", notices_d.id, notices_p.id, "Notices", "Notices",
                              None, None, part="heading")
    k, pk = pay_d.text.index(" days"), pay_p.text.index(" days")
    touching = _made_deviation("v9", "insert", pay_d.id, pay_p.id, "", " days", (pk, pk), (k, k + 5))
    review2 = dataclasses.replace(review, deviations=review.deviations + (heading, touching))
    paras = redline_body(review2)
    assert _accept_reject(paras)[0] == _lines(review.draft)
    (head,) = [p for p in paras if any(r.text == "Notices" and r.mark == "ins" for r in p.runs)]
    assert [(r.mark, r.text) for r in head.runs] == [("", "3.\t"), ("del", "Notices"), ("ins", "Notices")]
    (pay,) = [p for p in paras if any("sixty" in r.text for r in p.runs if r.mark == "ins")]
    assert [r.text for r in pay.runs if r.mark == "ins"] == ["sixty (60) days"]


@settings(max_examples=200, deadline=None)
@given(st.text(alphabet="ab .,\n", max_size=30), st.text(alphabet="ab .,\n", max_size=30),
       st.data())
def test_a_pairs_diff_restricted_to_one_paragraph_tiles_both_stretches(a, b, data):
    """Any stretch of each text: the pieces rebuild exactly those stretches, and the
    unchanged pieces are identical on both sides."""
    from core.export.redline import _clipped_pieces
    from core.review.worddiff import diff_texts

    edits = diff_texts(a, b)  # a word diff tiling both texts, as Pair.edits does
    a0 = data.draw(st.integers(0, len(a)))
    a1 = data.draw(st.integers(a0, len(a)))
    b0 = data.draw(st.integers(0, len(b)))
    b1 = data.draw(st.integers(b0, len(b)))
    pieces = _clipped_pieces(edits, a, b, (a0, a1), (b0, b1))
    assert "".join(p for _, p, _ in pieces) == a[a0:a1]
    assert "".join(d for _, _, d in pieces) == b[b0:b1]
    assert all(p == d for same, p, d in pieces if same)


@settings(max_examples=300, deadline=None)
@given(st.text(alphabet="ab (),", max_size=20), st.text(alphabet="ab (),", max_size=20))
def test_affix_pieces_tile_both_texts_without_cutting_a_word(a, b):
    """The common beginning and end around one changed middle rebuild both texts, and
    neither ends or starts inside a word of either text."""
    from core.export.redline import _affix_pieces

    pieces = _affix_pieces(a, b)
    assert "".join(p for _, p, _ in pieces) == a and "".join(d for _, _, d in pieces) == b
    assert all(p == d for same, p, d in pieces if same)
    if a != b:
        assert sum(not same for same, _, _ in pieces) == 1
        first, last = pieces[0], pieces[-1]
        if first[0]:
            k = len(first[1])
            assert not first[1][-1].isalnum() or all(k >= len(t) or not t[k].isalnum() for t in (a, b))
        if last[0]:
            k = len(last[1])
            assert not last[1][0].isalnum() or all(
                len(t) - k <= 0 or not t[len(t) - k - 1].isalnum() for t in (a, b))


def test_the_view_must_be_one_of_the_two(scenario):
    with pytest.raises(ValueError):
        redline_body(scenario.review, show="terms")  # type: ignore[arg-type]


def test_export_writes_the_substantive_view_unless_told_all(scenario, tmp_path, capsys):
    from core.cli import main

    review_file = tmp_path / "r.json"
    assert main(["review", str(scenario.draft_path), "--against", str(scenario.precedent_path),
                 "--save", str(review_file)]) == 0
    short, full = tmp_path / "short.docx", tmp_path / "full.docx"
    assert main(["export", str(review_file), "--redline", str(short)]) == 0
    assert main(["export", str(review_file), "--redline", str(full), "--show", "all"]) == 0
    capsys.readouterr()
    for path, moves in ((short, False), (full, True)):
        assert validate_docx(path) == []
        root = _document(path.read_bytes())
        assert any(True for _ in root.iter(w("moveFromRangeStart"))) is moves  # §17.13.5.24
    assert len(_tracked_runs(short.read_bytes())) < len(_tracked_runs(full.read_bytes()))


def test_heading_deviations_are_found_by_their_part_not_guessed(scenario):
    review = scenario.review
    notices_d = next(p for p in review.draft.provisions if p.heading == "Notices")
    notices_p = next(p for p in review.precedent.provisions if p.heading == "Notices")
    heading = _made_deviation("v8", "replace", notices_d.id, notices_p.id, "Notices", "Notices", None, None,
                              part="heading")
    guessed = dataclasses.replace(heading, id="v9", rank=98, part="text", reasons=("heading changed",))
    review2 = dataclasses.replace(review, deviations=review.deviations + (heading, guessed))
    plan = plan_counter_draft(review2, [Decision("v8", "amend", text="Communications")])
    assert [e.replacement for e in plan.edits] == ["Communications"] and plan.notes == ()
    # a deviation of the provision's text without any span has no place: it is skipped,
    # never taken for a heading because of its reasons
    plan = plan_counter_draft(review2, [Decision("v9", "amend", text="Communications")])
    assert plan.edits == () and any(n.startswith(f"deviation {guessed.rank} (") and "no place" in n
                                    for n in plan.notes)
