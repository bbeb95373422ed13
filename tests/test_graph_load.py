"""graph.load_knowledge on the kb_small fixture: nodes, fields, the digraph and reachability.

Oracles: the fixture's YAML parsed independently with PyYAML's plain safe loader (counts,
edges, lines), and networkx's own reachability (``nx.descendants``) on a graph built here
from that independent parse.
"""

from __future__ import annotations

import hashlib
import shutil
import subprocess
import sys
from pathlib import Path

import networkx as nx
import pytest
import yaml

from faultwise.core.errors import KnowledgeError
from faultwise.graph.knowledge import load_knowledge
from faultwise.graph.nodes import FAMILIES, MEASURE_OUTCOMES, Check, Escalate, Fault, Suspects

KB = Path(__file__).parent / "fixtures" / "kb_small"


@pytest.fixture(scope="module")
def k():
    return load_knowledge(KB)


def raw_nodes():
    """(file, file-level families, node dict) from PyYAML's own safe loader."""
    for path in sorted((KB / "graph").glob("*.yaml")):
        data = yaml.safe_load(path.read_text())
        for node in data["nodes"]:
            yield path, data.get("families", list(FAMILIES)), node


def raw_routes(node):
    """Routes out of a raw node, with ``otherwise`` expanded, as (target, kind)."""
    if node["kind"] == "check":
        names = MEASURE_OUTCOMES if "expect" in node else tuple(node["choices"])
        outcomes = dict(node["outcomes"])
        other = outcomes.pop("otherwise", None)
        for name in names:
            yield outcomes.get(name, other), "outcome"
        if node.get("unable"):
            yield node["unable"], "unable"
    elif node["kind"] == "suspects":
        for inv in node["investigations"]:
            yield inv["target"], "suspect"
        yield node.get("exhausted", "cleared"), "exhausted"
    elif node["kind"] == "fault":
        for v in node.get("verify", []):
            yield v, "verify"


def copy_kb(tmp_path: Path) -> Path:
    dest = tmp_path / "kb"
    shutil.copytree(KB, dest)
    return dest


def test_fixture_loads_with_every_node_of_the_files(k):
    raw = list(raw_nodes())
    assert set(k.nodes) == {n["id"] for _, _, n in raw}
    for kind in ("check", "suspects", "fault", "escalate"):
        assert sum(1 for n in k.nodes.values() if n.kind == kind) == \
            sum(1 for _, _, n in raw if n["kind"] == kind)
    assert len(k.symptoms) == 14 and len(k.cautions) == 4
    assert k.prior_strength == 10.0


def test_node_kinds_map_to_the_model_classes(k):
    classes = {"check": Check, "suspects": Suspects, "fault": Fault, "escalate": Escalate}
    for node in k.nodes.values():
        assert isinstance(node, classes[node.kind])


def test_where_is_the_line_of_the_node_in_its_file(k):
    for path, _, node in raw_nodes():
        lines = path.read_text().splitlines()
        expected = lines.index(f"  - id: {node['id']}") + 1
        loaded = k.node(node["id"])
        assert loaded.where.file == str(path) and loaded.where.line == expected


def test_measurement_fields_and_otherwise_expansion(k):
    b = k.node("supply.b-plus")
    assert b.is_measurement and b.expect == "supply.rectifier_out_v"
    assert b.normal == "normal" and b.minutes == 2.0
    assert b.cautions == ("charged-caps",)
    ripple = k.node("supply.first-cap-test")
    # outcomes {high: fault, otherwise: cleared} -> all four routed
    assert dict(ripple.outcomes) == {"normal": "cleared", "low": "cleared",
                                     "high": "supply.dry-first-cap", "absent": "cleared"}


def test_observation_and_families_default(k):
    glow = k.node("supply.heaters-glow")
    assert not glow.is_measurement and tuple(glow.choices) == ("glow", "dark")
    assert glow.outcome_names() == ("glow", "dark") and glow.normal == "glow"
    assert glow.families == ("series-string",)              # node-level families
    assert k.node("supply.b-plus").families == ("series-string", "transformer")   # file-level
    assert k.node("audio.signal-test").families == FAMILIES                       # default


def test_suspects_fault_escalate_fields(k):
    low = k.node("supply.low-b-suspects")
    assert [i.target for i in low.investigations] == ["supply.first-cap-test",
                                                       "supply.rectifier-test"]
    assert low.investigations[1].minutes == 4.0 and low.exhausted == "supply.escalate-b-plus"
    cap = k.node("supply.dry-first-cap")
    assert cap.verify == ("supply.b-plus", "supply.first-cap-test")
    assert dict(cap.signature.readings) == {"supply.rectifier_out_v": "low",
                                            "supply.ripple_vpp": "high"}
    assert cap.priors["hum-loud"] == 60.0
    assert k.fault_weight("supply.dry-first-cap", "hum-loud") == 60.0
    assert k.fault_weight("supply.dry-first-cap", "scratchy-controls") == 1.0  # DEVELOPERS default
    assert k.node("audio.cold-joint").parts == ()
    assert k.node("supply.escalate-b-plus").advice.startswith("Check the power transformer")


def test_symptoms_entry_and_families(k):
    assert k.entry("dead-nothing-lights", "series-string") == "supply.heaters-glow"
    assert k.entry("dead-nothing-lights", "transistor") == "supply.tr-battery"
    assert k.entry("low-volume", "transformer") == "audio.stage-suspects"
    assert k.symptoms["hum-loud"].families == ("series-string", "transformer")
    with pytest.raises(KnowledgeError, match="no entry for transistor"):
        k.entry("hum-loud", "transistor")
    with pytest.raises(KnowledgeError, match="unknown symptom"):
        k.entry("no-such-complaint", "transistor")
    with pytest.raises(KnowledgeError):
        k.node("supply.nope")


def test_applies_and_closing_checks(k):
    assert k.applies("supply.heaters-glow", "series-string")
    assert not k.applies(k.node("supply.heaters-glow"), "transformer")
    assert [c.id for c in k.closing_checks("transformer")] == ["supply.leakage-check"]
    assert k.closing_checks("transistor") == []


def test_digraph_edges_match_an_independent_parse(k):
    g = k.digraph()
    expected = {}
    for _, _, node in raw_nodes():
        for target, kind in raw_routes(node):
            if target != "cleared":
                expected.setdefault((node["id"], target), set()).add(kind)
    assert set(g.edges) == set(expected)
    for (u, v), kinds in expected.items():
        assert set(g.edges[u, v]["kinds"]) == kinds
    assert g.edges["supply.b-plus", "supply.low-b-suspects"]["outcomes"] == ("low", "absent")
    assert g.edges["supply.b-plus", "supply.low-b-suspects"]["kind"] == "outcome"
    assert g.edges["supply.dry-first-cap", "supply.b-plus"]["kind"] == "verify"
    assert g.edges["supply.low-b-suspects", "supply.escalate-b-plus"]["kind"] == "exhausted"
    assert g.nodes["supply.b-plus"]["kind"] == "check"
    assert g.nodes["supply.b-plus"]["stage"] == "supply"
    assert k.digraph() is g          # cached


def test_faults_under_hand_computed(k):
    # Hand-traced from the fixture files.
    assert k.faults_under("supply.low-b-suspects", "series-string") == {
        "supply.dry-first-cap", "supply.weak-rectifier"}
    assert k.faults_under("supply.heaters-glow", "series-string") >= {
        "supply.open-heater", "supply.dry-first-cap", "audio.open-output-transformer"}
    assert k.faults_under("supply.heaters-glow", "transformer") == frozenset()
    assert k.faults_under("audio.stage-suspects", "transistor") == {
        "audio.open-output-transformer", "detector.leaky-diode", "if.misaligned",
        "if.open-if-coil", "oscillator.misaligned-osc", "oscillator.dead-converter"}
    assert k.faults_under("supply.dry-first-cap", "transformer") == {"supply.dry-first-cap"}
    assert "supply.open-heater" in k.faults_for("dead-nothing-lights", "series-string")
    assert "supply.open-heater" not in k.faults_for("dead-nothing-lights", "transformer")
    assert k.faults_for("scratchy-controls", "transistor") == {"audio.dirty-control"}


def test_faults_under_agrees_with_networkx_on_an_independent_graph(k):
    raw = {n["id"]: (n, n.get("families", fam)) for _, fam, n in raw_nodes()}
    for family in FAMILIES:
        g = nx.DiGraph()
        g.add_nodes_from(i for i, (_, fams) in raw.items() if family in fams)
        for i, (node, _) in raw.items():
            for target, kind in raw_routes(node):
                if kind != "verify" and i in g and target in g:
                    g.add_edge(i, target)
        for i in raw:
            want = set()
            if i in g:
                want = {n for n in nx.descendants(g, i) | {i} if raw[n][0]["kind"] == "fault"}
            assert k.faults_under(i, family) == want, (i, family)


def test_version_is_a_sha256_over_the_files_and_changes_with_a_byte(tmp_path):
    kb = copy_kb(tmp_path)
    v1 = load_knowledge(kb).version
    assert v1.startswith("sha256:") and len(v1) == len("sha256:") + 64
    assert load_knowledge(kb).version == v1
    # hashlib as oracle: the digest covers every file's bytes (sorted by relative path)
    files = sorted(p for p in kb.rglob("*.yaml"))
    h = hashlib.sha256()
    for p in sorted(files, key=lambda p: p.relative_to(kb).as_posix()):
        h.update(p.relative_to(kb).as_posix().encode() + b"\0" + p.read_bytes() + b"\0")
    assert v1 == "sha256:" + h.hexdigest()
    path = kb / "graph" / "audio.yaml"
    path.write_text(path.read_text() + "\n# a comment\n")
    assert load_knowledge(kb).version != v1


def test_load_does_not_import_networkx():
    code = ("import sys; from faultwise.graph.knowledge import load_knowledge; "
            f"k = load_knowledge({str(KB)!r}); k.entry('hum-loud', 'transformer'); "
            "print('networkx' in sys.modules, 'rapidfuzz' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True).stdout.split()
    assert out == ["False", "False"]


def test_prior_strength_from_settings(tmp_path):
    kb = copy_kb(tmp_path)
    p = kb / "symptoms.yaml"
    p.write_text(p.read_text().replace("prior_strength: 10", "prior_strength: 4"))
    assert load_knowledge(kb).prior_strength == 4.0


def test_learned_counts_are_read(tmp_path):
    kb = copy_kb(tmp_path)
    (kb / "learned.yaml").write_text(
        "format: faultwise-learned/1\nwritten: 2026-12-01T09:00:00+00:00\ncases: 3\n"
        "counts:\n  hum-loud:\n    transformer: {supply.dry-first-cap: 2, "
        "supply.heater-cathode-leak: 1}\n")
    k = load_knowledge(kb)
    assert k.learned.cases == 3 and k.learned.written.startswith("2026-12-01")
    assert k.learned.count("hum-loud", "transformer", "supply.dry-first-cap") == 2
    assert dict(k.learned.pair("hum-loud", "series-string")) == {}


def _break(tmp_path, old: str, new: str, file: str = "graph/supply.yaml") -> Path:
    kb = copy_kb(tmp_path)
    path = kb / file
    text = path.read_text()
    assert old in text
    path.write_text(text.replace(old, new, 1))
    return kb


def _line_of(kb: Path, file: str, fragment: str) -> int:
    return next(i for i, line in enumerate((kb / file).read_text().splitlines(), 1)
                if fragment in line)


@pytest.mark.parametrize("old,new,fragment,message", [
    ("    minutes: 2\n", "    minutes: 2\n    colour: red\n", "colour: red",
     "unknown key 'colour'"),
    ("    minutes: 2\n", "    minutes: two\n", "minutes: two", "must be a number"),
    ("  - id: supply.rectifier-test\n    kind: check\n",
     "  - id: supply.rectifier-test\n    kind: probe\n", "kind: probe", "unknown kind"),
    ("    families: [series-string]\n    how: Power on",
     "    families: [series-strung]\n    how: Power on", "series-strung", "unknown family"),
    ("  - id: supply.escalate-b-plus\n", "  - id: escalate-b-plus\n", "id: escalate-b-plus",
     "does not start with its stage"),
    ("    choices: {glow: All heaters glow, dark: No heater glows}",
     "    choices: {yes: All heaters glow, dark: No heater glows}", "choices: {yes",
     "read as true"),
    ("    cautions: [charged-caps]\n    minutes: 2", "    cautions: charged-caps\n    minutes: 2",
     "cautions: charged-caps", "must be a list"),
])
def test_structural_problems_are_located(tmp_path, old, new, fragment, message):
    kb = _break(tmp_path, old, new)
    with pytest.raises(KnowledgeError) as info:
        load_knowledge(kb)
    err = info.value
    assert message in err.message
    assert Path(err.file).name == "supply.yaml"
    assert err.line == _line_of(kb, "graph/supply.yaml", fragment)
    assert "Traceback" not in str(err) and err.hint


def test_missing_title_names_the_node(tmp_path):
    kb = _break(tmp_path, "    title: Weak rectifier\n", "")
    with pytest.raises(KnowledgeError, match="'title' is missing") as info:
        load_knowledge(kb)
    assert info.value.node == "supply.weak-rectifier"
    assert info.value.line == _line_of(kb, "graph/supply.yaml", "id: supply.weak-rectifier")


def test_bad_file_stage_and_duplicate_id(tmp_path):
    kb = _break(tmp_path, "stage: audio", "stage: speaker", "graph/audio.yaml")
    with pytest.raises(KnowledgeError, match="unknown or missing stage") as info:
        load_knowledge(kb)
    assert Path(info.value.file).name == "audio.yaml" and info.value.line == 2
    kb2 = copy_kb(tmp_path / "two")
    path = kb2 / "graph" / "detector.yaml"
    text = path.read_text()
    path.write_text(text + text[text.index("  - id: detector.leaky-diode"):])
    with pytest.raises(KnowledgeError, match="appears twice") as info:
        load_knowledge(kb2)
    assert info.value.node == "detector.leaky-diode"
    assert info.value.line == len(text.splitlines()) + 1


def test_every_structural_problem_is_collected(tmp_path):
    kb = _break(tmp_path, "    minutes: 2\n", "    minutes: two\n    colour: red\n")
    with pytest.raises(KnowledgeError, match="1 more problem") as info:
        load_knowledge(kb)
    assert len(info.value.problems) == 2
