"""Markup Compatibility (ECMA-376 Part 3): which branch of ``mc:AlternateContent`` to read.

An ``mc:AlternateContent`` element holds one or more ``mc:Choice`` branches, each naming the
namespaces it ``Requires``, and usually one ``mc:Fallback``.  A consumer reads the first
choice whose required namespaces it understands, else the fallback (Part 3 §10.2).  The
reader understands the Word 2010-2016 WordprocessingML extensions (``w14``, ``w15``, ...),
which carry nothing our text needs to skip: Word 2010 stores a custom list format
("00001, 00002, ...") in a ``w14`` choice with a plain ``decimal`` fallback.  Drawing and
shape namespaces are not understood, so a text box is read from neither branch (text boxes
are not blocks).
"""

from __future__ import annotations

from lxml import etree

__all__ = ["MC_NS", "UNDERSTOOD_NAMESPACES", "alternate_branch"]

MC_NS = "http://schemas.openxmlformats.org/markup-compatibility/2006"
_CHOICE = f"{{{MC_NS}}}Choice"
_FALLBACK = f"{{{MC_NS}}}Fallback"

#: Namespaces whose content the reader handles like WordprocessingML: the Word 2010+
#: extensions of the main namespace (their elements are either text we read or properties
#: we ignore).  Office's own namespace URIs, as Word writes them.
UNDERSTOOD_NAMESPACES = frozenset({
    "http://schemas.microsoft.com/office/word/2010/wordml",
    "http://schemas.microsoft.com/office/word/2012/wordml",
    "http://schemas.microsoft.com/office/word/2015/wordml/symex",
    "http://schemas.microsoft.com/office/word/2016/wordml/cid",
    "http://schemas.microsoft.com/office/word/2018/wordml",
    "http://schemas.microsoft.com/office/word/2018/wordml/cex",
    "http://schemas.microsoft.com/office/word/2020/wordml/sdtdatahash",
    "http://schemas.microsoft.com/office/word/2023/wordml/word16du",
})


def alternate_branch(alternate: etree._Element) -> etree._Element | None:
    """The ``mc:Choice`` or ``mc:Fallback`` child of *alternate* a reader takes, or None."""
    for child in alternate:
        if child.tag == _CHOICE:
            prefixes = (child.get("Requires") or "").split()
            nsmap = child.nsmap
            if prefixes and all(nsmap.get(p) in UNDERSTOOD_NAMESPACES for p in prefixes):
                return child
        elif child.tag == _FALLBACK:
            return child
    return None
