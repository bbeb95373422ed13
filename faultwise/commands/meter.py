"""``faultwise meter [--meter SPEC] [--count N] [--json]``: what the bench meter reads now.

One line per sample (value, unit, AC/DC, the meter's identity, the time) until N samples or
Ctrl-C, so a technician can test the link before a job. ``--json`` prints one JSON list of
samples ``[{"value", "unit", "mode", "meter", "at"}]`` (DESIGN section 10; an overload has
value null and ``"overload": true``); without ``--count`` it takes one sample. Ctrl-C stops
cleanly: the samples so far are printed and the exit status is 0. A meter that does not
answer, or a bad setting, is one sentence on stderr and exit status 1.
"""

from __future__ import annotations

import argparse
import json
import sys
import time
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from faultwise.meter.base import Quantity, Sample


def register(subparsers: argparse._SubParsersAction) -> None:
    from faultwise.meter.base import QUANTITIES

    p = subparsers.add_parser("meter", help="show what the bench meter reads",
                              description="Read the bench meter set for this bench (faultwise.yaml "
                              "'meter:', FAULTWISE_METER or --meter) to test the link.")
    p.add_argument("--meter", metavar="SPEC", default=argparse.SUPPRESS,
                   help="visa:RESOURCE, sigrok:DRIVER[:conn=PORT] or manual")
    p.add_argument("--count", type=int, metavar="N", default=None,
                   help="stop after N samples (default: until Ctrl-C; 1 with --json)")
    p.add_argument("--quantity", choices=sorted(QUANTITIES), default=None,
                   help="what a VISA meter is asked to measure (default: what it is set to)")
    p.add_argument("--interval", type=float, metavar="S", default=0.5,
                   help="pause between samples in seconds (default 0.5)")
    p.add_argument("--json", action="store_true", help="print one JSON list of samples")
    p.set_defaults(func=run)


def sample_line(n: int, sample: Sample) -> str:
    """'  1  146.2 V DC   Demo DMM-45 SIM0001   2026-12-02T06:10:02+00:00'."""
    from faultwise.core.safe_text import one_line

    return f"{n:>3}  {sample.shown():<16} {one_line(sample.meter)}   {sample.at}"


def run(args: argparse.Namespace) -> int:
    from faultwise.core.errors import FaultwiseError
    from faultwise.meter import QUANTITIES, open_meter
    from faultwise.core.workspace import workspace_from_args

    if args.count is not None and args.count < 1:
        raise FaultwiseError("--count must be 1 or more", key="--count",
                             hint="give the number of samples, or leave it out")
    if not 0 <= args.interval <= 3600:
        raise FaultwiseError("--interval must be from 0 to 3600 seconds", key="--interval")
    ws = workspace_from_args(args)
    if ws.meter.is_manual:
        raise FaultwiseError("no meter is set for this bench (meter: manual)", key="meter",
                             hint="pass --meter visa:RESOURCE or sigrok:DRIVER[:conn=PORT], "
                                  "or set meter: in faultwise.yaml")
    count = args.count if args.count is not None else (1 if args.json else None)
    quantity = QUANTITIES[args.quantity] if args.quantity else None
    meter = open_meter(ws.meter)
    samples = []
    try:
        while count is None or len(samples) < count:
            if samples and args.interval:
                time.sleep(args.interval)
            sample = meter.read(quantity)
            if quantity is not None and not meter.can_select:
                _check_dial(sample, quantity)
            samples.append(sample)
            if not args.json:
                print(sample_line(len(samples), sample), flush=True)
    except KeyboardInterrupt:
        if not args.json:
            print(f"stopped after {len(samples)} sample{'s' if len(samples) != 1 else ''}.",
                  file=sys.stderr)
    finally:
        meter.close()
    if args.json:
        print(json.dumps([s.to_json() for s in samples], indent=2, ensure_ascii=False))
    return 0


def _check_dial(sample: Sample, quantity: Quantity) -> None:
    """A meter whose function is set on its dial (sigrok) must read what --quantity asks."""
    from faultwise.meter import MeterRefused

    if sample.unit != quantity.unit or (sample.mode and quantity.mode
                                        and sample.mode != quantity.mode):
        raise MeterRefused(f"the meter reads {sample.mode} {sample.unit}".replace("  ", " ")
                           + f", not {quantity.title}",
                           hint=f"turn its dial to {quantity.title}")
