"""Full garbage collections wait for a pause in the keys (faultwise.tui.collector).

The reference is Python's own collector as its documentation describes it (the ``gc``
module: ``get_threshold``/``set_threshold``, and ``get_count()[2]``, the number of
second-generation collections since the last full one): started, the collector keeps
Python from running full collections by itself, runs one when Python would have and no key
came for ``idle_s``, and gives Python its setting back when stopped. The clock is a fake
one, so nothing here depends on time.
"""

from __future__ import annotations

import gc

from faultwise.tui.collector import NEVER, IdleCollector


class FakeClock:
    def __init__(self) -> None:
        self.now = 100.0

    def __call__(self) -> float:
        return self.now


def make_due(collector: IdleCollector, threshold: int) -> None:
    """Run as many second-generation collections as Python waits for before a full one."""
    for _ in range(threshold):
        gc.collect(1)


def test_full_collections_wait_for_a_pause_and_python_gets_its_setting_back():
    before = gc.get_threshold()
    clock = FakeClock()
    collector = IdleCollector(idle_s=1.0, clock=clock)
    collector.start()
    try:
        assert gc.get_threshold() == (before[0], before[1], NEVER)
        assert collector.tick() is False         # the app has just started: no pause yet
        make_due(collector, before[2])
        assert collector.due()
        collector.key_pressed()
        clock.now += 0.4                         # a key came 0.4 s ago: not now
        assert collector.tick() is False and collector.collections == 0
        assert collector.due()
        clock.now += 0.7                         # 1.1 s without a key: now
        assert collector.tick() is True and collector.collections == 1
        assert gc.get_count()[2] == 0            # Python's own count starts again
        assert not collector.due()
        assert collector.tick() is False         # nothing due: nothing run
    finally:
        collector.stop()
    assert gc.get_threshold() == before
    assert not collector.due()                   # stopped: Python collects by itself again


def test_start_and_stop_twice_keep_pythons_setting():
    before = gc.get_threshold()
    collector = IdleCollector()
    collector.start()
    collector.start()                            # a second start must not save NEVER
    collector.stop()
    collector.stop()
    assert gc.get_threshold() == before
