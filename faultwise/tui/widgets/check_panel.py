"""The current check: title, instruction, expected band with its basis, numbered choices,
the answer field and, below it, why the last input was refused.

The panel only shows and collects; the screen gives the text to the walk. All knowledge
and user text is passed to ``Content`` as template variables, never as markup.
"""

from __future__ import annotations

from collections.abc import Iterable

from textual import events, on
from textual.app import ComposeResult
from textual.containers import Vertical
from textual.content import Content
from textual.message import Message
from textual.widgets import Input, Static

from faultwise.core.units import format_reading
from faultwise.expect.context import Expected
from faultwise.graph.knowledge import Knowledge
from faultwise.tui.meter_state import meter_hint
from faultwise.tui.widgets.bench_input import BenchInput, choices_hint
from faultwise.tui.widgets.in_place import set_text
from faultwise.tui.wording import printable, readable
from faultwise.walk.results import Prompt

PHASE_TAGS = {"diagnose": "CHECK", "verify": "VERIFY", "closing": "BEFORE IT GOES BACK"}


def reading_text(value: float, unit: str) -> str:
    """A value with its unit, as the trade writes it (units.format_reading)."""
    try:
        return format_reading(value, unit)
    except Exception:  # an expectation in a unit the formatter does not know
        return f"{value:g} {unit}".strip()


BASIS_CHARS = 160      # about two lines at 80 columns; the sheet (F6) has the rest


def short_basis(text: str, limit: int = BASIS_CHARS) -> str:
    """The basis cut at a word near ``limit`` characters, pointing to the sheet for the rest
    (a long worked basis would push the answer history off an 80x24 screen)."""
    if len(text) <= limit:
        return text
    cut = text.rfind(" ", 0, limit)
    return text[: cut if cut > limit // 2 else limit].rstrip(" ,;") + " … (F6: the full basis)"


def band_lines(expected: Expected) -> list[Content]:
    """'Expect 131 V to 160 V (nominal 146 V)', the typical mark, then the basis."""
    unit = expected.unit
    band = Content.from_markup(
        "[b]Expect[/b] $low to $high  [dim](nominal $nominal)[/dim]",
        low=reading_text(expected.low, unit), high=reading_text(expected.high, unit),
        nominal=reading_text(expected.nominal, unit))
    lines = [band]
    if expected.typical:
        lines.append(Content.from_markup(
            "[b]≈ typical:[/b] this band rests on typical values the profile did not "
            "give; treat it as a guide"))
    lines.append(Content.from_markup("[dim]Basis:[/dim] $basis",
                                     basis=short_basis(expected.basis or "-")))
    return lines


class CheckPanel(Vertical):
    """Shows one check prompt and posts :class:`CheckPanel.Answered` with the typed text."""

    DEFAULT_CSS = """
    CheckPanel { height: auto; padding: 0 1; }
    CheckPanel #check-title { text-style: bold; color: $primary; }
    CheckPanel #check-choices { color: $text; }
    CheckPanel #answer { margin-top: 1; background: $panel-lighten-1; }
    CheckPanel #answer-error { color: $error; height: auto; }
    CheckPanel #check-warning { color: $warning; height: auto; }
    CheckPanel #meter-line { color: $text-muted; height: auto; display: none; }
    """

    class Answered(Message):
        """The tech submitted an answer (a reading, a choice number or name)."""

        def __init__(self, text: str) -> None:
            super().__init__()
            self.text = text

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self.prompt = None

    def compose(self) -> ComposeResult:
        yield Static("", id="check-title")
        yield Static("", id="check-instruction")
        yield Static("", id="check-expected")
        yield Static("", id="check-choices")
        yield Static("", id="check-warning")
        # Not select_on_focus: coming back from a dialog, typing goes on after what was typed.
        yield AnswerInput(id="answer", compact=True, select_on_focus=False,
                          placeholder="type the reading, Enter records it")
        yield Static("", id="answer-error")
        yield Static("", id="meter-line")

    def on_mount(self) -> None:
        self._title = self.query_one("#check-title", Static)
        self._instruction = self.query_one("#check-instruction", Static)
        self._expected = self.query_one("#check-expected", Static)
        self._choices = self.query_one("#check-choices", Static)
        self._warning = self.query_one("#check-warning", Static)
        self._error = self.query_one("#answer-error", Static)
        self._meter = self.query_one("#meter-line", Static)
        self._input = self.query_one("#answer", AnswerInput)

    @property
    def input(self) -> AnswerInput:
        """The answer field."""
        return self._input

    def show(self, prompt: Prompt, knowledge: Knowledge | None = None) -> None:
        """Display a check prompt (kind 'check') and clear the field and the error;
        ``knowledge`` puts node titles in place of ids in the warning. Only the lines that
        differ from the check shown before are redrawn."""
        self.prompt = prompt
        check = prompt.node
        tag = PHASE_TAGS.get(prompt.phase, prompt.phase.upper())
        if prompt.position:
            tag += f" {prompt.position[0]} of {prompt.position[1]}"
        set_text(self._title, Content.from_markup(
            "$tag  $title  [dim]($stage)[/dim]", tag=tag, title=check.title,
            stage=check.stage))
        if prompt.is_measurement:
            exp = prompt.expected
            from faultwise.core.units import reads_open

            opened = " OL or open: an open circuit." if reads_open(exp.unit or "V") else ""
            set_text(self._instruction, Content.from_markup(
                "Measure: $what. Type the reading (in $unit or with a prefix: 4k7, 150m, "
                "2R2).$opened", what=exp.title, unit=exp.unit or "its unit", opened=opened))
            set_text(self._expected, Content("\n").join(band_lines(exp)))
            placeholder = f"type the reading in {exp.unit or 'its unit'}, then Enter"
        else:
            set_text(self._instruction, "This set's profile gives no band for this reading: "
                     "judge it and choose." if check.is_measurement else
                     "What do you see? Press its number.")
            set_text(self._choices, choice_lines(prompt.choices))
            placeholder = choices_hint(len(prompt.choices)) + " (or the choice's name)"
        self._input.choices = 0 if prompt.is_measurement else len(prompt.choices)
        self._expected.display = prompt.is_measurement
        self._choices.display = not prompt.is_measurement
        if self._input.placeholder != placeholder:
            self._input.placeholder = placeholder
        if prompt.warning:
            set_text(self._warning, Content.from_markup(
                "[b]![/b] $w", w=readable(prompt.warning, knowledge)))
        self._warning.display = bool(prompt.warning)
        if self._input.value:
            self._input.value = ""
        self.show_error(None)
        self.show_meter(meter_hint(getattr(self.app, "bench", None), prompt))

    def show_meter(self, text: str) -> None:
        """The bench meter's line (tui.meter_keys), hidden when the bench has none."""
        set_text(self._meter, Content(text))
        self._meter.display = bool(text)

    def show_error(self, message: str | None) -> None:
        """The reason the last input was refused (nothing was recorded), or clear it."""
        set_text(self._error, Content.from_markup("Not recorded: $m", m=printable(message))
                 if message else Content(""))
        self._input.set_class(bool(message), "-invalid")

    @on(Input.Submitted, "#answer")
    def _submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.post_message(self.Answered(event.value))

    @on(Input.Changed, "#answer")
    def _changed(self, event: Input.Changed) -> None:
        """One number key answers an observation at once (up to nine choices); this catches
        a number put in the field otherwise than by a key (handed on from a dialog)."""
        value = event.value.strip()
        if value and self._input.choices and value in self._input.numbers():
            self.post_message(self.Answered(value))


class AnswerInput(BenchInput):
    """The check's answer field. For an observation with up to nine choices, a choice's
    number typed into the empty field answers at once, before the field draws it (one
    repaint fewer between the key and the next check)."""

    def __init__(self, **kwargs: object) -> None:
        super().__init__(**kwargs)
        self.choices = 0            # choices of the observation shown; 0 for a reading

    def numbers(self) -> tuple[str, ...]:
        """The keys that answer at once: '1'...'n' for up to nine choices, else none."""
        return tuple(str(i) for i in range(1, self.choices + 1)) if self.choices <= 9 else ()

    def on_key(self, event: events.Key) -> None:
        if self.value.strip() or event.character not in self.numbers():
            return
        event.stop()
        event.prevent_default()             # the number is not typed into the field
        self.post_message(CheckPanel.Answered(event.character))


def choice_lines(choices: Iterable[tuple[str, str]]) -> Content:
    """'1  All heaters glow   2  No heater glows', one choice per line."""
    return Content("\n").join(
        Content.from_markup("[b reverse] $n [/]  $label  [dim]$name[/dim]", n=str(i),
                            label=label, name=name if name != label else "")
        for i, (name, label) in enumerate(choices, 1))
