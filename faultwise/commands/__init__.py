"""The subcommands: one module per command, each with ``register(subparsers)`` and ``run(args)``.

The workspace options every command takes are defined here, below the CLI entry point.
"""

from __future__ import annotations

import argparse


def add_workspace_options(p: argparse.ArgumentParser, *, top: bool = False) -> None:
    """The options every command that reads the workspace takes.

    On a subcommand the options default to "not given" (SUPPRESS), so that
    ``faultwise --knowledge X lint`` and ``faultwise lint --knowledge X`` mean the same.
    """
    default = None if top else argparse.SUPPRESS
    p.add_argument("--knowledge", metavar="DIR", default=default,
                   help="knowledge folder (default: the bundled one)")
    p.add_argument("--cases", metavar="DIR", default=default,
                   help="cases folder (default: ./cases)")
