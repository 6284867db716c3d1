"""Small .docx files for tests, built with python-docx (package, styles) plus inline
WordprocessingML (ECMA-376 Part 1) for the parts under test.

Inline XML uses the ``w:`` prefix for the WordprocessingML main namespace; :data:`W_DECL`
declares it.
"""

from __future__ import annotations

import io
import os
from collections.abc import Mapping

import docx
from docx.oxml import parse_xml
from lxml import etree

__all__ = ["W", "W_DECL", "body_element", "build_docx", "docx_bytes"]

W = "http://schemas.openxmlformats.org/wordprocessingml/2006/main"
W_DECL = f'xmlns:w="{W}"'


def body_element(inner: str) -> etree._Element:
    """A ``w:document`` element whose body holds *inner* (paragraphs, tables, ...)."""
    return etree.fromstring(f"<w:document {W_DECL}><w:body>{inner}</w:body></w:document>")


def docx_bytes(
    body: str,
    *,
    numbering: str | None = None,
    style_numbering: Mapping[str, tuple[str, int | None]] | None = None,
    extra_styles: str = "",
    default_lang: str | None = None,
) -> bytes:
    """A .docx whose body is *body* (inline XML).

    *numbering* is the inner XML of ``w:numbering`` (abstractNum and num elements);
    *style_numbering* maps a paragraph style id of python-docx's default template (e.g.
    "Heading1") to the (numId, ilvl) its ``w:pPr/w:numPr`` should carry (ilvl None = leave it
    out); *extra_styles* is appended to ``w:styles`` (inline ``w:style`` elements);
    *default_lang* sets the document's language (``w:docDefaults`` ``w:lang``, e.g. "fr-FR").
    """
    document = docx.Document()
    body_el = document.element.body
    sect = None
    for child in list(body_el):
        if child.tag == f"{{{W}}}sectPr":
            sect = child
        else:
            body_el.remove(child)
    for child in body_element(body).find(f"{{{W}}}body"):
        if sect is not None:
            sect.addprevious(child)
        else:
            body_el.append(child)
    if numbering is not None:
        document.part.numbering_part._element = parse_xml(
            f"<w:numbering {W_DECL}>{numbering}</w:numbering>"
        )
    styles = document.styles.element
    if extra_styles:
        for el in etree.fromstring(f"<w:styles {W_DECL}>{extra_styles}</w:styles>"):
            styles.append(parse_xml(etree.tostring(el)))
    for style_id, (num_id, ilvl) in (style_numbering or {}).items():
        style = styles.find(f"{{{W}}}style[@{{{W}}}styleId='{style_id}']")
        if style is None:
            raise KeyError(style_id)
        ppr = style.find(f"{{{W}}}pPr")
        if ppr is None:
            ppr = parse_xml(f"<w:pPr {W_DECL}/>")
            style.append(ppr)
        level = f'<w:ilvl w:val="{ilvl}"/>' if ilvl is not None else ""
        # CT_PPrBase order (ECMA-376 Part 1 §17.3.1.26): numPr follows these five.
        before = {f"{{{W}}}{n}" for n in ("pStyle", "keepNext", "keepLines", "pageBreakBefore",
                                          "framePr", "widowControl")}
        index = sum(1 for child in ppr if child.tag in before)
        ppr.insert(index, parse_xml(
            f'<w:numPr {W_DECL}>{level}<w:numId w:val="{num_id}"/></w:numPr>'))
    if default_lang is not None:
        # The document's language (ECMA-376 Part 1 §17.3.2.20 w:lang in w:docDefaults).
        lang = styles.find(f"{{{W}}}docDefaults/{{{W}}}rPrDefault/{{{W}}}rPr/{{{W}}}lang")
        if lang is None:
            raise KeyError("w:docDefaults has no w:lang")
        lang.set(f"{{{W}}}val", default_lang)
    out = io.BytesIO()
    document.save(out)
    return out.getvalue()


def build_docx(path: str | os.PathLike[str], body: str, **kwargs: object) -> str:
    """Write :func:`docx_bytes` to *path* and return the path as a string."""
    data = docx_bytes(body, **kwargs)  # type: ignore[arg-type]
    with open(path, "wb") as fh:
        fh.write(data)
    return os.fspath(path)
