"""Entry point for ``faultwise`` with no subcommand: resolve the workspace, run the app."""

from __future__ import annotations

import argparse

from faultwise.core.errors import FaultwiseError


def run_tui(args: argparse.Namespace) -> int:
    """Run the bench program; the exit status is the app's return code."""
    from faultwise.tui.app import build_app
    from faultwise.tui.settings import Settings, default_settings_path
    from faultwise.core.workspace import workspace_from_args

    workspace = workspace_from_args(args)
    try:
        workspace.cases_dir.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise FaultwiseError("the cases folder cannot be created", file=str(workspace.cases_dir),
                             hint=f"{exc.strerror or exc}; pass --cases with a folder you can "
                                  "write") from None
    app = build_app(workspace, settings=Settings.load(default_settings_path()))
    app.run()
    return app.return_code or 0
