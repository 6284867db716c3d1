"""Choosing the variant cut-off from labelled provisions.

Outside references:
* the demo generator's record (demo_agreements/scenario.json): which past agreement carries
  which variant of the negotiated clauses gives the labels;
* scipy.cluster.hierarchy: the flat clusters of one linkage cut at growing distances are
  nested, so the number of clusters never grows with the cut-off;
* Python's ``csv`` module writes the labels file read back by ``read_labels``.
"""

from __future__ import annotations

import csv

import pytest

from core.errors import CounterdraftError
from core.library.calibrate import (
    Labelled,
    calibrate,
    format_calibration,
    read_labels,
    suggest_cutoff,
)

#: variant group of the record -> the precedent number of its provision (same in every past
#: agreement of the demo set, which follow the precedent's numbering).
GROUPS = {"payment-days": "9.2", "liability-cap": "12.3", "confidentiality-period": "16.4",
          "warranty-period": "11.1", "termination-convenience": "20.1"}


@pytest.fixture(scope="module")
def labelled(scenario) -> list[Labelled]:
    out = []
    for v in scenario["precedent_set"]["variants"]:
        group, name = v["variant"].split("/")
        if group in GROUPS:
            out.extend(Labelled(doc, GROUPS[group], f"{group}/{name}") for doc in v["documents"])
    return out


def test_default_cutoff_keeps_the_recorded_variants_apart(demo_library, labelled):
    rows = calibrate(demo_library, labelled, cutoffs=(0.05, 0.2, 0.35, 0.5, 0.8))
    by_cut = {r.cutoff: r for r in rows}
    # 15 recorded variants in the 5 groups: at the default cut-off each is its own cluster.
    assert by_cut[0.2].mixed == 0
    assert by_cut[0.2].labelled_clusters == len({x.label for x in labelled}) == 15
    # Far too coarse a cut-off merges variants that differ by one figure.
    assert by_cut[0.8].mixed > 0
    # Nested partitions (hierarchical clustering): never more clusters at a larger cut-off.
    clusters = [r.clusters for r in rows]
    assert clusters == sorted(clusters, reverse=True)
    best = suggest_cutoff(rows)
    assert best is not None and by_cut[best].mixed == 0
    assert by_cut[best].clusters == min(r.clusters for r in rows if r.mixed == 0)
    text = format_calibration(rows)
    assert "suggested cut-off" in text and "0.20" in text


def test_labels_file_and_stored_positions(tmp_path, demo_library, labelled):
    path = tmp_path / "labels.csv"
    with open(path, "w", newline="", encoding="utf-8") as fh:
        w = csv.writer(fh)
        w.writerow(["document", "provision", "label"])
        for x in labelled[:6]:
            w.writerow([x.document, x.provision, x.label])
    assert read_labels(str(path)) == labelled[:6]
    (tmp_path / "bad.csv").write_text("doc,prov\na,b\n", encoding="utf-8")
    with pytest.raises(CounterdraftError, match="header"):
        read_labels(str(tmp_path / "bad.csv"))
    with pytest.raises(CounterdraftError, match="not in the index"):
        calibrate(demo_library, [Labelled("nowhere.docx", "1", "x")])


def test_without_labels_the_stored_positions_are_used(tmp_path, demo_set, backend):
    folder = backend.copy(demo_set, tmp_path / "set")
    with backend.open(folder) as lib:
        with pytest.raises(CounterdraftError, match="no labelled provisions"):
            calibrate(lib)
        lib.label_variant(lib.variant_of("04-pellbrook-analytical.docx", "9.2"), "refuse")
        lib.label_variant(lib.variant_of("01-quenby-astrel-diagnostics.docx", "9.2"), "house wording")
        rows = calibrate(lib, cutoffs=(0.2, 0.9))
    assert [r.mixed for r in rows] == [0, 1]
