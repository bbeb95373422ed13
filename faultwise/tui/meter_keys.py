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

from textual.binding import Binding

from faultwise.core.errors import FaultwiseError
from faultwise.meter import MeterTimeout, Quantity, Sample, read_stable
from faultwise.meter.fit import answer_from_meter, quantity_for
from faultwise.tui.meter_state import MeterState, meter_can_take, meter_hint, meter_state
from faultwise.tui.screens.caution import CautionScreen
from faultwise.tui.widgets.check_panel import CheckPanel
from faultwise.tui.wording import internal_error

CAUTION_ID = "meter-link"

__all__ = ["CAUTION_ID", "MeterKeys", "MeterState", "meter_hint", "meter_state"]


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
                    and meter_can_take(prompt.expected))
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

    def _meter_panel(self) -> CheckPanel:
        return self.query_one(CheckPanel)

    def _meter_panel_hint(self, text: str | None = None) -> None:
        panel = self._meter_panel()
        panel.show_meter(text if text is not None else meter_hint(self.bench, panel.prompt))

    def _meter_caution(self, quantity: Quantity) -> None:
        caution = self.walk.knowledge.cautions.get(CAUTION_ID)
        if caution is None:
            self._meter_panel().show_error(
                f"the knowledge has no '{CAUTION_ID}' caution, so the meter is not used; "
                "copy it from the bundled cautions.yaml, or type the reading")
            return
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

    def _meter_start(self, state: MeterState, quantity: Quantity) -> None:
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

    def _meter_done(self, token: tuple[str | None, int], sample: Sample | None,
                    error: BaseException | None) -> None:
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
