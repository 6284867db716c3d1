"""The demo scenario (demo_agreements/) is reproducible and its record tells the truth.

Later tests (review engine, precedent set) measure Counterdraft against
``demo_agreements/scenario.json``; these tests make sure that record matches the files.

Outside references:
* LibreOffice (Debian's ``soffice``, headless) renders the auto-number labels of the demo
  .docx files into plain text (4 spaces of indent per list level, the label, one space, the
  text): the numbers in the record must be the ones a word processor shows.
* python-docx reads the paragraph text back for the word checks.
"""

from __future__ import annotations

import importlib.util
import json
import re
import shutil
import subprocess
import sys
import tempfile
import zipfile
from pathlib import Path

import docx
import pytest

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "demo_agreements"
W = "{http://schemas.openxmlformats.org/wordprocessingml/2006/main}"


def _load_generator():
    spec = importlib.util.spec_from_file_location("demo_generate", DEMO / "generate.py")
    module = importlib.util.module_from_spec(spec)
    sys.modules["demo_generate"] = module  # dataclasses look their module up here
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def record() -> dict:
    return json.loads((DEMO / "scenario.json").read_text(encoding="utf-8"))


def _docx_text(path: Path) -> str:
    return "\n".join(p.text for p in docx.Document(str(path)).paragraphs)


def _normalise(text: str) -> str:
    """Quotes straightened and runs of whitespace collapsed (cosmetic noise removed)."""
    text = text.translate(str.maketrans({"\u201c": '"', "\u201d": '"', "\u2019": "'"}))
    return " ".join(text.split())


def _to_precedent_terms(text: str, renamed: list[dict]) -> str:
    mapping = {r["draft"]: r["precedent"] for r in renamed}
    pattern = re.compile(r"\b(" + "|".join(sorted(map(re.escape, mapping), key=len, reverse=True))
                         + r")(s?)\b")
    return pattern.sub(lambda m: mapping[m.group(1)] + m.group(2), text)


@pytest.fixture(scope="module")
def rendered() -> dict[str, list[str]]:
    """precedent.docx and draft.docx as LibreOffice renders them (one soffice run)."""
    soffice = shutil.which("soffice")
    assert soffice, "LibreOffice (soffice) is needed: apt-get install libreoffice-writer python3-uno"
    out: dict[str, list[str]] = {}
    with tempfile.TemporaryDirectory(prefix="cd-demo-") as tmp:
        subprocess.run(
            [soffice, f"-env:UserInstallation=file://{tmp}/profile", "--headless",
             "--convert-to", "txt:Text (encoded):UTF8", "--outdir", tmp,
             str(DEMO / "precedent.docx"), str(DEMO / "draft.docx")],
            check=False, capture_output=True, timeout=300,
        )
        for name in ("precedent", "draft"):
            result = Path(tmp) / f"{name}.txt"
            assert result.exists(), f"LibreOffice did not convert {name}.docx"  # exit status is 0 anyway
            out[name] = result.read_text(encoding="utf-8").lstrip("\ufeff").splitlines()
    return out


_WORDED = re.compile(r"^(Article|Section) ")


def _labelled_lines(lines: list[str]) -> list[tuple[str, str, int]]:
    """(label, text, indent level) of every line LibreOffice wrote with a list label."""
    found = []
    for line in lines:
        m = re.match(r"^((?:    )+)(.*)$", line)
        if not m:
            continue
        rest = m.group(2)
        if _WORDED.match(rest):  # "Article 3 Termination", "Section 3.1 Either party ..."
            word, number, text = rest.split(" ", 2)
            label = f"{word} {number}"
        else:
            label, _, text = rest.partition(" ")
        found.append((label, text, len(m.group(1)) // 4))
    return found


def _numbered_entries(outline: list[dict]) -> list[dict]:
    # The schedule's own heading carries a typed label ("Schedule 1"), not an auto-number.
    return [e for e in outline if e["number"] and not e["number"].startswith("Schedule")]


# --------------------------------------------------------------------------------------
# Determinism
# --------------------------------------------------------------------------------------


def test_generator_is_deterministic_and_matches_the_committed_files() -> None:
    generator = _load_generator()
    with tempfile.TemporaryDirectory() as a, tempfile.TemporaryDirectory() as b:
        first = sorted(p.relative_to(a) for p in generator.generate(Path(a)))
        second = sorted(p.relative_to(b) for p in generator.generate(Path(b)))
        assert first == second
        for rel in first:
            data = (Path(a) / rel).read_bytes()
            assert data == (Path(b) / rel).read_bytes(), f"{rel} differs between two runs"
            assert data == (DEMO / rel).read_bytes(), (
                f"demo_agreements/{rel} is stale: run python demo_agreements/generate.py")
    committed = sorted(p.relative_to(DEMO) for p in (DEMO / "precedent_set").glob("*.docx"))
    assert committed == [r for r in first if r.parts[0] == "precedent_set"]


def test_demo_files_are_small_real_docx_files(record: dict) -> None:
    files = [DEMO / record["precedent"]["file"], DEMO / record["draft"]["file"]]
    files += [DEMO / record["precedent_set"]["folder"] / d["file"]
              for d in record["precedent_set"]["documents"]]
    for path in files:
        assert 8_000 < path.stat().st_size < 25_000, path
        with zipfile.ZipFile(path) as z:
            assert "word/numbering.xml" in z.namelist()


# --------------------------------------------------------------------------------------
# What the issue asks of the scenario
# --------------------------------------------------------------------------------------


def test_record_validates_against_its_schema_and_the_taxonomy(record: dict) -> None:
    import tomllib

    import jsonschema

    schema = json.loads((ROOT / "resources/schemas/demo-scenario.schema.json").read_text())
    jsonschema.Draft202012Validator.check_schema(schema)
    jsonschema.validate(record, schema, cls=jsonschema.Draft202012Validator)
    with open(ROOT / "resources/clause_types.toml", "rb") as fh:
        known = set(tomllib.load(fh)["types"])
    used = {d["clause_type"] for d in record["departures"]}
    used |= {v["clause_type"] for v in record["precedent_set"]["variants"]}
    assert used <= known


def test_scenario_has_the_required_shape(record: dict, rendered: dict[str, list[str]]) -> None:
    assert record["schema"] == "counterdraft.demo-scenario/1"
    precedent = record["precedent"]["outline"]
    top = [e for e in precedent if e["kind"] == "clause" and e["level"] == 1]
    assert len(top) >= 25
    assert any(e["kind"] == "clause" and e["level"] == 4 for e in precedent)  # (i) under (a)
    assert sum(e["kind"] == "definition" for e in precedent) >= 15
    assert {e["kind"] for e in precedent} >= {"title", "parties", "recital", "definition",
                                             "clause", "signature", "schedule"}
    assert record["precedent_set"]["total"] == len(record["precedent_set"]["documents"]) >= 12
    assert len({d["counterparty"] for d in record["precedent_set"]["documents"]}) >= 12
    assert 10 <= len(record["departures"]) <= 20
    assert len({d["weight"] for d in record["departures"]}) == 3
    renamed = {r["precedent"]: r["draft"] for r in record["renamed_terms"]}
    assert renamed["Customer"] == "Client" and len(renamed) >= 3
    assert len(record["moved"]) >= 2
    # some of the draft's departures are wordings the firm has accepted before, some never
    matching = [d["precedent_set_matching"] for d in record["departures"]]
    assert any(m == 0 for m in matching) and any(m > 0 for m in matching)
    # the draft's numbering style differs from the precedent's
    draft_labels = {label.split(" ")[0] for label, _, _ in _labelled_lines(rendered["draft"])}
    assert {"Article", "Section"} <= draft_labels


def test_defined_terms_of_the_draft_are_renamed(record: dict) -> None:
    draft = _docx_text(DEMO / record["draft"]["file"])
    precedent = _docx_text(DEMO / record["precedent"]["file"])
    for pair in record["renamed_terms"]:
        assert f"\u201c{pair['draft']}\u201d" in draft  # defined on the customer's paper
        assert f'"{pair["precedent"]}"' in precedent
    without_draft_terms = re.sub(
        "|".join(re.escape(r["draft"]) for r in record["renamed_terms"]), "", draft)
    for pair in record["renamed_terms"]:  # the house's names never appear on their paper
        assert not re.search(rf"\b{re.escape(pair['precedent'])}\b", without_draft_terms), pair


# --------------------------------------------------------------------------------------
# The outlines are what a word processor shows (reference: LibreOffice)
# --------------------------------------------------------------------------------------


@pytest.mark.parametrize("side", ["precedent", "draft"])
def test_recorded_numbers_and_headings_are_the_rendered_ones(
    record: dict, rendered: dict[str, list[str]], side: str
) -> None:
    outline = record[side]["outline"]
    schedule_at = next(i for i, e in enumerate(outline) if e["kind"] == "schedule")
    in_schedule = {id(e) for e in outline[schedule_at:]}
    entries = _numbered_entries(outline)
    labelled = _labelled_lines(rendered[side])
    assert [e["number"] for e in entries] == [label.rstrip(".:") for label, _, _ in labelled]
    for entry, (_, text, indent) in zip(entries, labelled):
        if entry["heading"]:
            assert text.startswith(entry["heading"]), (entry, text)
        if entry["kind"] == "clause":
            # one list level per outline level; the schedule's paragraphs sit one level
            # below the schedule's own heading
            assert indent == entry["level"] - (id(entry) in in_schedule), entry
            if entry["level"] == 1:
                assert text == entry["heading"]  # a heading-styled line, heading only


@pytest.mark.parametrize("side", ["precedent", "draft"])
def test_numbered_paragraphs_carry_word_numbering(record: dict, side: str) -> None:
    # Reading the XML ourselves: every auto-numbered entry is a w:p with w:numPr, and no
    # number is typed into the text.
    document = docx.Document(str(DEMO / record[side]["file"]))
    numbered = [p for p in document.paragraphs if p._p.find(f"{W}pPr/{W}numPr") is not None]
    assert len(numbered) == len(_numbered_entries(record[side]["outline"]))
    for p in numbered:
        assert not re.match(r"^\(?\d+[.)]|^(Article|Section) \d", p.text), p.text


def _main_body(lines: list[str]) -> list[str]:
    """The lines before the schedule (whose paragraphs are numbered 1, 2, ... again)."""
    end = next(i for i, line in enumerate(lines) if line.startswith("Schedule "))
    return lines[:end]


def test_moved_clauses_are_where_the_record_says(record: dict, rendered) -> None:
    pre_lines = _labelled_lines(_main_body(rendered["precedent"]))
    dra_lines = _labelled_lines(_main_body(rendered["draft"]))
    pre = {label.rstrip("."): text for label, text, _ in pre_lines}
    dra = {label: text for label, text, _ in dra_lines}
    for moved in record["moved"]:
        assert pre[moved["precedent_number"]] == moved["heading"]
        assert dra[moved["draft_number"]] == moved["heading"]
    # The relative order really changed, and only for the moved clauses: the clauses both
    # documents head alike follow the precedent's order once the moved ones are set aside.
    house = [text for label, text, indent in pre_lines if indent == 1 and label[0].isdigit()]
    draft = [text for label, text, indent in dra_lines if label.startswith("Article ")]
    positions = [house.index(h) for h in draft if h in house]
    assert positions != sorted(positions)
    moved = {m["heading"] for m in record["moved"]}
    rest = [house.index(h) for h in draft if h in house and h not in moved]
    assert rest == sorted(rest)


# --------------------------------------------------------------------------------------
# Departures: the words are where the record says, in the documents the record names
# --------------------------------------------------------------------------------------


def _provision_line(lines: list[str], number: str) -> str:
    """The text of the provision labelled *number* (for a heading-only line: its body)."""
    for i, line in enumerate(lines):
        for label, text, _ in _labelled_lines([line]):
            if label.rstrip(".") == number:
                if i + 1 < len(lines) and not lines[i + 1].startswith(" "):
                    return text + "\n" + lines[i + 1]  # heading line + unnumbered body
                return text
    raise AssertionError(f"no provision labelled {number}")


def test_departure_words_occur_in_the_documents(record: dict) -> None:
    precedent = _docx_text(DEMO / record["precedent"]["file"])
    draft = _docx_text(DEMO / record["draft"]["file"])
    for dep in record["departures"]:
        if dep["precedent_words"]:
            assert dep["precedent_words"] in precedent, dep["id"]
        if dep["draft_words"]:
            assert dep["draft_words"] in draft, dep["id"]
        assert dep["precedent_words"] or dep["draft_words"], dep["id"]
        assert dep["expected_reasons"] and all(r == r.lower() for r in dep["expected_reasons"])
        assert (dep["precedent_number"] is None) == (dep["change"] == "add-provision")
        assert (dep["draft_number"] is None) == (dep["change"] == "remove-provision")


def _has_words(words: str, text: str) -> bool:
    return re.search(rf"(?<!\w){re.escape(_normalise(words))}(?!\w)", _normalise(text)) is not None


def test_departure_words_sit_in_the_numbered_provisions(record: dict, rendered) -> None:
    # The provision at the recorded number (as LibreOffice numbers it) carries the recorded
    # words on its side, and not the other side's words.
    renamed = record["renamed_terms"]
    for dep in record["departures"]:
        pre = _provision_line(rendered["precedent"], dep["precedent_number"]) \
            if dep["precedent_number"] else None
        dra = _provision_line(rendered["draft"], dep["draft_number"]) \
            if dep["draft_number"] else None
        if pre is not None:
            assert _has_words(dep["precedent_words"], pre), dep["id"]
        if dra is not None:
            assert _has_words(dep["draft_words"], dra), dep["id"]
        if dep["change"] in ("replace", "delete"):
            assert not _has_words(_to_precedent_terms(dep["precedent_words"], renamed),
                                  _to_precedent_terms(dra, renamed)), dep["id"]
        if dep["change"] in ("replace", "insert"):
            assert not _has_words(dep["draft_words"], pre), dep["id"]
        if dep["change"] == "add-provision":
            assert dra.startswith(dep["heading"]) or dep["draft_number"].startswith("Section")
        if dep["change"] == "remove-provision":
            assert pre.startswith(dep["heading"] + "\n")


# --------------------------------------------------------------------------------------
# The reader sees the outlines the record describes (issue "Done when")
# --------------------------------------------------------------------------------------


@pytest.fixture(scope="module")
def read_back(record: dict) -> dict:
    from core.reader import read_document

    return {side: read_document(str(DEMO / record[side]["file"])) for side in ("precedent", "draft")}


@pytest.mark.parametrize("side", ["precedent", "draft"])
def test_reader_outline_shows_every_clause_as_recorded(record: dict, read_back, side: str) -> None:
    doc = read_back[side]
    got = [(p.number, p.heading, p.kind, p.level) for p in doc.provisions if p.kind == "clause"]
    want = [(e["number"], e["heading"], e["kind"], e["level"])
            for e in record[side]["outline"] if e["kind"] == "clause"]
    assert got == want
    definitions = [p for p in doc.provisions if p.kind == "definition"]
    assert len(definitions) == sum(e["kind"] == "definition" for e in record[side]["outline"])


def test_reader_finds_the_departures_where_the_record_says(record: dict, read_back) -> None:
    def provision_text(doc, number: str) -> str:
        found = [p for p in doc.provisions if p.kind == "clause" and p.number == number]
        assert len(found) == 1, number
        return found[0].text

    for dep in record["departures"]:
        if dep["precedent_number"]:
            text = provision_text(read_back["precedent"], dep["precedent_number"])
            assert _has_words(dep["precedent_words"], text), dep["id"]
        if dep["draft_number"]:
            text = provision_text(read_back["draft"], dep["draft_number"])
            assert _has_words(dep["draft_words"], text), dep["id"]


# --------------------------------------------------------------------------------------
# Precedent set: counts in the record equal what the files contain
# --------------------------------------------------------------------------------------


@pytest.fixture(scope="module")
def set_texts(record: dict) -> dict[str, str]:
    folder = DEMO / record["precedent_set"]["folder"]
    return {d["file"]: _docx_text(folder / d["file"]) for d in record["precedent_set"]["documents"]}


def test_variant_counts_equal_the_files_that_contain_them(record: dict, set_texts) -> None:
    variants = record["precedent_set"]["variants"]
    by_group: dict[str, list[dict]] = {}
    for v in variants:
        by_group.setdefault(v["variant"].split("/")[0], []).append(v)
    for v in variants:
        if v["text"]:
            holders = sorted(f for f, t in set_texts.items() if v["text"] in t)
        else:  # the provision is absent: no sibling wording of the same slot is present
            siblings = [s["text"] for s in by_group[v["variant"].split("/")[0]] if s["text"]]
            holders = sorted(f for f, t in set_texts.items() if not any(s in t for s in siblings))
        assert v["count"] == len(holders) == len(v["documents"]), v["variant"]
        assert sorted(v["documents"]) == holders, v["variant"]
    for group in by_group.values():  # each document carries exactly one variant of a slot
        assert sum(v["count"] for v in group) == record["precedent_set"]["total"]


def test_precedent_set_matching_is_true(record: dict, rendered) -> None:
    variants = record["precedent_set"]["variants"]
    for dep in record["departures"]:
        same_type = [v for v in variants if v["clause_type"] == dep["clause_type"]]
        if dep["draft_number"] is None:  # removed: documents that also lack the provision
            carried = [v for v in same_type if not v["text"]]
        else:
            text = _provision_line(rendered["draft"], dep["draft_number"])
            text = _normalise(_to_precedent_terms(text, record["renamed_terms"]))
            carried = [v for v in same_type if v["text"] and _normalise(v["text"]) in text]
        assert len(carried) <= 1, dep["id"]
        expected = carried[0]["count"] if carried else 0
        assert dep["precedent_set_matching"] == expected, dep["id"]
