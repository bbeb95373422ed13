"""lint on kb_small and on deliberately broken copies of it; the CLI; shipped knowledge.

The expectation names used for kb_small come from the contract tables (DESIGN section 5 and
DEVELOPERS.md "Expectation names"), assigned to families by what each name means there.
Cycles and reachability are also checked against networkx run on the files as parsed here
by PyYAML's own safe loader.
"""

from __future__ import annotations

import json
import os
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest
import yaml
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from faultwise.core.errors import KnowledgeError
from faultwise.graph.knowledge import load_knowledge
from faultwise.graph.lint import SYMPTOM_IDS, lint
from faultwise.graph.lint_run import LintReport, name_matcher

KB = Path(__file__).parent / "fixtures" / "kb_small"

# Contract names (DESIGN section 5, DEVELOPERS "Expectation names"), by family.
_BAND = {"tuning.lo_low_khz", "tuning.lo_high_khz", "tuning.image_low_khz",
         "tuning.image_high_khz", "tuning.cap_ratio", "tuning.antenna_uh", "if.peak_khz",
         "if.bandwidth_khz", "detector.time_constant_us", "output.reflected_ohm"}
_TUBE = {"supply.rectifier_out_v", "supply.ripple_vpp", "supply.filtered_v", "mains.line_v",
         "output.cathode_v", "output.plate_v", "safety.leakage_v", "heater.<role>.v",
         "detector.avc_v", "oscillator.grid_v", "supply.filter_drop_v"}
CONTRACT = {
    "series-string": _BAND | _TUBE | {"heaters.string_v", "heaters.string_ma",
                                      "heaters.dropping_ohm"},
    "transformer": _BAND | _TUBE | {"heaters.winding_v", "heaters.total_a",
                                    "supply.secondary_v"},
    "transistor": _BAND | {"supply.battery_v", "supply.standby_ma", "bias.<role>.vb_v",
                           "bias.<role>.ve_v", "bias.<role>.ic_ma", "bias.<role>.vc_v",
                           "oscillator.emitter_shift_v"},
}


def names(family: str) -> frozenset[str]:
    return frozenset(CONTRACT[family])


def copy_kb(tmp_path: Path) -> Path:
    dest = tmp_path / "kb"
    shutil.copytree(KB, dest)
    return dest


def broken(tmp_path: Path, file: str, old: str, new: str) -> Path:
    kb = copy_kb(tmp_path)
    path = kb / file
    text = path.read_text()
    assert old in text, old
    path.write_text(text.replace(old, new, 1))
    return kb


def line_of(kb: Path, file: str, fragment: str) -> int:
    return next(i for i, line in enumerate((kb / file).read_text().splitlines(), 1)
                if fragment in line)


def only(report: LintReport, pattern: str):
    found = [f for f in report.errors if re.search(pattern, f.message)]
    assert found, [f.text() for f in report.errors]
    return found


def test_kb_small_is_clean():
    report = lint(KB, names)
    assert report.errors == [] and report.warnings == []
    raw = [n for p in (KB / "graph").glob("*.yaml") for n in yaml.safe_load(p.read_text())["nodes"]]
    kinds = [n["kind"] for n in raw]
    s = report.summary
    assert (s["nodes"], s["checks"], s["suspects"], s["faults"], s["escalations"]) == (
        len(raw), kinds.count("check"), kinds.count("suspects"), kinds.count("fault"),
        kinds.count("escalate"))
    assert s["symptoms"] == len(SYMPTOM_IDS) == 14 and s["cautions"] == 4


def test_default_names_come_from_faultwise_expect(monkeypatch):
    import faultwise.expect.expected

    monkeypatch.setattr(faultwise.expect.expected, "expectation_names", names)
    assert lint(KB).errors == []
    monkeypatch.setattr(faultwise.expect.expected, "expectation_names",
                        lambda family: frozenset(names(family) - {"if.peak_khz"}))
    only(lint(KB), "unknown expectation name 'if.peak_khz'")


def test_names_not_yet_available_is_a_warning_not_a_crash(monkeypatch):
    def missing(family):
        raise NotImplementedError

    report = lint(KB, missing)
    assert report.errors == []
    assert any("not available" in w.message for w in report.warnings)


def test_role_placeholders_match_one_part():
    known = name_matcher(["heater.<role>.v", "supply.battery_v"])
    assert known("heater.output.v") and known("heater.if2.v") and known("supply.battery_v")
    assert not known("heater.v") and not known("heater.a.b.v") and not known("supply.battery")


def test_yaml_syntax_error_is_a_located_finding(tmp_path):
    kb = broken(tmp_path, "graph/supply.yaml", "dark: No heater glows}", "dark: No heater glows")
    report = lint(kb, names)
    [f] = only(report, "YAML syntax error")
    assert Path(f.file).name == "supply.yaml"
    # PyYAML reports where it noticed the unclosed flow mapping: at or after the bad line.
    assert f.line >= line_of(kb, "graph/supply.yaml", "dark: No heater glows")


def test_missing_stage_file(tmp_path):
    kb = copy_kb(tmp_path)
    (kb / "graph" / "detector.yaml").unlink()
    report = lint(kb, names)
    [f] = only(report, "no graph file for the stage 'detector'")
    assert Path(f.file).name == "graph"
    # the investigation into the removed node now dangles too
    assert any(f.node == "audio.stage-suspects" and "detector.diode-check" in f.message
               for f in report.errors)


def test_dangling_target(tmp_path):
    kb = broken(tmp_path, "graph/supply.yaml", "high: supply.escalate-b-plus}",
                "high: supply.nowhere}")
    [f] = only(lint(kb, names), "'supply.nowhere', which does not exist")
    assert f.node == "supply.b-plus" and Path(f.file).name == "supply.yaml"
    assert f.line == line_of(kb, "graph/supply.yaml", "id: supply.b-plus")
    assert "outcome 'high'" in f.message


def test_cycle_names_its_nodes(tmp_path):
    kb = broken(tmp_path, "graph/detector.yaml", "{clean: cleared,",
                "{clean: audio.stage-suspects,")
    [f] = only(lint(kb, names), "cycle")
    assert "audio.stage-suspects" in f.message and "detector.diode-check" in f.message
    assert f.node in ("audio.stage-suspects", "detector.diode-check")
    # networkx on the file as parsed here agrees there is exactly this cycle
    import networkx as nx

    g = nx.DiGraph()
    for p in (kb / "graph").glob("*.yaml"):
        for n in yaml.safe_load(p.read_text())["nodes"]:
            targets = list((n.get("outcomes") or {}).values())
            targets += [i["target"] for i in n.get("investigations", [])]
            g.add_edges_from((n["id"], t) for t in targets if t != "cleared")
    assert sorted(map(sorted, nx.simple_cycles(g))) == [["audio.stage-suspects",
                                                          "detector.diode-check"]]


def test_unknown_expectation_name(tmp_path):
    kb = broken(tmp_path, "graph/supply.yaml", "expect: supply.rectifier_out_v",
                "expect: supply.rectifier_volts")
    [f] = only(lint(kb, names), "unknown expectation name 'supply.rectifier_volts'")
    assert f.node == "supply.b-plus" and Path(f.file).name == "supply.yaml"


def test_expectation_missing_for_one_family(tmp_path):
    # heaters.string_v exists for series-string sets only (DESIGN section 5)
    kb = broken(tmp_path, "graph/supply.yaml", "expect: supply.rectifier_out_v",
                "expect: heaters.string_v")
    [f] = only(lint(kb, names), "does not exist for transformer sets")
    assert f.node == "supply.b-plus"


def test_unknown_caution(tmp_path):
    kb = broken(tmp_path, "graph/audio.yaml", "    minutes: 2\n    choices: {steady",
                "    minutes: 2\n    cautions: [hot-chassis]\n    choices: {steady")
    [f] = only(lint(kb, names), "unknown caution 'hot-chassis'")
    assert f.node == "audio.tap-test" and Path(f.file).name == "audio.yaml"
    assert f.line == line_of(kb, "graph/audio.yaml", "id: audio.tap-test")


def test_unreachable_fault(tmp_path):
    kb = broken(tmp_path, "graph/if.yaml", "stops: if.open-bypass-cap}", "stops: if.misaligned}")
    [f] = only(lint(kb, names), "no symptom reaches this fault")
    assert f.node == "if.open-bypass-cap" and Path(f.file).name == "if.yaml"
    assert f.line == line_of(kb, "graph/if.yaml", "id: if.open-bypass-cap")


def test_unrouted_outcome(tmp_path):
    kb = broken(tmp_path, "graph/supply.yaml", ", high: supply.escalate-b-plus}", "}")
    [f] = only(lint(kb, names), "outcome 'high' is not routed")
    assert f.node == "supply.b-plus"
    assert f.line == line_of(kb, "graph/supply.yaml", "id: supply.b-plus")


def test_fault_without_verify(tmp_path):
    kb = broken(tmp_path, "graph/audio.yaml", "    verify: [audio.control-noise]\n", "")
    [f] = only(lint(kb, names), "no 'verify'")
    assert f.node == "audio.dirty-control" and Path(f.file).name == "audio.yaml"
    assert f.line == line_of(kb, "graph/audio.yaml", "id: audio.dirty-control")


def test_fault_without_parts_key_but_empty_list_is_fine(tmp_path):
    kb = broken(tmp_path, "graph/antenna.yaml", "    parts: [loop antenna (if it cannot be "
                "repaired)]\n", "")
    [f] = only(lint(kb, names), "no 'parts'")
    assert f.node == "antenna.open-loop"
    assert not any(f.node == "audio.cold-joint" for f in lint(KB, names).errors)  # parts: []


@pytest.mark.parametrize("written, why", [
    # an unquoted YAML flow list splits at every comma (YAML 1.1 flow sequences): the bench
    # would offer two half parts, one with a bracket left open
    ("[volume control (if it will not clean, or if worn)]", "brackets do not pair"),
    ("[volume control, or a slide switch]", "starts with 'or'"),
    # quoted, but alone in the bench's parts field it splits at the comma
    ('["volume control, same value and taper"]', "would split it"),
])
def test_a_part_must_come_back_whole_from_the_bench(tmp_path, written, why):
    kb = broken(tmp_path, "graph/audio.yaml", "    parts: [volume control (if it will not clean)]",
                f"    parts: {written}")
    found = only(lint(kb, names), "would not be recorded as one part")
    assert {f.node for f in found} == {"audio.dirty-control"}
    assert any(why in f.message for f in found)


def test_missing_contract_symptom(tmp_path):
    kb = broken(tmp_path, "symptoms.yaml", "  - id: scratchy-controls\n", "  - id: scratchy\n")
    report = lint(kb, names)
    [f] = only(report, "'scratchy-controls' is missing")
    assert Path(f.file).name == "symptoms.yaml"
    assert any(w.node == "scratchy" for w in report.warnings)


def test_route_into_a_node_of_another_family(tmp_path):
    # supply.b-plus serves series-string and transformer; supply.open-heater only series-string
    kb = broken(tmp_path, "graph/supply.yaml", "high: supply.escalate-b-plus}",
                "high: supply.open-heater}")
    [f] = only(lint(kb, names), "does not apply to transformer sets")
    assert f.node == "supply.b-plus" and "supply.open-heater" in f.message


def test_a_list_may_name_an_investigation_of_fewer_families(tmp_path):
    # The ranking leaves out an investigation that does not apply to the set's family
    # (walk.rank.target_applies), so a shared list may name one while another serves the
    # family; a list left with nothing for a family is still an error.
    kb = broken(tmp_path / "a", "graph/supply.yaml", "    title: Rectifier emission\n",
                "    title: Rectifier emission\n    families: [series-string]\n")
    assert not [f for f in lint(kb, names).errors if "does not apply" in f.message
                and f.node == "supply.low-b-suspects"]
    kb2 = broken(tmp_path / "b", "graph/supply.yaml", "    title: Ripple at the first filter "
                 "capacitor\n", "    title: Ripple at the first filter capacitor\n"
                 "    families: [series-string]\n")
    kb2_file = kb2 / "graph/supply.yaml"
    kb2_file.write_text(kb2_file.read_text().replace(
        "    title: Rectifier emission\n", "    title: Rectifier emission\n"
        "    families: [series-string]\n"))
    found = only(lint(kb2, names), "does not apply to transformer sets")
    assert any(f.node == "supply.low-b-suspects" for f in found)


def test_entry_of_another_family(tmp_path):
    kb = broken(tmp_path, "symptoms.yaml",
                "transformer: supply.b-plus, transistor: supply.tr-battery}\n"
                "    phrasings: [completely dead",
                "transformer: supply.heaters-glow, transistor: supply.tr-battery}\n"
                "    phrasings: [completely dead")
    [f] = only(lint(kb, names), "transformer entry 'supply.heaters-glow' does not apply")
    assert f.node == "dead-nothing-lights"


def test_cleared_at_top_level_is_a_dead_end(tmp_path):
    kb = broken(tmp_path, "graph/audio.yaml", "clean: audio.escalate}", "clean: cleared}")
    found = only(lint(kb, names), "ends in 'cleared' outside any suspects list")
    assert {f.node for f in found} == {"audio.control-noise"}
    kb2 = broken(tmp_path / "b", "graph/if.yaml", "    exhausted: if.escalate\n", "")
    found = only(lint(kb2, names), "exhausted into 'cleared'")
    assert {f.node for f in found} == {"if.squeal-suspects"}


def test_signature_problems(tmp_path):
    kb = broken(tmp_path, "graph/antenna.yaml", "{antenna.loop-check: louder}",
                "{antenna.loop-check: quieter, audio.escalate: x}")
    report = lint(kb, names)
    only(report, "'quieter' is not a choice of 'antenna.loop-check'")
    only(report, "'audio.escalate' is not an observation check")
    kb2 = broken(tmp_path / "b", "graph/if.yaml", "{if.peak_khz: low}", "{if.peak_mhz: low}")
    only(lint(kb2, names), "signature reading 'if.peak_mhz'")


def test_verify_must_be_a_check_of_the_family(tmp_path):
    kb = broken(tmp_path, "graph/supply-transistor.yaml", "verify: [supply.tr-battery]",
                "verify: [supply.b-plus]")
    only(lint(kb, names), "verify check 'supply.b-plus' does not apply")


def test_warnings(tmp_path):
    kb = copy_kb(tmp_path)
    audio = kb / "graph" / "audio.yaml"
    text = audio.read_text()
    text = text.replace("    how: Turn the volume control slowly with a station tuned in.\n", "")
    text = text.replace("    minutes: 2\n    choices: {steady", "    choices: {steady")
    audio.write_text(text)
    symptoms = kb / "symptoms.yaml"
    symptoms.write_text(symptoms.read_text().replace("[loud hum,", "[loud hum, Loud Hum!,")
                        .replace("poor pickup,", "poor pickup, muddy audio,"))
    antenna = kb / "graph" / "antenna.yaml"
    antenna.write_text(antenna.read_text().replace("{weak-reception: 30, noise-no-stations: 10,",
                                                   "{weak-reception: 30,"))
    report = lint(kb, names)
    assert report.errors == []
    by = {(w.node, w.message) for w in report.warnings}
    assert ("audio.control-noise", "the check has no 'how'") in by
    assert ("audio.tap-test", "the check has no 'minutes'") in by
    assert ("hum-loud", "the phrasing 'Loud Hum!' appears twice") in by
    # symptoms.yaml lists weak-reception first, so the later one carries the warning
    assert ("distorted-audio", "the phrasing 'muddy audio' appears also under "
            "'weak-reception'") in by
    assert ("antenna.open-loop", "no prior for 'noise-no-stations', which reaches this "
            "fault") in by
    kb2 = broken(tmp_path / "b", "graph/oscillator.yaml", "      - {target: antenna.loop-check}\n",
                 "")
    report = lint(kb2, names)
    assert any(w.node == "oscillator.osc-suspects" and "single investigation" in w.message
               for w in report.warnings)


def _cli(*args: str) -> subprocess.CompletedProcess:
    env = dict(os.environ)
    env.pop("FAULTWISE_DEBUG", None)
    return subprocess.run([sys.executable, "-m", "faultwise", "lint", *args],
                          capture_output=True, text=True, env=env)


def test_cli_reports_errors_with_status_1(tmp_path):
    kb = broken(tmp_path, "graph/supply.yaml", "high: supply.escalate-b-plus}",
                "high: supply.nowhere}")
    out = _cli("--knowledge", str(kb))
    assert out.returncode == 1 and "Traceback" not in out.stderr
    line = line_of(kb, "graph/supply.yaml", "id: supply.b-plus")
    assert f"{kb / 'graph' / 'supply.yaml'}:{line}: node 'supply.b-plus': outcome 'high' " \
        "routes to 'supply.nowhere', which does not exist." in out.stdout
    js = _cli("--knowledge", str(kb), "--json")
    assert js.returncode == 1
    doc = json.loads(js.stdout)
    assert set(doc) == {"errors", "warnings", "summary"}
    assert doc["errors"][0]["node"] == "supply.b-plus" and doc["errors"][0]["line"] == line


def test_cli_yaml_error_has_no_traceback(tmp_path):
    kb = broken(tmp_path, "graph/audio.yaml", "nodes:\n", "nodes:\n  - [\n")
    out = _cli("--knowledge", str(kb))
    assert out.returncode == 1 and "Traceback" not in out.stderr + out.stdout
    assert "audio.yaml:" in out.stdout


def test_cli_clean_summary():
    out = _cli("--knowledge", str(KB))
    assert out.returncode == 0, out.stdout + out.stderr
    raw = [n for p in (KB / "graph").glob("*.yaml") for n in yaml.safe_load(p.read_text())["nodes"]]
    kinds = [n["kind"] for n in raw]
    head = (f"knowledge OK: {len(raw)} nodes ({kinds.count('check')} checks, "
            f"{kinds.count('suspects')} suspect lists, {kinds.count('fault')} faults, "
            f"{kinds.count('escalate')} escalations), 14 symptoms, 4 cautions; ")
    last = out.stdout.strip().splitlines()[-1]
    assert last.startswith(head) and re.fullmatch(r"\d+ warnings?", last[len(head):])


def test_shipped_knowledge_has_no_errors():
    """Passes once the content engineers' knowledge/ is complete."""
    from faultwise.core.workspace import bundled_knowledge_dir

    report = lint(bundled_knowledge_dir())
    assert report.errors == [], "\n".join(f.text() for f in report.errors[:40])


# ------------------------------------------------------------------ property test

@pytest.fixture(scope="module")
def scratch(tmp_path_factory):
    return copy_kb(tmp_path_factory.mktemp("prop"))


_VALUES = st.one_of(st.none(), st.booleans(), st.integers(-5, 5), st.text(max_size=8),
                    st.lists(st.text(max_size=4), max_size=2),
                    st.dictionaries(st.text(max_size=4), st.text(max_size=4), max_size=2))


_FILES = sorted(f"graph/{p.name}" for p in (KB / "graph").glob("*.yaml")) + [
    "symptoms.yaml", "cautions.yaml"]


@st.composite
def mutated_file(draw):
    """A file of kb_small (graph, symptoms or cautions) changed by one random mutation."""
    name = draw(st.sampled_from(_FILES))
    text = (KB / name).read_text()
    data = yaml.safe_load(text)
    list_key = {"symptoms.yaml": "symptoms", "cautions.yaml": "cautions"}.get(name, "nodes")
    items = data[list_key]
    i = draw(st.integers(0, len(items) - 1))
    how = draw(st.sampled_from(["delete", "retype", "target", "duplicate", "truncate", "top"]))
    if how == "truncate":
        return name, text[: draw(st.integers(0, len(text)))]
    item = items[i]
    key = draw(st.sampled_from(sorted(item)))
    if how == "delete":
        del item[key]
    elif how == "retype":
        item[key] = draw(_VALUES)
    elif how == "target":
        routes = item.get("outcomes") or item.get("entry") or {}
        if isinstance(routes, dict) and routes:
            routes[draw(st.sampled_from(sorted(routes)))] = draw(st.text(max_size=12))
        else:
            item["exhausted" if list_key == "nodes" else "entry"] = draw(st.text(max_size=12))
    elif how == "duplicate":
        items.append(dict(item))
    else:
        data[draw(st.sampled_from(sorted(data)))] = draw(_VALUES)
    return name, yaml.safe_dump(data, sort_keys=False)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(mutated_file())
def test_mutations_never_crash(scratch, mutation):
    name, text = mutation
    for rel in _FILES:
        shutil.copy(KB / rel, scratch / rel)
    (scratch / name).write_text(text)
    try:
        load_knowledge(scratch)
    except KnowledgeError as err:
        assert err.file and str(err)
    report = lint(scratch, names)
    assert isinstance(report, LintReport)
    for f in report.errors + report.warnings:
        assert f.file and f.message and f.text()


def test_caution_for_none_of_the_nodes_families_is_never_shown(tmp_path):
    """supply.heaters-glow applies to series-string sets only; a caution narrowed to
    transformer sets would never be shown there."""
    kb = broken(tmp_path, "cautions.yaml", "    families: [series-string]\n",
                "    families: [transformer]\n")
    [f] = only(lint(kb, names), "caution 'live-chassis' concerns only transformer")
    assert f.node == "supply.heaters-glow" and "never shown" in f.message


def test_a_concern_worded_per_family_must_be_named_for_each(tmp_path):
    """Two wordings of one concern (series-string and transformer); a check that applies to
    both families and names only the series-string one is an error naming the other."""
    kb = broken(tmp_path, "cautions.yaml", "    families: [series-string]\n",
                "    families: [series-string]\n    concern: chassis\n"
                "  - id: transformer-chassis\n    title: B+ is lethal\n"
                "    text: The chassis is normally not live.\n"
                "    families: [transformer]\n    concern: chassis\n")
    assert not lint(kb, names).errors
    path = kb / "graph" / "supply.yaml"
    path.write_text(path.read_text().replace("    cautions: [charged-caps]\n    minutes: 2\n",
                                             "    cautions: [live-chassis, charged-caps]\n"
                                             "    minutes: 2\n", 1))
    [f] = only(lint(kb, names), "wording for transformer sets, 'transformer-chassis'")
    assert f.node == "supply.b-plus"


def test_shipped_cautions_fit_each_family():
    """The bundled knowledge: no transformer set is told its chassis is tied to the line
    (the series-string wording); every check that warns a series-string set of a live
    chassis warns a transformer set with its own wording (B+ lethal, the line bypass
    capacitor). Trade fact, common practice, no source: a transformer set's chassis is
    isolated from the line unless a line-to-chassis capacitor or a winding fails."""
    from faultwise.core.workspace import bundled_knowledge_dir

    k = load_knowledge(bundled_knowledge_dir())
    assert k.cautions["live-chassis"].families == ("series-string",)
    own = k.cautions["transformer-chassis"]
    assert own.families == ("transformer",) and "line bypass capacitor" in own.text
    assert "lethal" in own.title
    for node in k.nodes.values():
        named = getattr(node, "cautions", ())
        if "live-chassis" in named and "transformer" in node.families:
            assert "transformer-chassis" in named, node.id


def test_lint_from_a_checkout_that_was_never_installed(tmp_path):
    """`python -m faultwise lint` at the root of a checkout without an install finds the
    knowledge beside the package. Simulated with -S: no site processing, so no editable
    install's finder; only the dependencies' folder is on the path."""
    import yaml as _yaml

    root = Path(__file__).resolve().parent.parent
    site = str(Path(_yaml.__file__).resolve().parent.parent)
    checkout = tmp_path / "checkout"
    shutil.copytree(root / "faultwise", checkout / "faultwise", symlinks=True,
                    ignore=shutil.ignore_patterns("__pycache__"))
    shutil.copytree(root / "knowledge", checkout / "knowledge")
    env = {**os.environ, "PYTHONPATH": site}
    out = subprocess.run([sys.executable, "-S", "-m", "faultwise", "lint"], cwd=checkout,
                         env=env, capture_output=True, text=True, timeout=120)
    assert out.returncode == 0, out.stderr
    assert "knowledge OK" in out.stdout
    # Without the folder either: one sentence that says how to install.
    shutil.rmtree(checkout / "knowledge")
    out = subprocess.run([sys.executable, "-S", "-m", "faultwise", "lint"], cwd=checkout,
                         env=env, capture_output=True, text=True, timeout=120)
    assert out.returncode == 1 and "Traceback" not in out.stderr
    assert "pip install ." in out.stderr and out.stderr.count("\n") == 1


def test_unfed_must_name_a_choice_and_known_readings(tmp_path):
    # 'unfed' is an observation's answer when a stage it listens through has no supply.
    good = "    normal: same\n    unfed: {choice: same, readings: [output.plate_v]}\n"
    kb = broken(tmp_path / "ok", "graph/antenna.yaml", "    normal: same\n", good)
    assert lint(kb, names).errors == []
    kb = broken(tmp_path / "a", "graph/antenna.yaml", "    normal: same\n",
                "    normal: same\n    unfed: {choice: silent, readings: [output.plate_v]}\n")
    found = only(lint(kb, names), "'unfed' choice 'silent' is not one of the check's choices")
    assert found[0].node == "antenna.loop-check"
    assert found[0].line == line_of(kb, "graph/antenna.yaml", "unfed:")
    kb = broken(tmp_path / "b", "graph/antenna.yaml", "    normal: same\n",
                "    normal: same\n    unfed: {choice: same, readings: [output.plate_mv]}\n")
    only(lint(kb, names), "the 'unfed' reading 'output.plate_mv' is not an expectation name")
    kb = broken(tmp_path / "c", "graph/antenna.yaml", "    normal: same\n",
                "    normal: same\n    unfed: {choice: same, readings: output.plate_v}\n")
    only(lint(kb, names), "'unfed' needs 'readings'")
