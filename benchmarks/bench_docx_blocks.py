"""Benchmark: the .docx paragraph reader (``core.docx.blocks.read_docx_blocks``) on a
Word-like heavy document.

``bench_read.py`` measures the whole reader on a compact generated agreement.  Documents
saved by Word are much heavier per word: every few words start a new run carrying revision
ids (``w:rsidR``), fonts, sizes and languages; proofing marks and bookmarks sit between runs;
negotiated drafts carry tracked changes and cross-reference fields.  This script generates
such a document (~100 pages, ~45,000 words, ~400 auto-numbered paragraphs, tables, tracked
changes, fields) and prints the read time (best of 3) and peak memory.

Targets (foundation issue, 2-core machine): well under 1.0 s; <= 200 MB.
Run: ``python benchmarks/bench_docx_blocks.py [--pages N] [--seed S]``.
"""

from __future__ import annotations

import io
import random
import tempfile
import zipfile
from pathlib import Path

# _measure first: importing it puts the repository root on sys.path.
from _measure import argument_parser, best_of, peak_rss_mb, traced_peak_mb

from core.docx.blocks import read_docx_blocks

TARGET_SECONDS = 1.0
TARGET_MB = 200.0
REPEATS = 3
#: ~450 words per page of a contract in 11-point type (common practice, no source).
WORDS_PER_PAGE = 450
#: Words per run: Word starts a new run at every edit session, proofing mark or format change.
WORDS_PER_RUN = 6
NUMBERED_PER_PAGE = 4

W = "http://schemas.openxmlformats.org/wordprocessingml/2006/main"
_VOCAB = ("the supplier shall deliver goods customer agreement price payment within days "
          "of notice party parties any all such terms liability confidential information "
          "obligations reasonable written consent termination breach material period").split()


def _run(rng: random.Random, words: list[str], *, bold: bool = False) -> str:
    rsid = f"{rng.randrange(16**8):08X}"
    rpr = ('<w:rPr><w:rFonts w:ascii="Arial" w:hAnsi="Arial" w:cs="Arial"/>'
           + ("<w:b/><w:bCs/>" if bold else "")
           + '<w:sz w:val="22"/><w:szCs w:val="22"/><w:lang w:val="en-GB"/></w:rPr>')
    return (f'<w:r w:rsidR="{rsid}" w:rsidRPr="{rsid}">{rpr}'
            f'<w:t xml:space="preserve">{" ".join(words)} </w:t></w:r>')


def _paragraph(rng: random.Random, n_words: int, *, numbered: int | None, lead: bool,
               revision: int) -> str:
    words = [rng.choice(_VOCAB) for _ in range(n_words)]
    parts = []
    if lead:
        parts.append(_run(rng, ["Heading", "Words."], bold=True))
    for i in range(0, len(words), WORDS_PER_RUN):
        chunk = words[i:i + WORDS_PER_RUN]
        if i and rng.random() < 0.08:
            parts.append('<w:proofErr w:type="spellStart"/>')
        if rng.random() < 0.03:
            parts.append(f'<w:ins w:id="{revision}" w:author="A" w:date="2026-01-01T00:00:00Z">'
                         f"{_run(rng, chunk)}</w:ins>")
        elif rng.random() < 0.03:
            parts.append(f'<w:del w:id="{revision}" w:author="A" w:date="2026-01-01T00:00:00Z">'
                         f'<w:r><w:delText xml:space="preserve">{" ".join(chunk)} </w:delText>'
                         "</w:r></w:del>")
        elif rng.random() < 0.02:
            parts.append('<w:r><w:fldChar w:fldCharType="begin"/></w:r>'
                         '<w:r><w:instrText xml:space="preserve"> REF _Ref1 \\r \\h </w:instrText>'
                         '</w:r><w:r><w:fldChar w:fldCharType="separate"/></w:r>'
                         + _run(rng, ["12.3"]) + '<w:r><w:fldChar w:fldCharType="end"/></w:r>')
        else:
            parts.append(_run(rng, chunk))
    ppr = '<w:pPr><w:pStyle w:val="BodyText"/><w:spacing w:after="120"/><w:jc w:val="both"/>'
    if numbered is not None:
        ppr += f'<w:numPr><w:ilvl w:val="{numbered}"/><w:numId w:val="1"/></w:numPr>'
    ppr += "</w:pPr>"
    rsid = f"{rng.randrange(16**8):08X}"
    return (f'<w:p w:rsidR="{rsid}" w:rsidRDefault="{rsid}" w:rsidP="{rsid}">{ppr}'
            f'<w:bookmarkStart w:id="{revision}" w:name="_Ref{revision}"/>{"".join(parts)}'
            f'<w:bookmarkEnd w:id="{revision}"/></w:p>')


def make_heavy_docx(*, pages: int, seed: int) -> bytes:
    rng = random.Random(seed)
    total_words = pages * WORDS_PER_PAGE
    n_numbered = pages * NUMBERED_PER_PAGE
    per_para = total_words // (n_numbered + n_numbered // 4)
    body: list[str] = []
    words = 0
    revision = 1
    numbered = 0
    while words < total_words:
        revision += 1
        if numbered < n_numbered:
            level = rng.choice((0, 1, 1, 2, 2, 2))
            numbered += 1
        else:
            level = None
        n = max(5, int(rng.gauss(per_para, per_para / 3)))
        body.append(_paragraph(rng, n, numbered=level, lead=level == 0, revision=revision))
        words += n
        if revision % 60 == 0:  # a small table now and then
            cells = "".join(f"<w:tc>{_paragraph(rng, 8, numbered=None, lead=False, revision=revision)}"
                            "</w:tc>" for _ in range(3))
            body.append(f"<w:tbl><w:tblPr/><w:tr>{cells}</w:tr><w:tr>{cells}</w:tr></w:tbl>")
    document = (f'<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
                f'<w:document xmlns:w="{W}"><w:body>{"".join(body)}<w:sectPr/></w:body>'
                "</w:document>")
    levels = "".join(
        f'<w:lvl w:ilvl="{i}"><w:start w:val="1"/><w:numFmt w:val="{fmt}"/>'
        f'<w:lvlText w:val="{text}"/></w:lvl>'
        for i, (fmt, text) in enumerate((("decimal", "%1."), ("decimal", "%1.%2"),
                                         ("lowerLetter", "(%3)")))
    )
    numbering = (f'<?xml version="1.0" encoding="UTF-8"?><w:numbering xmlns:w="{W}">'
                 f'<w:abstractNum w:abstractNumId="0">{levels}</w:abstractNum>'
                 '<w:num w:numId="1"><w:abstractNumId w:val="0"/></w:num></w:numbering>')
    styles = (f'<?xml version="1.0" encoding="UTF-8"?><w:styles xmlns:w="{W}">'
              '<w:style w:type="paragraph" w:default="1" w:styleId="Normal"><w:name w:val="Normal"/>'
              '</w:style><w:style w:type="paragraph" w:styleId="BodyText"><w:name w:val="Body Text"/>'
              '<w:basedOn w:val="Normal"/></w:style></w:styles>')
    rel = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as zf:
        zf.writestr("[Content_Types].xml",
                    '<?xml version="1.0"?><Types xmlns="http://schemas.openxmlformats.org/package/'
                    '2006/content-types"><Default Extension="xml" ContentType="application/xml"/>'
                    '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.'
                    'relationships+xml"/><Override PartName="/word/document.xml" ContentType='
                    '"application/vnd.openxmlformats-officedocument.wordprocessingml.document.main'
                    '+xml"/></Types>')
        zf.writestr("_rels/.rels",
                    '<?xml version="1.0"?><Relationships xmlns="http://schemas.openxmlformats.org/'
                    f'package/2006/relationships"><Relationship Id="rId1" Type="{rel}/officeDocument"'
                    ' Target="word/document.xml"/></Relationships>')
        zf.writestr("word/_rels/document.xml.rels",
                    '<?xml version="1.0"?><Relationships xmlns="http://schemas.openxmlformats.org/'
                    f'package/2006/relationships"><Relationship Id="rId1" Type="{rel}/styles" '
                    f'Target="styles.xml"/><Relationship Id="rId2" Type="{rel}/numbering" '
                    'Target="numbering.xml"/></Relationships>')
        zf.writestr("word/document.xml", document)
        zf.writestr("word/styles.xml", styles)
        zf.writestr("word/numbering.xml", numbering)
    return out.getvalue()


def main(argv: list[str] | None = None) -> int:
    args = argument_parser(__doc__, pages=100, seed=1).parse_args(argv)
    with tempfile.TemporaryDirectory(prefix="cd-bench-blocks-") as tmp:
        path = Path(tmp) / f"heavy-{args.pages}p.docx"
        path.write_bytes(make_heavy_docx(pages=args.pages, seed=args.seed))
        with zipfile.ZipFile(path) as zf:
            xml_size = zf.getinfo("word/document.xml").file_size
        blocks, warnings = read_docx_blocks(str(path))
        words = sum(len(b.text.split()) for b in blocks)
        numbered = sum(b.label is not None for b in blocks)
        print(f"input: {path.stat().st_size / 1024:.0f} KiB .docx, word/document.xml "
              f"{xml_size / 2**20:.1f} MiB, {len(blocks)} paragraphs, {words:,} words, "
              f"{numbered} auto-numbered; {'; '.join(warnings)}")
        best = best_of(lambda: read_docx_blocks(str(path)), repeats=REPEATS)
        peak_mb = traced_peak_mb(lambda: read_docx_blocks(str(path)))
    rss_mb = peak_rss_mb()
    print(f"read_docx_blocks best of {REPEATS}: {best:.3f} s "
          f"(target well under {TARGET_SECONDS:.1f} s: {'ok' if best < TARGET_SECONDS else 'OVER'})")
    print(f"peak Python allocations (tracemalloc): {peak_mb:.1f} MB; peak RSS of the "
          f"process: {rss_mb:.1f} MB (target <= {TARGET_MB:.0f} MB: "
          f"{'ok' if rss_mb <= TARGET_MB else 'OVER'})")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
