"""The bench meter in the walk: F10 takes the reading the meter shows, ctrl+t holds until stable.

Mixed into the screens that ask checks (walk, conclusion): ``class WalkScreen(MeterKeys,
CaseScreen)`` and ``*MeterKeys.BINDINGS`` in the screen's bindings. The keys show only when
the bench has a meter (``meter:`` in faultwise.yaml or ``--meter``) and the check is a
reading with a band. The meter is read in a thread worker, so the screen never waits on it.

What a press does: the check's quantity is worked out first (a reading a meter cannot
take, such as peak-to-peak volts, is refused under the field); the first meter reading
of a case shows the ``meter-link`` caution (CAT rating, a USB ground on a live chassis)
and records its acknowledgement; then the meter is read (three agreeing samples in hold
mode) and the sample goes to :func:`faultwise.meter.fit.answer_from_meter`, which refuses
a unit that does not fit and otherwise records the answer with the meter's value, unit,
identity and time. A time-out or a refusal leaves the field for typing and says why; a
reading that comes back after the step has changed is dropped. Nothing here holds domain
logic.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from textual.binding import Binding

CAUTION_ID = "meter-link"


@dataclass
class MeterState:
    """The bench's meter for this run (on ``Bench.meter``): the opened source and the mode."""

    meter: Any
    hold: bool = False
    busy: bool = False
    identity: str | None = None       # the meter's own name, once it has answered


def meter_state(bench) -> MeterState | None:
    """The bench's meter state, opened on first use; None when the bench has no meter."""
    config = getattr(bench.workspace, "meter", None)
    if config is None or config.is_manual:
        return None
    if bench.meter is None:
        from faultwise.meter import open_meter

        bench.meter = MeterState(open_meter(config, clock=bench.clock))
    return bench.meter


def meter_hint(app, prompt) -> str:
    """The line under a reading check when the bench has a meter, else ''."""
    bench = getattr(app, "bench", None)
    if bench is None or prompt is None or not prompt.is_measurement:
        return ""
    state = meter_state(bench)
    if state is None:
        return ""
    from faultwise.meter.fit import quantity_for
    from faultwise.meter.base import MeterError

    try:
        quantity = quantity_for(prompt.expected)
    except MeterError as exc:
        return f"Meter: type this reading ({exc.message})."
    name = state.identity or state.meter.spec
    if state.hold:
        return (f"Meter {name}: F10 reads {quantity.title} until three samples agree; "
                "ctrl+t: one sample.")
    return f"Meter {name}: F10 reads {quantity.title}; ctrl+t: hold until stable."


def _meter_can_take(expected) -> bool:
    from faultwise.meter.base import MeterError
    from faultwise.meter.fit import quantity_for

    try:
        quantity_for(expected)
    except MeterError:
        return False
    return True


class MeterKeys:
    """Mixin for a CaseScreen: the meter actions and when they apply."""

    BINDINGS = [
        Binding("f10", "meter_read", "Meter", tooltip="Take the reading from the bench meter",
                priority=True),
        Binding("ctrl+t", "meter_hold", "Hold", tooltip="Hold until stable: wait for three "
                "agreeing samples", priority=True),
    ]

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action in ("meter_read", "meter_hold"):
            prompt = self.walk.prompt()
            return (meter_state(self.bench) is not None and prompt is not None
                    and prompt.kind == "check" and prompt.is_measurement
                    and _meter_can_take(prompt.expected))
        return super().check_action(action, parameters)

    # ------------------------------------------------------------------ actions

    def action_meter_hold(self) -> None:
        state = meter_state(self.bench)
        if state is None:
            return
        state.hold = not state.hold
        self.notify("Hold until stable: on (three agreeing samples)." if state.hold
                    else "Hold until stable: off (one sample).", timeout=3)
        self._meter_panel_hint()

    def action_meter_read(self) -> None:
        from faultwise.core.errors import FaultwiseError
        from faultwise.meter.fit import quantity_for

        state = meter_state(self.bench)
        prompt = self.walk.prompt()
        if state is None or prompt is None or not prompt.is_measurement:
            return
        panel = self._meter_panel()
        if state.busy:
            self.notify("The meter is being read.", timeout=2)
            return
        try:
            quantity = quantity_for(prompt.expected)
        except FaultwiseError as exc:
            panel.show_error(self.say(exc))
            return
        if CAUTION_ID not in self.walk.acknowledged:
            self._meter_caution(quantity)
            return
        self._meter_start(state, quantity)

    # ------------------------------------------------------------------ steps

    def _meter_panel(self):
        from faultwise.tui.widgets.check_panel import CheckPanel

        return self.query_one(CheckPanel)

    def _meter_panel_hint(self, text: str | None = None) -> None:
        panel = self._meter_panel()
        panel.show_meter(text if text is not None else meter_hint(self.app, panel.prompt))

    def _meter_caution(self, quantity) -> None:
        caution = self.walk.knowledge.cautions.get(CAUTION_ID)
        if caution is None:
            self._meter_panel().show_error(
                f"the knowledge has no '{CAUTION_ID}' caution, so the meter is not used; "
                "copy it from the bundled cautions.yaml, or type the reading")
            return
        from faultwise.tui.screens.caution import CautionScreen

        shown = self.bench.now_iso()
        modal = CautionScreen([caution], guard_s=self.bench.settings.caution_guard_s)

        def done(ok: bool | None) -> None:
            if not ok:                  # "Leave the case", as for any other caution
                self.leave_case(saved=True)
                return
            state = meter_state(self.bench)

            def then() -> None:
                self.show_prompt()
                self._meter_start(state, quantity)

            self.change(lambda: self.walk.acknowledge(CAUTION_ID, shown=shown,
                                                      read_s=modal.read_s), then)

        self.app.push_screen(modal, done)

    def _meter_start(self, state: MeterState, quantity) -> None:
        prompt = self.walk.prompt()
        if prompt is None or not prompt.is_measurement:
            return
        token = (self.walk.current_node, len(self.walk.events))
        state.busy = True
        how = "until three samples agree" if state.hold else "once"
        self._meter_panel_hint(f"Reading the meter {how}... (type the reading if it does "
                               "not answer)")
        meter, hold = state.meter, state.hold

        def work() -> None:
            from faultwise.meter import read_stable

            sample = error = None
            try:
                if hold:
                    sample = read_stable(lambda: meter.read(quantity))
                else:
                    sample = meter.read(quantity)
            except Exception as exc:  # reported on the screen, never a traceback
                error = exc
            self.app.call_from_thread(self._meter_done, token, sample, error)

        self.run_worker(work, thread=True, exit_on_error=False, group="meter",
                        name="meter-read")

    def _meter_done(self, token, sample, error) -> None:
        from faultwise.core.errors import FaultwiseError
        from faultwise.meter import MeterTimeout
        from faultwise.meter.fit import answer_from_meter
        from faultwise.tui.screens.case_screen import internal_error

        state = meter_state(self.bench)
        if state is not None:
            state.busy = False
        if not self.is_attached:
            return
        if token != (self.walk.current_node, len(self.walk.events)):
            self.notify("The meter answered after the step changed; that reading was not "
                        "recorded.", severity="warning", timeout=5)
            return
        panel = self._meter_panel()
        self._meter_panel_hint()
        if error is not None:
            text = self.say(error) if isinstance(error, FaultwiseError) else internal_error(error)
            if isinstance(error, MeterTimeout):
                text = "meter time-out: " + text
            panel.show_error(text)
            panel.input.focus()
            return
        try:
            answer_from_meter(self.walk, sample)
        except FaultwiseError as exc:
            panel.show_error(self.say(exc))
            return
        except Exception as exc:
            panel.show_error(internal_error(exc))
            return
        if state is not None:
            state.identity = sample.meter
        self.notify(f"From the meter: {sample.shown()}", timeout=3, markup=False)
        self.commit(self.show_prompt)
