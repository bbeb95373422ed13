"""The optimal-order bound: the least expected minutes any check order can reach.

The problem (single fault, known outcomes): hypotheses H (the faults of one complaint on one
set, with prior weights, plus the healthy set with weight 0), checks C with a cost in
minutes and, for every hypothesis, the outcome the check gives. A policy asks checks one
after another, each chosen from what the earlier outcomes left possible, until one
hypothesis is left. Its cost is the prior-weighted mean of the minutes spent per fault.

The healthy hypothesis carries no weight but must be told apart from every fault: a fault is
never concluded by elimination alone, some check must read differently from a good set
(the walk works the same way: a healthy set must end without a part blamed).

:func:`optimal_minutes` solves it by dynamic programming over the sets of hypotheses still
possible (memoised on the set):

    V(S) = 0                                      if S holds one hypothesis
    V(S) = min over checks c that split S of  cost(c) + sum_g  w(g)/w(S) V(g)

where g runs over the groups of S with the same outcome of c and w is the prior weight (a
set of zero weight -- only the healthy set -- costs nothing). A check that splits nothing
is never worth asking. Hypotheses no check separates are left together (``inseparable``).
A fault is concluded the way the walk concludes it: on a check whose outcome routes to it
(its *confirming* checks, ``Problem.confirms``). When a check leaves one fault that it does
not itself route to, the policy still pays for the cheapest of that fault's confirming checks
(a fault named by elimination among the listed ones is not yet proven; the walk's graph asks
for that proof, so the bound asks for it too). A fault with no confirming check listed is
concluded as soon as it is alone.

A complaint opens with a fixed check where its entry is one (``Problem.opening``): the
listening test that names the branch, or the unpowered plug reading that must come before
any powered one on a line set. Every order the walk may take starts there, so the bound
asks it first too (its minutes count even where it splits nothing); ``Solution.free_minutes``
is the optimum that may start anywhere, and shows what the opening itself costs.

The number of distinct sets reached is what bounds the work, and checks that confirm a
single fault each (most of a graph's confirming checks) make it grow as 2^n: the exhaustive
search is exact but is practical to about 25 hypotheses. ``restrict_singles=True`` tries, at
each set, every check that splits it several ways but only the best single-fault check by
weight over minutes (the interchange rule that makes p/c optimal for single-fault checks,
Kadane and Simon 1977 from memory): a real policy, so an upper bound on the optimum, and on
this knowledge within 0.5 % of the exhaustive optimum wherever that finished (measured
while building it). :func:`bound` uses the exhaustive search within a state budget and
the restricted one beyond it, and says which (``exact``).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field

HEALTHY = "(healthy)"


@dataclass(frozen=True)
class Problem:
    """Weights by hypothesis, and per check its minutes and outcome by hypothesis."""

    weights: Mapping[str, float]
    minutes: Mapping[str, float]
    outcomes: Mapping[str, Mapping[str, str]]      # check -> hypothesis -> outcome
    confirms: Mapping[str, frozenset] = field(default_factory=dict)   # hypothesis -> checks
    opening: str | None = None     # a check every order asks first (the complaint's opening)

    def confirm_minutes(self, hypothesis: str) -> float:
        """The cheapest confirming check of a hypothesis (0 with none listed)."""
        costs = [float(self.minutes[c]) for c in self.confirms.get(hypothesis, ())
                 if c in self.minutes]
        return min(costs) if costs else 0.0


@dataclass(frozen=True)
class Solution:
    minutes: float                        # expected minutes of the best order
    first: str | None                     # the best first check
    states: int                           # distinct sets of hypotheses solved
    inseparable: tuple[tuple[str, ...], ...] = ()
    exact: bool = True
    free_minutes: float | None = None     # the optimum without the opening check


EXACT_BUDGET = 3000
"""States the exhaustive search may solve before :func:`bound` falls back to the restricted one."""


def bound(problem: Problem, budget: int = EXACT_BUDGET) -> Solution:
    """The exact optimum when the exhaustive search fits in ``budget`` states; else the
    restricted search (a real policy, so an upper bound on the optimum), marked not exact.
    With an opening check, ``minutes`` opens with it and ``free_minutes`` is the optimum
    that may start anywhere."""
    try:
        return optimal_minutes(problem, restrict_singles=False, budget=budget)
    except TooLarge:
        sol = optimal_minutes(problem, restrict_singles=True)
        return Solution(sol.minutes, sol.first, sol.states, sol.inseparable, exact=False,
                        free_minutes=sol.free_minutes)


class TooLarge(Exception):
    """The state budget ran out."""


def optimal_minutes(problem: Problem, *, restrict_singles: bool = False,
                    budget: int | None = None, upper: float | None = None) -> Solution:
    """The optimum (see the module doc); ``restrict_singles=False``: every check at every state."""
    hyps = tuple(sorted(problem.weights))
    w = [float(problem.weights[h]) for h in hyps]
    checks = sorted(problem.minutes)
    # per check: its cost and, per outcome, the bitmask of the hypotheses giving it
    table = []
    for c in checks:
        outs = problem.outcomes[c]
        by_outcome: dict[str, int] = {}
        for i, h in enumerate(hyps):
            key = str(outs.get(h, ""))
            by_outcome[key] = by_outcome.get(key, 0) | (1 << i)
        if len(by_outcome) > 1:
            table.append((c, float(problem.minutes[c]), tuple(by_outcome.values())))
    stuck: list[tuple[str, ...]] = []
    # per hypothesis: the checks that conclude it, and the cheapest of them
    proof = [(frozenset(problem.confirms.get(h, ())), problem.confirm_minutes(h)) for h in hyps]
    weight_of: dict[int, float] = {}

    def weight(mask: int) -> float:
        total = weight_of.get(mask)
        if total is None:
            total, m = 0.0, mask
            while m:
                low = m & -m
                total += w[low.bit_length() - 1]
                m ^= low
            weight_of[mask] = total
        return total

    def left_alone(i: int, check: str) -> float:
        """Minutes still owed for hypothesis i left alone by ``check``."""
        confirmers, cheapest = proof[i]
        return 0.0 if not confirmers or check in confirmers else cheapest

    memo: dict[int, tuple[float, str | None]] = {}

    def solve(state: int, rows: list) -> tuple[float, str | None]:
        """V(state); ``rows``: the checks that split the parent set (a check that does not
        split a set splits none of its subsets, so the children weigh only these)."""
        hit = memo.get(state)
        if hit is not None:
            return hit
        if budget is not None and len(memo) > budget:
            raise TooLarge
        if state & (state - 1) == 0 or weight(state) <= 0:    # one hypothesis (or none) left
            memo[state] = (0.0, None)
            return memo[state]
        total = weight(state)
        child_rows = []            # the checks that split this set
        candidates = []            # (check, cost, groups) to weigh
        single_best = None         # (w/c, -cost, check) of the best single-fault test
        for row in rows:
            c, cost, masks = row
            if len(masks) == 2:             # most checks: two outcomes, a split in two
                a = state & masks[0]
                if not a or a == state:
                    continue
                groups = (a, state ^ a)
            else:
                groups = [g for g in (state & m for m in masks) if g]
                if len(groups) < 2:
                    continue
            child_rows.append(row)
            if restrict_singles and len(groups) == 2:
                # the heavier one-hypothesis side (of weight > 0), the first on a tie
                f, fw = None, 0.0
                for g in groups:
                    if g & (g - 1) == 0 and w[g.bit_length() - 1] > fw:
                        f, fw = g, w[g.bit_length() - 1]
                if f is not None:
                    key = (fw / cost if cost > 0 else float("inf"), -cost, c)
                    if single_best is None or key > single_best[0]:
                        single_best = (key, c, cost, groups)
                    continue
            candidates.append((c, cost, groups))
        if single_best is not None:
            candidates.append(single_best[1:])
        best, best_c = float("inf"), None
        for c, cost, groups in candidates:
            if cost >= best:
                continue
            value = cost
            for g in groups:
                gw = weight(g)
                if gw > 0:
                    if g & (g - 1) == 0:        # one hypothesis: nothing more to tell apart
                        value += gw / total * left_alone(g.bit_length() - 1, c)
                    else:
                        hit = memo.get(g)       # looked up here: most children are solved
                        value += gw / total * (hit or solve(g, child_rows))[0]
                    if value >= best:
                        break
            if value < best:
                best, best_c = value, c
        if best_c is None:
            stuck.append(tuple(sorted(hyps[i] for i in range(len(hyps)) if state >> i & 1)))
            memo[state] = (0.0, None)
        else:
            memo[state] = (best, best_c)
        return memo[state]

    start = (1 << len(hyps)) - 1
    value, first = solve(start, table)
    free = value
    if problem.opening is not None and problem.opening in problem.minutes:
        value, first = _opened(problem.opening, float(problem.minutes[problem.opening]),
                               table, start, weight, left_alone, solve), problem.opening
    states = len(memo)
    return Solution(value, first, states, tuple(sorted(set(stuck))), exact=not restrict_singles,
                    free_minutes=free)


def _opened(opening: str, cost: float, table: list, start: int, weight: Callable,
            left_alone: Callable, solve: Callable) -> float:
    """Minutes of the best order that asks ``opening`` first: its cost (asked even where it
    splits nothing), then the best order within each group of its outcomes."""
    masks = next((row[2] for row in table if row[0] == opening), (start,))
    total = weight(start)
    if total <= 0:
        return cost
    value = cost
    for g in (start & m for m in masks):
        gw = weight(g)
        if g and gw > 0:
            owed = left_alone(g.bit_length() - 1, opening) if g & (g - 1) == 0 else 0.0
            value += gw / total * (solve(g, table)[0] + owed)
    return value


def policy_minutes(problem: Problem, order: Sequence[str]) -> float:
    """Expected minutes of asking checks in one fixed ``order``, skipping checks that split nothing.

    Used by the tests' brute force over all orders: the best fixed order is an upper bound on
    the adaptive optimum, and equals it where adaptivity cannot help.
    """
    total = sum(problem.weights.values())
    out = 0.0
    for h, wh in problem.weights.items():
        if wh <= 0:
            continue
        alive = set(problem.weights)
        spent = 0.0
        for c in order:
            if len(alive) <= 1:
                break
            outs = problem.outcomes[c]
            if len({outs.get(x) for x in alive}) < 2:
                continue
            spent += problem.minutes[c]
            alive = {x for x in alive if outs.get(x) == outs.get(h)}
        out += wh / total * spent
    return out


def with_healthy(weights: Mapping[str, float], outcomes: Mapping[str, Mapping[str, str]],
                 normal: Mapping[str, str]) -> tuple[dict, dict]:
    """Weights and outcomes with the weightless healthy hypothesis added (its outcome: normal)."""
    ws = dict(weights)
    ws[HEALTHY] = 0.0
    outs = {c: {**o, HEALTHY: normal[c]} for c, o in outcomes.items()}
    return ws, outs
