"""The reviewer's decisions and the review file.

For each deviation the reviewer records **accept** (keep the draft's words), **revert**
(restore the precedent's words) or **amend** (own words), with an optional note.  The review
file (``counterdraft.review-file/1``, JSON, written atomically) holds both documents' paths and
SHA-256 content hashes, the term-map overrides, the deviations and the decisions.

Reopening a review file re-reads both documents and re-runs the review (the review is
deterministic, so unchanged inputs give the same deviations).  When a document's hash
differs from the saved one the result says so, and every decision is matched again against
the new deviations -- by the provision pair (numbers and headings, then ids) and the changed
words, never by deviation id alone, since ids are renumbered when the documents change.  A
decision whose words no longer appear is dropped with a note.

Review file layout::

    {"schema": "counterdraft.review-file/1",
     "draft":     {"path": "draft.docx", "absolute_path": "/...", "sha256": "..."},
     "precedent": {"path": "precedent.docx", "absolute_path": "/...", "sha256": "..."},
     "library": {"path": "precedent_set", "absolute_path": "/..."} | null,
     "acting_for": "Supplier" | null,   (absent in files written before it existed)
     "overrides": [{"draft": "Client", "precedent": "Customer", "action": "confirm"}],
     "term_map":  [...as in counterdraft.review/1...],
     "deviations": [...as in counterdraft.review/1...],
     "checks":    [...as in counterdraft.review/1 (recomputed on reopening)...],
     "decisions": [{"deviation": "v3", "action": "revert", "text": null, "note": "...",
                    "match": {"change": "replace", "category": "substantive",
                              "draft_provision": "p12", "precedent_provision": "p10",
                              "draft_clause": "9.1 Notice", "precedent_clause": "14.1 Notice",
                              "draft_text": "...", "precedent_text": "..."}}]}

``path`` is relative to the review file's folder when the document lies below it (so a
folder can be moved as a whole), else absolute; ``absolute_path`` is the fallback.

Cost: loading costs one review run (see :mod:`core.review`); matching decisions is
O(decisions x deviations).
"""

from __future__ import annotations

import dataclasses
import json
import os
import unicodedata
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any, Protocol

from .errors import CounterdraftError
from .fileio import atomic_write_text, exclusive, file_sha256
from .labels import clause_label, find_provision  # clause_label: re-exported for the CLI
from .model import DECISION_ACTIONS, Decision, DecisionAction, Deviation, Document, Review
from .serialize import decision_from_dict, decision_to_dict, override_from_dict, override_to_dict, schema_problem

if TYPE_CHECKING:
    from .model import TermOverride

__all__ = [
    "ACCEPT_ONLY",
    "ACTIONS",
    "AMEND_MAX_CHARS",
    "REVIEW_FILE_SCHEMA",
    "Decision",
    "DocumentRef",
    "ReviewFile",
    "clause_label",
    "decide",
    "decision_for",
    "is_renamed_term",
    "load_review_file",
    "check_amend_text",
    "match_key",
    "new_review_file",
    "read_library_folder",
    "remap_decisions",
    "review_file_to_dict",
    "save_review_file",
    "save_review_file_merged",
    "update_review_file",
]

REVIEW_FILE_SCHEMA = "counterdraft.review-file/1"
ACTIONS: tuple[DecisionAction, ...] = DECISION_ACTIONS
#: Deviation categories that can only be accepted: the counter-draft keeps the draft's own
#: punctuation, layout and numbering (restoring them is not a negotiating point, and the
#: numbering follows from the provisions kept -- common practice, no source).
ACCEPT_ONLY: tuple[str, ...] = ("formatting", "punctuation", "numbering")
#: Longest amend wording taken, in characters: a rewritten clause of several pages fits; a
#: longer text is almost certainly a paste gone wrong.
AMEND_MAX_CHARS = 100_000


@dataclass(frozen=True, slots=True)
class DocumentRef:
    path: str  # absolute path of the document
    sha256: str


@dataclass(frozen=True, slots=True)
class ReviewFile:
    """A review in progress: the inputs, the review result and the decisions."""

    draft: DocumentRef
    precedent: DocumentRef
    review: Review
    decisions: tuple[Decision, ...] = ()
    #: Term-map overrides passed to the review engine (its ``TermOverride`` objects).
    overrides: tuple[TermOverride, ...] = ()
    #: What happened when the file was reopened: changed documents, dropped decisions.
    notes: tuple[str, ...] = ()
    #: Folder of the precedent set the review used (absolute), or the address of its shared
    #: store (never with a password), or None.
    library: str | None = None


# --------------------------------------------------------------------------------------
# Deviations and the match key (clause labels: core.labels)
# --------------------------------------------------------------------------------------


def match_key(review: Review, deviation: Deviation) -> dict[str, Any]:
    """What identifies a deviation across re-runs: its kind, its provision pair and the
    changed words."""
    def clause(doc: Document, pid: str | None) -> str | None:
        # The key keeps its own simple form (number, heading or term): saved review files
        # match decisions by it, so it must not change when the display label does.
        prov = find_provision(doc, pid)
        if prov is None:
            return None
        return " ".join(x for x in (prov.number, prov.heading or prov.term) if x) or None

    return {
        "change": deviation.change,
        "category": deviation.category,
        "draft_provision": deviation.draft_provision,
        "precedent_provision": deviation.precedent_provision,
        "draft_clause": clause(review.draft, deviation.draft_provision),
        "precedent_clause": clause(review.precedent, deviation.precedent_provision),
        "draft_text": deviation.draft_text,
        "precedent_text": deviation.precedent_text,
    }


def _find_deviation(review: Review, deviation_id: str) -> Deviation:
    for d in review.deviations:
        if d.id == deviation_id:
            return d
    known = ", ".join(d.id for d in review.deviations[:8])
    more = ", ..." if len(review.deviations) > 8 else ""
    raise CounterdraftError(f"no deviation {deviation_id!r} in this review (known: {known}{more})")


def decision_for(decisions: Sequence[Decision], deviation_id: str) -> Decision | None:
    for d in decisions:
        if d.deviation == deviation_id:
            return d
    return None


def _bad_character(text: str) -> str | None:
    """The first character *text* may not hold, as ``U+XXXX``: a control character other
    than tab and line break, or one that XML 1.0 cannot carry (ECMA-376 parts are XML 1.0,
    §2.2 Characters: no C0 control but tab, line feed, carriage return; no surrogates, no
    U+FFFE or U+FFFF)."""
    for ch in text:
        code = ord(ch)
        if ch in "\t\n":
            continue
        if unicodedata.category(ch) == "Cc" or 0xD800 <= code <= 0xDFFF or code in (0xFFFE, 0xFFFF):
            return f"U+{code:04X}"
    return None


def check_amend_text(text: str, *, paragraphs: bool = False) -> str:
    """The reviewer's amend wording, checked: no control characters, at most
    :data:`AMEND_MAX_CHARS` characters, and one paragraph unless *paragraphs* says that line
    breaks start new paragraphs on purpose.  Windows line ends become ``"\\n"``.  Raises
    :class:`CounterdraftError` with one line saying what is wrong."""
    text = text.replace("\r\n", "\n")
    bad = _bad_character(text)
    if bad is not None:
        raise CounterdraftError(f"the new wording holds a control character ({bad}); type it again "
                                "without it")
    if len(text) > AMEND_MAX_CHARS:
        raise CounterdraftError(f"the new wording is {len(text):,} characters long; at most "
                                f"{AMEND_MAX_CHARS:,} are taken")
    if "\n" in text.strip("\n") and not paragraphs:
        raise CounterdraftError("the new wording holds a line break; an amendment is one paragraph "
                                "unless you ask for several (--paragraphs)")
    return text.strip("\n")


def is_renamed_term(dev: Deviation) -> bool:
    """Whether *dev* reports a renamed defined term: category ``term``, or a rename that the
    review's figures guard made substantive because a figure of the name changed ("Schedule
    1 Services" -> "Schedule 2 Services"): a whole-provision ``replace`` that is no
    renumbering.  Either way it is accepted, never written back as tracked changes."""
    return dev.category == "term" or (dev.part == "provision" and dev.change == "replace"
                                      and dev.category == "substantive")


def _refuse(dev: Deviation, action: str, who: str) -> None:
    """Refuse what cannot be written as a tracked change, in one line naming the deviation."""
    if action == "accept":
        return
    if dev.change == "move":
        raise CounterdraftError(
            f"{who} is a moved provision; moving it back is not written as a tracked change -- "
            "accept it, or amend the provision's words")
    if is_renamed_term(dev):
        raise CounterdraftError(
            f"{who} is a renamed defined term; renaming it back everywhere is not written as "
            "tracked changes -- accept it (the counter-draft keeps the draft's names)")
    if dev.category in ACCEPT_ONLY:
        raise CounterdraftError(
            f"{who} is a {dev.category} difference: it can be accepted, not reverted or amended "
            "(the counter-draft keeps the draft's own)")


def decide(rf: ReviewFile, deviation_id: str, action: str, *, text: str | None = None,
           note: str | None = None, paragraphs: bool = False) -> ReviewFile:
    """*rf* with the decision on *deviation_id* recorded (replacing an earlier one).  Amend
    wording is checked (:func:`check_amend_text`; *paragraphs* allows line breaks that start
    new paragraphs)."""
    if action not in ACTIONS:
        raise CounterdraftError(f"unknown decision {action!r}; use one of {', '.join(ACTIONS)}")
    dev = _find_deviation(rf.review, deviation_id)
    if action == "amend":
        if text is None:
            raise CounterdraftError("amend needs the new wording (--text)")
        text = check_amend_text(text, paragraphs=paragraphs)
    elif text is not None:
        raise CounterdraftError(f"--text goes with amend, not with {action}")
    where = clause_label(rf.review, dev)
    _refuse(dev, action, f"deviation {dev.rank}" + (f" ({where})" if where else ""))
    if note is not None:
        bad = _bad_character(note)
        if bad is not None:
            raise CounterdraftError(f"the note holds a control character ({bad}); type it again without it")
    if note is not None and not note.strip():
        note = None
    new = Decision(deviation=deviation_id, action=action, text=text, note=note,
                   match=match_key(rf.review, dev))
    kept = tuple(d for d in rf.decisions if d.deviation != deviation_id)
    order = {d.id: i for i, d in enumerate(rf.review.deviations)}
    decisions = tuple(sorted(kept + (new,), key=lambda d: order.get(d.deviation, len(order))))
    return dataclasses.replace(rf, decisions=decisions)


# --------------------------------------------------------------------------------------
# Matching decisions to the deviations of a re-run
# --------------------------------------------------------------------------------------

#: Points a candidate deviation earns for each agreeing part of the match key.  The changed
#: words and the kind of change must agree (required); then the provision pair breaks ties,
#: clause numbers and headings first (they survive an insertion elsewhere that shifts
#: provision ids), ids last.
_SAME_CLAUSE_POINTS = 4
_SAME_ID_POINTS = 1


def remap_decisions(decisions: Sequence[Decision], review: Review) -> tuple[tuple[Decision, ...], list[str]]:
    """The *decisions* that still apply to *review* (a re-run), with their new deviation ids,
    and notes on those that moved to another id or no longer apply."""
    kept: list[Decision] = []
    notes: list[str] = []
    taken: set[str] = set()
    keys = {d.id: match_key(review, d) for d in review.deviations}
    for dec in decisions:
        old = dec.match
        best: tuple[int, str] | None = None
        for dev in review.deviations:
            if dev.id in taken:
                continue
            new = keys[dev.id]
            if not old:
                score = 0 if dev.id == dec.deviation else -1
            elif (new["change"], new["draft_text"], new["precedent_text"]) != (
                    old.get("change"), old.get("draft_text"), old.get("precedent_text")):
                continue
            else:
                score = 0
                for side in ("draft", "precedent"):
                    if new[f"{side}_clause"] == old.get(f"{side}_clause"):
                        score += _SAME_CLAUSE_POINTS
                    if new[f"{side}_provision"] == old.get(f"{side}_provision"):
                        score += _SAME_ID_POINTS
            if score < 0:
                continue
            if best is None or score > best[0]:
                best = (score, dev.id)
        where = old.get("draft_clause") or old.get("precedent_clause") or dec.deviation
        if best is None:
            notes.append(f"decision '{dec.action}' on {where} no longer applies: "
                         "those words changed; decide again")
            continue
        taken.add(best[1])
        dev = next(d for d in review.deviations if d.id == best[1])
        kept.append(dataclasses.replace(dec, deviation=dev.id, match=keys[dev.id]))
        if dev.id != dec.deviation:
            notes.append(f"decision '{dec.action}' on {where} now applies to deviation {dev.rank}")
    return tuple(kept), notes


# --------------------------------------------------------------------------------------
# Reading and writing the file
# --------------------------------------------------------------------------------------


def _library_entry(library: str | None, folder: Path) -> dict[str, str] | None:
    """The review file's record of the precedent set: its folder (relative where possible),
    or a shared store's address as it is (:func:`~core.library.store.shown_address`)."""
    from .library.store import is_server_address, shown_address

    if not library:
        return None
    if is_server_address(library):
        shown = shown_address(library)
        return {"path": shown, "absolute_path": shown}
    return {"path": _stored_path(library, folder), "absolute_path": library}


def _stored_path(doc_path: str, folder: Path) -> str:
    p = Path(doc_path).resolve()
    try:
        return p.relative_to(folder.resolve()).as_posix()
    except ValueError:
        return str(p)


def review_file_to_dict(rf: ReviewFile, *, folder: str | os.PathLike[str] = ".") -> dict[str, Any]:
    """The ``counterdraft.review-file/1`` object; paths relative to *folder* where possible."""
    from .review import review_to_dict

    base = Path(folder)
    rd = review_to_dict(rf.review)
    return {
        "schema": REVIEW_FILE_SCHEMA,
        "draft": {"path": _stored_path(rf.draft.path, base), "absolute_path": rf.draft.path,
                  "sha256": rf.draft.sha256},
        "precedent": {"path": _stored_path(rf.precedent.path, base),
                      "absolute_path": rf.precedent.path, "sha256": rf.precedent.sha256},
        "library": _library_entry(rf.library, base),
        "acting_for": rf.review.acting_for,
        "overrides": [override_to_dict(o) for o in rf.overrides],
        "term_map": rd.get("term_map", []),
        "deviations": rd.get("deviations", []),
        "checks": rd.get("checks", []),
        "decisions": [decision_to_dict(d) for d in rf.decisions],
    }


def save_review_file(path: str | os.PathLike[str], rf: ReviewFile) -> None:
    """Write *rf* to *path* atomically (never over one of the reviewed documents)."""
    from .fileio import refuse_overwrite_of_inputs

    refuse_overwrite_of_inputs(path, rf.draft.path, rf.precedent.path)
    folder = Path(path).resolve().parent
    text = json.dumps(review_file_to_dict(rf, folder=folder), ensure_ascii=False, indent=2) + "\n"
    atomic_write_text(path, text)


class Runner(Protocol):
    """Runs the review of a review file's two documents (:func:`core.session.review` with
    the options of the client: progress, cancelling, a precedent set)."""

    def __call__(self, draft: Document, precedent: Document, *, overrides: Sequence[TermOverride] = (),
                 acting_for: str | None = None) -> Review: ...


def _default_runner(draft: Document, precedent: Document, *, overrides: Sequence[TermOverride],
                    acting_for: str | None = None) -> Review:
    from .session import review

    return review(draft, precedent, overrides=overrides, acting_for=acting_for)


def _read_documents(draft_path: str, precedent_path: str, *, library: str | None = None
                    ) -> tuple[Document, Document]:
    """Both documents, read as :func:`core.session.read_documents` reads them (a PDF draft
    with the precedent set's line model when the review used a set)."""
    from .session import read_documents

    docs = read_documents(draft_path, precedent_path, library=library)
    return docs.draft, docs.precedent


def new_review_file(draft_path: str | os.PathLike[str], precedent_path: str | os.PathLike[str], *,
                    overrides: Sequence[TermOverride] = (), review: Review | None = None,
                    runner: Runner | None = None,
                    library: str | os.PathLike[str] | None = None,
                    acting_for: str | None = None) -> ReviewFile:
    """Start a review file for two documents (running the review unless *review* is given,
    acting for *acting_for* when given; a given review carries its own).  *library* records
    the precedent-set folder (or shared store) the review used."""
    dpath, ppath = str(Path(draft_path).resolve()), str(Path(precedent_path).resolve())
    for p in (dpath, ppath):
        if not Path(p).is_file():
            raise CounterdraftError("file not found", path=p)
    if review is None:
        draft, precedent = _read_documents(dpath, ppath, library=str(library) if library else None)
        review = (runner or _default_runner)(draft, precedent, overrides=tuple(overrides),
                                             acting_for=acting_for or None)
    return ReviewFile(draft=DocumentRef(dpath, file_sha256(dpath)),
                      precedent=DocumentRef(ppath, file_sha256(ppath)),
                      review=review, overrides=tuple(overrides),
                      library=_library_reference(library))


def _library_reference(library: str | os.PathLike[str] | None) -> str | None:
    from .library.store import is_server_address, shown_address

    if not library:
        return None
    return shown_address(str(library)) if is_server_address(library) else str(Path(library).resolve())


def _locate(entry: Mapping[str, Any], folder: Path, *, role: str, review_path: str) -> str:
    rel = entry.get("path")
    absolute = entry.get("absolute_path")
    candidates = []
    if isinstance(rel, str) and rel:
        candidates.append(folder / rel if not Path(rel).is_absolute() else Path(rel))
    if isinstance(absolute, str) and absolute:
        candidates.append(Path(absolute))
    for c in candidates:
        if c.is_file():
            return str(c.resolve())
    shown = rel or absolute or "?"
    raise CounterdraftError(f"the {role} document {shown} named in the review file is missing",
                            path=review_path)


def _check_schema(data: Any, spath: str) -> None:
    """Refuse, in one line naming the field and the problem, anything that is not a valid
    ``counterdraft.review-file/1`` object (resources/schemas/review-file.schema.json); a
    file of a later schema version is refused as written by a newer Counterdraft."""
    found = data.get("schema") if isinstance(data, dict) else None
    if isinstance(found, str) and found.startswith("counterdraft.review-file/") and found != REVIEW_FILE_SCHEMA:
        raise CounterdraftError(f"written by another version of Counterdraft (schema {found}); this "
                                f"version reads {REVIEW_FILE_SCHEMA}", path=spath)
    if found != REVIEW_FILE_SCHEMA:
        raise CounterdraftError(f"not a {REVIEW_FILE_SCHEMA} file"
                                + (f" (schema {str(found)[:40]!r})" if found else ""), path=spath)
    problem = schema_problem(data, "review-file")
    if problem is not None:
        raise CounterdraftError(f"damaged review file ({problem})", path=spath)


def _parsed_decisions(data: Mapping[str, Any], spath: str) -> tuple[tuple[Decision, ...], tuple[TermOverride, ...]]:
    """The decisions and term overrides of a review file *data* that passed the schema check;
    wording that is not plain text (control characters, which no .docx can carry) and
    overrides the engine cannot take are refused in one line."""
    decisions = tuple(decision_from_dict(d) for d in data["decisions"])
    for d in decisions:
        for field_name, value in (("text", d.text), ("note", d.note)):
            if value is not None and _bad_character(value):
                raise CounterdraftError(f"damaged review file (the {field_name} of the decision on "
                                        f"{d.deviation} is not plain text)", path=spath)
    try:
        overrides = tuple(override_from_dict(o) for o in data["overrides"])
    except (KeyError, TypeError, AttributeError, ValueError, CounterdraftError) as err:
        raise CounterdraftError(f"damaged review file (term overrides: {err})", path=spath) from None
    return decisions, overrides


def update_review_file(path: str | os.PathLike[str], change: Callable[[ReviewFile], ReviewFile], *,
                       runner: Runner | None = None) -> ReviewFile:
    """Reopen the review file at *path*, apply *change* and save it, all under an exclusive
    lock (:func:`core.fileio.exclusive`): two people recording decisions at the same moment
    both land, one after the other.  Returns the saved review."""
    with exclusive(path):
        rf = change(load_review_file(path, runner=runner))
        save_review_file(path, rf)
    return rf


def save_review_file_merged(path: str | os.PathLike[str], rf: ReviewFile, *,
                            base: Sequence[Decision]) -> ReviewFile:
    """Save *rf* over the review file at *path* without losing what someone else recorded
    there meanwhile.  *base* is the decisions as this session last read or saved them.
    Under the exclusive lock the file's current decisions are read (matched to *rf*'s
    deviations by their words, as on reopening) and merged deviation by deviation: a
    decision this session changed or cleared since *base* wins; every other one is the
    file's.  Returns what was saved."""
    with exclusive(path):
        theirs: tuple[Decision, ...] = ()
        if Path(path).exists():
            data = _read_json(str(path))
            _check_schema(data, str(path))
            theirs, _ = remap_decisions(_parsed_decisions(data, str(path))[0], rf.review)
        merged = _merged(base, rf.decisions, theirs)
        order = {d.id: i for i, d in enumerate(rf.review.deviations)}
        rf = dataclasses.replace(rf, decisions=tuple(sorted(merged, key=lambda d: order.get(d.deviation, 0))))
        save_review_file(path, rf)
    return rf


def _merged(base: Sequence[Decision], mine: Sequence[Decision], theirs: Sequence[Decision]) -> list[Decision]:
    def by_id(ds: Sequence[Decision]) -> dict[str, Decision]:
        return {d.deviation: d for d in ds}

    b, m, t = by_id(base), by_id(mine), by_id(theirs)
    out = []
    for key in dict.fromkeys([*t, *m, *b]):
        changed_here = _decision_view(m.get(key)) != _decision_view(b.get(key))
        chosen = m.get(key) if changed_here else t.get(key)
        if chosen is not None:
            out.append(chosen)
    return out


def _decision_view(d: Decision | None) -> tuple[str, str | None, str | None] | None:
    return None if d is None else (d.action, d.text, d.note)


def _read_json(spath: str) -> Any:
    try:
        raw = Path(spath).read_text(encoding="utf-8")
    except FileNotFoundError:
        raise CounterdraftError("review file not found", path=spath) from None
    except (OSError, UnicodeDecodeError) as err:
        raise CounterdraftError(f"cannot read the review file ({err})", path=spath) from None
    try:
        return json.loads(raw)
    except (json.JSONDecodeError, RecursionError) as err:
        where = f" at line {err.lineno}" if isinstance(err, json.JSONDecodeError) else ""
        raise CounterdraftError(f"not a review file (invalid JSON{where})", path=spath) from None


def read_library_folder(path: str | os.PathLike[str]) -> str | None:
    """The precedent-set folder a review file records (None if none), without re-running
    anything -- so a caller can open the library and pass a matching *runner*."""
    try:
        data = json.loads(Path(path).read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, json.JSONDecodeError):
        return None
    entry = data.get("library") if isinstance(data, dict) else None
    if not isinstance(entry, dict):
        return None
    from .library.store import is_server_address

    address = entry.get("absolute_path")
    if isinstance(address, str) and is_server_address(address):
        return address
    folder = Path(path).resolve().parent
    for cand in (entry.get("path"), entry.get("absolute_path")):
        if isinstance(cand, str) and cand:
            p = Path(cand) if Path(cand).is_absolute() else folder / cand
            if p.is_dir():
                return str(p.resolve())
    return entry.get("absolute_path") if isinstance(entry.get("absolute_path"), str) else None


def load_review_file(path: str | os.PathLike[str], *, runner: Runner | None = None) -> ReviewFile:
    """Reopen a review file: re-read both documents, re-run the review (with *runner*, by
    default :func:`core.review.run_review` with the stored overrides) and keep the decisions
    that still apply.  ``notes`` says what changed."""
    spath = str(path)
    data = _read_json(spath)
    _check_schema(data, spath)
    folder = Path(spath).resolve().parent
    refs = {role: data[role] for role in ("draft", "precedent")}
    decisions, overrides = _parsed_decisions(data, spath)
    dpath = _locate(refs["draft"], folder, role="draft", review_path=spath)
    ppath = _locate(refs["precedent"], folder, role="precedent", review_path=spath)
    notes: list[str] = []
    hashes = {}
    for role, p in (("draft", dpath), ("precedent", ppath)):
        hashes[role] = file_sha256(p)
        if hashes[role] != refs[role].get("sha256"):
            notes.append(f"the {role} {Path(p).name} changed since the review was saved; "
                         "the review was run again")
    draft, precedent = _read_documents(dpath, ppath, library=read_library_folder(spath))
    acting_for = data.get("acting_for")  # absent from files written before it existed
    review = (runner or _default_runner)(draft, precedent, overrides=overrides,
                                         acting_for=acting_for if isinstance(acting_for, str) and acting_for else None)
    kept, remap_notes = remap_decisions(decisions, review)
    notes.extend(remap_notes)
    return ReviewFile(draft=DocumentRef(dpath, hashes["draft"]),
                      precedent=DocumentRef(ppath, hashes["precedent"]),
                      review=review, decisions=kept, overrides=overrides, notes=tuple(notes),
                      library=read_library_folder(spath))
