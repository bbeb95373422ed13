"""``faultwise match "TEXT" [--json] [--knowledge DIR]``: rank symptom ids for a complaint."""

from __future__ import annotations

import argparse
import json

SHOWN = 5   # lines in the plain-text output; --json lists every symptom


def register(subparsers: argparse._SubParsersAction) -> None:
    from faultwise.commands import add_workspace_options

    p = subparsers.add_parser("match", help="rank symptom ids for a free-text complaint",
                              description="Rank the knowledge's symptoms for a complaint "
                              "written in plain words, best first.")
    p.add_argument("text", metavar="TEXT", help="the complaint, e.g. \"hums loudly, no stations\"")
    add_workspace_options(p)
    p.add_argument("--json", action="store_true", help="print one JSON document")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from faultwise.core.errors import InputError
    from faultwise.graph.knowledge import load_symptoms
    from faultwise.graph.match import match
    from faultwise.core.workspace import workspace_from_args

    if not args.text.strip():
        raise InputError("the complaint is empty", hint='give it in quotes, e.g. '
                         'faultwise match "hums loudly"')
    ws = workspace_from_args(args)
    matches = match(args.text, load_symptoms(ws.knowledge_dir))
    if args.json:
        print(json.dumps({"matches": [m.to_json() for m in matches]}, indent=2))
        return 0
    width = max((len(m.id) for m in matches[:SHOWN]), default=0)
    for m in matches[:SHOWN]:
        print(f"{m.score:5.1f}  {m.id:<{width}}  {m.title}")
    return 0
