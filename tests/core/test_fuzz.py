"""Mutated .docx files: the reader and the review never crash, never hang, refuse in one line.

Inputs: the invented demo agreements and licence texts of the PyPI package
``licensedcode-data`` (mpl-2.0, gpl-3.0) written to .docx with real auto-numbering and
roughened (``tests/support/licence_docx.py``).  Each variant changes the XML of the main
document, numbering or styles part in one of the ways a damaged or hostile file does:

* an element deleted, or duplicated in place;
* an attribute set to a limit of its type or beyond it (ECMA-376 Part 1 §17.18: ST_DecimalNumber
  values such as ``w:start``, ``w:ilvl``, ``w:val`` of 0, -1, 2^31 - 1, 2^31, 10^12, 10^30,
  an empty or non-numeric value);
* random bytes in a text node (XML 1.0 forbids some: the part must then be refused).

Each variant is read with :func:`core.reader.read_document` and reviewed against the
original with :func:`core.review.run_review`, with a time limit.  Allowed outcomes: a result,
or a :class:`core.errors.CounterdraftError` whose message is one line.  The default run tries
150 variants; ``-m slow`` tries several thousand.
"""

from __future__ import annotations

import io
import random
import signal
import time
import zipfile
from pathlib import Path

import pytest
from lxml import etree

from core.errors import CounterdraftError
from core.reader import read_document
from core.review import run_review
from tests.support.licence_docx import licence_docx

DEMO = Path(__file__).resolve().parents[2] / "demo_agreements"
#: Seconds one variant may take (read and review); the originals take well under one.
VARIANT_LIMIT_S = 10
PARTS = ("word/document.xml", "word/numbering.xml", "word/styles.xml")
LIMIT_VALUES = ("0", "-1", "2147483647", "2147483648", "1000000000000",
                "1000000000000000000000000000000", "", "x", "1e9", "٣")


class _Timeout(Exception):
    pass


def _alarm(_signum, _frame):
    raise _Timeout


def _mutate(root: etree._Element, rng: random.Random) -> None:
    elements = list(root.iter())
    if len(elements) < 2:
        return
    el = rng.choice(elements[1:])
    kind = rng.randrange(4)
    if kind == 0 and el.getparent() is not None:
        el.getparent().remove(el)
    elif kind == 1 and el.getparent() is not None:
        el.addnext(etree.fromstring(etree.tostring(el)))
    elif kind == 2:
        with_attrs = [e for e in elements if e.attrib]
        if with_attrs:
            target = rng.choice(with_attrs)
            name = rng.choice(list(target.attrib))
            target.set(name, rng.choice(LIMIT_VALUES))
    else:
        with_text = [e for e in elements if e.text]
        if with_text:
            target = rng.choice(with_text)
            # bytes XML can carry here; those it cannot are planted in the raw part below
            noise = "".join(chr(rng.choice((rng.randrange(0x20, 0x7F), rng.randrange(0xA0, 0xD7FF))))
                            for _ in range(rng.randint(1, 6)))
            target.text = target.text + noise


def _variant(data: bytes, rng: random.Random) -> bytes:
    zin = zipfile.ZipFile(io.BytesIO(data))
    names = [n for n in PARTS if n in zin.namelist()]
    part = rng.choice(names)
    root = etree.fromstring(zin.read(part))
    for _ in range(rng.randint(1, 3)):
        _mutate(root, rng)
    payload = etree.tostring(root, xml_declaration=True, encoding="UTF-8")
    if rng.random() < 0.1:  # raw bytes XML 1.0 cannot carry
        payload = payload.replace(b"<w:t", b"<w:t\x01", 1)
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as zout:
        for info in zin.infolist():
            zout.writestr(info.filename, payload if info.filename == part else zin.read(info))
    return out.getvalue()


@pytest.fixture(scope="module")
def originals(tmp_path_factory):
    folder = tmp_path_factory.mktemp("fuzz-originals")
    sources = {"demo-draft": (DEMO / "draft.docx").read_bytes(),
               "mpl-2.0": licence_docx("mpl-2.0", seed=3),
               "gpl-3.0": licence_docx("gpl-3.0", seed=4)}
    out = {}
    for name, data in sources.items():
        path = folder / f"{name}.docx"
        path.write_bytes(data)
        out[name] = (data, read_document(str(path)))
    return out


def _fuzz(originals, tmp_path, count: int, seed: int) -> dict[str, int]:
    rng = random.Random(seed)
    outcomes = {"read": 0, "refused": 0}
    previous = signal.signal(signal.SIGALRM, _alarm)
    try:
        for n in range(count):
            name = rng.choice(sorted(originals))
            data, original = originals[name]
            path = tmp_path / f"variant-{n % 50}.docx"
            path.write_bytes(_variant(data, rng))
            signal.alarm(VARIANT_LIMIT_S)
            started = time.monotonic()
            try:
                doc = read_document(str(path))
                run_review(doc, original)
                outcomes["read"] += 1
            except CounterdraftError as err:
                assert "\n" not in str(err) and str(path) in str(err), str(err)
                outcomes["refused"] += 1
            except _Timeout:
                raise AssertionError(f"variant {n} of {name} took over {VARIANT_LIMIT_S} s") from None
            finally:
                signal.alarm(0)
            assert time.monotonic() - started < VARIANT_LIMIT_S
    finally:
        signal.signal(signal.SIGALRM, previous)
    return outcomes


def test_mutated_documents_are_read_or_refused_in_one_line(originals, tmp_path):
    outcomes = _fuzz(originals, tmp_path, 150, seed=2026)
    assert outcomes["read"] > 0 and sum(outcomes.values()) == 150


@pytest.mark.slow
def test_thousands_of_mutated_documents(originals, tmp_path):
    started = time.monotonic()
    outcomes = _fuzz(originals, tmp_path, 4000, seed=11)
    print(f"fuzz: {outcomes} in {time.monotonic() - started:.0f} s")
    assert sum(outcomes.values()) == 4000
