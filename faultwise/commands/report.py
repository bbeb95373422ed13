"""``faultwise report CASE``: the job report for one case (Markdown, or printable HTML)."""

from __future__ import annotations

import argparse
import sys


def register(subparsers) -> None:
    from faultwise.commands import add_workspace_options

    p = subparsers.add_parser(
        "report", help="the job report for one case",
        description="Print the job report of a case as Markdown: set, complaint, checks with "
        "their recorded bands, fault, repair, parts, readings after the repair, leakage check, "
        "time, outcome and the safety statement.")
    add_workspace_options(p)
    p.add_argument("case", metavar="CASE",
                   help="a case id in the cases folder, or a case file path")
    p.add_argument("--html", metavar="FILE", help="write a printable HTML report to FILE instead")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from pathlib import Path

    from faultwise.core.errors import FaultwiseError, KnowledgeError
    from faultwise.report.job import find_case, job_report, job_report_markdown, read_case
    from faultwise.core.workspace import workspace_from_args

    ws = workspace_from_args(args)
    case = read_case(find_case(args.case, ws.cases_dir))
    knowledge = None
    try:
        from faultwise.graph.knowledge import load_knowledge

        knowledge = load_knowledge(ws.knowledge_dir)
    except KnowledgeError as exc:
        print(f"faultwise: note: titles come from the case only ({exc})", file=sys.stderr)
    report = job_report(case, knowledge)
    if args.html:
        from faultwise.report.html_report import job_report_html

        try:
            Path(args.html).write_text(job_report_html(report), encoding="utf-8")
        except OSError as exc:
            raise FaultwiseError(f"cannot write the HTML report ({exc.strerror})",
                                 file=args.html, hint="choose a writable path") from None
        print(f"HTML report written to {args.html}")
        return 0
    sys.stdout.write(job_report_markdown(report))
    return 0
