"""Bad input through the command line (issue 2, point 8): ``counterdraft inspect BAD --json OUT``
exits with status 2, writes exactly one line on stderr naming the file and the problem, no
traceback, no output file, and leaves the input's bytes unchanged.

The inputs are built per the formats' specifications (see ``tests/support/bad_inputs.py``);
the legacy .doc of the last tests is a real one, written by LibreOffice (Debian's
``soffice --convert-to doc``) as the outside reference.
"""

from __future__ import annotations

import hashlib
import shutil

import pytest

from core.cli import main
from tests.support.bad_inputs import BAD_INPUTS, BadInput, healthy_docx
from tests.support.libreoffice import convert


def _folders(tmp_path):
    """A folder of inputs and one for outputs (so that an output never lands beside an input)."""
    inputs, out = tmp_path / "in", tmp_path / "out"
    inputs.mkdir()
    out.mkdir()
    return inputs, out

def _digest(path) -> str | None:
    return hashlib.sha256(path.read_bytes()).hexdigest() if path.is_file() else None


def _refused(capsys, path, folder, *, json_out: str | None, bad: BadInput | None = None,
             words: tuple[str, ...] = ()) -> str:
    before = _digest(path)
    argv = ["inspect", str(path)]
    if json_out is not None:
        argv += ["--json", json_out]
    code = main(argv)
    captured = capsys.readouterr()
    assert code == 2
    lines = captured.err.splitlines()
    assert len(lines) == 1, captured.err
    line = lines[0]
    assert str(path) in line
    assert "Traceback" not in captured.err and "Traceback" not in captured.out
    if bad is not None:
        assert bad.named_in(line), line
    for w in words:
        assert w in line.lower(), line
    assert captured.out == ""  # no outline and no JSON on stdout
    assert list(folder.iterdir()) == []  # no output file, no leftover temporary file
    assert _digest(path) == before  # the input is never modified
    return line


@pytest.mark.parametrize("bad", BAD_INPUTS, ids=lambda b: b.name)
def test_inspect_refuses_bad_input(tmp_path, capsys, bad):
    inputs, out = _folders(tmp_path)
    path = bad.make(inputs)
    _refused(capsys, path, out, json_out=str(out / "doc.json"), bad=bad)


@pytest.mark.parametrize("json_out", [None, "-"], ids=["outline", "json-stdout"])
@pytest.mark.parametrize("name", ["zip-bomb", "password-protected", "doctype-entities"])
def test_inspect_refuses_without_output_file(tmp_path, capsys, name, json_out):
    bad = next(b for b in BAD_INPUTS if b.name == name)
    inputs, out = _folders(tmp_path)
    _refused(capsys, bad.make(inputs), out, json_out=json_out, bad=bad)


@pytest.fixture(scope="module")
def real_doc(tmp_path_factory):
    """A legacy binary .doc written by LibreOffice from a small .docx."""
    folder = tmp_path_factory.mktemp("legacy")
    source = folder / "supply-agreement.docx"
    source.write_bytes(healthy_docx())
    return convert(source, target="doc:MS Word 97", suffix=".doc", outdir=folder / "doc")


def test_real_legacy_doc_renamed_docx(tmp_path, capsys, real_doc):
    """A real .doc saved under a .docx name is recognised from its content ([MS-CFB] header
    and the "WordDocument" stream)."""
    inputs, out = _folders(tmp_path)
    path = inputs / "agreement.docx"
    shutil.copyfile(real_doc, path)
    _refused(capsys, path, out, json_out=str(out / "doc.json"),
             words=("legacy binary word document (.doc)",))


def test_real_legacy_doc(tmp_path, capsys, real_doc):
    inputs, out = _folders(tmp_path)
    path = inputs / "agreement.doc"
    shutil.copyfile(real_doc, path)
    _refused(capsys, path, out, json_out=str(out / "doc.json"), words=(".doc",))


def test_healthy_docx_is_read(tmp_path, capsys):
    """The control: the same command on a healthy .docx succeeds and writes its JSON."""
    path = tmp_path / "ok.docx"
    path.write_bytes(healthy_docx())
    out = tmp_path / "ok.json"
    assert main(["inspect", str(path), "--json", str(out)]) == 0
    assert out.is_file()
    assert "The Supplier shall supply the Goods" in out.read_text(encoding="utf-8")
    assert capsys.readouterr().err == ""


@pytest.mark.parametrize("start, fmt", [("1" + "0" * 30, "decimal"), ("1000000000000", "decimal"),
                                        ("2147483647", "upperLetter")])
def test_inspect_refuses_a_list_start_beyond_the_limit(tmp_path, capsys, start, fmt):
    """A numbering level whose w:start (ECMA-376 Part 1 §17.9.25, an ST_DecimalNumber) is
    beyond core.docx.numbering.MAX_LIST_START: one line naming the file and the limit."""
    numbering = ('<w:abstractNum w:abstractNumId="1"><w:lvl w:ilvl="0">'
                 f'<w:start w:val="{start}"/><w:numFmt w:val="{fmt}"/><w:lvlText w:val="%1."/>'
                 '</w:lvl></w:abstractNum><w:num w:numId="1"><w:abstractNumId w:val="1"/></w:num>')
    body = ('<w:p><w:pPr><w:numPr><w:ilvl w:val="0"/><w:numId w:val="1"/></w:numPr></w:pPr>'
            "<w:r><w:t>The Supplier shall deliver the Goods.</w:t></w:r></w:p>")
    from tests.support.docx_fixtures import build_docx

    inputs, out = _folders(tmp_path)
    path = build_docx(inputs / "absurd-list.docx", body, numbering=numbering)
    _refused(capsys, inputs / "absurd-list.docx", out, json_out=str(out / "doc.json"),
             words=("limit is 0 to 32767",))
    assert path.endswith("absurd-list.docx")
