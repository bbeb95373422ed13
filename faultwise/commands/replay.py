"""``faultwise replay [CASES...] [--json]``: re-walk recorded cases against the current graph."""

from __future__ import annotations

import argparse
import json
from pathlib import Path


def register(subparsers: argparse._SubParsersAction) -> None:
    from faultwise.commands import add_workspace_options

    p = subparsers.add_parser("replay", help="re-walk cases against the current knowledge",
                              description="Give each recorded case's answers to the current "
                              "graph and priors, and list every case whose path or conclusion "
                              "would change. Case files are only read.")
    p.add_argument("cases_given", nargs="*", metavar="CASES",
                   help="case ids, case files or folders (every case in them, subfolders "
                        "too); default: every case in the cases folder")
    add_workspace_options(p)
    p.add_argument("--json", action="store_true", help="print one JSON document")
    p.set_defaults(func=run)


def _targets(given: list[str], folder: Path) -> list[Path]:
    """Case files for what was given: a folder gives every case in it (subfolders too), a
    file itself, anything else is a case id in the cases folder."""
    from faultwise.cases.store import case_path
    from faultwise.core.errors import CaseError
    from faultwise.shop.replay import case_files

    out = []
    for item in given:
        path = Path(item)
        if path.is_dir():
            found = case_files(path)
            if not found:
                raise CaseError("the folder holds no case files", file=item,
                                hint="give a cases folder, a case file or a case id")
            out.extend(p for p in found if p not in out)
            continue
        if item.endswith(".json") or path.is_file():
            if not path.is_file():
                raise CaseError("there is no such case file", file=item,
                                hint="give a case id or the path of a case file")
            out.append(path)
            continue
        path = case_path(folder, item)
        if not path.is_file():
            raise CaseError(f"there is no case {item}", file=str(path),
                            hint="check the id, or give the path of the case file")
        out.append(path)
    return out


def run(args: argparse.Namespace) -> int:
    from faultwise.graph.knowledge import load_knowledge
    from faultwise.shop.replay import case_files, replay_files
    from faultwise.core.workspace import workspace_from_args

    ws = workspace_from_args(args)
    knowledge = load_knowledge(ws.knowledge_dir)
    if args.cases_given:
        paths = _targets(args.cases_given, ws.cases_dir)
    else:
        paths = case_files(ws.cases_dir)
    report = replay_files(knowledge, paths, knowledge_dir=ws.knowledge_dir)
    if args.json:
        print(json.dumps(report.to_json(), indent=2, ensure_ascii=False))
        return 0
    for r in report.results:
        if r.same:
            print(f"{r.case}  same  {r.now or 'no conclusion'}")
        else:
            print(f"{r.case}  changed at step {r.step}: was {r.check_was or '(end)'} -> "
                  f"{r.was or 'no conclusion'}; now {r.check_now or '(end)'} -> "
                  f"{r.now or 'no conclusion'}")
    for file, reason in report.damaged:
        print(f"{file}  damaged ({reason}), left as it is")
    for case, reason in report.failed:
        print(f"{case}  not replayed: {reason}")
    print(f"replayed {report.replayed} case{'s' if report.replayed != 1 else ''}: "
          f"{report.same} same, {len(report.changed)} changed, {len(report.damaged)} damaged"
          + (f", {len(report.failed)} not replayable" if report.failed else "") + ".")
    return 0
