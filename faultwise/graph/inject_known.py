"""Faults the readings alone cannot find: ``<knowledge>/inject_known.yaml``.

The injected sweep (:mod:`faultwise.shop.sweep_inject`) fails on every modelled fault it does not
find, except those listed here with the physical reason and the check that does find them.
Each entry::

    - fault: supply.open-first-filter-cap          # a fault id with a model
      sets: [demo-6v-console.yaml]                 # the set files where readings miss it
      found_by: supply.low-b-ripple                # a check whose routes reach the fault
      reason: B+ stays in band; only the ripple shows the dried capacitor

A miss is *explained* when its fault and set are listed; the entry is checked when loaded
(the fault exists and has a model, the check exists and can reach the fault for the set's
family) and a bad entry is a located error. The knowledge README lists the same faults in words.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from faultwise.core.errors import FaultwiseError
from faultwise.graph.nodes import Check, Fault

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge

FILE_NAME = "inject_known.yaml"
FORMAT = "faultwise-inject-known/1"


@dataclass(frozen=True)
class Known:
    fault: str
    sets: tuple[str, ...]
    found_by: str
    reason: str


def load_known(knowledge: Knowledge,
               knowledge_dir: str | os.PathLike[str]) -> dict[tuple[str, str], Known]:
    """{(set file name, fault id): entry}; empty when the file does not exist."""
    from faultwise.core.yamlload import line_of, load_yaml_file

    path = Path(knowledge_dir) / FILE_NAME
    if not path.is_file():
        return {}
    data = load_yaml_file(path)
    hint = f"write 'format: {FORMAT}' and 'faults:' with fault, sets, found_by and reason"
    if not isinstance(data, dict) or data.get("format") != FORMAT or \
            not isinstance(data.get("faults"), list):
        raise FaultwiseError("not a list of faults the readings cannot find", file=str(path),
                             line=1, hint=hint)
    out: dict[tuple[str, str], Known] = {}
    for item in data["faults"]:
        line = line_of(data["faults"], data["faults"].index(item))
        if not isinstance(item, dict) or not all(k in item for k in ("fault", "sets", "found_by",
                                                                        "reason")):
            raise FaultwiseError("an entry needs fault, sets, found_by and reason",
                                 file=str(path), line=line, hint=hint)
        fid, check_id = str(item["fault"]), str(item["found_by"])
        fault, check = knowledge.nodes.get(fid), knowledge.nodes.get(check_id)
        if not isinstance(fault, Fault) or not fault.model:
            raise FaultwiseError(f"'{fid}' is not a fault with a model", file=str(path),
                                 line=line, node=fid, hint="name a fault that carries 'model:'")
        if not isinstance(check, Check) or not any(
                fid in knowledge.faults_under(check_id, fam) for fam in fault.families):
            raise FaultwiseError(f"the check '{check_id}' cannot reach '{fid}'", file=str(path),
                                 line=line, node=fid,
                                 hint="name a check whose routes lead to the fault")
        sets = item["sets"] if isinstance(item["sets"], list) else [item["sets"]]
        entry = Known(fid, tuple(str(s) for s in sets), check_id, str(item["reason"]))
        for s in entry.sets:
            out[(s, fid)] = entry
    return out
