"""The library summary.

Outside references: the demo generator's record (scenario.json: 12 agreements, the
non-solicitation clause kept by 10 of them) and the count of the index's provision rows.
"""

from __future__ import annotations

from core.library.stats import format_stats, format_variants, library_stats, stats_to_dict


def test_stats_of_the_demo_set(demo_library, scenario):
    stats = library_stats(demo_library)
    assert stats.documents == scenario["precedent_set"]["total"] == 12
    assert stats.failures == ()
    assert stats.provisions == len(demo_library.store.provision_rows())
    by = {t.bucket: t for t in stats.types}
    kept = {d for v in scenario["precedent_set"]["variants"]
            if v["variant"] == "non-solicitation/present" for d in v["documents"]}
    assert by["non_solicitation"].documents == len(kept) == 10
    assert sum(t.provisions for t in stats.types) == stats.provisions
    assert all(t.variants >= 1 for t in stats.types)
    text = format_stats(stats)
    assert "12 agreements" in text and all(len(line) <= 100 for line in text.splitlines())
    assert stats_to_dict(stats)["schema"] == "counterdraft.library-stats/1"


def test_variant_listing(demo_library):
    listing = format_variants(demo_library.variants(bucket="payment"), total=demo_library.total)
    lines = listing.splitlines()
    assert lines[0].split()[:2] == ["id", "variant"]
    assert any("2 of 12" in line and "04-pellbrook-analytical.docx 9.2" in line for line in lines)
    assert format_variants([], total=12).startswith("No variants")
