"""``faultwise lint [--knowledge DIR] [--json]``: validate a knowledge folder."""

from __future__ import annotations

import argparse
import json
import sys


def register(subparsers: argparse._SubParsersAction) -> None:
    from faultwise.commands import add_workspace_options

    p = subparsers.add_parser("lint", help="validate the knowledge; exit 1 with located errors",
                              description="Check the knowledge folder: schema, routes, cycles, "
                              "reachability, expectation names, cautions, faults.")
    add_workspace_options(p)
    p.add_argument("--json", action="store_true", help="print one JSON document")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from faultwise.graph.lint import lint
    from faultwise.core.workspace import workspace_from_args

    ws = workspace_from_args(args)
    report = lint(ws.knowledge_dir)
    if args.json:
        print(json.dumps(report.to_json(), indent=2))
        return 1 if report.errors else 0
    for finding in report.errors:
        print(finding.text())
    for finding in report.warnings:
        print("warning: " + finding.text())
    if report.errors:
        n = len(report.errors)
        print(f"faultwise: {n} error{'' if n == 1 else 's'} in the knowledge at "
              f"{ws.knowledge_dir}; fix them and run lint again.", file=sys.stderr)
        return 1
    print(report.summary_line())
    return 0
