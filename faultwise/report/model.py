"""One job report model, built from a case and the knowledge, for both views of the report.

The **bench copy** (the shop's record) and the **customer copy** (what goes home with the
set) render the same :class:`JobReport` (:mod:`faultwise.report.render`). The model reads
the case as recorded: each reading's band is the band written into the case when it was
taken, not one computed again. The knowledge, when given, supplies check titles, the words
of an observation's choice (never the key that was pressed), the fault's repair steps and
its plain sentence for the owner. The shop comes from the workspace configuration
(:class:`faultwise.core.workspace.Shop`); no shop is named when it is unset.

Steps are numbered 1..n in walk order over every answered or skipped check of every phase
(diagnose, verify, closing); the case's own event numbers are not shown. No UI imports.
"""

from __future__ import annotations

from dataclasses import dataclass
from collections.abc import Iterable
from typing import TYPE_CHECKING, Mapping

from faultwise.core.vocabulary import LINE_FAMILIES, STAGES
from faultwise.core.workspace import Shop
from faultwise.report.formats import band_text, number

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge
    from faultwise.graph.nodes import Node

MAINS_FAMILIES = LINE_FAMILIES          # sets that get the leakage check
# The bench copy says what the family means for the bench; the customer copy says what
# kind of set it is, in words that do not alarm (a transformer set's chassis is not live).
FAMILY_BENCH = {
    "series-string": "series-string: AC/DC, no power transformer; the chassis may be live",
    "transformer": "transformer: mains through a power transformer; leakage check required",
    "transistor": "transistor: battery set; no leakage check needed",
}
FAMILY_CUSTOMER = {
    "series-string": "Tube set that runs straight from the mains (no power transformer)",
    "transformer": "Tube set with a power transformer",
    "transistor": "Transistor set (battery)",
}
RESULT_WORDS = {"normal": "normal", "low": "low: below the band", "high": "high: above the band",
                "absent": "absent"}


@dataclass(frozen=True)
class Step:
    """One check in walk order, in words: what was typed or chosen and how it was classified."""

    number: int               # 1..n in walk order
    phase: str                # diagnose | verify | closing
    node: str                 # for the shop's records only
    title: str
    answer: str               # a reading with its unit, a choice's words, or why it was not made
    band: str                 # the expected band as shown at the time; empty for an observation
    result: str               # the classification in words
    normal: bool
    skipped: bool = False
    routes_on: bool = False   # the answer routes to a suspects list (faultwise.walk.stages)

    @property
    def passed(self) -> str:
        """``passed``, ``not passed`` or ``not made``: how the customer copy states it."""
        return "not made" if self.skipped else ("passed" if self.normal else "not passed")


@dataclass(frozen=True)
class Part:
    """A part as the parts field recorded it, with the ratings read from it (empty: unknown)."""

    text: str
    rating: str


@dataclass(frozen=True)
class JobReport:
    shop: Shop
    case_id: str
    bench: str
    customer: str
    opened: str
    closed: str
    status: str
    set_label: str
    set_source: str
    family: str
    family_bench: str          # the family and what it means for the bench
    set_kind: str              # the kind of set in the owner's words
    complaint: str
    symptom: str
    symptom_title: str
    steps: tuple[Step, ...]    # every phase, numbered 1..n in walk order
    fault: str
    fault_title: str
    fault_plain: str           # one sentence for the owner; empty when the knowledge has none
    fault_stage: str
    off_graph: str
    repair: tuple[str, ...]
    parts: tuple[Part, ...]
    mains: bool                # mains-powered: the leakage check is required
    leakage_state: str         # passed | failed | not recorded | not needed
    minutes: float | None
    outcome: str
    notes: tuple[str, ...]
    stages: Mapping[str, str]  # stage -> a state of faultwise.walk.stages (absent: untested)

    def phase(self, name: str) -> tuple[Step, ...]:
        return tuple(s for s in self.steps if s.phase == name)

    @property
    def checks(self) -> tuple[Step, ...]:
        return self.phase("diagnose")

    @property
    def after(self) -> tuple[Step, ...]:
        return self.phase("verify")

    @property
    def leakage(self) -> tuple[Step, ...]:
        return self.phase("closing")

    @property
    def line_connected(self) -> bool:          # older name of ``mains``
        return self.mains


# ------------------------------------------------------------------------ building

def _node(knowledge: Knowledge | None, node_id: str) -> Node | None:
    return knowledge.nodes.get(node_id) if knowledge is not None and node_id else None


def _title(knowledge: Knowledge | None, node_id: str) -> str:
    node = _node(knowledge, node_id)
    if node is not None:
        return node.title
    # No knowledge for it: the id's last part in words, so no id reaches the customer copy.
    words = node_id.rsplit(".", 1)[-1].replace("-", " ").replace("_", " ").strip()
    return words[:1].upper() + words[1:] if words else "Check"


def _is_normal(knowledge: Knowledge | None, node_id: str, outcome: str) -> bool:
    node = _node(knowledge, node_id)
    if node is not None and getattr(node, "normal", None):
        return outcome == node.normal
    return outcome == "normal"


def _number(value: object) -> float | None:
    return float(value) if isinstance(value, (int, float)) and not isinstance(value, bool) \
        else None


def _answer_words(ev: Mapping, node: Node | None, band: Mapping | None, value: float | None,
                  outcome: str) -> str:
    """What was typed or chosen, in words: never the key pressed for a choice."""
    if value is not None and band and band.get("unit"):
        return number(value, str(band["unit"]))
    choices = getattr(node, "choices", None) or {}
    if outcome in choices:
        return str(choices[outcome])
    if getattr(node, "expect", None) or band:
        return f"judged {outcome}" if outcome else "-"
    # A choice the knowledge no longer lists: its recorded name in words (not the raw key).
    return outcome.replace("-", " ") if outcome else "-"


def _step(number: int, ev: Mapping, knowledge: Knowledge | None) -> Step:
    node_id = str(ev.get("node") or "")
    node = _node(knowledge, node_id)
    phase = str(ev.get("phase") or "diagnose")
    title = _title(knowledge, node_id)
    if ev.get("type") == "skip":
        reason = str(ev.get("reason") or "").strip()
        return Step(number, phase, node_id, title,
                    "not made" + (f": {reason}" if reason else " (no reason given)"),
                    "", "skipped", True, skipped=True)
    outcome = str(ev.get("outcome") or "")
    band = ev.get("band") if isinstance(ev.get("band"), dict) else None
    value = _number(ev.get("value"))
    normal = _is_normal(knowledge, node_id, outcome)
    is_reading = bool(band) or bool(getattr(node, "expect", None))
    result = RESULT_WORDS.get(outcome, outcome) if is_reading else \
        ("normal" if normal else "not normal")
    from faultwise.walk.stages import routes_on

    return Step(number, phase, node_id, title, _answer_words(ev, node, band, value, outcome),
                band_text(band), result, normal, routes_on=routes_on(node, outcome, knowledge))


def _stage_of(knowledge: Knowledge | None, node_id: str) -> str:
    node = _node(knowledge, node_id)
    if node is not None:
        return node.stage
    head = node_id.split(".", 1)[0]
    return head if head in STAGES else ""


def stage_states(checks: Iterable[Step], fault_stage: str,
                 knowledge: Knowledge | None = None) -> dict[str, str]:
    """Stage -> state of :func:`faultwise.walk.stages.stage_states` (the bench map's rule)."""
    from faultwise.walk.stages import StepView
    from faultwise.walk.stages import stage_states as rule

    return rule((StepView(_stage_of(knowledge, step.node),
                          "skipped" if step.skipped else "answered", step.normal, step.phase,
                          step.routes_on)
                 for step in checks), fault_stage or None)


def _leakage_state(mains: bool, closing: tuple[Step, ...]) -> str:
    made = [s for s in closing if not s.skipped]
    if not mains:
        return "not needed"
    if not made:
        return "not recorded"
    return "passed" if all(s.normal for s in made) else "failed"


def _off_graph_text(case: Mapping, events: list[dict]) -> str:
    findings = [str(e.get("finding")) for e in events
                if e.get("type") == "off-graph" and e.get("finding")]
    off = case.get("off_graph")
    return "; ".join(findings) or (str(off.get("finding")) if isinstance(off, dict)
                                   else str(off or ""))


def build_report(case: Mapping, knowledge: Knowledge | None = None,
                 shop: Shop | None = None) -> JobReport:
    """The report model of a case dict (format: :mod:`faultwise.cases.schema`)."""
    from faultwise.report.part_ratings import part_ratings

    events = [e for e in case.get("events") or () if isinstance(e, dict)]
    walked = [e for e in events if e.get("type") in ("answer", "skip") and e.get("node")]
    steps = tuple(_step(i, e, knowledge) for i, e in enumerate(walked, 1))
    conclusion = case.get("conclusion") if isinstance(case.get("conclusion"), dict) else {}
    fault = str(conclusion.get("fault") or "")
    node = _node(knowledge, fault)
    fault_stage = str(conclusion.get("stage") or (node.stage if node is not None else "")
                      or (_stage_of(None, fault) if fault else ""))
    symptom = str(case.get("symptom") or "")
    sym = knowledge.symptoms.get(symptom) if knowledge is not None else None
    s = case.get("set") if isinstance(case.get("set"), dict) else {}
    profile = s.get("profile") if isinstance(s.get("profile"), dict) else {}
    family = str(case.get("family") or profile.get("family") or "")
    if node is not None:    # this family's text, this set's ratings in the repair steps
        from faultwise.graph.node_text import for_case_profile

        node = for_case_profile(node, family, profile)
    mains = family in MAINS_FAMILIES
    parts = case.get("parts") if isinstance(case.get("parts"), list) else []
    diagnose = tuple(x for x in steps if x.phase == "diagnose")
    return JobReport(
        shop=shop or Shop(), case_id=str(case.get("id") or ""),
        bench=str(case.get("bench") or ""), customer=str(case.get("customer") or ""),
        opened=str(case.get("opened") or ""), closed=str(case.get("closed") or ""),
        status=str(case.get("status") or ""),
        set_label=str(profile.get("label") or s.get("source") or "(no set profile)"),
        set_source=str(s.get("source") or ""), family=family,
        family_bench=FAMILY_BENCH.get(family, family or "-"),
        set_kind=FAMILY_CUSTOMER.get(family, ""),
        complaint=str(case.get("complaint") or ""), symptom=symptom,
        symptom_title=sym.title if sym is not None else "",
        steps=steps, fault=fault,
        fault_title=str(conclusion.get("title") or (node.title if node is not None else "")),
        fault_plain=str(getattr(node, "plain", "") or ""),
        fault_stage=fault_stage, off_graph=_off_graph_text(case, events),
        repair=tuple(node.repair) if node is not None else (),
        parts=tuple(Part(t, r) for t, r in part_ratings(
            (p for p in parts if isinstance(p, (str, int, float)) and str(p).strip()), profile)),
        mains=mains, leakage_state=_leakage_state(mains, tuple(x for x in steps
                                                             if x.phase == "closing")),
        minutes=_number(case.get("minutes")), outcome=str(case.get("outcome") or ""),
        notes=tuple(str(e.get("text")) for e in events
                    if e.get("type") == "note" and e.get("text")),
        stages=stage_states(diagnose, fault_stage, knowledge))
