"""Profile-aware applicability: the `when` predicate, its parsing, ranking, the walk and the sweep.

Outside facts used: a series string needs a dropping resistor when its heaters add up to
less than the line, R = (line - sum of heater volts) / string current (Ohm's law, computed
here from the tube table's ratings); a rectifier tube has a heater and a selenium stack or a
silicon diode has none, so a set without a rectifier tube has no rectifier-heater reading
(common practice, no source). The rank figures are worked by hand from the p/c rule of
Heckerman, Breese and Rommelse (1995) on the small invented knowledge in
tests/fixtures/kb_when (priors 50/20/20/5/5 for one complaint; the arithmetic is written
beside each check).
"""

from __future__ import annotations

import json
import shutil
from fractions import Fraction
from pathlib import Path
from types import MappingProxyType

import pytest

from faultwise.graph.applicability import (WHEN_KEYS, applies_predicate, applying_faults,
                                           node_applies, set_facts, when_holds)
from faultwise.core.errors import KnowledgeError
from faultwise.expect.expected import expect
from faultwise.graph.knowledge import load_all, load_knowledge
from faultwise.graph.nodes import Check
from faultwise.profile.load import load_profile
from faultwise.walk.rank import investigation_cost, rank_investigations
from faultwise.shop.sweep import load_demo_sets, run_sweep
from faultwise.shop.sweep_report import sweep_text, sweep_to_dict
from faultwise.walk.state import Walk
from faultwise.walk.scripted import auto_walk
from faultwise.expect.classify import representative_value
from faultwise.core.workspace import bundled_knowledge_dir

KB = Path(__file__).parent / "fixtures" / "kb_when"
SHIPPED = bundled_knowledge_dir()
SETS = SHIPPED / "sets"
DEAD = "dead-lights-on"


def _set(name: str, root: Path = SETS):
    profile = load_profile(root / name)
    return profile, expect(profile)


@pytest.fixture(scope="module")
def kb():
    return load_knowledge(KB)


@pytest.fixture(scope="module")
def tube_set():
    return _set("a-tube-series.yaml", KB / "sets")


@pytest.fixture(scope="module")
def selenium_set():
    return _set("b-selenium-series.yaml", KB / "sets")


def _check(when: dict, families=("series-string", "transformer", "transistor"), expect_name=None):
    """A bare check carrying ``when`` (an observation unless ``expect_name`` is given)."""
    return Check(id="supply.x", title="x", stage="supply", families=tuple(families), how="", why="",
                 minutes=1.0, outcomes=MappingProxyType({}), normal="ok", expect=expect_name,
                 choices=MappingProxyType({"ok": "OK"}),
                 when=MappingProxyType({k: tuple(v) for k, v in when.items()}))


# ------------------------------------------------------------------ the predicate, key by key

def test_every_key_has_a_fact():
    profile, ex = _set("demo-5-tube-table.yaml")
    assert set(set_facts(profile, ex)) == set(WHEN_KEYS)


@pytest.mark.parametrize("name,value,holds", [
    ("demo-5-tube-table.yaml", "tube", True),          # the profile says rectifier: tube
    ("demo-5-tube-table.yaml", "selenium", False),
    ("demo-4-tube-silicon.yaml", "silicon", True),
    ("demo-4-tube-silicon.yaml", "tube", False),
    ("demo-selenium-series.yaml", "selenium", True),
    ("demo-ge-pnp-portable.yaml", "silicon", False),    # a battery set has no rectifier
])
def test_rectifier_key(name, value, holds):
    profile, ex = _set(name)
    assert profile.supply.rectifier == value or not holds     # the fact is the profile's field
    assert node_applies(_check({"rectifier": [value]}), profile, ex) is holds


def test_a_list_of_values_is_any_of():
    profile, ex = _set("demo-4-tube-silicon.yaml")
    assert node_applies(_check({"rectifier": ["tube", "silicon"]}), profile, ex)
    assert not node_applies(_check({"rectifier": ["tube", "selenium"]}), profile, ex)


@pytest.mark.parametrize("name,value,holds", [
    ("demo-6v-console.yaml", "full-wave", True),       # 5Y3GT: two plates, centre tap
    ("demo-230v-transformer.yaml", "bridge", True),
    ("demo-230v-transformer.yaml", "full-wave", False),
    ("demo-5-tube-table.yaml", "half-wave", True),     # 35W4: one plate
])
def test_circuit_key(name, value, holds):
    profile, ex = _set(name)
    assert node_applies(_check({"circuit": [value]}), profile, ex) is holds


def test_tube_role_key():
    five, ex5 = _set("demo-5-tube-table.yaml")
    four, ex4 = _set("demo-4-tube-silicon.yaml")
    assert node_applies(_check({"tube-role": ["rectifier"]}), five, ex5)
    assert not node_applies(_check({"tube-role": ["rectifier"]}), four, ex4)
    assert not node_applies(_check({"tube-role": ["rf"]}), five, ex5)   # no RF stage in the lineup
    assert node_applies(_check({"tube-role": ["rf", "output"]}), four, ex4)


def test_transistor_role_polarity_and_material_keys():
    ge, ex_ge = _set("demo-ge-pnp-portable.yaml")
    si, ex_si = _set("demo-si-npn-portable.yaml")
    assert node_applies(_check({"transistor-role": ["driver"]}), ge, ex_ge)
    assert not node_applies(_check({"transistor-role": ["audio"]}), ge, ex_ge)   # no first audio
    assert node_applies(_check({"transistor-role": ["audio"]}), si, ex_si)
    assert node_applies(_check({"polarity": ["pnp"]}), ge, ex_ge)
    assert not node_applies(_check({"polarity": ["pnp"]}), si, ex_si)
    assert node_applies(_check({"material": ["germanium"]}), ge, ex_ge)
    assert node_applies(_check({"material": ["silicon"]}), si, ex_si)
    assert not node_applies(_check({"material": ["germanium"]}), si, ex_si)
    five, ex5 = _set("demo-5-tube-table.yaml")
    assert not node_applies(_check({"material": ["germanium", "silicon"]}), five, ex5)


@pytest.mark.parametrize("name", ["demo-5-tube-table.yaml", "demo-4-tube-silicon.yaml",
                                  "demo-300ma-series.yaml", "demo-selenium-series.yaml",
                                  "demo-6v-console.yaml"])
def test_dropping_resistor_key_follows_the_heater_arithmetic(name):
    profile, ex = _set(name)
    if profile.family == "series-string":
        # Ohm's law: (line - sum of heater volts) / string current > 0 means a dropper
        heaters_v = sum(t.heater_v for t in profile.tubes)
        needs = (profile.mains_v - heaters_v) / profile.tubes[0].heater_a > 0
    else:
        needs = False                  # heaters on their own winding: no dropping resistor
    assert node_applies(_check({"dropping-resistor": ["yes"]}), profile, ex) is needs
    assert node_applies(_check({"dropping-resistor": ["no"]}), profile, ex) is (not needs)


def test_several_keys_must_all_hold():
    five, ex5 = _set("demo-5-tube-table.yaml")
    assert node_applies(_check({"rectifier": ["tube"], "circuit": ["half-wave"]}), five, ex5)
    assert not node_applies(_check({"rectifier": ["tube"], "circuit": ["bridge"]}), five, ex5)
    assert when_holds({}, set_facts(five, ex5))


def test_family_and_expectation_name_decide_first():
    four, ex4 = _set("demo-4-tube-silicon.yaml")
    assert not node_applies(_check({}, families=("transistor",)), four, ex4)
    # a silicon set has no rectifier tube, so no rectifier-heater expectation (trade fact)
    assert "heater.rectifier.v" not in ex4
    assert not node_applies(_check({}, expect_name="heater.rectifier.v"), four, ex4)
    assert node_applies(_check({}, expect_name="heater.output.v"), four, ex4)


def test_suspects_apply_when_one_investigation_does(kb, tube_set, selenium_set):
    on_tube = applies_predicate(kb, *tube_set)
    on_selenium = applies_predicate(kb, *selenium_set)
    # dropper-suspects holds the dropping resistor (dropping-resistor: yes) and a ballast tube
    assert not on_tube("supply.dropper-suspects")          # 122.8 V string: no dropper, no ballast
    assert on_selenium("supply.dropper-suspects")          # 87.8 V string: a dropper
    assert on_selenium("supply.dropper-suspects")          # cached answer is the same
    assert not on_tube("supply.no-such-node")
    assert applying_faults(kb, *tube_set) == {"supply.dry-cap", "supply.weak-rect-tube"}
    assert applying_faults(kb, *selenium_set) == {"supply.dry-cap", "supply.bad-selenium",
                                                  "supply.open-dropper"}


# ---------------------------------------------------------------------------- parsing

def _with_when(tmp_path: Path, when_text: str) -> Path:
    """A copy of the fixture knowledge whose rect-swap check carries ``when_text``."""
    root = tmp_path / "kb"
    shutil.copytree(KB, root)
    path = root / "graph" / "supply.yaml"
    text = path.read_text()
    old = "    when: {rectifier: tube}\n    how: Fit a known good tube"
    assert old in text
    path.write_text(text.replace(old, f"    when: {when_text}\n    how: Fit a known good tube"))
    return root


def _line_of(root: Path, needle: str) -> int:
    lines = (root / "graph" / "supply.yaml").read_text().splitlines()
    return next(i for i, line in enumerate(lines, 1) if needle in line)


def test_unknown_when_key_is_located(tmp_path):
    root = _with_when(tmp_path, "{rectifer: tube}")
    with pytest.raises(KnowledgeError) as err:
        load_knowledge(root)
    e = err.value
    assert e.file.endswith("supply.yaml") and e.node == "supply.rect-swap" and e.key == "when"
    assert e.line == _line_of(root, "rectifer")
    assert "rectifer" in e.message
    assert all(key in e.hint for key in WHEN_KEYS)            # the hint lists the valid keys


def test_unknown_when_value_is_located(tmp_path):
    root = _with_when(tmp_path, "\n      rectifier: [tube, vacuum]")
    errors = load_all(root).errors
    assert len(errors) == 1
    e = errors[0]
    assert (e.node, e.key, e.line) == ("supply.rect-swap", "when.rectifier",
                                       _line_of(root, "vacuum"))
    assert "vacuum" in e.message and all(v in e.hint for v in WHEN_KEYS["rectifier"])
    assert str(e).startswith(f"{e.file}:{e.line}")


@pytest.mark.parametrize("text", ["{rectifier: []}", "{rectifier: yes}", "[rectifier]",
                                  "{circuit: 3}"])
def test_bad_when_shapes_are_errors(tmp_path, text):
    root = _with_when(tmp_path, text)
    errors = load_all(root).errors
    assert errors and all(e.node == "supply.rect-swap" and e.file.endswith("supply.yaml")
                          and e.line for e in errors)


def test_yes_no_values_and_lists_are_read(tmp_path):
    # YAML 1.1 reads an unquoted yes as a boolean: dropping-resistor takes it as "yes"
    root = _with_when(tmp_path, "{dropping-resistor: yes, tube-role: [Rectifier, output, output]}")
    node = load_knowledge(root).nodes["supply.rect-swap"]
    assert dict(node.when) == {"dropping-resistor": ("yes",), "tube-role": ("rectifier", "output")}


def test_shipped_when_values_are_parsed():
    kn = load_knowledge(SHIPPED)
    selenium = [n for n in kn.nodes.values() if "selenium" in n.title.lower()
                and n.kind in ("check", "fault")]
    assert selenium and all(n.when.get("rectifier") == ("selenium",) for n in selenium)


# ------------------------------------------------------------------------------ ranking

def _shares(ranked):
    return {r.target.split(".")[1]: r.p for r in ranked}


def test_rank_without_a_predicate_is_the_family_order(kb):
    # p_f = w_f / 100 (no counts). Investigations: cap-ripple {dry-cap} .5, 2 min;
    # selenium-hot {bad-selenium} .2, 2; rect-swap {weak-rect-tube} .2, 4; dropper-suspects
    # {open-dropper, open-ballast} .1, 4 + 2 = 6; rectifier-look {weak-rect-tube,
    # bad-selenium} .4, 1. Sum 1.4, so shares .5/1.4 ... and p/c: look .286, ripple .179,
    # selenium .071, swap .036, dropper .012.
    ranked = rank_investigations(kb, "supply.low-b-suspects", DEAD, "series-string", counts={})
    assert [r.target for r in ranked] == ["supply.rectifier-look", "supply.cap-ripple",
                                          "supply.selenium-hot", "supply.rect-swap",
                                          "supply.dropper-suspects"]
    total = Fraction(14, 10)
    expected = {"rectifier-look": Fraction(4, 10) / total, "cap-ripple": Fraction(5, 10) / total,
                "selenium-hot": Fraction(2, 10) / total, "rect-swap": Fraction(2, 10) / total,
                "dropper-suspects": Fraction(1, 10) / total}
    assert _shares(ranked) == pytest.approx({k: float(v) for k, v in expected.items()})
    assert ranked[-1].cost == 6.0


def test_rank_on_a_tube_set_drops_and_renormalises(kb, tube_set):
    # Tube rectifier, no dropper: selenium-hot and dropper-suspects drop; rectifier-look keeps
    # only weak-rect-tube (.2). Rows .5, .2, .2 sum .9: shares 5/9, 2/9, 2/9; p/c ripple
    # 5/18 = .278, look 2/9 = .222, swap 2/36 = .056: the ripple now goes first.
    ranked = rank_investigations(kb, "supply.low-b-suspects", DEAD, "series-string", counts={},
                                 applies=applies_predicate(kb, *tube_set))
    assert [r.target for r in ranked] == ["supply.cap-ripple", "supply.rectifier-look",
                                          "supply.rect-swap"]
    assert _shares(ranked) == pytest.approx({"cap-ripple": 5 / 9, "rectifier-look": 2 / 9,
                                             "rect-swap": 2 / 9})
    assert ranked[1].faults == {"supply.weak-rect-tube"}
    assert sum(r.p for r in ranked) == pytest.approx(1.0)


def test_rank_on_a_selenium_set(kb, selenium_set):
    # Selenium with a dropper: rect-swap drops; dropper-suspects keeps open-dropper (.05) and
    # costs only the dropper check (4 min, the ballast check does not apply); rectifier-look
    # keeps bad-selenium (.2). Rows .5, .2, .05, .2 sum .95; p/c ripple .263, look .211,
    # selenium .105, dropper .013.
    applies = applies_predicate(kb, *selenium_set)
    ranked = rank_investigations(kb, "supply.low-b-suspects", DEAD, "series-string", counts={},
                                 applies=applies)
    assert [r.target for r in ranked] == ["supply.cap-ripple", "supply.rectifier-look",
                                          "supply.selenium-hot", "supply.dropper-suspects"]
    assert _shares(ranked) == pytest.approx({"cap-ripple": .5 / .95, "rectifier-look": .2 / .95,
                                             "selenium-hot": .2 / .95,
                                             "dropper-suspects": .05 / .95})
    dropper = kb.node("supply.low-b-suspects").investigations[3]
    assert investigation_cost(kb, dropper, "series-string", applies=applies) == 4.0
    assert investigation_cost(kb, dropper, "series-string") == 6.0


# ------------------------------------------------------------------------ the walk (fixture)

def _walk(kb, profile_ex):
    profile, ex = profile_ex
    return Walk(kb, profile, DEAD, expectations=ex)


def _answer_reading(walk, outcome):
    prompt = walk.prompt()
    return walk.answer_value(representative_value(prompt.expected, outcome))


def test_route_into_a_check_that_does_not_apply_takes_its_unable_route(kb, tube_set, selenium_set):
    walk = _walk(kb, tube_set)
    _answer_reading(walk, "absent")            # absent -> selenium-first, not on a tube set
    prompt = walk.prompt()
    assert prompt.kind == "escalate" and prompt.node.id == "supply.esc-no-b"   # its unable route
    assert [e["type"] for e in walk.events] == ["answer"]                      # nothing recorded
    walk = _walk(kb, selenium_set)
    _answer_reading(walk, "absent")
    assert walk.prompt().node.id == "supply.selenium-first"


def test_route_into_a_fault_that_does_not_apply_is_cleared(kb, selenium_set):
    walk = _walk(kb, selenium_set)
    _answer_reading(walk, "low")
    assert walk.prompt().node.id == "supply.cap-ripple"
    _answer_reading(walk, "normal")
    assert walk.prompt().node.id == "supply.rectifier-look"
    walk.answer("tube-weak")                   # a weak rectifier tube: not on a selenium set
    assert walk.conclusion is None
    assert walk.prompt().node.id == "supply.selenium-hot"
    assert walk.prompt().context[-1].cleared == ("supply.cap-ripple", "supply.rectifier-look")


def test_verify_and_closing_queues_skip_what_does_not_apply(kb, tube_set, selenium_set):
    seen = {}
    for name, ps in (("tube", tube_set), ("selenium", selenium_set)):
        result = auto_walk(kb, ps[0], DEAD, {"supply.rectifier_out_v": "low",
                                             "supply.ripple_vpp": "high"},
                           expectations=ps[1], through=True)
        assert result.conclusion.id == "supply.dry-cap"
        seen[name] = [(s.phase, s.node) for s in result.steps if s.phase != "diagnose"]
    # dry-cap verifies with cap-ripple and rect-swap (tube only); selenium-cool closes only
    # selenium sets; the leakage check closes both (line-connected sets).
    assert seen["tube"] == [("verify", "supply.cap-ripple"), ("verify", "supply.rect-swap"),
                            ("closing", "supply.leakage")]
    assert seen["selenium"] == [("verify", "supply.cap-ripple"), ("closing", "supply.leakage"),
                                ("closing", "supply.selenium-cool")]


def test_replaying_the_events_gives_the_same_walk(kb, selenium_set):
    walk = _walk(kb, selenium_set)
    _answer_reading(walk, "low")
    _answer_reading(walk, "normal")
    walk.answer("tube-weak")
    again = Walk.from_events(kb, selenium_set[0], DEAD, walk.events, expectations=selenium_set[1])
    assert again.prompt().node.id == walk.prompt().node.id == "supply.selenium-hot"


# --------------------------------------------------------------------- the shipped knowledge

@pytest.fixture(scope="module")
def shipped():
    return load_knowledge(SHIPPED)


def _rectifier_tube_node(node) -> bool:
    when = getattr(node, "when", {})
    return ("tube" in when.get("rectifier", ()) or "rectifier" in when.get("tube-role", ())
            or (getattr(node, "expect", None) or "").startswith("heater.rectifier."))


def _walk_every_signature(kn, set_name):
    """auto_walk every applying fault's signature for every symptom of its priors, and the
    all-normal walk of every symptom; returns (results by fault, every node asked)."""
    profile, ex = _set(set_name)
    faults = applying_faults(kn, profile, ex)
    asked, results = set(), {}
    for symptom in sorted(kn.symptoms):
        if profile.family not in kn.symptoms[symptom].entry:
            continue
        plain = auto_walk(kn, profile, symptom, expectations=ex, counts={}, through=True)
        asked |= {s.node for s in plain.steps}
        for fid in sorted(kn.faults_for(symptom, profile.family) & faults):
            fault = kn.nodes[fid]
            if symptom not in fault.causes:          # a zero prior: reached, not a cause
                continue
            readings = {k: representative_value(ex[k], v) if isinstance(v, str) else v
                        for k, v in fault.signature.readings.items() if k in ex}
            r = auto_walk(kn, profile, symptom, readings, dict(fault.signature.observations),
                          expectations=ex, counts={}, through=True)
            asked |= {s.node for s in r.steps}
            results[(symptom, fid)] = r.conclusion.id if r.conclusion else None
    return results, asked


def test_tube_rectifier_set_is_never_asked_a_selenium_check(shipped):
    results, asked = _walk_every_signature(shipped, "demo-5-tube-table.yaml")
    selenium = {n for n in asked if "selenium" in shipped.nodes[n].when.get("rectifier", ())}
    assert asked and not selenium
    assert results and all(results[k] == k[1] for k in results), \
        [k for k in results if results[k] != k[1]]


def test_silicon_set_is_never_asked_a_rectifier_tube_check(shipped):
    results, asked = _walk_every_signature(shipped, "demo-4-tube-silicon.yaml")
    tube_checks = {n for n in asked if _rectifier_tube_node(shipped.nodes[n])}
    assert asked and not tube_checks, sorted(tube_checks)
    assert results and all(results[k] == k[1] for k in results), \
        [k for k in results if results[k] != k[1]]


def test_silicon_transformer_set_skips_the_rectifier_tube_checks(shipped):
    results, asked = _walk_every_signature(shipped, "demo-230v-transformer.yaml")
    assert not {n for n in asked if _rectifier_tube_node(shipped.nodes[n])}
    assert results and all(results[k] == k[1] for k in results)


# ------------------------------------------------------------------------------- the sweep

def test_sweep_lists_a_fault_no_set_can_carry_under_no_set(kb):
    sets = load_demo_sets(KB / "sets", KB)
    report = run_sweep(kb, sets)
    assert [(g.family, g.faults) for g in report.no_set] == [("series-string",
                                                               ("supply.open-ballast",))]
    assert "supply.open-ballast" not in {w.fault for w in report.walks}
    assert report.failures == ()
    where = {w.fault: w.set_name for w in report.walks}
    assert where == {"supply.dry-cap": "a-tube-series.yaml",        # first set by file name
                     "supply.weak-rect-tube": "a-tube-series.yaml",
                     "supply.bad-selenium": "b-selenium-series.yaml",   # the one it applies on
                     "supply.open-dropper": "b-selenium-series.yaml"}
    doc = json.loads(json.dumps(sweep_to_dict(report)))
    assert doc["no_set"] == {"series-string": ["supply.open-ballast"]}
    assert "supply.open-ballast" in sweep_text(report)
    every = run_sweep(kb, sets, all_sets=True)
    assert {(w.fault, w.set_name) for w in every.walks} == set(where.items()) | {
        ("supply.dry-cap", "b-selenium-series.yaml")}


def test_shipped_sweep_has_a_set_for_every_fault():
    report = run_sweep(load_knowledge(SHIPPED), load_demo_sets(SETS, SHIPPED), baselines=False)
    assert report.no_set == ()
    selenium = {w.set_name for w in report.walks if w.fault == "supply.failing-selenium-rectifier"}
    assert selenium == {"demo-selenium-series.yaml", "demo-selenium-transformer.yaml"}
