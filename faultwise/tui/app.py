"""The bench program: an App assembled from its dependencies by :func:`build_app`.

The start screen paints before anything heavy is imported; the knowledge is loaded in a
worker after the first paint. Screens receive the :class:`Bench` context; nothing here
holds domain logic.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Callable, Iterable

from textual import events
from textual.app import App, SystemCommand
from textual.binding import Binding
from textual.screen import Screen
from textual.theme import Theme
from textual.worker import Worker, WorkerState

from faultwise.tui.collector import IDLE_S, IdleCollector, freeze_long_lived
from faultwise.tui.context import Bench, Clock, system_clock
from faultwise.tui.messages import KnowledgeReady
from faultwise.tui.settings import Settings
from faultwise.core.workspace import Workspace

if TYPE_CHECKING:        # the start screen paints before the case code is imported
    from faultwise.cases.store import OpenCase
    from faultwise.walk.state import Walk

BENCH_THEME = Theme(
    name="bench-lamp",
    primary="#D4913A",       # warm amber, like a dial lamp
    secondary="#4E9A94",
    accent="#C8643C",
    foreground="#E8E0D0",
    background="#1B1916",
    surface="#25221E",
    panel="#332E28",
    success="#79B15A",
    warning="#E3B341",
    error="#E0604A",
    dark=True,
)


class FaultwiseApp(App[None]):
    """The bench TUI. Build it with :func:`build_app`."""

    CSS_PATH = "app.tcss"
    TITLE = "faultwise"
    SUB_TITLE = "bench"
    BINDINGS = [
        Binding("ctrl+q", "quit", "Quit", priority=True),
        Binding("f12", "bench_help", "Help", show=False),
    ]

    def __init__(self, bench: Bench) -> None:
        super().__init__()
        self.bench = bench
        self._waiting: list[Callable[[], None]] = []
        self._knowledge_started = False
        self.collector = IdleCollector()
        self.register_theme(BENCH_THEME)
        self.theme = BENCH_THEME.name

    # start-up -----------------------------------------------------------------------

    def get_default_screen(self) -> Screen:
        from faultwise.tui.screens.start import StartScreen

        return StartScreen(self.bench)

    def on_mount(self) -> None:
        self.sub_title = f"bench {self.bench.workspace.bench}"
        # full garbage collections wait for a pause in the keys (tui.collector)
        self.collector.start()
        self.set_interval(IDLE_S / 2, self.collector.tick, name="idle-collector")
        if not self.bench.settings.safety_acknowledged:
            self.show_safety(first_run=True)
        # After the first paint; the timer is a backstop: on a busy machine an
        # after-refresh callback queued while the safety notice is pushed can be lost,
        # and then nothing would ever load (seen under load in tmux).
        self.call_after_refresh(self._start_knowledge_load)
        self.set_timer(0.5, self._start_knowledge_load)

    def on_unmount(self) -> None:
        self.collector.stop()

    async def on_event(self, event: events.Event) -> None:
        if isinstance(event, events.Key):
            self.collector.key_pressed()
        await super().on_event(event)

    def show_safety(self, *, first_run: bool = False) -> None:
        from faultwise.tui.screens.safety import SafetyScreen

        self.push_screen(SafetyScreen(first_run=first_run), self._safety_closed)

    def _safety_closed(self, acknowledged: bool | None) -> None:
        if acknowledged:
            settings = self.bench.settings
            settings.acknowledge_safety(self.bench.now_iso())
            if settings.write_error:
                self.notify(f"The acknowledgement could not be saved ({settings.write_error}); "
                            "the notice will show again next time.", severity="warning",
                            markup=False)

    def _start_knowledge_load(self) -> None:
        """Start loading the knowledge once (idempotent: several paths may ask for it)."""
        if self._knowledge_started:
            return
        self._knowledge_started = True
        self.run_worker(self._load_knowledge, name="knowledge", thread=True,
                        exit_on_error=False)

    def _load_knowledge(self):
        from faultwise.graph.knowledge import load_knowledge

        return load_knowledge(self.bench.workspace.knowledge_dir)

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        if event.worker.name != "knowledge":
            return
        if event.state == WorkerState.SUCCESS:
            self.bench.knowledge = event.worker.result
            freeze_long_lived()
            waiting, self._waiting = self._waiting, []
            for callback in waiting:
                callback()
            for screen in self.screen_stack:
                screen.post_message(KnowledgeReady())
        elif event.state == WorkerState.ERROR:
            self.fatal(event.worker.error)

    def fatal(self, error: BaseException | None) -> None:
        """Leave with status 1 and one sentence (a fatal start-up problem)."""
        from faultwise.core.errors import FaultwiseError

        if isinstance(error, FaultwiseError):
            text = f"faultwise: {error}"
        else:
            text = (f"faultwise: the knowledge could not be loaded ({type(error).__name__}: "
                    f"{error}).")
        self.exit(return_code=1, message=text)

    def with_knowledge(self, callback: Callable[[], None]) -> None:
        """Run ``callback`` now if the knowledge is loaded, else as soon as it is."""
        if self.bench.knowledge is not None:
            callback()
            return
        self._waiting.append(callback)
        self._start_knowledge_load()
        self.notify("Loading the knowledge...", timeout=2)

    def case_screen(self, screen_id: str, case: OpenCase, walk: Walk) -> Screen:
        """The screen that shows an open case: "conclusion" (repair, verify, close) or
        "walk" (the diagnosis). The case screens switch between each other through this
        factory, so neither imports the other."""
        if screen_id == "conclusion":
            from faultwise.tui.screens.conclusion import ConclusionScreen

            return ConclusionScreen(self.bench, case, walk)
        from faultwise.tui.screens.walk import WalkScreen

        return WalkScreen(self.bench, case, walk)

    def action_bench_help(self) -> None:
        from faultwise.tui.screens.help import HelpScreen

        self.push_screen(HelpScreen())

    async def action_quit(self) -> None:
        """Release any case held on screen, then leave."""
        for screen in self.screen_stack:
            case = getattr(screen, "case", None)
            if case is not None:
                case.close()
        self.exit()

    # command palette ----------------------------------------------------------------

    def get_system_commands(self, screen: Screen) -> Iterable[SystemCommand]:
        yield from super().get_system_commands(screen)
        yield SystemCommand("Safety notice", "Show the safety notice again",
                            lambda: self.show_safety(first_run=False))
        yield SystemCommand("Bench help", "Keys and flow of the bench program",
                            self.action_bench_help)
        yield from getattr(screen, "palette_commands", lambda: ())()


def build_app(workspace: Workspace, *, clock: Clock | None = None,
              settings: Settings | None = None) -> FaultwiseApp:
    """The bench app for ``workspace``; tests pass a fixed clock and in-memory settings."""
    bench = Bench(workspace=workspace, clock=clock or system_clock,
                  settings=settings if settings is not None else Settings(None))
    return FaultwiseApp(bench)
