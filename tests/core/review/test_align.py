"""Alignment of provisions (core.review.align).

References: the definition of a longest increasing subsequence (exhaustive search on small
inputs); ``scipy.optimize.linear_sum_assignment`` on the whole weight matrix for the
per-component assignment; scikit-learn's ``TfidfVectorizer`` for the TF-IDF bound.
"""

from __future__ import annotations

import itertools

import numpy as np
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from scipy.optimize import linear_sum_assignment
from sklearn.feature_extraction.text import TfidfVectorizer

from core.review.align import (
    _COSINE_CEILING,
    ALIGN_MIN,
    CANDIDATE_MIN_COSINE,
    CANDIDATE_POSITION_WEIGHT,
    HEADING_WEIGHT,
    Features,
    _Cosines,
    _solve,
    _tfidf,
    align,
    longest_increasing_subsequence,
    pair_similarity,
)


def F(text: str, heading: str = "", kind: str = "clause", parent: int | None = None,
      term: str | None = None) -> Features:
    return Features(tuple(text.lower().split()), tuple(heading.lower().split()), kind, term, parent)


@settings(max_examples=300, deadline=None)
@given(st.lists(st.integers(0, 12), max_size=10))
def test_lis_is_longest_and_increasing(values):
    idx = longest_increasing_subsequence(values)
    assert idx == sorted(idx)
    assert all(values[a] < values[b] for a, b in zip(idx, idx[1:]))
    # reference: exhaustive search over all subsequences
    best = 0
    for r in range(len(values), 0, -1):
        if any(all(c[k] < c[k + 1] for k in range(r - 1))
               for c in itertools.combinations(values, r)):
            best = r
            break
    assert len(idx) == best


def test_lis_is_n_log_n_on_a_long_input():
    values = list(range(0, 200_000, 2)) + [1]  # one late small value
    idx = longest_increasing_subsequence(values)
    assert len(idx) == 100_000


@settings(max_examples=150, deadline=None)
@given(st.integers(1, 7), st.integers(1, 7), st.data())
def test_per_component_assignment_matches_scipy_on_the_whole_matrix(n_d, n_p, data):
    cells = [(d, p) for d in range(n_d) for p in range(n_p)]
    chosen = data.draw(st.lists(st.sampled_from(cells), unique=True, max_size=len(cells)))
    weights = data.draw(st.lists(st.floats(0.1, 3.0), min_size=len(chosen), max_size=len(chosen)))
    edges = dict(zip(chosen, weights))
    match = _solve(n_d, n_p, edges)
    assert len(set(match.values())) == len(match)
    assert all((d, p) in edges for d, p in match.items())
    got = sum(edges[(d, p)] for d, p in match.items())
    dense = np.zeros((n_d, n_p))
    for (d, p), w in edges.items():
        dense[d, p] = w
    r, c = linear_sum_assignment(dense, maximize=True)
    assert abs(got - dense[r, c].sum()) < 1e-9


def _dense(rows, width):
    out = np.zeros((len(rows), width))
    for i, r in enumerate(rows):
        for j, x in r.items():
            out[i, j] = x
    return out


def _sklearn_tfidf(docs):
    """Reference: scikit-learn's TfidfVectorizer(sublinear_tf=True), columns in our
    vocabulary order (first appearance)."""
    ref = TfidfVectorizer(analyzer=lambda x: x, sublinear_tf=True).fit(docs)
    vocab = {}
    for seq in docs:
        for w in seq:
            vocab.setdefault(w, len(vocab))
    theirs = ref.transform(docs).toarray()
    out = np.zeros((len(docs), len(vocab)))
    for k, w in enumerate(ref.get_feature_names_out()):
        out[:, vocab[w]] = theirs[:, k]
    return out, len(vocab)


def test_tfidf_bound_matches_scikit_learn():
    docs = [["the", "supplier", "shall", "deliver", "the", "goods"],
            ["the", "customer", "shall", "pay", "the", "fees"],
            ["goods", "goods", "fees"], []]
    theirs, width = _sklearn_tfidf(docs)
    assert np.allclose(_dense(_tfidf(docs), width), theirs)


@settings(max_examples=100, deadline=None)
@given(st.lists(st.lists(st.sampled_from(["the", "goods", "fees", "shall", "pay"]), min_size=1, max_size=6),
                min_size=1, max_size=6), st.data())
def test_tfidf_of_repeated_texts_matches_scikit_learn(docs, data):
    # texts both documents hold come twice or more: counted once, one row shared
    docs = docs + [data.draw(st.sampled_from(docs)) for _ in range(data.draw(st.integers(1, 4)))]
    theirs, width = _sklearn_tfidf(docs)
    assert np.allclose(_dense(_tfidf(docs), width), theirs)


WORDS = ["the", "supplier", "customer", "shall", "may", "pay", "deliver", "goods", "fees",
         "notice", "thirty", "days", "term", "law"]
docs_strategy = st.lists(st.lists(st.sampled_from(WORDS), max_size=12), min_size=1, max_size=12)


@settings(max_examples=100, deadline=None)
@given(docs_strategy, docs_strategy, docs_strategy, docs_strategy)
def test_cosines_and_candidates_plain_equal_numpy_and_scikit_learn(dw, pw, dh, ph):
    """The plain-Python cosines equal scikit-learn's TF-IDF cosines (reference), and the
    candidates chosen in plain Python equal those chosen with the numpy product (the path
    of longer documents), ties aside."""
    assume(any(dw + pw))  # scikit-learn refuses an empty vocabulary
    n_d, n_p = len(dw), len(pw)
    dh, ph = (dh * n_d)[:n_d], (ph * n_p)[:n_p]
    content, heads = _tfidf(dw + pw), _tfidf(dh + ph)
    ref, _w = _sklearn_tfidf(dw + pw)
    cos = _Cosines(content, heads, n_d)
    for d in range(n_d):
        for p in range(n_p):
            assert abs(cos.get(d, p)[0] - float(ref[d] @ ref[n_d + p])) < 1e-9
    plain = _Cosines(content, heads, n_d)._candidates_plain(n_p)
    dense = _Cosines(content, heads, n_d)._candidates_numpy(n_p)
    assert plain <= {(d, p) for d in range(n_d) for p in range(n_p)}
    select = {}
    for d in range(n_d):
        for p in range(n_p):
            c, h = cos.get(d, p)
            bound = (1 - HEADING_WEIGHT) * c + HEADING_WEIGHT * h
            if bound >= CANDIDATE_MIN_COSINE:
                select[(d, p)] = round(bound + CANDIDATE_POSITION_WEIGHT * (
                    1 - abs(d / max(1, n_d - 1) - p / max(1, n_p - 1))), 9)
    assert plain <= set(select)
    rows = [[v for (d, _p), v in select.items() if d == r] for r in range(n_d)]
    cols = [[v for (_d, p), v in select.items() if p == c] for c in range(n_p)]
    if all(len(set(x)) == len(x) for x in rows + cols):  # no tie to break differently
        assert plain == dense


PREC = [F("", "Definitions"), F("the supplier shall deliver the goods to the site on time", parent=0),
        F("the customer shall pay every invoice within thirty days of receipt", parent=0),
        F("either party may terminate this agreement on ninety days notice in writing"),
        F("this agreement is governed by the law of ardence and the courts of wexmoor")]


def test_renumbered_identical_provisions_are_paired_in_order():
    al = align(PREC, PREC)
    assert [(g.drafts, g.precedents, g.moved) for g in al.groups] == [
        ((i,), (i,), False) for i in range(len(PREC))]
    assert al.added == al.removed == ()


def test_moved_provision_is_outside_the_lis():
    draft = [PREC[0], PREC[1], PREC[4], PREC[2], PREC[3]]
    al = align(draft, PREC)
    moved = [(g.drafts, g.precedents) for g in al.groups if g.moved]
    assert moved == [((2,), (4,))]


def test_added_removed_and_nothing_shared():
    draft = [PREC[0], PREC[1], F("the supplier shall keep insurance with a reputable insurer"),
             PREC[3], PREC[4]]
    al = align(draft, PREC)
    assert al.added == (2,) and al.removed == (2,)
    other = [F("completely unrelated words about fishing boats and harbour fees"),
             F("lighthouse keepers rotate their watches at dawn")]
    empty = align(other, PREC)
    assert empty.groups == () and empty.added == (0, 1)
    assert align([], PREC).removed == tuple(range(len(PREC)))


def test_split_and_merged():
    whole = F("the customer shall pay every invoice within thirty days of receipt and "
              "interest accrues on late payments at four per cent above the base rate")
    first = F("the customer shall pay every invoice within thirty days of receipt")
    second = F("interest accrues on late payments at four per cent above the base rate")
    prec = [PREC[0], whole, PREC[3]]
    draft = [PREC[0], first, second, PREC[3]]
    split = align(draft, prec)
    g = next(g for g in split.groups if g.kind == "split")
    assert (g.drafts, g.precedents) == ((1, 2), (1,))
    assert len(g.pair_similarities) == 2 and g.similarity > ALIGN_MIN
    merged = align(prec, draft)
    g = next(g for g in merged.groups if g.kind == "merged")
    assert (g.drafts, g.precedents) == ((1,), (1, 2))


def test_a_provision_spread_over_several_is_gathered_whole():
    """cc-by-2.5's "Miscellaneous" (licensedcode-data) is one provision of five unlabelled
    paragraphs; cc-by-3.0 gives each its own label.  The paragraphs that follow the one
    paired with it join the split one after another, not only the paired one's neighbour."""
    paras = [
        ("each time you distribute the work the licensor offers to the recipient a license "
         "to the work on the same terms and conditions"),
        ("if any provision of this license is invalid or unenforceable under applicable law "
         "it shall not affect the validity of the remainder"),
        ("no term or provision of this license shall be deemed waived and no breach "
         "consented to unless such waiver shall be in writing"),
        ("this license constitutes the entire agreement between the parties with respect to "
         "the work licensed here"),
    ]
    whole = F(" ".join(paras), "Miscellaneous")
    prec = [PREC[0], whole, PREC[3]]
    draft = [PREC[0], F("", "Miscellaneous"), *(F(t) for t in paras), PREC[3]]
    g = next(g for g in align(draft, prec).groups if g.kind == "split")
    assert (g.drafts, g.precedents) == ((1, 2, 3, 4, 5), (1,))


def test_repeated_list_items_pair_inside_their_parents():
    """Word-for-word identical items under different clauses: the pairing follows the
    parents, not the first identical text found."""
    item = "any breach of this agreement by the other party"
    prec = [F("", "Termination"), F(item, parent=0), F("", "Indemnity"), F(item, parent=2)]
    draft = [F("", "Indemnity"), F(item, parent=0), F("", "Termination"), F(item, parent=2)]
    al = align(draft, prec)
    pairs = sorted((g.drafts[0], g.precedents[0]) for g in al.groups)
    assert pairs == [(0, 2), (1, 3), (2, 0), (3, 1)]


def test_definitions_pair_through_the_term_map():
    prec = [F('"customer" means the buyer named in the order form', kind="definition", term="Customer")]
    draft = [F('"client" means the entity identified as purchaser', kind="definition", term="Customer")]
    al = align(draft, prec)
    assert [(g.drafts, g.precedents) for g in al.groups] == [((0,), (0,))]


_PHRASES = st.lists(st.sampled_from(["the", "supplier", "shall", "pay", "fees", "notice", "term"]), max_size=8)


@settings(max_examples=300, deadline=None)
@given(_PHRASES, _PHRASES, _PHRASES, _PHRASES, st.booleans(), st.floats(0.0, 1.0))
def test_the_cosine_ceiling_bounds_every_pair_similarity(dw, pw, dh, ph, same_kind, cosine):
    # the alignment skips a pair whose bound is below ALIGN_MIN without its cosines: the
    # bound must hold for every cosine a pair can have (at most 1)
    d = Features(tuple(dw), tuple(dh), "clause", None, None)
    p = Features(tuple(pw), tuple(ph), "clause" if same_kind else "definition", None, None)
    assert pair_similarity(d, p, cosine) <= pair_similarity(d, p, _COSINE_CEILING)
