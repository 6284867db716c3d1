"""Accuracy on successive versions of published licences: false substantive deviations and
missed changes per pair.

For each pair of ``tests/support/version_pairs.PAIRS`` (older version of a licence from the
PyPI package ``licensedcode-data`` as precedent, newer as draft) the review is measured
against the standard library's ``difflib.SequenceMatcher`` on the normalised words of the
two texts (the reference and the counting rules are in ``tests/support/version_pairs.py``).
Prints one line per pair: reference changes, substantive deviations, false substantive
deviations (by cause: noise, rename, unchanged), missed changes and changes of figures that
no substantive deviation covers; with ``--details`` the false deviations and the missed
changes themselves.

Run from the repository (the ``core`` package imported is the one beside this file):

    python benchmarks/accuracy_version_pairs.py [--details] [--pair cc-by-2.0]

To measure another revision, export it (``git archive REV | tar -x -C DIR``) and run this
script with ``--root DIR``.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

#: Column widths of the table.
WIDTHS = (7, 5, 5, 5, 6, 6, 6, 7)


def _args() -> argparse.Namespace:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--details", action="store_true", help="list false deviations and missed changes")
    ap.add_argument("--pair", action="append", default=[],
                    help="only pairs whose precedent or draft key starts with this (repeatable)")
    ap.add_argument("--root", default=str(Path(__file__).resolve().parent.parent),
                    help="the checkout whose core package is measured (default: this one)")
    return ap.parse_args()


def main() -> int:
    args = _args()
    here = Path(__file__).resolve().parent.parent
    sys.path.insert(0, args.root)
    import core  # the measured checkout's engine (its submodules load from there too)

    sys.path.remove(args.root)
    sys.path.insert(0, str(here))  # the reference from this checkout
    from tests.support.version_pairs import PAIRS, measure, review_pair

    print(f"core: {Path(core.__file__).parent}")
    print(f"{'pair':<52} {'changes':>7} {'subst':>5} {'false':>5} {'noise':>5} "
          f"{'rename':>6} {'unchgd':>6} {'missed':>6} {'figures':>7}")
    totals = [0] * 8
    for pair in PAIRS:
        if args.pair and not any(pair.precedent.startswith(p) or pair.draft.startswith(p)
                                 for p in args.pair):
            continue
        name = f"{pair.precedent} -> {pair.draft}"
        fig = measure(review_pair(pair), name=name)
        whys = [w for w, _v in fig.false_substantive]
        row = [fig.changes, fig.substantive, len(whys), whys.count("noise"), whys.count("rename"),
               whys.count("unchanged"), len(fig.missed), len(fig.figures_not_substantive)]
        totals = [t + r for t, r in zip(totals, row)]
        print(f"{name:<52} " + " ".join(f"{v:>{w}}" for v, w in zip(row, WIDTHS)))
        if args.details:
            print("    changes covered, by category: "
                  + ", ".join(f"{c} {n}" for c, n in fig.covered_by)
                  + f"; described as a reordering: {len(fig.reordered)}")
            for why, v in fig.false_substantive:
                print(f"    false ({why}) {v.id} {v.part} {v.change}: "
                      f"{v.precedent_text[:70]!r} -> {v.draft_text[:70]!r}")
            for rc in fig.missed:
                print(f"    missed {rc.tag}: {rc.shown()[:150]}")
            for rc in fig.figures_not_substantive:
                print(f"    figures not substantive {rc.tag}: {rc.shown()[:150]}")
    print(f"{'total':<52} " + " ".join(f"{v:>{w}}" for v, w in zip(totals, WIDTHS)))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
