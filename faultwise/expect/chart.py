"""The voltage chart: every electrode of every device of the set, by device and pin.

``chart_rows(profile, expectations)`` turns the computed expectations into rows a
technician reads at the socket: tubes by pin number from the tube table's base diagrams
(heater, plate, screen, cathode, control or oscillator grid, the rectifier's cathode),
transistors by lead (B, E, C) and the push-pull pair's own readings. ``render_chart`` is the
80-column text table; :mod:`faultwise.report.chart_html` the printable page. Pure: no UI imports.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import TYPE_CHECKING

from faultwise.expect.context import basis_num as _n

if TYPE_CHECKING:
    from faultwise.expect.context import Expected
    from faultwise.profile.model import Profile
    from faultwise.profile.tubes import TubeTable


@dataclass(frozen=True)
class ChartRow:
    """One reading at one pin: device (role and type), pin label, electrode, expectation."""

    role: str
    device: str
    pin: str
    electrode: str
    name: str
    stage: str
    nominal: float
    low: float
    high: float
    unit: str
    typical: bool


# (expectation suffix, pin-map electrode, electrode label) per tube stage reading
_TUBE_READINGS = (("plate_v", "plate", "plate"), ("screen_v", "screen", "screen"),
                  ("cathode_v", "cathode", "cathode"), ("grid_v", "grid", "grid"),
                  ("cathode_ma", "cathode", "cathode current"))
_TRANSISTOR_READINGS = (("vc_v", "C", "collector"), ("vb_v", "B", "base"),
                        ("ve_v", "E", "emitter"), ("ic_ma", "C", "collector current"))
_PAIR_READINGS = (("idle_ma", "-", "pair idle current"), ("bases_v", "B-B", "base to base"),
                  ("midpoint_v", "E-E", "midpoint"))


def _pins(pins: tuple) -> str:
    return "-".join(str(p) for p in pins) if pins else "?"


def _row(role: str, device: str, pin: str, electrode: str, e: Expected) -> ChartRow:
    return ChartRow(role, device, pin, electrode, e.name, e.stage, e.nominal, e.low, e.high,
                    e.unit, e.typical)


def chart_rows(profile: Profile, expectations: Mapping[str, Expected],
               tube_table: TubeTable | None = None) -> list[ChartRow]:
    """The chart of this set, device by device in lineup order."""
    if profile.line_powered:
        return _tube_rows(profile, expectations, tube_table)
    return _transistor_rows(profile, expectations)


def _tube_rows(profile: Profile, expectations: Mapping[str, Expected],
               tube_table: TubeTable | None) -> list[ChartRow]:
    from faultwise.profile.tubes import load_tube_table, lookup

    table = tube_table if tube_table is not None else load_tube_table()
    rows: list[ChartRow] = []
    for tube in profile.tubes:
        data = lookup(tube.type, table)
        pin = (lambda el, data=data: _pins(data.pin(el))) if data is not None else (lambda el: "?")
        device = f"{tube.role} {tube.type}"
        heater = expectations.get(f"heater.{tube.role}.v")
        if heater is not None:
            rows.append(_row(tube.role, device, pin("heater"), "heater (AC)", heater))
        if tube.role == "rectifier":
            out = expectations.get("supply.rectifier_out_v")
            if out is not None:
                rows.append(_row(tube.role, device, pin("cathode"), "cathode (B+)", out))
            continue
        for suffix, electrode, label in _TUBE_READINGS:
            e = expectations.get(f"stage.{tube.role}.{suffix}")
            if e is None:
                continue
            if electrode == "grid" and data is not None and data.pin("osc_grid") and \
                    tube.role in ("converter", "mixer", "oscillator"):
                electrode, label = "osc_grid", "oscillator grid"
            rows.append(_row(tube.role, device, pin(electrode), label, e))
    return rows


def _transistor_rows(profile: Profile, expectations: Mapping[str, Expected]) -> list[ChartRow]:
    rows: list[ChartRow] = []
    for tr in profile.transistors:
        device = f"{tr.role} {tr.material[:2].upper()} {tr.polarity.upper()}"
        for suffix, lead, label in _TRANSISTOR_READINGS:
            e = expectations.get(f"bias.{tr.role}.{suffix}")
            if e is not None:
                rows.append(_row(tr.role, device, lead, label, e))
        if tr.role == "output":
            for suffix, lead, label in _PAIR_READINGS:
                if suffix == "bases_v" and profile.output_stage == "push-pull-transformer":
                    lead, label = "B", "bases to rail"
                e = expectations.get(f"bias.output.{suffix}")
                if e is not None:
                    rows.append(_row("output", "output pair", lead, label, e))
    battery = expectations.get("supply.battery_v")
    if battery is not None:
        rows.insert(0, _row("supply", "battery", "+/-", "under load", battery))
    return rows


def rows_for_stage(rows: list[ChartRow], stage: str) -> list[ChartRow]:
    """The chart rows of one stage (the readings sheet of the stage under test)."""
    return [r for r in rows if r.stage == stage]


def negative_to_rail(r: ChartRow) -> bool:
    """A tube's control or oscillator grid reads negative to B- or chassis (grid-leak,
    contact or AVC bias; common practice, no source); the chart computes magnitudes."""
    return r.name.startswith("stage.") and r.name.endswith(".grid_v")


def _shown(r: ChartRow) -> tuple[str, str]:
    """Expected value and band as the meter shows them, with the sign of a negative grid."""
    if not negative_to_rail(r):
        return f"{_n(r.nominal)} {r.unit}", f"{_n(r.low)}-{_n(r.high)}"
    neg = (lambda x: f"-{_n(x)}" if x else "0")
    return f"{neg(r.nominal)} {r.unit}", f"{neg(r.high)} to {neg(r.low)}"


def render_chart(profile: Profile, rows: list[ChartRow], width: int = 80) -> list[str]:
    """Plain-text chart, at most ``width`` columns: device, pin, electrode, nominal, band."""
    lines = [f"Voltage chart: {profile.label}"[:width],
             ("DC to B- (series-string) or chassis, warm, off station; grids read negative"
              if profile.line_powered else
              "DC to the common rail (magnitudes), no signal, volume down")[:width],
             "* rests on a typical value: confirm it on the set where you can"[:width], ""]
    head = f"{'device':<18}{'pin':>5}  {'electrode':<18}{'expected':>10}  {'band':<17}"
    lines += [head[:width], "-" * min(len(head), width)]
    last = None
    for r in rows:
        device = r.device if r.device != last else ""
        last = r.device
        expected, band = _shown(r)
        mark = "*" if r.typical else ""
        line = (f"{device[:18]:<18}{r.pin[:5]:>5}  {r.electrode[:18]:<18}{expected[:10]:>10}  "
                f"{band[:16]:<16} {mark}")
        lines.append(line[:width].rstrip())
    return lines


def stage_chart_lines(rows: list[ChartRow], stage: str | None) -> list[str]:
    """One line per device of the stage under test: "if 12BA6: pin 5 plate 111 V, ..."."""
    out: dict[str, list[str]] = {}
    for r in rows_for_stage(rows, stage) if stage else []:
        pin = f"pin {r.pin} " if r.pin[:1].isdigit() else f"{r.pin} "
        out.setdefault(r.device, []).append(
            f"{pin}{r.electrode} {_n(r.nominal)} {r.unit}{'*' if r.typical else ''}")
    return [f"{device}: " + ", ".join(items) for device, items in out.items()]
