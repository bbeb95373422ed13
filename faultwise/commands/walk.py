"""``faultwise walk PROFILE --symptom ID --answers FILE [--json]``: a walk without a screen.

The answers file (YAML) has ``readings`` keyed by expectation name (a number in the
expectation's unit, a string with a unit such as "58 V", or one of absent/low/normal/high)
and ``observations`` keyed by check id (a choice each); :mod:`faultwise.walk.answers` reads
and checks it.

The walk stops with exit status 1 at the first check the file leaves unanswered, naming the
check and the answers it accepts (``--json``: ``{"missing": {...}}`` with the steps so far);
a logged job with a forgotten reading must not conclude on invented data. With
``--assume-normal`` such a check reads its nominal value (an observation its normal choice)
and every assumed answer is marked: ``[assumed]`` in the text, ``"assumed": true`` on the
step in the JSON (and the list ``assumed``), and ``"assumed": true`` on the answer event, so
a case written from the walk carries the mark.
"""

from __future__ import annotations

import argparse
import json
import sys
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from faultwise.core.errors import MissingAnswerError
    from faultwise.walk.results import Step


def register(subparsers: argparse._SubParsersAction) -> None:
    from faultwise.commands import add_workspace_options

    p = subparsers.add_parser("walk", help="walk the graph with answers from a file",
                              description="Walk from a complaint to a conclusion without a "
                              "screen, answering each check from an answers file.")
    p.add_argument("profile", metavar="PROFILE", help="set profile YAML (faultwise-set/1)")
    p.add_argument("--symptom", required=True, metavar="ID", help="symptom id, e.g. dead-lights-on")
    p.add_argument("--answers", required=True, metavar="FILE",
                   help="YAML with 'readings' (by expectation name) and 'observations' (by check id)")
    p.add_argument("--assume-normal", action="store_true",
                   help="answer a check the file leaves out as normal, marking it assumed "
                        "(without it the walk stops there with exit status 1)")
    add_workspace_options(p)
    p.add_argument("--json", action="store_true", help="print one JSON document")
    p.set_defaults(func=run)


def _step_json(step: Step) -> dict:
    return {"n": step.n, "node": step.node, "title": step.title, "expect": step.expect,
            "raw": step.raw, "value": step.value, "outcome": step.outcome,
            "band": dict(step.band) if step.band else None, "minutes": step.minutes,
            "assumed": step.assumed}


def _missing_json(exc: MissingAnswerError) -> dict:
    return {"node": exc.node, "title": exc.title, "section": exc.section, "key": exc.key,
            "accepts": list(exc.accepts), "message": str(exc)}


def run(args: argparse.Namespace) -> int:
    from faultwise.expect.expected import expect_in_workspace
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.profile.load import load_profile
    from faultwise.profile.tubes import workspace_tube_dir
    from faultwise.walk.answers import load_answers
    from faultwise.walk.scripted import auto_walk
    from faultwise.core.workspace import workspace_from_args

    ws = workspace_from_args(args)
    knowledge = load_knowledge(ws.knowledge_dir)
    profile = load_profile(args.profile, knowledge_dir=workspace_tube_dir(ws.knowledge_dir))
    expectations = expect_in_workspace(profile, ws.knowledge_dir)
    readings, observations = load_answers(args.answers, knowledge, expectations)
    result = auto_walk(knowledge, profile, args.symptom, readings, observations,
                       expectations=expectations,
                       missing="mark" if args.assume_normal else "stop")
    steps = [s for s in result.steps if s.phase == "diagnose"]
    fault = result.conclusion
    missing = result.missing
    if missing is not None:
        missing.file = str(args.answers)
    if args.json:
        doc = {"conclusion": fault.id if fault else None, "title": fault.title if fault else None,
               "checks": result.checks, "minutes": result.minutes,
               "steps": [_step_json(s) for s in steps], "escalate": result.escalate,
               "assumed": [s.node for s in steps if s.assumed]}
        if missing is not None:
            doc.update(conclusion=None, title=None, escalate=None,
                       missing=_missing_json(missing))
        print(json.dumps(doc, indent=2, ensure_ascii=False))
        if missing is not None:
            print(f"faultwise: {missing}", file=sys.stderr)
            return 1
        return 0
    for s in steps:
        if s.band:
            shown = f"{s.raw} -> {s.outcome} (band {s.band['low']:.4g}-{s.band['high']:.4g} " \
                    f"{s.band['unit']})"
        else:
            shown = f"{s.raw} -> {s.outcome}"
        mark = "  [assumed: no answer given]" if s.assumed else ""
        print(f"{s.n:>3}. {s.node}  {s.title}: {shown}{mark}")
    if missing is not None:
        print(f"faultwise: {missing}", file=sys.stderr)
        return 1
    assumed = sum(1 for s in steps if s.assumed)
    if assumed:
        print(f"{assumed} answer{'s' if assumed != 1 else ''} assumed normal (--assume-normal): "
              "the conclusion rests on them.")
    if fault:
        print(f"Conclusion: {fault.id}  {fault.title}")
    elif result.escalate and result.escalate in knowledge.nodes:
        node = knowledge.nodes[result.escalate]
        print(f"No conclusion: {node.id}  {node.title}. {node.advice}")
    else:
        print("No conclusion: every suspect was cleared.")
    print(f"{result.checks} check{'s' if result.checks != 1 else ''}, {result.minutes:g} min.")
    return 0
