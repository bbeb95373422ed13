"""The current check: title, instruction, expected band with its basis, numbered choices,
the answer field and, below it, why the last input was refused.

The panel only shows and collects; the screen gives the text to the walk. All knowledge
and user text is passed to ``Content`` as template variables, never as markup.
"""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.containers import Vertical
from textual.content import Content
from textual.message import Message
from textual.widgets import Input, Static

from faultwise.tui.widgets.bench_input import BenchInput

PHASE_TAGS = {"diagnose": "CHECK", "verify": "VERIFY", "closing": "BEFORE IT GOES BACK"}


def reading_text(value: float, unit: str) -> str:
    """A value with its unit, as the trade writes it (units.format_reading)."""
    from faultwise.core.units import format_reading

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


def band_lines(expected) -> list[Content]:
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
        yield BenchInput(id="answer", compact=True, select_on_focus=False,
                         placeholder="type the reading, Enter records it")
        yield Static("", id="answer-error")
        yield Static("", id="meter-line")

    @property
    def input(self) -> Input:
        return self.query_one("#answer", Input)

    def show(self, prompt, knowledge=None) -> None:
        """Display a check prompt (kind 'check') and clear the field and the error;
        ``knowledge`` puts node titles in place of ids in the warning."""
        from faultwise.tui.wording import readable

        self.prompt = prompt
        check = prompt.node
        tag = PHASE_TAGS.get(prompt.phase, prompt.phase.upper())
        if prompt.position:
            tag += f" {prompt.position[0]} of {prompt.position[1]}"
        self.query_one("#check-title", Static).update(Content.from_markup(
            "$tag  $title  [dim]($stage)[/dim]", tag=tag, title=check.title,
            stage=check.stage))
        expected_box = self.query_one("#check-expected", Static)
        choices_box = self.query_one("#check-choices", Static)
        if prompt.is_measurement:
            exp = prompt.expected
            self.query_one("#check-instruction", Static).update(Content.from_markup(
                "Measure: $what. Type the reading (in $unit or with a prefix: 4k7, 150m, "
                "2R2).", what=exp.title, unit=exp.unit or "its unit"))
            expected_box.update(Content("\n").join(band_lines(exp)))
            choices_box.update("")
            self.input.placeholder = f"type the reading in {exp.unit or 'its unit'}, then Enter"
        else:
            what = ("This set's profile gives no band for this reading: judge it and "
                    "choose." if check.is_measurement else "What do you see? Press its number.")
            self.query_one("#check-instruction", Static).update(what)
            expected_box.update("")
            choices_box.update(choice_lines(prompt.choices))
            from faultwise.tui.widgets.bench_input import choices_hint

            self.input.placeholder = choices_hint(len(prompt.choices)) + " (or the choice's name)"
        warning = self.query_one("#check-warning", Static)
        warning.update(Content.from_markup("[b]![/b] $w", w=readable(prompt.warning, knowledge))
                       if prompt.warning else "")
        warning.display = bool(prompt.warning)
        expected_box.display = prompt.is_measurement
        choices_box.display = not prompt.is_measurement
        self.input.value = ""
        self.show_error(None)
        from faultwise.tui.meter_keys import meter_hint

        self.show_meter(meter_hint(self.app, prompt))

    def show_meter(self, text: str) -> None:
        """The bench meter's line (tui.meter_keys), hidden when the bench has none."""
        box = self.query_one("#meter-line", Static)
        box.update(Content(text))
        box.display = bool(text)

    def show_error(self, message: str | None) -> None:
        """The reason the last input was refused (nothing was recorded), or clear it."""
        box = self.query_one("#answer-error", Static)
        from faultwise.tui.wording import printable

        box.update(Content.from_markup("Not recorded: $m", m=printable(message))
                   if message else "")
        self.input.set_class(bool(message), "-invalid")

    @on(Input.Submitted, "#answer")
    def _submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.post_message(self.Answered(event.value))

    @on(Input.Changed, "#answer")
    def _changed(self, event: Input.Changed) -> None:
        """One number key answers an observation at once (up to nine choices)."""
        prompt = self.prompt
        if prompt is None or prompt.is_measurement or not prompt.choices:
            return
        value = event.value.strip()
        if len(prompt.choices) <= 9 and len(value) == 1 and value.isdigit() \
                and 1 <= int(value) <= len(prompt.choices):
            self.post_message(self.Answered(value))


def choice_lines(choices) -> Content:
    """'1  All heaters glow   2  No heater glows', one choice per line."""
    return Content("\n").join(
        Content.from_markup("[b reverse] $n [/]  $label  [dim]$name[/dim]", n=str(i),
                            label=label, name=name if name != label else "")
        for i, (name, label) in enumerate(choices, 1))
