"""Measure: false substantive deviations on successive versions of real licences.

    python benchmarks/measure_false_deviations.py [--details] [--json OUT.json]

Inputs (outside the project): the licence texts of the PyPI package ``licensedcode-data``
(``licensedcode/data/licenses/<key>.LICENSE``), read with ``core.readers.read_text``.  Each
pair is an older version (the precedent) and the next version (the draft) of one family;
only the families of :data:`FAMILIES` are measured here, the others of the package are kept
for an independent check.

A substantive deviation is *false* when its two sides have the same words once case, quote
style, white space and renamed terms are normalised.  The rename normaliser is independent
of the engine (no alignment, no term map): a changed run of at most
:data:`MAX_RENAME_WORDS` words ``x -> y`` (difflib's word opcodes on the two sides of the
deviation) is a renamed term when ``x`` is a phrase of the precedent that has (nearly)
left the draft and ``y`` a phrase of the draft that the precedent (nearly) lacks:
each is used on its "new" side at most :data:`LEFTOVER_SHARE` times as often as on its own
side.  Words are compared, so punctuation alone never makes a deviation real.

A phrase with a figure (dates, version numbers) or a function word ("the", "may", "by":
:data:`NOT_IN_NAMES`) is never a name here, and each phrase must be used at least
:data:`MIN_RENAME_USES` times on its own side.

Prints one line per pair (substantive deviations, the false ones, of which case/quotes/space
only, term mappings) and the totals; ``--details`` lists every false deviation.  ``--code
DIR`` measures the engine of another checkout (e.g. the commit before a change, unpacked
with ``git archive``), so that before and after are measured by the same yardstick.
"""

from __future__ import annotations

import argparse
import difflib
import json
import re
import sys
from collections import Counter
from collections.abc import Sequence
from functools import cache
from pathlib import Path
from typing import Any

#: Version sequences, oldest first (the generic texts only: no national ports).
FAMILIES: dict[str, tuple[str, ...]] = {
    "cc-by": ("cc-by-1.0", "cc-by-2.0", "cc-by-2.5", "cc-by-3.0", "cc-by-4.0"),
    "cc-by-sa": ("cc-by-sa-1.0", "cc-by-sa-2.0", "cc-by-sa-2.5", "cc-by-sa-3.0", "cc-by-sa-4.0"),
    "cc-by-nc": ("cc-by-nc-1.0", "cc-by-nc-2.0", "cc-by-nc-2.5", "cc-by-nc-3.0", "cc-by-nc-4.0"),
    "cc-by-nd": ("cc-by-nd-1.0", "cc-by-nd-2.0", "cc-by-nd-2.5", "cc-by-nd-3.0", "cc-by-nd-4.0"),
    "cc-by-nc-sa": ("cc-by-nc-sa-1.0", "cc-by-nc-sa-2.0", "cc-by-nc-sa-2.5", "cc-by-nc-sa-3.0",
                    "cc-by-nc-sa-4.0"),
    "cc-by-nc-nd": ("cc-by-nc-nd-1.0", "cc-by-nc-nd-2.0", "cc-by-nc-nd-2.5", "cc-by-nc-nd-3.0",
                    "cc-by-nc-nd-4.0"),
    "eclipse-sua": ("eclipse-sua-2001", "eclipse-sua-2002", "eclipse-sua-2003", "eclipse-sua-2004",
                    "eclipse-sua-2005", "eclipse-sua-2010", "eclipse-sua-2011", "eclipse-sua-2014",
                    "eclipse-sua-2014-11", "eclipse-sua-2017"),
    "google-tos": ("google-tos-2013", "google-tos-2014", "google-tos-2017", "google-tos-2019",
                   "google-tos-2020"),
    "hippocratic": ("hippocratic-1.0", "hippocratic-1.1", "hippocratic-1.2", "hippocratic-2.0",
                    "hippocratic-2.1", "hippocratic-3.0"),
    "gfdl": ("gfdl-1.1", "gfdl-1.2", "gfdl-1.3"),
    "gpl": ("gpl-1.0", "gpl-2.0", "gpl-3.0"),
    "lgpl": ("lgpl-2.0", "lgpl-2.1", "lgpl-3.0"),
    "agpl": ("agpl-1.0", "agpl-2.0", "agpl-3.0"),
    "tanuki-community-sla": ("tanuki-community-sla-1.0", "tanuki-community-sla-1.1",
                             "tanuki-community-sla-1.2", "tanuki-community-sla-1.3"),
    "zpl": ("zpl-1.0", "zpl-1.1", "zpl-2.0", "zpl-2.1"),
    "openldap": ("openldap-1.1", "openldap-1.2", "openldap-1.3", "openldap-1.4", "openldap-2.0",
                 "openldap-2.0.1", "openldap-2.1", "openldap-2.2", "openldap-2.2.1",
                 "openldap-2.2.2", "openldap-2.3", "openldap-2.4", "openldap-2.5", "openldap-2.6",
                 "openldap-2.7", "openldap-2.8"),
    "apache": ("apache-1.0", "apache-1.1", "apache-2.0"),
    "artistic": ("artistic-1.0", "artistic-2.0"),
    "psf": ("psf-2.0", "psf-3.7.2"),
}

#: Longest changed run (words, each side) the normaliser may read as a renamed term: the
#: longest names of these licences ("Adapted Material", "Licensed Rights") have two or three.
MAX_RENAME_WORDS = 4
#: A renamed phrase may stay on its old side this share of its uses on its new side (stale
#: uses a drafter forgot): at most one in four.
LEFTOVER_SHARE = 0.25

#: Words that never stand in a renamed name (common practice, no source): articles, modal
#: verbs and the like make a phrase a piece of a sentence ("may modify", "the copyright
#: holders"), whose replacement is a change of wording.
NOT_IN_NAMES = frozenset("a an the this that these by to may shall will must not no".split())
#: Uses a phrase needs on its own side to be read as a renamed name: a word met once and
#: replaced once is an edit, not a rename.
MIN_RENAME_USES = 2

_QUOTES = str.maketrans({"\u2018": "'", "\u2019": "'", "\u201c": '"', "\u201d": '"', "`": "'"})
_WORD_RE = re.compile(r"\w+")


def words(text: str) -> list[str]:
    """Case-folded words of *text* (quotes folded, punctuation and white space dropped)."""
    return _WORD_RE.findall(text.translate(_QUOTES).casefold())


class PhraseCounts:
    """Occurrences of word phrases in one document (case-folded words, counted lazily)."""

    def __init__(self, text: str) -> None:
        self.words = words(text)
        self.joined = " " + " ".join(self.words) + " "

    @cache  # noqa: B019  (two instances per pair, freed with the pair)
    def count(self, phrase: tuple[str, ...]) -> int:
        return self.joined.count(" " + " ".join(phrase) + " ")


def is_rename(x: Sequence[str], y: Sequence[str], prec: PhraseCounts, draft: PhraseCounts) -> bool:
    if not x or not y or len(x) > MAX_RENAME_WORDS or len(y) > MAX_RENAME_WORDS:
        return False
    if any(w[:1].isdigit() or w in NOT_IN_NAMES for w in (*x, *y)):
        return False  # dates, versions and figures, pieces of sentences
    xp, xd = prec.count(tuple(x)), draft.count(tuple(x))
    yp, yd = prec.count(tuple(y)), draft.count(tuple(y))
    return (min(xp, yd) >= MIN_RENAME_USES and xd <= LEFTOVER_SHARE * xp
            and yp <= LEFTOVER_SHARE * yd)


def is_false(v: Any, prec: PhraseCounts, draft: PhraseCounts) -> tuple[bool, bool]:
    """(false, by case/quotes/white space alone) for a substantive deviation."""
    a, b = words(v.precedent_text), words(v.draft_text)
    if a == b:
        return True, True
    if v.part == "provision":
        return False, False
    ops = difflib.SequenceMatcher(a=a, b=b, autojunk=False).get_opcodes()
    for tag, i1, i2, j1, j2 in ops:
        if tag == "equal":
            continue
        if tag != "replace" or not is_rename(a[i1:i2], b[j1:j2], prec, draft):
            return False, False
    return True, False


def measure_pair(older: str, newer: str) -> dict:
    from core.readers import read_text
    from core.review import run_review
    from tests.support.legal_texts import license_text

    prec_text, draft_text = license_text(older), license_text(newer)
    review = run_review(read_text(draft_text, source=newer + ".txt"),
                        read_text(prec_text, source=older + ".txt"))
    prec, draft = PhraseCounts(prec_text), PhraseCounts(draft_text)
    subst = [v for v in review.deviations if v.category == "substantive"]
    false_devs, plain = [], 0
    for v in subst:
        false, by_style = is_false(v, prec, draft)
        if false:
            false_devs.append(v)
            plain += by_style
    return {
        "pair": f"{older} -> {newer}",
        "substantive": len(subst),
        "false": len(false_devs),
        "false_style_only": plain,
        "term_map": [f"{m.draft}={m.precedent}" for m in review.term_map],
        "false_deviations": [(v.precedent_text, v.draft_text) for v in false_devs],
    }


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--details", action="store_true", help="list every false deviation")
    parser.add_argument("--json", help="write the figures to this file")
    parser.add_argument("--code", help="the checkout whose engine is measured (default: this one)")
    args = parser.parse_args()
    root = Path(args.code).resolve() if args.code else Path(__file__).resolve().parent.parent
    sys.path.insert(0, str(root))
    rows = []
    for versions in FAMILIES.values():
        for older, newer in zip(versions, versions[1:]):
            rows.append(measure_pair(older, newer))
    total: Counter[str] = Counter()
    for r in rows:
        print(f"{r['pair']:58} substantive {r['substantive']:4}  false {r['false']:3} "
              f"(style only {r['false_style_only']:3})  term map {len(r['term_map'])}")
        if args.details:
            for p, d in r["false_deviations"]:
                print(f"      {p[:70]!r} -> {d[:70]!r}")
            if r["term_map"]:
                print("      term map:", ", ".join(r["term_map"]))
        for k in ("substantive", "false", "false_style_only"):
            total[k] += r[k]
    n = len(rows)
    print(f"\n{n} pairs: substantive {total['substantive']}, false {total['false']} "
          f"({total['false'] / n:.2f} per pair; case/quotes/space only {total['false_style_only']}), "
          f"max {max(r['false'] for r in rows)} in one pair")
    if args.json:
        with open(args.json, "w", encoding="utf-8") as fh:
            json.dump({"pairs": rows, "totals": dict(total)}, fh, indent=1)


if __name__ == "__main__":
    main()
