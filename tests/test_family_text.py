"""Per-family node text (``text_by_family``), the family-word lint rule, text placeholders.

The rule's premise is a fact of the trade (common practice, no source): a transformer set
has no heater string and no live chassis, a tube set has no battery, a transistor portable
has no tubes, so a sentence about one family shown in another family's walk misleads.
"""

from __future__ import annotations

from tests.test_lint import KB as KB_SMALL
from tests.test_lint import broken, line_of, names, only

from faultwise.graph.knowledge import load_knowledge
from faultwise.graph.lint import lint
from faultwise.graph.lint_text import family_word_hits
from faultwise.graph.node_text import with_family
from faultwise.core.workspace import bundled_knowledge_dir


def test_family_word_in_a_shared_node_is_a_located_error(tmp_path):
    kb = broken(tmp_path, "graph/detector.yaml", "title: Leaky detector\n",
                "title: Leaky detector tube\n")
    found = only(lint(kb, names), r"transistor walk shows 'tube'")
    assert found[0].node == "detector.leaky-diode"
    assert found[0].line == line_of(kb, "graph/detector.yaml", "id: detector.leaky-diode")
    assert "text_by_family" in found[0].hint


def test_a_variant_for_the_family_clears_the_finding(tmp_path):
    kb = broken(tmp_path, "graph/supply.yaml",
                "      series-string: {advice: Check the surge resistor and the wiring of the supply.}",
                "      series-string: {advice: Check the power transformer.}")
    assert only(lint(kb, names), r"series-string walk shows 'power transformer'")
    report = lint(KB_SMALL, names)           # the untouched copy: the variant clears it
    assert not [f for f in report.errors if "walk shows" in f.message]


def test_word_of_a_family_the_node_serves_is_not_flagged():
    k = load_knowledge(KB_SMALL)
    node = k.nodes["supply.escalate-b-plus"]
    assert family_word_hits(node) == []           # its transformer variant names the transformer
    assert "power transformer" in with_family(node, "transformer").advice
    assert "transformer" not in with_family(node, "series-string").advice


def test_variant_for_a_family_the_node_is_not_shown_to_is_refused(tmp_path):
    kb = broken(tmp_path, "graph/supply.yaml",
                "      series-string: {advice: Check the surge resistor",
                "      transistor: {advice: Check the surge resistor")
    found = only(lint(kb, names), r"text_by_family names 'transistor'")
    assert found[0].node == "supply.escalate-b-plus"


def test_unknown_placeholder_is_an_error(tmp_path):
    kb = broken(tmp_path, "graph/supply.yaml",
                "advice: Check the power transformer or the surge resistor and the wiring",
                "advice: Check the power transformer ({parts.no_such_value|x}) and the wiring")
    only(lint(kb, names), r"unknown expectation '\{parts.no_such_value\}'")


def test_shipped_knowledge_shows_no_family_word_to_another_family():
    k = load_knowledge(bundled_knowledge_dir())
    hits = {n.id: family_word_hits(n) for n in k.nodes.values()}
    assert {i: h for i, h in hits.items() if h} == {}
    # the shared hum escalation no longer tells a transformer set about series-string sets
    assert "series-string" not in k.nodes["audio.escalate-hum-normal"].advice


def test_walk_shows_the_family_variant():
    from faultwise.expect.expected import expect
    from faultwise.profile.load import load_profile
    from faultwise.walk.state import Walk

    k = load_knowledge(bundled_knowledge_dir())
    node = k.nodes["supply.first-cap-ohms"]
    sets = bundled_knowledge_dir() / "sets"
    for name, family, word in (("demo-5-tube-table", "series-string", "B- bus"),
                               ("demo-6v-console", "transformer", "the chassis")):
        profile = load_profile(sets / f"{name}.yaml")
        assert profile.family == family
        walk = Walk(k, profile, "hum-loud", expectations=expect(profile))
        assert word in walk._view(node).how
