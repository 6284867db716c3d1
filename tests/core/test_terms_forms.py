"""Definition forms real drafters write, read from real texts (core.terms.find_terms through
core.reader).

Source of every real text here: the licence texts of the PyPI package ``licensedcode-data``
(``licensedcode/data/licenses/<key>.LICENSE``, read with
``tests.support.legal_texts.license_text``); the key is named beside each check, and the
expected terms were read in the file by hand.  Forms no licence text has (definition
tables, a definitions schedule, a bold term with a colon) are inline examples marked as
such; that drafters use them is common practice, no source.
"""

from __future__ import annotations

import re

import pytest

from core.model import Provision
from core.reader import read_document, read_text
from core.terms import find_terms
from tests.support.document_checks import check_document
from tests.support.docx_fixtures import build_docx
from tests.support.legal_texts import license_text


def terms_of(key: str, *, markdown: bool = False) -> dict[str, tuple[str, ...]]:
    """term -> aliases of licence *key*."""
    doc = read_text(license_text(key), source=f"{key}.txt", markdown=markdown)
    check_document(doc)
    return {t.term: t.aliases for t in doc.terms}


def prov(text: str, *, pid: int = 1, kind: str = "clause", term: str | None = None) -> Provision:
    return Provision(id=f"p{pid}", kind=kind, number=None, heading=None, level=0, parent=None,
                     text=text, term=term)


# --------------------------------------------------------------------------------------
# Unquoted and numbered definitions
# --------------------------------------------------------------------------------------

def test_unquoted_numbered_definitions_cddl():
    # cddl-1.0.LICENSE, section 1 "Definitions": 1.1 to 1.13, each "1.n. Name means ...",
    # no quotes; 1.13 reads "You (or Your) means ...".
    found = terms_of("cddl-1.0")
    assert list(found) == [
        "Contributor", "Contributor Version", "Covered Software", "Executable",
        "Initial Developer", "Larger Work", "License", "Licensable", "Modifications",
        "Original Software", "Patent Claims", "Source Code", "You"]
    assert found["You"] == ("Your",)


def test_unquoted_numbered_definition_uses_are_counted():
    doc = read_text(license_text("cddl-1.0"))
    term = next(t for t in doc.terms if t.term == "Initial Developer")
    defining = doc.provision(term.provision)
    assert defining.text.startswith("Initial Developer means the individual or entity")
    assert defining.text[term.span[0]:term.span[1]] == term.definition
    # cddl-1.0.LICENSE: "Initial Developer" occurs 21 times in the file (counted with
    # grep -o, independently of this code), once in its own definition: 20 uses.
    assert term.uses == len(re.findall(r"Initial Developer", license_text("cddl-1.0"))) - 1 == 20


@pytest.mark.parametrize("key", ["mpl-1.0", "npl-1.0"])
def test_tex_style_quotes_mpl_1_0(key):
    # mpl-1.0.LICENSE and npl-1.0.LICENSE, section 1: 1.1 ``Contributor'' ... 1.12 ``You''.
    found = terms_of(key)
    assert list(found)[:12] == [
        "Contributor", "Contributor Version", "Covered Code", "Electronic Distribution Mechanism",
        "Executable", "Initial Developer", "Larger Work", "License", "Modifications",
        "Original Code", "Source Code", "You"]
    # 1.12 also defines ``control'' ("For purposes of this definition, ``control'' means").
    assert "control" in found


def test_typewriter_quotes_sugarcrm():
    # sugarcrm-1.1.3.LICENSE: 1.1 ''Contributor'' means ..., 1.12 "You'' (or "Your") means.
    found = terms_of("sugarcrm-1.1.3")
    for term in ("Contributor", "Covered Code", "Initial Developer", "Original Code", "Source Code"):
        assert found[term] == ()
    assert found["You"] == ("Your",)


def test_colon_forms_cecill():
    # cecill-2.0.LICENSE, Article 1: sixteen lines "Name: means ..." (one "Parties: mean").
    found = terms_of("cecill-2.0")
    assert list(found) == [
        "Agreement", "Software", "Initial Software", "Modified Software", "Source Code",
        "Object Code", "Holder", "Licensee", "Contributor", "Licensor", "Contribution",
        "Module", "External Module", "Internal Module", "GNU GPL", "Parties"]


def test_colon_after_a_quoted_alias_list_dynarch():
    # dynarch-developer.LICENSE: '"Application", "Software Application" or "Web
    # Application": will refer to ...' and '"Library", "Software Library": refers to ...'.
    found = terms_of("dynarch-developer")
    assert found["Application"] == ("Software Application", "Web Application")
    assert found["Library"] == ("Software Library",)


def test_unquoted_lettered_definitions_and_corresponding_meaning_cc_by_4():
    # cc-by-4.0.LICENSE, Section 1 a. to k.: "Adapted Material means ...", ...,
    # "You means the individual or entity ... Your has a corresponding meaning."
    found = terms_of("cc-by-4.0")
    assert [t for t in found if t not in ("Creative Commons", "Public License")] == [
        "Adapted Material", "Adapter's License", "Copyright and Similar Rights",
        "Effective Technological Measures", "Exceptions and Limitations", "Licensed Material",
        "Licensed Rights", "Licensor", "Share", "Sui Generis Database Rights", "You"]
    assert found["You"] == ("Your",)


# --------------------------------------------------------------------------------------
# Alias lists and parentheses with several names
# --------------------------------------------------------------------------------------

def test_alias_list_with_means_broadleaf():
    # broadleaf-fair-use.LICENSE 1.6: '"Use", "Used" or "Using" means to access, ...'
    assert terms_of("broadleaf-fair-use")["Use"] == ("Used", "Using")


def test_alias_list_shall_refer_to_in_capitals_liferay():
    # liferay-marketplace-tos.LICENSE: 'IN WHICH CASE THE TERMS "YOU" OR "YOUR" SHALL REFER
    # TO SUCH ENTITY.'
    assert terms_of("liferay-marketplace-tos")["YOU"] == ("YOUR",)


def test_parenthesis_with_two_names_then_an_alias_list_crashlytics():
    # crashlytics-agreement-2018.LICENSE: 'and you ("Developer" or "You")', later 'the terms
    # "Developer" and "You" shall refer to such entity': one term, two names.
    found = terms_of("crashlytics-agreement-2018")
    assert found["Developer"] == ("You",)
    assert "You" not in found


def test_parenthesis_with_three_names_netapp():
    # netapp-sdk-aug2020.LICENSE: '(“You”, “Your” or “Licensee”)'
    assert terms_of("netapp-sdk-aug2020")["You"] == ("Your", "Licensee")


def test_refer_to_as_google_apis():
    # google-apis-tos-2021.LICENSE: 'We may refer to "Google" as "we", "our", or "us"'.
    assert terms_of("google-apis-tos-2021")["Google"] == ("we", "our", "us")


def test_referred_to_as_a_list_pftus():
    # pftus-1.1.LICENSE: 'you are refereed to as "You", "Your" and "Mirrorer" and
    # "Re-distributor"' (the licence's own spelling).
    assert terms_of("pftus-1.1")["You"] == ("Your", "Mirrorer", "Re-distributor")


def test_names_with_the_same_meaning_are_separate_terms_ms_refl():
    # ms-refl.LICENSE: 'The terms "reproduce," "reproduction" and "distribution" have the
    # same meaning here as under U.S. copyright law.'
    found = terms_of("ms-refl")
    assert {t: found[t] for t in ("reproduce", "reproduction", "distribution")} == {
        "reproduce": (), "reproduction": (), "distribution": ()}


def test_hereinafter_losla():
    # losla.LICENSE 1.3: '... electronic transfer of data (hereinafter "Electronic
    # Distribution Mechanism")'.
    assert "Electronic Distribution Mechanism" in terms_of("losla")


def test_each_a_and_together_the_solace():
    # solace-software-eula-2020.LICENSE: '(the “Licensee”) (together the “Parties”, and each
    # a “Party”)': separate terms.
    found = terms_of("solace-software-eula-2020")
    assert found["Parties"] == () and found["Party"] == () and found["Licensee"] == ()


def test_bold_terms_polyform_markdown():
    # polyform-shield-1.0.0.LICENSE read as Markdown: "**You** refers to ...",
    # "**Affiliates** means ...", "**Control** means ...", "**Use** means ...".
    found = terms_of("polyform-shield-1.0.0", markdown=True)
    assert {"You", "Affiliates", "Control", "Use"} <= set(found)


# --------------------------------------------------------------------------------------
# Precision: sentences that are no definitions
# --------------------------------------------------------------------------------------

def test_includes_in_an_ordinary_sentence_is_no_definition_gpl3():
    # gpl-3.0.LICENSE: 'An interactive user interface displays "Appropriate Legal Notices"
    # to the extent that it includes ...'; 'A patent license is "discriminatory" if it does
    # not include ...': neither is a definition.
    found = terms_of("gpl-3.0")
    assert "Appropriate Legal Notices" not in found and "discriminatory" not in found
    # ... while its real definitions are all found (section 0, read by hand).
    assert {"This License", "Program", "modify", "covered work", "propagate", "convey",
            "source code", "Object code", "Standard Interface", "System Libraries",
            "Major Component", "Corresponding Source"} <= set(found)


def test_a_table_that_is_no_definition_table_oracle_mysql():
    # oracle-mysql-foss-exception-2.0.LICENSE read as Markdown has a table of licence names
    # and versions ("Academic Free License | 2.0"): no term comes from it.
    doc = read_text(license_text("oracle-mysql-foss-exception-2.0"), markdown=True)
    assert not any("License" in t.term and t.term != "License" for t in doc.terms)
    assert all(t.term in ("Derivative Work", "FOSS Application", "FOSS Notice", "Independent Work",
                          "Program", "you") for t in doc.terms)


@pytest.mark.parametrize("text", [
    "Electronic means shall include email and fax.",  # the noun "means"
    "He said \"this\" means nothing.",  # a quotation, not a subject
    "Where the \"Licensed Material\" includes databases, the rules apply.",
    "The Supplier shall deliver the Goods.",
    "Note: the price excludes VAT.",  # a colon outside a definitions section
])
def test_inline_sentences_that_define_nothing(text):
    # Inline examples (no licence text has these exact sentences).
    assert find_terms([prov(text)]) == ()


# --------------------------------------------------------------------------------------
# Forms no licence text has: inline examples
# --------------------------------------------------------------------------------------

def test_alias_list_shall_refer_to_inline():
    # Inline example of the form the brief names.
    [t] = find_terms([prov('If you accept for a company, the terms "Licensee", "You" and "Your" '
                           "shall refer to that company.")])
    assert (t.term, t.aliases) == ("Licensee", ("You", "Your"))


def test_parenthesis_you_or_customer_inline():
    # Inline example: (“You” or “Customer”).
    [t] = find_terms([prov("Osterby Lampworks Limited (“You” or “Customer”) agrees as follows.")])
    assert (t.term, t.aliases) == ("You", ("Customer",))


def test_alias_uses_count_as_uses_of_the_term_inline():
    # Inline example: "Your" is an alias of "You"; uses of either count once each.
    found = find_terms([prov('"You" (or "Your") means the buyer.'),
                        prov("You shall pay. Your payment is due; You may not set off.", pid=2)])
    assert [(t.term, t.aliases, t.uses) for t in found] == [("You", ("Your",), 3)]


def test_markdown_definition_table_inline():
    # Inline example: a Markdown definitions table (term | meaning) with a header row.
    doc = read_text("SUPPLY TERMS\n\n## Definitions\n\n| Term | Meaning |\n| --- | --- |\n"
                    "| Goods | the lamp housings listed in the Order |\n"
                    "| Delivery Date | the date stated in the Order for delivery |\n\n"
                    "## Supply\n\nThe Goods are delivered on the Delivery Date.\n", markdown=True)
    check_document(doc)
    found = {t.term: t for t in doc.terms}
    assert list(found) == ["Goods", "Delivery Date"]
    goods = found["Goods"]
    defining = doc.provision(goods.provision)
    assert defining.text[goods.span[0]:goods.span[1]] == goods.definition
    assert "lamp housings" in goods.definition
    assert (found["Goods"].uses, found["Delivery Date"].uses) == (1, 1)


def _tc(text: str) -> str:
    return f"<w:tc><w:p><w:r><w:t xml:space=\"preserve\">{text}</w:t></w:r></w:p></w:tc>"


def _p(text: str, *, bold: str = "") -> str:
    lead = f"<w:r><w:rPr><w:b/></w:rPr><w:t xml:space=\"preserve\">{bold}</w:t></w:r>" if bold else ""
    return f"<w:p>{lead}<w:r><w:t xml:space=\"preserve\">{text}</w:t></w:r></w:p>"


def test_docx_definition_table_without_header_inline(tmp_path):
    # Inline example: a .docx two-column table (ECMA-376 Part 1 §17.4: w:tbl/w:tr/w:tc),
    # no header row; every row pairs a term with its meaning.
    rows = [("Buyer", "the person named as buyer in the Order Form"),
            ("Price", "the price payable for the Goods under clause 3"),
            ("Goods", "the lamp housings described in the Order Form")]
    table = "<w:tbl>" + "".join(f"<w:tr>{_tc(a)}{_tc(b)}</w:tr>" for a, b in rows) + "</w:tbl>"
    body = _p("1. Definitions") + table + _p("2. The Buyer shall pay the Price for the Goods.")
    doc = read_document(build_docx(tmp_path / "table.docx", body))
    check_document(doc)
    assert [(t.term, t.uses) for t in doc.terms] == [("Buyer", 1), ("Price", 1), ("Goods", 1)]
    price = doc.terms[1]
    assert doc.provision(price.provision).text[price.span[0]:price.span[1]] == (
        "Price\nthe price payable for the Goods under clause 3")


def test_docx_price_table_is_no_definition_table_inline(tmp_path):
    # Inline example: a two-column table of items and amounts defines nothing.
    rows = [("Lamp housing", "120.00"), ("Bracket", "14.50"), ("Item", "Amount")]
    table = "<w:tbl>" + "".join(f"<w:tr>{_tc(a)}{_tc(b)}</w:tr>" for a, b in rows) + "</w:tbl>"
    doc = read_document(build_docx(tmp_path / "prices.docx", _p("Schedule 2 Prices") + table))
    assert doc.terms == ()


def test_docx_bold_term_with_colon_in_a_definitions_section_inline(tmp_path):
    # Inline example: bold terms with a colon, no quotes and no "means", under a
    # "Definitions" heading of a schedule.
    body = (_p("SCHEDULE 1 DEFINITIONS") + _p("the buyer named in the Order Form.", bold="Buyer: ")
            + _p("the date stated in the Order Form.", bold="Delivery Date: ")
            + _p("1. The Buyer takes the goods on the Delivery Date."))
    doc = read_document(build_docx(tmp_path / "bold.docx", body))
    check_document(doc)
    assert [t.term for t in doc.terms] == ["Buyer", "Delivery Date"]


def test_bold_term_with_colon_outside_definitions_is_a_heading_inline(tmp_path):
    # Inline example: "Payment: the Buyer shall pay ..." in an operative clause is a
    # run-in heading, not a definition.
    body = _p("1. Supply") + _p("the Buyer shall pay within thirty days.", bold="Payment: ")
    doc = read_document(build_docx(tmp_path / "heading.docx", body))
    assert doc.terms == ()


def test_definitions_in_a_schedule_inline():
    # Inline example: the definitions sit in a schedule at the end.
    doc = read_text("1. Supply\n\nThe Seller supplies the Kit to the Buyer.\n\n"
                    "SCHEDULE 1\n\nDefinitions\n\n"
                    "Seller means Quillon Ashby Limited.\n\n"
                    "\"Kit\" means the lamp kit described in the Order.\n\n"
                    "Buyer: means the person named in the Order.\n")
    check_document(doc)
    assert [(t.term, t.uses) for t in doc.terms] == [("Seller", 1), ("Kit", 1), ("Buyer", 1)]


def test_docx_table_with_bold_terms_inline(tmp_path):
    # Inline example: a particulars table whose term cells are bold (w:b, ECMA-376 Part 1
    # §17.3.2.1) and whose meanings are names, not sentences.
    def bold_tc(text: str) -> str:
        return (f"<w:tc><w:p><w:r><w:rPr><w:b/></w:rPr><w:t>{text}</w:t></w:r></w:p></w:tc>")

    rows = [("Supplier", "Quillon Ashby Limited of 4 Wexmoor Road, Ardence"),
            ("Customer", "Marsh Tollard Limited of 9 Corvanne Quay, Ardence")]
    table = "<w:tbl>" + "".join(f"<w:tr>{bold_tc(a)}{_tc(b)}</w:tr>" for a, b in rows) + "</w:tbl>"
    body = _p("PARTICULARS") + table + _p("1. The Supplier sells the lamps to the Customer.")
    doc = read_document(build_docx(tmp_path / "particulars.docx", body))
    check_document(doc)
    assert [(t.term, t.uses) for t in doc.terms] == [("Supplier", 1), ("Customer", 1)]
