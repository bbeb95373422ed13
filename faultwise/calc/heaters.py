"""Heater strings (series) and heater windings (parallel)."""

from __future__ import annotations

from collections.abc import Iterable

COLD_TO_HOT = 0.10
"""A tungsten heater's cold resistance is about 1/10 of its hot resistance (trade)."""
COLD_TO_HOT_LOW, COLD_TO_HOT_HIGH = 1 / 14, 1 / 7
"""Spread of that ratio between heater designs: about 1/14 to 1/7 (trade)."""


def string_v(heater_vs: Iterable[float]) -> float:
    """Series string: sum of the rated heater voltages (Kirchhoff's voltage law)."""
    return float(sum(heater_vs))


def dropping_ohm(line_v: float, string_sum_v: float, string_a: float) -> float:
    """Dropping resistor needed: (line - sum) / I, 0 when the string sums to the line or more."""
    return max(line_v - string_sum_v, 0.0) / string_a


def design_line_v(string_sum_v: float, dropper_ohm: float, string_a: float) -> float:
    """Line voltage at which the string runs at rated current: sum + I x R_drop."""
    return string_sum_v + dropper_ohm * string_a


def string_current_a(line_v: float, hot_ohm_total: float, dropper_ohm: float) -> float:
    """Current the line drives: I = V / (R_hot + R_drop), hot resistance constant (Ohm's law)."""
    return line_v / (hot_ohm_total + dropper_ohm)


def hot_ohm(heater_v: float, heater_a: float) -> float:
    """Hot heater resistance at rating: R = V / I (Ohm's law)."""
    return heater_v / heater_a


def cold_ohm(heater_v: float, heater_a: float, ratio: float = COLD_TO_HOT) -> float:
    """Cold heater resistance: about 1/10 of the hot V/I for tungsten heaters (trade)."""
    return ratio * heater_v / heater_a


def series_heater_v(line_v: float, rated_v: float, own_factor: float, string_sum_v: float,
                    others_factor: float, dropper_v: float) -> float:
    """Voltage across one heater in a series string: divider of hot resistances.

    V = line x R_i / (R_i + R_others + R_drop), with R_i = factor x rated V / I, so in
    volts-at-rated-current terms V = line x f_i V_i / (f_i V_i + f_o (sum - V_i) + V_drop).
    With every factor 1 this is the rated voltage scaled by line / (sum + V_drop).
    """
    own = own_factor * rated_v
    return line_v * own / (own + others_factor * (string_sum_v - rated_v) + dropper_v)


def winding_total_a(heater_as: Iterable[float]) -> float:
    """Parallel heaters on one winding: the winding carries the sum of the heater currents."""
    return float(sum(heater_as))


def winding_v(line_v: float, nominal_line_v: float, rated_winding_v: float) -> float:
    """A transformer winding follows the line: V = V_rated x line / line_nominal."""
    return rated_winding_v * line_v / nominal_line_v
