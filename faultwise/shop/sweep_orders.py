"""The simple suspect orders the p/c walk is measured against (the sweep's baselines).

Each order is a function ``(ranked, suspects) -> ranked`` handed to ``walk.auto_walk``
through its ``order`` hook: *written* keeps the graph's written order, *speaker-back* takes
the suspects stage by stage from the speaker towards the aerial (SPEAKER_BACK), *random*
shuffles each suspects list with a seed fixed per list, so every run gives the same order.
"""

from __future__ import annotations

import inspect
import random
from collections.abc import Callable
from typing import TYPE_CHECKING

from faultwise.graph.nodes import Suspects

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge
    from faultwise.walk.rank import Ranked

#: stage order of the speaker-back baseline: signal tracing from the speaker towards the aerial,
#: then the supply last (common practice, no source).
SPEAKER_BACK = ("audio", "detector", "if", "oscillator", "antenna", "supply")
BASELINES = ("written", "speaker-back", "random")
RANDOM_SEED = 1955          # fixed so that the random baseline is the same on every run


#: the walk's ``order`` hook: (p/c-ranked suspects, the suspects list) -> the order to take
OrderFn = Callable[[list["Ranked"], Suspects], list["Ranked"]]


def _written_index(suspects: Suspects) -> dict[str, int]:
    index: dict[str, int] = {}
    for i, inv in enumerate(suspects.investigations):
        index.setdefault(inv.target, i)
    return index


def written_order(ranked: list[Ranked], suspects: Suspects) -> list[Ranked]:
    """The investigations as the graph writes them, ignoring p/c."""
    index = _written_index(suspects)
    return sorted(ranked, key=lambda r: index.get(r.target, len(index)))


def speaker_back_order(knowledge: Knowledge) -> OrderFn:
    """Investigations by the stage of their target (SPEAKER_BACK), written order within a stage."""
    def order(ranked: list[Ranked], suspects: Suspects) -> list[Ranked]:
        index = _written_index(suspects)

        def key(r: Ranked) -> tuple[int, int]:
            node = knowledge.nodes.get(r.target)
            stage = getattr(node, "stage", "supply")
            rank = SPEAKER_BACK.index(stage) if stage in SPEAKER_BACK else len(SPEAKER_BACK)
            return rank, index.get(r.target, len(index))
        return sorted(ranked, key=key)
    return order


def random_order(seed: int = RANDOM_SEED) -> OrderFn:
    """Each suspects list shuffled once by random.Random(f"{seed}:{suspects id}"): fixed per seed."""
    def order(ranked: list[Ranked], suspects: Suspects) -> list[Ranked]:
        targets = list(_written_index(suspects))
        random.Random(f"{seed}:{suspects.id}").shuffle(targets)
        position = {t: i for i, t in enumerate(targets)}
        return sorted(ranked, key=lambda r: position.get(r.target, len(position)))
    return order


def baseline_orders(knowledge: Knowledge, seed: int = RANDOM_SEED) -> dict[str, OrderFn]:
    """The simple orders the p/c walk is measured against, by name (BASELINES)."""
    return {"written": written_order, "speaker-back": speaker_back_order(knowledge),
            "random": random_order(seed)}


def walk_has_order_hook() -> bool:
    """Whether ``walk.auto_walk`` takes ``order=`` (needed for the baselines)."""
    from faultwise.walk import scripted as walk

    return "order" in inspect.signature(walk.auto_walk).parameters
