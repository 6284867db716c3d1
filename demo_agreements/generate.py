"""Generate Counterdraft's demo agreements and the record of what they contain.

Run ``python demo_agreements/generate.py`` (optionally ``--out DIR``) to write:

* ``precedent.docx`` -- the house standard master supply agreement of Tallowmere
  Instruments Limited, an invented maker of flow-measurement instruments (the firm's client);
* ``precedent_set/*.docx`` -- twelve past signed versions of it, each negotiated with a
  different invented customer, carrying negotiated variants of the usual contested clauses
  in known proportions (the table ``PRECEDENT_SET`` below);
* ``draft.docx`` -- an incoming draft on the customer's own paper: other numbering
  ("Article 3", "Section 3.1", "(i)"), other names for defined terms ("Client" for
  "Customer", ...), clauses moved, planted departures of different weight, cosmetic noise;
* ``scenario.json`` -- the machine-readable record (schema ``counterdraft.demo-scenario/1``)
  of the outlines, renamed terms, moved clauses, planted departures and precedent-set
  variants, generated from the same data structures as the documents.

Everything is invented: the companies, people, places (Ardence, Wexmoor, Corvanne, Port
Sarrow, ...), statutes and figures.  The script is deterministic: the same code writes the
same bytes, so regenerated files do not churn in version control.  All .docx files are
written with :func:`core.docx.compose.compose_docx` (real Word auto-numbering).
"""

from __future__ import annotations

import argparse
import json
import re
import sys
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path

try:
    from core.docx.compose import ComposeParagraph, compose_docx
    from core.fileio import atomic_write_bytes, atomic_write_text
except ModuleNotFoundError:  # run from a checkout without an installed package
    sys.path.insert(0, str(Path(__file__).resolve().parent.parent))
    from core.docx.compose import ComposeParagraph, compose_docx
    from core.fileio import atomic_write_bytes, atomic_write_text

__all__ = ["SCHEMA", "Front", "Rendered", "build_scenario", "generate", "main", "render"]

SCHEMA = "counterdraft.demo-scenario/1"
HERE = Path(__file__).resolve().parent
PRECEDENT_FILE = "precedent.docx"
DRAFT_FILE = "draft.docx"
SET_FOLDER = "precedent_set"
RECORD_FILE = "scenario.json"

SUPPLIER = "Tallowmere Instruments Limited"
SUPPLIER_DESCRIPTION = (
    "a company incorporated in Ardence with registered number ARD 0481772 whose registered "
    "office is at 14 Quarry Lane, Wexmoor"
)

# ======================================================================================
# 1. The house agreement as data
# ======================================================================================
# Text templates use the house's defined terms.  "{ref:KEY}" is a cross-reference to the
# provision with that key, rendered per paper ("clause 11.1" in the house style, "Section
# 13.1" on the customer's paper).  A text of the form "@slot" is filled from SLOTS with the
# variant a document chose; a slot variant of None leaves the provision out.


@dataclass(frozen=True)
class Item:
    """A numbered sub-provision (level 2 and below)."""

    text: str
    key: str | None = None
    kids: tuple[Item, ...] = ()


@dataclass(frozen=True)
class Clause:
    """A top-level clause: a numbered heading, then an unnumbered body and/or items."""

    key: str
    heading: str
    clause_type: str  # identifier of resources/clause_types.toml
    body: str | None = None
    items: tuple[Item, ...] = ()


def I(text: str, key: str | None = None, *kids: Item) -> Item:  # noqa: E743 - short DSL name
    return Item(text, key, tuple(kids))


DEFINITIONS: tuple[tuple[str, str], ...] = (
    ("Affiliate", "means, in relation to a party, any entity that directly or indirectly "
     "Controls, is Controlled by, or is under common Control with that party."),
    ("Agreement", "means this agreement, including its Schedule, as varied from time to time "
     "in accordance with {ref:variation}."),
    ("Applicable Law", "means all laws, statutes, regulations and binding codes of practice in "
     "force from time to time that apply to a party or to the Products."),
    ("Business Day", "means a day other than a Saturday, Sunday or public holiday in Wexmoor "
     "when banks in Wexmoor are open for business."),
    ("Commencement Date", "means the date of this Agreement."),
    ("Confidential Information", "means all information of a confidential nature relating to "
     "the business, affairs, products, customers or suppliers of a party or its Affiliates "
     "that is disclosed by or on behalf of that party to the other party, whether before or "
     "after the Commencement Date and in whatever form."),
    ("Contract Year", "means each period of twelve (12) months beginning on the Commencement "
     "Date or on an anniversary of it."),
    ("Control", "means the power to direct the management and policies of an entity, whether "
     "through the ownership of voting shares, by contract or otherwise, and \"Controls\" and "
     "\"Controlled\" shall be construed accordingly."),
    ("Data Protection Legislation", "means all Applicable Law relating to the processing of "
     "personal data and privacy, including the Personal Data Protection Act of Ardence."),
    ("Delivery", "means the completion of delivery of Products at the Delivery Location in "
     "accordance with {ref:delivery}, and \"Deliver\" and \"Delivered\" shall be construed "
     "accordingly."),
    ("Delivery Date", "means the date for Delivery stated in the relevant Order or, if none "
     "is stated, the date falling thirty (30) days after the Supplier accepts that Order."),
    ("Delivery Location", "means the address for Delivery stated in the relevant Order or, if "
     "none is stated, in Schedule 1."),
    ("Force Majeure Event", "means an event or circumstance beyond a party's reasonable "
     "control, including acts of God, flood, earthquake or other natural disaster, epidemic "
     "or pandemic, war, terrorist attack, riot, government action, or the interruption or "
     "failure of a utility service, but excluding any strike or other industrial action by "
     "the workforce of the affected party."),
    ("Good Industry Practice", "means the degree of skill, care and foresight that would "
     "reasonably be expected from a skilled and experienced supplier of goods similar to the "
     "Products."),
    ("Intellectual Property Rights", "means patents, rights to inventions, copyright and "
     "related rights, trade marks, business names and domain names, rights in designs, rights "
     "in computer software, database rights, rights in confidential information (including "
     "know-how and trade secrets) and all other intellectual property rights, in each case "
     "whether registered or unregistered, and all similar or equivalent rights anywhere in "
     "the world."),
    ("Order", "means an order for Products placed by the Customer in accordance with "
     "{ref:ordering}."),
    ("Prices", "means the prices for the Products set out in Schedule 1, as varied in "
     "accordance with {ref:price_review}."),
    ("Products", "means the products described in Schedule 1 and any other products that the "
     "parties agree in writing to add to it."),
    ("Specification", "means the specification for each of the Products set out or referred "
     "to in Schedule 1, as amended from time to time by written agreement of the parties."),
)

CLAUSES: tuple[Clause, ...] = (
    Clause("definitions", "Definitions and Interpretation", "definitions", items=(
        I("The following definitions apply in this Agreement.", "definitions_list"),
        I("In this Agreement, unless the context otherwise requires:", "interpretation",
          I("headings shall not affect the interpretation of this Agreement;"),
          I("a reference to a party includes its successors and permitted assigns;"),
          I("words in the singular include the plural and in the plural include the singular;"),
          I("a reference to a statute or statutory provision is a reference to it as amended, "
            "extended or re-enacted from time to time;"),
          I("any words following the terms including, include, in particular or for example, "
            "or any similar expression, shall be construed as illustrative and shall not limit "
            "the sense of the words preceding those terms; and"),
          I("a reference to writing or written includes email.")),
        I("If there is an inconsistency between any of the provisions of this Agreement and the "
          "provisions of any Order, the provisions of this Agreement shall prevail.", "precedence"),
    )),
    Clause("term", "Commencement and Duration", "term", body=(
        "This Agreement shall commence on the Commencement Date and shall continue in force "
        "until it is terminated in accordance with {ref:termination} or "
        "{ref:force_majeure_termination}.")),
    Clause("supply", "Supply of Products", "supply", items=(
        I("The Supplier shall supply the Products to the Customer in accordance with Orders "
          "accepted by the Supplier and the terms of this Agreement."),
        I("The Supplier shall manufacture the Products in accordance with the Specification, "
          "Good Industry Practice and Applicable Law."),
        I("Nothing in this Agreement obliges the Customer to purchase any minimum quantity of "
          "Products, and the Supplier is not obliged to supply the Products exclusively to the "
          "Customer."),
    )),
    Clause("ordering", "Orders", "ordering", items=(
        I("Each Order shall be submitted in writing or through the Supplier's electronic "
          "ordering system and shall state the type and quantity of Products required, the "
          "Delivery Date and the Delivery Location."),
        I("Each Order shall constitute an offer by the Customer to purchase the Products stated "
          "in it on the terms of this Agreement. No Order shall bind the Supplier until the "
          "Supplier accepts it in writing, and the Supplier may decline any Order within five "
          "(5) Business Days after its receipt."),
        I("@forecasts", "forecasts"),
        I("@cancellation_costs", "cancellation"),
    )),
    Clause("delivery", "Delivery", "delivery", items=(
        I("The Supplier shall Deliver the Products to the Delivery Location during the "
          "Customer's normal business hours."),
        I("Each delivery shall be accompanied by a delivery note stating the date and number "
          "of the Order, the type and quantity of Products delivered and \u2013 where "
          "applicable \u2013 any special storage or handling instructions.", "delivery_note"),
        I("@delivery_essence", "delivery_time"),
        I("If the Supplier fails to Deliver the Products within thirty (30) days after the "
          "Delivery Date, the Customer may cancel the affected Order by written notice to the "
          "Supplier, and the Supplier shall promptly refund any sums paid for the undelivered "
          "Products."),
        I("The Supplier may Deliver the Products by instalments, which shall be invoiced and "
          "paid for separately. A delay in the delivery of any instalment shall not entitle "
          "the Customer to cancel any other instalment.", "instalments"),
    )),
    Clause("acceptance", "Inspection and Acceptance", "acceptance", items=(
        I("The Customer shall inspect the Products within ten (10) Business Days after "
          "Delivery (the \"Inspection Period\")."),
        I("The Customer may reject any Products that do not comply with "
          "{ref:warranty_conformity} by giving written notice to the Supplier within the "
          "Inspection Period that states the reasons for rejection in reasonable detail.",
          "rejection"),
        I("If the Customer does not give notice under {ref:rejection} within the Inspection "
          "Period, the Products shall be deemed to have been accepted at the end of the "
          "Inspection Period."),
        I("@acceptance_deemed", "acceptance_use"),
        I("Acceptance of any Products shall not affect the Customer's rights under "
          "{ref:warranties}."),
    )),
    Clause("title_risk", "Title and Risk", "title_and_risk", items=(
        I("Risk in the Products shall pass to the Customer on completion of Delivery."),
        I("Title to the Products shall not pass to the Customer until the Supplier has "
          "received payment in full, in cash or cleared funds, for those Products."),
        I("Until title to the Products has passed to the Customer, the Customer shall:", None,
          I("store the Products separately from all other goods held by it so that they "
            "remain readily identifiable as the Supplier's property;"),
          I("not remove, deface or obscure any identifying mark on or relating to the "
            "Products; and"),
          I("keep the Products insured against all risks for their full price from the date "
            "of Delivery.")),
    )),
    Clause("prices", "Prices", "price", items=(
        I("The Prices are set out in Schedule 1. The Prices are exclusive of the costs of "
          "packaging, insurance and transport, which shall be invoiced to the Customer in "
          "addition."),
        I("The Supplier may increase the Prices with effect from the start of any Contract Year "
          "by giving the Customer not less than sixty (60) days' written notice, provided that "
          "no increase shall exceed the rise in the consumer price index published by the "
          "Statistics Office of Ardence over the preceding twelve (12) months.", "price_review"),
    )),
    Clause("payment", "Payment", "payment", items=(
        I("The Supplier may invoice the Customer for the Products on or at any time after "
          "Delivery. Each invoice shall quote the relevant Order number."),
        I("@payment_days", "payment_terms"),
        I("If the Customer disputes any invoice in good faith, it shall notify the Supplier in "
          "writing within ten (10) Business Days after receiving it and shall pay the undisputed "
          "part of the invoice in accordance with {ref:payment_terms}."),
        I("@late_interest", "late_payment"),
        I("The Customer shall pay all amounts due under this Agreement in full without any "
          "set-off, counterclaim, deduction or withholding, except as required by Applicable "
          "Law."),
    )),
    Clause("taxes", "Taxes", "taxes", items=(
        I("All sums payable under this Agreement are exclusive of value added tax or any "
          "similar sales tax, which the Customer shall pay in addition at the applicable rate "
          "on receipt of a valid tax invoice."),
        I("If any withholding or deduction is required by Applicable Law, the Customer shall pay "
          "such additional amount as will ensure that the Supplier receives the same total "
          "amount that it would have received if no withholding or deduction had been "
          "required."),
    )),
    Clause("warranties", "Warranties", "warranties", items=(
        I("@warranty_period", "warranty_conformity",
          I("conform in all material respects with the Specification;"),
          I("be free from material defects in design, materials and workmanship; and"),
          I("be fit for the purpose for which they are intended as stated in the "
            "Specification.")),
        I("If the Customer notifies the Supplier in writing during the Warranty Period, within "
          "a reasonable time of discovery, that any Products do not comply with "
          "{ref:warranty_conformity}, and the Supplier is given a reasonable opportunity of "
          "examining those Products, the Supplier shall, at its option, repair or replace the "
          "defective Products or refund their price in full."),
        I("The Supplier shall not be liable for a failure of the Products to comply with "
          "{ref:warranty_conformity} to the extent that the failure is caused by fair wear and "
          "tear, wilful damage, negligence, abnormal storage or working conditions, or any "
          "alteration or repair of the Products without the Supplier's written consent."),
        I("Except as set out in this Agreement, all warranties, conditions and other terms "
          "implied by statute or common law are, to the fullest extent permitted by law, "
          "excluded from this Agreement."),
    )),
    Clause("limitation", "Limitation of Liability", "limitation_of_liability", items=(
        I("Nothing in this Agreement shall limit or exclude either party's liability for:",
          "liability_unlimited",
          I("death or personal injury caused by its negligence;"),
          I("fraud or fraudulent misrepresentation;"),
          I("@confidentiality_carve_out"),
          I("any other liability which cannot be limited or excluded by Applicable Law.")),
        I("Subject to {ref:liability_unlimited}, neither party shall be liable to the other, "
          "whether in contract, tort (including negligence), breach of statutory duty or "
          "otherwise, for any loss of profit, loss of revenue, loss of business, loss of "
          "goodwill or any indirect or consequential loss arising under or in connection with "
          "this Agreement.", "excluded_losses"),
        I("@liability_cap", "liability_cap"),
    )),
    Clause("indemnity", "Indemnities", "indemnity", items=(
        I("The Customer shall indemnify the Supplier against all liabilities, costs, expenses, "
          "damages and losses (including reasonable legal fees) suffered or incurred by the "
          "Supplier arising out of or in connection with any claim that the manufacture or "
          "supply of Products made to a design or specification provided by the Customer "
          "infringes the Intellectual Property Rights of a third party."),
        I("@supplier_ip_indemnity", "supplier_ip_indemnity"),
        I("A party seeking to rely on an indemnity in this Agreement shall:", "indemnity_conduct",
          I("give the indemnifying party prompt written notice of the claim;"),
          I("allow the indemnifying party to conduct the defence and any settlement of the "
            "claim, at the indemnifying party's cost;"),
          I("not admit liability or settle the claim without the indemnifying party's prior "
            "written consent; and"),
          I("give the indemnifying party such assistance as it may reasonably request.")),
        I("Each indemnity in this Agreement is subject to {ref:limitation}."),
    )),
    Clause("insurance", "Insurance", "insurance", items=(
        I("@insurance_cover", "insurance_cover"),
        I("On the Customer's written request, the Supplier shall provide a certificate of "
          "insurance evidencing the cover required by {ref:insurance_cover}."),
    )),
    Clause("ipr", "Intellectual Property Rights", "intellectual_property", items=(
        I("All Intellectual Property Rights in or arising out of or in connection with the "
          "Products and the Specification shall remain the property of the Supplier or its "
          "licensors."),
        I("The Supplier grants to the Customer a non-exclusive, royalty-free licence to use any "
          "software embedded in the Products solely for the purpose of operating those "
          "Products."),
        I("The Customer shall not reverse engineer, decompile or disassemble any software "
          "embedded in the Products, except to the extent permitted by Applicable Law."),
    )),
    Clause("confidentiality", "Confidentiality", "confidentiality", items=(
        I("Each party shall keep the other party's Confidential Information confidential and "
          "shall not use it for any purpose other than the performance of its obligations "
          "under this Agreement."),
        I("A party may disclose the other party's Confidential Information:", None,
          I("to its employees, officers, professional advisers and subcontractors who need to "
            "know it for the purposes of this Agreement, provided that it ensures that each of "
            "them complies with {ref:confidentiality} as if it were a party; and"),
          I("as required by Applicable Law, a court of competent jurisdiction or any "
            "governmental or regulatory authority.")),
        I("Confidential Information does not include information that:", None,
          I("is or becomes generally available to the public other than through a breach of "
            "this Agreement;"),
          I("was lawfully in the possession of the receiving party before its disclosure; or"),
          I("is independently developed by the receiving party without use of the other "
            "party's Confidential Information.")),
        I("@confidentiality_period", "confidentiality_period"),
    )),
    Clause("data_protection", "Data Protection", "data_protection", items=(
        I("Each party shall comply with all applicable requirements of the Data Protection "
          "Legislation. {ref:data_protection:cap} is in addition to, and does not relieve, "
          "remove or replace, a party's obligations under the Data Protection Legislation."),
        I("The parties do not expect the Supplier to process personal data on behalf of the "
          "Customer under this Agreement. If it does so, the parties shall enter into a written "
          "agreement that complies with the Data Protection Legislation before any such "
          "processing begins."),
        I("Each party shall notify the other without undue delay on becoming aware of any "
          "personal data breach affecting personal data exchanged under this Agreement."),
    )),
    Clause("audit", "Records and Audit", "audit", items=(
        I("The Supplier shall keep complete and accurate records of the manufacture, testing "
          "and supply of the Products for at least six (6) years after Delivery."),
        I("The Customer may, on not less than twenty (20) Business Days' written notice and not "
          "more than once in any Contract Year, audit those records during the Supplier's normal "
          "business hours. The Customer shall bear its own costs of any audit.", "audit_right"),
    )),
    Clause("compliance", "Anti-Bribery and Compliance", "compliance", items=(
        I("Each party shall comply with all Applicable Law relating to anti-bribery and "
          "anti-corruption, and shall not offer, give, request or accept any bribe or improper "
          "payment in connection with this Agreement.", "anti_bribery"),
        I("Each party shall maintain adequate policies and procedures to ensure compliance with "
          "{ref:anti_bribery} and shall promptly report to the other party any request or demand "
          "for any undue financial or other advantage received by it in connection with this "
          "Agreement."),
        I("The Supplier shall comply with all applicable export control and sanctions laws in "
          "the supply of the Products."),
    )),
    Clause("termination", "Termination", "termination", items=(
        I("@termination_convenience", "termination_convenience"),
        I("@termination_breach", "termination_breach"),
        I("Without affecting any other right or remedy available to it, either party may "
          "terminate this Agreement with immediate effect by giving written notice to the "
          "other party if the other party:", "termination_insolvency",
          I("suspends, or threatens to suspend, payment of its debts or is unable to pay its "
            "debts as they fall due;"),
          I("makes a proposal for or enters into any compromise or arrangement with its "
            "creditors;"),
          I("has any of the following appointed over all or any part of its assets or "
            "undertaking:", None,
            I("a receiver or administrative receiver;"),
            I("an administrator; or"),
            I("a liquidator or provisional liquidator;")),
          I("is the subject of a petition or order for its winding up; or"),
          I("suspends or ceases, or threatens to suspend or cease, carrying on all or a "
            "substantial part of its business.")),
        I("Without affecting any other right or remedy available to it, the Supplier may "
          "suspend all further deliveries of Products if the Customer fails to pay any amount "
          "due under this Agreement on the due date for payment."),
    )),
    Clause("consequences", "Consequences of Termination", "consequences_of_termination", items=(
        I("On termination or expiry of this Agreement, the Customer shall immediately pay to "
          "the Supplier all outstanding unpaid invoices and interest and, in respect of Products "
          "supplied for which no invoice has been submitted, the Supplier may submit an invoice, "
          "which shall be payable immediately on receipt."),
        I("Termination or expiry of this Agreement shall not affect any rights, remedies, "
          "obligations or liabilities of the parties that have accrued up to the date of "
          "termination or expiry, including the right to claim damages in respect of any "
          "breach of this Agreement which existed at or before that date."),
        I("Any provision of this Agreement that expressly or by implication is intended to "
          "come into or continue in force on or after termination or expiry, including "
          "{ref:warranties}, {ref:limitation}, {ref:indemnity}, {ref:confidentiality} and "
          "{ref:governing_law}, shall remain in full force and effect."),
    )),
    Clause("force_majeure", "Force Majeure", "force_majeure", items=(
        I("Neither party shall be in breach of this Agreement nor liable for delay in "
          "performing, or failure to perform, any of its obligations under this Agreement if "
          "such delay or failure results from a Force Majeure Event."),
        I("The affected party shall promptly notify the other party of the nature and extent of "
          "the Force Majeure Event and shall use all reasonable endeavours to mitigate its "
          "effect."),
        I("If the period of delay or non-performance continues for ninety (90) days, the party "
          "not affected may terminate this Agreement by giving thirty (30) days' written notice "
          "to the affected party.", "force_majeure_termination"),
    )),
    Clause("assignment", "Assignment", "assignment", items=(
        I("@assignment", "assignment_consent"),
        I("Any purported assignment in breach of {ref:assignment_consent} shall be void."),
    )),
    Clause("subcontracting", "Subcontracting", "subcontracting", body=(
        "The Supplier may subcontract the manufacture of any part of the Products, provided "
        "that the Supplier shall remain responsible for all acts and omissions of its "
        "subcontractors as if they were its own.")),
    Clause("non_solicitation", "Non-Solicitation", "non_solicitation", body="@non_solicitation"),
    Clause("announcements", "Announcements", "publicity", body=(
        "Neither party shall make, or permit any person to make, any public announcement "
        "concerning this Agreement or its subject matter without the prior written consent of "
        "the other party, except as required by Applicable Law or by any governmental or "
        "regulatory authority.")),
    Clause("notices", "Notices", "notices", items=(
        I("Any notice given to a party under or in connection with this Agreement shall be in "
          "writing and shall be delivered by hand or by pre-paid post or other next working day "
          "delivery service at its registered office or principal place of business, or sent by "
          "email to the address specified by that party for the purpose."),
        I("Any notice shall be deemed to have been received:", None,
          I("if delivered by hand, at the time the notice is left at the proper address;"),
          I("if sent by pre-paid post or other next working day delivery service, at 9.00 am on "
            "the second Business Day after posting; and"),
          I("if sent by email, at the time of transmission or, if this time falls outside "
            "business hours in the place of receipt, when business hours resume.")),
        I("{ref:notices:cap} does not apply to the service of any proceedings or other "
          "documents in any legal action."),
    )),
    Clause("entire_agreement", "Entire Agreement", "entire_agreement", items=(
        I("This Agreement constitutes the entire agreement between the parties and supersedes "
          "and extinguishes all previous agreements, promises, assurances, warranties, "
          "representations and understandings between them, whether written or oral, relating "
          "to its subject matter."),
        I("Each party agrees that it shall have no remedies in respect of any statement, "
          "representation, assurance or warranty, whether made innocently or negligently, that "
          "is not set out in this Agreement. Nothing in this Agreement shall limit or exclude "
          "any liability for fraud."),
        I("These terms apply to the exclusion of any other terms that the Customer seeks to "
          "impose or incorporate, or which are implied by trade, custom, practice or course of "
          "dealing, including any terms on any Order."),
    )),
    Clause("variation", "Variation", "variation", body=(
        "No variation of this Agreement shall be effective unless it is in writing and signed "
        "by the parties or their authorised representatives.")),
    Clause("waiver", "Waiver", "waiver", body=(
        "A waiver of any right or remedy under this Agreement or by law is only effective if it "
        "is given in writing, and shall not be deemed a waiver of any subsequent right or "
        "remedy. A failure or delay by a party to exercise any right or remedy provided under "
        "this Agreement or by law shall not constitute a waiver of that or any other right or "
        "remedy, nor shall it prevent or restrict the further exercise of that or any other "
        "right or remedy.")),
    Clause("severance", "Severance", "severance", body=(
        "If any provision or part-provision of this Agreement is or becomes invalid, illegal or "
        "unenforceable, it shall be deemed modified to the minimum extent necessary to make it "
        "valid, legal and enforceable. If such modification is not possible, the relevant "
        "provision or part-provision shall be deemed deleted. Any modification to or deletion of "
        "a provision or part-provision under {ref:severance} shall not affect the validity and "
        "enforceability of the rest of this Agreement.")),
    Clause("counterparts", "Counterparts", "counterparts", body=(
        "This Agreement may be executed in any number of counterparts, each of which when "
        "executed shall constitute a duplicate original, but all the counterparts together "
        "shall constitute one agreement.")),
    Clause("third_party_rights", "Third Party Rights", "third_party_rights", body=(
        "A person who is not a party to this Agreement shall not have any rights to enforce any "
        "of its terms.")),
    Clause("relationship", "No Partnership or Agency", "relationship", body=(
        "Nothing in this Agreement is intended to, or shall be deemed to, establish any "
        "partnership or joint venture between the parties, or constitute either party the "
        "agent of the other party for any purpose.")),
    Clause("costs", "Costs", "costs", body=(
        "Each party shall pay its own costs and expenses incurred in connection with the "
        "negotiation, preparation and execution of this Agreement.")),
    Clause("governing_law", "Governing Law", "governing_law", body="@governing_law"),
    Clause("dispute_resolution", "Dispute Resolution", "dispute_resolution", body="@forum"),
    # Not in the house form: the customer's draft adds it.
    Clause("service_credits", "Service Credits", "service_levels", body="@service_credits"),
)

HOUSE_ORDER: tuple[str, ...] = tuple(c.key for c in CLAUSES if c.key != "service_credits")

# --------------------------------------------------------------------------------------
# Slots: the contested wordings and their variants (house wording first).
# --------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Slot:
    clause: str  # key of the clause the slot sits in
    variants: Mapping[str, str | None]  # variant name -> text (None: provision absent)
    labels: Mapping[str, str] = field(default_factory=dict)  # variant -> short description


def _payment(days: str) -> str:
    return (f"The Customer shall pay each invoice submitted by the Supplier in full and in "
            f"cleared funds within {days} days of the date of the invoice, to the bank account "
            f"nominated in writing by the Supplier.")


def _interest(rate: str) -> str:
    return (f"If the Customer fails to make any payment due to the Supplier under this "
            f"Agreement by the due date, the Customer shall pay interest on the overdue sum from "
            f"the due date until payment, whether before or after judgment, at the rate of "
            f"{rate} a year above the base rate of the Central Bank of Ardence from time to time.")


def _cap(share: str) -> str:
    return (f"The Supplier's total liability to the Customer, whether in contract, tort "
            f"(including negligence), breach of statutory duty or otherwise, arising under or in "
            f"connection with this Agreement in any Contract Year shall not exceed {share} of "
            f"the Prices paid or payable by the Customer in that Contract Year.")


def _warranty(period: str) -> str:
    return (f"The Supplier warrants that, for a period of {period} months from the date of "
            f"Delivery (the \"Warranty Period\"), the Products shall:")


def _insurance(amount: str) -> str:
    return (f"During the term of this Agreement and for two (2) years after its termination or "
            f"expiry, the Supplier shall maintain in force, with a reputable insurer, product "
            f"liability insurance with a limit of not less than {amount} for each claim.")


def _confidentiality(period: str) -> str:
    return (f"The obligations of confidentiality in this Agreement shall continue in force for "
            f"a period of {period} years after the termination or expiry of this Agreement.")


def _convenience(days: str) -> str:
    return (f"Either party may terminate this Agreement for convenience at any time after the "
            f"first Contract Year by giving the other party not less than {days} days' written "
            f"notice.")


def _breach(kind: str) -> str:
    return (f"Without affecting any other right or remedy available to it, either party may "
            f"terminate this Agreement with immediate effect by giving written notice to the "
            f"other party if the other party commits a {kind}breach of this Agreement and (if "
            f"that breach is remediable) fails to remedy it within thirty (30) days after being "
            f"notified in writing to do so.")


def _law(place: str) -> str:
    return (f"This Agreement and any dispute or claim (including non-contractual disputes or "
            f"claims) arising out of or in connection with it or its subject matter or formation "
            f"shall be governed by and construed in accordance with the law of {place}.")


def _courts(city: str) -> str:
    return (f"Each party irrevocably agrees that the courts of {city} shall have exclusive "
            f"jurisdiction to settle any dispute or claim (including non-contractual disputes or "
            f"claims) arising out of or in connection with this Agreement or its subject matter "
            f"or formation.")


_ASSIGNMENT = ("Neither party shall assign, transfer, mortgage, charge, declare a trust over or "
               "deal in any other manner with any of its rights and obligations under this "
               "Agreement without the prior written consent of the other party")
_CANCELLATION = ("If the Customer cancels any Order after its acceptance by the Supplier, the "
                 "Customer shall pay to the Supplier all {}costs incurred by the Supplier in "
                 "respect of that Order up to the date of cancellation, including the cost of any "
                 "materials purchased for it.")

SLOTS: Mapping[str, Slot] = {
    "forecasts": Slot("ordering", {
        "house": "The Customer shall provide the Supplier, on or before the first Business Day "
                 "of each calendar month, with a non-binding forecast of its requirements for the "
                 "Products for the following six (6) months.",
        "may": "The Customer may provide the Supplier, on or before the first Business Day "
               "of each calendar month, with a non-binding forecast of its requirements for the "
               "Products for the following six (6) months.",
    }),
    "cancellation_costs": Slot("ordering", {
        "house": _CANCELLATION.format(""),
        "reasonable": _CANCELLATION.format("reasonable "),
    }),
    "delivery_essence": Slot("delivery", {
        "house": "The Supplier shall use reasonable endeavours to Deliver the Products on the "
                 "Delivery Date. Time of delivery is not of the essence.",
        "essence": "The Supplier shall use reasonable endeavours to Deliver the Products on the "
                   "Delivery Date. Time of delivery is of the essence.",
    }),
    "acceptance_deemed": Slot("acceptance", {
        "house": "Any Products used, processed or resold by the Customer after Delivery shall be "
                 "deemed to have been accepted.",
        "not": "Any Products used, processed or resold by the Customer after Delivery shall not "
               "be deemed to have been accepted.",
    }),
    "payment_days": Slot("payment", {
        "30-days": _payment("thirty (30)"),
        "45-days": _payment("forty-five (45)"),
        "60-days": _payment("sixty (60)"),
    }),
    "late_interest": Slot("payment", {
        "4-per-cent": _interest("four per cent (4%)"),
        "2-per-cent": _interest("two per cent (2%)"),
    }),
    "warranty_period": Slot("warranties", {
        "12-months": _warranty("twelve (12)"),
        "18-months": _warranty("eighteen (18)"),
        "24-months": _warranty("twenty-four (24)"),
    }),
    "confidentiality_carve_out": Slot("limitation", {
        "none": None,
        "confidentiality-uncapped": "any breach of its obligations of confidentiality under "
                                    "this Agreement;",
    }),
    "liability_cap": Slot("limitation", {
        "100-per-cent": _cap("one hundred per cent (100%)"),
        "150-per-cent": _cap("one hundred and fifty per cent (150%)"),
        "200-per-cent": _cap("two hundred per cent (200%)"),
    }),
    "supplier_ip_indemnity": Slot("indemnity", {
        "none": None,
        "added": "The Supplier shall indemnify the Customer against all liabilities, costs, "
                 "expenses, damages and losses (including reasonable legal fees) suffered or "
                 "incurred by the Customer arising out of or in connection with any claim that the "
                 "possession, use or resale of the Products infringes the Intellectual Property "
                 "Rights of a third party, except to the extent that the claim arises from a "
                 "design or specification provided by the Customer.",
    }),
    "insurance_cover": Slot("insurance", {
        "eur-5m": _insurance("EUR 5,000,000 (five million euros)"),
        "eur-2m": _insurance("EUR 2,000,000 (two million euros)"),
        "eur-10m": _insurance("EUR 10,000,000 (ten million euros)"),
    }),
    "confidentiality_period": Slot("confidentiality", {
        "5-years": _confidentiality("five (5)"),
        "3-years": _confidentiality("three (3)"),
        "7-years": _confidentiality("seven (7)"),
    }),
    "termination_convenience": Slot("termination", {
        "90-days": _convenience("ninety (90)"),
        "60-days": _convenience("sixty (60)"),
        "30-days": _convenience("thirty (30)"),
    }),
    "termination_breach": Slot("termination", {
        "any-breach": _breach(""),
        "material-breach": _breach("material "),
    }),
    "assignment": Slot("assignment", {
        "mutual-consent": _ASSIGNMENT + ".",
        "affiliate-carve-out": _ASSIGNMENT + ", save that the Customer may assign this "
                               "Agreement to any of its Affiliates without such consent.",
    }),
    "non_solicitation": Slot("non_solicitation", {
        "present": "Neither party shall, during the term of this Agreement and for a period of "
                   "twelve (12) months after its termination or expiry, solicit or entice away "
                   "from the other party, or employ or attempt to employ, any person who is or "
                   "was during that period an employee of the other party engaged in the "
                   "performance of this Agreement, without the prior written consent of the "
                   "other party. This restriction does not apply to general recruitment "
                   "advertising that is not specifically directed at such persons.",
        "removed": None,
    }),
    "governing_law": Slot("governing_law", {
        "ardence": _law("Ardence"),
        "corvanne": _law("Corvanne"),
    }),
    "forum": Slot("dispute_resolution", {
        "wexmoor-courts": _courts("Wexmoor"),
        "port-sarrow-courts": _courts("Port Sarrow"),
        "wexmoor-arbitration": "Any dispute arising out of or in connection with this "
                               "Agreement, including any question regarding its existence, "
                               "validity or termination, shall be referred to and finally "
                               "resolved by arbitration in Wexmoor before a sole arbitrator "
                               "appointed by agreement of the parties or, failing agreement, by "
                               "the President of the Wexmoor Chamber of Commerce.",
    }),
    "service_credits": Slot("service_credits", {
        "none": None,
        "added": "If the Supplier fails to Deliver any Products on the Delivery Date, the "
                 "Supplier shall pay to the Customer service credits equal to two per cent (2%) "
                 "of the Prices of the late Products for each complete week of delay, up to a "
                 "maximum of ten per cent (10%) of those Prices. The parties agree that service "
                 "credits are a price adjustment reflecting the reduced value of the late "
                 "Products and not an estimate of the loss that the Customer may suffer.",
    }),
}


def house_choices() -> dict[str, str]:
    """The house wording of every slot: its first variant."""
    return {name: next(iter(slot.variants)) for name, slot in SLOTS.items()}


# ======================================================================================
# 2. The precedent set: who signed what (the known proportions)
# ======================================================================================


@dataclass(frozen=True)
class Counterparty:
    file: str
    name: str
    description: str
    site: str
    signed: str
    signatory: str


COUNTERPARTIES: tuple[Counterparty, ...] = (
    Counterparty("01-quenby-astrel-diagnostics.docx", "Quenby Astrel Diagnostics Ltd",
                 "a company incorporated in Ardence with registered number ARD 5520147 whose "
                 "registered office is at 3 Mill Race, Lisswater", "Unit 4, Greyfold Park, "
                 "Lisswater", "14 March 2019", "Tamsin Quarrie"),
    Counterparty("02-orrinwick-process-engineering.docx", "Orrinwick Process Engineering Ltd",
                 "a company incorporated in Ardence with registered number ARD 3318820 whose "
                 "registered office is at 77 Canal Row, Tarnby Cross", "Orrinwick Works, Canal "
                 "Row, Tarnby Cross", "2 July 2019", "Bram Oakhurst"),
    Counterparty("03-saltreach-water-services.docx", "Saltreach Water Services Ltd",
                 "a company incorporated in Ardence with registered number ARD 6042281 whose "
                 "registered office is at Saltreach House, Estuary Road, Wexmoor",
                 "Saltreach Depot, Estuary Road, Wexmoor", "19 November 2019", "Ilse Varden"),
    Counterparty("04-pellbrook-analytical.docx", "Pellbrook Analytical Inc.",
                 "a corporation organised under the laws of Corvanne whose principal office is at "
                 "41 Lantern Quay, Port Sarrow", "Pellbrook Laboratories, 9 Harbour Mile, Port "
                 "Sarrow", "3 February 2020", "Corin Pell"),
    Counterparty("05-vantry-and-loame-manufacturing.docx", "Vantry & Loame Manufacturing Ltd",
                 "a company incorporated in Ardence with registered number ARD 2290413 whose "
                 "registered office is at 12 Forge Street, Fennick Vale", "Vantry & Loame "
                 "Goods-In, Forge Street, Fennick Vale", "28 May 2020", "Maud Ashgrove"),
    Counterparty("06-gristmoor-hydrotech.docx", "Gristmoor Hydrotech Ltd",
                 "a company incorporated in Ardence with registered number ARD 7711094 whose "
                 "registered office is at 5 Sluice Lane, Wexmoor", "Gristmoor Pumping Station, "
                 "Sluice Lane, Wexmoor", "9 October 2020", "Rufus Tenley"),
    Counterparty("07-caddow-fenn-biosciences.docx", "Caddow Fenn Biosciences Inc.",
                 "a corporation organised under the laws of Corvanne whose principal office is at "
                 "220 Tidewater Avenue, Port Sarrow", "Caddow Fenn Campus, Building C, Port "
                 "Sarrow", "17 March 2021", "Wren Halloway"),
    Counterparty("08-lumbrey-ironworks.docx", "Lumbrey Ironworks Ltd",
                 "a company incorporated in Ardence with registered number ARD 1184306 whose "
                 "registered office is at The Foundry, Slagbank Road, Tarnby Cross",
                 "Lumbrey Stores, Slagbank Road, Tarnby Cross", "30 June 2021", "Aubrey Kestle"),
    Counterparty("09-norrow-kiln-ceramics.docx", "Norrow Kiln Ceramics Inc.",
                 "a corporation organised under the laws of Corvanne whose principal office is at "
                 "8 Clayfield Street, Velmont", "Norrow Kiln Works, Clayfield Street, Velmont",
                 "12 January 2022", "Sela Marnock"),
    Counterparty("10-drummlin-dairy-cooperative.docx", "Drummlin Dairy Cooperative Ltd",
                 "a company incorporated in Ardence with registered number ARD 4407765 whose "
                 "registered office is at Creamery Yard, Ostley Ford", "Drummlin Creamery, "
                 "Ostley Ford", "6 September 2022", "Idris Fenwood"),
    Counterparty("11-hollin-vree-energy.docx", "Hollin Vree Energy Ltd",
                 "a company incorporated in Ardence with registered number ARD 5093318 whose "
                 "registered office is at 60 Turbine Walk, Lisswater", "Hollin Vree Plant 2, "
                 "Turbine Walk, Lisswater", "21 April 2023", "Nell Carrow"),
    Counterparty("12-merrow-vance-pharmaceuticals.docx", "Merrow Vance Pharmaceuticals Ltd",
                 "a company incorporated in Ardence with registered number ARD 6620954 whose "
                 "registered office is at 1 Apothecary Square, Wexmoor", "Merrow Vance "
                 "Distribution Centre, Wexmoor", "15 February 2024", "Jory Blackett"),
)

#: Which variant each precedent-set document carries, per slot (one entry per counterparty,
#: in the order of COUNTERPARTIES).  Slots not listed carry the house wording everywhere.
PRECEDENT_SET: Mapping[str, tuple[str, ...]] = {
    #                           01    02    03    04    05    06    07    08    09    10    11    12
    "payment_days": ("30-days", "45-days", "30-days", "60-days", "30-days", "45-days",
                     "30-days", "30-days", "60-days", "45-days", "30-days", "30-days"),
    "liability_cap": ("100-per-cent", "150-per-cent", "100-per-cent", "200-per-cent",
                      "100-per-cent", "100-per-cent", "150-per-cent", "100-per-cent",
                      "100-per-cent", "150-per-cent", "100-per-cent", "100-per-cent"),
    "confidentiality_carve_out": ("none", "confidentiality-uncapped", "none",
                                  "confidentiality-uncapped", "none", "none",
                                  "confidentiality-uncapped", "none", "none", "none", "none",
                                  "none"),
    "supplier_ip_indemnity": ("none", "added", "added", "added", "none", "none", "added", "none",
                              "none", "added", "none", "none"),
    "insurance_cover": ("eur-5m", "eur-5m", "eur-5m", "eur-5m", "eur-2m", "eur-5m", "eur-5m",
                        "eur-2m", "eur-5m", "eur-5m", "eur-5m", "eur-5m"),
    "confidentiality_period": ("5-years", "3-years", "5-years", "3-years", "5-years", "5-years",
                               "7-years", "5-years", "5-years", "3-years", "5-years", "5-years"),
    "termination_convenience": ("90-days", "60-days", "90-days", "30-days", "90-days", "90-days",
                                "60-days", "90-days", "90-days", "60-days", "90-days", "90-days"),
    "termination_breach": ("any-breach", "material-breach", "any-breach", "material-breach",
                           "any-breach", "any-breach", "material-breach", "any-breach",
                           "any-breach", "material-breach", "any-breach", "any-breach"),
    "governing_law": ("ardence", "ardence", "ardence", "corvanne", "ardence", "ardence",
                      "corvanne", "ardence", "corvanne", "ardence", "ardence", "ardence"),
    "forum": ("wexmoor-courts", "wexmoor-courts", "wexmoor-courts", "port-sarrow-courts",
              "wexmoor-courts", "wexmoor-arbitration", "port-sarrow-courts", "wexmoor-courts",
              "wexmoor-courts", "wexmoor-courts", "wexmoor-courts", "wexmoor-courts"),
    "assignment": ("mutual-consent", "affiliate-carve-out", "mutual-consent",
                   "affiliate-carve-out", "mutual-consent", "mutual-consent",
                   "affiliate-carve-out", "mutual-consent", "mutual-consent", "mutual-consent",
                   "mutual-consent", "mutual-consent"),
    "warranty_period": ("12-months", "18-months", "12-months", "24-months", "12-months",
                        "12-months", "18-months", "12-months", "12-months", "12-months",
                        "12-months", "12-months"),
    "non_solicitation": ("present", "present", "present", "removed", "present", "present",
                         "present", "removed", "present", "present", "present", "present"),
}

# ======================================================================================
# 3. The customer's draft: its paper, its names, its departures
# ======================================================================================

#: The draft's names for the house's defined terms (draft -> precedent).  The parties'
#: labels are a trap for a term mapper: "Client" is the house "Customer", "Vendor" the house
#: "Supplier"; they must never be crossed.
RENAMED_TERMS: tuple[tuple[str, str], ...] = (
    ("Client", "Customer"),
    ("Vendor", "Supplier"),
    ("Goods", "Products"),
    ("Proprietary Information", "Confidential Information"),
    ("Purchase Order", "Order"),
    ("Effective Date", "Commencement Date"),
)

#: Clause order on the customer's paper: Termination moved up after the term clause,
#: Insurance moved down after compliance, Service Credits added after Delivery,
#: Non-Solicitation struck out.
DRAFT_ORDER: tuple[str, ...] = (
    "definitions", "term", "termination", "supply", "ordering", "delivery", "service_credits",
    "acceptance", "title_risk", "prices", "payment", "taxes", "warranties", "limitation",
    "indemnity", "ipr", "confidentiality", "data_protection", "audit", "compliance", "insurance",
    "consequences", "force_majeure", "assignment", "subcontracting", "non_solicitation",
    "announcements", "notices", "entire_agreement", "variation", "waiver", "severance",
    "counterparts", "third_party_rights", "relationship", "costs", "governing_law",
    "dispute_resolution",
)
MOVED = ("termination", "insurance")

#: Headings the customer's paper words differently ("Force majeure": capitalisation noise).
DRAFT_HEADINGS: Mapping[str, str] = {
    "term": "Term",
    "acceptance": "Acceptance",
    "force_majeure": "Force majeure",
    "announcements": "Publicity",
}

#: Run-in bold headings of the customer's sections (keys of the house items).
DRAFT_LEADS: Mapping[str, str] = {
    "definitions_list": "Definitions.",
    "interpretation": "Interpretation.",
    "precedence": "Conflicts.",
    "payment.1": "Invoicing.",
    "payment_terms": "Payment Terms.",
    "payment.3": "Disputed Invoices.",
    "late_payment": "Late Payment.",
    "payment.5": "No Set-Off.",
    "termination_convenience": "Termination for Convenience.",
    "termination_breach": "Termination for Breach.",
    "termination_insolvency": "Insolvency.",
    "termination.4": "Suspension.",
    "liability_unlimited": "Unlimited Liability.",
    "excluded_losses": "Excluded Losses.",
    "liability_cap": "Liability Cap.",
}


@dataclass(frozen=True)
class Departure:
    id: str
    slot: str
    draft_variant: str
    change: str  # insert | delete | replace | add-provision | remove-provision
    precedent_words: str  # house terms; "" for insert / add-provision (filled in for removal)
    draft_words: str  # house terms; renamed for the record
    expected_reasons: tuple[str, ...]
    weight: str


DEPARTURES: tuple[Departure, ...] = (
    Departure("d1", "payment_days", "60-days", "replace", "thirty (30)", "sixty (60)",
              ("30", "60"), "high"),
    Departure("d2", "liability_cap", "200-per-cent", "replace", "one hundred per cent (100%)",
              "two hundred per cent (200%)", ("100", "200"), "high"),
    Departure("d3", "governing_law", "corvanne", "replace", "Ardence", "Corvanne",
              ("ardence", "corvanne"), "high"),
    Departure("d4", "forum", "port-sarrow-courts", "replace", "Wexmoor", "Port Sarrow",
              ("wexmoor", "port sarrow"), "high"),
    Departure("d5", "termination_convenience", "30-days", "replace", "ninety (90)",
              "thirty (30)", ("90", "30"), "high"),
    Departure("d6", "confidentiality_period", "3-years", "replace", "five (5)", "three (3)",
              ("5", "3"), "medium"),
    Departure("d7", "warranty_period", "24-months", "replace", "twelve (12)",
              "twenty-four (24)", ("12", "24"), "medium"),
    Departure("d8", "forecasts", "may", "replace", "shall", "may", ("obligation",), "low"),
    Departure("d9", "acceptance_deemed", "not", "insert", "", "not", ("negation",), "high"),
    Departure("d10", "termination_breach", "material-breach", "insert", "", "material",
              ("qualifier",), "medium"),
    Departure("d11", "cancellation_costs", "reasonable", "insert", "", "reasonable",
              ("qualifier",), "low"),
    Departure("d12", "supplier_ip_indemnity", "added", "add-provision", "", "",
              ("added",), "high"),
    Departure("d13", "non_solicitation", "removed", "remove-provision", "", "",
              ("removed",), "medium"),
    Departure("d14", "service_credits", "added", "add-provision", "", "", ("added",), "high"),
    Departure("d15", "assignment", "affiliate-carve-out", "insert", "",
              "save that the Customer may assign this Agreement to any of its Affiliates "
              "without such consent", ("added",), "medium"),
    Departure("d16", "insurance_cover", "eur-10m", "replace",
              "EUR 5,000,000 (five million euros)", "EUR 10,000,000 (ten million euros)",
              ("5,000,000", "10,000,000"), "medium"),
    Departure("d17", "late_interest", "2-per-cent", "replace", "four per cent (4%)",
              "two per cent (2%)", ("4", "2"), "low"),
    Departure("d18", "delivery_essence", "essence", "delete", "not", "", ("negation",), "high"),
)

COSMETIC_NOISE: tuple[str, ...] = (
    "curly quotation marks and apostrophes throughout the customer's paper (straight ones in "
    "the precedent)",
    "double spaces after full stops in the instalments section and the audit section",
    "hyphens instead of en dashes around 'where applicable' in the delivery note section",
    "heading capitalisation: 'Force majeure' for the precedent's 'Force Majeure'",
)


def draft_choices() -> dict[str, str]:
    choices = house_choices()
    for dep in DEPARTURES:
        choices[dep.slot] = dep.draft_variant
    return choices


# ======================================================================================
# 4. Papers and rendering
# ======================================================================================

ROMAN = (("m", 1000), ("cm", 900), ("d", 500), ("cd", 400), ("c", 100), ("xc", 90),
         ("l", 50), ("xl", 40), ("x", 10), ("ix", 9), ("v", 5), ("iv", 4), ("i", 1))


def _roman(n: int) -> str:
    out = []
    for sym, val in ROMAN:
        while n >= val:
            out.append(sym)
            n -= val
    return "".join(out)


def _letter(n: int) -> str:
    # ECMA-376 §17.18.59 lowerLetter: a..z, then aa..zz, aaa.. (the letter repeated)
    return chr(ord("a") + (n - 1) % 26) * ((n - 1) // 26 + 1)


def format_number(n: int, fmt: str) -> str:
    """Render counter *n* in the ST_NumberFormat *fmt* (the formats the demo uses)."""
    if fmt == "decimal":
        return str(n)
    if fmt == "lowerLetter":
        return _letter(n)
    if fmt == "upperLetter":
        return _letter(n).upper()
    if fmt == "lowerRoman":
        return _roman(n)
    if fmt == "upperRoman":
        return _roman(n).upper()
    raise ValueError(fmt)


def render_label(levels: Sequence[tuple[str, str]], counters: Sequence[int]) -> str:
    """The label a word processor shows for the counters of levels 0..len(counters)-1."""
    _, text = levels[len(counters) - 1]
    return re.sub(r"%([1-9])", lambda m: format_number(counters[int(m.group(1)) - 1],
                                                        levels[int(m.group(1)) - 1][0]), text)


def strip_label(label: str) -> str:
    """The number as the document JSON shows it: the label without trailing "." or ":"."""
    return label.rstrip(".:")


@dataclass(frozen=True)
class Paper:
    """Everything that differs between the house form and the customer's paper."""

    name: str
    order: tuple[str, ...]
    lists: Mapping[str, Sequence[tuple[str, str]]]
    ref_prefix: str  # "clause " in the house style, "" where the label says "Section"
    ref_cap_prefix: str  # at the start of a sentence ("This clause 27" / "This Article 27")
    renames: Mapping[str, str] = field(default_factory=dict)  # precedent term -> draft term
    headings: Mapping[str, str] = field(default_factory=dict)
    leads: Mapping[str, str] = field(default_factory=dict)
    curly_quotes: bool = False
    noise: Mapping[str, Callable[[str], str]] = field(default_factory=dict)


HOUSE_LISTS = {
    "main": (("decimal", "%1."), ("decimal", "%1.%2"), ("lowerLetter", "(%3)"),
             ("lowerRoman", "(%4)")),
    "parties": (("decimal", "(%1)"),),
    "recitals": (("upperLetter", "(%1)"),),
    "schedule": (("decimal", "%1."), ("decimal", "%1.%2")),
}
DRAFT_LISTS = {
    "main": (("decimal", "Article %1"), ("decimal", "Section %1.%2"), ("lowerRoman", "(%3)"),
             ("upperLetter", "(%4)")),
    "parties": (("decimal", "(%1)"),),
    "recitals": (("upperLetter", "%1."),),
    "schedule": (("decimal", "%1."), ("decimal", "%1.%2")),
}


def _double_spaces(text: str) -> str:
    return re.sub(r"\. (?=[A-Z])", ".  ", text)


def _hyphens(text: str) -> str:
    return text.replace(" \u2013 ", " - ")


HOUSE = Paper("house", HOUSE_ORDER, HOUSE_LISTS, "clause ", "This clause ")
DRAFT = Paper(
    "draft", DRAFT_ORDER, DRAFT_LISTS, "", "This ",
    renames={precedent: draft for draft, precedent in RENAMED_TERMS},
    headings=DRAFT_HEADINGS, leads=DRAFT_LEADS, curly_quotes=True,
    noise={"instalments": _double_spaces, "audit_right": _double_spaces,
           "delivery_note": _hyphens},
)


@dataclass
class Rendered:
    """One rendered document: its paragraphs, its outline and where each provision went."""

    paragraphs: list[ComposeParagraph] = field(default_factory=list)
    outline: list[dict[str, object]] = field(default_factory=list)
    numbers: dict[str, str] = field(default_factory=dict)  # provision key -> number
    texts: dict[str, str] = field(default_factory=dict)  # provision key -> its own text
    headings: dict[str, str] = field(default_factory=dict)  # clause key -> heading


def _rename(text: str, renames: Mapping[str, str]) -> str:
    """Replace each defined term (and its plural in "s") by the paper's name for it."""
    if not renames:
        return text
    pattern = re.compile(r"\b(" + "|".join(sorted(map(re.escape, renames), key=len,
                                                      reverse=True)) + r")(s?)\b")
    return pattern.sub(lambda m: renames[m.group(1)] + m.group(2), text)


def _curl(text: str) -> str:
    text = re.sub(r'"(?=\w)', "\u201c", text)
    return text.replace('"', "\u201d").replace("'", "\u2019")


@dataclass(frozen=True)
class _Node:
    key: str  # unique key of the provision
    level: int  # 1 = top-level clause
    text: str | None  # template (None for a heading-only clause)
    clause: str


def _slot_text(template: str, choices: Mapping[str, str]) -> str | None:
    if template.startswith("@"):
        slot = template[1:]
        return SLOTS[slot].variants[choices[slot]]
    return template


def _layout(paper: Paper, choices: Mapping[str, str]) -> list[tuple[_Node, tuple[int, ...]]]:
    """The numbered provisions of the main body in order, with their counters.

    Items whose slot variant is None are left out (and not counted); a clause whose body
    slot is None and that has no items is struck out.  Keys of unkeyed items are
    ``"<parent key>.<position in the house form>"`` so that they stay stable across papers.
    """
    by_key = {c.key: c for c in CLAUSES}
    out: list[tuple[_Node, tuple[int, ...]]] = []
    top = 0
    for ckey in paper.order:
        clause = by_key[ckey]
        body = _slot_text(clause.body, choices) if clause.body is not None else None
        if clause.body is not None and body is None and not clause.items:
            continue  # the clause is struck out
        top += 1
        out.append((_Node(ckey, 1, body, ckey), (top,)))
        # Depth-first walk with an explicit stack of (items, next index, counters, parent).
        stack: list[tuple[Sequence[Item], int, tuple[int, ...], str]] = [
            (clause.items, 0, (top,), ckey)]
        counts: list[int] = [0]
        while stack:
            items, idx, prefix, parent = stack.pop()
            if idx >= len(items):
                counts.pop()
                continue
            stack.append((items, idx + 1, prefix, parent))
            item = items[idx]
            text = _slot_text(item.text, choices)
            if text is None:
                continue
            counts[-1] += 1
            key = item.key or f"{parent}.{idx + 1}"
            counters = prefix + (counts[-1],)
            out.append((_Node(key, len(counters), text, ckey), counters))
            if item.kids:
                stack.append((item.kids, 0, counters, key))
                counts.append(0)
    return out


@dataclass(frozen=True)
class Front:
    """The parts of an agreement outside its clauses."""

    title: str
    opening: str
    parties: tuple[str, ...]
    recitals_heading: str
    recitals: tuple[str, ...]
    agreed: str
    execution: str
    signatures: tuple[str, ...]
    schedule_number: str
    schedule_heading: str
    schedule: tuple[tuple[int, str | None, str], ...]  # (depth, run-in heading, text)


def render(paper: Paper, choices: Mapping[str, str], *, front: Front) -> Rendered:
    """Render one agreement on *paper* with the slot *choices* and front matter *front*."""
    layout = _layout(paper, choices)
    main = paper.lists["main"]
    numbers = {node.key: strip_label(render_label(main, counters)) for node, counters in layout}

    def fill(template: str) -> str:
        def ref(m: re.Match[str]) -> str:
            key, cap = m.group(1), m.group(2)
            prefix = paper.ref_cap_prefix if cap else paper.ref_prefix
            return prefix + numbers[key]
        text = re.sub(r"\{ref:(\w+)(:cap)?\}", ref, template)
        text = _rename(text, paper.renames)
        return _curl(text) if paper.curly_quotes else text

    out = Rendered()
    by_key = {c.key: c for c in CLAUSES}

    def para(text: str, kind: str, *, number: str | None = None, heading: str | None = None,
             level_out: int = 0, **kw: object) -> None:
        out.paragraphs.append(ComposeParagraph(text, **kw))  # type: ignore[arg-type]
        if kind:
            out.outline.append({"number": number, "heading": heading, "kind": kind,
                                "level": level_out})

    # --- title, parties, recitals
    para(fill(front.title), "title", style="Title")
    # The opening line introduces the parties; a bold line heads the recitals; the line
    # before clause 1 stands alone.
    para(fill(front.opening), "parties")
    for i, party in enumerate(front.parties, start=1):
        label = render_label(paper.lists["parties"], (i,))
        para(fill(party), "parties", number=strip_label(label), level_out=1, level=0,
             list="parties")
    recitals_heading = fill(front.recitals_heading)
    para(recitals_heading, "recital", heading=recitals_heading, bold=True)
    for i, recital in enumerate(front.recitals, start=1):
        label = render_label(paper.lists["recitals"], (i,))
        para(fill(recital), "recital", number=strip_label(label), level_out=1, level=0,
             list="recitals")
    agreed = fill(front.agreed)
    para(agreed, "other", heading=agreed.rstrip(":"), bold=True)

    # --- the clauses
    for node, _counters in layout:
        clause = by_key[node.clause]
        number = numbers[node.key]
        if node.level == 1:
            heading = paper.headings.get(node.key) or _rename(clause.heading, paper.renames)
            out.headings[node.key] = heading
            out.numbers[node.key] = number
            para(heading, "clause", number=number, heading=heading, level_out=1, level=0,
                 style="Heading 1")
            if node.text:
                text = fill(node.text)
                out.texts[node.key] = text
                para(text, "")
            continue
        text = fill(node.text or "")
        text = paper.noise.get(node.key, lambda s: s)(text)
        lead = paper.leads.get(node.key)
        out.numbers[node.key] = number
        out.texts[node.key] = text
        para(text, "clause", number=number, heading=lead.rstrip(".") if lead else None,
             level_out=node.level, level=node.level - 1, lead=lead)
        if node.key == "definitions_list":
            defs = sorted(((_rename(term, paper.renames), fill(f'"{term}" {body}'))
                           for term, body in DEFINITIONS), key=lambda d: d[0].lower())
            for _, text in defs:
                para(text, "definition")

    # --- execution, then the schedule
    para(fill(front.execution), "signature")
    for line in front.signatures:
        para(fill(line), "")
    sched_heading = fill(front.schedule_heading)
    para(f"{front.schedule_number} \u2013 {sched_heading}", "schedule",
         number=front.schedule_number, heading=sched_heading, level_out=1, style="Heading 1")
    sched_counters: list[int] = []
    for depth, lead, text in front.schedule:
        sched_counters = sched_counters[:depth] + [
            sched_counters[depth] + 1 if len(sched_counters) > depth else 1]
        label = strip_label(render_label(paper.lists["schedule"], sched_counters))
        lead = fill(lead) if lead else None
        # Numbered paragraphs of the schedule are clauses of the schedule provision.
        para(fill(text), "clause", number=label, heading=lead.rstrip(".") if lead else None,
             level_out=depth + 2, level=depth, list="schedule", lead=lead)
    return out


# --------------------------------------------------------------------------------------
# Front matter per document
# --------------------------------------------------------------------------------------

RECITALS = (
    "The Supplier designs and manufactures precision flow measurement and calibration "
    "instruments.",
    "The Customer wishes to purchase, and the Supplier wishes to supply, such instruments on "
    "the terms of this Agreement.",
)


def _schedule(site: str) -> tuple[tuple[int, str | None, str], ...]:
    return (
        (0, "Products.", "The Products comprise the instruments listed in paragraph 2, each as "
                         "described in the Supplier's current product data sheet, which forms "
                         "part of the Specification."),
        (0, "Prices.", "The Prices, exclusive of value added tax, are:"),
        (1, None, "TI-220 ultrasonic flow meter: EUR 1,840 per unit;"),
        (1, None, "TI-310 differential pressure transducer: EUR 960 per unit;"),
        (1, None, "TC-45 portable calibration rig: EUR 12,500 per unit; and"),
        (1, None, "TS-9 spare sensor kit: EUR 215 per kit."),
        (0, "Delivery Location.", f"{site}, or such other location as the Customer may state "
                                  f"in the relevant Order."),
        (0, "Minimum Order.", "The minimum value of each Order is EUR 2,500 (two thousand five "
                              "hundred euros), exclusive of value added tax."),
    )


def _house_front(cp: Counterparty | None) -> Front:
    if cp is None:  # the unsigned standard form
        date, name, description, site = ("[DATE]", "[CUSTOMER NAME]", "[DESCRIPTION OF "
                                          "CUSTOMER]", "[ADDRESS OF CUSTOMER'S PREMISES]")
        signatures = ("Signed by [NAME OF DIRECTOR], director, for and on behalf of "
                      f"{SUPPLIER}", "Signed by [NAME OF DIRECTOR], director, for and on behalf "
                      "of [CUSTOMER NAME]")
    else:
        date, name, description, site = cp.signed, cp.name, cp.description, cp.site
        signatures = (f"Signed by Orla Venn, director, for and on behalf of {SUPPLIER}",
                      f"Signed by {cp.signatory}, director, for and on behalf of {cp.name}")
    return Front(
        title="MASTER SUPPLY AGREEMENT",
        opening=f"This Agreement is dated {date}.",
        parties=(f"{SUPPLIER.upper()}, {SUPPLIER_DESCRIPTION} (the \"Supplier\").",
                 f"{name.upper()}, {description} (the \"Customer\")."),
        recitals_heading="BACKGROUND",
        recitals=RECITALS,
        agreed="AGREED TERMS",
        execution="This Agreement has been entered into on the date stated at the beginning of "
                  "it.",
        signatures=signatures,
        schedule_number="Schedule 1",
        schedule_heading="Products and Prices",
        schedule=_schedule(site),
    )


DRAFT_CUSTOMER = Counterparty(
    "draft.docx", "Marrowfield Clinical Systems Inc.",
    "a corporation organised under the laws of Corvanne whose principal office is at 200 "
    "Gannet Street, Port Sarrow", "Marrowfield Central Stores, 15 Dock Road, Port Sarrow",
    "[DATE]", "[NAME]")


def _draft_front() -> Front:
    cp = DRAFT_CUSTOMER
    return Front(
        title="MASTER SUPPLY AGREEMENT",
        opening="This Master Supply Agreement is made on [DATE] between:",
        parties=(f"{cp.name.upper()}, {cp.description} (the \"Customer\"); and",
                 f"{SUPPLIER.upper()}, {SUPPLIER_DESCRIPTION} (the \"Supplier\")."),
        recitals_heading="Background",
        recitals=RECITALS,
        agreed="NOW, THEREFORE, the parties agree as follows:",
        execution="IN WITNESS WHEREOF the parties have executed this Agreement as of the "
                  "Commencement Date.",
        signatures=(f"{cp.name.upper()}\nBy: ______________________\nName:\nTitle:",
                    f"{SUPPLIER.upper()}\nBy: ______________________\nName:\nTitle:"),
        schedule_number="Schedule 1",
        schedule_heading="Products and Prices",
        schedule=_schedule(cp.site),
    )


# ======================================================================================
# 5. The record and the files
# ======================================================================================


def _squash(text: str) -> str:
    return " ".join(re.sub(r"\W+", " ", text).split())


def _check_departure(dep: Departure) -> None:
    """The planted words really are the difference between the two wordings (house terms)."""
    slot = SLOTS[dep.slot]
    house = slot.variants[house_choices()[dep.slot]]
    draft = slot.variants[dep.draft_variant]
    if dep.change == "replace":
        assert house and draft and house.count(dep.precedent_words) == 1, dep.id
        assert house.replace(dep.precedent_words, dep.draft_words) == draft, dep.id
    elif dep.change == "insert":
        assert house and draft and draft.count(dep.draft_words) == 1, dep.id
        assert _squash(draft.replace(dep.draft_words, "", 1)) == _squash(house), dep.id
    elif dep.change == "delete":
        assert house and draft and house.count(dep.precedent_words) == 1, dep.id
        assert _squash(house.replace(dep.precedent_words, "", 1)) == _squash(draft), dep.id
    elif dep.change == "add-provision":
        assert house is None and draft, dep.id
    elif dep.change == "remove-provision":
        assert house and draft is None, dep.id
    else:
        raise AssertionError(dep.change)


def _slot_key(slot: str) -> str:
    """The provision key a slot's wording lives in (a clause key for body slots)."""
    for clause in CLAUSES:
        if clause.body == f"@{slot}":
            return clause.key
        todo = list(clause.items)
        while todo:
            item = todo.pop()
            if item.text == f"@{slot}":
                if item.key is None:
                    raise AssertionError(f"slot {slot} needs a keyed item")
                return item.key
            todo.extend(item.kids)
    raise KeyError(slot)


def _clause_of(slot: str) -> Clause:
    return next(c for c in CLAUSES if c.key == SLOTS[slot].clause)


_BAD_ARTICLES = re.compile(r"\ban (Purchase|Vendor|Client|Goods)\b|\ba (Effective|Order)\b")


def build_scenario() -> tuple[dict[str, bytes], dict[str, object]]:
    """All files (relative path -> bytes) and the record, computed in memory."""
    for dep in DEPARTURES:
        _check_departure(dep)
    for name, variants in PRECEDENT_SET.items():
        assert len(variants) == len(COUNTERPARTIES), name
        assert set(variants) <= set(SLOTS[name].variants), name
    for slot in SLOTS.values():
        assert all("{ref:" not in (t or "") for t in slot.variants.values())

    files: dict[str, bytes] = {}
    house = render(HOUSE, house_choices(), front=_house_front(None))
    files[PRECEDENT_FILE] = compose_docx(house.paragraphs, lists=HOUSE.lists)

    set_choices: list[dict[str, str]] = []
    for i, cp in enumerate(COUNTERPARTIES):
        choices = house_choices()
        choices.update({slot: variants[i] for slot, variants in PRECEDENT_SET.items()})
        set_choices.append(choices)
        doc = render(HOUSE, choices, front=_house_front(cp))
        files[f"{SET_FOLDER}/{cp.file}"] = compose_docx(doc.paragraphs, lists=HOUSE.lists)

    draft = render(DRAFT, draft_choices(), front=_draft_front())
    files[DRAFT_FILE] = compose_docx(draft.paragraphs, lists=DRAFT.lists)
    all_draft_text = "\n".join(p.text for p in draft.paragraphs)
    bad = _BAD_ARTICLES.search(all_draft_text)
    assert bad is None, f"renaming left {bad.group(0)!r} in the draft"

    def rename(text: str) -> str:
        text = _rename(text, DRAFT.renames)
        return _curl(text) if DRAFT.curly_quotes else text

    departures = []
    for dep in DEPARTURES:
        key = _slot_key(dep.slot)
        clause = _clause_of(dep.slot)
        precedent_words, draft_words = dep.precedent_words, rename(dep.draft_words)
        if dep.change == "remove-provision":
            precedent_words = house.texts[key]
        if dep.change == "add-provision":
            draft_words = draft.texts[key]
        departures.append({
            "id": dep.id,
            "precedent_number": house.numbers.get(key),
            "draft_number": draft.numbers.get(key),
            "heading": house.headings.get(clause.key) or draft.headings[clause.key],
            "clause_type": clause.clause_type,
            "change": dep.change,
            "precedent_words": precedent_words,
            "draft_words": draft_words,
            "expected_reasons": list(dep.expected_reasons),
            "weight": dep.weight,
            "precedent_set_matching": sum(c[dep.slot] == dep.draft_variant for c in set_choices),
        })

    variants = []
    listed = list(PRECEDENT_SET) + [d.slot for d in DEPARTURES if d.slot not in PRECEDENT_SET]
    for slot in listed:
        clause = _clause_of(slot)
        for name, text in SLOTS[slot].variants.items():
            docs = [cp.file for cp, c in zip(COUNTERPARTIES, set_choices) if c[slot] == name]
            if not docs:
                continue
            variants.append({
                "clause_type": clause.clause_type,
                "heading": clause.heading,
                "variant": f"{slot.replace('_', '-')}/{name}",
                "text": text or "",
                "count": len(docs),
                "documents": docs,
            })

    record = {
        "schema": SCHEMA,
        "precedent": {"file": PRECEDENT_FILE, "outline": house.outline},
        "draft": {"file": DRAFT_FILE, "outline": draft.outline},
        "renamed_terms": [{"draft": d, "precedent": p} for d, p in RENAMED_TERMS],
        "moved": [{"precedent_number": house.numbers[k], "draft_number": draft.numbers[k],
                   "heading": house.headings[k]} for k in MOVED],
        "departures": departures,
        "cosmetic_noise": list(COSMETIC_NOISE),
        "precedent_set": {
            "folder": SET_FOLDER,
            "total": len(COUNTERPARTIES),
            "documents": [{"file": cp.file, "counterparty": cp.name} for cp in COUNTERPARTIES],
            "variants": variants,
        },
    }
    return files, record


def record_text(record: Mapping[str, object]) -> str:
    return json.dumps(record, ensure_ascii=False, indent=2) + "\n"


def generate(out_dir: Path) -> list[Path]:
    """Write every demo file under *out_dir*; returns the paths written."""
    files, record = build_scenario()
    (out_dir / SET_FOLDER).mkdir(parents=True, exist_ok=True)
    written = []
    for rel, data in files.items():
        path = out_dir / rel
        atomic_write_bytes(path, data)
        written.append(path)
    written.append(out_dir / RECORD_FILE)
    atomic_write_text(written[-1], record_text(record))
    for path in written:  # invented, public demo data: readable by everyone
        path.chmod(0o644)
    for stale in sorted((out_dir / SET_FOLDER).glob("*.docx")):
        if stale not in written:
            stale.unlink()
    return written


def main(argv: Sequence[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Regenerate Counterdraft's demo agreements.")
    parser.add_argument("--out", type=Path, default=HERE, help="output folder (default: here)")
    args = parser.parse_args(argv)
    args.out.mkdir(parents=True, exist_ok=True)
    for path in generate(args.out):
        print(f"wrote {path} ({path.stat().st_size:,} bytes)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
