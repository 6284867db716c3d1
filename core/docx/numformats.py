"""Number formats of list labels: ECMA-376 Part 1 §17.18.59 ``ST_NumberFormat``, every value.

:func:`format_number` renders one counter value in one format.  What each format shows is
checked against LibreOffice's rendering (the project's outside reference, Debian's 7.4),
except where LibreOffice 7.4 shows plain decimal for a format the standard names as
something else; there the standard's name of the format is followed (``hex`` "Hexadecimal
Numbering", ``decimalFullWidth`` "Double Byte Arabic Numerals", ``decimalEnclosedParen``
"Decimal Numbers Enclosed in Parenthesis", ...).  Formats whose exact spelling neither
source gives (``hindiCounting``, ``thaiCounting``, ``vietnameseCounting``, ``bahtText``,
``dollarText``, ``hindiConsonants``) are shown in decimal, which keeps the label's
structure ("%1.%2" stays "3.4").

The text formats (``ordinal``, ``cardinalText``, ``ordinalText``) depend on the paragraph's
language, as in LibreOffice: English, French, German, Russian and Spanish ordinals, and
English (British English says "one hundred and one"), French, German and Russian words;
other languages use English.

``custom`` takes its pattern from ``w:numFmt/@w:format`` (Word 2010 writes it inside
``mc:AlternateContent``, e.g. ``"00001, 00002, 00003, ..."``); the first format token is
read as in XSLT 1.0 ``xsl:number`` (§7.7.1), which the attribute's definition refers to:
``001`` pads to three digits, ``a``/``A`` letters, ``i``/``I`` roman numerals.

Timing: O(length of the label) per value: every format is computed by arithmetic on the
value's digits (letters "AAA..." by ``divmod``), never by a loop that counts up to it.
Values below 1 show in decimal in every format but ``decimal`` and ``decimalZero``, as
LibreOffice shows them.
"""

from __future__ import annotations

from collections.abc import Callable

from ..lazyre import lazy_compile

__all__ = [
    "BULLET_FORMATS",
    "MAX_REPEATED_CHARS",
    "MAX_ROMAN",
    "MAX_WORDS_NUMBER",
    "NUMBER_FORMATS",
    "format_number",
]

#: Every ST_NumberFormat value of ECMA-376 Part 1 §17.18.59, in the standard's order.
NUMBER_FORMATS: tuple[str, ...] = (
    "decimal", "upperRoman", "lowerRoman", "upperLetter", "lowerLetter", "ordinal",
    "cardinalText", "ordinalText", "hex", "chicago", "ideographDigital", "japaneseCounting",
    "aiueo", "iroha", "decimalFullWidth", "decimalHalfWidth", "japaneseLegal",
    "japaneseDigitalTenThousand", "decimalEnclosedCircle", "decimalFullWidth2",
    "aiueoFullWidth", "irohaFullWidth", "decimalZero", "bullet", "ganada", "chosung",
    "decimalEnclosedFullstop", "decimalEnclosedParen", "decimalEnclosedCircleChinese",
    "ideographEnclosedCircle", "ideographTraditional", "ideographZodiac",
    "ideographZodiacTraditional", "taiwaneseCounting", "ideographLegalTraditional",
    "taiwaneseCountingThousand", "taiwaneseDigital", "chineseCounting",
    "chineseLegalSimplified", "chineseCountingThousand", "koreanDigital", "koreanCounting",
    "koreanLegal", "koreanDigital2", "vietnameseCounting", "russianLower", "russianUpper",
    "none", "numberInDash", "hebrew1", "hebrew2", "arabicAlpha", "arabicAbjad",
    "hindiVowels", "hindiConsonants", "hindiNumbers", "hindiCounting", "thaiLetters",
    "thaiNumbers", "thaiCounting", "bahtText", "dollarText", "custom",
)

#: Formats rendered as bullets (no number).
BULLET_FORMATS = frozenset({"bullet"})

#: Largest number spelled out in words (cardinalText/ordinalText); larger values are shown in
#: decimal.  Contracts number clauses in the tens or hundreds at most.
MAX_WORDS_NUMBER = 999_999

#: Longest label made by repeating one letter or symbol ("AAA...", "***..."): a list counted
#: from the largest start accepted (32767) shows 1261 letters, as LibreOffice does; beyond
#: this the value is shown in decimal, so no label costs more than this to build.
MAX_REPEATED_CHARS = 2_000

#: Roman numerals past 3999 repeat "M" (LibreOffice shows 12345 as "MMMMMMMMMMMMCCCXLV");
#: beyond this value the label would be absurdly long, so it is shown in decimal.
MAX_ROMAN = 99_999

# --------------------------------------------------------------------------------------
# Latin letters and roman numerals
# --------------------------------------------------------------------------------------

_ROMAN = (
    (1000, "m"), (900, "cm"), (500, "d"), (400, "cd"), (100, "c"), (90, "xc"),
    (50, "l"), (40, "xl"), (10, "x"), (9, "ix"), (5, "v"), (4, "iv"), (1, "i"),
)


def _roman(n: int) -> str:
    out = []
    for value, letters in _ROMAN:  # 13 steps; "m" repeats by multiplication
        count, n = divmod(n, value)
        out.append(letters * count)
    return "".join(out)


def _repeated(n: int, alphabet: str) -> str:
    """a..z, aa..zz, aaa...: the letter ``(n-1) % N`` repeated ``(n-1) // N + 1`` times, as
    Word and LibreOffice show letter lists.  Arithmetic, not a loop up to *n*."""
    repeat, index = divmod(n - 1, len(alphabet))
    if repeat >= MAX_REPEATED_CHARS:
        return str(n)
    return alphabet[index] * (repeat + 1)


def _bijective(n: int, alphabet: tuple[str, ...] | str) -> str:
    """a..z, aa, ab, ...: bijective base-N numeration (LibreOffice's Cyrillic, Hebrew,
    Arabic, Devanagari and Thai letter lists).  O(log n)."""
    base = len(alphabet)
    out = []
    while n > 0:
        n, digit = divmod(n - 1, base)
        out.append(alphabet[digit])
    return "".join(reversed(out))


def _cyclic(n: int, alphabet: tuple[str, ...] | str) -> str:
    """The alphabet over and over: after the last letter the first again (LibreOffice's
    Japanese and Korean syllable lists)."""
    return alphabet[(n - 1) % len(alphabet)]


_LATIN = "abcdefghijklmnopqrstuvwxyz"
_RUSSIAN = "абвгдежзиклмнопрстуфхцчшщыэюя"  # LibreOffice's list: no ё, й, ъ, ь
_HEBREW = "אבגדהוזחטיכלמנסעפצקרשת"
_ARABIC_ALPHA = "أبتثجحخدذرزسشصضطظعغفقكلمنهوى"
_ARABIC_ABJAD = "ابجدهوزحطيكلمنسعفصقرشتثخذضظغ"
_DEVANAGARI = "कखगघङचछजझञटठडढणतथदधनपफबभमयरलवशषसह"
_THAI = "กขคงจฉชซฌญฎฏฐฑฒณดตถทธนบปผฝพฟภมยรฤลฦวศษสหฬอฮ"
_AIUEO = "ｱｲｳｴｵｶｷｸｹｺｻｼｽｾｿﾀﾁﾂﾃﾄﾅﾆﾇﾈﾉﾊﾋﾌﾍﾎﾏﾐﾑﾒﾓﾔﾕﾖﾗﾘﾙﾚﾛﾜｦﾝ"
_AIUEO_FULL = "アイウエオカキクケコサシスセソタチツテトナニヌネノハヒフヘホマミムメモヤユヨラリルレロワヲン"
_IROHA = "ｲﾛﾊﾆﾎﾍﾄﾁﾘﾇﾙｦﾜｶﾖﾀﾚｿﾂﾈﾅﾗﾑｳヰﾉｵｸﾔﾏｹﾌｺｴﾃｱｻｷﾕﾒﾐｼヱﾋﾓｾｽﾝ"
_IROHA_FULL = "イロハニホヘトチリヌルヲワカヨタレソツネナラムウヰノオクヤマケフコエテアサキユメミシヱヒモセスン"
_GANADA = "가나다라마바사아자차카타파하"
_CHOSUNG = "ㄱㄴㄷㄹㅁㅂㅅㅇㅈㅊㅋㅌㅍㅎ"
_CHICAGO = "*†‡§"
_HEAVENLY_STEMS = "甲乙丙丁戊己庚辛壬癸"
_EARTHLY_BRANCHES = "子丑寅卯辰巳午未申酉戌亥"

# --------------------------------------------------------------------------------------
# Digits of other scripts, enclosed numbers
# --------------------------------------------------------------------------------------


def _digits(n: int, zero_to_nine: str) -> str:
    return "".join(zero_to_nine[int(d)] for d in str(n))


_FULLWIDTH_DIGITS = "０１２３４５６７８９"
_DEVANAGARI_DIGITS = "०१२३४५६७८९"
_THAI_DIGITS = "๐๑๒๓๔๕๖๗๘๙"
_IDEOGRAPH_DIGITS = "〇一二三四五六七八九"


def _circled(n: int) -> str | None:
    """① .. ㊿ (Unicode's circled numbers 1-50), None above."""
    if 1 <= n <= 20:
        return chr(0x2460 + n - 1)
    if 21 <= n <= 35:
        return chr(0x3251 + n - 21)
    if 36 <= n <= 50:
        return chr(0x32B1 + n - 36)
    return None


# --------------------------------------------------------------------------------------
# East Asian counting systems (the spellings LibreOffice shows)
# --------------------------------------------------------------------------------------


class _Counting:
    """A counting system with units for 10, 100, 1000 and a unit per group of four digits."""

    def __init__(self, digits: str, units: str, myriad: str, *, zero: str | None,
                 one_before_unit: bool, one_before_ten: bool) -> None:
        self.digits = digits  # 1..9 at positions 1..9
        self.units = units  # 10, 100, 1000
        self.myriad = myriad  # 10^4
        self.zero = zero  # written for a gap ("一百零一"), or None (Korean writes nothing)
        self.one_before_unit = one_before_unit  # "一百" rather than "百"
        self.one_before_ten = one_before_ten  # "壹拾" rather than "拾" at the start

    def _group(self, n: int, leading: bool) -> str:
        """0 < n < 10000; *leading*: the first group of the number."""
        out: list[str] = []
        gap = False
        for power in (3, 2, 1, 0):
            d = (n // 10 ** power) % 10
            if d == 0:
                gap = bool(out)
                continue
            if gap and self.zero:
                out.append(self.zero)
            gap = False
            unit = self.units[power - 1] if power else ""
            one_dropped = (d == 1 and power > 0 and (
                not self.one_before_unit
                or (power == 1 and leading and not out and not self.one_before_ten)))
            out.append(("" if one_dropped else self.digits[d]) + unit)
        return "".join(out)

    def __call__(self, n: int) -> str:
        high, low = divmod(n, 10_000)
        text = ""
        if high:
            lone_one = high == 1 and not self.one_before_unit  # Korean: 만, not 일만
            text = ("" if lone_one else self._group(high, True)) + self.myriad
        if low:
            if high and low < 1000 and self.zero:
                text += self.zero
            text += self._group(low, not high)
        return text


_CHINESE = _Counting(" 一二三四五六七八九", "十百千", "万", zero="零", one_before_unit=True,
                     one_before_ten=False)
_CHINESE_LEGAL = _Counting(" 壹贰叁肆伍陆柒捌玖", "拾佰仟", "万", zero="零", one_before_unit=True,
                           one_before_ten=True)
_TAIWANESE_LEGAL = _Counting(" 壹貳參肆伍陸柒捌玖", "拾佰仟", "萬", zero="零", one_before_unit=True,
                             one_before_ten=True)
_KOREAN = _Counting(" 일이삼사오육칠팔구", "십백천", "만", zero=None, one_before_unit=False,
                    one_before_ten=False)

_KOREAN_NATIVE_ONES = ("", "하나", "둘", "셋", "넷", "다섯", "여섯", "일곱", "여덟", "아홉")
_KOREAN_NATIVE_TENS = ("", "열", "스물", "서른", "마흔", "쉰", "예순", "일흔", "여든", "아흔")


def _korean_legal(n: int) -> str:
    """Native Korean numbers below 100 (하나, 둘, ... 아흔아홉), Sino-Korean above."""
    if n < 100:
        tens, ones = divmod(n, 10)
        return _KOREAN_NATIVE_TENS[tens] + _KOREAN_NATIVE_ONES[ones]
    return _KOREAN(n)


_JAPANESE_LEGAL_DIGITS = "零壱弐参四伍六七八九"


def _japanese_legal(n: int) -> str:
    """Digit by digit in the legal ideographs, with 萬 after the ten-thousands (LibreOffice)."""
    high, low = divmod(n, 10_000)
    if not high:
        return _digits(low, _JAPANESE_LEGAL_DIGITS)
    return _digits(high, _JAPANESE_LEGAL_DIGITS) + "萬" + (
        _digits(low, _JAPANESE_LEGAL_DIGITS) if low else "")


# --------------------------------------------------------------------------------------
# Hebrew numerals
# --------------------------------------------------------------------------------------

_HEBREW_VALUES = (
    (400, "ת"), (300, "ש"), (200, "ר"), (100, "ק"), (90, "צ"), (80, "פ"), (70, "ע"),
    (60, "ס"), (50, "נ"), (40, "מ"), (30, "ל"), (20, "כ"), (10, "י"), (9, "ט"), (8, "ח"),
    (7, "ז"), (6, "ו"), (5, "ה"), (4, "ד"), (3, "ג"), (2, "ב"), (1, "א"),
)


def _gematria(n: int) -> str:
    """1..999 in Hebrew letters; 15 and 16 are written 9+6 and 9+7 (טו, טז), never the
    letters of the divine name."""
    out = []
    hundreds_400, n = divmod(n, 400)
    out.append("ת" * hundreds_400)
    for value, letter in _HEBREW_VALUES[1:]:
        if n in (15, 16):
            out.append("ט" + ("ו" if n == 15 else "ז"))
            break
        if n >= value:
            out.append(letter)
            n -= value
    return "".join(out)


def _hebrew_numerals(n: int) -> str:
    thousands, rest = divmod(n, 1000)
    if not thousands:
        return _gematria(rest)
    if not rest:
        return "אלף" if thousands == 1 else _gematria(thousands) + " אלפים"
    return _gematria(thousands) + " " + _gematria(rest)


# --------------------------------------------------------------------------------------
# Words (cardinalText, ordinalText) and ordinals, by language
# --------------------------------------------------------------------------------------

_EN_ONES = (
    "zero", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten",
    "eleven", "twelve", "thirteen", "fourteen", "fifteen", "sixteen", "seventeen", "eighteen",
    "nineteen",
)
_EN_TENS = ("", "", "twenty", "thirty", "forty", "fifty", "sixty", "seventy", "eighty", "ninety")
_EN_ORDINAL_WORDS = {
    "one": "first", "two": "second", "three": "third", "five": "fifth", "eight": "eighth",
    "nine": "ninth", "twelve": "twelfth",
}


def _en_below_thousand(n: int, *, british: bool = False) -> str:
    hundreds, rest = divmod(n, 100)
    parts = []
    if hundreds:
        parts.append(f"{_EN_ONES[hundreds]} hundred")
        if rest and british:
            parts.append("and")  # "one hundred and one" (LibreOffice, en-GB)
    if rest:
        if rest < 20:
            parts.append(_EN_ONES[rest])
        else:
            tens, ones = divmod(rest, 10)
            parts.append(_EN_TENS[tens] + (f"-{_EN_ONES[ones]}" if ones else ""))
    return " ".join(parts)


def _en_cardinal(n: int, *, british: bool = False) -> str:
    thousands, rest = divmod(n, 1000)
    parts = []
    if thousands:
        parts.append(f"{_en_below_thousand(thousands, british=british)} thousand")
    if rest:
        if thousands and rest < 100:
            parts.append("and")  # "one thousand and one", as LibreOffice spells it
        parts.append(_en_below_thousand(rest, british=british))
    return " ".join(parts)


def _en_ordinal_words(n: int, *, british: bool = False) -> str:
    words = _en_cardinal(n, british=british)
    head, sep, last = words.rpartition(" ")
    prefix, dash, final = last.rpartition("-")
    if final in _EN_ORDINAL_WORDS:
        final = _EN_ORDINAL_WORDS[final]
    elif final.endswith("y"):
        final = final[:-1] + "ieth"
    else:
        final += "th"
    return head + sep + prefix + dash + final


def _en_ordinal(n: int) -> str:
    if 10 <= n % 100 <= 20:
        return f"{n}th"
    return f"{n}" + {1: "st", 2: "nd", 3: "rd"}.get(n % 10, "th")


_FR_ONES = ("zéro", "un", "deux", "trois", "quatre", "cinq", "six", "sept", "huit", "neuf", "dix",
            "onze", "douze", "treize", "quatorze", "quinze", "seize")
_FR_TENS = ("", "dix", "vingt", "trente", "quarante", "cinquante", "soixante")


def _fr_below_hundred(n: int) -> str:
    if n <= 16:
        return _FR_ONES[n]
    if n < 20:
        return "dix-" + _FR_ONES[n - 10]
    tens, ones = divmod(n, 10)
    if tens in (7, 9):  # soixante-dix, quatre-vingt-dix: count on from the lower ten
        base = "soixante" if tens == 7 else "quatre-vingt"
        rest = n - (60 if tens == 7 else 80)
        joiner = "-et-" if n == 71 else "-"
        return base + joiner + _fr_below_hundred(rest)
    if tens == 8:
        return "quatre-vingts" if ones == 0 else "quatre-vingt-" + _FR_ONES[ones]
    if ones == 0:
        return _FR_TENS[tens]
    return _FR_TENS[tens] + ("-et-un" if ones == 1 else "-" + _FR_ONES[ones])


def _fr_below_thousand(n: int) -> str:
    hundreds, rest = divmod(n, 100)
    if not hundreds:
        return _fr_below_hundred(rest)
    head = "cent" if hundreds == 1 else _FR_ONES[hundreds] + "-cent" + ("" if rest else "s")
    return head + ("-" + _fr_below_hundred(rest) if rest else "")


def _fr_cardinal(n: int) -> str:
    """French in the hyphenated spelling of the 1990 reform (LibreOffice: "Cent-un")."""
    thousands, rest = divmod(n, 1000)
    if not thousands:
        return _fr_below_thousand(rest)
    head = "mille" if thousands == 1 else _fr_below_thousand(thousands).removesuffix("s") + "-mille"
    return head + ("-" + _fr_below_thousand(rest) if rest else "")


def _fr_ordinal_words(n: int) -> str:
    if n == 1:
        return "premier"
    words = _fr_cardinal(n)
    if words.endswith("cinq"):
        return words + "uième"
    if words.endswith("neuf"):
        return words[:-1] + "vième"
    if words.endswith("e"):
        return words[:-1] + "ième"
    return words + "ième"


_DE_ONES = ("null", "eins", "zwei", "drei", "vier", "fünf", "sechs", "sieben", "acht", "neun",
            "zehn", "elf", "zwölf", "dreizehn", "vierzehn", "fünfzehn", "sechzehn", "siebzehn",
            "achtzehn", "neunzehn")
_DE_TENS = ("", "", "zwanzig", "dreißig", "vierzig", "fünfzig", "sechzig", "siebzig", "achtzig",
            "neunzig")
_DE_SMALL_ORDINALS = ("", "erste", "zweite", "dritte", "vierte", "fünfte", "sechste", "siebte",
                      "achte", "neunte", "zehnte", "elfte", "zwölfte", "dreizehnte", "vierzehnte",
                      "fünfzehnte", "sechzehnte", "siebzehnte", "achtzehnte", "neunzehnte")


def _de_below_hundred(n: int, *, final: bool) -> str:
    if n < 20:
        return "ein" if n == 1 and not final else _DE_ONES[n]
    tens, ones = divmod(n, 10)
    return (("ein" if ones == 1 else _DE_ONES[ones]) + "und" if ones else "") + _DE_TENS[tens]


def _de_below_thousand(n: int, *, final: bool) -> str:
    hundreds, rest = divmod(n, 100)
    head = ("ein" if hundreds == 1 else _DE_ONES[hundreds]) + "hundert" if hundreds else ""
    return head + (_de_below_hundred(rest, final=final) if rest else "")


def _de_cardinal(n: int) -> str:
    thousands, rest = divmod(n, 1000)
    head = _de_below_thousand(thousands, final=False) + "tausend" if thousands else ""
    return head + (_de_below_thousand(rest, final=True) if rest else "")


def _de_ordinal_words(n: int) -> str:
    small = n % 100
    if 1 <= small <= 19:
        return (_de_cardinal(n - small) if n > small else "") + _DE_SMALL_ORDINALS[small]
    return _de_cardinal(n) + "ste"


_RU_ONES = ("ноль", "один", "два", "три", "четыре", "пять", "шесть", "семь", "восемь", "девять",
            "десять", "одиннадцать", "двенадцать", "тринадцать", "четырнадцать", "пятнадцать",
            "шестнадцать", "семнадцать", "восемнадцать", "девятнадцать")
_RU_TENS = ("", "", "двадцать", "тридцать", "сорок", "пятьдесят", "шестьдесят", "семьдесят",
            "восемьдесят", "девяносто")
_RU_HUNDREDS = ("", "сто", "двести", "триста", "четыреста", "пятьсот", "шестьсот", "семьсот",
                "восемьсот", "девятьсот")
_RU_ORD_ONES = ("", "первый", "второй", "третий", "четвёртый", "пятый", "шестой", "седьмой",
                "восьмой", "девятый", "десятый", "одиннадцатый", "двенадцатый", "тринадцатый",
                "четырнадцатый", "пятнадцатый", "шестнадцатый", "семнадцатый", "восемнадцатый",
                "девятнадцатый")
_RU_ORD_TENS = ("", "", "двадцатый", "тридцатый", "сороковой", "пятидесятый", "шестидесятый",
                "семидесятый", "восьмидесятый", "девяностый")
#: Genitive stems of 1..9 that form "двухсотый", "трёхтысячный".
_RU_GENITIVE = ("", "", "двух", "трёх", "четырёх", "пяти", "шести", "семи", "восьми", "девяти")


def _ru_below_thousand(n: int, *, feminine: bool = False) -> list[str]:
    hundreds, rest = divmod(n, 100)
    words = [_RU_HUNDREDS[hundreds]] if hundreds else []
    if rest >= 20:
        tens, rest = divmod(rest, 10)
        words.append(_RU_TENS[tens])
    if rest:
        if feminine and rest in (1, 2):
            words.append("одна" if rest == 1 else "две")
        else:
            words.append(_RU_ONES[rest])
    return words


def _ru_thousands(thousands: int) -> list[str]:
    last, last_two = thousands % 10, thousands % 100
    if last == 1 and last_two != 11:
        noun = "тысяча"
    elif 2 <= last <= 4 and not 12 <= last_two <= 14:
        noun = "тысячи"
    else:
        noun = "тысяч"
    return _ru_below_thousand(thousands, feminine=True) + [noun]


def _ru_cardinal(n: int) -> str:
    thousands, rest = divmod(n, 1000)
    words = _ru_thousands(thousands) if thousands else []
    return " ".join(words + (_ru_below_thousand(rest) if rest else []))


def _ru_ordinal_words(n: int) -> str | None:
    thousands, rest = divmod(n, 1000)
    if rest:
        words = _ru_thousands(thousands) if thousands else []
        hundreds, below = divmod(rest, 100)
        if below:
            words += [_RU_HUNDREDS[hundreds]] if hundreds else []
            if below >= 20 and below % 10:
                words += [_RU_TENS[below // 10], _RU_ORD_ONES[below % 10]]
            elif below >= 20:
                words.append(_RU_ORD_TENS[below // 10])
            else:
                words.append(_RU_ORD_ONES[below])
        else:
            words.append(("" if hundreds == 1 else _RU_GENITIVE[hundreds]) + "сотый")
        return " ".join(words)
    if thousands == 1:
        return "тысячный"
    if thousands < 10:
        return _RU_GENITIVE[thousands] + "тысячный"
    return None  # "двадцатитысячный" and the like: shown in decimal


def _capitalise(words: str) -> str:
    return words[:1].upper() + words[1:]


#: A number shown in one format, or None where the format has no form for it.
_Render = Callable[[int], str | None]
#: A number in words or with a suffix, in one language.
_Words = Callable[[int], str]

_ORDINAL_SUFFIX: dict[str, _Words] = {
    "fr": lambda n: f"{n}ᵉʳ" if n == 1 else f"{n}ᵉ", "de": lambda n: f"{n}.",
    "ru": lambda n: f"{n}-й", "es": lambda n: f"{n}.º"}
_CARDINAL: dict[str, _Words] = {
    "fr": _fr_cardinal, "de": _de_cardinal, "ru": _ru_cardinal,
    "en-gb": lambda n: _en_cardinal(n, british=True)}
_ORDINAL_WORDS: dict[str, _Render] = {
    "fr": _fr_ordinal_words, "de": _de_ordinal_words, "ru": _ru_ordinal_words,
    "en-gb": lambda n: _en_ordinal_words(n, british=True)}


def _language(lang: str | None) -> str:
    """The language of a ``w:lang`` value as the tables key it: "en-gb" for British English
    (which says "one hundred and one"), else the primary subtag ("fr-FR" -> "fr"); "en" when
    none is given."""
    if not lang:
        return "en"
    tag = lang.replace("_", "-").lower()
    return "en-gb" if tag == "en-gb" else tag.split("-", 1)[0]


def _text_format(value: int, num_fmt: str, lang: str) -> str | None:
    if num_fmt == "ordinal":
        return _ORDINAL_SUFFIX.get(lang, _en_ordinal)(value)  # en-gb: "1st" as in en
    if value > MAX_WORDS_NUMBER:
        return None
    if num_fmt == "cardinalText":
        return _capitalise(_CARDINAL.get(lang, _en_cardinal)(value))
    words = _ORDINAL_WORDS.get(lang, _en_ordinal_words)(value)
    return _capitalise(words) if words else None


# --------------------------------------------------------------------------------------
# custom: XSLT 1.0 format tokens
# --------------------------------------------------------------------------------------

_FORMAT_TOKEN = lazy_compile(r"[^\W_]+")


def _custom(value: int, pattern: str | None) -> str:
    token_match = _FORMAT_TOKEN.search(pattern or "")
    token = token_match.group() if token_match else "1"
    if token.isdigit() and token.endswith("1") and set(token[:-1]) <= {"0"}:
        return str(value).zfill(len(token))
    if token == "a":
        return _repeated(value, _LATIN)
    if token == "A":
        return _repeated(value, _LATIN).upper()
    if token in ("i", "I") and value <= MAX_ROMAN:
        roman = _roman(value)
        return roman if token == "i" else roman.upper()
    return str(value)


# --------------------------------------------------------------------------------------
# The table of formats
# --------------------------------------------------------------------------------------

_SIMPLE: dict[str, _Render] = {
    "lowerLetter": lambda n: _repeated(n, _LATIN),
    "upperLetter": lambda n: _repeated(n, _LATIN).upper(),
    "chicago": lambda n: _repeated(n, _CHICAGO),
    "hex": lambda n: f"{n:X}",
    "decimalHalfWidth": str,
    "decimalFullWidth": lambda n: _digits(n, _FULLWIDTH_DIGITS),
    "decimalFullWidth2": lambda n: _digits(n, _FULLWIDTH_DIGITS),
    "hindiNumbers": lambda n: _digits(n, _DEVANAGARI_DIGITS),
    "thaiNumbers": lambda n: _digits(n, _THAI_DIGITS),
    "taiwaneseDigital": lambda n: _digits(n, _IDEOGRAPH_DIGITS),
    "japaneseDigitalTenThousand": lambda n: _digits(n, _IDEOGRAPH_DIGITS),
    "numberInDash": lambda n: f"- {n} -",
    "decimalEnclosedCircle": _circled,
    "decimalEnclosedCircleChinese": _circled,
    "ideographEnclosedCircle": _circled,
    "decimalEnclosedFullstop": lambda n: chr(0x2488 + n - 1) if n <= 20 else None,
    "decimalEnclosedParen": lambda n: chr(0x2474 + n - 1) if n <= 20 else None,
    "ideographTraditional": lambda n: _HEAVENLY_STEMS[n - 1] if n <= 10 else None,
    "ideographZodiac": lambda n: _EARTHLY_BRANCHES[n - 1] if n <= 12 else None,
    "ideographZodiacTraditional": lambda n: (_HEAVENLY_STEMS[(n - 1) % 10]
                                             + _EARTHLY_BRANCHES[(n - 1) % 12]) if n <= 60 else None,
    "ideographDigital": _CHINESE,
    "japaneseCounting": _CHINESE,
    "taiwaneseCounting": _CHINESE,
    "taiwaneseCountingThousand": _CHINESE,
    "chineseCounting": _CHINESE,
    "chineseCountingThousand": _CHINESE,
    "chineseLegalSimplified": _CHINESE_LEGAL,
    "ideographLegalTraditional": _TAIWANESE_LEGAL,
    "japaneseLegal": _japanese_legal,
    "koreanCounting": _KOREAN,
    "koreanLegal": _korean_legal,
    "koreanDigital": lambda n: _digits(n, "영일이삼사오육칠팔구"),
    "koreanDigital2": lambda n: _digits(n, "零一二三四五六七八九"),
    "aiueo": lambda n: _cyclic(n, _AIUEO),
    "aiueoFullWidth": lambda n: _cyclic(n, _AIUEO_FULL),
    "iroha": lambda n: _cyclic(n, _IROHA),
    "irohaFullWidth": lambda n: _cyclic(n, _IROHA_FULL),
    "ganada": lambda n: _cyclic(n, _GANADA),
    "chosung": lambda n: _cyclic(n, _CHOSUNG),
    "russianLower": lambda n: _bijective(n, _RUSSIAN),
    # LibreOffice capitalises only the first letter: 30 -> "Аа".
    "russianUpper": lambda n: _capitalise(_bijective(n, _RUSSIAN)),
    "hebrew1": _hebrew_numerals,
    "hebrew2": lambda n: _bijective(n, _HEBREW),
    "arabicAlpha": lambda n: _bijective(n, _ARABIC_ALPHA),
    "arabicAbjad": lambda n: _bijective(n, _ARABIC_ABJAD),
    "hindiVowels": lambda n: _bijective(n, _DEVANAGARI),
    "thaiLetters": lambda n: _bijective(n, _THAI),
}


def format_number(value: int, num_fmt: str, *, lang: str | None = None,
                  custom: str | None = None) -> str:
    """*value* rendered in ST_NumberFormat *num_fmt* (ECMA-376 Part 1 §17.18.59).

    *lang* is the paragraph's language (``w:lang``, e.g. "fr-FR") for the text formats;
    *custom* the ``w:format`` pattern of a ``custom`` format.  An unknown format shows
    decimal.
    """
    if num_fmt == "none" or num_fmt in BULLET_FORMATS:
        return ""
    if num_fmt == "decimalZero":
        return f"{value:02d}" if 1 <= value < 10 else str(value)
    if value < 1:
        return str(value)
    if num_fmt == "custom":
        return _custom(value, custom)
    if num_fmt in ("lowerRoman", "upperRoman"):
        if value > MAX_ROMAN:
            return str(value)
        roman = _roman(value)
        return roman if num_fmt == "lowerRoman" else roman.upper()
    if num_fmt in ("ordinal", "cardinalText", "ordinalText"):
        shown = _text_format(value, num_fmt, _language(lang))
        return shown if shown is not None else str(value)
    render = _SIMPLE.get(num_fmt)
    shown = render(value) if render is not None else None
    return shown if shown is not None else str(value)
