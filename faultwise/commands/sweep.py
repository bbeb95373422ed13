"""``faultwise sweep``: every fault signature through the graph; exit 1 if any is not isolated."""

from __future__ import annotations

import argparse
import json
import sys
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from pathlib import Path
    
    from faultwise.core.workspace import Workspace
    from faultwise.graph.knowledge import Knowledge
    from faultwise.shop.sweep import DemoSet


def register(subparsers: argparse._SubParsersAction) -> None:
    from faultwise.commands import add_workspace_options

    p = subparsers.add_parser(
        "sweep", help="walk every fault signature through the graph: isolated or not, checks, minutes",
        description="For every fault with a signature, every symptom in its priors that can reach "
        "it and every family it applies to, synthesise the readings the signature implies on a "
        "demo set of that family, walk automatically and check that the walk concludes that "
        "fault. Reports prior-weighted mean checks against the entropy of the priors, minutes "
        "against the known-cause floor, and simple baseline orders. Exit status 1 when any "
        "signature is not isolated.")
    add_workspace_options(p)
    p.add_argument("--json", action="store_true", help="print one JSON document")
    p.add_argument("--family", metavar="F", help="only this family")
    p.add_argument("--symptom", metavar="S", help="only this symptom id")
    p.add_argument("--all-sets", action="store_true",
                   help="walk on every demo set of each family (default: the first by file name)")
    p.add_argument("--sets", metavar="DIR",
                   help="folder of set profiles (default: <knowledge>/sets, else the bundled ones)")
    p.add_argument("--learning", action="store_true",
                   help="also measure learning: counts from the earlier half of the closed cases, "
                        "mean checks on the later half with and without them")
    p.add_argument("--inject", action="store_true",
                   help="break every modelled fault in every set's calc model and walk on the "
                        "computed readings: found, wrong, missed; the healthy sets; the p/c order "
                        "against the optimal order (exit 1 when anything is wrong, missed or blamed)")
    p.add_argument("--seed", type=int, default=None, metavar="N",
                   help="seed of the random baseline order (default: a fixed one)")
    p.set_defaults(func=run)


def _sets_dir(ws: Workspace, given: str | None) -> Path:
    from pathlib import Path

    from faultwise.core.errors import FaultwiseError
    from faultwise.core.workspace import bundled_knowledge_dir

    if given:
        folder = Path(given)
        if not folder.is_dir():
            raise FaultwiseError("the sets folder does not exist", file=str(folder),
                                 hint="pass --sets with a folder of set profiles (*.yaml)")
        return folder
    if any(ws.sets_dir.glob("*.yaml")):
        return ws.sets_dir
    return bundled_knowledge_dir() / "sets"


def run(args: argparse.Namespace) -> int:
    from dataclasses import replace

    from faultwise.core.errors import FaultwiseError
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.shop.sweep import RANDOM_SEED, learning_check, load_demo_sets, run_sweep
    from faultwise.shop.sweep_report import failure_sentence, sweep_text, sweep_to_dict
    from faultwise.core.workspace import workspace_from_args

    ws = workspace_from_args(args)
    knowledge = load_knowledge(ws.knowledge_dir)
    sets = load_demo_sets(_sets_dir(ws, args.sets), ws.knowledge_dir)
    if args.inject:
        return run_inject_command(args, ws, knowledge, sets)
    seed = RANDOM_SEED if args.seed is None else args.seed
    report = run_sweep(knowledge, sets, family=args.family, symptom=args.symptom,
                       all_sets=args.all_sets, seed=seed)
    if report.signatures == 0:
        raise FaultwiseError("no fault signature could be walked", file=str(ws.knowledge_dir),
                             hint="give faults a signature and priors, and put a demo set of "
                                  "each family in the sets folder")
    if args.learning or args.json:
        report = replace(report, learning=learning_check(knowledge, ws.cases_dir, sets, ws.bench))
    if args.json:
        print(json.dumps(sweep_to_dict(report), indent=2))
    else:
        sys.stdout.write(sweep_text(report, learning=args.learning))
    sentence = failure_sentence(report)
    if sentence:
        sys.stdout.flush()
        print(f"faultwise: {sentence}", file=sys.stderr)
        return 1
    return 0


def run_inject_command(args: argparse.Namespace, ws: Workspace, knowledge: Knowledge,
                       sets: dict[str, list[DemoSet]]) -> int:
    """``sweep --inject``: the injected sweep and the optimal-order bound."""
    from faultwise.core.errors import FaultwiseError
    from faultwise.shop.sweep_inject import SEED, run_inject
    from faultwise.shop.sweep_inject_report import failure_sentence, inject_text, inject_to_dict

    if args.family:
        sets = {f: v for f, v in sets.items() if f == args.family}
    seed = SEED if args.seed is None else args.seed
    from faultwise.graph.inject_known import load_known

    report = run_inject(knowledge, sets, seed=seed,
                        known=load_known(knowledge, ws.knowledge_dir))
    if not report.walks:
        raise FaultwiseError("no modelled fault could be injected", file=str(ws.knowledge_dir),
                             hint="give faults a 'model:' and put set profiles in the sets folder")
    if args.json:
        print(json.dumps(inject_to_dict(report), indent=2))
    else:
        sys.stdout.write(inject_text(report))
    sentence = failure_sentence(report)
    if sentence:
        sys.stdout.flush()
        print(f"faultwise: {sentence}", file=sys.stderr)
        return 1
    return 0
