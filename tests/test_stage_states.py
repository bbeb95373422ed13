"""The bench stage map and the printed job report say the same of every stage.

Both read :func:`faultwise.walk.stages.stage_states`. The rule (common practice, no source):
a check that reads normal clears a suspect part, not a stage that has already shown an
abnormal answer; once a fault is concluded, stages suspected on the way are set aside as
not needed, and only the faulty stage stands out.

The walks below run on the bundled knowledge with the demo sets; after every answer the
case as it would be written is turned into the job report and compared with the bench map.
"""

from __future__ import annotations

import random
from pathlib import Path

import pytest

from faultwise.core.workspace import bundled_knowledge_dir
from faultwise.graph.knowledge import load_knowledge
from faultwise.profile.load import load_profile
from faultwise.report.model import build_report
from faultwise.walk.stages import (CLEARED, FAULTY, NOT_NEEDED, SUSPECT, StepView,
                                   stage_states, walk_stage_states)
from faultwise.walk.state import Walk
from faultwise.expect.classify import representative_value

TUI_KB = Path(__file__).parent / "tui" / "fixtures" / "knowledge"


def _report_states(walk) -> dict:
    case = {"id": "t", "symptom": walk.symptom, "family": walk.family, **walk.to_case_fields()}
    return dict(build_report(case, walk.knowledge).stages)


def _answer_at_random(walk, rng: random.Random) -> bool:
    """Answer the current diagnose check with a random outcome; False when the walk ended."""
    prompt = walk.prompt()
    if prompt is None or prompt.kind != "check" or prompt.phase != "diagnose":
        return False
    if prompt.is_measurement:
        outcome = rng.choice(("normal", "low", "high", "absent"))
        walk.answer_value(representative_value(prompt.expected, outcome))
    else:
        walk.answer(rng.choice([name for name, _ in prompt.choices]))
    return True


def test_abnormal_then_normal_in_one_stage_stays_suspect_on_both():
    """TUI fixture: low B+ (abnormal, supply), then the first capacitor bridged changes
    nothing (normal, supply). The supply is still suspect: the report used to say cleared."""
    kb = load_knowledge(TUI_KB)
    profile = load_profile(TUI_KB / "sets" / "demo-5-tube-table.yaml")
    walk = Walk(kb, profile, "hum-loud")
    walk.answer("glow")
    walk.answer_value(representative_value(walk.prompt().expected, "low"))
    assert walk.prompt().node.id == "supply.bridge-cap"
    walk.answer("same")
    assert walk_stage_states(walk) == {"supply": SUSPECT}
    assert _report_states(walk) == {"supply": SUSPECT}


def test_suspect_elsewhere_is_not_needed_after_the_conclusion_on_both():
    """TUI fixture, "distorted": the audio check is abnormal, the fault is in the supply."""
    kb = load_knowledge(TUI_KB)
    profile = load_profile(TUI_KB / "sets" / "demo-5-tube-table.yaml")
    walk = Walk(kb, profile, "distorted-audio")
    walk.answer("stays")
    walk.answer_value(representative_value(walk.prompt().expected, "high"))
    assert walk.conclusion is not None and walk.conclusion.stage == "supply"
    assert walk_stage_states(walk) == {"audio": NOT_NEEDED, "supply": FAULTY}
    assert _report_states(walk) == walk_stage_states(walk)


@pytest.mark.parametrize("seed", range(12))
def test_report_and_bench_map_agree_after_every_answer(seed):
    kb = load_knowledge(bundled_knowledge_dir())
    rng = random.Random(seed)
    sets = sorted((bundled_knowledge_dir() / "sets").glob("*.yaml"))
    profile = load_profile(rng.choice(sets))
    symptoms = sorted(s.id for s in kb.symptoms.values()
                      if profile.family in s.families and profile.family in s.entry)
    walk = Walk(kb, profile, rng.choice(symptoms))
    for _ in range(60):
        if not _answer_at_random(walk, rng):
            break
        assert _report_states(walk) == walk_stage_states(walk), walk.events


def test_the_rule():
    steps = [StepView("audio", "stays", False), StepView("audio", "follows", True),
             StepView("detector", "ok", True), StepView("if", "skipped", True),
             StepView("antenna", "low", False, phase="verify")]
    assert stage_states(steps, None) == {"audio": SUSPECT, "detector": CLEARED}
    assert stage_states(steps, "supply") == {"audio": NOT_NEEDED, "detector": CLEARED,
                                              "supply": FAULTY}


def test_a_triage_choice_clears_no_stage():
    # "Distorted on every station and at any volume" is the complaint narrowed, not a healthy
    # audio stage: its route is the audio distortion list. A technician must not see the audio
    # stage marked cleared before a single audio part was tested (common practice, no source).
    kb = load_knowledge(bundled_knowledge_dir())
    sets = bundled_knowledge_dir() / "sets"
    walk = Walk(kb, load_profile(sets / "demo-5-tube-table.yaml", knowledge_dir=bundled_knowledge_dir()),
                "distorted-audio", counts={})
    assert walk.current_node == "audio.distortion-kind"
    walk.answer("all-volumes")
    assert walk.steps[-1].normal
    assert "audio" not in walk_stage_states(walk)
    assert "audio" not in _report_states(walk)
    # the same answer, routed to 'cleared', would clear it (the rule's other half)
    assert stage_states([StepView("audio", "x", True)], None) == {"audio": CLEARED}
