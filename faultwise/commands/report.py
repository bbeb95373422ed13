"""``faultwise report CASE [--customer] [--html FILE]``: the job report for one case.

Two views of one report model (:mod:`faultwise.report.model`): the bench copy (default) and
the customer copy (``--customer``), each as Markdown on stdout or printable HTML in FILE.
The shop's name, contact and terms come from ``faultwise.yaml`` (none shown when unset).
"""

from __future__ import annotations

import argparse
import sys


def register(subparsers: argparse._SubParsersAction) -> None:
    from faultwise.commands import add_workspace_options

    p = subparsers.add_parser(
        "report", help="the job report for one case",
        description="Print the job report of a case as Markdown: set, complaint, checks with "
        "their recorded bands, fault, repair, parts, readings after the repair, leakage check, "
        "time, outcome and the safety statement. With --customer: the copy that goes home "
        "with the set, in plain words (no check ids, no bands).")
    add_workspace_options(p)
    p.add_argument("case", metavar="CASE",
                   help="a case id in the cases folder, or a case file path")
    p.add_argument("--html", metavar="FILE", help="write a printable HTML report to FILE instead")
    p.add_argument("--customer", action="store_true",
                   help="the customer copy: shop, set, complaint, what was found, parts, checks "
                        "after the repair, safety check, time and the shop's terms")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from pathlib import Path

    from faultwise.core.errors import FaultwiseError, KnowledgeError
    from faultwise.report.job import find_case, job_report, read_case
    from faultwise.report.render import (bench_html, bench_markdown, customer_html,
                                         customer_markdown)
    from faultwise.core.workspace import workspace_from_args

    ws = workspace_from_args(args)
    case = read_case(find_case(args.case, ws.cases_dir))
    knowledge = None
    try:
        from faultwise.graph import load_knowledge

        knowledge = load_knowledge(ws.knowledge_dir)
    except KnowledgeError as exc:
        print(f"faultwise: note: titles come from the case only ({exc})", file=sys.stderr)
    report = job_report(case, knowledge, ws.shop)
    if args.html:
        page = (customer_html if args.customer else bench_html)(report)
        try:
            Path(args.html).write_text(page, encoding="utf-8")
        except OSError as exc:
            raise FaultwiseError(f"cannot write the HTML report ({exc.strerror})",
                                 file=args.html, hint="choose a writable path") from None
        print(f"HTML report written to {args.html}")
        return 0
    sys.stdout.write((customer_markdown if args.customer else bench_markdown)(report))
    return 0
