"""The words every layer shares: set families, receiver stages and case event types.

Declared once here; the profile, the graph, the expectations and the reports import them.
"""

from __future__ import annotations

__all__ = ["FAMILIES", "LINE_FAMILIES", "STAGES", "UNDOABLE", "EVENT_TYPES"]

FAMILIES = ("series-string", "transformer", "transistor")
LINE_FAMILIES = ("series-string", "transformer")   # mains-powered: the leakage check applies
STAGES = ("supply", "audio", "detector", "if", "oscillator", "antenna")   # expect() order
# Case events (the walk writes them, the case schema checks them): the undoable ones first.
UNDOABLE = ("answer", "skip", "parts", "off-graph", "resume", "to-closing")
EVENT_TYPES = UNDOABLE + ("note", "acknowledge", "close", "reopen")

#: the classes of a reading against its band (a measurement check's outcomes)
MEASURE_OUTCOMES = ("normal", "low", "high", "absent")
