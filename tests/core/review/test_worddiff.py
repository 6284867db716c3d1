"""The word diff (core.review.worddiff), checked against the standard library's difflib.

Reference: Python's ``difflib.SequenceMatcher`` on the same token keys.  Its matching blocks
form a common subsequence of the two token sequences; the exact diff -- diff-match-patch's
Myers search with no time-out (E. W. Myers, "An O(ND) difference algorithm and its
variations", Algorithmica 1986) or, above the budget, rapidfuzz's longest common
subsequence -- finds a *longest* common subsequence, so before the semantic clean-up the
diff keeps at least as many tokens unchanged as difflib does, and exactly as many as
diff-match-patch's unbounded Myers search (the second reference).
"""

from __future__ import annotations

import difflib
import re

from hypothesis import given, settings
from hypothesis import strategies as st

from core.review.tokens import tokenize
from core.review.worddiff import diff_texts, edits_from_ops, token_ops

from .helpers import check_tiling, excerpt

WORDS = ["the", "The", "Customer", "shall", "may", "not", "pay", "thirty", "(30)", "days",
         "“quoted”", '"quoted"', "–", "-", ",", ".", ";", "Supplier's", "Supplier’s", "7.2",
         "1,000", "notice", "in", "writing", "  ", "\n", "\t"]

texts = st.lists(st.sampled_from(WORDS), max_size=40).map(
    lambda ws: "".join(w if w.isspace() else w + " " for w in ws).rstrip(" "))
any_text = st.text(alphabet=st.characters(blacklist_categories=("Cs",)), max_size=80)


def reconstruct(edits, a: str, b: str) -> tuple[str, str]:
    return "".join(a[e.p1:e.p2] for e in edits), "".join(b[e.d1:e.d2] for e in edits)


@settings(max_examples=300, deadline=None)
@given(texts, texts)
def test_diff_reconstructs_both_texts_and_equal_spans_are_equal(a: str, b: str) -> None:
    check_reconstruction(a, b)


@settings(max_examples=200, deadline=None)
@given(any_text, any_text)
def test_diff_reconstructs_arbitrary_unicode(a: str, b: str) -> None:
    check_reconstruction(a, b)


def check_reconstruction(a: str, b: str) -> None:
    edits = diff_texts(a, b)
    assert reconstruct(edits, a, b) == (a, b)
    check_tiling(edits, a, b)


@settings(max_examples=300, deadline=None)
@given(texts, texts)
def test_unchanged_tokens_at_least_as_many_as_difflib(a: str, b: str) -> None:
    """Reference: difflib.SequenceMatcher (autojunk off) on the same keys finds a common
    subsequence; the exact Myers diff (before clean-up) keeps at least as many tokens."""
    ta, tb = tokenize(a), tokenize(b)
    ops = token_ops(ta, tb, semantic=False)
    kept = sum(op.i2 - op.i1 for op in ops if op.tag in ("equal", "restyle"))
    sm = difflib.SequenceMatcher(None, ta.keys, tb.keys, autojunk=False)
    reference = sum(block.size for block in sm.get_matching_blocks())
    assert kept >= reference
    # the clean-up only merges, it never loses text
    edits = edits_from_ops(ta, tb, token_ops(ta, tb))
    assert reconstruct(edits, a, b) == (a, b)


@settings(max_examples=200, deadline=None)
@given(texts)
def test_identical_texts_give_one_equal_edit_like_difflib(a: str) -> None:
    """Reference: difflib reports one 'equal' opcode (or none) for identical inputs."""
    edits = diff_texts(a, a)
    ref = difflib.SequenceMatcher(None, a.split(), a.split()).get_opcodes()
    assert all(tag == "equal" for tag, *_ in ref)
    assert all(e.tag == "equal" for e in edits)
    assert len(edits) == (1 if a else 0)


def test_word_granularity_and_offsets() -> None:
    a = "The Customer shall pay within thirty (30) days."
    b = "The Customer may pay within sixty (60) days."
    edits = diff_texts(a, b)
    changed = [(a[e.p1:e.p2], b[e.d1:e.d2]) for e in edits if e.tag != "equal"]
    assert changed == [("shall", "may"), ("thirty", "sixty"), ("30", "60")]


def test_formatting_differences_are_their_own_edits() -> None:
    """Case, quote style and white space differ: the words still line up (the keys ignore
    them), differences a token or two apart form one hunk, and everything else is equal."""
    a = 'The "Goods" shall be  delivered'
    b = "the “Goods” shall be delivered"
    edits = diff_texts(a, b)
    changed = [(a[e.p1:e.p2], b[e.d1:e.d2]) for e in edits if e.tag != "equal"]
    assert changed == [('The "Goods"', "the “Goods”"), ("  ", " ")]


def test_semantic_cleanup_merges_small_equalities() -> None:
    """diff-match-patch's semantic clean-up turns two replacements around one shared word
    into one readable replacement (raw Myers keeps the shared 'x')."""
    a = "a b c d x e f g h"
    b = "a p q r x s t u v"
    raw = [e for e in diff_texts(a, b, semantic=False) if e.tag != "equal"]
    clean = [e for e in diff_texts(a, b) if e.tag != "equal"]
    assert len(clean) < len(raw)
    assert reconstruct(diff_texts(a, b), a, b) == (a, b)


def test_long_pairs_reconstruct_and_change_only_the_changed_sentences():
    """A long provision with a few sentences rewritten is diffed with rapidfuzz (Myers'
    search would cost more); the result still rebuilds both texts, equal spans are equal,
    and the changed sentences are the ones difflib (the reference) finds changed."""
    import random

    from rapidfuzz.distance import Indel

    from core.review.worddiff import _myers_cap

    rng = random.Random(3)
    words = [f"w{i}" for i in range(200)]
    sentences = [" ".join(rng.choice(words) for _ in range(20)) + "." for _ in range(600)]
    changed = sorted(rng.sample(range(600), 12))
    other = list(sentences)
    for i in changed:
        other[i] = " ".join(rng.choice(words) for _ in range(18)) + "."
    a, b = " ".join(sentences), " ".join(other)
    ta, tb = tokenize(a), tokenize(b)
    assert Indel.distance(ta.keys, tb.keys) > _myers_cap(len(ta), len(tb))
    edits = diff_texts(a, b)
    assert reconstruct(edits, a, b) == (a, b)
    check_tiling(edits, a, b)
    sm = difflib.SequenceMatcher(None, sentences, other, autojunk=False)
    ref_changed = {i for tag, i1, i2, _j1, _j2 in sm.get_opcodes() if tag != "equal" for i in range(i1, i2)}
    assert ref_changed == set(changed)
    starts = [0]
    for s in sentences:
        starts.append(starts[-1] + len(s) + 1)
    touched = {max(k for k in range(600) if starts[k] <= e.p1) for e in edits if e.tag != "equal"}
    assert touched == set(changed)


def _myers_kept(ta, tb) -> int:
    """Reference: the tokens diff-match-patch's Myers search (no time-out, no budget) keeps:
    the length of a longest common subsequence of the keys."""
    from diff_match_patch import diff_match_patch

    from core.review.worddiff import _encode

    book: dict[str, str] = {}
    dmp = diff_match_patch()
    dmp.Diff_Timeout = 0
    diffs = dmp.diff_main(_encode(ta.keys, book), _encode(tb.keys, book), False)
    return sum(len(t) for op, t in diffs if op == 0)


@settings(max_examples=300, deadline=None)
@given(texts, texts)
def test_bounded_path_keeps_as_many_tokens_as_myers_and_difflib(a: str, b: str) -> None:
    """Whichever way is chosen, the exact diff is a shortest edit script: with rapidfuzz's
    opcodes forced for every pair, the tokens kept equal those of
    diff-match-patch's unbounded Myers search and are at least those of difflib's matching
    blocks (both references), and the clean-up still rebuilds both texts."""
    import core.review.worddiff as wd

    ta, tb = tokenize(a), tokenize(b)
    saved = wd._myers_cap
    wd._myers_cap = lambda n, m: -1
    wd.clear_diff_cache()
    try:
        ops = token_ops(ta, tb, semantic=False)
        edits = edits_from_ops(ta, tb, token_ops(ta, tb))
    finally:
        wd._myers_cap = saved
        wd.clear_diff_cache()
    kept = sum(op.i2 - op.i1 for op in ops if op.tag in ("equal", "restyle"))
    assert kept == _myers_kept(ta, tb)
    sm = difflib.SequenceMatcher(None, ta.keys, tb.keys, autojunk=False)
    assert kept >= sum(block.size for block in sm.get_matching_blocks())
    assert reconstruct(edits, a, b) == (a, b)
    check_tiling(edits, a, b)


diff_ops = st.lists(st.tuples(st.sampled_from((-1, 0, 1)), st.text(alphabet="ab \n.", min_size=1, max_size=6)),
                   max_size=40)


def _dmp_cleanup(diffs):
    """Reference: diff-match-patch's own diff_cleanupSemantic, in place on a copy."""
    from diff_match_patch import diff_match_patch

    out = list(diffs)
    diff_match_patch().diff_cleanupSemantic(out)
    return out


@settings(max_examples=500, deadline=None)
@given(diff_ops)
def test_semantic_clean_up_equals_diff_match_patch_on_any_diff(diffs) -> None:
    """The one-sweep clean-up gives exactly diff-match-patch's result (the reference), on
    any list of operations, normalised or not."""
    from core.review.worddiff import semantic_cleanup

    assert semantic_cleanup(list(diffs)) == _dmp_cleanup(diffs)


@settings(max_examples=300, deadline=None)
@given(st.text(alphabet="abc .", max_size=60), st.text(alphabet="abc .", max_size=60))
def test_semantic_clean_up_equals_diff_match_patch_on_real_diffs(a: str, b: str) -> None:
    """The same on the exact diffs the review cleans (reference: diff-match-patch)."""
    from core.review.worddiff import exact_diff, semantic_cleanup

    diffs = exact_diff(a, b)
    assert semantic_cleanup(list(diffs)) == _dmp_cleanup(diffs)


def test_semantic_clean_up_of_a_long_rewrite_is_linear_and_equal() -> None:
    """A 3,000-word text against another drawn from the same words (thousands of diff
    entries): the same result as diff-match-patch's clean-up (reference), and both texts
    rebuilt."""
    import random

    import core.review.worddiff as wd

    rng = random.Random(9)
    words = [f"v{i}" for i in range(60)]
    a = " ".join(rng.choice(words) for _ in range(3000))
    b = " ".join(rng.choice(words) for _ in range(3000))
    ta, tb = tokenize(a), tokenize(b)
    book: dict[str, str] = {}
    sa, sb = wd._encode(ta.keys, book), wd._encode(tb.keys, book)
    diffs = wd.exact_diff(sa, sb)
    assert len(diffs) > 1000
    cleaned = wd.semantic_cleanup(list(diffs))
    assert cleaned == _dmp_cleanup(diffs)
    assert "".join(t for op, t in cleaned if op <= 0) == sa
    assert "".join(t for op, t in cleaned if op >= 0) == sb


# --------------------------------------------------------------------------------------
# Pair.edits: the term-aware hunks the review keeps (pair_edits_from_ops)
# --------------------------------------------------------------------------------------

TERM_WORDS = [w for w in WORDS if w not in ("Customer",)] + ["Customer", "Customer's", "Customers"]
term_texts = st.lists(st.sampled_from(TERM_WORDS), max_size=40).map(
    lambda ws: "".join(w if w.isspace() else w + " " for w in ws).rstrip(" "))


def _term_aware(a: str, b: str):
    """The review's keys: the draft's "Client" read as the precedent's "Customer"."""
    from core.review.tokens import base_tokens, rekey, term_matcher
    from core.review.worddiff import pair_edits_from_ops

    matcher = term_matcher(["Customer", "Client"])
    ta = rekey(base_tokens(a, matcher), term_key={})
    tb = rekey(base_tokens(b, matcher), term_key={"Client": "Customer"})
    return pair_edits_from_ops(ta, tb, token_ops(ta, tb))


@settings(max_examples=300, deadline=None)
@given(term_texts, term_texts)
def test_pair_edits_rebuild_both_original_texts(a: str, b: str) -> None:
    b = b.replace("Customer", "Client")
    edits = _term_aware(a, b)
    assert reconstruct(edits, a, b) == (a, b)
    check_tiling(edits, a, b)


@settings(max_examples=300, deadline=None)
@given(term_texts)
def test_a_renamed_term_is_a_hunk_of_its_own_and_nothing_else_changes(a: str) -> None:
    """Reference: difflib.SequenceMatcher on the words, with the draft's term read as the
    precedent's, finds the two texts equal; the review's hunks are then exactly the term's
    uses, one hunk each."""
    b = a.replace("Customer", "Client")
    assert difflib.SequenceMatcher(None, a.split(), b.replace("Client", "Customer").split()).ratio() == 1.0
    edits = _term_aware(a, b)
    changed = [(a[e.p1:e.p2], b[e.d1:e.d2]) for e in edits if e.tag != "equal"]
    assert all(e.tag in ("equal", "replace") for e in edits)
    assert [p for p, _ in changed] == re.findall(r"Customer(?:'s|s)?", a)
    assert all(d == p.replace("Customer", "Client") for p, d in changed)


def test_restyled_words_stay_one_hunk_but_a_term_use_is_apart() -> None:
    a = 'The "Customer" shall PAY'
    b = "The “Client” shall pay"
    edits = _term_aware(a, b)
    changed = [(a[e.p1:e.p2], b[e.d1:e.d2]) for e in edits if e.tag != "equal"]
    assert changed == [('"', "“"), ("Customer", "Client"), ('"', "”"), ("PAY", "pay")]


def test_unchanged_words_between_two_rewrites_stay_unchanged() -> None:
    """artistic-1.0 and artistic-2.0 (licensedcode-data), the verbatim-copies permission:
    the clause is rewritten around "provided that you duplicate all of the original
    copyright notices and associated disclaimers", which both versions keep.  Reference:
    difflib's word-level SequenceMatcher finds that run as one matching block; the review's
    diff must keep it unchanged too rather than show it deleted and inserted again (the
    semantic clean-up would merge it into the rewrites on each side)."""
    from core.review.worddiff import ANCHOR_WORDS

    a = excerpt("artistic-1.0", "You may make and give away verbatim copies", "associated disclaimers.")
    b = excerpt("artistic-2.0", "You may Distribute verbatim copies", "Compiled form of the Package.")
    edits = diff_texts(a, b)
    assert reconstruct(edits, a, b) == (a, b)
    kept = [a[e.p1:e.p2] for e in edits if e.tag == "equal"]
    aw, bw = a.split(), b.split()
    blocks = difflib.SequenceMatcher(None, aw, bw, autojunk=False).get_matching_blocks()
    long_runs = [" ".join(aw[m.a:m.a + m.size]).rstrip(".") for m in blocks if m.size >= 2 * ANCHOR_WORDS]
    assert "provided that you duplicate all of the original copyright notices and associated disclaimers" in long_runs
    for run in long_runs:
        assert any(run in k for k in kept), run
