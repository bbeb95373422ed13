"""Typical stage data for the voltage chart: each small tube's handbook typical operation, and
the family's typical stage circuit (plate load, screen feed, cathode resistor, grid network).

Handbook figures are from memory of the receiving-tube handbooks' typical-operation tables
(each entry says so); the mu of grid 1 against the screen, which the handbooks rarely print,
is a trade estimate. A profile's own values (``tubes[].plate_ohm`` ...) always win; every
value used from here is marked typical in the chart.
"""

from __future__ import annotations

from dataclasses import dataclass

from faultwise.calc.tube_stage import TypicalOperation

_MEM = "receiving-tube handbook typical operation, from memory"
_SCREEN_MU = "; grid-1-to-screen mu a trade estimate"


def _op(pv: float, sv: float, gv: float, pma: float, sma: float, mu: float, gm: float | None,
        src: str = _MEM) -> TypicalOperation:
    return TypicalOperation(float(pv), float(sv), float(gv), float(pma), float(sma), float(mu),
                            None if gm is None else float(gm), src)


# converter rows: the oscillator grid's current (mA) with its handbook grid resistor, kept apart
OSC_GRID_MA = 0.5
"""Oscillator-grid current of a pentagrid converter in typical operation: 0.5 mA (6BE6/6SA7
handbook typical operation, from memory)."""

_CONVERTER = _op(100, 100, 0, 2.6, 7.0, 1, None, _MEM + " (6BE6 at 100 V, 20 kohm grid-1 resistor)")
_REMOTE = _op(250, 100, -1, 11, 4.2, 20, 4.4, _MEM + " (6BA6 at 250 V)" + _SCREEN_MU)
_SHARP = _op(250, 150, -1, 10.6, 4.3, 25, 5.2, _MEM + " (6AU6 at 250 V)" + _SCREEN_MU)
_DDT = _op(100, 0, -1, 0.5, 0, 100, 1.25, _MEM + " (6AV6 triode at 100 V)")

OPERATION: dict[str, TypicalOperation] = {
    **dict.fromkeys(("12BE6", "6BE6", "14Q7", "6BA7"), _CONVERTER),
    **dict.fromkeys(("12SA7", "6SA7"), _op(100, 100, 0, 3.3, 8.5, 1, None,
                                         _MEM + " (6SA7 at 100 V, 20 kohm grid-1 resistor)")),
    **dict.fromkeys(("12K8", "6K8", "ECH81", "6A8"), _op(100, 100, 0, 2.5, 6.0, 1, None,
                                                         _MEM + " (hexode/heptode section)")),
    **dict.fromkeys(("12BA6", "6BA6", "14A7", "EF89"), _REMOTE),
    **dict.fromkeys(("12BD6", "6BD6"), _op(250, 100, -3, 9, 3.5, 20, 2.0,
                                           _MEM + " (6BD6 at 250 V)" + _SCREEN_MU)),
    **dict.fromkeys(("12AU6", "6AU6", "6AK5"), _SHARP),
    **dict.fromkeys(("12SK7", "6SK7"), _op(250, 100, -3, 9.2, 2.4, 20, 2.0,
                                           _MEM + " (6SK7 at 250 V)" + _SCREEN_MU)),
    **dict.fromkeys(("12SG7",), _op(250, 150, -2.5, 9.2, 3.4, 20, 4.0,
                                    _MEM + " (6SG7 at 250 V)" + _SCREEN_MU)),
    **dict.fromkeys(("12SJ7", "6SJ7"), _op(250, 100, -3, 3.0, 0.8, 20, 1.65,
                                           _MEM + " (6SJ7 at 250 V)" + _SCREEN_MU)),
    **dict.fromkeys(("6K7",), _op(250, 100, -3, 7.0, 1.7, 20, 1.45,
                                  _MEM + " (6K7 at 250 V)" + _SCREEN_MU)),
    **dict.fromkeys(("EBF89",), _op(250, 100, -2, 5.0, 1.7, 20, 2.2,
                                    _MEM + " (EBF89 pentode at 250 V)" + _SCREEN_MU)),
    **dict.fromkeys(("12AV6", "6AV6", "14B6", "12SQ7", "6SQ7"), _DDT),
    **dict.fromkeys(("12AT6", "6AT6", "6Q7", "19T8"), _op(100, 0, -1, 0.8, 0, 70, 1.3,
                                                          _MEM + " (6AT6 triode at 100 V)")),
}
"""Small-signal types: handbook typical operation (volts to cathode, mA, mA/V)."""

OUTPUT_SLOPE: dict[str, tuple[float, float]] = {
    **dict.fromkeys(("50C5", "50B5", "50L6GT", "50A5", "25L6GT"), (7.5, 6.0)),
    **dict.fromkeys(("35C5", "35B5", "35L6GT", "35A5"), (5.8, 6.0)),
    **dict.fromkeys(("6AQ5", "6V6GT"), (4.1, 9.8)),
    "6K6GT": (2.3, 7.0), "6F6": (2.5, 7.0), "EL84": (11.3, 19.0),
}
"""Output types: (gm mA/V, grid-1-to-screen mu) at the table's typical operation (handbook
transconductance from memory; mu from the triode-connected figures, from memory)."""

GENERIC_BY_KIND = {"pentagrid converter": _CONVERTER, "triode-hexode converter": _CONVERTER,
                   "triode-heptode converter": _CONVERTER, "remote-cutoff pentode": _REMOTE,
                   "semi-remote-cutoff pentode": _REMOTE, "sharp-cutoff pentode": _SHARP,
                   "duplex-diode pentode": _SHARP, "duplex-diode triode": _DDT,
                   "triple-diode triode": _DDT}
"""A type with no row above takes its kind's representative (marked typical)."""


@dataclass(frozen=True)
class StageCircuit:
    """A stage's parts: plate load, screen feed (0 = direct), cathode and grid resistors,
    and the filter point the plate returns to (first or second)."""

    plate_ohm: float
    screen_ohm: float
    cathode_ohm: float
    grid_ohm: float
    supply: str


def typical_circuit(family: str, role_kind: str) -> StageCircuit:
    """The family's usual stage circuit for a role kind (trade practice, from memory).

    Plate loads of IF-transformer-coupled stages are the primary's DC resistance (a few to
    about 20 ohm); a resistance-coupled first audio triode has 220-470 kohm with a 10 Mohm
    grid leak (contact bias); series-string sets feed screens straight from B+, transformer
    sets through a dropping resistor.
    """
    series = family == "series-string"
    table = {
        "converter": StageCircuit(10.0, 0.0 if series else 22e3, 0.0, 22e3, "second"),
        "if": StageCircuit(15.0, 0.0 if series else 33e3, 68.0, 2.2e6, "second"),
        "triode-audio": StageCircuit(220e3 if series else 470e3, 0.0, 0.0, 10e6, "second"),
        "pentode-audio": StageCircuit(220e3, 1e6, 1.5e3, 1e6, "second"),
        "output": StageCircuit(0.0, 0.0, 0.0, 470e3, "first"),
    }
    return table[role_kind]


GRID_STATE = {
    "avc": (0.0, 0.0, 1.0, "the AVC line between stations: about 0 V (up to a volt from the "
                           "detector diode's contact potential), negative on a station (trade)"),
    "contact": (0.7, 0.4, 1.0, "contact bias across the 10 Mohm grid leak, negative to chassis, "
                               "about 0.4-1 V (trade; a 10 Mohm meter halves it)"),
    "cathode": (0.0, 0.0, 0.5, "grid returned to chassis through its leak: 0 V; any positive "
                               "volts mean a leaky coupling capacitor (trade)"),
}
"""Grid states: (nominal, low, high) magnitude to chassis and what sets it."""
