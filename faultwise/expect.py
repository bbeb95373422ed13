"""Expected readings: profile -> {name: Expected} (DESIGN section 5; the names are a contract).

Owned by the calculators' author; the model below is shared by every layer.
"""

from __future__ import annotations

from dataclasses import dataclass


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


def expect(profile) -> dict[str, Expected]:  # pragma: no cover - replaced by the calculators
    raise NotImplementedError


def expectation_names(family: str) -> frozenset[str]:  # pragma: no cover
    raise NotImplementedError
