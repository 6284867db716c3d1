"""The three outputs of a review: the counter-draft, the comparison redline and the issues list.

* **Counter-draft** (:func:`write_counter_draft`): the counterparty's own .docx with every
  *revert* and *amend* decision written as tracked changes and every note as a comment on the
  changed words.  Nothing else in the file changes (see :mod:`core.docx.tracked`).
* **Comparison redline** (:func:`write_redline`): a new .docx comparing the precedent with
  the draft as tracked changes, after the caution and a short table of the ranked
  substantive deviations.  ``show`` picks the view (:data:`REDLINE_SHOW_CHOICES`):
  ``"substantive"`` (the default, :data:`REDLINE_DEFAULT_SHOW`) is the draft's own text with
  only the substantive deviations tracked -- their changed words, changed headings, added
  and removed provisions -- while renamed defined terms, renumbering, formatting and
  punctuation differences and moves are shown as the draft has them (a moved provision once,
  at the draft's position); a table before the ranked one lists the renamed terms and counts
  what was left unmarked.  ``"all"`` marks every difference word by word, moved provisions
  as ``w:moveFrom``/``w:moveTo`` inside their range markers.  Accepting all changes gives
  the draft's paragraphs in either view; in the ``"all"`` view rejecting all gives the
  precedent's.
* **Issues list** (:func:`write_issues_list`): the table a lawyer circulates -- each
  deviation's number (its rank), the clause, what changed (the precedent's words → the
  draft's, the changed words in bold), why it matters, how common the draft's wording is in
  the precedent set (when a library was used), decision, note -- as a Word table (.docx), a
  self-contained printable page (.html) or a plain CSV table (.csv, with each side's exact
  changed words in columns of their own), by the output's suffix; rows in the draft's clause
  order or by rank (:data:`ISSUE_ORDERS`).  By default it lists the substantive deviations,
  then the renamed defined terms as a short group for information
  (:data:`ISSUES_DEFAULT_INCLUDE`).

Every output but the CSV carries :data:`core.CAUTION` (the command line and the desktop app
show it whenever they write one) and is written atomically; an output path equal
to one of the inputs is refused.  Where the caution goes in the counter-draft is explained
at :data:`CAUTION_PROPERTY`.

Cost: the counter-draft is linear in the draft's XML; the redline is one
``difflib.SequenceMatcher`` over the paragraph keys (O(B^2) worst case for B paragraphs, near
linear for similar documents) plus, per matched paragraph pair, its share of the review's word
diff (``Pair.edits``) in the full view, or the substantive deviations' spans in the
substantive view (the outputs never diff the texts again); the issues list is linear in
the deviations times the length of their provisions' texts (each quote scans its
provision's sentences once).  ``benchmarks/bench_export.py`` measures them.

The package has one module per output (:mod:`.counter_draft`, :mod:`.redline`,
:mod:`.issues`) and the helpers they share (:mod:`.common`).
"""

from __future__ import annotations

import importlib
from typing import Any

#: Where each public name lives.  The package loads a module only when one of its names is
#: first used (PEP 562 module ``__getattr__``), so a command that needs one output -- or
#: only the issues list's constants -- does not import the engine behind the others.
_HOME = {
    "CAUTION_PROPERTY": "common",
    "CHANGE_CONTEXT_WORDS": "issues",
    "CHANGE_MAX_WORDS": "issues",
    "CounterDraftPlan": "counter_draft",
    "Excerpt": "issues",
    "ISSUES_DEFAULT_INCLUDE": "issues",
    "ISSUES_DEFAULT_ORDER": "options",
    "ISSUE_COLUMNS": "issues",
    "ISSUE_CSV_COLUMNS": "issues",
    "ISSUE_ORDERS": "options",
    "ISSUE_WIDTHS_CM": "issues",
    "IssueRow": "issues",
    "REDLINE_BODY_HEADING": "redline",
    "REDLINE_BODY_HEADINGS": "redline",
    "REDLINE_DEFAULT_SHOW": "redline",
    "REDLINE_END": "redline",
    "REDLINE_SHOW_CHOICES": "redline",
    "REDLINE_TABLE_WIDTHS_CM": "redline",
    "REDLINE_TERMS_WIDTHS_CM": "redline",
    "RedlineShow": "redline",
    "block_owners": "common",
    "clause_order": "issues",
    "counter_draft_bytes": "counter_draft",
    "default_author": "common",
    "issue_rows": "issues",
    "issues_list_csv": "issues",
    "issues_list_docx": "issues",
    "issues_list_html": "issues",
    "plan_counter_draft": "counter_draft",
    "provision_blocks": "common",
    "redline_body": "redline",
    "redline_bytes": "redline",
    "write_counter_draft": "counter_draft",
    "write_issues_list": "issues",
    "write_redline": "redline",
}

__all__ = [
    "CAUTION_PROPERTY",
    "CHANGE_CONTEXT_WORDS",
    "CHANGE_MAX_WORDS",
    "ISSUES_DEFAULT_INCLUDE",
    "ISSUES_DEFAULT_ORDER",
    "ISSUE_COLUMNS",
    "ISSUE_CSV_COLUMNS",
    "ISSUE_ORDERS",
    "ISSUE_WIDTHS_CM",
    "REDLINE_BODY_HEADING",
    "REDLINE_BODY_HEADINGS",
    "REDLINE_DEFAULT_SHOW",
    "REDLINE_END",
    "REDLINE_SHOW_CHOICES",
    "REDLINE_TABLE_WIDTHS_CM",
    "REDLINE_TERMS_WIDTHS_CM",
    "RedlineShow",
    "CounterDraftPlan",
    "Excerpt",
    "IssueRow",
    "block_owners",
    "clause_order",
    "counter_draft_bytes",
    "default_author",
    "issue_rows",
    "issues_list_csv",
    "issues_list_docx",
    "issues_list_html",
    "plan_counter_draft",
    "provision_blocks",
    "redline_body",
    "redline_bytes",
    "write_counter_draft",
    "write_issues_list",
    "write_redline",
]


def __getattr__(name: str) -> Any:
    home = _HOME.get(name)
    if home is None:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    value = getattr(importlib.import_module(f"{__name__}.{home}"), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(__all__)
