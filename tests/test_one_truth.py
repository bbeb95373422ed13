"""Rules and words declared once: every layer uses the same object, so they cannot drift.

Families and stages are the contract of DESIGN sections 4 and 6; the rectifier circuits are
the three textbook connections of a rectifier to its supply (half-wave, full-wave with a
centre-tapped winding, bridge: common practice, no source).
"""

from __future__ import annotations

from pathlib import Path

from faultwise.core import vocabulary


def test_families_stages_and_event_types_are_one_declaration():
    import faultwise.cases.schema as schema
    import faultwise.expect.expected as expected
    import faultwise.graph.nodes as nodes
    import faultwise.profile.model as model
    import faultwise.report.model as report

    assert nodes.FAMILIES is model.FAMILIES is vocabulary.FAMILIES
    assert model.LINE_FAMILIES is report.MAINS_FAMILIES is vocabulary.LINE_FAMILIES
    assert nodes.STAGES is expected.STAGES is vocabulary.STAGES
    assert schema.EVENT_TYPES is vocabulary.EVENT_TYPES
    assert set(vocabulary.LINE_FAMILIES) < set(vocabulary.FAMILIES)
    assert set(vocabulary.UNDOABLE) < set(vocabulary.EVENT_TYPES)


def test_rectifier_circuits_are_one_declaration():
    import faultwise.calc.rectifier as rectifier
    import faultwise.profile.model as model

    assert model.CIRCUITS is rectifier.CIRCUITS
    assert set(rectifier.CIRCUITS) == {"half-wave", "full-wave", "bridge"}


def test_one_damaged_file_record_from_listing_index_and_review(tmp_path):
    from faultwise.cases.index import scan_cases
    from faultwise.cases.listing import DamagedFile
    from faultwise.cases.store import CaseStore
    from faultwise.shop.review import review_folder

    (tmp_path / "20261201-B1-001.json").write_text("{not json", encoding="utf-8")
    listed = CaseStore(tmp_path, "B1").list().damaged
    scanned = scan_cases(tmp_path).damaged
    reviewed = review_folder(tmp_path, None).damaged
    for found in (listed, scanned, reviewed):
        assert len(found) == 1 and type(found[0]) is DamagedFile
        assert Path(found[0].file).name == "20261201-B1-001.json" and found[0].reason


def test_a_profile_error_shows_a_control_character_as_the_bench_screen_does(tmp_path):
    """ECMA-48 ESC (0x1B) in a key is shown as U+241B SYMBOL FOR ESCAPE everywhere."""
    import pytest

    from faultwise.core.errors import ProfileError
    from faultwise.profile.load import load_profile
    from faultwise.tui.wording import printable

    path = tmp_path / "set.yaml"
    path.write_text('format: faultwise-set/1\nlabel: x\nfamily: transistor\n"odd\\e[2J": 1\n',
                    encoding="utf-8")
    with pytest.raises(ProfileError) as err:
        load_profile(path)
    shown = str(err.value)
    assert "\x1b" not in shown
    assert printable("odd\x1b[2J") in shown


def test_percent_and_number_have_one_rule():
    import faultwise.report.html_report as html
    import faultwise.report.job as job
    import faultwise.tui.screens.review as screen

    assert html.pct is job.pct is screen.pct
    assert html.num is job.num is screen.num
    assert (job.pct(0.125), job.pct(None), job.num(2.25), job.num(2.0, 2)) == \
        ("12%", "-", "2.2", "2.00")    # Python's format: round half to even on the binary value
