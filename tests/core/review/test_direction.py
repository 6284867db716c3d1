"""Whose side a change is on (core.review.direction), on real agreements from outside the
project.

Source of every text here: the licence texts shipped in the PyPI package
``licensedcode-data`` (``licensedcode/data/licenses/<key>.LICENSE``), each named beside its
plants: two end-user licence agreements between a "Licensor" and a "Licensee" --
``agentxpp.LICENSE`` (LICENSOR / LICENSEE, in capitals) and ``appfire-eula.LICENSE``
(Licensor / Licensee, who is also "you") -- a commercial software licence,
``solace-software-eula-2020.LICENSE`` (its licensor is defined by name, "SOLACE", and the
other side as "Licensee"), and a free-software licence written as a contract between a
Licensor and a Licensee, ``cecill-2.1.LICENSE``, and the Mozilla Public License 2.0,
``mpl-2.0.LICENSE``, whose licensee is "You" (or "Your") and whose licensors are the
Contributors.

Each test plants edits whose direction a reader of the clause can tell (which party's
obligation, right, cap, period or payment changed, and which way: the expectation is the
authors' reading of each clause, common practice of contract reading, no source), reviews
the edited text (the counterparty's draft) against the original (the precedent) acting for
each party in turn, and checks that every planted edit gets the expected direction for one
party and the opposite for the other.  A change of governing law cannot be judged from the
wording: "unclear" for both; a clause binding each party alike: "neutral" for both.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cache

import pytest

from core.errors import CounterdraftError
from core.model import Deviation, Review
from core.reader import read_text
from core.review import run_review
from core.review.direction import FAVOURABLE_RANK_SHARE, party_terms

from .helpers import licence_text, replace_once


@dataclass(frozen=True)
class Plant:
    """An edit planted in a licence: *old* becomes *new*; *favours* is the party it favours
    (None: unclear for both, "each": neutral for both); the deviation is the one whose words
    show *was* and *now* (and, when given, whose reasons mention *where*)."""

    old: str
    new: str
    favours: str | None
    was: str
    now: str
    where: str = ""


AGENTXPP = "agentxpp"  # licensedcode-data: agentxpp.LICENSE (LICENSOR / LICENSEE)
AGENTXPP_PLANTS = (
    # the Licensor's delivery obligation weakened
    Plant("LICENSOR will provide LICENSEE with one (1) copy", "LICENSOR may provide LICENSEE with one (1) copy",
          "LICENSOR", "will", "may"),
    # the Licensor's warranty period shortened
    Plant("for  a  period ending 90   days following", "for a period ending 30 days following",
          "LICENSOR", "90", "30"),
    # the notice the Licensor must give before terminating lengthened
    Plant("if LICENSOR provides 30 days notice of its intention",
          "if LICENSOR provides 90 days notice of its intention",
          "LICENSEE", "30", "90"),
    # "immediately" taken out of the Licensee's duty to notify
    Plant("LICENSEE agrees  to notify  LICENSOR immediately  and in  writing",
          "LICENSEE agrees to notify LICENSOR and in writing", "LICENSEE", "immediately", ""),
    # "material" taken out of a ground on which the Licensor may terminate
    Plant("(c) LICENSEE  violates  any  material provision", "(c) LICENSEE violates any provision",
          "LICENSOR", "material", ""),
    # the Licensor's exclusion of liability for third-party products removed
    Plant("In no event will LICENSOR be liable for any third-party products",
          "LICENSOR will be liable for any third-party products", "LICENSEE", "In no event will", "will"),
    # the Licensor's indemnity made optional
    Plant("LICENSOR  agrees to  indemnify and  hold LICENSEE  harmless",
          "LICENSOR may indemnify and hold LICENSEE harmless",
          "LICENSOR", "agrees to", "may"),
    # more time for the Licensee to destroy its copies after termination
    Plant("within  ten  (10) days after termination, will  destroy",
          "within thirty (30) days after termination, will destroy",
          "LICENSEE", "ten (10)", "thirty (30)"),
    # a new payment obligation on the Licensee
    Plant("LICENSOR reserves  the right at  any time to  make changes to  the Software Product.",
          "LICENSOR reserves the right at any time to make changes to the Software Product. LICENSEE shall pay "
          "all shipping costs for every copy that LICENSOR delivers.", "LICENSOR", "", "LICENSEE shall pay"),
    # the Licensee's promise not to challenge the Licensor's title turned into a right
    Plant("LICENSEE agrees not to challenge, directly", "LICENSEE may challenge, directly", "LICENSEE",
          "agrees not to", "may"),
    # the governing law
    Plant("the laws  of  Germany", "the laws of Austria", None, "Germany", "Austria"),
    # the Licensor's right to assign taken away
    Plant("LICENSOR reserves the right to  assign or transfer", "LICENSOR may not assign or transfer", "LICENSEE",
          "reserves the right to", "may not"),
)

APPFIRE = "appfire-eula"  # licensedcode-data: appfire-eula.LICENSE (Licensor / Licensee, "you")
APPFIRE_PLANTS = (
    # the Licensee's duty to pay the licence fee made optional
    Plant("then you must pay the license fee within", "then you may pay the license fee within", "Licensee", "must",
          "may"),
    # less notice of an audit from the Licensor
    Plant("Licensor will provide you with at least 10 days advance notice prior to the audit",
          "Licensor will provide you with at least 3 days advance notice prior to the audit", "Licensor", "10", "3"),
    # the Licensor bears only half of its audit costs
    Plant("Licensor will bear all its own out-of-pocket costs for the audit",
          "Licensor will bear half of its own out-of-pocket costs for the audit", "Licensor", "all", "half of"),
    # the Licensee's assistance no longer limited to "reasonable" assistance
    Plant("You will provide reasonable assistance, cooperation, and access",
          "You will provide assistance, cooperation, and access",
          "Licensor", "reasonable", ""),
    # "promptly" taken out of the Licensee's duty to pay an audit invoice
    Plant("you will pay the invoice promptly after receipt", "you will pay the invoice after receipt", "Licensee",
          "promptly", "", "will pay"),
    # the Licensee's duty to defend softened to reasonable efforts
    Plant("Licensee will defend or settle, at Licensee\u2019s expense",
          "Licensee will use reasonable efforts to defend or settle, at Licensee\u2019s expense", "Licensee", "",
          "use reasonable efforts to"),
    # "promptly" taken out of the Licensor's duty to notify a claim
    Plant("Licensor shall notify Licensee promptly in writing", "Licensor shall notify Licensee in writing", "Licensor",
          "promptly", "", "shall notify"),
    # control of the defence moved from the Licensee to the Licensor
    Plant("(iii) Licensee shall have sole control of any such action",
          "(iii) Licensor shall have sole control of any such action",
          "Licensor", "Licensee", "Licensor"),
    # the cap on the Licensor's liability halved
    Plant("In no event will Licensor\u2019s aggregate liability under any claims arising out of this EULA "
          "exceed the fees paid by you for the current Support Period",
          "In no event will Licensor\u2019s aggregate liability under any claims arising out of this EULA "
          "exceed fifty per cent (50%) of the fees paid by you for the current Support Period", "Licensor", "",
          "fifty per cent (50%)"),
    # less time for the Licensee to tell the Licensor of an assignment (a condition of its right)
    Plant("(a) Licensor is notified in writing within ninety (90) days of such assignment",
          "(a) Licensor is notified in writing within thirty (30) days of such assignment", "Licensor", "ninety (90)",
          "thirty (30)"),
    # the Licensor's free right to assign made subject to the Licensee's consent
    Plant("Licensor may assign its rights and obligation under this EULA without consent of Licensee.",
          "Licensor may assign its rights and obligation under this EULA only with the prior written "
          "consent of Licensee.",
          "Licensee", "without", "only with the prior written"),
    # the governing law
    Plant("the laws of the Commonwealth of Massachusetts", "the laws of the State of New York", None, "Massachusetts",
          "New York"),
    # the Licensee's indemnity widened to a duty to defend
    Plant("Licensee agrees to indemnify and hold Licensor", "Licensee agrees to indemnify, defend and hold Licensor",
          "Licensor", "", "defend"),
    # the Licensor's support made an obligation
    Plant("Licensor may provide you with online support services",
          "Licensor shall provide you with online support services",
          "Licensee", "may", "shall"),
    # a mutual exclusion of liability widened: it binds each party alike
    Plant("neither party will be liable for lost profits", "neither party will be liable for lost profits or lost data",
          "each", "", "lost data"),
)

SOLACE = "solace-software-eula-2020"  # licensedcode-data: solace-software-eula-2020.LICENSE
SOLACE_PLANTS = (
    # the Licensee may make two back-up copies instead of one
    Plant("Licensee may make one copy of each licensed Product per Subscription solely for back-up",
          "Licensee may make two copies of each licensed Product per Subscription solely for back-up", "Licensee",
          "one copy", "two copies"),
    # more time to pay the licensor's invoices (the payer is the Licensee)
    Plant("All invoices issued by SOLACE are due and payable within 30 days of the invoice date",
          "All invoices issued by SOLACE are due and payable within 45 days of the invoice date", "Licensee", "30",
          "45"),
    # the support fees taken out of what the Licensee shall pay
    Plant("Licensee shall pay the applicable Subscription Fees and support fees",
          "Licensee shall pay the applicable Subscription Fees",
          "Licensee", "and support fees", ""),
    # the Licensee's duty to reproduce notices softened
    Plant("Licensee must reproduce all copyright and other proprietary notices",
          "Licensee should reproduce all copyright and other proprietary notices", "Licensee", "must", "should"),
)

CECILL = "cecill-2.1"  # licensedcode-data: cecill-2.1.LICENSE (Licensor / Licensee)
CECILL_PLANTS = (
    # the Licensor may terminate sooner after its notice
    Plant("the Licensor may automatically terminate this Agreement\nthirty (30) days after notice",
          "the Licensor may automatically terminate this Agreement ten (10) days after notice", "Licensor",
          "thirty (30)", "ten (10)"),
    # the Licensor's help in an infringement defence made optional
    Plant("the Licensor shall provide it with technical and legal\nexpertise",
          "the Licensor may provide it with technical and legal expertise", "Licensor", "shall", "may"),
    # the Licensee's right to claim compensation taken away
    Plant("the Licensee shall be\nentitled to claim compensation",
          "the Licensee shall not be entitled to claim compensation",
          "Licensor", "", "not", "claim"),
    # the Licensee's undertaking not to infringe narrowed to direct infringement
    Plant("The Licensee undertakes not to directly or indirectly infringe",
          "The Licensee undertakes not to directly infringe",
          "Licensee", "or indirectly", ""),
    # the Licensor's right to offer services taken away
    Plant("However, the Licensor is entitled to offer this type of services.",
          "However, the Licensor is not entitled to offer this type of services.", "Licensee", "", "not", "offer"),
)

MPL = "mpl-2.0"  # licensedcode-data: mpl-2.0.LICENSE (You / Contributor)
MPL_PLANTS = (
    # Your duty to tell recipients where the source is made optional
    Plant("You must inform recipients that the Source", "You may inform recipients that the Source", "You", "must",
          "may"),
    # a restriction on You lifted
    Plant("You may not remove or alter the substance of any license notices",
          "You may remove or alter the substance of any license notices", "You", "not", ""),
    # a right of Yours taken away
    Plant("You may include additional", "You may not include additional", "Contributor", "", "not", "include"),
    # less time for You to become compliant again
    Plant("and You become compliant prior to 30 days after", "and You become compliant prior to 10 days after",
          "Contributor", "30", "10"),
    # the rights granted to You no longer end when You sue
    Plant("2.1 of this License shall terminate.", "2.1 of this License shall not terminate.", "You", "", "not",
          "terminate"),
)

CASES = {
    AGENTXPP: (("LICENSOR", "LICENSEE"), AGENTXPP_PLANTS),
    APPFIRE: (("Licensor", "Licensee"), APPFIRE_PLANTS),
    SOLACE: (("SOLACE", "Licensee"), SOLACE_PLANTS),
    CECILL: (("Licensor", "Licensee"), CECILL_PLANTS),
    MPL: (("Contributor", "You"), MPL_PLANTS),
}


def _norm(s: str) -> str:
    return " ".join(s.split())


@cache
def _documents(key: str):
    parties, plants = CASES[key]
    base = licence_text(key)
    draft = base
    for p in plants:
        draft = replace_once(draft, p.old, p.new)
    return read_text(draft, source=f"{key}-draft.txt"), read_text(base, source=f"{key}.txt")


@cache
def _review(key: str, acting_for: str | None) -> Review:
    draft, precedent = _documents(key)
    return run_review(draft, precedent, acting_for=acting_for)


def _planted(review: Review, p: Plant) -> Deviation:
    hits = [v for v in review.deviations
            if _norm(p.was) in _norm(v.precedent_text) and _norm(p.now) in _norm(v.draft_text)
            and (not p.where or p.where in " ".join(v.reasons))]
    assert hits, f"planted edit not reported: {p.was!r} -> {p.now!r}"
    return hits[0]


def _expected(p: Plant, acting_for: str) -> str:
    if p.favours is None:
        return "unclear"
    if p.favours == "each":
        return "neutral"
    return "favourable" if p.favours.casefold() == acting_for.casefold() else "adverse"


@pytest.mark.parametrize("key", sorted(CASES))
def test_direction_of_every_planted_edit_for_each_party_and_it_flips(key):
    parties, plants = CASES[key]
    got: dict[str, list[str]] = {}
    for party in parties:
        review = _review(key, party)
        assert review.acting_for == party
        got[party] = []
        for p in plants:
            v = _planted(review, p)
            assert v.direction == _expected(p, party), (key, party, p.was, p.now, v.direction, v.reasons)
            got[party].append(v.direction)
    flip = {"adverse": "favourable", "favourable": "adverse", "neutral": "neutral", "unclear": "unclear"}
    assert [flip[d] for d in got[parties[0]]] == got[parties[1]]
    assert set(got[parties[0]]) >= {"adverse"} and set(got[parties[1]]) >= {"favourable"}


@pytest.mark.parametrize("key", sorted(CASES))
def test_the_reason_names_whom_a_change_favours(key):
    parties, plants = CASES[key]
    review = _review(key, parties[1])
    for p in plants:
        if p.favours in (None, "each"):
            continue
        v = _planted(review, p)
        whom = "You" if parties[1] == "You" else f"the {parties[1]}"
        said = [r for r in v.reasons if r.endswith(f"{v.direction} to {whom}")]
        assert len(said) == 1, v.reasons
        assert any(name in said[0] for name in parties)  # whose obligation or right it is


def test_adverse_ranks_above_favourable_at_equal_severity_and_favourable_never_tops():
    """The agentxpp plants hold pairs of adverse and favourable deviations of equal severity
    (two obligations weakened in clauses of the same weight)."""
    for party in CASES[AGENTXPP][0]:
        review = _review(AGENTXPP, party)
        adverse = [v for v in review.deviations if v.direction == "adverse"]
        favourable = [v for v in review.deviations if v.direction == "favourable"]
        ties = [(a, f) for a in adverse for f in favourable if a.severity == f.severity]
        assert ties, "the plants give an adverse and a favourable deviation of equal severity"
        for a in adverse:
            for f in favourable:
                if a.severity >= f.severity * FAVOURABLE_RANK_SHARE:
                    assert a.rank < f.rank, (a.reasons, f.reasons)
        assert review.deviations[0].direction != "favourable"


def test_without_a_party_every_direction_is_unclear_and_the_ranking_is_by_severity():
    review = _review(AGENTXPP, None)
    assert review.acting_for is None
    assert {v.direction for v in review.deviations} == {"unclear"}
    assert [v.severity for v in review.deviations] == sorted((v.severity for v in review.deviations), reverse=True)
    # acting for a party changes neither severity nor reasons other than the direction's own
    acting = {v.id: v for v in _review(AGENTXPP, "LICENSEE").deviations}
    for v in review.deviations:
        other = acting[v.id]
        assert other.severity == v.severity
        assert [r for r in other.reasons if not r.endswith(("to the LICENSEE", "alike"))] == list(v.reasons)


def test_party_terms_of_real_agreements():
    """The parties the precedents define (licensedcode-data texts)."""
    def terms(key: str) -> tuple[str, ...]:
        return party_terms(read_text(licence_text(key), source=key))

    assert terms("agentxpp")[:2] == ("LICENSOR", "LICENSEE")  # the two it defines come first
    assert set(terms("appfire-eula")) >= {"Licensor", "Licensee"}
    assert terms("apache-2.0") == ("Licensor", "You", "Contributor")  # "You" (or "Your")
    # what is defined but names a thing, not a party, is left out
    assert not {"Agreement", "Software", "Documentation"} & set(terms("solace-software-eula-2020"))


def test_unknown_party_is_refused_naming_the_party_terms_found():
    draft, precedent = _documents(AGENTXPP)
    assert run_review(draft, precedent, acting_for="licensee").acting_for == "LICENSEE"  # any case
    with pytest.raises(CounterdraftError) as err:
        run_review(draft, precedent, acting_for="Purchaser")
    message = str(err.value)
    assert "agentxpp.txt" in message and "LICENSOR, LICENSEE" in message and "\n" not in message
