"""``faultwise expect PROFILE [--json] [--knowledge DIR]``: expected readings for a set profile."""

from __future__ import annotations

import argparse
import json

TYPICAL_MARK = "*"
LEGEND = (f"{TYPICAL_MARK} rests on a typical value the profile did not give (or on a trade range): "
          "confirm it on the set where you can.")


def register(subparsers) -> None:
    from faultwise.commands import add_workspace_options

    p = subparsers.add_parser("expect", help="expected readings for a set profile",
                              description="Compute what each test point of the set should read, "
                              "with its band and the arithmetic behind it.")
    p.add_argument("profile", metavar="PROFILE", help="set profile YAML (faultwise-set/1)")
    add_workspace_options(p)
    p.add_argument("--json", action="store_true", help="print one JSON document")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from faultwise.expect.expected import expect
    from faultwise.profile.load import load_profile
    from faultwise.profile.model import profile_to_dict

    knowledge = None
    if getattr(args, "knowledge", None):
        from faultwise.core.workspace import resolve_workspace

        knowledge = resolve_workspace(args.knowledge).knowledge_dir
    profile = load_profile(args.profile, knowledge_dir=knowledge)
    table = None
    if knowledge is not None:
        from faultwise.profile.tubes import load_tube_table

        table = load_tube_table(knowledge)
    expectations = expect(profile, tube_table=table)
    if args.json:
        doc = {"profile": profile_to_dict(profile),
               "expectations": {name: _json_entry(e) for name, e in expectations.items()}}
        print(json.dumps(doc, indent=2, ensure_ascii=False))
        return 0
    print("\n".join(render_table(profile, expectations)))
    return 0


def _json_entry(e) -> dict:
    """The contract keys first, then title, stage and absent_below."""
    out = e.to_json()
    out.update({"title": e.title, "stage": e.stage, "absent_below": e.absent_below})
    return out


def render_table(profile, expectations: dict, width: int | None = None) -> list[str]:
    """Plain-text table grouped by stage: name, nominal, band, unit, marker; basis beneath."""
    import shutil
    import textwrap

    from faultwise.expect.expected import STAGES
    from faultwise.expect.context import basis_num as _num

    width = width or max(60, min(shutil.get_terminal_size((100, 24)).columns, 120))
    rows = list(expectations.values())
    name_w = max((len(e.name) for e in rows), default=4)
    lines = [f"Expected readings: {profile.label} ({profile.family})", LEGEND, ""]
    head = f"  {'name':<{name_w}}  {'nominal':>9}  {'band':>19}  {'unit':<5}"
    for stage in STAGES:
        group = [e for e in rows if e.stage == stage]
        if not group:
            continue
        lines += [stage.upper(), head]
        for e in group:
            band = f"{_num(e.low)} .. {_num(e.high)}"
            mark = TYPICAL_MARK if e.typical else " "
            lines.append(f"  {e.name:<{name_w}}  {_num(e.nominal):>9}  {band:>19}  {e.unit:<5} {mark}")
            lines += textwrap.wrap(e.basis, width=width, initial_indent="      ",
                                   subsequent_indent="      ")
        lines.append("")
    return lines
