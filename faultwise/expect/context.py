"""What the expectation builders share: the build context and the basis number format."""

from __future__ import annotations

from faultwise.expect import Expected


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

    def __init__(self, profile, tube_table) -> None:
        self.p = profile
        self._table = tube_table
        self.out: dict[str, Expected] = {}
        self.supply_sim = None   # expect_supply.simulate_supply caches its result here

    @property
    def table(self):
        if self._table is None:
            from faultwise.tubes import load_tube_table

            self._table = load_tube_table()
        return self._table

    def tube_type(self, type_name: str):
        from faultwise.tubes import lookup

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

    def line(self):
        from faultwise.calc.mains import line_range_v

        return line_range_v(self.p.mains_v)


