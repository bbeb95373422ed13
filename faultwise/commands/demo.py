"""``faultwise demo``: (re)generate the invented demo cases by walking the graph."""

from __future__ import annotations

import argparse


def register(sub: argparse._SubParsersAction) -> None:
    from faultwise.commands import add_workspace_options

    p = sub.add_parser("demo", help="generate the invented demo cases (seeded)",
                       description="Walk the graph for an invented shop and write its cases.")
    add_workspace_options(p)
    p.add_argument("--seed", type=int, default=7, help="random seed (default 7)")
    p.add_argument("--closed", type=int, default=200, help="closed cases (default 200)")
    p.add_argument("--open", type=int, default=3, dest="open_cases", help="open cases (default 3)")
    p.add_argument("--force", action="store_true", help="replace the cases already in the folder")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from faultwise.shop.demo import generate
    from faultwise.core.workspace import workspace_from_args

    ws = workspace_from_args(args)
    summary = generate(ws.knowledge_dir, ws.cases_dir, seed=args.seed, closed=args.closed,
                       open_cases=args.open_cases, force=args.force)
    print(f"wrote {summary.closed} closed and {summary.open} open demo cases to {summary.folder}")
    return 0
