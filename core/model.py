"""The document model: plain frozen dataclasses that every stage of the engine shares.

A reader turns a file into a tuple of :class:`Block` (one per paragraph, in reading order,
table cells included).  :mod:`core.structure` turns blocks into :class:`Provision` objects and
:mod:`core.terms` finds the :class:`DefinedTerm` objects.  Nothing here holds a live
python-docx or lxml object: the engine never touches XML above ``core.docx``.

Invariants
----------
* ``Block.index`` is the block's position in ``Document.blocks`` (0-based, gap-free).
* ``Provision.id`` is ``"p<n>"`` with n = 1, 2, ... in document order.
* ``Provision.segments`` says where each line of the provision's text sits in the blocks:
  ``provision.text == "\n".join(doc.blocks[s.block].text[s.start:s.end] for s in
  provision.segments)``.  Writers use it to find the provision's words again in the file.
* ``Provision.text`` holds the provision's own words only: no number label, no heading,
  no child provisions.  Unnumbered paragraphs that follow a provision belong to it and are
  joined with ``"\\n"``.

Review invariants (what :mod:`core.review` guarantees; writers and views rely on them and
never recompute them)
----------------------------------------------------------------------------------------
* ``Pair.edits`` is the engine's own word diff of the pair, the one it classified: with
  ``P`` the precedent provision's text and ``D`` the draft provision's text (the original
  texts, not the term-normalised ones), the hunks tile both texts in order, without gap or
  overlap: the first hunk starts at ``p1 == d1 == 0``, each next hunk starts where the
  previous one ended (``p1 == previous p2``, ``d1 == previous d2``), the last ends at
  ``len(P)`` and ``len(D)``; so ``"".join(P[e.p1:e.p2] for e in edits) == P`` and the same
  for ``D``.  An ``equal`` hunk covers identical text (``P[e.p1:e.p2] == D[e.d1:e.d2]``); an
  ``insert`` has ``p1 == p2`` and a ``delete`` ``d1 == d2``; a ``replace`` is non-empty on
  both sides.  The diff is term-aware: where it matched a use of a renamed defined term
  (``Review.term_map``) with the other side's use of the same term, that use is a
  ``replace`` hunk of its own covering exactly the use on each side (plural and possessive
  endings included), so a view can show it as a term rather than as changed words; a term
  used inside changed words stays part of their hunk.  Split
  and merged provisions have one diff per pairing (the two provisions' own texts).
  ``edits`` is ``()`` for an added or removed provision (one side only), when both texts
  are empty, and for a pair built without the engine (a hand-made review); a consumer
  that finds ``()`` on a two-sided pair with different texts has no word diff to show.
* ``Deviation.part`` says which part of the provision the deviation concerns: ``"text"``
  (words of ``Provision.text``), ``"heading"`` (``Provision.heading``) or ``"provision"``
  (the provision as a whole: added, removed, moved, renumbered; or, for a renamed defined
  term, the two defining provisions).
* ``Deviation.precedent_text_span`` / ``draft_text_span`` locate the words shown
  (``precedent_text``, ``draft_text``: the changed words, widened to whole figures and, for a
  change without letters or digits, a word of context) in the same texts:
  ``P[a:b] == precedent_text`` and ``D[c:d] == draft_text``, neither with white space at
  either end.  They correspond: ``P[:a]`` and ``D[:c]`` end at the same place of the pair's
  diff, up to white space, and so do ``P[b:]`` and ``D[d:]``.  A ``replace`` hunk with
  ``restyle`` set is a renamed term, a renumbered reference or a formatting change.
* ``Deviation.precedent_span`` / ``draft_span`` are character offsets into
  ``Provision.text`` and are given exactly when ``part == "text"`` (None otherwise).  They
  cover the changed words without context; for an ``insert`` the precedent span is empty
  at the insertion point (``(k, k)``: the words would go before ``P[k]``), for a ``delete``
  the draft span is empty at the place the words were taken from.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any, Literal, get_args

from .errors import CounterdraftError

__all__ = [
    "CATEGORIES",
    "CHANGES",
    "CHECK_DOCUMENTS",
    "CHECK_KINDS",
    "CHECK_PARTS",
    "DECISION_ACTIONS",
    "DEVIATION_PARTS",
    "DIRECTIONS",
    "EDIT_TAGS",
    "EVIDENCE_KINDS",
    "OVERRIDE_ACTIONS",
    "PAIR_STATUSES",
    "PROVISION_KINDS",
    "STANCES",
    "FORMER_STANCES",
    "stance_named",
    "Block",
    "Category",
    "ChangeKind",
    "Check",
    "CheckDocument",
    "CheckKind",
    "CheckPart",
    "ClosestProvision",
    "Decision",
    "DecisionAction",
    "DefinedTerm",
    "Deviation",
    "DeviationPart",
    "Direction",
    "Document",
    "Edit",
    "EditTag",
    "Evidence",
    "Frequency",
    "OverrideAction",
    "Pair",
    "PairStatus",
    "Provision",
    "ProvisionKind",
    "Review",
    "Segment",
    "Stance",
    "Term",
    "TermMapping",
    "TermOverride",
]

# --------------------------------------------------------------------------------------
# The closed sets: each a Literal type, and its values in order as a tuple derived from it
# (typing.get_args), so that the two cannot drift apart.
# --------------------------------------------------------------------------------------

ProvisionKind = Literal[
    "title", "parties", "recital", "definition", "clause", "signature", "schedule", "other"
]
PROVISION_KINDS: tuple[ProvisionKind, ...] = get_args(ProvisionKind)
#: How a provision pairs with the other document's (core.review.align).
PairStatus = Literal["same", "changed", "moved", "added", "removed", "split", "merged"]
PAIR_STATUSES: tuple[PairStatus, ...] = get_args(PairStatus)
#: What kind of change a deviation is (core.review.classify).
Category = Literal["substantive", "term", "formatting", "numbering", "punctuation", "completion"]
CATEGORIES: tuple[Category, ...] = get_args(Category)
ChangeKind = Literal["insert", "delete", "replace", "move", "add-provision", "remove-provision"]
CHANGES: tuple[ChangeKind, ...] = get_args(ChangeKind)
#: Which part of the provision a deviation concerns (see the module's invariants).
DeviationPart = Literal["text", "heading", "provision"]
DEVIATION_PARTS: tuple[DeviationPart, ...] = get_args(DeviationPart)
#: Whose side a deviation is on, for the party the review acts for (core.review.direction):
#: against it, for it, for neither (no change of meaning, or a clause binding each party
#: alike), or not to be told from the wording.
Direction = Literal["adverse", "favourable", "neutral", "unclear"]
DIRECTIONS: tuple[Direction, ...] = get_args(Direction)
#: The hunk tags of a word diff, as difflib's opcodes name them.
EditTag = Literal["equal", "insert", "delete", "replace"]
EDIT_TAGS: tuple[EditTag, ...] = get_args(EditTag)
#: What a term mapping rests on (core.review.termmap).
Evidence = Literal["definition", "substitution", "embedding", "user"]
EVIDENCE_KINDS: tuple[Evidence, ...] = get_args(Evidence)
#: The five drafting checks (core.review.checks), the document the words are in and the
#: part of the provision they are in.
CheckKind = Literal["undefined-term", "unused-definition", "stale-term", "dangling-reference",
                    "definition-changed"]
CHECK_KINDS: tuple[CheckKind, ...] = get_args(CheckKind)
CheckDocument = Literal["draft", "precedent"]
CHECK_DOCUMENTS: tuple[CheckDocument, ...] = get_args(CheckDocument)
CheckPart = Literal["text", "heading"]
CHECK_PARTS: tuple[CheckPart, ...] = get_args(CheckPart)
#: The reviewer's decision on a deviation (core.decisions): keep the draft's words, restore
#: the precedent's, or write their own.
DecisionAction = Literal["accept", "revert", "amend"]
DECISION_ACTIONS: tuple[DecisionAction, ...] = get_args(DecisionAction)
#: The reviewer's word on a term mapping (:class:`TermOverride`).
OverrideAction = Literal["confirm", "reject", "add"]
OVERRIDE_ACTIONS: tuple[OverrideAction, ...] = get_args(OverrideAction)
#: The firm's stance on a wording of its precedent set (core.library): house wording, can
#: live with, last concession, refuse.
Stance = Literal["house wording", "can live with", "last concession", "refuse"]
STANCES: tuple[Stance, ...] = get_args(Stance)
#: The names an index or a review file written by an earlier version used, and the stance
#: each now reads as.
FORMER_STANCES: dict[str, Stance] = {
    "preferred": "house wording", "acceptable": "can live with", "fallback": "last concession",
    "not acceptable": "refuse",
}


def stance_named(value: str | None) -> Stance | None:
    """The stance *value* names (a former name reads as its new one); None for None or a
    name that is no stance."""
    name = FORMER_STANCES.get(value, value) if value is not None else None
    return next((s for s in STANCES if s == name), None)


@dataclass(frozen=True, slots=True)
class Block:
    """One paragraph as a reader saw it, before any legal structure is inferred.

    ``text`` is the displayed text with tracked changes read as accepted, field results
    shown, tabs as ``"\\t"`` and soft line breaks as ``"\\n"``; an auto-number label is *not*
    part of it (it lives in ``label``).  Literal labels typed into the text stay in ``text``.
    """

    index: int
    text: str
    #: Rendered auto-number label exactly as displayed, e.g. ``"7.2."``, ``"(a)"``; None if the
    #: paragraph is not auto-numbered (or is a bullet: then ``bullet`` is True).
    label: str | None = None
    #: 0-based list level (w:ilvl) of an auto-numbered paragraph, else None.
    list_level: int | None = None
    #: Identifier of the list the paragraph belongs to (the abstract numbering), else None.
    list_id: str | None = None
    bullet: bool = False
    #: Paragraph style name as the document names it (e.g. "Heading 2"), else None.
    style: str | None = None
    #: Outline level from a heading style or w:outlineLvl: 1 for "Heading 1"; 0 for "Title".
    outline_level: int | None = None
    #: Leading run-in heading: the text of the emphasised (bold, underlined or all-caps) runs
    #: at the start of the paragraph when the paragraph continues with plain text.
    lead: str | None = None
    #: True when every non-blank run of the paragraph is emphasised (a standalone heading line).
    emphasised: bool = False
    #: True when all letters are shown in capitals (w:caps or typed in capitals).
    all_caps: bool = False
    in_table: bool = False


@dataclass(frozen=True, slots=True)
class Segment:
    """``blocks[block].text[start:end]`` is one line of a provision's text."""

    block: int
    start: int
    end: int


@dataclass(frozen=True, slots=True)
class Provision:
    """One unit of the agreement: a clause at any level, a definition, a recital, ..."""

    id: str
    kind: ProvisionKind
    number: str | None  # rendered label without trailing "." or ":"; e.g. "7.2", "(a)"
    heading: str | None
    level: int  # depth in the numbering hierarchy; 1 = top level, 0 = unnumbered
    parent: str | None
    text: str
    term: str | None = None  # only for kind == "definition"
    segments: tuple[Segment, ...] = ()


@dataclass(frozen=True, slots=True)
class DefinedTerm:
    """A term the document defines.

    ``aliases`` are the other names defined as the same term in the same breath (``"You"
    (or "Your")``, ``the terms "Licensee", "You" and "Your" shall refer to``): a use of an
    alias is a use of the term.  ``span`` locates the definition's source in the defining
    provision's text: ``provision.text[a:b]`` is the whole provision for a definition
    provision, else the sentence or table row that defines the term; ``definition`` is that
    slice (an inline one cut at ``core.terms.MAX_INLINE_DEFINITION_CHARS`` with "…").  None
    for a term built by hand without it.
    """

    term: str
    definition: str
    provision: str  # id of the provision that defines it
    uses: int  # uses elsewhere as written (any of its names), plural and possessive forms counted
    aliases: tuple[str, ...] = ()
    span: tuple[int, int] | None = None

    @property
    def names(self) -> tuple[str, ...]:
        """The term and its aliases."""
        return (self.term, *self.aliases)


#: The shorter name of a defined term in the model's vocabulary.
Term = DefinedTerm


@dataclass(frozen=True, slots=True)
class Document:
    source: str  # file name as given to the reader (the JSON shows its base name)
    provisions: tuple[Provision, ...]
    terms: tuple[DefinedTerm, ...]
    blocks: tuple[Block, ...] = ()
    #: Human-readable notes from reading, e.g. "3 tracked changes read as accepted".
    warnings: tuple[str, ...] = field(default=())

    def provision(self, pid: str) -> Provision:
        """The provision with id *pid* (KeyError if absent)."""
        for p in self.provisions:
            if p.id == pid:
                return p
        raise KeyError(pid)


# --------------------------------------------------------------------------------------
# The review: what the engine (core.review) produces from a draft and a precedent.
# --------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class TermMapping:
    """The draft calls ``draft`` what the precedent calls ``precedent`` (singular forms)."""

    draft: str
    precedent: str
    confidence: float  # 0..1
    evidence: tuple[Evidence, ...]
    occurrences: int  # uses of the draft term in the draft, plural and possessive included
    #: Stale uses: places where the draft still writes the precedent's name although it
    #: otherwise uses its own (kept visible for a drafting check; the diff reads them as the
    #: same term, so no deviation shows them).
    stale: int = 0
    #: The substitution evidence counted: aligned places where the draft writes its name
    #: where the precedent writes its own, out of ``aligned`` uses of the precedent's name in
    #: the aligned provisions (0 when not counted); their ratio is the rename's consistency.
    substitutions: int = 0
    aligned: int = 0


@dataclass(frozen=True, slots=True)
class ClosestProvision:
    document: str
    provision: str
    similarity: float


@dataclass(frozen=True, slots=True)
class Frequency:
    """How common a wording is in the precedent set (null in the JSON without a library)."""

    same_type: int
    matching: int
    total: int
    closest: tuple[ClosestProvision, ...] = ()
    #: For inserted or removed words: same-type library provisions that contain them.
    containing: int | None = None
    #: The firm's stance on the matching variant (core.library.index.POSITIONS): house
    #: wording, can live with, last concession, refuse; None when unlabelled.
    position: Stance | None = None


@dataclass(frozen=True, slots=True)
class Pair:
    draft: str | None  # provision id in the draft, or None (removed)
    precedent: str | None  # provision id in the precedent, or None (added)
    status: PairStatus
    similarity: float
    frequency: Frequency | None = None
    #: The engine's word diff of the two provision texts (see the module's invariants).
    edits: tuple[Edit, ...] = ()


@dataclass(frozen=True, slots=True)
class Edit:
    """One hunk of a pair's word diff, as character offsets into the two provision texts,
    in the spirit of difflib's opcodes: ``precedent.text[p1:p2]`` became ``draft.text[d1:d2]``."""

    tag: EditTag
    p1: int
    p2: int
    d1: int
    d2: int
    #: True for a ``replace`` hunk whose two sides compare equal once normalised: a renamed
    #: defined term, a renumbered cross-reference to the same provision, or a change of
    #: letter case, quote or dash style or white space (also between a defined term's use
    #: and the same word written plainly: "You" / "you") -- not a change of words.  A writer
    #: restoring the precedent's words keeps the draft's side of such a hunk.
    restyle: bool = False


@dataclass(frozen=True, slots=True)
class Deviation:
    id: str  # "v1", "v2", ... stable for the same inputs
    rank: int  # 1..N, by descending severity, ties by draft order
    severity: int  # 0..100
    category: Category
    change: ChangeKind
    draft_provision: str | None
    precedent_provision: str | None
    precedent_text: str  # the changed words with a little context, verbatim from the precedent
    draft_text: str  # verbatim from the draft, the draft's own defined terms
    reasons: tuple[str, ...]
    frequency: Frequency | None = None
    #: Character offsets of the changed words (without context) in each provision's text,
    #: given when ``part == "text"``; an empty span ``(k, k)`` marks the insertion point on
    #: the side without words (the precedent's for an insert, the draft's for a delete).
    #: None for a heading or a whole provision.
    precedent_span: tuple[int, int] | None = None
    draft_span: tuple[int, int] | None = None
    #: Which part of the provision the deviation concerns.
    part: DeviationPart = "text"
    #: Character offsets of ``precedent_text`` and ``draft_text`` themselves (the words shown,
    #: context included) in the provision's text (``part == "text"``) or heading (``part ==
    #: "heading"``); None for a whole provision or a review built without them.  The two
    #: spans correspond: the text before them is the same stretch of both provisions, and so
    #: is the text after them, so replacing the draft's span by the precedent's words undoes
    #: exactly this deviation.  Decisions apply to these spans.
    precedent_text_span: tuple[int, int] | None = None
    draft_text_span: tuple[int, int] | None = None
    #: Whose side the change is on, for the party the review acts for
    #: (``Review.acting_for``); "unclear" for a review without one
    #: (see :mod:`core.review.direction`).
    direction: Direction = "unclear"


@dataclass(frozen=True, slots=True)
class Check:
    """One drafting problem (:mod:`core.review.checks`).

    ``text`` is the words concerned, verbatim: ``provision.text[a:b]`` (or
    ``provision.heading[a:b]`` when ``part == "heading"``) with ``span == (a, b)``; None
    span when the check concerns no particular words.  ``term`` names the defined term a
    term check concerns; ``provisions`` lists the other provisions concerned, in document
    order: where an undefined term is also used, the provisions using a changed
    definition's term."""

    kind: CheckKind
    document: CheckDocument
    provision: str | None
    text: str
    message: str
    span: tuple[int, int] | None = None
    part: CheckPart = "text"
    term: str | None = None
    provisions: tuple[str, ...] = field(default=())


@dataclass(frozen=True, slots=True)
class Review:
    draft: Document
    precedent: Document
    term_map: tuple[TermMapping, ...]
    pairs: tuple[Pair, ...]
    deviations: tuple[Deviation, ...]
    #: Human-readable notes, e.g. "the documents share no provision".
    notes: tuple[str, ...] = ()
    #: The precedent's defined term for the party the reviewer acts for ("Supplier"), or
    #: None: then every deviation's direction is "unclear".
    acting_for: str | None = None
    #: The drafting checks of the draft (:mod:`core.review.checks`): undefined terms, unused
    #: definitions, stale names of renamed terms, dangling references, changed definitions.
    checks: tuple[Check, ...] = ()


# --------------------------------------------------------------------------------------
# The reviewer's input: term overrides and decisions.
# --------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class TermOverride:
    """A reviewer's decision: ``confirm`` or ``add`` the mapping draft -> precedent, or
    ``reject`` it (``precedent=None`` rejects every mapping of the draft term)."""

    draft: str
    precedent: str | None = None
    action: OverrideAction = "confirm"

    def __post_init__(self) -> None:
        if self.action not in OVERRIDE_ACTIONS:
            raise CounterdraftError(f"term override: unknown action {self.action!r}")
        if not self.draft.strip():
            raise CounterdraftError("term override: empty draft term")
        if self.action != "reject" and not (self.precedent or "").strip():
            raise CounterdraftError(f"term override: {self.action} needs a precedent term")


@dataclass(frozen=True, slots=True)
class Decision:
    """What the reviewer decided about one deviation (:mod:`core.decisions`).

    ``text`` is the reviewer's own wording (amend only); ``match`` identifies the deviation
    independently of its id (``core.decisions.match_key``), so the decision survives a re-run.
    """

    deviation: str
    action: DecisionAction
    text: str | None = None
    note: str | None = None
    match: Mapping[str, Any] = field(default_factory=dict)
