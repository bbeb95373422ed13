"""``faultwise review``: shop statistics, suggested orders and learned counts."""

from __future__ import annotations

import argparse
import json
import sys
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from pathlib import Path
    
    from faultwise.core.workspace import Workspace
    from faultwise.graph.knowledge import Knowledge
    from faultwise.shop.learn import Learning, PairChange


def register(subparsers: argparse._SubParsersAction) -> None:
    from faultwise.commands import add_workspace_options

    p = subparsers.add_parser(
        "review", help="shop statistics and suggested orders from the closed cases",
        description="Review the closed cases: fault shares per symptom and family, checks and "
        "minutes to the fault, the minutes a data-supported order would save, checks that never "
        "varied, skipped checks, off-graph findings, faults never reached, cases back after a "
        "repair. Damaged case files are named and left unchanged.")
    add_workspace_options(p)
    p.add_argument("--since", metavar="DATE",
                   help="only cases closed on or after DATE (YYYY-MM-DD)")
    p.add_argument("--json", action="store_true", help="print one JSON document")
    p.add_argument("--html", metavar="FILE", help="also write a printable HTML review to FILE")
    p.add_argument("--inject", action="store_true",
                   help="with --html: add the injected sweep per complaint (found, mean minutes, "
                        "ratio to the optimal order); takes some seconds")
    p.add_argument("--learn", action="store_true",
                   help="write the fault counts to <knowledge>/learned.yaml")
    p.add_argument("--dry-run", action="store_true",
                   help="with --learn: show what would change, write nothing")
    p.add_argument("--reopen-days", type=float, default=None, metavar="N",
                   help="a set back from the same customer within N days counts as re-opened "
                        "(default 30)")
    p.add_argument("--no-index", action="store_true",
                   help="parse every case file, neither reading nor writing the index")
    p.set_defaults(func=run)


def _learn_dict(learning: Learning, changes: list[PairChange], path: Path, dry_run: bool
                ) -> dict:
    return {
        "file": str(path), "written": not dry_run, "cases": learning.cases,
        "counts": learning.counts,
        "dropped": [{"symptom": s, "family": f, "fault": x, "count": n}
                    for s, f, x, n in learning.dropped],
        "changes": [{"symptom": c.symptom, "family": c.family,
                     "counts": [{"fault": f, "before": a, "after": b} for f, a, b in c.counts],
                     "orders": [{"suspects": o.suspects, "before": list(o.before),
                                 "after": list(o.after)} for o in c.orders]}
                    for c in changes],
    }


def _learn_text(learning: Learning, changes: list[PairChange], path: Path, dry_run: bool
                ) -> str:
    verb = "would write" if dry_run else "wrote"
    lines = ["", f"Learned counts: {verb} {learning.cases} case(s) to {path}"]
    for c in changes:
        lines.append(f"  {c.symptom} / {c.family}")
        for fault, before, after in c.counts:
            lines.append(f"    {fault}: {before} -> {after}")
        for o in c.orders:
            if o.before != o.after:
                lines.append(f"    {o.suspects} before: {' > '.join(o.before)}")
                lines.append(f"    {' ' * len(o.suspects)} after:  {' > '.join(o.after)}")
    if not changes:
        lines.append("  no change")
    for s, f, x, n in learning.dropped:
        lines.append(f"  left out {n} case(s) of {x} ({s} / {f}): not in the knowledge")
    return "\n".join(lines) + "\n"


def _with_inject(page: str, ws: Workspace, knowledge: Knowledge) -> str:
    """The review page with the injected sweep's tables before its safety section."""
    from faultwise.commands.sweep import _sets_dir
    from faultwise.shop.sweep import load_demo_sets
    from faultwise.shop.sweep_inject import run_inject
    from faultwise.shop.sweep_inject_report import inject_html

    sets = load_demo_sets(_sets_dir(ws, None), ws.knowledge_dir)
    from faultwise.graph.inject_known import load_known

    section = inject_html(run_inject(knowledge, sets, band_pass=False,
                                     known=load_known(knowledge, ws.knowledge_dir)))
    mark = "<h2>Safety</h2>"
    return page.replace(mark, section + mark, 1) if mark in page else page + section


def run(args: argparse.Namespace) -> int:
    from pathlib import Path

    from faultwise.core.errors import FaultwiseError
    from faultwise.shop.review import REOPEN_DAYS, parse_since, review_to_dict
    from faultwise.core.workspace import workspace_from_args

    if args.dry_run and not args.learn:
        raise FaultwiseError("--dry-run goes with --learn", key="--dry-run",
                             hint="run 'faultwise review --learn --dry-run'")
    since = parse_since(args.since)
    ws = workspace_from_args(args)
    if not ws.cases_dir.is_dir():
        raise FaultwiseError("the cases folder does not exist", file=str(ws.cases_dir),
                             hint="pass --cases with the shop's cases folder")
    days = REOPEN_DAYS if args.reopen_days is None else args.reopen_days
    review = None
    cacheable = not args.no_index and not args.learn
    if cacheable:       # nothing changed since the last review: no graph loaded, no shares
        from faultwise.shop.review_cache import cache_key, read_cached, review_from_dict

        key = cache_key(ws.cases_dir, ws.knowledge_dir, since=since, reopen_days=days)
        doc = read_cached(ws.cases_dir, key)
        if doc is not None:
            from dataclasses import replace

            cached = review_from_dict(doc)
            review = replace(cached, parsed=0, from_index=cached.parsed + cached.from_index,
                             index_note="nothing changed since the last review (review cache)")
    if review is None:
        from faultwise.cases.index import scan_cases
        from faultwise.graph.knowledge import load_knowledge
        from faultwise.shop.review import review_scan

        knowledge = load_knowledge(ws.knowledge_dir)
        scan = scan_cases(ws.cases_dir, use_index=not args.no_index)
        review = review_scan(scan, knowledge, since=since, reopen_days=days)
        if cacheable:
            from faultwise.shop.review_cache import write_cached

            write_cached(ws.cases_dir, key, review_to_dict(review))
    learned = None
    if args.learn:
        from faultwise.shop.learn import LEARNED_NAME, learn_changes, learn_counts, write_learned
        from faultwise.shop.review import selected_cases

        learning = learn_counts(selected_cases(scan.summaries, since), knowledge)
        changes = learn_changes(knowledge, learning)
        path = Path(ws.knowledge_dir) / LEARNED_NAME
        if not args.dry_run:
            path = write_learned(ws.knowledge_dir, learning)
        learned = (learning, changes, path, args.dry_run)
    if args.html:
        from faultwise.report.html_report import review_html

        page = review_html(review, ws.shop.name)
        if args.inject:
            page = _with_inject(page, ws, knowledge)
        try:
            Path(args.html).write_text(page, encoding="utf-8")
        except OSError as exc:
            raise FaultwiseError(f"cannot write the HTML review ({exc.strerror})",
                                 file=args.html, hint="choose a writable path") from None
    if args.json:
        doc = review_to_dict(review)
        if learned:
            doc["learn"] = _learn_dict(*learned)
        print(json.dumps(doc, indent=2))
    else:
        from faultwise.report.job import review_text

        sys.stdout.write(review_text(review))
        if learned:
            sys.stdout.write(_learn_text(*learned))
        if args.html:
            print(f"\nHTML review written to {args.html}")
    return 0
