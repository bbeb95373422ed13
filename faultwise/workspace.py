"""Where the knowledge, the cases and the set profiles live for this run.

Resolution order for each folder: the command-line option, then the environment
(``FAULTWISE_KNOWLEDGE``, ``FAULTWISE_CASES``, ``FAULTWISE_BENCH``), then a ``faultwise.yaml``
in the current folder (keys ``knowledge``, ``cases``, ``bench``), then the default: the
bundled knowledge, ``./cases`` and bench ``B1``.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

from faultwise.errors import FaultwiseError

CONFIG_NAME = "faultwise.yaml"


def bundled_knowledge_dir() -> Path:
    """The knowledge folder shipped inside the installed package; from a checkout that was
    never installed (``python -m faultwise`` at the repository root) the ``knowledge/``
    folder beside the package. Neither: a KnowledgeError saying how to install."""
    from importlib.resources import files

    try:
        return Path(str(files("faultwise.knowledge")))
    except ModuleNotFoundError:
        pass
    checkout = Path(__file__).resolve().parent.parent / "knowledge"
    if (checkout / "symptoms.yaml").is_file():
        return checkout
    from faultwise.errors import KnowledgeError

    raise KnowledgeError("the bundled knowledge was not found",
                         hint="install the package with 'pip install .' from the repository "
                              "root, or give --knowledge DIR")


@dataclass(frozen=True)
class Workspace:
    knowledge_dir: Path
    cases_dir: Path
    bench: str

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
                             hint="write keys knowledge, cases and bench")
    unknown = set(data) - {"knowledge", "cases", "bench"}
    if unknown:
        key = sorted(unknown)[0]
        raise FaultwiseError("unknown key in the config file", file=str(path), key=key,
                             hint="use only knowledge, cases and bench")
    return data


def resolve_workspace(knowledge: str | os.PathLike | None = None,
                      cases: str | os.PathLike | None = None,
                      bench: str | None = None,
                      cwd: Path | None = None) -> Workspace:
    """Pick the knowledge folder, cases folder and bench name for this run."""
    cwd = Path.cwd() if cwd is None else cwd
    env = os.environ
    need_config = knowledge is None and "FAULTWISE_KNOWLEDGE" not in env or \
        cases is None and "FAULTWISE_CASES" not in env or \
        bench is None and "FAULTWISE_BENCH" not in env
    conf = _config(cwd) if need_config else {}
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
    return Workspace(knowledge_dir=kdir, cases_dir=cdir, bench=str(b))


def workspace_from_args(args) -> Workspace:
    """The workspace for a parsed command line (options given before or after the command)."""
    return resolve_workspace(getattr(args, "knowledge", None), getattr(args, "cases", None),
                             getattr(args, "bench", None))
