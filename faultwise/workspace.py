"""Where the knowledge, the cases and the set profiles live for this run.

Resolution order for each folder: the command-line option, then the environment
(``FAULTWISE_KNOWLEDGE``, ``FAULTWISE_CASES``, ``FAULTWISE_BENCH``), then a ``faultwise.yaml``
in the current folder (keys ``knowledge``, ``cases``, ``bench``), then the default: the
bundled knowledge, ``./cases`` and bench ``B1``.

The bench meter (key ``meter``, option ``--meter``, ``FAULTWISE_METER``; default ``manual``)
resolves the same way; its format is in :mod:`faultwise.meter.config`. ``--meter`` and the
environment replace the source and keep the options (time-out, backend) of the file.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

from faultwise.errors import FaultwiseError
from faultwise.meter.config import MeterConfig

CONFIG_NAME = "faultwise.yaml"


def bundled_knowledge_dir() -> Path:
    """The knowledge folder shipped inside the installed package."""
    from importlib.resources import files

    return Path(str(files("faultwise.knowledge")))


@dataclass(frozen=True)
class Workspace:
    knowledge_dir: Path
    cases_dir: Path
    bench: str
    meter: MeterConfig = MeterConfig()

    @property
    def sets_dir(self) -> Path:
        """Set profiles of the library: ``<knowledge>/sets``."""
        return self.knowledge_dir / "sets"


def _config(cwd: Path) -> dict:
    path = cwd / CONFIG_NAME
    if not path.is_file():
        return {}
    from faultwise.yamlload import load_yaml_file

    data = load_yaml_file(path)
    if not isinstance(data, dict):
        raise FaultwiseError("the config file must be a mapping", file=str(path),
                             hint="write keys knowledge, cases, bench and meter")
    unknown = set(data) - {"knowledge", "cases", "bench", "meter"}
    if unknown:
        key = sorted(unknown)[0]
        from faultwise.yamlload import line_of

        raise FaultwiseError("unknown key in the config file", file=str(path), key=key,
                             line=line_of(data, key),
                             hint="use only knowledge, cases, bench and meter")
    if "meter" in data:
        from faultwise.meter.config import parse_meter_setting
        from faultwise.yamlload import line_of

        try:
            data["meter"] = parse_meter_setting(data["meter"], file=str(path), line_of=line_of)
        except FaultwiseError as exc:
            if exc.line is None:
                exc.line = line_of(data, "meter")
            raise
    return data


def resolve_workspace(knowledge: str | os.PathLike | None = None,
                      cases: str | os.PathLike | None = None,
                      bench: str | None = None,
                      cwd: Path | None = None, meter: str | None = None) -> Workspace:
    """Pick the knowledge folder, cases folder, bench name and meter for this run."""
    cwd = Path.cwd() if cwd is None else cwd
    env = os.environ
    conf = _config(cwd)      # read even with every folder given: the meter's options
    k = knowledge or env.get("FAULTWISE_KNOWLEDGE") or conf.get("knowledge")
    c = cases or env.get("FAULTWISE_CASES") or conf.get("cases") or "cases"
    b = bench or env.get("FAULTWISE_BENCH") or conf.get("bench") or "B1"
    kdir = Path(k).expanduser() if k else bundled_knowledge_dir()
    if not kdir.is_absolute():
        kdir = cwd / kdir
    cdir = Path(c).expanduser()
    if not cdir.is_absolute():
        cdir = cwd / cdir
    from faultwise.cases import check_bench

    check_bench(b)
    if not kdir.is_dir():
        raise FaultwiseError("the knowledge folder does not exist", file=str(kdir),
                             hint="pass --knowledge with a folder that holds symptoms.yaml and graph/")
    from faultwise.meter.config import with_spec

    meter_config = with_spec(conf.get("meter") or MeterConfig(), env.get("FAULTWISE_METER"),
                             key="FAULTWISE_METER")
    meter_config = with_spec(meter_config, meter)
    return Workspace(knowledge_dir=kdir, cases_dir=cdir, bench=str(b), meter=meter_config)


def workspace_from_args(args) -> Workspace:
    """The workspace for a parsed command line (options given before or after the command)."""
    return resolve_workspace(getattr(args, "knowledge", None), getattr(args, "cases", None),
                             getattr(args, "bench", None), meter=getattr(args, "meter", None))
