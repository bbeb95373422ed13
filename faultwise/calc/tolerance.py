"""Tolerance rules and the worst-case corner evaluator.

A band is never a flat guess: each input that has a stated tolerance becomes a
:class:`Spread`, and :func:`worst_case` evaluates the formula at every corner of the
tolerance box (``itertools.product`` over each input's low and high) and keeps the
smallest and largest result. The rules below name where each tolerance comes from.
"""

from __future__ import annotations

import itertools
from collections.abc import Callable, Mapping
from dataclasses import dataclass, fields, is_dataclass

RESISTOR_TOL = 0.10
"""Old carbon-composition resistors: +-10 % (silver band, IEC 60062); the trade's assumption."""
ELECTROLYTIC_LOW, ELECTROLYTIC_HIGH = -0.20, 0.50
"""Aluminium electrolytics: -20/+50 % (trade; older parts were often -10/+50 or -20/+80)."""
HEATER_TOL = 0.10
"""Heaters within +-10 % of rating (receiving-tube handbooks)."""
BETA_LOW, BETA_HIGH = 0.5, 2.0
"""Current gain spread of one transistor type: half to twice the stated beta (trade)."""
VBE_V = {"silicon": (0.6, 0.65, 0.7), "germanium": (0.2, 0.25, 0.3)}
"""Base-emitter drop at normal bias, (low, nominal, high) in volts (textbooks)."""
LOAD_TOL = 0.10
"""Set-to-set spread of a stage's DC current draw: +-10 % (trade)."""
TUBE_CURRENT_TOL = 0.20
"""Tube-to-tube spread of plate/cathode current at the same bias: +-20 % (trade)."""
STRAY_TOL = 0.50
"""Stray and trimmer capacitance is known only roughly: +-50 % (trade)."""
GANG_TOL = 0.05
"""Tuning-gang section maximum capacitance: +-5 % (trade)."""


@dataclass(frozen=True)
class Spread:
    """One toleranced input: nominal value, the low and high ends, and the rule used."""

    nominal: float
    low: float
    high: float
    rule: str = ""

    @property
    def is_fixed(self) -> bool:
        return self.low == self.high == self.nominal


@dataclass(frozen=True)
class Band:
    """A worst-case result: nominal, smallest and largest value over the corners."""

    nominal: float
    low: float
    high: float


def fixed(value: float, rule: str = "") -> Spread:
    """An input taken as exact."""
    return Spread(value, value, value, rule)


def relative(value: float, minus: float, plus: float | None = None, rule: str = "") -> Spread:
    """value x (1 - minus) .. value x (1 + plus); plus defaults to minus."""
    plus = minus if plus is None else plus
    a, b = value * (1.0 - minus), value * (1.0 + plus)
    return Spread(value, min(a, b), max(a, b), rule)


def resistor_ohm(ohm: float, tol: float = RESISTOR_TOL) -> Spread:
    """R x (1 +- tol), default +-10 % (old carbon composition, IEC 60062 silver band; trade)."""
    return relative(ohm, tol, rule=f"resistors +-{tol * 100:.0f} % (carbon composition, trade)")


def electrolytic_uf(uf: float) -> Spread:
    """C x (1 - 0.20) .. C x (1 + 0.50) (aluminium electrolytic, trade)."""
    return relative(uf, -ELECTROLYTIC_LOW, ELECTROLYTIC_HIGH, rule="electrolytics -20/+50 % (trade)")


def heater(value: float) -> Spread:
    """Heater rating +-10 % (receiving-tube handbooks)."""
    return relative(value, HEATER_TOL, rule="heaters +-10 % of rating (tube handbooks)")


def beta(stated: float) -> Spread:
    """0.5 x beta .. 2 x beta (spread of one transistor type, trade)."""
    return Spread(stated, stated * BETA_LOW, stated * BETA_HIGH, rule="beta 0.5x-2x of stated (trade)")


def vbe_v(material: str) -> Spread:
    """Vbe by material: silicon 0.6-0.7 V, germanium 0.2-0.3 V (textbooks)."""
    low, nominal, high = VBE_V[material]
    return Spread(nominal, low, high, rule=f"Vbe {material} {low:g}-{high:g} V (textbooks)")


def load_ma(ma: float) -> Spread:
    """Stage current draw +-10 % (trade)."""
    return relative(ma, LOAD_TOL, rule="load current +-10 % (trade)")


def corners(spreads: Mapping[str, Spread]) -> list[dict[str, float]]:
    """Every corner of the tolerance box: itertools.product over each input's (low, high)."""
    names = list(spreads)
    ends = [(s.nominal,) if s.is_fixed else (s.low, s.high) for s in spreads.values()]
    return [dict(zip(names, combo)) for combo in itertools.product(*ends)]


def worst_case(fn: Callable[..., float], spreads: Mapping[str, Spread]) -> Band:
    """(fn(nominals), min and max of fn over every corner of the tolerance box)."""
    nominal = fn(**{k: s.nominal for k, s in spreads.items()})
    values = [fn(**c) for c in corners(spreads)]
    return Band(nominal, min(values + [nominal]), max(values + [nominal]))


def worst_case_fields(fn: Callable[..., object], spreads: Mapping[str, Spread]) -> dict[str, Band]:
    """worst_case for a function returning a dataclass: one Band per numeric field."""
    nominal = fn(**{k: s.nominal for k, s in spreads.items()})
    if not is_dataclass(nominal):
        raise TypeError("worst_case_fields needs a function returning a dataclass")
    results = [fn(**c) for c in corners(spreads)] + [nominal]
    out: dict[str, Band] = {}
    for f in fields(nominal):
        values = [getattr(r, f.name) for r in results]
        if all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in values):
            out[f.name] = Band(getattr(nominal, f.name), min(values), max(values))
    return out
