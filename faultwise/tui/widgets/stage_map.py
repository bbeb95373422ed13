"""The receiver as a row of stage boxes, signal path left to right, the supply beside it.

Each box shows its stage's state as a symbol AND a word (never colour alone) and is
coloured by state; the stage of the current check has a heavy border. Once the walk has
concluded a fault, only the faulty stage stands out: stages that were suspected along the
way but never cleared are "not needed" (the fault explains the complaint), cleared ones stay
cleared.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Iterable

from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.content import Content
from textual.widgets import Static

UNTESTED, SUSPECT, CLEARED, FAULTY = "untested", "suspect", "cleared", "faulty"
NOT_NEEDED = "not-needed"

# (box id, label, domain stage): the speaker belongs to the audio stage in the graph.
BOXES = (
    ("antenna", "ANTENNA", "antenna"),
    ("oscillator", "OSC+MIXER", "oscillator"),
    ("if", "IF", "if"),
    ("detector", "DETECTOR", "detector"),
    ("audio", "AUDIO", "audio"),
    ("speaker", "SPEAKER", "audio"),
    ("supply", "SUPPLY", "supply"),
)

STATE_TEXT = {
    UNTESTED: "· to test",
    SUSPECT: "? suspect",
    CLEARED: "✓ cleared",
    FAULTY: "✗ FAULTY",
    NOT_NEEDED: "– no need",
}


@dataclass(frozen=True)
class StepView:
    """What the map needs of one recorded step."""

    stage: str
    outcome: str
    normal: bool
    phase: str = "diagnose"


def stage_states(steps: Iterable[StepView], fault_stage: str | None) -> dict[str, str]:
    """Stage -> state: any abnormal diagnose answer makes a stage suspect, answers that
    were all normal clear it, a skipped check changes nothing. With a concluded fault
    (``fault_stage``) its stage is faulty and every other suspect is not needed."""
    states: dict[str, str] = {}
    for step in steps:
        if step.phase != "diagnose" or step.outcome == "skipped":
            continue
        if not step.normal:
            states[step.stage] = SUSPECT
        elif states.get(step.stage) != SUSPECT:
            states[step.stage] = CLEARED
    if fault_stage:
        states = {stage: NOT_NEEDED if state == SUSPECT else state
                  for stage, state in states.items()}
        states[fault_stage] = FAULTY
    return states


class StageBox(Static):
    """One stage: its label, and its state as symbol and word below it."""

    def __init__(self, box_id: str, label: str, stage: str) -> None:
        super().__init__(id=f"stage-{box_id}", classes="stage-box")
        self.stage = stage
        self.label = label
        self.state = UNTESTED
        self.update(self._text(UNTESTED))

    def _text(self, state: str) -> Content:
        return Content.from_markup("[b]$label[/b]\n$state", label=self.label,
                                   state=STATE_TEXT[state])

    def show(self, state: str, current: bool) -> None:
        self.state = state
        self.update(self._text(state))
        for name in STATE_TEXT:
            self.set_class(name == state, f"-{name}")
        self.set_class(current, "-current")


class StageMap(Horizontal):
    """The row of stage boxes. ``show(states, current_stage)`` repaints them."""

    DEFAULT_CSS = """
    StageMap {
        height: 4;
        width: 1fr;
    }
    StageMap .stage-box {
        width: 1fr;
        min-width: 10;
        height: 4;
        border: round $panel-lighten-2;
        text-align: center;
        color: $text-muted;
    }
    StageMap #stage-supply {
        margin-left: 1;     /* beside the signal path; its border follows its state */
    }
    StageMap .stage-box.-suspect { color: $warning; border: round $warning; }
    StageMap .stage-box.-cleared { color: $success; border: round $success 70%; }
    StageMap .stage-box.-faulty { color: $error; text-style: bold; border: round $error; }
    StageMap .stage-box.-not-needed {
        color: $secondary;
        text-style: italic;
        border: round $secondary 50%;
    }
    StageMap .stage-box.-current {
        border: heavy $accent;
        background: $accent 20%;
    }
    """

    def compose(self) -> ComposeResult:
        for box_id, label, stage in BOXES:
            yield StageBox(box_id, label, stage)

    def show(self, states: dict[str, str], current_stage: str | None) -> None:
        for box in self.query(StageBox):
            box.show(states.get(box.stage, UNTESTED), box.stage == current_stage)
