"""``faultwise expect PROFILE [--json] [--chart [--html FILE]] [--knowledge DIR]``: expected
readings for a set profile; ``--chart`` prints them as a voltage chart by device and pin,
``--chart --html FILE`` writes the printable chart page."""

from __future__ import annotations

import argparse
import json
from collections.abc import Mapping
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from faultwise.expect.context import Expected
    from faultwise.profile.model import Profile
    from faultwise.profile.tubes import TubeTable

TYPICAL_MARK = "*"
LEGEND = (f"{TYPICAL_MARK} rests on a typical value the profile did not give (or on a trade range): "
          "confirm it on the set where you can.")


def register(subparsers: argparse._SubParsersAction) -> None:
    from faultwise.commands import add_workspace_options

    p = subparsers.add_parser("expect", help="expected readings for a set profile",
                              description="Compute what each test point of the set should read, "
                              "with its band and the arithmetic behind it.")
    p.add_argument("profile", metavar="PROFILE", help="set profile YAML (faultwise-set/1)")
    add_workspace_options(p)
    p.add_argument("--json", action="store_true", help="print one JSON document")
    p.add_argument("--chart", action="store_true",
                   help="print the voltage chart: every electrode of every device, by pin")
    p.add_argument("--html", metavar="FILE",
                   help="with --chart: write the chart as a printable HTML page to FILE")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from faultwise.expect.expected import expect
    from faultwise.profile.load import load_profile
    from faultwise.profile.tubes import workspace_tube_dir, workspace_tube_table
    from faultwise.profile.model import profile_to_dict

    knowledge = None
    if getattr(args, "knowledge", None):
        from faultwise.core.workspace import resolve_workspace

        knowledge = resolve_workspace(args.knowledge).knowledge_dir
    profile = load_profile(args.profile, knowledge_dir=workspace_tube_dir(knowledge))
    table = workspace_tube_table(knowledge)
    expectations = expect(profile, tube_table=table)
    if args.html and not args.chart:
        from faultwise.core.errors import InputError

        raise InputError("--html goes with --chart", key="--html",
                         hint="write: faultwise expect PROFILE --chart --html FILE")
    if args.chart:
        return _chart(args, profile, expectations, table)
    if args.json:
        doc = {"profile": profile_to_dict(profile),
               "expectations": {name: _json_entry(e) for name, e in expectations.items()}}
        print(json.dumps(doc, indent=2, ensure_ascii=False))
        return 0
    print("\n".join(render_table(profile, expectations)))
    return 0


def _chart(args: argparse.Namespace, profile: Profile, expectations: Mapping[str, Expected],
           table: TubeTable | None) -> int:
    from pathlib import Path

    from faultwise.expect.chart import chart_rows, render_chart

    rows = chart_rows(profile, expectations, table)
    if args.html:
        from faultwise.report.chart_html import chart_html
        from faultwise.core.errors import FaultwiseError

        try:
            Path(args.html).write_text(chart_html(profile, rows, table), encoding="utf-8")
        except OSError as exc:
            raise FaultwiseError(f"cannot write the chart page ({exc.strerror})", file=args.html,
                                 hint="choose a writable path") from None
        print(f"Voltage chart written to {args.html}")
        return 0
    print("\n".join(render_chart(profile, rows)))
    return 0


def _json_entry(e: Expected) -> dict:
    """The contract keys first, then title, stage and absent_below."""
    out = e.to_json()
    out.update({"title": e.title, "stage": e.stage, "absent_below": e.absent_below})
    return out


def render_table(profile: Profile, expectations: Mapping[str, Expected],
                 width: int | None = None) -> list[str]:
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
