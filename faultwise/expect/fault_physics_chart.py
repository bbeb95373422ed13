"""The broken set's voltage chart: ``stage.<role>.*`` and ``bias.output.*`` through the chart's engine.

The injected sweep (:mod:`faultwise.expect.fault_physics`) answers a chart check with what the
chart's own model gives for the broken part, so a band, a route and a fault model are judged
by one calculation:

* Tube stages: :func:`faultwise.expect.stages.faulty_stage_readings` with the model's part
  changes (``tube.<role>.screen_ohm/plate_ohm/cathode_ohm``: open = infinite, short = 0, xK
  = K times the stage's resistor; ``tube.<role>.grid: leaky`` = the grid
  :data:`~faultwise.expect.fault_models.LEAKY_GRID_V` positive; ``tube.<role>.emission``),
  an open or shorted output primary as the output stage's plate load, a cold heater as no
  emission, and the supply as the broken supply's filter points over the healthy ones
  (``scale`` for the filtered point that feeds every screen, ``first_scale`` for a plate fed
  from the first capacitor): a low B+ lowers every stage. A stopped oscillator leaves the
  converter grid without its grid-leak bias.
* Transistor push-pull pair: :func:`faultwise.expect.output_pair.faulty_pair_readings` at the
  broken battery's voltage with ``output.bias`` (open: the bias feed, ``top_ohm`` infinite
  for a transformer-coupled pair, the driver's ``load_ohm`` for a complementary one; short:
  ``bottom_ohm`` 0, or the bias diodes at 0 V) and the output transistor's own changes
  (divider resistors, emitter resistor; an open transistor passes no collector current, as
  an open emitter resistor).

The engine's context (the healthy expectations and the supply simulation) is built once per
profile and kept.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import TYPE_CHECKING

from faultwise.expect.fault_models import LEAKY_GRID_V, OPEN_OHM, SHORT_OHM
from faultwise.expect.fault_state import stage_point

if TYPE_CHECKING:
    from faultwise.expect.context import Context, Expected
    from faultwise.expect.fault_models import Change
    from faultwise.expect.fault_state import State
    from faultwise.profile.model import Profile
    from faultwise.profile.tubes import TubeTable

_CONTEXTS: dict[int, tuple] = {}


def chart_context(profile: Profile, healthy: Mapping[str, Expected], table: TubeTable | None) -> Context:
    """The chart engine's context for this profile (kept: the supply simulation is its cost)."""
    from faultwise.expect.context import Context

    hit = _CONTEXTS.get(id(profile))
    if hit is not None and hit[0] is profile:
        return hit[1]
    ctx = Context(profile, table)
    ctx.out = dict(healthy)
    if len(_CONTEXTS) > 64:
        _CONTEXTS.clear()
    _CONTEXTS[id(profile)] = (profile, ctx)
    return ctx


def _part(change: Change, values: dict[str, float], factors: dict[str, float], name: str) -> None:
    if change.kind == "open":
        values[name] = math.inf
    elif change.kind == "short":
        values[name] = 0.0
    elif change.kind == "leaky":
        factors["grid_v"] = LEAKY_GRID_V
    else:
        factors[name] = factors.get(name, 1.0) * change.factor


def tube_stage_readings(profile: Profile, st: State, healthy: Mapping[str, Expected],
                        table: TubeTable | None, *, first_scale: float, scale: float,
                        cold: set[str]) -> dict[str, float]:
    """Every tube stage's chart readings on the broken set (names the healthy set has)."""
    from faultwise.expect.stages import NO_STAGE_ROLES, faulty_stage_readings

    ctx = chart_context(profile, healthy, table)
    out: dict[str, float] = {}
    for tube in profile.tubes:
        role = tube.role
        if role in NO_STAGE_ROLES or not any(n.startswith(f"stage.{role}.") for n in healthy):
            continue
        values: dict = {"scale": scale, "first_scale": first_scale}
        factors: dict = {}
        values["emission"] = 0.0 if (role in cold or st.line_open) else st.emission.get(role, 1.0)
        for part, c in st.stage.get(role, {}).items():
            _part(c, values, factors, "grid_v" if part == "grid" else part)
        if role in ("output",) and st.primary:
            if st.primary == "open":
                values["plate_ohm"] = math.inf
            else:
                factors["plate_ohm"] = factors.get("plate_ohm", 1.0) * 0.05
        got = faulty_stage_readings(ctx, role, factors=factors, **values)
        grid = f"stage.{role}.grid_v"
        if role in ("converter", "mixer", "oscillator") and grid in got:
            got[grid] *= min(max(st.osc, 0.0), 1.0)
        out.update({n: v for n, v in got.items() if n in healthy})
    return out


def grid_current_factor(profile: Profile, st: State, healthy: Mapping[str, Expected],
                        table: TubeTable | None, role: str) -> float:
    """A positive grid's cathode current over the healthy one (the chart's stage model), for the
    older names (``output.cathode_v``) that scale with the stage's current; 1 without one."""
    from faultwise.expect.stages import faulty_stage_readings

    c = st.stage.get(role, {}).get("grid")
    name = f"stage.{role}.cathode_ma"
    if c is None or name not in healthy or not healthy[name].nominal:
        return 1.0
    got = faulty_stage_readings(chart_context(profile, healthy, table), role,
                                factors={"grid_v": LEAKY_GRID_V})
    return got.get(name, healthy[name].nominal) / healthy[name].nominal


def pair_readings(profile: Profile, st: State, healthy: Mapping[str, Expected], table: TubeTable | None,
                  vcc: float) -> tuple[dict[str, float], float]:
    """(bias.output.* readings, faulty idle current) of a push-pull pair on the broken set."""
    from faultwise.expect.output_pair import faulty_pair_readings

    ctx = chart_context(profile, healthy, table)
    comp = profile.output_stage == "complementary"
    tr = profile.transistor("output")
    ch = st.transistors.get("output", {})
    values: dict = {"vcc_v": vcc}
    b = tr.bias

    def res(name: str, base: float) -> None:
        c = ch.get(name)
        if c is None:
            return
        if c.kind == "open":
            values[name] = math.inf if name == "top_ohm" else 1e12
        elif c.kind == "short":
            values[name] = 0.0 if name != "emitter_ohm" else SHORT_OHM * 1e-3
        else:
            values[name] = base * c.factor

    if not comp:
        res("top_ohm", b.top_ohm)
        res("bottom_ohm", b.bottom_ohm)
        if "beta" in ch:
            values["beta"] = tr.beta * ch["beta"].factor
    res("emitter_ohm", b.emitter_ohm)
    if "emitter_ohm" in values and math.isinf(values["emitter_ohm"]):
        values["emitter_ohm"] = OPEN_OHM
    me = ch.get("self")
    coll = ch.get("collector_ohm")
    if (me is not None and me.kind == "open") or (coll is not None and coll.kind == "open"):
        values["emitter_ohm"] = OPEN_OHM      # no collector current (the pair, or its primary)
    if st.pair_bias == "open":
        values["load_ohm" if comp else "top_ohm"] = math.inf
    elif st.pair_bias == "short":
        if comp:
            values["diode_1ma_v"] = 0.0
        else:
            values["bottom_ohm"] = 0.0
    out = faulty_pair_readings(ctx, **values)
    if not comp and "bias.output.vc_v" in healthy:
        out["bias.output.vc_v"] = vcc
    if me is not None and me.kind == "short":
        # collector to emitter: the supply across the emitter resistor and half the primary
        pt = stage_point(vcc, b.top_ohm, b.bottom_ohm, b.emitter_ohm, b.collector_ohm, tr.beta,
                         0.0, state="short")
        out.update({"bias.output.ic_ma": pt.ic_ma, "bias.output.ve_v": pt.ve_v})
        out["bias.output.idle_ma"] = out["bias.output.idle_ma"] / 2.0 + pt.ic_ma
        if comp:
            out["bias.output.midpoint_v"] = out["bias.output.vc_v"] = 0.0
    idle = out.get("bias.output.idle_ma", 0.0)
    return {n: v for n, v in out.items() if n in healthy}, idle
