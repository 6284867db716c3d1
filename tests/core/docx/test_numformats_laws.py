"""Laws of the number formats (core.docx.numformats.format_number) against slow direct
formatters written here from the definitions, not from the module's code.

Sources of the definitions:
- ECMA-376 Part 1 §17.18.59 (ST_NumberFormat): ``lowerLetter`` / ``upperLetter`` "a, b, c,
  ... z, aa, bb, ..." (the letter repeated), ``lowerRoman`` / ``upperRoman`` Roman numerals,
  ``ordinal`` "1st, 2nd, 3rd", ``decimalZero`` "01, 02, ... 09, 10".
- Roman numerals: additive counting (n strokes "I", five "I" made "V", ...) then the
  subtractive shortening (IIII -> IV, VIIII -> IX, ...): the classical definition, common
  practice, no source.
- Bijective base-N (the letter lists of LibreOffice's Cyrillic locale, ``russianLower``):
  the n-th string in shortlex order over the alphabet, found by counting, not by division.
- English cardinal text: a word-to-number parser written here reads every label back
  (the label must be a faithful spelling; the parser knows only the English number words).
"""

from __future__ import annotations

import itertools

from hypothesis import given, settings
from hypothesis import strategies as st

from core.docx.numformats import MAX_ROMAN, format_number

_ADDITIVE = (("M", 1000), ("D", 500), ("C", 100), ("L", 50), ("X", 10), ("V", 5), ("I", 1))
_SHORTEN = (("DCCCC", "CM"), ("CCCC", "CD"), ("LXXXX", "XC"), ("XXXX", "XL"),
            ("VIIII", "IX"), ("IIII", "IV"))


def slow_roman(n: int) -> str:
    out, rest = [], n
    for letter, value in _ADDITIVE:  # additive: as many of each as fit
        out.append(letter * (rest // value))
        rest %= value
    s = "".join(out)
    for long, short in _SHORTEN:
        s = s.replace(long, short)
    return s


def slow_repeated(n: int, alphabet: str) -> str:
    label, letter, times = "", 0, 1
    for _ in range(n):  # count up: a, b, ..., z, aa, bb, ...
        label = alphabet[letter] * times
        letter += 1
        if letter == len(alphabet):
            letter, times = 0, times + 1
    return label


def slow_shortlex(n: int, alphabet: str) -> str:
    count = 0
    for length in itertools.count(1):
        for letters in itertools.product(alphabet, repeat=length):
            count += 1
            if count == n:
                return "".join(letters)
    raise AssertionError  # pragma: no cover


_UNITS = {w: i for i, w in enumerate(
    "zero one two three four five six seven eight nine ten eleven twelve thirteen fourteen "
    "fifteen sixteen seventeen eighteen nineteen".split())}
_TENS = {w: 10 * i for i, w in enumerate(
    "_ _ twenty thirty forty fifty sixty seventy eighty ninety".split()) if w != "_"}


def parse_english(words: str) -> int:
    total = current = 0
    for word in words.replace("-", " ").split():
        if word == "and":
            continue
        if word in _UNITS:
            current += _UNITS[word]
        elif word in _TENS:
            current += _TENS[word]
        elif word == "hundred":
            current *= 100
        elif word == "thousand":
            total, current = total + current * 1000, 0
        else:
            raise ValueError(word)
    return total + current


@settings(max_examples=400)
@given(st.integers(1, 3999))
def test_roman_equals_additive_then_subtractive(n):
    assert format_number(n, "upperRoman") == slow_roman(n)
    assert format_number(n, "lowerRoman") == slow_roman(n).lower()


def test_roman_beyond_its_bound_falls_back_to_decimal():
    assert format_number(MAX_ROMAN + 1, "lowerRoman") == str(MAX_ROMAN + 1)


@settings(max_examples=300)
@given(st.integers(1, 400))
def test_letters_repeat_as_the_standard_shows(n):
    assert format_number(n, "lowerLetter") == slow_repeated(n, "abcdefghijklmnopqrstuvwxyz")
    assert format_number(n, "upperLetter") == slow_repeated(n, "ABCDEFGHIJKLMNOPQRSTUVWXYZ")


@settings(max_examples=300)
@given(st.integers(1, 1500))
def test_bijective_letters_are_shortlex_order(n):
    alphabet = "абвгдежзиклмнопрстуфхцчшщыэюя"  # LibreOffice's Russian list (from memory: no ё, й, ъ, ь)
    assert format_number(n, "russianLower") == slow_shortlex(n, alphabet)


@settings(max_examples=400)
@given(st.integers(1, 999_999))
def test_english_cardinal_text_reads_back_to_its_number(n):
    assert parse_english(format_number(n, "cardinalText", lang="en-US").lower()) == n
    assert parse_english(format_number(n, "cardinalText", lang="en-GB").lower()) == n


@given(st.integers(1, 10_000))
def test_ordinal_suffix_follows_the_last_two_digits(n):
    label = format_number(n, "ordinal", lang="en-US")
    suffix = "th" if n % 100 in (11, 12, 13) else {1: "st", 2: "nd", 3: "rd"}.get(n % 10, "th")
    assert label == f"{n}{suffix}"


@given(st.integers(1, 200))
def test_decimal_zero_pads_below_ten_only(n):
    assert format_number(n, "decimalZero") == (f"0{n}" if n < 10 else str(n))
