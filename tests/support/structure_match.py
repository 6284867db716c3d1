"""How much of a document's structure another reading recovers: provision by provision.

A provision is its number label, heading, level and words (white space collapsed, a soft
hyphen dropped, the non-breaking and Unicode hyphens read as "-": what a printed page cannot
tell apart).  The two readings' provision sequences are lined up with the standard library's
``difflib.SequenceMatcher`` (the outside reference algorithm); a provision counts as
recovered when it is in a matching block, so a wrong boundary costs the provisions on both
sides of it, a wrong label, heading or level the provision itself.  The share is matched
provisions over the longer of the two sequences.
"""

from __future__ import annotations

import difflib
from dataclasses import dataclass

from core.model import Document, Provision

__all__ = ["Match", "match_provisions", "provision_key"]


def _norm(text: str) -> str:
    return " ".join(text.replace("\u00ad", "").replace("\u2011", "-").replace("\u2010", "-").split())


def provision_key(p: Provision) -> tuple[str | None, str, int, str]:
    return (p.number, _norm(p.heading or ""), p.level, _norm(p.text))


@dataclass(frozen=True)
class Match:
    matched: int
    reference: int
    recovered: int
    #: The provisions of the reference that were not recovered, as keys (for messages).
    missed: tuple[tuple, ...] = ()

    @property
    def total(self) -> int:
        return max(self.reference, self.recovered)

    @property
    def share(self) -> float:
        return self.matched / self.total if self.total else 1.0


def match_provisions(reference: Document, recovered: Document) -> Match:
    a = [provision_key(p) for p in reference.provisions]
    b = [provision_key(p) for p in recovered.provisions]
    sm = difflib.SequenceMatcher(None, a, b, autojunk=False)
    blocks = sm.get_matching_blocks()
    matched = sum(m.size for m in blocks)
    hit = {m.a + k for m in blocks for k in range(m.size)}
    missed = tuple(a[i] for i in range(len(a)) if i not in hit)
    return Match(matched, len(a), len(b), missed)
