"""Where the review's alignment and term-map constants stand: measured, not timed.

    python benchmarks/sweep_review_constants.py [CONSTANT ...]

Inputs (all outside the project or committed): the demo pair (``demo_agreements/draft.docx``
against ``precedent.docx``); the Apache 2.0, GPL 3.0 and MPL 2.0 texts of the PyPI package
``licensedcode-data``, each with every edit of ``tests/core/review/test_licences.py`` planted
at once (moved section, changed figure, "shall" -> "may", "not" inserted, sentence inserted,
section deleted, section added, cosmetic noise, defined term renamed) and reviewed against
the unchanged text; and the Apache licence reviewed against the MPL (unrelated documents:
every pairing there is spurious or weak).

Prints:

* for the candidate step of ``core.review.align``: the exact similarity of the best pair
  whose cheap bound is under ``CANDIDATE_MIN_COSINE``, the lowest bound of a pair that
  reaches ``ALIGN_MIN``, and how deep in its row or column (by the bound) such a pair
  ranks, against ``CANDIDATES``;
* for each constant, for a range of values: how many pairs (p) and term mappings (t) differ
  from those of the current value, summed over the five reviews (and which reviews).

The comments beside the constants quote these figures.
"""

from __future__ import annotations

import importlib
import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from core.readers import read_document  # noqa: E402
from core.review import run_review  # noqa: E402
from tests.core.review import test_licences as tl  # noqa: E402
from tests.core.review.helpers import doc, licence_text  # noqa: E402

al = importlib.import_module("core.review.align")

#: Values tried per constant (module, name): around the current value, both ways.
SWEEPS: dict[str, dict[str, list[float]]] = {
    "core.review.align": {
        "CANDIDATES": [1, 2, 3, 4, 10, 20, 10_000],
        "CANDIDATE_MIN_COSINE": [-1.0, 0.0, 0.02, 0.1, 0.2, 0.3],
        "ALIGN_MIN": [0.25, 0.3, 0.35, 0.45, 0.5, 0.55, 0.6],
        "HEADING_WEIGHT": [0.0, 0.1, 0.2, 0.4, 0.5, 0.6],
        "COSINE_WEIGHT": [0.0, 0.2, 0.3, 0.4, 0.6, 0.7, 0.8, 1.0],
        "KIND_MISMATCH_FACTOR": [0.5, 0.6, 0.7, 0.9, 1.0],
        "HEADING_ONLY_FACTOR": [0.0, 0.3, 0.4, 0.5, 0.7, 0.8, 1.0],
        "CANDIDATE_POSITION_WEIGHT": [0.0, 0.005, 0.02, 0.05, 0.1],
        "POSITION_WEIGHT": [0.0, 0.01, 0.05, 0.1, 0.2],
        "PARENT_BONUS": [0.0, 0.02, 0.1, 0.2, 0.4],
        "SPLIT_CONTAINMENT": [0.5, 0.6, 0.7, 0.8, 0.9, 1.0],
        "SPLIT_GAIN": [0.0, 0.01, 0.05, 0.1, 0.2],
        "SPLIT_MIN_WORDS": [1, 2, 4, 6, 10],
        "CHILD_VOTE_SHARE": [0.25, 0.34, 0.67, 0.75, 1.0],
    },
    "core.review.termmap": {
        "DEFINITION_MIN": [0.5, 0.6, 0.8, 0.9],
        "SUBSTITUTION_SCALE": [0.5, 1.0, 1.5, 3.0, 4.0],
        "MAP_MIN": [0.3, 0.4, 0.6, 0.7, 0.8, 0.9],
        "FOREIGN_USE_RATIO": [0.1, 0.25, 0.75, 1.0],
        "FOREIGN_USE_MIN": [1, 3, 5],
        "_SLOT_MAX_OTHER_WORDS": [0, 1, 3, 5],
        "RENAME_MIN_SHARE": [0.5, 0.6, 0.9, 1.0],
        "RENAME_MIN_SLOTS": [1, 3, 4],
        "MAX_NAME_WORDS": [1, 2, 3, 6],
    },
}


def cases() -> dict[str, tuple]:
    demo = ROOT / "demo_agreements"
    out = {"demo": (read_document(str(demo / "draft.docx")), read_document(str(demo / "precedent.docx")))}
    # The rename last: the other edits quote the licence's own wording.
    edits = [tl.move, tl.number, tl.weaken, tl.negate, tl.sentence, tl.delete, tl.add, tl.noise, tl.rename]
    for key, plan in tl.PLANS.items():
        base = licence_text(key)
        text = base
        for edit in edits:
            text = edit(text, plan)
        out[key] = (doc(text, f"{key}-draft.txt"), doc(base, f"{key}.txt"))
    out["apache-vs-mpl"] = (doc(licence_text("apache-2.0")), doc(licence_text("mpl-2.0")))
    return out


def signature(review) -> tuple[set, set]:
    return ({(p.draft or "", p.precedent or "", p.status) for p in review.pairs},
            {(m.draft, m.precedent) for m in review.term_map})


def candidate_figures(inputs: dict[str, tuple]) -> None:
    """Bound against exact similarity over every provision pair (all pairs scored)."""
    captured = []
    real = al.align

    def spy(d, p):
        res = real(d, p)
        captured.append((d, p, res))
        return res

    review_mod = importlib.import_module("core.review")
    review_mod.align = spy
    try:
        for name, (draft, precedent) in inputs.items():
            captured.clear()
            run_review(draft, precedent)
            d_feats, p_feats, res = captured[-1]
            n_d, n_p = len(d_feats), len(p_feats)
            content = al._tfidf([f.words for f in d_feats] + [f.words for f in p_feats])
            heads = al._tfidf([f.heading for f in d_feats] + [f.heading for f in p_feats])
            cos = (content[:n_d] @ content[n_d:].T).toarray()
            hcos = (heads[:n_d] @ heads[n_d:].T).toarray()
            bound = (1.0 - al.HEADING_WEIGHT) * cos + al.HEADING_WEIGHT * hcos
            sim = np.array([[al.pair_similarity(d_feats[i], p_feats[j], cos[i, j], hcos[i, j])
                             for j in range(n_p)] for i in range(n_d)])
            low = bound < al.CANDIDATE_MIN_COSINE
            ok = sim >= al.ALIGN_MIN
            rd = np.arange(n_d) / max(1, n_d - 1)
            rp = np.arange(n_p) / max(1, n_p - 1)
            select = bound + al.CANDIDATE_POSITION_WEIGHT * (1 - np.abs(rd[:, None] - rp[None, :]))
            ranks = [min(int((select[i] > select[i, j]).sum()) + 1, int((select[:, j] > select[i, j]).sum()) + 1)
                     for i, j in zip(*np.nonzero(ok))]
            print(f"{name:14s} {n_d:4d} x {n_p:<4d} pairs under the bound {al.CANDIDATE_MIN_COSINE}: "
                  f"{int(low.sum()):6d} (best exact similarity {sim[low].max() if low.any() else 0:.3f}); "
                  f"pairs >= ALIGN_MIN {al.ALIGN_MIN}: {int(ok.sum())} (lowest bound "
                  f"{bound[ok].min() if ok.any() else float('nan'):.3f}, deepest rank "
                  f"{max(ranks) if ranks else 0}; CANDIDATES = {al.CANDIDATES})")
    finally:
        review_mod.align = real


def main(argv: list[str]) -> int:
    inputs = cases()

    def run_all() -> dict[str, tuple[set, set]]:
        return {n: signature(run_review(d, p)) for n, (d, p) in inputs.items()}

    candidate_figures(inputs)
    base = run_all()
    print("term maps:", {n: sorted(v[1]) for n, v in base.items()})
    for modname, consts in SWEEPS.items():
        mod = importlib.import_module(modname)
        for name, values in consts.items():
            if argv and name not in argv:
                continue
            current = getattr(mod, name)
            row = []
            for v in values:
                setattr(mod, name, v)
                try:
                    res = run_all()
                finally:
                    setattr(mod, name, current)
                dp = sum(len(res[n][0] ^ base[n][0]) for n in inputs)
                dt = sum(len(res[n][1] ^ base[n][1]) for n in inputs)
                which = sorted(n for n in inputs if res[n] != base[n])
                row.append(f"{v}: {dp}p/{dt}t" + (f" ({', '.join(which)})" if which else ""))
            print(f"{name} (now {current}): " + "; ".join(row), flush=True)
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
