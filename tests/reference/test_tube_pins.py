"""Pin maps of the tube table against the handbooks' base diagrams (mostly from memory).

Every type must name each electrode its kind has (heater, cathode, grids, plate, diode
plates): a complete map is what lets the voltage chart say "pin 5 plate". Spot checks use
base diagrams the trade knows by heart (from memory): octal receiving tubes put the heater on
pins 2 and 7 (the 6SQ7 family on 7 and 8, the 5Y3GT's filament on 2 and 8); 7AC beam tubes
(6V6GT, 50L6GT) have the plate on 3, screen 4, grid 5, cathode 8; 7BT duplex-diode triodes
(12AV6) the triode plate on 7; 7CC pentodes (12BA6) the screen on 6 and cathode on 7.
"""

from __future__ import annotations

import pytest

from faultwise.core.errors import KnowledgeError
from faultwise.profile.tubes import BASE_PINS, load_tube_table, missing_electrodes, parse_tube_table
from faultwise.core.yamlload import load_yaml_text

TABLE = load_tube_table()


@pytest.mark.parametrize("name", sorted(TABLE))
def test_every_type_has_a_complete_pin_map(name):
    tube = TABLE[name]
    assert missing_electrodes(tube) == [], f"{name} ({tube.kind}) lacks {missing_electrodes(tube)}"
    assert tube.pins_source and ("memory" in tube.pins_source or "source" in tube.pins_source)
    # no pin does two jobs, except a filament that is also the cathode (directly heated)
    seen: dict = {}
    for electrode, pins in tube.pins:
        for pin in pins:
            if pin == "cap":
                continue
            assert 1 <= pin <= BASE_PINS[tube.base]
            other = seen.get(pin)
            assert other is None or {other, electrode} == {"heater", "cathode"}, \
                f"{name}: pin {pin} is both {other} and {electrode}"
            seen[pin] = electrode


@pytest.mark.parametrize("name, electrode, pins", [
    ("6V6GT", "plate", (3,)), ("6V6GT", "cathode", (8,)), ("6V6GT", "heater", (2, 7)),
    ("50L6GT", "screen", (4,)), ("6SK7", "grid", (4,)), ("12SQ7", "heater", (7, 8)),
    ("5Y3GT", "heater", (2, 8)), ("12AV6", "plate", (7,)), ("12BA6", "screen", (6,)),
    ("12BA6", "cathode", (7,)), ("80", "heater", (1, 4)), ("EL84", "plate", (7,)),
])
def test_known_base_diagrams(name, electrode, pins):
    assert TABLE[name].pin(electrode) == pins


def test_bad_pin_map_is_a_located_error():
    text = ("format: faultwise-tubes/1\ntubes:\n  - type: 1X1\n    heater_v: 6.3\n"
            "    heater_a: 0.3\n    base: 7-pin miniature\n    pins: {plate: 9}\n"
            "    kind: sharp-cutoff pentode\n    roles: [if]\n    source: test\n")
    with pytest.raises(KnowledgeError) as exc:
        parse_tube_table(load_yaml_text(text, "t.yaml"), "t.yaml")
    assert exc.value.line == 7 and "pin 9" in exc.value.message
