"""The receiver as a row of stage boxes, signal path left to right, the supply beside it.

Each box shows its stage's state as a symbol AND a word (never colour alone) and is
coloured by state; the stage of the current check has a heavy border. The states come from
the domain rule :func:`faultwise.walk.stages.stage_states`, the same the printed job report
uses: once the walk has concluded a fault, only the faulty stage stands out.
"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.content import Content
from textual.widgets import Static

from faultwise.walk.stages import (CLEARED, FAULTY, NOT_NEEDED, SUSPECT, UNTESTED, StepView,
                                   stage_states)

__all__ = ["BOXES", "STATE_TEXT", "StageBox", "StageMap", "StepView", "stage_states",
           "UNTESTED", "SUSPECT", "CLEARED", "FAULTY", "NOT_NEEDED"]

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
        """Repaint with ``state`` (a no-op when neither it nor ``current`` changed)."""
        if state != self.state:
            self.state = state
            # two lines in a box of fixed height and width: no new layout needed
            self.update(self._text(state), layout=False)
        classes = {f"-{name}": name == state for name in STATE_TEXT}
        classes["-current"] = current
        self.update_classes(classes)          # one restyle, and none when unchanged


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
        """Repaint the boxes whose state or current mark changed."""
        for box in self.children:
            if isinstance(box, StageBox):
                box.show(states.get(box.stage, UNTESTED), box.stage == current_stage)
