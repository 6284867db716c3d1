"""The choices the export command offers, in a module that imports nothing, so that the
command line can list them without loading the issues list's writer."""

from __future__ import annotations

__all__ = ["ISSUES_DEFAULT_ORDER", "ISSUE_ORDERS"]

#: Row orders: ``"clause"`` follows the draft (a provision the draft left out sits where it
#: would have been), ``"rank"`` the review's ranking by severity.
ISSUE_ORDERS: tuple[str, ...] = ("clause", "rank")
#: Issues lists are usually read alongside the agreement, clause by clause (common practice,
#: no source); the rank stays visible as each row's number.
ISSUES_DEFAULT_ORDER = "clause"
