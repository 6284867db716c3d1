"""Real agreement texts as .docx files that look like the ones other people send.

Source of the words: license texts of the PyPI package ``licensedcode-data`` (the ScanCode
license database; :mod:`tests.support.legal_texts`).  They are read as plain text, their
literal labels ("1.", "3.2.", "(a)") are moved into real Word auto-numbering
(``core.docx.compose``: the numbers live in numbering.xml, ECMA-376 Part 1 §17.9), and then
the paragraphs are *roughened* the way edited files are, each feature written as ECMA-376
Part 1 defines it:

* ``split`` -- every paragraph's text cut into runs at random places, words included, with
  run properties that differ from run to run but are not emphasis (colour, language,
  no-proofing: §17.3.2), as a word processor leaves them after edits and spell checks;
* ``hyperlink`` -- a few words wrapped in ``w:hyperlink`` (§17.16.22) with an external
  relationship;
* ``field`` -- a few words shown as the result of a complex field (``w:fldChar``
  begin/separate/end around ``w:instrText``, §17.16.18), a HYPERLINK field so that a word
  processor keeps its result text;
* ``comment`` -- a few words under an existing comment by another reviewer
  (``w:commentRangeStart``/``End`` and the reference run, §17.13.4);
* ``tracked`` -- a few words inside an existing tracked insertion by another author
  (``w:ins``, §17.13.5.18).  Their text is part of the draft as a reader sees it (changes
  accepted).

The generator is deterministic for a given seed.  The XML work here builds test inputs
only; the application's own .docx code lives in ``core.docx``.
"""

from __future__ import annotations

import io
import random
import re
import zipfile
from collections.abc import Iterable, Sequence
from copy import deepcopy

from lxml import etree

from core.docx.compose import ComposeParagraph, compose_docx
from core.docx.validate import COMMENTS_CT, COMMENTS_REL
from core.reader import read_text
from core.structure import parse_label
from tests.support.legal_texts import license_text

__all__ = ["FEATURES", "house_style", "licence_paragraphs", "licence_docx", "roughen", "smart_quotes"]

W = "http://schemas.openxmlformats.org/wordprocessingml/2006/main"
R = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
PKG_REL = "http://schemas.openxmlformats.org/package/2006/relationships"
HYPERLINK_REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships/hyperlink"
CT_NS = "http://schemas.openxmlformats.org/package/2006/content-types"
XML_SPACE = "{http://www.w3.org/XML/1998/namespace}space"

FEATURES = ("split", "hyperlink", "field", "comment", "tracked")

#: Clause numbering of the converted texts: dotted decimals by depth, then (a) and (i).
LISTS = {"main": [("decimal", "%1."), ("decimal", "%1.%2."), ("decimal", "%1.%2.%3."),
                  ("lowerLetter", "(%4)"), ("lowerRoman", "(%5)")]}
_LIST_LEVEL = {"paren-lower-letter": 3, "paren-lower-roman": 4}


def _w(tag: str) -> str:
    return f"{{{W}}}{tag}"


def licence_paragraphs(name: str, *, text: str | None = None) -> list[ComposeParagraph]:
    """The paragraphs of licensedcode-data's ``<name>.LICENSE`` (or of *text*, an edited copy
    of it) with dotted-decimal, "(a)" and "(i)" labels moved into auto-numbering.  A text
    whose numbering starts at 0 keeps its literal labels (a list starts at 1)."""
    doc = read_text(text if text is not None else license_text(name), source=f"{name}.txt")
    out = []
    for b in doc.blocks:
        label = parse_label(b.text)
        level = None
        if label is not None and label.scheme == "dec" and label.comps and label.comps[0] > 0 \
                and len(label.comps) <= 3:
            level = len(label.comps) - 1
        elif label is not None and label.scheme in _LIST_LEVEL:
            level = _LIST_LEVEL[label.scheme]
        if level is None:
            out.append(ComposeParagraph(b.text, bold=b.emphasised))
        else:
            out.append(ComposeParagraph(b.text[label.end:].strip(), level=level, bold=b.emphasised))
    return out


def licence_docx(name: str, *, text: str | None = None, seed: int | None = None,
                 features: Iterable[str] = FEATURES) -> bytes:
    """A .docx of the licence (or of *text*), roughened with *seed* unless it is None."""
    data = compose_docx(licence_paragraphs(name, text=text), lists=LISTS)
    return data if seed is None else roughen(data, seed=seed, features=features)


# --------------------------------------------------------------------------------------
# Roughening
# --------------------------------------------------------------------------------------

def _rpr_variants(base: etree._Element | None) -> list[etree._Element]:
    """Run properties that look the same to a reader of the words: colour, language, no
    proofing (ECMA-376 Part 1 §17.3.2.6, §17.3.2.20, §17.3.2.21), on top of *base*."""
    out = []
    for extra in ('<w:color w:val="1F1F1F"/>', '<w:lang w:val="en-GB"/>', "<w:noProof/>", ""):
        rpr = deepcopy(base) if base is not None else etree.Element(_w("rPr"))
        if extra:
            rpr.append(etree.fromstring(f'<x xmlns:w="{W}">{extra}</x>')[0])
        out.append(rpr)
    return out


def _split_runs(p: etree._Element, rng: random.Random) -> None:
    """Cut each plain text run of *p* into runs of 1-9 characters, words included."""
    for run in list(p.iter(_w("r"))):
        kids = [k for k in run if k.tag != _w("rPr")]
        if len(kids) != 1 or kids[0].tag != _w("t") or not kids[0].text:
            continue
        text = kids[0].text
        base = run.find(_w("rPr"))
        variants = _rpr_variants(base)
        pos, prev = 0, run
        pieces = []
        while pos < len(text):
            step = rng.randint(1, 9)
            pieces.append(text[pos:pos + step])
            pos += step
        for k, piece in enumerate(pieces):
            new = etree.Element(_w("r"))
            new.append(deepcopy(variants[k % len(variants)]))
            t = etree.SubElement(new, _w("t"))
            t.text = piece
            t.set(XML_SPACE, "preserve")
            prev.addnext(new)
            prev = new
        run.getparent().remove(run)


def _word_runs(p: etree._Element, rng: random.Random) -> list[etree._Element] | None:
    """A few consecutive runs of *p* that are direct children of it (not in a wrapper)."""
    runs = [r for r in p if r.tag == _w("r") and r.find(_w("t")) is not None]
    if len(runs) < 6:
        return None
    i = rng.randrange(1, len(runs) - 4)
    return runs[i:i + rng.randint(1, 3)]


def _wrap(runs: Sequence[etree._Element], wrapper: etree._Element) -> None:
    runs[0].addprevious(wrapper)
    for r in runs:
        wrapper.append(r)


def _field(runs: Sequence[etree._Element]) -> None:
    """Make *runs* the result of a HYPERLINK complex field (§17.16.18, §17.16.5.25)."""
    def char_run(kind: str) -> etree._Element:
        r = etree.Element(_w("r"))
        etree.SubElement(r, _w("fldChar"), {_w("fldCharType"): kind})
        return r

    instr = etree.Element(_w("r"))
    code = etree.SubElement(instr, _w("instrText"))
    code.text = ' HYPERLINK "https://example.invalid/terms" '
    code.set(XML_SPACE, "preserve")
    runs[0].addprevious(char_run("begin"))
    runs[0].addprevious(instr)
    runs[0].addprevious(char_run("separate"))
    runs[-1].addnext(char_run("end"))


def roughen(data: bytes, *, seed: int, features: Iterable[str] = FEATURES) -> bytes:
    """*data* (a .docx) with its paragraphs roughened (see the module's list)."""
    chosen = set(features)
    rng = random.Random(seed)
    zin = zipfile.ZipFile(io.BytesIO(data))
    root = etree.fromstring(zin.read("word/document.xml"))
    rels = etree.fromstring(zin.read("word/_rels/document.xml.rels"))
    types = etree.fromstring(zin.read("[Content_Types].xml"))
    comments = []
    link_id = None
    if "hyperlink" in chosen:
        link_id = "rIdRough1"
        etree.SubElement(rels, f"{{{PKG_REL}}}Relationship", Id=link_id, Type=HYPERLINK_REL,
                         Target="https://example.invalid/", TargetMode="External")
    for n, p in enumerate(root.iter(_w("p"))):
        if "split" in chosen:
            _split_runs(p, rng)
        kind = ("hyperlink", "field", "comment", "tracked")[n % 4]
        if kind not in chosen or rng.random() < 0.5:
            continue
        runs = _word_runs(p, rng)
        if runs is None:
            continue
        if kind == "hyperlink":
            _wrap(runs, etree.Element(_w("hyperlink"), {f"{{{R}}}id": link_id}))
        elif kind == "field":
            _field(runs)
        elif kind == "tracked":
            _wrap(runs, etree.Element(_w("ins"), {_w("id"): str(900 + n), _w("author"): "Other Reviewer",
                                                  _w("date"): "2026-01-05T10:00:00Z"}))
        else:
            cid = str(len(comments) + 500)
            runs[0].addprevious(etree.Element(_w("commentRangeStart"), {_w("id"): cid}))
            runs[-1].addnext(etree.Element(_w("commentRangeEnd"), {_w("id"): cid}))
            ref = etree.Element(_w("r"))
            etree.SubElement(ref, _w("commentReference"), {_w("id"): cid})
            runs[-1].getnext().addnext(ref)
            comments.append(cid)
    replaced = {"word/document.xml": etree.tostring(root, xml_declaration=True, encoding="UTF-8",
                                                    standalone=True)}
    added = {}
    if comments:
        part = etree.Element(_w("comments"), nsmap={"w": W})
        for cid in comments:
            c = etree.SubElement(part, _w("comment"), {_w("id"): cid, _w("author"): "Other Reviewer",
                                                       _w("date"): "2026-01-05T10:00:00Z"})
            cp = etree.SubElement(c, _w("p"))
            t = etree.SubElement(etree.SubElement(cp, _w("r")), _w("t"))
            t.text = "Please check this wording."
        added["word/comments.xml"] = etree.tostring(part, xml_declaration=True, encoding="UTF-8",
                                                    standalone=True)
        etree.SubElement(rels, f"{{{PKG_REL}}}Relationship", Id="rIdRough2", Type=COMMENTS_REL,
                         Target="comments.xml")
        etree.SubElement(types, f"{{{CT_NS}}}Override", PartName="/word/comments.xml",
                         ContentType=COMMENTS_CT)
    replaced["word/_rels/document.xml.rels"] = etree.tostring(rels, xml_declaration=True,
                                                              encoding="UTF-8", standalone=True)
    replaced["[Content_Types].xml"] = etree.tostring(types, xml_declaration=True, encoding="UTF-8",
                                                     standalone=True)
    return _repacked(zin, replaced, added)


def smart_quotes(text: str) -> str:
    """*text* with straight quotes turned into typographic ones, as word processors do
    while typing (opening after a space or bracket, closing elsewhere; common practice, no
    source)."""
    text = re.sub(r'(^|[\s(\[])"', "\\1\u201c", text)
    text = text.replace('"', "\u201d")
    text = re.sub(r"(^|[\s(\[])'", "\\1\u2018", text)
    return text.replace("'", "\u2019")


# --------------------------------------------------------------------------------------
# House styles: how another firm sets the same words
# --------------------------------------------------------------------------------------

HEADER_CT = "application/vnd.openxmlformats-officedocument.wordprocessingml.header+xml"
FOOTER_CT = "application/vnd.openxmlformats-officedocument.wordprocessingml.footer+xml"
HEADER_REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships/header"
FOOTER_REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships/footer"


def _field_runs(parent: etree._Element, code: str) -> None:
    """A simple field (``w:fldSimple``, ECMA-376 Part 1 §17.16.19) showing *code*'s result."""
    fld = etree.SubElement(parent, _w("fldSimple"), {_w("instr"): f" {code} "})
    t = etree.SubElement(etree.SubElement(fld, _w("r")), _w("t"))
    t.text = "1"


def _hdr_ftr(tag: str, text: str, *, page_numbers: bool) -> bytes:
    """A header or footer part (§17.10.3, §17.10.4) with one paragraph: *text*, then "Page N
    of M" from PAGE and NUMPAGES fields (§17.16.5.43, §17.16.5.37) when asked."""
    root = etree.Element(_w(tag), nsmap={"w": W})
    p = etree.SubElement(root, _w("p"))
    t = etree.SubElement(etree.SubElement(p, _w("r")), _w("t"))
    t.text = text + (" \u2013 Page " if page_numbers else "")
    t.set(XML_SPACE, "preserve")
    if page_numbers:
        _field_runs(p, "PAGE")
        t2 = etree.SubElement(etree.SubElement(p, _w("r")), _w("t"))
        t2.text = " of "
        t2.set(XML_SPACE, "preserve")
        _field_runs(p, "NUMPAGES")
    return etree.tostring(root, xml_declaration=True, encoding="UTF-8", standalone=True)


def house_style(data: bytes, *, spacing_after: int | None = None, font: str | None = None,
                size: int | None = None, justify: bool = False, header: str | None = None,
                footer: str | None = None, page_numbers: bool = False) -> bytes:
    """*data* (a .docx) set in another house style, the words untouched: space after each
    paragraph in twentieths of a point (``w:spacing/@w:after``, §17.3.1.33; 0 = none), the
    body font and size in half-points (``w:rFonts``, ``w:sz``, §17.3.2.26, §17.3.2.38, in the
    document defaults §17.7.5), justified paragraphs (``w:jc`` both, §17.3.1.13), and a
    running header and footer on every page (§17.10) whose footer can end with "Page N of M"."""
    zin = zipfile.ZipFile(io.BytesIO(data))
    styles = etree.fromstring(zin.read("word/styles.xml"))
    document = etree.fromstring(zin.read("word/document.xml"))
    rels = etree.fromstring(zin.read("word/_rels/document.xml.rels"))
    types = etree.fromstring(zin.read("[Content_Types].xml"))
    defaults = styles.find(_w("docDefaults"))
    ppr = defaults.find(f"{_w('pPrDefault')}/{_w('pPr')}")
    rpr = defaults.find(f"{_w('rPrDefault')}/{_w('rPr')}")
    if spacing_after is not None:
        spacing = ppr.find(_w("spacing"))
        spacing.set(_w("after"), str(spacing_after))
    if font is not None:
        fonts = rpr.find(_w("rFonts"))
        for attr in list(fonts.attrib):
            del fonts.attrib[attr]
        for attr in ("ascii", "hAnsi", "cs", "eastAsia"):
            fonts.set(_w(attr), font)
    if size is not None:
        rpr.find(_w("sz")).set(_w("val"), str(size))
        rpr.find(_w("szCs")).set(_w("val"), str(size))
    if justify:
        for p in document.iter(_w("p")):
            pp = p.find(_w("pPr"))
            if pp is None:
                pp = etree.Element(_w("pPr"))
                p.insert(0, pp)
            pp.append(etree.Element(_w("jc"), {_w("val"): "both"}))
    added: dict[str, bytes] = {}
    sect = document.find(f"{_w('body')}/{_w('sectPr')}")
    for tag, text, ct, rel, name in (("hdr", header, HEADER_CT, HEADER_REL, "header1.xml"),
                                     ("ftr", footer, FOOTER_CT, FOOTER_REL, "footer1.xml")):
        if text is None:
            continue
        added[f"word/{name}"] = _hdr_ftr(tag, text, page_numbers=page_numbers and tag == "ftr")
        rid = f"rIdHouse{tag}"
        etree.SubElement(rels, f"{{{PKG_REL}}}Relationship", Id=rid, Type=rel, Target=name)
        etree.SubElement(types, f"{{{CT_NS}}}Override", PartName=f"/word/{name}", ContentType=ct)
        ref = "headerReference" if tag == "hdr" else "footerReference"
        sect.insert(0, etree.Element(_w(ref), {_w("type"): "default", f"{{{R}}}id": rid}))
    replaced = {name: etree.tostring(el, xml_declaration=True, encoding="UTF-8", standalone=True)
                for name, el in (("word/styles.xml", styles), ("word/document.xml", document),
                                 ("word/_rels/document.xml.rels", rels), ("[Content_Types].xml", types))}
    return _repacked(zin, replaced, added)


def _repacked(zin: zipfile.ZipFile, replaced: dict[str, bytes], added: dict[str, bytes]) -> bytes:
    """The package of *zin* with the parts in *replaced* swapped and *added* appended."""
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as zout:
        for info in zin.infolist():
            zout.writestr(info.filename, replaced.get(info.filename, zin.read(info)))
        for name, payload in added.items():
            zout.writestr(name, payload)
    return out.getvalue()
