"""Where the knowledge, the cases and the set profiles live for this run.

Resolution order for each folder: the command-line option, then the environment
(``FAULTWISE_KNOWLEDGE``, ``FAULTWISE_CASES``, ``FAULTWISE_BENCH``), then a ``faultwise.yaml``
in the current folder (keys ``knowledge``, ``cases``, ``bench``), then the default: the
bundled knowledge, ``./cases`` and bench ``B1``.

The bench meter (key ``meter``, option ``--meter``, ``FAULTWISE_METER``; default ``manual``)
resolves the same way; its format is in :mod:`faultwise.meter.config`. ``--meter`` and the
environment replace the source and keep the options (time-out, backend) of the file.

The shop that prints the reports comes only from ``faultwise.yaml`` (no default: a report
shows no shop name when it is unset)::

    shop:
      name: Larkspur Lane Radio Works           # one line
      contact: 14 Larkspur Lane, tel. 0100 555 0199   # may span lines
      terms: Parts and labour are guaranteed for 90 days.   # printed on the customer copy

Every key is optional. A wrong key or value is a located error (file, line, key).
"""

from __future__ import annotations

import os
import re
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from faultwise.core.errors import CaseError, FaultwiseError
from faultwise.core.meter_setting import MeterConfig

if TYPE_CHECKING:
    import argparse

CONFIG_NAME = "faultwise.yaml"
CONFIG_KEYS = ("knowledge", "cases", "bench", "shop", "meter")
SHOP_KEYS = ("name", "contact", "terms")
SHOP_LIMITS = {"name": 80, "contact": 300, "terms": 1200}   # characters; the page must hold them
_BENCH_RE = re.compile(r"^[A-Za-z0-9_-]{1,40}\Z")


def bundled_knowledge_dir() -> Path:
    """The knowledge folder shipped inside the installed package; from a checkout that was
    never installed (``python -m faultwise`` at the repository root) the ``knowledge/``
    folder beside the package. Neither: a KnowledgeError saying how to install."""
    from importlib.resources import files

    try:
        return Path(str(files("faultwise.knowledge")))
    except ModuleNotFoundError:
        pass
    checkout = Path(__file__).resolve().parent.parent.parent / "knowledge"
    if (checkout / "symptoms.yaml").is_file():
        return checkout
    from faultwise.core.errors import KnowledgeError

    raise KnowledgeError("the bundled knowledge was not found",
                         hint="install the package with 'pip install .' from the repository "
                              "root, or give --knowledge DIR")


def check_bench(bench: object) -> str:
    """The bench name, if it is safe in a case id and a file name; CaseError otherwise."""
    bench = str(bench)
    if not _BENCH_RE.match(bench):
        from faultwise.core.safe_text import one_line

        raise CaseError(f"the bench name '{one_line(bench)}' may hold only letters, digits, "
                        "'-' and '_'", key="bench",
                        hint="use a short name such as B1 (40 characters at most)")
    return bench


@dataclass(frozen=True)
class Shop:
    """The shop named on the reports (``faultwise.yaml``, key ``shop``); empty when unset."""

    name: str = ""
    contact: str = ""
    terms: str = ""


@dataclass(frozen=True)
class Workspace:
    knowledge_dir: Path
    cases_dir: Path
    bench: str
    meter: MeterConfig = MeterConfig()
    shop: Shop = Shop()

    @property
    def sets_dir(self) -> Path:
        """Set profiles of the library: ``<knowledge>/sets``."""
        return self.knowledge_dir / "sets"


def _config(cwd: Path) -> dict:
    path = cwd / CONFIG_NAME
    if not path.is_file():
        return {}
    from faultwise.core.yamlload import line_of, load_yaml_file

    data = load_yaml_file(path)
    if data is None:
        return {}
    if not isinstance(data, dict):
        raise FaultwiseError("the config file must be a mapping", file=str(path),
                             hint="write keys " + ", ".join(CONFIG_KEYS))
    unknown = sorted(str(k) for k in set(data) - set(CONFIG_KEYS))
    if unknown:
        key = unknown[0]
        raise FaultwiseError("unknown key in the config file", file=str(path),
                             line=line_of(data, key), key=key,
                             hint="use only " + ", ".join(CONFIG_KEYS))
    for key in ("knowledge", "cases", "bench"):
        value = data.get(key)
        if value is not None and not isinstance(value, str):
            raise FaultwiseError(f"'{key}' must be a text", file=str(path),
                                 line=line_of(data, key), key=key,
                                 hint="write a folder path or a bench name")
    if "meter" in data:
        from faultwise.core.meter_setting import parse_meter_setting

        try:
            data["meter"] = parse_meter_setting(data["meter"], file=str(path), line_of=line_of)
        except FaultwiseError as exc:
            if exc.line is None:
                exc.line = line_of(data, "meter")
            raise
    return data


def _text(value: object, key: str, path: Path, line: int | None) -> str:
    """A shop field as text: strings and plain numbers (a phone number) are accepted."""
    if isinstance(value, bool) or not isinstance(value, (str, int, float)):
        raise FaultwiseError(f"'shop.{key}' must be a text", file=str(path), line=line,
                             key=f"shop.{key}", hint="write it as one line of text, quoted "
                             "if it holds a colon")
    text = str(value).strip()
    if key == "name" and "\n" in text:
        raise FaultwiseError("the shop name must be one line", file=str(path), line=line,
                             key="shop.name", hint="put the address under 'contact'")
    if len(text) > SHOP_LIMITS[key]:
        raise FaultwiseError(f"'shop.{key}' is too long ({len(text)} characters, at most "
                             f"{SHOP_LIMITS[key]})", file=str(path), line=line,
                             key=f"shop.{key}", hint="shorten it so the report fits its page")
    return text


def shop_from_config(conf: dict, cwd: Path) -> Shop:
    """The ``shop`` mapping of the config file; FaultwiseError (file, line, key) when wrong."""
    raw = conf.get("shop")
    if raw is None:
        return Shop()
    from faultwise.core.yamlload import line_of

    path = cwd / CONFIG_NAME
    if not isinstance(raw, dict):
        raise FaultwiseError("'shop' must be a mapping", file=str(path),
                             line=line_of(conf, "shop"), key="shop",
                             hint="write name, contact and terms under it")
    unknown = sorted(str(k) for k in set(raw) - set(SHOP_KEYS))
    if unknown:
        raise FaultwiseError("unknown key under 'shop'", file=str(path),
                             line=line_of(raw, unknown[0]), key=f"shop.{unknown[0]}",
                             hint="use only " + ", ".join(SHOP_KEYS))
    fields = {key: _text(raw[key], key, path, line_of(raw, key))
              for key in SHOP_KEYS if raw.get(key) is not None}
    return Shop(**fields)


def resolve_workspace(knowledge: str | os.PathLike | None = None,
                      cases: str | os.PathLike | None = None,
                      bench: str | None = None,
                      cwd: Path | None = None, meter: str | None = None) -> Workspace:
    """Pick the knowledge folder, cases folder, bench name and meter for this run."""
    cwd = Path.cwd() if cwd is None else cwd
    env = os.environ
    conf = _config(cwd)          # always read: the shop and the meter's options
    k = knowledge or env.get("FAULTWISE_KNOWLEDGE") or conf.get("knowledge")
    c = cases or env.get("FAULTWISE_CASES") or conf.get("cases") or "cases"
    b = bench or env.get("FAULTWISE_BENCH") or conf.get("bench") or "B1"
    kdir = Path(k).expanduser() if k else bundled_knowledge_dir()
    if not kdir.is_absolute():
        kdir = cwd / kdir
    cdir = Path(c).expanduser()
    if not cdir.is_absolute():
        cdir = cwd / cdir
    check_bench(b)
    if not kdir.is_dir():
        raise FaultwiseError("the knowledge folder does not exist", file=str(kdir),
                             hint="pass --knowledge with a folder that holds symptoms.yaml and graph/")
    from faultwise.core.meter_setting import with_spec

    meter_config = with_spec(conf.get("meter") or MeterConfig(), env.get("FAULTWISE_METER"),
                             key="FAULTWISE_METER")
    meter_config = with_spec(meter_config, meter)
    return Workspace(knowledge_dir=kdir, cases_dir=cdir, bench=str(b),
                     shop=shop_from_config(conf, cwd), meter=meter_config)


def workspace_from_args(args: argparse.Namespace) -> Workspace:
    """The workspace for a parsed command line (options given before or after the command)."""
    return resolve_workspace(getattr(args, "knowledge", None), getattr(args, "cases", None),
                             getattr(args, "bench", None), meter=getattr(args, "meter", None))
