"""Deterministic generator of long, plausible agreements for the benchmarks.

``make_agreement_paragraphs(pages=100, seed=1)`` gives the paragraphs of a ~100-page
agreement (~45,000 words, ~400 auto-numbered provisions) ready for
:func:`core.docx.compose.compose_docx`: a title, parties, recitals, a definitions clause,
numbered clauses with headings ("Heading 1"), sub-clauses and lettered items, a signature
block.  The prose is assembled from sentence parts with a seeded random generator, so the
same (pages, seed) always gives the same paragraphs and different seeds give different but
comparable agreements.  All names are invented.

Cost: linear in *pages*.
"""

from __future__ import annotations

import random

from core.docx.compose import ComposeParagraph

__all__ = [
    "DEFINED_TERMS",
    "PROVISIONS_PER_PAGE",
    "WORDS_PER_PAGE",
    "make_agreement_paragraphs",
    "make_agreement_docx",
]

#: Words on one page of an agreement set in 11-point type with usual margins; used to size
#: the benchmark documents (common practice, no source; ~45,000 words for 100 pages).
WORDS_PER_PAGE = 450
#: Auto-numbered provisions (headings, sub-clauses and items) per page (~400 for 100 pages).
PROVISIONS_PER_PAGE = 4

#: Defined terms the generated prose uses, with their definitions.  Benchmarks that plant a
#: rename pick one of these.
DEFINED_TERMS: tuple[tuple[str, str], ...] = (
    ("Affiliate", "any entity that directly or indirectly controls, is controlled by, or is "
     "under common control with a party"),
    ("Applicable Law", "all laws, regulations and binding codes of practice that apply to a "
     "party or to the Products"),
    ("Business Day", "a day other than a Saturday, Sunday or public holiday in Wexmoor"),
    ("Charges", "the sums payable by the Customer for the Products and the Services"),
    ("Confidential Information", "all information of a confidential nature disclosed by a "
     "party to the other party in connection with this Agreement"),
    ("Contract Year", "each period of twelve (12) months beginning on the Start Date"),
    ("Deliverables", "all documents, data and materials provided by the Supplier under this "
     "Agreement"),
    ("Delivery Location", "the address for delivery stated in the relevant Order"),
    ("Good Industry Practice", "the skill and care expected of a skilled and experienced "
     "supplier of similar products"),
    ("Intellectual Property Rights", "patents, copyright, trade marks, design rights, database "
     "rights and all similar rights anywhere in the world"),
    ("Order", "an order for Products placed by the Customer under this Agreement"),
    ("Personnel", "the employees, agents and subcontractors of a party"),
    ("Products", "the goods described in Schedule 1"),
    ("Services", "the installation, maintenance and support services described in Schedule 2"),
    ("Specification", "the specification of the Products set out in Schedule 1"),
    ("Start Date", "the date of this Agreement"),
)

_HEADINGS = (
    "Supply", "Orders", "Forecasts", "Delivery", "Installation", "Acceptance", "Title and Risk",
    "Charges", "Invoicing", "Payment", "Taxes", "Service Levels", "Warranties", "Remedies",
    "Limitation of Liability", "Indemnities", "Insurance", "Intellectual Property Rights",
    "Confidentiality", "Data Protection", "Security", "Records and Audit", "Compliance",
    "Personnel", "Subcontracting", "Business Continuity", "Change Control", "Governance",
    "Dispute Resolution", "Termination", "Consequences of Termination", "Exit Assistance",
    "Force Majeure", "Assignment", "Notices", "Entire Agreement", "Variation", "Waiver",
    "Severance", "Governing Law",
)
_ACTORS = ("the Supplier", "the Customer", "each party", "either party", "the receiving party",
           "the disclosing party", "the Supplier's Personnel", "the Customer and its Affiliates")
_VERBS = ("shall provide", "shall maintain", "shall promptly notify the other party of",
          "shall deliver", "shall keep confidential", "shall use reasonable endeavours to "
          "procure", "may suspend", "shall not disclose", "shall correct", "shall review",
          "shall comply with", "may terminate the relevant Order in respect of",
          "shall bear the cost of", "shall keep accurate records of", "may request")
_OBJECTS = ("the Products supplied under each Order", "the Deliverables",
            "any Confidential Information of the other party", "the Charges",
            "the Services", "all Intellectual Property Rights in the Deliverables",
            "the Specification", "any defect in the Products", "all Applicable Law",
            "the service levels for each Contract Year", "the Delivery Location",
            "any Order that has not been accepted", "the performance of the Services",
            "all documents relating to the Charges")
_CONDITIONS = ("in accordance with Good Industry Practice", "on or before the date agreed "
               "in the relevant Order", "save as otherwise agreed in writing by the parties",
               "to the extent permitted by Applicable Law", "at its own cost",
               "on reasonable prior written notice", "during the term of this Agreement",
               "as soon as reasonably practicable", "subject to the other provisions of this "
               "Agreement", "in each Contract Year", "without undue delay")
_NUMBERS = ((5, "five"), (7, "seven"), (10, "ten"), (14, "fourteen"), (20, "twenty"),
            (30, "thirty"), (45, "forty-five"), (60, "sixty"), (90, "ninety"))
_UNITS = ("Business Days", "days", "months")
_TAILS = ("If {actor} fails to do so within {words} ({n}) {unit}, {actor2} may give written "
          "notice requiring it to remedy the failure.",
          "Any costs reasonably incurred under this clause shall be borne by {actor}.",
          "This obligation continues for {words} ({n}) {unit} after the termination or expiry "
          "of this Agreement.",
          "{Actor} shall keep {actor2} informed of its progress at intervals of not more than "
          "{words} ({n}) {unit}.",
          "Nothing in this clause limits any other right or remedy of {actor2}.")
_ITEMS = ("any breach of this Agreement by {actor}", "any failure of the Products to "
          "comply with the Specification", "any claim that the Deliverables infringe the "
          "Intellectual Property Rights of a third party", "the insolvency of {actor}",
          "any delay caused by an act or omission of {actor}", "any change in Applicable Law "
          "that affects the Services", "the loss or corruption of any data held by {actor}")


def _sentence(rng: random.Random) -> str:
    actor, actor2 = rng.sample(_ACTORS, 2)
    main = (f"{actor[0].upper()}{actor[1:]} {rng.choice(_VERBS)} {rng.choice(_OBJECTS)} "
            f"{rng.choice(_CONDITIONS)}.")
    if rng.random() < 0.6:
        n, words = rng.choice(_NUMBERS)
        tail = rng.choice(_TAILS).format(actor=actor, actor2=actor2, Actor=actor[0].upper()
                                         + actor[1:], n=n, words=words, unit=rng.choice(_UNITS))
        main += " " + tail
    return main


def _words(text: str) -> int:
    return len(text.split())


def make_agreement_paragraphs(*, pages: int, seed: int) -> list[ComposeParagraph]:
    """Paragraphs of an agreement of about *pages* pages (see the module docstring).

    About ``pages * WORDS_PER_PAGE`` words and ``pages * PROVISIONS_PER_PAGE`` auto-numbered
    provisions (main list "main": "1." / "1.1" / "(a)"), plus unnumbered definitions.
    """
    if pages < 1:
        raise ValueError("pages must be at least 1")
    rng = random.Random(seed)
    target_words = pages * WORDS_PER_PAGE
    target_numbered = pages * PROVISIONS_PER_PAGE
    out: list[ComposeParagraph] = [
        ComposeParagraph("MASTER SERVICES AND SUPPLY AGREEMENT", style="Title"),
        ComposeParagraph("This Agreement is dated 1 March 2024."),
        ComposeParagraph("PARTIES", bold=True),
        ComposeParagraph("ORRELL FENWICK SYSTEMS LIMITED, a company incorporated in Ardence "
                         "(the \"Supplier\").", level=0, list="parties"),
        ComposeParagraph("BRASKETT HOLM LOGISTICS LIMITED, a company incorporated in Ardence "
                         "(the \"Customer\").", level=0, list="parties"),
        ComposeParagraph("BACKGROUND", bold=True),
        ComposeParagraph("The Customer wishes to obtain, and the Supplier wishes to provide, "
                         "the Products and the Services on the terms of this Agreement.",
                         level=0, list="recitals"),
        ComposeParagraph("AGREED TERMS", bold=True),
        ComposeParagraph("Definitions and Interpretation", level=0, style="Heading 1"),
        ComposeParagraph("The following definitions apply in this Agreement.", level=1),
    ]
    for term, definition in DEFINED_TERMS:
        out.append(ComposeParagraph(f"\"{term}\" means {definition}."))
    numbered = 2
    words = sum(_words(p.text) for p in out)
    clause = 1
    while numbered < target_numbered:
        clause += 1
        cycle, index = divmod(clause - 2, len(_HEADINGS))
        heading = _HEADINGS[index] + (f" (Part {cycle + 1})" if cycle else "")
        out.append(ComposeParagraph(heading, level=0, style="Heading 1"))
        numbered += 1
        words += _words(heading)
        for _ in range(rng.randint(4, 8)):
            if numbered >= target_numbered:
                break
            budget = (target_words - words) / max(1, target_numbered - numbered)
            items = rng.random() < 0.25 and target_numbered - numbered > 4
            text = _sentence(rng)
            while _words(text) < (budget * 0.6 if items else budget):
                text += " " + _sentence(rng)
            if items:
                text = text[:-1] + ", and in particular in respect of:"
            out.append(ComposeParagraph(text, level=1))
            numbered += 1
            words += _words(text)
            if items:
                count = rng.randint(2, 4)
                for k in range(count):
                    end = "; and" if k == count - 2 else ("." if k == count - 1 else ";")
                    item = rng.choice(_ITEMS).format(actor=rng.choice(_ACTORS)) + end
                    out.append(ComposeParagraph(item, level=2))
                    numbered += 1
                    words += _words(item)
    out.append(ComposeParagraph("This Agreement has been entered into on the date stated at "
                                "the beginning of it."))
    out.append(ComposeParagraph("Signed by Pell Ardwyn, director, for and on behalf of Orrell "
                                "Fenwick Systems Limited"))
    out.append(ComposeParagraph("Signed by Isolde Crane, director, for and on behalf of "
                                "Braskett Holm Logistics Limited"))
    return out


#: Numbering used with the generated paragraphs (the default "main" list plus the parties'
#: and recitals' own lists).
AGREEMENT_LISTS = {
    "parties": (("decimal", "(%1)"),),
    "recitals": (("upperLetter", "(%1)"),),
}


def make_agreement_docx(*, pages: int, seed: int) -> bytes:
    """The generated agreement as .docx bytes (real auto-numbering)."""
    from core.docx.compose import compose_docx

    return compose_docx(make_agreement_paragraphs(pages=pages, seed=seed), lists=AGREEMENT_LISTS)
