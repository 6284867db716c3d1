"""A small hand-made review for the output tests: two invented agreements written with
:func:`core.docx.compose.compose_docx` (real auto-numbering), read back with the project's
reader, and a :class:`core.model.Review` whose pairs and deviations are written out by hand
(as the review engine would report them), so the writers can be tested on their own.

The agreements (invented wording, no real parties):

precedent                                   draft
1. Definitions                              1. Definitions
1.1 "Customer" means the purchaser ...      1.1 "Client" means the purchaser ...   (renamed term)
2. Payment                                  2. Payment
2.1 ... within thirty (30) days.            2.1 ... within sixty (60) days.         (replace)
2.2 Late payments carry interest ...        2.2 (same)
                                            2.3 The Client may set off ...          (added)
3. Audit / 3.1 The Supplier shall keep ...  --                                      (removed)
4. Liability / 4.1 ... for fraud.           3. Notices / 3.1 Notices ...            (moved up)
5. Notices / 5.1 Notices must be ...        4. Liability / 4.1 ... for fraud or death.  (insert)
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from core.docx.compose import ComposeParagraph as CP
from core.docx.compose import compose_docx
from core.model import Deviation, Document, Pair, Review, TermMapping
from core.reader import read_document

__all__ = ["Scenario", "build_scenario", "PRECEDENT", "DRAFT"]

PRECEDENT = [
    CP("Master Supply Agreement", style="Title"),
    CP("Definitions", level=0, bold=True),
    CP("\u201cCustomer\u201d means the purchaser named in the Order.", level=1),
    CP("Payment", level=0, bold=True),
    CP("The Customer shall pay each invoice within thirty (30) days of receipt.", level=1),
    CP("Late payments carry interest at 2% a year above the base rate.", level=1),
    CP("Audit", level=0, bold=True),
    CP("The Supplier shall keep complete records for six years.", level=1),
    CP("Liability", level=0, bold=True),
    CP("Neither party limits its liability for fraud.", level=1),
    CP("Notices", level=0, bold=True),
    CP("Notices must be in writing and signed.", level=1),
]

DRAFT = [
    CP("Master Supply Agreement", style="Title"),
    CP("Definitions", level=0, bold=True),
    CP("\u201cClient\u201d means the purchaser named in the Order.", level=1),
    CP("Payment", level=0, bold=True),
    CP("The Client shall pay each invoice within sixty (60) days of receipt.", level=1),
    CP("Late payments carry interest at 2% a year above the base rate.", level=1),
    CP("The Client may set off any amount the Supplier owes it.", level=1),
    CP("Notices", level=0, bold=True),
    CP("Notices must be in writing and signed.", level=1),
    CP("Liability", level=0, bold=True),
    CP("Neither party limits its liability for fraud or death.", level=1),
]


@dataclass(frozen=True)
class Scenario:
    precedent_path: Path
    draft_path: Path
    review: Review

    def deviation(self, dev_id: str) -> Deviation:
        return next(d for d in self.review.deviations if d.id == dev_id)


def _by_text(doc: Document, needle: str):
    return next(p for p in doc.provisions if needle in p.text)


def _by_heading(doc: Document, heading: str):
    return next(p for p in doc.provisions if p.heading == heading)


def _span(text: str, words: str) -> tuple[int, int]:
    i = text.index(words)
    return (i, i + len(words))


def build_scenario(folder: Path) -> Scenario:
    pp = folder / "precedent.docx"
    dp = folder / "draft.docx"
    pp.write_bytes(compose_docx(PRECEDENT))
    dp.write_bytes(compose_docx(DRAFT))
    prec = read_document(str(pp))
    draft = read_document(str(dp))

    pairs: list[Pair] = []
    # Provisions matched by heading or by their words (the engine's alignment, by hand).
    matched = [
        (_by_text(draft, "Master Supply"), _by_text(prec, "Master Supply"), "same"),
        (_by_heading(draft, "Definitions"), _by_heading(prec, "Definitions"), "same"),
        (_by_text(draft, "means the purchaser"), _by_text(prec, "means the purchaser"), "changed"),
        (_by_heading(draft, "Payment"), _by_heading(prec, "Payment"), "same"),
        (_by_text(draft, "shall pay each invoice"), _by_text(prec, "shall pay each invoice"), "changed"),
        (_by_text(draft, "Late payments"), _by_text(prec, "Late payments"), "same"),
        (_by_heading(draft, "Notices"), _by_heading(prec, "Notices"), "moved"),
        (_by_text(draft, "Notices must be"), _by_text(prec, "Notices must be"), "moved"),
        (_by_heading(draft, "Liability"), _by_heading(prec, "Liability"), "same"),
        (_by_text(draft, "limits its liability"), _by_text(prec, "limits its liability"), "changed"),
    ]
    for d, p, status in matched:
        pairs.append(Pair(draft=d.id, precedent=p.id, status=status, similarity=0.9))
    setoff = _by_text(draft, "set off")
    audit_head = _by_heading(prec, "Audit")
    audit = _by_text(prec, "keep complete records")
    pairs.append(Pair(draft=setoff.id, precedent=None, status="added", similarity=0.0))
    pairs.append(Pair(draft=None, precedent=audit_head.id, status="removed", similarity=0.0))
    pairs.append(Pair(draft=None, precedent=audit.id, status="removed", similarity=0.0))

    pay_d, pay_p = _by_text(draft, "shall pay each invoice"), _by_text(prec, "shall pay each invoice")
    liab_d = _by_text(draft, "limits its liability")
    liab_p = _by_text(prec, "limits its liability")
    notices_d = _by_heading(draft, "Notices")
    notices_p = _by_heading(prec, "Notices")
    devs = [
        Deviation(id="v1", rank=1, severity=80, category="substantive", change="replace",
                  draft_provision=pay_d.id, precedent_provision=pay_p.id,
                  precedent_text="within thirty (30) days", draft_text="within sixty (60) days",
                  reasons=("payment period changed from 30 to 60 days",),
                  precedent_span=_span(pay_p.text, "thirty (30)"),
                  draft_span=_span(pay_d.text, "sixty (60)")),
        Deviation(id="v2", rank=2, severity=70, category="substantive", change="insert",
                  draft_provision=liab_d.id, precedent_provision=liab_p.id,
                  precedent_text="", draft_text="fraud or death",
                  reasons=("words added to a liability carve-out",),
                  precedent_span=None, draft_span=_span(liab_d.text, " or death")),
        Deviation(id="v3", rank=3, severity=60, category="substantive", change="remove-provision",
                  draft_provision=None, precedent_provision=audit.id,
                  precedent_text=audit.text, draft_text="",
                  reasons=("audit provision left out",)),
        Deviation(id="v4", rank=4, severity=50, category="substantive", change="add-provision",
                  draft_provision=setoff.id, precedent_provision=None,
                  precedent_text="", draft_text=setoff.text,
                  reasons=("set-off right added",)),
        Deviation(id="v5", rank=5, severity=30, category="substantive", change="remove-provision",
                  draft_provision=None, precedent_provision=audit_head.id,
                  precedent_text="", draft_text="", reasons=("heading Audit left out",)),
        Deviation(id="v6", rank=6, severity=5, category="term", change="replace",
                  draft_provision=None, precedent_provision=None,
                  precedent_text="Customer", draft_text="Client",
                  reasons=("defined term Customer renamed Client (3 uses)",)),
        Deviation(id="v7", rank=7, severity=2, category="numbering", change="move",
                  draft_provision=notices_d.id, precedent_provision=notices_p.id,
                  precedent_text="", draft_text="", reasons=("clause moved from 5 to 3",)),
    ]
    review = Review(
        draft=draft, precedent=prec,
        term_map=(TermMapping(draft="Client", precedent="Customer", confidence=0.95,
                              evidence=("definition",), occurrences=3),),
        pairs=tuple(pairs), deviations=tuple(devs),
    )
    return Scenario(precedent_path=pp, draft_path=dp, review=review)
