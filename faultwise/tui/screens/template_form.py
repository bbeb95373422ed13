"""Fill a family template for a set that is not in the library.

Each number is checked as it is typed with the reading parser the CLI uses
(``units.parse_reading``), and the whole profile with ``profile_from_dict``; a refusal is
shown under the field it concerns. An empty field is filled with the family's typical
value (and marked typical wherever it is shown).
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.content import Content
from textual.screen import ModalScreen
from textual.widgets import Input, Static

from faultwise.tui.widgets.bench_input import BenchInput
from faultwise.tui.wording import bench_sentence

FAMILY_CHOICES = (("series-string", "series-string (AC/DC, no power transformer)"),
                  ("transformer", "transformer (tube set with a power transformer)"),
                  ("transistor", "transistor (battery portable)"))


@dataclass(frozen=True)
class Field:
    """One form field: the profile key it fills (dotted), its label, unit and example."""

    key: str
    label: str
    unit: str | None        # None: text; "lineup": role=type list
    example: str


LABEL = Field("label", "Label", None, "Bench set, 5-tube table model")
BAND = (
    Field("band.low_khz", "Band low", "kHz", "540"),
    Field("band.high_khz", "Band high", "kHz", "1600"),
    Field("if_khz", "IF", "kHz", "455"),
    Field("gang.max_pf", "Gang max", "pF", "365"),
)
# Each family's own supply fields come first (they are what sets the expected readings
# most), with the family's typical lineup as the example: a series string whose heaters sum
# to about the line (12.6 x 3 + 50 + 35 = 122.8 V), a transformer set of 6.3 V heaters on
# the heater winding with a 5 V full-wave rectifier, a germanium portable.
FIELDS = {
    "series-string": (
        LABEL,
        Field("mains.volts_v", "Line", "V", "120"),
        Field("tubes", "Tubes", "lineup", "converter=12BE6, if=12BA6, detector=12AV6, "
              "output=50C5, rectifier=35W4"),
        Field("supply.surge_ohm", "Surge res.", "ohm", "22"),
        Field("supply.first_cap_uf", "1st filter", "uF", "50"),
        Field("supply.second_cap_uf", "2nd filter", "uF", "30"),
        Field("supply.load_ma", "B+ load", "mA", "55"),
    ) + BAND + (Field("audio.speaker_ohm", "Speaker", "ohm", "3.2"),),
    "transformer": (
        LABEL,
        Field("mains.volts_v", "Line", "V", "120"),
        Field("heater_winding_v", "Heater wdg", "V", "6.3"),
        Field("supply.secondary_v", "HV half", "V", "250"),
        Field("tubes", "Tubes", "lineup", "converter=6BE6, if=6BA6, detector=6AV6, "
              "output=6V6GT, rectifier=5Y3GT"),
        Field("supply.first_cap_uf", "1st filter", "uF", "20"),
        Field("supply.second_cap_uf", "2nd filter", "uF", "20"),
        Field("supply.load_ma", "B+ load", "mA", "70"),
    ) + BAND + (Field("audio.speaker_ohm", "Speaker", "ohm", "3.2"),),
    "transistor": (
        LABEL,
        Field("battery.volts_v", "Battery", "V", "9"),
        Field("transistors", "Stages", "lineup", "converter=germanium, if=germanium, "
              "detector=germanium, audio=germanium, output=germanium"),
    ) + BAND + (Field("audio.speaker_ohm", "Speaker", "ohm", "8"),),
}


def parse_lineup(text: str, family: str) -> list[dict]:
    """'converter=12BE6, if=12BA6' -> [{role, type}] (tubes) or [{role, material}] (transistors)."""
    from faultwise.core.errors import InputError

    value_key = "material" if family == "transistor" else "type"
    items = []
    for chunk in [c.strip() for c in text.replace(";", ",").split(",") if c.strip()]:
        role, sep, value = chunk.partition("=")
        if not sep or not role.strip() or not value.strip():
            example = "germanium" if value_key == "material" else "12BE6"
            raise InputError(f"'{chunk}' is not role=value", hint=f"write e.g. converter={example}")
        items.append({"role": role.strip(), value_key: value.strip()})
    return items


def field_id(key: str) -> str:
    return "tf-" + key.replace(".", "-").replace("_", "-")


def check_field(field: Field, text: str, family: str) -> str | None:
    """The parser's refusal for one field's text, or None when it reads (or is empty)."""
    from faultwise.core.errors import FaultwiseError
    from faultwise.core.units import parse_reading

    if not text.strip() or field.unit is None:
        return None
    try:
        if field.unit == "lineup":
            parse_lineup(text, family)
        else:
            parse_reading(text, field.unit)
    except FaultwiseError as exc:
        return bench_sentence(exc)
    return None


def form_to_dict(family: str, values: dict[str, str]) -> dict:
    """The profile mapping the form describes (empty fields left out: typical values)."""
    data: dict = {"format": "faultwise-set/1", "family": family}
    for field in FIELDS[family]:
        text = values.get(field.key, "").strip()
        if not text:
            continue
        if field.unit == "lineup":
            data[field.key] = parse_lineup(text, family)
            continue
        section, _, name = field.key.rpartition(".")
        target = data.setdefault(section, {}) if section else data
        target[name] = text       # a string with a unit: profile_from_dict parses it
    return data


def field_for_error_key(key: str | None, family: str) -> str | None:
    """The form field a ProfileError key ('tubes[2].type', 'band.high_khz') belongs to."""
    if not key:
        return None
    head = key.split("[", 1)[0]
    keys = [f.key for f in FIELDS[family]]
    if key in keys:
        return key
    if head in keys:
        return head
    return None


class TemplateFormScreen(ModalScreen[tuple | None]):
    """Returns (Profile, mapping) for the filled template, or None when cancelled."""

    BINDINGS = [
        Binding("f10", "use", "Use this set", priority=True),
        Binding("escape", "cancel", "Cancel", priority=True),
    ]

    def __init__(self, tube_dir: Path | None) -> None:
        super().__init__(id="template-form")
        self.tube_dir = tube_dir
        self.family: str | None = None

    def compose(self) -> ComposeResult:
        with Vertical(classes="modal-box", id="template-box"):
            # Head and foot are docked; the fields between them scroll (so the hint and the
            # form's error stay on screen at 80x24).
            with Vertical(id="tf-head"):
                yield Static("Set from a family template", classes="modal-title")
                yield Static(Content("\n").join(
                    Content.from_markup("[b reverse] $n [/]  $l", n=str(i), l=label)
                    for i, (_, label) in enumerate(FAMILY_CHOICES, 1)), id="family-choices")
                yield BenchInput(id="tf-family", compact=True, placeholder="type 1, 2 or 3")
                yield Static("", id="tf-family-error", classes="field-error")
            with Vertical(id="tf-foot"):
                yield Static("", id="tf-error", classes="field-error")
                yield Static("[dim]Empty fields take typical values. F10 uses the set, Esc "
                             "cancels.[/dim]", id="tf-hint")
            yield VerticalScroll(id="template-fields")

    def on_mount(self) -> None:
        for box_id in ("#tf-family-error", "#tf-error"):
            self.query_one(box_id).display = False
        self.query_one("#tf-family", Input).focus()

    def _say(self, box_id: str, message: str | None) -> None:
        """Show ``message`` in one of the form's error lines (hidden while empty)."""
        box = self.query_one(box_id, Static)
        box.update(Content(message or ""))
        box.display = bool(message)

    @on(Input.Submitted, "#tf-family")
    @on(Input.Changed, "#tf-family")
    async def family_typed(self, event: Input.Changed | Input.Submitted) -> None:
        from faultwise.core.errors import FaultwiseError
        from faultwise.walk.results import resolve_choice

        text = event.value.strip()
        if self.family and text[:-1] == self.family and text[-1:] in ("1", "2", "3"):
            text = text[-1]           # a number typed after the family shown: change it
        if isinstance(event, Input.Changed) and text not in ("1", "2", "3"):
            return
        try:
            family = resolve_choice(text, FAMILY_CHOICES)
        except FaultwiseError as exc:
            self._say("#tf-family-error", bench_sentence(exc))
            return
        self._say("#tf-family-error", None)
        await self.show_family(family)

    async def show_family(self, family: str) -> None:
        self.family = family
        self.query_one("#tf-family", Input).value = family
        box = self.query_one("#template-fields", VerticalScroll)
        await box.remove_children()
        rows = []
        for field in FIELDS[family]:
            unit = "" if field.unit in (None, "lineup") else f" ({field.unit})"
            rows.append(Horizontal(
                Static(field.label + unit, classes="field-name"),
                BenchInput(id=field_id(field.key), compact=True,
                           placeholder=f"e.g. {field.example}"),
                classes="field-row"))
            error = Static("", id=field_id(field.key) + "-error", classes="field-error")
            error.display = False                 # shown only with a message
            rows.append(error)
        await box.mount_all(rows)
        self.query_one("#" + field_id(FIELDS[family][0].key), Input).focus()

    def _field(self, input_id: str) -> Field | None:
        if self.family is None:
            return None
        return next((f for f in FIELDS[self.family] if field_id(f.key) == input_id), None)

    @on(Input.Changed)
    def field_changed(self, event: Input.Changed) -> None:
        field = self._field(event.input.id or "")
        if field is None:
            return
        self.show_field_error(field.key, check_field(field, event.value, self.family))

    @on(Input.Submitted)
    def field_submitted(self, event: Input.Submitted) -> None:
        if self._field(event.input.id or "") is not None:
            event.stop()
            self.focus_next()

    def show_field_error(self, key: str, message: str | None) -> None:
        box = self.query_one("#" + field_id(key) + "-error", Static)
        box.update(Content(message) if message else "")
        box.display = bool(message)
        self.query_one("#" + field_id(key), Input).set_class(bool(message), "-invalid")

    def values(self) -> dict[str, str]:
        return {f.key: self.query_one("#" + field_id(f.key), Input).value
                for f in FIELDS[self.family]}

    def action_use(self) -> None:
        from faultwise.core.errors import FaultwiseError
        from faultwise.profile.load import profile_from_dict

        if self.family is None:
            self._say("#tf-error", "Choose the family first (1, 2 or 3).")
            return
        values = self.values()
        bad = False
        for field in FIELDS[self.family]:
            problem = check_field(field, values[field.key], self.family)
            self.show_field_error(field.key, problem)
            bad = bad or problem is not None
        if bad:
            self._say("#tf-error", "Correct the fields marked above.")
            return
        try:
            data = form_to_dict(self.family, values)
            profile = profile_from_dict(data, source="template form", knowledge_dir=self.tube_dir)
        except FaultwiseError as exc:
            key = field_for_error_key(getattr(exc, "key", None), self.family)
            if key is not None:
                self.show_field_error(key, bench_sentence(exc))
                self.query_one("#" + field_id(key), Input).focus()
                self._say("#tf-error", "Correct the field marked above.")
            else:
                self._say("#tf-error", bench_sentence(exc))
            return
        self.dismiss((profile, data))

    def action_cancel(self) -> None:
        self.dismiss(None)
