"""Re-walk recorded cases against the current knowledge and priors (``faultwise replay``).

Each case's diagnose-phase answers are given again, by node, to a fresh :class:`Walk`
(measurements by their recorded value, so a changed band re-classifies them; skips skip
again; a resume made in the case is made again when the walk reaches the same fault). A
check the case never answered is answered the way ``walk --answers`` does: a reading by
expectation name from the case's readings if present, else nominal; an observation by
check id if present, else its normal choice -- but only when the case's diagnosis was
finished (a conclusion or an off-graph finding). An unfinished case stops at the first
check it did not answer. The result per case: same, or the first divergent step and the
old and new conclusions. Case files are only read; a damaged one is named and skipped.
"""

from __future__ import annotations

import os
from collections import deque
from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from faultwise.core.errors import DamagedCaseError, FaultwiseError
from faultwise.graph.nodes import MEASURE_OUTCOMES

if TYPE_CHECKING:
    from faultwise.expect.context import Expected
    from faultwise.graph.knowledge import Knowledge
    from faultwise.walk.state import Walk


@dataclass(frozen=True)
class ReplayResult:
    case: str
    file: str
    same: bool
    step: int | None                   # first divergent step, 1-based; None when paths agree
    was: str | None                    # old conclusion (fault id) or None
    now: str | None                    # new conclusion or None
    check_was: str | None = None       # "node: outcome" at the divergent step
    check_now: str | None = None
    old_path: tuple[tuple[str, str], ...] = ()
    new_path: tuple[tuple[str, str], ...] = ()

    def to_json(self) -> dict:
        return {"case": self.case, "step": self.step, "was": self.was, "now": self.now,
                "check_was": self.check_was, "check_now": self.check_now}


@dataclass(frozen=True)
class ReplayReport:
    results: tuple[ReplayResult, ...] = ()
    damaged: tuple[tuple[str, str], ...] = ()          # (file, reason)
    failed: tuple[tuple[str, str], ...] = ()           # (case, reason): not replayable

    @property
    def replayed(self) -> int:
        return len(self.results)

    @property
    def same(self) -> int:
        return sum(1 for r in self.results if r.same)

    @property
    def changed(self) -> tuple[ReplayResult, ...]:
        return tuple(r for r in self.results if not r.same)

    def to_json(self) -> dict:
        return {"replayed": self.replayed, "same": self.same,
                "changed": [r.to_json() for r in self.changed],
                "damaged": [{"file": f, "reason": r} for f, r in self.damaged],
                "failed": [{"case": c, "reason": r} for c, r in self.failed]}


def _diagnose_events(events: Iterable[Mapping]) -> list[Mapping]:
    return [e for e in events if e.get("type") in ("answer", "skip")
            and e.get("phase", "diagnose") == "diagnose"]


def _path_of(events: Iterable[Mapping]) -> tuple[tuple[str, str], ...]:
    return tuple((str(e.get("node")), "skipped" if e.get("type") == "skip"
                  else str(e.get("outcome"))) for e in _diagnose_events(events))


def _recorded_inputs(events: list[Mapping]) -> tuple[dict, dict]:
    readings, observations = {}, {}
    for e in _diagnose_events(events):
        if e.get("type") != "answer":
            continue
        if e.get("expect") and isinstance(e.get("value"), (int, float)):
            readings.setdefault(e["expect"], float(e["value"]))
        elif not e.get("expect"):
            observations.setdefault(str(e.get("node")), str(e.get("outcome")))
    return readings, observations


def _give(walk: Walk, event: Mapping, readings: Mapping, observations: Mapping) -> None:
    """Give one recorded answer again to the walk's current check."""
    from faultwise.walk.scripted import auto_answer
    from faultwise.expect.classify import representative_value

    if event.get("type") == "skip":
        walk.skip(str(event.get("reason") or ""))
        return
    prompt = walk.prompt()
    check = prompt.node
    outcome = event.get("outcome")
    if check.is_measurement:
        value = event.get("value")
        if prompt.expected is None:
            walk.answer(outcome if outcome in MEASURE_OUTCOMES else "normal")
        elif isinstance(value, (int, float)) and not isinstance(value, bool):
            walk.answer_value(float(value), raw=str(event.get("raw") or f"{value:g}"))
        elif outcome in MEASURE_OUTCOMES:
            walk.answer_value(representative_value(prompt.expected, outcome))
        else:
            auto_answer(walk, readings, observations)
        return
    if outcome in check.choices:
        walk.answer(outcome)
    else:
        auto_answer(walk, readings, observations)


def _at(path: tuple[tuple[str, str], ...], step: int) -> str | None:
    return f"{path[step - 1][0]}: {path[step - 1][1]}" if step <= len(path) else None


def replay_case(knowledge: Knowledge, data: Mapping, *,
                expectations: Mapping[str, Expected] | None = None,
                file: str = "",
                knowledge_dir: str | os.PathLike[str] | None = None) -> ReplayResult:
    """Re-walk one case's recorded answers against this knowledge; see the module doc.

    ``knowledge_dir``: the workspace's knowledge folder (its own tube table, if any, sets
    the expectations when none are given).
    """
    from faultwise.expect.expected import expect_in_workspace
    from faultwise.profile.load import profile_from_dict
    from faultwise.profile.tubes import workspace_tube_dir
    from faultwise.walk.state import Walk
    from faultwise.walk.scripted import auto_answer

    case_id = str(data.get("id") or file)
    s = data.get("set") if isinstance(data.get("set"), dict) else {}
    profile = profile_from_dict(s.get("profile") or {}, s.get("source") or file or case_id,
                                knowledge_dir=workspace_tube_dir(knowledge_dir))
    if expectations is None:
        expectations = expect_in_workspace(profile, knowledge_dir)
    events = [e for e in data.get("events") or [] if isinstance(e, dict)]
    old_path = _path_of(events)
    conclusion = data.get("conclusion") if isinstance(data.get("conclusion"), dict) else None
    was = conclusion.get("fault") if conclusion else None
    off_graph = [e for e in events if e.get("type") == "off-graph"]
    finished = was is not None or bool(off_graph)
    stop_at = {e.get("node") for e in off_graph if e.get("node")}
    resumes = deque(e.get("fault") for e in events if e.get("type") == "resume")
    by_node: dict[str, deque] = {}
    for e in _diagnose_events(events):
        by_node.setdefault(str(e.get("node")), deque()).append(e)
    readings, observations = _recorded_inputs(events)

    walk = Walk(knowledge, profile, str(data.get("symptom")), expectations=expectations)
    for _ in range(4 * len(knowledge.nodes) + len(events) + 10):
        prompt = walk.prompt()
        if prompt is None:
            break
        if prompt.kind == "repair":
            fault = walk.conclusion.id if walk.conclusion else None
            if resumes and fault is not None and resumes[0] == fault:
                resumes.popleft()
                walk.resume_diagnosis()
                continue
            break
        if prompt.kind != "check" or walk.phase != "diagnose":
            break
        node = prompt.node.id
        queued = by_node.get(node)
        if queued:
            _give(walk, queued.popleft(), readings, observations)
        elif finished and node not in stop_at:
            auto_answer(walk, readings, observations)
        else:
            break
    new_path = tuple((s.node, s.outcome) for s in walk.steps if s.phase == "diagnose")
    now = walk.conclusion.id if walk.conclusion else None
    step = None
    check_was = check_now = None
    if old_path != new_path:
        step = next((i + 1 for i, (a, b) in enumerate(zip(old_path, new_path)) if a != b),
                    min(len(old_path), len(new_path)) + 1)
        check_was, check_now = _at(old_path, step), _at(new_path, step)
    return ReplayResult(case_id, file, old_path == new_path and was == now, step, was, now,
                        check_was, check_now, old_path, new_path)


def replay_files(knowledge: Knowledge, paths: Iterable[Path], *,
                 knowledge_dir: str | os.PathLike[str] | None = None) -> ReplayReport:
    """Replay every case file; damaged files are named, unreplayable cases listed, none written."""
    from faultwise.cases.codec import read_case_bytes

    results, damaged, failed = [], [], []
    for path in paths:
        path = Path(path)
        try:
            data = read_case_bytes(path.read_bytes(), path)
        except DamagedCaseError as exc:
            damaged.append((str(path), getattr(exc, "reason", str(exc))))
            continue
        except OSError as exc:
            damaged.append((str(path), f"unreadable ({exc.strerror or exc})"))
            continue
        try:
            results.append(replay_case(knowledge, data, file=str(path),
                                       knowledge_dir=knowledge_dir))
        except FaultwiseError as exc:
            failed.append((str(data.get("id") or path.name), str(exc)))
    return ReplayReport(tuple(results), tuple(damaged), tuple(failed))


def case_files(folder: Path) -> list[Path]:
    """Every case file of a cases folder and its subfolders, sorted (temp and hidden files
    and hidden folders left out; the same listing as the review's index)."""
    from faultwise.cases.index import case_entries

    folder = Path(folder)
    if not folder.is_dir():
        return []
    # case_entries keeps regular files only: a FIFO would block the read.
    return [folder / name for name, *_ in case_entries(folder)]
