"""What the expectation builders share: the Expected record, the build context and the basis
number format."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from faultwise.calc.tolerance import Spread
    from faultwise.expect.supply import SimulatedSupply
    from faultwise.profile.model import Profile
    from faultwise.profile.tubes import TubeTable, TubeType


@dataclass(frozen=True)
class Expected:
    """What one test point should read on this set.

    ``low``/``high`` bound the normal band (worst case over the stated tolerances);
    ``basis`` is the arithmetic with this set's numbers and says where the band comes from;
    ``typical`` is true when it rests on a value the profile did not give.
    ``absent_below``: a reading at or below this magnitude is classified ``absent``
    (0 for limits such as leakage, where zero is normal).
    """

    name: str
    title: str
    stage: str
    nominal: float
    low: float
    high: float
    unit: str
    basis: str
    typical: bool = False
    absent_below: float = 0.0

    def to_json(self) -> dict:
        return {"nominal": self.nominal, "low": self.low, "high": self.high,
                "unit": self.unit, "basis": self.basis, "typical": self.typical}


_ROLE_WORDS = {"if": "IF", "if2": "Second IF", "rf": "RF"}


def role_word(role: str) -> str:
    """A stage role as a label starts: 'IF', 'Second IF', 'Converter' (not 'If')."""
    return _ROLE_WORDS.get(role, role.capitalize())


def basis_num(x: float) -> str:
    """A number for a basis line: 4 significant digits, plain notation."""
    if x == 0:
        return "0"
    text = f"{x:.4g}"
    if "e" in text:
        text = f"{float(text):f}".rstrip("0").rstrip(".")
    return text


class Context:
    """The profile, the tube table (loaded on first use) and the expectations built so far."""

    def __init__(self, profile: Profile, tube_table: TubeTable | None) -> None:
        self.p = profile
        self._table = tube_table
        self.out: dict[str, Expected] = {}
        self.supply_sim: SimulatedSupply | None = None   # supply.simulate_supply caches it here

    @property
    def table(self) -> TubeTable:
        if self._table is None:
            from faultwise.profile.tubes import load_tube_table

            self._table = load_tube_table()
        return self._table

    def tube_type(self, type_name: str) -> TubeType | None:
        from faultwise.profile.tubes import lookup

        return lookup(type_name, self.table)

    def typical(self, *keys: str) -> bool:
        """True when any key (or a section above or below it) was filled with a typical value."""
        for key in keys:
            for t in self.p.typical:
                if t == key or key.startswith(t + ".") or t.startswith(key + "."):
                    return True
        return False

    def add(self, name: str, title: str, stage: str, nominal: float, low: float, high: float,
            unit: str, basis: str, keys: tuple[str, ...] = (), absent: float | None = None,
            typical: bool | None = None) -> None:
        lo, hi = min(low, high, nominal), max(low, high, nominal)
        self.out[name] = Expected(
            name=name, title=title, stage=stage, nominal=nominal, low=lo, high=hi, unit=unit,
            basis=basis, typical=self.typical(*keys) if typical is None else typical,
            absent_below=0.1 * abs(nominal) if absent is None else absent)

    def line(self) -> Spread:
        from faultwise.calc.mains import line_range_v

        return line_range_v(self.p.mains_v)


