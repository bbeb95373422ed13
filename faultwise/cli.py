"""Command line: ``faultwise`` (the bench TUI) and its subcommands.

Each subcommand lives in ``faultwise/commands/<name>.py`` with two functions:
``register(subparsers)`` adds its parser (and must import nothing heavy), and
``run(args) -> int`` does the work. Errors are :class:`FaultwiseError`; this module turns
them into one sentence on stderr and exit status 1. No traceback reaches the user.
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys

from faultwise.commands import add_workspace_options
from faultwise.core.errors import FaultwiseError

COMMANDS = ("expect", "match", "lint", "walk", "replay", "review", "sweep", "report", "demo",
            "meter")


class _Parser(argparse.ArgumentParser):
    """An argument parser whose usage errors exit with status 1 and one sentence."""

    def error(self, message: str) -> None:  # noqa: D401 - argparse API
        self.exit(1, f"faultwise: {message}. Run '{self.prog} --help' for the options.\n")


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(prog="faultwise",
                     description="Bench companion for repairing AM broadcast receivers.")
    from faultwise import __version__

    parser.add_argument("--version", action="version", version=f"faultwise {__version__}")
    add_workspace_options(parser, top=True)
    parser.add_argument("--bench", metavar="NAME", help="this bench's name (default: B1)")
    parser.add_argument("--meter", metavar="SPEC", help="the bench meter: visa:RESOURCE, "
                        "sigrok:DRIVER[:conn=PORT] or manual (default: manual)")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for name in COMMANDS:
        try:
            module = importlib.import_module(f"faultwise.commands.{name}")
        except ModuleNotFoundError as exc:
            if exc.name == f"faultwise.commands.{name}":
                continue  # command not built yet
            raise
        module.register(sub)
    return parser


def _run_tui(args: argparse.Namespace) -> int:
    from faultwise.tui.run import run_tui

    return run_tui(args)


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    try:
        if args.command is None:
            return _run_tui(args)
        return int(args.func(args) or 0)
    except FaultwiseError as exc:
        print(f"faultwise: {exc}", file=sys.stderr)
        return 1
    except KeyboardInterrupt:
        print("faultwise: interrupted.", file=sys.stderr)
        return 130
    except BrokenPipeError:
        return 0
    except Exception as exc:  # last line of defence: never show a traceback
        if os.environ.get("FAULTWISE_DEBUG"):
            raise
        print(f"faultwise: internal error ({type(exc).__name__}: {exc}). "
              "Nothing recorded was lost; set FAULTWISE_DEBUG=1 to see the details and report it.",
              file=sys.stderr)
        return 2


if __name__ == "__main__":
    raise SystemExit(main())
