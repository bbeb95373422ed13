"""Learned counts: closed, repaired cases -> ``<knowledge>/learned.yaml`` (review --learn).

Format (knowledge/README.md, "Knowledge schema"): ``{format: faultwise-learned/1, written, cases,
counts: {symptom: {family: {fault: n}}}}`` with every mapping's keys sorted, so a shop's
refinement is a reviewable diff. The file is written atomically (temp file in the same
folder, flush, fsync, rename, fsync the folder). The hand-written graph files are never
touched. Only faults, symptoms and families the knowledge knows are written; the rest are
reported as dropped.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from datetime import datetime, timezone
from pathlib import Path
from typing import TYPE_CHECKING, Iterable, Mapping

from faultwise.core.atomic import atomic_write
from faultwise.core.errors import FaultwiseError
from faultwise.shop.review_pairs import fault_counts, suspects_lists

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge

LEARNED_FORMAT = "faultwise-learned/1"
LEARNED_NAME = "learned.yaml"


@dataclass(frozen=True)
class Learning:
    """Counts to write, the number of cases behind them, and what was left out and why."""

    counts: dict            # {symptom: {family: {fault: n}}}, keys sorted
    cases: int
    dropped: tuple[tuple[str, str, str, int], ...]   # (symptom, family, fault, n), unknown


@dataclass(frozen=True)
class OrderChange:
    suspects: str
    before: tuple[str, ...]
    after: tuple[str, ...]


@dataclass(frozen=True)
class PairChange:
    """What learning changes for one pair: counts (fault, old, new) and the orders."""

    symptom: str
    family: str
    counts: tuple[tuple[str, int, int], ...]
    orders: tuple[OrderChange, ...]


def learn_counts(cases: Iterable[Mapping], knowledge: Knowledge | None) -> Learning:
    """Counts of concluded faults per symptom and family from closed, repaired cases."""
    counts: dict = {}
    dropped = []
    total = 0
    for (symptom, family), faults in sorted(fault_counts(cases).items()):
        for fault, n in sorted(faults.items()):
            node = knowledge.nodes.get(fault)
            sym = knowledge.symptoms.get(symptom)
            if node is None or node.kind != "fault" or sym is None or family not in sym.families:
                dropped.append((symptom, family, fault, n))
                continue
            counts.setdefault(symptom, {}).setdefault(family, {})[fault] = n
            total += n
    return Learning(counts, total, tuple(dropped))


def learned_yaml(learning: Learning, written: datetime) -> str:
    """The text of learned.yaml: fixed top-level order, sorted keys below, one count a line."""
    import yaml

    head = [f"format: {LEARNED_FORMAT}",
            f"written: '{written.isoformat(timespec='seconds')}'",
            f"cases: {learning.cases}"]
    comment = ("# Written by 'faultwise review --learn' from the shop's closed, repaired cases."
               " Do not edit by hand.")
    if not learning.counts:
        return "\n".join([comment, *head, "counts: {}"]) + "\n"
    body = yaml.safe_dump({"counts": learning.counts}, sort_keys=True, default_flow_style=False,
                          allow_unicode=True, width=100)
    return "\n".join([comment, *head]) + "\n" + body


def write_learned(knowledge_dir: str | os.PathLike, learning: Learning,
                  now: datetime | None = None) -> Path:
    """Write ``<knowledge>/learned.yaml`` atomically; FaultwiseError if the folder refuses."""
    path = Path(knowledge_dir) / LEARNED_NAME
    now = now or datetime.now(timezone.utc)
    try:
        atomic_write(path, learned_yaml(learning, now))
    except OSError as exc:
        raise FaultwiseError(f"cannot write the learned counts ({exc.strerror})", file=str(path),
                             hint="check that the knowledge folder is writable, or point "
                                  "--knowledge at the shop's own copy") from None
    return path


def learn_changes(knowledge: Knowledge, learning: Learning) -> list[PairChange]:
    """Per pair with old or new counts: count changes and every suspects order that moves."""
    from faultwise.walk.rank import rank_investigations

    old = knowledge.learned.counts
    pairs = sorted({(s, f) for s in old for f in old[s]} |
                   {(s, f) for s in learning.counts for f in learning.counts[s]})
    out = []
    for symptom, family in pairs:
        before = dict(knowledge.learned.pair(symptom, family))
        after = learning.counts.get(symptom, {}).get(family, {})
        changes = tuple((f, int(before.get(f, 0)), int(after.get(f, 0)))
                        for f in sorted(set(before) | set(after))
                        if int(before.get(f, 0)) != int(after.get(f, 0)))
        orders = []
        try:
            lists = suspects_lists(knowledge, symptom, family)
        except FaultwiseError:
            lists = []
        for sid in lists:
            b = tuple(r.target for r in rank_investigations(knowledge, sid, symptom, family,
                                                            counts=before))
            a = tuple(r.target for r in rank_investigations(knowledge, sid, symptom, family,
                                                            counts=after))
            orders.append(OrderChange(sid, b, a))
        if changes or any(o.before != o.after for o in orders):
            out.append(PairChange(symptom, family, changes, tuple(orders)))
    return out

