"""Voltage chart of a tube set: plate, screen, cathode, grid and cathode current of every tube.

Names ``stage.<role>.plate_v``, ``.screen_v``, ``.cathode_v``, ``.grid_v``, ``.cathode_ma``
(DESIGN section 5, voltage chart names). Each stage is solved by
:func:`faultwise.calc.tube_stage.solve_stage` from the filter point that feeds it (the supply
simulation's first or second capacitor), its parts (profile ``tubes[]`` keys, else the
family's typical circuit in :mod:`faultwise.expect.stage_typical`) and the tube's handbook typical
operation; the band is the worst case over the supply band, the resistors (+-10 %, a
transformer primary's DC +-50 %), the tube-to-tube spread (+-20 %) and the grid's state.
Voltages are to B- (series-string) or chassis (transformer), as magnitudes.

Fault models: :func:`faulty_stage_readings` gives a stage's chart readings with a part
changed (``screen_ohm=math.inf``, ``emission=0.4`` ...), from the same model as the bands.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import replace
from typing import TYPE_CHECKING

from faultwise.expect.context import Context, basis_num as _n, role_word

if TYPE_CHECKING:
    from faultwise.calc.tolerance import Band, Spread
    from faultwise.calc.tube_stage import StageDC, TypicalOperation
    from faultwise.expect.stage_typical import StageCircuit
    from faultwise.expect.supply import SimulatedSupply
    from faultwise.profile.model import Tube

STAGE_FIELDS = ("plate_v", "screen_v", "cathode_v", "grid_v", "cathode_ma")
NO_STAGE_ROLES = ("rectifier", "tuning-eye", "ballast")
ROLE_STAGE = {"rf": "antenna", "converter": "oscillator", "mixer": "oscillator",
              "oscillator": "oscillator", "if": "if", "if2": "if", "detector": "detector",
              "audio": "audio", "output": "audio", "output2": "audio"}
_WHAT = {"plate_v": ("plate", "V"), "screen_v": ("screen", "V"), "cathode_v": ("cathode", "V"),
         "grid_v": ("control grid", "V"), "cathode_ma": ("cathode current", "mA")}


def role_kind(role: str, op: TypicalOperation) -> str:
    """converter | if | triode-audio | pentode-audio | output, from the role and the section."""
    if role in ("converter", "mixer", "oscillator"):
        return "converter"
    if role in ("rf", "if", "if2"):
        return "if"
    if role in ("output", "output2"):
        return "output"
    return "triode-audio" if op.is_triode else "pentode-audio"


def stage_operation(ctx: Context, tube: Tube) -> tuple[TypicalOperation | None, bool]:
    """(TypicalOperation, typical?) for a tube, or (None, False) when it has no amplifier section."""
    from faultwise.calc.tube_stage import TypicalOperation
    from faultwise.expect.stage_typical import GENERIC_BY_KIND, OPERATION, OUTPUT_SLOPE

    data = ctx.tube_type(tube.type)
    if tube.role in ("output", "output2"):
        o = getattr(data, "operation", None)
        if o is None:
            return None, False
        gm, mu = OUTPUT_SLOPE.get(data.name, (2.0 * o.plate_ma / abs(o.grid_v), 8.0))
        return TypicalOperation(o.plate_v, o.screen_v, o.grid_v, o.plate_ma, o.screen_ma, mu,
                                gm, o.source), data.name not in OUTPUT_SLOPE
    if data is not None and data.name in OPERATION:
        return OPERATION[data.name], False
    kind = getattr(data, "kind", None)
    if kind in GENERIC_BY_KIND:
        return GENERIC_BY_KIND[kind], True
    return None, False


def stage_circuit(ctx: Context, tube: Tube, kind: str) -> tuple[StageCircuit, list[str]]:
    """(StageCircuit, typical keys used): the profile's parts over the family's typical ones."""
    from faultwise.expect.stage_typical import typical_circuit

    base = typical_circuit(ctx.p.family, kind)
    given = {"plate_ohm": tube.plate_ohm, "screen_ohm": tube.screen_ohm,
             "cathode_ohm": tube.cathode_ohm, "grid_ohm": tube.grid_ohm, "supply": tube.supply}
    if kind == "output":
        primary = ctx.out.get("output.primary_ohm")
        if given["plate_ohm"] is None and primary is not None:
            given["plate_ohm"] = primary.nominal
    used = [k for k, v in given.items() if v is None]
    if kind == "output" and "plate_ohm" in used:
        o = getattr(ctx.tube_type(tube.type), "operation", None)
        given["plate_ohm"] = 0.1 * (o.load_ohm if o is not None else 2500.0)
        used.remove("plate_ohm")
        used.append("plate_ohm")
    circuit = replace(base, **{k: v for k, v in given.items() if v is not None})
    return circuit, used


def _spreads(ctx: Context, circuit: StageCircuit, kind: str, nodes: dict[str, Band]
             ) -> tuple[dict[str, Spread], Band, Band, str | None]:
    from faultwise.calc.tolerance import TUBE_CURRENT_TOL, Spread, fixed, relative, resistor_ohm
    from faultwise.expect.stage_typical import GRID_STATE

    plate_node = nodes[circuit.supply]
    screen_node = nodes["second"]          # screens are fed from the filtered point
    scale = Spread(1.0, min(plate_node.low / plate_node.nominal, screen_node.low / screen_node.nominal),
                   max(plate_node.high / plate_node.nominal, screen_node.high / screen_node.nominal),
                   "the supply simulation's band at the feed point")
    load = (relative(circuit.plate_ohm, 0.5, rule="transformer primary DC +-50 % (trade)")
            if circuit.plate_ohm < 1000 else resistor_ohm(circuit.plate_ohm))
    state = {"converter": None, "if": "avc", "triode-audio": "contact"}.get(kind, "cathode")
    if state in ("avc", "contact"):
        nom, lo, hi, _ = GRID_STATE[state]
        grid = Spread(-nom, -hi, -lo, GRID_STATE[state][3])
    else:
        grid = fixed(0.0)
    return {"scale": scale, "plate_ohm": load,
            "screen_ohm": resistor_ohm(circuit.screen_ohm) if circuit.screen_ohm else fixed(0.0),
            "cathode_ohm": resistor_ohm(circuit.cathode_ohm) if circuit.cathode_ohm else fixed(0.0),
            "emission": relative(1.0, TUBE_CURRENT_TOL, rule="tube current +-20 % tube to tube (trade)"),
            "grid_v": grid}, plate_node, screen_node, state


def add_tube_stages(ctx: Context) -> None:
    """Every amplifying tube's electrodes (needs the supply simulation)."""
    from faultwise.expect.supply import simulate_supply

    sim = simulate_supply(ctx)
    if sim is None:
        return
    nodes = {"first": sim.bands["rectifier_out_v"], "second": sim.bands["filtered_v"]}
    for tube in ctx.p.tubes:
        if tube.role in NO_STAGE_ROLES:
            continue
        op, op_typical = stage_operation(ctx, tube)
        if op is None:
            continue
        _add_stage(ctx, tube, op, op_typical, nodes, sim)


def stage_model(ctx: Context, tube: Tube, op: TypicalOperation, nodes: dict[str, Band]
                ) -> tuple[Callable[..., StageDC], dict[str, Spread], StageCircuit, list[str],
                           str | None, Band, Band]:
    """(function of the spreads -> StageDC, spreads, circuit, typical keys, grid state, plate
    node, screen node) for one tube: what the chart's band and a fault model both evaluate."""
    from faultwise.calc.tube_stage import solve_stage
    from faultwise.expect.stage_typical import OSC_GRID_MA

    kind = role_kind(tube.role, op)
    circuit, used = stage_circuit(ctx, tube, kind)
    sp, pnode, snode, state = _spreads(ctx, circuit, kind, nodes)
    p_nom, s_nom = pnode.nominal, snode.nominal
    rg1 = circuit.grid_ohm

    def stage(scale: float, plate_ohm: float, screen_ohm: float, cathode_ohm: float,
              emission: float, grid_v: float, first_scale: float | None = None) -> StageDC:
        # first_scale: the first filter point moved on its own (a fault model; the bands
        # move both points together through ``scale``)
        p_scale = first_scale if first_scale is not None and circuit.supply == "first" else scale
        dc = solve_stage(op, p_nom * p_scale, plate_ohm, cathode_ohm, grid_v, s_nom * scale,
                         screen_ohm, emission)
        if kind == "converter":   # oscillator grid: grid-leak bias, Ig1 scales with the current
            dc = replace(dc, grid_v=-OSC_GRID_MA * dc.cathode_ma / op.cathode_ma * rg1 / 1000.0)
        return dc

    return stage, sp, circuit, used, state, pnode, snode


def faulty_stage_readings(ctx: Context, role: str, *, factors: Mapping[str, float] | None = None,
                          **changes: float) -> dict[str, float]:
    """Chart readings of one tube stage with parts changed (a fault model), as magnitudes.

    ``changes`` override the nominal inputs: ``screen_ohm=math.inf`` (screen resistor open),
    ``plate_ohm=math.inf``, ``cathode_ohm=math.inf``, ``emission=0.4`` (worn tube),
    ``grid_v=+2.0`` (a leaky coupling capacitor), ``scale=0.8`` (supply 20 % low),
    ``first_scale=1.1`` (the first filter point alone, for a stage fed from it).
    ``factors`` multiply nominal inputs instead (``{"cathode_ohm": 3}``: the resistor drifted
    to three times its value; ``{"grid_v": ...}`` is added, not multiplied).
    """
    from faultwise.expect.supply import simulate_supply

    tube = ctx.p.tube(role)
    if tube is None:
        return {}
    op, _ = stage_operation(ctx, tube)
    sim = simulate_supply(ctx)
    if op is None or sim is None:
        return {}
    nodes = {"first": sim.bands["rectifier_out_v"], "second": sim.bands["filtered_v"]}
    stage, sp, *_ = stage_model(ctx, tube, op, nodes)
    args = {k: s.nominal for k, s in sp.items()}
    for k, f in (factors or {}).items():
        args[k] = args[k] + f if k == "grid_v" else args[k] * f
    dc = stage(**(args | changes))
    fields = [f for f in STAGE_FIELDS if not (f == "screen_v" and op.is_triode)]
    return {f"stage.{role}.{f}": abs(getattr(dc, f)) for f in fields}


def _add_stage(ctx: Context, tube: Tube, op: TypicalOperation, op_typical: bool,
               nodes: dict[str, Band], sim: SimulatedSupply) -> None:
    from faultwise.calc.tolerance import worst_case_fields
    from faultwise.expect.stage_typical import GRID_STATE, OSC_GRID_MA

    stage, sp, circuit, used, state, pnode, snode = stage_model(ctx, tube, op, nodes)
    kind = role_kind(tube.role, op)
    p_nom, s_nom = pnode.nominal, snode.nominal
    rg1 = circuit.grid_ohm

    bands = worst_case_fields(stage, sp)
    nom = stage(**{k: s.nominal for k, s in sp.items()})
    typical = op_typical or bool(used) or ctx.typical(*sim.keys) or sim.diode_typical
    parts = (f"{'first' if circuit.supply == 'first' else 'second'} filter point "
             f"{_n(p_nom)} V, plate load {_n(circuit.plate_ohm)} ohm"
             + ("" if op.is_triode else
                (f", screen {'fed directly' if not circuit.screen_ohm else f'through {_n(circuit.screen_ohm)} ohm'}"
                 f" from {_n(s_nom)} V"))
             + f", cathode {_n(circuit.cathode_ohm)} ohm")
    law = (f"Ik = {_n(op.cathode_ma)} mA x (Vscreen/{_n(op.screen_v)} V)^1.5 (self-biased "
           "converter, all voltages scale)" if op.gm_ma_v is None else
           f"Ik from the 3/2-power law through the typical operation "
           f"{_n(op.plate_v)} V plate" + ("" if op.is_triode else f", {_n(op.screen_v)} V screen")
           + f", {_n(op.grid_v)} V grid, {_n(op.cathode_ma)} mA, gm {_n(op.gm_ma_v)} mA/V, "
           f"mu {_n(op.mu)}")
    head = (f"{tube.type} {kind}: {parts}; {law} (source: {op.source}); solved with the "
            f"cathode and screen drops: Ik = {_n(nom.cathode_ma)} mA")
    band = ("band: worst case over " + ", ".join(s.rule for s in sp.values() if s.rule)
            + (f"; used typical {', '.join(used)} (family circuit)" if used else ""))
    tails = {
        "plate_v": f"Vp = {_n(p_nom)} - {_n(nom.plate_ma)} mA x {_n(circuit.plate_ohm)} ohm = "
                   f"{_n(nom.plate_v)} V",
        "screen_v": f"Vg2 = {_n(s_nom)} - {_n(nom.screen_ma)} mA x {_n(circuit.screen_ohm)} ohm = "
                    f"{_n(nom.screen_v)} V",
        "cathode_v": f"Vk = {_n(nom.cathode_ma)} mA x {_n(circuit.cathode_ohm)} ohm = "
                     f"{_n(nom.cathode_v)} V",
        "grid_v": (f"oscillator grid: {_n(OSC_GRID_MA)} mA grid current (scaled with Ik) x "
                   f"{_n(rg1)} ohm = {_n(abs(nom.grid_v))} V negative (oscillating)"
                   if kind == "converter" else
                   f"grid: {GRID_STATE[state][3]}" if state in GRID_STATE else ""),
        "cathode_ma": f"Ik = Ip + Ig2 = {_n(nom.plate_ma)} + {_n(nom.screen_ma)} = "
                      f"{_n(nom.cathode_ma)} mA (measure Vk / Rk, or a meter in the cathode lead)",
    }
    stage_name = ROLE_STAGE.get(tube.role, "audio")
    keys = tuple(f"tubes.{tube.role}.{k}" for k in used)
    for field in STAGE_FIELDS:
        if field == "screen_v" and op.is_triode:
            continue
        b = bands[field]
        if field == "grid_v" and state == "cathode":
            gn, gl, gh, _ = GRID_STATE["cathode"]
            b = type(b)(gn, gl, gh)
        lo, hi, n = sorted((abs(b.low), abs(b.high))) + [abs(b.nominal)]
        what, unit = _WHAT[field]
        zero_ok = field in ("grid_v",) or (field == "cathode_v" and not circuit.cathode_ohm)
        role = role_word(tube.role)
        ctx.add(f"stage.{tube.role}.{field}", f"{role} tube {what} ({tube.type})",
                stage_name, n, lo, hi, unit, f"{head}; {tails[field]}; {band}", keys=keys,
                absent=0.0 if zero_ok and n < 1e-9 else None,
                typical=typical or ctx.typical(*keys))
