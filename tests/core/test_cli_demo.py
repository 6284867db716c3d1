"""`counterdraft demo` (what `make demo` runs first) does the whole job on the bundled demo."""

import json
from html.parser import HTMLParser

import docx

from core import CAUTION
from core.cli import DEMO_REVERTS, main
from core.docx.validate import validate_docx


class _Text(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.chunks: list[str] = []

    def handle_data(self, data: str) -> None:
        self.chunks.append(data)


def test_demo_reviews_decides_and_writes_every_output(tmp_path, capsys):
    assert main(["demo", "--out", str(tmp_path)]) == 0
    out = capsys.readouterr().out
    assert " ".join(out.split("\n\n")[0].split()) == CAUTION
    assert " No. Sev" in out and "illustration, not a recommendation" in out

    record = json.loads((tmp_path / "review.json").read_text(encoding="utf-8"))
    decided = [d for d in record["decisions"] if d["action"] == "revert"]
    # the top deviations, plus a clause restored and one struck (to show cross-references kept)
    changes = {d["id"]: d["change"] for d in record["deviations"]}
    assert len(decided) == DEMO_REVERTS + 2
    assert {"add-provision", "remove-provision"} <= {changes[d["deviation"]] for d in decided}
    # The demo names what it reverted by the numbers the table shows (the saved ranks), never
    # by internal id.
    rank = {d["id"]: d["rank"] for d in record["deviations"]}
    numbers = sorted(rank[d["deviation"]] for d in decided)[:DEMO_REVERTS]
    assert f"reverted deviations {', '.join(map(str, numbers[:-1]))} and {numbers[-1]}," in out
    assert not any(d["deviation"] in out.split() for d in decided)

    # ECMA-376 Part 1 §17.13: our structural check of every revision element we wrote.
    for name in ("counter-draft.docx", "redline.docx", "issues-list.docx"):
        assert validate_docx(tmp_path / name) == [], name
    # The issues list as a Word table, read back with python-docx: one row per deviation shown.
    table = docx.Document(str(tmp_path / "issues-list.docx")).tables[0]
    assert len(table.rows) > DEMO_REVERTS
    # The printable page carries the caution (stdlib html.parser as the reader).
    page = _Text()
    page.feed((tmp_path / "issues-list.html").read_text(encoding="utf-8"))
    assert "not legal advice" in " ".join(page.chunks)
    assert not list(tmp_path.glob("*.part"))  # atomic writes left no temporary file


